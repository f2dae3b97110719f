/* test_model.c: reading and validating model files.
 *
 * Golden error files: every tests/models/bad/NNNN-what/model.yaml must fail with exactly
 * the lines of its expected.err (messages and positions). Good models must load without
 * a message. Local axes are checked against the definition in docs/model-format.md,
 * worked by hand for each case below, and as properties (orthonormal, right-handed).
 * The test finds the repository root from the working directory (or $EF_SRCDIR).
 */
#define _POSIX_C_SOURCE 200809L
#include <dirent.h>
#include <float.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "support.h"
#include "model.h"
#include "section.h"
#include "sha256.h"

/* ---- helpers ------------------------------------------------------------------- */

static ef_ctx *ctx_new(void)
{
    ef_ctx *ctx = NULL;
    assert_int_equal(ef_ctx_create(&ctx), EF_OK);
    return ctx;
}

/* Load a model from text; on failure print the messages (to help reading a failed test). */
static ef_model *load_text(const char *text, ef_ctx *ctx, ef_status want)
{
    ef_model *m = NULL;
    ef_status st = ef_model_load_yaml_string(text, strlen(text), "test.yaml", &m, ctx);
    if (st != want)
        for (ef_index i = 0; i < ef_ctx_diag_count(ctx); i++)
            print_message("%s\n", ef_ctx_diag_text(ctx, i));
    assert_int_equal(st, want);
    if (want == EF_OK)
        assert_non_null(m);
    else
        assert_null(m);
    return m;
}

static bool has_message(const ef_ctx *ctx, const char *text)
{
    for (ef_index i = 0; i < ef_ctx_diag_count(ctx); i++)
        if (strcmp(ef_ctx_diag_text(ctx, i), text) == 0) return true;
    return false;
}

#define assert_message(ctx, text)                                                      \
    do {                                                                               \
        if (!has_message((ctx), (text))) {                                             \
            for (ef_index i_ = 0; i_ < ef_ctx_diag_count(ctx); i_++)                   \
                print_message("  got: %s\n", ef_ctx_diag_text((ctx), i_));             \
            fail_msg("missing message: %s", (text));                                   \
        }                                                                              \
    } while (0)

static char *read_file(const char *path, size_t *len)
{
    FILE *f = fopen(path, "rb");
    if (!f) return NULL;
    size_t cap = 4096, n = 0;
    char *buf = malloc(cap + 1);
    size_t got;
    while (buf && (got = fread(buf + n, 1, cap - n, f)) > 0) {
        n += got;
        if (n == cap) {
            char *nb = realloc(buf, 2 * cap + 1);
            if (!nb) {
                free(buf);
                buf = NULL;
                break;
            }
            buf = nb;
            cap *= 2;
        }
    }
    fclose(f);
    if (buf) buf[n] = '\0';
    if (len) *len = n;
    return buf;
}

/* Change to the repository root: $EF_SRCDIR, or the nearest parent holding tests/models. */
static int to_repo_root(void **state)
{
    (void)state;
    const char *dir = getenv("EF_SRCDIR");
    if (dir && chdir(dir) != 0) return -1;
    for (int up = 0; up < 4; up++) {
        DIR *d = opendir("tests/models/bad");
        if (d) {
            closedir(d);
            return 0;
        }
        if (chdir("..") != 0) return -1;
    }
    return -1;
}

static int cmp_str(const void *a, const void *b)
{
    return strcmp(*(const char *const *)a, *(const char *const *)b);
}

/* Sorted names of the entries of `dir` that end with `suffix` ("" for subfolders). */
static int list_dir(const char *dir, const char *suffix, char **names, int max)
{
    DIR *d = opendir(dir);
    int n = 0;
    struct dirent *e;
    assert_non_null(d);
    while ((e = readdir(d)) && n < max) {
        size_t len = strlen(e->d_name), k = strlen(suffix);
        if (e->d_name[0] == '.' || len < k || strcmp(e->d_name + len - k, suffix) != 0) continue;
        names[n++] = strdup(e->d_name);
    }
    closedir(d);
    qsort(names, (size_t)n, sizeof *names, cmp_str);
    return n;
}

/* ---- golden files ------------------------------------------------------------------ */

/* Each bad model fails with exactly the lines of expected.err (FILE is the path as passed,
 * relative to the repository root). */
static void test_model_bad_files_give_the_expected_errors(void **state)
{
    (void)state;
    char *dirs[200];
    int n = list_dir("tests/models/bad", "", dirs, 200);
    assert_true(n >= 20);
    int failures = 0;
    for (int i = 0; i < n; i++) {
        char path[512], errpath[512];
        snprintf(path, sizeof path, "tests/models/bad/%s/model.yaml", dirs[i]);
        snprintf(errpath, sizeof errpath, "tests/models/bad/%s/expected.err", dirs[i]);
        char *want = read_file(errpath, NULL);
        assert_non_null(want);
        ef_ctx *ctx = ctx_new();
        ef_model *m = NULL;
        ef_status st = ef_model_load_yaml(path, &m, ctx);
        size_t cap = 256;
        for (ef_index k = 0; k < ef_ctx_diag_count(ctx); k++)
            cap += strlen(ef_ctx_diag_text(ctx, k)) + 1;
        char *got = calloc(cap, 1);
        assert_non_null(got);
        for (ef_index k = 0; k < ef_ctx_diag_count(ctx); k++) {
            strcat(got, ef_ctx_diag_text(ctx, k));
            strcat(got, "\n");
        }
        if (st != EF_EINPUT || m != NULL || ef_ctx_error_count(ctx) == 0 ||
            strcmp(got, want) != 0) {
            print_message("%s: status %d\n--- expected\n%s--- got\n%s", path, (int)st, want, got);
            failures++;
        }
        free(got);
        free(want);
        ef_model_free(&m);
        ef_ctx_free(&ctx);
        free(dirs[i]);
    }
    assert_int_equal(failures, 0);
}

/* Every good model (YAML and JSON) loads with no message at all. */
static void test_model_good_files_load_without_messages(void **state)
{
    (void)state;
    char *files[100];
    int n = list_dir("tests/models/good", ".yaml", files, 90);
    n += list_dir("tests/models/good", ".json", files + n, 100 - n);
    assert_true(n >= 5);
    for (int i = 0; i < n; i++) {
        char path[512];
        snprintf(path, sizeof path, "tests/models/good/%s", files[i]);
        ef_ctx *ctx = ctx_new();
        ef_model *m = NULL;
        ef_status st = ef_model_load_yaml(path, &m, ctx);
        for (ef_index k = 0; k < ef_ctx_diag_count(ctx); k++)
            print_message("%s\n", ef_ctx_diag_text(ctx, k));
        assert_int_equal(st, EF_OK);
        assert_int_equal(ef_ctx_diag_count(ctx), 0);
        assert_true(m->n_members > 0);
        ef_model_free(&m);
        assert_null(m);
        ef_ctx_free(&ctx);
        free(files[i]);
    }
}

