/* test_solve_chol.c: packed symmetric products (ef_spmat), the factor facts, and the
 * BLAS thread count around a solve. Reference values are computed here with dense
 * arithmetic on the same small matrices (a property test: two ways to one product).
 */
#include "support.h"

#include "solve_chol.h"

#include <cblas.h>
#include <stdlib.h>
#include <string.h>

#define N 7

/* A symmetric positive definite 7x7 with exact zeros inside its pattern: a path graph
 * (i, i+1) plus (0, 6), diagonally dominant; the entries (1, 2) and (3, 4) of the pattern
 * are set to zero, as a member along a global axis leaves zeros in its block. */
static void build(ef_sparse **A, double **vals, double dense[N][N], ef_ctx *ctx)
{
    ef_index row[N], col[N];
    for (int i = 0; i < N - 1; i++) {
        row[i] = i;
        col[i] = i + 1;
    }
    row[N - 1] = 0;
    col[N - 1] = N - 1;
    assert_int_equal(ef_sparse_create_pattern(N, N, row, col, A, ctx), EF_OK);
    ef_index nnz = ef_sparse_nnz(*A);
    assert_int_equal(nnz, N + N);                     /* diagonal + 7 pairs */
    *vals = calloc((size_t)nnz, sizeof **vals);
    assert_non_null(*vals);
    memset(dense, 0, sizeof(double) * N * N);
    const ef_index *Ap = ef_sparse_colptr(*A), *Ai = ef_sparse_rowind(*A);
    for (ef_index j = 0; j < N; j++)
        for (ef_index p = Ap[j]; p < Ap[j + 1]; p++) {
            ef_index i = Ai[p];
            double v = i == j ? 10.0 + (double)j : -1.0 - 0.125 * (double)(i + j);
            if ((i == 1 && j == 2) || (i == 3 && j == 4)) v = 0.0;
            (*vals)[p] = v;
            dense[i][j] = dense[j][i] = v;
        }
}

static void test_solve_chol_packed_product_equals_dense_product(void **state)
{
    (void)state;
    ef_ctx *ctx = NULL;
    assert_int_equal(ef_ctx_create(&ctx), EF_OK);
    ef_sparse *A = NULL;
    double *v = NULL, D[N][N];
    build(&A, &v, D, ctx);
    ef_spmat *P = NULL;
    assert_int_equal(ef_spmat_create(A, v, &P), EF_OK);
    assert_int_equal(ef_spmat_nnz(P), N + N - 2);     /* the two exact zeros dropped */
    double x[N], y[N], y2[N];
    for (int i = 0; i < N; i++) x[i] = 1.0 + 0.5 * i * (i % 2 ? -1.0 : 1.0);
    ef_spmat_symv(P, x, y);
    ef_sparse_symv(A, v, x, y2);
    for (int i = 0; i < N; i++) {
        double s = 0.0;
        for (int j = 0; j < N; j++) s += D[i][j] * x[j];
        assert_rel_close(y[i], s, 1e-14);
        assert_rel_close(y2[i], s, 1e-14);
    }
    ef_spmat_free(&P);
    assert_null(P);
    ef_spmat_free(&P);                                /* NULL-safe */
    ef_sparse_free(&A, ctx);
    free(v);
    ef_ctx_free(&ctx);
}

/* An all-zero value array packs to the (zero) diagonal only; the product is zero. */
static void test_solve_chol_packed_zero_matrix(void **state)
{
    (void)state;
    ef_ctx *ctx = NULL;
    assert_int_equal(ef_ctx_create(&ctx), EF_OK);
    ef_sparse *A = NULL;
    double *v = NULL, D[N][N];
    build(&A, &v, D, ctx);
    memset(v, 0, (size_t)ef_sparse_nnz(A) * sizeof *v);
    ef_spmat *P = NULL;
    assert_int_equal(ef_spmat_create(A, v, &P), EF_OK);
    assert_int_equal(ef_spmat_nnz(P), N);
    double x[N], y[N];
    for (int i = 0; i < N; i++) x[i] = 1.0;
    ef_spmat_symv(P, x, y);
    for (int i = 0; i < N; i++) assert_true(y[i] == 0.0);
    ef_spmat_free(&P);
    ef_sparse_free(&A, ctx);
    free(v);
    ef_ctx_free(&ctx);
}

/* Solve A x = b; the residual is at rounding level, the factor facts are sane, and the
 * caller's BLAS thread count is the same after the solve as before it. */
