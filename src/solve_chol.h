/* solve_chol.h: sparse symmetric matrices and their Cholesky factors (private).
 *
 * Only solve_chol.c sees CHOLMOD. A matrix is a fixed pattern (the upper triangle,
 * compressed by column, sorted) plus any number of value arrays on that pattern: K, M,
 * K_G and K - sigma M all share one pattern, so one symbolic analysis (fill-reducing
 * ordering, supernodes) serves every factorization of a run.
 * Equations are numbered 0..n-1 (see dof.h); the factor's permutation never leaks out.
 */
#ifndef EF_SOLVE_CHOL_H
#define EF_SOLVE_CHOL_H

#include "ctx.h"

typedef struct ef_sparse ef_sparse;
typedef struct ef_factor ef_factor;

/* Build a pattern of order n from (row, col) pairs of the upper triangle (row <= col,
 * duplicates allowed). The caller frees with ef_sparse_free. */
ef_status ef_sparse_create_pattern(ef_index n, ef_index n_pairs, const ef_index *row,
                                   const ef_index *col, ef_sparse **out, ef_ctx *ctx);
void ef_sparse_free(ef_sparse **A, ef_ctx *ctx);
ef_index ef_sparse_n(const ef_sparse *A);
ef_index ef_sparse_nnz(const ef_sparse *A);
/* Position of entry (row, col), row <= col, in a value array; EF_NONE when not stored. */
ef_index ef_sparse_find(const ef_sparse *A, ef_index row, ef_index col);
/* y = A x for the symmetric matrix whose upper triangle is `values`. */
void ef_sparse_symv(const ef_sparse *A, const double *values, const double *x, double *y);
/* Column pointers and row indices of the pattern (read only). */
const ef_index *ef_sparse_colptr(const ef_sparse *A);
const ef_index *ef_sparse_rowind(const ef_sparse *A);

/* Symbolic analysis (ordering and supernodal structure) of the pattern. */
ef_status ef_chol_analyze(const ef_sparse *A, ef_factor **out, ef_ctx *ctx);
/* Numeric factorization of the matrix with these values (on A's pattern).
 * When the matrix is not positive definite, returns EF_EUNSTABLE and sets *bad_eq to the
 * equation where the factorization broke down (in the caller's numbering), or EF_NONE.
 * `bad_eq` may be NULL. */
ef_status ef_chol_factorize(const ef_sparse *A, const double *values, ef_factor *L,
                            ef_index *bad_eq, ef_ctx *ctx);
/* x = A^{-1} b for nrhs right-hand sides stored one after another (n each). b and x
 * may be the same array. */
ef_status ef_chol_solve(ef_factor *L, ef_index nrhs, const double *b, double *x, ef_ctx *ctx);
/* Smallest and largest diagonal pivot of the last factorization, and the equation of
 * the smallest (caller's numbering). */
void ef_chol_pivot_range(const ef_factor *L, double *dmin, double *dmax, ef_index *eq_min);
/* The weakest pivot relative to its own diagonal entry: min over j of d_j / a_jj, where
 * a_jj = diag[j] in the caller's numbering. A tiny ratio means that equation is all but
 * unheld (a mechanism that rounding kept from showing as a breakdown). */
void ef_chol_weakest_pivot(const ef_factor *L, const double *diag, double *ratio, ef_index *eq);
/* Number of nonzeros in the factor L (as counted by the symbolic analysis; the same for
 * every factorization on the pattern). */
double ef_chol_factor_nnz(const ef_factor *L);
/* Name of the fill-reducing ordering the analysis chose ("AMD", "METIS", "NESDIS", ...). */
const char *ef_chol_ordering(const ef_factor *L);
void ef_factor_free(ef_factor **L, ef_ctx *ctx);

/* A symmetric matrix packed for repeated products y = A x: the diagonal and the nonzero
 * strictly upper entries of `values` (on A's pattern), copied. Exact zeros are common on
 * the element-block pattern (a member along a global axis leaves most of its 12x12
 * block zero: about 70% of a building's K or M), so the product reads far less memory
 * than ef_sparse_symv. Later changes to `values` are not seen. Free with ef_spmat_free. */
typedef struct ef_spmat ef_spmat;
ef_status ef_spmat_create(const ef_sparse *A, const double *values, ef_spmat **out);
/* Stored entries: diagonal plus strictly upper nonzeros. */
ef_index ef_spmat_nnz(const ef_spmat *S);
/* y = A x (x and y of length n, distinct). */
void ef_spmat_symv(const ef_spmat *S, const double *x, double *y);
void ef_spmat_free(ef_spmat **S);

#endif /* EF_SOLVE_CHOL_H */