/* ---- local axes ---------------------------------------------------------------- */

static const char *frame_head =
    "eigenframe: 1\n"
    "units: {force: kN, length: m}\n"
    "materials: {steel: {E: 210e6, G: 81e6}}\n"
    "sections: {s: {A: 1e-2, Iy: 1e-4, Iz: 2e-5, J: 1e-6}}\n";

/* One member from (0,0,0) to `to`, with extra member keys and an optional gravity line. */
static ef_model *one_member(const char *to, const char *extra, const char *gravity, ef_ctx *ctx)
{
    char text[1024];
    snprintf(text, sizeof text,
             "%s%s"
             "nodes: {a: [0, 0, 0], b: %s}\n"
             "members: {m: {nodes: [a, b], section: s, material: steel%s}}\n"
             "supports: {a: fixed}\n",
             frame_head, gravity ? gravity : "", to, extra ? extra : "");
    return load_text(text, ctx, EF_OK);
}

static void assert_axes(const ef_member *b, const double want[3][3])
{
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++) assert_abs_close(b->axes[i][j], want[i][j], 1e-14);
}

/* Vertical member under default gravity (-Z): up defaults to +X for a member parallel
 * to gravity, so z = +X and y = z × x = X × Z = -Y. */
static void test_model_axes_vertical_member_takes_global_x_as_up(void **state)
{
    (void)state;
    ef_ctx *ctx = ctx_new();
    ef_model *m = one_member("[0, 0, 4.5]", NULL, NULL, ctx);
    const double want[3][3] = {{0, 0, 1}, {0, -1, 0}, {1, 0, 0}};
    assert_axes(&m->members[0], want);
    assert_rel_close(m->members[0].length, 4.5, 1e-15);
    ef_model_free(&m);
    ef_ctx_free(&ctx);
}

/* Horizontal member along +X: up = +Z, so z = +Z, y = Z × X = +Y. Along +Y: y = Z × Y = -X. */
static void test_model_axes_horizontal_members_have_z_up(void **state)
{
    (void)state;
    ef_ctx *ctx = ctx_new();
    ef_model *m = one_member("[6, 0, 0]", NULL, NULL, ctx);
    const double wx[3][3] = {{1, 0, 0}, {0, 1, 0}, {0, 0, 1}};
    assert_axes(&m->members[0], wx);
    ef_model_free(&m);
    m = one_member("[0, 2, 0]", NULL, NULL, ctx);
    const double wy[3][3] = {{0, 1, 0}, {-1, 0, 0}, {0, 0, 1}};
    assert_axes(&m->members[0], wy);
    ef_model_free(&m);
    ef_ctx_free(&ctx);
}

/* Inclined member (0,0,0) -> (3,0,4): x = (0.6, 0, 0.8); z = Z - 0.8 x normalised =
 * (-0.8, 0, 0.6); y = z × x = (0, 1, 0). */
static void test_model_axes_inclined_member(void **state)
{
    (void)state;
    ef_ctx *ctx = ctx_new();
    ef_model *m = one_member("[3, 0, 4]", NULL, NULL, ctx);
    const double want[3][3] = {{0.6, 0, 0.8}, {0, 1, 0}, {-0.8, 0, 0.6}};
    assert_axes(&m->members[0], want);
    assert_rel_close(m->members[0].length, 5.0, 1e-15);
    ef_model_free(&m);
    ef_ctx_free(&ctx);
}

/* roll 90 (degrees) turns y to z and z to -y, right-handed about x: along +X,
 * y' = +Z, z' = -Y. The stored roll is in radians. */
static void test_model_axes_roll_90_turns_y_into_z(void **state)
{
    (void)state;
    ef_ctx *ctx = ctx_new();
    ef_model *m = one_member("[6, 0, 0]", ", roll: 90", NULL, ctx);
    const double want[3][3] = {{1, 0, 0}, {0, 0, 1}, {0, -1, 0}};
    assert_axes(&m->members[0], want);
    assert_rel_close(m->members[0].roll, 3.14159265358979323846 / 2, 1e-15);
    ef_model_free(&m);
    ef_ctx_free(&ctx);
}

/* Explicit up (0, 1, 0) on a member along +X: z = +Y, y = Y × X = -Z. An `up` with a
 * component along the member only has its normal part used. */
static void test_model_axes_explicit_up(void **state)
{
    (void)state;
    ef_ctx *ctx = ctx_new();
    ef_model *m = one_member("[6, 0, 0]", ", up: [0, 1, 0]", NULL, ctx);
    const double want[3][3] = {{1, 0, 0}, {0, 0, -1}, {0, 1, 0}};
    assert_axes(&m->members[0], want);
    assert_true(m->members[0].has_up);
    ef_model_free(&m);
    m = one_member("[6, 0, 0]", ", up: [5, 2, 0]", NULL, ctx);
    assert_axes(&m->members[0], want);
    ef_model_free(&m);
    ef_ctx_free(&ctx);
}

/* Gravity along -Y: up = +Y. Along +X: z = +Y, y = -Z. Vertical (along +Y): up = +X,
 * z = +X, y = X × Y = +Z. */
static void test_model_axes_with_gravity_along_minus_y(void **state)
{
    (void)state;
    ef_ctx *ctx = ctx_new();
    ef_model *m = one_member("[6, 0, 0]", NULL, "gravity: [0, -9.81, 0]\n", ctx);
    const double wx[3][3] = {{1, 0, 0}, {0, 0, -1}, {0, 1, 0}};
    assert_axes(&m->members[0], wx);
    assert_abs_close(m->gravity_dir[1], -1.0, 1e-15);    /* normalised */
    ef_model_free(&m);
    m = one_member("[0, 3, 0]", NULL, "gravity: [0, -1, 0]\n", ctx);
    const double wy[3][3] = {{0, 1, 0}, {0, 0, 1}, {1, 0, 0}};
    assert_axes(&m->members[0], wy);
    ef_model_free(&m);
    ef_ctx_free(&ctx);
}

/* Properties for many directions and rolls: orthonormal rows, det = +1 (right-handed),
 * x along the member, and y normal to `up` before the roll (z lies in the x-up plane). */
