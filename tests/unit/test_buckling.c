/* test_buckling.c: elastic critical load factors against closed forms.
 * Units: kN, m. E = 210e6, G = 81e6. Sources beside each expected value.
 */
#include "frame_support.h"

#include "buckling.h"

#include <stdio.h>

#define PI 3.141592653589793
#define E_ 210e6
#define G_ 81e6

/* A vertical column A (base) - B (top) of length L, weak axis Iz = 1e-4, unit load down
 * at the top; supports given. The factor is then the critical load itself. */
static double column_factor(double L, int div, const char *supports, int *kind)
{
    char yaml[2048];
    snprintf(yaml, sizeof yaml,
             "eigenframe: 1\n"
             "units: {force: kN, length: m}\n"
             "mesh: {divisions: %d}\n"
             "materials: {steel: {E: 210e6, G: 81e6}}\n"
             "sections: {s: {A: 0.01, Iy: 2.0e-4, Iz: 1.0e-4, J: 5.0e-5}}\n"
             "nodes: {A: [0, 0, 0], B: [0, 0, %.17g]}\n"
             "members: {M: {nodes: [A, B], section: s, material: steel}}\n"
             "supports: %s\n"
             "loads: {P: {nodes: {B: {Fz: -1.0}}}}\n"
             "analyses: {static: [], buckling: {load: P, modes: 2}}\n",
             div, L, supports);
    frame_run f = frame_solve(yaml);
    assert_int_equal(f.st, EF_OK);
    assert_true(f.r->buckling->n_pos >= 1);
    double lam = f.r->buckling->factors[0];
    if (kind) *kind = f.r->buckling->kind[0];
    assert_true(f.r->buckling->residual[0] < 1e-8);
    frame_free(&f);
    return lam;
}

/* Euler loads (Timoshenko & Gere, Theory of Elastic Stability, §2.1-2.3): pinned
 * pi^2 EI/L^2, fixed-free pi^2 EI/(4 L^2), fixed-fixed 4 pi^2 EI/L^2, fixed-pinned
 * 20.19 EI/L^2 (= (4.4934/L)^2 EI, T&G §2.4). Ratio of the consistent-K_G result to the
 * exact load for 1/2/4/8 elements, dynamics-and-stability-methods.md §6.3 [D]. */
static void test_buckling_euler_columns_converge(void **state)
{
    (void)state;
    const double L = 5.0, EI = E_ * 1e-4;
    const char *pinned = "{A: [ux, uy, uz, rz], B: [ux, uy]}";
    const char *cant = "{A: fixed}";
    const char *fixed = "{A: fixed, B: [ux, uy, rx, ry]}";
    const char *fixpin = "{A: fixed, B: [ux, uy]}";
    const double pe = PI * PI * EI / (L * L);
    const double r_pin[4] = {1.2159, 1.0075, 1.0005, 1.00003};
    const int d4[4] = {1, 2, 4, 8};
    for (int i = 0; i < 4; i++) assert_rel_close(column_factor(L, d4[i], pinned, NULL) / pe, r_pin[i], 1.5e-4);
    const double r_cant[3] = {1.0075, 1.0005, 1.00003};
    for (int i = 0; i < 3; i++) assert_rel_close(column_factor(L, d4[i], cant, NULL) / (pe / 4), r_cant[i], 1.5e-4);
    const double r_fix[3] = {1.0132, 1.0075, 1.0005};
    for (int i = 0; i < 3; i++) assert_rel_close(column_factor(L, d4[i + 1], fixed, NULL) / (4 * pe), r_fix[i], 1.5e-4);
    const double beta = 4.493409457909064;       /* tan(beta) = beta */
    int kind;
    double fp = column_factor(L, 8, fixpin, &kind);
    assert_rel_close(fp, beta * beta * EI / (L * L), 2e-4);
    assert_int_equal(kind, EF_BUCKLE_MEMBER_FLEXURAL);   /* one member: all energy in it */
}

/* A short column of tiny J: torsional buckling at P = G J A / Ip with no warping
 * stiffness (Timoshenko & Gere §5.3, torsional buckling load with C1 = 0); the K_G
 * torsional term N Ip/(A L) makes this exact for any mesh. Classified as torsional. */
