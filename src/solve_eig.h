/* solve_eig.h: symmetric eigen-extraction with ARPACK-NG (private).
 *
 * Only solve_eig.c calls ARPACK. The matrices are never seen here: the caller supplies
 * three operators through callbacks, so the same driver serves natural frequencies
 * (A = K, B = M, shift-invert) and critical load factors (A = -K_G, B = K, inverse-B).
 *
 * Problem: A x = lambda B x, A symmetric, B symmetric positive semi-definite (mode
 * EF_EIG_SHIFT_INVERT) or positive definite (mode EF_EIG_INVERSE_B).
 *   EF_EIG_SHIFT_INVERT (ARPACK mode 3): `solve` applies (A - sigma B)^{-1}; `apply_b`
 *     applies B. Finds the eigenvalues nearest sigma (returned as lambda, not the
 *     transformed values); vectors are B-orthonormal.
 *   EF_EIG_INVERSE_B (ARPACK mode 2): `solve` applies B^{-1}; `apply_a` applies A;
 *     `apply_b` applies B. Finds the algebraically largest (EF_EIG_LARGEST) or smallest
 *     (EF_EIG_SMALLEST) lambda; vectors are B-orthonormal.
 *   EF_EIG_BUCKLING (ARPACK mode 4, "buckling mode"): B x = lambda A x with B positive
 *     definite; `solve` applies (B - sigma A)^{-1}, `apply_b` applies B. Finds the lambda
 *     just above sigma (0 < sigma below the wanted ones), returned as lambda; vectors are
 *     B-orthonormal. For critical load factors B = K and A = -K_G.
 */
#ifndef EF_SOLVE_EIG_H
#define EF_SOLVE_EIG_H

#include "ctx.h"

/* y = Op x, both of length n. Return EF_OK or a failure status (stops the iteration). */
typedef ef_status (*ef_eig_op)(void *data, const double *x, double *y);

typedef enum { EF_EIG_SHIFT_INVERT, EF_EIG_INVERSE_B, EF_EIG_BUCKLING } ef_eig_mode;
typedef enum { EF_EIG_NEAREST, EF_EIG_LARGEST, EF_EIG_SMALLEST } ef_eig_which;

typedef struct {
    ef_index n;           /* order of the problem */
    int nev;              /* eigenpairs wanted, 1 <= nev < n */
    int ncv;              /* Lanczos basis size; 0 = default min(n, max(2 nev + 1, nev + 20)) */
    double tol;           /* ARPACK relative accuracy of the Ritz values; 0 = default 1e-12 */
    int max_restarts;     /* 0 = default 300 */
    ef_eig_mode mode;
    ef_eig_which which;   /* SHIFT_INVERT always takes the ones nearest sigma */
    double sigma;         /* shift (SHIFT_INVERT only) */
    ef_eig_op solve, apply_a, apply_b;
    void *data;           /* passed to the callbacks */
    const double *start;  /* optional starting vector (length n, not all zero); NULL = a
                             fixed pseudo-random vector, so runs are reproducible */
} ef_eig_problem;

typedef struct {
    int nconv;            /* converged pairs, sorted by lambda ascending */
    double *values;       /* [nconv] lambda */
    double *vectors;      /* [nconv][n], column of each pair contiguous, B-orthonormal */
    ef_index n_op;        /* applications of `solve` */
    int restarts;         /* ARPACK iterations (implicit restarts), iparam[2] on return;
                             max_restarts + 1 when the limit stopped it */
    int ncv;              /* basis size used */
    double tol;           /* tolerance used */
} ef_eig_result;

/* Solve. On EF_OK all nev pairs converged. On EF_ENOCONV the `nconv` that did converge
 * are still in *out and a message is in ctx. The caller frees *out with
 * ef_eig_result_free (also after a failure). *out is overwritten, not freed, on entry.
 * A callback's failure status (< 0) stops the iteration and is returned (the callback
 * reports its own message); a callback warning (> 0) does not stop it and is returned
 * instead of EF_OK when everything else succeeded. Not thread-safe: ARPACK keeps state
 * between calls, so run one solve at a time. */
ef_status ef_eig_solve(const ef_eig_problem *pb, ef_eig_result *out, ef_ctx *ctx);
void ef_eig_result_free(ef_eig_result *r);

#endif /* EF_SOLVE_EIG_H */
