/* results_hdf5.c: the HDF5 results file, format 1 (docs/results-format.md): writing
 * it atomically, and reading it back into a stub model and results for `show` and `plot`.
 * This is the only file that includes hdf5.h.
 *
 * Invariants of a file we write:
 * - root attribute format = "eigenframe-results", format_version = 1;
 * - every dataset carries `unit` and `description` text attributes. `unit` is one word
 *   when all values share a unit, else one word per entry of the last dimension,
 *   separated by single spaces ("m m m rad rad rad");
 * - strings are variable-length UTF-8;
 * - arrays are at model nodes and members only, in model file order; loads are named by
 *   group (a load or member name is a link name, so it must not contain '/' or start
 *   with '.');
 * - the file appears under its final name only when complete (temporary + rename).
 */
#define _POSIX_C_SOURCE 200809L
#include "results_hdf5.h"

#include "sha256.h"
#include "vibration.h"

#include <hdf5.h>

#include <errno.h>
#include <fcntl.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

#if H5_VERSION_GE(1, 12, 0)
#define vlen_reclaim H5Treclaim
#else
#define vlen_reclaim H5Dvlen_reclaim
#endif

#define FORMAT_NAME "eigenframe-results"
#define PI 3.14159265358979323846
#define MAX_NAME 1024            /* longest load or member name we store as a link name */
#define PATH_CAP (3 * MAX_NAME)  /* longest object path we build */

/* out = a b c (c may be NULL), cut to fit cap; long names are refused before this */
static char *join(char *out, size_t cap, const char *a, const char *b, const char *c)
{
    size_t o = 0;
    const char *part[3] = {a, b, c};
    for (int i = 0; i < 3; i++)
        for (const char *q = part[i]; q && *q && o + 1 < cap; q++) out[o++] = *q;
    out[o] = '\0';
    return out;
}

static const char *const kind_names[3] = {"global", "member-flexural", "member-torsional"};

/* ======================================================================== writing */

typedef struct {
    hid_t file;
    const char *path;            /* the final name, for messages */
    ef_ctx *ctx;
    long n_datasets;             /* datasets written so far */
    long fail_after;             /* test hook: fail once this many are written; -1 = off */
    bool failed;
    hid_t lcpl;                  /* link creation: make intermediate groups */
    hid_t str;                   /* variable-length UTF-8 string type */
    /* unit names of this model */
    char F[16], L[16], FL[40], M[48], ML2[64], Mh[64], MhL[80], MhpL[80], Lrec[24];
} wr;

static void wfail(wr *w, const char *call, const char *object)
{
    if (w->failed) return;
    w->failed = true;
    ef_diag_error(w->ctx, NULL, "%s: cannot write the results file: %s failed for '%s'", w->path,
                  call, object);
}

/* variable-length UTF-8 string type (caller closes) */
static hid_t str_type(void)
{
    hid_t t = H5Tcopy(H5T_C_S1);
    if (t < 0) return t;
    if (H5Tset_size(t, H5T_VARIABLE) < 0 || H5Tset_cset(t, H5T_CSET_UTF8) < 0) {
        H5Tclose(t);
        return -1;
    }
    return t;
}

/* Write attribute `name` on the open object o (at path `obj`, for messages). n < 0:
 * scalar; n == 0: an empty (null dataspace) attribute; n > 0: a 1-D array of n values. */
static void attr_write_on(wr *w, hid_t o, const char *obj, const char *name, hid_t ftype,
                          hid_t mtype, long n, const void *data)
{
    if (w->failed) return;
    char what[PATH_CAP + 64];
    hsize_t dim = (hsize_t)(n > 0 ? n : 0);
    hid_t sp = n < 0 ? H5Screate(H5S_SCALAR) : n == 0 ? H5Screate(H5S_NULL)
                                                       : H5Screate_simple(1, &dim, NULL);
    hid_t a = sp < 0 ? -1 : H5Acreate2(o, name, ftype, sp, H5P_DEFAULT, H5P_DEFAULT);
    const char *failed = sp < 0 ? "H5Screate" : a < 0 ? "H5Acreate2"
                       : (n != 0 && H5Awrite(a, mtype, data) < 0) ? "H5Awrite" : NULL;
    if (a >= 0 && H5Aclose(a) < 0 && !failed) failed = "H5Aclose";
    if (sp >= 0) H5Sclose(sp);
    if (failed) {
        snprintf(what, sizeof what, "%s@%s", obj, name);
        wfail(w, failed, what);
    }
}

/* the same on the object at the absolute path `obj` */
static void attr_write(wr *w, const char *obj, const char *name, hid_t ftype, hid_t mtype,
                       long n, const void *data)
{
    if (w->failed) return;
    hid_t o = H5Oopen(w->file, obj, H5P_DEFAULT);
    if (o < 0) { wfail(w, "H5Oopen", obj); return; }
    attr_write_on(w, o, obj, name, ftype, mtype, n, data);
    H5Oclose(o);
}

static void attr_str(wr *w, const char *obj, const char *name, const char *value)
{
    const char *v = value ? value : "";
    attr_write(w, obj, name, w->str, w->str, -1, &v);
}

static void attr_strv(wr *w, const char *obj, const char *name, long n, const char *const *v)
{
    attr_write(w, obj, name, w->str, w->str, n, v);
}

static void attr_f64(wr *w, const char *obj, const char *name, double v)
{
    attr_write(w, obj, name, H5T_IEEE_F64LE, H5T_NATIVE_DOUBLE, -1, &v);
}

static void attr_f64v(wr *w, const char *obj, const char *name, long n, const double *v)
{
    attr_write(w, obj, name, H5T_IEEE_F64LE, H5T_NATIVE_DOUBLE, n, v);
}

static void attr_i64(wr *w, const char *obj, const char *name, int64_t v)
{
    attr_write(w, obj, name, H5T_STD_I64LE, H5T_NATIVE_INT64, -1, &v);
}

static void attr_i32(wr *w, const char *obj, const char *name, int32_t v)
{
    attr_write(w, obj, name, H5T_STD_I32LE, H5T_NATIVE_INT32, -1, &v);
}

static void group(wr *w, const char *path)
{
    if (w->failed) return;
    hid_t g = H5Gcreate2(w->file, path, w->lcpl, H5P_DEFAULT, H5P_DEFAULT);
    if (g < 0) { wfail(w, "H5Gcreate2", path); return; }
    if (H5Gclose(g) < 0) wfail(w, "H5Gclose", path);
}

/* Create and write one dataset with its `unit` and `description`. chunk_rows: store
 * chunked, one index of the first dimension per chunk, shuffled and deflated (level 4). */
static void dset(wr *w, const char *path, hid_t ftype, hid_t mtype, int rank, const hsize_t *dims,
                 const void *data, const char *unit, const char *desc, bool chunk_rows)
{
    if (w->failed) return;
    if (w->fail_after >= 0 && w->n_datasets >= w->fail_after) {
        wfail(w, "H5Dwrite (failure simulated by EF_TEST_FAIL_WRITE_AFTER)", path);
        return;
    }
    hsize_t total = 1;
    for (int i = 0; i < rank; i++) total *= dims[i];
    hid_t sp = H5Screate_simple(rank, dims, NULL);
    if (sp < 0) { wfail(w, "H5Screate_simple", path); return; }
    hid_t dcpl = H5P_DEFAULT;
    if (chunk_rows && total > 0) {
        hsize_t chunk[8];
        for (int i = 0; i < rank; i++) chunk[i] = dims[i];
        chunk[0] = 1;
        dcpl = H5Pcreate(H5P_DATASET_CREATE);
        if (dcpl < 0 || H5Pset_chunk(dcpl, rank, chunk) < 0 ||
            (H5Zfilter_avail(H5Z_FILTER_SHUFFLE) > 0 && H5Pset_shuffle(dcpl) < 0) ||
            (H5Zfilter_avail(H5Z_FILTER_DEFLATE) > 0 && H5Pset_deflate(dcpl, 4) < 0)) {
            wfail(w, "H5Pset_chunk", path);
            if (dcpl >= 0) H5Pclose(dcpl);
            H5Sclose(sp);
            return;
        }
    }
    hid_t d = H5Dcreate2(w->file, path, ftype, sp, w->lcpl, dcpl, H5P_DEFAULT);
    if (dcpl != H5P_DEFAULT) H5Pclose(dcpl);
    H5Sclose(sp);
    if (d < 0) { wfail(w, "H5Dcreate2", path); return; }
    if (total > 0 && H5Dwrite(d, mtype, H5S_ALL, H5S_ALL, H5P_DEFAULT, data) < 0)
        wfail(w, "H5Dwrite", path);
    attr_write_on(w, d, path, "unit", w->str, w->str, -1, &unit);
    attr_write_on(w, d, path, "description", w->str, w->str, -1, &desc);
    if (H5Dclose(d) < 0) wfail(w, "H5Dclose", path);
    if (!w->failed) w->n_datasets++;
}

static void dset_f64(wr *w, const char *path, int rank, const hsize_t *dims, const double *data,
                     const char *unit, const char *desc)
{
    dset(w, path, H5T_IEEE_F64LE, H5T_NATIVE_DOUBLE, rank, dims, data, unit, desc, false);
}

static void dset_i32(wr *w, const char *path, int rank, const hsize_t *dims, const int32_t *data,
                     const char *unit, const char *desc)
{
    dset(w, path, H5T_STD_I32LE, H5T_NATIVE_INT32, rank, dims, data, unit, desc, false);
}

static void dset_str(wr *w, const char *path, hsize_t n, const char *const *v, const char *desc)
{
    dset(w, path, w->str, w->str, 1, &n, v, "", desc, false);   /* text: no unit */
}

static bool bad_link_name(const char *s)
{
    return !s || !*s || s[0] == '.' || strchr(s, '/') || strlen(s) > MAX_NAME;
}

static bool check_names(const ef_results *r, ef_ctx *ctx)
{
    const ef_model *m = r->model;
    bool ok = true;
    for (ef_index k = 0; k < m->n_members; k++)
        if (bad_link_name(m->members[k].name)) {
            ef_diag_error(ctx, &m->members[k].where,
                          "member '%s': the name cannot be stored in the results file (it is "
                          "empty, contains '/', starts with '.' or is too long)",
                          m->members[k].name ? m->members[k].name : "");
            ok = false;
        }
    /* the loads that name a group: those analysed */
    ef_index n = r->n_statics + r->n_second + (r->buckling ? 1 : 0);
    for (ef_index i = 0; i < n; i++) {
        ef_index l = i < r->n_statics ? r->statics[i].load
                   : i < r->n_statics + r->n_second ? r->second[i - r->n_statics].load
                   : r->buckling->load;
        if (bad_link_name(ef_model_load_name(m, l))) {
            ef_diag_error(ctx, NULL,
                          "load '%s': the name cannot be stored in the results file (it is "
                          "empty, contains '/', starts with '.' or is too long)",
                          ef_model_load_name(m, l));
            ok = false;
        }
    }
    for (ef_index t = 0; t < r->n_machines; t++)
        if (bad_link_name(r->machines[t].name)) {
            ef_diag_error(ctx, NULL,
                          "machine '%s': the name cannot be stored in the results file (it is "
                          "empty, contains '/', starts with '.' or is too long)",
                          r->machines[t].name ? r->machines[t].name : "");
            ok = false;
        }
    return ok;
}

/* mass^-1/2 style names need parentheses when the mass unit is a compound */
static void unit_names(wr *w, const ef_units *u)
{
    char mu[40];
    snprintf(w->F, sizeof w->F, "%s", ef_units_force_name(u->force));
    snprintf(w->L, sizeof w->L, "%s", ef_units_length_name(u->length));
    snprintf(w->FL, sizeof w->FL, "%s*%s", w->F, w->L);
    ef_units_mass_name(u, mu, sizeof mu);
    bool compound = strpbrk(mu, "*/^") != NULL;
    snprintf(w->M, sizeof w->M, "%s", mu);
    snprintf(w->ML2, sizeof w->ML2, "%s*%s^2", mu, w->L);
    snprintf(w->Mh, sizeof w->Mh, compound ? "(%s)^-1/2" : "%s^-1/2", mu);
    snprintf(w->MhL, sizeof w->MhL, "%s/%s", w->Mh, w->L);
    snprintf(w->MhpL, sizeof w->MhpL, compound ? "(%s)^1/2*%s" : "%s^1/2*%s", mu, w->L);
    snprintf(w->Lrec, sizeof w->Lrec, "1/%s", w->L);
}

