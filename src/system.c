/* system.c: the discrete system shared by every analysis.
 *
 * Element matrices are formed on demand from the pure kernels (element.c): nothing but
 * the sparse values is stored per element. Releases are condensed per element
 * (u_full = T u + R f_fixed); T comes from the elastic k, except in the second-order
 * tangent, where the whole k + k_G is condensed so that released ends stay force-free.
 */
#include "system.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* A pivot below this fraction of its own diagonal entry marks an equation that the
 * structure does not really hold (a mechanism that rounding kept from breaking down).
 * Sound frames stay above ~1e-8 even with stiffness ratios of 1e6 between members. */
#define EF_MECHANISM_PIVOT_RTOL 1e-11

static const double (*axes_of(const ef_system *sys, ef_index e))[3]
{
    return (const double (*)[3])sys->m->members[sys->mesh->elems[e].member].axes;
}

void ef_system_elem_k(const ef_system *sys, ef_index e, double ke[144])
{
    double k[144], T[144], R[144];
    bool rel;
    ef_mesh_elem_k_local(sys->mesh, e, k, T, R, &rel);
    ef_elem_to_global(axes_of(sys, e), k, ke);
}

static ef_status check_releases(const ef_system *sys, ef_ctx *ctx)
{
    ef_status st = EF_OK;
    const ef_model *m = sys->m;
    for (ef_index e = 0; e < sys->mesh->n_elems; e++) {
        const ef_elem *el = &sys->mesh->elems[e];
        if (!(el->release[0] | el->release[1])) continue;
        double k[144], T[144], R[144];
        ef_elem_k_local(&sys->mesh->props[el->member], el->len, k);
        if (!ef_elem_release_map(k, el->release[0], el->release[1], T, R)) {
            const ef_member *b = &m->members[el->member];
            ef_diag_error(ctx, &b->where,
                          "member '%s': its end releases leave it free to move on its own "
                          "(a mechanism inside the member); release fewer DOFs", b->name);
            st = EF_EINPUT;
        }
    }
    return st;
}

ef_status ef_system_create(const ef_model *m, ef_system **out, ef_ctx *ctx)
{
    ef_status st;
    ef_system *sys = calloc(1, sizeof *sys);
    if (!sys) return EF_ENOMEM;
    sys->m = m;
    double t0 = ef_clock();
    if ((st = ef_mesh_build(m, &sys->mesh, ctx)) != EF_OK) goto fail;
    if ((st = check_releases(sys, ctx)) != EF_OK) goto fail;
    if ((st = ef_dofmap_build(m, sys->mesh, &sys->dofs, ctx)) != EF_OK) goto fail;
    ef_ctx_time_add(ctx, "mesh", ef_clock() - t0, 1);
    t0 = ef_clock();
    if ((st = ef_asm_create(sys->mesh, sys->dofs, &sys->asmb, ctx)) != EF_OK) goto fail;
    ef_index nnz = ef_sparse_nnz(sys->asmb->A);
    st = EF_ENOMEM;
    sys->K = calloc((size_t)EF_MAX(nnz, 1), sizeof *sys->K);
    if (!sys->K) goto fail;
    for (ef_index e = 0; e < sys->mesh->n_elems; e++) {
        double ke[144];
        ef_system_elem_k(sys, e, ke);
        ef_asm_add_elem(sys->asmb, e, ke, sys->K);
    }
    for (ef_index i = 0; i < m->n_supports; i++)
        for (int c = 0; c < 6; c++) {
            ef_index eq = sys->dofs->eq_of_dof[6 * m->supports[i].node + c];
            if (eq >= 0) sys->K[ef_asm_diag(sys->asmb, eq)] += m->supports[i].spring[c];
        }
    ef_ctx_time_add(ctx, "assemble", ef_clock() - t0, 1);
    if (sys->dofs->n_eq == 0) {
        ef_diag_error(ctx, NULL, "the model has no free degree of freedom to analyse");
        st = EF_EINPUT;
        goto fail;
    }
    if ((st = ef_chol_analyze(sys->asmb->A, &sys->L, ctx)) != EF_OK) goto fail;
    ctx->info_n_eq = sys->dofs->n_eq;
    ctx->info_nnz_k = ef_sparse_nnz(sys->asmb->A);
    ctx->info_nnz_l = ef_chol_factor_nnz(sys->L);
    ctx->info_ordering = ef_chol_ordering(sys->L);
    *out = sys;
    return EF_OK;
fail:
    ef_system_free(&sys, ctx);
    return st;
}

