/* test_element.c: the 3D frame element kernels (element.c).
 *
 * Single elements are checked against closed forms; small straight members are
 * assembled here into dense matrices (the test owns them; the library never sees a dense
 * global matrix) and solved with LAPACK: dsyev for spectra, dsygv for eigenpairs, dposv
 * for statics. Fixed-end forces are checked against textbook values and, for arbitrary
 * loads and shear-flexible elements, against an independent force-method computation.
 * [D] marks values derived in docs/element.md.
 */
#include "element.h"

#include "support.h"

#include <float.h>
#include <lapacke.h>
#include <stdlib.h>
#include <string.h>

#define PI 3.14159265358979323846

/* ---- helpers ------------------------------------------------------------------------ */

/* Steel-like section, deliberately unequal in every property so that swapped indices
 * show up. Units: N, m, kg. */
static ef_elem_props props_beam(void)
{
    ef_elem_props p;
    memset(&p, 0, sizeof p);
    p.E = 210e9;
    p.G = 81e9;
    p.A = 5.4e-3;
    p.Iy = 8.3e-5;
    p.Iz = 2.1e-5;
    p.J = 3.7e-6;                                   /* torsional modes above flexural */
    p.Ip = p.Iy + p.Iz;
    p.mass = 42.4;
    p.rot_mass = 7850.0 * p.Ip;
    return p;
}

static ef_elem_props props_timoshenko(void)
{
    ef_elem_props p = props_beam();
    p.Ay = 2.6e-3;
    p.Az = 1.9e-3;
    return p;
}

static double max_abs(const double *a, int n)
{
    double m = 0.0;
    for (int i = 0; i < n; i++)
        m = fabs(a[i]) > m ? fabs(a[i]) : m;
    return m;
}

/* |a_ij - a_ji| <= tol (absolute; callers scale it) */
static void assert_symmetric(const double a[144], double tol)
{
    for (int i = 0; i < 12; i++)
        for (int j = 0; j < i; j++)
            assert_abs_close(a[12 * i + j], a[12 * j + i], tol);
}

/* The six rigid-body motions of an element of length L along local x: translations,
 * then small rotations w about x, y, z: u = w x (x e_x), theta = w at both ends. */
static void rigid_modes(double L, double r[6][12])
{
    memset(r, 0, 6 * 12 * sizeof r[0][0]);
    for (int t = 0; t < 3; t++) {
        r[t][t] = 1.0;
        r[t][t + 6] = 1.0;
    }
    for (int w = 0; w < 3; w++) {
        r[3 + w][3 + w] = 1.0;
        r[3 + w][9 + w] = 1.0;
    }
    r[4][8] = -L;                                   /* about y: w = -x */
    r[5][7] = L;                                    /* about z: v = +x */
}

static void matvec12(const double a[144], const double x[12], double y[12])
{
    for (int i = 0; i < 12; i++) {
        double s = 0.0;
        for (int j = 0; j < 12; j++)
            s += a[12 * i + j] * x[j];
        y[i] = s;
    }
}

/* Ascending eigenvalues of a symmetric 12x12 (LAPACK dsyev). */
static void eig12(const double a[144], double w[12])
{
    double c[144];
    memcpy(c, a, sizeof c);
    assert_int_equal(LAPACKE_dsyev(LAPACK_ROW_MAJOR, 'N', 'U', 12, c, 12, w), 0);
}

/* A straight member along x: n_el equal elements, 6 DOFs per node, dense n x n. */
typedef struct {
    int n;                 /* DOFs */
    double *K, *B;         /* first and second matrix of a pencil */
    bool *fixed;
} chain;

static void chain_init(chain *c, int n_el)
{
    c->n = 6 * (n_el + 1);
    c->K = calloc((size_t)c->n * (size_t)c->n, sizeof *c->K);
    c->B = calloc((size_t)c->n * (size_t)c->n, sizeof *c->B);
    c->fixed = calloc((size_t)c->n, sizeof *c->fixed);
    assert_non_null(c->K);
    assert_non_null(c->B);
    assert_non_null(c->fixed);
}

static void chain_free(chain *c)
{
    free(c->K);
    free(c->B);
    free(c->fixed);
}

static void chain_add(double *a, int n, int e, const double ae[144])
{
    for (int i = 0; i < 12; i++)
        for (int j = 0; j < 12; j++)
            a[(size_t)(6 * e + i) * (size_t)n + (size_t)(6 * e + j)] += ae[12 * i + j];
}

static void chain_fix(chain *c, int node, const char *dofs)   /* dofs: "xyzXYZ" subset */
{
    static const char names[] = "xyzXYZ";
    for (const char *s = dofs; *s; s++)
        c->fixed[6 * node + (int)(strchr(names, *s) - names)] = true;
}

/* Copy the free-free block of a (n x n) into r; returns its order. */
static int chain_reduce(const chain *c, const double *a, double *r)
{
    int m = 0;
    for (int i = 0; i < c->n; i++)
        if (!c->fixed[i])
            m++;
    int ri = 0;
    for (int i = 0; i < c->n; i++) {
        if (c->fixed[i])
            continue;
        int rj = 0;
        for (int j = 0; j < c->n; j++) {
            if (c->fixed[j])
                continue;
            r[(size_t)ri * (size_t)m + (size_t)rj] = a[(size_t)i * (size_t)c->n + (size_t)j];
            rj++;
        }
        ri++;
    }
    return m;
}

/* Smallest positive lambda of K phi = lambda (-B) phi (B = K_G at unit load), from the
 * largest mu of (-B) phi = mu K phi (dsygv, K positive definite on the free DOFs). */
static double chain_lowest_load_factor(const chain *c)
{
    double *Kr = malloc((size_t)c->n * (size_t)c->n * sizeof *Kr);
    double *Gr = malloc((size_t)c->n * (size_t)c->n * sizeof *Gr);
    double *w = malloc((size_t)c->n * sizeof *w);
    assert_non_null(Kr);
    assert_non_null(Gr);
    assert_non_null(w);
    int m = chain_reduce(c, c->K, Kr);
    chain_reduce(c, c->B, Gr);
    for (int i = 0; i < m * m; i++)
        Gr[i] = -Gr[i];
    assert_int_equal(LAPACKE_dsygv(LAPACK_ROW_MAJOR, 1, 'N', 'U', m, Gr, m, Kr, m, w), 0);
    double mu = w[m - 1];                           /* ascending */
    free(Kr);
    free(Gr);
    free(w);
    assert_true(mu > 0.0);
    return 1.0 / mu;
}

/* Smallest lambda of K phi = lambda B phi, B positive definite on the free DOFs. */
static double chain_lowest_eigenvalue(const chain *c)
{
    double *Kr = malloc((size_t)c->n * (size_t)c->n * sizeof *Kr);
    double *Br = malloc((size_t)c->n * (size_t)c->n * sizeof *Br);
    double *w = malloc((size_t)c->n * sizeof *w);
    assert_non_null(Kr);
    assert_non_null(Br);
    assert_non_null(w);
    int m = chain_reduce(c, c->K, Kr);
    chain_reduce(c, c->B, Br);
    assert_int_equal(LAPACKE_dsygv(LAPACK_ROW_MAJOR, 1, 'N', 'U', m, Kr, m, Br, m, w), 0);
    double lam = w[0];
    free(Kr);
    free(Br);
    free(w);
    return lam;
}

/* Solve the 6x6 system of the end node of one element clamped at its start:
 * k_jj d = load (local), by dposv. */
static void solve_cantilever(const double k[144], const double load[6], double d[6])
{
    double a[36];
    for (int i = 0; i < 6; i++)
        for (int j = 0; j < 6; j++)
            a[6 * i + j] = k[12 * (6 + i) + 6 + j];
    memcpy(d, load, 6 * sizeof *d);
    assert_int_equal(LAPACKE_dposv(LAPACK_ROW_MAJOR, 'U', 6, 1, a, 6, d, 1), 0);
}

/* ---- elastic stiffness -------------------------------------------------------------- */

static void test_elem_k_symmetric_with_exactly_six_rigid_body_modes(void **state)
{
    (void)state;
    const ef_elem_props cases[2] = {props_beam(), props_timoshenko()};
    const double L = 3.7;
    for (int c = 0; c < 2; c++) {
        double k[144], w[12], r[6][12], y[12];
        ef_elem_k_local(&cases[c], L, k);
        assert_symmetric(k, 1e-15 * max_abs(k, 144));
        for (int m = 0; m < 6; m++) {               /* K r = 0 for every rigid motion */
            rigid_modes(L, r);
            matvec12(k, r[m], y);
            assert_true(max_abs(y, 12) <= 1e-14 * max_abs(k, 144) * L);
        }
        eig12(k, w);                                /* PSD, rank 6 */
        const double wmax = w[11];
        for (int i = 0; i < 6; i++)
            assert_true(fabs(w[i]) <= 1e-12 * wmax);
        for (int i = 6; i < 12; i++)
            assert_true(w[i] > 1e-9 * wmax);
    }
}

