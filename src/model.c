/* model.c: the in-memory model: freeing, name lookups, combination expansion and member
 * local axes. Reading is in model_yaml.c, cross-item checks in validate.c.
 *
 * Name lookups use `by_name`, a permutation of each list sorted with strcmp, built by
 * ef_model_index_names (binary search: O(log n) per reference, so large models read in
 * O(n log n)).
 */
#include "model.h"
#include "vec3.h"

#include <float.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

const char *const ef_dof_names[6] = {"ux", "uy", "uz", "rx", "ry", "rz"};

static void free_cases(ef_model *m)
{
    for (ef_index i = 0; i < m->n_cases; i++) {
        free(m->cases[i].name);
        free(m->cases[i].node_loads);
        free(m->cases[i].member_loads);
    }
    free(m->cases);
    for (ef_index i = 0; i < m->n_combos; i++) {
        free(m->combos[i].name);
        free(m->combos[i].terms);
    }
    free(m->combos);
}

void ef_model_drop_machines(ef_model *m)
{
    ef_analyses *a = &m->analyses;
    for (ef_index i = 0; i < a->n_machines; i++) {
        free(a->machines[i].name);
        free(a->machines[i].receivers);
    }
    free(a->machines);
    a->machines = NULL;
    a->n_machines = 0;
}

static void free_analyses(ef_model *m)
{
    ef_analyses *a = &m->analyses;
    free(a->static_loads);
    free(a->second_order_loads);
    free(a->walk_receivers);
    free(a->walk_walkers);
    ef_model_drop_machines(m);
}

void ef_model_free(ef_model **pm)
{
    if (!pm || !*pm) return;
    ef_model *m = *pm;
    free(m->file);
    free(m->title);
    for (ef_index i = 0; i < m->n_materials; i++) free(m->materials[i].name);
    free(m->materials);
    for (ef_index i = 0; i < m->n_sections; i++) free(m->sections[i].name);
    free(m->sections);
    for (ef_index i = 0; i < m->n_nodes; i++) free(m->nodes[i].name);
    free(m->nodes);
    for (ef_index i = 0; i < m->n_members; i++) free(m->members[i].name);
    free(m->members);
    free(m->supports);
    free(m->masses);
    free_cases(m);
    free(m->mass_source.cases);
    free(m->mass_source.factors);
    free_analyses(m);
    free(m->case_factors);
    free(m->by_name.material);
    free(m->by_name.section);
    free(m->by_name.node);
    free(m->by_name.member);
    free(m->by_name.load);
    free(m);
    *pm = NULL;
}

/* ---- names ---------------------------------------------------------------- */

typedef enum { K_MATERIAL, K_SECTION, K_NODE, K_MEMBER, K_LOAD } name_kind;

static const char *name_of(const ef_model *m, name_kind k, ef_index i)
{
    switch (k) {
    case K_MATERIAL: return m->materials[i].name;
    case K_SECTION: return m->sections[i].name;
    case K_NODE: return m->nodes[i].name;
    case K_MEMBER: return m->members[i].name;
    case K_LOAD: return ef_model_load_name(m, i);
    }
    return "";
}

static ef_index count_of(const ef_model *m, name_kind k)
{
    switch (k) {
    case K_MATERIAL: return m->n_materials;
    case K_SECTION: return m->n_sections;
    case K_NODE: return m->n_nodes;
    case K_MEMBER: return m->n_members;
    case K_LOAD: return ef_model_n_loads(m);
    }
    return 0;
}

static ef_index **index_of(ef_model *m, name_kind k)
{
    switch (k) {
    case K_MATERIAL: return &m->by_name.material;
    case K_SECTION: return &m->by_name.section;
    case K_NODE: return &m->by_name.node;
    case K_MEMBER: return &m->by_name.member;
    case K_LOAD: return &m->by_name.load;
    }
    return NULL;
}

static const ef_index *cindex_of(const ef_model *m, name_kind k)
{
    return *index_of((ef_model *)m, k);
}

static int cmp_names(const char *a, const char *b) { return strcmp(a ? a : "", b ? b : ""); }

/* Stable bottom-up merge sort of idx[0..n) by name, with a scratch array tmp[n]. */
static void sort_by_name(const ef_model *m, name_kind k, ef_index *idx, ef_index *tmp, ef_index n)
{
    for (ef_index width = 1; width < n; width *= 2) {
        for (ef_index lo = 0; lo < n; lo += 2 * width) {
            ef_index mid = EF_MIN(lo + width, n), hi = EF_MIN(lo + 2 * width, n);
            ef_index i = lo, j = mid, o = lo;
            while (i < mid && j < hi)
                tmp[o++] = (cmp_names(name_of(m, k, idx[j]), name_of(m, k, idx[i])) < 0)
                               ? idx[j++] : idx[i++];
            while (i < mid) tmp[o++] = idx[i++];
            while (j < hi) tmp[o++] = idx[j++];
        }
        memcpy(idx, tmp, (size_t)n * sizeof *idx);
    }
}

ef_status ef_model_index_names(ef_model *m)
{
    ef_status st = EF_OK;
    for (int k = K_MATERIAL; k <= K_LOAD; k++) {
        ef_index n = count_of(m, (name_kind)k);
        ef_index **slot = index_of(m, (name_kind)k);
        free(*slot);
        *slot = NULL;
        if (n == 0) continue;
        ef_index *idx = malloc((size_t)n * sizeof *idx);
        ef_index *tmp = malloc((size_t)n * sizeof *tmp);
        if (!idx || !tmp) {
            free(idx);
            free(tmp);
            st = EF_ENOMEM;
            continue;
        }
        for (ef_index i = 0; i < n; i++) idx[i] = i;
        sort_by_name(m, (name_kind)k, idx, tmp, n);
        free(tmp);
        *slot = idx;
    }
    return st;
}

