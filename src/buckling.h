/* buckling.h: elastic critical load factors (private). */
#ifndef EF_BUCKLING_H
#define EF_BUCKLING_H

#include "system.h"

enum { EF_BUCKLE_GLOBAL = 0, EF_BUCKLE_MEMBER_FLEXURAL = 1, EF_BUCKLE_MEMBER_TORSIONAL = 2 };

/* The lowest `modes` positive critical load factors of `load` (shared load index) into
 * r->buckling, with shapes, member shares and a kind per mode; with `negative` also the
 * factors of the reversed load. */
ef_status ef_buckling_run(ef_system *sys, ef_index load, int modes, bool negative,
                          ef_results *r, ef_ctx *ctx);

/* alpha_cr for the EN 1993-1-1 5.2.1 classification: the lowest global (sway) mode's
 * factor (*global true), or the lowest factor of all when every mode found is a member
 * mode (*global false); NaN when none is positive. */
double ef_buckling_alpha_cr(const ef_buckling_result *br, bool *global);

#endif /* EF_BUCKLING_H */