static void test_elem_k_cantilever_tip_deflections_match_beam_theory(void **state)
{
    (void)state;
    const ef_elem_props p = props_beam();
    const double L = 2.5, P = 1.3e4, T = 2.2e3;
    double k[144], d[6];
    ef_elem_k_local(&p, L, k);

    /* tip force in y: w = P L^3 / (3 E Iz), rotation rz = P L^2 / (2 E Iz)
     * (Gere & Timoshenko, Mechanics of Materials, cantilever table; Roark Table 8.1,
     * from memory) */
    const double fy[6] = {0, P, 0, 0, 0, 0};
    solve_cantilever(k, fy, d);
    assert_rel_close(d[1], P * L * L * L / (3.0 * p.E * p.Iz), 1e-12);
    assert_rel_close(d[5], P * L * L / (2.0 * p.E * p.Iz), 1e-12);
    assert_abs_close(d[2], 0.0, 1e-12 * fabs(d[1]));

    /* tip force in z: same with Iy; the rotation about y is negative (ry = -dw/dx) */
    const double fz[6] = {0, 0, P, 0, 0, 0};
    solve_cantilever(k, fz, d);
    assert_rel_close(d[2], P * L * L * L / (3.0 * p.E * p.Iy), 1e-12);
    assert_rel_close(d[4], -P * L * L / (2.0 * p.E * p.Iy), 1e-12);

    /* axial P L / (E A) and torsion T L / (G J) (any strength-of-materials text) */
    const double fx[6] = {P, 0, 0, T, 0, 0};
    solve_cantilever(k, fx, d);
    assert_rel_close(d[0], P * L / (p.E * p.A), 1e-12);
    assert_rel_close(d[3], T * L / (p.G * p.J), 1e-12);

    /* tip moment about z: w = M L^2 / (2 E Iz), rz = M L / (E Iz) (same table) */
    const double mz[6] = {0, 0, 0, 0, 0, T};
    solve_cantilever(k, mz, d);
    assert_rel_close(d[1], T * L * L / (2.0 * p.E * p.Iz), 1e-12);
    assert_rel_close(d[5], T * L / (p.E * p.Iz), 1e-12);
}

static void test_elem_k_timoshenko_cantilever_adds_shear_deflection(void **state)
{
    (void)state;
    const ef_elem_props p = props_timoshenko();
    const double L = 0.9, P = 5.0e4;                /* short: shear matters */
    double k[144], d[6];
    ef_elem_k_local(&p, L, k);

    /* w = P L^3 / (3 E I) + P L / (G A_s): unit-load method with the shear term
     * (Gere & Timoshenko, Mechanics of Materials, shear deflections of beams; from memory).
     * The rotation of the section at the tip is the bending part only: P L^2 / (2 E I). */
    const double fy[6] = {0, P, 0, 0, 0, 0};
    solve_cantilever(k, fy, d);
    const double wy = P * L * L * L / (3.0 * p.E * p.Iz) + P * L / (p.G * p.Ay);
    assert_rel_close(d[1], wy, 1e-12);
    assert_rel_close(d[5], P * L * L / (2.0 * p.E * p.Iz), 1e-12);
    assert_true(P * L / (p.G * p.Ay) > 0.05 * wy); /* the shear part is not negligible */

    const double fz[6] = {0, 0, P, 0, 0, 0};
    solve_cantilever(k, fz, d);
    assert_rel_close(d[2], P * L * L * L / (3.0 * p.E * p.Iy) + P * L / (p.G * p.Az), 1e-12);
    assert_rel_close(d[4], -P * L * L / (2.0 * p.E * p.Iy), 1e-12);
}

static void test_elem_k_axial_only_has_only_axial_terms(void **state)
{
    (void)state;
    ef_elem_props p = props_beam();
    p.axial_only = true;
    const double L = 4.0;
    double k[144];
    ef_elem_k_local(&p, L, k);
    const double EA_L = p.E * p.A / L;
    for (int i = 0; i < 12; i++)
        for (int j = 0; j < 12; j++) {
            double want = 0.0;
            if ((i == 0 || i == 6) && (j == 0 || j == 6))
                want = i == j ? EA_L : -EA_L;
            assert_true(k[12 * i + j] == want);
        }
}

/* ---- fixed-end forces --------------------------------------------------------------- */

/* Independent reference: fixed-end forces of a clamped-clamped beam in one plane by the
 * force method. The clamp at the end is removed; its force F_j and moment M_j are found
 * from zero deflection and rotation there (unit-load method: bending M m / EI plus shear
 * V v / (G A_s)). The plane has deflection v and section rotation psi (counter-clockwise
 * moments positive); internal moment M = EI psi', shear V = G A_s (v' - psi). */
typedef struct {
    int kind;              /* 0 distributed (qa at a .. qb at b), 1 force at a, 2 moment at a */
    double a, b, qa, qb;
} pl_load;

/* Internal moment and shear at x of the released beam due to the loads beyond x. */
static void pl_beyond(const pl_load *ld, int n, double x, double *M, double *V)
{
    static const double gx[3] = {-0.77459666924148337704, 0.0, 0.77459666924148337704};
    static const double gw[3] = {5.0 / 9.0, 8.0 / 9.0, 5.0 / 9.0};
    *M = *V = 0.0;
    for (int k = 0; k < n; k++) {
        if (ld[k].kind == 1 && ld[k].a > x) {
            *V += ld[k].qa;
            *M += (ld[k].a - x) * ld[k].qa;
        } else if (ld[k].kind == 2 && ld[k].a > x) {
            *M += ld[k].qa;
        } else if (ld[k].kind == 0 && ld[k].b > x) {
            double c = ld[k].a > x ? ld[k].a : x, h = ld[k].b - c;
            for (int g = 0; g < 3; g++) {
                double s = c + 0.5 * h * (1.0 + gx[g]);
                double q = ld[k].qa + (ld[k].qb - ld[k].qa) * (s - ld[k].a) / (ld[k].b - ld[k].a);
                *V += 0.5 * h * gw[g] * q;
                *M += 0.5 * h * gw[g] * q * (s - x);
            }
        }
    }
}

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

/* out = {F_i, M_i, F_j, M_j}: forces the clamps exert on the beam. GAs = 0: no shear
 * deformation. */
static void pl_fixed_end(double L, double EI, double GAs, const pl_load *ld, int n,
                         double out[4])
{
    static const double gx[6] = {-0.93246951420315202781, -0.66120938646626451366,
                                 -0.23861918608319690863, 0.23861918608319690863,
                                 0.66120938646626451366,  0.93246951420315202781};
    static const double gw[6] = {0.17132449237917034504, 0.36076157304813860757,
                                 0.46791393457269104739, 0.46791393457269104739,
                                 0.36076157304813860757, 0.17132449237917034504};
    double bp[2 + 2 * 16];
    int nb = 0;
    bp[nb++] = 0.0;
    bp[nb++] = L;
    for (int k = 0; k < n && k < 16; k++) {
        bp[nb++] = ld[k].a;
        bp[nb++] = ld[k].b;
    }
    qsort(bp, (size_t)nb, sizeof *bp, cmp_double);
    /* integrals over [0, L] of 1, (L-x), (L-x)^2, M0, (L-x) M0, V0 */
    double i1 = 0, ix = 0, ixx = 0, iM = 0, ixM = 0, iV = 0;
    for (int s = 0; s + 1 < nb; s++) {
        double h = bp[s + 1] - bp[s];
        if (!(h > 0.0))
            continue;
        for (int g = 0; g < 6; g++) {
            double x = bp[s] + 0.5 * h * (1.0 + gx[g]), w = 0.5 * h * gw[g], M0, V0;
            pl_beyond(ld, n, x, &M0, &V0);
            i1 += w;
            ix += w * (L - x);
            ixx += w * (L - x) * (L - x);
            iM += w * M0;
            ixM += w * (L - x) * M0;
            iV += w * V0;
        }
    }
    const double s = GAs > 0.0 ? EI / GAs : 0.0;
    /* M(x) = M_j + (L - x) F_j + M0(x), V = F_j + V0:
     *   rotation at j:   M_j i1 + F_j ix + iM = 0
     *   deflection at j: M_j ix + F_j (ixx + s L) + ixM + s iV = 0 */
    const double a11 = i1, a12 = ix, a21 = ix, a22 = ixx + s * L;
    const double b1 = -iM, b2 = -(ixM + s * iV);
    const double det = a11 * a22 - a12 * a21;
    const double Mj = (b1 * a22 - a12 * b2) / det;
    const double Fj = (a11 * b2 - a21 * b1) / det;
    double Mtot, Vtot;                              /* all loads, about x = 0 */
    pl_beyond(ld, n, -1e-300, &Mtot, &Vtot);
    out[2] = Fj;
    out[3] = Mj;
    out[0] = -Fj - Vtot;                            /* sum of forces = 0 */
    out[1] = -Mj - L * Fj - Mtot;                   /* sum of moments about x = 0 */
}

