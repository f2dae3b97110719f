/* test_results_hdf5.c: the HDF5 results file: a hand-built model and results written and
 * read back unchanged; the atomic write (an interrupted write leaves no file under the
 * final name and keeps an older one); refusal of files that are not ours.
 *
 * The results here are made-up numbers, not an analysis: this file tests storage only,
 * so the check values are the written values themselves (an f64 round trip is exact).
 * This test includes hdf5.h to make foreign files and to inspect what was written; the
 * program itself sees HDF5 only in results_hdf5.c.
 */
#define _POSIX_C_SOURCE 200809L
#include "support.h"

#include "results_hdf5.h"
#include "vibration.h"

#include <hdf5.h>

#include <dirent.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

/* ---- a small hand-built model and results ---------------------------------------- */

/* A portal: nodes A (0,0,0), B (0,0,3), C (4,0,3), D (4,0,0); members col1 A-B,
 * beam B-C, col2 D-C; fixed at A and D (D with a spring). Loads: cases dead, live; a
 * combination ULS. Three members with 3, 5 and 4 stations. */
static ef_model *portal_model(void)
{
    ef_model *m = calloc(1, sizeof *m);
    assert_non_null(m);
    static const double xyz[4][3] = {{0, 0, 0}, {0, 0, 3}, {4, 0, 3}, {4, 0, 0}};
    static const char *const node_names[4] = {"A", "B", "C", "D"};
    static const char *const member_names[3] = {"col1", "beam", "col 2 (west)"};
    static const int ends[3][2] = {{0, 1}, {1, 2}, {3, 2}};
    static const int stations[3] = {3, 5, 4};
    m->file = strdup("portal & <frame>.yaml");
    m->title = strdup("Portal \"P1\" — bay 2");
    for (int i = 0; i < 32; i++) m->sha256[i] = (unsigned char)(7 * i + 3);
    m->units.force = EF_FORCE_KN;
    m->units.length = EF_LEN_M;
    m->gravity_dir[2] = -1.0;
    m->divisions = 4;
    m->stations = 11;
    m->restrain_all = EF_UY;
    m->n_nodes = 4;
    m->nodes = calloc(4, sizeof *m->nodes);
    for (int i = 0; i < 4; i++) {
        m->nodes[i].name = strdup(node_names[i]);
        memcpy(m->nodes[i].xyz, xyz[i], sizeof xyz[i]);
    }
    m->n_members = 3;
    m->members = calloc(3, sizeof *m->members);
    for (int k = 0; k < 3; k++) {
        ef_member *b = &m->members[k];
        b->name = strdup(member_names[k]);
        b->node[0] = ends[k][0];
        b->node[1] = ends[k][1];
        b->stations = stations[k];
        b->divisions = 2 + k;
        const double *a = xyz[ends[k][0]], *c = xyz[ends[k][1]];
        double d[3] = {c[0] - a[0], c[1] - a[1], c[2] - a[2]};
        b->length = sqrt(d[0] * d[0] + d[1] * d[1] + d[2] * d[2]);
        for (int j = 0; j < 3; j++) b->axes[0][j] = d[j] / b->length;
        /* y = -Y for the beam, any orthonormal set for the storage test */
        b->axes[1][1] = k == 1 ? -1.0 : 1.0;
        b->axes[2][0] = k == 1 ? 0.0 : -b->axes[0][2];
        b->axes[2][2] = k == 1 ? 1.0 : 0.0;
    }
    m->members[1].release[1] = EF_RY | EF_RZ;
    m->n_supports = 2;
    m->supports = calloc(2, sizeof *m->supports);
    m->supports[0].node = 0;
    m->supports[0].held = EF_ALL_DOF;
    m->supports[1].node = 3;
    m->supports[1].held = EF_UX | EF_UY | EF_UZ;
    m->supports[1].spring[4] = 5.0e3;
    m->n_cases = 2;
    m->cases = calloc(2, sizeof *m->cases);
    m->cases[0].name = strdup("dead");
    m->cases[1].name = strdup("live");
    m->n_combos = 1;
    m->combos = calloc(1, sizeof *m->combos);
    m->combos[0].name = strdup("ULS");
    assert_int_equal(ef_model_index_names(m), EF_OK);
    return m;
}

/* deterministic, distinct, non-round values */
static double val(int seed, ef_index i) { return sin(0.37 * (double)seed + 1.3 * (double)i) * 1e3 / (double)(seed + 2); }

static void fill(double *a, ef_index n, int seed)
{
    for (ef_index i = 0; i < n; i++) a[i] = val(seed, i);
}

