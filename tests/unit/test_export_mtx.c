/* test_export_mtx.c: K, M, K_G and the DOF map written by export_mtx.c, read back from
 * the files (a small Matrix Market reader of the test's own) and checked against closed
 * forms and against the in-memory values. Units: kN, m, t. E = 210e6, G = 81e6.
 */
#define _POSIX_C_SOURCE 200809L
#include "support.h"

#include "export_mtx.h"
#include "model.h"

#include <dirent.h>
#include <lapacke.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#define PI 3.141592653589793

typedef struct {
    ef_ctx *ctx;
    ef_model *m;
    ef_system *sys;
    char dir[64];
} fixture;

static void setup(fixture *fx, const char *yaml)
{
    memset(fx, 0, sizeof *fx);
    assert_int_equal(ef_ctx_create(&fx->ctx), EF_OK);
    ef_status st = ef_model_load_yaml_string(yaml, strlen(yaml), "test.yaml", &fx->m, fx->ctx);
    for (ef_index i = 0; st != EF_OK && i < ef_ctx_diag_count(fx->ctx); i++)
        print_message("%s\n", ef_ctx_diag_text(fx->ctx, i));
    assert_int_equal(st, EF_OK);
    assert_int_equal(ef_system_create(fx->m, &fx->sys, fx->ctx), EF_OK);
    strcpy(fx->dir, "/tmp/ef_export_XXXXXX");
    assert_non_null(mkdtemp(fx->dir));
}

/* Remove the export directory (its files, one level of subdirectories) and free. */
static void remove_tree(const char *dir)
{
    DIR *d = opendir(dir);
    if (d) {
        struct dirent *e;
        char path[512];
        while ((e = readdir(d)) != NULL) {
            if (!strcmp(e->d_name, ".") || !strcmp(e->d_name, "..")) continue;
            snprintf(path, sizeof path, "%s/%s", dir, e->d_name);
            if (remove(path) != 0) remove_tree(path);
        }
        closedir(d);
    }
    rmdir(dir);
}

static void teardown(fixture *fx)
{
    remove_tree(fx->dir);
    ef_system_free(&fx->sys, fx->ctx);
    ef_model_free(&fx->m);
    ef_ctx_free(&fx->ctx);
}

/* A Matrix Market file read back: header, order, and the entries as written. */
typedef struct {
    char header[128];
    ef_index n, nnz;
    ef_index *row, *col;     /* 1-based, as in the file */
    double *val;
} mtx;

static void mtx_read(const char *dir, const char *name, mtx *a)
{
    char path[512], line[512];
    snprintf(path, sizeof path, "%s/%s", dir, name);
    FILE *f = fopen(path, "r");
    assert_non_null(f);
    memset(a, 0, sizeof *a);
    assert_non_null(fgets(a->header, sizeof a->header, f));
    do {
        assert_non_null(fgets(line, sizeof line, f));
    } while (line[0] == '%');
    long long n1, n2, nz;
    assert_int_equal(sscanf(line, "%lld %lld %lld", &n1, &n2, &nz), 3);
    assert_int_equal(n1, n2);
    a->n = n1;
    a->nnz = nz;
    a->row = malloc((size_t)nz * sizeof *a->row);
    a->col = malloc((size_t)nz * sizeof *a->col);
    a->val = malloc((size_t)nz * sizeof *a->val);
    assert_true(a->row && a->col && a->val);
    for (ef_index k = 0; k < a->nnz; k++) {
        long long i, j;
        assert_int_equal(fscanf(f, "%lld %lld %lf", &i, &j, &a->val[k]), 3);
        a->row[k] = i;
        a->col[k] = j;
    }
    assert_int_equal(fscanf(f, "%s", line), EOF);     /* nothing after the nnz entries */
    fclose(f);
}

static void mtx_free(mtx *a)
{
    free(a->row);
    free(a->col);
    free(a->val);
}

/* Dense symmetric n x n from the stored lower triangle. */
static double *mtx_dense(const mtx *a)
{
    double *D = calloc((size_t)(a->n * a->n), sizeof *D);
    assert_non_null(D);
    for (ef_index k = 0; k < a->nnz; k++) {
        ef_index i = a->row[k] - 1, j = a->col[k] - 1;
        D[i * a->n + j] = D[j * a->n + i] = a->val[k];
    }
    return D;
}

/* Largest mu of A x = mu B x (B positive definite), dense, LAPACK dsygv. */
static double largest_mu(double *A, double *B, ef_index n)
{
    double *w = malloc((size_t)n * sizeof *w);
    assert_non_null(w);
    lapack_int info = LAPACKE_dsygv(LAPACK_ROW_MAJOR, 1, 'N', 'U', (lapack_int)n, A,
                                    (lapack_int)n, B, (lapack_int)n, w);
    assert_int_equal(info, 0);
    double mu = w[n - 1];                          /* ascending */
    free(w);
    return mu;
}