static ef_bload bl_dist(double a, double b, const double qa[3], const double qb[3])
{
    ef_bload l;
    memset(&l, 0, sizeof l);
    l.kind = EF_BLOAD_DIST;
    l.a = a;
    l.b = b;
    memcpy(l.q[0], qa, 3 * sizeof(double));
    memcpy(l.q[1], qb, 3 * sizeof(double));
    return l;
}

static ef_bload bl_point(ef_bload_kind kind, double a, const double v[3])
{
    ef_bload l;
    memset(&l, 0, sizeof l);
    l.kind = kind;
    l.a = l.b = a;
    memcpy(l.q[0], v, 3 * sizeof(double));
    return l;
}

static void test_elem_fef_full_udl_matches_fixed_end_table(void **state)
{
    (void)state;
    const ef_elem_props p = props_beam();
    const double L = 6.0, q = 2.5e3;
    /* uniform q in -y and in -z over the span: reactions q L / 2, end moments q L^2 / 12
     * (Roark, Formulas for Stress and Strain, Table 8.1, both ends fixed; from memory) */
    const double qa[3] = {0.0, -q, -q};
    ef_bload l = bl_dist(0.0, L, qa, qa);
    double fef[12] = {0};
    ef_elem_fef_add(&p, L, &l, fef);
    assert_rel_close(fef[1], q * L / 2.0, 1e-13);
    assert_rel_close(fef[5], q * L * L / 12.0, 1e-13);
    assert_rel_close(fef[7], q * L / 2.0, 1e-13);
    assert_rel_close(fef[11], -q * L * L / 12.0, 1e-13);
    /* x-z plane: the clamp moments about y have the opposite signs (ry = -dw/dx) */
    assert_rel_close(fef[2], q * L / 2.0, 1e-13);
    assert_rel_close(fef[4], -q * L * L / 12.0, 1e-13);
    assert_rel_close(fef[8], q * L / 2.0, 1e-13);
    assert_rel_close(fef[10], q * L * L / 12.0, 1e-13);
    assert_true(fef[0] == 0.0 && fef[3] == 0.0 && fef[6] == 0.0 && fef[9] == 0.0);

    /* the same for a Timoshenko element: symmetric load, shear does not change it
     * (force-method reference below gives the same) */
    const ef_elem_props t = props_timoshenko();
    double fet[12] = {0};
    ef_elem_fef_add(&t, L, &l, fet);
    assert_rel_close(fet[5], q * L * L / 12.0, 1e-12);
    assert_rel_close(fet[7], q * L / 2.0, 1e-12);
}

static void test_elem_fef_off_centre_point_load_matches_fixed_end_table(void **state)
{
    (void)state;
    const ef_elem_props p = props_beam();
    const double L = 5.0, a = 1.5, b = L - a, P = 4.0e3;
    /* P downwards (-y) at a: M_i = P a b^2 / L^2, M_j = P a^2 b / L^2,
     * R_i = P b^2 (3a + b) / L^3, R_j = P a^2 (a + 3b) / L^3 (Roark Table 8.1, both ends
     * fixed, concentrated load; from memory) */
    const double v[3] = {0.0, -P, 0.0};
    ef_bload l = bl_point(EF_BLOAD_POINT, a, v);
    double fef[12] = {0};
    ef_elem_fef_add(&p, L, &l, fef);
    assert_rel_close(fef[5], P * a * b * b / (L * L), 1e-13);
    assert_rel_close(fef[11], -P * a * a * b / (L * L), 1e-13);
    assert_rel_close(fef[1], P * b * b * (3.0 * a + b) / (L * L * L), 1e-13);
    assert_rel_close(fef[7], P * a * a * (a + 3.0 * b) / (L * L * L), 1e-13);

    /* axial force at a on a bar fixed at both ends: shares b/L and a/L (statics plus
     * compatibility, any strength-of-materials text) */
    const double h[3] = {P, 0.0, 0.0};
    ef_bload lx = bl_point(EF_BLOAD_POINT, a, h);
    double fx[12] = {0};
    ef_elem_fef_add(&p, L, &lx, fx);
    assert_rel_close(fx[0], -P * b / L, 1e-13);
    assert_rel_close(fx[6], -P * a / L, 1e-13);
}

static void test_elem_fef_triangular_and_partial_loads_match_tables(void **state)
{
    (void)state;
    const ef_elem_props p = props_beam();
    const double L = 4.0, q = 3.0e3;
    /* triangular, 0 at the start to q (-y) at the end: M_i = q L^2 / 30, M_j = q L^2 / 20,
     * R_i = 3 q L / 20, R_j = 7 q L / 20 (Roark Table 8.1, both ends fixed, uniformly
     * increasing load; from memory) */
    const double q0[3] = {0.0, 0.0, 0.0}, q1[3] = {0.0, -q, 0.0};
    ef_bload tri = bl_dist(0.0, L, q0, q1);
    double fef[12] = {0};
    ef_elem_fef_add(&p, L, &tri, fef);
    assert_rel_close(fef[5], q * L * L / 30.0, 1e-13);
    assert_rel_close(fef[11], -q * L * L / 20.0, 1e-13);
    assert_rel_close(fef[1], 3.0 * q * L / 20.0, 1e-13);
    assert_rel_close(fef[7], 7.0 * q * L / 20.0, 1e-13);

    /* uniform q over the first half: M_i = 11 q L^2 / 192, M_j = 5 q L^2 / 192,
     * R_i = 13 q L / 32, R_j = 3 q L / 32 (standard fixed-end table; from memory) */
    ef_bload half = bl_dist(0.0, L / 2.0, q1, q1);
    double fh[12] = {0};
    ef_elem_fef_add(&p, L, &half, fh);
    assert_rel_close(fh[5], 11.0 * q * L * L / 192.0, 1e-13);
    assert_rel_close(fh[11], -5.0 * q * L * L / 192.0, 1e-13);
    assert_rel_close(fh[1], 13.0 * q * L / 32.0, 1e-13);
    assert_rel_close(fh[7], 3.0 * q * L / 32.0, 1e-13);
}

static void test_elem_fef_concentrated_moment_matches_fixed_end_table(void **state)
{
    (void)state;
    const ef_elem_props p = props_beam();
    const double L = 5.0, a = 1.2, b = L - a, M0 = 7.0e3;
    /* moment M0 about +z at a: end moments M0 b (2a - b) / L^2 and M0 a (2b - a) / L^2,
     * shears 6 M0 a b / L^3 (Roark Table 8.1, both ends fixed, concentrated moment;
     * magnitudes from memory). Signs: at a = L/2 both clamps carry +M0/4 and the shears
     * balance M0 (equilibrium); the force-method reference checks every sign. */
    const double m[3] = {0.0, 0.0, M0};
    ef_bload l = bl_point(EF_BLOAD_MOMENT, a, m);
    double fef[12] = {0};
    ef_elem_fef_add(&p, L, &l, fef);
    assert_rel_close(fef[5], M0 * b * (2.0 * a - b) / (L * L), 1e-12);
    assert_rel_close(fef[11], M0 * a * (2.0 * b - a) / (L * L), 1e-12);
    assert_rel_close(fef[1], 6.0 * M0 * a * b / (L * L * L), 1e-12);
    assert_rel_close(fef[7], -6.0 * M0 * a * b / (L * L * L), 1e-12);
    /* equilibrium of moments about the start: fef_5 + fef_11 + L fef_7 + M0 = 0 */
    assert_abs_close(fef[5] + fef[11] + L * fef[7] + M0, 0.0, 1e-12 * M0);

    const pl_load ref_l = {2, a, a, M0, 0.0};
    double ref[4];
    pl_fixed_end(L, p.E * p.Iz, 0.0, &ref_l, 1, ref);
    assert_rel_close(fef[5], ref[1], 1e-11);
    assert_rel_close(fef[11], ref[3], 1e-11);

    /* torque at a: shares b/L and a/L like the axial bar */
    const double t[3] = {M0, 0.0, 0.0};
    ef_bload lt = bl_point(EF_BLOAD_MOMENT, a, t);
    double ft[12] = {0};
    ef_elem_fef_add(&p, L, &lt, ft);
    assert_rel_close(ft[3], -M0 * b / L, 1e-13);
    assert_rel_close(ft[9], -M0 * a / L, 1e-13);
}

