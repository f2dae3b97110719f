/* test_section.c: section properties from shapes against closed forms computed here by a
 * different route (parallel-axis theorem, part by part) and against the exact torsion
 * series of a rectangle. Sources beside each check. */
#include <float.h>
#include <math.h>

#include "support.h"
#include "section.h"

static const double PI = 3.14159265358979323846;

/* Exact St Venant constant of a solid rectangle a x b (a >= b), series solution
 * (Timoshenko & Goodier, Theory of Elasticity, 3rd ed., §109):
 * J = a b^3 / 3 [1 - (192/π^5)(b/a) Σ_{n odd} tanh(nπa/2b)/n^5]. */
static double rect_torsion_series(double a, double b)
{
    double s = 0.0;
    for (int n = 1; n < 400; n += 2) s += tanh(n * PI * a / (2.0 * b)) / pow(n, 5.0);
    return a * b * b * b / 3.0 * (1.0 - 192.0 / pow(PI, 5.0) * (b / a) * s);
}

/* Rectangle b x h (h along z): A = bh, Iy = b h^3/12, Iz = h b^3/12 (any strength of
 * materials text, e.g. Gere & Goodno, Mechanics of Materials, Appendix E, case 1). */
static void test_section_rectangle_closed_forms(void **state)
{
    (void)state;
    ef_section_props p;
    ef_section_rectangle(0.1, 0.3, &p);
    assert_rel_close(p.A, 0.03, 1e-15);
    assert_rel_close(p.Iy, 0.1 * 0.3 * 0.3 * 0.3 / 12.0, 1e-15);
    assert_rel_close(p.Iz, 0.3 * 0.1 * 0.1 * 0.1 / 12.0, 1e-15);
    assert_true(p.Iy > p.Iz);                 /* depth along z: Iy is the major axis */
    assert_abs_close(p.Iw, 0.0, 0.0);
}

/* Roark's fitted formula (Table 10.7 case 4, from memory) against the exact series:
 * within 0.5 % for aspect ratios 1..20, and symmetric in its arguments. */
static void test_section_rectangle_torsion_matches_exact_series(void **state)
{
    (void)state;
    const double ratios[] = {1.0, 1.2, 1.5, 2.0, 3.0, 4.0, 6.0, 10.0, 20.0};
    for (size_t i = 0; i < sizeof ratios / sizeof ratios[0]; i++) {
        double a = 0.05 * ratios[i], b = 0.05;
        double exact = rect_torsion_series(a, b);
        assert_rel_close(ef_section_rect_torsion(a, b), exact, 5e-3);
        assert_rel_close(ef_section_rect_torsion(b, a), ef_section_rect_torsion(a, b), 1e-15);
    }
    /* square: J = 0.1406 a^4 (Timoshenko & Goodier §109 table, k1 = 0.141; from memory) */
    assert_rel_close(rect_torsion_series(1.0, 1.0), 0.1406, 1e-3);
    assert_rel_close(ef_section_rect_torsion(1.0, 1.0), 0.1406, 2e-3);
}

/* Solid circle: I = π d^4/64, J = Ip = π d^4/32 (Roark Table A.1 and Table 10.7, solid circle,
 * from memory). */
static void test_section_circle_closed_forms(void **state)
{
    (void)state;
    ef_section_props p;
    double d = 0.02;
    ef_section_circle(d, &p);
    assert_rel_close(p.A, PI * d * d / 4.0, 1e-15);
    assert_rel_close(p.Iy, PI * pow(d, 4) / 64.0, 1e-14);
    assert_rel_close(p.Iz, p.Iy, 1e-15);
    assert_rel_close(p.J, PI * pow(d, 4) / 32.0, 1e-14);
}

/* Circular tube: I = π(D^4 - d^4)/64, J = 2I exactly (Roark Table 10.7, hollow circle, from
 * memory); as t -> 0, I -> π r^3 t with r the mean radius (thin-wall limit). */