void ef_system_free(ef_system **psys, ef_ctx *ctx)
{
    if (!psys || !*psys) return;
    ef_system *sys = *psys;
    ef_factor_free(&sys->L, ctx);
    free(sys->K);
    ef_asm_free(&sys->asmb, ctx);
    ef_dofmap_free(&sys->dofs);
    ef_mesh_free(&sys->mesh);
    free(sys);
    *psys = NULL;
}

ef_status ef_system_factorize(ef_system *sys, const double *values, const char *what, ef_ctx *ctx)
{
    ef_index bad = EF_NONE, n = sys->dofs->n_eq;
    char place[320];
    sys->L_holds_K = false;
    ef_status st = ef_chol_factorize(sys->asmb->A, values, sys->L, &bad, ctx);
    if (st == EF_EUNSTABLE) {
        if (bad >= 0)
            ef_diag_error(ctx, NULL,
                          "the %s matrix is not positive definite: the structure cannot hold "
                          "%s (a mechanism, or a load beyond critical); add a support, a "
                          "member or a restraint there, or check the releases",
                          what, ef_dofmap_eq_text(sys->dofs, sys->mesh, sys->m, bad, place,
                                                  sizeof place));
        else
            ef_diag_error(ctx, NULL, "the %s matrix is not positive definite", what);
        return st;
    }
    if (st != EF_OK) return st;
    double *diag = malloc((size_t)n * sizeof *diag);
    if (!diag) return EF_ENOMEM;
    for (ef_index i = 0; i < n; i++) diag[i] = values[ef_asm_diag(sys->asmb, i)];
    double ratio;
    ef_index eq;
    ef_chol_weakest_pivot(sys->L, diag, &ratio, &eq);
    free(diag);
    if (eq >= 0 && ratio < EF_MECHANISM_PIVOT_RTOL) {
        ef_diag_error(ctx, NULL,
                      "the %s matrix is singular: nothing holds %s (pivot %.2g of its "
                      "diagonal; a mechanism); add a support, a member or a restraint there, "
                      "or check the releases",
                      what, ef_dofmap_eq_text(sys->dofs, sys->mesh, sys->m, eq, place,
                                              sizeof place), ratio);
        return EF_EUNSTABLE;
    }
    return EF_OK;
}

ef_status ef_system_factor_k(ef_system *sys, ef_ctx *ctx)
{
    if (sys->L_holds_K) return EF_OK;
    ef_status st = ef_system_factorize(sys, sys->K, "stiffness", ctx);
    sys->L_holds_K = st == EF_OK;
    return st;
}

/* Fixed-end forces of element e with its releases condensed, and T, R. */
static bool elem_fef(const ef_system *sys, const ef_loadset *ls, ef_index e, double fef[12])
{
    const ef_elem *el = &sys->mesh->elems[e];
    if (ls->first[el->member + 1] == ls->first[el->member]) {
        memset(fef, 0, 12 * sizeof *fef);
        return false;
    }
    ef_loadset_elem_fef(ls, sys->mesh, e, fef);
    return true;
}

static void matvec12(const double *a, const double *x, double *y)
{
    for (int i = 0; i < 12; i++) {
        double s = 0.0;
        for (int j = 0; j < 12; j++) s += a[12 * i + j] * x[j];
        y[i] = s;
    }
}

static void matTvec12(const double *a, const double *x, double *y)
{
    for (int i = 0; i < 12; i++) {
        double s = 0.0;
        for (int j = 0; j < 12; j++) s += a[12 * j + i] * x[j];
        y[i] = s;
    }
}