/* "a a a b b b" */
static const char *unit6(char *buf, size_t n, const char *a, const char *b)
{
    snprintf(buf, n, "%s %s %s %s %s %s", a, a, a, b, b, b);
    return buf;
}

static void write_model(wr *w, const ef_results *r)
{
    const ef_model *m = r->model;
    ef_index nn = m->n_nodes, nm = m->n_members, ns = m->n_supports, nl = ef_model_n_loads(m);
    hsize_t d1[1], d2[2], d3[3];
    char u[256];
    const char **names = malloc((size_t)EF_MAX(EF_MAX(nn, nm), EF_MAX(nl, 1)) * sizeof *names);
    double *xyz = malloc((size_t)EF_MAX(nn, 1) * 3 * sizeof *xyz);
    double *axes = malloc((size_t)EF_MAX(nm, 1) * 9 * sizeof *axes);
    double *len = malloc((size_t)EF_MAX(nm, 1) * sizeof *len);
    double *spr = malloc((size_t)EF_MAX(ns, 1) * 6 * sizeof *spr);
    int32_t *iv = malloc((size_t)EF_MAX(EF_MAX(nm, ns), 1) * 2 * sizeof *iv);
    if (!names || !xyz || !axes || !len || !spr || !iv) {
        wfail(w, "malloc", "/model");
        goto done;
    }

    group(w, "/model");
    attr_i64(w, "/model", "mesh_nodes", r->n_mesh_nodes);
    attr_i64(w, "/model", "elements", r->n_elems);
    attr_i64(w, "/model", "equations", r->n_eq);
    attr_i64(w, "/model", "dropped_rotations", r->n_dropped);
    attr_i32(w, "/model", "divisions", m->divisions);
    attr_i32(w, "/model", "stations", m->stations);
    attr_i32(w, "/model", "restrain_all", (int32_t)m->restrain_all);
    attr_f64v(w, "/model", "gravity_dir", 3, m->gravity_dir);

    for (ef_index i = 0; i < nn; i++) {
        names[i] = m->nodes[i].name;
        memcpy(xyz + 3 * i, m->nodes[i].xyz, sizeof m->nodes[i].xyz);
    }
    d1[0] = (hsize_t)nn;
    dset_str(w, "/model/nodes/names", d1[0], names, "model node names, in file order");
    d2[0] = (hsize_t)nn, d2[1] = 3;
    dset_f64(w, "/model/nodes/xyz", 2, d2, xyz, w->L, "node coordinates X Y Z, global axes");

    for (ef_index k = 0; k < nm; k++) names[k] = m->members[k].name;
    d1[0] = (hsize_t)nm;
    dset_str(w, "/model/members/names", d1[0], names, "member names, in file order");
    for (ef_index k = 0; k < nm; k++)
        for (int e = 0; e < 2; e++) iv[2 * k + e] = (int32_t)m->members[k].node[e];
    d2[0] = (hsize_t)nm, d2[1] = 2;
    dset_i32(w, "/model/members/nodes", 2, d2, iv, "1",
             "start and end node of each member, 0-based indices into /model/nodes");
    for (ef_index k = 0; k < nm; k++) {
        memcpy(axes + 9 * k, m->members[k].axes, 9 * sizeof(double));
        len[k] = m->members[k].length;
    }
    d3[0] = (hsize_t)nm, d3[1] = 3, d3[2] = 3;
    dset_f64(w, "/model/members/axes", 3, d3, axes, "1",
             "local axes of each member: rows are the unit vectors x (start to end), y, z "
             "in global components");
    dset_f64(w, "/model/members/length", 1, d1, len, w->L, "member length, start to end node");
    for (ef_index k = 0; k < nm; k++) iv[k] = m->members[k].stations;
    dset_i32(w, "/model/members/stations", 1, d1, iv, "1",
             "number of result stations along each member, ends included, evenly spaced");
    for (ef_index k = 0; k < nm; k++) iv[k] = m->members[k].divisions;
    dset_i32(w, "/model/members/divisions", 1, d1, iv, "1",
             "number of finite elements each member was divided into for the analysis");
    for (ef_index k = 0; k < nm; k++) iv[k] = m->members[k].axial_only ? 1 : 0;
    dset_i32(w, "/model/members/axial_only", 1, d1, iv, "1",
             "1 for an axial-only (two-force) member, else 0");
    for (ef_index k = 0; k < nm; k++)
        for (int e = 0; e < 2; e++) iv[2 * k + e] = (int32_t)m->members[k].release[e];
    dset_i32(w, "/model/members/releases", 2, d2, iv, "1",
             "released local DOFs at the start and end of each member, bit mask: ux 1, uy 2, "
             "uz 4, rx 8, ry 16, rz 32");

    group(w, "/model/supports");
    for (ef_index s = 0; s < ns; s++) {
        iv[s] = (int32_t)m->supports[s].node;
        memcpy(spr + 6 * s, m->supports[s].spring, 6 * sizeof(double));
    }
    d1[0] = (hsize_t)ns;
    dset_i32(w, "/model/supports/node", 1, d1, iv, "1",
             "supported node, 0-based index into /model/nodes");
    for (ef_index s = 0; s < ns; s++) iv[s] = (int32_t)m->supports[s].held;
    dset_i32(w, "/model/supports/held", 1, d1, iv, "1",
             "rigidly held global DOFs, bit mask: ux 1, uy 2, uz 4, rx 8, ry 16, rz 32");
    d2[0] = (hsize_t)ns, d2[1] = 6;
    snprintf(u, sizeof u, "%s/%s %s/%s %s/%s %s/rad %s/rad %s/rad", w->F, w->L, w->F, w->L, w->F,
             w->L, w->FL, w->FL, w->FL);
    dset_f64(w, "/model/supports/springs", 2, d2, spr, u,
             "spring stiffness per global DOF ux uy uz rx ry rz, 0 = none");

    for (ef_index l = 0; l < nl; l++) names[l] = ef_model_load_name(m, l);
    d1[0] = (hsize_t)nl;
    dset_str(w, "/model/loads/names", d1[0], names,
             "load case names, then combination names (the shared load index)");
    for (ef_index l = 0; l < nl; l++) names[l] = ef_model_load_is_combo(m, l) ? "combination" : "case";
    dset_str(w, "/model/loads/kind", d1[0], names, "'case' or 'combination', per load");
done:
    free(names);
    free(xyz);
    free(axes);
    free(len);
    free(spr);
    free(iv);
}

static void write_load(wr *w, const ef_results *r, const ef_load_result *lr, const char *top,
                       bool second)
{
    const ef_model *m = r->model;
    const char *name = ef_model_load_name(m, lr->load);
    char g[PATH_CAP], p[PATH_CAP], u[256];
    hsize_t d1[1], d2[2], d3[3];
    snprintf(g, sizeof g, "%s/%s", top, name);
    group(w, g);
    attr_str(w, g, "load", name);
    attr_str(w, g, "load_kind", ef_model_load_is_combo(m, lr->load) ? "combination" : "case");
    attr_f64(w, g, "equilibrium_residual", lr->eq_residual);
    attr_f64(w, g, "solve_residual", lr->solve_residual);
    if (second) {
        attr_i64(w, g, "iterations", lr->iterations);
        attr_i32(w, g, "converged", lr->converged ? 1 : 0);
        attr_f64(w, g, "tolerance", lr->tolerance);
        attr_f64(w, g, "residual", lr->residual);
        attr_str(w, g, "status", lr->converged ? "converged" : "not converged");
        attr_str(w, g, "pdelta", lr->chord_only ? "chord" : "consistent");
    }
    d2[0] = (hsize_t)m->n_nodes, d2[1] = 6;
    join(p, sizeof p, g, "/displacements", NULL);
    dset_f64(w, p, 2, d2, lr->disp, unit6(u, sizeof u, w->L, "rad"),
             "node displacements ux uy uz and rotations rx ry rz, global axes, at model nodes");
    join(p, sizeof p, g, "/reactions", NULL);
    dset_f64(w, p, 2, d2, lr->react, unit6(u, sizeof u, w->F, w->FL),
             "forces Fx Fy Fz and moments Mx My Mz the supports exert on the structure, "
             "global axes; 0 where free");
    d3[0] = (hsize_t)m->n_members, d3[1] = 2, d3[2] = 6;
    join(p, sizeof p, g, "/end_forces", NULL);
    dset_f64(w, p, 3, d3, lr->end_forces, unit6(u, sizeof u, w->F, w->FL),
             "forces the nodes exert on the member at its start and end, local axes, "
             "N Vy Vz T My Mz (stiffness times displacements plus fixed-end forces)");
    d1[0] = 6;
    join(p, sizeof p, g, "/applied", NULL);
    dset_f64(w, p, 1, d1, lr->applied, unit6(u, sizeof u, w->F, w->FL),
             "resultant Fx Fy Fz Mx My Mz of the applied load about the global origin");
    join(p, sizeof p, g, "/reaction_sum", NULL);
    dset_f64(w, p, 1, d1, lr->reaction_sum, unit6(u, sizeof u, w->F, w->FL),
             "resultant Fx Fy Fz Mx My Mz of the support reactions about the global origin");
    if (second && lr->amplification && lr->converged) {
        join(p, sizeof p, g, "/amplification", NULL);
        dset_f64(w, p, 3, d3, lr->amplification, "1",
                 "second-order over first-order end force |S_II|/|S_I|, per member end and "
                 "component N Vy Vz T My Mz; NaN where the first-order value is negligible");
    }
    snprintf(u, sizeof u, "%s %s %s %s %s %s %s", w->L, w->F, w->F, w->F, w->FL, w->FL, w->FL);
    for (ef_index k = 0; k < m->n_members && !w->failed; k++) {
        ef_index s0 = r->st_first[k], s1 = r->st_first[k + 1];
        join(p, sizeof p, g, "/stations/", m->members[k].name);
        d2[0] = (hsize_t)(s1 - s0), d2[1] = 7;
        dset_f64(w, p, 2, d2, lr->stations + 7 * s0, u,
                 "x from the member start, then N Vy Vz T My Mz: forces the part beyond the "
                 "cut exerts on the part before it, local axes (N > 0 tension)");
    }
}

static void write_loads(wr *w, const ef_results *r, const ef_load_result *lr, ef_index n,
                        const char *top, bool second)
{
    if (n <= 0 || w->failed) return;
    const char **order = malloc((size_t)n * sizeof *order);
    if (!order) { wfail(w, "malloc", top); return; }
    group(w, top);
    for (ef_index i = 0; i < n; i++) order[i] = ef_model_load_name(r->model, lr[i].load);
    attr_strv(w, top, "loads", (long)n, order);
    free(order);
    for (ef_index i = 0; i < n; i++) write_load(w, r, &lr[i], top, second);
}

