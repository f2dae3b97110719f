/* validate.c: cross-item checks of a model after reading (see validate.h).
 *
 * Works on a possibly partial model (the reader keeps going after errors): a member
 * whose nodes are undefined (EF_NONE) or unreadable (NaN coordinates) gets no geometry
 * check, a load on such a member no torque check. Each check reports every offender.
 */
#include "validate.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* A moment counts as having a component about a member's axis when that component is
 * above this fraction of its size: far above the rounding of the axis itself. */
#define TORQUE_RTOL 1e-9

static bool node_ok(const ef_model *m, ef_index n)
{
    if (n < 0 || n >= m->n_nodes) return false;
    const double *x = m->nodes[n].xyz;
    return isfinite(x[0]) && isfinite(x[1]) && isfinite(x[2]);
}

static bool member_geometry_ok(const ef_model *m, const ef_member *b)
{
    return node_ok(m, b->node[0]) && node_ok(m, b->node[1]) && b->node[0] != b->node[1];
}

/* Lengths and local axes; zero-length members and `up` parallel to the axis. */
static void check_axes(ef_model *m, bool *axes_ok, ef_ctx *ctx)
{
    double scale = ef_model_size(m);
    for (ef_index k = 0; k < m->n_members; k++) {
        ef_member *b = &m->members[k];
        axes_ok[k] = false;
        if (!member_geometry_ok(m, b)) continue;
        const double *a = m->nodes[b->node[0]].xyz, *c = m->nodes[b->node[1]].xyz;
        double d[3] = {c[0] - a[0], c[1] - a[1], c[2] - a[2]};
        double L = sqrt(d[0] * d[0] + d[1] * d[1] + d[2] * d[2]);
        if (!(L > EF_ZERO_LENGTH_RTOL * scale)) {
            ef_diag_error(ctx, &b->where, "member '%s': zero length (nodes '%s' and '%s' are at "
                          "the same place)", b->name, m->nodes[b->node[0]].name,
                          m->nodes[b->node[1]].name);
            continue;
        }
        if (!b->has_up) {
            double x[3] = {d[0] / L, d[1] / L, d[2] / L};
            ef_model_default_up(x, m->gravity_dir, b->up);
        }
        if (!ef_model_member_axes(a, c, b->up, b->roll, scale, b->axes, &b->length)) {
            ef_diag_error(ctx, b->up_where.line ? &b->up_where : &b->where,
                          "member '%s': 'up' is parallel to the member (local z is undefined)",
                          b->name);
            continue;
        }
        axes_ok[k] = true;
    }
}

static void list_dofs(unsigned mask, char *buf, size_t n)
{
    size_t used = 0;
    buf[0] = '\0';
    for (int d = 0; d < 6; d++)
        if (mask & (1u << d))
            used += (size_t)snprintf(buf + used, n - used, "%s%s", used ? ", " : "",
                                     ef_dof_names[d]);
}

/* Bending in one local plane: the member's rigid motions there are a translation v and a
 * rotation θ; its ends hold v(0) (t0), θ (r0), v(0) + θL (t1), θ (r1). They fix both
 * motions unless the translation is free at both ends, or three of the four are free. */
static void check_plane(const ef_member *b, unsigned t, unsigned rot, const char *axis,
                        const char *plane, const ef_where *w, ef_ctx *ctx)
{
    unsigned s = b->release[0] & (t | rot), e = b->release[1] & (t | rot);
    int n_free = ((s & t) != 0) + ((s & rot) != 0) + ((e & t) != 0) + ((e & rot) != 0);
    if ((s & t) && (e & t)) {
        ef_diag_error(ctx, w, "member '%s': %s released at both ends lets the member move "
                      "freely along its local %s axis", b->name, ef_dof_names[t == EF_UY ? 1 : 2],
                      axis);
    } else if (n_free >= 3) {
        char sa[40], ea[40];
        list_dofs(s, sa, sizeof sa);
        list_dofs(e, ea, sizeof ea);
        ef_diag_error(ctx, w, "member '%s': releases of %s at the start and %s at the end let "
                      "the member swing in its local %s plane", b->name, sa, ea, plane);
    }
}

