/* buckling.c: elastic critical load factors, (K + lambda K_G) phi = 0.
 *
 * K_G is formed from the first-order element forces of the load (its axial forces and,
 * through element.c, the end moments). K is positive definite wherever the static
 * analysis succeeded, so the pencil is solved as -K_G phi = mu K phi with mu = 1/lambda
 * (ARPACK mode 2, B = K, through the factor of K that the static analysis already made):
 * the most negative mu are the smallest factors of the reversed load. The positive ones
 * come from the shifted form of the same pencil (ARPACK mode 4), see extract_positive. Shapes are scaled to a largest translation
 * of 1. Every mode is classified by where its geometric strain energy sits
 * (dynamics-and-stability-methods.md §3): a member that holds half of it or more makes
 * the mode a member mode (flexural or torsional), else the mode is global (sway).
 */
#include "buckling.h"

#include "solve_eig.h"
#include "static.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* A member holding more than this share of |phi^T K_G phi| makes a mode "member-dominated"
 * (our threshold, dynamics-and-stability-methods.md §3). Strictly more: two identical
 * columns sharing a sway mode hold exactly half each, and that mode is global. */
#define EF_MEMBER_SHARE (0.5 + 1e-6)
/* |mu| below this fraction of the largest |mu| found is lambda = infinity: no buckling. */
#define EF_MU_NEGLIGIBLE 1e-10

typedef struct {
    ef_system *sys;
    const double *KG;
    ef_ctx *ctx;
} op_data;

static ef_status op_solve(void *data, const double *x, double *y)
{
    op_data *d = data;
    return ef_chol_solve(d->sys->L, 1, x, y, d->ctx);            /* y = K^{-1} x */
}

static ef_status op_a(void *data, const double *x, double *y)
{
    op_data *d = data;
    ef_index n = d->sys->dofs->n_eq;
    ef_sparse_symv(d->sys->asmb->A, d->KG, x, y);
    for (ef_index i = 0; i < n; i++) y[i] = -y[i];               /* y = -K_G x */
    return EF_OK;
}

static ef_status op_b(void *data, const double *x, double *y)
{
    op_data *d = data;
    ef_sparse_symv(d->sys->asmb->A, d->sys->K, x, y);            /* y = K x */
    return EF_OK;
}

static ef_status extract(ef_system *sys, const double *KG, int nev, ef_eig_which which,
                         ef_eig_result *er, ef_ctx *ctx)
{
    op_data od = {sys, KG, ctx};
    ef_eig_problem pb;
    memset(&pb, 0, sizeof pb);
    pb.n = sys->dofs->n_eq;
    pb.nev = (int)EF_MIN((ef_index)nev, pb.n - 1);
    pb.mode = EF_EIG_INVERSE_B;
    pb.which = which;
    pb.solve = op_solve;
    pb.apply_a = op_a;
    pb.apply_b = op_b;
    pb.data = &od;
    ef_status st = ef_eig_solve(&pb, er, ctx);
    return st;
}

/* An estimate from above of the lowest positive factor: the Rayleigh quotient
 * u^T K u / (-u^T K_G u) of the first-order displacements (0 when not positive). */
static double rayleigh_estimate(const ef_system *sys, const double *KG, const double *u)
{
    ef_index n = sys->dofs->n_eq;
    double *t = malloc((size_t)n * sizeof *t), ku = 0.0, kg = 0.0;
    if (!t) return 0.0;
    ef_sparse_symv(sys->asmb->A, sys->K, u, t);
    for (ef_index i = 0; i < n; i++) ku += u[i] * t[i];
    ef_sparse_symv(sys->asmb->A, KG, u, t);
    for (ef_index i = 0; i < n; i++) kg -= u[i] * t[i];
    free(t);
    double est = kg > 0.0 ? ku / kg : 0.0;
    return isfinite(est) ? est : 0.0;
}

/* Put a result of the shifted (mode 4) solve, lambda ascending, into the form of the
 * inverse-B (mode 2) one: mu = 1/lambda, ascending. */
static void as_inverse_values(ef_eig_result *er, ef_index n)
{
    for (int a = 0, b = er->nconv - 1; a < b; a++, b--) {
        double t = er->values[a];
        er->values[a] = er->values[b];
        er->values[b] = t;
        double *va = er->vectors + (size_t)a * (size_t)n, *vb = er->vectors + (size_t)b * (size_t)n;
        for (ef_index i = 0; i < n; i++) {
            double w = va[i];
            va[i] = vb[i];
            vb[i] = w;
        }
    }
    for (int a = 0; a < er->nconv; a++) er->values[a] = 1.0 / er->values[a];
}

