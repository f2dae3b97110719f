/* test_modal.c: natural frequencies against closed forms and benchmarks.
 * Beam frequencies: omega_n = (beta_n L)^2 sqrt(E I / (m L^4)) (Blevins, Formulas for
 * Natural Frequency and Mode Shape, Table 8-1); bars and shafts: Blevins Table 8-16/8-19
 * (from memory for the table numbers).
 */
#include "frame_support.h"

#include <stdio.h>

#define TWO_PI 6.283185307179586

/* A straight member from (0,0,0) to (L,0,0) in kN, m, t; section A=0.01, I=2e-4;
 * `extra` adds lines (supports, restraints, masses, analyses). */
static const char *beam_model(double L, int div, const char *mat, const char *sec,
                              const char *extra)
{
    static char buf[4096];
    snprintf(buf, sizeof buf,
             "eigenframe: 1\n"
             "units: {force: kN, length: m}\n"
             "mesh: {divisions: %d}\n"
             "materials: {steel: %s}\n"
             "sections: {s: %s}\n"
             "nodes: {A: [0, 0, 0], B: [%.17g, 0, 0]}\n"
             "members: {M: {nodes: [A, B], section: s, material: steel}}\n"
             "%s",
             div, mat, sec, L, extra);
    return buf;
}

static const char *STEEL = "{E: 210e6, G: 81e6, density: 7.85}";
static const char *SEC = "{A: 0.01, Iy: 2.0e-4, Iz: 2.0e-4, J: 3.0e-4}";

static double beam_omega(double beta_L, double L)
{
    const double EI = 210e6 * 2e-4, m = 7.85 * 0.01;
    return beta_L * beta_L * sqrt(EI / (m * pow(L, 4)));
}

static double omega(const frame_run *f, int mode)
{
    return sqrt(f->r->modal->omega2[mode]);
}

/* Cantilever bending in the x-z plane: beta L = 1.87510, 4.69409, 7.85476 (Blevins
 * Table 8-1, clamped-free). 24 cubic elements with consistent mass: within 2e-5. The
 * axial translation is held so that the axial modes do not interleave. */
static void test_modal_cantilever_bending(void **state)
{
    (void)state;
    const double L = 4.0;
    frame_run f = frame_solve(beam_model(L, 24, STEEL, SEC,
        "restrain_all: [ux, uy, rx, rz]\n"
        "supports: {A: fixed}\n"
        "analyses: {static: [], modal: {modes: 4}}\n"));
    assert_int_equal(f.st, EF_OK);
    const double bl[3] = {1.87510407, 4.69409113, 7.85475744};
    for (int i = 0; i < 3; i++) assert_rel_close(omega(&f, i), beam_omega(bl[i], L), 2e-5);
    /* consistent mass bounds the exact frequency from above (Rayleigh-Ritz) */
    for (int i = 0; i < 3; i++) assert_true(omega(&f, i) >= beam_omega(bl[i], L) * (1 - 1e-12));
    /* mass normalisation: residuals small */
    for (int i = 0; i < 3; i++) assert_true(f.r->modal->residual[i] < 1e-8);
    frame_free(&f);
}

/* Simply supported beam: omega_n = (n pi)^2 sqrt(EI/(m L^4)) (Blevins Table 8-1). Lumped
 * mass converges too, from below (lumped mass drops the inertia coupling). */