/* A fixed set of mixed loads (all components, all kinds), positions inside [0, L]. */
static int mixed_loads(double L, ef_bload *ld)
{
    int n = 0;
    const double d1a[3] = {1.1e3, -2.3e3, 0.7e3}, d1b[3] = {-0.4e3, 0.9e3, 3.1e3};
    const double d2[3] = {0.5e3, 1.7e3, -1.2e3};
    const double p1[3] = {2.0e3, -5.5e3, 3.3e3}, p2[3] = {-1.0e3, 2.2e3, -4.4e3};
    const double m1[3] = {1.5e3, -2.5e3, 3.5e3}, m2[3] = {-0.8e3, 1.9e3, -2.7e3};
    ld[n++] = bl_dist(0.13 * L, 0.71 * L, d1a, d1b);
    ld[n++] = bl_dist(0.0, L, d2, d2);
    ld[n++] = bl_point(EF_BLOAD_POINT, 0.37 * L, p1);
    ld[n++] = bl_point(EF_BLOAD_POINT, 0.88 * L, p2);
    ld[n++] = bl_point(EF_BLOAD_MOMENT, 0.21 * L, m1);
    ld[n++] = bl_point(EF_BLOAD_MOMENT, 0.64 * L, m2);
    return n;
}

/* Reference fixed-end forces of element loads by the force method, both planes, and
 * the bar/shaft shares for axial force and torque. */
static void reference_fef(const ef_elem_props *p, double L, const ef_bload *ld, int n,
                          double ref[12])
{
    pl_load py[16], pz[16];
    bool timo = p->Ay > 0.0 && p->Az > 0.0;
    memset(ref, 0, 12 * sizeof *ref);
    for (int k = 0; k < n; k++) {
        const ef_bload *l = &ld[k];
        if (l->kind == EF_BLOAD_DIST) {
            py[k] = (pl_load){0, l->a, l->b, l->q[0][1], l->q[1][1]};
            pz[k] = (pl_load){0, l->a, l->b, l->q[0][2], l->q[1][2]};
            /* bar: reaction = -(integral of p (1 - x/L)), -(integral of p x/L) */
            /* trapezoid of the load times the linear shares, in closed form:
             * integral of (pa + (pb - pa) t)(1 - x/L) over [a, b], x = a + t (b - a) */
            const double pa = l->q[0][0], pb = l->q[1][0], h = l->b - l->a;
            const double ia = h * (pa / 2.0 + pb / 2.0);                  /* integral of p */
            const double ix = h * (pa * (l->a / 2.0 + h / 6.0) + pb * (l->a / 2.0 + h / 3.0));
            ref[0] -= ia - ix / L;                  /* integral of p x = ix */
            ref[6] -= ix / L;
        } else if (l->kind == EF_BLOAD_POINT) {
            py[k] = (pl_load){1, l->a, l->a, l->q[0][1], 0.0};
            pz[k] = (pl_load){1, l->a, l->a, l->q[0][2], 0.0};
            ref[0] -= l->q[0][0] * (1.0 - l->a / L);
            ref[6] -= l->q[0][0] * (l->a / L);
        } else {
            /* the x-z plane's psi is -ry: a moment about +y is -M in that plane */
            py[k] = (pl_load){2, l->a, l->a, l->q[0][2], 0.0};
            pz[k] = (pl_load){2, l->a, l->a, -l->q[0][1], 0.0};
            ref[3] -= l->q[0][0] * (1.0 - l->a / L);
            ref[9] -= l->q[0][0] * (l->a / L);
        }
    }
    double ry[4], rz[4];
    pl_fixed_end(L, p->E * p->Iz, timo ? p->G * p->Ay : 0.0, py, n, ry);
    pl_fixed_end(L, p->E * p->Iy, timo ? p->G * p->Az : 0.0, pz, n, rz);
    ref[1] = ry[0];
    ref[5] = ry[1];
    ref[7] = ry[2];
    ref[11] = ry[3];
    ref[2] = rz[0];
    ref[4] = -rz[1];
    ref[8] = rz[2];
    ref[10] = -rz[3];
}

static void test_elem_fef_mixed_loads_match_force_method_for_both_theories(void **state)
{
    (void)state;
    const ef_elem_props cases[2] = {props_beam(), props_timoshenko()};
    const double L = 1.1;                           /* short: Phi ~ 0.1 .. 0.5 */
    for (int c = 0; c < 2; c++) {
        ef_bload ld[8];
        int n = mixed_loads(L, ld);
        double fef[12] = {0}, ref[12];
        for (int k = 0; k < n; k++)
            ef_elem_fef_add(&cases[c], L, &ld[k], fef);
        reference_fef(&cases[c], L, ld, n, ref);
        const double scale = max_abs(ref, 12);
        for (int i = 0; i < 12; i++)
            assert_abs_close(fef[i], ref[i], 1e-11 * scale);
    }
    /* the Timoshenko and Euler-Bernoulli answers differ (the test can tell them apart) */
    ef_bload ld[8];
    int n = mixed_loads(L, ld);
    double fe[12] = {0}, ft[12] = {0};
    const ef_elem_props pe = props_beam(), pt = props_timoshenko();
    for (int k = 0; k < n; k++) {
        ef_elem_fef_add(&pe, L, &ld[k], fe);
        ef_elem_fef_add(&pt, L, &ld[k], ft);
    }
    assert_true(fabs(fe[5] - ft[5]) > 1e-3 * fabs(fe[5]));
}

static void test_elem_fef_timoshenko_point_load_matches_force_method(void **state)
{
    (void)state;
    const ef_elem_props p = props_timoshenko();
    const double L = 0.8, P = 1.0e4;
    for (int k = 1; k < 8; k++) {                   /* load positions along the span */
        const double a = L * k / 8.0;
        const double v[3] = {0.0, -P, P};
        ef_bload l = bl_point(EF_BLOAD_POINT, a, v);
        double fef[12] = {0}, ref[12];
        ef_elem_fef_add(&p, L, &l, fef);
        reference_fef(&p, L, &l, 1, ref);
        for (int i = 0; i < 12; i++)
            assert_abs_close(fef[i], ref[i], 1e-11 * P * L);
        if (k == 4)                                 /* mid-span: P L / 8 as without shear */
            assert_rel_close(fef[5], P * L / 8.0, 1e-12);
    }
}

static void test_elem_fef_axial_only_gives_simple_span_shares(void **state)
{
    (void)state;
    ef_elem_props p = props_beam();
    p.axial_only = true;
    const double L = 3.0, a = 1.0, P = 900.0, q = 120.0;
    const double v[3] = {P, -P, 2.0 * P};
    ef_bload l = bl_point(EF_BLOAD_POINT, a, v);
    double fef[12] = {0};
    ef_elem_fef_add(&p, L, &l, fef);
    /* simple span: reactions P (L - a)/L and P a/L (statics), no moments */
    const double bi = (L - a) / L, bj = a / L;
    const double want[12] = {-P * bi, P * bi, -2.0 * P * bi, 0, 0, 0,
                             -P * bj, P * bj, -2.0 * P * bj, 0, 0, 0};
    for (int i = 0; i < 12; i++)
        assert_abs_close(fef[i], want[i], 1e-12 * P);

    /* uniform q (-y): qL/2 each end */
    const double qq[3] = {0.0, -q, 0.0};
    ef_bload u = bl_dist(0.0, L, qq, qq);
    double fu[12] = {0};
    ef_elem_fef_add(&p, L, &u, fu);
    assert_rel_close(fu[1], q * L / 2.0, 1e-13);
    assert_rel_close(fu[7], q * L / 2.0, 1e-13);
    assert_true(fu[5] == 0.0 && fu[11] == 0.0);

    /* moment about z at a: simple-span couple -+M/L (statics) */
    const double m[3] = {0.0, 0.0, P};
    ef_bload lm = bl_point(EF_BLOAD_MOMENT, a, m);
    double fm[12] = {0};
    ef_elem_fef_add(&p, L, &lm, fm);
    assert_rel_close(fm[1], P / L, 1e-13);
    assert_rel_close(fm[7], -P / L, 1e-13);
}

/* ---- internal forces ---------------------------------------------------------------- */

