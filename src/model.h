/* model.h: the in-memory model (private), as read from a format-1 model file.
 *
 * Invariants once ef_model_load_yaml has returned EF_OK:
 * - every index field refers to an existing item (no EF_NONE where a reference is required);
 * - every member has length > 0, orthonormal right-handed local axes (axes[0] = x along
 *   the member, axes[1] = y, axes[2] = z, each a row in global components);
 * - section and material properties are positive where the analysis divides by them;
 * - combinations are acyclic, and `case_factors` of each load is the full expansion onto
 *   load cases;
 * - all values are in the model's own units (see units.h); angles are radians.
 * Loads (cases and combinations) share one index space: 0..n_cases-1 are cases,
 * n_cases..n_loads-1 are combinations.
 */
#ifndef EF_MODEL_H
#define EF_MODEL_H

#include "ctx.h"
#include "units.h"

/* Bit masks for the six DOFs of a node or a member end, in the order ux uy uz rx ry rz. */
enum { EF_UX = 1, EF_UY = 2, EF_UZ = 4, EF_RX = 8, EF_RY = 16, EF_RZ = 32, EF_ALL_DOF = 63 };
extern const char *const ef_dof_names[6];   /* "ux" .. "rz" */

typedef struct {
    char *name;
    ef_where where;
    double E;          /* [force/length^2] */
    double G;          /* [force/length^2] given, or E/(2(1+nu)) */
    double density;    /* [mass/length^3], 0 = massless */
    bool used;
} ef_material;

typedef enum {
    EF_SHAPE_NONE = 0, EF_SHAPE_RECTANGLE, EF_SHAPE_CIRCLE, EF_SHAPE_PIPE, EF_SHAPE_I, EF_SHAPE_BOX
} ef_shape_kind;

typedef struct {
    char *name;
    ef_where where;
    ef_shape_kind shape;
    double dims[4];    /* shape dimensions as given: rectangle b,h; circle d; pipe d,t;
                          I h,b,tw,tf; box h,b,t [length] */
    double A;          /* [length^2] */
    double Ay, Az;     /* shear areas [length^2]; 0 = no shear deformation */
    double Iy, Iz;     /* [length^4] about local y (major for I/box) and local z */
    double J;          /* St Venant torsion constant [length^4] */
    double Ip;         /* polar moment [length^4], default Iy + Iz */
    double Iw;         /* warping constant [length^6], 0 = not given */
    double extra_mass; /* non-structural mass [mass/length] */
    bool used;
} ef_section;

typedef struct {
    char *name;
    ef_where where;
    double xyz[3];
} ef_node;

typedef struct {
    char *name;
    ef_where where;
    ef_index node[2];
    ef_index section;
    ef_index material;
    double length;         /* [length], set by validation */
    double axes[3][3];     /* rows: local x, y, z in global components (validation) */
    double roll;           /* [rad] */
    double up[3];          /* as given (has_up) or the default */
    bool has_up;
    unsigned release[2];   /* EF_UX.. masks of released local DOFs at start, end
                              (`hinged` included; always 0 for axial_only members) */
    bool axial_only;
    int divisions;         /* elements per member, >= 1 (1 for axial_only) */
    int stations;          /* result stations, >= 2, ends included */
    ef_where up_where;     /* the `up` key (0 = not given) */
    ef_where release_where;/* the `release` (else `hinged`) key (0 = none) */
} ef_member;

typedef struct {
    ef_index node;
    ef_where where;
    unsigned held;         /* EF_UX.. mask of rigidly held global DOFs */
    double spring[6];      /* [force/length] or [force*length/rad], 0 = none */
} ef_support;

typedef struct {
    ef_index node;
    ef_where where;
    double m;              /* [mass] in x, y and z */
    double J[3];           /* rotary inertia about global x, y, z [mass*length^2] */
} ef_point_mass;

