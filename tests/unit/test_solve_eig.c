/* test_solve_eig.c: the ARPACK driver (solve_eig.c) on small banded pencils built here.
 *
 * The test owns the matrices: symmetric band storage (LAPACK 'U' layout), operators
 * applied by loops, (A - sigma B) or B factorised by LAPACK dpbtrf. Dense copies go to
 * LAPACK dsygvd as the reference; dense matrices are fine here, the library never sees them.
 */
#include "solve_eig.h"

#include "support.h"

#include <float.h>
#include <lapacke.h>
#include <stdlib.h>
#include <string.h>

#define PI 3.14159265358979323846

/* ---- a banded symmetric pencil and its operators ------------------------------------ */

typedef struct {
    int n, kd;
    double *a;          /* A, band 'U', column-major, leading dimension kd + 1 */
    double *b;          /* B, same layout */
    double *f;          /* Cholesky factor of the matrix `solve` inverts */
    int n_solve, n_a, n_b;
    int fail_at;        /* `solve` call that returns EF_EUNSTABLE (0: never) */
    int nan_at;         /* `solve` call that returns a NaN (0: never) */
    int warn_at;        /* `solve` call that returns EF_WARN_ILLCOND (0: never) */
} pencil;

static void pencil_init(pencil *p, int n, int kd)
{
    memset(p, 0, sizeof *p);
    p->n = n;
    p->kd = kd;
    p->a = calloc((size_t)(kd + 1) * (size_t)n, sizeof *p->a);
    p->b = calloc((size_t)(kd + 1) * (size_t)n, sizeof *p->b);
    p->f = calloc((size_t)(kd + 1) * (size_t)n, sizeof *p->f);
    assert_non_null(p->a);
    assert_non_null(p->b);
    assert_non_null(p->f);
}

static void pencil_free(pencil *p)
{
    free(p->a);
    free(p->b);
    free(p->f);
    memset(p, 0, sizeof *p);
}

static double *band_at(double *ab, int kd, int i, int j)  /* i, j any order, |i-j| <= kd */
{
    if (i > j) { int t = i; i = j; j = t; }
    assert_true(j - i <= kd);
    return &ab[(size_t)(kd + i - j) + (size_t)j * (size_t)(kd + 1)];
}

static double band_get(const double *ab, int kd, int i, int j)
{
    if (i > j) { int t = i; i = j; j = t; }
    if (j - i > kd) return 0.0;
    return ab[(size_t)(kd + i - j) + (size_t)j * (size_t)(kd + 1)];
}

static void band_mv(const double *ab, int kd, int n, const double *x, double *y)
{
    for (int i = 0; i < n; i++) {
        double s = 0.0;
        int lo = i - kd > 0 ? i - kd : 0, hi = i + kd < n - 1 ? i + kd : n - 1;
        for (int j = lo; j <= hi; j++) s += band_get(ab, kd, i, j) * x[j];
        y[i] = s;
    }
}

/* f = chol(A - sigma B) (use_a) or chol(B); every matrix inverted here is SPD. */
static void pencil_factor(pencil *p, int use_a, double sigma)
{
    size_t len = (size_t)(p->kd + 1) * (size_t)p->n;
    for (size_t k = 0; k < len; k++) p->f[k] = use_a ? p->a[k] - sigma * p->b[k] : p->b[k];
    lapack_int info = LAPACKE_dpbtrf(LAPACK_COL_MAJOR, 'U', p->n, p->kd, p->f, p->kd + 1);
    assert_int_equal(info, 0);
}

static ef_status op_solve(void *data, const double *x, double *y)
{
    pencil *p = data;
    p->n_solve++;
    if (p->fail_at && p->n_solve == p->fail_at) return EF_EUNSTABLE;
    memcpy(y, x, (size_t)p->n * sizeof *y);
    lapack_int info = LAPACKE_dpbtrs(LAPACK_COL_MAJOR, 'U', p->n, p->kd, 1, p->f, p->kd + 1,
                                     y, p->n);
    if (info != 0) return EF_EINTERNAL;
    if (p->nan_at && p->n_solve == p->nan_at) y[p->n / 2] = NAN;
    if (p->warn_at && p->n_solve == p->warn_at) return EF_WARN_ILLCOND;
    return EF_OK;
}

static ef_status op_a(void *data, const double *x, double *y)
{
    pencil *p = data;
    p->n_a++;
    band_mv(p->a, p->kd, p->n, x, y);
    return EF_OK;
}

static ef_status op_b(void *data, const double *x, double *y)
{
    pencil *p = data;
    p->n_b++;
    band_mv(p->b, p->kd, p->n, x, y);
    return EF_OK;
}

static double *dense(const double *ab, int kd, int n)   /* column-major n x n */
{
    double *d = calloc((size_t)n * (size_t)n, sizeof *d);
    assert_non_null(d);
    for (int j = 0; j < n; j++)
        for (int i = 0; i < n; i++) d[(size_t)i + (size_t)j * (size_t)n] = band_get(ab, kd, i, j);
    return d;
}