static void write_modal(wr *w, const ef_results *r)
{
    const ef_modal_result *mr = r->modal;
    const ef_model *m = r->model;
    int k = mr->n_modes;
    hsize_t d1[1] = {(hsize_t)k}, d2[2] = {(hsize_t)k, 6},
            d3[3] = {(hsize_t)k, (hsize_t)m->n_nodes, 6}, d6[1] = {6};
    char u[512];
    double *per = malloc((size_t)EF_MAX(k, 1) * sizeof *per);
    if (!per) { wfail(w, "malloc", "/modal"); return; }
    for (int i = 0; i < k; i++) per[i] = mr->freq[i] > 0.0 ? 1.0 / mr->freq[i] : (double)INFINITY;
    group(w, "/modal");
    attr_str(w, "/modal", "normalisation", "mass");
    attr_str(w, "/modal", "mass_source", mr->mass_source);
    attr_f64v(w, "/modal", "reference_point", 3, mr->ref_point);
    attr_f64v(w, "/modal", "residuals", k, mr->residual);
    attr_f64(w, "/modal", "model_mass", mr->model_mass);
    attr_i32(w, "/modal", "lumped", mr->lumped ? 1 : 0);
    attr_i32(w, "/modal", "lanczos_basis", mr->ncv);
    attr_f64(w, "/modal", "tolerance", mr->tol);
    attr_i64(w, "/modal", "operator_applications", mr->n_op);
    attr_f64(w, "/modal", "shift", mr->shift);
    attr_i32(w, "/modal", "rigid_modes", mr->n_rigid);
    dset_f64(w, "/modal/frequencies", 1, d1, mr->freq, "Hz", "natural frequencies, ascending");
    dset_f64(w, "/modal/periods", 1, d1, per, "s", "natural periods 1/f (inf for a 0 Hz mode)");
    dset_f64(w, "/modal/eigenvalues", 1, d1, mr->omega2, "rad^2/s^2",
             "eigenvalues omega^2 = (2 pi f)^2 as solved");
    snprintf(u, sizeof u, "%s %s %s %s %s %s", w->Mh, w->Mh, w->Mh, w->MhL, w->MhL, w->MhL);
    if (!w->failed) {
        dset(w, "/modal/shapes", H5T_IEEE_F64LE, H5T_NATIVE_DOUBLE, 3, d3, mr->shapes, u,
             "mode shapes ux uy uz rx ry rz at model nodes, global axes, mass-normalised "
             "(phi^T M phi = 1), largest translation positive",
             true);
    }
    snprintf(u, sizeof u, "%s^1/2 %s^1/2 %s^1/2 %s %s %s", w->M, w->M, w->M, w->MhpL, w->MhpL,
             w->MhpL);
    if (strpbrk(w->M, "*/^"))
        snprintf(u, sizeof u, "(%s)^1/2 (%s)^1/2 (%s)^1/2 %s %s %s", w->M, w->M, w->M, w->MhpL,
                 w->MhpL, w->MhpL);
    dset_f64(w, "/modal/participation", 2, d2, mr->participation, u,
             "participation factors phi^T M r for unit translation X Y Z and unit rotation "
             "about X Y Z through the reference point");
    snprintf(u, sizeof u, "%s %s %s %s %s %s", w->M, w->M, w->M, w->ML2, w->ML2, w->ML2);
    dset_f64(w, "/modal/effective_mass", 2, d2, mr->eff_mass, u,
             "effective modal mass (X Y Z) and rotational inertia (about X Y Z through the "
             "reference point): participation squared");
    dset_f64(w, "/modal/effective_mass_ratio", 2, d2, mr->eff_ratio, "1",
             "effective modal mass over participating_mass in that direction");
    dset_f64(w, "/modal/total_mass", 1, d6, mr->total_mass, u,
             "total mass and rotational inertia per direction r^T M r on the free DOFs (the "
             "denominator of effective_mass_ratio; equal to participating_mass)");
    dset_f64(w, "/modal/participating_mass", 1, d6, mr->total_mass, u,
             "participating mass and rotational inertia per direction r^T M r on the free "
             "DOFs; mass at held DOFs is excluded (see attribute model_mass)");
    dset_f64(w, "/modal/modal_mass_unitmax", 1, d1, mr->unitmax_mass, w->M,
             "modal mass of each shape scaled to a largest translation of 1: "
             "1/max|phi_translation|^2");
    free(per);
}

static void write_buckling(wr *w, const ef_results *r)
{
    const ef_buckling_result *br = r->buckling;
    const ef_model *m = r->model;
    const char *name = ef_model_load_name(m, br->load);
    int k = br->n_pos;
    char g[PATH_CAP], p[PATH_CAP], u[128];
    hsize_t d1[1] = {(hsize_t)k}, d2[2] = {(hsize_t)k, (hsize_t)m->n_members},
            d3[3] = {(hsize_t)k, (hsize_t)m->n_nodes, 6};
    const char **kinds = malloc((size_t)EF_MAX(k, 1) * sizeof *kinds);
    int32_t *dom = malloc((size_t)EF_MAX(k, 1) * sizeof *dom);
    if (!kinds || !dom) {
        wfail(w, "malloc", "/buckling");
        goto done;
    }
    for (int i = 0; i < k; i++) {
        int c = br->kind ? br->kind[i] : 0;
        kinds[i] = kind_names[(c >= 0 && c <= 2) ? c : 0];
        dom[i] = br->dominant ? (int32_t)br->dominant[i] : -1;
    }
    group(w, "/buckling");
    snprintf(g, sizeof g, "/buckling/%s", name);
    group(w, g);
    attr_str(w, g, "load", name);
    attr_f64v(w, g, "residuals", k, br->residual);
    attr_i64(w, g, "operator_applications", br->n_op);
    attr_i32(w, g, "found_none", br->found_none ? 1 : 0);
    join(p, sizeof p, g, "/factors", NULL);
    dset_f64(w, p, 1, d1, br->factors, "1",
             "elastic critical load factors (multiples of the load), positive, ascending");
    if (br->n_neg > 0) {
        hsize_t dn[1] = {(hsize_t)br->n_neg};
        join(p, sizeof p, g, "/negative_factors", NULL);
        dset_f64(w, p, 1, dn, br->neg_factors, "1",
                 "critical factors found with the load reversed (negative numbers, ascending "
                 "absolute value)");
    }
    join(p, sizeof p, g, "/shapes", NULL);
    unit6(u, sizeof u, "1", w->Lrec);
    dset(w, p, H5T_IEEE_F64LE, H5T_NATIVE_DOUBLE, 3, d3, br->shapes, u,
         "buckling mode shapes ux uy uz rx ry rz at model nodes, global axes, normalised "
         "to a largest translation of 1",
         true);
    if (br->member_share) {
        join(p, sizeof p, g, "/member_share", NULL);
        dset_f64(w, p, 2, d2, br->member_share, "1",
                 "share of each member in |phi^T K_G phi| per mode (sums to 1 over members)");
    }
    join(p, sizeof p, g, "/kind", NULL);
    dset_str(w, p, d1[0], kinds,
             "where the mode's energy sits: global (sway), member-flexural or member-torsional");
    join(p, sizeof p, g, "/dominant_member", NULL);
    dset_i32(w, p, 1, d1, dom, "1",
             "member with the largest share per mode, 0-based index into /model/members; -1 none");
    if (br->axial0) {
        hsize_t dm[1] = {(hsize_t)m->n_members};
        join(p, sizeof p, g, "/axial_force", NULL);
        dset_f64(w, p, 1, dm, br->axial0, w->F,
                 "axial force N0 of the load at each member start (tension positive), the "
                 "state the geometric stiffness was built from");
    }
done:
    free(kinds);
    free(dom);
}

static void names_of_nodes(const ef_model *m, const ef_index *idx, ef_index n, const char **out)
{
    for (ef_index i = 0; i < n; i++)
        out[i] = (idx[i] >= 0 && idx[i] < m->n_nodes) ? m->nodes[idx[i]].name : "";
}

static void i32_of(const int *v, ef_index n, int32_t *out)
{
    for (ef_index i = 0; i < n; i++) out[i] = (int32_t)v[i];
}

static void write_walking(wr *w, const ef_results *r)
{
    const ef_walking_result *wk = r->walking;
    const ef_model *m = r->model;
    ef_index nr = wk->n_receivers;
    int nk = wk->n_modes;
    size_t big = (size_t)EF_MAX(EF_MAX(nr, nk), 1);
    const char **txt = malloc(big * sizeof *txt);
    int32_t *iv = malloc(big * sizeof *iv);
    char u[64];
    hsize_t dr[1] = {(hsize_t)nr}, dk[1] = {(hsize_t)nk};
    if (!txt || !iv) {
        wfail(w, "malloc", "/walking");
        goto done;
    }
    group(w, "/walking");
    const char *g = "/walking";
    attr_f64(w, g, "damping", wk->damping);
    attr_f64(w, g, "walker_weight", wk->walker_weight);
    attr_f64v(w, g, "pace_hz", 2, wk->pace);
    attr_str(w, g, "weighting", wk->weighting == 1 ? "Wg" : "Wb");
    attr_f64(w, g, "path_length", wk->path_length);
    attr_f64(w, g, "limit_R", wk->limit_R);
    attr_i32(w, g, "modes_used", wk->modes_used);
    attr_f64(w, g, "f1_vertical", wk->f1_vertical);
    attr_i32(w, g, "f1_mode", wk->f1_mode);
    attr_f64(w, g, "f_selfweight", wk->f_selfweight);
    attr_f64(w, g, "delta_selfweight", wk->delta_selfweight);
    attr_str(w, g, "delta_where", wk->delta_where);
    attr_i32(w, g, "methods", wk->methods);
    attr_f64(w, g, "cutoff_resonant", wk->cutoff_resonant);
    attr_f64(w, g, "cutoff_transient", wk->cutoff_transient);
    attr_i32(w, g, "modes_resonant", wk->modes_resonant);
    attr_i32(w, g, "modes_transient", wk->modes_transient);
    attr_f64(w, g, "highest_hz", wk->highest_hz);
    attr_i32(w, g, "pace_frequencies_scanned", wk->n_pace);
    attr_f64(w, g, "pace_transient", wk->pace_transient);

    names_of_nodes(m, wk->receivers, nr, txt);
    dset_str(w, "/walking/receivers", dr[0], txt, "receiver node names");
    dset_f64(w, "/walking/R", 1, dr, wk->R, "1",
             "response factor: weighted rms response over the base-curve value, governing method");
    snprintf(u, sizeof u, "%s/s^2|%s/s", w->L, w->L);
    dset_f64(w, "/walking/a_w_rms", 1, dr, wk->response_rms, u,
             "weighted rms acceleration (resonant method, first unit) or velocity (transient "
             "method, second unit), as `method` says");
    for (ef_index i = 0; i < nr; i++) txt[i] = wk->method[i] == 1 ? "transient" : "resonant";
    dset_str(w, "/walking/method", dr[0], txt, "governing method: resonant or transient");
    dset_f64(w, "/walking/pace_hz", 1, dr, wk->pace_hz, "Hz", "governing pace frequency");
    i32_of(wk->harmonic, nr, iv);
    dset_i32(w, "/walking/harmonic", 1, dr, iv, "1", "governing harmonic 1..4 (0: transient)");
    i32_of(wk->mode, nr, iv);
    dset_i32(w, "/walking/mode", 1, dr, iv, "1", "mode contributing most, 1-based");
    names_of_nodes(m, wk->walker, nr, txt);
    dset_str(w, "/walking/walker", dr[0], txt, "node of the governing walker");
    dset_f64(w, "/walking/R_resonant", 1, dr, wk->R_resonant, "1",
             "R of the resonant method, NaN where not computed");
    dset_f64(w, "/walking/R_transient", 1, dr, wk->R_transient, "1",
             "R of the transient method, NaN where not computed");
    snprintf(u, sizeof u, "%s/s^2", w->L);
    dset_f64(w, "/walking/rms_resonant", 1, dr, wk->rms_resonant, u,
             "weighted rms acceleration of the resonant method, NaN where not computed");
    snprintf(u, sizeof u, "%s/s", w->L);
    dset_f64(w, "/walking/rms_transient", 1, dr, wk->rms_transient, u,
             "weighted rms velocity of the transient method, NaN where not computed");
    dset_f64(w, "/walking/vertical_share", 1, dk, wk->vertical_share, "1",
             "per mode: vertical share of the squared translation at receivers and walkers");
    dset_f64(w, "/walking/floor_motion", 1, dk, wk->floor_motion, "1",
             "per mode: largest vertical movement at receivers and walkers over the mode's "
             "largest translation at any model node");
    i32_of(wk->is_vertical, nk, iv);
    dset_i32(w, "/walking/is_vertical", 1, dk, iv, "1", "per mode: 1 when it passes the vertical-mode test");
    i32_of(wk->pace_flags, nk, iv);
    dset_i32(w, "/walking/pace_flags", 1, dk, iv, "1",
             "per mode: bit h-1 set when the mode is vertical and f lies in h times the pace range");
done:
    free(txt);
    free(iv);
}

