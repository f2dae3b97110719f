/* model_yaml.c: reads a format-1 model file (docs/model-format.md) into an ef_model.
 * The only file that sees libfyaml.
 *
 * libfyaml builds the document (YAML 1.2; a `.json` file is read in JSON mode) and
 * collects its own syntax errors, which are re-emitted here with file:line:col. This file
 * then walks the node tree top-down in a fixed order (units before materials, nodes
 * before members, every load name before any combination), so that each reference is
 * resolved where it is written and an error can point at the offending scalar. Scalars
 * are typed by the YAML 1.2 core schema: null, true/false, numbers (a plain scalar only;
 * `.inf`/`.nan` and quoted numbers are rejected), anything else is text. A plain
 * integer used as a name is taken as its decimal text (`007` and `7` name the same node).
 *
 * Reading never stops at the first error: every problem is reported, then validate.c
 * adds the cross-item checks, and the caller gets EF_EINPUT and no model.
 * Positions: fy_mark counts lines and columns from 0 (we add 1); libfyaml's own
 * collected diagnostics already count from 1. Collections carry no position of their
 * own in libfyaml 0.7, so a mapping or list is located by its first scalar, or failing
 * that by the key that holds it.
 */
#define _POSIX_C_SOURCE 200809L
#include <errno.h>
#include <libfyaml.h>
#include <limits.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "model.h"
#include "section.h"
#include "sha256.h"
#include "validate.h"

/* Upper bounds on counts the user gives, so that a typo cannot ask for terabytes. */
#define MAX_DIVISIONS 100000
#define MAX_STATIONS 100001
#define MAX_MODES 1000000
#define MAX_ITERATIONS 1000000
/* Default walker weight, 746 N (SCI P354 / CCIP-016, from memory: see
 * dynamics-and-stability-methods.md section 2). */
#define WALKER_WEIGHT_N 746.0

typedef struct fy_node fnode;

typedef struct {
    ef_ctx *ctx;
    ef_model *m;
    bool nomem;
} reader;

/* ---- small helpers ------------------------------------------------------------- */

static void *xcalloc(reader *r, size_t n, size_t size)
{
    if (n == 0) return NULL;
    void *p = calloc(n, size);
    if (!p) r->nomem = true;
    return p;
}

static char *xstrndup(reader *r, const char *s, size_t n)
{
    char *p = malloc(n + 1);
    if (!p) {
        r->nomem = true;
        return NULL;
    }
    memcpy(p, s, n);
    p[n] = '\0';
    return p;
}

static ef_where where_of(fnode *n, ef_where fallback)
{
    if (!n) return fallback;
    struct fy_token *t = fy_node_get_scalar_token(n);
    if (t) {
        const struct fy_mark *mk = fy_token_start_mark(t);
        if (mk) return (ef_where){mk->line + 1, mk->column + 1};
    }
    void *it = NULL;
    if (fy_node_get_type(n) == FYNT_MAPPING) {
        struct fy_node_pair *p = fy_node_mapping_iterate(n, &it);
        if (p) return where_of(fy_node_pair_key(p), fallback);
    } else if (fy_node_get_type(n) == FYNT_SEQUENCE) {
        fnode *c = fy_node_sequence_iterate(n, &it);
        if (c) return where_of(c, fallback);
    }
    return fallback;
}

/* Follow an alias to its anchored node. An alias without an anchor is reported and
 * returned as it is (a text scalar), so the caller's type check reports it too. */
static fnode *deref(reader *r, fnode *n)
{
    if (!n || !fy_node_is_alias(n)) return n;
    fnode *t = fy_node_resolve_alias(n);
    if (t) return t;
    size_t len = 0;
    const char *s = fy_node_get_scalar(n, &len);
    ef_where w = where_of(n, (ef_where){0, 0});
    ef_diag_error(r->ctx, &w, "alias '*%.*s' refers to no anchor", (int)(len > 80 ? 80 : len),
                  s ? s : "");
    return n;
}

typedef enum { V_NONE, V_NULL, V_BOOL, V_NUM, V_TEXT, V_MAP, V_SEQ } vkind;

/* Copy a scalar's text into buf (NUL-terminated, cut to size-1); returns the full length. */
static size_t scalar_text(fnode *n, char *buf, size_t size)
{
    size_t len = 0;
    const char *s = n ? fy_node_get_scalar(n, &len) : NULL;
    if (!s) len = 0;
    size_t k = len < size - 1 ? len : size - 1;
    if (k) memcpy(buf, s, k);
    buf[k] = '\0';
    return len;
}

static bool is_one_of(const char *s, const char *const *words)
{
    for (; *words; words++)
        if (strcmp(s, *words) == 0) return true;
    return false;
}

static bool all_digits(const char *s, const char *set)
{
    if (!*s) return false;
    for (; *s; s++)
        if (!strchr(set, *s)) return false;
    return true;
}

/* YAML 1.2 core schema integer: [-+]?[0-9]+ | 0o[0-7]+ | 0x[0-9a-fA-F]+ */
static bool core_int(const char *s)
{
    if (s[0] == '0' && s[1] == 'o') return all_digits(s + 2, "01234567");
    if (s[0] == '0' && s[1] == 'x') return all_digits(s + 2, "0123456789abcdefABCDEF");
    if (*s == '-' || *s == '+') s++;
    return all_digits(s, "0123456789");
}

/* YAML 1.2 core schema float: [-+]?(\.[0-9]+|[0-9]+(\.[0-9]*)?)([eE][-+]?[0-9]+)? */
static bool core_float(const char *s)
{
    int digits = 0;
    if (*s == '-' || *s == '+') s++;
    while (*s >= '0' && *s <= '9') s++, digits++;
    if (*s == '.') {
        s++;
        while (*s >= '0' && *s <= '9') s++, digits++;
    }
    if (!digits) return false;
    if (*s == 'e' || *s == 'E') {
        s++;
        if (*s == '-' || *s == '+') s++;
        if (!(*s >= '0' && *s <= '9')) return false;
        while (*s >= '0' && *s <= '9') s++;
    }
    return *s == '\0';
}

static const char *const null_words[] = {"~", "null", "Null", "NULL", NULL};
static const char *const true_words[] = {"true", "True", "TRUE", NULL};
static const char *const false_words[] = {"false", "False", "FALSE", NULL};
static const char *const inf_nan_words[] = {".inf", ".Inf", ".INF", "+.inf", "+.Inf", "+.INF",
                                            "-.inf", "-.Inf", "-.INF", ".nan", ".NaN", ".NAN",
                                            NULL};

static vkind kind_of(fnode *n)
{
    if (!n) return V_NONE;
    switch (fy_node_get_type(n)) {
    case FYNT_MAPPING: return V_MAP;
    case FYNT_SEQUENCE: return V_SEQ;
    default: break;
    }
    if (fy_node_get_style(n) != FYNS_PLAIN) return V_TEXT;
    char buf[512];
    size_t len = scalar_text(n, buf, sizeof buf);
    if (len == 0) return V_NULL;
    if (len >= sizeof buf) return V_TEXT;
    if (is_one_of(buf, null_words)) return V_NULL;
    if (is_one_of(buf, true_words) || is_one_of(buf, false_words)) return V_BOOL;
    if (core_int(buf) || core_float(buf) || is_one_of(buf, inf_nan_words)) return V_NUM;
    return V_TEXT;
}

/* How a value reads in a message: 'text' as written (cut), or null, a list, a mapping. */
static const char *show(fnode *n, char *buf, size_t size)
{
    switch (kind_of(n)) {
    case V_NONE:
    case V_NULL: return "null";
    case V_MAP: return "a mapping";
    case V_SEQ: return "a list";
    default: break;
    }
    char t[48];
    size_t len = scalar_text(n, t, sizeof t);
    snprintf(buf, size, "'%s%s'", t, len >= sizeof t ? "..." : "");
    return buf;
}

/* A scalar as a name: its text, or for a plain integer its decimal text. NULL (after a
 * message "WHAT: NOUN must be text") when `n` is not a usable name. */
static char *name_text(reader *r, fnode *n, ef_where fb, const char *what, const char *noun)
{
    char sb[64];
    ef_where w = where_of(n, fb);
    vkind k = kind_of(n);
    if (k == V_MAP || k == V_SEQ || k == V_NONE || k == V_NULL) {
        ef_diag_error(r->ctx, &w, "%s: %s must be text, not %s", what, noun,
                      show(n, sb, sizeof sb));
        return NULL;
    }
    size_t len = 0;
    const char *s = fy_node_get_scalar(n, &len);
    if (!s) s = "";
    if (k == V_NUM && len < 64) {
        char buf[64];
        scalar_text(n, buf, sizeof buf);
        if (core_int(buf)) {
            int base = 10;
            const char *digits = buf;
            if (buf[0] == '0' && buf[1] == 'x') base = 16, digits = buf + 2;
            if (buf[0] == '0' && buf[1] == 'o') base = 8, digits = buf + 2;
            errno = 0;
            long long v = strtoll(digits, NULL, base);
            if (errno == 0) {
                char dec[32];
                int nd = snprintf(dec, sizeof dec, "%lld", v);
                return xstrndup(r, dec, (size_t)nd);
            }
        }
    }
    if (len == 0) {
        ef_diag_error(r->ctx, &w, "%s: %s must not be empty", what, noun);
        return NULL;
    }
    return xstrndup(r, s, len);
}

/* ---- mappings with known keys -------------------------------------------------- */

typedef struct {
    const char *key;
    fnode *val;        /* dereferenced value; NULL when the key is absent */
    ef_where kw;       /* position of the key */
    ef_where vw;       /* position of the value (of the key when the value has none) */
    bool present;
} fld;

static bool expect_map(reader *r, fnode *map, ef_where at, const char *what)
{
    if (kind_of(map) == V_MAP) return true;
    char sb[64];
    ef_where w = where_of(map, at);
    ef_diag_error(r->ctx, &w, "%s: expected a mapping, not %s", what, show(map, sb, sizeof sb));
    return false;
}

