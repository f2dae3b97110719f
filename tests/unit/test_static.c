/* test_static.c: linear static analysis against closed-form solutions.
 * Units in every model: kN and m. Sources are named beside each expected value.
 */
#include "frame_support.h"

#include <stdio.h>

#define E_ 210e6
#define G_ 81e6

/* A cantilever along +x, fixed at A, tip load at B, `div` elements. Gravity -Z, so local
 * z = +Z and bending under Fz uses Iy. */
static char *cantilever(double L, int div, const char *section, const char *load)
{
    static char buf[4096];
    snprintf(buf, sizeof buf,
             "eigenframe: 1\n"
             "units: {force: kN, length: m}\n"
             "mesh: {divisions: %d}\n"
             "materials: {steel: {E: 210e6, G: 81e6}}\n"
             "sections: {s: %s}\n"
             "nodes: {A: [0, 0, 0], B: [%.17g, 0, 0]}\n"
             "members: {M: {nodes: [A, B], section: s, material: steel}}\n"
             "supports: {A: fixed}\n"
             "loads: {P: %s}\n",
             div, section, L, load);
    return buf;
}

/* Cantilever, tip load P: w = P L^3 / (3 E I), rotation P L^2 / (2 E I), base moment P L
 * (Timoshenko & Gere, Mechanics of Materials; Roark Table 8.1 case 1a). Cubic shape
 * functions are exact for end loads, so any subdivision gives the closed form. */
static void test_static_cantilever_tip_load(void **state)
{
    (void)state;
    const double L = 3.0, P = 10.0, Iy = 2e-4;
    frame_run f = frame_solve(cantilever(L, 4, "{A: 0.01, Iy: 2.0e-4, Iz: 1.0e-4, J: 5.0e-5}",
                                         "{nodes: {B: {Fz: -10}}}"));
    assert_int_equal(f.st, EF_OK);
    assert_rel_close(frame_disp(&f, 0, "B", 2), -P * L * L * L / (3 * E_ * Iy), 1e-10);
    assert_rel_close(frame_disp(&f, 0, "B", 4), P * L * L / (2 * E_ * Iy), 1e-10);
    assert_rel_close(frame_react(&f, 0, "A", 2), P, 1e-12);
    assert_rel_close(frame_react(&f, 0, "A", 4), -P * L, 1e-12);   /* My at the base: -P L */
    /* internal moment is linear: at the base |My| = P L, zero at the tip */
    assert_rel_close(fabs(frame_station(&f, 0, "M", 0, 4, NULL)), P * L, 1e-10);
    assert_abs_close(frame_station(&f, 0, "M", 10, 4, NULL), 0.0, 1e-9);
    frame_free(&f);
}

/* Simply supported beam under uniform load w: midspan deflection 5 w L^4 / (384 E I),
 * reactions w L / 2, midspan moment w L^2 / 8 (Roark Table 8.1 case 2e; any text). */
static void test_static_simply_supported_udl(void **state)
{
    (void)state;
    const double L = 6.0, w = 4.0, Iy = 2e-4;
    const char *yaml =
        "eigenframe: 1\n"
        "units: {force: kN, length: m}\n"
        "mesh: {divisions: 4, stations: 11}\n"
        "materials: {steel: {E: 210e6, G: 81e6}}\n"
        "sections: {s: {A: 0.01, Iy: 2.0e-4, Iz: 1.0e-4, J: 5.0e-5}}\n"
        "nodes: {A: [0, 0, 0], C: [3, 0, 0], B: [6, 0, 0]}\n"
        "members: {M1: {nodes: [A, C], section: s, material: steel},\n"
        "          M2: {nodes: [C, B], section: s, material: steel}}\n"
        "supports: {A: [ux, uy, uz, rx], B: [uy, uz]}\n"
        "loads: {w: {members: {M1: [{uniform: [0, 0, -4]}], M2: [{uniform: [0, 0, -4]}]}}}\n";
    frame_run f = frame_solve(yaml);
    assert_int_equal(f.st, EF_OK);
    assert_rel_close(frame_disp(&f, 0, "C", 2), -5 * w * pow(L, 4) / (384 * E_ * Iy), 1e-10);
    assert_rel_close(frame_react(&f, 0, "A", 2), w * L / 2, 1e-12);
    assert_rel_close(frame_react(&f, 0, "B", 2), w * L / 2, 1e-12);
    /* moment at the end of M1 (midspan); sagging: the part beyond pulls the bottom */
    assert_rel_close(fabs(frame_station(&f, 0, "M1", 10, 4, NULL)), w * L * L / 8, 1e-10);
    /* quarter point within M1 (station 5 of 11 = 1.5 m): M = w x (L - x) / 2 */
    double x;
    double m = frame_station(&f, 0, "M1", 5, 4, &x);
    assert_rel_close(x, 1.5, 1e-14);
    assert_rel_close(fabs(m), w * 1.5 * (L - 1.5) / 2, 1e-10);
    frame_free(&f);
}

