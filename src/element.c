/* element.c: pure kernels of the 3D frame element (stiffness, geometric stiffness, mass,
 * fixed-end forces, internal forces, end releases, rotation to global axes).
 *
 * Invariants: every matrix is 12x12, row-major, local DOFs ux uy uz rx ry rz at the start,
 * then at the end (element.h). Bending in the x-y plane couples (uy, rz) with rz = +dv/dx;
 * bending in the x-z plane couples (uz, ry) with ry = -dw/dx, so the x-z blocks are the
 * x-y blocks with the signs of the rotation rows and columns flipped (flip_plane below).
 * No allocation, no globals, no I/O: inputs in, caller arrays out.
 * Sources of every matrix and the derivations are in docs/element.md.
 *
 * Theory per kernel:
 * - K: Euler-Bernoulli, or shear deformable (Timoshenko) when Ay > 0 and Az > 0.
 * - K_G and M: the same matrices for both theories (cubic Hermite functions); K_G has the
 *   axial, Wagner-torsion, shear-force, end-moment and torque terms; the moments are
 *   semitangential (docs/element.md).
 * - Fixed-end forces: exact for both theories (exact load-free shape functions).
 * - Cut forces: a point load or moment exactly at the cut (a == x) is included.
 * Preconditions (checked by the caller): L > 0; G > 0 for shear-deformable elements;
 * 0 <= a <= b <= L; no torque on an axial_only element.
 */
#include "element.h"

#include <math.h>
#include <string.h>

/* A released set is a mechanism when a pivot of the Cholesky factorisation of the
 * released block K_rr, scaled to unit diagonal, falls below this. K_rr is a principal
 * block of the positive semidefinite elastic stiffness, so its pivots are >= 0 in exact
 * arithmetic and 0 exactly when the released DOFs can move without straining the
 * element; the scaling makes the test independent of units (forces vs moments). Genuine
 * element blocks stay far above it (both ends hinged, Euler-Bernoulli: 0.75; a shear
 * flexible element reaches 1e-10 only at Phi ~ 1e11). */
#define EF_RELEASE_PIVOT_RTOL 1e-10

/* DOF numbers of the two bending planes, in the order (v1, psi1, v2, psi2): the
 * deflection and the section rotation at each end. In the x-z plane psi = -ry. */
static const int PLANE_XY[4] = {1, 5, 7, 11};
static const int PLANE_XZ[4] = {2, 4, 8, 10};

static void add_sym(double a[144], int i, int j, double v)
{
    a[12 * i + j] += v;
    if (i != j)
        a[12 * j + i] += v;
}

/* Add a 4x4 block b, written for (v1, psi1, v2, psi2) with psi = +dv/dx, into the plane
 * `dof`. In the x-z plane the rotation DOF is ry = -psi: flip the sign of rows and
 * columns 1 and 3 (flip_plane). */
static void add_plane(double a[144], const int dof[4], bool flip_plane, const double b[16])
{
    static const double s_xz[4] = {1.0, -1.0, 1.0, -1.0};
    for (int r = 0; r < 4; r++)
        for (int c = 0; c < 4; c++) {
            double s = flip_plane ? s_xz[r] * s_xz[c] : 1.0;
            a[12 * dof[r] + dof[c]] += s * b[4 * r + c];
        }
}

/* Bending stiffness of one plane, shear deformable when phi > 0 (Przemieniecki, Theory
 * of Matrix Structural Analysis, 1968, ch. 5; phi = 12 E I / (G A_s L^2)); phi = 0 is the
 * Euler-Bernoulli matrix. */
static void bending_k(double EI, double L, double phi, double b[16])
{
    const double c = EI / ((1.0 + phi) * L * L * L);
    const double L2 = L * L;
    const double m[16] = {
        12.0,      6.0 * L,               -12.0,     6.0 * L,
        6.0 * L,   (4.0 + phi) * L2,      -6.0 * L,  (2.0 - phi) * L2,
        -12.0,     -6.0 * L,              12.0,      -6.0 * L,
        6.0 * L,   (2.0 - phi) * L2,      -6.0 * L,  (4.0 + phi) * L2,
    };
    for (int i = 0; i < 16; i++)
        b[i] = c * m[i];
}

