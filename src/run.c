/* run.c: the analyses a model asks for, over one shared discrete system. */
#include "run.h"

#include "buckling.h"
#include "export_mtx.h"
#include "modal.h"
#include "second_order.h"
#include "vibration.h"
#include "static.h"

#include <stdlib.h>

ef_status ef_run_analyses(const ef_model *m, const char *export_dir, ef_results **out,
                          ef_run_facts *facts, ef_ctx *ctx)
{
    ef_status st;
    ef_system *sys = NULL;
    ef_results *r = NULL;
    *out = NULL;
    ctx->file = m->file;                       /* positions in later messages are in it */
    if ((st = ef_results_create(m, &r)) != EF_OK) return st;
    if ((st = ef_system_create(m, &sys, ctx)) != EF_OK) goto done;
    r->n_mesh_nodes = sys->mesh->n_nodes;
    r->n_elems = sys->mesh->n_elems;
    r->n_eq = sys->dofs->n_eq;
    r->n_dropped = sys->dofs->n_dropped;
    if (facts) {
        facts->n_mesh_nodes = r->n_mesh_nodes;
        facts->n_elems = r->n_elems;
        facts->n_eq = r->n_eq;
        facts->n_dropped = r->n_dropped;
    }
    if (export_dir && (st = ef_export_system(sys, export_dir, ctx)) != EF_OK) goto done;
    const ef_analyses *an = &m->analyses;
    if (an->static_given) {
        st = ef_static_run(sys, an->static_loads, an->n_static_loads, r, ctx);
    } else {
        ef_index n = ef_model_n_loads(m);
        ef_index *all = malloc((size_t)EF_MAX(n, 1) * sizeof *all);
        if (!all) { st = EF_ENOMEM; goto done; }
        for (ef_index i = 0; i < n; i++) all[i] = i;
        st = ef_static_run(sys, all, n, r, ctx);
        free(all);
    }
    if (st != EF_OK) goto done;
    /* an analysis that fails for its own reasons (no convergence, a load beyond critical)
     * does not stop the others; the run reports the first such failure at the end */
    ef_status failed = EF_OK;
    if (an->modal) {
        st = ef_modal_run(sys, an->modal_modes, an->modal_above_hz, r, ctx);
        if (st == EF_ENOMEM || st == EF_EINPUT) goto done;
        if (st != EF_OK && failed == EF_OK) failed = st;
    }
    if (an->buckling) {
        st = ef_buckling_run(sys, an->buckling_load, an->buckling_modes, an->buckling_negative,
                             r, ctx);
        if (st == EF_ENOMEM || st == EF_EINPUT) goto done;
        if (st != EF_OK && failed == EF_OK) failed = st;
    }
    for (ef_index i = 0; i < an->n_second_order_loads; i++) {
        st = ef_second_order_run(sys, an->second_order_loads[i], an->so_tolerance,
                                 an->so_max_iterations, an->so_chord_only, r, ctx);
        if (st == EF_ENOMEM || st == EF_EINPUT) goto done;
        if (st != EF_OK && failed == EF_OK) failed = st;
    }
    if (an->walking || an->n_machines > 0) {
        /* enough modes to reach the vibration cut-off (the modal results grow to it) */
        st = ef_vibration_modal_run(sys, an, an->modal_modes, r, ctx);
        if (st == EF_ENOMEM || st == EF_EINPUT) goto done;
        if (st != EF_OK && failed == EF_OK) failed = st;
    }
    if (an->walking && r->modal) {
        st = ef_walking_run(sys, an, r, ctx);
        if (st == EF_ENOMEM || st == EF_EINPUT) goto done;
        if (st != EF_OK && failed == EF_OK) failed = st;
    }
    if (an->n_machines > 0 && r->modal) {
        st = ef_machines_run(sys, m, r, ctx);
        if (st == EF_ENOMEM || st == EF_EINPUT) goto done;
        if (st != EF_OK && failed == EF_OK) failed = st;
    }
    st = failed;
done:
    ef_system_free(&sys, ctx);
    *out = r;
    return st;
}