/* All eigenvalues of X v = mu Y v, ascending, by LAPACK dsygvd ("as calculated by LAPACK");
 * Y must be SPD. */
static double *dense_eigenvalues(const double *xb, const double *yb, int kd, int n)
{
    double *X = dense(xb, kd, n), *Y = dense(yb, kd, n);
    double *w = malloc((size_t)n * sizeof *w);
    assert_non_null(w);
    lapack_int info = LAPACKE_dsygvd(LAPACK_COL_MAJOR, 1, 'N', 'U', n, X, n, Y, n, w);
    assert_int_equal(info, 0);
    free(X);
    free(Y);
    return w;
}

/* A fixed-free spring-mass chain on nodes first .. first+count-1: spring k_s joins node s
 * to node s-1, the first node's spring goes to the ground; masses on the diagonal of B. */
static void add_chain(pencil *p, int first, int count, const double *k_spring,
                      const double *mass)
{
    for (int s = 0; s < count; s++) {
        int i = first + s;
        *band_at(p->a, p->kd, i, i) += k_spring[s];
        if (s > 0) {
            *band_at(p->a, p->kd, i - 1, i - 1) += k_spring[s];
            *band_at(p->a, p->kd, i - 1, i) -= k_spring[s];
        }
        *band_at(p->b, p->kd, i, i) += mass[s];
    }
}

static void add_uniform_chain(pencil *p, int first, int count, double k, double m)
{
    double *ks = malloc((size_t)count * sizeof *ks), *ms = malloc((size_t)count * sizeof *ms);
    assert_non_null(ks);
    assert_non_null(ms);
    for (int s = 0; s < count; s++) { ks[s] = k; ms[s] = m; }
    add_chain(p, first, count, ks, ms);
    free(ks);
    free(ms);
}

/* Uniform fixed-free chain of n equal masses m and springs k:
 *   omega_j^2 = 4 (k/m) sin^2((2j - 1) pi / (2 (2n + 1))),  j = 1 .. n.
 * Derived here: u_i = sin(i theta) meets the fixed end (u_0 = 0) and the interior
 * equations k(2u_i - u_{i-1} - u_{i+1}) = m omega^2 u_i with m omega^2 = 2k(1 - cos theta)
 * = 4k sin^2(theta/2); the free end k(u_n - u_{n-1}) = m omega^2 u_n is the interior
 * equation with a ghost u_{n+1} = u_n, i.e. sin((n+1) theta) = sin(n theta), so
 * theta = (2j - 1) pi / (2n + 1). It is the standard result for a uniform spring-mass chain
 * (e.g. Meirovitch, Fundamentals of Vibrations, 2001, lumped systems; from memory). */
static double chain_closed_form(int j, int n, double k, double m)
{
    double s = sin((2.0 * j - 1.0) * PI / (2.0 * (2.0 * n + 1.0)));
    return 4.0 * (k / m) * s * s;
}

/* Properties every returned pair must have: ascending values, V^T B V = I, and a small
 * residual ||A x - lambda B x|| / ||A x||. */
static void check_pairs(const pencil *p, const ef_eig_result *r, double res_rtol)
{
    const int n = p->n;
    double *bx = malloc((size_t)n * sizeof *bx), *ax = malloc((size_t)n * sizeof *ax);
    assert_non_null(bx);
    assert_non_null(ax);
    for (int k = 1; k < r->nconv; k++) assert_true(r->values[k - 1] <= r->values[k]);
    for (int k = 0; k < r->nconv; k++) {
        const double *xk = r->vectors + (size_t)k * (size_t)n;
        band_mv(p->b, p->kd, n, xk, bx);
        band_mv(p->a, p->kd, n, xk, ax);
        for (int l = 0; l < r->nconv; l++) {            /* B-orthonormality */
            const double *xl = r->vectors + (size_t)l * (size_t)n;
            double s = 0.0;
            for (int i = 0; i < n; i++) s += xl[i] * bx[i];
            assert_abs_close(s, k == l ? 1.0 : 0.0, 1e-10);
        }
        double rr = 0.0, aa = 0.0;
        for (int i = 0; i < n; i++) {
            double e = ax[i] - r->values[k] * bx[i];
            rr += e * e;
            aa += ax[i] * ax[i];
        }
        if (!(sqrt(rr) <= res_rtol * sqrt(aa)))
            fail_msg("pair %d: residual %.3g > %.3g", k, sqrt(rr) / sqrt(aa), res_rtol);
    }
    free(bx);
    free(ax);
}