static void test_model_axes_are_orthonormal_and_right_handed(void **state)
{
    (void)state;
    const double a[3] = {1.0, -2.0, 0.5};
    const double up[3] = {0.0, 0.0, 1.0};
    for (int k = 0; k < 40; k++) {
        double t = 0.37 * k, p = 0.21 * k + 0.1;
        double b[3] = {a[0] + 3 * cos(t) * sin(p), a[1] + 3 * sin(t) * sin(p), a[2] + 3 * cos(p)};
        double ax[3][3], L;
        if (!ef_model_member_axes(a, b, up, 0.0, 10.0, ax, &L)) continue;
        assert_rel_close(L, 3.0, 1e-14);
        for (int i = 0; i < 3; i++)
            for (int j = 0; j < 3; j++) {
                double d = ax[i][0] * ax[j][0] + ax[i][1] * ax[j][1] + ax[i][2] * ax[j][2];
                assert_abs_close(d, i == j ? 1.0 : 0.0, 1e-14);
            }
        double det = ax[0][0] * (ax[1][1] * ax[2][2] - ax[1][2] * ax[2][1]) -
                     ax[0][1] * (ax[1][0] * ax[2][2] - ax[1][2] * ax[2][0]) +
                     ax[0][2] * (ax[1][0] * ax[2][1] - ax[1][1] * ax[2][0]);
        assert_abs_close(det, 1.0, 1e-14);
        for (int i = 0; i < 3; i++) assert_abs_close(ax[0][i], (b[i] - a[i]) / 3.0, 1e-14);
        assert_abs_close(ax[1][2], 0.0, 1e-14);          /* y ⟂ up */
        assert_true(ax[2][2] > 0.0);                      /* z on the side of up */
        double rolled[3][3], L2;
        assert_true(ef_model_member_axes(a, b, up, 0.3 * k, 10.0, rolled, &L2));
        /* roll keeps x and turns (y, z) by the angle: y·y' = cos(roll) */
        double c = ax[1][0] * rolled[1][0] + ax[1][1] * rolled[1][1] + ax[1][2] * rolled[1][2];
        assert_abs_close(c, cos(0.3 * k), 1e-13);
    }
}

/* Zero length is relative to the model size (EF_ZERO_LENGTH_RTOL); `up` along the member
 * is refused; *length is set either way so the caller can say which. */
static void test_model_axes_refuse_zero_length_and_parallel_up(void **state)
{
    (void)state;
    const double a[3] = {0, 0, 0}, up[3] = {0, 0, 1};
    double ax[3][3], L;
    const double tiny[3] = {1e-10, 0, 0}, ok[3] = {1e-8, 0, 0}, vertical[3] = {0, 0, 2};
    assert_false(ef_model_member_axes(a, tiny, up, 0.0, 1000.0, ax, &L));  /* < 1e-9 * 1000 */
    assert_rel_close(L, 1e-10, 1e-15);
    assert_true(ef_model_member_axes(a, ok, up, 0.0, 1.0, ax, &L));        /* > 1e-9 * 1 */
    assert_false(ef_model_member_axes(a, vertical, up, 0.0, 2.0, ax, &L));
    assert_rel_close(L, 2.0, 1e-15);
    const double leaning[3] = {0, 1e-4, 1};     /* sine 1e-4 < EF_PARALLEL_RTOL */
    assert_false(ef_model_member_axes(a, leaning, up, 0.0, 2.0, ax, &L));
}

/* A column out of plumb by less than EF_PARALLEL_RTOL keeps the vertical default
 * (up = +X), so rounding in coordinates cannot swing its axes. */
static void test_model_default_up_for_nearly_vertical_member(void **state)
{
    (void)state;
    const double g[3] = {0, 0, -1};
    double up[3];
    const double x1[3] = {1e-5, 0, 1};
    ef_model_default_up(x1, g, up);
    assert_abs_close(up[0], 1.0, 0.0);
    const double x2[3] = {0.6, 0, 0.8};
    ef_model_default_up(x2, g, up);
    assert_abs_close(up[2], 1.0, 0.0);
    const double gx[3] = {-1, 0, 0}, x3[3] = {1, 0, 0};   /* gravity along X */
    ef_model_default_up(x3, gx, up);
    assert_abs_close(up[1], 1.0, 0.0);
}

/* ---- values, units and defaults ------------------------------------------------ */

/* kip and inch: g = 386.0886 in/s^2 (9.80665 / 0.0254, exact definitions, NIST SP 811),
 * density = unit_weight / g, walker weight 746 N = 0.16770747 kip (746 / 4448.2216). */
static void test_model_units_kip_inch(void **state)
{
    (void)state;
    ef_ctx *ctx = ctx_new();
    ef_model *m = load_text("eigenframe: 1\n"
                            "units: {force: kip, length: in}\n"
                            "materials: {steel: {E: 29000, nu: 0.3, unit_weight: 2.836e-4}}\n"
                            "sections: {s: {pipe: {d: 10.75, t: 0.365}}}\n"
                            "nodes: {1: [0, 0, 0], 2: [0, 0, 240]}\n"
                            "members: {c: {nodes: [1, 2], section: s, material: steel}}\n"
                            "supports: {1: fixed}\n"
                            "analyses: {walking: {receivers: [2], damping: 0.02}}\n",
                            ctx, EF_OK);
    assert_int_equal(m->units.force, EF_FORCE_KIP);
    assert_int_equal(m->units.length, EF_LEN_IN);
    assert_rel_close(ef_units_g(&m->units), 9.80665 / 0.0254, 1e-15);
    assert_rel_close(m->materials[0].density, 2.836e-4 / (9.80665 / 0.0254), 1e-14);
    assert_rel_close(m->materials[0].G, 29000 / (2 * 1.3), 1e-15);
    assert_rel_close(m->analyses.walk_weight, 746.0 / 4448.2216152605, 1e-12);
    assert_true(m->analyses.modal);               /* walking implies the modal defaults */
    assert_int_equal(m->analyses.modal_modes, 12);
    assert_int_equal(m->analyses.n_walk_walkers, 1);    /* walkers default to receivers */
    assert_int_equal(m->analyses.walk_walkers[0], ef_model_find_node(m, "2"));
    ef_model_free(&m);
    ef_ctx_free(&ctx);
}

/* Materials: G = E / (2 (1 + nu)) (isotropic elasticity); density = unit_weight / g,
 * 25 kN/m^3 / 9.80665 = 2.549 t/m^3; absent: massless. */
