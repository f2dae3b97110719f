/* write_svg.c: SVG 1.1 pictures of results: shapes and internal-force diagrams.
 *
 * Geometry: a parallel projection onto a view plane spanned by two orthonormal vectors
 * (right, up), so projected coordinates are in model length units; they are fitted to
 * the page at the end. A member's displaced centreline is drawn through the cubic
 * Hermite interpolation of its end displacements and rotations in local axes (the exact
 * elastic line of an unloaded Euler-Bernoulli member; span loads between model nodes are
 * not shown). A released end rotation is not the node's: there the curve takes the slope
 * of zero curvature at that end, theta = (3 (v_b - v_a)/L - theta_other)/2 [D: the cubic
 * with v'' = 0 at the released end], and both ends released give the chord.
 * The file is built in memory and written atomically (temporary file + rename).
 */
#define _POSIX_C_SOURCE 200809L
#include "write_svg.h"
#include "vec3.h"

#include <errno.h>
#include <float.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#define SEGMENTS 12              /* straight pieces per member curve */
#define SHAPE_FRACTION 0.08      /* largest displacement drawn as this share of the model size */
#define DIAGRAM_FRACTION 0.06    /* largest diagram ordinate, same */
#define PAGE_W 1200.0            /* px */
#define DRAW_H 760.0             /* px, drawing area above the title block */
#define MARGIN 40.0              /* px around the drawing */
#define LINE_H 19.0              /* px per title-block line */
#define MAX_LABELLED 60          /* label every member's extreme up to this many members */
#define LABEL_FRACTION 0.05      /* no label for a member extreme below this share of the largest */

/* our own palette */
#define C_FRAME "#b9bec7"        /* undeformed members */
#define C_SHAPE "#b3126f"        /* displaced shape */
#define C_SUPPORT "#4a4e57"
#define C_POS "#1d7874"          /* diagram, positive values */
#define C_NEG "#d9822b"          /* diagram, negative values */
#define C_TEXT "#1f2330"
#define C_BLOCK "#f3f1ec"

static const char *const comp_names[6] = {"N", "Vy", "Vz", "T", "My", "Mz"};
static const char *const view_names[4] = {"iso", "plan", "xz", "yz"};
static const char *const view_words[4] = {"isometric", "plan (looking along gravity)",
                                          "elevation X-Z (looking along +Y)",
                                          "elevation Y-Z (looking along -X)"};

bool ef_svg_parse_view(const char *s, ef_svg_view *out)
{
    for (int i = 0; i < 4; i++)
        if (!strcmp(s, view_names[i])) {
            *out = (ef_svg_view)i;
            return true;
        }
    return false;
}

int ef_svg_parse_component(const char *s)
{
    for (int i = 0; i < 6; i++)
        if (!strcmp(s, comp_names[i])) return i;
    return -1;
}

/* ---- a growing text buffer --------------------------------------------------------- */

typedef struct {
    char *s;
    size_t n, cap;
    bool oom;
} sbuf;