static void test_modal_simply_supported_consistent_and_lumped(void **state)
{
    (void)state;
    const double L = 6.0, pi = 3.141592653589793;
    frame_run f = frame_solve(beam_model(L, 20, STEEL, SEC,
        "restrain_all: [uy, rx, rz]\n"
        "supports: {A: [ux, uz], B: [uz]}\n"
        "analyses: {static: [], modal: {modes: 3}}\n"));
    assert_int_equal(f.st, EF_OK);
    for (int n = 1; n <= 2; n++) assert_rel_close(omega(&f, n - 1), beam_omega(n * pi, L), 1e-5);
    frame_free(&f);
    f = frame_solve(beam_model(L, 20, STEEL, SEC,
        "restrain_all: [uy, rx, rz]\n"
        "supports: {A: [ux, uz], B: [uz]}\n"
        "mass_source: {self: true, lumped: true}\n"
        "analyses: {static: [], modal: {modes: 3}}\n"));
    assert_int_equal(f.st, EF_OK);
    for (int n = 1; n <= 2; n++) {
        assert_rel_close(omega(&f, n - 1), beam_omega(n * pi, L), 2e-3 * n * n);
        assert_true(omega(&f, n - 1) < beam_omega(n * pi, L));
    }
    assert_true(f.r->modal->lumped);
    frame_free(&f);
}

/* Fixed-free axial bar: omega_n = (2n - 1) pi / (2L) sqrt(E / rho) (Blevins, longitudinal
 * vibration of a clamped-free bar). Linear elements with consistent mass, 40 elements. */
static void test_modal_axial_bar(void **state)
{
    (void)state;
    const double L = 5.0, pi = 3.141592653589793, c = sqrt(210e6 / 7.85);
    frame_run f = frame_solve(beam_model(L, 40, STEEL, SEC,
        "restrain_all: [uy, uz, rx, ry, rz]\n"
        "supports: {A: fixed}\n"
        "analyses: {static: [], modal: {modes: 2}}\n"));
    assert_int_equal(f.st, EF_OK);
    for (int n = 1; n <= 2; n++) assert_rel_close(omega(&f, n - 1), (2 * n - 1) * pi / (2 * L) * c, 1e-3);
    frame_free(&f);
}

/* Fixed-free shaft of circular section: omega_n = (2n - 1) pi / (2L) sqrt(G / rho)
 * (Blevins, torsional vibration of a clamped-free circular shaft; J = Ip). */
static void test_modal_torsional_shaft(void **state)
{
    (void)state;
    const double L = 3.0, pi = 3.141592653589793, c = sqrt(81e6 / 7.85);
    frame_run f = frame_solve(beam_model(L, 40, STEEL, "{circle: {d: 0.1}}",
        "restrain_all: [ux, uy, uz, ry, rz]\n"
        "supports: {A: fixed}\n"
        "analyses: {static: [], modal: {modes: 2}}\n"));
    assert_int_equal(f.st, EF_OK);
    for (int n = 1; n <= 2; n++) assert_rel_close(omega(&f, n - 1), (2 * n - 1) * pi / (2 * L) * c, 1e-3);
    frame_free(&f);
}

/* A point mass on a massless cantilever: omega^2 = k / m with k = 3 E I / L^3 (the
 * cubic element is exact for tip loads). M is singular (no rotational mass). */
static void test_modal_point_mass_on_light_cantilever(void **state)
{
    (void)state;
    const double L = 2.0, mass = 1.5, EI = 210e6 * 2e-4;
    frame_run f = frame_solve(beam_model(L, 4, "{E: 210e6, G: 81e6}", SEC,
        "supports: {A: fixed}\n"
        "masses: {B: 1.5}\n"
        "analyses: {static: [], modal: {modes: 2}}\n"));
    assert_int_equal(f.st, EF_OK);
    double w2 = 3 * EI / pow(L, 3) / mass;
    /* Iy = Iz: the two bending directions give the same (repeated) frequency */
    assert_rel_close(f.r->modal->omega2[0], w2, 1e-9);
    assert_rel_close(f.r->modal->omega2[1], w2, 1e-9);
    /* the pair takes all of the mass in y and z between them */
    const double *er = f.r->modal->eff_ratio;
    assert_rel_close(er[1] + er[6 + 1], 1.0, 1e-9);
    assert_rel_close(er[2] + er[6 + 2], 1.0, 1e-9);
    frame_free(&f);
}