/* Residual bound for shift-invert on a chain with B = m I. ARPACK accepts a pair when
 * s = OP x - theta x has ||s||_B <= tol |theta| (dsaupd, TOL), OP = (A - sigma B)^-1 B,
 * lambda = sigma + 1/theta. Then A x - lambda B x = -(A - sigma B) s / theta, and with
 * ||A x|| ~ lambda ||B x|| = lambda m ||x|| the relative residual is at most about
 * tol (lambda_max - sigma) / lambda, lambda_max <= 4k/m (Gershgorin on M^-1 K: row sum 4k).
 * The factor 10 covers the norm equivalences. */
static double residual_bound(double tol, double lambda_max, double lambda)
{
    return 10.0 * tol * lambda_max / fabs(lambda);
}

static ef_eig_problem shift_invert_problem(pencil *p, int nev, double sigma)
{
    ef_eig_problem pb = {0};
    pb.n = p->n;
    pb.nev = nev;
    pb.mode = EF_EIG_SHIFT_INVERT;
    pb.which = EF_EIG_NEAREST;
    pb.sigma = sigma;
    pb.solve = op_solve;
    pb.apply_b = op_b;
    pb.data = p;
    return pb;
}

static int setup_ctx(void **state)
{
    ef_ctx *ctx = NULL;
    if (ef_ctx_create(&ctx) != EF_OK) return -1;
    *state = ctx;
    return 0;
}

static int teardown_ctx(void **state)
{
    ef_ctx *ctx = *state;
    ef_ctx_free(&ctx);
    return 0;
}

static const char *last_message(const ef_ctx *ctx)
{
    ef_index n = ef_ctx_diag_count(ctx);
    return n > 0 ? ef_ctx_diag_text(ctx, n - 1) : "";
}

/* ---- tests ------------------------------------------------------------------------- */

enum { CHAIN_N = 200 };
static const double CHAIN_K = 1.5e3;   /* [force/length], arbitrary */
static const double CHAIN_M = 2.5;     /* [mass], arbitrary */

/* (1) Lowest 6 modes of a 200-mass fixed-free chain by shift-invert just below zero. */
static void test_eig_chain_lowest_modes_match_dense_and_closed_form(void **state)
{
    ef_ctx *ctx = *state;
    pencil p;
    pencil_init(&p, CHAIN_N, 1);
    add_uniform_chain(&p, 0, CHAIN_N, CHAIN_K, CHAIN_M);
    const double sigma = -1e-3;             /* slightly negative: below omega_1^2 ~ 0.015 */
    pencil_factor(&p, 1, sigma);
    ef_eig_problem pb = shift_invert_problem(&p, 6, sigma);
    ef_eig_result r;
    assert_int_equal(ef_eig_solve(&pb, &r, ctx), EF_OK);
    assert_int_equal(r.nconv, 6);
    assert_int_equal(r.ncv, 26);            /* default min(n, max(2*6 + 1, 6 + 20)) */
    assert_rel_close(r.tol, 1e-12, 0.0);
    assert_int_equal(r.n_op, p.n_solve);    /* every application of `solve` is counted */
    assert_true(r.restarts >= 1);

    double *ref = dense_eigenvalues(p.a, p.b, p.kd, p.n);   /* LAPACK dsygvd */
    for (int j = 0; j < 6; j++) {
        assert_rel_close(r.values[j], ref[j], 1e-10);
        assert_rel_close(r.values[j], chain_closed_form(j + 1, CHAIN_N, CHAIN_K, CHAIN_M),
                         1e-10);
    }
    check_pairs(&p, &r, residual_bound(r.tol, 4.0 * CHAIN_K / CHAIN_M, r.values[0]));
    free(ref);
    ef_eig_result_free(&r);
    pencil_free(&p);
}

/* (2) Massless nodes (singular B). Every other node of a fixed-free chain of 2n springs
 * carries no mass: each massless node joins two springs k in series, k/2 (1/k_eq = 1/k +
 * 1/k), so the finite spectrum is that of a uniform chain of n masses m and springs k/2. */