static void sb_printf(sbuf *b, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
static void sb_printf(sbuf *b, const char *fmt, ...)
{
    if (b->oom) return;
    for (;;) {
        va_list ap;
        va_start(ap, fmt);
        int k = vsnprintf(b->s ? b->s + b->n : NULL, b->s ? b->cap - b->n : 0, fmt, ap);
        va_end(ap);
        if (k < 0) { b->oom = true; return; }
        if (b->s && b->n + (size_t)k < b->cap) {
            b->n += (size_t)k;
            return;
        }
        size_t cap = b->cap ? 2 * b->cap : 65536;
        while (cap < b->n + (size_t)k + 1) cap *= 2;
        char *s = realloc(b->s, cap);
        if (!s) { b->oom = true; return; }
        b->s = s;
        b->cap = cap;
    }
}

/* text with the XML special characters escaped; control characters (not allowed in
 * XML 1.0) become '?' */
static void sb_text(sbuf *b, const char *t)
{
    for (const unsigned char *p = (const unsigned char *)(t ? t : ""); *p; p++) {
        switch (*p) {
        case '&': sb_printf(b, "&amp;"); break;
        case '<': sb_printf(b, "&lt;"); break;
        case '>': sb_printf(b, "&gt;"); break;
        case '"': sb_printf(b, "&quot;"); break;
        case '\'': sb_printf(b, "&apos;"); break;
        default: sb_printf(b, "%c", (*p < 0x20 && *p != '\t') ? '?' : (char)*p);
        }
    }
}

/* Drop an incomplete UTF-8 sequence that snprintf may have cut at the end of s. */
static void utf8_cut(char *s)
{
    size_t n = strlen(s), i = n;
    while (i > 0 && ((unsigned char)s[i - 1] & 0xC0) == 0x80) i--;   /* continuation bytes */
    if (i == 0) return;
    unsigned char lead = (unsigned char)s[i - 1];
    size_t need = lead >= 0xF0 ? 4 : lead >= 0xE0 ? 3 : lead >= 0xC0 ? 2 : 1;
    if (n - (i - 1) < need) s[i - 1] = '\0';
}

/* ---- geometry ------------------------------------------------------------------------ */

static void unit3(double a[3])
{
    double n = sqrt(ef_dot3(a, a));
    if (n > 0.0)
        for (int i = 0; i < 3; i++) a[i] /= n;
}

/* Orthonormal view-plane basis: right and up on the page, in global components. */
static void view_basis(const ef_model *m, ef_svg_view view, double right[3], double up[3])
{
    static const double X[3] = {1, 0, 0}, Y[3] = {0, 1, 0}, Z[3] = {0, 0, 1};
    if (view == EF_SVG_XZ || view == EF_SVG_YZ) {
        memcpy(right, view == EF_SVG_XZ ? X : Y, sizeof X);
        memcpy(up, Z, sizeof Z);
        return;
    }
    double vert[3] = {-m->gravity_dir[0], -m->gravity_dir[1], -m->gravity_dir[2]};
    if (!(ef_dot3(vert, vert) > 0.0)) memcpy(vert, Z, sizeof Z);
    unit3(vert);
    /* h1: global X made horizontal (Y when X is vertical); h2 = vert x h1 */
    double h1[3], h2[3];
    const double *base = fabs(ef_dot3(vert, X)) < 0.9 ? X : Y;
    double c = ef_dot3(base, vert);
    for (int i = 0; i < 3; i++) h1[i] = base[i] - c * vert[i];
    unit3(h1);
    ef_cross3(vert, h1, h2);
    if (view == EF_SVG_PLAN) {
        memcpy(right, h1, sizeof h1);
        memcpy(up, h2, sizeof h2);
        return;
    }
    /* isometric: the eye along h1 - h2 + vert, looking at the model */
    double f[3];
    for (int i = 0; i < 3; i++) f[i] = -(h1[i] - h2[i] + vert[i]);
    unit3(f);
    ef_cross3(f, vert, right);
    unit3(right);
    ef_cross3(right, f, up);
    unit3(up);
}

typedef struct {
    double right[3], up[3];
} proj;

static void project(const proj *p, const double x[3], double out[2])
{
    out[0] = ef_dot3(p->right, x);
    out[1] = ef_dot3(p->up, x);
}

/* Displaced centreline of member k: SEGMENTS + 1 points in global coordinates; u are
 * the node displacements [n][6] and s the drawing scale. */
static void member_curve(const ef_model *m, ef_index k, const double *u, double s,
                         double pts[SEGMENTS + 1][3])
{
    const ef_member *b = &m->members[k];
    const double *xa = m->nodes[b->node[0]].xyz;
    const double L = b->length;
    double t[2][3], r[2][3];                    /* local translations, rotations per end */
    for (int e = 0; e < 2; e++) {
        const double *ue = u + 6 * b->node[e];
        for (int i = 0; i < 3; i++) {
            t[e][i] = ef_dot3(b->axes[i], ue);
            r[e][i] = ef_dot3(b->axes[i], ue + 3);
        }
    }
    /* slopes in the x-y plane (v' = rz) and the x-z plane (w' = -ry) */
    double sv[2] = {r[0][2], r[1][2]}, sw[2] = {-r[0][1], -r[1][1]};
    for (int plane = 0; plane < 2; plane++) {
        unsigned bit = plane == 0 ? EF_RZ : EF_RY;
        double *sl = plane == 0 ? sv : sw;
        int c = plane == 0 ? 1 : 2;
        bool freeA = b->axial_only || (b->release[0] & bit), freeB = b->axial_only || (b->release[1] & bit);
        double chord = L > 0.0 ? (t[1][c] - t[0][c]) / L : 0.0;
        if (freeA && freeB) sl[0] = sl[1] = chord;
        else if (freeA) sl[0] = 0.5 * (3.0 * chord - sl[1]);
        else if (freeB) sl[1] = 0.5 * (3.0 * chord - sl[0]);
    }
    for (int j = 0; j <= SEGMENTS; j++) {
        double xi = (double)j / SEGMENTS;
        /* cubic Hermite shape functions of the Euler-Bernoulli beam (Przemieniecki, Theory
           of Matrix Structural Analysis, 1968) */
        double H1 = 1 - 3 * xi * xi + 2 * xi * xi * xi, H2 = xi - 2 * xi * xi + xi * xi * xi;
        double H3 = 3 * xi * xi - 2 * xi * xi * xi, H4 = -xi * xi + xi * xi * xi;
        double ux = (1 - xi) * t[0][0] + xi * t[1][0];
        double v = H1 * t[0][1] + H2 * L * sv[0] + H3 * t[1][1] + H4 * L * sv[1];
        double w = H1 * t[0][2] + H2 * L * sw[0] + H3 * t[1][2] + H4 * L * sw[1];
        for (int i = 0; i < 3; i++)
            pts[j][i] = xa[i] + xi * L * b->axes[0][i] +
                        s * (ux * b->axes[0][i] + v * b->axes[1][i] + w * b->axes[2][i]);
    }
}

/* ---- page fitting -------------------------------------------------------------------- */

typedef struct {
    double lo[2], hi[2];
    double k, ox, oy;            /* page = (k (x - lo0) + ox, oy - k (y - lo1)) */
} fit;

static void fit_add(fit *f, const double p[2])
{
    for (int i = 0; i < 2; i++) {
        if (!isfinite(p[i])) continue;
        f->lo[i] = fmin(f->lo[i], p[i]);
        f->hi[i] = fmax(f->hi[i], p[i]);
    }
}

static void fit_finish(fit *f)
{
    double w = f->hi[0] - f->lo[0], h = f->hi[1] - f->lo[1];
    if (!(w >= 0.0)) { f->lo[0] = f->hi[0] = 0.0; w = 0.0; }
    if (!(h >= 0.0)) { f->lo[1] = f->hi[1] = 0.0; h = 0.0; }
    double aw = PAGE_W - 2 * MARGIN, ah = DRAW_H - 2 * MARGIN;
    double kx = w > 0.0 ? aw / w : DBL_MAX, ky = h > 0.0 ? ah / h : DBL_MAX;
    f->k = fmin(kx, ky);
    if (f->k == DBL_MAX) f->k = 1.0;
    f->ox = MARGIN + 0.5 * (aw - f->k * w);
    f->oy = DRAW_H - MARGIN - 0.5 * (ah - f->k * h);
}

static double px(const fit *f, const double p[2]) { return f->k * (p[0] - f->lo[0]) + f->ox; }
static double py(const fit *f, const double p[2]) { return f->oy - f->k * (p[1] - f->lo[1]); }

/* ---- what to draw -------------------------------------------------------------------- */

typedef struct {
    const double *u;             /* displacement field [n][6], or NULL */
    const ef_load_result *lr;    /* static or second-order load, or NULL */
    char what[512];              /* analysis line of the title block */
    char value[256];             /* frequency or critical factor line, or "" */
    bool normalised;             /* the shape has no absolute size (modes) */
} picture;

static bool find_load(const ef_load_result *lr, ef_index n, ef_index load, const ef_load_result **out)
{
    for (ef_index i = 0; i < n; i++)
        if (lr[i].load == load) {
            *out = &lr[i];
            return true;
        }
    return false;
}

static ef_status choose(const ef_model *m, const ef_results *r, const ef_svg_request *q,
                        picture *pic, ef_ctx *ctx)
{
    memset(pic, 0, sizeof *pic);
    const char *lname = ef_model_load_name(m, q->load);
    const char *lkind = ef_model_load_is_combo(m, q->load) ? "combination" : "case";
    if ((unsigned)q->view > (unsigned)EF_SVG_YZ) {
        ef_diag_error(ctx, NULL, "unknown view %d", (int)q->view);
        return EF_EINPUT;
    }
    if (q->diagram >= 6 || q->diagram < -1) {
        ef_diag_error(ctx, NULL, "unknown internal-force component %d", q->diagram);
        return EF_EINPUT;
    }
    if (q->diagram >= 0 && (q->what == EF_SVG_MODE || q->what == EF_SVG_BUCKLING)) {
        ef_diag_error(ctx, NULL, "internal-force diagrams are drawn for static and second-order loads only");
        return EF_EINPUT;
    }
    switch (q->what) {
    case EF_SVG_STATIC:
    case EF_SVG_SECOND_ORDER: {
        bool so = q->what == EF_SVG_SECOND_ORDER;
        if (q->load < 0 || q->load >= ef_model_n_loads(m) ||
            !find_load(so ? r->second : r->statics, so ? r->n_second : r->n_statics, q->load,
                       &pic->lr)) {
            ef_diag_error(ctx, NULL, "load '%s' has no %s results", q->load >= 0 ? lname : "?",
                          so ? "second-order" : "linear static");
            return EF_EINPUT;
        }
        pic->u = pic->lr->disp;
        if (so)
            snprintf(pic->what, sizeof pic->what,
                     "Second-order (P-delta, %s) analysis, load '%s' (%s): %s after %d iterations",
                     pic->lr->chord_only ? "chord terms" : "consistent", lname, lkind,
                     pic->lr->converged ? "converged" : "NOT converged", pic->lr->iterations);
        else
            snprintf(pic->what, sizeof pic->what, "Linear static analysis, load '%s' (%s)", lname,
                     lkind);
        return EF_OK;
    }
    case EF_SVG_MODE: {
        const ef_modal_result *mr = r->modal;
        if (!mr || q->mode < 0 || q->mode >= mr->n_modes) {
            ef_diag_error(ctx, NULL, "mode %d: %d natural modes were computed", q->mode + 1,
                          mr ? mr->n_modes : 0);
            return EF_EINPUT;
        }
        pic->u = mr->shapes + (size_t)q->mode * 6 * (size_t)m->n_nodes;
        pic->normalised = true;
        snprintf(pic->what, sizeof pic->what, "Natural vibration, mode %d of %d", q->mode + 1,
                 mr->n_modes);
        double f = mr->freq[q->mode];
        if (f > 0.0)
            snprintf(pic->value, sizeof pic->value, "f = %.4g Hz, T = %.4g s", f, 1.0 / f);
        else
            snprintf(pic->value, sizeof pic->value, "f = %.4g Hz (rigid-body or near-rigid mode)", f);
        return EF_OK;
    }
    case EF_SVG_BUCKLING: {
        const ef_buckling_result *br = r->buckling;
        if (!br) {
            ef_diag_error(ctx, NULL, "the results hold no buckling analysis");
            return EF_EINPUT;
        }
        if (q->load != EF_NONE && q->load != br->load) {
            ef_diag_error(ctx, NULL, "load '%s' has no buckling results (buckling was run for '%s')",
                          q->load >= 0 && q->load < ef_model_n_loads(m) ? lname : "?",
                          ef_model_load_name(m, br->load));
            return EF_EINPUT;
        }
        if (q->mode < 0 || q->mode >= br->n_pos) {
            ef_diag_error(ctx, NULL, "buckling mode %d: %d positive critical factors were found",
                          q->mode + 1, br->n_pos);
            return EF_EINPUT;
        }
        pic->u = br->shapes + (size_t)q->mode * 6 * (size_t)m->n_nodes;
        pic->normalised = true;
        snprintf(pic->what, sizeof pic->what, "Elastic critical load, load '%s', buckling mode %d of %d",
                 ef_model_load_name(m, br->load), q->mode + 1, br->n_pos);
        static const char *const kinds[3] = {"global (sway)", "member flexural", "member torsional"};
        int kd = br->kind ? br->kind[q->mode] : 0;
        const char *kw = kinds[(kd >= 0 && kd <= 2) ? kd : 0];
        ef_index dm = br->dominant ? br->dominant[q->mode] : EF_NONE;
        if (kd != 0 && dm >= 0 && dm < m->n_members)
            snprintf(pic->value, sizeof pic->value, "critical load factor %.4g; %s, member '%s'",
                     br->factors[q->mode], kw, m->members[dm].name);
        else
            snprintf(pic->value, sizeof pic->value, "critical load factor %.4g; %s",
                     br->factors[q->mode], kw);
        return EF_OK;
    }
    }
    ef_diag_error(ctx, NULL, "unknown kind of picture %d", (int)q->what);
    return EF_EINPUT;
}

/* A member as projected: start point a, start-to-end vector t, unit normal n (left). */
typedef struct {
    double a[2], t[2], n[2];
} member_2d;

/* station value of component c (0 where not finite) */
static double station_value(const ef_load_result *lr, ef_index j, int c)
{
    double v = lr->stations[7 * j + 1 + c];
    return isfinite(v) ? v : 0.0;
}

/* projected point at distance x from the member start, ordinate v drawn at scale d */
static void diagram_point(const member_2d *g, double L, double x, double v, double d, double out[2])
{
    double xi = L > 0.0 ? x / L : 0.0;
    out[0] = g->a[0] + xi * g->t[0] + d * v * g->n[0];
    out[1] = g->a[1] + xi * g->t[1] + d * v * g->n[1];
}

/* ---- the drawing ------------------------------------------------------------------- */

static void emit_title_line(sbuf *b, double y, bool bold, const char *text)
{
    sb_printf(b, "<text x=\"%.1f\" y=\"%.1f\"%s>", MARGIN, y, bold ? " font-weight=\"bold\"" : "");
    sb_text(b, text);
    sb_printf(b, "</text>\n");
}

static ef_status write_atomic(const char *path, const sbuf *b, ef_ctx *ctx)
{
    size_t tn = strlen(path) + 32;
    char *tmp = malloc(tn);
    if (!tmp) return EF_ENOMEM;
    snprintf(tmp, tn, "%s.tmp.%ld", path, (long)getpid());
    FILE *f = fopen(tmp, "wb");
    bool ok = f != NULL;
    const char *step = "fopen";
    if (ok && fwrite(b->s, 1, b->n, f) != b->n) { ok = false; step = "fwrite"; }
    if (f && fclose(f) != 0 && ok) { ok = false; step = "fclose"; }
    if (ok && rename(tmp, path) != 0) { ok = false; step = "rename"; }
    if (!ok) {
        ef_diag_error(ctx, NULL, "%s: cannot write the picture (%s failed: %s)", path, step,
                      strerror(errno));
        remove(tmp);
    }
    free(tmp);
    return ok ? EF_OK : EF_EIO;
}

ef_status ef_svg_write(const ef_model *m, const ef_results *r, const ef_svg_request *req,
                       const char *path, ef_ctx *ctx)
{
    picture pic;
    ef_status st = choose(m, r, req, &pic, ctx);
    if (st != EF_OK) return st;
    const bool diagram = req->diagram >= 0;
    const ef_index nn = m->n_nodes, nm = m->n_members;
    const char *F = ef_units_force_name(m->units.force), *Lu = ef_units_length_name(m->units.length);
    proj P;
    view_basis(m, req->view, P.right, P.up);
    double size = ef_model_size(m);
    if (!(size > 0.0)) size = 1.0;

    /* shape scale: largest node translation drawn as SHAPE_FRACTION of the model size */
    double umax = 0.0, s = 0.0;
    ef_index unode = EF_NONE;
    if (!diagram)
        for (ef_index i = 0; i < nn; i++) {
            const double *u = pic.u + 6 * i;
            double a = sqrt(ef_dot3(u, u));
            if (a > umax) { umax = a; unode = i; }
        }
    if (umax > 0.0) s = SHAPE_FRACTION * size / umax;

    const ef_index *sf = r->st_first;
    double vmax = 0.0, vhi = -INFINITY, vlo = INFINITY, d = 0.0;
    ef_index khi = EF_NONE, klo = EF_NONE, n_endon = 0;

    /* everything in projected model coordinates first */
    size_t npts = (size_t)EF_MAX(nm, 1) * (SEGMENTS + 1);
    double (*curve)[2] = malloc(npts * sizeof *curve);
    double (*base)[2] = malloc((size_t)EF_MAX(nn, 1) * sizeof *base);
    member_2d *dg = diagram ? malloc((size_t)EF_MAX(nm, 1) * sizeof *dg) : NULL;
    bool *endon = calloc((size_t)EF_MAX(nm, 1), sizeof *endon);
    sbuf b = {NULL, 0, 0, false};
    if (!curve || !base || (diagram && !dg) || !endon) {
        st = EF_ENOMEM;
        goto done;
    }
    fit fx = {{INFINITY, INFINITY}, {-INFINITY, -INFINITY}, 1.0, 0.0, 0.0};
    for (ef_index i = 0; i < nn; i++) {
        project(&P, m->nodes[i].xyz, base[i]);
        fit_add(&fx, base[i]);
    }
    for (ef_index k = 0; k < nm; k++) {
        const ef_member *mb = &m->members[k];
        if (!diagram) {
            double pts[SEGMENTS + 1][3];
            member_curve(m, k, pic.u, s, pts);
            for (int j = 0; j <= SEGMENTS; j++) {
                project(&P, pts[j], curve[k * (SEGMENTS + 1) + j]);
                fit_add(&fx, curve[k * (SEGMENTS + 1) + j]);
            }
            continue;
        }
        /* diagram ordinates: perpendicular to the projected member, positive to its left */
        const double *pa = base[mb->node[0]], *pb = base[mb->node[1]];
        member_2d *g = &dg[k];
        g->a[0] = pa[0];
        g->a[1] = pa[1];
        g->t[0] = pb[0] - pa[0];
        g->t[1] = pb[1] - pa[1];
        double lt = hypot(g->t[0], g->t[1]);
        endon[k] = !(lt > 1e-6 * size);
        g->n[0] = endon[k] ? 0.0 : -g->t[1] / lt;
        g->n[1] = endon[k] ? 0.0 : g->t[0] / lt;
        n_endon += endon[k];
    }
    /* diagram scale: the largest |value| on a member that is drawn (not seen end-on)
       becomes DIAGRAM_FRACTION of the model size */
    for (ef_index k = 0; diagram && k < nm; k++)
        for (ef_index j = sf[k]; j < sf[k + 1] && !endon[k]; j++) {
            double v = pic.lr->stations[7 * j + 1 + req->diagram];
            if (!isfinite(v)) continue;
            vmax = fmax(vmax, fabs(v));
            if (v > vhi) { vhi = v; khi = k; }
            if (v < vlo) { vlo = v; klo = k; }
        }
    if (vmax > 0.0) d = DIAGRAM_FRACTION * size / vmax;
    for (ef_index k = 0; diagram && k < nm; k++)
        for (ef_index j = sf[k]; j < sf[k + 1] && !endon[k]; j++) {
            double o[2];
            diagram_point(&dg[k], m->members[k].length, pic.lr->stations[7 * j],
                          station_value(pic.lr, j, req->diagram), d, o);
            fit_add(&fx, o);
        }
    fit_finish(&fx);

    /* title block text */
    char lines[8][1600];
    int nl = 0;
    char mu[40];
    snprintf(lines[nl++], sizeof lines[0], "eigenframe %s", EF_VERSION);
    if (m->title)
        snprintf(lines[nl++], sizeof lines[0], "Model: %s  (%s)", m->title, m->file ? m->file : "");
    else
        snprintf(lines[nl++], sizeof lines[0], "Model: %s", m->file ? m->file : "(memory)");
    snprintf(lines[nl++], sizeof lines[0], "%s", pic.what);
    if (pic.value[0]) snprintf(lines[nl++], sizeof lines[0], "%s", pic.value);
    if (diagram) {
        const char *cu = req->diagram >= 3 ? "*" : "";
        char unit[40];
        snprintf(unit, sizeof unit, "%s%s%s", F, cu, req->diagram >= 3 ? Lu : "");
        snprintf(lines[nl++], sizeof lines[0],
                 "Internal force %s [%s] (local axes, N > 0 tension): positive (teal) drawn "
                 "to the left of each member seen from start to end, negative (amber) to the right",
                 comp_names[req->diagram], unit);
        char endon_note[96] = "";
        if (n_endon)
            snprintf(endon_note, sizeof endon_note, "; %lld member(s) seen end-on are not drawn",
                     (long long)n_endon);
        if (vmax > 0.0)
            snprintf(lines[nl++], sizeof lines[0],
                     "Largest %.4g %s (member '%s'), smallest %.4g %s (member '%s'); diagram "
                     "scale: largest |value| drawn as %.0f%% of the model size%s",
                     vhi, unit, m->members[khi].name, vlo, unit, m->members[klo].name,
                     100.0 * DIAGRAM_FRACTION, endon_note);
        else
            snprintf(lines[nl++], sizeof lines[0], "%s is zero on every member drawn%s",
                     comp_names[req->diagram], endon_note);
    } else if (pic.normalised) {
        snprintf(lines[nl++], sizeof lines[0],
                 "Shape scale: largest node translation drawn as %.0f%% of the model size "
                 "(%.4g %s); a mode shape has no absolute size",
                 100.0 * SHAPE_FRACTION, size, Lu);
    } else if (umax > 0.0) {
        snprintf(lines[nl++], sizeof lines[0],
                 "Displacement scale x %.4g: largest node displacement %.4g %s (node '%s') drawn "
                 "as %.0f%% of the model size (%.4g %s)",
                 s, umax, Lu, m->nodes[unode].name, 100.0 * SHAPE_FRACTION, size, Lu);
    } else {
        snprintf(lines[nl++], sizeof lines[0], "No node moves under this load (displacements all zero)");
    }
    snprintf(lines[nl++], sizeof lines[0],
             "Units: force %s, length %s, mass %s; view: %s; grey: undeformed members", F, Lu,
             ef_units_mass_name(&m->units, mu, sizeof mu), view_words[req->view]);

    for (int i = 0; i < nl; i++) utf8_cut(lines[i]);
    double page_h = DRAW_H + 2 * 12 + LINE_H * nl + 12;
    sb_printf(&b, "<?xml version=\"1.0\" encoding=\"UTF-8\" standalone=\"no\"?>\n");
    sb_printf(&b,
              "<svg xmlns=\"http://www.w3.org/2000/svg\" version=\"1.1\" width=\"%.0f\" "
              "height=\"%.0f\" viewBox=\"0 0 %.0f %.0f\" font-family=\"DejaVu Sans, Helvetica, "
              "Arial, sans-serif\" font-size=\"13\">\n",
              PAGE_W, page_h, PAGE_W, page_h);
    sb_printf(&b, "<title>");
    sb_text(&b, pic.what);
    sb_printf(&b, "</title>\n<rect x=\"0\" y=\"0\" width=\"%.0f\" height=\"%.0f\" fill=\"#ffffff\"/>\n",
              PAGE_W, page_h);

    /* undeformed frame */
    sb_printf(&b, "<g id=\"undeformed\" fill=\"none\" stroke=\"" C_FRAME
                  "\" stroke-width=\"1.4\" stroke-linecap=\"round\">\n");
    for (ef_index k = 0; k < nm; k++) {
        const double *pa = base[m->members[k].node[0]], *pb = base[m->members[k].node[1]];
        sb_printf(&b, "<path d=\"M%.2f %.2fL%.2f %.2f\"><title>", px(&fx, pa), py(&fx, pa),
                  px(&fx, pb), py(&fx, pb));
        sb_text(&b, m->members[k].name);
        sb_printf(&b, "</title></path>\n");
    }
    sb_printf(&b, "</g>\n");

    /* supports: a small triangle under the node, filled when rotations are held too */
    sb_printf(&b, "<g id=\"supports\" stroke=\"" C_SUPPORT "\" stroke-width=\"1.2\">\n");
    for (ef_index i = 0; i < m->n_supports; i++) {
        ef_index nd = m->supports[i].node;
        if (nd < 0 || nd >= nn) continue;
        double x = px(&fx, base[nd]), y = py(&fx, base[nd]);
        bool fixed = (m->supports[i].held & (EF_RX | EF_RY | EF_RZ)) == (EF_RX | EF_RY | EF_RZ);
        sb_printf(&b, "<path d=\"M%.2f %.2fl-6 10h12z\" fill=\"%s\"/>\n", x, y,
                  fixed ? C_SUPPORT : "none");
    }
    sb_printf(&b, "</g>\n");

    if (!diagram) {
        sb_printf(&b, "<g id=\"shape\" fill=\"none\" stroke=\"" C_SHAPE
                      "\" stroke-width=\"2.2\" stroke-linejoin=\"round\" stroke-linecap=\"round\">\n");
        for (ef_index k = 0; k < nm; k++) {
            const double (*c)[2] = (const double (*)[2])curve + k * (SEGMENTS + 1);
            sb_printf(&b, "<path d=\"M%.2f %.2f", px(&fx, c[0]), py(&fx, c[0]));
            for (int j = 1; j <= SEGMENTS; j++) sb_printf(&b, "L%.2f %.2f", px(&fx, c[j]), py(&fx, c[j]));
            sb_printf(&b, "\"><title>");
            sb_text(&b, m->members[k].name);
            sb_printf(&b, "</title></path>\n");
        }
        sb_printf(&b, "</g>\n");
    } else {
        /* per member: the positive part and the negative part filled (ordinates clipped at
           zero, with the zero crossings between stations inserted), then the outline */
        sb_printf(&b, "<g id=\"diagram\">\n");
        for (ef_index k = 0; k < nm; k++) {
            if (endon[k] || sf[k + 1] <= sf[k]) continue;
            const double L = m->members[k].length;
            for (int sign = 1; sign >= -1; sign -= 2) {
                bool any = false;
                for (ef_index j = sf[k]; j < sf[k + 1]; j++)
                    any |= sign * station_value(pic.lr, j, req->diagram) > 0.0;
                if (!any) continue;
                sb_printf(&b, "<path fill=\"%s\" fill-opacity=\"0.4\" stroke=\"none\" d=\"",
                          sign > 0 ? C_POS : C_NEG);
                double o[2];
                diagram_point(&dg[k], L, pic.lr->stations[7 * sf[k]], 0.0, d, o);
                sb_printf(&b, "M%.2f %.2f", px(&fx, o), py(&fx, o));
                for (ef_index j = sf[k]; j < sf[k + 1]; j++) {
                    double x = pic.lr->stations[7 * j], v = station_value(pic.lr, j, req->diagram);
                    if (j > sf[k]) {          /* a zero crossing since the last station */
                        double x0 = pic.lr->stations[7 * (j - 1)];
                        double v0 = station_value(pic.lr, j - 1, req->diagram);
                        if ((v0 > 0.0 && v < 0.0) || (v0 < 0.0 && v > 0.0)) {
                            diagram_point(&dg[k], L, x0 + (x - x0) * v0 / (v0 - v), 0.0, d, o);
                            sb_printf(&b, "L%.2f %.2f", px(&fx, o), py(&fx, o));
                        }
                    }
                    diagram_point(&dg[k], L, x, sign > 0 ? fmax(v, 0.0) : fmin(v, 0.0), d, o);
                    sb_printf(&b, "L%.2f %.2f", px(&fx, o), py(&fx, o));
                }
                diagram_point(&dg[k], L, pic.lr->stations[7 * (sf[k + 1] - 1)], 0.0, d, o);
                sb_printf(&b, "L%.2f %.2fZ\"/>\n", px(&fx, o), py(&fx, o));
            }
            sb_printf(&b, "<path fill=\"none\" stroke=\"" C_TEXT "\" stroke-width=\"0.8\" d=\"");
            for (ef_index j = sf[k]; j < sf[k + 1]; j++) {
                double o[2];
                diagram_point(&dg[k], L, pic.lr->stations[7 * j], station_value(pic.lr, j, req->diagram),
                              d, o);
                sb_printf(&b, "%c%.2f %.2f", j == sf[k] ? 'M' : 'L', px(&fx, o), py(&fx, o));
            }
            sb_printf(&b, "\"><title>");
            sb_text(&b, m->members[k].name);
            sb_printf(&b, "</title></path>\n");
        }
        sb_printf(&b, "</g>\n");
        /* labels: each member's extreme (only the overall extremes on big models); values
           below LABEL_FRACTION of the largest, and labels that would overlap one already
           placed, are left out */
        sb_printf(&b, "<g id=\"labels\" fill=\"" C_TEXT "\" font-size=\"11\" text-anchor=\"middle\">\n");
        double placed[MAX_LABELLED + 2][2];
        int n_placed = 0;
        for (ef_index k = 0; k < nm && vmax > 0.0; k++) {
            if (endon[k]) continue;
            if (nm > MAX_LABELLED && k != khi && k != klo) continue;
            ef_index jb = EF_NONE;
            for (ef_index j = sf[k]; j < sf[k + 1]; j++)
                if (jb == EF_NONE || fabs(station_value(pic.lr, j, req->diagram)) >
                                         fabs(station_value(pic.lr, jb, req->diagram)))
                    jb = j;
            if (jb == EF_NONE) continue;
            double v = station_value(pic.lr, jb, req->diagram), o[2];
            if (fabs(v) < LABEL_FRACTION * vmax) continue;
            diagram_point(&dg[k], m->members[k].length, pic.lr->stations[7 * jb], v, d, o);
            double x = px(&fx, o), y = py(&fx, o) + (v * d >= 0.0 ? -4.0 : 12.0);
            bool clash = false;
            for (int i = 0; i < n_placed && !clash; i++)
                clash = fabs(placed[i][0] - x) < 40.0 && fabs(placed[i][1] - y) < 11.0;
            if (clash || n_placed >= MAX_LABELLED + 2) continue;
            placed[n_placed][0] = x;
            placed[n_placed++][1] = y;
            sb_printf(&b, "<text x=\"%.2f\" y=\"%.2f\">%.4g</text>\n", x, y, v);
        }
        sb_printf(&b, "</g>\n");
    }

    /* title block */
    double y0 = DRAW_H + 12;
    sb_printf(&b, "<g id=\"title-block\" fill=\"" C_TEXT "\">\n");
    sb_printf(&b, "<rect x=\"%.1f\" y=\"%.1f\" width=\"%.1f\" height=\"%.1f\" fill=\"" C_BLOCK
                  "\" stroke=\"" C_TEXT "\" stroke-width=\"0.8\"/>\n",
              MARGIN - 12, y0, PAGE_W - 2 * (MARGIN - 12), LINE_H * nl + 12);
    for (int i = 0; i < nl; i++) emit_title_line(&b, y0 + 6 + LINE_H * (i + 0.8), i == 0 || i == 2, lines[i]);
    sb_printf(&b, "</g>\n</svg>\n");
    if (b.oom) {
        st = EF_ENOMEM;
        goto done;
    }
    st = write_atomic(path, &b, ctx);
done:
    free(curve);
    free(base);
    free(dg);
    free(endon);
    free(b.s);
    return st;
}