/* A pinned column A (base) - B (top), L = 5, weak axis Iz = 1e-4, 8 elements, unit load
 * down at B; the buckling analysis of that load makes the export write K_G. */
static const char *COLUMN =
    "eigenframe: 1\n"
    "units: {force: kN, length: m}\n"
    "mesh: {divisions: 8}\n"
    "materials: {steel: {E: 210e6, G: 81e6, density: 7.85}}\n"
    "sections: {s: {A: 0.01, Iy: 2.0e-4, Iz: 1.0e-4, J: 5.0e-5}}\n"
    "nodes: {A: [0, 0, 0], B: [0, 0, 5.0]}\n"
    "members: {M: {nodes: [A, B], section: s, material: steel}}\n"
    "supports: {A: [ux, uy, uz, rz], B: [ux, uy]}\n"
    "loads: {P: {nodes: {B: {Fz: -1.0}}}}\n"
    "analyses: {static: [], buckling: {load: P, modes: 2}}\n";

/* Euler load pi^2 EI / L^2 of the pinned column (Timoshenko & Gere, Theory of Elastic
 * Stability, §2.1); with 8 cubic elements and consistent K_G the discrete value is 1.00003
 * times it (the ratio test_buckling.c checks, dynamics-and-stability-methods.md §6.3).
 * Computed here from the exported K.mtx and KG.mtx alone: -K_G x = mu K x, lambda = 1/mu. */
static void test_export_pinned_column_euler_load_from_the_files(void **state)
{
    (void)state;
    fixture fx;
    setup(&fx, COLUMN);
    assert_int_equal(ef_export_system(fx.sys, fx.dir, fx.ctx), EF_OK);
    mtx K, KG;
    mtx_read(fx.dir, "K.mtx", &K);
    mtx_read(fx.dir, "KG.mtx", &KG);
    assert_int_equal(K.n, fx.sys->dofs->n_eq);
    double *Kd = mtx_dense(&K), *Gd = mtx_dense(&KG);
    for (ef_index i = 0; i < K.n * K.n; i++) Gd[i] = -Gd[i];
    double lam = 1.0 / largest_mu(Gd, Kd, K.n);
    const double pe = PI * PI * 210e6 * 1e-4 / 25.0;
    assert_rel_close(lam / pe, 1.00003, 1.5e-4);
    free(Kd);
    free(Gd);
    mtx_free(&K);
    mtx_free(&KG);
    teardown(&fx);
}

/* First bending frequency of the pinned column about its weak axis:
 * omega = pi^2 sqrt(E Iz / (m L^4)), m = rho A (Blevins, Formulas for Natural Frequency
 * and Mode Shape, Table 8-1, pinned-pinned). 8 cubic elements with consistent mass land
 * within 1e-4 (Rayleigh-Ritz: from above). From K.mtx and M.mtx: M x = mu K x. */
static void test_export_pinned_column_first_frequency_from_the_files(void **state)
{
    (void)state;
    fixture fx;
    setup(&fx, COLUMN);
    assert_int_equal(ef_export_system(fx.sys, fx.dir, fx.ctx), EF_OK);
    mtx K, M;
    mtx_read(fx.dir, "K.mtx", &K);
    mtx_read(fx.dir, "M.mtx", &M);
    double *Kd = mtx_dense(&K), *Md = mtx_dense(&M);
    double w = sqrt(1.0 / largest_mu(Md, Kd, K.n));
    double exact = PI * PI * sqrt(210e6 * 1e-4 / (7.85 * 0.01 * pow(5.0, 4)));
    assert_rel_close(w, exact, 1e-4);
    assert_true(w >= exact * (1.0 - 1e-12));
    free(Kd);
    free(Md);
    mtx_free(&K);
    mtx_free(&M);
    teardown(&fx);
}

/* The files hold exactly the values in memory (17 digits read back bit for bit), in the
 * lower triangle the symmetric format stores, one entry per pattern position. */
static void test_export_values_read_back_bit_for_bit(void **state)
{
    (void)state;
    fixture fx;
    setup(&fx, COLUMN);
    assert_int_equal(ef_export_system(fx.sys, fx.dir, fx.ctx), EF_OK);
    mtx K;
    mtx_read(fx.dir, "K.mtx", &K);
    assert_string_equal(K.header, "%%MatrixMarket matrix coordinate real symmetric\n");
    const ef_sparse *A = fx.sys->asmb->A;
    assert_int_equal(K.nnz, ef_sparse_nnz(A));
    for (ef_index k = 0; k < K.nnz; k++) {
        assert_true(K.row[k] >= K.col[k]);                  /* lower triangle */
        ef_index p = ef_sparse_find(A, K.col[k] - 1, K.row[k] - 1);
        assert_int_equal(p, k);                             /* pattern order, no gaps */
        assert_true(K.val[k] == fx.sys->K[p]);
    }
    mtx_free(&K);
    teardown(&fx);
}