/* Match the keys of `map` against f[0..nf). Reports unknown keys and keys that are not
 * text. Returns false (after a message) when `map` is not a mapping. */
static bool read_map(reader *r, fnode *map, ef_where at, const char *what, fld *f, int nf)
{
    for (int i = 0; i < nf; i++) {
        f[i].val = NULL;
        f[i].present = false;
        f[i].kw = f[i].vw = at;
    }
    if (!expect_map(r, map, at, what)) return false;
    void *it = NULL;
    struct fy_node_pair *p;
    while ((p = fy_node_mapping_iterate(map, &it))) {
        fnode *key = deref(r, fy_node_pair_key(p));
        ef_where kw = where_of(key, at);
        char kb[64], sb[64];
        vkind kk = kind_of(key);
        if (kk == V_MAP || kk == V_SEQ) {
            ef_diag_error(r->ctx, &kw, "%s: a key must be text, not %s", what,
                          show(key, sb, sizeof sb));
            continue;
        }
        size_t len = scalar_text(key, kb, sizeof kb);
        int found = -1;
        for (int i = 0; len < sizeof kb && i < nf; i++)
            if (strcmp(kb, f[i].key) == 0) found = i;
        if (found < 0) {
            char expected[400] = "";
            size_t used = 0;
            for (int i = 0; i < nf && used < sizeof expected; i++)
                used += (size_t)snprintf(expected + used, sizeof expected - used, "%s%s",
                                         i ? ", " : "", f[i].key);
            ef_diag_error(r->ctx, &kw, "%s: unknown key %s (expected %s)", what,
                          show(key, sb, sizeof sb), expected);
            continue;
        }
        if (f[found].present) {
            ef_diag_error(r->ctx, &kw, "%s: duplicate key '%s' (first on line %d)", what,
                          f[found].key, f[found].kw.line);
            continue;
        }
        f[found].present = true;
        f[found].kw = kw;
        f[found].val = deref(r, fy_node_pair_value(p));
        f[found].vw = where_of(f[found].val, kw);
    }
    return true;
}

#define K(name) {.key = (name)}   /* a key of a mapping read with read_map */

static fld *field(fld *f, int nf, const char *key)
{
    for (int i = 0; i < nf; i++)
        if (strcmp(f[i].key, key) == 0) return &f[i];
    return NULL;
}

static void missing(reader *r, ef_where w, const char *what, const char *key, const char *hint)
{
    ef_diag_error(r->ctx, &w, "%s: '%s' is required%s", what, key, hint ? hint : "");
}

/* ---- typed values ---------------------------------------------------------------- */

typedef enum { R_ANY, R_POS, R_NONNEG, R_FRAC } range;

/* A number. 1: read; -1: not a number (reported). `label` names it in the message. */
static int num_value(reader *r, fnode *v, ef_where fb, const char *what, const char *label,
                     range rg, double *out)
{
    char sb[64], buf[512];
    ef_where w = where_of(v, fb);
    if (kind_of(v) != V_NUM) {
        ef_diag_error(r->ctx, &w, "%s: %s must be a number, not %s", what, label,
                      show(v, sb, sizeof sb));
        return -1;
    }
    scalar_text(v, buf, sizeof buf);
    if (is_one_of(buf, inf_nan_words)) {
        ef_diag_error(r->ctx, &w, "%s: %s must be a finite number, not '%s'", what, label, buf);
        return -1;
    }
    double x;
    errno = 0;
    if (buf[0] == '0' && (buf[1] == 'x' || buf[1] == 'o'))
        x = (double)strtoull(buf + 2, NULL, buf[1] == 'x' ? 16 : 8);
    else
        x = strtod(buf, NULL);
    if (!isfinite(x) || (errno == ERANGE && fabs(x) > 1.0)) {
        ef_diag_error(r->ctx, &w, "%s: %s is out of range, not %s", what, label,
                      show(v, sb, sizeof sb));
        return -1;
    }
    const char *bad = NULL;
    switch (rg) {
    case R_POS: if (!(x > 0.0)) bad = "must be positive"; break;
    case R_NONNEG: if (!(x >= 0.0)) bad = "must be zero or positive"; break;
    case R_FRAC: if (!(x >= 0.0 && x <= 1.0)) bad = "must be between 0 and 1"; break;
    default: break;
    }
    if (bad) {
        ef_diag_error(r->ctx, &w, "%s: %s %s, not %s", what, label, bad, show(v, sb, sizeof sb));
        return -1;
    }
    *out = x;
    return 1;
}

/* A field as a number: 1 read, 0 absent, -1 bad (reported). */
static int num_field(reader *r, const fld *f, const char *what, range rg, double *out)
{
    if (!f->present) return 0;
    char label[64];
    snprintf(label, sizeof label, "'%s'", f->key);
    return num_value(r, f->val, f->kw, what, label, rg, out);
}

static int int_value(reader *r, fnode *v, ef_where fb, const char *what, const char *label,
                     long lo, long hi, long *out)
{
    char sb[64], buf[64];
    ef_where w = where_of(v, fb);
    size_t len = scalar_text(v, buf, sizeof buf);
    if (kind_of(v) != V_NUM || len >= sizeof buf || !core_int(buf)) {
        ef_diag_error(r->ctx, &w, "%s: %s must be a whole number, not %s", what, label,
                      show(v, sb, sizeof sb));
        return -1;
    }
    int base = 10;
    const char *digits = buf;
    if (buf[0] == '0' && buf[1] == 'x') base = 16, digits = buf + 2;
    if (buf[0] == '0' && buf[1] == 'o') base = 8, digits = buf + 2;
    errno = 0;
    long long x = strtoll(digits, NULL, base);
    bool overflow = errno == ERANGE;
    if ((overflow && digits[0] == '-') || (!overflow && x < lo)) {
        ef_diag_error(r->ctx, &w, "%s: %s must be at least %ld, not %s", what, label, lo, buf);
        return -1;
    }
    if (overflow || x > hi) {
        ef_diag_error(r->ctx, &w, "%s: %s must be at most %ld, not %s", what, label, hi, buf);
        return -1;
    }
    *out = (long)x;
    return 1;
}

static int int_field(reader *r, const fld *f, const char *what, long lo, long hi, long *out)
{
    if (!f->present) return 0;
    char label[64];
    snprintf(label, sizeof label, "'%s'", f->key);
    return int_value(r, f->val, f->kw, what, label, lo, hi, out);
}

static int bool_field(reader *r, const fld *f, const char *what, bool *out)
{
    if (!f->present) return 0;
    char sb[64], buf[16];
    if (kind_of(f->val) == V_BOOL) {
        scalar_text(f->val, buf, sizeof buf);
        *out = is_one_of(buf, true_words);
        return 1;
    }
    ef_diag_error(r->ctx, &f->vw, "%s: '%s' must be true or false, not %s", what, f->key,
                  show(f->val, sb, sizeof sb));
    return -1;
}

/* One of `words` (NULL-terminated); *out = its index. */
static int word_value(reader *r, fnode *v, ef_where fb, const char *what, const char *label,
                      const char *const *words, int *out)
{
    char sb[64], buf[64], list[200] = "";
    size_t used = 0;
    ef_where w = where_of(v, fb);
    vkind k = kind_of(v);
    if (k == V_TEXT || k == V_NUM || k == V_BOOL) {
        size_t len = scalar_text(v, buf, sizeof buf);
        for (int i = 0; words[i] && len < sizeof buf; i++) {
            if (strcmp(buf, words[i]) == 0) {
                *out = i;
                return 1;
            }
        }
    }
    int n = 0;
    while (words[n]) n++;
    for (int i = 0; i < n; i++)
        used += (size_t)snprintf(list + used, sizeof list - used, "%s%s",
                                 i == 0 ? "" : (i == n - 1 ? " or " : ", "), words[i]);
    ef_diag_error(r->ctx, &w, "%s: %s must be %s, not %s", what, label, list,
                  show(v, sb, sizeof sb));
    return -1;
}

static int word_field(reader *r, const fld *f, const char *what, const char *const *words,
                      int *out)
{
    if (!f->present) return 0;
    char label[64];
    snprintf(label, sizeof label, "'%s'", f->key);
    return word_value(r, f->val, f->kw, what, label, words, out);
}

/* A list of exactly n numbers (n <= 3). */
static int vec_value(reader *r, fnode *v, ef_where fb, const char *what, const char *label,
                     int n, double *out)
{
    char sb[64];
    ef_where w = where_of(v, fb);
    int count = kind_of(v) == V_SEQ ? fy_node_sequence_item_count(v) : -1;
    if (count != n) {
        if (count < 0)
            ef_diag_error(r->ctx, &w, "%s: %s must be a list of %d numbers, not %s", what, label,
                          n, show(v, sb, sizeof sb));
        else
            ef_diag_error(r->ctx, &w, "%s: %s must be a list of %d numbers, not of %d", what,
                          label, n, count);
        return -1;
    }
    int ok = 1;
    void *it = NULL;
    fnode *c;
    for (int i = 0; (c = fy_node_sequence_iterate(v, &it)); i++) {
        char lab[80];
        snprintf(lab, sizeof lab, "item %d of %s", i + 1, label);
        if (num_value(r, deref(r, c), w, what, lab, R_ANY, &out[i]) < 0) ok = -1;
    }
    return ok;
}

static int vec_field(reader *r, const fld *f, const char *what, int n, double *out)
{
    if (!f->present) return 0;
    char label[64];
    snprintf(label, sizeof label, "'%s'", f->key);
    return vec_value(r, f->val, f->kw, what, label, n, out);
}

