/* units.h: the model's unit system. The program keeps the user's consistent system
 * (force, length, seconds); only g and the mass unit are derived here.
 */
#ifndef EF_UNITS_H
#define EF_UNITS_H

#include <stdbool.h>

typedef enum { EF_FORCE_N, EF_FORCE_KN, EF_FORCE_MN, EF_FORCE_LBF, EF_FORCE_KIP } ef_force_unit;
typedef enum { EF_LEN_MM, EF_LEN_CM, EF_LEN_M, EF_LEN_IN, EF_LEN_FT } ef_length_unit;

typedef struct {
    ef_force_unit force;
    ef_length_unit length;
} ef_units;

#define EF_G_SI 9.80665   /* standard gravity [m/s^2] (CGPM 1901) */

/* Parse a unit name ("kN", "m", ...); false when unknown. */
bool ef_units_parse_force(const char *s, ef_force_unit *out);
bool ef_units_parse_length(const char *s, ef_length_unit *out);
const char *ef_units_force_name(ef_force_unit u);
const char *ef_units_length_name(ef_length_unit u);
/* Size of one unit in SI (N, m). */
double ef_units_force_si(ef_force_unit u);
double ef_units_length_si(ef_length_unit u);
/* g in model length per s^2. */
double ef_units_g(const ef_units *u);
/* Size of the model's mass unit (force*s^2/length) in kg. */
double ef_units_mass_si(const ef_units *u);
/* Name of the mass unit: "t" for kN,m and N,mm; "kg" for N,m; else "kN*s^2/m" style. */
const char *ef_units_mass_name(const ef_units *u, char *buf, int n);

#endif /* EF_UNITS_H */
