/* second_order.c: iterative second-order (P-delta) analysis of one load.
 *
 * u_0, N_0 from the first-order solution; then for i = 0, 1, ...: assemble the tangent
 * K_T = K + K_G(N_i) (one numeric refactorization on the shared symbolic analysis),
 * solve K_T u_{i+1} = F, recover the element forces N_{i+1} including the geometric
 * term. Converged when both
 *   max|u_{i+1} - u_i| <= tol * max|u_{i+1}|, translations and rotations apart, and
 *   max_e |N_{i+1} - N_i| <= tol * max_e |N_{i+1}| + an absolute floor.
 * A tangent that is not positive definite means the load is at or beyond the elastic
 * critical load: the run stops and no result is stored. P-Delta comes from the
 * displacements of the nodes; P-delta (member bow) from the subdivision of members.
 */
#include "second_order.h"

#include "static.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Axial-force changes below this fraction of the largest first-order end force of the
 * model count as none (the absolute floor of the convergence test). */
#define EF_SO_FORCE_FLOOR 1e-12
/* A first-order end force below this fraction of the largest of its component over the
 * model is "negligible": its amplification is not a meaningful ratio (NaN). Our floor
 * (dynamics-and-stability-methods.md §4). */
#define EF_AMP_NEGLIGIBLE 1e-3

/* max |a - b| and max |a| over the equations of translations (c < 3) or rotations. */
static void change(const ef_system *sys, const double *a, const double *b, bool rot,
                   double *dmax, double *amax)
{
    double d = 0.0, s = 0.0;
    for (ef_index eq = 0; eq < sys->dofs->n_eq; eq++) {
        if ((sys->dofs->dof_of_eq[eq] % 6 >= 3) != rot) continue;
        d = fmax(d, fabs(a[eq] - b[eq]));
        s = fmax(s, fabs(a[eq]));
    }
    *dmax = d;
    *amax = s;
}