/* The lowest positive factors. Shifted first (ARPACK mode 4, OP = (K + sigma K_G)^-1 K):
 * sigma starts at half the Rayleigh estimate and is quartered until K + sigma K_G is
 * positive definite, which holds exactly when 0 < sigma < lambda_1 (Sylvester's law of
 * inertia); the wanted factors are then the ones just above sigma and converge in far
 * fewer steps than with the unshifted pencil. When no shift works (no positive estimate,
 * or the structure buckles under a tiny fraction of the load) the unshifted mode 2 runs.
 * Values come back as mu = 1/lambda, ascending, as from `extract`. */
#define EF_SHIFT_TRIES 8
#define EF_SHIFT_BISECT 2

/* Factorize K + sigma K_G into sys->L (no message: a failure only says sigma is too big). */
static ef_status shifted_factor(ef_system *sys, const double *KG, double sigma, double *A,
                                ef_ctx *ctx)
{
    ef_index nnz = ef_sparse_nnz(sys->asmb->A);
    for (ef_index p = 0; p < nnz; p++) A[p] = sys->K[p] + sigma * KG[p];    /* K + sigma K_G */
    sys->L_holds_K = false;
    return ef_chol_factorize(sys->asmb->A, A, sys->L, NULL, ctx);
}

static ef_status extract_positive(ef_system *sys, const double *KG, const double *u, int nev,
                                  ef_eig_result *er, ef_ctx *ctx)
{
    ef_index nnz = ef_sparse_nnz(sys->asmb->A), n = sys->dofs->n_eq;
    double est = rayleigh_estimate(sys, KG, u);
    double *A = est > 0.0 ? malloc((size_t)nnz * sizeof *A) : NULL;
    ef_status st = EF_EUNSTABLE;
    double sigma = 0.5 * est, failed_at = 0.0;
    for (int t = 0; A && t < EF_SHIFT_TRIES; t++) {
        st = shifted_factor(sys, KG, sigma, A, ctx);
        if (st != EF_EUNSTABLE) break;
        failed_at = sigma;
        sigma *= 0.25;
    }
    /* a shift closer to lambda_1 separates the wanted factors better: bisect towards the
     * last shift that failed, keeping the factor of the best one that held */
    bool holds = true;                        /* sys->L is the factor at sigma */
    for (int t = 0; A && st == EF_OK && failed_at > 0.0 && t < EF_SHIFT_BISECT; t++) {
        double mid = 0.5 * (sigma + failed_at);
        ef_status s2 = shifted_factor(sys, KG, mid, A, ctx);
        holds = s2 == EF_OK;
        if (s2 == EF_OK) sigma = mid;
        else if (s2 == EF_EUNSTABLE) failed_at = mid;
        else { st = s2; break; }
    }
    if (st == EF_OK && A && !holds) st = shifted_factor(sys, KG, sigma, A, ctx);
    free(A);
    if (st == EF_OK) {
        op_data od = {sys, KG, ctx};
        ef_eig_problem pb;
        memset(&pb, 0, sizeof pb);
        pb.n = n;
        pb.nev = (int)EF_MIN((ef_index)nev, n - 1);
        pb.mode = EF_EIG_BUCKLING;
        pb.sigma = sigma;
        pb.solve = op_solve;                         /* (K + sigma K_G)^-1 */
        pb.apply_b = op_b;                           /* K */
        pb.data = &od;
        st = ef_eig_solve(&pb, er, ctx);
        if (st == EF_OK || (st == EF_ENOCONV && er->nconv > 0)) {
            as_inverse_values(er, n);
            return st;
        }
        ef_eig_result_free(er);
    }
    if (st == EF_ENOMEM) return st;
    if ((st = ef_system_factor_k(sys, ctx)) != EF_OK) return st;
    return extract(sys, KG, nev, EF_EIG_LARGEST, er, ctx);
}

/* Quadratic form phi_e^T k_G,e phi_e of element e (local, releases condensed), and the
 * part of it in the torsional DOFs (rx at both ends). */