static void test_eig_chain_with_massless_nodes_gives_finite_modes(void **state)
{
    ef_ctx *ctx = *state;
    enum { NM = 60, N = 2 * NM };
    double ks[N], ms[N];
    for (int s = 0; s < N; s++) {
        ks[s] = CHAIN_K;
        ms[s] = (s % 2 == 1) ? CHAIN_M : 0.0;   /* nodes 2, 4, ..., 2n (1-based) have mass */
    }
    pencil p;
    pencil_init(&p, N, 1);
    add_chain(&p, 0, N, ks, ms);
    const double sigma = -1e-3;
    pencil_factor(&p, 1, sigma);
    ef_eig_problem pb = shift_invert_problem(&p, 5, sigma);
    ef_eig_result r;
    assert_int_equal(ef_eig_solve(&pb, &r, ctx), EF_OK);
    assert_int_equal(r.nconv, 5);

    /* Reference: M v = mu K v with K SPD (LAPACK dsygvd), lambda = 1/mu for mu > 0; the
     * massless DOFs give mu = 0. The largest mu are the lowest lambda. */
    double *mu = dense_eigenvalues(p.b, p.a, p.kd, p.n);
    for (int j = 0; j < 5; j++) {
        assert_rel_close(r.values[j], 1.0 / mu[N - 1 - j], 1e-10);
        assert_rel_close(r.values[j], chain_closed_form(j + 1, NM, CHAIN_K / 2.0, CHAIN_M),
                         1e-10);
    }
    int n_zero = 0;                          /* N - NM infinite eigenvalues, as built */
    for (int j = 0; j < N; j++)
        if (fabs(mu[j]) <= 1e3 * DBL_EPSILON * mu[N - 1]) n_zero++;
    assert_int_equal(n_zero, N - NM);
    /* the condensed chain has lambda_max <= 2k/m; 4k/m as in (1) is looser */
    check_pairs(&p, &r, residual_bound(r.tol, 4.0 * CHAIN_K / CHAIN_M, r.values[0]));
    free(mu);
    ef_eig_result_free(&r);
    pencil_free(&p);
}

/* (3) Two identical uncoupled chains: every eigenvalue is double; both copies must come
 * out, with B-orthonormal (hence independent) vectors. */
static void test_eig_two_identical_chains_give_each_value_twice(void **state)
{
    ef_ctx *ctx = *state;
    enum { NC = 100 };
    pencil p;
    pencil_init(&p, 2 * NC, 1);
    add_uniform_chain(&p, 0, NC, CHAIN_K, CHAIN_M);
    add_uniform_chain(&p, NC, NC, CHAIN_K, CHAIN_M);
    const double sigma = -1e-3;
    pencil_factor(&p, 1, sigma);
    ef_eig_problem pb = shift_invert_problem(&p, 6, sigma);
    ef_eig_result r;
    assert_int_equal(ef_eig_solve(&pb, &r, ctx), EF_OK);
    assert_int_equal(r.nconv, 6);
    for (int j = 0; j < 6; j++)              /* lambda_1, lambda_1, lambda_2, lambda_2, ... */
        assert_rel_close(r.values[j], chain_closed_form(j / 2 + 1, NC, CHAIN_K, CHAIN_M),
                         1e-10);
    check_pairs(&p, &r, residual_bound(r.tol, 4.0 * CHAIN_K / CHAIN_M, r.values[0]));
    ef_eig_result_free(&r);
    pencil_free(&p);
}

/* A pin-ended column of length L on N interior nodes, h = L/(N+1), finite differences:
 * B = K = (EI/h^3) T^2 with T = tridiag(-1, 2, -1) (simply supported: u = u'' = 0 at the
 * ends, so the fourth difference is T^2; pentadiagonal, SPD), and
 * A = -K_G = (1/h) sum_s P_s (u_{s+1} - u_s)^2, P_s the compression in segment s.
 * A x = mu B x gives mu = 1/alpha, alpha the critical factor of the axial force pattern.
 * The grid is coarse on purpose: B's condition number grows as (2(N+1)/pi)^4, and rounding
 * in B alone moves mu_1 by about 16 eps / t_1^2 relative (first-order perturbation,
 * t_1 = 4 sin^2(pi/(2(N+1))), the smallest eigenvalue of T), which is 3.4e-11 for N = 30 but
 * 1e-8 for N = 150; the 1e-10 comparisons below need the former. */
enum { COL_N = 30 };
static const double COL_L = 6.0;       /* [length] */
static const double COL_EI = 4.2e3;    /* [force*length^2] */
static const double COL_P = 10.0;      /* [force] */

static void build_column(pencil *p, const double *P_seg)   /* P_seg[COL_N + 1] */
{
    const double h = COL_L / (COL_N + 1);
    pencil_init(p, COL_N, 2);
    for (int i = 0; i < COL_N; i++) {       /* T^2 rows: 1 -4 6 -4 1, ends 5 */
        *band_at(p->b, 2, i, i) = (i == 0 || i == COL_N - 1 ? 5.0 : 6.0) * COL_EI / (h * h * h);
        if (i + 1 < COL_N) *band_at(p->b, 2, i, i + 1) = -4.0 * COL_EI / (h * h * h);
        if (i + 2 < COL_N) *band_at(p->b, 2, i, i + 2) = 1.0 * COL_EI / (h * h * h);
    }
    for (int s = 0; s <= COL_N; s++) {      /* segment s joins nodes s-1 and s (0-based) */
        double c = P_seg[s] / h;
        if (s - 1 >= 0) *band_at(p->a, 2, s - 1, s - 1) += c;
        if (s < COL_N) *band_at(p->a, 2, s, s) += c;
        if (s - 1 >= 0 && s < COL_N) *band_at(p->a, 2, s - 1, s) -= c;
    }
}