/* Shear parameters of the two planes: Phi_y (x-y plane, Iz, Ay) and Phi_z (x-z plane,
 * Iy, Az); both 0 for an Euler-Bernoulli element. */
static void shear_params(const ef_elem_props *p, double L, double *phi_y, double *phi_z)
{
    if (p->Ay > 0.0 && p->Az > 0.0) {
        *phi_y = 12.0 * p->E * p->Iz / (p->G * p->Ay * L * L);
        *phi_z = 12.0 * p->E * p->Iy / (p->G * p->Az * L * L);
    } else {
        *phi_y = 0.0;
        *phi_z = 0.0;
    }
}

void ef_elem_k_local(const ef_elem_props *p, double L, double k[144])
{
    const double EA_L = p->E * p->A / L;             /* [force/length] */
    memset(k, 0, 144 * sizeof *k);
    k[12 * 0 + 0] = k[12 * 6 + 6] = EA_L;
    k[12 * 0 + 6] = k[12 * 6 + 0] = -EA_L;
    if (p->axial_only)
        return;

    const double GJ_L = p->G * p->J / L;             /* [force*length] */
    k[12 * 3 + 3] = k[12 * 9 + 9] = GJ_L;
    k[12 * 3 + 9] = k[12 * 9 + 3] = -GJ_L;

    double phi_y, phi_z, b[16];
    shear_params(p, L, &phi_y, &phi_z);
    bending_k(p->E * p->Iz, L, phi_y, b);
    add_plane(k, PLANE_XY, false, b);
    bending_k(p->E * p->Iy, L, phi_z, b);
    add_plane(k, PLANE_XZ, true, b);
}

/* String stiffness (N/L) [[1,-1],[-1,1]] on uy and on uz: a straight chord between the
 * nodes (method note section 3). */
static void add_string(double N, double L, double kg[144])
{
    const double s = N / L;
    for (int t = 1; t <= 2; t++) {
        add_sym(kg, t, t, s);
        add_sym(kg, t + 6, t + 6, s);
        add_sym(kg, t, t + 6, -s);
    }
}

