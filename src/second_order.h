/* second_order.h: iterative second-order (P-delta) analysis (private). */
#ifndef EF_SECOND_ORDER_H
#define EF_SECOND_ORDER_H

#include "system.h"

/* Second-order analysis of `load` (a case or a combination, analysed whole: second-order
 * results do not superpose). Appends to r->second on success. EF_EUNSTABLE when the load
 * is at or beyond critical, EF_ENOCONV when the iteration does not settle; then nothing
 * is stored and the message says why (with alpha_cr when r->buckling has it). */
ef_status ef_second_order_run(ef_system *sys, ef_index load, double tol, int max_iter,
                              bool chord_only, ef_results *r, ef_ctx *ctx);

#endif /* EF_SECOND_ORDER_H */