static void test_solve_chol_solve_restores_blas_threads(void **state)
{
    (void)state;
    ef_ctx *ctx = NULL;
    assert_int_equal(ef_ctx_create(&ctx), EF_OK);
    ef_sparse *A = NULL;
    double *v = NULL, D[N][N];
    build(&A, &v, D, ctx);
    ef_factor *L = NULL;
    assert_int_equal(ef_chol_analyze(A, &L, ctx), EF_OK);
    const char *ord = ef_chol_ordering(L);
    assert_true(!strcmp(ord, "AMD") || !strcmp(ord, "METIS") || !strcmp(ord, "NESDIS") ||
                !strcmp(ord, "natural"));
    assert_true(ef_chol_factor_nnz(L) >= N && ef_chol_factor_nnz(L) <= N * (N + 1) / 2);
    assert_int_equal(ef_chol_factorize(A, v, L, NULL, ctx), EF_OK);
    double b[N], x[N];
    for (int i = 0; i < N; i++) b[i] = (double)(i + 1);
    int before = openblas_get_num_threads();
    assert_int_equal(ef_chol_solve(L, 1, b, x, ctx), EF_OK);
    assert_int_equal(openblas_get_num_threads(), before);
    for (int i = 0; i < N; i++) {
        double s = 0.0;
        for (int j = 0; j < N; j++) s += D[i][j] * x[j];
        assert_abs_close(s, b[i], 1e-13 * 20.0);
    }
    ef_factor_free(&L, ctx);
    ef_sparse_free(&A, ctx);
    free(v);
    ef_ctx_free(&ctx);
}

/* A chain of 40 nodes with 6 equations each, full 6x6 blocks on and next to the block
 * diagonal (what a line of frame elements assembles), the nodes numbered from the middle
 * outwards so that the natural order would fill. The equations of a node have identical
 * rows, so they are ordered as one node; a path graph has an elimination order without
 * fill (eliminate an end node, repeat; minimum degree finds it: common knowledge, e.g.
 * George & Liu, Computer Solution of Large Sparse Positive Definite Systems, 1981, from
 * memory), so L holds exactly the lower blocks: 40 x 21 + 39 x 36 entries. The solve of
 * this diagonally dominant system is checked against the matrix. */
#define NODES 40
static void test_solve_chol_node_chain_is_ordered_without_fill(void **state)
{
    (void)state;
    ef_ctx *ctx = NULL;
    assert_int_equal(ef_ctx_create(&ctx), EF_OK);
    ef_index pos[NODES], n = 6 * NODES;
    for (int k = 0; k < NODES; k++)            /* chain position k -> node number */
        pos[k] = k % 2 ? NODES / 2 + (k + 1) / 2 - 1 : NODES / 2 - 1 - k / 2;
    ef_index np = 0, cap = NODES * 6 * 12;
    ef_index *row = malloc((size_t)cap * sizeof *row), *col = malloc((size_t)cap * sizeof *col);
    assert_true(row && col);
    for (int k = 0; k < NODES; k++)
        for (int a = 0; a < 6; a++)
            for (int b = 0; b < 6; b++) {
                ef_index i = 6 * pos[k] + a, j = 6 * pos[k] + b;
                if (i < j) { row[np] = i; col[np] = j; np++; }
                if (k + 1 < NODES) {
                    ef_index j2 = 6 * pos[k + 1] + b;
                    row[np] = i < j2 ? i : j2;
                    col[np] = i < j2 ? j2 : i;
                    np++;
                }
            }
    ef_sparse *A = NULL;
    assert_int_equal(ef_sparse_create_pattern(n, np, row, col, &A, ctx), EF_OK);
    assert_int_equal(ef_sparse_nnz(A), NODES * 21 + (NODES - 1) * 36);
    ef_factor *L = NULL;
    assert_int_equal(ef_chol_analyze(A, &L, ctx), EF_OK);
    assert_true(ef_chol_factor_nnz(L) == (double)(NODES * 21 + (NODES - 1) * 36));
    ef_index nnz = ef_sparse_nnz(A);
    double *v = malloc((size_t)nnz * sizeof *v), *b = malloc((size_t)n * sizeof *b);
    double *x = malloc((size_t)n * sizeof *x), *r = malloc((size_t)n * sizeof *r);
    assert_true(v && b && x && r);
    const ef_index *Ap = ef_sparse_colptr(A), *Ai = ef_sparse_rowind(A);
    for (ef_index j = 0; j < n; j++)
        for (ef_index p = Ap[j]; p < Ap[j + 1]; p++)
            v[p] = Ai[p] == j ? 100.0 : -1.0 / (1.0 + (double)((Ai[p] + j) % 5));
    assert_int_equal(ef_chol_factorize(A, v, L, NULL, ctx), EF_OK);
    for (ef_index i = 0; i < n; i++) b[i] = 1.0 + (double)(i % 3);
    assert_int_equal(ef_chol_solve(L, 1, b, x, ctx), EF_OK);
    ef_sparse_symv(A, v, x, r);
    for (ef_index i = 0; i < n; i++) assert_abs_close(r[i], b[i], 1e-12 * 100.0);
    free(v); free(b); free(x); free(r); free(row); free(col);
    ef_factor_free(&L, ctx);
    ef_sparse_free(&A, ctx);
    ef_ctx_free(&ctx);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_solve_chol_packed_product_equals_dense_product),
        cmocka_unit_test(test_solve_chol_packed_zero_matrix),
        cmocka_unit_test(test_solve_chol_solve_restores_blas_threads),
        cmocka_unit_test(test_solve_chol_node_chain_is_ordered_without_fill),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
