/* loads.c: load cases and combinations into member and node loads.
 * Invariants: see loads.h. Positions are clipped to [0, L]; records of one member are
 * contiguous.
 */
#include "loads.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

double ef_loads_member_weight(const ef_model *m, ef_index k)
{
    const ef_member *b = &m->members[k];
    const ef_section *s = &m->sections[b->section];
    double g = ef_units_g(&m->units);
    return (m->materials[b->material].density * s->A + s->extra_mass) * g;
}

/* global vector -> member local components */
static void to_local(const double axes[3][3], const double v[3], double out[3])
{
    for (int i = 0; i < 3; i++) out[i] = axes[i][0] * v[0] + axes[i][1] * v[1] + axes[i][2] * v[2];
}

ef_status ef_loadset_build(const ef_model *m, ef_index load, ef_loadset **out, ef_ctx *ctx)
{
    double *f = calloc((size_t)EF_MAX(m->n_cases, 1), sizeof *f);
    if (!f) return EF_ENOMEM;
    ef_model_load_factors(m, load, f);
    ef_status st = ef_loadset_build_factors(m, f, true, out, ctx);
    free(f);
    if (st == EF_OK) (*out)->name = ef_model_load_name(m, load);
    return st;
}

ef_status ef_loadset_build_factors(const ef_model *m, const double *factors, bool self_weight,
                                   ef_loadset **out,
                                   ef_ctx *ctx)
{
    (void)ctx;
    ef_loadset *ls = calloc(1, sizeof *ls);
    if (!ls) return EF_ENOMEM;
    ls->name = "(factored loads)";
    ls->n_members = m->n_members;
    ls->first = calloc((size_t)m->n_members + 1, sizeof *ls->first);
    ls->node_f = calloc((size_t)EF_MAX(m->n_nodes, 1) * 6, sizeof *ls->node_f);
    if (!ls->first || !ls->node_f) goto nomem;
    /* count per member: one self-weight record per case that has it, plus member loads */
    for (ef_index c = 0; c < m->n_cases; c++) {
        const ef_load_case *lc = &m->cases[c];
        if (factors[c] == 0.0) continue;
        if (self_weight && lc->self_weight != 0.0)
            for (ef_index k = 0; k < m->n_members; k++) ls->first[k + 1]++;
        for (ef_index i = 0; i < lc->n_member_loads; i++) ls->first[lc->member_loads[i].member + 1]++;
    }
    for (ef_index k = 0; k < m->n_members; k++) ls->first[k + 1] += ls->first[k];
    ef_index total = ls->first[m->n_members];
    ls->bl = calloc((size_t)EF_MAX(total, 1), sizeof *ls->bl);
    ef_index *next = malloc((size_t)EF_MAX(m->n_members, 1) * sizeof *next);
    if (!ls->bl || !next) {
        free(next);
        goto nomem;
    }
    memcpy(next, ls->first, (size_t)m->n_members * sizeof *next);
    for (ef_index c = 0; c < m->n_cases; c++) {
        const ef_load_case *lc = &m->cases[c];
        double fc = factors[c];
        if (fc == 0.0) continue;
        if (self_weight && lc->self_weight != 0.0) {
            for (ef_index k = 0; k < m->n_members; k++) {
                const ef_member *b = &m->members[k];
                double w = fc * lc->self_weight * ef_loads_member_weight(m, k), q[3], gq[3];
                for (int i = 0; i < 3; i++) gq[i] = w * m->gravity_dir[i];
                to_local((const double (*)[3])b->axes, gq, q);
                ef_bload *r = &ls->bl[next[k]++];
                r->kind = EF_BLOAD_DIST;
                r->a = 0.0;
                r->b = b->length;
                memcpy(r->q[0], q, sizeof q);
                memcpy(r->q[1], q, sizeof q);
            }
        }
        for (ef_index i = 0; i < lc->n_member_loads; i++) {
            const ef_member_load *ml = &lc->member_loads[i];
            const ef_member *b = &m->members[ml->member];
            ef_bload *r = &ls->bl[next[ml->member]++];
            r->kind = ml->kind == EF_MLOAD_POINT    ? EF_BLOAD_POINT
                      : ml->kind == EF_MLOAD_MOMENT ? EF_BLOAD_MOMENT
                                                    : EF_BLOAD_DIST;
            r->a = ml->from * b->length;
            r->b = (r->kind == EF_BLOAD_DIST ? ml->to : ml->from) * b->length;
            for (int e = 0; e < 2; e++) {
                double v[3];
                for (int j = 0; j < 3; j++) v[j] = fc * ml->w[e][j];
                if (ml->local) memcpy(r->q[e], v, sizeof v);
                else to_local((const double (*)[3])b->axes, v, r->q[e]);
            }
        }
        for (ef_index i = 0; i < lc->n_node_loads; i++) {
            const ef_node_load *nl = &lc->node_loads[i];
            for (int j = 0; j < 6; j++) ls->node_f[6 * nl->node + j] += fc * nl->f[j];
        }
    }
    free(next);
    *out = ls;
    return EF_OK;
nomem:
    ef_loadset_free(&ls);
    return EF_ENOMEM;
}

