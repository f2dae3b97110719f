/* solve_chol.c: symmetric sparse patterns and CHOLMOD factors.
 *
 * Invariants: a pattern is the upper triangle of an n x n symmetric matrix, packed,
 * columns sorted, no duplicates, every diagonal entry present (so a shift by M or K_G
 * never needs a new entry). Value arrays are plain double[nnz] in pattern order; a
 * factorization temporarily points the CHOLMOD header at the caller's values.
 * The factor is supernodal LL' with CHOLMOD's default choice of fill-reducing ordering
 * (AMD; METIS too when AMD's fill is poor, keeping the one with the smaller factor),
 * computed once per pattern on the graph of nodes (node_ordering) and expanded to the
 * equations.
 * BLAS threads: the factorization runs with OpenBLAS's thread count (its dense kernels on
 * large supernodes gain from threads), a solve with one thread: a single right-hand side
 * makes many small dtrsv/dgemv calls, which threads only slow down (a 1e5-DOF building
 * on 2 cores: 20-25 ms a solve with one thread, 26-67 ms with two). The caller's thread
 * count is restored after each solve; like ARPACK, this module is meant for one thread of
 * the program at a time.
 */
#include "solve_chol.h"

#include <cblas.h>                       /* OpenBLAS: openblas_{get,set}_num_threads */
#include <cholmod.h>
#include <math.h>
#include <stdbool.h>
#include <stdlib.h>
#include <stdint.h>
#include <string.h>

struct ef_sparse {
    cholmod_sparse *A;      /* pattern owner; A->x is swapped in for each use */
    double *ones;           /* placeholder values for the header */
};

struct ef_factor {
    cholmod_factor *L;
    cholmod_dense *X, *Y, *E;   /* cholmod_l_solve2 workspace, reused across solves */
    double lnz;                 /* nonzeros of L, from the symbolic analysis */
    int ordering;               /* CHOLMOD_AMD, CHOLMOD_METIS, ... chosen by the analysis */
};

struct ef_spmat {
    ef_index n;
    ef_index *colptr;           /* [n + 1] strictly upper entries of each column */
    ef_index *rowind;
    double *val;
    double *diag;               /* [n] */
};

static void chol_free_common(void *p)
{
    cholmod_common *c = p;
    cholmod_l_finish(c);
    free(c);
}

static cholmod_common *common(ef_ctx *ctx)
{
    if (!ctx->chol) {
        cholmod_common *c = malloc(sizeof *c);
        if (!c) return NULL;
        cholmod_l_start(c);
        c->print = 0;                        /* the library never prints */
        c->error_handler = NULL;
        c->supernodal = CHOLMOD_SUPERNODAL;
        c->final_ll = 1;
        c->quick_return_if_not_posdef = 1;
        ctx->chol = c;
        ctx->chol_free = chol_free_common;
    }
    return ctx->chol;
}

static int cmp_index(const void *a, const void *b)
{
    ef_index x = *(const ef_index *)a, y = *(const ef_index *)b;
    return (x > y) - (x < y);
}

ef_status ef_sparse_create_pattern(ef_index n, ef_index n_pairs, const ef_index *row,
                                   const ef_index *col, ef_sparse **out, ef_ctx *ctx)
{
    cholmod_common *c = common(ctx);
    if (!c) return EF_ENOMEM;
    ef_status st = EF_ENOMEM;
    ef_sparse *S = calloc(1, sizeof *S);
    ef_index *start = calloc((size_t)n + 1, sizeof *start);
    ef_index *next = malloc(((size_t)n + 1) * sizeof *next);
    ef_index *rows = malloc(((size_t)n_pairs + (size_t)n + 1) * sizeof *rows);
    if (!S || !start || !next || !rows) goto done;
    /* bucket the rows by column (every diagonal added), then sort and merge each column */
    for (ef_index k = 0; k < n_pairs; k++) start[col[k] + 1]++;
    for (ef_index j = 0; j < n; j++) start[j + 1] += 1 + start[j];
    memcpy(next, start, ((size_t)n + 1) * sizeof *next);
    for (ef_index j = 0; j < n; j++) rows[next[j]++] = j;
    for (ef_index k = 0; k < n_pairs; k++) rows[next[col[k]]++] = row[k];
    ef_index nnz = 0;
    for (ef_index j = 0; j < n; j++) {      /* next[j]: count kept in column j */
        ef_index p0 = start[j], p1 = start[j + 1], keep = 0;
        qsort(rows + p0, (size_t)(p1 - p0), sizeof *rows, cmp_index);
        for (ef_index p = p0; p < p1; p++)
            if (keep == 0 || rows[p] != rows[p0 + keep - 1]) rows[p0 + keep++] = rows[p];
        next[j] = keep;
        nnz += keep;
    }
    S->A = cholmod_l_allocate_sparse((size_t)n, (size_t)n, (size_t)nnz, 1, 1, 1,
                                     CHOLMOD_REAL, c);
    if (!S->A) goto done;
    SuiteSparse_long *Ap = S->A->p, *Ai = S->A->i;
    ef_index dst = 0;
    for (ef_index j = 0; j < n; j++) {
        Ap[j] = dst;
        for (ef_index p = 0; p < next[j]; p++) Ai[dst++] = rows[start[j] + p];
    }
    Ap[n] = dst;
    S->ones = S->A->x;                       /* CHOLMOD's own value array, kept for free */
    st = EF_OK;
done:
    free(start);
    free(next);
    free(rows);
    if (st != EF_OK) {
        ef_sparse_free(&S, ctx);
        return st;
    }
    *out = S;
    return EF_OK;
}