static void test_model_material_derived_values(void **state)
{
    (void)state;
    ef_ctx *ctx = ctx_new();
    ef_model *m = load_text("eigenframe: 1\n"
                            "units: {force: kN, length: m}\n"
                            "materials:\n"
                            "  concrete: {E: 33e6, nu: 0.2, unit_weight: 25}\n"
                            "  steel: {E: 210e6, G: 81e6, density: 7.85}\n"
                            "  ghost: {E: 1e6, G: 4e5}\n"
                            "sections: {s: {rectangle: {b: 0.3, h: 0.5}}}\n"
                            "nodes: {a: [0, 0, 0], b: [5, 0, 0]}\n"
                            "members:\n"
                            "  m1: {nodes: [a, b], section: s, material: concrete}\n"
                            "  m2: {nodes: [b, a], section: s, material: steel}\n"
                            "  m3: {nodes: [a, b], section: s, material: ghost}\n",
                            ctx, EF_OK);
    assert_rel_close(m->materials[0].G, 33e6 / 2.4, 1e-15);
    assert_rel_close(m->materials[0].density, 25.0 / 9.80665, 1e-15);
    assert_rel_close(m->materials[1].G, 81e6, 0.0);
    assert_rel_close(m->materials[1].density, 7.85, 0.0);
    assert_abs_close(m->materials[2].density, 0.0, 0.0);
    ef_model_free(&m);
    ef_ctx_free(&ctx);
}

/* Sections: a shape gives A, Iy, Iz, J (section.c); explicit keys override it; Ip
 * defaults to Iy + Iz; Ay, Az only when given. */
static void test_model_section_shape_and_overrides(void **state)
{
    (void)state;
    ef_ctx *ctx = ctx_new();
    ef_model *m = load_text("eigenframe: 1\n"
                            "units: {force: kN, length: m}\n"
                            "materials: {steel: {E: 210e6, G: 81e6}}\n"
                            "sections:\n"
                            "  beam: {I: {h: 0.30, b: 0.15, tw: 0.0071, tf: 0.0107}, J: 1.0e-7,"
                            " Ay: 2.1e-3, extra_mass: 0.05}\n"
                            "  col: {A: 7.81e-3, Iy: 5.70e-5, Iz: 2.00e-5, J: 5.93e-7, Ip: 9e-5}\n"
                            "nodes: {a: [0, 0, 0], b: [5, 0, 0]}\n"
                            "members:\n"
                            "  m1: {nodes: [a, b], section: beam, material: steel}\n"
                            "  m2: {nodes: [b, a], section: col, material: steel}\n",
                            ctx, EF_OK);
    ef_section_props p;
    ef_section_i(0.30, 0.15, 0.0071, 0.0107, &p);
    const ef_section *s = &m->sections[0];
    assert_int_equal(s->shape, EF_SHAPE_I);
    assert_rel_close(s->dims[3], 0.0107, 0.0);
    assert_rel_close(s->A, p.A, 1e-15);
    assert_rel_close(s->Iy, p.Iy, 1e-15);
    assert_rel_close(s->J, 1.0e-7, 0.0);                /* explicit overrides the shape */
    assert_rel_close(s->Ip, p.Iy + p.Iz, 1e-15);
    assert_rel_close(s->Iw, p.Iw, 1e-15);
    assert_rel_close(s->Ay, 2.1e-3, 0.0);
    assert_abs_close(s->Az, 0.0, 0.0);                  /* not given: no shear deformation */
    assert_rel_close(s->extra_mass, 0.05, 0.0);
    assert_rel_close(m->sections[1].Ip, 9e-5, 0.0);
    assert_abs_close(m->sections[1].Iw, 0.0, 0.0);
    ef_model_free(&m);
    ef_ctx_free(&ctx);
}

/* Defaults of docs/model-format.md when a key is absent. */
static void test_model_defaults_match_the_format_doc(void **state)
{
    (void)state;
    ef_ctx *ctx = ctx_new();
    ef_model *m = one_member("[6, 0, 0]", NULL, NULL, ctx);
    assert_abs_close(m->gravity_dir[2], -1.0, 0.0);
    assert_int_equal(m->divisions, 4);
    assert_int_equal(m->stations, 11);
    assert_int_equal(m->members[0].divisions, 4);
    assert_int_equal(m->members[0].stations, 11);
    assert_int_equal(m->restrain_all, 0);
    assert_true(m->mass_source.self);
    assert_false(m->mass_source.lumped);
    assert_false(m->mass_source.given);
    assert_false(m->analyses.static_given);
    assert_false(m->analyses.modal);
    assert_false(m->analyses.buckling);
    assert_int_equal(m->analyses.modal_modes, 12);
    assert_int_equal(m->analyses.buckling_modes, 4);
    assert_false(m->analyses.buckling_negative);
    assert_rel_close(m->analyses.so_tolerance, 1e-6, 0.0);
    assert_int_equal(m->analyses.so_max_iterations, 50);
    assert_false(m->analyses.so_chord_only);
    assert_rel_close(m->analyses.walk_pace_hz[0], 1.8, 0.0);
    assert_rel_close(m->analyses.walk_pace_hz[1], 2.2, 0.0);
    assert_rel_close(m->analyses.walk_weight, 0.746, 1e-15);   /* 746 N in kN */
    assert_int_equal(m->analyses.walk_weighting, 0);
    assert_null(m->title);
    ef_model_free(&m);
    ef_ctx_free(&ctx);
}