/* Residual bound for inverse-B: s = B^-1 A x - mu x with ||s||_B <= tol |mu| (dsaupd, TOL)
 * gives A x - mu B x = B s, and ||B s|| / ||A x|| <= tol sqrt(cond B) = tol t_max / t_min
 * (B = c T^2); a factor 10 for the norm equivalences. */
static double column_residual_bound(double tol)
{
    double t_min = 4.0 * pow(sin(PI / (2.0 * (COL_N + 1))), 2);
    double t_max = 4.0 * pow(sin(COL_N * PI / (2.0 * (COL_N + 1))), 2);
    return 10.0 * tol * t_max / t_min;
}

static ef_eig_problem inverse_b_problem(pencil *p, int nev, ef_eig_which which)
{
    ef_eig_problem pb = {0};
    pb.n = p->n;
    pb.nev = nev;
    pb.mode = EF_EIG_INVERSE_B;
    pb.which = which;
    pb.solve = op_solve;
    pb.apply_a = op_a;
    pb.apply_b = op_b;
    pb.data = p;
    return pb;
}

/* (4) Compression at the base falling linearly to tension at the top: A is indefinite.
 * Largest mu (lowest positive critical factors) and smallest mu (reversed load) vs LAPACK. */
static void test_eig_inverse_b_indefinite_column_matches_dense(void **state)
{
    ef_ctx *ctx = *state;
    double P_seg[COL_N + 1];
    for (int s = 0; s <= COL_N; s++) {
        double x = (s + 0.5) / (COL_N + 1);             /* segment midpoint / L */
        P_seg[s] = COL_P * (1.0 - 1.5 * x);            /* +P at the base, -P/2 at the top */
    }
    pencil p;
    build_column(&p, P_seg);
    pencil_factor(&p, 0, 0.0);                          /* solve = B^-1 */
    double *ref = dense_eigenvalues(p.a, p.b, p.kd, p.n);  /* LAPACK dsygvd on (A, B) */
    assert_true(ref[0] < 0.0 && ref[COL_N - 1] > 0.0);  /* indefinite, as intended */

    ef_eig_problem pb = inverse_b_problem(&p, 4, EF_EIG_LARGEST);
    ef_eig_result r;
    assert_int_equal(ef_eig_solve(&pb, &r, ctx), EF_OK);
    assert_int_equal(r.nconv, 4);
    for (int j = 0; j < 4; j++) assert_rel_close(r.values[j], ref[COL_N - 4 + j], 1e-10);
    assert_int_equal(r.n_op, p.n_solve);
    assert_int_equal(p.n_a, p.n_solve);     /* mode 2: one A x per B^-1 application */
    check_pairs(&p, &r, column_residual_bound(r.tol));
    ef_eig_result_free(&r);

    pb = inverse_b_problem(&p, 4, EF_EIG_SMALLEST);
    assert_int_equal(ef_eig_solve(&pb, &r, ctx), EF_OK);
    assert_int_equal(r.nconv, 4);
    for (int j = 0; j < 4; j++) assert_rel_close(r.values[j], ref[j], 1e-10);
    check_pairs(&p, &r, column_residual_bound(r.tol));
    ef_eig_result_free(&r);
    free(ref);
    pencil_free(&p);
}

/* (4b) Uniform compression P: T's eigenvectors diagonalise both matrices, so
 * mu_j = P h^2 / (EI t_j), t_j = 4 sin^2(j pi / (2(N+1))) (derived here from the
 * eigenvalues of T, which are standard). 1/mu_1 tends to the Euler load ratio
 * pi^2 EI / (P L^2) (Timoshenko & Gere, Theory of Elastic Stability, 2nd ed., sec. 2.1; from
 * memory) from below with relative error sin^2(theta)/theta^2 - 1 ~ -theta^2/3,
 * theta = pi/(2(N+1)) = 0.0507: 8.6e-4 here, so 1e-3 tests that the pencil is a column. */
static void test_eig_inverse_b_uniform_column_gives_euler_load(void **state)
{
    ef_ctx *ctx = *state;
    double P_seg[COL_N + 1];
    for (int s = 0; s <= COL_N; s++) P_seg[s] = COL_P;
    pencil p;
    build_column(&p, P_seg);
    pencil_factor(&p, 0, 0.0);
    ef_eig_problem pb = inverse_b_problem(&p, 3, EF_EIG_LARGEST);
    ef_eig_result r;
    assert_int_equal(ef_eig_solve(&pb, &r, ctx), EF_OK);
    assert_int_equal(r.nconv, 3);
    const double h = COL_L / (COL_N + 1);
    for (int j = 1; j <= 3; j++) {          /* values ascend: mu_3 < mu_2 < mu_1 */
        double s = sin(j * PI / (2.0 * (COL_N + 1)));
        double mu = COL_P * h * h / (COL_EI * 4.0 * s * s);
        assert_rel_close(r.values[3 - j], mu, 1e-10);
    }
    double euler = PI * PI * COL_EI / (COL_P * COL_L * COL_L);
    assert_rel_close(1.0 / r.values[2], euler, 1e-3);
    assert_true(1.0 / r.values[2] < euler);
    check_pairs(&p, &r, column_residual_bound(r.tol));
    ef_eig_result_free(&r);
    pencil_free(&p);
}