static void fill_load(const ef_results *r, ef_load_result *lr, ef_index load, int seed, bool second)
{
    const ef_model *m = r->model;
    assert_int_equal(ef_load_result_alloc(r, lr, second), EF_OK);
    lr->load = load;
    fill(lr->disp, 6 * m->n_nodes, seed);
    fill(lr->react, 6 * m->n_nodes, seed + 1);
    fill(lr->end_forces, 12 * m->n_members, seed + 2);
    fill(lr->stations, 7 * r->st_first[m->n_members], seed + 3);
    fill(lr->applied, 6, seed + 4);
    fill(lr->reaction_sum, 6, seed + 5);
    lr->eq_residual = 1.25e-15 * seed;
    lr->solve_residual = 3.5e-16 * seed;
    if (second) {
        fill(lr->amplification, 12 * m->n_members, seed + 6);
        lr->amplification[3] = NAN;
        lr->iterations = 4;
        lr->converged = true;
        lr->tolerance = 1e-6;
        lr->residual = 2.5e-8;
        lr->chord_only = true;
    }
}

static ef_results *portal_results(const ef_model *m, int seed)
{
    ef_results *r = NULL;
    assert_int_equal(ef_results_create(m, &r), EF_OK);
    r->n_mesh_nodes = 10;
    r->n_elems = 9;
    r->n_eq = 42;
    r->n_dropped = 1;
    r->statics = calloc(2, sizeof *r->statics);
    /* analysis order differs from the shared load order on purpose */
    fill_load(r, &r->statics[0], 2, seed, false);
    r->n_statics = 1;
    fill_load(r, &r->statics[1], 0, seed + 10, false);
    r->n_statics = 2;
    r->second = calloc(1, sizeof *r->second);
    fill_load(r, &r->second[0], 2, seed + 20, true);
    r->n_second = 1;

    int k = 3;
    ef_modal_result *mr = calloc(1, sizeof *mr);
    mr->n_modes = k;
    mr->omega2 = malloc(k * sizeof(double));
    mr->freq = malloc(k * sizeof(double));
    for (int i = 0; i < k; i++) {
        mr->freq[i] = 1.5 + 2.25 * i;
        mr->omega2[i] = pow(2 * 3.14159265358979323846 * mr->freq[i], 2);
    }
    mr->shapes = malloc(k * 6 * m->n_nodes * sizeof(double));
    fill(mr->shapes, k * 6 * m->n_nodes, seed + 30);
    mr->participation = malloc(k * 6 * sizeof(double));
    fill(mr->participation, 6 * k, seed + 31);
    mr->eff_mass = malloc(k * 6 * sizeof(double));
    fill(mr->eff_mass, 6 * k, seed + 32);
    mr->eff_ratio = malloc(k * 6 * sizeof(double));
    fill(mr->eff_ratio, 6 * k, seed + 33);
    mr->unitmax_mass = malloc(k * sizeof(double));
    fill(mr->unitmax_mass, k, seed + 34);
    mr->residual = malloc(k * sizeof(double));
    fill(mr->residual, k, seed + 35);
    fill(mr->total_mass, 6, seed + 36);
    mr->model_mass = 12.5;
    mr->ref_point[0] = 2.0;
    mr->ref_point[2] = 3.0;
    snprintf(mr->mass_source, sizeof mr->mass_source, "self (consistent) + 1.0 x dead");
    mr->lumped = true;
    mr->ncv = 20;
    mr->tol = 1e-10;
    mr->n_op = 77;
    mr->shift = -0.5;
    mr->n_rigid = 1;
    r->modal = mr;

    ef_buckling_result *br = calloc(1, sizeof *br);
    br->load = 2;
    br->n_pos = 2;
    br->n_neg = 1;
    br->factors = malloc(2 * sizeof(double));
    br->factors[0] = 4.5;
    br->factors[1] = 11.25;
    br->neg_factors = malloc(sizeof(double));
    br->neg_factors[0] = -7.0;
    br->shapes = malloc(2 * 6 * m->n_nodes * sizeof(double));
    fill(br->shapes, 2 * 6 * m->n_nodes, seed + 40);
    br->residual = malloc(2 * sizeof(double));
    fill(br->residual, 2, seed + 41);
    br->member_share = malloc(2 * m->n_members * sizeof(double));
    fill(br->member_share, 2 * m->n_members, seed + 42);
    br->kind = malloc(2 * sizeof(int));
    br->kind[0] = 0;
    br->kind[1] = 2;
    br->dominant = malloc(2 * sizeof(ef_index));
    br->dominant[0] = EF_NONE;
    br->dominant[1] = 1;
    br->axial0 = malloc(m->n_members * sizeof(double));
    fill(br->axial0, m->n_members, seed + 43);
    br->n_op = 55;
    r->buckling = br;

    /* walking: receivers B and C, walker C; 3 modes screened */
    ef_walking_result *wk = NULL;
    assert_int_equal(ef_vibration_walking_alloc(2, 3, &wk), EF_OK);
    wk->receivers[0] = 1;
    wk->receivers[1] = 2;
    wk->walker[0] = wk->walker[1] = 2;
    fill(wk->R, 2, seed + 50);
    fill(wk->response_rms, 2, seed + 51);
    wk->method[1] = 1;
    fill(wk->pace_hz, 2, seed + 52);
    wk->harmonic[0] = 2;
    wk->mode[0] = 1;
    wk->mode[1] = 3;
    wk->R_resonant[0] = 4.5;
    wk->rms_transient[1] = 2.5e-4;
    fill(wk->vertical_share, 3, seed + 53);
    fill(wk->floor_motion, 3, seed + 54);
    wk->is_vertical[2] = 1;
    wk->pace_flags[2] = 5;
    wk->damping = 0.03;
    wk->walker_weight = 0.746;
    wk->pace[0] = 1.8;
    wk->pace[1] = 2.2;
    wk->weighting = 1;
    wk->path_length = 10.0;
    wk->f1_vertical = 3.75;
    wk->f1_mode = 3;
    wk->methods = 3;
    wk->n_pace = 120;
    snprintf(wk->delta_where, sizeof wk->delta_where, "member 'beam' at 0.5 of its length");
    r->walking = wk;

    /* one machine on B, 4 frequencies, receivers B and A */
    r->machines = calloc(1, sizeof *r->machines);
    ef_machine_result *mc = &r->machines[0];
    assert_int_equal(ef_vibration_machine_alloc("pump 1", 4, 2, mc), EF_OK);
    r->n_machines = 1;
    mc->receivers[0] = 1;
    mc->receivers[1] = 0;
    fill(mc->hz, 4, seed + 60);
    fill(mc->disp, 24, seed + 61);
    fill(mc->vel, 24, seed + 62);
    fill(mc->acc, 24, seed + 63);
    fill(mc->R, 2, seed + 64);
    fill(mc->R_scan, 8, seed + 65);
    mc->node = 1;
    mc->force[2] = 0.45;
    mc->hz_nominal = 24.5;
    mc->corrected = true;
    return r;
}