/* A list of DOF names ([ux, rz]) as a mask (EF_UX..). */
static int dof_list(reader *r, fnode *v, ef_where fb, const char *what, unsigned *mask)
{
    char sb[64], buf[8];
    ef_where w = where_of(v, fb);
    if (kind_of(v) != V_SEQ) {
        ef_diag_error(r->ctx, &w, "%s: expected a list of DOF names (ux, uy, uz, rx, ry, rz), "
                      "not %s", what, show(v, sb, sizeof sb));
        return -1;
    }
    int ok = 1;
    unsigned m = 0;
    void *it = NULL;
    fnode *c;
    while ((c = fy_node_sequence_iterate(v, &it))) {
        c = deref(r, c);
        int d = -1;
        vkind k = kind_of(c);
        if ((k == V_TEXT || k == V_NUM) && scalar_text(c, buf, sizeof buf) < sizeof buf)
            for (int i = 0; i < 6; i++)
                if (strcmp(buf, ef_dof_names[i]) == 0) d = i;
        if (d < 0) {
            ef_where cw = where_of(c, w);
            ef_diag_error(r->ctx, &cw, "%s: unknown DOF %s (expected ux, uy, uz, rx, ry, rz)",
                          what, show(c, sb, sizeof sb));
            ok = -1;
        } else {
            m |= 1u << d;
        }
    }
    *mask = m;
    return ok;
}

/* A reference to a named item: resolves `name` with find(); reports an undefined name
 * as "WHAT: KIND 'NAME' is not defined". Returns the index or EF_NONE. */
typedef ef_index (*finder)(const ef_model *m, const char *name);

static ef_index ref_value(reader *r, fnode *v, ef_where fb, const char *what, const char *kind,
                          finder find)
{
    ef_where w = where_of(v, fb);
    char noun[80];
    snprintf(noun, sizeof noun, "the %s name", kind);
    char *name = name_text(r, v, w, what, noun);
    if (!name) return EF_NONE;
    ef_index i = find(r->m, name);
    if (i == EF_NONE) ef_diag_error(r->ctx, &w, "%s: %s '%s' is not defined", what, kind, name);
    free(name);
    return i;
}

/* A list of references (nodes, loads). Allocates *out (NULL for an empty list). */
static int ref_list(reader *r, fnode *v, ef_where fb, const char *what, const char *label,
                    const char *kind, finder find, ef_index **out, ef_index *n_out)
{
    char sb[64];
    ef_where w = where_of(v, fb);
    *out = NULL;
    *n_out = 0;
    if (kind_of(v) != V_SEQ) {
        ef_diag_error(r->ctx, &w, "%s: %s must be a list of %s names, not %s", what, label, kind,
                      show(v, sb, sizeof sb));
        return -1;
    }
    int n = fy_node_sequence_item_count(v), ok = 1;
    ef_index *idx = xcalloc(r, (size_t)n, sizeof *idx);
    if (n > 0 && !idx) return -1;
    void *it = NULL;
    fnode *c;
    ef_index k = 0;
    while ((c = fy_node_sequence_iterate(v, &it))) {
        ef_index i = ref_value(r, deref(r, c), w, what, kind, find);
        if (i == EF_NONE)
            ok = -1;
        else
            idx[k++] = i;
    }
    *out = idx;
    *n_out = k;
    return ok;
}

/* Load, combination and machine names become HDF5 group names: no '/', no leading '.'. */
static bool hdf5_name_ok(reader *r, ef_where w, const char *what, const char *name)
{
    if (strchr(name, '/')) {
        ef_diag_error(r->ctx, &w, "%s: the name may not contain '/' (it names a group in the "
                      "results file)", what);
        return false;
    }
    if (name[0] == '.') {
        ef_diag_error(r->ctx, &w, "%s: the name may not start with '.' (it names a group in "
                      "the results file)", what);
        return false;
    }
    return true;
}

/* Iterate a mapping of named items: the caller's loop body gets the key (name, where)
 * and the dereferenced value. */
typedef struct {
    void *it;
    fnode *map;
} map_iter;

static bool next_item(reader *r, map_iter *mi, const char *what, const char *noun,
                      char **name, ef_where *w, fnode **val, ef_where fb)
{
    struct fy_node_pair *p;
    while ((p = fy_node_mapping_iterate(mi->map, &mi->it))) {
        fnode *key = deref(r, fy_node_pair_key(p));
        *w = where_of(key, fb);
        *name = name_text(r, key, *w, what, noun);
        if (!*name) continue;
        *val = deref(r, fy_node_pair_value(p));
        return true;
    }
    return false;
}

/* Keys given twice in one mapping. libfyaml's own check is a linear search per key
 * (quadratic in the size of a mapping), so it is turned off and done here by sorting:
 * O(n log n). Names of materials, sections, nodes, members and loads are checked after
 * reading instead (check_duplicates), once integer names have become decimal text. */
typedef struct {
    const char *text;   /* not NUL-terminated (libfyaml's scalar) */
    size_t len;
    ef_where w;
} key_pos;

static int cmp_key_text(const key_pos *a, const key_pos *b)
{
    int c = memcmp(a->text, b->text, a->len < b->len ? a->len : b->len);
    return c ? c : (a->len > b->len) - (a->len < b->len);
}

static int cmp_key_pos(const void *pa, const void *pb)
{
    const key_pos *a = pa, *b = pb;
    int c = cmp_key_text(a, b);
    if (c == 0) c = a->w.line != b->w.line ? a->w.line - b->w.line : a->w.col - b->w.col;
    return c;
}

static void check_dup_keys(reader *r, fnode *map, ef_where at, const char *what)
{
    int n = fy_node_mapping_item_count(map);
    if (n < 2) return;
    key_pos *k = xcalloc(r, (size_t)n, sizeof *k);
    if (!k) return;
    void *it = NULL;
    struct fy_node_pair *p;
    int m = 0;
    while ((p = fy_node_mapping_iterate(map, &it)) && m < n) {
        fnode *key = deref(r, fy_node_pair_key(p));
        vkind kk = kind_of(key);
        if (kk == V_MAP || kk == V_SEQ) continue;
        k[m].text = fy_node_get_scalar(key, &k[m].len);
        if (!k[m].text) k[m].text = "", k[m].len = 0;
        k[m].w = where_of(key, at);
        m++;
    }
    qsort(k, (size_t)m, sizeof *k, cmp_key_pos);
    for (int i = 1; i < m; i++) {
        if (cmp_key_text(&k[i], &k[i - 1]) != 0) continue;
        ef_diag_error(r->ctx, &k[i].w, "%s: duplicate key '%.*s' (first on line %d)", what,
                      (int)(k[i].len > 60 ? 60 : k[i].len), k[i].text, k[i - 1].w.line);
    }
    free(k);
}

/* A mapping of named items (`what` for messages); count in *n. With `keys_once`, keys
 * given twice are reported here. */
static bool items_map(reader *r, fnode *v, ef_where at, const char *what, int *n,
                      bool keys_once)
{
    *n = 0;
    if (!v) return false;
    if (kind_of(v) != V_MAP) {
        char sb[64];
        ef_where w = where_of(v, at);
        ef_diag_error(r->ctx, &w, "%s: expected a mapping of names to %s, not %s", what, what,
                      show(v, sb, sizeof sb));
        return false;
    }
    *n = fy_node_mapping_item_count(v);
    if (keys_once) check_dup_keys(r, v, at, what);
    return true;
}

/* ---- top-level settings --------------------------------------------------------- */

static void read_units(reader *r, const fld *f)
{
    static const char *const force_words[] = {"N", "kN", "MN", "lbf", "kip", NULL};
    static const char *const length_words[] = {"mm", "cm", "m", "in", "ft", NULL};
    r->m->units.force = EF_FORCE_KN;
    r->m->units.length = EF_LEN_M;
    if (!f->present) {
        missing(r, f->kw, "model file", "units", " (e.g. units: {force: kN, length: m})");
        return;
    }
    fld u[] = {K("force"), K("length")};
    if (!read_map(r, f->val, f->kw, "units", u, 2)) return;
    int k;
    if (!u[0].present) missing(r, f->kw, "units", "force", " (N, kN, MN, lbf or kip)");
    else if (word_value(r, u[0].val, u[0].kw, "units", "the force unit", force_words, &k) > 0)
        r->m->units.force = (ef_force_unit)k;
    if (!u[1].present) missing(r, f->kw, "units", "length", " (mm, cm, m, in or ft)");
    else if (word_value(r, u[1].val, u[1].kw, "units", "the length unit", length_words, &k) > 0)
        r->m->units.length = (ef_length_unit)k;
}

static void read_gravity(reader *r, const fld *f)
{
    double *g = r->m->gravity_dir;
    g[0] = 0.0, g[1] = 0.0, g[2] = -1.0;
    double v[3];
    if (vec_field(r, f, "gravity", 3, v) <= 0) return;
    double n = sqrt(v[0] * v[0] + v[1] * v[1] + v[2] * v[2]);
    if (!(n > 0.0) || !isfinite(n)) {
        ef_diag_error(r->ctx, &f->vw, "gravity: the direction must not be the zero vector");
        return;
    }
    for (int i = 0; i < 3; i++) g[i] = v[i] / n;
}

static void read_mesh(reader *r, const fld *f)
{
    r->m->divisions = 4;
    r->m->stations = 11;
    if (!f->present) return;
    fld s[] = {K("divisions"), K("stations")};
    if (!read_map(r, f->val, f->kw, "mesh", s, 2)) return;
    long v;
    if (int_field(r, &s[0], "mesh", 1, MAX_DIVISIONS, &v) > 0) r->m->divisions = (int)v;
    if (int_field(r, &s[1], "mesh", 2, MAX_STATIONS, &v) > 0) r->m->stations = (int)v;
}

/* ---- materials, sections, nodes ------------------------------------------------- */