/* Fixed-fixed beam, point load P at a from the left (b = L - a): end moments
 * P a b^2 / L^2 and P a^2 b / L^2, reactions P b^2 (3a + b) / L^3 and P a^2 (a + 3b) / L^3
 * (Roark Table 8.1 case 1d, from memory; also any table of fixed-end moments). */
static void test_static_fixed_fixed_offcentre_point(void **state)
{
    (void)state;
    const double L = 5.0, a = 1.5, b = L - a, P = 12.0;
    const char *yaml =
        "eigenframe: 1\n"
        "units: {force: kN, length: m}\n"
        "mesh: {divisions: 3}\n"
        "materials: {steel: {E: 210e6, G: 81e6}}\n"
        "sections: {s: {A: 0.01, Iy: 2.0e-4, Iz: 1.0e-4, J: 5.0e-5}}\n"
        "nodes: {A: [0, 0, 0], B: [5, 0, 0]}\n"
        "members: {M: {nodes: [A, B], section: s, material: steel}}\n"
        "supports: {A: fixed, B: fixed}\n"
        "loads: {P: {members: {M: [{point: [0, 0, -12], at: 0.3}]}}}\n";
    frame_run f = frame_solve(yaml);
    assert_int_equal(f.st, EF_OK);
    assert_rel_close(fabs(frame_react(&f, 0, "A", 4)), P * a * b * b / (L * L), 1e-10);
    assert_rel_close(fabs(frame_react(&f, 0, "B", 4)), P * a * a * b / (L * L), 1e-10);
    assert_rel_close(frame_react(&f, 0, "A", 2), P * b * b * (3 * a + b) / pow(L, 3), 1e-10);
    assert_rel_close(frame_react(&f, 0, "B", 2), P * a * a * (a + 3 * b) / pow(L, 3), 1e-10);
    /* member end forces carry the same moments (local My at the ends) */
    assert_rel_close(fabs(frame_end(&f, 0, "M", 0, 4)), P * a * b * b / (L * L), 1e-10);
    assert_rel_close(fabs(frame_end(&f, 0, "M", 1, 4)), P * a * a * b / (L * L), 1e-10);
    frame_free(&f);
}

/* L-shaped cantilever out of its plane: arm 1 (length a) along x from the fixed base,
 * arm 2 (length b) along y, load P in -z at the tip. By the unit-load method (virtual
 * work): w = P b^3/(3 E I) + P a^3/(3 E I) + P b^2 a/(G J) (bending of both arms and
 * torsion of arm 1 by the torque P b). */
static void test_static_l_frame_bending_torsion(void **state)
{
    (void)state;
    const double a = 2.0, b = 1.5, P = 5.0, I = 2e-4, J = 5e-5;
    const char *yaml =
        "eigenframe: 1\n"
        "units: {force: kN, length: m}\n"
        "materials: {steel: {E: 210e6, G: 81e6}}\n"
        "sections: {s: {A: 0.01, Iy: 2.0e-4, Iz: 1.0e-4, J: 5.0e-5}}\n"
        "nodes: {O: [0, 0, 0], K: [2, 0, 0], T: [2, 1.5, 0]}\n"
        "members: {M1: {nodes: [O, K], section: s, material: steel},\n"
        "          M2: {nodes: [K, T], section: s, material: steel}}\n"
        "supports: {O: fixed}\n"
        "loads: {P: {nodes: {T: {Fz: -5}}}}\n";
    frame_run f = frame_solve(yaml);
    assert_int_equal(f.st, EF_OK);
    double w = P * b * b * b / (3 * E_ * I) + P * a * a * a / (3 * E_ * I) + P * b * b * a / (G_ * J);
    assert_rel_close(frame_disp(&f, 0, "T", 2), -w, 1e-10);
    /* the torque in arm 1 is P b */
    assert_rel_close(fabs(frame_end(&f, 0, "M1", 0, 3)), P * b, 1e-10);
    frame_free(&f);
}