static void write_machines(wr *w, const ef_results *r)
{
    const ef_model *m = r->model;
    const char **order = malloc((size_t)EF_MAX(r->n_machines, 1) * sizeof *order);
    if (!order) { wfail(w, "malloc", "/machines"); return; }
    group(w, "/machines");
    for (ef_index t = 0; t < r->n_machines; t++) order[t] = r->machines[t].name;
    attr_strv(w, "/machines", "machines", (long)r->n_machines, order);
    free(order);
    for (ef_index t = 0; t < r->n_machines && !w->failed; t++) {
        const ef_machine_result *mc = &r->machines[t];
        ef_index nr = mc->n_receivers;
        char g[PATH_CAP], p[PATH_CAP], u[64];
        hsize_t dr[1] = {(hsize_t)nr}, ds[1] = {(hsize_t)mc->n_hz},
                d3[3] = {(hsize_t)mc->n_hz, (hsize_t)nr, 3}, d2[2] = {(hsize_t)mc->n_hz, (hsize_t)nr};
        const char **txt = malloc((size_t)EF_MAX(nr, 1) * sizeof *txt);
        if (!txt) { wfail(w, "malloc", "/machines"); return; }
        join(g, sizeof g, "/machines/", mc->name, NULL);
        group(w, g);
        attr_str(w, g, "node", mc->node >= 0 && mc->node < m->n_nodes ? m->nodes[mc->node].name : "");
        attr_f64v(w, g, "force", 3, mc->force);
        attr_f64(w, g, "hz_nominal", mc->hz_nominal);
        attr_f64(w, g, "sweep", mc->sweep);
        attr_f64(w, g, "damping", mc->damping);
        attr_str(w, g, "weighting", mc->weighting == 1 ? "Wg" : "Wb");
        attr_i32(w, g, "modes_used", mc->modes_used);
        attr_f64(w, g, "highest_hz", mc->highest_hz);
        attr_i32(w, g, "corrected", mc->corrected ? 1 : 0);
        attr_i32(w, g, "beyond_modes", mc->beyond_modes ? 1 : 0);
        names_of_nodes(m, mc->receivers, nr, txt);
        dset_str(w, join(p, sizeof p, g, "/receivers", NULL), dr[0], txt, "receiver node names");
        free(txt);
        dset_f64(w, join(p, sizeof p, g, "/hz", NULL), 1, ds, mc->hz, "Hz", "excitation frequencies scanned");
        dset_f64(w, join(p, sizeof p, g, "/displacement", NULL), 3, d3, mc->disp, w->L,
                 "peak displacement amplitude per frequency, receiver and global translation x y z");
        snprintf(u, sizeof u, "%s/s", w->L);
        dset_f64(w, join(p, sizeof p, g, "/velocity", NULL), 3, d3, mc->vel, u,
                 "peak velocity amplitude per frequency, receiver and global translation x y z");
        snprintf(u, sizeof u, "%s/s^2", w->L);
        dset_f64(w, join(p, sizeof p, g, "/acceleration", NULL), 3, d3, mc->acc, u,
                 "peak acceleration amplitude per frequency, receiver and global translation x y z");
        dset_f64(w, join(p, sizeof p, g, "/R", NULL), 1, dr, mc->R, "1",
                 "largest vertical response factor over the scan, per receiver");
        dset_f64(w, join(p, sizeof p, g, "/R_hz", NULL), 1, dr, mc->R_hz, "Hz",
                 "frequency of the largest vertical R");
        dset_f64(w, join(p, sizeof p, g, "/R_scan", NULL), 2, d2, mc->R_scan, "1",
                 "vertical response factor per frequency and receiver");
        dset_f64(w, join(p, sizeof p, g, "/R_horizontal", NULL), 1, dr, mc->R_horizontal, "1",
                 "largest horizontal response factor over the scan");
        dset_f64(w, join(p, sizeof p, g, "/R_horizontal_hz", NULL), 1, dr, mc->R_horizontal_hz, "Hz",
                 "frequency of the largest horizontal R");
    }
}

static void utc_now(char *buf, size_t n)
{
    time_t t = time(NULL);
    const char *sde = getenv("SOURCE_DATE_EPOCH");   /* reproducible output when set */
    if (sde && *sde) {
        char *end;
        long long v = strtoll(sde, &end, 10);
        if (*end == '\0') t = (time_t)v;
    }
    struct tm tm;
    if (!gmtime_r(&t, &tm) || strftime(buf, n, "%Y-%m-%dT%H:%M:%SZ", &tm) == 0)
        snprintf(buf, n, "unknown");
}

/* TEST HOOK (never set in production): EF_TEST_FAIL_WRITE_AFTER=N makes the writer fail
 * after N datasets, as a full disk would, so that the tests can check that an
 * interrupted write leaves no file under the final name and keeps an older one. */
static long test_fail_after(void)
{
    const char *s = getenv("EF_TEST_FAIL_WRITE_AFTER");
    if (!s || !*s) return -1;
    char *end;
    long v = strtol(s, &end, 10);
    return (*end == '\0' && v >= 0) ? v : -1;
}

ef_status ef_results_write_hdf5(const ef_results *r, const char *path, ef_ctx *ctx)
{
    const ef_model *m = r->model;
    wr w;
    memset(&w, 0, sizeof w);
    w.file = -1;
    w.lcpl = -1;
    w.str = -1;
    w.path = path;
    w.ctx = ctx;
    w.fail_after = test_fail_after();
    if (!check_names(r, ctx)) return EF_EINPUT;
    H5Eset_auto2(H5E_DEFAULT, NULL, NULL);
    unit_names(&w, &m->units);

    size_t tn = strlen(path) + 32;
    char *tmp = malloc(tn);
    if (!tmp) return EF_ENOMEM;
    snprintf(tmp, tn, "%s.tmp.%ld", path, (long)getpid());

    hid_t fapl = H5Pcreate(H5P_FILE_ACCESS);
    w.lcpl = H5Pcreate(H5P_LINK_CREATE);
    w.str = str_type();
    if (fapl < 0 || w.lcpl < 0 || w.str < 0 || H5Pset_create_intermediate_group(w.lcpl, 1) < 0 ||
        H5Pset_fclose_degree(fapl, H5F_CLOSE_STRONG) < 0 ||
        H5Pset_libver_bounds(fapl, H5F_LIBVER_V18, H5F_LIBVER_V18) < 0) {
        wfail(&w, "H5Pcreate", tmp);
    } else {
        w.file = H5Fcreate(tmp, H5F_ACC_TRUNC, H5P_DEFAULT, fapl);
        if (w.file < 0) wfail(&w, "H5Fcreate", tmp);
    }
    if (fapl >= 0) H5Pclose(fapl);

    /* root attributes */
    char hex[65], now[64], mu[40];
    ef_sha256_hex(m->sha256, hex);
    utc_now(now, sizeof now);
    attr_str(&w, "/", "format", FORMAT_NAME);
    attr_i32(&w, "/", "format_version", EF_RESULTS_FORMAT_VERSION);
    attr_str(&w, "/", "program_version", EF_VERSION);
    attr_str(&w, "/", "model_file", m->file ? m->file : "");
    attr_str(&w, "/", "model_sha256", hex);
    attr_str(&w, "/", "created_utc", now);
    attr_str(&w, "/", "units_force", w.F);
    attr_str(&w, "/", "units_length", w.L);
    attr_str(&w, "/", "units_mass", ef_units_mass_name(&m->units, mu, sizeof mu));
    if (m->title) attr_str(&w, "/", "title", m->title);

    write_model(&w, r);
    write_loads(&w, r, r->statics, r->n_statics, "/static", false);
    write_loads(&w, r, r->second, r->n_second, "/second_order", true);
    if (r->modal) write_modal(&w, r);
    if (r->buckling) write_buckling(&w, r);
    if (r->walking) write_walking(&w, r);
    if (r->n_machines > 0) write_machines(&w, r);

    if (w.file >= 0) {
        if (H5Fclose(w.file) < 0) wfail(&w, "H5Fclose", tmp);
        w.file = -1;
    }
    if (w.lcpl >= 0) H5Pclose(w.lcpl);
    if (w.str >= 0) H5Tclose(w.str);
    if (!w.failed) {
        int fd = open(tmp, O_RDONLY);        /* the data on disk before the name moves */
        if (fd < 0 || fsync(fd) != 0) {
            ef_diag_error(ctx, NULL, "%s: cannot write the results file: fsync of '%s' failed: %s",
                          path, tmp, strerror(errno));
            w.failed = true;
        }
        if (fd >= 0) close(fd);
    }
    if (!w.failed && rename(tmp, path) != 0) {
        ef_diag_error(ctx, NULL, "%s: cannot write the results file: rename from '%s' failed: %s",
                      path, tmp, strerror(errno));
        w.failed = true;
    }
    if (w.failed) remove(tmp);
    free(tmp);
    return w.failed ? EF_EIO : EF_OK;
}

/* ======================================================================== reading */

typedef struct {
    hid_t file;
    const char *path;
    ef_ctx *ctx;
    ef_status st;                /* first failure */
} rd;

static void rfail(rd *r, ef_status st, const char *fmt, ...) __attribute__((format(printf, 3, 4)));
static void rfail(rd *r, ef_status st, const char *fmt, ...)
{
    if (r->st != EF_OK) return;
    char buf[PATH_CAP + 256];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(buf, sizeof buf, fmt, ap);
    va_end(ap);
    r->st = st;
    ef_diag_error(r->ctx, NULL, "%s: %s", r->path, buf);
}

/* true when every component of the absolute path exists */
static bool rd_exists(rd *r, const char *path)
{
    char buf[PATH_CAP];
    size_t n = strlen(path);
    if (n >= sizeof buf) return false;
    for (size_t i = 1; i <= n; i++) {
        if (path[i] != '/' && path[i] != '\0') continue;
        memcpy(buf, path, i);
        buf[i] = '\0';
        if (H5Lexists(r->file, buf, H5P_DEFAULT) <= 0) return false;
    }
    return true;
}

static hid_t rd_open(rd *r, const char *path)
{
    if (r->st != EF_OK) return -1;
    if (!rd_exists(r, path)) {
        rfail(r, EF_EINPUT, "dataset '%s' is missing", path);
        return -1;
    }
    hid_t d = H5Dopen2(r->file, path, H5P_DEFAULT);
    if (d < 0) rfail(r, EF_EINPUT, "'%s' is not a dataset", path);
    return d;
}

/* Shape of a dataset: rank (<= 4) into *rank, dims. */
static bool rd_shape(rd *r, hid_t d, const char *path, int *rank, hsize_t dims[4])
{
    hid_t sp = H5Dget_space(d);
    int rk = sp < 0 ? -1 : H5Sget_simple_extent_ndims(sp);
    if (rk < 0 || rk > 4 || H5Sget_simple_extent_dims(sp, dims, NULL) < 0) {
        if (sp >= 0) H5Sclose(sp);
        rfail(r, EF_EINPUT, "dataset '%s' has an unexpected shape", path);
        return false;
    }
    H5Sclose(sp);
    *rank = rk;
    return true;
}

static void shape_text(char *buf, size_t n, int rank, const hsize_t *dims)
{
    size_t o = 0;
    buf[0] = '\0';
    for (int i = 0; i < rank && o < n; i++)
        o += (size_t)snprintf(buf + o, n - o, "[%llu]", (unsigned long long)dims[i]);
}

/* Length of the first dimension of a 1-D or higher dataset; -1 on failure. */
static ef_index rd_len(rd *r, const char *path)
{
    hid_t d = rd_open(r, path);
    if (d < 0) return -1;
    int rank;
    hsize_t dims[4];
    ef_index n = -1;
    if (rd_shape(r, d, path, &rank, dims)) {
        if (rank < 1) rfail(r, EF_EINPUT, "dataset '%s' is not an array", path);
        else if (dims[0] > (hsize_t)INT32_MAX) rfail(r, EF_EINPUT, "dataset '%s' is too large", path);
        else n = (ef_index)dims[0];
    }
    H5Dclose(d);
    return n;
}