static void elem_energy(const ef_system *sys, const double *f_elem, const double *phi,
                        bool chord_only, ef_index e, double *all, double *torsion)
{
    const ef_elem *el = &sys->mesh->elems[e];
    const double (*axes)[3] = (const double (*)[3])sys->m->members[el->member].axes;
    double kg[144], dg[12], d[12];
    ef_elem_kg_local(&sys->mesh->props[el->member], el->len, f_elem + 12 * e, chord_only, kg);
    for (int a = 0; a < 12; a++) {
        ef_index eq = sys->dofs->eq_of_dof[6 * el->node[a / 6] + a % 6];
        dg[a] = eq >= 0 ? phi[eq] : 0.0;
    }
    ef_elem_vec_to_local(axes, dg, d);
    if (el->release[0] | el->release[1]) {
        double k[144], T[144], R[144], full[12];
        bool rel;
        ef_mesh_elem_k_local(sys->mesh, e, k, T, R, &rel);
        for (int i = 0; i < 12; i++) {
            double s = 0.0;
            for (int j = 0; j < 12; j++) s += T[12 * i + j] * d[j];
            full[i] = s;
        }
        memcpy(d, full, sizeof d);
    }
    double q = 0.0, qt = 0.0;
    for (int i = 0; i < 12; i++)
        for (int j = 0; j < 12; j++) {
            double v = d[i] * kg[12 * i + j] * d[j];
            q += v;
            if ((i == 3 || i == 9) && (j == 3 || j == 9)) qt += v;
        }
    *all = q;
    *torsion = qt;
}

