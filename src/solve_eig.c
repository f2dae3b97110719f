/* solve_eig.c: a few eigenpairs of A x = lambda B x with ARPACK-NG's symmetric driver
 * (dsaupd/dseupd, reverse communication, bmat = 'G').
 *
 * Invariants:
 * - This is the only file that calls ARPACK. The matrices are never seen: the caller's
 *   callbacks apply the operators, and every application of `solve` is counted in n_op.
 * - Workspace (workd 3n, workl ncv(ncv+8), v n*ncv, resid n, one scratch vector) is
 *   allocated once per call and freed on every path; the result is handed over only in
 *   the documented states (all pairs on EF_OK, the converged ones on EF_ENOCONV).
 * - Runs are reproducible: without a caller start vector a fixed pseudo-random one is used
 *   (see start_vector), never ARPACK's internal random generator.
 * - ARPACK keeps SAVEd state between reverse-communication calls, so at most one
 *   ef_eig_solve may run at a time in a process (it is not thread-safe).
 *
 * Reverse communication (Lehoucq, Sorensen & Yang, ARPACK Users' Guide, SIAM 1998, ch. 3
 * and the dsaupd header): ARPACK hands back x = workd[ipntr[0]-1 ...] and wants
 * y = workd[ipntr[1]-1 ...].
 *   mode 3 (shift-invert), OP = (A - sigma B)^-1 B:
 *     ido = -1: y = OP x;  ido = 1: y = (A - sigma B)^-1 (B x), B x given at ipntr[2];
 *     ido = 2: y = B x.  Ritz values theta of OP map back as lambda = sigma + 1/theta.
 *   mode 2 (inverse B), OP = B^-1 A:
 *     ido = -1 or 1: w = A x, x := w (dsaupd remark 5 requires x overwritten by A x),
 *     y = B^-1 w;  ido = 2: y = B x.
 */
#include "solve_eig.h"

#include <arpack/arpack.h>

#include <limits.h>
#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

/* ARPACK accepts a Ritz pair when its error bound is <= tol |theta| (dsaupd, TOL). For a
 * symmetric pencil the eigenvalue error is of the order of the squared residual over the
 * gap, so 1e-12 gives values far below the 1e-8 relative agreement on frequencies and
 * critical load factors that the test suite demands, at the price of a restart or two. */
#define EIG_TOL_DEFAULT 1e-12
/* Implicit restarts (ARPACK's MXITER). Well-separated structural spectra converge in a
 * handful; 300 only matters for clustered or ill-posed requests (common practice). */
#define EIG_MAX_RESTARTS_DEFAULT 300
/* Basis size: min(n, max(2 nev + 1, nev + 20)). ARPACK recommends ncv >= 2 nev (dsaupd
 * remark 4); the +20 floor helps small requests in clustered spectra. */
#define EIG_NCV_EXTRA 20
/* Seed of the deterministic start vector (any fixed value; this one spells nothing). */
#define EIG_START_SEED UINT64_C(0x2545F4914F6CDD1D)

/* Number of a_int (ARPACK's 32-bit INTEGER) values in workl must fit an a_int. */
static int workl_fits(int ncv)
{
    return (int64_t)ncv * ((int64_t)ncv + 8) <= (int64_t)INT_MAX;
}

/* Deterministic start: r_i = s_i (0.5 + u_i), u_i in [0, 1) and sign s_i from a 64-bit
 * linear congruential generator (multiplier and increment of Knuth's MMIX generator,
 * TAOCP vol. 2, 3.3.4, from memory). Every entry is nonzero, |r_i| in [0.5, 1.5), and the
 * signs vary, so no mode of a symmetric structure is orthogonal to it by construction. */
static void start_vector(ef_index n, double *r)
{
    uint64_t s = EIG_START_SEED;
    for (ef_index i = 0; i < n; i++) {
        s = s * UINT64_C(6364136223846793005) + UINT64_C(1442695040888963407);
        double u = (double)(s >> 11) * 0x1.0p-53;           /* top 53 bits: [0, 1) */
        r[i] = (s & (UINT64_C(1) << 10)) ? -(0.5 + u) : 0.5 + u;
    }
}