/* (4c) The shifted buckling mode (ARPACK mode 4): B x = alpha A x with OP = (B - sigma A)^-1 B
 * and 0 < sigma < alpha_1, on the uniform column of (4b): alpha_j = EI t_j / (P h^2), the
 * inverses of the mu_j above (same derivation). The values come back as alpha, ascending,
 * with B x = alpha A x to rounding. */
static void test_eig_buckling_mode_finds_factors_above_the_shift(void **state)
{
    ef_ctx *ctx = *state;
    double P_seg[COL_N + 1];
    for (int s = 0; s <= COL_N; s++) P_seg[s] = COL_P;
    pencil p;
    build_column(&p, P_seg);
    const double h = COL_L / (COL_N + 1);
    double alpha[4];
    for (int j = 1; j <= 4; j++) {
        double s = sin(j * PI / (2.0 * (COL_N + 1)));
        alpha[j - 1] = COL_EI * 4.0 * s * s / (COL_P * h * h);
    }
    double sigma = 0.6 * alpha[0];
    size_t len = (size_t)(p.kd + 1) * (size_t)p.n;
    for (size_t k = 0; k < len; k++) p.f[k] = p.b[k] - sigma * p.a[k];     /* B - sigma A */
    assert_int_equal(LAPACKE_dpbtrf(LAPACK_COL_MAJOR, 'U', p.n, p.kd, p.f, p.kd + 1), 0);
    ef_eig_problem pb = {0};
    pb.n = p.n;
    pb.nev = 3;
    pb.mode = EF_EIG_BUCKLING;
    pb.sigma = sigma;
    pb.solve = op_solve;
    pb.apply_b = op_b;
    pb.data = &p;
    ef_eig_result r;
    assert_int_equal(ef_eig_solve(&pb, &r, ctx), EF_OK);
    assert_int_equal(r.nconv, 3);
    double *bx = malloc((size_t)p.n * sizeof *bx), *ax = malloc((size_t)p.n * sizeof *ax);
    for (int j = 0; j < 3; j++) {
        assert_rel_close(r.values[j], alpha[j], 1e-10);
        const double *x = r.vectors + (size_t)j * (size_t)p.n;
        band_mv(p.b, p.kd, p.n, x, bx);
        band_mv(p.a, p.kd, p.n, x, ax);
        double rn = 0.0, bn = 0.0;
        for (int i = 0; i < p.n; i++) {
            rn += (bx[i] - r.values[j] * ax[i]) * (bx[i] - r.values[j] * ax[i]);
            bn += bx[i] * bx[i];
        }
        assert_true(sqrt(rn / bn) < 1e-8);
    }
    /* a zero shift is refused: mode 4's operator would be the identity */
    pb.sigma = 0.0;
    ef_eig_result_free(&r);
    assert_int_equal(ef_eig_solve(&pb, &r, ctx), EF_EINPUT);
    ef_eig_result_free(&r);
    free(bx);
    free(ax);
    pencil_free(&p);
}

/* (5) One restart with the smallest possible basis cannot converge 6 modes: EF_ENOCONV,
 * a message, fewer than 6 pairs reported, and the reported ones are true eigenpairs. */
static void test_eig_restart_limit_reports_partial_convergence(void **state)
{
    ef_ctx *ctx = *state;
    pencil p;
    pencil_init(&p, CHAIN_N, 1);
    add_uniform_chain(&p, 0, CHAIN_N, CHAIN_K, CHAIN_M);
    const double sigma = -1e-3;
    pencil_factor(&p, 1, sigma);
    ef_eig_problem pb = shift_invert_problem(&p, 6, sigma);
    pb.ncv = 7;
    pb.max_restarts = 1;
    ef_eig_result r;
    ef_index errors = ef_ctx_error_count(ctx);
    assert_int_equal(ef_eig_solve(&pb, &r, ctx), EF_ENOCONV);
    assert_int_equal(ef_ctx_error_count(ctx), errors + 1);
    assert_non_null(strstr(last_message(ctx), "eigen solver stopped after 1 restarts with"));
    assert_non_null(strstr(last_message(ctx), "of 6 modes converged"));
    assert_true(r.nconv < 6);
    /* The lowest value is isolated (its theta = 1/(lambda - sigma) is 9 times the next), so
     * it converges even here; with the fixed start vector this is reproducible, and it keeps
     * the extraction of a partial result (dseupd after info = 1) under test. */
    assert_true(r.nconv >= 1);
    assert_int_equal(r.n_op, p.n_solve);
    for (int k = 0; k < r.nconv; k++) {     /* each one a chain eigenvalue */
        double best = INFINITY;
        for (int j = 1; j <= CHAIN_N; j++) {
            double e = fabs(r.values[k] / chain_closed_form(j, CHAIN_N, CHAIN_K, CHAIN_M) - 1);
            if (e < best) best = e;
        }
        assert_true(best <= 1e-10);
    }
    check_pairs(&p, &r, residual_bound(r.tol, 4.0 * CHAIN_K / CHAIN_M,
                                       chain_closed_form(1, CHAIN_N, CHAIN_K, CHAIN_M)));
    ef_eig_result_free(&r);
    pencil_free(&p);
}

