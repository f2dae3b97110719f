/* modal.c: natural frequencies and mode shapes, K phi = w^2 M phi.
 *
 * ARPACK in shift-invert mode with the operator (K - sigma M)^{-1} M applied through one
 * CHOLMOD factor of K - sigma M (same pattern, same symbolic analysis as K). sigma sits
 * just below zero, so that rigid-body modes of an unsupported structure are found too and
 * K - sigma M stays positive definite (a Cholesky factor needs that). Modes below
 * `above_hz` are computed and dropped: more are asked for until enough remain.
 * When few DOFs carry mass (the Krylov space cannot grow beyond the rank of M), the small
 * problem is solved densely instead.
 * `modes: all` solves the small dense problem M x = mu K x (mu = 1/w^2) with LAPACK,
 * which tolerates a singular M (massless rotations give mu = 0, no finite frequency).
 * Shapes are mass-normalised (phi^T M phi = 1) and signed so that the largest
 * translation at a model node is positive.
 * Products with M and K use packed copies without the pattern's exact zeros
 * (ef_spmat): ARPACK asks for about three M products per operator application.
 */
#include "modal.h"

#include "mass.h"
#include "solve_eig.h"

#include <lapacke.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define TWO_PI 6.283185307179586
/* The shift below the lowest wanted eigenvalue: (2 pi 0.01 Hz)^2. Far below any
 * structural frequency, so the spectral separation around sigma is not spoiled, yet it
 * keeps K - sigma M positive definite for a free-floating structure. */
#define EF_MODAL_SHIFT_HZ 0.01
/* Modes below this frequency are rigid-body motions and are reported as 0 Hz. */
#define EF_RIGID_HZ 1e-4
/* The dense path (`modes: all`) is for small models only. */
#define EF_DENSE_MAX_EQ 3000

typedef struct {
    ef_system *sys;
    const ef_spmat *M;
    ef_ctx *ctx;
} op_data;

static ef_status op_solve(void *data, const double *x, double *y)
{
    op_data *d = data;
    return ef_chol_solve(d->sys->L, 1, x, y, d->ctx);            /* y = (K - sigma M)^{-1} x */
}

static ef_status op_mass(void *data, const double *x, double *y)
{
    op_data *d = data;
    ef_spmat_symv(d->M, x, y);                                   /* y = M x */
    return EF_OK;
}

/* Eigenpairs by ARPACK: the `want` lowest w^2 above sigma. */
static ef_status solve_sparse(ef_system *sys, const double *M, const ef_spmat *Mp, int want,
                              int ncv_cap, double sigma, double **w2, double **phi, int *nfound,
                              ef_modal_result *mr, ef_ctx *ctx)
{
    ef_index n = sys->dofs->n_eq, nnz = ef_sparse_nnz(sys->asmb->A);
    double *A = malloc((size_t)nnz * sizeof *A);
    if (!A) return EF_ENOMEM;
    for (ef_index p = 0; p < nnz; p++) A[p] = sys->K[p] - sigma * M[p];   /* K - sigma M */
    ef_status st = ef_system_factorize(sys, A, "shifted stiffness (K - sigma M)", ctx);
    free(A);
    if (st != EF_OK) return st;
    op_data od = {sys, Mp, ctx};
    ef_eig_problem pb;
    memset(&pb, 0, sizeof pb);
    pb.n = n;
    pb.nev = want;
    if (ncv_cap > want && ncv_cap < EF_MAX(2 * want + 1, want + 20)) pb.ncv = ncv_cap;
    pb.mode = EF_EIG_SHIFT_INVERT;
    pb.which = EF_EIG_NEAREST;
    pb.sigma = sigma;
    pb.solve = op_solve;
    pb.apply_b = op_mass;
    pb.data = &od;
    ef_eig_result er;
    st = ef_eig_solve(&pb, &er, ctx);
    mr->ncv = er.ncv;
    mr->tol = er.tol;
    mr->n_op += er.n_op;
    if (st == EF_OK || (st == EF_ENOCONV && er.nconv > 0)) {
        *w2 = er.values;
        *phi = er.vectors;
        *nfound = er.nconv;
        er.values = er.vectors = NULL;
    }
    ef_eig_result_free(&er);
    return st;
}

/* All finite eigenpairs densely: M x = mu K x with K positive definite (LAPACK dsygvd,
 * x^T K x = 1), then w^2 = 1/mu and phi = x / sqrt(mu). Small models only. */