void ef_elem_kg_local(const ef_elem_props *p, double L, const double f[12], bool chord_only,
                      double kg[144])
{
    const double N = f[6];                           /* tension positive */
    memset(kg, 0, 144 * sizeof *kg);
    if (chord_only || p->axial_only) {
        add_string(N, L, kg);
        return;
    }

    /* Axial force: consistent cubic matrix in both planes (McGuire, Gallagher & Ziemian,
     * Matrix Structural Analysis, 2nd ed., 2000, ch. 9; Przemieniecki 1968), the same for
     * Timoshenko elements. */
    {
        const double c = N / (30.0 * L);
        const double L2 = L * L;
        const double b[16] = {
            36.0 * c,     3.0 * L * c,   -36.0 * c,    3.0 * L * c,
            3.0 * L * c,  4.0 * L2 * c,  -3.0 * L * c, -L2 * c,
            -36.0 * c,    -3.0 * L * c,  36.0 * c,     -3.0 * L * c,
            3.0 * L * c,  -L2 * c,       -3.0 * L * c, 4.0 * L2 * c,
        };
        add_plane(kg, PLANE_XY, false, b);
        add_plane(kg, PLANE_XZ, true, b);
    }
    /* Wagner-type torsional term N Ip / (A L) of a doubly symmetric section. */
    if (p->A > 0.0) {
        const double t = N * p->Ip / (p->A * L);
        add_sym(kg, 3, 3, t);
        add_sym(kg, 9, 9, t);
        add_sym(kg, 3, 9, -t);
    }

    /* Internal forces (the part beyond a cut on the part before it) at x = 0 and x = L:
     * -f_start and f_end. Moments and torque vary linearly between the two ends; the
     * shear forces are taken as the mean of the two ends. */
    const double Vy = 0.5 * (f[7] - f[1]);
    const double Vz = 0.5 * (f[8] - f[2]);
    const double Ta = -f[3], Tb = f[9];
    const double Mya = -f[4], Myb = f[10];
    const double Mza = -f[5], Mzb = f[11];

    /* Shear forces turning with the chord: -(u2 - u1)(Vy (v2 - v1) + Vz (w2 - w1)) / L
     * (docs/element.md, term S). */
    add_sym(kg, 0, 1, -Vy / L);
    add_sym(kg, 6, 7, -Vy / L);
    add_sym(kg, 0, 7, Vy / L);
    add_sym(kg, 6, 1, Vy / L);
    add_sym(kg, 0, 2, -Vz / L);
    add_sym(kg, 6, 8, -Vz / L);
    add_sym(kg, 0, 8, Vz / L);
    add_sym(kg, 6, 2, Vz / L);

    /* Bending moments with twist: integral of (My v'' + Mz w'') theta_x over the element
     * minus the semitangential end terms (1/2) [theta_x (My rz - Mz ry)] at both ends
     * (docs/element.md, terms B and E). */
    add_sym(kg, 1, 3, -Mya / L);
    add_sym(kg, 3, 7, Mya / L);
    add_sym(kg, 1, 9, Myb / L);
    add_sym(kg, 7, 9, -Myb / L);
    add_sym(kg, 3, 5, -Mya / 3.0 - Myb / 6.0);
    add_sym(kg, 3, 11, (Myb - Mya) / 6.0);
    add_sym(kg, 5, 9, (Myb - Mya) / 6.0);
    add_sym(kg, 9, 11, Mya / 6.0 + Myb / 3.0);

    add_sym(kg, 2, 3, -Mza / L);
    add_sym(kg, 3, 8, Mza / L);
    add_sym(kg, 2, 9, Mzb / L);
    add_sym(kg, 8, 9, -Mzb / L);
    add_sym(kg, 3, 4, Mza / 3.0 + Mzb / 6.0);
    add_sym(kg, 3, 10, (Mza - Mzb) / 6.0);
    add_sym(kg, 4, 9, (Mza - Mzb) / 6.0);
    add_sym(kg, 9, 10, -Mza / 6.0 - Mzb / 3.0);

    /* Torque: integral of (T/2)(v'' w' - w'' v') (docs/element.md, term T). */
    {
        const double t_a = (3.0 * Ta + Tb) / (4.0 * L);
        const double t_b = (Ta + 3.0 * Tb) / (4.0 * L);
        const double t_m = (Ta + Tb) / 4.0;
        add_sym(kg, 1, 4, t_a);
        add_sym(kg, 2, 5, t_a);
        add_sym(kg, 4, 7, -t_a);
        add_sym(kg, 5, 8, -t_a);
        add_sym(kg, 1, 10, -t_b);
        add_sym(kg, 2, 11, -t_b);
        add_sym(kg, 7, 10, t_b);
        add_sym(kg, 8, 11, t_b);
        add_sym(kg, 4, 11, t_m);
        add_sym(kg, 5, 10, -t_m);
    }
}