/* (6) Bad requests are refused before any operator runs. */
static void expect_einput(ef_eig_problem pb, pencil *p, ef_ctx *ctx)
{
    ef_eig_result r;
    ef_index errors = ef_ctx_error_count(ctx);
    p->n_solve = p->n_a = p->n_b = 0;
    assert_int_equal(ef_eig_solve(&pb, &r, ctx), EF_EINPUT);
    assert_true(ef_ctx_error_count(ctx) > errors);
    assert_non_null(strstr(last_message(ctx), "eigen solver"));
    assert_int_equal(r.nconv, 0);
    assert_null(r.values);
    assert_null(r.vectors);
    assert_int_equal(p->n_solve + p->n_a + p->n_b, 0);
    ef_eig_result_free(&r);
}

static void test_eig_bad_arguments_are_rejected(void **state)
{
    ef_ctx *ctx = *state;
    enum { N = 10 };
    pencil p;
    pencil_init(&p, N, 1);
    add_uniform_chain(&p, 0, N, CHAIN_K, CHAIN_M);
    pencil_factor(&p, 1, -1.0);
    ef_eig_problem good = shift_invert_problem(&p, 3, -1.0), pb;
    double zero[N] = {0};

    pb = good; pb.nev = N;                         expect_einput(pb, &p, ctx);  /* nev >= n */
    assert_non_null(strstr(last_message(ctx), "fewer than the order"));
    pb = good; pb.nev = N + 5;                     expect_einput(pb, &p, ctx);
    pb = good; pb.nev = 0;                         expect_einput(pb, &p, ctx);
    pb = good; pb.ncv = 3;                         expect_einput(pb, &p, ctx);  /* ncv = nev */
    pb = good; pb.ncv = N + 1;                     expect_einput(pb, &p, ctx);  /* ncv > n */
    pb = good; pb.n = 1; pb.nev = 1;               expect_einput(pb, &p, ctx);
    pb = good; pb.apply_b = NULL;                  expect_einput(pb, &p, ctx);
    pb = good; pb.sigma = NAN;                     expect_einput(pb, &p, ctx);
    pb = good; pb.tol = -1.0;                      expect_einput(pb, &p, ctx);
    pb = good; pb.max_restarts = -1;               expect_einput(pb, &p, ctx);
    pb = good; pb.start = zero;                    expect_einput(pb, &p, ctx);
    pb = good; pb.mode = EF_EIG_INVERSE_B;         expect_einput(pb, &p, ctx);  /* no apply_a */
    pb = inverse_b_problem(&p, 3, EF_EIG_NEAREST); expect_einput(pb, &p, ctx);

    ef_eig_result r;                               /* the good one still works */
    assert_int_equal(ef_eig_solve(&good, &r, ctx), EF_OK);
    assert_int_equal(r.nconv, 3);
    ef_eig_result_free(&r);
    pencil_free(&p);
}

/* A failing operator stops the iteration; its status comes back, no pairs are handed over. */
static void test_eig_operator_failure_stops_iteration(void **state)
{
    ef_ctx *ctx = *state;
    pencil p;
    pencil_init(&p, CHAIN_N, 1);
    add_uniform_chain(&p, 0, CHAIN_N, CHAIN_K, CHAIN_M);
    pencil_factor(&p, 1, -1e-3);
    ef_eig_problem pb = shift_invert_problem(&p, 6, -1e-3);
    ef_eig_result r;

    p.fail_at = 5;
    assert_int_equal(ef_eig_solve(&pb, &r, ctx), EF_EUNSTABLE);
    assert_int_equal(p.n_solve, 5);                /* nothing more after the failure */
    assert_int_equal(r.nconv, 0);
    assert_null(r.values);
    assert_null(r.vectors);
    ef_eig_result_free(&r);

    p.fail_at = 0;
    p.nan_at = p.n_solve + 3;                      /* the third call of the next run */
    assert_int_equal(ef_eig_solve(&pb, &r, ctx), EF_EINTERNAL);
    assert_non_null(strstr(last_message(ctx), "non-finite"));
    assert_int_equal(r.nconv, 0);
    ef_eig_result_free(&r);
    pencil_free(&p);
}

