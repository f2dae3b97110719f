/* assemble.h: element matrices into one sparse symmetric pattern (private).
 *
 * The pattern is built once from the element connectivity; pos[78 e + idx(a, b)] is the
 * position (in any value array on the pattern) of element e's upper entry (a <= b in
 * element DOF order), or EF_NONE when either DOF is not an equation. K, M and K_G are
 * then sums of 12x12 blocks scattered into value arrays: no triplets, no sort per matrix.
 */
#ifndef EF_ASSEMBLE_H
#define EF_ASSEMBLE_H

#include "dof.h"
#include "solve_chol.h"

typedef struct {
    ef_sparse *A;          /* the pattern */
    ef_index *pos;         /* [n_elems][78] */
    ef_index n_elems;
} ef_asm;

ef_status ef_asm_create(const ef_mesh *mesh, const ef_dofmap *dofs, ef_asm **out, ef_ctx *ctx);
void ef_asm_free(ef_asm **a, ef_ctx *ctx);
/* values += element e's global 12x12 matrix (row-major, symmetric: the upper part is read). */
void ef_asm_add_elem(const ef_asm *a, ef_index e, const double ke[144], double *values);
/* Position of the diagonal entry of equation i. */
ef_index ef_asm_diag(const ef_asm *a, ef_index i);

#endif /* EF_ASSEMBLE_H */