ef_status ef_system_load_vector(const ef_system *sys, const ef_loadset *ls, double *F, ef_ctx *ctx)
{
    const ef_model *m = sys->m;
    const ef_dofmap *d = sys->dofs;
    ef_status st = EF_OK;
    memset(F, 0, (size_t)d->n_eq * sizeof *F);
    for (ef_index i = 0; i < m->n_nodes; i++)
        for (int c = 0; c < 6; c++) {
            double f = ls->node_f[6 * i + c];
            if (f == 0.0) continue;
            ef_index eq = d->eq_of_dof[6 * i + c];
            if (eq >= 0) {
                F[eq] += f;
            } else if (eq == EF_DOF_DROPPED || eq == EF_DOF_IDLE) {
                ef_diag_error(ctx, &m->nodes[i].where,
                              "load '%s': node '%s' gets %s %s, but %s", ls->name,
                              m->nodes[i].name, c < 3 ? "a force" : "a moment",
                              ef_dof_names[c],
                              eq == EF_DOF_IDLE ? "no member is attached to the node"
                                                : "no member resists that rotation");
                st = EF_EINPUT;
            }
        }
    for (ef_index e = 0; e < sys->mesh->n_elems; e++) {
        double fef[12], fc[12], fg[12];
        if (!elem_fef(sys, ls, e, fef)) continue;
        const ef_elem *el = &sys->mesh->elems[e];
        if (el->release[0] | el->release[1]) {
            double k[144], T[144], R[144];
            bool rel;
            ef_mesh_elem_k_local(sys->mesh, e, k, T, R, &rel);
            matTvec12(T, fef, fc);                 /* f_c = T^T f_fixed */
        } else {
            memcpy(fc, fef, sizeof fc);
        }
        ef_elem_vec_to_global(axes_of(sys, e), fc, fg);
        for (int a = 0; a < 12; a++) {
            ef_index eq = d->eq_of_dof[6 * el->node[a / 6] + a % 6];
            if (eq >= 0) F[eq] -= fg[a];           /* equivalent nodal load = -f_fixed */
        }
    }
    return st;
}

/* Element end displacements in local axes from the equation vector. */
static void elem_disp_local(const ef_system *sys, ef_index e, const double *u, double dl[12])
{
    double dg[12];
    const ef_elem *el = &sys->mesh->elems[e];
    for (int a = 0; a < 12; a++) {
        ef_index eq = sys->dofs->eq_of_dof[6 * el->node[a / 6] + a % 6];
        dg[a] = eq >= 0 ? u[eq] : 0.0;
    }
    ef_elem_vec_to_local(axes_of(sys, e), dg, dl);
}

void ef_system_elem_forces(const ef_system *sys, const ef_loadset *ls, const double *u,
                           const double *f_prev, bool chord_only, double *f_elem)
{
    for (ef_index e = 0; e < sys->mesh->n_elems; e++) {
        const ef_elem *el = &sys->mesh->elems[e];
        const ef_elem_props *p = &sys->mesh->props[el->member];
        double k[144], d[12], fef[12], full[12], tmp[12];
        ef_elem_k_local(p, el->len, k);
        if (f_prev) {
            double kg[144];
            ef_elem_kg_local(p, el->len, f_prev + 12 * e, chord_only, kg);
            for (int i = 0; i < 144; i++) k[i] += kg[i];
        }
        elem_disp_local(sys, e, u, d);
        if (ls) elem_fef(sys, ls, e, fef);
        else memset(fef, 0, sizeof fef);
        if (el->release[0] | el->release[1]) {
            double T[144], R[144];
            ef_elem_release_map(k, el->release[0], el->release[1], T, R);
            matvec12(T, d, full);
            matvec12(R, fef, tmp);
            for (int a = 0; a < 12; a++) full[a] += tmp[a];   /* u_full = T u + R f_fixed */
        } else {
            memcpy(full, d, sizeof full);
        }
        matvec12(k, full, f_elem + 12 * e);
        for (int a = 0; a < 12; a++) f_elem[12 * e + a] += fef[a];
    }
}

void ef_system_kg(const ef_system *sys, const double *f_elem, bool chord_only, double *KG)
{
    memset(KG, 0, (size_t)ef_sparse_nnz(sys->asmb->A) * sizeof *KG);
    for (ef_index e = 0; e < sys->mesh->n_elems; e++) {
        const ef_elem *el = &sys->mesh->elems[e];
        double kg[144], kgc[144], out[144];
        ef_elem_kg_local(&sys->mesh->props[el->member], el->len, f_elem + 12 * e, chord_only, kg);
        if (el->release[0] | el->release[1]) {
            double k[144], T[144], R[144];
            bool rel;
            ef_mesh_elem_k_local(sys->mesh, e, k, T, R, &rel);
            ef_elem_congruence(T, kg, kgc);
            memcpy(kg, kgc, sizeof kg);
        }
        ef_elem_to_global(axes_of(sys, e), kg, out);
        ef_asm_add_elem(sys->asmb, e, out, KG);
    }
}