static void test_buckling_torsional_short_column(void **state)
{
    (void)state;
    const char *yaml =
        "eigenframe: 1\n"
        "units: {force: kN, length: m}\n"
        "materials: {steel: {E: 210e6, G: 81e6}}\n"
        "sections: {x: {A: 0.01, Iy: 1.0e-4, Iz: 1.0e-4, J: 1.0e-8, Ip: 2.0e-4}}\n"
        "nodes: {A: [0, 0, 0], B: [0, 0, 2]}\n"
        "members: {M: {nodes: [A, B], section: x, material: steel}}\n"
        "supports: {A: [ux, uy, uz, rz], B: [ux, uy, rz]}\n"
        "loads: {P: {nodes: {B: {Fz: -1.0}}}}\n"
        "analyses: {static: [], buckling: {load: P, modes: 1}}\n";
    frame_run f = frame_solve(yaml);
    assert_int_equal(f.st, EF_OK);
    assert_rel_close(f.r->buckling->factors[0], G_ * 1e-8 * 0.01 / 2e-4, 1e-8);
    assert_int_equal(f.r->buckling->kind[0], EF_BUCKLE_MEMBER_TORSIONAL);
    frame_free(&f);
}

/* Stability functions of a compressed member (Livesley & Chandler, Stability Functions
 * for Structural Frameworks, 1956; Timoshenko & Gere §1.11): with u = L sqrt(P/EI),
 * s = u (sin u - u cos u) / (2 - 2 cos u - u sin u), c = (u - sin u) / (sin u - u cos u). */
static void stability_functions(double u, double *s, double *c)
{
    *s = u * (sin(u) - u * cos(u)) / (2 - 2 * cos(u) - u * sin(u));
    *c = (u - sin(u)) / (sin(u) - u * cos(u));
}

/* Sway buckling of a fixed-base portal (columns Ic, height h; beam Ib, span b; load P on
 * each column top) by slope-deflection with stability functions: joint rotation theta
 * and chord rotation psi satisfy
 *   (s + 6 rho) theta - s (1 + c) psi = 0             (moment at the top joint)
 *   s (1 + c) theta - (2 s (1 + c) - u^2) psi = 0      (storey shear with P-Delta)
 * with rho = (Ib/b)/(Ic/h); the lowest root u of the determinant gives P = u^2 EIc/h^2.
 * The hand method takes the members as axially rigid: the model's members get a large A
 * (with A = 0.01 the columns' axial give lowers the factor by 0.2%, which is real). */
static double portal_sway_u(double rho)
{
    double lo = 0.5, hi = PI - 1e-9;
    for (int i = 0; i < 200; i++) {
        double u = 0.5 * (lo + hi), s, c;
        stability_functions(u, &s, &c);
        double det = -(s + 6 * rho) * (2 * s * (1 + c) - u * u) + s * (1 + c) * s * (1 + c);
        /* det > 0 below the root (the frame is still stable) */
        if (det < 0) lo = u; else hi = u;
    }
    return 0.5 * (lo + hi);
}

static const char *portal(double Ib, const char *base, int div)
{
    static char buf[2048];
    snprintf(buf, sizeof buf,
             "eigenframe: 1\n"
             "units: {force: kN, length: m}\n"
             "mesh: {divisions: %d}\n"
             "restrain_all: [uy, rx, rz]\n"
             "materials: {steel: {E: 210e6, G: 81e6}}\n"
             "sections: {col: {A: 10.0, Iy: 1.0e-4, Iz: 1.0e-5, J: 1.0e-6},\n"
             "           bm: {A: 10.0, Iy: %.17g, Iz: 1.0e-5, J: 1.0e-6}}\n"
             "nodes: {A: [0, 0, 0], B: [0, 0, 4], C: [6, 0, 4], D: [6, 0, 0]}\n"
             "members: {c1: {nodes: [A, B], section: col, material: steel},\n"
             "          b1: {nodes: [B, C], section: bm, material: steel},\n"
             "          c2: {nodes: [D, C], section: col, material: steel}}\n"
             "supports: {A: %s, D: %s}\n"
             "loads: {P: {nodes: {B: {Fz: -1.0}, C: {Fz: -1.0}}}}\n"
             "analyses: {static: [], buckling: {load: P, modes: 2}}\n",
             div, Ib, base, base);
    return buf;
}

static void test_buckling_portal_sway_matches_stability_functions(void **state)
{
    (void)state;
    const double h = 4.0, b = 6.0, Ic = 1e-4, Ib = 2e-4;
    double u = portal_sway_u((Ib / b) / (Ic / h));
    frame_run f = frame_solve(portal(Ib, "fixed", 8));
    assert_int_equal(f.st, EF_OK);
    assert_rel_close(f.r->buckling->factors[0], u * u * E_ * Ic / (h * h), 2e-4);
    assert_int_equal(f.r->buckling->kind[0], EF_BUCKLE_GLOBAL);   /* two columns share it */
    frame_free(&f);
}