void ef_sparse_free(ef_sparse **pS, ef_ctx *ctx)
{
    if (!pS || !*pS) return;
    ef_sparse *S = *pS;
    if (S->A) {
        S->A->x = S->ones;                   /* give CHOLMOD back its own array */
        cholmod_l_free_sparse(&S->A, common(ctx));
    }
    free(S);
    *pS = NULL;
}

ef_index ef_sparse_n(const ef_sparse *S) { return (ef_index)S->A->ncol; }
ef_index ef_sparse_nnz(const ef_sparse *S) { return ((SuiteSparse_long *)S->A->p)[S->A->ncol]; }
const ef_index *ef_sparse_colptr(const ef_sparse *S) { return (const ef_index *)S->A->p; }
const ef_index *ef_sparse_rowind(const ef_sparse *S) { return (const ef_index *)S->A->i; }

ef_index ef_sparse_find(const ef_sparse *S, ef_index row, ef_index col)
{
    const SuiteSparse_long *Ap = S->A->p, *Ai = S->A->i;
    ef_index lo = Ap[col], hi = Ap[col + 1] - 1;
    while (lo <= hi) {
        ef_index mid = lo + (hi - lo) / 2;
        if (Ai[mid] == row) return mid;
        if (Ai[mid] < row) lo = mid + 1; else hi = mid - 1;
    }
    return EF_NONE;
}

void ef_sparse_symv(const ef_sparse *S, const double *v, const double *x, double *y)
{
    const SuiteSparse_long *Ap = S->A->p, *Ai = S->A->i;
    ef_index n = (ef_index)S->A->ncol;
    memset(y, 0, (size_t)n * sizeof *y);
    for (ef_index j = 0; j < n; j++) {
        double yj = 0.0, xj = x[j];
        for (ef_index p = Ap[j]; p < Ap[j + 1]; p++) {
            ef_index i = Ai[p];
            yj += v[p] * x[i];               /* upper part: y_j += a_ij x_i */
            if (i != j) y[i] += v[p] * xj;   /* mirrored lower part */
        }
        y[j] += yj;
    }
}

/* Equations whose rows in the symmetric pattern are identical (the DOFs of one node: the
 * pattern is a union of 12x12 element blocks) are ordered as one. The graph of nodes is
 * up to 36 times smaller than that of the equations, so the fill-reducing ordering (AMD,
 * and METIS when CHOLMOD tries it for a poor AMD fill) costs a fraction of the time, and
 * the ordering is as good: minimum degree merges such "indistinguishable" variables into
 * supervariables anyway (Amestoy, Davis & Duff, An approximate minimum degree ordering
 * algorithm, SIAM J. Matrix Anal. Appl. 17(4), 1996; from memory), only later. Returns the
 * permutation of the equations (caller frees) and CHOLMOD's ordering method in *method,
 * or NULL when there is little to merge or memory ran short (then CHOLMOD orders the
 * equations itself). */