/* dofmap.csv: one line per equation, equation column 1..n */
typedef struct {
    char node[128], dof[8];
    double x[3];
} dof_line;

static dof_line *read_dofmap(const char *dir, ef_index n)
{
    char path[512], line[512];
    snprintf(path, sizeof path, "%s/dofmap.csv", dir);
    FILE *f = fopen(path, "r");
    assert_non_null(f);
    assert_non_null(fgets(line, sizeof line, f));
    assert_string_equal(line, "equation,node,dof,x,y,z\n");
    dof_line *d = calloc((size_t)n, sizeof *d);
    assert_non_null(d);
    for (ef_index i = 0; i < n; i++) {
        assert_non_null(fgets(line, sizeof line, f));
        char *s = line;
        assert_int_equal(strtoll(s, &s, 10), i + 1);
        assert_int_equal(*s++, ',');
        char *o = d[i].node;
        if (*s == '"') {                                    /* RFC 4180 quoted field */
            for (s++; !(s[0] == '"' && s[1] != '"'); s++) {
                if (s[0] == '"') s++;
                *o++ = *s;
            }
            s++;
        } else {
            while (*s != ',') *o++ = *s++;
        }
        *o = '\0';
        assert_int_equal(*s++, ',');
        o = d[i].dof;
        while (*s != ',') *o++ = *s++;
        *o = '\0';
        for (int c = 0; c < 3; c++) {
            assert_int_equal(*s++, ',');
            d[i].x[c] = strtod(s, &s);
        }
        assert_int_equal(*s, '\n');
    }
    assert_null(fgets(line, sizeof line, f));
    fclose(f);
    return d;
}

/* An unsupported L-shaped frame (three members in space, one subdivided). The stiffness
 * of a free body has the six rigid-body motions in its null space; rigid motions are
 * built here from dofmap.csv alone (its node coordinates and DOF names), so the test also
 * checks the map. A consistent mass matrix gives a rigid translation the whole member
 * mass, r^T M r = sum rho A L (the kinetic energy of a rigid body). */
static void test_export_free_frame_rigid_body_modes_and_mass(void **state)
{
    (void)state;
    fixture fx;
    setup(&fx, "eigenframe: 1\n"
               "units: {force: kN, length: m}\n"
               "mesh: {divisions: 1}\n"
               "materials: {steel: {E: 210e6, G: 81e6, density: 7.85}}\n"
               "sections: {s: {A: 0.01, Iy: 2.0e-4, Iz: 1.0e-4, J: 5.0e-5}}\n"
               "nodes: {\"A,1\": [0, 0, 0], B: [4, 0, 0], C: [4, 3, 0], D: [4, 3, 2.5]}\n"
               "members:\n"
               "  M1: {nodes: [\"A,1\", B], section: s, material: steel, divisions: 2}\n"
               "  M2: {nodes: [B, C], section: s, material: steel}\n"
               "  M3: {nodes: [C, D], section: s, material: steel}\n"
               "analyses: {static: []}\n");
    assert_int_equal(ef_export_system(fx.sys, fx.dir, fx.ctx), EF_OK);
    mtx K, M;
    mtx_read(fx.dir, "K.mtx", &K);
    mtx_read(fx.dir, "M.mtx", &M);
    ef_index n = K.n;
    assert_int_equal(n, 6 * 5);                             /* 4 nodes + 1 inside M1 */
    dof_line *d = read_dofmap(fx.dir, n);
    assert_string_equal(d[0].node, "A,1");
    bool inside = false;
    for (ef_index i = 0; i < n; i++)
        if (!strcmp(d[i].node, "member M1 at 0.5")) {
            inside = true;
            assert_rel_close(d[i].x[0], 2.0, 1e-15);
        }
    assert_true(inside);
    double *Kd = mtx_dense(&K), *Md = mtx_dense(&M);
    double kmax = 0.0;
    for (ef_index i = 0; i < n * n; i++) kmax = fmax(kmax, fabs(Kd[i]));
    const char *names[6] = {"ux", "uy", "uz", "rx", "ry", "rz"};
    double *r = calloc((size_t)n, sizeof *r);
    assert_non_null(r);
    for (int mode = 0; mode < 6; mode++) {
        for (ef_index i = 0; i < n; i++) {
            int c = -1;
            for (int k = 0; k < 6; k++) if (!strcmp(d[i].dof, names[k])) c = k;
            assert_true(c >= 0);
            if (mode < 3) {
                r[i] = c == mode ? 1.0 : 0.0;               /* translation */
            } else {                                        /* rotation about an axis at 0 */
                int a = mode - 3;
                double e[3] = {0, 0, 0}, t[3];
                e[a] = 1.0;
                const double *x = d[i].x;
                t[0] = e[1] * x[2] - e[2] * x[1];
                t[1] = e[2] * x[0] - e[0] * x[2];
                t[2] = e[0] * x[1] - e[1] * x[0];
                r[i] = c < 3 ? t[c] : (c - 3 == a ? 1.0 : 0.0);
            }
        }
        for (ef_index i = 0; i < n; i++) {
            double s = 0.0;
            for (ef_index j = 0; j < n; j++) s += Kd[i * n + j] * r[j];
            assert_abs_close(s, 0.0, 1e-12 * kmax * 5.0);   /* |K r| << |K| |r| */
        }
        if (mode < 3) {
            double q = 0.0;
            for (ef_index i = 0; i < n; i++)
                for (ef_index j = 0; j < n; j++) q += r[i] * Md[i * n + j] * r[j];
            assert_rel_close(q, 7.85 * 0.01 * (4.0 + 3.0 + 2.5), 1e-12);
        }
    }
    free(r);
    free(d);
    free(Kd);
    free(Md);
    mtx_free(&K);
    mtx_free(&M);
    teardown(&fx);
}