/* Analyses blocks: `modes: all` is 0; pdelta chord; negative; machines' defaults. */
static void test_model_analyses_are_read(void **state)
{
    (void)state;
    ef_ctx *ctx = ctx_new();
    char text[2048];
    snprintf(text, sizeof text,
             "%s"
             "nodes: {a: [0, 0, 0], b: [6, 0, 0]}\n"
             "members: {m: {nodes: [a, b], section: s, material: steel}}\n"
             "supports: {a: fixed}\n"
             "loads: {dead: {self_weight: 1.0}, live: {nodes: {b: {Fz: -1}}}}\n"
             "combinations: {ULS: {dead: 1.35, live: 1.5}}\n"
             "mass_source: {self: false, loads: {live: 0.3}, lumped: true}\n"
             "analyses:\n"
             "  static: []\n"
             "  modal: {modes: all, above_hz: 0.5}\n"
             "  buckling: {load: ULS, modes: 2, negative: true}\n"
             "  second_order: {loads: [ULS, dead], tolerance: 1e-8, max_iterations: 20,"
             " pdelta: chord}\n"
             "  walking: {receivers: [b], walkers: [a, b], damping: 0.03, pace_hz: [1.5, 2.5],"
             " walker_weight: 0.7, path_length: 12, weighting: Wg, limit_R: 8}\n"
             "  machines: {fan: {node: b, force: [0, 0, 0.2], hz: 12.5, damping: 0.02}}\n",
             frame_head);
    ef_model *m = load_text(text, ctx, EF_OK);
    const ef_analyses *a = &m->analyses;
    assert_true(a->static_given);
    assert_int_equal(a->n_static_loads, 0);
    assert_true(a->modal);
    assert_int_equal(a->modal_modes, 0);
    assert_rel_close(a->modal_above_hz, 0.5, 0.0);
    assert_true(a->buckling);
    assert_int_equal(a->buckling_load, ef_model_find_load(m, "ULS"));
    assert_int_equal(a->buckling_modes, 2);
    assert_true(a->buckling_negative);
    assert_int_equal(a->n_second_order_loads, 2);
    assert_int_equal(a->second_order_loads[1], ef_model_find_load(m, "dead"));
    assert_rel_close(a->so_tolerance, 1e-8, 0.0);
    assert_int_equal(a->so_max_iterations, 20);
    assert_true(a->so_chord_only);
    assert_true(a->walking);
    assert_int_equal(a->n_walk_walkers, 2);
    assert_rel_close(a->walk_damping, 0.03, 0.0);
    assert_rel_close(a->walk_pace_hz[1], 2.5, 0.0);
    assert_rel_close(a->walk_weight, 0.7, 0.0);
    assert_rel_close(a->walk_path_length, 12.0, 0.0);
    assert_int_equal(a->walk_weighting, 1);
    assert_rel_close(a->walk_limit_R, 8.0, 0.0);
    assert_int_equal(a->n_machines, 1);
    assert_string_equal(a->machines[0].name, "fan");
    assert_rel_close(a->machines[0].sweep, 0.1, 0.0);
    assert_int_equal(a->machines[0].n_receivers, 1);            /* default: its own node */
    assert_int_equal(a->machines[0].receivers[0], ef_model_find_node(m, "b"));
    assert_false(m->mass_source.self);
    assert_true(m->mass_source.lumped);
    assert_true(m->mass_source.given);
    assert_int_equal(m->mass_source.n_cases, 1);
    assert_int_equal(m->mass_source.cases[0], ef_model_find_load(m, "live"));
    assert_rel_close(m->mass_source.factors[0], 0.3, 0.0);
    ef_model_free(&m);
    ef_ctx_free(&ctx);
}

/* Loads: node loads, the four member load kinds, from/to/at, local axes. */
static void test_model_loads_are_read(void **state)
{
    (void)state;
    ef_ctx *ctx = ctx_new();
    ef_model *m = load_text("eigenframe: 1\n"
                            "units: {force: kN, length: m}\n"
                            "materials: {steel: {E: 210e6, G: 81e6}}\n"
                            "sections: {s: {A: 1e-2, Iy: 1e-4, Iz: 2e-5, J: 1e-6}}\n"
                            "nodes: {a: [0, 0, 0], b: [6, 0, 0]}\n"
                            "members: {m: {nodes: [a, b], section: s, material: steel}}\n"
                            "supports: {a: fixed, b: [uz, ry]}\n"
                            "loads:\n"
                            "  dead:\n"
                            "    self_weight: 1.0\n"
                            "    nodes: {b: {Fx: 1.5, Mz: 0.4}}\n"
                            "    members:\n"
                            "      m:\n"
                            "        - {uniform: [0, 0, -4.2]}\n"
                            "        - {linear: [[0, 0, -2], [0, 0, -6]], from: 0.2, to: 1.0}\n"
                            "        - {point: [0, 0, -15], at: 0.25}\n"
                            "        - {moment: [0, 2, 0], at: 0.5, axes: local}\n"
                            "  single:\n"
                            "    members: {m: {uniform: [0, -3, 0], axes: local, to: 0.5}}\n",
                            ctx, EF_OK);
    assert_int_equal(m->n_cases, 2);
    const ef_load_case *lc = &m->cases[0];
    assert_rel_close(lc->self_weight, 1.0, 0.0);
    assert_int_equal(lc->n_node_loads, 1);
    assert_rel_close(lc->node_loads[0].f[0], 1.5, 0.0);
    assert_rel_close(lc->node_loads[0].f[5], 0.4, 0.0);
    assert_int_equal(lc->n_member_loads, 4);
    const ef_member_load *ml = lc->member_loads;
    assert_int_equal(ml[0].kind, EF_MLOAD_UNIFORM);
    assert_rel_close(ml[0].w[1][2], -4.2, 0.0);
    assert_abs_close(ml[0].from, 0.0, 0.0);
    assert_rel_close(ml[0].to, 1.0, 0.0);
    assert_false(ml[0].local);
    assert_int_equal(ml[1].kind, EF_MLOAD_LINEAR);
    assert_rel_close(ml[1].w[0][2], -2.0, 0.0);
    assert_rel_close(ml[1].w[1][2], -6.0, 0.0);
    assert_rel_close(ml[1].from, 0.2, 0.0);
    assert_int_equal(ml[2].kind, EF_MLOAD_POINT);
    assert_rel_close(ml[2].from, 0.25, 0.0);
    assert_rel_close(ml[2].to, 0.25, 0.0);
    assert_int_equal(ml[3].kind, EF_MLOAD_MOMENT);
    assert_true(ml[3].local);
    assert_int_equal(m->cases[1].n_member_loads, 1);      /* one mapping instead of a list */
    assert_rel_close(m->cases[1].member_loads[0].to, 0.5, 0.0);
    assert_int_equal(m->n_supports, 2);
    assert_int_equal(m->supports[1].held, EF_UZ | EF_RY);
    ef_model_free(&m);
    ef_ctx_free(&ctx);
}

