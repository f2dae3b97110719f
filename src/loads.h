/* loads.h: one load (a case or a combination) in the form the analyses use (private).
 *
 * Member loads become ef_bload records in the member's local axes with positions in
 * length units from the member's start; self weight becomes a uniform load along
 * gravity. A combination is the factored sum of its cases (first order: the same
 * as superposing the case results). Node loads are global, at model nodes.
 */
#ifndef EF_LOADS_H
#define EF_LOADS_H

#include "dof.h"

typedef struct {
    const char *name;       /* the load's name, for messages (not owned) */
    ef_index n_members;
    ef_index *first;        /* [n_members + 1]: member k's loads are bl[first[k] .. first[k+1]-1] */
    ef_bload *bl;
    double *node_f;         /* [n_model_nodes][6] global Fx Fy Fz Mx My Mz */
} ef_loadset;

/* Build the loads of the shared load index `load` (case or combination).
 * Caller frees with ef_loadset_free. */
ef_status ef_loadset_build(const ef_model *m, ef_index load, ef_loadset **out, ef_ctx *ctx);
/* The same from explicit factors per load case (factors[c], c < n_cases); with
 * self_weight false the self-weight part of every case is left out. */
ef_status ef_loadset_build_factors(const ef_model *m, const double *factors, bool self_weight,
                                   ef_loadset **out,
                                   ef_ctx *ctx);
void ef_loadset_free(ef_loadset **ls);

/* The loads of member `k` that fall on element e, moved to the element's own positions.
 * Writes at most `cap` records into out and returns how many. */
int ef_loadset_elem_loads(const ef_loadset *ls, const ef_mesh *mesh, ef_index e,
                          ef_bload *out, int cap);
/* Fixed-end forces of element e (local axes, unreleased element), zero when unloaded. */
void ef_loadset_elem_fef(const ef_loadset *ls, const ef_mesh *mesh, ef_index e, double fef[12]);

/* Resultant of the applied load about the global origin: Fx Fy Fz Mx My Mz. */
void ef_loadset_resultant(const ef_loadset *ls, const ef_model *m, double out[6]);

/* Weight per length of a member (structural + extra mass) times g [force/length]. */
double ef_loads_member_weight(const ef_model *m, ef_index member);

#endif /* EF_LOADS_H */