/* No buckling analysis: no KG.mtx. Nested missing directories are created. */
static void test_export_makes_missing_directories_and_skips_kg(void **state)
{
    (void)state;
    fixture fx;
    setup(&fx, "eigenframe: 1\n"
               "units: {force: kN, length: m}\n"
               "materials: {steel: {E: 210e6, G: 81e6, density: 7.85}}\n"
               "sections: {s: {A: 0.01, Iy: 2.0e-4, Iz: 1.0e-4, J: 5.0e-5}}\n"
               "nodes: {A: [0, 0, 0], B: [3, 0, 0]}\n"
               "members: {M: {nodes: [A, B], section: s, material: steel}}\n"
               "supports: {A: fixed}\n");
    char sub[128];
    snprintf(sub, sizeof sub, "%s/a/b", fx.dir);
    assert_int_equal(ef_export_system(fx.sys, sub, fx.ctx), EF_OK);
    char path[256];
    snprintf(path, sizeof path, "%s/K.mtx", sub);
    assert_int_equal(access(path, R_OK), 0);
    snprintf(path, sizeof path, "%s/M.mtx", sub);
    assert_int_equal(access(path, R_OK), 0);
    snprintf(path, sizeof path, "%s/KG.mtx", sub);
    assert_int_not_equal(access(path, F_OK), 0);
    snprintf(path, sizeof path, "%s/dofmap.csv", sub);
    assert_int_equal(access(path, R_OK), 0);
    snprintf(path, sizeof path, "%s/a", fx.dir);
    remove_tree(sub);
    rmdir(path);
    teardown(&fx);
}

/* A path through (or onto) an existing file cannot become a directory: EF_EIO and a
 * message naming the file. */
static void test_export_into_a_file_path_fails_with_a_message(void **state)
{
    (void)state;
    fixture fx;
    setup(&fx, COLUMN);
    char file[128], bad[160];
    snprintf(file, sizeof file, "%s/plain", fx.dir);
    FILE *f = fopen(file, "w");
    assert_non_null(f);
    fclose(f);
    snprintf(bad, sizeof bad, "%s/inside", file);
    assert_int_equal(ef_export_matrices(fx.sys, NULL, NULL, bad, fx.ctx), EF_EIO);
    assert_true(ef_ctx_error_count(fx.ctx) >= 1);
    assert_non_null(strstr(ef_ctx_diag_text(fx.ctx, ef_ctx_diag_count(fx.ctx) - 1),
                           "/plain' is not a directory"));
    assert_int_equal(ef_export_matrices(fx.sys, NULL, NULL, file, fx.ctx), EF_EIO);
    assert_non_null(strstr(ef_ctx_diag_text(fx.ctx, ef_ctx_diag_count(fx.ctx) - 1),
                           "is not a directory"));
    teardown(&fx);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_export_pinned_column_euler_load_from_the_files),
        cmocka_unit_test(test_export_pinned_column_first_frequency_from_the_files),
        cmocka_unit_test(test_export_values_read_back_bit_for_bit),
        cmocka_unit_test(test_export_free_frame_rigid_body_modes_and_mass),
        cmocka_unit_test(test_export_makes_missing_directories_and_skips_kg),
        cmocka_unit_test(test_export_into_a_file_path_fails_with_a_message),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