/* Read a numeric dataset of exactly the shape `want` into out (converted to mtype). */
static bool rd_num(rd *r, const char *path, hid_t mtype, int rank, const hsize_t *want, void *out)
{
    hid_t d = rd_open(r, path);
    if (d < 0) return false;
    int rk;
    hsize_t dims[4];
    bool ok = rd_shape(r, d, path, &rk, dims);
    if (ok) {
        bool same = rk == rank;
        for (int i = 0; same && i < rank; i++) same = dims[i] == want[i];
        if (!same) {
            char a[96], b[96];
            shape_text(a, sizeof a, rk, dims);
            shape_text(b, sizeof b, rank, want);
            rfail(r, EF_EINPUT, "dataset '%s' has shape %s, expected %s", path, a, b);
            ok = false;
        }
    }
    hid_t ft = ok ? H5Dget_type(d) : -1;
    if (ok) {
        H5T_class_t c = ft >= 0 ? H5Tget_class(ft) : H5T_NO_CLASS;
        if (c != H5T_FLOAT && c != H5T_INTEGER) {
            rfail(r, EF_EINPUT, "dataset '%s' does not hold numbers", path);
            ok = false;
        }
    }
    if (ft >= 0) H5Tclose(ft);
    hsize_t total = 1;
    for (int i = 0; i < rank; i++) total *= want[i];
    if (ok && total > 0 && H5Dread(d, mtype, H5S_ALL, H5S_ALL, H5P_DEFAULT, out) < 0) {
        rfail(r, EF_EIO, "cannot read dataset '%s' (H5Dread failed)", path);
        ok = false;
    }
    H5Dclose(d);
    return ok;
}

static bool rd_f64(rd *r, const char *path, int rank, const hsize_t *want, double *out)
{
    return rd_num(r, path, H5T_NATIVE_DOUBLE, rank, want, out);
}

static bool rd_i32(rd *r, const char *path, int rank, const hsize_t *want, int32_t *out)
{
    return rd_num(r, path, H5T_NATIVE_INT32, rank, want, out);
}

static char *dup_n(const char *s, size_t n)
{
    char *c = malloc(n + 1);
    if (!c) return NULL;
    memcpy(c, s, n);
    c[n] = '\0';
    return c;
}

/* Read a 1-D string dataset of n entries into out[n] (each malloc'ed; the caller frees
 * them, also after a failure: entries not read are NULL). Variable- or fixed-length. */
static bool rd_strs(rd *r, const char *path, ef_index n, char **out)
{
    for (ef_index i = 0; i < n; i++) out[i] = NULL;
    hid_t d = rd_open(r, path);
    if (d < 0) return false;
    int rk;
    hsize_t dims[4];
    bool ok = rd_shape(r, d, path, &rk, dims);
    if (ok && (rk != 1 || dims[0] != (hsize_t)n)) {
        rfail(r, EF_EINPUT, "dataset '%s' does not hold %lld names", path, (long long)n);
        ok = false;
    }
    hid_t ft = ok ? H5Dget_type(d) : -1;
    if (ok && (ft < 0 || H5Tget_class(ft) != H5T_STRING)) {
        rfail(r, EF_EINPUT, "dataset '%s' does not hold text", path);
        ok = false;
    }
    if (ok && n > 0) {
        if (H5Tis_variable_str(ft) > 0) {
            hid_t mt = str_type();
            hid_t sp = H5Dget_space(d);
            char **v = calloc((size_t)n, sizeof *v);
            if (!v || mt < 0 || sp < 0) {
                rfail(r, EF_ENOMEM, "out of memory reading '%s'", path);
                ok = false;
            } else if (H5Dread(d, mt, H5S_ALL, H5S_ALL, H5P_DEFAULT, v) < 0) {
                rfail(r, EF_EIO, "cannot read dataset '%s' (H5Dread failed)", path);
                ok = false;
            } else {
                for (ef_index i = 0; i < n && ok; i++) {
                    out[i] = dup_n(v[i] ? v[i] : "", v[i] ? strlen(v[i]) : 0);
                    if (!out[i]) { rfail(r, EF_ENOMEM, "out of memory reading '%s'", path); ok = false; }
                }
                vlen_reclaim(mt, sp, H5P_DEFAULT, v);
            }
            free(v);
            if (sp >= 0) H5Sclose(sp);
            if (mt >= 0) H5Tclose(mt);
        } else {
            size_t sz = H5Tget_size(ft);
            hid_t mt = H5Tcopy(ft);
            char *buf = sz ? malloc((size_t)n * sz) : NULL;
            if (!buf || mt < 0) {
                rfail(r, EF_ENOMEM, "out of memory reading '%s'", path);
                ok = false;
            } else if (H5Dread(d, mt, H5S_ALL, H5S_ALL, H5P_DEFAULT, buf) < 0) {
                rfail(r, EF_EIO, "cannot read dataset '%s' (H5Dread failed)", path);
                ok = false;
            } else {
                for (ef_index i = 0; i < n && ok; i++) {
                    const char *s = buf + (size_t)i * sz;
                    out[i] = dup_n(s, strnlen(s, sz));
                    if (!out[i]) { rfail(r, EF_ENOMEM, "out of memory reading '%s'", path); ok = false; }
                }
            }
            free(buf);
            if (mt >= 0) H5Tclose(mt);
        }
    }
    if (ft >= 0) H5Tclose(ft);
    H5Dclose(d);
    return ok;
}

/* attribute `name` of the object at `obj`; -1 when absent (not an error) */
static hid_t rd_attr_open(rd *r, const char *obj, const char *name)
{
    if (r->st != EF_OK || !rd_exists(r, obj)) return -1;
    if (H5Aexists_by_name(r->file, obj, name, H5P_DEFAULT) <= 0) return -1;
    return H5Aopen_by_name(r->file, obj, name, H5P_DEFAULT, H5P_DEFAULT);
}

/* Text attribute into buf; false when absent or not text (buf = ""). */
static bool rd_attr_str(rd *r, const char *obj, const char *name, char *buf, size_t cap)
{
    buf[0] = '\0';
    hid_t a = rd_attr_open(r, obj, name);
    if (a < 0) return false;
    hid_t ft = H5Aget_type(a), sp = H5Aget_space(a);
    bool ok = ft >= 0 && sp >= 0 && H5Tget_class(ft) == H5T_STRING &&
              H5Sget_simple_extent_type(sp) == H5S_SCALAR;
    if (ok && H5Tis_variable_str(ft) > 0) {
        hid_t mt = str_type();
        char *v = NULL;
        ok = mt >= 0 && H5Aread(a, mt, &v) >= 0;
        if (ok) snprintf(buf, cap, "%s", v ? v : "");
        if (v) H5free_memory(v);
        if (mt >= 0) H5Tclose(mt);
    } else if (ok) {
        size_t sz = H5Tget_size(ft);
        char *v = malloc(sz + 1);
        hid_t mt = H5Tcopy(ft);
        ok = v && mt >= 0 && H5Aread(a, mt, v) >= 0;
        if (ok) {
            v[sz] = '\0';
            snprintf(buf, cap, "%s", v);
        }
        free(v);
        if (mt >= 0) H5Tclose(mt);
    }
    if (ft >= 0) H5Tclose(ft);
    if (sp >= 0) H5Sclose(sp);
    H5Aclose(a);
    return ok;
}

/* Numeric attribute with exactly n values (n = 1: a scalar or a 1-element array). */
static bool rd_attr_num(rd *r, const char *obj, const char *name, hid_t mtype, hsize_t n, void *out)
{
    hid_t a = rd_attr_open(r, obj, name);
    if (a < 0) return false;
    hid_t ft = H5Aget_type(a), sp = H5Aget_space(a);
    H5T_class_t c = ft >= 0 ? H5Tget_class(ft) : H5T_NO_CLASS;
    hssize_t np = sp >= 0 ? H5Sget_simple_extent_npoints(sp) : -1;
    bool ok = (c == H5T_FLOAT || c == H5T_INTEGER) && np >= 0 && (hsize_t)np == n;
    if (ok && n > 0) ok = H5Aread(a, mtype, out) >= 0;
    if (ft >= 0) H5Tclose(ft);
    if (sp >= 0) H5Sclose(sp);
    H5Aclose(a);
    return ok;
}

static double rd_attr_f64(rd *r, const char *obj, const char *name, double dflt)
{
    double v;
    return rd_attr_num(r, obj, name, H5T_NATIVE_DOUBLE, 1, &v) ? v : dflt;
}

static int64_t rd_attr_i64(rd *r, const char *obj, const char *name, int64_t dflt)
{
    int64_t v;
    return rd_attr_num(r, obj, name, H5T_NATIVE_INT64, 1, &v) ? v : dflt;
}

/* Open a results file and check that it is ours and not newer. */
static void rd_open_file(rd *r, const char *path, ef_ctx *ctx)
{
    memset(r, 0, sizeof *r);
    r->file = -1;
    r->path = path;
    r->ctx = ctx;
    H5Eset_auto2(H5E_DEFAULT, NULL, NULL);
    FILE *f = fopen(path, "rb");
    if (!f) {
        rfail(r, EF_EIO, "cannot open the results file: %s", strerror(errno));
        return;
    }
    fclose(f);
    if (H5Fis_hdf5(path) <= 0) {
        rfail(r, EF_EINPUT, "not an eigenframe results file (not an HDF5 file)");
        return;
    }
    hid_t fapl = H5Pcreate(H5P_FILE_ACCESS);
    if (fapl >= 0) H5Pset_fclose_degree(fapl, H5F_CLOSE_STRONG);
    r->file = H5Fopen(path, H5F_ACC_RDONLY, fapl >= 0 ? fapl : H5P_DEFAULT);
    if (fapl >= 0) H5Pclose(fapl);
    if (r->file < 0) {
        rfail(r, EF_EIO, "cannot open the results file (H5Fopen failed)");
        return;
    }
    char fmt[64];
    if (!rd_attr_str(r, "/", "format", fmt, sizeof fmt) || strcmp(fmt, FORMAT_NAME) != 0) {
        rfail(r, EF_EINPUT, "not an eigenframe results file (no format attribute '%s')",
              FORMAT_NAME);
        return;
    }
    int64_t v = rd_attr_i64(r, "/", "format_version", -1);
    if (v > EF_RESULTS_FORMAT_VERSION) {
        rfail(r, EF_EINPUT,
              "results file format_version %lld is newer than this program reads (%d): "
              "use a newer eigenframe",
              (long long)v, EF_RESULTS_FORMAT_VERSION);
    } else if (v < 1) {
        rfail(r, EF_EINPUT, "results file has no valid format_version attribute");
    }
}

static void rd_close_file(rd *r)
{
    if (r->file >= 0) H5Fclose(r->file);
    r->file = -1;
}

ef_status ef_results_read_hdf5_info(const char *path, ef_results_file_info *info, ef_ctx *ctx)
{
    rd r;
    memset(info, 0, sizeof *info);
    rd_open_file(&r, path, ctx);
    if (r.st == EF_OK) {
        info->format_version = (int)rd_attr_i64(&r, "/", "format_version", 0);
        rd_attr_str(&r, "/", "program_version", info->program_version, sizeof info->program_version);
        rd_attr_str(&r, "/", "created_utc", info->created_utc, sizeof info->created_utc);
        rd_attr_str(&r, "/", "model_file", info->model_file, sizeof info->model_file);
        rd_attr_str(&r, "/", "model_sha256", info->model_sha256, sizeof info->model_sha256);
    }
    rd_close_file(&r);
    return r.st;
}

static int hexval(char c)
{
    if (c >= '0' && c <= '9') return c - '0';
    if (c >= 'a' && c <= 'f') return c - 'a' + 10;
    if (c >= 'A' && c <= 'F') return c - 'A' + 10;
    return -1;
}