ef_status ef_system_tangent(const ef_system *sys, const ef_loadset *ls, const double *f_prev,
                            bool chord_only, double *KT, double *F, ef_ctx *ctx)
{
    const ef_model *m = sys->m;
    ef_status st = ef_system_load_vector(sys, ls, F, ctx);    /* node loads, checks */
    if (st != EF_OK) return st;
    memset(KT, 0, (size_t)ef_sparse_nnz(sys->asmb->A) * sizeof *KT);
    for (ef_index e = 0; e < sys->mesh->n_elems; e++) {
        const ef_elem *el = &sys->mesh->elems[e];
        const ef_elem_props *p = &sys->mesh->props[el->member];
        double k[144], kg[144], out[144];
        ef_elem_k_local(p, el->len, k);
        ef_elem_kg_local(p, el->len, f_prev + 12 * e, chord_only, kg);
        for (int i = 0; i < 144; i++) k[i] += kg[i];
        if (el->release[0] | el->release[1]) {
            double T[144], R[144], kc[144], fef[12], f1[12], f2[12], fg1[12], fg2[12];
            if (!ef_elem_release_map(k, el->release[0], el->release[1], T, R)) {
                ef_diag_error(ctx, &m->members[el->member].where,
                              "member '%s': under its axial force the released element has no "
                              "stiffness left (local buckling of a released member)",
                              m->members[el->member].name);
                return EF_EUNSTABLE;
            }
            ef_elem_congruence(T, k, kc);
            memcpy(k, kc, sizeof kc);
            /* replace the first-order condensation of the fixed-end forces with this one */
            if (elem_fef(sys, ls, e, fef)) {
                double k0[144], T0[144], R0[144];
                bool rel;
                ef_mesh_elem_k_local(sys->mesh, e, k0, T0, R0, &rel);
                matTvec12(T0, fef, f1);
                matTvec12(T, fef, f2);
                ef_elem_vec_to_global(axes_of(sys, e), f1, fg1);
                ef_elem_vec_to_global(axes_of(sys, e), f2, fg2);
                for (int a = 0; a < 12; a++) {
                    ef_index eq = sys->dofs->eq_of_dof[6 * el->node[a / 6] + a % 6];
                    if (eq >= 0) F[eq] += fg1[a] - fg2[a];
                }
            }
        }
        ef_elem_to_global(axes_of(sys, e), k, out);
        ef_asm_add_elem(sys->asmb, e, out, KT);
    }
    for (ef_index i = 0; i < m->n_supports; i++)
        for (int c = 0; c < 6; c++) {
            ef_index eq = sys->dofs->eq_of_dof[6 * m->supports[i].node + c];
            if (eq >= 0) KT[ef_asm_diag(sys->asmb, eq)] += m->supports[i].spring[c];
        }
    return EF_OK;
}

/* Forces the element exerts on its nodes, global, accumulated per mesh node. */
static void add_node_forces(const ef_system *sys, const double *f_elem, double *S)
{
    for (ef_index e = 0; e < sys->mesh->n_elems; e++) {
        const ef_elem *el = &sys->mesh->elems[e];
        double fg[12];
        ef_elem_vec_to_global(axes_of(sys, e), f_elem + 12 * e, fg);
        for (int a = 0; a < 12; a++) S[6 * el->node[a / 6] + a % 6] += fg[a];
    }
}