static void check_releases(ef_model *m, ef_ctx *ctx)
{
    for (ef_index k = 0; k < m->n_members; k++) {
        ef_member *b = &m->members[k];
        const ef_where *w = b->release_where.line ? &b->release_where : &b->where;
        unsigned both = b->release[0] & b->release[1];
        if (b->axial_only) {
            unsigned bad = (b->release[0] | b->release[1]) & (EF_UX | EF_UY | EF_UZ);
            if (bad) {
                char list[40];
                list_dofs(bad, list, sizeof list);
                ef_diag_error(ctx, w, "member '%s': an axial_only member cannot release %s "
                              "(its ends carry its axial force and its load shares)", b->name,
                              list);
            }
            b->release[0] = b->release[1] = 0;   /* rx, ry, rz: already free */
            continue;
        }
        if (both & EF_UX)
            ef_diag_error(ctx, w, "member '%s': ux released at both ends lets the member slide "
                          "along its own axis", b->name);
        if (both & EF_RX)
            ef_diag_error(ctx, w, "member '%s': rx released at both ends lets the member spin "
                          "about its own axis", b->name);
        check_plane(b, EF_UY, EF_RZ, "y", "x-y", w, ctx);
        check_plane(b, EF_UZ, EF_RY, "z", "x-z", w, ctx);
    }
}

/* A concentrated moment about the axis of an axial_only member has nothing to resist it. */
static void check_axial_only_loads(const ef_model *m, const bool *axes_ok, ef_ctx *ctx)
{
    for (ef_index c = 0; c < m->n_cases; c++) {
        const ef_load_case *lc = &m->cases[c];
        for (ef_index i = 0; i < lc->n_member_loads; i++) {
            const ef_member_load *ml = &lc->member_loads[i];
            if (ml->kind != EF_MLOAD_MOMENT || ml->member < 0 || ml->member >= m->n_members)
                continue;
            const ef_member *b = &m->members[ml->member];
            if (!b->axial_only) continue;
            const double *v = ml->w[0];
            double size = sqrt(v[0] * v[0] + v[1] * v[1] + v[2] * v[2]), torque;
            if (ml->local)
                torque = v[0];
            else if (axes_ok[ml->member])
                torque = v[0] * b->axes[0][0] + v[1] * b->axes[0][1] + v[2] * b->axes[0][2];
            else
                continue;
            if (fabs(torque) > TORQUE_RTOL * size)
                ef_diag_error(ctx, &ml->where, "load case '%s': member '%s': a torque (a moment "
                              "about the member axis) cannot act on an axial_only member",
                              lc->name, b->name);
        }
    }
}

/* Report each combination that reaches itself, with the chain, at the term starting it.
 * Breadth-first search over combinations from each term; parent[] rebuilds the path. */
static ef_status report_cycles(const ef_model *m, ef_ctx *ctx)
{
    ef_index nc = m->n_combos, ncase = m->n_cases;
    ef_index *parent = malloc((size_t)nc * sizeof *parent);
    ef_index *queue = malloc((size_t)nc * sizeof *queue);
    if (!parent || !queue) {
        free(parent);
        free(queue);
        return EF_ENOMEM;
    }
    for (ef_index c = 0; c < nc; c++) {
        const ef_combination *cb = &m->combos[c];
        bool found = false;
        for (ef_index t = 0; t < cb->n_terms && !found; t++) {
            ef_index d = cb->terms[t].load - ncase;
            if (d < 0) continue;
            if (d == c) {
                ef_diag_error(ctx, &cb->terms[t].where, "combination '%s' refers to itself",
                              cb->name);
                found = true;
                break;
            }
            for (ef_index i = 0; i < nc; i++) parent[i] = -2;   /* -2: not reached */
            ef_index head = 0, tail = 0;
            queue[tail++] = d;
            parent[d] = -1;
            while (head < tail && !found) {
                ef_index v = queue[head++];
                const ef_combination *cv = &m->combos[v];
                for (ef_index u = 0; u < cv->n_terms; u++) {
                    ef_index x = cv->terms[u].load - ncase;
                    if (x < 0 || parent[x] != -2) continue;
                    parent[x] = v;
                    if (x == c) {
                        found = true;
                        break;
                    }
                    queue[tail++] = x;
                }
            }
            if (!found) continue;
            /* path d -> ... -> c: walk back from c */
            char chain[600] = "";
            ef_index hops[64], n_hops = 0;
            for (ef_index v = parent[c]; v >= 0 && n_hops < 64; v = parent[v]) hops[n_hops++] = v;
            size_t used = 0;
            for (ef_index h = n_hops - 1; h >= 0 && used < sizeof chain; h--)
                used += (size_t)snprintf(chain + used, sizeof chain - used, "%s'%s'",
                                         h == n_hops - 1 ? "" : ", ", m->combos[hops[h]].name);
            ef_diag_error(ctx, &cb->terms[t].where, "combination '%s' refers to itself through "
                          "%s", cb->name, chain);
        }
    }
    free(parent);
    free(queue);
    return EF_OK;
}