/* The first cantilever frequency converges from above as members are subdivided. */
static void test_modal_convergence_with_divisions(void **state)
{
    (void)state;
    const double L = 4.0;
    double prev = INFINITY, exact = beam_omega(1.87510407, L);
    const int divs[4] = {1, 2, 4, 8};
    for (int i = 0; i < 4; i++) {
        frame_run f = frame_solve(beam_model(L, divs[i], STEEL, SEC,
            "restrain_all: [uy, rx, rz]\n"
            "supports: {A: fixed}\n"
            "analyses: {static: [], modal: {modes: 1}}\n"));
        assert_int_equal(f.st, EF_OK);
        double w = omega(&f, 0);
        assert_true(w < prev);
        assert_true(w >= exact * (1 - 1e-12));
        prev = w;
        frame_free(&f);
    }
    assert_rel_close(prev, exact, 1e-4);
}

/* NAFEMS FV2, pin-ended double cross, in-plane (NAFEMS "Selected benchmarks for natural
 * frequency analysis"; reference values from memory): eight 5 m arms at 45 degrees,
 * 0.125 m square, E = 200 GPa, rho = 8000 kg/m^3, outer ends pinned. Reference Hz:
 * 11.336, 17.709 (modes 2-8), 45.345, 57.390 (modes 10-16). They also follow in closed
 * form: mode 1 and 9 are every arm pinned-pinned (beta L = pi, 2 pi: the centre turns
 * freely), modes 4-8 and 12-16 every arm clamped-pinned (beta L = 3.92660, 7.06858: the
 * centre held still by the other arms), Blevins Table 8-1. Modes 2-3 and 10-11 move the
 * centre, which the arms' axial stiffness resists, so they sit slightly lower. */
static void test_modal_nafems_fv2_double_cross(void **state)
{
    (void)state;
    char yaml[4096];
    int w = snprintf(yaml, sizeof yaml,
        "eigenframe: 1\n"
        "units: {force: N, length: m}\n"
        "mesh: {divisions: 8}\n"
        "restrain_all: [uz, rx, ry]\n"
        "materials: {steel: {E: 200e9, nu: 0.3, density: 8000}}\n"
        "sections: {sq: {rectangle: {b: 0.125, h: 0.125}}}\n"
        "nodes:\n  O: [0, 0, 0]\n");
    for (int i = 0; i < 8; i++) {
        double a = i * TWO_PI / 8;
        w += snprintf(yaml + w, sizeof yaml - (size_t)w, "  P%d: [%.17g, %.17g, 0]\n", i,
                      5 * cos(a), 5 * sin(a));
    }
    w += snprintf(yaml + w, sizeof yaml - (size_t)w, "members:\n");
    for (int i = 0; i < 8; i++)
        w += snprintf(yaml + w, sizeof yaml - (size_t)w,
                      "  arm%d: {nodes: [O, P%d], section: sq, material: steel}\n", i, i);
    w += snprintf(yaml + w, sizeof yaml - (size_t)w, "supports:\n");
    for (int i = 0; i < 8; i++)
        w += snprintf(yaml + w, sizeof yaml - (size_t)w, "  P%d: [ux, uy]\n", i);
    snprintf(yaml + w, sizeof yaml - (size_t)w, "analyses: {static: [], modal: {modes: 16}}\n");
    frame_run f = frame_solve(yaml);
    assert_int_equal(f.st, EF_OK);
    const double *hz = f.r->modal->freq;
    const double EI = 200e9 * pow(0.125, 4) / 12, m = 8000 * 0.125 * 0.125, L = 5.0;
    double pp = 3.141592653589793 * 3.141592653589793 / (TWO_PI * L * L) * sqrt(EI / m);
    double cp = 3.92660231 * 3.92660231 / (TWO_PI * L * L) * sqrt(EI / m);
    double cp2 = 7.06858275 * 7.06858275 / (TWO_PI * L * L) * sqrt(EI / m);
    assert_rel_close(hz[0], 11.336, 1e-3);
    assert_rel_close(hz[0], pp, 1e-4);
    for (int i = 1; i <= 7; i++) assert_rel_close(hz[i], 17.709, 2e-3);
    for (int i = 3; i <= 7; i++) assert_rel_close(hz[i], cp, 1e-4);
    assert_rel_close(hz[8], 45.345, 1e-3);
    assert_rel_close(hz[8], 4 * pp, 1e-3);
    for (int i = 9; i <= 10; i++) assert_rel_close(hz[i], 57.390, 1e-2);
    for (int i = 11; i <= 15; i++) {
        assert_rel_close(hz[i], 57.390, 1e-3);
        assert_rel_close(hz[i], cp2, 1e-3);
    }
    frame_free(&f);
}