typedef struct {
    ef_index node;
    ef_where where;
    double f[6];           /* Fx Fy Fz [force], Mx My Mz [force*length], global */
} ef_node_load;

typedef enum { EF_MLOAD_UNIFORM, EF_MLOAD_LINEAR, EF_MLOAD_POINT, EF_MLOAD_MOMENT } ef_mload_kind;

typedef struct {
    ef_index member;
    ef_where where;
    ef_mload_kind kind;
    bool local;            /* components in member local axes (else global) */
    double w[2][3];        /* UNIFORM/LINEAR: force/length at `from` and at `to` (equal for
                              UNIFORM); POINT: w[0] = force; MOMENT: w[0] = moment */
    double from, to;       /* fractions of the length, 0 <= from < to <= 1;
                              POINT/MOMENT: from = to = at */
} ef_member_load;

typedef struct {
    char *name;
    ef_where where;
    double self_weight;    /* multiple of g along the gravity direction */
    ef_node_load *node_loads;
    ef_index n_node_loads;
    ef_member_load *member_loads;
    ef_index n_member_loads;
} ef_load_case;

typedef struct {
    ef_index load;         /* a case or another combination, in the shared load index */
    double factor;
    ef_where where;
} ef_combo_term;

typedef struct {
    char *name;
    ef_where where;
    ef_combo_term *terms;
    ef_index n_terms;
} ef_combination;

typedef struct {
    bool self;             /* structural mass from density (default true) */
    ef_index *cases;       /* load cases whose gravity loads become mass */
    double *factors;
    ef_index n_cases;
    bool lumped;           /* diagonal mass instead of consistent */
    bool given;            /* mass_source present in the file */
} ef_mass_source;

typedef struct {
    ef_index node;
    ef_where where;
    char *name;
    double force[3];       /* amplitude, global [force] */
    double hz;
    double damping;
    ef_index *receivers;
    ef_index n_receivers;
    double sweep;          /* +- fraction of hz scanned, default 0.1 */
} ef_machine;

typedef struct {
    /* static: absent = every case and combination */
    bool static_given;
    ef_index *static_loads;
    ef_index n_static_loads;
    /* modal */
    bool modal;
    int modal_modes;       /* default 12; 0 = `all` (dense, small models) */
    double modal_above_hz;
    /* buckling */
    bool buckling;
    ef_index buckling_load;
    int buckling_modes;    /* default 4 */
    bool buckling_negative;/* also report reversed-load factors */
    /* second order */
    ef_index *second_order_loads;
    ef_index n_second_order_loads;
    double so_tolerance;   /* default 1e-6 */
    int so_max_iterations; /* default 50 */
    bool so_chord_only;    /* pdelta: chord (string terms only) vs consistent (default) */
    /* walking */
    bool walking;
    ef_index *walk_receivers, *walk_walkers;
    ef_index n_walk_receivers, n_walk_walkers;
    double walk_damping;
    double walk_pace_hz[2];        /* default 1.8, 2.2 */
    double walk_weight;            /* [force], default 746 N converted */
    double walk_path_length;       /* [length], 0 = not given */
    int walk_weighting;            /* 0 = Wb, 1 = Wg */
    double walk_limit_R;           /* 0 = not given */
    /* machines */
    ef_machine *machines;
    ef_index n_machines;
} ef_analyses;

struct ef_model {
    char *file;            /* path as given */
    char *title;
    unsigned char sha256[32];  /* of the file's bytes */
    ef_units units;
    double gravity_dir[3]; /* unit vector, default (0,0,-1) */
    int divisions;         /* mesh.divisions, default 4 */
    int stations;          /* mesh.stations, default 11 */
    unsigned restrain_all; /* EF_UX.. mask held at every node */

    ef_material *materials;  ef_index n_materials;
    ef_section *sections;    ef_index n_sections;
    ef_node *nodes;          ef_index n_nodes;
    ef_member *members;      ef_index n_members;
    ef_support *supports;    ef_index n_supports;
    ef_point_mass *masses;   ef_index n_masses;
    ef_load_case *cases;     ef_index n_cases;
    ef_combination *combos;  ef_index n_combos;
    ef_mass_source mass_source;
    ef_analyses analyses;