/* ---- fixtures --------------------------------------------------------------------- */

typedef struct {
    char dir[256];
    char path[300];
    ef_ctx *ctx;
    ef_model *m;
    ef_results *r;
} fixture;

static int setup(void **state)
{
    fixture *f = calloc(1, sizeof *f);
    const char *tmp = getenv("TMPDIR");
    snprintf(f->dir, sizeof f->dir, "%s/ef_h5_XXXXXX", tmp && *tmp ? tmp : "/tmp");
    if (!mkdtemp(f->dir)) return -1;
    snprintf(f->path, sizeof f->path, "%s/out.h5", f->dir);
    if (ef_ctx_create(&f->ctx) != EF_OK) return -1;
    f->m = portal_model();
    f->r = portal_results(f->m, 1);
    unsetenv("EF_TEST_FAIL_WRITE_AFTER");
    *state = f;
    return 0;
}

static int teardown(void **state)
{
    fixture *f = *state;
    DIR *d = opendir(f->dir);
    struct dirent *e;
    while (d && (e = readdir(d))) {
        if (e->d_name[0] == '.') continue;
        char p[600];
        snprintf(p, sizeof p, "%s/%s", f->dir, e->d_name);
        remove(p);
    }
    if (d) closedir(d);
    rmdir(f->dir);
    ef_results_free(&f->r);
    ef_model_free(&f->m);
    ef_ctx_free(&f->ctx);
    unsetenv("EF_TEST_FAIL_WRITE_AFTER");
    free(f);
    return 0;
}

static void print_diags(const ef_ctx *ctx)
{
    for (ef_index i = 0; i < ef_ctx_diag_count(ctx); i++)
        print_message("%s\n", ef_ctx_diag_text(ctx, i));
}

static bool any_diag_contains(const ef_ctx *ctx, const char *text)
{
    for (ef_index i = 0; i < ef_ctx_diag_count(ctx); i++)
        if (strstr(ef_ctx_diag_text(ctx, i), text)) return true;
    return false;
}

/* files in the directory whose name contains `part` */
static int count_files(const char *dir, const char *part)
{
    int n = 0;
    DIR *d = opendir(dir);
    struct dirent *e;
    while (d && (e = readdir(d)))
        if (strstr(e->d_name, part)) n++;
    if (d) closedir(d);
    return n;
}