/* Every mode of a small 3D frame, densely: the effective masses add up to the
 * participating mass in each direction (Sum M*_d = r_d^T M r_d since Phi Phi^T = M^-1,
 * dynamics-and-stability-methods.md §1); and the sparse (ARPACK) solution of the same
 * K, M agrees with the dense LAPACK dsygvd one to 1e-8. */
static const char *FRAME3D =
    "eigenframe: 1\n"
    "units: {force: kN, length: m}\n"
    "mesh: {divisions: 2}\n"
    "materials: {steel: {E: 210e6, G: 81e6, density: 7.85}}\n"
    "sections: {c: {A: 0.008, Iy: 9.0e-5, Iz: 3.0e-5, J: 1.0e-6}, b: {A: 0.006, Iy: 8.0e-5, Iz: 6.0e-6, J: 2.0e-7}}\n"
    "nodes: {a: [0,0,0], b: [5,0,0], c: [5,4,0], d: [0,4,0], A: [0,0,3.5], B: [5,0,3.5], C: [5,4,3.5], D: [0,4,3.5]}\n"
    "members:\n"
    "  ca: {nodes: [a, A], section: c, material: steel}\n"
    "  cb: {nodes: [b, B], section: c, material: steel, roll: 90}\n"
    "  cc: {nodes: [c, C], section: c, material: steel}\n"
    "  cd: {nodes: [d, D], section: c, material: steel}\n"
    "  AB: {nodes: [A, B], section: b, material: steel}\n"
    "  BC: {nodes: [B, C], section: b, material: steel}\n"
    "  CD: {nodes: [C, D], section: b, material: steel}\n"
    "  DA: {nodes: [D, A], section: b, material: steel, hinged: both}\n"
    "  br: {nodes: [a, B], section: c, material: steel, axial_only: true}\n"
    "supports: {a: fixed, b: fixed, c: fixed, d: pinned}\n"
    "masses: {C: {m: 2.0, Jz: 1.0}}\n"
    "loads: {dead: {members: {AB: [{uniform: [0, 0, -5]}]}, nodes: {D: {Fz: -10}}}}\n"
    "mass_source: {loads: {dead: 1.0}}\n";

static void test_modal_all_modes_sum_to_participating_mass(void **state)
{
    (void)state;
    char yaml[4096];
    snprintf(yaml, sizeof yaml, "%sanalyses: {static: [], modal: {modes: all}}\n", FRAME3D);
    frame_run f = frame_solve(yaml);
    assert_int_equal(f.st, EF_OK);
    const ef_modal_result *mr = f.r->modal;
    assert_true(mr->n_modes > 50);
    for (int d = 0; d < 6; d++) {
        double s = 0.0;
        for (int t = 0; t < mr->n_modes; t++) s += mr->eff_mass[6 * t + d];
        assert_rel_close(s, mr->total_mass[d], 1e-9);
    }
    /* participating mass is below the model mass: the supports hold some of it */
    assert_true(mr->total_mass[0] < mr->model_mass);
    frame_free(&f);
}