static void test_elem_cut_forces_match_end_forces_at_both_ends(void **state)
{
    (void)state;
    const ef_elem_props cases[2] = {props_beam(), props_timoshenko()};
    const double L = 2.3;
    /* arbitrary displacements; f = k d + f_fixed is a set of end forces in equilibrium
     * with the loads */
    const double d[12] = {1e-3, -2e-3, 3e-3, 4e-3, -5e-3, 6e-3,
                          -7e-4, 8e-4, -9e-4, 1e-3, 2e-3, -3e-3};
    for (int c = 0; c < 2; c++) {
        ef_bload ld[8];
        int n = mixed_loads(L, ld);
        double k[144], f[12] = {0}, kd[12], out[6];
        for (int i = 0; i < n; i++)
            ef_elem_fef_add(&cases[c], L, &ld[i], f);
        ef_elem_k_local(&cases[c], L, k);
        matvec12(k, d, kd);
        for (int i = 0; i < 12; i++)
            f[i] += kd[i];
        const double scale = max_abs(f, 12);
        ef_elem_cut_forces(f, ld, n, 0.0, out);
        for (int i = 0; i < 6; i++)
            assert_abs_close(out[i], -f[i], 1e-13 * scale);
        ef_elem_cut_forces(f, ld, n, L, out);
        for (int i = 0; i < 6; i++)
            assert_abs_close(out[i], f[6 + i], 1e-11 * scale);
    }
}

static void test_elem_cut_forces_give_simple_beam_midspan_moment(void **state)
{
    (void)state;
    /* simply supported span, UDL q (-y): start end force +qL/2 (upwards), no moment;
     * at mid-span Mz = q L^2 / 8 (sagging: bottom fibre (-y) in tension, Mz > 0 with
     * sigma = -Mz y / Iz), Vy = 0; at L/4 Vy = -qL/4 and Mz = 3 q L^2 / 32
     * (any beam table, from memory) */
    const double L = 8.0, q = 1.5e3;
    const double qq[3] = {0.0, -q, 0.0};
    ef_bload u = bl_dist(0.0, L, qq, qq);
    const double fs[6] = {0.0, q * L / 2.0, 0.0, 0.0, 0.0, 0.0};
    double out[6];
    ef_elem_cut_forces(fs, &u, 1, L / 2.0, out);
    assert_rel_close(out[5], q * L * L / 8.0, 1e-13);
    assert_abs_close(out[1], 0.0, 1e-12 * q * L);
    ef_elem_cut_forces(fs, &u, 1, L / 4.0, out);
    assert_rel_close(out[5], 3.0 * q * L * L / 32.0, 1e-13);
    /* shear on the part before the cut from the part beyond: it carries the load
     * q L/4 of [0, L/4] net of the support force q L/2, i.e. -(qL/2 - qL/4) */
    assert_rel_close(out[1], -q * L / 4.0, 1e-13);
}

static void test_elem_cut_forces_include_a_point_load_exactly_at_the_cut(void **state)
{
    (void)state;
    const double P = 100.0;                         /* at a = 1 on a span of 4 */
    const double v[3] = {0.0, -P, 0.0};
    ef_bload l = bl_point(EF_BLOAD_POINT, 1.0, v);
    const double fs[6] = {0.0, 0.75 * P, 0.0, 0.0, 0.0, 0.0}; /* simple span share */
    double before[6], at[6], after[6];
    ef_elem_cut_forces(fs, &l, 1, 1.0 - 1e-9, before);
    ef_elem_cut_forces(fs, &l, 1, 1.0, at);
    ef_elem_cut_forces(fs, &l, 1, 1.0 + 1e-9, after);
    assert_rel_close(before[1], -0.75 * P, 1e-12);
    assert_rel_close(at[1], 0.25 * P, 1e-12);       /* a <= x: included */
    assert_rel_close(after[1], 0.25 * P, 1e-12);
    assert_rel_close(at[5], 0.75 * P * 1.0, 1e-12); /* the moment is continuous */
}

/* ---- geometric stiffness ------------------------------------------------------------ */

/* End forces of an element carrying axial force N (tension +) and nothing else. */
static void axial_forces(double N, double f[12])
{
    memset(f, 0, 12 * sizeof *f);
    f[0] = -N;
    f[6] = N;
}

static double column_factor(int n_el, double L, bool cantilever)
{
    const ef_elem_props p = props_beam();
    const double le = L / n_el;
    chain c;
    chain_init(&c, n_el);
    double k[144], kg[144], f[12];
    axial_forces(-1.0, f);                          /* unit compression */
    ef_elem_k_local(&p, le, k);
    ef_elem_kg_local(&p, le, f, false, kg);
    for (int e = 0; e < n_el; e++) {
        chain_add(c.K, c.n, e, k);
        chain_add(c.B, c.n, e, kg);
    }
    if (cantilever) {
        chain_fix(&c, 0, "xyzXYZ");
    } else {
        chain_fix(&c, 0, "xyzX");
        chain_fix(&c, n_el, "yzX");
    }
    double P = chain_lowest_load_factor(&c);
    chain_free(&c);
    /* weak axis Iz, bending in x-y */
    const double Pe = PI * PI * p.E * p.Iz / (L * L);
    return P / (cantilever ? Pe / 4.0 : Pe);
}

static void test_elem_kg_pinned_column_converges_as_the_method_note_says(void **state)
{
    (void)state;
    /* Euler load pi^2 E I / L^2; consistent-K_G ratios 1.2159 / 1.0075 / 1.0005 /
     * 1.00003 for 1 / 2 / 4 / 8 elements (dynamics-and-stability-methods.md section 6,
     * item 3, [D]); one element gives 12 E I / L^2 exactly (12 / pi^2). */
    assert_rel_close(column_factor(1, 5.0, false), 12.0 / (PI * PI), 1e-10);
    assert_rel_close(column_factor(1, 5.0, false), 1.2159, 1e-4);
    assert_rel_close(column_factor(2, 5.0, false), 1.0075, 1e-4);
    assert_rel_close(column_factor(4, 5.0, false), 1.0005, 1e-4);
    assert_rel_close(column_factor(8, 5.0, false), 1.00003, 1e-5);
    /* cantilever pi^2 E I / (4 L^2): 1.0075 with one element (same note) */
    assert_rel_close(column_factor(1, 5.0, true), 1.0075, 1e-4);
    assert_rel_close(column_factor(2, 5.0, true), 1.0005, 1e-4);
}

static void test_elem_kg_torsional_term_gives_torsional_buckling_load(void **state)
{
    (void)state;
    /* Column without warping stiffness: torsional buckling at N = G J A / Ip
     * (Timoshenko & Gere, Theory of Elastic Stability, ch. 5, with C1 = 0; from memory;
     * also the method note section 3). Flexural modes pushed away by large Iy, Iz. */
    ef_elem_props p = props_beam();
    p.Iy = p.Iz = 1.0;
    const int n_el = 3;
    const double L = 3.0;
    chain c;
    chain_init(&c, n_el);
    double k[144], kg[144], f[12];
    axial_forces(-1.0, f);
    ef_elem_k_local(&p, L / n_el, k);
    ef_elem_kg_local(&p, L / n_el, f, false, kg);
    for (int e = 0; e < n_el; e++) {
        chain_add(c.K, c.n, e, k);
        chain_add(c.B, c.n, e, kg);
    }
    chain_fix(&c, 0, "xyzX");
    chain_fix(&c, n_el, "yzX");
    assert_rel_close(chain_lowest_load_factor(&c), p.G * p.J * p.A / p.Ip, 1e-10);
    chain_free(&c);
}

/* Lateral-torsional buckling of a fork-supported beam under uniform moment about its
 * strong axis. strong_y: moment about y (Iy strong, lateral bending in x-y with Iz);
 * else moment about z. Returns M_cr / ((pi/L) sqrt(E I_weak G J)). */
static double ltb_ratio(int n_el, bool strong_y)
{
    ef_elem_props p = props_beam();
    /* narrow rectangle 20 x 200 mm: J = h t^3 / 3 (Timoshenko & Gere, section 6.2) */
    const double t = 0.02, h = 0.2, L = 4.0;
    p.A = t * h;
    p.J = h * t * t * t / 3.0;
    const double I_strong = t * h * h * h / 12.0, I_weak = h * t * t * t / 12.0;
    p.Iy = strong_y ? I_strong : I_weak;
    p.Iz = strong_y ? I_weak : I_strong;
    p.Ip = p.Iy + p.Iz;
    const double le = L / n_el;
    chain c;
    chain_init(&c, n_el);
    double k[144], kg[144], f[12] = {0};
    /* unit uniform moment: internal moment +1 along the span, no shear */
    f[strong_y ? 4 : 5] = -1.0;
    f[strong_y ? 10 : 11] = 1.0;
    ef_elem_k_local(&p, le, k);
    ef_elem_kg_local(&p, le, f, false, kg);
    for (int e = 0; e < n_el; e++) {
        chain_add(c.K, c.n, e, k);
        chain_add(c.B, c.n, e, kg);
    }
    chain_fix(&c, 0, "xyzX");                       /* fork supports */
    chain_fix(&c, n_el, "yzX");
    const double M = chain_lowest_load_factor(&c);
    chain_free(&c);
    return M / ((PI / L) * sqrt(p.E * I_weak * p.G * p.J));
}

