/* dof.h: equation numbers of the mesh's degrees of freedom (private).
 *
 * eq_of_dof[6*node + d] >= 0: equation of a free DOF (d = ux uy uz rx ry rz, global);
 * EF_DOF_HELD: held by a support or restrain_all; EF_DOF_DROPPED: a rotation no member
 * resists (removed with a note); EF_DOF_IDLE: a node attached to no member.
 * Equations are numbered node by node; CHOLMOD reorders them for the factorization.
 */
#ifndef EF_DOF_H
#define EF_DOF_H

#include "mesh.h"

enum { EF_DOF_HELD = -1, EF_DOF_DROPPED = -2, EF_DOF_IDLE = -3 };

typedef struct {
    ef_index n_eq;
    ef_index n_dof;          /* 6 * mesh nodes */
    ef_index *eq_of_dof;     /* [n_dof] */
    ef_index *dof_of_eq;     /* [n_eq] */
    ef_index n_dropped;
} ef_dofmap;

/* Number the free DOFs. A translation that nothing holds is reported later by the
 * factorization; rotations with no stiffness at all are dropped here with a note. */
ef_status ef_dofmap_build(const ef_model *m, const ef_mesh *mesh, ef_dofmap **out, ef_ctx *ctx);
void ef_dofmap_free(ef_dofmap **d);
/* Equations of element e's 12 DOFs (negative: not an equation). */
void ef_dofmap_elem(const ef_dofmap *d, const ef_mesh *mesh, ef_index e, ef_index eq[12]);
/* "node 'A2', rotation rz" style description of an equation. */
const char *ef_dofmap_eq_text(const ef_dofmap *d, const ef_mesh *mesh, const ef_model *m,
                              ef_index eq, char *buf, size_t n);

#endif /* EF_DOF_H */