/* Supports (fixed, pinned, list, springs) and extra masses. */
static void test_model_supports_and_masses_are_read(void **state)
{
    (void)state;
    ef_ctx *ctx = ctx_new();
    char text[2048];
    snprintf(text, sizeof text,
             "%s"
             "restrain_all: [uy, rx, rz]\n"
             "nodes: {a: [0, 0, 0], b: [6, 0, 0], c: [12, 0, 0], d: [18, 0, 0]}\n"
             "members:\n"
             "  m1: {nodes: [a, b], section: s, material: steel}\n"
             "  m2: {nodes: [b, c], section: s, material: steel}\n"
             "  m3: {nodes: [c, d], section: s, material: steel}\n"
             "supports:\n"
             "  a: fixed\n"
             "  b: pinned\n"
             "  c: {uz: fixed, ux: 2.0e4, ry: 5.0e3}\n"
             "masses: {b: 1.8, c: {m: 2.4, Jx: 0.3, Jz: 0.5}}\n",
             frame_head);
    ef_model *m = load_text(text, ctx, EF_OK);
    assert_int_equal(m->restrain_all, EF_UY | EF_RX | EF_RZ);
    assert_int_equal(m->n_supports, 3);
    assert_int_equal(m->supports[0].held, EF_ALL_DOF);
    assert_int_equal(m->supports[1].held, EF_UX | EF_UY | EF_UZ);
    assert_int_equal(m->supports[2].held, EF_UZ);
    assert_rel_close(m->supports[2].spring[0], 2.0e4, 0.0);
    assert_rel_close(m->supports[2].spring[4], 5.0e3, 0.0);
    assert_abs_close(m->supports[2].spring[1], 0.0, 0.0);
    assert_int_equal(m->n_masses, 2);
    assert_rel_close(m->masses[0].m, 1.8, 0.0);
    assert_rel_close(m->masses[1].J[0], 0.3, 0.0);
    assert_abs_close(m->masses[1].J[1], 0.0, 0.0);
    assert_rel_close(m->masses[1].J[2], 0.5, 0.0);
    ef_model_free(&m);
    ef_ctx_free(&ctx);
}

/* Releases and hinges as masks; an axial_only member has one element and no releases. */
static void test_model_member_options(void **state)
{
    (void)state;
    ef_ctx *ctx = ctx_new();
    char text[2048];
    snprintf(text, sizeof text,
             "%s"
             "mesh: {divisions: 6, stations: 5}\n"
             "nodes: {a: [0, 0, 0], b: [6, 0, 0], c: [6, 0, 3]}\n"
             "members:\n"
             "  m1: {nodes: [a, b], section: s, material: steel, release: {start: [ry, rz]},"
             " stations: 21}\n"
             "  m2: {nodes: [b, c], section: s, material: steel, hinged: both, divisions: 3}\n"
             "  m3: {nodes: [a, c], section: s, material: steel, axial_only: true, hinged: end}\n"
             "supports: {a: fixed}\n",
             frame_head);
    ef_model *m = load_text(text, ctx, EF_OK);
    assert_int_equal(m->members[0].release[0], EF_RY | EF_RZ);
    assert_int_equal(m->members[0].release[1], 0);
    assert_int_equal(m->members[0].divisions, 6);
    assert_int_equal(m->members[0].stations, 21);
    assert_int_equal(m->members[1].release[0], EF_RY | EF_RZ);
    assert_int_equal(m->members[1].release[1], EF_RY | EF_RZ);
    assert_int_equal(m->members[1].divisions, 3);
    assert_int_equal(m->members[1].stations, 5);
    assert_true(m->members[2].axial_only);
    assert_int_equal(m->members[2].divisions, 1);
    assert_int_equal(m->members[2].release[1], 0);      /* rotations already free */
    ef_model_free(&m);
    ef_ctx_free(&ctx);
}

/* A YAML integer key names an item by its decimal text: `007` and `7` are one node. */
static void test_model_integer_names_are_decimal_text(void **state)
{
    (void)state;
    ef_ctx *ctx = ctx_new();
    char text[1024];
    snprintf(text, sizeof text,
             "%s"
             "nodes: {007: [0, 0, 0], 12: [6, 0, 0], '0012': [9, 0, 0]}\n"
             "members: {1: {nodes: [7, 0x0c], section: s, material: steel},"
             " 2: {nodes: [12, '0012'], section: s, material: steel}}\n"
             "supports: {+7: fixed}\n",
             frame_head);
    ef_model *m = load_text(text, ctx, EF_OK);
    assert_string_equal(m->nodes[0].name, "7");
    assert_string_equal(m->nodes[2].name, "0012");          /* quoted: text as written */
    assert_string_equal(m->members[0].name, "1");
    assert_int_equal(m->members[0].node[0], 0);
    assert_int_equal(m->members[0].node[1], 1);
    assert_int_equal(m->members[1].node[1], 2);
    assert_int_equal(m->supports[0].node, 0);
    ef_model_free(&m);
    ef_ctx_free(&ctx);
}

/* Combinations expand through nesting: ULS-W = 1.0 ULS + 1.5 wind, ULS = 1.35 dead +
 * 1.5 live, so ULS-W = 1.35 dead + 1.5 live + 1.5 wind; twice = 2 ULS-W. */
static void test_model_combinations_expand_through_nesting(void **state)
{
    (void)state;
    ef_ctx *ctx = ctx_new();
    char text[2048];
    snprintf(text, sizeof text,
             "%s"
             "nodes: {a: [0, 0, 0], b: [6, 0, 0]}\n"
             "members: {m: {nodes: [a, b], section: s, material: steel}}\n"
             "supports: {a: fixed}\n"
             "loads: {dead: {self_weight: 1}, live: {nodes: {b: {Fz: -1}}},"
             " wind: {nodes: {b: {Fx: 1}}}}\n"
             "combinations:\n"
             "  twice: {ULS-W: 2.0}\n"                 /* refers to a later combination */
             "  ULS-W: {ULS: 1.0, wind: 1.5}\n"
             "  ULS: {dead: 1.35, live: 1.5}\n",
             frame_head);
    ef_model *m = load_text(text, ctx, EF_OK);
    assert_int_equal(ef_model_n_loads(m), 6);
    double f[3];
    ef_model_load_factors(m, ef_model_find_load(m, "ULS-W"), f);
    assert_rel_close(f[0], 1.35, 1e-15);
    assert_rel_close(f[1], 1.5, 1e-15);
    assert_rel_close(f[2], 1.5, 1e-15);
    ef_model_load_factors(m, ef_model_find_load(m, "twice"), f);
    assert_rel_close(f[0], 2.7, 1e-15);
    assert_rel_close(f[2], 3.0, 1e-15);
    ef_model_load_factors(m, ef_model_find_load(m, "live"), f);
    assert_abs_close(f[0], 0.0, 0.0);
    assert_rel_close(f[1], 1.0, 0.0);
    assert_true(ef_model_load_is_combo(m, ef_model_find_load(m, "twice")));
    assert_string_equal(ef_model_load_name(m, 3), "twice");
    ef_model_free(&m);
    ef_ctx_free(&ctx);
}