static void test_elem_kg_lateral_torsional_buckling_converges_to_uniform_moment_value(void **state)
{
    (void)state;
    /* M_cr = (pi / L) sqrt(E I_weak G J) (Timoshenko & Gere, Theory of Elastic
     * Stability, section 6.2, narrow rectangular beam in pure bending) */
    for (int s = 0; s < 2; s++) {
        double r4 = ltb_ratio(4, s == 0), r8 = ltb_ratio(8, s == 0);
        double r16 = ltb_ratio(16, s == 0);
        assert_rel_close(r8, 1.0, 1e-2);            /* 8 el.: +0.64 % */
        assert_rel_close(r16, 1.0, 2e-3);           /* 16 el.: +0.16 % */
        assert_true(fabs(r16 - 1.0) < fabs(r8 - 1.0));  /* converging */
        assert_true(fabs(r8 - 1.0) < fabs(r4 - 1.0));
    }
}

/* Shaft of circular section under torque T alone, n_el elements; `clamped`: both ends
 * fully fixed, else pinned (translations and twist fixed, bending rotations free).
 * Returns T_cr L / (E I). */
static double shaft_factor(int n_el, bool clamped)
{
    ef_elem_props p = props_beam();
    p.Iy = p.Iz = 3.0e-5;
    const double L = 6.0, le = L / n_el;
    chain c;
    chain_init(&c, n_el);
    double k[144], kg[144], f[12] = {0};
    f[3] = -1.0;                                    /* unit internal torque */
    f[9] = 1.0;
    ef_elem_k_local(&p, le, k);
    ef_elem_kg_local(&p, le, f, false, kg);
    for (int e = 0; e < n_el; e++) {
        chain_add(c.K, c.n, e, k);
        chain_add(c.B, c.n, e, kg);
    }
    chain_fix(&c, 0, clamped ? "xyzXYZ" : "xyzX");
    chain_fix(&c, n_el, clamped ? "xyzXYZ" : "yzX");
    const double T = chain_lowest_load_factor(&c);
    chain_free(&c);
    return T * L / (p.E * p.Iy);
}

static void test_elem_kg_torque_buckles_a_clamped_shaft_at_greenhill_value(void **state)
{
    (void)state;
    /* clamped-clamped shaft: T_cr = s E I / L with tan(s/2) = s/2, s = 8.98682
     * (Ziegler, Principles of Structural Stability, Greenhill's problem with clamped ends;
     * from memory; [D] in docs/element.md). Here the end conditions do not depend on how
     * the torque turns, so the value is unambiguous. */
    assert_rel_close(shaft_factor(32, true), 8.986818916, 2e-5);   /* 32 el.: 9e-6 */
    /* pinned ends, semitangential torque: tan(s/2) = -s/6, s = 4.91129 [D] */
    assert_rel_close(shaft_factor(32, false), 4.911287726, 2e-6);  /* 32 el.: 7e-7 */
}

/* Equilibrated end forces: N, torque T, end moments; shears from moment equilibrium. */
static void equilibrated_forces(double L, double f[12])
{
    memset(f, 0, 12 * sizeof *f);
    f[6] = 3.1e3;
    f[0] = -f[6];
    f[9] = 1.7e3;
    f[3] = -f[9];
    f[4] = 2.3e3;
    f[10] = -4.1e3;
    f[5] = -5.2e3;
    f[11] = 6.7e3;
    f[7] = -(f[5] + f[11]) / L;                     /* sum Mz about start = 0 */
    f[1] = -f[7];
    f[8] = (f[4] + f[10]) / L;                      /* sum My about start = 0 */
    f[2] = -f[8];
}

static void test_elem_kg_rigid_rotation_turns_forces_and_half_turns_moments(void **state)
{
    (void)state;
    /* Rigid-body rule [D, docs/element.md]: K_G r = w x F at each node for the forces and
     * (1/2) w x M for the moments (semitangential moments; cf. Yang & Kuo, Theory and
     * Analysis of Nonlinear Framed Structures, 1994, rigid-body rule; from memory). */
    const ef_elem_props cases[2] = {props_beam(), props_timoshenko()};
    const double L = 2.9;
    double f[12], kg[144], r[6][12], y[12];
    equilibrated_forces(L, f);
    rigid_modes(L, r);
    for (int c = 0; c < 2; c++) {
        ef_elem_kg_local(&cases[c], L, f, false, kg);
        assert_symmetric(kg, 1e-15 * max_abs(kg, 144));
        for (int m = 0; m < 3; m++) {               /* translations: no forces */
            matvec12(kg, r[m], y);
            assert_true(max_abs(y, 12) <= 1e-12 * max_abs(f, 12));
        }
        for (int ax = 0; ax < 3; ax++) {
            double w[3] = {0, 0, 0};
            w[ax] = 1.0;
            matvec12(kg, r[3 + ax], y);
            for (int node = 0; node < 2; node++) {
                const double *F = f + 6 * node, *M = f + 6 * node + 3;
                const double wF[3] = {w[1] * F[2] - w[2] * F[1], w[2] * F[0] - w[0] * F[2],
                                      w[0] * F[1] - w[1] * F[0]};
                const double wM[3] = {w[1] * M[2] - w[2] * M[1], w[2] * M[0] - w[0] * M[2],
                                      w[0] * M[1] - w[1] * M[0]};
                for (int i = 0; i < 3; i++) {
                    assert_abs_close(y[6 * node + i], wF[i], 1e-11 * max_abs(f, 12));
                    assert_abs_close(y[6 * node + 3 + i], 0.5 * wM[i], 1e-11 * max_abs(f, 12));
                }
            }
        }
    }
}

static void test_elem_kg_chord_only_and_axial_only_have_string_terms_only(void **state)
{
    (void)state;
    ef_elem_props p = props_beam();
    const double L = 2.0;
    double f[12], kg[144];
    equilibrated_forces(L, f);
    for (int variant = 0; variant < 2; variant++) {
        p.axial_only = variant == 1;
        ef_elem_kg_local(&p, L, f, variant == 0, kg);
        /* string stiffness (N/L)[1 -1; -1 1] on uy and uz, nothing else (method note
         * section 3, (N/L)(I - e e^T) in local axes) */
        const double s = f[6] / L;
        for (int i = 0; i < 12; i++)
            for (int j = 0; j < 12; j++) {
                double want = 0.0;
                int ti = i % 6, tj = j % 6;
                if (ti == tj && (ti == 1 || ti == 2))
                    want = (i == j) ? s : -s;
                assert_true(kg[12 * i + j] == want);
            }
    }
}

static void test_elem_kg_axial_part_matches_consistent_matrix(void **state)
{
    (void)state;
    /* pure axial force: (N / 30 L)[36 3L -36 3L; 3L 4L^2 -3L -L^2; ...] in both planes
     * and N Ip / (A L) on the twist (McGuire, Gallagher & Ziemian, Matrix Structural
     * Analysis, 2nd ed., 2000, ch. 9; Przemieniecki 1968; from memory) */
    const ef_elem_props p = props_timoshenko();     /* the same K_G for both theories */
    const double L = 1.7, N = -2.5e4;
    double f[12], kg[144];
    axial_forces(N, f);
    ef_elem_kg_local(&p, L, f, false, kg);
    assert_rel_close(kg[12 * 1 + 1], 6.0 * N / (5.0 * L), 1e-14);
    assert_rel_close(kg[12 * 1 + 5], N / 10.0, 1e-14);
    assert_rel_close(kg[12 * 2 + 4], -N / 10.0, 1e-14);
    assert_rel_close(kg[12 * 5 + 5], 2.0 * N * L / 15.0, 1e-14);
    assert_rel_close(kg[12 * 5 + 11], -N * L / 30.0, 1e-14);
    assert_rel_close(kg[12 * 4 + 10], -N * L / 30.0, 1e-14);
    assert_rel_close(kg[12 * 1 + 7], -6.0 * N / (5.0 * L), 1e-14);
    assert_rel_close(kg[12 * 3 + 3], N * p.Ip / (p.A * L), 1e-14);
    assert_rel_close(kg[12 * 3 + 9], -N * p.Ip / (p.A * L), 1e-14);
    assert_true(kg[0] == 0.0);                      /* no axial-axial term */
}

/* ---- mass ----------------------------------------------------------------------------- */