static int all_finite(ef_index n, const double *y)
{
    for (ef_index i = 0; i < n; i++)
        if (!isfinite(y[i])) return 0;
    return 1;
}

/* What ARPACK's negative info codes mean (dsaupd and dseupd headers, ARPACK-NG 3.8). */
static const char *arpack_error_text(int info)
{
    switch (info) {
    case -1: return "the order n must be positive";
    case -2: return "nev must be positive";
    case -3: return "ncv must be greater than nev and at most n";
    case -4: return "the restart limit must be positive";
    case -5: return "unknown selection of eigenvalues (which)";
    case -6: return "bmat must be 'I' or 'G'";
    case -7: return "the workl array is too short";
    case -8: return "the tridiagonal eigenvalue solver (LAPACK dsteqr) failed";
    case -9: return "the starting vector is zero";
    case -10: return "the mode (iparam[6]) must be 1 to 5";
    case -11: return "mode 1 cannot take bmat = 'G'";
    case -12: return "iparam[0] must be 0 or 1 (dsaupd), or nev and which = 'BE' clash (dseupd)";
    case -13: return "nev and which = 'BE' are incompatible";
    case -14: return "no eigenvalue was found to sufficient accuracy";
    case -15: return "howmny must be 'A' or 'S' when vectors are wanted";
    case -16: return "howmny = 'S' is not implemented";
    case -17: return "dseupd counted a different number of converged values than dsaupd";
    case -9999: return "could not build a Lanczos factorization";
    default: return "undocumented error";
    }
}

static ef_status check_problem(const ef_eig_problem *pb, ef_eig_result *out, ef_ctx *ctx)
{
    ef_status st = EF_OK;
    const ef_index n = pb->n;
    if (n < 2 || n > INT_MAX) {
        ef_diag_error(ctx, NULL, "eigen solver: the problem order %lld must be between 2 and %d",
                      (long long)n, INT_MAX);
        return EF_EINPUT;                      /* the other checks compare with n */
    }
    if (pb->nev < 1 || (ef_index)pb->nev >= n) {
        ef_diag_error(ctx, NULL,
                      "eigen solver: %d eigenpairs asked of a problem of order %lld; "
                      "ask for at least 1 and fewer than the order",
                      pb->nev, (long long)n);
        return EF_EINPUT;                      /* the default ncv depends on nev */
    }
    if (pb->ncv != 0 && (pb->ncv <= pb->nev || (ef_index)pb->ncv > n)) {
        ef_diag_error(ctx, NULL,
                      "eigen solver: basis size %d must exceed the %d eigenpairs asked and "
                      "not exceed the order %lld",
                      pb->ncv, pb->nev, (long long)n);
        st = EF_EINPUT;
    } else if (!workl_fits(out->ncv)) {
        ef_diag_error(ctx, NULL, "eigen solver: basis size %d is too large", out->ncv);
        st = EF_EINPUT;
    }
    if (!(pb->tol >= 0.0 && pb->tol < 1.0)) {  /* also rejects NaN */
        ef_diag_error(ctx, NULL, "eigen solver: tolerance %g must be in [0, 1) (0: default)",
                      pb->tol);
        st = EF_EINPUT;
    }
    if (pb->max_restarts < 0) {
        ef_diag_error(ctx, NULL, "eigen solver: restart limit %d must not be negative",
                      pb->max_restarts);
        st = EF_EINPUT;
    }
    if (pb->mode == EF_EIG_SHIFT_INVERT || pb->mode == EF_EIG_BUCKLING) {
        if (!pb->solve || !pb->apply_b) {
            ef_diag_error(ctx, NULL,
                          "eigen solver: shift-invert needs the solve and apply_b operators");
            st = EF_EINPUT;
        }
        if (!isfinite(pb->sigma) || (pb->mode == EF_EIG_BUCKLING && pb->sigma == 0.0)) {
            ef_diag_error(ctx, NULL, "eigen solver: the shift is not a finite number%s",
                          pb->mode == EF_EIG_BUCKLING ? " other than zero" : "");
            st = EF_EINPUT;
        }
    } else if (pb->mode == EF_EIG_INVERSE_B) {
        if (!pb->solve || !pb->apply_a || !pb->apply_b) {
            ef_diag_error(ctx, NULL, "eigen solver: inverse-B mode needs the solve, apply_a "
                                     "and apply_b operators");
            st = EF_EINPUT;
        }
        if (pb->which != EF_EIG_LARGEST && pb->which != EF_EIG_SMALLEST) {
            ef_diag_error(ctx, NULL, "eigen solver: inverse-B mode finds the largest or the "
                                     "smallest eigenvalues; 'nearest' needs shift-invert");
            st = EF_EINPUT;
        }
    } else {
        ef_diag_error(ctx, NULL, "eigen solver: unknown mode %d", (int)pb->mode);
        st = EF_EINPUT;
    }
    if (pb->start && !all_finite(n, pb->start)) {
        ef_diag_error(ctx, NULL, "eigen solver: the start vector has a non-finite entry");
        st = EF_EINPUT;
    } else if (pb->start) {
        ef_index i = 0;
        while (i < n && pb->start[i] == 0.0) i++;      /* exact zero: ARPACK's own test */
        if (i == n) {
            ef_diag_error(ctx, NULL, "eigen solver: the start vector is zero");
            st = EF_EINPUT;
        }
    }
    return st;
}

