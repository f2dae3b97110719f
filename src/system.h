/* system.h: the discrete system of a model (private): mesh, DOF map, sparse pattern,
 * the stiffness K on it, and one CHOLMOD symbolic analysis that every factorization
 * of the run reuses (K, K - sigma M, K + K_G). Analyses build on this; it knows no
 * analysis type.
 */
#ifndef EF_SYSTEM_H
#define EF_SYSTEM_H

#include "assemble.h"
#include "loads.h"
#include "results.h"

typedef struct {
    const ef_model *m;       /* not owned */
    ef_mesh *mesh;
    ef_dofmap *dofs;
    ef_asm *asmb;
    double *K;               /* [nnz] stiffness values on the pattern (springs included) */
    ef_factor *L;            /* symbolic analysis, and the last numeric factor */
    bool L_holds_K;          /* the numeric factor in L is that of K */
} ef_system;

/* Mesh, number, build the pattern, assemble K, analyse. */
ef_status ef_system_create(const ef_model *m, ef_system **out, ef_ctx *ctx);
void ef_system_free(ef_system **sys, ef_ctx *ctx);

/* Factorize `values` (on the pattern). A breakdown or a negligible pivot is reported
 * in words (which node, which DOF) with `what` naming the matrix in the message
 * ("stiffness"); returns EF_EUNSTABLE then. */
ef_status ef_system_factorize(ef_system *sys, const double *values, const char *what, ef_ctx *ctx);
/* Make sure L holds the factor of K. */
ef_status ef_system_factor_k(ef_system *sys, ef_ctx *ctx);

/* Equivalent load vector of a load set on the equations (length n_eq). A load on a
 * dropped rotation or on a node attached to nothing is an error. */
ef_status ef_system_load_vector(const ef_system *sys, const ef_loadset *ls, double *F, ef_ctx *ctx);

/* Global 12x12 stiffness of element e (releases condensed). */
void ef_system_elem_k(const ef_system *sys, ef_index e, double ke[144]);

/* Element end forces (local, on the element; length 12 per element) from the equation
 * displacements u: f = k u + f_fixed (+ k_G(f_prev) u when f_prev is given: second order,
 * with the axial forces of f_prev). */
void ef_system_elem_forces(const ef_system *sys, const ef_loadset *ls, const double *u,
                           const double *f_prev, bool chord_only, double *f_elem);

/* Geometric stiffness values on the pattern from element end forces (12 per element). */
void ef_system_kg(const ef_system *sys, const double *f_elem, bool chord_only, double *KG);

/* Second-order tangent K + K_G(f_prev) on the pattern, each element's k + k_G condensed
 * for its releases as a whole, and the equivalent load vector F of `ls` with the same
 * condensation (length n_eq). */
ef_status ef_system_tangent(const ef_system *sys, const ef_loadset *ls, const double *f_prev,
                            bool chord_only, double *KT, double *F, ef_ctx *ctx);

/* Fill a load result: node displacements, reactions, member end forces, stations, the
 * equilibrium check. f_elem are the element end forces (ef_system_elem_forces). */
void ef_system_recover(const ef_system *sys, const ef_loadset *ls, const double *u,
                       const double *f_elem, const ef_results *r, ef_load_result *lr);

/* ||K u - f|| / (||K|| ||u|| + ||f||), infinity norms, K given by `values`. */
double ef_system_residual(const ef_system *sys, const double *values, const double *u,
                          const double *f);

#endif /* EF_SYSTEM_H */