static ef_status solve_dense(ef_system *sys, const double *M, double **w2, double **phi,
                             int *nfound, ef_ctx *ctx)
{
    ef_index n = sys->dofs->n_eq;
    if (n > EF_DENSE_MAX_EQ) {
        ef_diag_error(ctx, NULL, "modal: `modes: all` solves densely and is limited to %d "
                      "equations; this model has %lld: ask for a number of modes instead",
                      EF_DENSE_MAX_EQ, (long long)n);
        return EF_EINPUT;
    }
    ef_status st = ef_system_factor_k(sys, ctx);     /* K must be positive definite */
    if (st != EF_OK) return st;
    double *Kd = calloc((size_t)(n * n), sizeof *Kd), *Md = calloc((size_t)(n * n), sizeof *Md);
    double *mu = malloc((size_t)n * sizeof *mu);
    if (!Kd || !Md || !mu) {
        free(Kd); free(Md); free(mu);
        return EF_ENOMEM;
    }
    const ef_index *Ap = ef_sparse_colptr(sys->asmb->A), *Ai = ef_sparse_rowind(sys->asmb->A);
    for (ef_index j = 0; j < n; j++)
        for (ef_index p = Ap[j]; p < Ap[j + 1]; p++) {
            Kd[Ai[p] * n + j] = sys->K[p];           /* row-major upper: (i, j), i <= j */
            Md[Ai[p] * n + j] = M[p];
        }
    double t0 = ef_clock();
    lapack_int info = LAPACKE_dsygvd(LAPACK_ROW_MAJOR, 1, 'V', 'U', (lapack_int)n, Md,
                                     (lapack_int)n, Kd, (lapack_int)n, mu);
    ef_ctx_time_add(ctx, "dense eigen solve", ef_clock() - t0, 1);
    free(Kd);
    if (info != 0) {
        free(Md); free(mu);
        ef_diag_error(ctx, NULL, "modal: the dense eigen solver failed (LAPACK dsygvd info %d)",
                      (int)info);
        return EF_EINTERNAL;
    }
    double mu_max = 0.0;
    for (ef_index i = 0; i < n; i++) mu_max = fmax(mu_max, mu[i]);
    int k = 0;
    for (ef_index i = n - 1; i >= 0; i--) k += mu[i] > 1e-12 * mu_max;   /* finite w^2 */
    *w2 = malloc((size_t)EF_MAX(k, 1) * sizeof **w2);
    *phi = malloc((size_t)EF_MAX(k, 1) * (size_t)n * sizeof **phi);
    if (!*w2 || !*phi) {
        free(Md); free(mu); free(*w2); free(*phi);
        *w2 = *phi = NULL;
        return EF_ENOMEM;
    }
    /* ascending w^2 = descending mu; dsygvd sorts mu ascending */
    for (int t = 0; t < k; t++) {
        ef_index col = n - 1 - t;
        (*w2)[t] = 1.0 / mu[col];
        double s = 1.0 / sqrt(mu[col]);
        for (ef_index i = 0; i < n; i++) (*phi)[(size_t)t * (size_t)n + (size_t)i] = Md[i * n + col] * s;
    }
    *nfound = k;
    free(Md);
    free(mu);
    return EF_OK;
}

/* Keep the pairs with a frequency of at least f0 Hz (all when f0 <= 0), in order;
 * returns how many remain. */
static int keep_above(double *w2, double *phi, ef_index n, int found, double f0)
{
    if (f0 <= 0.0) return found;
    int keep = 0;
    for (int t = 0; t < found; t++)
        if (sqrt(fmax(w2[t], 0.0)) / TWO_PI >= f0) {
            w2[keep] = w2[t];
            memmove(phi + (size_t)keep * (size_t)n, phi + (size_t)t * (size_t)n,
                    (size_t)n * sizeof *phi);
            keep++;
        }
    return keep;
}

/* Influence vector of direction d (0..2 translation X Y Z; 3..5 rotation about X Y Z
 * through O) on the equations. */
static void influence(const ef_system *sys, int d, const double O[3], double *r)
{
    const ef_dofmap *dm = sys->dofs;
    for (ef_index eq = 0; eq < dm->n_eq; eq++) {
        ef_index dof = dm->dof_of_eq[eq], node = dof / 6;
        int c = (int)(dof % 6);
        if (d < 3) {
            r[eq] = c == d ? 1.0 : 0.0;
            continue;
        }
        int a = d - 3;
        if (c >= 3) {
            r[eq] = c - 3 == a ? 1.0 : 0.0;
            continue;
        }
        double x[3], t[3];
        for (int i = 0; i < 3; i++) x[i] = sys->mesh->xyz[3 * node + i] - O[i];
        double e[3] = {0, 0, 0};
        e[a] = 1.0;
        t[0] = e[1] * x[2] - e[2] * x[1];            /* e_a × (x - O) */
        t[1] = e[2] * x[0] - e[0] * x[2];
        t[2] = e[0] * x[1] - e[1] * x[0];
        r[eq] = t[c];
    }
}