/* Apply one operator and check its output. A warning status (> 0) is remembered in *warn
 * and the iteration goes on; a failure (< 0) is returned and stops it. The callback
 * reports its own failures into the context; only a non-finite output is reported here. */
static ef_status apply(ef_eig_op op, void *data, const double *x, double *y, ef_index n,
                       const char *what, ef_status *warn, ef_ctx *ctx)
{
    ef_status st = op(data, x, y);
    if (st < 0) return st;
    if (st > 0 && *warn == EF_OK) *warn = st;
    if (!all_finite(n, y)) {
        ef_diag_error(ctx, NULL,
                      "eigen solver: the %s operator returned a non-finite value (NaN or "
                      "infinity); the matrix it applies may be singular",
                      what);
        return EF_EINTERNAL;
    }
    return EF_OK;
}

/* Keep the `keep` of the `count` ascending values that were asked for (dseupd may return
 * more converged pairs than nev): a window of the sorted list. */
static int window_start(const double *val, const int *order, int count, int keep,
                        const ef_eig_problem *pb)
{
    int lo = 0, hi = count;                    /* [lo, hi) */
    while (hi - lo > keep) {
        if (pb->mode != EF_EIG_INVERSE_B) {    /* drop the end farther from sigma */
            double dlo = fabs(val[order[lo]] - pb->sigma);
            double dhi = fabs(val[order[hi - 1]] - pb->sigma);
            if (dlo > dhi) lo++; else hi--;
        } else if (pb->which == EF_EIG_LARGEST) {
            lo++;
        } else {
            hi--;
        }
    }
    return lo;
}