/* Expand every combination onto the cases in dependency order (iterative depth-first
 * post-order: a combination's row is summed once all its combination terms have rows).
 * Terms that close a cycle are skipped here; report_cycles names them. */
static ef_status expand_combinations(ef_model *m, ef_ctx *ctx)
{
    ef_index nc = m->n_combos, ncase = m->n_cases;
    if (nc == 0) return EF_OK;
    ef_status st = EF_OK;
    bool cyclic = false;
    unsigned char *state = calloc((size_t)nc, 1);   /* 0 new, 1 on the stack, 2 done */
    ef_index *stack = malloc((size_t)nc * sizeof *stack);
    ef_index *next = calloc((size_t)nc, sizeof *next);   /* next term to visit */
    double *rows = ncase > 0 ? calloc((size_t)(nc * ncase), sizeof *rows) : NULL;
    if (!state || !stack || !next || (ncase > 0 && !rows)) {
        st = EF_ENOMEM;
        goto done;
    }
    for (ef_index root = 0; root < nc; root++) {
        if (state[root]) continue;
        ef_index top = 0;
        stack[top++] = root;
        state[root] = 1;
        while (top > 0) {
            ef_index v = stack[top - 1];
            const ef_combination *cv = &m->combos[v];
            if (next[v] < cv->n_terms) {
                ef_index d = cv->terms[next[v]++].load - ncase;
                if (d < 0) continue;
                if (state[d] == 1) cyclic = true;
                if (state[d] == 0) {
                    state[d] = 1;
                    stack[top++] = d;
                }
                continue;
            }
            double *row = rows ? rows + v * ncase : NULL;
            for (ef_index u = 0; row && u < cv->n_terms; u++) {
                ef_index l = cv->terms[u].load;
                double f = cv->terms[u].factor;
                if (l < ncase) {
                    row[l] += f;
                } else if (state[l - ncase] == 2) {
                    const double *sub = rows + (l - ncase) * ncase;
                    for (ef_index k = 0; k < ncase; k++) row[k] += f * sub[k];
                }
            }
            state[v] = 2;
            top--;
        }
    }
    if (cyclic) st = report_cycles(m, ctx);
    free(m->case_factors);
    m->case_factors = rows;
    rows = NULL;
done:
    free(state);
    free(stack);
    free(next);
    free(rows);
    return st;
}

/* Items whose name is defined twice are reported as such by the reader; only the first
 * definition (the one lookups find) gets the warnings below. */
static void warn_unused(const ef_model *m, ef_ctx *ctx)
{
    for (ef_index i = 0; i < m->n_materials; i++)
        if (!m->materials[i].used && ef_model_find_material(m, m->materials[i].name) == i)
            ef_diag_warning(ctx, &m->materials[i].where, "material '%s' is not used by any member",
                            m->materials[i].name);
    for (ef_index i = 0; i < m->n_sections; i++)
        if (!m->sections[i].used && ef_model_find_section(m, m->sections[i].name) == i)
            ef_diag_warning(ctx, &m->sections[i].where, "section '%s' is not used by any member",
                            m->sections[i].name);
}

static ef_status warn_lonely_nodes(const ef_model *m, ef_ctx *ctx)
{
    if (m->n_nodes == 0) return EF_OK;
    bool *attached = calloc((size_t)m->n_nodes, sizeof *attached);
    if (!attached) return EF_ENOMEM;
    for (ef_index k = 0; k < m->n_members; k++)
        for (int e = 0; e < 2; e++)
            if (m->members[k].node[e] >= 0) attached[m->members[k].node[e]] = true;
    for (ef_index i = 0; i < m->n_nodes; i++)
        if (!attached[i] && ef_model_find_node(m, m->nodes[i].name) == i)
            ef_diag_warning(ctx, &m->nodes[i].where, "node '%s' is attached to no member",
                            m->nodes[i].name);
    free(attached);
    return EF_OK;
}

ef_status ef_model_validate(ef_model *m, ef_ctx *ctx)
{
    ef_index errors_before = ctx->n_errors;
    ef_status st = EF_OK;
    bool *axes_ok = m->n_members ? calloc((size_t)m->n_members, sizeof *axes_ok) : NULL;
    if (m->n_members && !axes_ok) return EF_ENOMEM;
    check_axes(m, axes_ok, ctx);
    check_releases(m, ctx);
    check_axial_only_loads(m, axes_ok, ctx);
    free(axes_ok);
    if ((st = expand_combinations(m, ctx)) != EF_OK) return st;
    warn_unused(m, ctx);
    if ((st = warn_lonely_nodes(m, ctx)) != EF_OK) return st;
    return ctx->n_errors > errors_before ? EF_EINPUT : EF_OK;
}
