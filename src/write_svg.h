/* write_svg.h: pictures of results as SVG 1.1 (private): deformed shapes, mode shapes,
 * buckling shapes, member internal-force diagrams and the footfall response factor R over
 * the floor's receiver nodes, drawn from results.h only.
 */
#ifndef EF_WRITE_SVG_H
#define EF_WRITE_SVG_H

#include "results.h"

typedef enum {
    EF_SVG_STATIC,          /* deformed shape (or a diagram) of a linear static load */
    EF_SVG_SECOND_ORDER,    /* the same for a second-order load */
    EF_SVG_MODE,            /* natural vibration mode */
    EF_SVG_BUCKLING,        /* buckling mode of r->buckling */
    EF_SVG_WALKING          /* response factor R of r->walking at each receiver node */
} ef_svg_what;

typedef enum {
    EF_SVG_ISO,             /* isometric, from above, gravity pointing down the page */
    EF_SVG_PLAN,            /* looking along gravity */
    EF_SVG_XZ,              /* elevation on the global X-Z plane (looking along +Y) */
    EF_SVG_YZ               /* elevation on the global Y-Z plane (looking along -X) */
} ef_svg_view;

typedef struct {
    ef_svg_what what;
    ef_index load;          /* STATIC, SECOND_ORDER: shared load index (BUCKLING: EF_NONE
                               or the load of r->buckling; unused by MODE and WALKING) */
    int mode;               /* MODE, BUCKLING: 0-based mode number */
    int diagram;            /* -1: the deformed shape; 0..5: diagram of N Vy Vz T My Mz
                               (STATIC and SECOND_ORDER only; WALKING needs -1) */
    ef_svg_view view;
} ef_svg_request;

/* Draw what `req` asks for and write it to `path` as an SVG 1.1 file, atomically (a
 * temporary file renamed onto `path` once complete). The undeformed frame is drawn in
 * light grey, a shape as one <path> per member (group id "shape"), a diagram as one
 * filled <path> per member (group id "diagram"); a title block states the model,
 * analysis, load or mode, frequency or critical factor, units, view and scale.
 * WALKING draws, over the undeformed frame, one filled <circle> per receiver (group id
 * "receivers"; its <title> starts "NODE: R = value"), coloured by R on the continuous
 * scale described in write_svg.c, in ascending order of R; one <text> label
 * "NODE: R = value" per receiver (group id "receiver-labels"), R to 4 significant digits
 * as in the text report; a legend bar (group id "legend") with the scale's values, the
 * smallest and largest R and the user's limit_R (when given, dashed); and a title block
 * with the damping, walker, pace range, weighting, governing methods and units.
 * Returns EF_OK; EF_EINPUT when the request names results that r does not hold
 * (WALKING: r->walking is NULL) (message in ctx); EF_EIO when the file cannot be
 * written; EF_ENOMEM. */
ef_status ef_svg_write(const ef_model *m, const ef_results *r, const ef_svg_request *req,
                       const char *path, ef_ctx *ctx);

/* "iso", "plan", "xz", "yz" -> view; false when unknown. */
bool ef_svg_parse_view(const char *s, ef_svg_view *out);
/* "N" "Vy" "Vz" "T" "My" "Mz" -> 0..5; -1 when unknown. */
int ef_svg_parse_component(const char *s);

#endif /* EF_WRITE_SVG_H */