static SuiteSparse_long *node_ordering(cholmod_sparse *A, int *method, cholmod_common *c)
{
    const size_t n = A->ncol;
    SuiteSparse_long *perm = NULL, *grp = NULL, *first = NULL;
    cholmod_sparse *F = NULL, *C = NULL;
    cholmod_factor *Lc = NULL;
    if (n < 2) return NULL;
    F = cholmod_l_copy(A, 0, 0, c);                /* both triangles, pattern only */
    grp = malloc(n * sizeof *grp);
    first = malloc((n + 1) * sizeof *first);
    if (!F || !grp || !first) goto done;
    const SuiteSparse_long *Fp = F->p, *Fi = F->i;
    size_t ng = 0;
    for (size_t j = 0; j < n; j++) {
        SuiteSparse_long len = Fp[j + 1] - Fp[j];
        bool same = j > 0 && len == Fp[j] - Fp[j - 1] &&
                    memcmp(Fi + Fp[j], Fi + Fp[j - 1], (size_t)len * sizeof *Fi) == 0;
        if (!same) first[ng++] = (SuiteSparse_long)j;
        grp[j] = (SuiteSparse_long)ng - 1;
    }
    first[ng] = (SuiteSparse_long)n;
    if (2 * ng > n) goto done;                      /* little to merge */
    size_t nz = 0;                                  /* upper pattern of the node graph */
    for (size_t g = 0; g < ng; g++) {
        SuiteSparse_long last = -1;
        for (SuiteSparse_long p = Fp[first[g]]; p < Fp[first[g] + 1]; p++) {
            SuiteSparse_long r = grp[Fi[p]];
            if (r <= (SuiteSparse_long)g && r != last) { nz++; last = r; }
        }
    }
    C = cholmod_l_allocate_sparse(ng, ng, nz, 1, 1, 1, CHOLMOD_PATTERN, c);
    if (!C) goto done;
    SuiteSparse_long *Cp = C->p, *Ci = C->i;
    nz = 0;
    for (size_t g = 0; g < ng; g++) {
        SuiteSparse_long last = -1;
        Cp[g] = (SuiteSparse_long)nz;
        for (SuiteSparse_long p = Fp[first[g]]; p < Fp[first[g] + 1]; p++) {
            SuiteSparse_long r = grp[Fi[p]];            /* rows sorted: groups ascending */
            if (r <= (SuiteSparse_long)g && r != last) { Ci[nz++] = r; last = r; }
        }
    }
    Cp[ng] = (SuiteSparse_long)nz;
    cholmod_l_free_sparse(&F, c);
    Lc = cholmod_l_analyze(C, c);                   /* CHOLMOD's own choice of method */
    if (!Lc) goto done;
    perm = malloc(n * sizeof *perm);
    if (!perm) goto done;
    const SuiteSparse_long *Pg = Lc->Perm;
    size_t k = 0;
    for (size_t t = 0; t < ng; t++)
        for (SuiteSparse_long j = first[Pg[t]]; j < first[Pg[t] + 1]; j++) perm[k++] = j;
    *method = Lc->ordering;
done:
    cholmod_l_free_factor(&Lc, c);
    cholmod_l_free_sparse(&C, c);
    cholmod_l_free_sparse(&F, c);
    free(grp);
    free(first);
    return perm;
}

ef_status ef_chol_analyze(const ef_sparse *S, ef_factor **out, ef_ctx *ctx)
{
    cholmod_common *c = common(ctx);
    if (!c) return EF_ENOMEM;
    ef_factor *F = calloc(1, sizeof *F);
    if (!F) return EF_ENOMEM;
    double t0 = ef_clock();
    int method = -1;
    SuiteSparse_long *perm = node_ordering(S->A, &method, c);
    if (perm) {                                     /* analyse with the node ordering */
        int nmethods = c->nmethods, given = c->method[0].ordering, post = c->postorder;
        c->nmethods = 1;
        c->method[0].ordering = CHOLMOD_GIVEN;
        c->postorder = 1;
        F->L = cholmod_l_analyze_p(S->A, perm, NULL, 0, c);
        c->nmethods = nmethods;
        c->method[0].ordering = given;
        c->postorder = post;
        free(perm);
    } else {
        F->L = cholmod_l_analyze(S->A, c);
    }
    ef_ctx_time_add(ctx, "order and analyse", ef_clock() - t0, 1);
    if (!F->L) {
        free(F);
        if (c->status == CHOLMOD_OUT_OF_MEMORY) return EF_ENOMEM;
        ef_diag_error(ctx, NULL, "sparse ordering failed (CHOLMOD status %d)", c->status);
        return EF_EINTERNAL;
    }
    F->lnz = c->lnz;
    F->ordering = method >= 0 ? method : F->L->ordering;
    *out = F;
    return EF_OK;
}