void ef_elem_m_local(const ef_elem_props *p, double L, bool lumped, double m[144])
{
    const double mL = p->mass * L;                   /* [mass] */
    const double rL = p->rot_mass * L;               /* [mass*length^2] */
    memset(m, 0, 144 * sizeof *m);

    if (lumped) {
        for (int t = 0; t < 3; t++) {
            m[12 * t + t] = 0.5 * mL;
            m[12 * (t + 6) + (t + 6)] = 0.5 * mL;
        }
        if (!p->axial_only)
            m[12 * 3 + 3] = m[12 * 9 + 9] = 0.5 * rL;
        return;
    }

    /* Linear shape functions: (mL/6) [[2,1],[1,2]] (Przemieniecki 1968, ch. 11). */
    const int n_linear = p->axial_only ? 3 : 1;      /* axial_only: all three translations */
    for (int t = 0; t < n_linear; t++) {
        add_sym(m, t, t, mL / 3.0);
        add_sym(m, t + 6, t + 6, mL / 3.0);
        add_sym(m, t, t + 6, mL / 6.0);
    }
    if (p->axial_only)
        return;

    add_sym(m, 3, 3, rL / 3.0);                      /* torsion, same functions */
    add_sym(m, 9, 9, rL / 3.0);
    add_sym(m, 3, 9, rL / 6.0);

    /* Cubic Hermite functions, translational inertia only (no rotary inertia of bending):
     * (mL/420)[156 22L 54 -13L; ...] (Przemieniecki 1968, ch. 11; Paz, Structural
     * Dynamics, consistent mass of a beam segment). Timoshenko elements use it too. */
    const double c = mL / 420.0;
    const double L2 = L * L;
    const double b[16] = {
        156.0 * c,     22.0 * L * c,  54.0 * c,      -13.0 * L * c,
        22.0 * L * c,  4.0 * L2 * c,  13.0 * L * c,  -3.0 * L2 * c,
        54.0 * c,      13.0 * L * c,  156.0 * c,     -22.0 * L * c,
        -13.0 * L * c, -3.0 * L2 * c, -22.0 * L * c, 4.0 * L2 * c,
    };
    add_plane(m, PLANE_XY, false, b);
    add_plane(m, PLANE_XZ, true, b);
}

/* ---- fixed-end forces ------------------------------------------------------------- */

/* Exact shape functions of a homogeneous (load-free) shear-deformable beam in one plane,
 * DOFs (v1, psi1, v2, psi2), at xi = x / L: deflection n[4] and section rotation r[4].
 * phi = 0 gives the cubic Hermite functions and their derivatives. (Interdependent
 * interpolation: Reddy, On locking-free shear deformable beam finite elements, Comput.
 * Methods Appl. Mech. Engrg. 149 (1997); the stiffness they imply is bending_k.) */
static void plane_shape(double L, double phi, double xi, double n[4], double r[4])
{
    const double mu = 1.0 / (1.0 + phi);
    const double x2 = xi * xi, x3 = x2 * xi;
    n[0] = mu * (1.0 - 3.0 * x2 + 2.0 * x3 + phi * (1.0 - xi));
    n[1] = mu * L * (xi - 2.0 * x2 + x3 + 0.5 * phi * (xi - x2));
    n[2] = mu * (3.0 * x2 - 2.0 * x3 + phi * xi);
    n[3] = mu * L * (-x2 + x3 - 0.5 * phi * (xi - x2));
    r[0] = mu * 6.0 * (x2 - xi) / L;
    r[1] = mu * (1.0 - 4.0 * xi + 3.0 * x2 + phi * (1.0 - xi));
    r[2] = mu * 6.0 * (xi - x2) / L;
    r[3] = mu * (-2.0 * xi + 3.0 * x2 + phi * xi);
}

/* Work-equivalent nodal loads eq[12] of a force F[3] at x. By Betti's theorem, with the
 * exact load-free deflection shapes as weights they are the exact fixed-end reactions
 * with the sign reversed (docs/element.md, fixed-end forces). */
static void equiv_force(const ef_elem_props *p, double L, double phi_y, double phi_z,
                        const double F[3], double x, double eq[12])
{
    const double xi = x / L;
    double n[4], r[4];
    eq[0] += F[0] * (1.0 - xi);                      /* axial: linear, exact */
    eq[6] += F[0] * xi;
    if (p->axial_only) {                             /* simple-span shares (statics) */
        eq[1] += F[1] * (1.0 - xi);
        eq[7] += F[1] * xi;
        eq[2] += F[2] * (1.0 - xi);
        eq[8] += F[2] * xi;
        return;
    }
    plane_shape(L, phi_y, xi, n, r);
    for (int a = 0; a < 4; a++)
        eq[PLANE_XY[a]] += F[1] * n[a];
    plane_shape(L, phi_z, xi, n, r);
    for (int a = 0; a < 4; a++)                      /* ry = -psi: flip rotations */
        eq[PLANE_XZ[a]] += F[2] * ((a & 1) ? -n[a] : n[a]);
}

