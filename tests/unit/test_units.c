/* test_units.c: unit names, SI sizes, g and the mass unit.
 * Reference values: exact definitions of the international foot, inch and pound
 * (NIST SP 811, 2008, Appendix B: 1 ft = 0.3048 m, 1 in = 0.0254 m, 1 lb = 0.45359237 kg)
 * and standard gravity g_n = 9.80665 m/s^2 (3rd CGPM, 1901). */
#include <string.h>

#include "support.h"
#include "units.h"

static void test_units_names_round_trip(void **state)
{
    (void)state;
    const char *forces[] = {"N", "kN", "MN", "lbf", "kip"};
    const char *lengths[] = {"mm", "cm", "m", "in", "ft"};
    for (int i = 0; i < 5; i++) {
        ef_force_unit f;
        ef_length_unit l;
        assert_true(ef_units_parse_force(forces[i], &f));
        assert_string_equal(ef_units_force_name(f), forces[i]);
        assert_true(ef_units_parse_length(lengths[i], &l));
        assert_string_equal(ef_units_length_name(l), lengths[i]);
    }
}

static void test_units_unknown_names_are_rejected_case_sensitively(void **state)
{
    (void)state;
    ef_force_unit f;
    ef_length_unit l;
    assert_false(ef_units_parse_force("KN", &f));
    assert_false(ef_units_parse_force("kn", &f));
    assert_false(ef_units_parse_force("", &f));
    assert_false(ef_units_parse_length("M", &l));
    assert_false(ef_units_parse_length("metre", &l));
    assert_false(ef_units_parse_length("inch", &l));
}

static void test_units_si_sizes_follow_the_definitions(void **state)
{
    (void)state;
    assert_rel_close(ef_units_force_si(EF_FORCE_KN), 1.0e3, 1e-15);
    assert_rel_close(ef_units_force_si(EF_FORCE_MN), 1.0e6, 1e-15);
    /* 1 lbf = 0.45359237 kg * 9.80665 m/s^2 (NIST SP 811 B.8: 4.448222 N) */
    assert_rel_close(ef_units_force_si(EF_FORCE_LBF), 0.45359237 * 9.80665, 1e-14);
    assert_rel_close(ef_units_force_si(EF_FORCE_KIP), 1000.0 * 0.45359237 * 9.80665, 1e-14);
    assert_rel_close(ef_units_length_si(EF_LEN_MM), 1.0e-3, 1e-15);
    assert_rel_close(ef_units_length_si(EF_LEN_CM), 1.0e-2, 1e-15);
    assert_rel_close(ef_units_length_si(EF_LEN_IN), 0.0254, 1e-15);
    assert_rel_close(ef_units_length_si(EF_LEN_FT), 0.3048, 1e-15);
}

static void test_units_g_in_model_lengths(void **state)
{
    (void)state;
    ef_units u = {EF_FORCE_KN, EF_LEN_M};
    assert_rel_close(ef_units_g(&u), 9.80665, 1e-15);
    u.length = EF_LEN_MM;
    assert_rel_close(ef_units_g(&u), 9806.65, 1e-14);
    /* 9.80665 / 0.3048 = 32.174048556... ft/s^2 (NIST SP 811 B.8: 32.17405 ft/s^2) */
    u.length = EF_LEN_FT;
    assert_rel_close(ef_units_g(&u), 32.17405, 2e-7);
    assert_rel_close(ef_units_g(&u), 9.80665 / 0.3048, 1e-14);
    /* 386.0886 in/s^2 */
    u.length = EF_LEN_IN;
    assert_rel_close(ef_units_g(&u), 386.0886, 2e-7);
}

static void test_units_mass_unit_in_kilograms(void **state)
{
    (void)state;
    ef_units u = {EF_FORCE_KN, EF_LEN_M};
    assert_rel_close(ef_units_mass_si(&u), 1000.0, 1e-15);      /* kN s^2/m = tonne */
    u = (ef_units){EF_FORCE_N, EF_LEN_MM};
    assert_rel_close(ef_units_mass_si(&u), 1000.0, 1e-15);      /* N s^2/mm = tonne */
    u = (ef_units){EF_FORCE_N, EF_LEN_M};
    assert_rel_close(ef_units_mass_si(&u), 1.0, 1e-15);
    /* kip s^2/in = 4448.2216152605 N / 0.0254 m = 175126.835 kg */
    u = (ef_units){EF_FORCE_KIP, EF_LEN_IN};
    assert_rel_close(ef_units_mass_si(&u), 4448.2216152605 / 0.0254, 1e-14);
    assert_rel_close(ef_units_mass_si(&u), 175126.835, 1e-8);
    /* lbf s^2/ft = 1 slug = 14.59390 kg (NIST SP 811 B.8) */
    u = (ef_units){EF_FORCE_LBF, EF_LEN_FT};
    assert_rel_close(ef_units_mass_si(&u), 14.59390, 1e-6);
}

static void test_units_mass_names(void **state)
{
    (void)state;
    char buf[32];
    ef_units u = {EF_FORCE_KN, EF_LEN_M};
    assert_string_equal(ef_units_mass_name(&u, buf, sizeof buf), "t");
    u = (ef_units){EF_FORCE_N, EF_LEN_MM};
    assert_string_equal(ef_units_mass_name(&u, buf, sizeof buf), "t");
    u = (ef_units){EF_FORCE_N, EF_LEN_M};
    assert_string_equal(ef_units_mass_name(&u, buf, sizeof buf), "kg");
    u = (ef_units){EF_FORCE_KIP, EF_LEN_IN};
    assert_string_equal(ef_units_mass_name(&u, buf, sizeof buf), "kip*s^2/in");
    u = (ef_units){EF_FORCE_MN, EF_LEN_CM};
    assert_string_equal(ef_units_mass_name(&u, buf, sizeof buf), "MN*s^2/cm");
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_units_names_round_trip),
        cmocka_unit_test(test_units_unknown_names_are_rejected_case_sensitively),
        cmocka_unit_test(test_units_si_sizes_follow_the_definitions),
        cmocka_unit_test(test_units_g_in_model_lengths),
        cmocka_unit_test(test_units_mass_unit_in_kilograms),
        cmocka_unit_test(test_units_mass_names),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
