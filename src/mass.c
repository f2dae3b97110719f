/* mass.c: the mass matrix. Element mass is consistent (or lumped, mass_source.lumped);
 * mass converted from loads follows model-format.md: only components along gravity,
 * downward, count; distributed loads give distributed mass, point loads point masses,
 * moments nothing; converted mass acts in all three translations with no rotary inertia;
 * the self-weight part of a listed case is not converted again.
 */
#include "mass.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

typedef struct {
    double m, mx[3];          /* total mass and first moments about the origin */
} mass_sum;

static void sum_add(mass_sum *s, double mass, const double x[3])
{
    s->m += mass;
    for (int c = 0; c < 3; c++) s->mx[c] += mass * x[c];
}

/* Point on element e at distance x from its start, global. */
static void elem_point(const ef_system *sys, ef_index e, double x, double p[3])
{
    const ef_elem *el = &sys->mesh->elems[e];
    const double *a = sys->mesh->xyz + 3 * el->node[0], *b = sys->mesh->xyz + 3 * el->node[1];
    for (int c = 0; c < 3; c++) p[c] = a[c] + (b[c] - a[c]) * x / el->len;
}

/* Loads of element e turned into translational mass (mass per length or mass). */
static int elem_load_masses(const ef_system *sys, const ef_loadset *ls, ef_index e,
                            ef_bload *out, int cap, mass_sum *sum)
{
    const ef_model *m = sys->m;
    const ef_member *b = &m->members[sys->mesh->elems[e].member];
    double g = ef_units_g(&m->units);
    ef_bload bl[64];
    int n = ef_loadset_elem_loads(ls, sys->mesh, e, bl, 64), k = 0;
    for (int i = 0; i < n && k < cap; i++) {
        if (bl[i].kind == EF_BLOAD_MOMENT) continue;
        double mu[2];
        for (int end = 0; end < 2; end++) {
            double down = 0.0;          /* component along gravity of the global load */
            for (int c = 0; c < 3; c++) {
                double gc = b->axes[0][c] * bl[i].q[end][0] + b->axes[1][c] * bl[i].q[end][1] +
                            b->axes[2][c] * bl[i].q[end][2];
                down += gc * m->gravity_dir[c];
            }
            mu[end] = fmax(down, 0.0) / g;
        }
        ef_bload *r = &out[k];
        memset(r, 0, sizeof *r);
        r->kind = bl[i].kind;
        r->a = bl[i].a;
        r->b = bl[i].b;
        r->q[0][0] = mu[0];
        r->q[1][0] = bl[i].kind == EF_BLOAD_DIST ? mu[1] : mu[0];
        double p[3], total;
        if (r->kind == EF_BLOAD_DIST) {
            double len = r->b - r->a, m0 = r->q[0][0], m1 = r->q[1][0];
            total = 0.5 * (m0 + m1) * len;
            double xc = total > 0 ? r->a + len * len * (m0 / 2 + (m1 - m0) / 3) / total : r->a;
            elem_point(sys, e, xc, p);
        } else {
            total = mu[0];
            elem_point(sys, e, r->a, p);
        }
        if (total <= 0.0) continue;
        sum_add(sum, total, p);
        k++;
    }
    return k;
}

static void describe(const ef_model *m, ef_mass_info *info)
{
    char *s = info->source;
    size_t n = sizeof info->source;
    bool self = m->mass_source.self || !m->mass_source.given;
    int w = snprintf(s, n, "%s%s mass; section extra_mass; extra node masses",
                     self ? "structural (density) " : "no structural ",
                     info->lumped ? "lumped" : "consistent");
    for (ef_index i = 0; i < m->mass_source.n_cases && w > 0 && (size_t)w < n; i++)
        w += snprintf(s + w, n - (size_t)w, "%s%s x %g", i == 0 ? "; gravity loads / g of " : ", ",
                      m->cases[m->mass_source.cases[i]].name, m->mass_source.factors[i]);
}

