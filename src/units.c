/* units.c: the model's unit system. The program computes in the user's consistent system
 * (force, length, seconds); this file only names the units and derives g and the mass unit.
 * SI sizes are exact by definition: 1 in = 0.0254 m, 1 ft = 0.3048 m, 1 lb = 0.45359237 kg
 * (international yard and pound, 1959; NIST SP 811, 2008, Appendix B), so
 * 1 lbf = 0.45359237 kg * 9.80665 m/s^2 = 4.4482216152605 N and 1 kip = 1000 lbf.
 */
#include "units.h"

#include <stdio.h>
#include <string.h>

static const char *const force_names[] = {"N", "kN", "MN", "lbf", "kip"};
static const double force_si[] = {1.0, 1.0e3, 1.0e6, 4.4482216152605, 4.4482216152605e3};
static const char *const length_names[] = {"mm", "cm", "m", "in", "ft"};
static const double length_si[] = {1.0e-3, 1.0e-2, 1.0, 0.0254, 0.3048};

bool ef_units_parse_force(const char *s, ef_force_unit *out)
{
    for (int i = 0; i < 5; i++) {
        if (strcmp(s, force_names[i]) == 0) {
            *out = (ef_force_unit)i;
            return true;
        }
    }
    return false;
}

bool ef_units_parse_length(const char *s, ef_length_unit *out)
{
    for (int i = 0; i < 5; i++) {
        if (strcmp(s, length_names[i]) == 0) {
            *out = (ef_length_unit)i;
            return true;
        }
    }
    return false;
}

const char *ef_units_force_name(ef_force_unit u)
{
    return ((unsigned)u < 5u) ? force_names[u] : "?";
}

const char *ef_units_length_name(ef_length_unit u)
{
    return ((unsigned)u < 5u) ? length_names[u] : "?";
}

double ef_units_force_si(ef_force_unit u) { return ((unsigned)u < 5u) ? force_si[u] : 0.0; }
double ef_units_length_si(ef_length_unit u) { return ((unsigned)u < 5u) ? length_si[u] : 0.0; }

double ef_units_g(const ef_units *u)
{
    return EF_G_SI / ef_units_length_si(u->length);       /* [length/s^2] */
}

double ef_units_mass_si(const ef_units *u)
{
    /* force*s^2/length: N*s^2/m = kg */
    return ef_units_force_si(u->force) / ef_units_length_si(u->length);
}

const char *ef_units_mass_name(const ef_units *u, char *buf, int n)
{
    const char *name = NULL;
    if ((u->force == EF_FORCE_KN && u->length == EF_LEN_M) ||
        (u->force == EF_FORCE_N && u->length == EF_LEN_MM))
        name = "t";                                        /* 1000 kg */
    else if (u->force == EF_FORCE_N && u->length == EF_LEN_M)
        name = "kg";
    if (n <= 0) return name ? name : "";
    if (name)
        snprintf(buf, (size_t)n, "%s", name);
    else
        snprintf(buf, (size_t)n, "%s*s^2/%s", ef_units_force_name(u->force),
                 ef_units_length_name(u->length));
    return buf;
}