/* Cantilever with a uniform load w on its outer part [a, L]: tip deflection
 * w (3 L^4 - 4 a^3 L + a^4) / (24 E I), from integrating the point-load deflection
 * P x^2 (3L - x) / (6 E I) over the loaded length (Roark Table 8.1 case 2a, from memory). */
static void test_static_partial_uniform_load(void **state)
{
    (void)state;
    const double L = 4.0, a = 1.0, w = 3.0, Iy = 2e-4;
    frame_run f = frame_solve(cantilever(L, 4, "{A: 0.01, Iy: 2.0e-4, Iz: 1.0e-4, J: 5.0e-5}",
                                         "{members: {M: [{uniform: [0, 0, -3], from: 0.25, to: 1.0}]}}"));
    assert_int_equal(f.st, EF_OK);
    double want = w * (3 * pow(L, 4) - 4 * pow(a, 3) * L + pow(a, 4)) / (24 * E_ * Iy);
    assert_rel_close(frame_disp(&f, 0, "B", 2), -want, 1e-10);
    assert_rel_close(frame_react(&f, 0, "A", 2), w * (L - a), 1e-12);
    frame_free(&f);
}

/* Cantilever with a load rising linearly from 0 at the root to q at the tip:
 * tip deflection 11 q L^4 / (120 E I) (Roark Table 8.1 case 2a with a = 0, from memory;
 * also by integrating P x^2 (3L - x)/(6EI) against q x / L). Here split over 3 elements,
 * with the load given as a member load over the whole length. */
static void test_static_linear_load(void **state)
{
    (void)state;
    const double L = 3.0, q = 6.0, Iy = 2e-4;
    frame_run f = frame_solve(cantilever(L, 3, "{A: 0.01, Iy: 2.0e-4, Iz: 1.0e-4, J: 5.0e-5}",
                                         "{members: {M: [{linear: [[0, 0, 0], [0, 0, -6]]}]}}"));
    assert_int_equal(f.st, EF_OK);
    assert_rel_close(frame_disp(&f, 0, "B", 2), -11 * q * pow(L, 4) / (120 * E_ * Iy), 1e-10);
    /* base moment q L^2 / 3 (resultant q L / 2 at 2L/3 from the root) */
    assert_rel_close(fabs(frame_react(&f, 0, "A", 4)), q * L * L / 3, 1e-10);
    frame_free(&f);
}

/* Propped cantilever by a release: beam fixed at A, fixed support at B but the member
 * end at B released in bending (hinged end). Uniform load w: reaction at B 3 w L / 8,
 * moment at A w L^2 / 8 (Roark Table 8.1 case 2c, from memory), no moment at B. */
static void test_static_hinged_end_release(void **state)
{
    (void)state;
    const double L = 5.0, w = 2.0;
    const char *yaml =
        "eigenframe: 1\n"
        "units: {force: kN, length: m}\n"
        "materials: {steel: {E: 210e6, G: 81e6}}\n"
        "sections: {s: {A: 0.01, Iy: 2.0e-4, Iz: 1.0e-4, J: 5.0e-5}}\n"
        "nodes: {A: [0, 0, 0], B: [5, 0, 0]}\n"
        "members: {M: {nodes: [A, B], section: s, material: steel, hinged: end}}\n"
        "supports: {A: fixed, B: fixed}\n"
        "loads: {w: {members: {M: [{uniform: [0, 0, -2]}]}}}\n";
    frame_run f = frame_solve(yaml);
    assert_int_equal(f.st, EF_OK);
    assert_rel_close(frame_react(&f, 0, "B", 2), 3 * w * L / 8, 1e-10);
    assert_rel_close(fabs(frame_react(&f, 0, "A", 4)), w * L * L / 8, 1e-10);
    assert_abs_close(frame_end(&f, 0, "M", 1, 4), 0.0, 1e-9);
    assert_abs_close(frame_react(&f, 0, "B", 4), 0.0, 1e-9);
    frame_free(&f);
}

