/* element.h: pure kernels of the 3D frame element (private).
 *
 * No allocation, no globals, no context, no I/O: inputs in, caller arrays out.
 * Matrices are 12x12, row-major (a[12*i + j]). Element DOFs in local axes:
 *   0..5 = ux uy uz rx ry rz at the start (end i), 6..11 = the same at the end (end j).
 * Local x runs from start to end; bending in the local x-y plane uses Iz (and shear
 * area Ay), bending in the x-z plane uses Iy (and Az).
 * End forces follow one convention everywhere: the forces the nodes exert on the
 * element, f = k d + f_fixed, local axes, order N Vy Vz T My Mz at each end (so the
 * axial force is tension-positive as N_t = f[6] = -f[0] when no axial load acts).
 * f_fixed are the fixed-end forces of the element loads (forces the clamps exert on
 * a fully fixed element); the equivalent nodal load vector is -f_fixed.
 */
#ifndef EF_ELEMENT_H
#define EF_ELEMENT_H

#include <stdbool.h>

typedef struct {
    double E, G;          /* [force/length^2] */
    double A;             /* [length^2] */
    double Ay, Az;        /* shear areas [length^2]; both > 0: Timoshenko, else Euler-Bernoulli */
    double Iy, Iz;        /* [length^4] */
    double J;             /* St Venant torsion constant [length^4] */
    double Ip;            /* polar moment [length^4] (torsional term of K_G) */
    double mass;          /* translational mass per length [mass/length] */
    double rot_mass;      /* torsional rotary inertia per length rho*(Iy+Iz) [mass*length] */
    bool axial_only;      /* two-force member: axial stiffness, string K_G, translational mass */
} ef_elem_props;

/* A load on an element (or a whole member), local axes, positions from its start. */
typedef enum { EF_BLOAD_DIST, EF_BLOAD_POINT, EF_BLOAD_MOMENT } ef_bload_kind;
typedef struct {
    ef_bload_kind kind;
    double a, b;          /* [length], 0 <= a <= b <= L; POINT/MOMENT act at a (b = a) */
    double q[2][3];       /* DIST: force/length at a and at b (linear between);
                             POINT: q[0] = force; MOMENT: q[0] = moment vector */
} ef_bload;

/* Elastic stiffness in local axes. */
void ef_elem_k_local(const ef_elem_props *p, double L, double k[144]);

/* Geometric stiffness in local axes from the element's end forces f (convention above).
 * The axial force is N = f[6] (tension positive). With chord_only only the string terms
 * (N/L)(transverse translations) are used. Otherwise the consistent cubic matrix with the
 * torsional term N*Ip/(A*L) and the end-moment terms. axial_only: string terms only. */
void ef_elem_kg_local(const ef_elem_props *p, double L, const double f[12], bool chord_only,
                      double kg[144]);

/* Mass in local axes: consistent (cubic/linear shape functions, torsional rotary inertia)
 * or lumped (half the mass to each end's translations, half the rotary inertia to rx). */
void ef_elem_m_local(const ef_elem_props *p, double L, bool lumped, double m[144]);

/* Add the translational mass of a mass distribution on the element to m (local axes):
 * `mass` is EF_BLOAD_DIST with mass per length q[0][0] at a and q[1][0] at b (linear
 * between), or EF_BLOAD_POINT with the mass q[0][0] at a. The mass acts in all three
 * translations, with no rotary inertia of its own. Consistent: integral of rho N^T N over
 * the element with the element's own shape functions (cubic transverse, linear axial);
 * lumped: the mass goes to the two ends by the lever rule (statics of a simple span). */
void ef_elem_m_add_translational(double L, const ef_bload *mass, bool lumped, double m[144]);

/* Fixed-end forces of one load on an element of length L (convention above); exact for
 * Euler-Bernoulli elements (and for Timoshenko ones where stated in element.c).
 * Adds into fef (the caller zeroes it). */
void ef_elem_fef_add(const ef_elem_props *p, double L, const ef_bload *ld, double fef[12]);

/* Internal forces at x (0 <= x <= L) of a member or element from its start end forces
 * f_start[6] (convention above) and the loads on it: the forces the part beyond the cut
 * exerts on the part before it, N Vy Vz T My Mz. First order (undeformed geometry). */
void ef_elem_cut_forces(const double f_start[6], const ef_bload *loads, int n_loads,
                        double x, double out[6]);

/* Member end releases by static condensation. rel_i, rel_j: masks (bit d = local DOF d
 * of that end, 1 = ux .. 32 = rz) of DOFs that carry no force. Builds T (12x12) with
 * u_full = T u + R f_fixed, where u holds the kept DOFs (released columns of T are zero)
 * and R (12x12) recovers the released displacements due to element loads.
 * Returns false when the released set is itself a mechanism (K_rr singular). */
bool ef_elem_release_map(const double k[144], unsigned rel_i, unsigned rel_j,
                         double T[144], double R[144]);

/* out = T^T a T (12x12). `out` may not alias. */
void ef_elem_congruence(const double T[144], const double a[144], double out[144]);

/* Rotate a local 12x12 matrix to global axes: out = Λ^T a Λ, Λ = diag(R,R,R,R),
 * R rows = local axes in global components. */
void ef_elem_to_global(const double axes[3][3], const double a[144], double out[144]);
/* 12-vectors: global = Λ^T local; local = Λ global. */
void ef_elem_vec_to_global(const double axes[3][3], const double v[12], double out[12]);
void ef_elem_vec_to_local(const double axes[3][3], const double v[12], double out[12]);

#endif /* EF_ELEMENT_H */