static void read_materials(reader *r, const fld *top)
{
    ef_model *m = r->m;
    int n;
    if (!items_map(r, top->val, top->kw, "materials", &n, false) || n == 0) return;
    if (!(m->materials = xcalloc(r, (size_t)n, sizeof *m->materials))) return;
    map_iter mi = {NULL, top->val};
    char *name;
    ef_where w;
    fnode *val;
    const double g = ef_units_g(&m->units);
    while (next_item(r, &mi, "materials", "a material name", &name, &w, &val, top->kw)) {
        ef_material *mat = &m->materials[m->n_materials++];
        mat->name = name;
        mat->where = w;
        char what[200];
        snprintf(what, sizeof what, "material '%s'", name);
        fld f[] = {K("E"), K("G"), K("nu"), K("density"), K("unit_weight")};
        if (!read_map(r, val, w, what, f, 5)) continue;
        if (num_field(r, &f[0], what, R_POS, &mat->E) == 0) missing(r, w, what, "E", NULL);
        double nu = 0.0, uw = 0.0;
        if (f[1].present && f[2].present) {
            ef_diag_error(r->ctx, &f[2].kw, "%s: give G or nu, not both", what);
        } else if (f[1].present) {
            num_field(r, &f[1], what, R_POS, &mat->G);
        } else if (f[2].present) {
            if (num_field(r, &f[2], what, R_ANY, &nu) > 0) {
                if (!(nu > -1.0 && nu <= 0.5))
                    ef_diag_error(r->ctx, &f[2].vw, "%s: 'nu' must be more than -1 and at most "
                                  "0.5, not %g", what, nu);
                else
                    mat->G = mat->E / (2.0 * (1.0 + nu));   /* isotropic elasticity */
            }
        } else {
            ef_diag_error(r->ctx, &w, "%s: give G (shear modulus) or nu (Poisson's ratio)", what);
        }
        if (f[3].present && f[4].present) {
            ef_diag_error(r->ctx, &f[4].kw, "%s: give density or unit_weight, not both", what);
        } else if (f[3].present) {
            num_field(r, &f[3], what, R_NONNEG, &mat->density);
        } else if (num_field(r, &f[4], what, R_NONNEG, &uw) > 0) {
            mat->density = uw / g;          /* [force/length^3] / [length/s^2] = mass/length^3 */
        }
    }
}

static void read_sections(reader *r, const fld *top)
{
    static const ef_shape_kind shapes[] = {EF_SHAPE_RECTANGLE, EF_SHAPE_CIRCLE, EF_SHAPE_PIPE,
                                           EF_SHAPE_I, EF_SHAPE_BOX};
    ef_model *m = r->m;
    int n;
    if (!items_map(r, top->val, top->kw, "sections", &n, false) || n == 0) return;
    if (!(m->sections = xcalloc(r, (size_t)n, sizeof *m->sections))) return;
    map_iter mi = {NULL, top->val};
    char *name;
    ef_where w;
    fnode *val;
    while (next_item(r, &mi, "sections", "a section name", &name, &w, &val, top->kw)) {
        ef_section *s = &m->sections[m->n_sections++];
        s->name = name;
        s->where = w;
        char what[200];
        snprintf(what, sizeof what, "section '%s'", name);
        fld f[] = {K("A"), K("Ay"), K("Az"), K("Iy"), K("Iz"), K("J"), K("Ip"), K("Iw"),
                   K("extra_mass"),
                   K("rectangle"), K("circle"), K("pipe"), K("I"), K("box")};
        if (!read_map(r, val, w, what, f, 14)) continue;
        /* the shape, if any */
        ef_section_props sp = {0};
        bool shape_ok = false;
        fld *shape = NULL;
        for (int i = 0; i < 5; i++) {
            fld *sf = &f[9 + i];
            if (!sf->present) continue;
            if (shape) {
                ef_diag_error(r->ctx, &sf->kw, "%s: give one shape, not both '%s' and '%s'", what,
                              shape->key, sf->key);
                continue;
            }
            shape = sf;
            s->shape = shapes[i];
        }
        if (shape) {
            char swhat[240];
            snprintf(swhat, sizeof swhat, "%s: %s", what, shape->key);
            int nd = ef_section_n_dims(s->shape);
            fld d[4];
            for (int i = 0; i < nd; i++) d[i] = (fld){.key = ef_section_dim_name(s->shape, i)};
            if (read_map(r, shape->val, shape->kw, swhat, d, nd)) {
                bool dims_ok = true;
                for (int i = 0; i < nd; i++) {
                    int got = num_field(r, &d[i], swhat, R_POS, &s->dims[i]);
                    if (got == 0) missing(r, shape->kw, swhat, d[i].key, NULL);
                    if (got <= 0) dims_ok = false;
                }
                if (dims_ok) {
                    const char *problem = ef_section_dims_problem(s->shape, s->dims);
                    if (problem)
                        ef_diag_error(r->ctx, &shape->kw, "%s: %s", swhat, problem);
                    else
                        shape_ok = ef_section_props_of_shape(s->shape, s->dims, &sp);
                }
            }
        }
        /* explicit properties (override the shape's) */
        double *slot[] = {&s->A, &s->Iy, &s->Iz, &s->J};
        const char *key[] = {"A", "Iy", "Iz", "J"};
        double from_shape[] = {sp.A, sp.Iy, sp.Iz, sp.J};
        for (int i = 0; i < 4; i++) {
            int got = num_field(r, field(f, 14, key[i]), what, R_POS, slot[i]);
            if (got == 0 && shape_ok) *slot[i] = from_shape[i];
            if (got == 0 && !shape)
                missing(r, w, what, key[i], " (or give a shape: rectangle, circle, pipe, I, box)");
        }
        num_field(r, &f[1], what, R_POS, &s->Ay);
        num_field(r, &f[2], what, R_POS, &s->Az);
        if (num_field(r, &f[6], what, R_POS, &s->Ip) == 0) s->Ip = s->Iy + s->Iz;
        if (num_field(r, &f[7], what, R_NONNEG, &s->Iw) == 0) s->Iw = shape_ok ? sp.Iw : 0.0;
        num_field(r, &f[8], what, R_NONNEG, &s->extra_mass);
    }
}

static void read_nodes(reader *r, const fld *top)
{
    ef_model *m = r->m;
    int n;
    if (!top->present) {
        missing(r, top->kw, "model file", "nodes", NULL);
        return;
    }
    if (!items_map(r, top->val, top->kw, "nodes", &n, false) || n == 0) return;
    if (!(m->nodes = xcalloc(r, (size_t)n, sizeof *m->nodes))) return;
    map_iter mi = {NULL, top->val};
    char *name;
    ef_where w;
    fnode *val;
    while (next_item(r, &mi, "nodes", "a node name", &name, &w, &val, top->kw)) {
        ef_node *nd = &m->nodes[m->n_nodes++];
        nd->name = name;
        nd->where = w;
        char what[200];
        snprintf(what, sizeof what, "node '%s'", name);
        if (vec_value(r, val, w, what, "the coordinates", 3, nd->xyz) <= 0)
            nd->xyz[0] = nd->xyz[1] = nd->xyz[2] = (double)NAN;   /* validate.c skips it */
    }
}

/* ---- members -------------------------------------------------------------------- */

static void read_member_nodes(reader *r, ef_member *b, const fld *f, const char *what)
{
    static const char *const end_word[2] = {"start node", "end node"};
    char sb[64];
    int count = kind_of(f->val) == V_SEQ ? fy_node_sequence_item_count(f->val) : -1;
    if (count != 2) {
        if (count < 0)
            ef_diag_error(r->ctx, &f->vw, "%s: 'nodes' must be a list of 2 node names, not %s",
                          what, show(f->val, sb, sizeof sb));
        else
            ef_diag_error(r->ctx, &f->vw, "%s: 'nodes' must be a list of 2 node names, not of %d",
                          what, count);
        return;
    }
    void *it = NULL;
    fnode *c;
    for (int e = 0; (c = fy_node_sequence_iterate(f->val, &it)); e++) {
        c = deref(r, c);
        b->node[e] = ref_value(r, c, f->vw, what, end_word[e], ef_model_find_node);
        if (e == 1 && b->node[1] != EF_NONE && b->node[1] == b->node[0]) {
            ef_where w = where_of(c, f->vw);
            ef_diag_error(r->ctx, &w, "%s: both ends are node '%s'", what,
                          r->m->nodes[b->node[1]].name);
        }
    }
}

static void read_release(reader *r, ef_member *b, const fld *rel, const fld *hin,
                         const char *what)
{
    static const char *const hinge_words[] = {"start", "end", "both", NULL};
    if (rel->present) {
        b->release_where = rel->kw;
        char rwhat[240], ewhat[260];
        snprintf(rwhat, sizeof rwhat, "%s: release", what);
        fld e[] = {K("start"), K("end")};
        if (read_map(r, rel->val, rel->kw, rwhat, e, 2)) {
            for (int k = 0; k < 2; k++) {
                unsigned mask = 0;
                snprintf(ewhat, sizeof ewhat, "%s %s", rwhat, e[k].key);
                if (e[k].present && dof_list(r, e[k].val, e[k].kw, ewhat, &mask) > 0)
                    b->release[k] |= mask;
            }
        }
    }
    int h;
    if (word_field(r, hin, what, hinge_words, &h) > 0) {
        if (!rel->present) b->release_where = hin->kw;
        if (h == 0 || h == 2) b->release[0] |= EF_RY | EF_RZ;
        if (h == 1 || h == 2) b->release[1] |= EF_RY | EF_RZ;
    }
}

