/* mass.h: the mass matrix of a model (private), from every mass source the model file
 * allows: structural mass (density), section extra_mass, extra node masses with rotary
 * inertia, and gravity loads of the cases listed in mass_source.loads divided by g.
 */
#ifndef EF_MASS_H
#define EF_MASS_H

#include "system.h"

typedef struct {
    double total;            /* all mass in the model, held DOFs included [mass] */
    double centre[3];        /* centre of that mass [length] */
    bool lumped;
    char source[256];        /* how the mass was formed, for reports and the file */
} ef_mass_info;

/* M values on the system's pattern (n_eq equations). */
ef_status ef_mass_assemble(const ef_system *sys, double *M, ef_mass_info *info, ef_ctx *ctx);

#endif /* EF_MASS_H */