/* The stub model: everything the file records about the model. */
static void read_model(rd *r, ef_model *m)
{
    char buf[4 * MAX_NAME];
    if (rd_attr_str(r, "/", "model_file", buf, sizeof buf) && !(m->file = strdup(buf)))
        rfail(r, EF_ENOMEM, "out of memory");
    if (rd_attr_str(r, "/", "title", buf, sizeof buf) && !(m->title = strdup(buf)))
        rfail(r, EF_ENOMEM, "out of memory");
    if (rd_attr_str(r, "/", "model_sha256", buf, sizeof buf) && strlen(buf) == 64)
        for (int i = 0; i < 32; i++) {
            int hi = hexval(buf[2 * i]), lo = hexval(buf[2 * i + 1]);
            m->sha256[i] = (unsigned char)(hi >= 0 && lo >= 0 ? 16 * hi + lo : 0);
        }
    if (!rd_attr_str(r, "/", "units_force", buf, sizeof buf) ||
        !ef_units_parse_force(buf, &m->units.force))
        rfail(r, EF_EINPUT, "root attribute 'units_force' is missing or unknown ('%s')", buf);
    if (!rd_attr_str(r, "/", "units_length", buf, sizeof buf) ||
        !ef_units_parse_length(buf, &m->units.length))
        rfail(r, EF_EINPUT, "root attribute 'units_length' is missing or unknown ('%s')", buf);
    m->gravity_dir[2] = -1.0;
    rd_attr_num(r, "/model", "gravity_dir", H5T_NATIVE_DOUBLE, 3, m->gravity_dir);
    m->divisions = (int)rd_attr_i64(r, "/model", "divisions", 4);
    m->stations = (int)rd_attr_i64(r, "/model", "stations", 11);
    m->restrain_all = (unsigned)rd_attr_i64(r, "/model", "restrain_all", 0) & EF_ALL_DOF;
    if (r->st != EF_OK) return;

    /* nodes */
    ef_index nn = rd_len(r, "/model/nodes/xyz");
    if (nn < 0) return;
    m->nodes = calloc((size_t)EF_MAX(nn, 1), sizeof *m->nodes);
    char **names = calloc((size_t)EF_MAX(nn, 1), sizeof *names);
    double *xyz = malloc((size_t)EF_MAX(nn, 1) * 3 * sizeof *xyz);
    if (!m->nodes || !names || !xyz) {
        free(names);
        free(xyz);
        rfail(r, EF_ENOMEM, "out of memory");
        return;
    }
    m->n_nodes = nn;
    hsize_t d2[2] = {(hsize_t)nn, 3};
    rd_strs(r, "/model/nodes/names", nn, names);
    rd_f64(r, "/model/nodes/xyz", 2, d2, xyz);
    for (ef_index i = 0; i < nn; i++) {
        m->nodes[i].name = names[i];
        memcpy(m->nodes[i].xyz, xyz + 3 * i, sizeof m->nodes[i].xyz);
    }
    free(names);
    free(xyz);
    if (r->st != EF_OK) return;

    /* members */
    ef_index nm = rd_len(r, "/model/members/names");
    if (nm < 0) return;
    size_t nm1 = (size_t)EF_MAX(nm, 1);
    m->members = calloc(nm1, sizeof *m->members);
    names = calloc(nm1, sizeof *names);
    double *axes = malloc(nm1 * 9 * sizeof *axes), *len = malloc(nm1 * sizeof *len);
    int32_t *ends = malloc(nm1 * 2 * sizeof *ends), *st = malloc(nm1 * sizeof *st),
            *div = malloc(nm1 * sizeof *div), *ax = malloc(nm1 * sizeof *ax),
            *rel = malloc(nm1 * 2 * sizeof *rel);
    if (!m->members || !names || !axes || !len || !ends || !st || !div || !ax || !rel) {
        rfail(r, EF_ENOMEM, "out of memory");
    } else {
        m->n_members = nm;
        hsize_t d1[1] = {(hsize_t)nm}, e2[2] = {(hsize_t)nm, 2}, d3[3] = {(hsize_t)nm, 3, 3};
        rd_strs(r, "/model/members/names", nm, names);
        rd_i32(r, "/model/members/nodes", 2, e2, ends);
        rd_f64(r, "/model/members/axes", 3, d3, axes);
        rd_f64(r, "/model/members/length", 1, d1, len);
        rd_i32(r, "/model/members/stations", 1, d1, st);
        /* optional additions */
        for (ef_index k = 0; k < nm; k++) {
            div[k] = m->divisions;
            ax[k] = 0;
            rel[2 * k] = rel[2 * k + 1] = 0;
        }
        if (rd_exists(r, "/model/members/divisions")) rd_i32(r, "/model/members/divisions", 1, d1, div);
        if (rd_exists(r, "/model/members/axial_only")) rd_i32(r, "/model/members/axial_only", 1, d1, ax);
        if (rd_exists(r, "/model/members/releases")) rd_i32(r, "/model/members/releases", 2, e2, rel);
        for (ef_index k = 0; k < nm; k++) {
            ef_member *b = &m->members[k];
            b->name = names[k];
            b->section = b->material = EF_NONE;
            if (r->st != EF_OK) continue;
            for (int e = 0; e < 2; e++) {
                b->node[e] = ends[2 * k + e];
                if (b->node[e] < 0 || b->node[e] >= nn)
                    rfail(r, EF_EINPUT, "member '%s': node index %lld out of range", b->name,
                          (long long)b->node[e]);
                b->release[e] = (unsigned)rel[2 * k + e] & EF_ALL_DOF;
            }
            memcpy(b->axes, axes + 9 * k, sizeof b->axes);
            b->length = len[k];
            b->stations = st[k];
            b->divisions = div[k];
            b->axial_only = ax[k] != 0;
            if (st[k] < 1 || st[k] > 1000000)
                rfail(r, EF_EINPUT, "member '%s': %d stations is out of range", b->name, (int)st[k]);
        }
    }
    free(names);
    free(axes);
    free(len);
    free(ends);
    free(st);
    free(div);
    free(ax);
    free(rel);
    if (r->st != EF_OK) return;

    /* supports */
    if (rd_exists(r, "/model/supports/node")) {
        ef_index ns = rd_len(r, "/model/supports/node");
        if (ns < 0) return;
        size_t ns1 = (size_t)EF_MAX(ns, 1);
        m->supports = calloc(ns1, sizeof *m->supports);
        int32_t *node = malloc(ns1 * sizeof *node), *held = malloc(ns1 * sizeof *held);
        double *spr = malloc(ns1 * 6 * sizeof *spr);
        if (!m->supports || !node || !held || !spr) {
            rfail(r, EF_ENOMEM, "out of memory");
        } else {
            hsize_t d1[1] = {(hsize_t)ns}, s2[2] = {(hsize_t)ns, 6};
            m->n_supports = ns;
            rd_i32(r, "/model/supports/node", 1, d1, node);
            rd_i32(r, "/model/supports/held", 1, d1, held);
            rd_f64(r, "/model/supports/springs", 2, s2, spr);
            for (ef_index s = 0; s < ns && r->st == EF_OK; s++) {
                m->supports[s].node = node[s];
                m->supports[s].held = (unsigned)held[s] & EF_ALL_DOF;
                memcpy(m->supports[s].spring, spr + 6 * s, sizeof m->supports[s].spring);
                if (node[s] < 0 || node[s] >= nn)
                    rfail(r, EF_EINPUT, "support %lld: node index %d out of range", (long long)s,
                          (int)node[s]);
            }
        }
        free(node);
        free(held);
        free(spr);
        if (r->st != EF_OK) return;
    }

    /* loads: cases first, then combinations (the shared load index) */
    ef_index nl = rd_len(r, "/model/loads/names");
    if (nl < 0) return;
    size_t nl1 = (size_t)EF_MAX(nl, 1);
    char **ln = calloc(nl1, sizeof *ln), **lk = calloc(nl1, sizeof *lk);
    m->cases = calloc(nl1, sizeof *m->cases);
    m->combos = calloc(nl1, sizeof *m->combos);
    if (!ln || !lk || !m->cases || !m->combos) {
        rfail(r, EF_ENOMEM, "out of memory");
    } else {
        rd_strs(r, "/model/loads/names", nl, ln);
        rd_strs(r, "/model/loads/kind", nl, lk);
        for (int pass = 0; pass < 2 && r->st == EF_OK; pass++)
            for (ef_index l = 0; l < nl; l++) {
                bool combo = !strcmp(lk[l], "combination");
                if (!combo && strcmp(lk[l], "case"))
                    rfail(r, EF_EINPUT, "load '%s': unknown kind '%s'", ln[l], lk[l]);
                if (combo != (pass == 1)) continue;
                if (combo) m->combos[m->n_combos++].name = ln[l];
                else m->cases[m->n_cases++].name = ln[l];
                ln[l] = NULL;                /* moved into the model */
            }
    }
    for (ef_index l = 0; l < nl && ln && lk; l++) {
        free(ln[l]);
        free(lk[l]);
    }
    free(ln);
    free(lk);
    if (r->st == EF_OK && ef_model_index_names(m) != EF_OK) rfail(r, EF_ENOMEM, "out of memory");
}

static void read_load(rd *r, ef_results *res, const char *top, const char *name,
                      ef_load_result *lr, bool second)
{
    const ef_model *m = res->model;
    char g[PATH_CAP], p[PATH_CAP];
    snprintf(g, sizeof g, "%s/%s", top, name);
    ef_index load = ef_model_find_load(m, name);
    if (load == EF_NONE) {
        rfail(r, EF_EINPUT, "group '%s' names no load of the model", g);
        return;
    }
    if (ef_load_result_alloc(res, lr, second) != EF_OK) {
        rfail(r, EF_ENOMEM, "out of memory");
        return;
    }
    lr->load = load;
    hsize_t d2[2] = {(hsize_t)m->n_nodes, 6}, d3[3] = {(hsize_t)m->n_members, 2, 6}, d6[1] = {6};
    join(p, sizeof p, g, "/displacements", NULL);
    rd_f64(r, p, 2, d2, lr->disp);
    join(p, sizeof p, g, "/reactions", NULL);
    rd_f64(r, p, 2, d2, lr->react);
    join(p, sizeof p, g, "/end_forces", NULL);
    rd_f64(r, p, 3, d3, lr->end_forces);
    join(p, sizeof p, g, "/applied", NULL);
    if (rd_exists(r, p)) rd_f64(r, p, 1, d6, lr->applied);
    join(p, sizeof p, g, "/reaction_sum", NULL);
    if (rd_exists(r, p)) rd_f64(r, p, 1, d6, lr->reaction_sum);
    lr->eq_residual = rd_attr_f64(r, g, "equilibrium_residual", NAN);
    lr->solve_residual = rd_attr_f64(r, g, "solve_residual", NAN);
    for (ef_index k = 0; k < m->n_members && r->st == EF_OK; k++) {
        ef_index s0 = res->st_first[k], s1 = res->st_first[k + 1];
        hsize_t ds[2] = {(hsize_t)(s1 - s0), 7};
        join(p, sizeof p, g, "/stations/", m->members[k].name);
        rd_f64(r, p, 2, ds, lr->stations + 7 * s0);
    }
    if (second) {
        char s[32];
        join(p, sizeof p, g, "/amplification", NULL);
        if (rd_exists(r, p)) {
            rd_f64(r, p, 3, d3, lr->amplification);
        } else {
            for (ef_index i = 0; i < 12 * m->n_members; i++) lr->amplification[i] = NAN;
        }
        lr->iterations = (int)rd_attr_i64(r, g, "iterations", 0);
        lr->converged = rd_attr_i64(r, g, "converged", 0) != 0;
        lr->tolerance = rd_attr_f64(r, g, "tolerance", NAN);
        lr->residual = rd_attr_f64(r, g, "residual", NAN);
        lr->chord_only = rd_attr_str(r, g, "pdelta", s, sizeof s) && !strcmp(s, "chord");
    }
}

/* Names of the loads analysed under `top`: the group's `loads` attribute (analysis
 * order), else the model's loads that have a group there, in the shared index order.
 * Returns the count; *out holds malloc'ed names (the caller frees each and the array). */