static void read_members(reader *r, const fld *top)
{
    ef_model *m = r->m;
    int n;
    if (!top->present) {
        missing(r, top->kw, "model file", "members", NULL);
        return;
    }
    if (!items_map(r, top->val, top->kw, "members", &n, false)) return;
    if (n == 0) {
        ef_diag_error(r->ctx, &top->kw, "members: the model has no members");
        return;
    }
    if (!(m->members = xcalloc(r, (size_t)n, sizeof *m->members))) return;
    map_iter mi = {NULL, top->val};
    char *name;
    ef_where w;
    fnode *val;
    while (next_item(r, &mi, "members", "a member name", &name, &w, &val, top->kw)) {
        ef_member *b = &m->members[m->n_members++];
        b->name = name;
        b->where = w;
        b->node[0] = b->node[1] = b->section = b->material = EF_NONE;
        b->divisions = m->divisions;
        b->stations = m->stations;
        char what[200];
        snprintf(what, sizeof what, "member '%s'", name);
        fld f[] = {K("nodes"), K("section"), K("material"), K("roll"), K("up"),
                   K("release"), K("hinged"), K("axial_only"), K("divisions"), K("stations")};
        if (!read_map(r, val, w, what, f, 10)) continue;
        if (f[0].present)
            read_member_nodes(r, b, &f[0], what);
        else
            missing(r, w, what, "nodes", NULL);
        if (f[1].present) {
            b->section = ref_value(r, f[1].val, f[1].kw, what, "section", ef_model_find_section);
            if (b->section != EF_NONE) m->sections[b->section].used = true;
        } else {
            missing(r, w, what, "section", NULL);
        }
        if (f[2].present) {
            b->material =
                ref_value(r, f[2].val, f[2].kw, what, "material", ef_model_find_material);
            if (b->material != EF_NONE) m->materials[b->material].used = true;
        } else {
            missing(r, w, what, "material", NULL);
        }
        double roll_deg;
        if (num_field(r, &f[3], what, R_ANY, &roll_deg) > 0)
            b->roll = roll_deg * (3.14159265358979323846 / 180.0);
        if (vec_field(r, &f[4], what, 3, b->up) > 0) {
            b->up_where = f[4].kw;
            double nu = sqrt(b->up[0] * b->up[0] + b->up[1] * b->up[1] + b->up[2] * b->up[2]);
            if (!(nu > 0.0) || !isfinite(nu))
                ef_diag_error(r->ctx, &f[4].vw, "%s: 'up' must not be the zero vector", what);
            else
                b->has_up = true;
        }
        read_release(r, b, &f[5], &f[6], what);
        bool_field(r, &f[7], what, &b->axial_only);
        long v;
        if (int_field(r, &f[8], what, 1, MAX_DIVISIONS, &v) > 0) {
            b->divisions = (int)v;
            if (b->axial_only && v != 1)
                ef_diag_warning(r->ctx, &f[8].kw, "%s: 'divisions' is ignored: an axial_only "
                                "member is never subdivided", what);
        }
        if (b->axial_only) b->divisions = 1;
        if (int_field(r, &f[9], what, 2, MAX_STATIONS, &v) > 0) b->stations = (int)v;
    }
}

/* ---- supports and masses ---------------------------------------------------------- */

static void read_supports(reader *r, const fld *top)
{
    ef_model *m = r->m;
    int n;
    if (!items_map(r, top->val, top->kw, "supports", &n, true) || n == 0) return;
    if (!(m->supports = xcalloc(r, (size_t)n, sizeof *m->supports))) return;
    map_iter mi = {NULL, top->val};
    char *name;
    ef_where w;
    fnode *val;
    while (next_item(r, &mi, "supports", "a node name", &name, &w, &val, top->kw)) {
        char what[200], sb[64];
        snprintf(what, sizeof what, "support '%s'", name);
        ef_index node = ef_model_find_node(m, name);
        if (node == EF_NONE) ef_diag_error(r->ctx, &w, "supports: node '%s' is not defined", name);
        free(name);
        ef_support s = {.node = node, .where = w};
        bool ok = true;
        vkind k = kind_of(val);
        char buf[16];
        if (k == V_TEXT && scalar_text(val, buf, sizeof buf) < sizeof buf &&
            strcmp(buf, "fixed") == 0) {
            s.held = EF_ALL_DOF;
        } else if (k == V_TEXT && strcmp(buf, "pinned") == 0) {
            s.held = EF_UX | EF_UY | EF_UZ;
        } else if (k == V_SEQ) {
            ok = dof_list(r, val, w, what, &s.held) > 0;
        } else if (k == V_MAP) {
            fld f[6];
            for (int d = 0; d < 6; d++) f[d] = (fld){.key = ef_dof_names[d]};
            read_map(r, val, w, what, f, 6);
            for (int d = 0; d < 6; d++) {
                if (!f[d].present) continue;
                if (kind_of(f[d].val) == V_TEXT &&
                    scalar_text(f[d].val, buf, sizeof buf) < sizeof buf &&
                    strcmp(buf, "fixed") == 0) {
                    s.held |= 1u << d;
                    continue;
                }
                if (kind_of(f[d].val) != V_NUM) {
                    ef_diag_error(r->ctx, &f[d].vw, "%s: '%s' must be fixed or a spring "
                                  "stiffness, not %s", what, f[d].key,
                                  show(f[d].val, sb, sizeof sb));
                    ok = false;
                } else if (num_field(r, &f[d], what, R_NONNEG, &s.spring[d]) < 0) {
                    ok = false;
                }
            }
        } else {
            ef_where vw = where_of(val, w);
            ef_diag_error(r->ctx, &vw, "%s: expected fixed, pinned, a list of DOFs or a mapping "
                          "of DOFs to fixed or a spring stiffness, not %s", what,
                          show(val, sb, sizeof sb));
            ok = false;
        }
        if (ok && node != EF_NONE) m->supports[m->n_supports++] = s;
    }
}

static void read_masses(reader *r, const fld *top)
{
    ef_model *m = r->m;
    int n;
    if (!items_map(r, top->val, top->kw, "masses", &n, true) || n == 0) return;
    if (!(m->masses = xcalloc(r, (size_t)n, sizeof *m->masses))) return;
    map_iter mi = {NULL, top->val};
    char *name;
    ef_where w;
    fnode *val;
    while (next_item(r, &mi, "masses", "a node name", &name, &w, &val, top->kw)) {
        char what[200];
        snprintf(what, sizeof what, "mass '%s'", name);
        ef_index node = ef_model_find_node(m, name);
        if (node == EF_NONE) ef_diag_error(r->ctx, &w, "masses: node '%s' is not defined", name);
        free(name);
        ef_point_mass pm = {.node = node, .where = w};
        bool ok = true;
        if (kind_of(val) == V_MAP) {
            fld f[] = {K("m"), K("Jx"), K("Jy"), K("Jz")};
            read_map(r, val, w, what, f, 4);
            if (num_field(r, &f[0], what, R_NONNEG, &pm.m) < 0) ok = false;
            for (int i = 0; i < 3; i++)
                if (num_field(r, &f[1 + i], what, R_NONNEG, &pm.J[i]) < 0) ok = false;
        } else {
            ok = num_value(r, val, w, what, "the mass", R_NONNEG, &pm.m) > 0;
        }
        if (ok && node != EF_NONE) m->masses[m->n_masses++] = pm;
    }
}

/* ---- loads and combinations ------------------------------------------------------- */

static void read_member_load(reader *r, ef_member_load *ml, fnode *v, ef_where fb,
                             const char *what, bool *ok)
{
    static const char *const axes_words[] = {"global", "local", NULL};
    static const char *const kinds[] = {"uniform", "linear", "point", "moment"};
    ml->where = where_of(v, fb);
    fld f[] = {K("uniform"), K("linear"), K("point"), K("moment"),
               K("from"),    K("to"),     K("at"),    K("axes")};
    if (!read_map(r, v, fb, what, f, 8)) {
        *ok = false;
        return;
    }
    int kind = -1, n_kinds = 0;
    for (int i = 0; i < 4; i++) {
        if (!f[i].present) continue;
        if (++n_kinds == 2)
            ef_diag_error(r->ctx, &f[i].kw, "%s: give only one of uniform, linear, point, moment "
                          "(found '%s' and '%s')", what, kinds[kind], kinds[i]);
        if (kind < 0) kind = i;
    }
    if (kind < 0) {
        ef_diag_error(r->ctx, &ml->where, "%s: give one of uniform, linear, point, moment", what);
        *ok = false;
        return;
    }
    if (n_kinds > 1) *ok = false;
    ml->kind = (ef_mload_kind)kind;          /* enum order matches `kinds` */
    char sb[64];
    switch (kind) {
    case 0:
        if (vec_field(r, &f[0], what, 3, ml->w[0]) < 0) *ok = false;
        memcpy(ml->w[1], ml->w[0], sizeof ml->w[0]);
        break;
    case 1: {
        int count = kind_of(f[1].val) == V_SEQ ? fy_node_sequence_item_count(f[1].val) : -1;
        if (count != 2) {
            ef_diag_error(r->ctx, &f[1].vw, "%s: 'linear' must be a list of two [x, y, z] values "
                          "(at from and at to), not %s", what,
                          count < 0 ? show(f[1].val, sb, sizeof sb) : "a list of another length");
            *ok = false;
            break;
        }
        void *it = NULL;
        fnode *c;
        for (int e = 0; (c = fy_node_sequence_iterate(f[1].val, &it)); e++)
            if (vec_value(r, deref(r, c), f[1].vw, what, e ? "the 'linear' value at 'to'" :
                          "the 'linear' value at 'from'", 3, ml->w[e]) < 0)
                *ok = false;
        break;
    }
    default:
        if (vec_field(r, &f[kind], what, 3, ml->w[0]) < 0) *ok = false;
        break;
    }
    ml->from = 0.0;
    ml->to = 1.0;
    if (kind <= 1) {
        if (f[6].present) {
            ef_diag_error(r->ctx, &f[6].kw, "%s: 'at' does not apply to a %s load (use 'from' and "
                          "'to')", what, kinds[kind]);
            *ok = false;
        }
        int a = num_field(r, &f[4], what, R_FRAC, &ml->from);
        int b = num_field(r, &f[5], what, R_FRAC, &ml->to);
        if (a < 0 || b < 0) {
            *ok = false;
        } else if (!(ml->from < ml->to)) {
            ef_diag_error(r->ctx, a > 0 ? &f[4].vw : &f[5].vw, "%s: 'from' (%g) must be less "
                          "than 'to' (%g)", what, ml->from, ml->to);
            *ok = false;
        }
    } else {
        for (int i = 4; i <= 5; i++) {
            if (!f[i].present) continue;
            ef_diag_error(r->ctx, &f[i].kw, "%s: '%s' does not apply to a %s load (use 'at')",
                          what, f[i].key, kinds[kind]);
            *ok = false;
        }
        int a = num_field(r, &f[6], what, R_FRAC, &ml->from);
        if (a == 0)
            missing(r, ml->where, what, "at", " (the position as a fraction of the length)");
        if (a <= 0) *ok = false;
        ml->to = ml->from;
    }
    int ax = 0;
    if (word_field(r, &f[7], what, axes_words, &ax) < 0) *ok = false;
    ml->local = ax == 1;
}