/* Pinned bases and a very stiff beam: each column is a flagpole in sway, effective
 * length 2h: P = pi^2 E Ic / (2h)^2 (Timoshenko & Gere §2.2 / effective length factor
 * K = 2, e.g. AISC 360 Commentary Table C-A-7.1, from memory). */
static void test_buckling_pinned_portal_effective_length_two(void **state)
{
    (void)state;
    const double h = 4.0, Ic = 1e-4;
    frame_run f = frame_solve(portal(1.0, "[ux, uy, uz]", 8));
    assert_int_equal(f.st, EF_OK);
    assert_rel_close(f.r->buckling->factors[0], PI * PI * E_ * Ic / (4 * h * h), 2e-3);
    frame_free(&f);
}

/* Lateral-torsional buckling of a narrow rectangular beam under uniform moment, fork
 * supported: M_cr = (pi/L) sqrt(E Iz G J) (Timoshenko & Gere §6.2, eq. 6-13). */
static void test_buckling_lateral_torsional_narrow_beam(void **state)
{
    (void)state;
    const double L = 4.0, b = 0.02, h = 0.2;
    const double Iy = b * h * h * h / 12, Iz = h * b * b * b / 12, J = h * b * b * b / 3;
    const double M0 = 1.0;
    char yaml[2048];
    snprintf(yaml, sizeof yaml,
             "eigenframe: 1\n"
             "units: {force: kN, length: m}\n"
             "mesh: {divisions: 16}\n"
             "materials: {steel: {E: 210e6, G: 81e6}}\n"
             "sections: {r: {A: %.17g, Iy: %.17g, Iz: %.17g, J: %.17g}}\n"
             "nodes: {A: [0, 0, 0], B: [4, 0, 0]}\n"
             "members: {M: {nodes: [A, B], section: r, material: steel}}\n"
             "supports: {A: [ux, uy, uz, rx], B: [uy, uz, rx]}\n"
             "loads: {M: {nodes: {A: {My: %.17g}, B: {My: %.17g}}}}\n"
             "analyses: {static: [], buckling: {load: M, modes: 1}}\n",
             b * h, Iy, Iz, J, -M0, M0);
    frame_run f = frame_solve(yaml);
    assert_int_equal(f.st, EF_OK);
    double Mcr = PI / L * sqrt(E_ * Iz * G_ * J);
    assert_rel_close(f.r->buckling->factors[0] * M0, Mcr, 5e-3);
    frame_free(&f);
}

/* A column in tension cannot buckle: no positive factor, said plainly; the reversed load
 * buckles at -P_cr (pinned column, 8 elements: within 3e-5 of pi^2 EI/L^2, §6.3). */
static void test_buckling_tension_only_has_no_positive_factor(void **state)
{
    (void)state;
    const char *yaml =
        "eigenframe: 1\n"
        "units: {force: kN, length: m}\n"
        "mesh: {divisions: 8}\n"
        "materials: {steel: {E: 210e6, G: 81e6}}\n"
        "sections: {s: {A: 0.01, Iy: 2.0e-4, Iz: 1.0e-4, J: 5.0e-5}}\n"
        "nodes: {A: [0, 0, 0], B: [0, 0, 5]}\n"
        "members: {M: {nodes: [A, B], section: s, material: steel}}\n"
        "supports: {A: [ux, uy, uz, rz], B: [ux, uy]}\n"
        "loads: {T: {nodes: {B: {Fz: 1.0}}}}\n"
        "analyses: {static: [], buckling: {load: T, modes: 2, negative: true}}\n";
    frame_run f = frame_solve(yaml);
    assert_int_equal(f.st, EF_OK);
    assert_int_equal(f.r->buckling->n_pos, 0);
    assert_true(f.r->buckling->found_none);
    assert_true(frame_diag_has(&f, "no positive critical load factor"));
    assert_true(f.r->buckling->n_neg >= 1);
    assert_rel_close(f.r->buckling->neg_factors[0], -PI * PI * E_ * 1e-4 / 25, 1e-4);
    frame_free(&f);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_buckling_euler_columns_converge),
        cmocka_unit_test(test_buckling_torsional_short_column),
        cmocka_unit_test(test_buckling_portal_sway_matches_stability_functions),
        cmocka_unit_test(test_buckling_pinned_portal_effective_length_two),
        cmocka_unit_test(test_buckling_lateral_torsional_narrow_beam),
        cmocka_unit_test(test_buckling_tension_only_has_no_positive_factor),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