static void test_section_pipe_closed_forms_and_thin_wall_limit(void **state)
{
    (void)state;
    ef_section_props p;
    double D = 0.1683, t = 0.008, d = D - 2 * t;
    ef_section_pipe(D, t, &p);
    assert_rel_close(p.A, PI * (D * D - d * d) / 4.0, 1e-14);
    assert_rel_close(p.Iy, PI * (pow(D, 4) - pow(d, 4)) / 64.0, 1e-13);
    assert_rel_close(p.J, 2.0 * p.Iy, 1e-15);
    /* thin wall: with D = 2r + t, d = 2r - t, exactly I = π r^3 t (1 + t^2 / (4 r^2))
     * (expanding D^4 - d^4 by hand), so the thin-wall value is off by 1e-8 here */
    ef_section_pipe(1.0, 1e-4, &p);
    double r = 0.5 - 0.5e-4;
    assert_rel_close(p.Iy, PI * r * r * r * 1e-4, 1e-7);
    assert_rel_close(p.Iy, PI * r * r * r * 1e-4 * (1 + 1e-8 / (4 * r * r)), 1e-12);
    /* a wall of half the diameter is a solid circle */
    ef_section_props c;
    ef_section_pipe(0.05, 0.025, &p);
    ef_section_circle(0.05, &c);
    assert_rel_close(p.A, c.A, 1e-14);
    assert_rel_close(p.Iy, c.Iy, 1e-14);
    assert_rel_close(p.J, c.J, 1e-14);
}

/* Doubly symmetric I from three plates, part by part with the parallel-axis theorem
 * (Gere & Goodno, Mechanics of Materials, §12.5): flanges b x tf at ±(h - tf)/2, web
 * tw x (h - 2 tf). J = Σ b t^3 / 3 over the plates (thin-walled open sections, Roark
 * Table 10.7, from memory). Iw = Iz (h - tf)^2 / 4 (AISC
 * Design Guide 9, Torsional Analysis of Structural Steel Members, doubly symmetric I,
 * from memory). */
static void test_section_i_by_parts(void **state)
{
    (void)state;
    const double h = 0.30, b = 0.15, tw = 0.0071, tf = 0.0107;
    const double hw = h - 2 * tf, e = (h - tf) / 2;
    ef_section_props p;
    ef_section_i(h, b, tw, tf, &p);
    double A = 2 * b * tf + hw * tw;
    double Iy = 2 * (b * tf * tf * tf / 12 + b * tf * e * e) + tw * hw * hw * hw / 12;
    double Iz = 2 * (tf * b * b * b / 12) + hw * tw * tw * tw / 12;
    double J = (2 * b * tf * tf * tf + hw * tw * tw * tw) / 3;
    assert_rel_close(p.A, A, 1e-14);
    assert_rel_close(p.Iy, Iy, 1e-13);
    assert_rel_close(p.Iz, Iz, 1e-13);
    assert_rel_close(p.J, J, 1e-14);
    assert_rel_close(p.Iw, Iz * (h - tf) * (h - tf) / 4, 1e-14);
    assert_true(p.Iy > p.Iz);                 /* Iy is the major axis of an I */
}

/* Rectangular hollow section part by part (two flanges b x t at ±(h - t)/2 and two webs
 * t x (h - 2t) at ±(b - t)/2), parallel-axis theorem as above. J by Bredt's formula
 * (Timoshenko & Goodier §115; Roark Table 10.7, thin-walled closed sections; from
 * memory): for a square box of mean side a, J = 4 a^4 t / (4a) = a^3 t. */