static void read_case_body(reader *r, ef_load_case *lc, fnode *val)
{
    ef_model *m = r->m;
    char what[200];
    snprintf(what, sizeof what, "load case '%s'", lc->name);
    fld f[] = {K("self_weight"), K("nodes"), K("members")};
    if (!read_map(r, val, lc->where, what, f, 3)) return;
    num_field(r, &f[0], what, R_ANY, &lc->self_weight);
    int n;
    char sub[240];
    snprintf(sub, sizeof sub, "%s: nodes", what);
    if (f[1].present && items_map(r, f[1].val, f[1].kw, sub, &n, true) && n > 0 &&
        (lc->node_loads = xcalloc(r, (size_t)n, sizeof *lc->node_loads))) {
        map_iter mi = {NULL, f[1].val};
        char *name;
        ef_where w;
        fnode *v;
        while (next_item(r, &mi, what, "a node name", &name, &w, &v, f[1].kw)) {
            ef_node_load nl = {.node = ef_model_find_node(m, name), .where = w};
            if (nl.node == EF_NONE)
                ef_diag_error(r->ctx, &w, "%s: node '%s' is not defined", what, name);
            char lwhat[300];
            snprintf(lwhat, sizeof lwhat, "%s: node '%s'", what, name);
            free(name);
            fld c[] = {K("Fx"), K("Fy"), K("Fz"), K("Mx"), K("My"), K("Mz")};
            bool ok = read_map(r, v, w, lwhat, c, 6);
            for (int i = 0; ok && i < 6; i++)
                if (num_field(r, &c[i], lwhat, R_ANY, &nl.f[i]) < 0) ok = false;
            if (ok && nl.node != EF_NONE) lc->node_loads[lc->n_node_loads++] = nl;
        }
    }
    snprintf(sub, sizeof sub, "%s: members", what);
    if (f[2].present && items_map(r, f[2].val, f[2].kw, sub, &n, true) && n > 0) {
        /* count the loads first: each member holds a list (or one mapping) */
        ef_index total = 0;
        void *it = NULL;
        struct fy_node_pair *p;
        while ((p = fy_node_mapping_iterate(f[2].val, &it))) {
            fnode *v = deref(r, fy_node_pair_value(p));
            total += kind_of(v) == V_SEQ ? fy_node_sequence_item_count(v) : 1;
        }
        if (total == 0 || !(lc->member_loads = xcalloc(r, (size_t)total, sizeof *lc->member_loads)))
            return;
        map_iter mi = {NULL, f[2].val};
        char *name;
        ef_where w;
        fnode *v;
        while (next_item(r, &mi, what, "a member name", &name, &w, &v, f[2].kw)) {
            ef_index mb = ef_model_find_member(m, name);
            if (mb == EF_NONE)
                ef_diag_error(r->ctx, &w, "%s: member '%s' is not defined", what, name);
            char lwhat[300];
            if (kind_of(v) == V_SEQ) {
                void *it2 = NULL;
                fnode *c;
                for (int k = 1; (c = fy_node_sequence_iterate(v, &it2)); k++) {
                    snprintf(lwhat, sizeof lwhat, "%s: member '%s' load %d", what, name, k);
                    ef_member_load ml = {.member = mb};
                    bool ok = true;
                    read_member_load(r, &ml, deref(r, c), w, lwhat, &ok);
                    if (ok && mb != EF_NONE && lc->n_member_loads < total)
                        lc->member_loads[lc->n_member_loads++] = ml;
                }
            } else {
                snprintf(lwhat, sizeof lwhat, "%s: member '%s' load", what, name);
                ef_member_load ml = {.member = mb};
                bool ok = true;
                read_member_load(r, &ml, v, w, lwhat, &ok);
                if (ok && mb != EF_NONE && lc->n_member_loads < total)
                    lc->member_loads[lc->n_member_loads++] = ml;
            }
            free(name);
        }
    }
    if (!f[0].present && lc->n_node_loads == 0 && lc->n_member_loads == 0 && !f[1].present &&
        !f[2].present)
        ef_diag_warning(r->ctx, &lc->where, "%s is empty", what);
}

static void read_combo_body(reader *r, ef_combination *c, fnode *val)
{
    char what[200];
    snprintf(what, sizeof what, "combination '%s'", c->name);
    if (!expect_map(r, val, c->where, what)) return;
    check_dup_keys(r, val, c->where, what);
    int n = fy_node_mapping_item_count(val);
    if (n == 0) {
        ef_diag_warning(r->ctx, &c->where, "%s is empty", what);
        return;
    }
    if (!(c->terms = xcalloc(r, (size_t)n, sizeof *c->terms))) return;
    map_iter mi = {NULL, val};
    char *name;
    ef_where w;
    fnode *v;
    while (next_item(r, &mi, what, "a load name", &name, &w, &v, c->where)) {
        ef_combo_term t = {.load = ef_model_find_load(r->m, name), .where = w};
        if (t.load == EF_NONE)
            ef_diag_error(r->ctx, &w, "%s: load '%s' is not defined", what, name);
        char label[200];
        snprintf(label, sizeof label, "the factor of '%s'", name);
        free(name);
        if (num_value(r, v, w, what, label, R_ANY, &t.factor) > 0 && t.load != EF_NONE)
            c->terms[c->n_terms++] = t;
    }
}

/* Loads and combinations share one name space, so every name is created first, the
 * names indexed, and only then the bodies read (a combination may name a later one). */
static void read_loads(reader *r, const fld *lf, const fld *cf)
{
    ef_model *m = r->m;
    int nl = 0, nc = 0;
    fnode **body = NULL;
    if (lf->present) items_map(r, lf->val, lf->kw, "loads", &nl, false);
    if (cf->present) items_map(r, cf->val, cf->kw, "combinations", &nc, false);
    if (nl + nc == 0) return;
    body = xcalloc(r, (size_t)(nl + nc), sizeof *body);
    if (nl > 0) m->cases = xcalloc(r, (size_t)nl, sizeof *m->cases);
    if (nc > 0) m->combos = xcalloc(r, (size_t)nc, sizeof *m->combos);
    if (!body || (nl > 0 && !m->cases) || (nc > 0 && !m->combos)) {
        free(body);
        return;
    }
    char *name;
    ef_where w;
    fnode *v;
    if (nl > 0) {
        map_iter mi = {NULL, lf->val};
        while (next_item(r, &mi, "loads", "a load case name", &name, &w, &v, lf->kw)) {
            char what[200];
            snprintf(what, sizeof what, "load case '%s'", name);
            hdf5_name_ok(r, w, what, name);
            body[m->n_cases] = v;
            m->cases[m->n_cases].name = name;
            m->cases[m->n_cases++].where = w;
        }
    }
    if (nc > 0) {
        map_iter mi = {NULL, cf->val};
        while (next_item(r, &mi, "combinations", "a combination name", &name, &w, &v, cf->kw)) {
            char what[200];
            snprintf(what, sizeof what, "combination '%s'", name);
            hdf5_name_ok(r, w, what, name);
            body[m->n_cases + m->n_combos] = v;
            m->combos[m->n_combos].name = name;
            m->combos[m->n_combos++].where = w;
        }
    }
    /* body[0..n_cases) are the cases, body[n_cases..) the combinations */
    if (ef_model_index_names(m) != EF_OK) r->nomem = true;
    for (ef_index i = 0; i < m->n_cases; i++) read_case_body(r, &m->cases[i], body[i]);
    for (ef_index i = 0; i < m->n_combos; i++)
        read_combo_body(r, &m->combos[i], body[m->n_cases + i]);
    free(body);
}

static void read_mass_source(reader *r, const fld *top)
{
    ef_mass_source *ms = &r->m->mass_source;
    ms->self = true;
    if (!top->present) return;
    ms->given = true;
    fld f[] = {K("self"), K("loads"), K("lumped")};
    if (!read_map(r, top->val, top->kw, "mass_source", f, 3)) return;
    bool_field(r, &f[0], "mass_source", &ms->self);
    bool_field(r, &f[2], "mass_source", &ms->lumped);
    int n;
    if (!f[1].present || !items_map(r, f[1].val, f[1].kw, "mass_source: loads", &n, true) ||
        n == 0)
        return;
    ms->cases = xcalloc(r, (size_t)n, sizeof *ms->cases);
    ms->factors = xcalloc(r, (size_t)n, sizeof *ms->factors);
    if (!ms->cases || !ms->factors) return;
    map_iter mi = {NULL, f[1].val};
    char *name;
    ef_where w;
    fnode *v;
    while (next_item(r, &mi, "mass_source", "a load case name", &name, &w, &v, f[1].kw)) {
        ef_index k = ef_model_find_load(r->m, name);
        if (k == EF_NONE)
            ef_diag_error(r->ctx, &w, "mass_source: load case '%s' is not defined", name);
        else if (ef_model_load_is_combo(r->m, k))
            ef_diag_error(r->ctx, &w, "mass_source: '%s' is a combination: list load cases",
                          name);
        char label[200];
        snprintf(label, sizeof label, "the factor of '%s'", name);
        free(name);
        double fac;
        if (num_value(r, v, w, "mass_source", label, R_NONNEG, &fac) > 0 && k != EF_NONE &&
            !ef_model_load_is_combo(r->m, k)) {
            ms->cases[ms->n_cases] = k;
            ms->factors[ms->n_cases++] = fac;
        }
    }
}

/* ---- analyses --------------------------------------------------------------------- */