/* Cantilever on a tip spring k: w = P / (k + 3 E I / L^3) (springs in parallel). */
static void test_static_spring_support(void **state)
{
    (void)state;
    const double L = 3.0, P = 10.0, Iy = 2e-4, k = 2000.0;
    const char *yaml =
        "eigenframe: 1\n"
        "units: {force: kN, length: m}\n"
        "materials: {steel: {E: 210e6, G: 81e6}}\n"
        "sections: {s: {A: 0.01, Iy: 2.0e-4, Iz: 1.0e-4, J: 5.0e-5}}\n"
        "nodes: {A: [0, 0, 0], B: [3, 0, 0]}\n"
        "members: {M: {nodes: [A, B], section: s, material: steel}}\n"
        "supports: {A: fixed, B: {uz: 2000.0}}\n"
        "loads: {P: {nodes: {B: {Fz: -10}}}}\n";
    frame_run f = frame_solve(yaml);
    assert_int_equal(f.st, EF_OK);
    double w = P / (k + 3 * E_ * Iy / pow(L, 3));
    assert_rel_close(frame_disp(&f, 0, "B", 2), -w, 1e-10);
    assert_rel_close(frame_react(&f, 0, "B", 2), k * w, 1e-10);   /* the spring's force */
    frame_free(&f);
}

/* Deep cantilever with shear areas (Timoshenko beam): w = P L^3/(3 E I) + P L/(G A_s)
 * (Timoshenko & Gere, Mechanics of Materials, shear deflection of a cantilever). */
static void test_static_timoshenko_deep_cantilever(void **state)
{
    (void)state;
    const double L = 1.2, P = 50.0, Iy = 2e-4, Az = 0.005;
    frame_run f = frame_solve(cantilever(L, 2,
        "{A: 0.01, Iy: 2.0e-4, Iz: 1.0e-4, J: 5.0e-5, Ay: 0.004, Az: 0.005}",
        "{nodes: {B: {Fz: -50}}}"));
    assert_int_equal(f.st, EF_OK);
    double w = P * pow(L, 3) / (3 * E_ * Iy) + P * L / (G_ * Az);
    assert_rel_close(frame_disp(&f, 0, "B", 2), -w, 1e-10);
    frame_free(&f);
}

/* The same cantilever along x and along a 45 degree inclined axis in plan, with the load
 * normal to it, gives the same deflection magnitude; and a member rolled by 90 degrees
 * with Iy and Iz exchanged gives the same result as the unrolled one. */
static void test_static_inclined_and_rolled_members_agree(void **state)
{
    (void)state;
    const char *base =
        "eigenframe: 1\n"
        "units: {force: kN, length: m}\n"
        "materials: {steel: {E: 210e6, G: 81e6}}\n"
        "sections: {s: {A: 0.01, Iy: 2.0e-4, Iz: 1.0e-4, J: 5.0e-5},\n"
        "           t: {A: 0.01, Iy: 1.0e-4, Iz: 2.0e-4, J: 5.0e-5}}\n"
        "nodes: {A: [0, 0, 0], B: [3, 0, 0], C: [0, 5, 0], D: [2.1213203435596424, 7.121320343559643, 0],\n"
        "        E: [0, 10, 0], F: [3, 10, 0]}\n"
        "members: {M1: {nodes: [A, B], section: s, material: steel},\n"
        "          M2: {nodes: [C, D], section: s, material: steel},\n"
        "          M3: {nodes: [E, F], section: t, material: steel, roll: 90}}\n"
        "supports: {A: fixed, C: fixed, E: fixed}\n"
        "loads: {P: {nodes: {B: {Fz: -10, Fy: 4}, D: {Fz: -10, Fx: -2.8284271247461903, Fy: 2.8284271247461903},\n"
        "                    F: {Fz: -10, Fy: 4}}}}\n";
    frame_run f = frame_solve(base);
    assert_int_equal(f.st, EF_OK);
    double wz = frame_disp(&f, 0, "B", 2);
    double wy = frame_disp(&f, 0, "B", 1);
    assert_rel_close(frame_disp(&f, 0, "D", 2), wz, 1e-10);
    double dx = frame_disp(&f, 0, "D", 0), dy = frame_disp(&f, 0, "D", 1);
    assert_rel_close(sqrt(dx * dx + dy * dy), fabs(wy), 1e-9);
    assert_rel_close(frame_disp(&f, 0, "F", 2), wz, 1e-10);
    assert_rel_close(frame_disp(&f, 0, "F", 1), wy, 1e-10);
    frame_free(&f);
}

