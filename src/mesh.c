/* mesh.c: members into elements, and element properties.
 * Invariants: see mesh.h.
 */
#include "mesh.h"

#include <stdio.h>
#include <stdlib.h>
#include <math.h>
#include <string.h>

void ef_mesh_member_props(const ef_model *m, ef_index member, ef_elem_props *p)
{
    const ef_member *b = &m->members[member];
    const ef_section *s = &m->sections[b->section];
    const ef_material *mat = &m->materials[b->material];
    memset(p, 0, sizeof *p);
    p->E = mat->E;
    p->G = mat->G;
    p->A = s->A;
    p->Ay = s->Ay;
    p->Az = s->Az;
    p->Iy = s->Iy;
    p->Iz = s->Iz;
    p->J = s->J;
    p->Ip = s->Ip;
    p->axial_only = b->axial_only;
    /* structural mass counts unless mass_source.self is false; extra_mass always does */
    bool self = m->mass_source.self || !m->mass_source.given;
    p->mass = (self ? mat->density * s->A : 0.0) + s->extra_mass;   /* [mass/length] */
    p->rot_mass = self ? mat->density * (s->Iy + s->Iz) : 0.0;     /* rho (Iy + Iz) [mass*length] */
    if (b->axial_only) p->rot_mass = 0.0;
}

ef_status ef_mesh_build(const ef_model *m, ef_mesh **out, ef_ctx *ctx)
{
    (void)ctx;
    ef_mesh *mesh = calloc(1, sizeof *mesh);
    if (!mesh) return EF_ENOMEM;
    ef_index n_gen = 0, n_elems = 0;
    for (ef_index k = 0; k < m->n_members; k++) {
        n_elems += m->members[k].divisions;
        n_gen += m->members[k].divisions - 1;
    }
    mesh->n_model_nodes = m->n_nodes;
    mesh->n_nodes = m->n_nodes + n_gen;
    mesh->n_elems = n_elems;
    mesh->xyz = malloc((size_t)mesh->n_nodes * 3 * sizeof *mesh->xyz);
    mesh->node_member = malloc((size_t)mesh->n_nodes * sizeof *mesh->node_member);
    mesh->elems = calloc((size_t)EF_MAX(n_elems, 1), sizeof *mesh->elems);
    mesh->first_elem = malloc((size_t)(m->n_members + 1) * sizeof *mesh->first_elem);
    mesh->props = calloc((size_t)EF_MAX(m->n_members, 1), sizeof *mesh->props);
    if (!mesh->xyz || !mesh->node_member || !mesh->elems || !mesh->first_elem || !mesh->props) {
        ef_mesh_free(&mesh);
        return EF_ENOMEM;
    }
    for (ef_index i = 0; i < m->n_nodes; i++) {
        memcpy(mesh->xyz + 3 * i, m->nodes[i].xyz, 3 * sizeof(double));
        mesh->node_member[i] = EF_NONE;
    }
    ef_index next_node = m->n_nodes, e = 0;
    for (ef_index k = 0; k < m->n_members; k++) {
        const ef_member *b = &m->members[k];
        const double *a = m->nodes[b->node[0]].xyz, *z = m->nodes[b->node[1]].xyz;
        int nd = b->divisions;
        ef_mesh_member_props(m, k, &mesh->props[k]);
        mesh->first_elem[k] = e;
        ef_index prev = b->node[0];
        for (int d = 0; d < nd; d++, e++) {
            ef_elem *el = &mesh->elems[e];
            ef_index next;
            if (d == nd - 1) {
                next = b->node[1];
            } else {
                next = next_node++;
                double t = (double)(d + 1) / nd;
                for (int c = 0; c < 3; c++) mesh->xyz[3 * next + c] = a[c] + t * (z[c] - a[c]);
                mesh->node_member[next] = k;
            }
            el->member = k;
            el->node[0] = prev;
            el->node[1] = next;
            el->x0 = b->length * d / nd;
            el->len = b->length / nd;
            el->release[0] = d == 0 ? b->release[0] : 0;
            el->release[1] = d == nd - 1 ? b->release[1] : 0;
            prev = next;
        }
    }
    mesh->first_elem[m->n_members] = e;
    *out = mesh;
    return EF_OK;
}

void ef_mesh_free(ef_mesh **pmesh)
{
    if (!pmesh || !*pmesh) return;
    ef_mesh *mesh = *pmesh;
    free(mesh->xyz);
    free(mesh->node_member);
    free(mesh->elems);
    free(mesh->first_elem);
    free(mesh->props);
    free(mesh);
    *pmesh = NULL;
}

void ef_mesh_elem_k_local(const ef_mesh *mesh, ef_index e, double k[144], double T[144],
                          double R[144], bool *released)
{
    const ef_elem *el = &mesh->elems[e];
    ef_elem_k_local(&mesh->props[el->member], el->len, k);
    *released = (el->release[0] | el->release[1]) != 0;
    if (*released) {
        double kc[144];
        /* a singular released set is rejected when the model is validated */
        ef_elem_release_map(k, el->release[0], el->release[1], T, R);
        ef_elem_congruence(T, k, kc);
        memcpy(k, kc, sizeof kc);
    }
}

const char *ef_mesh_node_text(const ef_mesh *mesh, const ef_model *m, ef_index node,
                              char *buf, size_t n)
{
    if (node < mesh->n_model_nodes) {
        snprintf(buf, n, "node '%s'", m->nodes[node].name);
    } else {
        ef_index k = mesh->node_member[node];
        const ef_member *b = &m->members[k];
        const double *a = m->nodes[b->node[0]].xyz, *p = mesh->xyz + 3 * node;
        double d = 0.0;
        for (int c = 0; c < 3; c++) d += (p[c] - a[c]) * (p[c] - a[c]);
        snprintf(buf, n, "member '%s' at %.3g of its length (inside the member)", b->name,
                 sqrt(d) / b->length);
    }
    return buf;
}