static void test_elem_m_rigid_motions_carry_the_whole_mass(void **state)
{
    (void)state;
    const double L = 2.7;
    for (int variant = 0; variant < 4; variant++) {
        ef_elem_props p = props_beam();
        p.axial_only = variant >= 2;
        bool lumped = variant % 2 == 1;
        double m[144], r[6][12], y[12];
        ef_elem_m_local(&p, L, lumped, m);
        assert_symmetric(m, 1e-15 * max_abs(m, 144));
        rigid_modes(L, r);
        for (int t = 0; t < 3; t++) {               /* r^T M r = m L (kinetic energy) */
            matvec12(m, r[t], y);
            double e = 0.0;
            for (int i = 0; i < 12; i++)
                e += r[t][i] * y[i];
            assert_rel_close(e, p.mass * L, 1e-14);
        }
        if (!p.axial_only) {                        /* spin about x: rot_mass L */
            matvec12(m, r[3], y);
            assert_rel_close(y[3] + y[9], p.rot_mass * L, 1e-14);
        }
        double w[12];
        eig12(m, w);
        assert_true(w[0] >= -1e-14 * w[11]);        /* positive semidefinite */
        if (!lumped && !p.axial_only)
            assert_true(w[0] > 0.0);                /* consistent: positive definite */
    }
}

static void test_elem_m_lumped_puts_half_the_mass_at_each_end(void **state)
{
    (void)state;
    /* m L / 2 per translation and rot_mass L / 2 on rx at each end, nothing on ry, rz
     * (tributary halves, common practice; the contract in element.h) */
    const ef_elem_props p = props_beam();
    const double L = 3.0;
    double m[144];
    ef_elem_m_local(&p, L, true, m);
    double total = 0.0;
    for (int i = 0; i < 12; i++)
        for (int j = 0; j < 12; j++) {
            if (i != j)
                assert_true(m[12 * i + j] == 0.0);
        }
    for (int i = 0; i < 3; i++) {
        assert_rel_close(m[12 * i + i], p.mass * L / 2.0, 1e-15);
        assert_rel_close(m[12 * (i + 6) + i + 6], p.mass * L / 2.0, 1e-15);
        total += m[12 * i + i] + m[12 * (i + 6) + i + 6];
    }
    assert_rel_close(total, 3.0 * p.mass * L, 1e-15);
    assert_rel_close(m[12 * 3 + 3], p.rot_mass * L / 2.0, 1e-15);
    assert_true(m[12 * 4 + 4] == 0.0 && m[12 * 5 + 5] == 0.0);
}

static void test_elem_m_cantilever_first_frequency_with_eight_elements(void **state)
{
    (void)state;
    /* omega_1 = lambda^2 sqrt(E I / (m L^4)), lambda = 1.87510 the first root of
     * cos(l) cosh(l) + 1 = 0 (Blevins, Formulas for Natural Frequency and Mode Shape,
     * Table 8-1, clamped-free). The root is recomputed here by Newton. */
    double lam = 1.875;
    for (int it = 0; it < 50; it++) {
        double g = cos(lam) * cosh(lam) + 1.0;
        double dg = -sin(lam) * cosh(lam) + cos(lam) * sinh(lam);
        lam -= g / dg;
    }
    assert_rel_close(lam, 1.87510407, 1e-8);

    const ef_elem_props p = props_beam();
    const int n_el = 8;
    const double L = 6.0;
    chain c;
    chain_init(&c, n_el);
    double k[144], m[144];
    ef_elem_k_local(&p, L / n_el, k);
    ef_elem_m_local(&p, L / n_el, false, m);
    for (int e = 0; e < n_el; e++) {
        chain_add(c.K, c.n, e, k);
        chain_add(c.B, c.n, e, m);
    }
    chain_fix(&c, 0, "xyzXYZ");
    const double omega = sqrt(chain_lowest_eigenvalue(&c));
    chain_free(&c);
    const double want = lam * lam * sqrt(p.E * p.Iz / (p.mass * L * L * L * L)); /* Iz weak */
    assert_rel_close(omega, want, 1e-3);
    assert_true(omega >= want);                     /* consistent mass: upper bound */
}

/* ---- end releases --------------------------------------------------------------------- */

#define REL_RZ 32u
#define REL_RX 8u
#define REL_UX 1u

static void test_elem_release_propped_cantilever_gives_known_end_moment(void **state)
{
    (void)state;
    const ef_elem_props p = props_beam();
    const double L = 5.0, q = 2.0e3;
    double k[144], T[144], R[144], kc[144], fef[12] = {0}, fc[12];
    ef_elem_k_local(&p, L, k);
    assert_true(ef_elem_release_map(k, 0u, REL_RZ, T, R));
    ef_elem_congruence(T, k, kc);

    /* clamped at the start, hinged at the end: UDL (-y) gives M = q L^2 / 8 at the clamp,
     * reactions 5 q L / 8 and 3 q L / 8 (Roark Table 8.1, left fixed right simply
     * supported; from memory). Condensed fixed-end forces: T^T f_fixed. */
    const double qq[3] = {0.0, -q, 0.0};
    ef_bload u = bl_dist(0.0, L, qq, qq);
    ef_elem_fef_add(&p, L, &u, fef);
    for (int i = 0; i < 12; i++) {
        double s = 0.0;
        for (int j = 0; j < 12; j++)
            s += T[12 * j + i] * fef[j];
        fc[i] = s;
    }
    assert_rel_close(fc[5], q * L * L / 8.0, 1e-13);
    assert_rel_close(fc[1], 5.0 * q * L / 8.0, 1e-13);
    assert_rel_close(fc[7], 3.0 * q * L / 8.0, 1e-13);
    assert_abs_close(fc[11], 0.0, 1e-13 * q * L * L);
    /* end rotation recovered from R: with both nodes fixed, rz_j = R f_fixed; the propped
     * cantilever's end slope is q L^3 / (48 E I) (same table); the span sags (-y) and
     * rises to the hinge, so rz_j > 0 */
    double u_rel = 0.0;
    for (int j = 0; j < 12; j++)
        u_rel += R[12 * 11 + j] * fef[j];
    assert_rel_close(u_rel, q * L * L * L / (48.0 * p.E * p.Iz), 1e-12);

    /* stiffness: tip force stiffness 3 E I / L^3, start rotational stiffness 3 E I / L
     * (far end hinged; any stiffness table) */
    assert_rel_close(kc[12 * 7 + 7], 3.0 * p.E * p.Iz / (L * L * L), 1e-12);
    assert_rel_close(kc[12 * 5 + 5], 3.0 * p.E * p.Iz / L, 1e-12);
    /* the other plane and the released column are untouched / zero */
    assert_rel_close(kc[12 * 4 + 4], 4.0 * p.E * p.Iy / L, 1e-12);
    for (int i = 0; i < 12; i++)
        assert_true(kc[12 * i + 11] == 0.0 && kc[12 * 11 + i] == 0.0);
}

static void test_elem_release_hinged_both_ends_gives_simple_span(void **state)
{
    (void)state;
    const ef_elem_props cases[2] = {props_beam(), props_timoshenko()};
    const double L = 4.0, q = 1.0e3;
    for (int c = 0; c < 2; c++) {
        const ef_elem_props *p = &cases[c];
        double k[144], T[144], R[144], fef[12] = {0}, fc[12];
        ef_elem_k_local(p, L, k);
        assert_true(ef_elem_release_map(k, REL_RZ, REL_RZ, T, R));
        const double qq[3] = {0.0, -q, 0.0};
        ef_bload u = bl_dist(0.0, L, qq, qq);
        ef_elem_fef_add(p, L, &u, fef);
        for (int i = 0; i < 12; i++) {
            double s = 0.0;
            for (int j = 0; j < 12; j++)
                s += T[12 * j + i] * fef[j];
            fc[i] = s;
        }
        /* simple span: shears q L / 2, no end moments (statics) */
        assert_rel_close(fc[1], q * L / 2.0, 1e-12);
        assert_rel_close(fc[7], q * L / 2.0, 1e-12);
        assert_abs_close(fc[5], 0.0, 1e-12 * q * L * L);
        assert_abs_close(fc[11], 0.0, 1e-12 * q * L * L);
        /* end slopes -+ q L^3 / (24 E I) (simple beam table; for the Timoshenko beam the
         * shear strain is antisymmetric and the section rotation at the ends is the same
         * [D]) */
        double ri = 0.0, rj = 0.0;
        for (int j = 0; j < 12; j++) {
            ri += R[12 * 5 + j] * fef[j];
            rj += R[12 * 11 + j] * fef[j];
        }
        const double slope = q * L * L * L / (24.0 * p->E * p->Iz);
        assert_rel_close(ri, -slope, 1e-12);
        assert_rel_close(rj, slope, 1e-12);
    }
}