static double norm2(const double *x, ef_index n)
{
    double s = 0.0;
    for (ef_index i = 0; i < n; i++) s += x[i] * x[i];
    return sqrt(s);
}

/* Everything derived from the eigenpairs: shapes at model nodes, participation,
 * effective masses, residuals. */
static ef_status post_process(ef_system *sys, const ef_spmat *M, const ef_spmat *Kp,
                              const double *w2, double *phi, int k, const ef_mass_info *mi,
                              ef_modal_result *mr)
{
    const ef_model *m = sys->m;
    ef_index n = sys->dofs->n_eq, nn = m->n_nodes;
    mr->n_modes = k;
    size_t K = (size_t)EF_MAX(k, 1);
    mr->omega2 = malloc(K * sizeof(double));
    mr->freq = malloc(K * sizeof(double));
    mr->shapes = calloc(K * (size_t)EF_MAX(nn, 1) * 6, sizeof(double));
    mr->participation = malloc(K * 6 * sizeof(double));
    mr->eff_mass = malloc(K * 6 * sizeof(double));
    mr->eff_ratio = malloc(K * 6 * sizeof(double));
    mr->unitmax_mass = malloc(K * sizeof(double));
    mr->residual = malloc(K * sizeof(double));
    double *Mr = malloc((size_t)n * 6 * sizeof *Mr), *r = malloc((size_t)n * sizeof *r);
    double *t1 = malloc((size_t)n * sizeof *t1), *t2 = malloc((size_t)n * sizeof *t2);
    if (!mr->omega2 || !mr->freq || !mr->shapes || !mr->participation || !mr->eff_mass ||
        !mr->eff_ratio || !mr->unitmax_mass || !mr->residual || !Mr || !r || !t1 || !t2) {
        free(Mr); free(r); free(t1); free(t2);
        return EF_ENOMEM;
    }
    memcpy(mr->ref_point, mi->centre, sizeof mr->ref_point);
    for (int d = 0; d < 6; d++) {
        influence(sys, d, mr->ref_point, r);
        ef_spmat_symv(M, r, Mr + (size_t)d * (size_t)n);
        double s = 0.0;
        for (ef_index i = 0; i < n; i++) s += r[i] * Mr[(size_t)d * (size_t)n + (size_t)i];
        mr->total_mass[d] = s;                          /* M_d = r_d^T M r_d */
    }
    mr->model_mass = mi->total;
    mr->n_rigid = 0;
    for (int t = 0; t < k; t++) {
        double *v = phi + (size_t)t * (size_t)n;
        double om2 = w2[t] > 0.0 ? w2[t] : 0.0;
        double f = sqrt(om2) / TWO_PI;
        if (f < EF_RIGID_HZ) {
            om2 = 0.0;
            f = 0.0;
            mr->n_rigid++;
        }
        /* sign: largest translation at a model node positive */
        double big = 0.0, umax = 0.0;
        for (ef_index eq = 0; eq < n; eq++) {
            ef_index dof = sys->dofs->dof_of_eq[eq];
            if (dof % 6 >= 3) continue;
            umax = fmax(umax, fabs(v[eq]));
            if (dof / 6 < nn && fabs(v[eq]) > fabs(big)) big = v[eq];
        }
        if (big < 0.0)
            for (ef_index eq = 0; eq < n; eq++) v[eq] = -v[eq];
        mr->omega2[t] = om2;
        mr->freq[t] = f;
        mr->unitmax_mass[t] = umax > 0.0 ? 1.0 / (umax * umax) : 0.0;
        for (ef_index eq = 0; eq < n; eq++) {
            ef_index dof = sys->dofs->dof_of_eq[eq];
            if (dof / 6 < nn) mr->shapes[(size_t)t * (size_t)nn * 6 + (size_t)dof] = v[eq];
        }
        for (int d = 0; d < 6; d++) {
            double g = 0.0;
            for (ef_index i = 0; i < n; i++) g += v[i] * Mr[(size_t)d * (size_t)n + (size_t)i];
            mr->participation[6 * t + d] = g;           /* Gamma = phi^T M r_d */
            mr->eff_mass[6 * t + d] = g * g;
            mr->eff_ratio[6 * t + d] = mr->total_mass[d] > 0.0 ? g * g / mr->total_mass[d] : 0.0;
        }
        ef_spmat_symv(Kp, v, t1);
        ef_spmat_symv(M, v, t2);
        double kn = norm2(t1, n);
        for (ef_index i = 0; i < n; i++) t2[i] = t1[i] - w2[t] * t2[i];
        mr->residual[t] = kn > 0.0 ? norm2(t2, n) / kn : (double)NAN;   /* ||K phi - w^2 M phi|| / ||K phi|| */
    }
    free(Mr); free(r); free(t1); free(t2);
    return EF_OK;
}

