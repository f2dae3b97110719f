/* section.c: section properties from shapes (pure kernels: no allocation, no I/O).
 *
 * Local axes: depth h along z, width b along y; Iy = ∫ z² dA (major axis of an I or box),
 * Iz = ∫ y² dA. Sources per formula below and in docs/sections.md. Torsion constants of
 * the open and thin-walled closed shapes are the usual thin-wall approximations; the
 * solid rectangle uses Roark's fitted formula (from memory, see below).
 */
#include "section.h"

#include <math.h>
#include <string.h>

static const double PI = 3.14159265358979323846;

int ef_section_n_dims(ef_shape_kind kind)
{
    switch (kind) {
    case EF_SHAPE_RECTANGLE: return 2;
    case EF_SHAPE_CIRCLE: return 1;
    case EF_SHAPE_PIPE: return 2;
    case EF_SHAPE_I: return 4;
    case EF_SHAPE_BOX: return 3;
    default: return 0;
    }
}

const char *ef_section_dim_name(ef_shape_kind kind, int i)
{
    static const char *const rect[] = {"b", "h"}, *const circ[] = {"d"},
                             *const pipe[] = {"d", "t"}, *const ish[] = {"h", "b", "tw", "tf"},
                             *const box[] = {"h", "b", "t"};
    if (i < 0 || i >= ef_section_n_dims(kind)) return "";
    switch (kind) {
    case EF_SHAPE_RECTANGLE: return rect[i];
    case EF_SHAPE_CIRCLE: return circ[i];
    case EF_SHAPE_PIPE: return pipe[i];
    case EF_SHAPE_I: return ish[i];
    case EF_SHAPE_BOX: return box[i];
    default: return "";
    }
}

const char *ef_section_shape_name(ef_shape_kind kind)
{
    switch (kind) {
    case EF_SHAPE_RECTANGLE: return "rectangle";
    case EF_SHAPE_CIRCLE: return "circle";
    case EF_SHAPE_PIPE: return "pipe";
    case EF_SHAPE_I: return "I";
    case EF_SHAPE_BOX: return "box";
    default: return "";
    }
}

const char *ef_section_dims_problem(ef_shape_kind kind, const double dims[4])
{
    int n = ef_section_n_dims(kind);
    if (n == 0) return "unknown shape";
    for (int i = 0; i < n; i++)
        if (!(dims[i] > 0.0) || !isfinite(dims[i])) return "every dimension must be positive";
    switch (kind) {
    case EF_SHAPE_PIPE:
        if (!(2.0 * dims[1] <= dims[0])) return "the wall thickness t is more than half of d";
        break;
    case EF_SHAPE_I:
        if (!(2.0 * dims[3] < dims[0])) return "the flanges (2 tf) are not thinner than h";
        if (!(dims[2] <= dims[1])) return "the web tw is wider than the flanges b";
        break;
    case EF_SHAPE_BOX:
        if (!(2.0 * dims[2] < dims[0]) || !(2.0 * dims[2] < dims[1]))
            return "the walls (2 t) are not thinner than h and b";
        break;
    default:
        break;
    }
    return NULL;
}

/* Solid rectangle, sides a >= b: K = a b^3 [1/3 - 0.21 (b/a)(1 - b^4/(12 a^4))]
 * (Roark's Formulas for Stress and Strain, Young & Budynas, 7th ed., Table 10.7 case 4,
 * written there for sides 2a x 2b; from memory). It stays within 0.5 % of the exact
 * series (Timoshenko & Goodier, Theory of Elasticity, 3rd ed., §109) for a/b from 1 to 21
 * (compared here, tests/unit/test_section.c). */
double ef_section_rect_torsion(double a, double b)
{
    if (a < b) {
        double t = a;
        a = b;
        b = t;
    }
    double r = b / a;
    return a * b * b * b * (1.0 / 3.0 - 0.21 * r * (1.0 - r * r * r * r / 12.0));
}

void ef_section_rectangle(double b, double h, ef_section_props *p)
{
    memset(p, 0, sizeof *p);
    p->A = b * h;
    p->Iy = b * h * h * h / 12.0;        /* depth h along z */
    p->Iz = h * b * b * b / 12.0;
    p->J = ef_section_rect_torsion(b, h);
    p->Iw = 0.0;                         /* small for a solid section: neglected */
}

