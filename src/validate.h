/* validate.h: cross-item checks of a model after reading (private).
 *
 * ef_model_validate runs after model_yaml.c has read every item and resolved every
 * name it could. It tolerates a partly read model (EF_NONE references, NaN coordinates
 * of nodes that failed to read: it skips what depends on them) so that one run reports
 * every problem. It computes what the invariants of model.h promise: member lengths
 * and local axes, the default `up`, the expansion of combinations onto load cases
 * (case_factors); it checks zero-length members, `up` parallel to a member, releases
 * that leave a member a mechanism, torques on axial_only members, cycles among
 * combinations; it warns about unused materials and sections, and nodes attached to no
 * member.
 */
#ifndef EF_VALIDATE_H
#define EF_VALIDATE_H

#include "model.h"

/* Check and complete `m`; messages go to ctx (positions from the items' `where`, file
 * name from ctx->file). Returns EF_OK, EF_EINPUT when it found an error, EF_ENOMEM. */
ef_status ef_model_validate(ef_model *m, ef_ctx *ctx);

#endif /* EF_VALIDATE_H */
