/* results.c: allocation and release of results. */
#include "results.h"

#include <stdlib.h>
#include <string.h>

ef_status ef_results_create(const ef_model *m, ef_results **out)
{
    ef_results *r = calloc(1, sizeof *r);
    if (!r) return EF_ENOMEM;
    r->model = m;
    r->st_first = malloc((size_t)(m->n_members + 1) * sizeof *r->st_first);
    if (!r->st_first) {
        free(r);
        return EF_ENOMEM;
    }
    r->st_first[0] = 0;
    for (ef_index k = 0; k < m->n_members; k++)
        r->st_first[k + 1] = r->st_first[k] + m->members[k].stations;
    *out = r;
    return EF_OK;
}

ef_status ef_load_result_alloc(const ef_results *r, ef_load_result *lr, bool second_order)
{
    const ef_model *m = r->model;
    memset(lr, 0, sizeof *lr);
    size_t nn = (size_t)EF_MAX(m->n_nodes, 1), nm = (size_t)EF_MAX(m->n_members, 1);
    lr->disp = calloc(nn * 6, sizeof(double));
    lr->react = calloc(nn * 6, sizeof(double));
    lr->end_forces = calloc(nm * 12, sizeof(double));
    lr->stations = calloc((size_t)EF_MAX(r->st_first[m->n_members], 1) * 7, sizeof(double));
    if (second_order) lr->amplification = calloc(nm * 12, sizeof(double));
    if (!lr->disp || !lr->react || !lr->end_forces || !lr->stations ||
        (second_order && !lr->amplification)) {
        ef_load_result_clear(lr);
        return EF_ENOMEM;
    }
    return EF_OK;
}

void ef_load_result_clear(ef_load_result *lr)
{
    free(lr->disp);
    free(lr->react);
    free(lr->end_forces);
    free(lr->stations);
    free(lr->amplification);
    memset(lr, 0, sizeof *lr);
}

void ef_modal_result_free(ef_modal_result **pmr)
{
    if (!pmr || !*pmr) return;
    ef_modal_result *mr = *pmr;
    free(mr->omega2);
    free(mr->freq);
    free(mr->shapes);
    free(mr->participation);
    free(mr->eff_mass);
    free(mr->eff_ratio);
    free(mr->unitmax_mass);
    free(mr->residual);
    free(mr);
    *pmr = NULL;
}

void ef_buckling_result_free(ef_buckling_result **pbr)
{
    if (!pbr || !*pbr) return;
    ef_buckling_result *br = *pbr;
    free(br->factors);
    free(br->neg_factors);
    free(br->shapes);
    free(br->residual);
    free(br->member_share);
    free(br->kind);
    free(br->dominant);
    free(br->axial0);
    free(br);
    *pbr = NULL;
}

void ef_walking_result_free(ef_walking_result **pwr)
{
    if (!pwr || !*pwr) return;
    ef_walking_result *wr = *pwr;
    free(wr->receivers);
    free(wr->R);
    free(wr->response_rms);
    free(wr->method);
    free(wr->pace_hz);
    free(wr->harmonic);
    free(wr->mode);
    free(wr->walker);
    free(wr);
    *pwr = NULL;
}

void ef_machine_result_clear(ef_machine_result *mr)
{
    free(mr->name);
    free(mr->receivers);
    free(mr->hz);
    free(mr->disp);
    free(mr->vel);
    free(mr->acc);
    free(mr->R);
    memset(mr, 0, sizeof *mr);
}

void ef_results_free(ef_results **pr)
{
    if (!pr || !*pr) return;
    ef_results *r = *pr;
    for (ef_index i = 0; i < r->n_statics; i++) ef_load_result_clear(&r->statics[i]);
    for (ef_index i = 0; i < r->n_second; i++) ef_load_result_clear(&r->second[i]);
    free(r->statics);
    free(r->second);
    ef_modal_result_free(&r->modal);
    ef_buckling_result_free(&r->buckling);
    ef_walking_result_free(&r->walking);
    for (ef_index i = 0; i < r->n_machines; i++) ef_machine_result_clear(&r->machines[i]);
    free(r->machines);
    free(r->st_first);
    free(r);
    *pr = NULL;
}