/* Lookups find every name and nothing else. */
static void test_model_lookups_find_every_name(void **state)
{
    (void)state;
    ef_ctx *ctx = ctx_new();
    ef_model *m = NULL;
    assert_int_equal(ef_model_load_yaml("tests/models/good/loads-all-kinds.yaml", &m, ctx), EF_OK);
    for (ef_index i = 0; i < m->n_nodes; i++)
        assert_int_equal(ef_model_find_node(m, m->nodes[i].name), i);
    for (ef_index i = 0; i < m->n_members; i++)
        assert_int_equal(ef_model_find_member(m, m->members[i].name), i);
    for (ef_index i = 0; i < ef_model_n_loads(m); i++)
        assert_int_equal(ef_model_find_load(m, ef_model_load_name(m, i)), i);
    assert_int_equal(ef_model_find_node(m, "Z9"), EF_NONE);
    assert_int_equal(ef_model_find_member(m, ""), EF_NONE);
    assert_int_equal(ef_model_find_load(m, "ULS-2"), EF_NONE);
    assert_int_equal(ef_model_find_material(m, "steel"), 0);
    assert_int_equal(ef_model_find_section(m, "girder"), 1);
    assert_string_equal(ef_dof_names[4], "ry");
    ef_model_free(&m);
    ef_ctx_free(&ctx);
}

/* The model's fingerprint is the SHA-256 of the file's bytes. */
static void test_model_sha256_is_of_the_file_bytes(void **state)
{
    (void)state;
    const char *path = "tests/models/good/portal.json";
    size_t len;
    char *bytes = read_file(path, &len);
    assert_non_null(bytes);
    unsigned char want[32];
    ef_sha256(bytes, len, want);
    ef_ctx *ctx = ctx_new();
    ef_model *m = NULL;
    assert_int_equal(ef_model_load_yaml(path, &m, ctx), EF_OK);
    assert_memory_equal(m->sha256, want, 32);
    assert_string_equal(m->file, path);
    assert_string_equal(m->title, "Store canopy portal, JSON input");
    ef_model_free(&m);
    ef_ctx_free(&ctx);
    free(bytes);
}

/* Warnings (unused material and section, a node attached to no member) do not fail. */
static void test_model_warnings_do_not_fail_the_load(void **state)
{
    (void)state;
    ef_ctx *ctx = ctx_new();
    ef_model *m = load_text("eigenframe: 1\n"
                            "units: {force: kN, length: m}\n"
                            "materials: {steel: {E: 210e6, G: 81e6}, alu: {E: 70e6, nu: 0.33}}\n"
                            "sections: {s: {circle: {d: 0.1}}, t: {circle: {d: 0.2}}}\n"
                            "nodes: {a: [0, 0, 0], b: [6, 0, 0], lone: [3, 3, 3]}\n"
                            "members: {m: {nodes: [a, b], section: s, material: steel}}\n"
                            "supports: {a: fixed, lone: fixed}\n",
                            ctx, EF_OK);
    assert_int_equal(ef_ctx_error_count(ctx), 0);
    assert_int_equal(ef_ctx_diag_count(ctx), 3);
    assert_message(ctx, "test.yaml:3:41: warning: material 'alu' is not used by any member");
    assert_message(ctx, "test.yaml:4:35: warning: section 't' is not used by any member");
    assert_message(ctx, "test.yaml:5:37: warning: node 'lone' is attached to no member");
    assert_int_equal(ef_ctx_diag_level(ctx, 0), EF_DIAG_WARNING);
    ef_model_free(&m);
    ef_ctx_free(&ctx);
}

/* Anchors and aliases are followed; an alias with no anchor is an error. */
static void test_model_aliases_are_followed(void **state)
{
    (void)state;
    ef_ctx *ctx = ctx_new();
    ef_model *m = load_text("eigenframe: 1\n"
                            "units: {force: kN, length: m}\n"
                            "materials: {steel: &st {E: 210e6, G: 81e6}, steel2: *st}\n"
                            "sections: {s: {circle: {d: 0.1}}}\n"
                            "nodes: {a: &origin [0, 0, 0], b: [6, 0, 0]}\n"
                            "members:\n"
                            "  m1: &beam {nodes: [a, b], section: s, material: steel}\n"
                            "  m2: {nodes: [b, a], section: s, material: steel2}\n",
                            ctx, EF_OK);
    assert_rel_close(m->materials[1].E, 210e6, 0.0);
    ef_model_free(&m);
    ef_ctx_free(&ctx);
}

/* JSON text in memory, named *.json (read in JSON mode). */
static void test_model_json_text_loads(void **state)
{
    (void)state;
    const char *json =
        "{\"eigenframe\": 1, \"units\": {\"force\": \"N\", \"length\": \"mm\"},"
        " \"materials\": {\"S\": {\"E\": 210000, \"nu\": 0.3, \"density\": 7.85e-9}},"
        " \"sections\": {\"R\": {\"rectangle\": {\"b\": 50, \"h\": 100}}},"
        " \"nodes\": {\"1\": [0, 0, 0], \"2\": [1000, 0, 0]},"
        " \"members\": {\"M\": {\"nodes\": [\"1\", \"2\"], \"section\": \"R\","
        " \"material\": \"S\", \"axial_only\": false}},"
        " \"supports\": {\"1\": \"fixed\"}}";
    ef_ctx *ctx = ctx_new();
    ef_model *m = NULL;
    assert_int_equal(ef_model_load_yaml_string(json, strlen(json), "in-memory.json", &m, ctx),
                     EF_OK);
    assert_rel_close(m->sections[0].Iy, 50.0 * 1e6 / 12.0, 1e-15);   /* b h^3 / 12 */
    assert_rel_close(m->members[0].length, 1000.0, 0.0);
    assert_rel_close(ef_units_g(&m->units), 9806.65, 1e-15);
    ef_model_free(&m);
    /* a quoted number is text, not a number */
    const char *quoted = "{\"eigenframe\": \"1\"}";
    assert_int_equal(ef_model_load_yaml_string(quoted, strlen(quoted), "q.json", &m, ctx),
                     EF_EINPUT);
    assert_message(ctx, "q.json:1:17: error: model file: 'eigenframe' must be a whole number, "
                        "not '1'");
    ef_ctx_free(&ctx);
}

static void test_model_missing_file_is_an_io_error(void **state)
{
    (void)state;
    ef_ctx *ctx = ctx_new();
    ef_model *m = NULL;
    assert_int_equal(ef_model_load_yaml("tests/models/no-such-file.yaml", &m, ctx), EF_EIO);
    assert_null(m);
    assert_message(ctx, "tests/models/no-such-file.yaml: error: cannot open the model file: "
                        "no such file or directory");
    assert_null(ctx->file);                     /* the caller's file name is restored */
    ef_ctx_free(&ctx);
}