/* A 3D frame under every kind of load: reactions balance the applied loads (statics). */
static void test_static_reactions_balance_loads(void **state)
{
    (void)state;
    const char *yaml =
        "eigenframe: 1\n"
        "units: {force: kN, length: m}\n"
        "materials: {steel: {E: 210e6, G: 81e6, density: 7.85}}\n"
        "sections: {s: {A: 0.01, Iy: 2.0e-4, Iz: 1.0e-4, J: 5.0e-5}}\n"
        "nodes: {a: [0,0,0], b: [4,0,0], c: [4,3,0], d: [0,3,0], A: [0,0,3], B: [4,0,3], C: [4,3,3.5], D: [0,3,3]}\n"
        "members:\n"
        "  c1: {nodes: [a, A], section: s, material: steel}\n"
        "  c2: {nodes: [b, B], section: s, material: steel}\n"
        "  c3: {nodes: [c, C], section: s, material: steel, roll: 30}\n"
        "  c4: {nodes: [d, D], section: s, material: steel}\n"
        "  b1: {nodes: [A, B], section: s, material: steel}\n"
        "  b2: {nodes: [B, C], section: s, material: steel, release: {end: [ry]}}\n"
        "  b3: {nodes: [C, D], section: s, material: steel, up: [0, 1, 1]}\n"
        "  b4: {nodes: [D, A], section: s, material: steel}\n"
        "  br: {nodes: [a, B], section: s, material: steel, axial_only: true}\n"
        "supports: {a: fixed, b: pinned, c: fixed, d: {ux: fixed, uy: fixed, uz: fixed, rz: 500.0}}\n"
        "loads:\n"
        "  L1:\n"
        "    self_weight: 1.0\n"
        "    nodes: {B: {Fx: 3, My: 1.5}, C: {Fy: -2, Mz: 0.7}}\n"
        "    members:\n"
        "      b1: [{uniform: [0, 0, -4.2]}, {point: [1, 0, -5], at: 0.3}, {moment: [0.5, 2, 0], at: 0.6}]\n"
        "      b3: [{linear: [[0, 0, -2], [0, 1, -6]], from: 0.2, to: 0.9}]\n"
        "      b4: [{uniform: [0, -3, 0], axes: local, from: 0.1, to: 0.4}]\n"
        "      br: [{uniform: [0, 0, -1.0]}]\n";
    frame_run f = frame_solve(yaml);
    assert_int_equal(f.st, EF_OK);
    const ef_load_result *lr = &f.r->statics[0];
    for (int c = 0; c < 6; c++)
        assert_abs_close(lr->applied[c] + lr->reaction_sum[c], 0.0, 1e-9 * (1 + fabs(lr->applied[c])));
    assert_true(lr->eq_residual < 1e-12);
    assert_true(lr->solve_residual < 1e-12);
    /* the first station is minus the start end force, the last equals the end force */
    for (ef_index k = 0; k < f.m->n_members; k++) {
        const double *first = lr->stations + 7 * f.r->st_first[k];
        const double *last = lr->stations + 7 * (f.r->st_first[k + 1] - 1);
        for (int c = 0; c < 6; c++) {
            assert_abs_close(first[1 + c], -lr->end_forces[12 * k + c], 1e-9);
            assert_abs_close(last[1 + c], lr->end_forces[12 * k + 6 + c], 1e-9);
        }
    }
    frame_free(&f);
}

/* Numbering order does not change results: the same frame with nodes and members listed
 * in another order gives the same displacements at every named node. */
static void test_static_independent_of_numbering(void **state)
{
    (void)state;
    const char *head =
        "eigenframe: 1\n"
        "units: {force: kN, length: m}\n"
        "materials: {steel: {E: 210e6, G: 81e6}}\n"
        "sections: {s: {A: 0.01, Iy: 2.0e-4, Iz: 1.0e-4, J: 5.0e-5}}\n"
        "supports: {a: fixed, d: fixed}\n"
        "loads: {L: {nodes: {b: {Fx: 2, Fz: -3}, c: {My: 1}}, members: {m2: [{uniform: [0, 1, -2]}]}}}\n";
    char y1[2048], y2[2048];
    snprintf(y1, sizeof y1, "%s"
             "nodes: {a: [0,0,0], b: [0,0,3], c: [4,1,3], d: [4,1,0]}\n"
             "members: {m1: {nodes: [a, b], section: s, material: steel},\n"
             "          m2: {nodes: [b, c], section: s, material: steel},\n"
             "          m3: {nodes: [c, d], section: s, material: steel}}\n", head);
    snprintf(y2, sizeof y2, "%s"
             "nodes: {d: [4,1,0], c: [4,1,3], a: [0,0,0], b: [0,0,3]}\n"
             "members: {m3: {nodes: [c, d], section: s, material: steel},\n"
             "          m2: {nodes: [b, c], section: s, material: steel},\n"
             "          m1: {nodes: [a, b], section: s, material: steel}}\n", head);
    frame_run f1 = frame_solve(y1), f2 = frame_solve(y2);
    assert_int_equal(f1.st, EF_OK);
    assert_int_equal(f2.st, EF_OK);
    const char *names[] = {"b", "c"};
    for (int i = 0; i < 2; i++)
        for (int c = 0; c < 6; c++)
            assert_abs_close(frame_disp(&f1, 0, names[i], c), frame_disp(&f2, 0, names[i], c), 1e-14);
    frame_free(&f1);
    frame_free(&f2);
}