    /* Full expansion of each combination onto the load cases, row-major
     * [n_combos][n_cases]: case_factors[c*n_cases + k] multiplies case k in combination c
     * (nesting resolved). Set by validation; read it through ef_model_load_factors. */
    double *case_factors;
    /* Name indexes: permutations of each list sorted by name (strcmp), for the
     * ef_model_find_* lookups; `load` covers cases and combinations (shared index). */
    struct {
        ef_index *material, *section, *node, *member, *load;
    } by_name;
};

/* Tolerances of the geometry checks (relative, so independent of the length unit).
 * A member shorter than EF_ZERO_LENGTH_RTOL times the model size (the largest extent of
 * the node coordinates along x, y or z) has zero length: rounding noise, not a member.
 * `up` counts as parallel to a member when the sine of the angle between them is below
 * EF_PARALLEL_RTOL (0.06 degrees): the local axes would swing with coordinate noise.
 * The same test decides when a member is "parallel to gravity" for the default `up`
 * (common practice: a column out of plumb by rounding keeps its axes). */
#define EF_ZERO_LENGTH_RTOL 1e-9
#define EF_PARALLEL_RTOL 1e-3

/* Model size for EF_ZERO_LENGTH_RTOL: the largest extent of the finite node coordinates
 * along a global axis (0 with fewer than two distinct nodes). */
double ef_model_size(const ef_model *m);
/* Default `up` of a member with unit axis x: opposite to gravity (unit gravity_dir);
 * for a member parallel to gravity, global +X (and +Y when +X is parallel too, which
 * happens only when gravity is along X). */
void ef_model_default_up(const double x[3], const double gravity_dir[3], double up[3]);
ef_index ef_model_find_material(const ef_model *m, const char *name);
ef_index ef_model_find_section(const ef_model *m, const char *name);
/* (Re)build the name indexes from the current lists. EF_ENOMEM on failure. Equal names
 * sit next to each other in an index (the reader reports them); a lookup of such a name
 * returns one of them. */
ef_status ef_model_index_names(ef_model *m);

/* Number of loads (cases + combinations). */
static inline ef_index ef_model_n_loads(const ef_model *m) { return m->n_cases + m->n_combos; }
/* Name of a load in the shared index. */
const char *ef_model_load_name(const ef_model *m, ef_index load);
/* true when `load` is a combination (index >= n_cases). */
static inline bool ef_model_load_is_combo(const ef_model *m, ef_index load)
{
    return load >= m->n_cases;
}
/* Look up a load by name; EF_NONE when there is none. */
ef_index ef_model_find_load(const ef_model *m, const char *name);
ef_index ef_model_find_node(const ef_model *m, const char *name);
ef_index ef_model_find_member(const ef_model *m, const char *name);
/* Forget the machines of analyses.machines (a command that runs something else). */
void ef_model_drop_machines(ef_model *m);
/* Expand a load onto the cases: factors[c] for c < n_cases (combinations nest).
 * Needs case_factors (set once the model is validated); a load case gives a unit vector. */
void ef_model_load_factors(const ef_model *m, ef_index load, double *factors);

/* Local axes of a member from its end coordinates, `up` and roll (model-format.md):
 * x from start to end; z = component of `up` normal to x; y = z × x; then y, z turned
 * by `roll` about x. Returns false when the member has zero length (length <=
 * EF_ZERO_LENGTH_RTOL * scale) or `up` is parallel to x (EF_PARALLEL_RTOL); *length is
 * set in every case, so the caller can tell which. */
bool ef_model_member_axes(const double a[3], const double b[3], const double up[3],
                          double roll, double scale, double axes[3][3], double *length);

#endif /* EF_MODEL_H */
