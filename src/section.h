/* section.h: section properties computed from a shape (private; pure kernels).
 *
 * Local axes of a section: z runs along the depth h, y along the width b, so Iy (about y)
 * is the major axis of an I or a box. Formulas and their sources: docs/sections.md and
 * the comments in section.c. Shear areas are never derived from a shape: a model gets
 * shear deformation only where the user gives Ay/Az.
 */
#ifndef EF_SECTION_H
#define EF_SECTION_H

#include <stdbool.h>

#include "model.h"

typedef struct {
    double A;          /* [length^2] */
    double Iy, Iz;     /* [length^4] about local y (depth h along z) and local z */
    double J;          /* St Venant torsion constant [length^4] */
    double Iw;         /* warping constant [length^6]; 0 where negligible (solid, closed) */
} ef_section_props;

/* Number of dimensions a shape takes and their names in the model file
 * (rectangle b h; circle d; pipe d t; I h b tw tf; box h b t). */
int ef_section_n_dims(ef_shape_kind kind);
const char *ef_section_dim_name(ef_shape_kind kind, int i);
const char *ef_section_shape_name(ef_shape_kind kind);

/* Why a set of dimensions cannot make the shape: NULL when they can (all positive and
 * finite, walls thinner than half the outside, flanges thinner than half the depth, the
 * web no wider than the flanges). Static text. */
const char *ef_section_dims_problem(ef_shape_kind kind, const double dims[4]);

/* Properties of a shape from its dimensions (as ef_section.dims). Returns false (and
 * leaves *p zeroed) when ef_section_dims_problem() reports a problem. */
bool ef_section_props_of_shape(ef_shape_kind kind, const double dims[4], ef_section_props *p);

/* The individual shapes. Dimensions in model length units. */
void ef_section_rectangle(double b, double h, ef_section_props *p);
void ef_section_circle(double d, ef_section_props *p);
void ef_section_pipe(double d, double t, ef_section_props *p);
void ef_section_i(double h, double b, double tw, double tf, ef_section_props *p);
void ef_section_box(double h, double b, double t, ef_section_props *p);

/* St Venant torsion constant of a solid rectangle with sides a, b (either order). */
double ef_section_rect_torsion(double a, double b);

#endif /* EF_SECTION_H */