static void assert_same(const double *a, const double *b, ef_index n)
{
    for (ef_index i = 0; i < n; i++) {
        if (isnan(b[i])) assert_true(isnan(a[i]));
        else assert_true(a[i] == b[i]);
    }
}

static void assert_same_load(const ef_results *ra, const ef_load_result *a, const ef_results *rb,
                             const ef_load_result *b, bool second)
{
    const ef_model *m = rb->model;
    assert_string_equal(ef_model_load_name(ra->model, a->load), ef_model_load_name(m, b->load));
    assert_same(a->disp, b->disp, 6 * m->n_nodes);
    assert_same(a->react, b->react, 6 * m->n_nodes);
    assert_same(a->end_forces, b->end_forces, 12 * m->n_members);
    assert_same(a->stations, b->stations, 7 * rb->st_first[m->n_members]);
    assert_same(a->applied, b->applied, 6);
    assert_same(a->reaction_sum, b->reaction_sum, 6);
    assert_true(a->eq_residual == b->eq_residual);
    assert_true(a->solve_residual == b->solve_residual);
    if (second) {
        assert_same(a->amplification, b->amplification, 12 * m->n_members);
        assert_int_equal(a->iterations, b->iterations);
        assert_int_equal(a->converged, b->converged);
        assert_true(a->tolerance == b->tolerance);
        assert_true(a->residual == b->residual);
        assert_int_equal(a->chord_only, b->chord_only);
    }
}

/* ---- tests -------------------------------------------------------------------------- */

