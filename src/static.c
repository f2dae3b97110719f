/* static.c: linear static analysis: K u = F for every requested load, one factor. */
#include "static.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* Above this the solution residual ||Ku - f|| / (||K|| ||u|| + ||f||) draws a warning:
 * a sound double-precision solve lands near 1e-16 times a modest growth factor. */
#define EF_SOLVE_RESIDUAL_WARN 1e-10

ef_status ef_static_solve_one(ef_system *sys, const ef_loadset *ls, double **pu, double **pf,
                              ef_ctx *ctx)
{
    ef_status st;
    ef_index n = sys->dofs->n_eq;
    double *F = malloc((size_t)n * sizeof *F), *u = malloc((size_t)n * sizeof *u);
    double *f = malloc((size_t)EF_MAX(sys->mesh->n_elems, 1) * 12 * sizeof *f);
    if (!F || !u || !f) { st = EF_ENOMEM; goto fail; }
    if ((st = ef_system_factor_k(sys, ctx)) != EF_OK) goto fail;
    if ((st = ef_system_load_vector(sys, ls, F, ctx)) != EF_OK) goto fail;
    if ((st = ef_chol_solve(sys->L, 1, F, u, ctx)) != EF_OK) goto fail;
    ef_system_elem_forces(sys, ls, u, NULL, false, f);
    free(F);
    *pu = u;
    *pf = f;
    return EF_OK;
fail:
    free(F);
    free(u);
    free(f);
    return st;
}

ef_status ef_static_run(ef_system *sys, const ef_index *loads, ef_index n_loads,
                        ef_results *r, ef_ctx *ctx)
{
    const ef_model *m = sys->m;
    ef_index n = sys->dofs->n_eq;
    ef_status st = EF_OK;
    if (n_loads == 0) return EF_OK;
    ef_loadset **ls = calloc((size_t)n_loads, sizeof *ls);
    double *F = malloc((size_t)(n * n_loads) * sizeof *F);
    double *U = malloc((size_t)(n * n_loads) * sizeof *U);
    double *f = malloc((size_t)EF_MAX(sys->mesh->n_elems, 1) * 12 * sizeof *f);
    ef_load_result *out = realloc(r->statics, (size_t)(r->n_statics + n_loads) * sizeof *out);
    if (out) r->statics = out;
    if (!ls || !F || !U || !f || !out) { st = EF_ENOMEM; goto done; }
    if ((st = ef_system_factor_k(sys, ctx)) != EF_OK) goto done;
    double t0 = ef_clock();
    for (ef_index i = 0; i < n_loads; i++) {
        ef_status s2;
        if ((s2 = ef_loadset_build(m, loads[i], &ls[i], ctx)) != EF_OK) { st = s2; goto done; }
        if ((s2 = ef_system_load_vector(sys, ls[i], F + n * i, ctx)) != EF_OK) st = s2;
    }
    ef_ctx_time_add(ctx, "loads", ef_clock() - t0, n_loads);
    if (st != EF_OK) goto done;
    if ((st = ef_chol_solve(sys->L, n_loads, F, U, ctx)) != EF_OK) goto done;
    t0 = ef_clock();
    for (ef_index i = 0; i < n_loads; i++) {
        ef_load_result *lr = &r->statics[r->n_statics];
        if ((st = ef_load_result_alloc(r, lr, false)) != EF_OK) goto done;
        r->n_statics++;
        lr->load = loads[i];
        lr->solve_residual = ef_system_residual(sys, sys->K, U + n * i, F + n * i);
        if (lr->solve_residual > EF_SOLVE_RESIDUAL_WARN)
            ef_diag_warning(ctx, NULL, "load '%s': the static solution has a relative residual "
                            "of %.2g; the stiffness matrix is ill-conditioned",
                            ef_model_load_name(m, loads[i]), lr->solve_residual);
        ef_system_elem_forces(sys, ls[i], U + n * i, NULL, false, f);
        ef_system_recover(sys, ls[i], U + n * i, f, r, lr);
        lr->converged = true;
    }
    ef_ctx_time_add(ctx, "recover", ef_clock() - t0, n_loads);
done:
    if (ls)
        for (ef_index i = 0; i < n_loads; i++) ef_loadset_free(&ls[i]);
    free(ls);
    free(F);
    free(U);
    free(f);
    return st;
}