void ef_loadset_free(ef_loadset **pls)
{
    if (!pls || !*pls) return;
    free((*pls)->first);
    free((*pls)->bl);
    free((*pls)->node_f);
    free(*pls);
    *pls = NULL;
}

/* The part of load r that falls on the element [x0, x0 + len), in element positions.
 * A concentrated load belongs to the element whose span holds it (the last element also
 * takes one at the member's end). */
static bool clip_to_elem(const ef_bload *r, double x0, double len, bool last, ef_bload *c)
{
    double x1 = x0 + len;
    *c = *r;
    if (r->kind != EF_BLOAD_DIST) {
        if (!(r->a >= x0 && (r->a < x1 || last))) return false;
        c->a = c->b = fmin(r->a - x0, len);
        return true;
    }
    double a = fmax(r->a, x0), b = fmin(r->b, x1), span = r->b - r->a;
    if (!(b > a)) return false;
    for (int j = 0; j < 3; j++) {
        double slope = span > 0.0 ? (r->q[1][j] - r->q[0][j]) / span : 0.0;
        c->q[0][j] = r->q[0][j] + slope * (a - r->a);
        c->q[1][j] = r->q[0][j] + slope * (b - r->a);
    }
    c->a = a - x0;
    c->b = b - x0;
    return true;
}

int ef_loadset_elem_loads(const ef_loadset *ls, const ef_mesh *mesh, ef_index e,
                          ef_bload *out, int cap)
{
    const ef_elem *el = &mesh->elems[e];
    ef_index k = el->member;
    bool last = e == mesh->first_elem[k + 1] - 1;
    int n = 0;
    for (ef_index i = ls->first[k]; i < ls->first[k + 1] && n < cap; i++)
        if (clip_to_elem(&ls->bl[i], el->x0, el->len, last, &out[n])) n++;
    return n;
}

void ef_loadset_elem_fef(const ef_loadset *ls, const ef_mesh *mesh, ef_index e, double fef[12])
{
    const ef_elem *el = &mesh->elems[e];
    ef_index k = el->member;
    bool last = e == mesh->first_elem[k + 1] - 1;
    memset(fef, 0, 12 * sizeof *fef);
    for (ef_index i = ls->first[k]; i < ls->first[k + 1]; i++) {
        ef_bload c;
        if (clip_to_elem(&ls->bl[i], el->x0, el->len, last, &c))
            ef_elem_fef_add(&mesh->props[k], el->len, &c, fef);
    }
}

void ef_loadset_resultant(const ef_loadset *ls, const ef_model *m, double out[6])
{
    memset(out, 0, 6 * sizeof *out);
    for (ef_index i = 0; i < m->n_nodes; i++) {
        const double *f = ls->node_f + 6 * i, *x = m->nodes[i].xyz;
        for (int j = 0; j < 3; j++) out[j] += f[j];
        out[3] += f[3] + x[1] * f[2] - x[2] * f[1];
        out[4] += f[4] + x[2] * f[0] - x[0] * f[2];
        out[5] += f[5] + x[0] * f[1] - x[1] * f[0];
    }
    for (ef_index k = 0; k < m->n_members; k++) {
        const ef_member *b = &m->members[k];
        const double *x0 = m->nodes[b->node[0]].xyz;
        for (ef_index i = ls->first[k]; i < ls->first[k + 1]; i++) {
            const ef_bload *r = &ls->bl[i];
            double F[3] = {0, 0, 0}, M1[3] = {0, 0, 0}, C[3] = {0, 0, 0};
            /* local resultant F and first moments M1_j = integral of x q_j about the start */
            if (r->kind == EF_BLOAD_DIST) {
                double len = r->b - r->a;
                for (int j = 0; j < 3; j++) {
                    double q0 = r->q[0][j], q1 = r->q[1][j];
                    F[j] = 0.5 * (q0 + q1) * len;
                    M1[j] = r->a * F[j] + len * len * (q0 / 2.0 + (q1 - q0) / 3.0);
                }
            } else if (r->kind == EF_BLOAD_POINT) {
                for (int j = 0; j < 3; j++) {
                    F[j] = r->q[0][j];
                    M1[j] = r->a * F[j];
                }
            } else {
                memcpy(C, r->q[0], sizeof C);
            }
            C[2] += M1[1];                   /* x e_x × F_y e_y = x F_y e_z */
            C[1] -= M1[2];                   /* x e_x × F_z e_z = -x F_z e_y */
            double Fg[3], Cg[3];
            for (int j = 0; j < 3; j++) {
                Fg[j] = b->axes[0][j] * F[0] + b->axes[1][j] * F[1] + b->axes[2][j] * F[2];
                Cg[j] = b->axes[0][j] * C[0] + b->axes[1][j] * C[1] + b->axes[2][j] * C[2];
            }
            for (int j = 0; j < 3; j++) out[j] += Fg[j];
            out[3] += Cg[0] + x0[1] * Fg[2] - x0[2] * Fg[1];   /* M_O = C + x_start × F */
            out[4] += Cg[1] + x0[2] * Fg[0] - x0[0] * Fg[2];
            out[5] += Cg[2] + x0[0] * Fg[1] - x0[1] * Fg[0];
        }
    }
}