static ef_index find(const ef_model *m, name_kind k, const char *name)
{
    const ef_index *idx = cindex_of(m, k);
    ef_index lo = 0, hi = count_of(m, k);
    if (!idx || !name) return EF_NONE;
    while (lo < hi) {                       /* first position with name >= `name` */
        ef_index mid = lo + (hi - lo) / 2;
        if (cmp_names(name_of(m, k, idx[mid]), name) < 0)
            lo = mid + 1;
        else
            hi = mid;
    }
    if (lo < count_of(m, k) && cmp_names(name_of(m, k, idx[lo]), name) == 0) return idx[lo];
    return EF_NONE;
}

ef_index ef_model_find_material(const ef_model *m, const char *name)
{
    return find(m, K_MATERIAL, name);
}
ef_index ef_model_find_section(const ef_model *m, const char *name)
{
    return find(m, K_SECTION, name);
}
ef_index ef_model_find_node(const ef_model *m, const char *name) { return find(m, K_NODE, name); }
ef_index ef_model_find_member(const ef_model *m, const char *name)
{
    return find(m, K_MEMBER, name);
}
ef_index ef_model_find_load(const ef_model *m, const char *name) { return find(m, K_LOAD, name); }

const char *ef_model_load_name(const ef_model *m, ef_index load)
{
    if (load >= 0 && load < m->n_cases) return m->cases[load].name;
    if (load >= m->n_cases && load < ef_model_n_loads(m)) return m->combos[load - m->n_cases].name;
    return "";
}

void ef_model_load_factors(const ef_model *m, ef_index load, double *factors)
{
    for (ef_index k = 0; k < m->n_cases; k++) factors[k] = 0.0;
    if (load >= 0 && load < m->n_cases) {
        factors[load] = 1.0;
    } else if (load >= m->n_cases && load < ef_model_n_loads(m) && m->case_factors) {
        const double *row = m->case_factors + (load - m->n_cases) * m->n_cases;
        for (ef_index k = 0; k < m->n_cases; k++) factors[k] = row[k];
    }
}

/* ---- geometry --------------------------------------------------------------- */

double ef_model_size(const ef_model *m)
{
    double lo[3] = {DBL_MAX, DBL_MAX, DBL_MAX}, hi[3] = {-DBL_MAX, -DBL_MAX, -DBL_MAX};
    double size = 0.0;
    bool any = false;
    for (ef_index i = 0; i < m->n_nodes; i++) {
        const double *x = m->nodes[i].xyz;
        if (!isfinite(x[0]) || !isfinite(x[1]) || !isfinite(x[2])) continue;
        any = true;
        for (int d = 0; d < 3; d++) {
            lo[d] = fmin(lo[d], x[d]);
            hi[d] = fmax(hi[d], x[d]);
        }
    }
    if (!any) return 0.0;
    for (int d = 0; d < 3; d++) size = fmax(size, hi[d] - lo[d]);
    return size;
}

/* sine of the angle between unit x and v (|v| > 0) */
static double sin_angle(const double x[3], const double v[3])
{
    double c[3];
    ef_cross3(x, v, c);
    return sqrt(ef_dot3(c, c)) / sqrt(ef_dot3(v, v));
}

void ef_model_default_up(const double x[3], const double gravity_dir[3], double up[3])
{
    double anti[3] = {-gravity_dir[0], -gravity_dir[1], -gravity_dir[2]};
    static const double ex[3] = {1, 0, 0}, ey[3] = {0, 1, 0};
    if (sin_angle(x, anti) >= EF_PARALLEL_RTOL)
        memcpy(up, anti, sizeof anti);
    else if (sin_angle(x, ex) >= EF_PARALLEL_RTOL)
        memcpy(up, ex, sizeof ex);
    else
        memcpy(up, ey, sizeof ey);          /* gravity along X and the member along it */
}

bool ef_model_member_axes(const double a[3], const double b[3], const double up[3],
                          double roll, double scale, double axes[3][3], double *length)
{
    double d[3] = {b[0] - a[0], b[1] - a[1], b[2] - a[2]};
    double L = sqrt(ef_dot3(d, d));
    *length = L;
    memset(axes, 0, 9 * sizeof(double));
    if (!(L > EF_ZERO_LENGTH_RTOL * scale) || !isfinite(L)) return false;
    double x[3] = {d[0] / L, d[1] / L, d[2] / L};
    double nu = sqrt(ef_dot3(up, up));
    if (!(nu > 0.0) || !isfinite(nu) || !(sin_angle(x, up) >= EF_PARALLEL_RTOL)) return false;
    double c = ef_dot3(up, x);
    double z[3] = {up[0] - c * x[0], up[1] - c * x[1], up[2] - c * x[2]};  /* up ⟂ x */
    double nz = sqrt(ef_dot3(z, z));
    for (int i = 0; i < 3; i++) z[i] /= nz;
    double y[3];
    ef_cross3(z, x, y);                       /* y = z × x: (x, y, z) right-handed */
    /* roll: right-handed turn by θ about x: y' = y cosθ + z sinθ, z' = -y sinθ + z cosθ */
    double cr = cos(roll), sr = sin(roll);
    for (int i = 0; i < 3; i++) {
        axes[0][i] = x[i];
        axes[1][i] = cr * y[i] + sr * z[i];
        axes[2][i] = -sr * y[i] + cr * z[i];
    }
    return true;
}
