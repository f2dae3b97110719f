/* test_second_order.c: second-order (P-delta) analysis against closed forms and the two
 * benchmark problems of the AISC 360-16 Commentary to Chapter C (section C2.1; the
 * problems, their acceptance criteria 3% on moment and 5% on deflection, and the W14x48
 * properties are from memory). The closed forms are the beam-column solutions of
 * Timoshenko & Gere, Theory of Elastic Stability, §1.3 and §1.11.
 */
#include "frame_support.h"

#include <stdio.h>

#define PI 3.141592653589793

/* kip, in; W14x48 (AISC Manual, from memory): A = 14.1 in^2, Ix = 484 in^4; E = 29000 ksi */
#define E_W 29000.0
#define I_W 484.0
#define L_W 336.0          /* 28 ft */

/* Benchmark 1: pinned beam-column, uniform lateral load w = 0.2 kip/ft, axial P.
 * u = kL/2, k = sqrt(P/EI): M_mid = (w/k^2)(sec u - 1),
 * w_mid = w/(EI k^4)(sec u - 1) - w L^2/(8 EI k^2)   (Timoshenko & Gere §1.11). */
static void test_second_order_aisc_pinned_beam_column(void **state)
{
    (void)state;
    const double w = 0.2 / 12.0, P[4] = {0.0, 150.0, 300.0, 450.0};
    for (int i = 0; i < 4; i++) {
        char yaml[2048];
        snprintf(yaml, sizeof yaml,
                 "eigenframe: 1\n"
                 "units: {force: kip, length: in}\n"
                 "restrain_all: [uy, rx, rz]\n"
                 "materials: {steel: {E: 29000, G: 11200}}\n"
                 "sections: {W14x48: {A: 14.1, Iy: 484, Iz: 51.4, J: 1.45}}\n"
                 "nodes: {A: [0, 0, 0], C: [168, 0, 0], B: [336, 0, 0]}\n"
                 "members: {m1: {nodes: [A, C], section: W14x48, material: steel, divisions: 2},\n"
                 "          m2: {nodes: [C, B], section: W14x48, material: steel, divisions: 2}}\n"
                 "supports: {A: [ux, uz], B: [uz]}\n"
                 "loads: {L: {nodes: {B: {Fx: %.17g}},\n"
                 "            members: {m1: [{uniform: [0, 0, %.17g]}], m2: [{uniform: [0, 0, %.17g]}]}}}\n"
                 "analyses: {static: [L], second_order: {loads: [L]}}\n",
                 -P[i], -w, -w);
        frame_run f = frame_solve(yaml);
        assert_int_equal(f.st, EF_OK);
        assert_int_equal(f.r->n_second, 1);
        ef_index c = ef_model_find_node(f.m, "C");
        double defl = -f.r->second[0].disp[6 * c + 2];
        double mom = fabs(f.r->second[0].end_forces[12 * 0 + 6 + 4]);   /* m1 end = midspan */
        double Mw, dw;
        if (P[i] == 0.0) {
            Mw = w * L_W * L_W / 8;
            dw = 5 * w * pow(L_W, 4) / (384 * E_W * I_W);
        } else {
            double k = sqrt(P[i] / (E_W * I_W)), u = k * L_W / 2;
            Mw = w / (k * k) * (1 / cos(u) - 1);
            dw = w / (E_W * I_W * pow(k, 4)) * (1 / cos(u) - 1) - w * L_W * L_W / (8 * E_W * I_W * k * k);
        }
        assert_rel_close(mom, Mw, 0.03);
        assert_rel_close(defl, dw, 0.05);
        /* with 4 elements the consistent K_G does far better than the criterion */
        assert_rel_close(mom, Mw, 2e-3);
        assert_rel_close(defl, dw, 2e-3);
        frame_free(&f);
    }
}

/* Benchmark 2: fixed-base cantilever column, lateral tip load H = 1 kip, axial P.
 * u = kL: w_tip = H (tan u - u)/(EI k^3), M_base = H tan(u)/k (Timoshenko & Gere §1.3). */
static void test_second_order_aisc_cantilever_column(void **state)
{
    (void)state;
    const double H = 1.0, P[4] = {0.0, 100.0, 150.0, 200.0};
    for (int i = 0; i < 4; i++) {
        char yaml[2048];
        snprintf(yaml, sizeof yaml,
                 "eigenframe: 1\n"
                 "units: {force: kip, length: in}\n"
                 "restrain_all: [uy, rx, rz]\n"
                 "materials: {steel: {E: 29000, G: 11200}}\n"
                 "sections: {W14x48: {A: 14.1, Iy: 484, Iz: 51.4, J: 1.45}}\n"
                 "nodes: {A: [0, 0, 0], B: [0, 0, 336]}\n"
                 "members: {c: {nodes: [A, B], section: W14x48, material: steel}}\n"
                 "supports: {A: fixed}\n"
                 "loads: {L: {nodes: {B: {Fx: 1.0, Fz: %.17g}}}}\n"
                 "analyses: {static: [L], second_order: {loads: [L]}}\n",
                 -P[i]);
        frame_run f = frame_solve(yaml);
        assert_int_equal(f.st, EF_OK);
        ef_index b = ef_model_find_node(f.m, "B"), a = ef_model_find_node(f.m, "A");
        double defl = f.r->second[0].disp[6 * b + 0];
        double mom = fabs(f.r->second[0].react[6 * a + 4]);
        double Mw, dw;
        if (P[i] == 0.0) {
            Mw = H * L_W;
            dw = H * pow(L_W, 3) / (3 * E_W * I_W);
        } else {
            double k = sqrt(P[i] / (E_W * I_W)), u = k * L_W;
            Mw = H * tan(u) / k;
            dw = H * (tan(u) - u) / (E_W * I_W * pow(k, 3));
        }
        assert_rel_close(mom, Mw, 0.03);
        assert_rel_close(defl, dw, 0.05);
        assert_rel_close(mom, Mw, 2e-3);
        assert_rel_close(defl, dw, 2e-3);
        frame_free(&f);
    }
}