ef_status ef_eig_solve(const ef_eig_problem *pb, ef_eig_result *out, ef_ctx *ctx)
{
    ef_status st = EF_OK, warn = EF_OK;
    double *workd = NULL, *workl = NULL, *v = NULL, *resid = NULL, *tmp = NULL, *d = NULL;
    a_int *select = NULL;
    int *order = NULL;
    const double t0 = ef_clock();

    memset(out, 0, sizeof *out);
    if (pb->nev >= 1 && pb->n > pb->nev && pb->n <= INT_MAX) {
        int nn = (int)pb->n;
        int ncv_default = EF_MIN(nn, EF_MAX(2 * pb->nev + 1, pb->nev + EIG_NCV_EXTRA));
        out->ncv = pb->ncv ? pb->ncv : ncv_default;
    }
    out->tol = pb->tol > 0.0 ? pb->tol : EIG_TOL_DEFAULT;
    if ((st = check_problem(pb, out, ctx)) != EF_OK) return st;

    const ef_index n = pb->n;
    const a_int nn = (a_int)n, nev = pb->nev, ncv = out->ncv;
    const a_int lworkl = ncv * (ncv + 8);
    const size_t un = (size_t)n, uncv = (size_t)ncv;
    /* modes 3 and 4 apply their operator alike: y = (solve)(B x) */
    const bool shift_invert = pb->mode == EF_EIG_SHIFT_INVERT || pb->mode == EF_EIG_BUCKLING;
    /* mode 4's Ritz values nu = lambda / (lambda - sigma): the largest belong to the lambda
     * just above a positive sigma */
    const char *which = pb->mode == EF_EIG_SHIFT_INVERT ? "LM"
                        : pb->mode == EF_EIG_BUCKLING  ? "LA"
                        : pb->which == EF_EIG_LARGEST  ? "LA" : "SA";

    workd = malloc(3 * un * sizeof *workd);
    workl = malloc((size_t)lworkl * sizeof *workl);
    v = malloc(un * uncv * sizeof *v);
    resid = malloc(un * sizeof *resid);
    tmp = malloc(un * sizeof *tmp);
    d = malloc(uncv * sizeof *d);              /* dseupd writes nconv <= ncv values */
    select = malloc(uncv * sizeof *select);
    order = malloc(uncv * sizeof *order);
    if (!workd || !workl || !v || !resid || !tmp || !d || !select || !order) {
        ef_diag_error(ctx, NULL, "eigen solver: out of memory for a Lanczos basis of %d "
                                 "vectors of length %lld", (int)ncv, (long long)n);
        st = EF_ENOMEM;
        goto done;
    }

    if (pb->start) memcpy(resid, pb->start, un * sizeof *resid);
    else start_vector(n, resid);

    a_int ido = 0, info = 1;                   /* info = 1: resid holds the start vector */
    a_int iparam[11] = {0}, ipntr[11] = {0};
    iparam[0] = 1;                             /* exact shifts */
    const int limit = pb->max_restarts ? pb->max_restarts : EIG_MAX_RESTARTS_DEFAULT;
    iparam[2] = limit;
    iparam[3] = 1;                             /* block size: the only one implemented */
    iparam[6] = pb->mode == EF_EIG_SHIFT_INVERT ? 3 : pb->mode == EF_EIG_BUCKLING ? 4 : 2;

    for (;;) {
        dsaupd_c(&ido, "G", nn, which, nev, out->tol, resid, ncv, v, nn, iparam, ipntr,
                 workd, workl, lworkl, &info);
        if (ido != -1 && ido != 1 && ido != 2) break;          /* 99: done or failed */
        double *x = workd + ipntr[0] - 1;
        double *y = workd + ipntr[1] - 1;
        if (ido == 2) {
            st = apply(pb->apply_b, pb->data, x, y, n, "B", &warn, ctx);  /* y = B x */
        } else if (shift_invert) {
            const double *bx = x;
            if (ido == -1) {
                st = apply(pb->apply_b, pb->data, x, tmp, n, "B", &warn, ctx);
                bx = tmp;                      /* B x */
            } else {
                bx = workd + ipntr[2] - 1;     /* B x, already computed by ARPACK */
            }
            if (st == EF_OK) {
                out->n_op++;
                st = apply(pb->solve, pb->data, bx, y, n, "solve", &warn, ctx);
            }                                  /* y = (A - sigma B)^-1 B x */
        } else {
            st = apply(pb->apply_a, pb->data, x, tmp, n, "A", &warn, ctx);  /* w = A x */
            if (st == EF_OK) {
                memcpy(x, tmp, un * sizeof *x);                /* x := A x (remark 5) */
                out->n_op++;
                st = apply(pb->solve, pb->data, tmp, y, n, "solve", &warn, ctx);
            }                                  /* y = B^-1 A x */
        }
        if (st != EF_OK) goto done;            /* abandon ARPACK mid-iteration */
        if (ido != 2 && out->n_op % 25 == 0) ef_ctx_progress(ctx, "eigen iterations", out->n_op);
    }
    out->restarts = iparam[2];                 /* limit + 1 when info = 1: ARPACK counts
                                                  the final, unrestarted cycle too */

    if (info < 0 || info == 2) {
        ef_diag_error(ctx, NULL, "eigen solver: ARPACK dsaupd failed with code %d: %s",
                      (int)info, arpack_error_text((int)info));
        st = EF_EINTERNAL;
        goto done;
    }
    const int nconv_arpack = iparam[4];
    if (nconv_arpack > 0) {
        a_int info_e = 0;
        dseupd_c(1, "A", select, d, v, nn, pb->sigma, "G", nn, which, nev, out->tol, resid,
                 ncv, v, nn, iparam, ipntr, workd, workl, lworkl, &info_e);
        if (info_e != 0) {
            ef_diag_error(ctx, NULL, "eigen solver: ARPACK dseupd failed with code %d: %s",
                          (int)info_e, arpack_error_text((int)info_e));
            st = EF_EINTERNAL;
            goto done;
        }
    }

    /* Ascending order (dseupd already sorts; this makes it a guarantee of ours), then
     * keep the nev asked for if more converged. Z = V: columns of v are the vectors. */
    const int count = EF_MAX(nconv_arpack, 0);
    for (int k = 0; k < count; k++) order[k] = k;
    for (int k = 1; k < count; k++)            /* insertion sort, count <= ncv is small */
        for (int j = k; j > 0 && d[order[j - 1]] > d[order[j]]; j--) {
            int t = order[j];
            order[j] = order[j - 1];
            order[j - 1] = t;
        }
    const int keep = EF_MIN(count, (int)nev);
    const int first = window_start(d, order, count, keep, pb);
    if (keep > 0) {
        out->values = malloc((size_t)keep * sizeof *out->values);
        out->vectors = malloc((size_t)keep * un * sizeof *out->vectors);
        if (!out->values || !out->vectors) {
            ef_diag_error(ctx, NULL, "eigen solver: out of memory for %d eigenvectors", keep);
            st = EF_ENOMEM;
            goto done;
        }
        for (int k = 0; k < keep; k++) {
            int c = order[first + k];
            out->values[k] = d[c];
            memcpy(out->vectors + (size_t)k * un, v + (size_t)c * un, un * sizeof *v);
        }
    }
    out->nconv = keep;

    if (keep < (int)nev) {
        if (info == 3)
            ef_diag_error(ctx, NULL,
                          "eigen solver: no shifts could be applied after %d restarts, %d of "
                          "%d modes converged; try a larger basis (%d vectors now)",
                          out->restarts, keep, (int)nev, (int)ncv);
        else
            ef_diag_error(ctx, NULL,
                          "eigen solver stopped after %d restarts with %d of %d modes "
                          "converged; a larger basis (%d vectors now) or more restarts "
                          "may help",
                          info == 1 ? limit : out->restarts, keep, (int)nev, (int)ncv);
        st = EF_ENOCONV;
        goto done;
    }
    st = warn;                                 /* EF_OK, or the first operator warning */

done:
    if (st < 0 && st != EF_ENOCONV) {          /* on failure hand over statistics only */
        free(out->values);
        free(out->vectors);
        out->values = NULL;
        out->vectors = NULL;
        out->nconv = 0;
    }
    free(order);
    free(select);
    free(d);
    free(tmp);
    free(resid);
    free(v);
    free(workl);
    free(workd);
    ef_ctx_time_add(ctx, "eigen iterations", ef_clock() - t0, out->n_op);
    return st;
}

void ef_eig_result_free(ef_eig_result *r)
{
    if (!r) return;
    free(r->values);
    free(r->vectors);
    memset(r, 0, sizeof *r);
}