/* Hostile inputs: each must fail cleanly (EF_EINPUT, at least one error, no model, and
 * under the sanitizers no memory error). */
static void test_model_hostile_inputs_fail_cleanly(void **state)
{
    (void)state;
    static const char *const inputs[] = {
        "",
        "\n\n# only a comment\n",
        "~",
        "[1, 2, 3]",
        "just text",
        "{a: [",
        "eigenframe: 1\nunits: *nothing\n",
        "eigenframe: 1\n\tunits: 1\n",
        "eigenframe: 1\nunits: {force: kN, length: m}\nnodes: [1, 2]\nmembers: ~\n",
        "eigenframe: 1\nunits: {force: kN, length: m}\nnodes: {a: ~}\nmembers: {m: ~}\n",
        "eigenframe: 1\nunits: {force: kN, length: m}\nnodes: {a: [[], {}, ~]}\n"
        "members: {m: {nodes: ~, section: [], material: {}}}\n",
        "eigenframe: 1\nunits: {force: kN, length: m}\nnodes: {[a]: [0, 0, 0], ~: [1, 1, 1]}\n"
        "members: {{}: {}}\n",
        "eigenframe: 1\nunits: {force: kN, length: m}\nnodes: {a: [1e308, -1e308, 1e308],"
        " b: [-1e308, 1e308, -1e308]}\nmembers: {m: {nodes: [a, b], section: s, material: t}}\n",
        "eigenframe: 99999999999999999999999\nunits: {force: kN, length: m}\n",
        "eigenframe: 1\nunits: {force: kN, length: m}\nmaterials: {s: {E: .inf, G: -.inf,"
        " nu: .NaN}}\nnodes: {a: [0x10, 0o7, +.5]}\nmembers: {}\n",
        "eigenframe: 1\nunits: {force: kN, length: m}\nloads: {a: {members: {x: [1, ~, []]},"
        " nodes: {y: [1]}}}\ncombinations: {c: [1], d: {c: x, e: 1}}\nanalyses: [1]\n",
        "eigenframe: 1\nunits: {force: kN, length: m}\nanalyses: {static: {}, modal: [],"
        " buckling: {load: []}, walking: {receivers: {}, pace_hz: [3, 1]}, machines: [x]}\n",
        "a: 1\na: 2\n",
        "eigenframe: 1\n---\neigenframe: 1\n",
        "\xff\xfe\x00garbage",
    };
    for (size_t i = 0; i < sizeof inputs / sizeof inputs[0]; i++) {
        ef_ctx *ctx = ctx_new();
        ef_model *m = NULL;
        size_t len = i + 1 == sizeof inputs / sizeof inputs[0] ? 10 : strlen(inputs[i]);
        ef_status st = ef_model_load_yaml_string(inputs[i], len, "h.yaml", &m, ctx);
        if (st != EF_EINPUT || ef_ctx_error_count(ctx) == 0)
            print_message("input %zu: status %d, %ld errors\n", i, (int)st,
                          (long)ef_ctx_error_count(ctx));
        assert_int_equal(st, EF_EINPUT);
        assert_true(ef_ctx_error_count(ctx) > 0);
        assert_null(m);
        ef_ctx_free(&ctx);
    }
}

/* Errors are collected in one run: several independent problems, each reported once,
 * with its position; the caller's earlier messages are kept. */
static void test_model_reports_every_problem_in_one_run(void **state)
{
    (void)state;
    ef_ctx *ctx = ctx_new();
    ef_diag_error(ctx, NULL, "an earlier message");
    load_text("eigenframe: 1\n"
              "units: {force: kN, length: m}\n"
              "materials: {steel: {E: -1, G: 81e6}}\n"
              "sections: {s: {A: 1e-2, Iy: 1e-4, Iz: 2e-5}}\n"
              "nodes: {a: [0, 0, 0], b: [6, 0, 0]}\n"
              "members: {m: {nodes: [a, c], section: s, material: steel}}\n",
              ctx, EF_EINPUT);
    assert_int_equal(ef_ctx_error_count(ctx), 4);
    assert_message(ctx, "error: an earlier message");
    assert_message(ctx, "test.yaml:3:24: error: material 'steel': 'E' must be positive, not '-1'");
    assert_message(ctx, "test.yaml:4:12: error: section 's': 'J' is required (or give a shape: "
                        "rectangle, circle, pipe, I, box)");
    assert_message(ctx, "test.yaml:6:26: error: member 'm': end node 'c' is not defined");
    ef_ctx_free(&ctx);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_model_bad_files_give_the_expected_errors),
        cmocka_unit_test(test_model_good_files_load_without_messages),
        cmocka_unit_test(test_model_axes_vertical_member_takes_global_x_as_up),
        cmocka_unit_test(test_model_axes_horizontal_members_have_z_up),
        cmocka_unit_test(test_model_axes_inclined_member),
        cmocka_unit_test(test_model_axes_roll_90_turns_y_into_z),
        cmocka_unit_test(test_model_axes_explicit_up),
        cmocka_unit_test(test_model_axes_with_gravity_along_minus_y),
        cmocka_unit_test(test_model_axes_are_orthonormal_and_right_handed),
        cmocka_unit_test(test_model_axes_refuse_zero_length_and_parallel_up),
        cmocka_unit_test(test_model_default_up_for_nearly_vertical_member),
        cmocka_unit_test(test_model_units_kip_inch),
        cmocka_unit_test(test_model_material_derived_values),
        cmocka_unit_test(test_model_section_shape_and_overrides),
        cmocka_unit_test(test_model_defaults_match_the_format_doc),
        cmocka_unit_test(test_model_analyses_are_read),
        cmocka_unit_test(test_model_loads_are_read),
        cmocka_unit_test(test_model_supports_and_masses_are_read),
        cmocka_unit_test(test_model_member_options),
        cmocka_unit_test(test_model_integer_names_are_decimal_text),
        cmocka_unit_test(test_model_combinations_expand_through_nesting),
        cmocka_unit_test(test_model_lookups_find_every_name),
        cmocka_unit_test(test_model_sha256_is_of_the_file_bytes),
        cmocka_unit_test(test_model_warnings_do_not_fail_the_load),
        cmocka_unit_test(test_model_aliases_are_followed),
        cmocka_unit_test(test_model_json_text_loads),
        cmocka_unit_test(test_model_missing_file_is_an_io_error),
        cmocka_unit_test(test_model_hostile_inputs_fail_cleanly),
        cmocka_unit_test(test_model_reports_every_problem_in_one_run),
    };
    return cmocka_run_group_tests(tests, to_repo_root, NULL);
}