ef_status ef_chol_factorize(const ef_sparse *S, const double *values, ef_factor *F,
                            ef_index *bad_eq, ef_ctx *ctx)
{
    cholmod_common *c = common(ctx);
    if (!c) return EF_ENOMEM;
    if (bad_eq) *bad_eq = EF_NONE;
    double t0 = ef_clock();
    S->A->x = (void *)(uintptr_t)values;     /* CHOLMOD only reads A */
    int ok = cholmod_l_factorize(S->A, F->L, c);
    S->A->x = S->ones;
    ef_ctx_time_add(ctx, "factorize", ef_clock() - t0, 1);
    if (!ok || c->status == CHOLMOD_OUT_OF_MEMORY) {
        if (c->status == CHOLMOD_OUT_OF_MEMORY) return EF_ENOMEM;
        ef_diag_error(ctx, NULL, "sparse factorization failed (CHOLMOD status %d)", c->status);
        return EF_EINTERNAL;
    }
    if (c->status == CHOLMOD_NOT_POSDEF) {
        const SuiteSparse_long *perm = F->L->Perm;
        size_t k = F->L->minor;
        if (bad_eq && k < F->L->n) *bad_eq = perm ? perm[k] : (ef_index)k;
        return EF_EUNSTABLE;
    }
    return EF_OK;
}

ef_status ef_chol_solve(ef_factor *F, ef_index nrhs, const double *b, double *x, ef_ctx *ctx)
{
    cholmod_common *c = common(ctx);
    if (!c) return EF_ENOMEM;
    ef_index n = (ef_index)F->L->n;
    double t0 = ef_clock();
    cholmod_dense B;
    memset(&B, 0, sizeof B);
    B.nrow = (size_t)n;
    B.ncol = (size_t)nrhs;
    B.nzmax = (size_t)(n * nrhs);
    B.d = (size_t)n;
    B.x = (void *)(uintptr_t)b;
    B.xtype = CHOLMOD_REAL;
    B.dtype = CHOLMOD_DOUBLE;
    int threads = openblas_get_num_threads();
    if (threads > 1) openblas_set_num_threads(1);
    int ok = cholmod_l_solve2(CHOLMOD_A, F->L, &B, NULL, &F->X, NULL, &F->Y, &F->E, c);
    if (threads > 1) openblas_set_num_threads(threads);
    if (!ok) return c->status == CHOLMOD_OUT_OF_MEMORY ? EF_ENOMEM : EF_EINTERNAL;
    memcpy(x, F->X->x, (size_t)(n * nrhs) * sizeof *x);
    ef_ctx_time_add(ctx, "solve", ef_clock() - t0, nrhs);
    return EF_OK;
}

/* Visit every pivot d_j (caller's equation numbering) of the last factorization. */
static void each_pivot(const ef_factor *F, void (*visit)(void *, ef_index, double), void *data)
{
    const cholmod_factor *L = F->L;
    const double *Lx = L->x;
    const SuiteSparse_long *perm = L->Perm;
    if (L->is_super) {
        const SuiteSparse_long *super = L->super, *pi = L->pi, *px = L->px;
        for (size_t s = 0; s < L->nsuper; s++) {
            SuiteSparse_long k1 = super[s], k2 = super[s + 1], nsrow = pi[s + 1] - pi[s];
            for (SuiteSparse_long j = k1; j < k2; j++) {
                double l = Lx[px[s] + (j - k1) + (j - k1) * nsrow];
                visit(data, perm ? perm[j] : j, l * l);     /* pivot of LL' */
            }
        }
    } else {
        const SuiteSparse_long *Lp = L->p;
        for (size_t j = 0; j < L->n; j++) {
            double l = Lx[Lp[j]];
            visit(data, perm ? perm[j] : (ef_index)j, L->is_ll ? l * l : l);
        }
    }
}

typedef struct {
    const double *diag;
    double lo, hi;
    ef_index at;
} pivot_scan;

static void scan_range(void *data, ef_index eq, double d)
{
    pivot_scan *s = data;
    if (d < s->lo) { s->lo = d; s->at = eq; }
    if (d > s->hi) s->hi = d;
}

static void scan_ratio(void *data, ef_index eq, double d)
{
    pivot_scan *s = data;
    double a = s->diag[eq];
    double r = a > 0.0 ? d / a : 0.0;
    if (r < s->lo) { s->lo = r; s->at = eq; }
}

