/* static.h: linear static analysis (private). */
#ifndef EF_STATIC_H
#define EF_STATIC_H

#include "system.h"

/* Solve every listed load (shared load index) with one factorization of K and append
 * the results to r->statics. Combinations are solved as their factored sum of cases,
 * which for a linear analysis equals superposing the case results. */
ef_status ef_static_run(ef_system *sys, const ef_index *loads, ef_index n_loads,
                        ef_results *r, ef_ctx *ctx);

/* First-order solution of one load: equation displacements u (n_eq) and element end
 * forces (12 per element); used by buckling and second-order analysis. The caller
 * frees *u and *f_elem. */
ef_status ef_static_solve_one(ef_system *sys, const ef_loadset *ls, double **u, double **f_elem,
                              ef_ctx *ctx);

#endif /* EF_STATIC_H */