/* Work-equivalent nodal loads of a moment vector M[3] at x: conjugate to the section
 * rotations (theta_x linear; rz = psi_y, ry = -psi_z). */
static void equiv_moment(const ef_elem_props *p, double L, double phi_y, double phi_z,
                         const double M[3], double x, double eq[12])
{
    const double xi = x / L;
    double n[4], r[4];
    if (p->axial_only) {
        /* No torsional stiffness: a torque is rejected by the caller (precondition) and
         * ignored here. Bending moments act on the chord rotation: rz = (v2 - v1)/L,
         * ry = -(w2 - w1)/L, i.e. the simple-span reactions +-M/L. */
        eq[1] += -M[2] / L;
        eq[7] += M[2] / L;
        eq[2] += M[1] / L;
        eq[8] += -M[1] / L;
        return;
    }
    eq[3] += M[0] * (1.0 - xi);
    eq[9] += M[0] * xi;
    plane_shape(L, phi_y, xi, n, r);
    for (int a = 0; a < 4; a++)
        eq[PLANE_XY[a]] += M[2] * r[a];
    plane_shape(L, phi_z, xi, n, r);
    for (int a = 0; a < 4; a++)                      /* ry = -psi on both sides */
        eq[PLANE_XZ[a]] += M[1] * ((a & 1) ? r[a] : -r[a]);
}

void ef_elem_fef_add(const ef_elem_props *p, double L, const ef_bload *ld, double fef[12])
{
    double eq[12] = {0};
    double phi_y, phi_z;
    shear_params(p, L, &phi_y, &phi_z);

    switch (ld->kind) {
    case EF_BLOAD_DIST: {
        /* Load linear in x times shape functions of degree <= 3: degree 4, integrated
         * exactly by 3-point Gauss-Legendre (exact to degree 5). */
        static const double gx[3] = {-0.77459666924148337704, 0.0, 0.77459666924148337704};
        static const double gw[3] = {5.0 / 9.0, 8.0 / 9.0, 5.0 / 9.0};
        const double h = ld->b - ld->a;
        if (!(h > 0.0))
            break;                                   /* zero length: no load */
        for (int g = 0; g < 3; g++) {
            const double t = 0.5 * (1.0 + gx[g]);    /* position in [a, b] as a fraction */
            const double w = 0.5 * h * gw[g];
            double F[3];
            for (int c = 0; c < 3; c++)
                F[c] = w * (ld->q[0][c] + t * (ld->q[1][c] - ld->q[0][c]));
            equiv_force(p, L, phi_y, phi_z, F, ld->a + t * h, eq);
        }
        break;
    }
    case EF_BLOAD_POINT:
        equiv_force(p, L, phi_y, phi_z, ld->q[0], ld->a, eq);
        break;
    case EF_BLOAD_MOMENT:
        equiv_moment(p, L, phi_y, phi_z, ld->q[0], ld->a, eq);
        break;
    }
    for (int i = 0; i < 12; i++)
        fef[i] -= eq[i];                             /* f_fixed = -(equivalent nodal load) */
}

/* ---- internal forces -------------------------------------------------------------- */

/* Add a force F at signed distance d = (position - x) from the cut to the resultant
 * (R, Mc) about the cut point: Mc += d e_x x F = (0, -d Fz, d Fy). */
static void add_force_at(const double F[3], double d, double R[3], double Mc[3])
{
    R[0] += F[0];
    R[1] += F[1];
    R[2] += F[2];
    Mc[1] -= d * F[2];
    Mc[2] += d * F[1];
}