void ef_system_recover(const ef_system *sys, const ef_loadset *ls, const double *u,
                       const double *f_elem, const ef_results *r, ef_load_result *lr)
{
    const ef_model *m = sys->m;
    const ef_mesh *mesh = sys->mesh;
    for (ef_index i = 0; i < m->n_nodes; i++)
        for (int c = 0; c < 6; c++) {
            ef_index eq = sys->dofs->eq_of_dof[6 * i + c];
            lr->disp[6 * i + c] = eq >= 0 ? u[eq] : 0.0;
        }
    /* member end forces: outer ends of the first and last elements */
    for (ef_index k = 0; k < m->n_members; k++) {
        ef_index e0 = mesh->first_elem[k], e1 = mesh->first_elem[k + 1] - 1;
        memcpy(lr->end_forces + 12 * k, f_elem + 12 * e0, 6 * sizeof(double));
        memcpy(lr->end_forces + 12 * k + 6, f_elem + 12 * e1 + 6, 6 * sizeof(double));
    }
    /* reactions: node equilibrium R = sum of element forces on the node - applied load */
    double *S = calloc((size_t)mesh->n_nodes * 6, sizeof *S);
    if (S) {
        add_node_forces(sys, f_elem, S);
        memset(lr->react, 0, (size_t)m->n_nodes * 6 * sizeof *lr->react);
        for (ef_index i = 0; i < m->n_supports; i++) {
            ef_index nd = m->supports[i].node;
            for (int c = 0; c < 6; c++) {
                bool held = (m->supports[i].held & (1u << c)) || m->supports[i].spring[c] != 0.0;
                if (held) lr->react[6 * nd + c] = S[6 * nd + c] - ls->node_f[6 * nd + c];
            }
        }
        if (m->restrain_all)
            for (ef_index i = 0; i < m->n_nodes; i++)
                for (int c = 0; c < 6; c++)
                    if (m->restrain_all & (1u << c))
                        lr->react[6 * i + c] = S[6 * i + c] - ls->node_f[6 * i + c];
        free(S);
    }
    /* equilibrium of the whole: applied + reactions about the origin */
    ef_loadset_resultant(ls, m, lr->applied);
    memset(lr->reaction_sum, 0, sizeof lr->reaction_sum);
    double fscale = 0.0, mscale = 0.0, lscale = 0.0;
    for (ef_index i = 0; i < m->n_nodes; i++) {
        const double *R = lr->react + 6 * i, *x = m->nodes[i].xyz;
        for (int c = 0; c < 3; c++) lr->reaction_sum[c] += R[c];
        lr->reaction_sum[3] += R[3] + x[1] * R[2] - x[2] * R[1];
        lr->reaction_sum[4] += R[4] + x[2] * R[0] - x[0] * R[2];
        lr->reaction_sum[5] += R[5] + x[0] * R[1] - x[1] * R[0];
        for (int c = 0; c < 3; c++) {
            fscale += fabs(R[c]);
            mscale += fabs(R[3 + c]);
            lscale = fmax(lscale, fabs(x[c]));
        }
    }
    for (int c = 0; c < 3; c++) {
        fscale += fabs(lr->applied[c]);
        mscale += fabs(lr->applied[3 + c]);
    }
    mscale += fscale * fmax(lscale, 1e-300);
    double rf = 0.0, rm = 0.0;
    for (int c = 0; c < 3; c++) {
        rf = fmax(rf, fabs(lr->applied[c] + lr->reaction_sum[c]));
        rm = fmax(rm, fabs(lr->applied[3 + c] + lr->reaction_sum[3 + c]));
    }
    lr->eq_residual = fmax(fscale > 0 ? rf / fscale : rf, mscale > 0 ? rm / mscale : rm);
    /* internal forces at stations: from the start forces of the element that holds x */
    for (ef_index k = 0; k < m->n_members; k++) {
        const ef_member *b = &m->members[k];
        ef_index e0 = mesh->first_elem[k], ne = mesh->first_elem[k + 1] - e0;
        int ns = b->stations;
        for (int s = 0; s < ns; s++) {
            double x = b->length * s / (ns - 1);
            ef_index j = EF_MIN((ef_index)(x / mesh->elems[e0].len), ne - 1);
            ef_index e = e0 + j;
            ef_bload bl[64];
            int nb = ls ? ef_loadset_elem_loads(ls, mesh, e, bl, 64) : 0;
            double *row = lr->stations + 7 * (r->st_first[k] + s);
            row[0] = x;
            double xe = fmin(fmax(x - mesh->elems[e].x0, 0.0), mesh->elems[e].len);
            if (s == ns - 1) {
                memcpy(row + 1, f_elem + 12 * (e0 + ne - 1) + 6, 6 * sizeof(double));
            } else {
                ef_elem_cut_forces(f_elem + 12 * e, bl, nb, xe, row + 1);
            }
        }
    }
}

double ef_system_residual(const ef_system *sys, const double *values, const double *u,
                          const double *f)
{
    ef_index n = sys->dofs->n_eq;
    const ef_sparse *A = sys->asmb->A;
    double *Ku = malloc((size_t)n * sizeof *Ku);
    if (!Ku) return NAN;
    ef_sparse_symv(A, values, u, Ku);
    double rn = 0.0, un = 0.0, fn = 0.0, kn = 0.0;
    for (ef_index i = 0; i < n; i++) {
        rn = fmax(rn, fabs(Ku[i] - f[i]));
        un = fmax(un, fabs(u[i]));
        fn = fmax(fn, fabs(f[i]));
    }
    /* ||K||_inf: largest absolute row sum of the symmetric matrix */
    const ef_index *Ap = ef_sparse_colptr(A), *Ai = ef_sparse_rowind(A);
    double *rs = Ku;
    memset(rs, 0, (size_t)n * sizeof *rs);
    for (ef_index j = 0; j < n; j++)
        for (ef_index p = Ap[j]; p < Ap[j + 1]; p++) {
            rs[j] += fabs(values[p]);
            if (Ai[p] != j) rs[Ai[p]] += fabs(values[p]);
        }
    for (ef_index i = 0; i < n; i++) kn = fmax(kn, rs[i]);
    free(Ku);
    double den = kn * un + fn;
    return den > 0.0 ? rn / den : 0.0;
}