static void test_modal_sparse_matches_dense(void **state)
{
    (void)state;
    char y1[4096], y2[4096];
    snprintf(y1, sizeof y1, "%sanalyses: {static: [], modal: {modes: all}}\n", FRAME3D);
    snprintf(y2, sizeof y2, "%sanalyses: {static: [], modal: {modes: 10}}\n", FRAME3D);
    frame_run fd = frame_solve(y1), fs = frame_solve(y2);
    assert_int_equal(fd.st, EF_OK);
    assert_int_equal(fs.st, EF_OK);
    for (int t = 0; t < 10; t++) {
        assert_rel_close(fs.r->modal->freq[t], fd.r->modal->freq[t], 1e-8);
        assert_true(fs.r->modal->residual[t] < 1e-8);
        /* effective masses are invariants of the mode (up to sign of the shape) */
        for (int d = 0; d < 6; d++)
            assert_abs_close(fs.r->modal->eff_mass[6 * t + d], fd.r->modal->eff_mass[6 * t + d],
                             1e-7 * (fd.r->modal->total_mass[d] + 1e-300));
    }
    frame_free(&fd);
    frame_free(&fs);
}

/* A free-floating beam: six rigid-body modes reported at 0 Hz, then the first free-free
 * bending mode, beta L = 4.73004 (Blevins Table 8-1, free-free). */
static void test_modal_unsupported_rigid_body_modes(void **state)
{
    (void)state;
    const double L = 4.0;
    frame_run f = frame_solve(beam_model(L, 16, STEEL, "{A: 0.01, Iy: 2.0e-4, Iz: 2.0e-4, J: 3.0e-4}",
        "analyses: {static: [], modal: {modes: 8}}\n"));
    assert_int_equal(f.st, EF_OK);
    assert_int_equal(f.r->modal->n_rigid, 6);
    for (int t = 0; t < 6; t++) assert_true(f.r->modal->freq[t] == 0.0);
    assert_rel_close(omega(&f, 6), beam_omega(4.73004074, L), 1e-4);
    assert_rel_close(omega(&f, 7), beam_omega(4.73004074, L), 1e-4);   /* Iy = Iz: repeated */
    frame_free(&f);
}

/* above_hz: only modes above the given frequency are returned. */
static void test_modal_above_frequency(void **state)
{
    (void)state;
    const double L = 4.0;
    frame_run f = frame_solve(beam_model(L, 24, STEEL, SEC,
        "restrain_all: [ux, uy, rx, rz]\n"
        "supports: {A: fixed}\n"
        "analyses: {static: [], modal: {modes: 2, above_hz: 30.0}}\n"));
    assert_int_equal(f.st, EF_OK);
    /* f1 = 25.6 Hz is skipped; the next two bending modes (160, 449 Hz) come back */
    assert_int_equal(f.r->modal->n_modes, 2);
    assert_rel_close(omega(&f, 0), beam_omega(4.69409113, L), 2e-5);
    assert_rel_close(omega(&f, 1), beam_omega(7.85475744, L), 2e-5);
    assert_true(f.r->modal->freq[0] > 30.0);
    frame_free(&f);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_modal_cantilever_bending),
        cmocka_unit_test(test_modal_simply_supported_consistent_and_lumped),
        cmocka_unit_test(test_modal_axial_bar),
        cmocka_unit_test(test_modal_torsional_shaft),
        cmocka_unit_test(test_modal_point_mass_on_light_cantilever),
        cmocka_unit_test(test_modal_convergence_with_divisions),
        cmocka_unit_test(test_modal_nafems_fv2_double_cross),
        cmocka_unit_test(test_modal_all_modes_sum_to_participating_mass),
        cmocka_unit_test(test_modal_sparse_matches_dense),
        cmocka_unit_test(test_modal_unsupported_rigid_body_modes),
        cmocka_unit_test(test_modal_above_frequency),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