static void test_results_hdf5_round_trip_keeps_model_and_every_result(void **state)
{
    fixture *f = *state;
    ef_status st = ef_results_write_hdf5(f->r, f->path, f->ctx);
    print_diags(f->ctx);
    assert_int_equal(st, EF_OK);
    assert_int_equal(count_files(f->dir, ".tmp."), 0);

    ef_model *m = NULL;
    ef_results *r = NULL;
    st = ef_results_read_hdf5(f->path, &m, &r, f->ctx);
    print_diags(f->ctx);
    assert_int_equal(st, EF_OK);
    const ef_model *m0 = f->m;
    const ef_results *r0 = f->r;

    assert_string_equal(m->file, m0->file);
    assert_string_equal(m->title, m0->title);
    assert_memory_equal(m->sha256, m0->sha256, 32);
    assert_int_equal(m->units.force, EF_FORCE_KN);
    assert_int_equal(m->units.length, EF_LEN_M);
    assert_same(m->gravity_dir, m0->gravity_dir, 3);
    assert_int_equal(m->divisions, 4);
    assert_int_equal(m->stations, 11);
    assert_int_equal(m->restrain_all, EF_UY);
    assert_int_equal(m->n_nodes, 4);
    for (int i = 0; i < 4; i++) {
        assert_string_equal(m->nodes[i].name, m0->nodes[i].name);
        assert_same(m->nodes[i].xyz, m0->nodes[i].xyz, 3);
    }
    assert_int_equal(m->n_members, 3);
    for (int k = 0; k < 3; k++) {
        const ef_member *a = &m->members[k], *b = &m0->members[k];
        assert_string_equal(a->name, b->name);
        assert_int_equal(a->node[0], b->node[0]);
        assert_int_equal(a->node[1], b->node[1]);
        assert_same(&a->axes[0][0], &b->axes[0][0], 9);
        assert_true(a->length == b->length);
        assert_int_equal(a->stations, b->stations);
        assert_int_equal(a->divisions, b->divisions);
        assert_int_equal(a->release[0], b->release[0]);
        assert_int_equal(a->release[1], b->release[1]);
        assert_int_equal(a->section, EF_NONE);
        assert_int_equal(r->st_first[k + 1], r0->st_first[k + 1]);
    }
    assert_int_equal(m->n_supports, 2);
    assert_int_equal(m->supports[1].node, 3);
    assert_int_equal(m->supports[1].held, EF_UX | EF_UY | EF_UZ);
    assert_same(m->supports[1].spring, m0->supports[1].spring, 6);
    assert_int_equal(m->n_cases, 2);
    assert_int_equal(m->n_combos, 1);
    assert_string_equal(ef_model_load_name(m, 0), "dead");
    assert_string_equal(ef_model_load_name(m, 2), "ULS");
    assert_int_equal(ef_model_find_load(m, "live"), 1);
    assert_int_equal(ef_model_find_member(m, "col 2 (west)"), 2);

    assert_int_equal(r->n_mesh_nodes, 10);
    assert_int_equal(r->n_elems, 9);
    assert_int_equal(r->n_eq, 42);
    assert_int_equal(r->n_dropped, 1);
    assert_int_equal(r->n_statics, 2);       /* in analysis order: ULS, then dead */
    assert_int_equal(r->statics[0].load, 2);
    assert_int_equal(r->statics[1].load, 0);
    for (int i = 0; i < 2; i++) assert_same_load(r, &r->statics[i], r0, &r0->statics[i], false);
    assert_int_equal(r->n_second, 1);
    assert_same_load(r, &r->second[0], r0, &r0->second[0], true);

    const ef_modal_result *a = r->modal, *b = r0->modal;
    assert_non_null(a);
    assert_int_equal(a->n_modes, 3);
    assert_same(a->freq, b->freq, 3);
    assert_same(a->omega2, b->omega2, 3);
    assert_same(a->shapes, b->shapes, 3 * 6 * 4);
    assert_same(a->participation, b->participation, 18);
    assert_same(a->eff_mass, b->eff_mass, 18);
    assert_same(a->eff_ratio, b->eff_ratio, 18);
    assert_same(a->unitmax_mass, b->unitmax_mass, 3);
    assert_same(a->residual, b->residual, 3);
    assert_same(a->total_mass, b->total_mass, 6);
    assert_same(a->ref_point, b->ref_point, 3);
    assert_true(a->model_mass == b->model_mass);
    assert_string_equal(a->mass_source, b->mass_source);
    assert_int_equal(a->lumped, b->lumped);
    assert_int_equal(a->ncv, b->ncv);
    assert_int_equal(a->n_op, b->n_op);
    assert_int_equal(a->n_rigid, b->n_rigid);
    assert_true(a->shift == b->shift);

    const ef_buckling_result *p = r->buckling, *q = r0->buckling;
    assert_non_null(p);
    assert_int_equal(p->load, 2);
    assert_int_equal(p->n_pos, 2);
    assert_int_equal(p->n_neg, 1);
    assert_same(p->factors, q->factors, 2);
    assert_same(p->neg_factors, q->neg_factors, 1);
    assert_same(p->shapes, q->shapes, 2 * 6 * 4);
    assert_same(p->residual, q->residual, 2);
    assert_same(p->member_share, q->member_share, 2 * 3);
    assert_same(p->axial0, q->axial0, 3);
    assert_int_equal(p->kind[0], 0);
    assert_int_equal(p->kind[1], 2);
    assert_int_equal(p->dominant[0], EF_NONE);
    assert_int_equal(p->dominant[1], 1);
    assert_int_equal(p->n_op, 55);

    const ef_walking_result *wa = r->walking, *wb = r0->walking;
    assert_non_null(wa);
    assert_int_equal(wa->n_receivers, 2);
    assert_int_equal(wa->n_modes, 3);
    assert_int_equal(wa->receivers[1], 2);
    assert_int_equal(wa->walker[0], 2);
    assert_same(wa->R, wb->R, 2);
    assert_same(wa->response_rms, wb->response_rms, 2);
    assert_int_equal(wa->method[0], 0);
    assert_int_equal(wa->method[1], 1);
    assert_same(wa->pace_hz, wb->pace_hz, 2);
    assert_int_equal(wa->harmonic[0], 2);
    assert_int_equal(wa->mode[1], 3);
    assert_same(wa->R_resonant, wb->R_resonant, 2);
    assert_same(wa->rms_transient, wb->rms_transient, 2);
    assert_same(wa->vertical_share, wb->vertical_share, 3);
    assert_same(wa->floor_motion, wb->floor_motion, 3);
    assert_int_equal(wa->is_vertical[2], 1);
    assert_int_equal(wa->pace_flags[2], 5);
    assert_int_equal(wa->weighting, 1);
    assert_true(wa->damping == 0.03 && wa->path_length == 10.0 && wa->pace[1] == 2.2);
    assert_int_equal(wa->f1_mode, 3);
    assert_int_equal(wa->methods, 3);
    assert_int_equal(wa->n_pace, 120);
    assert_string_equal(wa->delta_where, wb->delta_where);
    assert_int_equal(r->n_machines, 1);
    const ef_machine_result *ma = &r->machines[0], *mb = &r0->machines[0];
    assert_string_equal(ma->name, "pump 1");
    assert_int_equal(ma->n_hz, 4);
    assert_int_equal(ma->receivers[1], 0);
    assert_int_equal(ma->node, 1);
    assert_same(ma->hz, mb->hz, 4);
    assert_same(ma->disp, mb->disp, 24);
    assert_same(ma->vel, mb->vel, 24);
    assert_same(ma->acc, mb->acc, 24);
    assert_same(ma->R, mb->R, 2);
    assert_same(ma->R_scan, mb->R_scan, 8);
    assert_same(ma->force, mb->force, 3);
    assert_true(ma->corrected);

    ef_results_file_info info;
    assert_int_equal(ef_results_read_hdf5_info(f->path, &info, f->ctx), EF_OK);
    assert_int_equal(info.format_version, 1);
    assert_string_equal(info.program_version, EF_VERSION);
    assert_string_equal(info.model_sha256,
                        "030a11181f262d343b424950575e656c737a81888f969da4abb2b9c0c7ced5dc");
    assert_int_equal(strlen(info.created_utc), 20);   /* YYYY-MM-DDTHH:MM:SSZ */
    ef_results_free(&r);
    ef_model_free(&m);
}