static const char *cantilever(double ratio, bool with_buckling)
{
    /* kN, m; L = 5, EI = 21000: P_cr = pi^2 EI / (4 L^2) */
    static char buf[2048];
    double pcr = PI * PI * 210e6 * 1e-4 / (4 * 25.0);
    snprintf(buf, sizeof buf,
             "eigenframe: 1\n"
             "units: {force: kN, length: m}\n"
             "mesh: {divisions: 8}\n"
             "restrain_all: [uy, rx, rz]\n"
             "materials: {steel: {E: 210e6, G: 81e6}}\n"
             "sections: {s: {A: 0.01, Iy: 1.0e-4, Iz: 1.0e-4, J: 1.0e-4}}\n"
             "nodes: {A: [0, 0, 0], B: [0, 0, 5]}\n"
             "members: {c: {nodes: [A, B], section: s, material: steel}}\n"
             "supports: {A: fixed}\n"
             "loads: {P: {nodes: {B: {Fx: 2.0, Fz: %.17g}}}}\n"
             "analyses: {static: [P], second_order: {loads: [P]}%s}\n",
             -ratio * pcr, with_buckling ? ", buckling: {load: P, modes: 1}" : "");
    return buf;
}

/* Cantilever with axial P and tip H: deflection ratio 3 (tan u - u)/u^3 and base moment
 * ratio tan(u)/u with u = (pi/2) sqrt(P/P_cr) (Timoshenko & Gere §1.3); for P/P_cr =
 * 0.25 / 0.5 / 0.75: 1.3289 / 1.9863 / 3.9578 and 1.2732 / 1.8168 / 3.4413
 * (dynamics-and-stability-methods.md §6.4 [D]). 8 elements: within 0.5%. */
static void test_second_order_cantilever_tan_formula(void **state)
{
    (void)state;
    const double ratio[3] = {0.25, 0.5, 0.75};
    const double dref[3] = {1.3289, 1.9863, 3.9578}, mref[3] = {1.2732, 1.8168, 3.4413};
    for (int i = 0; i < 3; i++) {
        frame_run f = frame_solve(cantilever(ratio[i], false));
        assert_int_equal(f.st, EF_OK);
        ef_index b = ef_model_find_node(f.m, "B"), a = ef_model_find_node(f.m, "A");
        double d1 = f.r->statics[0].disp[6 * b], d2 = f.r->second[0].disp[6 * b];
        double m1 = f.r->statics[0].react[6 * a + 4], m2 = f.r->second[0].react[6 * a + 4];
        double u = PI / 2 * sqrt(ratio[i]);
        assert_rel_close(d2 / d1, 3 * (tan(u) - u) / (u * u * u), 5e-3);
        assert_rel_close(d2 / d1, dref[i], 5e-3);
        assert_rel_close(m2 / m1, tan(u) / u, 5e-3);
        assert_rel_close(m2 / m1, mref[i], 5e-3);
        /* the base moment's amplification is reported per end force */
        assert_rel_close(f.r->second[0].amplification[4], mref[i], 5e-3);
        assert_true(f.r->second[0].converged);
        frame_free(&f);
    }
}

/* Close to critical the iteration still converges and the amplification follows the tan
 * formula (as above), about 20 times the first-order deflection at 0.95 P_cr. K_G sits in
 * the matrix, so the amplification comes out of the first solve; the next ones only
 * update the axial forces (constant here), so two iterations settle it. */
static void test_second_order_converges_near_critical(void **state)
{
    (void)state;
    frame_run lo = frame_solve(cantilever(0.25, false));
    frame_run hi = frame_solve(cantilever(0.95, false));
    assert_int_equal(lo.st, EF_OK);
    assert_int_equal(hi.st, EF_OK);
    assert_true(hi.r->second[0].converged && lo.r->second[0].converged);
    assert_true(hi.r->second[0].iterations >= 2 && hi.r->second[0].iterations <= 5);
    ef_index b = ef_model_find_node(hi.m, "B");
    double u = PI / 2 * sqrt(0.95);
    double ratio = hi.r->second[0].disp[6 * b] / hi.r->statics[0].disp[6 * b];
    assert_rel_close(ratio, 3 * (tan(u) - u) / (u * u * u), 1e-2);
    frame_free(&lo);
    frame_free(&hi);
}

/* Above the critical load the analysis stops, says so with the load's name and alpha_cr
 * (here from the buckling analysis of the same load), and stores no results. */
static void test_second_order_refuses_load_above_critical(void **state)
{
    (void)state;
    frame_run f = frame_solve(cantilever(1.1, true));
    assert_int_equal(f.st, EF_EUNSTABLE);
    assert_int_equal(f.r->n_second, 0);
    assert_true(frame_diag_has(&f, "load 'P'"));
    assert_true(frame_diag_has(&f, "beyond the elastic critical load"));
    assert_true(frame_diag_has(&f, "alpha_cr = 0.909"));
    frame_free(&f);
    f = frame_solve(cantilever(1.1, false));
    assert_int_equal(f.st, EF_EUNSTABLE);
    assert_true(frame_diag_has(&f, "run the buckling analysis"));
    frame_free(&f);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_second_order_aisc_pinned_beam_column),
        cmocka_unit_test(test_second_order_aisc_cantilever_column),
        cmocka_unit_test(test_second_order_cantilever_tan_formula),
        cmocka_unit_test(test_second_order_converges_near_critical),
        cmocka_unit_test(test_second_order_refuses_load_above_critical),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