ef_status ef_mass_assemble(const ef_system *sys, double *M, ef_mass_info *info, ef_ctx *ctx)
{
    const ef_model *m = sys->m;
    const ef_mesh *mesh = sys->mesh;
    const ef_dofmap *d = sys->dofs;
    bool lumped = m->mass_source.lumped;
    mass_sum sum = {0.0, {0.0, 0.0, 0.0}};
    ef_loadset *ls = NULL;
    ef_status st;
    double t0 = ef_clock();
    memset(M, 0, (size_t)ef_sparse_nnz(sys->asmb->A) * sizeof *M);
    memset(info, 0, sizeof *info);
    info->lumped = lumped;
    if (m->mass_source.n_cases > 0) {
        double *f = calloc((size_t)EF_MAX(m->n_cases, 1), sizeof *f);
        if (!f) return EF_ENOMEM;
        for (ef_index i = 0; i < m->mass_source.n_cases; i++)
            f[m->mass_source.cases[i]] += m->mass_source.factors[i];
        st = ef_loadset_build_factors(m, f, false, &ls, ctx);
        free(f);
        if (st != EF_OK) return st;
    }
    for (ef_index e = 0; e < mesh->n_elems; e++) {
        const ef_elem *el = &mesh->elems[e];
        const ef_elem_props *p = &mesh->props[el->member];
        double me[144], mg[144], mid[3];
        ef_elem_m_local(p, el->len, lumped, me);
        elem_point(sys, e, 0.5 * el->len, mid);
        sum_add(&sum, p->mass * el->len, mid);
        if (ls) {
            ef_bload lm[64];
            int n = elem_load_masses(sys, ls, e, lm, 64, &sum);
            for (int i = 0; i < n; i++) ef_elem_m_add_translational(el->len, &lm[i], lumped, me);
        }
        if (el->release[0] | el->release[1]) {
            double k[144], T[144], R[144], mc[144];
            bool rel;
            ef_mesh_elem_k_local(mesh, e, k, T, R, &rel);
            ef_elem_congruence(T, me, mc);
            memcpy(me, mc, sizeof mc);
        }
        ef_elem_to_global((const double (*)[3])m->members[el->member].axes, me, mg);
        ef_asm_add_elem(sys->asmb, e, mg, M);
    }
    /* node masses: extra masses (gathered per node in one pass: m, Jx, Jy, Jz), and node
     * loads along gravity / g */
    double g = ef_units_g(&m->units);
    double *extra = calloc((size_t)EF_MAX(m->n_nodes, 1) * 4, sizeof *extra);
    if (!extra) {
        ef_loadset_free(&ls);
        return EF_ENOMEM;
    }
    for (ef_index k = 0; k < m->n_masses; k++) {
        double *e = extra + 4 * m->masses[k].node;
        e[0] += m->masses[k].m;
        for (int c = 0; c < 3; c++) e[1 + c] += m->masses[k].J[c];
    }
    for (ef_index i = 0; i < m->n_nodes; i++) {
        double node_m = 0.0, J[3] = {0.0, 0.0, 0.0};
        if (ls) {
            double down = 0.0;
            for (int c = 0; c < 3; c++) down += ls->node_f[6 * i + c] * m->gravity_dir[c];
            node_m += fmax(down, 0.0) / g;
        }
        node_m += extra[4 * i];
        for (int c = 0; c < 3; c++) J[c] += extra[4 * i + 1 + c];
        if (node_m == 0.0 && J[0] == 0.0 && J[1] == 0.0 && J[2] == 0.0) continue;
        sum_add(&sum, node_m, m->nodes[i].xyz);
        for (int c = 0; c < 6; c++) {
            ef_index eq = d->eq_of_dof[6 * i + c];
            if (eq >= 0) M[ef_asm_diag(sys->asmb, eq)] += c < 3 ? node_m : J[c - 3];
        }
    }
    free(extra);
    ef_loadset_free(&ls);
    info->total = sum.m;
    for (int c = 0; c < 3; c++) info->centre[c] = sum.m > 0 ? sum.mx[c] / sum.m : 0.0;
    describe(m, info);
    ef_ctx_time_add(ctx, "assemble mass", ef_clock() - t0, 1);
    return EF_OK;
}