/* H5Ovisit callback: every dataset must carry text attributes unit and description */
static herr_t check_dataset_attrs(hid_t obj, const char *name, const H5O_info_t *info, void *data)
{
    int *n = data;
    if (info->type != H5O_TYPE_DATASET) return 0;
    if (H5Aexists_by_name(obj, name, "unit", H5P_DEFAULT) <= 0 ||
        H5Aexists_by_name(obj, name, "description", H5P_DEFAULT) <= 0) {
        print_message("dataset %s lacks unit or description\n", name);
        return -1;
    }
    (*n)++;
    return 0;
}

static void test_results_hdf5_every_dataset_has_unit_and_description(void **state)
{
    fixture *f = *state;
    assert_int_equal(ef_results_write_hdf5(f->r, f->path, f->ctx), EF_OK);
    hid_t file = H5Fopen(f->path, H5F_ACC_RDONLY, H5P_DEFAULT);
    assert_true(file >= 0);
    int n = 0;
    assert_true(H5Ovisit(file, H5_INDEX_NAME, H5_ITER_INC, check_dataset_attrs, &n) >= 0);
    /* counted from the layout in docs/results-format.md: model 15 (nodes 2, members 8,
       supports 3, loads 2); per static load 5 + 3 stations; second order 6 + 3 stations;
       modal 10; buckling 7; walking 16; a machine 10 */
    assert_int_equal(n, 15 + 2 * 8 + 9 + 10 + 7 + 16 + 10);

    /* mode shapes: chunked one mode per chunk, deflate-compressed */
    hid_t d = H5Dopen2(file, "/modal/shapes", H5P_DEFAULT);
    assert_true(d >= 0);
    hid_t dcpl = H5Dget_create_plist(d);
    hsize_t chunk[3] = {0, 0, 0};
    assert_int_equal(H5Pget_layout(dcpl), H5D_CHUNKED);
    assert_int_equal(H5Pget_chunk(dcpl, 3, chunk), 3);
    assert_int_equal(chunk[0], 1);
    assert_int_equal(chunk[1], 4);
    assert_int_equal(chunk[2], 6);
    bool deflate = false;
    for (int i = 0; i < H5Pget_nfilters(dcpl); i++) {
        unsigned flags, cd[4];
        size_t ncd = 4;
        if (H5Pget_filter2(dcpl, (unsigned)i, &flags, &ncd, cd, 0, NULL, NULL) == H5Z_FILTER_DEFLATE)
            deflate = ncd >= 1 && cd[0] == 4;
    }
    assert_true(deflate);
    H5Pclose(dcpl);
    H5Dclose(d);
    H5Fclose(file);
}

/* The test hook makes the write fail after N datasets, as a full disk would. */
static void test_results_hdf5_interrupted_write_keeps_the_older_file(void **state)
{
    fixture *f = *state;
    assert_int_equal(ef_results_write_hdf5(f->r, f->path, f->ctx), EF_OK);

    /* a second run with other numbers fails half-way */
    ef_results *r2 = portal_results(f->m, 5);
    setenv("EF_TEST_FAIL_WRITE_AFTER", "20", 1);
    ef_status st = ef_results_write_hdf5(r2, f->path, f->ctx);
    unsetenv("EF_TEST_FAIL_WRITE_AFTER");
    assert_int_equal(st, EF_EIO);
    assert_true(any_diag_contains(f->ctx, f->path));
    assert_true(any_diag_contains(f->ctx, "H5Dwrite"));
    assert_int_equal(count_files(f->dir, ".tmp."), 0);

    /* the file under the final name is still the first, complete one */
    ef_model *m = NULL;
    ef_results *r = NULL;
    assert_int_equal(ef_results_read_hdf5(f->path, &m, &r, f->ctx), EF_OK);
    assert_same(r->statics[0].disp, f->r->statics[0].disp, 24);
    assert_non_null(r->buckling);
    ef_results_free(&r);
    ef_model_free(&m);
    ef_results_free(&r2);
}