static void test_elem_release_condensed_k_is_symmetric_and_keeps_rigid_modes(void **state)
{
    (void)state;
    const unsigned masks[][2] = {{REL_RZ, 0u}, {0u, REL_RZ | 16u}, {REL_RZ | 16u, REL_RZ | 16u},
                                 {REL_RX, 0u}, {REL_RZ | 16u | REL_RX, REL_RZ}, {2u, 0u},
                                 {63u, 0u}};
    const ef_elem_props cases[2] = {props_beam(), props_timoshenko()};
    const double L = 3.3;
    for (int c = 0; c < 2; c++)
        for (size_t s = 0; s < sizeof masks / sizeof masks[0]; s++) {
            double k[144], T[144], R[144], kc[144], w[12], r[6][12], y[12];
            ef_elem_k_local(&cases[c], L, k);
            assert_true(ef_elem_release_map(k, masks[s][0], masks[s][1], T, R));
            ef_elem_congruence(T, k, kc);
            assert_symmetric(kc, 1e-13 * max_abs(k, 144));
            rigid_modes(L, r);
            for (int m = 0; m < 6; m++) {
                matvec12(kc, r[m], y);
                assert_true(max_abs(y, 12) <= 1e-11 * max_abs(k, 144) * L);
            }
            int n_rel = 0;
            for (int b = 0; b < 6; b++)
                n_rel += (int)((masks[s][0] >> b) & 1u) + (int)((masks[s][1] >> b) & 1u);
            eig12(kc, w);
            const double kmax = max_abs(k, 144);
            for (int i = 0; i < 6 + n_rel; i++)     /* rigid modes + released columns */
                assert_true(fabs(w[i]) <= 1e-10 * kmax);
            for (int i = 6 + n_rel; i < 12; i++)
                assert_true(w[i] > 1e-9 * w[11]);
        }
}

static void test_elem_release_mechanism_is_refused(void **state)
{
    (void)state;
    const ef_elem_props p = props_beam();
    double k[144], T[144], R[144];
    ef_elem_k_local(&p, 2.0, k);
    /* twist released at both ends, axial released at both ends, a whole free end plus
     * the other end's deflection: each lets the element move without strain */
    assert_false(ef_elem_release_map(k, REL_RX, REL_RX, T, R));
    assert_false(ef_elem_release_map(k, REL_UX, REL_UX, T, R));
    assert_false(ef_elem_release_map(k, 2u | REL_RZ, 2u, T, R));
    assert_false(ef_elem_release_map(k, 63u, 63u, T, R));
    for (int i = 0; i < 144; i++)
        assert_true(T[i] == 0.0 && R[i] == 0.0);
    /* axial_only: any bending release meets a zero diagonal */
    ef_elem_props a = p;
    a.axial_only = true;
    ef_elem_k_local(&a, 2.0, k);
    assert_false(ef_elem_release_map(k, REL_RZ, 0u, T, R));
    /* no release: identity */
    ef_elem_k_local(&p, 2.0, k);
    assert_true(ef_elem_release_map(k, 0u, 0u, T, R));
    for (int i = 0; i < 12; i++)
        for (int j = 0; j < 12; j++)
            assert_true(T[12 * i + j] == (i == j ? 1.0 : 0.0) && R[12 * i + j] == 0.0);
}

/* ---- rotation to global axes ----------------------------------------------------------- */

/* An orthonormal, right-handed frame with local x along (1, 2, 2)/3. */
static void skew_axes(double ax[3][3])
{
    const double x[3] = {1.0 / 3.0, 2.0 / 3.0, 2.0 / 3.0};
    double y[3] = {-2.0, 1.0, 0.0};
    double n = sqrt(5.0);
    for (int i = 0; i < 3; i++)
        y[i] /= n;
    const double z[3] = {x[1] * y[2] - x[2] * y[1], x[2] * y[0] - x[0] * y[2],
                         x[0] * y[1] - x[1] * y[0]};
    for (int i = 0; i < 3; i++) {
        ax[0][i] = x[i];
        ax[1][i] = y[i];
        ax[2][i] = z[i];
    }
}

static void test_elem_rotated_cantilever_gives_the_same_tip_deflection(void **state)
{
    (void)state;
    const ef_elem_props p = props_timoshenko();
    const double L = 2.2, P = 3.0e3, Mt = 500.0;
    double ax[3][3], k[144], kg_[144], fl[12] = {0}, fg[12], dg[12] = {0}, dl[12], d[6];
    skew_axes(ax);
    ef_elem_k_local(&p, L, k);
    ef_elem_to_global(ax, k, kg_);
    assert_symmetric(kg_, 1e-14 * max_abs(kg_, 144));
    fl[7] = P;                                      /* local tip force y, z, torque */
    fl[8] = -0.5 * P;
    fl[9] = Mt;
    ef_elem_vec_to_global(ax, fl, fg);
    solve_cantilever(kg_, fg + 6, d);
    memcpy(dg + 6, d, sizeof d);
    ef_elem_vec_to_local(ax, dg, dl);
    /* cantilever formulas as above (bending + shear; torsion) */
    assert_rel_close(dl[7], P * L * L * L / (3.0 * p.E * p.Iz) + P * L / (p.G * p.Ay), 1e-10);
    assert_rel_close(dl[8], -0.5 * P * (L * L * L / (3.0 * p.E * p.Iy) + L / (p.G * p.Az)),
                     1e-10);
    assert_rel_close(dl[9], Mt * L / (p.G * p.J), 1e-10);
    assert_abs_close(dl[6], 0.0, 1e-10 * fabs(dl[7]));

    /* round trip and invariance of the spectrum */
    double back[12], w1[12], w2[12];
    ef_elem_vec_to_local(ax, fg, back);
    for (int i = 0; i < 12; i++)
        assert_abs_close(back[i], fl[i], 1e-12 * P);
    eig12(k, w1);
    eig12(kg_, w2);
    for (int i = 0; i < 12; i++)                    /* dsyev: accurate to eps |K| */
        assert_abs_close(w2[i], w1[i], 1e-12 * w1[11]);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_elem_k_symmetric_with_exactly_six_rigid_body_modes),
        cmocka_unit_test(test_elem_k_cantilever_tip_deflections_match_beam_theory),
        cmocka_unit_test(test_elem_k_timoshenko_cantilever_adds_shear_deflection),
        cmocka_unit_test(test_elem_k_axial_only_has_only_axial_terms),
        cmocka_unit_test(test_elem_fef_full_udl_matches_fixed_end_table),
        cmocka_unit_test(test_elem_fef_off_centre_point_load_matches_fixed_end_table),
        cmocka_unit_test(test_elem_fef_triangular_and_partial_loads_match_tables),
        cmocka_unit_test(test_elem_fef_concentrated_moment_matches_fixed_end_table),
        cmocka_unit_test(test_elem_fef_mixed_loads_match_force_method_for_both_theories),
        cmocka_unit_test(test_elem_fef_timoshenko_point_load_matches_force_method),
        cmocka_unit_test(test_elem_fef_axial_only_gives_simple_span_shares),
        cmocka_unit_test(test_elem_cut_forces_match_end_forces_at_both_ends),
        cmocka_unit_test(test_elem_cut_forces_give_simple_beam_midspan_moment),
        cmocka_unit_test(test_elem_cut_forces_include_a_point_load_exactly_at_the_cut),
        cmocka_unit_test(test_elem_kg_pinned_column_converges_as_the_method_note_says),
        cmocka_unit_test(test_elem_kg_torsional_term_gives_torsional_buckling_load),
        cmocka_unit_test(test_elem_kg_lateral_torsional_buckling_converges_to_uniform_moment_value),
        cmocka_unit_test(test_elem_kg_torque_buckles_a_clamped_shaft_at_greenhill_value),
        cmocka_unit_test(test_elem_kg_rigid_rotation_turns_forces_and_half_turns_moments),
        cmocka_unit_test(test_elem_kg_chord_only_and_axial_only_have_string_terms_only),
        cmocka_unit_test(test_elem_kg_axial_part_matches_consistent_matrix),
        cmocka_unit_test(test_elem_m_rigid_motions_carry_the_whole_mass),
        cmocka_unit_test(test_elem_m_lumped_puts_half_the_mass_at_each_end),
        cmocka_unit_test(test_elem_m_cantilever_first_frequency_with_eight_elements),
        cmocka_unit_test(test_elem_release_propped_cantilever_gives_known_end_moment),
        cmocka_unit_test(test_elem_release_hinged_both_ends_gives_simple_span),
        cmocka_unit_test(test_elem_release_condensed_k_is_symmetric_and_keeps_rigid_modes),
        cmocka_unit_test(test_elem_release_mechanism_is_refused),
        cmocka_unit_test(test_elem_rotated_cantilever_gives_the_same_tip_deflection),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