ef_status ef_second_order_run(ef_system *sys, ef_index load, double tol, int max_iter,
                              bool chord_only, ef_results *res, ef_ctx *ctx)
{
    const ef_model *m = sys->m;
    const char *name = ef_model_load_name(m, load);
    ef_index n = sys->dofs->n_eq, ne = sys->mesh->n_elems, nm = m->n_members;
    ef_status st;
    ef_loadset *ls = NULL;
    double *u0 = NULL, *f0 = NULL;
    double *u = malloc((size_t)n * sizeof *u), *un = malloc((size_t)n * sizeof *un);
    double *F = malloc((size_t)n * sizeof *F);
    double *f = malloc((size_t)EF_MAX(ne, 1) * 12 * sizeof *f);
    double *fn = malloc((size_t)EF_MAX(ne, 1) * 12 * sizeof *fn);
    double *KT = malloc((size_t)ef_sparse_nnz(sys->asmb->A) * sizeof *KT);
    ef_load_result first, lr;
    memset(&first, 0, sizeof first);
    memset(&lr, 0, sizeof lr);
    if (!u || !un || !F || !f || !fn || !KT) { st = EF_ENOMEM; goto done; }
    if ((st = ef_loadset_build(m, load, &ls, ctx)) != EF_OK) goto done;
    if ((st = ef_static_solve_one(sys, ls, &u0, &f0, ctx)) != EF_OK) goto done;
    memcpy(u, u0, (size_t)n * sizeof *u);
    memcpy(f, f0, (size_t)ne * 12 * sizeof *f);
    double fscale = 0.0;
    for (ef_index i = 0; i < ne * 12; i++) fscale = fmax(fscale, fabs(f0[i]));
    bool converged = false;
    int it = 0;
    double rel = INFINITY;
    double t0 = ef_clock();
    for (it = 1; it <= max_iter; it++) {
        if ((st = ef_system_tangent(sys, ls, f, chord_only, KT, F, ctx)) != EF_OK) goto unstable;
        st = ef_system_factorize(sys, KT, "second-order tangent (K + K_G)", ctx);
        if (st == EF_EUNSTABLE) goto unstable;
        if (st != EF_OK) goto done;
        if ((st = ef_chol_solve(sys->L, 1, F, un, ctx)) != EF_OK) goto done;
        ef_system_elem_forces(sys, ls, un, f, chord_only, fn);
        double du_t, ut, du_r, ur, dN = 0.0, Nmax = 0.0;
        change(sys, un, u, false, &du_t, &ut);
        change(sys, un, u, true, &du_r, &ur);
        for (ef_index e = 0; e < ne; e++) {
            dN = fmax(dN, fabs(fn[12 * e + 6] - f[12 * e + 6]));
            Nmax = fmax(Nmax, fabs(fn[12 * e + 6]));
        }
        double rt = ut > 0.0 ? du_t / ut : 0.0, rr = ur > 0.0 ? du_r / ur : 0.0;
        double rn = Nmax > 0.0 ? dN / Nmax : 0.0;
        rel = fmax(fmax(rt, rr), rn);
        memcpy(u, un, (size_t)n * sizeof *u);
        memcpy(f, fn, (size_t)ne * 12 * sizeof *f);
        ef_ctx_progress(ctx, "second-order iterations", it);
        if (!isfinite(rel)) break;
        if (rt <= tol && rr <= tol && dN <= tol * Nmax + EF_SO_FORCE_FLOOR * fscale) {
            converged = true;
            break;
        }
    }
    ef_ctx_time_add(ctx, "second-order iterations", ef_clock() - t0, it);
    if (!converged) {
        ef_diag_error(ctx, NULL, "second-order analysis of load '%s' did not converge in %d "
                      "iterations (last relative change %.3g > tolerance %.3g): the load is "
                      "probably near its elastic critical value; no second-order results are "
                      "given for it%s", name, max_iter, rel, tol,
                      res->buckling && res->buckling->load == load && res->buckling->n_pos > 0
                          ? "" : "; run the buckling analysis of the same load to see alpha_cr");
        st = EF_ENOCONV;
        goto done;
    }
    /* results, and the first-order end forces to compare with */
    if ((st = ef_load_result_alloc(res, &first, false)) != EF_OK) goto done;
    ef_system_recover(sys, ls, u0, f0, res, &first);
    if ((st = ef_load_result_alloc(res, &lr, true)) != EF_OK) goto done;
    lr.load = load;
    ef_system_recover(sys, ls, u, f, res, &lr);
    lr.iterations = it;
    lr.converged = true;
    lr.tolerance = tol;
    lr.residual = rel;
    lr.chord_only = chord_only;
    lr.solve_residual = ef_system_residual(sys, KT, u, F);
    /* amplification |S_II| / |S_I| per end-force component; NaN where S_I is negligible */
    double cmax[6] = {0, 0, 0, 0, 0, 0};
    for (ef_index k = 0; k < nm; k++)
        for (int a = 0; a < 12; a++) cmax[a % 6] = fmax(cmax[a % 6], fabs(first.end_forces[12 * k + a]));
    for (ef_index k = 0; k < nm; k++)
        for (int a = 0; a < 12; a++) {
            double s1 = fabs(first.end_forces[12 * k + a]), s2 = fabs(lr.end_forces[12 * k + a]);
            lr.amplification[12 * k + a] = s1 > EF_AMP_NEGLIGIBLE * cmax[a % 6] && s1 > 0.0
                                               ? s2 / s1 : (double)NAN;
        }
    {
        ef_load_result *grown = realloc(res->second, (size_t)(res->n_second + 1) * sizeof *grown);
        if (!grown) { st = EF_ENOMEM; goto done; }
        res->second = grown;
        res->second[res->n_second++] = lr;
        memset(&lr, 0, sizeof lr);
    }
    st = EF_OK;
    goto done;
unstable:
    ef_ctx_time_add(ctx, "second-order iterations", ef_clock() - t0, it);
    if (st == EF_EUNSTABLE) {
        if (res->buckling && res->buckling->load == load && res->buckling->n_pos > 0)
            ef_diag_error(ctx, NULL, "second-order analysis of load '%s' stopped at iteration %d: "
                          "the load is at or beyond the elastic critical load (alpha_cr = %.4g "
                          "from the buckling analysis); no second-order results are given",
                          name, it, res->buckling->factors[0]);
        else
            ef_diag_error(ctx, NULL, "second-order analysis of load '%s' stopped at iteration %d: "
                          "the load is at or beyond the elastic critical load; no second-order "
                          "results are given (run the buckling analysis of the same load for "
                          "alpha_cr)", name, it);
    }
done:
    ef_load_result_clear(&first);
    ef_load_result_clear(&lr);
    ef_loadset_free(&ls);
    free(u0); free(f0); free(u); free(un); free(F); free(f); free(fn); free(KT);
    sys->L_holds_K = false;
    return st;
}
