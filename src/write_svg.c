/* write_svg.c: SVG 1.1 pictures of results: shapes, internal-force diagrams and the
 * footfall response factor R at the receiver nodes of a floor.
 *
 * Geometry: a parallel projection onto a view plane spanned by two orthonormal vectors
 * (right, up), so projected coordinates are in model length units; they are fitted to
 * the page at the end. A member's displaced centreline is drawn through the cubic
 * Hermite interpolation of its end displacements and rotations in local axes (the exact
 * elastic line of an unloaded Euler-Bernoulli member; span loads between model nodes are
 * not shown). A released end rotation is not the node's: there the curve takes the slope
 * of zero curvature at that end, theta = (3 (v_b - v_a)/L - theta_other)/2 [D: the cubic
 * with v'' = 0 at the released end], and both ends released give the chord.
 * The footfall picture draws no shape: markers at the receiver nodes coloured by R on the
 * scale described at scale_stops (docs/results-format.md, /walking, says the same to users).
 * The file is built in memory and written atomically (temporary file + rename).
 */
#define _POSIX_C_SOURCE 200809L
#include "write_svg.h"
#include "vec3.h"
#include "vibration.h"

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
    double reserve;              /* px kept free at the right of the drawing area */
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
    double aw = PAGE_W - 2 * MARGIN - f->reserve, ah = DRAW_H - 2 * MARGIN;
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
    if (q->diagram >= 0 && q->what != EF_SVG_STATIC && q->what != EF_SVG_SECOND_ORDER) {
        ef_diag_error(ctx, NULL, "internal-force diagrams are drawn for static and second-order loads only");
        return EF_EINPUT;
    }
    switch (q->what) {
    case EF_SVG_WALKING: {
        const ef_walking_result *wk = r->walking;
        if (!wk) {
            ef_diag_error(ctx, NULL, "the results hold no walking (footfall) response: the model's "
                          "analyses had no walking block");
            return EF_EINPUT;
        }
        snprintf(pic->what, sizeof pic->what,
                 "Floor vibration under walking: footfall response factor R at %lld receiver node%s",
                 (long long)wk->n_receivers, wk->n_receivers == 1 ? "" : "s");
        return EF_OK;
    }
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

/* Page height for a title block of nl lines. */
static double page_height(int nl) { return DRAW_H + 2 * 12 + LINE_H * nl + 12; }

/* XML declaration, <svg> element, <title> and the white background. */
static void emit_head(sbuf *b, double page_h, const char *title)
{
    sb_printf(b, "<?xml version=\"1.0\" encoding=\"UTF-8\" standalone=\"no\"?>\n");
    sb_printf(b,
              "<svg xmlns=\"http://www.w3.org/2000/svg\" version=\"1.1\" width=\"%.0f\" "
              "height=\"%.0f\" viewBox=\"0 0 %.0f %.0f\" font-family=\"DejaVu Sans, Helvetica, "
              "Arial, sans-serif\" font-size=\"13\">\n",
              PAGE_W, page_h, PAGE_W, page_h);
    sb_printf(b, "<title>");
    sb_text(b, title);
    sb_printf(b, "</title>\n<rect x=\"0\" y=\"0\" width=\"%.0f\" height=\"%.0f\" fill=\"#ffffff\"/>\n",
              PAGE_W, page_h);
}

/* The undeformed members in light grey and the supports; base: projected model nodes. */
static void emit_frame(sbuf *b, const ef_model *m, const double (*base)[2], const fit *fx)
{
    sb_printf(b, "<g id=\"undeformed\" fill=\"none\" stroke=\"" C_FRAME
                 "\" stroke-width=\"1.4\" stroke-linecap=\"round\">\n");
    for (ef_index k = 0; k < m->n_members; k++) {
        const double *pa = base[m->members[k].node[0]], *pb = base[m->members[k].node[1]];
        sb_printf(b, "<path d=\"M%.2f %.2fL%.2f %.2f\"><title>", px(fx, pa), py(fx, pa),
                  px(fx, pb), py(fx, pb));
        sb_text(b, m->members[k].name);
        sb_printf(b, "</title></path>\n");
    }
    sb_printf(b, "</g>\n");

    /* supports: a small triangle under the node, filled when rotations are held too */
    sb_printf(b, "<g id=\"supports\" stroke=\"" C_SUPPORT "\" stroke-width=\"1.2\">\n");
    for (ef_index i = 0; i < m->n_supports; i++) {
        ef_index nd = m->supports[i].node;
        if (nd < 0 || nd >= m->n_nodes) continue;
        double x = px(fx, base[nd]), y = py(fx, base[nd]);
        bool fixed = (m->supports[i].held & (EF_RX | EF_RY | EF_RZ)) == (EF_RX | EF_RY | EF_RZ);
        sb_printf(b, "<path d=\"M%.2f %.2fl-6 10h12z\" fill=\"%s\"/>\n", x, y,
                  fixed ? C_SUPPORT : "none");
    }
    sb_printf(b, "</g>\n");
}

/* The title block under the drawing and the end of the document; line i is bold when
 * bit i of `bold` is set. */
static void emit_title_block(sbuf *b, const char (*lines)[1600], int nl, unsigned bold)
{
    double y0 = DRAW_H + 12;
    sb_printf(b, "<g id=\"title-block\" fill=\"" C_TEXT "\">\n");
    sb_printf(b, "<rect x=\"%.1f\" y=\"%.1f\" width=\"%.1f\" height=\"%.1f\" fill=\"" C_BLOCK
                 "\" stroke=\"" C_TEXT "\" stroke-width=\"0.8\"/>\n",
              MARGIN - 12, y0, PAGE_W - 2 * (MARGIN - 12), LINE_H * nl + 12);
    for (int i = 0; i < nl; i++)
        emit_title_line(b, y0 + 6 + LINE_H * (i + 0.8), (bold >> i) & 1u, lines[i]);
    sb_printf(b, "</g>\n</svg>\n");
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

/* ---- the footfall picture ---------------------------------------------------------- */

#define MARKER_R 7.0             /* px, receiver marker radius */
#define LEGEND_W 260.0           /* px kept free at the right of the drawing for the legend */
#define BAR_W 18.0               /* px, legend bar width */
#define LABEL_CHAR_W 6.4         /* px, mean character width at font-size 11 (estimate) */
#define LABEL_H 12.0             /* px, label height at font-size 11 */
#define R_SPREAD_MIN 0.1         /* the colour scale spans at least this share of its top */
#define C_NODATA "#ffffff"       /* marker of a receiver whose R is not a number (dashed) */

/* The R colour scale (ours): piecewise linear in sRGB through five equally spaced stops,
 * pale straw (lowest R), ochre, burnt orange, brick, plum (highest R). The stops are
 * picked so that CIE L* falls evenly, 94.0, 76.4, 57.8, 39.9, 22.2 [D: computed from the
 * sRGB values with the D65 sRGB transfer function], so lightness alone orders the values:
 * the order survives a greyscale print and the common colour-vision deficiencies. The
 * scale is sequential, with no built-in threshold: no colour says "acceptable"; the
 * user's limit is only marked on the legend. SVG's gradients interpolate in sRGB too, so
 * the legend bar is exactly this function. */
static const unsigned char scale_stops[5][3] = {
    {0xf6, 0xf0, 0xb8}, {0xee, 0xb2, 0x4f}, {0xd9, 0x6c, 0x33}, {0xa9, 0x34, 0x39}, {0x5a, 0x1d, 0x4c}};

/* "#rrggbb" of the scale at t (clamped to 0..1) */
static void scale_colour(double t, char hex[8])
{
    t = isfinite(t) ? fmin(fmax(t, 0.0), 1.0) : 0.0;
    double u = 4.0 * t;
    int k = (int)u;
    if (k > 3) k = 3;
    u -= k;
    int c[3];
    for (int i = 0; i < 3; i++)
        c[i] = (int)lround(scale_stops[k][i] + u * (scale_stops[k + 1][i] - scale_stops[k][i]));
    snprintf(hex, 8, "#%02x%02x%02x", c[0] & 0xff, c[1] & 0xff, c[2] & 0xff);
}

/* Range [lo, hi] of the colour scale: the smallest and largest finite R, widened to take
 * in the user's limit, then widened about its middle to at least R_SPREAD_MIN of its top
 * (never below 0), so that nearly equal values are not drawn in far-apart colours; a
 * single value, or equal values, thus sit in the middle of the scale. [0, 1] when there
 * is nothing positive to show. */
static void scale_range(const ef_walking_result *wk, double *lo, double *hi)
{
    double a = INFINITY, z = -INFINITY;
    for (ef_index i = 0; i < wk->n_receivers; i++)
        if (isfinite(wk->R[i])) {
            a = fmin(a, wk->R[i]);
            z = fmax(z, wk->R[i]);
        }
    if (wk->limit_R > 0.0 && isfinite(wk->limit_R)) {
        a = fmin(a, wk->limit_R);
        z = fmax(z, wk->limit_R);
    }
    if (!(z > 0.0)) {
        *lo = 0.0;
        *hi = 1.0;
        return;
    }
    double want = R_SPREAD_MIN * fabs(z);
    if (z - a < want) {
        double mid = 0.5 * (a + z);
        a = fmax(0.0, mid - 0.5 * want);
        z = a + want;
    }
    *lo = a;
    *hi = z;
}

/* 1, 2, 2.5 or 5 times a power of ten, at least x (x > 0) */
static double nice_step(double x)
{
    double p = pow(10.0, floor(log10(x))), f = x / p;
    return p * (f <= 1.0 ? 1.0 : f <= 2.0 ? 2.0 : f <= 2.5 ? 2.5 : f <= 5.0 ? 5.0 : 10.0);
}

/* characters (UTF-8 code points) of s */
static size_t n_chars(const char *s)
{
    size_t n = 0;
    for (const unsigned char *p = (const unsigned char *)s; *p; p++) n += (*p & 0xC0) != 0x80;
    return n;
}

typedef struct {
    double x0, y0, x1, y1;
} box;

static bool boxes_meet(const box *a, const box *c)
{
    return a->x0 < c->x1 && c->x0 < a->x1 && a->y0 < c->y1 && c->y0 < a->y1;
}

/* a marker of radius MARKER_R at (x, y) overlaps the box */
static bool marker_meets(double x, double y, const box *a)
{
    double dx = fmax(fmax(a->x0 - x, 0.0), x - a->x1), dy = fmax(fmax(a->y0 - y, 0.0), y - a->y1);
    return dx * dx + dy * dy < MARKER_R * MARKER_R;
}

/* one legend tick: value, label, 0 = main (kept, moved to avoid overlap), 1 = scale end,
 * 2 = intermediate (dropped when its label would overlap another) */
typedef struct {
    double v;
    int prio;
    bool limit;
    char text[160];
} tick;

static const char *weighting_words(int w)
{
    return w == EF_WEIGHT_WG ? "Wg (BS 6472:1992, asymptotic)" : "Wb (BS 6841 / BS 6472-1:2008, asymptotic)";
}

static const char *node_name(const ef_model *m, ef_index i)
{
    return i >= 0 && i < m->n_nodes ? m->nodes[i].name : "-";
}

/* drawing order of a receiver: by R, non-finite values first */
static double sort_key(double R) { return isfinite(R) ? R : -HUGE_VAL; }

/* "NODE: R = value" (R as the text report prints it) */
static void receiver_label(const ef_model *m, const ef_walking_result *wk, ef_index i, char *s, size_t n)
{
    if (isfinite(wk->R[i]))
        snprintf(s, n, "%s: R = %.4g", node_name(m, wk->receivers[i]), wk->R[i]);
    else
        snprintf(s, n, "%s: R = n/a", node_name(m, wk->receivers[i]));
    utf8_cut(s);
}

static ef_status write_walking(const ef_model *m, const ef_results *r, const ef_svg_request *req,
                               const picture *pic, const char *path, ef_ctx *ctx)
{
    const ef_walking_result *wk = r->walking;
    const ef_index nn = m->n_nodes, nr = wk->n_receivers;
    const char *F = ef_units_force_name(m->units.force), *Lu = ef_units_length_name(m->units.length);
    const double Lsi = ef_units_length_si(m->units.length);
    const bool has_limit = wk->limit_R > 0.0 && isfinite(wk->limit_R);
    ef_status st = EF_OK;
    proj P;
    view_basis(m, req->view, P.right, P.up);
    double (*base)[2] = malloc((size_t)EF_MAX(nn, 1) * sizeof *base);
    ef_index *order = malloc((size_t)EF_MAX(nr, 1) * sizeof *order);
    box *placed = malloc((size_t)EF_MAX(nr, 1) * sizeof *placed);
    sbuf b = {NULL, 0, 0, false};
    if (!base || !order || !placed) {
        st = EF_ENOMEM;
        goto done;
    }
    fit fx = {{INFINITY, INFINITY}, {-INFINITY, -INFINITY}, 1.0, 0.0, 0.0, LEGEND_W};
    for (ef_index i = 0; i < nn; i++) {
        project(&P, m->nodes[i].xyz, base[i]);
        fit_add(&fx, base[i]);
    }
    fit_finish(&fx);

    /* receivers drawn (node known), in ascending R so that the largest lie on top;
       non-finite R first; insertion sort keeps file order among equals */
    ef_index nd = 0, n_res = 0, n_tr = 0, n_above = 0, imin = EF_NONE, imax = EF_NONE;
    for (ef_index i = 0; i < nr; i++) {
        if (wk->method[i] == 1) n_tr++;
        else n_res++;
        double R = wk->R[i];
        if (isfinite(R)) {
            if (imin == EF_NONE || R < wk->R[imin]) imin = i;
            if (imax == EF_NONE || R > wk->R[imax]) imax = i;
            if (has_limit && R > wk->limit_R) n_above++;
        }
        if (wk->receivers[i] < 0 || wk->receivers[i] >= nn) continue;
        ef_index j = nd++;
        for (; j > 0 && sort_key(wk->R[order[j - 1]]) > sort_key(R); j--) order[j] = order[j - 1];
        order[j] = i;
    }
    double lo, hi;
    scale_range(wk, &lo, &hi);

    /* title block text */
    char lines[10][1600];
    int nl = 0;
    char mu[40], tmp[400];
    snprintf(lines[nl++], sizeof lines[0], "eigenframe %s", EF_VERSION);
    if (m->title)
        snprintf(lines[nl++], sizeof lines[0], "Model: %s  (%s)", m->title, m->file ? m->file : "");
    else
        snprintf(lines[nl++], sizeof lines[0], "Model: %s", m->file ? m->file : "(memory)");
    snprintf(lines[nl++], sizeof lines[0], "%s", pic->what);
    snprintf(lines[nl++], sizeof lines[0],
             "Assumed: damping ratio %.4g of critical; walker weight %.6g %s (%.0f N); pace "
             "frequency %.4g-%.4g Hz",
             wk->damping, wk->walker_weight, F, wk->walker_weight * ef_units_force_si(m->units.force),
             wk->pace[0], wk->pace[1]);
    if (wk->path_length > 0.0)
        snprintf(tmp, sizeof tmp, "walking path %.6g %s (resonance build-up)", wk->path_length, Lu);
    else
        snprintf(tmp, sizeof tmp, "no walking path given (full resonance)");
    snprintf(lines[nl++], sizeof lines[0], "Weighting %s; %s; %d modes summed",
             weighting_words(wk->weighting), tmp, wk->modes_used);
    snprintf(lines[nl++], sizeof lines[0],
             "Governing method: resonant at %lld receiver%s, transient at %lld; R = a_w,rms / %.4g "
             "%s/s^2 (resonant) or v_w,rms / %.4g %s/s (transient)",
             (long long)n_res, n_res == 1 ? "" : "s", (long long)n_tr, EF_VIB_BASE_ACC_SI / Lsi, Lu,
             EF_VIB_BASE_VEL_SI / Lsi, Lu);
    if (imax != EF_NONE) {
        char h[24] = "";
        if (wk->method[imax] != 1) snprintf(h, sizeof h, ", harmonic %d", wk->harmonic[imax]);
        snprintf(tmp, sizeof tmp, "; smallest R = %.4g at node '%s'", wk->R[imin],
                 node_name(m, wk->receivers[imin]));
        utf8_cut(tmp);
        snprintf(lines[nl++], sizeof lines[0],
                 "Largest R = %.4g at node '%s' (%s, pace %.4g Hz%s, mode %d, walker '%s')%s",
                 wk->R[imax], node_name(m, wk->receivers[imax]),
                 wk->method[imax] == 1 ? "transient" : "resonant", wk->pace_hz[imax], h,
                 wk->mode[imax], node_name(m, wk->walker[imax]), imin != imax ? tmp : "");
    } else {
        snprintf(lines[nl++], sizeof lines[0], "No receiver has a finite R");
    }
    if (has_limit)
        snprintf(lines[nl++], sizeof lines[0],
                 "Your limit R = %.4g (marked on the legend): %lld of %lld receivers above it, "
                 "drawn with a heavy outline; the program makes no acceptance decision",
                 wk->limit_R, (long long)n_above, (long long)nr);
    else
        snprintf(lines[nl++], sizeof lines[0],
                 "No limit on R was given (analyses.walking.limit_R); the program makes no "
                 "acceptance decision");
    snprintf(lines[nl++], sizeof lines[0],
             "Colour: R on a linear scale, %.4g (pale straw) to %.4g (plum), darker as R rises; "
             "receivers are drawn in order of R, the largest on top",
             lo, hi);
    snprintf(lines[nl++], sizeof lines[0],
             "Units: force %s, length %s, mass %s; R is a ratio (no unit); view: %s; grey: members "
             "(undeformed)",
             F, Lu, ef_units_mass_name(&m->units, mu, sizeof mu), view_words[req->view]);
    for (int i = 0; i < nl; i++) utf8_cut(lines[i]);

    emit_head(&b, page_height(nl), pic->what);
    emit_frame(&b, m, (const double (*)[2])base, &fx);

    /* markers */
    sb_printf(&b, "<g id=\"receivers\" stroke=\"" C_TEXT "\">\n");
    for (ef_index q = 0; q < nd; q++) {
        ef_index i = order[q];
        const double *p = base[wk->receivers[i]];
        double R = wk->R[i];
        char hex[8] = C_NODATA, lab[320];
        if (isfinite(R)) scale_colour((R - lo) / (hi - lo), hex);
        bool above = has_limit && isfinite(R) && R > wk->limit_R;
        receiver_label(m, wk, i, lab, sizeof lab);
        sb_printf(&b, "<circle cx=\"%.2f\" cy=\"%.2f\" r=\"%.1f\" fill=\"%s\" stroke-width=\"%s\"%s><title>",
                  px(&fx, p), py(&fx, p), MARKER_R, hex, above ? "2.6" : "1",
                  isfinite(R) ? "" : " stroke-dasharray=\"2 2\"");
        sb_text(&b, lab);
        if (isfinite(R)) {
            char h[24] = "";
            if (wk->method[i] != 1) snprintf(h, sizeof h, ", harmonic %d", wk->harmonic[i]);
            snprintf(tmp, sizeof tmp, " (%s, pace %.4g Hz%s, mode %d, walker %s)",
                     wk->method[i] == 1 ? "transient" : "resonant", wk->pace_hz[i], h, wk->mode[i],
                     node_name(m, wk->walker[i]));
            utf8_cut(tmp);
            sb_text(&b, tmp);
        }
        sb_printf(&b, "</title></circle>\n");
    }
    sb_printf(&b, "</g>\n");

    /* labels, the largest R placed first: right of the marker, else left, above, below,
       the first place that meets no label placed and no marker and stays clear of the
       legend; right when none does */
    const double bar_x = PAGE_W - MARGIN - 150.0, label_xmax = bar_x - 16.0;
    sb_printf(&b, "<g id=\"receiver-labels\" fill=\"" C_TEXT "\" font-size=\"11\">\n");
    ef_index n_placed = 0;
    for (ef_index q = nd - 1; q >= 0; q--) {
        ef_index i = order[q];
        const double *p = base[wk->receivers[i]];
        double x = px(&fx, p), y = py(&fx, p);
        char lab[320];
        receiver_label(m, wk, i, lab, sizeof lab);
        double w = LABEL_CHAR_W * (double)n_chars(lab), g = MARKER_R + 3.0;
        const box cand[4] = {
            {x + g, y - 0.5 * LABEL_H, x + g + w, y + 0.5 * LABEL_H},
            {x - g - w, y - 0.5 * LABEL_H, x - g, y + 0.5 * LABEL_H},
            {x - 0.5 * w, y - g - LABEL_H, x + 0.5 * w, y - g},
            {x - 0.5 * w, y + g, x + 0.5 * w, y + g + LABEL_H}};
        int c = 0;
        for (int k = 0; k < 4; k++) {
            bool ok = cand[k].x1 <= label_xmax && cand[k].x0 >= 2.0;
            for (ef_index j = 0; ok && j < n_placed; j++) ok = !boxes_meet(&cand[k], &placed[j]);
            for (ef_index j = 0; ok && j < nd; j++) {
                const double *o = base[wk->receivers[order[j]]];
                ok = !marker_meets(px(&fx, o), py(&fx, o), &cand[k]);
            }
            if (ok) {
                c = k;
                break;
            }
        }
        placed[n_placed++] = cand[c];
        static const char *const anchor[4] = {"start", "end", "middle", "middle"};
        double tx = c == 0 ? cand[c].x0 : c == 1 ? cand[c].x1 : x;
        sb_printf(&b, "<text x=\"%.2f\" y=\"%.2f\" text-anchor=\"%s\">", tx, cand[c].y1 - 2.0, anchor[c]);
        sb_text(&b, lab);
        sb_printf(&b, "</text>\n");
    }
    sb_printf(&b, "</g>\n");

    /* legend: the bar (largest at the top), ticks with values */
    const double top = MARGIN + 50.0, bot = DRAW_H - MARGIN - 40.0, tx = bar_x + BAR_W + 10.0;
    tick tk[32];
    int nt = 0;
    if (imax != EF_NONE) {
        tk[nt] = (tick){wk->R[imax], 0, false, ""};
        if (imin == imax)
            snprintf(tk[nt].text, sizeof tk[nt].text, "%.4g  at %.20s", wk->R[imax],
                     node_name(m, wk->receivers[imax]));
        else if (wk->R[imin] == wk->R[imax])
            snprintf(tk[nt].text, sizeof tk[nt].text, "%.4g  at every receiver", wk->R[imax]);
        else
            snprintf(tk[nt].text, sizeof tk[nt].text, "%.4g  largest, %.20s", wk->R[imax],
                     node_name(m, wk->receivers[imax]));
        nt++;
        if (imin != imax && wk->R[imin] != wk->R[imax]) {
            tk[nt] = (tick){wk->R[imin], 0, false, ""};
            snprintf(tk[nt].text, sizeof tk[nt].text, "%.4g  smallest, %.20s", wk->R[imin],
                     node_name(m, wk->receivers[imin]));
            nt++;
        }
    }
    if (has_limit) {
        tk[nt] = (tick){wk->limit_R, 0, true, ""};
        snprintf(tk[nt].text, sizeof tk[nt].text, "%.4g  your limit", wk->limit_R);
        nt++;
    }
    tk[nt] = (tick){hi, 1, false, ""};
    snprintf(tk[nt].text, sizeof tk[nt].text, "%.4g", hi);
    nt++;
    tk[nt] = (tick){lo, 1, false, ""};
    snprintf(tk[nt].text, sizeof tk[nt].text, "%.4g", lo);
    nt++;
    double step = nice_step((hi - lo) / 5.0);
    for (double v = ceil(lo / step) * step; v < hi && nt < 32; v += step) {
        if (!(v > lo)) continue;
        tk[nt] = (tick){v, 2, false, ""};
        snprintf(tk[nt].text, sizeof tk[nt].text, "%.4g", v);
        nt++;
    }
    for (int k = 0; k < nt; k++) utf8_cut(tk[k].text);
    /* main ticks top to bottom (insertion sort by value, descending) */
    for (int k = 1; k < nt && tk[k].prio == 0; k++)
        for (int j = k; j > 0 && tk[j].v > tk[j - 1].v; j--) {
            tick t = tk[j];
            tk[j] = tk[j - 1];
            tk[j - 1] = t;
        }
    double label_y[32];
    bool shown[32];
    for (int k = 0; k < nt; k++) {
        double y = bot - (tk[k].v - lo) / (hi - lo) * (bot - top);
        shown[k] = true;
        label_y[k] = y;
        if (tk[k].prio == 0) {
            if (k > 0 && tk[k - 1].prio == 0) label_y[k] = fmax(y, label_y[k - 1] + LABEL_H + 1.0);
            continue;
        }
        for (int j = 0; j < k && shown[k]; j++)
            if (shown[j] && fabs(label_y[j] - y) < LABEL_H + 1.0) shown[k] = false;
    }
    sb_printf(&b, "<g id=\"legend\" fill=\"" C_TEXT "\" font-size=\"11\">\n");
    sb_printf(&b, "<defs><linearGradient id=\"r-scale\" x1=\"0\" y1=\"1\" x2=\"0\" y2=\"0\">");
    for (int k = 0; k < 5; k++)
        sb_printf(&b, "<stop offset=\"%.2f\" stop-color=\"#%02x%02x%02x\"/>", 0.25 * k,
                  scale_stops[k][0], scale_stops[k][1], scale_stops[k][2]);
    sb_printf(&b, "</linearGradient></defs>\n");
    sb_printf(&b, "<text x=\"%.1f\" y=\"%.1f\" font-size=\"13\" font-weight=\"bold\">R, response factor</text>\n",
              bar_x, top - 28.0);
    sb_printf(&b, "<text x=\"%.1f\" y=\"%.1f\">linear scale, no unit</text>\n", bar_x, top - 12.0);
    sb_printf(&b, "<rect x=\"%.1f\" y=\"%.1f\" width=\"%.1f\" height=\"%.1f\" fill=\"url(#r-scale)\" "
                  "stroke=\"" C_TEXT "\" stroke-width=\"0.8\"/>\n",
              bar_x, top, BAR_W, bot - top);
    for (int k = 0; k < nt; k++) {
        if (!shown[k]) continue;
        double y = bot - (tk[k].v - lo) / (hi - lo) * (bot - top);
        if (tk[k].limit)
            sb_printf(&b, "<path d=\"M%.1f %.2fH%.1f\" stroke=\"" C_TEXT "\" stroke-width=\"2\" "
                          "stroke-dasharray=\"4 3\"/>\n", bar_x - 8.0, y, bar_x + BAR_W + 8.0);
        else
            sb_printf(&b, "<path d=\"M%.1f %.2fH%.1f\" stroke=\"" C_TEXT "\" stroke-width=\"%s\"/>\n",
                      tk[k].prio == 0 ? bar_x - 4.0 : bar_x + BAR_W, y, bar_x + BAR_W + 5.0,
                      tk[k].prio == 0 ? "1.2" : "0.8");
        sb_printf(&b, "<text x=\"%.1f\" y=\"%.2f\"%s>", tx, label_y[k] + 4.0,
                  tk[k].prio == 0 ? " font-weight=\"bold\"" : "");
        sb_text(&b, tk[k].text);
        sb_printf(&b, "</text>\n");
    }
    sb_printf(&b, "</g>\n");

    emit_title_block(&b, (const char (*)[1600])lines, nl, 1u | 4u);
    if (b.oom) {
        st = EF_ENOMEM;
        goto done;
    }
    st = write_atomic(path, &b, ctx);
done:
    free(base);
    free(order);
    free(placed);
    free(b.s);
    return st;
}

ef_status ef_svg_write(const ef_model *m, const ef_results *r, const ef_svg_request *req,
                       const char *path, ef_ctx *ctx)
{
    picture pic;
    ef_status st = choose(m, r, req, &pic, ctx);
    if (st != EF_OK) return st;
    if (req->what == EF_SVG_WALKING) return write_walking(m, r, req, &pic, path, ctx);
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
    fit fx = {{INFINITY, INFINITY}, {-INFINITY, -INFINITY}, 1.0, 0.0, 0.0, 0.0};
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
    emit_head(&b, page_height(nl), pic.what);
    emit_frame(&b, m, (const double (*)[2])base, &fx);

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

    emit_title_block(&b, (const char (*)[1600])lines, nl, 1u | 4u);
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