ef_status ef_modal_run(ef_system *sys, int modes, double above_hz, ef_results *res, ef_ctx *ctx)
{
    ef_index n = sys->dofs->n_eq;
    ef_status st;
    ef_mass_info mi;
    double t_start = ef_clock();
    double *M = malloc((size_t)ef_sparse_nnz(sys->asmb->A) * sizeof *M);
    double *w2 = NULL, *phi = NULL;
    ef_spmat *Mp = NULL, *Kp = NULL;
    int found = 0;
    ef_modal_result *mr = calloc(1, sizeof *mr);
    if (!M || !mr) { st = EF_ENOMEM; goto done; }
    if ((st = ef_mass_assemble(sys, M, &mi, ctx)) != EF_OK) goto done;
    if ((st = ef_spmat_create(sys->asmb->A, M, &Mp)) != EF_OK) goto done;
    mr->lumped = mi.lumped;
    snprintf(mr->mass_source, sizeof mr->mass_source, "%s", mi.source);
    ef_index with_mass = 0;
    for (ef_index i = 0; i < n; i++) with_mass += M[ef_asm_diag(sys->asmb, i)] > 0.0;
    if (with_mass == 0) {
        ef_diag_error(ctx, NULL, "modal: the model has no mass on any free DOF: give the "
                      "materials a density, add masses, or list load cases in mass_source");
        st = EF_EINPUT;
        goto done;
    }
    double f0 = above_hz > 0.0 ? above_hz : 0.0;
    /* Few DOFs with mass: the Krylov space cannot outgrow rank(M), so solve densely */
    bool dense = modes == 0 || (with_mass <= 2 * (ef_index)modes + 20 && n <= EF_DENSE_MAX_EQ);
    if (dense) {
        st = solve_dense(sys, M, &w2, &phi, &found, ctx);
        mr->shift = 0.0;
        if (st == EF_OK) found = keep_above(w2, phi, n, found, f0);
        if (modes > 0 && found > modes) found = modes;
    } else {
        double sigma = -(TWO_PI * EF_MODAL_SHIFT_HZ) * (TWO_PI * EF_MODAL_SHIFT_HZ);
        mr->shift = sigma;
        if (modes >= with_mass) modes = (int)EF_MAX(with_mass - 1, 1);
        /* a few more than asked: a cluster of repeated frequencies at the end of the wanted
         * range can otherwise lose a copy (Krylov methods see one vector per distinct
         * eigenvalue until rounding brings the copies in) */
        int cap = (int)EF_MIN(with_mass, n);
        int want = (int)EF_MIN((ef_index)(modes + EF_MAX(4, (modes + 2) / 3)), EF_MIN(n - 1, cap - 1));
        for (;;) {
            free(w2); free(phi);
            w2 = phi = NULL;
            st = solve_sparse(sys, M, Mp, want, cap, sigma, &w2, &phi, &found, mr, ctx);
            if (st != EF_OK && !(st == EF_ENOCONV && found > 0)) goto done;
            int got = found;
            found = keep_above(w2, phi, n, found, f0);
            /* modes below above_hz were dropped: ask for more when too few remain */
            int short_by = modes - found;
            if (short_by <= 0 || want >= EF_MIN(n - 1, cap - 1) || st != EF_OK || got < want) break;
            want = (int)EF_MIN((ef_index)want + short_by + 2, EF_MIN(n - 1, cap - 1));
        }
        if (found > modes) found = modes;
    }
    if (st != EF_OK && !(st == EF_ENOCONV && found > 0)) goto done;
    {
        double t0 = ef_clock();
        ef_status s2 = ef_spmat_create(sys->asmb->A, sys->K, &Kp);
        if (s2 == EF_OK) s2 = post_process(sys, Mp, Kp, w2, phi, found, &mi, mr);
        ef_ctx_time_add(ctx, "modal post-process", ef_clock() - t0, 1);
        if (s2 != EF_OK) { st = s2; goto done; }
    }
    ef_modal_result_free(&res->modal);
    res->modal = mr;
    mr = NULL;
done:
    ef_modal_result_free(&mr);
    ef_spmat_free(&Mp);
    ef_spmat_free(&Kp);
    free(M);
    free(w2);
    free(phi);
    ef_ctx_time_add(ctx, "modal total", ef_clock() - t_start, 1);
    return st;
}