void ef_chol_pivot_range(const ef_factor *F, double *dmin, double *dmax, ef_index *eq_min)
{
    pivot_scan s = {NULL, INFINITY, 0.0, EF_NONE};
    each_pivot(F, scan_range, &s);
    *dmin = s.lo;
    *dmax = s.hi;
    if (eq_min) *eq_min = s.at;
}

void ef_chol_weakest_pivot(const ef_factor *F, const double *diag, double *ratio, ef_index *eq)
{
    pivot_scan s = {diag, INFINITY, 0.0, EF_NONE};
    each_pivot(F, scan_ratio, &s);
    *ratio = s.lo;
    *eq = s.at;
}

double ef_chol_factor_nnz(const ef_factor *F)
{
    return F->lnz;
}

const char *ef_chol_ordering(const ef_factor *F)
{
    switch (F->ordering) {
    case CHOLMOD_NATURAL: return "natural";
    case CHOLMOD_GIVEN: return "given";
    case CHOLMOD_AMD: return "AMD";
    case CHOLMOD_METIS: return "METIS";
    case CHOLMOD_NESDIS: return "NESDIS";
    case CHOLMOD_COLAMD: return "COLAMD";
    default: return "other";
    }
}

ef_status ef_spmat_create(const ef_sparse *A, const double *values, ef_spmat **out)
{
    const SuiteSparse_long *Ap = A->A->p, *Ai = A->A->i;
    ef_index n = (ef_index)A->A->ncol, nz = 0;
    for (ef_index j = 0; j < n; j++)
        for (ef_index p = Ap[j]; p < Ap[j + 1]; p++) nz += Ai[p] != j && values[p] != 0.0;
    ef_spmat *S = calloc(1, sizeof *S);
    if (!S) return EF_ENOMEM;
    S->n = n;
    S->colptr = malloc(((size_t)n + 1) * sizeof *S->colptr);
    S->rowind = malloc((size_t)EF_MAX(nz, 1) * sizeof *S->rowind);
    S->val = malloc((size_t)EF_MAX(nz, 1) * sizeof *S->val);
    S->diag = malloc((size_t)EF_MAX(n, 1) * sizeof *S->diag);
    if (!S->colptr || !S->rowind || !S->val || !S->diag) {
        ef_spmat_free(&S);
        return EF_ENOMEM;
    }
    nz = 0;
    for (ef_index j = 0; j < n; j++) {
        S->colptr[j] = nz;
        S->diag[j] = 0.0;
        for (ef_index p = Ap[j]; p < Ap[j + 1]; p++) {
            if (Ai[p] == j) {
                S->diag[j] = values[p];
            } else if (values[p] != 0.0) {
                S->rowind[nz] = Ai[p];
                S->val[nz++] = values[p];
            }
        }
    }
    S->colptr[n] = nz;
    *out = S;
    return EF_OK;
}

ef_index ef_spmat_nnz(const ef_spmat *S)
{
    return S->colptr[S->n] + S->n;
}

void ef_spmat_symv(const ef_spmat *S, const double *x, double *y)
{
    const ef_index n = S->n, *Ap = S->colptr, *Ai = S->rowind;
    const double *v = S->val;
    memset(y, 0, (size_t)n * sizeof *y);
    for (ef_index j = 0; j < n; j++) {
        double xj = x[j], yj = S->diag[j] * xj;
        for (ef_index p = Ap[j]; p < Ap[j + 1]; p++) {
            ef_index i = Ai[p];                  /* i < j */
            yj += v[p] * x[i];                   /* y_j += a_ij x_i */
            y[i] += v[p] * xj;                   /* mirrored: y_i += a_ij x_j */
        }
        y[j] += yj;
    }
}

void ef_spmat_free(ef_spmat **pS)
{
    if (!pS || !*pS) return;
    free((*pS)->colptr);
    free((*pS)->rowind);
    free((*pS)->val);
    free((*pS)->diag);
    free(*pS);
    *pS = NULL;
}

void ef_factor_free(ef_factor **pF, ef_ctx *ctx)
{
    if (!pF || !*pF) return;
    ef_factor *F = *pF;
    cholmod_common *c = common(ctx);
    if (c) {
        cholmod_l_free_factor(&F->L, c);
        cholmod_l_free_dense(&F->X, c);
        cholmod_l_free_dense(&F->Y, c);
        cholmod_l_free_dense(&F->E, c);
    }
    free(F);
    *pF = NULL;
}