/* A beam on two pins can spin about its own axis: reported by node and DOF, in words. */
static void test_static_mechanism_named(void **state)
{
    (void)state;
    const char *yaml =
        "eigenframe: 1\n"
        "units: {force: kN, length: m}\n"
        "materials: {steel: {E: 210e6, G: 81e6}}\n"
        "sections: {s: {A: 0.01, Iy: 2.0e-4, Iz: 1.0e-4, J: 5.0e-5}}\n"
        "nodes: {A: [0, 0, 0], B: [5, 0, 0]}\n"
        "members: {M: {nodes: [A, B], section: s, material: steel, divisions: 1}}\n"
        "supports: {A: pinned, B: pinned}\n"
        "loads: {P: {nodes: {B: {Fz: -1}}}}\n";
    frame_run f = frame_solve(yaml);
    assert_int_equal(f.st, EF_EUNSTABLE);
    assert_true(frame_diag_has(&f, "rotation rx"));
    assert_true(frame_diag_has(&f, "node '"));
    frame_free(&f);
}

/* Combinations equal the factored sum of their cases (linear superposition). */
static void test_static_combination_is_superposition(void **state)
{
    (void)state;
    const char *yaml =
        "eigenframe: 1\n"
        "units: {force: kN, length: m}\n"
        "materials: {steel: {E: 210e6, G: 81e6, density: 7.85}}\n"
        "sections: {s: {A: 0.01, Iy: 2.0e-4, Iz: 1.0e-4, J: 5.0e-5}}\n"
        "nodes: {A: [0, 0, 0], B: [0, 0, 3], C: [4, 0, 3]}\n"
        "members: {M1: {nodes: [A, B], section: s, material: steel},\n"
        "          M2: {nodes: [B, C], section: s, material: steel}}\n"
        "supports: {A: fixed, C: pinned}\n"
        "loads: {g: {self_weight: 1.0}, q: {members: {M2: [{uniform: [0, 0, -5]}]}},\n"
        "        w: {nodes: {B: {Fx: 3}}}}\n"
        "combinations: {C1: {g: 1.35, q: 1.5}, C2: {C1: 1.0, w: 0.9}}\n"
        "analyses: {static: [g, q, w, C1, C2]}\n";
    frame_run f = frame_solve(yaml);
    assert_int_equal(f.st, EF_OK);
    for (int c = 0; c < 6; c++) {
        double g = frame_disp(&f, 0, "B", c), q = frame_disp(&f, 1, "B", c), w = frame_disp(&f, 2, "B", c);
        assert_abs_close(frame_disp(&f, 3, "B", c), 1.35 * g + 1.5 * q, 1e-14);
        assert_abs_close(frame_disp(&f, 4, "B", c), 1.35 * g + 1.5 * q + 0.9 * w, 1e-14);
        double eg = frame_end(&f, 0, "M2", 1, c), eq = frame_end(&f, 1, "M2", 1, c);
        assert_abs_close(frame_end(&f, 3, "M2", 1, c), 1.35 * eg + 1.5 * eq, 1e-9);
    }
    frame_free(&f);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_static_cantilever_tip_load),
        cmocka_unit_test(test_static_simply_supported_udl),
        cmocka_unit_test(test_static_fixed_fixed_offcentre_point),
        cmocka_unit_test(test_static_l_frame_bending_torsion),
        cmocka_unit_test(test_static_partial_uniform_load),
        cmocka_unit_test(test_static_linear_load),
        cmocka_unit_test(test_static_hinged_end_release),
        cmocka_unit_test(test_static_spring_support),
        cmocka_unit_test(test_static_timoshenko_deep_cantilever),
        cmocka_unit_test(test_static_inclined_and_rolled_members_agree),
        cmocka_unit_test(test_static_reactions_balance_loads),
        cmocka_unit_test(test_static_independent_of_numbering),
        cmocka_unit_test(test_static_mechanism_named),
        cmocka_unit_test(test_static_combination_is_superposition),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