static void test_section_box_by_parts_and_bredt(void **state)
{
    (void)state;
    const double h = 0.20, b = 0.10, t = 0.006;
    ef_section_props p;
    ef_section_box(h, b, t, &p);
    double ef = (h - t) / 2, ew = (b - t) / 2, hw = h - 2 * t;
    double A = 2 * b * t + 2 * t * hw;
    double Iy = 2 * (b * t * t * t / 12 + b * t * ef * ef) + 2 * (t * hw * hw * hw / 12);
    double Iz = 2 * (t * b * b * b / 12) + 2 * (hw * t * t * t / 12 + hw * t * ew * ew);
    assert_rel_close(p.A, A, 1e-14);
    assert_rel_close(p.Iy, Iy, 1e-13);
    assert_rel_close(p.Iz, Iz, 1e-13);
    double Am = (b - t) * (h - t), s = 2 * ((b - t) + (h - t));
    assert_rel_close(p.J, 4 * Am * Am * t / s, 1e-14);
    ef_section_box(0.15, 0.15, 0.005, &p);
    double a = 0.15 - 0.005;
    assert_rel_close(p.J, a * a * a * 0.005, 1e-14);
}

static void test_section_impossible_dimensions_are_reported(void **state)
{
    (void)state;
    ef_section_props p;
    const double pipe_bad[4] = {0.1, 0.06, 0, 0};
    const double pipe_ok[4] = {0.1, 0.05, 0, 0};
    const double i_flanges[4] = {0.3, 0.15, 0.007, 0.15};
    const double i_web[4] = {0.3, 0.15, 0.2, 0.01};
    const double box_thick[4] = {0.2, 0.01, 0.006, 0};
    const double negative[4] = {-0.1, 0.1, 0, 0};
    const double not_finite[4] = {(double)NAN, 0.1, 0, 0};
    assert_non_null(ef_section_dims_problem(EF_SHAPE_PIPE, pipe_bad));
    assert_null(ef_section_dims_problem(EF_SHAPE_PIPE, pipe_ok));
    assert_non_null(ef_section_dims_problem(EF_SHAPE_I, i_flanges));
    assert_non_null(ef_section_dims_problem(EF_SHAPE_I, i_web));
    assert_non_null(ef_section_dims_problem(EF_SHAPE_BOX, box_thick));
    assert_non_null(ef_section_dims_problem(EF_SHAPE_RECTANGLE, negative));
    assert_non_null(ef_section_dims_problem(EF_SHAPE_CIRCLE, not_finite));
    assert_false(ef_section_props_of_shape(EF_SHAPE_PIPE, pipe_bad, &p));
    assert_abs_close(p.A, 0.0, 0.0);
    assert_true(ef_section_props_of_shape(EF_SHAPE_PIPE, pipe_ok, &p));
    assert_true(p.A > 0.0);
}

/* The dispatcher gives what the individual shapes give, dimensions in file order. */
static void test_section_props_of_shape_uses_file_order(void **state)
{
    (void)state;
    ef_section_props a, b;
    const double dims[4] = {0.30, 0.15, 0.0071, 0.0107};
    assert_true(ef_section_props_of_shape(EF_SHAPE_I, dims, &a));
    ef_section_i(0.30, 0.15, 0.0071, 0.0107, &b);
    assert_rel_close(a.Iy, b.Iy, 0.0);
    assert_int_equal(ef_section_n_dims(EF_SHAPE_BOX), 3);
    assert_string_equal(ef_section_dim_name(EF_SHAPE_I, 2), "tw");
    assert_string_equal(ef_section_shape_name(EF_SHAPE_PIPE), "pipe");
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_section_rectangle_closed_forms),
        cmocka_unit_test(test_section_rectangle_torsion_matches_exact_series),
        cmocka_unit_test(test_section_circle_closed_forms),
        cmocka_unit_test(test_section_pipe_closed_forms_and_thin_wall_limit),
        cmocka_unit_test(test_section_i_by_parts),
        cmocka_unit_test(test_section_box_by_parts_and_bredt),
        cmocka_unit_test(test_section_impossible_dimensions_are_reported),
        cmocka_unit_test(test_section_props_of_shape_uses_file_order),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