static void read_walking(reader *r, ef_analyses *a, const fld *top)
{
    static const char *const weight_words[] = {"Wb", "Wg", NULL};
    const char *what = "analyses: walking";
    fld f[] = {K("receivers"), K("walkers"), K("damping"), K("pace_hz"),
               K("walker_weight"), K("path_length"), K("weighting"), K("limit_R")};
    if (!read_map(r, top->val, top->kw, what, f, 8)) return;
    a->walking = true;
    if (f[0].present)
        ref_list(r, f[0].val, f[0].kw, what, "'receivers'", "node", ef_model_find_node,
                 &a->walk_receivers, &a->n_walk_receivers);
    else
        missing(r, top->kw, what, "receivers", " (the nodes where the response is judged)");
    if (f[0].present && a->n_walk_receivers == 0 && kind_of(f[0].val) == V_SEQ &&
        fy_node_sequence_item_count(f[0].val) == 0)
        ef_diag_error(r->ctx, &f[0].vw, "%s: 'receivers' must name at least one node", what);
    if (f[1].present) {
        ref_list(r, f[1].val, f[1].kw, what, "'walkers'", "node", ef_model_find_node,
                 &a->walk_walkers, &a->n_walk_walkers);
    } else if (a->n_walk_receivers > 0) {
        a->walk_walkers = xcalloc(r, (size_t)a->n_walk_receivers, sizeof *a->walk_walkers);
        if (a->walk_walkers) {
            memcpy(a->walk_walkers, a->walk_receivers,
                   (size_t)a->n_walk_receivers * sizeof *a->walk_walkers);
            a->n_walk_walkers = a->n_walk_receivers;
        }
    }
    int got = num_field(r, &f[2], what, R_POS, &a->walk_damping);
    if (got == 0)
        missing(r, top->kw, what, "damping", " (ratio of critical damping; there is no default)");
    else if (got > 0 && !(a->walk_damping < 1.0))
        ef_diag_error(r->ctx, &f[2].vw, "%s: 'damping' is a ratio of critical damping and must "
                      "be less than 1, not %g", what, a->walk_damping);
    double pace[2];
    if (vec_field(r, &f[3], what, 2, pace) > 0) {
        if (!(pace[0] > 0.0) || !(pace[0] <= pace[1]))
            ef_diag_error(r->ctx, &f[3].vw, "%s: 'pace_hz' must be [lowest, highest] with 0 < "
                          "lowest <= highest", what);
        else
            memcpy(a->walk_pace_hz, pace, sizeof pace);
    }
    num_field(r, &f[4], what, R_POS, &a->walk_weight);
    num_field(r, &f[5], what, R_POS, &a->walk_path_length);
    word_field(r, &f[6], what, weight_words, &a->walk_weighting);
    num_field(r, &f[7], what, R_POS, &a->walk_limit_R);
}

static void read_machines(reader *r, ef_analyses *a, const fld *top)
{
    int n;
    if (!items_map(r, top->val, top->kw, "analyses: machines", &n, true) || n == 0) return;
    if (!(a->machines = xcalloc(r, (size_t)n, sizeof *a->machines))) return;
    map_iter mi = {NULL, top->val};
    char *name;
    ef_where w;
    fnode *v;
    while (next_item(r, &mi, "analyses: machines", "a machine name", &name, &w, &v, top->kw)) {
        ef_machine *mc = &a->machines[a->n_machines++];
        mc->name = name;
        mc->where = w;
        mc->node = EF_NONE;
        mc->sweep = 0.1;
        char what[200];
        snprintf(what, sizeof what, "machine '%s'", name);
        hdf5_name_ok(r, w, what, name);
        fld f[] = {K("node"), K("force"), K("hz"), K("damping"), K("receivers"), K("sweep")};
        if (!read_map(r, v, w, what, f, 6)) continue;
        if (f[0].present)
            mc->node = ref_value(r, f[0].val, f[0].kw, what, "node", ef_model_find_node);
        else
            missing(r, w, what, "node", NULL);
        if (vec_field(r, &f[1], what, 3, mc->force) == 0)
            missing(r, w, what, "force", " (amplitude [Fx, Fy, Fz])");
        if (num_field(r, &f[2], what, R_POS, &mc->hz) == 0) missing(r, w, what, "hz", NULL);
        int got = num_field(r, &f[3], what, R_POS, &mc->damping);
        if (got == 0)
            missing(r, w, what, "damping", " (ratio of critical damping; there is no default)");
        else if (got > 0 && !(mc->damping < 1.0))
            ef_diag_error(r->ctx, &f[3].vw, "%s: 'damping' is a ratio of critical damping and "
                          "must be less than 1, not %g", what, mc->damping);
        if (f[4].present) {
            ref_list(r, f[4].val, f[4].kw, what, "'receivers'", "node", ef_model_find_node,
                     &mc->receivers, &mc->n_receivers);
        } else if (mc->node != EF_NONE && (mc->receivers = xcalloc(r, 1, sizeof *mc->receivers))) {
            mc->receivers[0] = mc->node;
            mc->n_receivers = 1;
        }
        if (num_field(r, &f[5], what, R_NONNEG, &mc->sweep) > 0 && !(mc->sweep < 1.0))
            ef_diag_error(r->ctx, &f[5].vw, "%s: 'sweep' must be less than 1, not %g", what,
                          mc->sweep);
    }
}

static void read_analyses(reader *r, const fld *top)
{
    static const char *const pdelta_words[] = {"consistent", "chord", NULL};
    ef_analyses *a = &r->m->analyses;
    a->modal_modes = 12;
    a->modal_above_hz = 0.0;
    a->buckling_load = EF_NONE;
    a->buckling_modes = 4;
    a->so_tolerance = 1e-6;
    a->so_max_iterations = 50;
    a->walk_pace_hz[0] = 1.8;
    a->walk_pace_hz[1] = 2.2;
    a->walk_weight = WALKER_WEIGHT_N / ef_units_force_si(r->m->units.force);
    if (!top->present) return;
    fld f[] = {K("static"),  K("modal"),   K("buckling"),
               K("second_order"), K("walking"), K("machines")};
    if (!read_map(r, top->val, top->kw, "analyses", f, 6)) return;
    if (f[0].present) {
        a->static_given = true;
        ref_list(r, f[0].val, f[0].kw, "analyses: static", "the list", "load", ef_model_find_load,
                 &a->static_loads, &a->n_static_loads);
    }
    if (f[1].present) {
        const char *what = "analyses: modal";
        fld s[] = {K("modes"), K("above_hz")};
        if (read_map(r, f[1].val, f[1].kw, what, s, 2)) {
            a->modal = true;
            char buf[8], buf64[64];
            long v;
            if (s[0].present && kind_of(s[0].val) == V_TEXT &&
                scalar_text(s[0].val, buf, sizeof buf) < sizeof buf && strcmp(buf, "all") == 0)
                a->modal_modes = 0;
            else if (s[0].present && kind_of(s[0].val) != V_NUM)
                ef_diag_error(r->ctx, &s[0].vw, "%s: 'modes' must be a whole number or all, not "
                              "%s", what, show(s[0].val, buf64, sizeof buf64));
            else if (int_field(r, &s[0], what, 1, MAX_MODES, &v) > 0)
                a->modal_modes = (int)v;
            num_field(r, &s[1], what, R_NONNEG, &a->modal_above_hz);
        }
    }
    if (f[2].present) {
        const char *what = "analyses: buckling";
        fld s[] = {K("load"), K("modes"), K("negative")};
        if (read_map(r, f[2].val, f[2].kw, what, s, 3)) {
            a->buckling = true;
            long v;
            if (s[0].present)
                a->buckling_load =
                    ref_value(r, s[0].val, s[0].kw, what, "load", ef_model_find_load);
            else
                missing(r, f[2].kw, what, "load", " (the load whose critical factors are sought)");
            if (int_field(r, &s[1], what, 1, MAX_MODES, &v) > 0) a->buckling_modes = (int)v;
            bool_field(r, &s[2], what, &a->buckling_negative);
        }
    }
    if (f[3].present) {
        const char *what = "analyses: second_order";
        fld s[] = {K("loads"), K("tolerance"), K("max_iterations"), K("pdelta")};
        if (read_map(r, f[3].val, f[3].kw, what, s, 4)) {
            long v;
            int k;
            if (s[0].present)
                ref_list(r, s[0].val, s[0].kw, what, "'loads'", "load", ef_model_find_load,
                         &a->second_order_loads, &a->n_second_order_loads);
            else
                missing(r, f[3].kw, what, "loads", NULL);
            num_field(r, &s[1], what, R_POS, &a->so_tolerance);
            if (int_field(r, &s[2], what, 1, MAX_ITERATIONS, &v) > 0) a->so_max_iterations = (int)v;
            if (word_field(r, &s[3], what, pdelta_words, &k) > 0) a->so_chord_only = k == 1;
        }
    }
    if (f[4].present) read_walking(r, a, &f[4]);
    if (f[5].present) read_machines(r, a, &f[5]);
    if ((a->walking || a->n_machines > 0) && !a->modal) a->modal = true;  /* with its defaults */
}

/* ---- duplicates ------------------------------------------------------------------- */

static void item_label(const ef_model *m, int kind, ef_index i, char *buf, size_t n,
                       ef_where *w)
{
    static const char *const word[] = {"material", "section", "node", "member"};
    const char *name = "";
    switch (kind) {
    case 0: name = m->materials[i].name, *w = m->materials[i].where; break;
    case 1: name = m->sections[i].name, *w = m->sections[i].where; break;
    case 2: name = m->nodes[i].name, *w = m->nodes[i].where; break;
    case 3: name = m->members[i].name, *w = m->members[i].where; break;
    default:
        name = ef_model_load_name(m, i);
        *w = i < m->n_cases ? m->cases[i].where : m->combos[i - m->n_cases].where;
        snprintf(buf, n, "%s '%s'", i < m->n_cases ? "load case" : "combination", name);
        return;
    }
    snprintf(buf, n, "%s '%s'", word[kind], name);
}

/* Equal names (after integer keys became decimal text, or a load case and a combination
 * with one name) sit next to each other in the sorted indexes. */