static void test_results_hdf5_interrupted_first_write_leaves_no_file(void **state)
{
    fixture *f = *state;
    for (const char *n = "0"; n; n = strcmp(n, "0") ? NULL : "7") {
        setenv("EF_TEST_FAIL_WRITE_AFTER", n, 1);
        assert_int_equal(ef_results_write_hdf5(f->r, f->path, f->ctx), EF_EIO);
        assert_int_equal(access(f->path, F_OK), -1);
        assert_int_equal(count_files(f->dir, ".tmp."), 0);
    }
}

static void test_results_hdf5_unwritable_directory_is_an_io_error(void **state)
{
    fixture *f = *state;
    char p[400];
    snprintf(p, sizeof p, "%s/no-such-dir/out.h5", f->dir);
    assert_int_equal(ef_results_write_hdf5(f->r, p, f->ctx), EF_EIO);
    assert_true(any_diag_contains(f->ctx, "H5Fcreate"));
}

static void test_results_hdf5_refuses_a_name_that_cannot_be_a_group(void **state)
{
    fixture *f = *state;
    free(f->m->members[1].name);
    f->m->members[1].name = strdup("beam/1");
    assert_int_equal(ef_results_write_hdf5(f->r, f->path, f->ctx), EF_EINPUT);
    assert_true(any_diag_contains(f->ctx, "member 'beam/1'"));
    assert_int_equal(access(f->path, F_OK), -1);
}

/* A valid HDF5 file of someone else's: no `format` attribute, or a different one. */
static void make_foreign(const char *path, const char *format, int version)
{
    hid_t file = H5Fcreate(path, H5F_ACC_TRUNC, H5P_DEFAULT, H5P_DEFAULT);
    assert_true(file >= 0);
    hsize_t n = 3;
    double v[3] = {1, 2, 3};
    hid_t sp = H5Screate_simple(1, &n, NULL);
    hid_t d = H5Dcreate2(file, "x", H5T_IEEE_F64LE, sp, H5P_DEFAULT, H5P_DEFAULT, H5P_DEFAULT);
    H5Dwrite(d, H5T_NATIVE_DOUBLE, H5S_ALL, H5S_ALL, H5P_DEFAULT, v);
    H5Dclose(d);
    H5Sclose(sp);
    if (format) {
        hid_t t = H5Tcopy(H5T_C_S1);
        H5Tset_size(t, H5T_VARIABLE);
        hid_t s1 = H5Screate(H5S_SCALAR);
        hid_t a = H5Acreate2(file, "format", t, s1, H5P_DEFAULT, H5P_DEFAULT);
        H5Awrite(a, t, &format);
        H5Aclose(a);
        a = H5Acreate2(file, "format_version", H5T_STD_I32LE, s1, H5P_DEFAULT, H5P_DEFAULT);
        H5Awrite(a, H5T_NATIVE_INT, &version);
        H5Aclose(a);
        H5Sclose(s1);
        H5Tclose(t);
    }
    H5Fclose(file);
}

static void test_results_hdf5_refuses_files_that_are_not_ours(void **state)
{
    fixture *f = *state;
    ef_model *m = NULL;
    ef_results *r = NULL;
    char msg[512];

    make_foreign(f->path, NULL, 0);
    assert_int_equal(ef_results_read_hdf5(f->path, &m, &r, f->ctx), EF_EINPUT);
    assert_null(m);
    assert_null(r);
    snprintf(msg, sizeof msg,
             "%s: not an eigenframe results file (no format attribute 'eigenframe-results')",
             f->path);
    assert_true(any_diag_contains(f->ctx, msg));

    ef_ctx_diag_clear(f->ctx);
    make_foreign(f->path, "some-other-results", 1);
    assert_int_equal(ef_results_read_hdf5(f->path, &m, &r, f->ctx), EF_EINPUT);
    assert_true(any_diag_contains(f->ctx, msg));

    ef_ctx_diag_clear(f->ctx);
    make_foreign(f->path, "eigenframe-results", 2);
    assert_int_equal(ef_results_read_hdf5(f->path, &m, &r, f->ctx), EF_EINPUT);
    assert_true(any_diag_contains(f->ctx, "format_version 2 is newer"));

    ef_ctx_diag_clear(f->ctx);
    FILE *t = fopen(f->path, "w");
    fputs("eigenframe: 1\n", t);
    fclose(t);
    assert_int_equal(ef_results_read_hdf5(f->path, &m, &r, f->ctx), EF_EINPUT);
    assert_true(any_diag_contains(f->ctx, "not an HDF5 file"));

    ef_ctx_diag_clear(f->ctx);
    remove(f->path);
    assert_int_equal(ef_results_read_hdf5(f->path, &m, &r, f->ctx), EF_EIO);
    assert_null(m);
}

