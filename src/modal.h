/* modal.h: natural frequencies and mode shapes (private). */
#ifndef EF_MODAL_H
#define EF_MODAL_H

#include "system.h"

/* The lowest `modes` natural frequencies above `above_hz` (modes 0: every finite mode,
 * densely, small models only) into r->modal. On EF_ENOCONV the converged modes are
 * still stored, and the message says how many. */
ef_status ef_modal_run(ef_system *sys, int modes, double above_hz, ef_results *r, ef_ctx *ctx);

#endif /* EF_MODAL_H */