void ef_elem_cut_forces(const double f_start[6], const ef_bload *loads, int n_loads,
                        double x, double out[6])
{
    /* Resultant of everything acting on the free body [0, x], moments about the cut. */
    double R[3] = {0.0, 0.0, 0.0};
    double Mc[3] = {f_start[3], f_start[4], f_start[5]};
    add_force_at(f_start, -x, R, Mc);

    for (int k = 0; k < n_loads; k++) {
        const ef_bload *ld = &loads[k];
        switch (ld->kind) {
        case EF_BLOAD_DIST: {
            /* the part of [a, b] before the cut; linear load times linear arm: 2-point
             * Gauss-Legendre is exact (degree 3) */
            static const double gx[2] = {-0.57735026918962576451, 0.57735026918962576451};
            const double h = ld->b - ld->a;
            const double e = ld->b < x ? ld->b : x;
            if (!(h > 0.0) || !(e > ld->a))
                break;
            for (int g = 0; g < 2; g++) {
                const double s = ld->a + 0.5 * (e - ld->a) * (1.0 + gx[g]);
                const double t = (s - ld->a) / h;
                double F[3];
                for (int c = 0; c < 3; c++)
                    F[c] = 0.5 * (e - ld->a) * (ld->q[0][c] + t * (ld->q[1][c] - ld->q[0][c]));
                add_force_at(F, s - x, R, Mc);
            }
            break;
        }
        case EF_BLOAD_POINT:
            if (ld->a <= x)                          /* closed free body [0, x] */
                add_force_at(ld->q[0], ld->a - x, R, Mc);
            break;
        case EF_BLOAD_MOMENT:
            if (ld->a <= x)
                for (int c = 0; c < 3; c++)
                    Mc[c] += ld->q[0][c];
            break;
        }
    }
    for (int c = 0; c < 3; c++) {
        out[c] = -R[c];
        out[c + 3] = -Mc[c];
    }
}

/* ---- end releases ----------------------------------------------------------------- */

bool ef_elem_release_map(const double k[144], unsigned rel_i, unsigned rel_j,
                         double T[144], double R[144])
{
    int rel[12], kept[12], nr = 0, nc = 0;
    for (int d = 0; d < 12; d++) {
        unsigned mask = d < 6 ? rel_i : rel_j;
        if ((mask >> (d % 6)) & 1u)
            rel[nr++] = d;
        else
            kept[nc++] = d;
    }
    memset(T, 0, 144 * sizeof *T);
    memset(R, 0, 144 * sizeof *R);
    for (int a = 0; a < nc; a++)
        T[12 * kept[a] + kept[a]] = 1.0;
    if (nr == 0)
        return true;

    /* S = D K_rr D with D = diag(1/sqrt(K_rr,aa)): unit diagonal, then Cholesky S = C C^T
     * (lower C, in place). K_rr is symmetric positive semidefinite (a principal block of
     * K), so Cholesky needs no pivoting and a vanishing pivot means a mechanism. */
    double S[144], D[12];
    for (int a = 0; a < nr; a++) {
        const double kaa = k[12 * rel[a] + rel[a]];
        if (!(kaa > 0.0) || !isfinite(kaa))
            goto singular;
        D[a] = 1.0 / sqrt(kaa);
    }
    for (int a = 0; a < nr; a++)
        for (int b = 0; b < nr; b++)
            S[12 * a + b] = D[a] * k[12 * rel[a] + rel[b]] * D[b];
    for (int j = 0; j < nr; j++) {
        double piv = S[12 * j + j];
        for (int m = 0; m < j; m++)
            piv -= S[12 * j + m] * S[12 * j + m];
        if (!(piv > EF_RELEASE_PIVOT_RTOL))
            goto singular;
        const double cjj = sqrt(piv);
        S[12 * j + j] = cjj;
        for (int i = j + 1; i < nr; i++) {
            double s = S[12 * i + j];
            for (int m = 0; m < j; m++)
                s -= S[12 * i + m] * S[12 * j + m];
            S[12 * i + j] = s / cjj;
        }
    }

    /* Columns: for each right-hand side b (K_rc column or unit vector), x = K_rr^{-1} b
     * = D S^{-1} D b. T_rc = -K_rr^{-1} K_rc, R_rr = -K_rr^{-1}. */
    for (int col = 0; col < nc + nr; col++) {
        double y[12];
        for (int a = 0; a < nr; a++) {
            double b = col < nc ? k[12 * rel[a] + kept[col]] : (a == col - nc ? 1.0 : 0.0);
            y[a] = D[a] * b;
        }
        for (int a = 0; a < nr; a++) {               /* C z = y */
            double s = y[a];
            for (int m = 0; m < a; m++)
                s -= S[12 * a + m] * y[m];
            y[a] = s / S[12 * a + a];
        }
        for (int a = nr - 1; a >= 0; a--) {          /* C^T w = z */
            double s = y[a];
            for (int m = a + 1; m < nr; m++)
                s -= S[12 * m + a] * y[m];
            y[a] = s / S[12 * a + a];
        }
        for (int a = 0; a < nr; a++) {
            const double xa = D[a] * y[a];
            if (col < nc)
                T[12 * rel[a] + kept[col]] = -xa;
            else
                R[12 * rel[a] + rel[col - nc]] = -xa;
        }
    }
    return true;

singular:
    memset(T, 0, 144 * sizeof *T);
    memset(R, 0, 144 * sizeof *R);
    return false;
}