/* A file of ours with a dataset of the wrong shape is refused, not read out of bounds. */
static void test_results_hdf5_refuses_a_dataset_of_the_wrong_shape(void **state)
{
    fixture *f = *state;
    assert_int_equal(ef_results_write_hdf5(f->r, f->path, f->ctx), EF_OK);
    hid_t file = H5Fopen(f->path, H5F_ACC_RDWR, H5P_DEFAULT);
    assert_true(file >= 0);
    assert_true(H5Ldelete(file, "/static/dead/stations/beam", H5P_DEFAULT) >= 0);
    hsize_t dims[2] = {2, 7};
    double v[14] = {0};
    hid_t sp = H5Screate_simple(2, dims, NULL);
    hid_t d = H5Dcreate2(file, "/static/dead/stations/beam", H5T_IEEE_F64LE, sp, H5P_DEFAULT,
                         H5P_DEFAULT, H5P_DEFAULT);
    H5Dwrite(d, H5T_NATIVE_DOUBLE, H5S_ALL, H5S_ALL, H5P_DEFAULT, v);
    H5Dclose(d);
    H5Sclose(sp);
    H5Fclose(file);
    ef_model *m = NULL;
    ef_results *r = NULL;
    assert_int_equal(ef_results_read_hdf5(f->path, &m, &r, f->ctx), EF_EINPUT);
    assert_true(any_diag_contains(f->ctx, "'/static/dead/stations/beam' has shape [2][7], expected [5][7]"));
    assert_null(m);
}

/* A model without results beyond the model part, and with no supports, still round-trips. */
static void test_results_hdf5_model_only_file_round_trips(void **state)
{
    fixture *f = *state;
    ef_results *r0 = NULL;
    assert_int_equal(ef_results_create(f->m, &r0), EF_OK);
    free(f->m->supports);
    f->m->supports = NULL;
    f->m->n_supports = 0;
    assert_int_equal(ef_results_write_hdf5(r0, f->path, f->ctx), EF_OK);
    ef_model *m = NULL;
    ef_results *r = NULL;
    assert_int_equal(ef_results_read_hdf5(f->path, &m, &r, f->ctx), EF_OK);
    assert_int_equal(m->n_supports, 0);
    assert_int_equal(r->n_statics, 0);
    assert_null(r->modal);
    assert_null(r->buckling);
    ef_results_free(&r);
    ef_model_free(&m);
    ef_results_free(&r0);
}

/* No mode found and no positive critical factor: empty arrays round-trip as empty. */
static void test_results_hdf5_empty_modal_and_buckling_round_trip(void **state)
{
    fixture *f = *state;
    ef_modal_result *mr = f->r->modal;
    mr->n_modes = 0;
    ef_buckling_result *br = f->r->buckling;
    br->n_pos = 0;
    br->n_neg = 0;
    br->found_none = true;
    assert_int_equal(ef_results_write_hdf5(f->r, f->path, f->ctx), EF_OK);
    ef_model *m = NULL;
    ef_results *r = NULL;
    ef_status st = ef_results_read_hdf5(f->path, &m, &r, f->ctx);
    print_diags(f->ctx);
    assert_int_equal(st, EF_OK);
    assert_non_null(r->modal);
    assert_int_equal(r->modal->n_modes, 0);
    assert_non_null(r->buckling);
    assert_int_equal(r->buckling->n_pos, 0);
    assert_int_equal(r->buckling->n_neg, 0);
    assert_true(r->buckling->found_none);
    ef_results_free(&r);
    ef_model_free(&m);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test_setup_teardown(test_results_hdf5_round_trip_keeps_model_and_every_result, setup, teardown),
        cmocka_unit_test_setup_teardown(test_results_hdf5_every_dataset_has_unit_and_description, setup, teardown),
        cmocka_unit_test_setup_teardown(test_results_hdf5_interrupted_write_keeps_the_older_file, setup, teardown),
        cmocka_unit_test_setup_teardown(test_results_hdf5_interrupted_first_write_leaves_no_file, setup, teardown),
        cmocka_unit_test_setup_teardown(test_results_hdf5_unwritable_directory_is_an_io_error, setup, teardown),
        cmocka_unit_test_setup_teardown(test_results_hdf5_refuses_a_name_that_cannot_be_a_group, setup, teardown),
        cmocka_unit_test_setup_teardown(test_results_hdf5_refuses_files_that_are_not_ours, setup, teardown),
        cmocka_unit_test_setup_teardown(test_results_hdf5_refuses_a_dataset_of_the_wrong_shape, setup, teardown),
        cmocka_unit_test_setup_teardown(test_results_hdf5_model_only_file_round_trips, setup, teardown),
        cmocka_unit_test_setup_teardown(test_results_hdf5_empty_modal_and_buckling_round_trip, setup, teardown),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
