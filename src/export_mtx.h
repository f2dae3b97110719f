/* export_mtx.h: the matrices of a run written for other programs (private).
 *
 * Matrix Market exchange format (Boisvert, Pozo & Remington, "The Matrix Market Exchange
 * Formats: Initial Design", NIST IR 5935, 1996): "coordinate real symmetric", which stores
 * the lower triangle. Our pattern is the upper triangle, so entry (row i, col j), i <= j,
 * is written as "j+1 i+1 value". Every file of one system has the same pattern (explicit
 * zeros are kept), so K - sigma M needs no merge of patterns by the reader.
 */
#ifndef EF_EXPORT_MTX_H
#define EF_EXPORT_MTX_H

#include "system.h"

/* Write into `dir` (created, with its parents, when missing):
 *   K.mtx       stiffness of the free DOFs, springs included [force/length, force,
 *               force*length by DOF pair]
 *   M.mtx       mass on the same equations, when M is not NULL
 *   KG.mtx      geometric stiffness of a load (per unit load factor), when KG is not NULL
 *   dofmap.csv  one line per equation: equation (1-based, the row/column number in the
 *               .mtx files), node (the model node's name, or "member NAME at F" for a node
 *               generated inside a subdivided member, F its fraction of the length),
 *               dof (ux uy uz rx ry rz, global axes), x, y, z of the node.
 * M and KG are value arrays on the system's pattern (ef_mass_assemble, ef_system_kg).
 * Values are written with 17 significant digits, so they read back bit for bit.
 * Returns EF_EIO with a message when a directory or a file cannot be made or written. */
ef_status ef_export_matrices(ef_system *sys, const double *M, const double *KG, const char *dir,
                             ef_ctx *ctx);

/* What `eigenframe run --export-matrices DIR` writes: K, M of the model's mass source and,
 * when the model asks for a buckling analysis, K_G of that load (from its first-order
 * solution; this factorizes K, which the run reuses). Calls ef_export_matrices. */
ef_status ef_export_system(ef_system *sys, const char *dir, ef_ctx *ctx);

#endif /* EF_EXPORT_MTX_H */
