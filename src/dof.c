/* dof.c: equation numbering. Invariants: see dof.h. */
#include "dof.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* A rotational diagonal stiffness below this fraction of the largest one is "none":
 * exact zeros arise from axial-only members and released ends; the ratio only guards
 * against rounding in the axis rotation. */
#define EF_ROT_STIFF_RTOL 1e-13

ef_status ef_dofmap_build(const ef_model *m, const ef_mesh *mesh, ef_dofmap **out, ef_ctx *ctx)
{
    ef_dofmap *d = calloc(1, sizeof *d);
    if (!d) return EF_ENOMEM;
    ef_index n_dof = 6 * mesh->n_nodes;
    d->n_dof = n_dof;
    d->eq_of_dof = malloc((size_t)n_dof * sizeof *d->eq_of_dof);
    double *diag = calloc((size_t)n_dof, sizeof *diag);
    char *attached = calloc((size_t)mesh->n_nodes, 1);
    if (!d->eq_of_dof || !diag || !attached) {
        free(diag);
        free(attached);
        ef_dofmap_free(&d);
        return EF_ENOMEM;
    }
    /* diagonal of the assembled stiffness, to find rotations that nothing resists */
    for (ef_index e = 0; e < mesh->n_elems; e++) {
        const ef_elem *el = &mesh->elems[e];
        double k[144], T[144], R[144], kg[144];
        bool rel;
        ef_mesh_elem_k_local(mesh, e, k, T, R, &rel);
        ef_elem_to_global((const double (*)[3])m->members[el->member].axes, k, kg);
        for (int a = 0; a < 12; a++) diag[6 * el->node[a / 6] + a % 6] += fabs(kg[13 * a]);
        attached[el->node[0]] = attached[el->node[1]] = 1;
    }
    for (ef_index i = 0; i < m->n_supports; i++)
        for (int c = 0; c < 6; c++) diag[6 * m->supports[i].node + c] += m->supports[i].spring[c];
    double rot_max = 0.0;
    for (ef_index i = 0; i < mesh->n_nodes; i++)
        for (int c = 3; c < 6; c++) rot_max = fmax(rot_max, diag[6 * i + c]);
    for (ef_index i = 0; i < n_dof; i++) d->eq_of_dof[i] = 0;
    for (ef_index i = 0; i < mesh->n_nodes; i++)
        for (int c = 0; c < 6; c++)
            if (m->restrain_all & (1u << c)) d->eq_of_dof[6 * i + c] = EF_DOF_HELD;
    for (ef_index i = 0; i < m->n_supports; i++)
        for (int c = 0; c < 6; c++)
            if (m->supports[i].held & (1u << c)) d->eq_of_dof[6 * m->supports[i].node + c] = EF_DOF_HELD;
    for (ef_index i = 0; i < mesh->n_nodes; i++) {
        if (!attached[i]) {
            for (int c = 0; c < 6; c++) d->eq_of_dof[6 * i + c] = EF_DOF_IDLE;
            continue;
        }
        for (int c = 3; c < 6; c++) {
            ef_index dof = 6 * i + c;
            if (d->eq_of_dof[dof] == 0 && diag[dof] <= EF_ROT_STIFF_RTOL * rot_max) {
                d->eq_of_dof[dof] = EF_DOF_DROPPED;
                d->n_dropped++;
            }
        }
    }
    ef_index n_eq = 0;
    for (ef_index i = 0; i < n_dof; i++)
        if (d->eq_of_dof[i] == 0) d->eq_of_dof[i] = n_eq++;
    d->n_eq = n_eq;
    d->dof_of_eq = malloc((size_t)EF_MAX(n_eq, 1) * sizeof *d->dof_of_eq);
    free(diag);
    free(attached);
    if (!d->dof_of_eq) {
        ef_dofmap_free(&d);
        return EF_ENOMEM;
    }
    for (ef_index i = 0; i < n_dof; i++)
        if (d->eq_of_dof[i] >= 0) d->dof_of_eq[d->eq_of_dof[i]] = i;
    if (d->n_dropped > 0) {
        ef_index shown = 0;
        for (ef_index i = 0; i < m->n_nodes && shown < 5; i++) {
            unsigned mask = 0;
            for (int c = 3; c < 6; c++)
                if (d->eq_of_dof[6 * i + c] == EF_DOF_DROPPED) mask |= 1u << c;
            if (!mask) continue;
            ef_diag_note(ctx, &m->nodes[i].where,
                         "node '%s': no member resists its rotation%s%s%s%s; dropped from the system",
                         m->nodes[i].name, (mask & EF_RX) ? " rx" : "", (mask & EF_RY) ? " ry" : "",
                         (mask & EF_RZ) ? " rz" : "", "");
            shown++;
        }
        if (d->n_dropped > 0 && shown == 5)
            ef_diag_note(ctx, NULL, "%lld rotations in all were dropped (no member resists them)",
                         (long long)d->n_dropped);
    }
    *out = d;
    return EF_OK;
}

void ef_dofmap_free(ef_dofmap **pd)
{
    if (!pd || !*pd) return;
    free((*pd)->eq_of_dof);
    free((*pd)->dof_of_eq);
    free(*pd);
    *pd = NULL;
}

void ef_dofmap_elem(const ef_dofmap *d, const ef_mesh *mesh, ef_index e, ef_index eq[12])
{
    const ef_elem *el = &mesh->elems[e];
    for (int a = 0; a < 12; a++) eq[a] = d->eq_of_dof[6 * el->node[a / 6] + a % 6];
}

const char *ef_dofmap_eq_text(const ef_dofmap *d, const ef_mesh *mesh, const ef_model *m,
                              ef_index eq, char *buf, size_t n)
{
    static const char *const what[6] = {"translation ux", "translation uy", "translation uz",
                                        "rotation rx", "rotation ry", "rotation rz"};
    char place[256];
    ef_index dof = d->dof_of_eq[eq];
    ef_mesh_node_text(mesh, m, dof / 6, place, sizeof place);
    snprintf(buf, n, "%s, %s", place, what[dof % 6]);
    return buf;
}