static void check_duplicates(reader *r)
{
    const ef_model *m = r->m;
    const ef_index *idx[5] = {m->by_name.material, m->by_name.section, m->by_name.node,
                              m->by_name.member, m->by_name.load};
    const ef_index count[5] = {m->n_materials, m->n_sections, m->n_nodes, m->n_members,
                               ef_model_n_loads(m)};
    for (int k = 0; k < 5; k++) {
        for (ef_index i = 1; idx[k] && i < count[k]; i++) {
            char a[200], b[200];
            ef_where wa, wb;
            item_label(m, k, idx[k][i - 1], a, sizeof a, &wa);
            item_label(m, k, idx[k][i], b, sizeof b, &wb);
            const char *na = strchr(a, '\''), *nb = strchr(b, '\'');
            if (strcmp(na, nb) != 0) continue;
            bool later_b = wb.line > wa.line || (wb.line == wa.line && wb.col > wa.col);
            const char *la = later_b ? b : a, *first = later_b ? a : b;
            int first_line = later_b ? wa.line : wb.line;
            if (strncmp(la, first, (size_t)(na - a)) == 0 && na - a == nb - b)
                ef_diag_error(r->ctx, later_b ? &wb : &wa, "%s is defined twice (first on line "
                              "%d)", la, first_line);
            else
                ef_diag_error(r->ctx, later_b ? &wb : &wa, "%s: the name is already used by %s "
                              "(line %d)", la, first, first_line);
        }
    }
}

/* ---- the document ----------------------------------------------------------------- */

static void read_model(reader *r, fnode *root)
{
    ef_model *m = r->m;
    ef_where at = where_of(root, (ef_where){1, 1});
    fld f[] = {K("eigenframe"), K("title"), K("units"), K("gravity"), K("mesh"),
               K("restrain_all"), K("materials"), K("sections"), K("nodes"), K("members"),
               K("supports"), K("masses"), K("loads"), K("combinations"), K("mass_source"),
               K("analyses")};
    enum { F_VER, F_TITLE, F_UNITS, F_GRAV, F_MESH, F_RESTRAIN, F_MAT, F_SEC, F_NODES, F_MEMB,
           F_SUPP, F_MASS, F_LOADS, F_COMBO, F_MSRC, F_ANAL, F_N };
    m->gravity_dir[2] = -1.0;
    m->divisions = 4;
    m->stations = 11;
    m->mass_source.self = true;
    if (kind_of(root) != V_MAP) {
        char sb[64];
        ef_diag_error(r->ctx, &at, "the model must be a mapping of keys (eigenframe, units, "
                      "nodes, ...), not %s", show(root, sb, sizeof sb));
        return;
    }
    read_map(r, root, at, "model file", f, F_N);
    long version;
    int got = int_field(r, &f[F_VER], "model file", LONG_MIN, LONG_MAX, &version);
    if (got == 0)
        missing(r, at, "model file", "eigenframe", " (the format version: eigenframe: 1)");
    else if (got > 0 && version != 1)
        ef_diag_error(r->ctx, &f[F_VER].vw, "eigenframe: format version %ld is not supported "
                      "(this program reads version 1)", version);
    if (f[F_TITLE].present) {
        vkind k = kind_of(f[F_TITLE].val);
        if (k == V_MAP || k == V_SEQ) {
            char sb[64];
            ef_diag_error(r->ctx, &f[F_TITLE].vw, "'title' must be text, not %s",
                          show(f[F_TITLE].val, sb, sizeof sb));
        } else if (k != V_NULL) {
            size_t len = 0;
            const char *s = fy_node_get_scalar(f[F_TITLE].val, &len);
            m->title = xstrndup(r, s ? s : "", s ? len : 0);
        }
    }
    f[F_UNITS].kw = f[F_UNITS].present ? f[F_UNITS].kw : at;
    read_units(r, &f[F_UNITS]);
    read_gravity(r, &f[F_GRAV]);
    read_mesh(r, &f[F_MESH]);
    if (f[F_RESTRAIN].present)
        dof_list(r, f[F_RESTRAIN].val, f[F_RESTRAIN].kw, "restrain_all", &m->restrain_all);
    read_materials(r, &f[F_MAT]);
    read_sections(r, &f[F_SEC]);
    if (!f[F_NODES].present) f[F_NODES].kw = at;
    read_nodes(r, &f[F_NODES]);
    if (ef_model_index_names(m) != EF_OK) r->nomem = true;
    if (!f[F_MEMB].present) f[F_MEMB].kw = at;
    read_members(r, &f[F_MEMB]);
    if (ef_model_index_names(m) != EF_OK) r->nomem = true;
    read_supports(r, &f[F_SUPP]);
    read_masses(r, &f[F_MASS]);
    read_loads(r, &f[F_LOADS], &f[F_COMBO]);
    if (ef_model_index_names(m) != EF_OK) r->nomem = true;
    check_duplicates(r);
    read_mass_source(r, &f[F_MSRC]);
    read_analyses(r, &f[F_ANAL]);
}

/* Re-emit what libfyaml collected (its lines and columns count from 1). */
static void emit_fy_diag(reader *r, struct fy_diag *diag)
{
    void *it = NULL;
    struct fy_diag_error *e;
    while ((e = fy_diag_errors_iterate(diag, &it))) {
        if (e->type < FYET_WARNING) continue;
        ef_where w = {e->line > 0 ? e->line : 0, e->column > 0 ? e->column : 0};
        ef_diag_add(r->ctx, e->type >= FYET_ERROR ? EF_DIAG_ERROR : EF_DIAG_WARNING, &w, "%s",
                    e->msg ? e->msg : "syntax error");
    }
}

static bool ends_with(const char *s, const char *tail)
{
    size_t n = strlen(s), k = strlen(tail);
    return n >= k && strcmp(s + n - k, tail) == 0;
}

ef_status ef_model_load_yaml_string(const char *text, size_t len, const char *name,
                                    ef_model **out, ef_ctx *ctx)
{
    ef_status st = EF_OK;
    const char *saved_file = ctx->file;
    ef_index errors_before = ctx->n_errors;
    struct fy_diag *diag = NULL;
    struct fy_parser *fyp = NULL;
    struct fy_document *doc = NULL, *doc2 = NULL;
    reader r = {ctx, NULL, false};
    *out = NULL;
    ctx->file = name;

    ef_model *m = calloc(1, sizeof *m);
    if (!m || !(m->file = strdup(name ? name : ""))) {
        st = EF_ENOMEM;
        goto done;
    }
    r.m = m;
    ef_sha256(text, len, m->sha256);

    struct fy_diag_cfg dcfg;
    fy_diag_cfg_default(&dcfg);
    dcfg.fp = NULL;
    dcfg.colorize = false;
    if (!(diag = fy_diag_create(&dcfg))) {
        st = EF_ENOMEM;
        goto done;
    }
    fy_diag_set_collect_errors(diag, true);
    struct fy_parse_cfg cfg = {0};
    cfg.flags = FYPCF_QUIET | FYPCF_COLLECT_DIAG | FYPCF_DEFAULT_VERSION_1_2 |
                FYPCF_ALLOW_DUPLICATE_KEYS | FYPCF_DISABLE_ACCELERATORS |
                ((name && ends_with(name, ".json")) ? FYPCF_JSON_FORCE : FYPCF_JSON_NONE);
    cfg.diag = diag;
    if (!(fyp = fy_parser_create(&cfg)) || fy_parser_set_string(fyp, text, len) != 0) {
        st = EF_ENOMEM;
        goto done;
    }
    doc = fy_parse_load_document(fyp);
    if (doc) doc2 = fy_parse_load_document(fyp);
    emit_fy_diag(&r, diag);
    if (ctx->n_errors > errors_before) goto done;
    if (!doc || !fy_document_root(doc)) {
        ef_where w = {1, 1};
        ef_diag_error(ctx, &w, "the model file is empty");
        goto done;
    }
    if (doc2) {
        ef_where w = where_of(fy_document_root(doc2), (ef_where){0, 0});
        ef_diag_error(ctx, &w, "a model file holds one YAML document; this one has more");
    }
    read_model(&r, fy_document_root(doc));
    if (r.nomem) {
        st = EF_ENOMEM;
        goto done;
    }
    st = ef_model_validate(m, ctx);

done:
    if (st == EF_OK && ctx->n_errors > errors_before) st = EF_EINPUT;
    if (st == EF_OK) {
        *out = m;
        m = NULL;
    }
    ef_model_free(&m);
    if (doc2) fy_parse_document_destroy(fyp, doc2);
    if (doc) fy_parse_document_destroy(fyp, doc);
    if (fyp) fy_parser_destroy(fyp);
    if (diag) fy_diag_destroy(diag);
    ctx->file = saved_file;
    return st;
}

ef_status ef_model_load_yaml(const char *path, ef_model **out, ef_ctx *ctx)
{
    *out = NULL;
    FILE *fp = fopen(path, "rb");
    char *buf = NULL;
    size_t len = 0, cap = 0;
    if (!fp) {
        int e = errno;
        const char *saved = ctx->file;
        ctx->file = path;
        char msg[200];
        snprintf(msg, sizeof msg, "%s", strerror(e));
        if (msg[0] >= 'A' && msg[0] <= 'Z') msg[0] = (char)(msg[0] - 'A' + 'a');
        ef_diag_error(ctx, NULL, "cannot open the model file: %s", msg);
        ctx->file = saved;
        return EF_EIO;
    }
    for (;;) {
        if (len == cap) {
            size_t ncap = cap ? 2 * cap : 65536;
            char *nb = realloc(buf, ncap);
            if (!nb) {
                free(buf);
                fclose(fp);
                return EF_ENOMEM;
            }
            buf = nb;
            cap = ncap;
        }
        size_t got = fread(buf + len, 1, cap - len, fp);
        len += got;
        if (got == 0) break;
    }
    bool failed = ferror(fp) != 0;
    fclose(fp);
    if (failed) {
        const char *saved = ctx->file;
        ctx->file = path;
        ef_diag_error(ctx, NULL, "cannot read the model file");
        ctx->file = saved;
        free(buf);
        return EF_EIO;
    }
    ef_status st = ef_model_load_yaml_string(buf, len, path, out, ctx);
    free(buf);
    return st;
}