/* An operator warning does not stop the iteration: all pairs come back, with the warning. */
static void test_eig_operator_warning_is_passed_on(void **state)
{
    ef_ctx *ctx = *state;
    pencil p;
    pencil_init(&p, CHAIN_N, 1);
    add_uniform_chain(&p, 0, CHAIN_N, CHAIN_K, CHAIN_M);
    pencil_factor(&p, 1, -1e-3);
    ef_eig_problem pb = shift_invert_problem(&p, 3, -1e-3);
    ef_eig_result r;
    p.warn_at = 2;
    assert_int_equal(ef_eig_solve(&pb, &r, ctx), EF_WARN_ILLCOND);
    assert_true(p.n_solve > 2);
    assert_int_equal(r.nconv, 3);
    for (int j = 0; j < 3; j++)
        assert_rel_close(r.values[j], chain_closed_form(j + 1, CHAIN_N, CHAIN_K, CHAIN_M), 1e-10);
    ef_eig_result_free(&r);
    pencil_free(&p);
}

/* Without a start vector the run is deterministic: two runs agree bit for bit. A caller's
 * start vector gives the same eigenvalues. */
static void test_eig_runs_are_reproducible(void **state)
{
    ef_ctx *ctx = *state;
    pencil p;
    pencil_init(&p, CHAIN_N, 1);
    add_uniform_chain(&p, 0, CHAIN_N, CHAIN_K, CHAIN_M);
    pencil_factor(&p, 1, -1e-3);
    ef_eig_problem pb = shift_invert_problem(&p, 4, -1e-3);
    ef_eig_result r1, r2, r3;
    assert_int_equal(ef_eig_solve(&pb, &r1, ctx), EF_OK);
    assert_int_equal(ef_eig_solve(&pb, &r2, ctx), EF_OK);
    assert_int_equal(r1.n_op, r2.n_op);
    assert_memory_equal(r1.values, r2.values, 4 * sizeof(double));
    assert_memory_equal(r1.vectors, r2.vectors, 4 * CHAIN_N * sizeof(double));

    double start[CHAIN_N];
    for (int i = 0; i < CHAIN_N; i++) start[i] = 1.0 + 0.01 * i;
    pb.start = start;
    assert_int_equal(ef_eig_solve(&pb, &r3, ctx), EF_OK);
    for (int j = 0; j < 4; j++) assert_rel_close(r3.values[j], r1.values[j], 1e-10);
    ef_eig_result_free(&r1);
    ef_eig_result_free(&r2);
    ef_eig_result_free(&r3);
    pencil_free(&p);
}

static void test_eig_result_free_is_null_safe_and_zeroes(void **state)
{
    (void)state;
    ef_eig_result_free(NULL);
    ef_eig_result r = {0};
    ef_eig_result_free(&r);                         /* empty result */
    r.values = malloc(2 * sizeof *r.values);
    r.vectors = malloc(6 * sizeof *r.vectors);
    r.nconv = 2;
    r.n_op = 9;
    ef_eig_result_free(&r);
    assert_null(r.values);
    assert_null(r.vectors);
    assert_int_equal(r.nconv, 0);
    assert_int_equal(r.n_op, 0);
    ef_eig_result_free(&r);                         /* twice is fine */
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test_setup_teardown(test_eig_chain_lowest_modes_match_dense_and_closed_form,
                                        setup_ctx, teardown_ctx),
        cmocka_unit_test_setup_teardown(test_eig_chain_with_massless_nodes_gives_finite_modes,
                                        setup_ctx, teardown_ctx),
        cmocka_unit_test_setup_teardown(test_eig_two_identical_chains_give_each_value_twice,
                                        setup_ctx, teardown_ctx),
        cmocka_unit_test_setup_teardown(test_eig_inverse_b_indefinite_column_matches_dense,
                                        setup_ctx, teardown_ctx),
        cmocka_unit_test_setup_teardown(test_eig_buckling_mode_finds_factors_above_the_shift,
                                        setup_ctx, teardown_ctx),
        cmocka_unit_test_setup_teardown(test_eig_inverse_b_uniform_column_gives_euler_load,
                                        setup_ctx, teardown_ctx),
        cmocka_unit_test_setup_teardown(test_eig_restart_limit_reports_partial_convergence,
                                        setup_ctx, teardown_ctx),
        cmocka_unit_test_setup_teardown(test_eig_bad_arguments_are_rejected, setup_ctx,
                                        teardown_ctx),
        cmocka_unit_test_setup_teardown(test_eig_operator_failure_stops_iteration, setup_ctx,
                                        teardown_ctx),
        cmocka_unit_test_setup_teardown(test_eig_operator_warning_is_passed_on, setup_ctx,
                                        teardown_ctx),
        cmocka_unit_test_setup_teardown(test_eig_runs_are_reproducible, setup_ctx,
                                        teardown_ctx),
        cmocka_unit_test(test_eig_result_free_is_null_safe_and_zeroes),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