static ef_index load_order(rd *r, const ef_model *m, const char *top, char ***out)
{
    ef_index nl = ef_model_n_loads(m), n = 0;
    char **names = NULL;
    *out = NULL;
    hid_t a = rd_attr_open(r, top, "loads");
    if (a >= 0) {
        hid_t ft = H5Aget_type(a), sp = H5Aget_space(a);
        hssize_t np = sp >= 0 ? H5Sget_simple_extent_npoints(sp) : -1;
        if (ft >= 0 && H5Tget_class(ft) == H5T_STRING && H5Tis_variable_str(ft) > 0 && np >= 0 &&
            np <= 10 * (nl + 1)) {
            hid_t mt = str_type();
            char **v = calloc((size_t)EF_MAX(np, 1), sizeof *v);
            names = calloc((size_t)EF_MAX(np, 1), sizeof *names);
            if (v && names && mt >= 0 && (np == 0 || H5Aread(a, mt, v) >= 0)) {
                for (hssize_t i = 0; i < np; i++) {
                    names[n] = strdup(v[i] ? v[i] : "");
                    if (names[n]) n++;
                    else rfail(r, EF_ENOMEM, "out of memory");
                }
                if (np > 0) vlen_reclaim(mt, sp, H5P_DEFAULT, v);
            } else {
                rfail(r, EF_EINPUT, "attribute '%s@loads' cannot be read", top);
            }
            free(v);
            if (mt >= 0) H5Tclose(mt);
        } else {
            rfail(r, EF_EINPUT, "attribute '%s@loads' is not a list of names", top);
        }
        if (ft >= 0) H5Tclose(ft);
        if (sp >= 0) H5Sclose(sp);
        H5Aclose(a);
    } else {
        names = calloc((size_t)EF_MAX(nl, 1), sizeof *names);
        if (!names) rfail(r, EF_ENOMEM, "out of memory");
        for (ef_index l = 0; names && l < nl && r->st == EF_OK; l++) {
            char p[PATH_CAP];
            snprintf(p, sizeof p, "%s/%s", top, ef_model_load_name(m, l));
            if (!rd_exists(r, p)) continue;
            names[n] = strdup(ef_model_load_name(m, l));
            if (names[n]) n++;
            else rfail(r, EF_ENOMEM, "out of memory");
        }
    }
    *out = names;
    return n;
}

static void read_loads(rd *r, ef_results *res, const char *top, bool second)
{
    if (r->st != EF_OK || !rd_exists(r, top)) return;
    char **names = NULL;
    ef_index n = load_order(r, res->model, top, &names);
    ef_load_result *lr = calloc((size_t)EF_MAX(n, 1), sizeof *lr);
    if (!lr) rfail(r, EF_ENOMEM, "out of memory");
    if (second) res->second = lr;
    else res->statics = lr;
    for (ef_index i = 0; lr && i < n && r->st == EF_OK; i++) {
        read_load(r, res, top, names[i], &lr[i], second);
        if (second) res->n_second = i + 1;     /* lr[i] allocated: freed with res */
        else res->n_statics = i + 1;
    }
    for (ef_index i = 0; i < n; i++) free(names[i]);
    free(names);
}

static void read_modal(rd *r, ef_results *res)
{
    if (r->st != EF_OK || !rd_exists(r, "/modal")) return;
    const ef_model *m = res->model;
    ef_index k = rd_len(r, "/modal/frequencies");
    if (k < 0) return;
    ef_modal_result *mr = calloc(1, sizeof *mr);
    if (!mr) { rfail(r, EF_ENOMEM, "out of memory"); return; }
    res->modal = mr;
    size_t k1 = (size_t)EF_MAX(k, 1);
    mr->n_modes = (int)k;
    mr->omega2 = malloc(k1 * sizeof(double));
    mr->freq = malloc(k1 * sizeof(double));
    mr->shapes = malloc(k1 * (size_t)EF_MAX(m->n_nodes, 1) * 6 * sizeof(double));
    mr->participation = malloc(k1 * 6 * sizeof(double));
    mr->eff_mass = malloc(k1 * 6 * sizeof(double));
    mr->eff_ratio = malloc(k1 * 6 * sizeof(double));
    mr->unitmax_mass = malloc(k1 * sizeof(double));
    mr->residual = malloc(k1 * sizeof(double));
    if (!mr->omega2 || !mr->freq || !mr->shapes || !mr->participation || !mr->eff_mass ||
        !mr->eff_ratio || !mr->unitmax_mass || !mr->residual) {
        rfail(r, EF_ENOMEM, "out of memory");
        return;
    }
    hsize_t d1[1] = {(hsize_t)k}, d2[2] = {(hsize_t)k, 6}, d3[3] = {(hsize_t)k, (hsize_t)m->n_nodes, 6},
            d6[1] = {6};
    rd_f64(r, "/modal/frequencies", 1, d1, mr->freq);
    if (rd_exists(r, "/modal/eigenvalues")) {
        rd_f64(r, "/modal/eigenvalues", 1, d1, mr->omega2);
    } else {
        for (ef_index i = 0; i < k; i++) mr->omega2[i] = pow(2.0 * PI * mr->freq[i], 2);
    }
    rd_f64(r, "/modal/shapes", 3, d3, mr->shapes);
    rd_f64(r, "/modal/participation", 2, d2, mr->participation);
    rd_f64(r, "/modal/effective_mass", 2, d2, mr->eff_mass);
    rd_f64(r, "/modal/effective_mass_ratio", 2, d2, mr->eff_ratio);
    rd_f64(r, rd_exists(r, "/modal/participating_mass") ? "/modal/participating_mass"
                                                         : "/modal/total_mass", 1, d6, mr->total_mass);
    if (rd_exists(r, "/modal/modal_mass_unitmax")) {
        rd_f64(r, "/modal/modal_mass_unitmax", 1, d1, mr->unitmax_mass);
    } else {
        for (ef_index i = 0; i < k; i++) mr->unitmax_mass[i] = NAN;
    }
    if (!rd_attr_num(r, "/modal", "residuals", H5T_NATIVE_DOUBLE, (hsize_t)k, mr->residual))
        for (ef_index i = 0; i < k; i++) mr->residual[i] = NAN;
    rd_attr_num(r, "/modal", "reference_point", H5T_NATIVE_DOUBLE, 3, mr->ref_point);
    rd_attr_str(r, "/modal", "mass_source", mr->mass_source, sizeof mr->mass_source);
    mr->model_mass = rd_attr_f64(r, "/modal", "model_mass", NAN);
    mr->lumped = rd_attr_i64(r, "/modal", "lumped", 0) != 0;
    mr->ncv = (int)rd_attr_i64(r, "/modal", "lanczos_basis", 0);
    mr->tol = rd_attr_f64(r, "/modal", "tolerance", NAN);
    mr->n_op = rd_attr_i64(r, "/modal", "operator_applications", 0);
    mr->shift = rd_attr_f64(r, "/modal", "shift", NAN);
    mr->n_rigid = (int)rd_attr_i64(r, "/modal", "rigid_modes", 0);
}

/* first group name under /buckling (H5Literate callback) */
static herr_t first_link(hid_t g, const char *name, const H5L_info_t *info, void *data)
{
    (void)g;
    (void)info;
    snprintf((char *)data, MAX_NAME + 1, "%s", name);
    return 1;                                   /* stop */
}

static void read_buckling(rd *r, ef_results *res)
{
    if (r->st != EF_OK || !rd_exists(r, "/buckling")) return;
    const ef_model *m = res->model;
    char name[MAX_NAME + 1] = "", g[PATH_CAP], p[PATH_CAP];
    hid_t grp = H5Gopen2(r->file, "/buckling", H5P_DEFAULT);
    hsize_t idx = 0;
    if (grp < 0 || H5Literate(grp, H5_INDEX_NAME, H5_ITER_INC, &idx, first_link, name) < 0 ||
        !name[0]) {
        if (grp >= 0) H5Gclose(grp);
        rfail(r, EF_EINPUT, "group '/buckling' holds no load");
        return;
    }
    H5Gclose(grp);
    snprintf(g, sizeof g, "/buckling/%s", name);
    ef_index load = ef_model_find_load(m, name);
    if (load == EF_NONE) {
        rfail(r, EF_EINPUT, "group '%s' names no load of the model", g);
        return;
    }
    join(p, sizeof p, g, "/factors", NULL);
    ef_index k = rd_len(r, p);
    if (k < 0) return;
    ef_buckling_result *br = calloc(1, sizeof *br);
    if (!br) { rfail(r, EF_ENOMEM, "out of memory"); return; }
    res->buckling = br;
    br->load = load;
    br->n_pos = (int)k;
    size_t k1 = (size_t)EF_MAX(k, 1), nm1 = (size_t)EF_MAX(m->n_members, 1);
    br->factors = malloc(k1 * sizeof(double));
    br->shapes = malloc(k1 * (size_t)EF_MAX(m->n_nodes, 1) * 6 * sizeof(double));
    br->residual = malloc(k1 * sizeof(double));
    br->member_share = calloc(k1 * nm1, sizeof(double));
    br->kind = calloc(k1, sizeof(int));
    br->dominant = malloc(k1 * sizeof(ef_index));
    br->axial0 = calloc(nm1, sizeof(double));
    int32_t *dom = malloc(k1 * sizeof *dom);
    char **kinds = calloc(k1, sizeof *kinds);
    if (!br->factors || !br->shapes || !br->residual || !br->member_share || !br->kind ||
        !br->dominant || !br->axial0 || !dom || !kinds) {
        rfail(r, EF_ENOMEM, "out of memory");
        goto done;
    }
    hsize_t d1[1] = {(hsize_t)k}, d2[2] = {(hsize_t)k, (hsize_t)m->n_members},
            d3[3] = {(hsize_t)k, (hsize_t)m->n_nodes, 6}, dm[1] = {(hsize_t)m->n_members};
    rd_f64(r, p, 1, d1, br->factors);
    join(p, sizeof p, g, "/negative_factors", NULL);
    if (rd_exists(r, p)) {
        ef_index j = rd_len(r, p);
        if (j >= 0) {
            hsize_t dj[1] = {(hsize_t)j};
            br->neg_factors = malloc((size_t)EF_MAX(j, 1) * sizeof(double));
            if (!br->neg_factors) rfail(r, EF_ENOMEM, "out of memory");
            else if (rd_f64(r, p, 1, dj, br->neg_factors)) br->n_neg = (int)j;
        }
    }
    join(p, sizeof p, g, "/shapes", NULL);
    rd_f64(r, p, 3, d3, br->shapes);
    join(p, sizeof p, g, "/member_share", NULL);
    if (rd_exists(r, p)) rd_f64(r, p, 2, d2, br->member_share);
    join(p, sizeof p, g, "/axial_force", NULL);
    if (rd_exists(r, p)) rd_f64(r, p, 1, dm, br->axial0);
    for (ef_index i = 0; i < k; i++) dom[i] = -1;
    join(p, sizeof p, g, "/dominant_member", NULL);
    if (rd_exists(r, p)) rd_i32(r, p, 1, d1, dom);
    for (ef_index i = 0; i < k; i++)
        br->dominant[i] = (dom[i] >= 0 && dom[i] < m->n_members) ? dom[i] : EF_NONE;
    join(p, sizeof p, g, "/kind", NULL);
    if (rd_exists(r, p) && rd_strs(r, p, k, kinds))
        for (ef_index i = 0; i < k; i++)
            for (int c = 0; c < 3; c++)
                if (!strcmp(kinds[i], kind_names[c])) br->kind[i] = c;
    if (!rd_attr_num(r, g, "residuals", H5T_NATIVE_DOUBLE, (hsize_t)k, br->residual))
        for (ef_index i = 0; i < k; i++) br->residual[i] = NAN;
    br->n_op = rd_attr_i64(r, g, "operator_applications", 0);
    br->found_none = rd_attr_i64(r, g, "found_none", 0) != 0;
done:
    for (ef_index i = 0; kinds && i < k; i++) free(kinds[i]);
    free(kinds);
    free(dom);
}

/* node names -> model node indices; false (and a message) when one is not a node */
static bool rd_nodes(rd *r, const ef_model *m, const char *path, ef_index n, ef_index *out)
{
    char **v = calloc((size_t)EF_MAX(n, 1), sizeof *v);
    if (!v) { rfail(r, EF_ENOMEM, "out of memory"); return false; }
    bool ok = rd_strs(r, path, n, v);
    for (ef_index i = 0; i < n && ok; i++) {
        out[i] = ef_model_find_node(m, v[i]);
        if (out[i] == EF_NONE) {
            rfail(r, EF_EINPUT, "dataset '%s': '%s' is not a node of the model", path, v[i]);
            ok = false;
        }
    }
    for (ef_index i = 0; i < n; i++) free(v[i]);
    free(v);
    return ok;
}

static void rd_ints(rd *r, const char *path, ef_index n, int *out)
{
    int32_t *v = malloc((size_t)EF_MAX(n, 1) * sizeof *v);
    hsize_t d[1] = {(hsize_t)n};
    if (!v) { rfail(r, EF_ENOMEM, "out of memory"); return; }
    if (rd_i32(r, path, 1, d, v))
        for (ef_index i = 0; i < n; i++) out[i] = v[i];
    free(v);
}