void ef_section_circle(double d, ef_section_props *p)
{
    memset(p, 0, sizeof *p);
    double d2 = d * d;
    p->A = PI * d2 / 4.0;
    p->Iy = p->Iz = PI * d2 * d2 / 64.0;
    p->J = PI * d2 * d2 / 32.0;          /* exact for a circle: J = Ip (Saint-Venant) */
}

void ef_section_pipe(double d, double t, ef_section_props *p)
{
    memset(p, 0, sizeof *p);
    double di = d - 2.0 * t;             /* inside diameter */
    double d4 = d * d * d * d, di4 = di * di * di * di;
    p->A = PI * (d * d - di * di) / 4.0;
    p->Iy = p->Iz = PI * (d4 - di4) / 64.0;
    p->J = PI * (d4 - di4) / 32.0;       /* exact for a circular tube: J = Ip */
}

/* Doubly symmetric I: two flanges b x tf and a web tw x (h - 2 tf), fillets ignored.
 * Iy, Iz: the gross rectangle minus the two voids beside the web.
 * J: sum of b t^3 / 3 over the three plates (thin-walled open section; e.g. Roark
 * Table 10.7, open thin-walled sections, from memory), no fillet term.
 * Iw = Iz (h - tf)^2 / 4, flanges' centroids h - tf apart (Timoshenko & Gere, Theory of
 * Elastic Stability, 2nd ed., torsional buckling chapter; from memory). */
void ef_section_i(double h, double b, double tw, double tf, ef_section_props *p)
{
    memset(p, 0, sizeof *p);
    double hw = h - 2.0 * tf;            /* clear web height */
    p->A = 2.0 * b * tf + hw * tw;
    p->Iy = (b * h * h * h - (b - tw) * hw * hw * hw) / 12.0;
    p->Iz = (2.0 * tf * b * b * b + hw * tw * tw * tw) / 12.0;
    p->J = (2.0 * b * tf * tf * tf + hw * tw * tw * tw) / 3.0;
    double hf = h - tf;
    p->Iw = p->Iz * hf * hf / 4.0;
}

/* Rectangular hollow section, outside h x b, wall t (sharp corners).
 * Iy, Iz: outer rectangle minus the inner one.
 * J: Bredt's formula for a thin-walled closed section, J = 4 Am^2 t / s with the
 * mid-line area Am = (b - t)(h - t) and perimeter s = 2[(b - t) + (h - t)]
 * (Roark Table 10.7, thin-walled closed sections; Timoshenko & Goodier §115;
 * from memory): J = 2 t (b-t)^2 (h-t)^2 / ((b-t) + (h-t)). */
void ef_section_box(double h, double b, double t, ef_section_props *p)
{
    memset(p, 0, sizeof *p);
    double hi = h - 2.0 * t, bi = b - 2.0 * t;
    double hm = h - t, bm = b - t;
    p->A = b * h - bi * hi;
    p->Iy = (b * h * h * h - bi * hi * hi * hi) / 12.0;
    p->Iz = (h * b * b * b - hi * bi * bi * bi) / 12.0;
    p->J = 2.0 * t * bm * bm * hm * hm / (bm + hm);
    p->Iw = 0.0;                         /* closed section: warping negligible */
}

bool ef_section_props_of_shape(ef_shape_kind kind, const double dims[4], ef_section_props *p)
{
    memset(p, 0, sizeof *p);
    if (ef_section_dims_problem(kind, dims)) return false;
    switch (kind) {
    case EF_SHAPE_RECTANGLE: ef_section_rectangle(dims[0], dims[1], p); break;
    case EF_SHAPE_CIRCLE: ef_section_circle(dims[0], p); break;
    case EF_SHAPE_PIPE: ef_section_pipe(dims[0], dims[1], p); break;
    case EF_SHAPE_I: ef_section_i(dims[0], dims[1], dims[2], dims[3], p); break;
    case EF_SHAPE_BOX: ef_section_box(dims[0], dims[1], dims[2], p); break;
    default: return false;
    }
    return true;
}