ef_status ef_buckling_run(ef_system *sys, ef_index load, int modes, bool negative,
                          ef_results *res, ef_ctx *ctx)
{
    const ef_model *m = sys->m;
    const char *name = ef_model_load_name(m, load);
    ef_index n = sys->dofs->n_eq, nn = m->n_nodes, nm = m->n_members;
    ef_status st;
    ef_loadset *ls = NULL;
    double *u = NULL, *f = NULL, *KG = NULL;
    ef_eig_result pos, neg;
    memset(&pos, 0, sizeof pos);
    memset(&neg, 0, sizeof neg);
    ef_buckling_result *br = calloc(1, sizeof *br);
    if (!br) return EF_ENOMEM;
    br->load = load;
    if ((st = ef_loadset_build(m, load, &ls, ctx)) != EF_OK) goto done;
    if ((st = ef_static_solve_one(sys, ls, &u, &f, ctx)) != EF_OK) goto done;
    KG = malloc((size_t)ef_sparse_nnz(sys->asmb->A) * sizeof *KG);
    br->axial0 = malloc((size_t)EF_MAX(nm, 1) * sizeof *br->axial0);
    if (!KG || !br->axial0) { st = EF_ENOMEM; goto done; }
    for (ef_index k = 0; k < nm; k++) br->axial0[k] = f[12 * sys->mesh->first_elem[k] + 6];
    ef_system_kg(sys, f, false, KG);
    if (negative) {                     /* first, while the factor of K is at hand */
        ef_status s2 = extract(sys, KG, modes, EF_EIG_SMALLEST, &neg, ctx);
        if (s2 != EF_OK && !(s2 == EF_ENOCONV && neg.nconv > 0)) { st = s2; goto done; }
        br->n_op += neg.n_op;
    }
    st = extract_positive(sys, KG, u, modes, &pos, ctx);
    if (st != EF_OK && !(st == EF_ENOCONV && pos.nconv > 0)) goto done;
    br->n_op += pos.n_op;
    double mu_max = 0.0;
    for (int t = 0; t < pos.nconv; t++) mu_max = fmax(mu_max, fabs(pos.values[t]));
    for (int t = 0; t < neg.nconv; t++) mu_max = fmax(mu_max, fabs(neg.values[t]));
    /* positive factors: mu > 0, largest mu first = smallest lambda first */
    int np = 0;
    for (int t = pos.nconv - 1; t >= 0; t--) np += pos.values[t] > EF_MU_NEGLIGIBLE * mu_max;
    br->n_pos = np;
    size_t P = (size_t)EF_MAX(np, 1);
    br->factors = malloc(P * sizeof(double));
    br->shapes = calloc(P * (size_t)EF_MAX(nn, 1) * 6, sizeof(double));
    br->residual = malloc(P * sizeof(double));
    br->member_share = calloc(P * (size_t)EF_MAX(nm, 1), sizeof(double));
    br->kind = calloc(P, sizeof(int));
    br->dominant = calloc(P, sizeof(ef_index));
    double *t1 = malloc((size_t)n * sizeof *t1), *t2 = malloc((size_t)n * sizeof *t2);
    double *share = calloc((size_t)EF_MAX(nm, 1) * 2, sizeof *share);
    if (!br->factors || !br->shapes || !br->residual || !br->member_share || !br->kind ||
        !br->dominant || !t1 || !t2 || !share) {
        free(t1); free(t2); free(share);
        st = EF_ENOMEM;
        goto done;
    }
    for (int t = 0; t < np; t++) {
        int src = pos.nconv - 1 - t;                 /* ARPACK sorts mu ascending */
        double lam = 1.0 / pos.values[src];
        double *v = pos.vectors + (size_t)src * (size_t)n;
        br->factors[t] = lam;
        /* residual ||K phi + lambda K_G phi|| / ||K phi|| */
        ef_sparse_symv(sys->asmb->A, sys->K, v, t1);
        ef_sparse_symv(sys->asmb->A, KG, v, t2);
        double rn = 0.0, kn = 0.0;
        for (ef_index i = 0; i < n; i++) {
            rn += (t1[i] + lam * t2[i]) * (t1[i] + lam * t2[i]);
            kn += t1[i] * t1[i];
        }
        br->residual[t] = kn > 0.0 ? sqrt(rn / kn) : 0.0;
        /* scale: largest translation (any mesh node) 1 and positive */
        double big = 0.0;
        for (ef_index eq = 0; eq < n; eq++)
            if (sys->dofs->dof_of_eq[eq] % 6 < 3 && fabs(v[eq]) > fabs(big)) big = v[eq];
        if (big == 0.0) big = 1.0;
        for (ef_index eq = 0; eq < n; eq++) {
            v[eq] /= big;
            ef_index dof = sys->dofs->dof_of_eq[eq];
            if (dof / 6 < nn) br->shapes[(size_t)t * (size_t)nn * 6 + (size_t)dof] = v[eq];
        }
        /* where the geometric strain energy sits */
        memset(share, 0, (size_t)nm * 2 * sizeof *share);
        double total = 0.0;
        for (ef_index e = 0; e < sys->mesh->n_elems; e++) {
            double q, qt;
            elem_energy(sys, f, v, false, e, &q, &qt);
            ef_index k = sys->mesh->elems[e].member;
            share[2 * k] += q;
            share[2 * k + 1] += qt;
        }
        for (ef_index k = 0; k < nm; k++) total += fabs(share[2 * k]);
        ef_index best = 0;
        for (ef_index k = 0; k < nm; k++) {
            double s = total > 0.0 ? fabs(share[2 * k]) / total : 0.0;
            br->member_share[(size_t)t * (size_t)nm + (size_t)k] = s;
            if (s > br->member_share[(size_t)t * (size_t)nm + (size_t)best]) best = k;
        }
        br->dominant[t] = best;
        double sb = br->member_share[(size_t)t * (size_t)nm + (size_t)best];
        if (sb <= EF_MEMBER_SHARE) br->kind[t] = EF_BUCKLE_GLOBAL;
        else if (fabs(share[2 * best + 1]) > 0.5 * fabs(share[2 * best])) br->kind[t] = EF_BUCKLE_MEMBER_TORSIONAL;
        else br->kind[t] = EF_BUCKLE_MEMBER_FLEXURAL;
    }
    free(t1); free(t2); free(share);
    /* reversed-load factors: mu < 0, most negative first */
    int ng = 0;
    for (int t = 0; t < neg.nconv; t++) ng += neg.values[t] < -EF_MU_NEGLIGIBLE * mu_max;
    br->n_neg = ng;
    br->neg_factors = malloc((size_t)EF_MAX(ng, 1) * sizeof(double));
    if (!br->neg_factors) { st = EF_ENOMEM; goto done; }
    for (int t = 0, j = 0; t < neg.nconv; t++)
        if (neg.values[t] < -EF_MU_NEGLIGIBLE * mu_max) br->neg_factors[j++] = 1.0 / neg.values[t];
    br->found_none = np == 0;
    if (np == 0)
        ef_diag_warning(ctx, NULL, "buckling of load '%s': no positive critical load factor among "
                        "the %d lowest in magnitude: the load does not make this structure "
                        "unstable (members in tension), or ask for more modes", name, pos.nconv);
    ef_buckling_result_free(&res->buckling);
    res->buckling = br;
    br = NULL;
done:
    ef_buckling_result_free(&br);
    ef_eig_result_free(&pos);
    ef_eig_result_free(&neg);
    ef_loadset_free(&ls);
    free(u);
    free(f);
    free(KG);
    return st;
}

double ef_buckling_alpha_cr(const ef_buckling_result *br, bool *global)
{
    for (int t = 0; t < br->n_pos; t++)
        if (br->kind[t] == EF_BUCKLE_GLOBAL) {
            if (global) *global = true;
            return br->factors[t];
        }
    if (global) *global = false;
    return br->n_pos > 0 ? br->factors[0] : (double)NAN;
}