static void read_walking(rd *r, ef_results *res)
{
    if (r->st != EF_OK || !rd_exists(r, "/walking")) return;
    const ef_model *m = res->model;
    const char *g = "/walking";
    ef_index nr = rd_len(r, "/walking/R");
    ef_index nk = rd_exists(r, "/walking/vertical_share") ? rd_len(r, "/walking/vertical_share") : 0;
    if (nr < 0 || nk < 0) return;
    ef_walking_result *wk = NULL;
    if (ef_vibration_walking_alloc(nr, (int)nk, &wk) != EF_OK) {
        rfail(r, EF_ENOMEM, "out of memory");
        return;
    }
    res->walking = wk;
    hsize_t dr[1] = {(hsize_t)nr}, dk[1] = {(hsize_t)nk};
    char txt[256];
    rd_nodes(r, m, "/walking/receivers", nr, wk->receivers);
    rd_f64(r, "/walking/R", 1, dr, wk->R);
    rd_f64(r, "/walking/a_w_rms", 1, dr, wk->response_rms);
    char **meth = calloc((size_t)EF_MAX(nr, 1), sizeof *meth);
    if (!meth) rfail(r, EF_ENOMEM, "out of memory");
    else if (rd_strs(r, "/walking/method", nr, meth))
        for (ef_index i = 0; i < nr; i++) wk->method[i] = !strcmp(meth[i], "transient") ? 1 : 0;
    for (ef_index i = 0; meth && i < nr; i++) free(meth[i]);
    free(meth);
    rd_f64(r, "/walking/pace_hz", 1, dr, wk->pace_hz);
    rd_ints(r, "/walking/harmonic", nr, wk->harmonic);
    rd_ints(r, "/walking/mode", nr, wk->mode);
    rd_nodes(r, m, "/walking/walker", nr, wk->walker);
    if (rd_exists(r, "/walking/R_resonant")) rd_f64(r, "/walking/R_resonant", 1, dr, wk->R_resonant);
    if (rd_exists(r, "/walking/R_transient")) rd_f64(r, "/walking/R_transient", 1, dr, wk->R_transient);
    if (rd_exists(r, "/walking/rms_resonant")) rd_f64(r, "/walking/rms_resonant", 1, dr, wk->rms_resonant);
    if (rd_exists(r, "/walking/rms_transient")) rd_f64(r, "/walking/rms_transient", 1, dr, wk->rms_transient);
    if (nk > 0) {
        rd_f64(r, "/walking/vertical_share", 1, dk, wk->vertical_share);
        if (rd_exists(r, "/walking/floor_motion")) rd_f64(r, "/walking/floor_motion", 1, dk, wk->floor_motion);
        if (rd_exists(r, "/walking/is_vertical")) rd_ints(r, "/walking/is_vertical", nk, wk->is_vertical);
        if (rd_exists(r, "/walking/pace_flags")) rd_ints(r, "/walking/pace_flags", nk, wk->pace_flags);
    }
    wk->damping = rd_attr_f64(r, g, "damping", NAN);
    wk->walker_weight = rd_attr_f64(r, g, "walker_weight", NAN);
    rd_attr_num(r, g, "pace_hz", H5T_NATIVE_DOUBLE, 2, wk->pace);
    wk->weighting = rd_attr_str(r, g, "weighting", txt, sizeof txt) && !strcmp(txt, "Wg") ? 1 : 0;
    wk->path_length = rd_attr_f64(r, g, "path_length", 0.0);
    wk->limit_R = rd_attr_f64(r, g, "limit_R", 0.0);
    wk->modes_used = (int)rd_attr_i64(r, g, "modes_used", 0);
    wk->f1_vertical = rd_attr_f64(r, g, "f1_vertical", NAN);
    wk->f1_mode = (int)rd_attr_i64(r, g, "f1_mode", 0);
    wk->f_selfweight = rd_attr_f64(r, g, "f_selfweight", NAN);
    wk->delta_selfweight = rd_attr_f64(r, g, "delta_selfweight", NAN);
    rd_attr_str(r, g, "delta_where", wk->delta_where, sizeof wk->delta_where);
    wk->methods = (int)rd_attr_i64(r, g, "methods", 0);
    wk->cutoff_resonant = rd_attr_f64(r, g, "cutoff_resonant", NAN);
    wk->cutoff_transient = rd_attr_f64(r, g, "cutoff_transient", 0.0);
    wk->modes_resonant = (int)rd_attr_i64(r, g, "modes_resonant", 0);
    wk->modes_transient = (int)rd_attr_i64(r, g, "modes_transient", 0);
    wk->highest_hz = rd_attr_f64(r, g, "highest_hz", NAN);
    wk->n_pace = (int)rd_attr_i64(r, g, "pace_frequencies_scanned", 0);
    wk->pace_transient = rd_attr_f64(r, g, "pace_transient", NAN);
}

/* names of the groups under `path` in name order (H5Literate callback) */
typedef struct {
    char **names;
    ef_index n, cap;
    bool oom;
} name_list;

static herr_t collect_link(hid_t g, const char *name, const H5L_info_t *info, void *data)
{
    (void)g;
    (void)info;
    name_list *l = data;
    if (l->n == l->cap) {
        ef_index cap = l->cap ? 2 * l->cap : 8;
        char **v = realloc(l->names, (size_t)cap * sizeof *v);
        if (!v) { l->oom = true; return -1; }
        l->names = v;
        l->cap = cap;
    }
    if (!(l->names[l->n] = strdup(name))) { l->oom = true; return -1; }
    l->n++;
    return 0;
}

static void read_machine(rd *r, const ef_model *m, const char *name, ef_machine_result *mc)
{
    char g[PATH_CAP], p[PATH_CAP], txt[MAX_NAME + 1];
    join(g, sizeof g, "/machines/", name, NULL);
    ef_index nr = rd_len(r, join(p, sizeof p, g, "/R", NULL));
    ef_index ns = rd_len(r, join(p, sizeof p, g, "/hz", NULL));
    if (nr < 0 || ns < 0) return;
    if (ef_vibration_machine_alloc(name, (int)ns, nr, mc) != EF_OK) {
        rfail(r, EF_ENOMEM, "out of memory");
        return;
    }
    hsize_t dr[1] = {(hsize_t)nr}, ds[1] = {(hsize_t)ns}, d3[3] = {(hsize_t)ns, (hsize_t)nr, 3},
            d2[2] = {(hsize_t)ns, (hsize_t)nr};
    rd_nodes(r, m, join(p, sizeof p, g, "/receivers", NULL), nr, mc->receivers);
    rd_f64(r, join(p, sizeof p, g, "/hz", NULL), 1, ds, mc->hz);
    rd_f64(r, join(p, sizeof p, g, "/displacement", NULL), 3, d3, mc->disp);
    rd_f64(r, join(p, sizeof p, g, "/velocity", NULL), 3, d3, mc->vel);
    rd_f64(r, join(p, sizeof p, g, "/acceleration", NULL), 3, d3, mc->acc);
    rd_f64(r, join(p, sizeof p, g, "/R", NULL), 1, dr, mc->R);
    if (rd_exists(r, join(p, sizeof p, g, "/R_hz", NULL))) rd_f64(r, p, 1, dr, mc->R_hz);
    if (rd_exists(r, join(p, sizeof p, g, "/R_scan", NULL))) rd_f64(r, p, 2, d2, mc->R_scan);
    if (rd_exists(r, join(p, sizeof p, g, "/R_horizontal", NULL))) rd_f64(r, p, 1, dr, mc->R_horizontal);
    if (rd_exists(r, join(p, sizeof p, g, "/R_horizontal_hz", NULL))) rd_f64(r, p, 1, dr, mc->R_horizontal_hz);
    if (rd_attr_str(r, g, "node", txt, sizeof txt)) mc->node = ef_model_find_node(m, txt);
    rd_attr_num(r, g, "force", H5T_NATIVE_DOUBLE, 3, mc->force);
    mc->hz_nominal = rd_attr_f64(r, g, "hz_nominal", NAN);
    mc->sweep = rd_attr_f64(r, g, "sweep", 0.0);
    mc->damping = rd_attr_f64(r, g, "damping", NAN);
    mc->weighting = rd_attr_str(r, g, "weighting", txt, sizeof txt) && !strcmp(txt, "Wg") ? 1 : 0;
    mc->modes_used = (int)rd_attr_i64(r, g, "modes_used", 0);
    mc->highest_hz = rd_attr_f64(r, g, "highest_hz", NAN);
    mc->corrected = rd_attr_i64(r, g, "corrected", 0) != 0;
    mc->beyond_modes = rd_attr_i64(r, g, "beyond_modes", 0) != 0;
}

static void read_machines(rd *r, ef_results *res)
{
    if (r->st != EF_OK || !rd_exists(r, "/machines")) return;
    name_list l = {NULL, 0, 0, false};
    /* analysis order from the `machines` attribute, else name order */
    hid_t a = rd_attr_open(r, "/machines", "machines");
    if (a >= 0) {
        hid_t sp = H5Aget_space(a), mt = str_type();
        hssize_t np = sp >= 0 ? H5Sget_simple_extent_npoints(sp) : -1;
        char **v = np > 0 && np < 1000000 ? calloc((size_t)np, sizeof *v) : NULL;
        if (v && mt >= 0 && H5Aread(a, mt, v) >= 0) {
            for (hssize_t i = 0; i < np && !l.oom; i++) collect_link(-1, v[i] ? v[i] : "", NULL, &l);
            vlen_reclaim(mt, sp, H5P_DEFAULT, v);
        }
        free(v);
        if (mt >= 0) H5Tclose(mt);
        if (sp >= 0) H5Sclose(sp);
        H5Aclose(a);
    } else {
        hid_t grp = H5Gopen2(r->file, "/machines", H5P_DEFAULT);
        hsize_t idx = 0;
        if (grp >= 0) {
            H5Literate(grp, H5_INDEX_NAME, H5_ITER_INC, &idx, collect_link, &l);
            H5Gclose(grp);
        }
    }
    if (l.oom) rfail(r, EF_ENOMEM, "out of memory");
    if (l.n > 0 && r->st == EF_OK) {
        res->machines = calloc((size_t)l.n, sizeof *res->machines);
        if (!res->machines) rfail(r, EF_ENOMEM, "out of memory");
        for (ef_index t = 0; res->machines && t < l.n && r->st == EF_OK; t++) {
            read_machine(r, res->model, l.names[t], &res->machines[t]);
            res->n_machines = t + 1;       /* cleared (NULL-safe) with res */
        }
    }
    for (ef_index t = 0; t < l.n; t++) free(l.names[t]);
    free(l.names);
}

ef_status ef_results_read_hdf5(const char *path, ef_model **model, ef_results **results,
                               ef_ctx *ctx)
{
    rd r;
    ef_model *m = NULL;
    ef_results *res = NULL;
    *model = NULL;
    *results = NULL;
    rd_open_file(&r, path, ctx);
    if (r.st != EF_OK) goto done;
    if (!(m = calloc(1, sizeof *m))) {
        rfail(&r, EF_ENOMEM, "out of memory");
        goto done;
    }
    read_model(&r, m);
    if (r.st != EF_OK) goto done;
    if (ef_results_create(m, &res) != EF_OK) {
        rfail(&r, EF_ENOMEM, "out of memory");
        goto done;
    }
    res->n_mesh_nodes = rd_attr_i64(&r, "/model", "mesh_nodes", 0);
    res->n_elems = rd_attr_i64(&r, "/model", "elements", 0);
    res->n_eq = rd_attr_i64(&r, "/model", "equations", 0);
    res->n_dropped = rd_attr_i64(&r, "/model", "dropped_rotations", 0);
    read_loads(&r, res, "/static", false);
    read_loads(&r, res, "/second_order", true);
    read_modal(&r, res);
    read_buckling(&r, res);
    read_walking(&r, res);
    read_machines(&r, res);
done:
    rd_close_file(&r);
    if (r.st != EF_OK) {
        ef_results_free(&res);
        ef_model_free(&m);
        return r.st;
    }
    *model = m;
    *results = res;
    return EF_OK;
}
