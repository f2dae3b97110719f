/* mesh.h: the analysis mesh (private): members split into elements.
 *
 * Invariants: mesh nodes 0..n_model_nodes-1 are the model's nodes in file order;
 * nodes n_model_nodes.. are generated inside subdivided members, member by member, in
 * order from the member's start. Elements of member k are elems[first_elem[k] ..
 * first_elem[k+1]-1], in order from its start; member end releases sit on the outer ends
 * of the first and last element only. Generated nodes never appear in results.
 */
#ifndef EF_MESH_H
#define EF_MESH_H

#include "element.h"
#include "model.h"

typedef struct {
    ef_index member;
    ef_index node[2];       /* mesh nodes at start, end */
    double x0;              /* position of the start along the member [length] */
    double len;             /* [length] */
    unsigned release[2];    /* local DOF masks released at start, end */
} ef_elem;

typedef struct {
    ef_index n_nodes;       /* model + generated */
    ef_index n_model_nodes;
    double *xyz;            /* [n_nodes][3] */
    ef_index *node_member;  /* [n_nodes]: member of a generated node, EF_NONE otherwise */
    ef_elem *elems;
    ef_index n_elems;
    ef_index *first_elem;   /* [n_members + 1] */
    ef_elem_props *props;   /* [n_members]: element properties of each member */
} ef_mesh;

/* Split every member into its `divisions` elements. Caller frees with ef_mesh_free. */
ef_status ef_mesh_build(const ef_model *m, ef_mesh **out, ef_ctx *ctx);
void ef_mesh_free(ef_mesh **mesh);

/* Element properties of a member from its section and material. */
void ef_mesh_member_props(const ef_model *m, ef_index member, ef_elem_props *p);

/* Local stiffness of element e with its releases condensed (k, and T, R of
 * ef_elem_release_map when the element has releases; `released` tells). */
void ef_mesh_elem_k_local(const ef_mesh *mesh, ef_index e, double k[144],
                          double T[144], double R[144], bool *released);

/* Describe a mesh node for a message: "node 'A2'" or "member 'B1' at 0.25 of its length".
 * Writes into buf (n bytes) and returns it. */
const char *ef_mesh_node_text(const ef_mesh *mesh, const ef_model *m, ef_index node,
                              char *buf, size_t n);

#endif /* EF_MESH_H */