void ef_elem_congruence(const double T[144], const double a[144], double out[144])
{
    double aT[144];                                  /* a T */
    for (int i = 0; i < 12; i++)
        for (int j = 0; j < 12; j++) {
            double s = 0.0;
            for (int m = 0; m < 12; m++)
                s += a[12 * i + m] * T[12 * m + j];
            aT[12 * i + j] = s;
        }
    for (int i = 0; i < 12; i++)                     /* T^T (a T) */
        for (int j = 0; j < 12; j++) {
            double s = 0.0;
            for (int m = 0; m < 12; m++)
                s += T[12 * m + i] * aT[12 * m + j];
            out[12 * i + j] = s;
        }
}

/* ---- rotation to global axes ------------------------------------------------------ */

void ef_elem_to_global(const double axes[3][3], const double a[144], double out[144])
{
    /* Block (I, J) of Lambda^T a Lambda is R^T a_IJ R, R[i][j] = axes[i][j]. */
    for (int I = 0; I < 4; I++)
        for (int J = 0; J < 4; J++) {
            double t[3][3];                          /* a_IJ R */
            for (int i = 0; i < 3; i++)
                for (int j = 0; j < 3; j++) {
                    double s = 0.0;
                    for (int m = 0; m < 3; m++)
                        s += a[12 * (3 * I + i) + 3 * J + m] * axes[m][j];
                    t[i][j] = s;
                }
            for (int i = 0; i < 3; i++)
                for (int j = 0; j < 3; j++) {
                    double s = 0.0;
                    for (int m = 0; m < 3; m++)
                        s += axes[m][i] * t[m][j];
                    out[12 * (3 * I + i) + 3 * J + j] = s;
                }
        }
}

void ef_elem_vec_to_global(const double axes[3][3], const double v[12], double out[12])
{
    for (int I = 0; I < 4; I++)
        for (int j = 0; j < 3; j++) {                /* R^T v_I */
            double s = 0.0;
            for (int m = 0; m < 3; m++)
                s += axes[m][j] * v[3 * I + m];
            out[3 * I + j] = s;
        }
}

void ef_elem_vec_to_local(const double axes[3][3], const double v[12], double out[12])
{
    for (int I = 0; I < 4; I++)
        for (int i = 0; i < 3; i++) {                /* R v_I */
            double s = 0.0;
            for (int m = 0; m < 3; m++)
                s += axes[i][m] * v[3 * I + m];
            out[3 * I + i] = s;
        }
}
