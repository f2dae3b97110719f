/* element_mass.c: translational mass of a mass distribution on an element (element.h).
 *
 * Consistent: M = integral of mu(x) N(x)^T N(x) dx with the element's own Euler-Bernoulli
 * shape functions: linear for the axial translation, cubic Hermite for the transverse
 * ones (v with rz = dv/dx in the x-y plane; w with ry = -dw/dx in the x-z plane), the
 * same functions that give the consistent mass matrix (Przemieniecki 1968, ch. 11).
 * A linear mu times two cubics is a polynomial of degree 7: 4-point Gauss-Legendre is
 * exact. A point mass is mu = m delta(x - a). Lumped: the lever rule of a simple span.
 */
#include "element.h"

#include <math.h>

/* Shape functions at x of an element of length L: axial (2) and transverse (4: v1,
 * theta1, v2, theta2 for a slope theta = dv/dx). */
static void shapes(double L, double x, double na[2], double nt[4])
{
    double s = x / L, s2 = s * s, s3 = s2 * s;
    na[0] = 1.0 - s;
    na[1] = s;
    nt[0] = 1.0 - 3.0 * s2 + 2.0 * s3;
    nt[1] = L * (s - 2.0 * s2 + s3);
    nt[2] = 3.0 * s2 - 2.0 * s3;
    nt[3] = L * (s3 - s2);
}

/* m += w * N^T N at x, for all three translations. */
static void add_point(double L, double x, double w, double m[144])
{
    static const int ax[2] = {0, 6};
    static const int xy[4] = {1, 5, 7, 11};
    static const int xz[4] = {2, 4, 8, 10};
    static const double sz[4] = {1.0, -1.0, 1.0, -1.0};   /* ry = -dw/dx */
    double na[2], nt[4];
    shapes(L, x, na, nt);
    for (int i = 0; i < 2; i++)
        for (int j = 0; j < 2; j++) m[12 * ax[i] + ax[j]] += w * na[i] * na[j];
    for (int i = 0; i < 4; i++)
        for (int j = 0; j < 4; j++) {
            m[12 * xy[i] + xy[j]] += w * nt[i] * nt[j];
            m[12 * xz[i] + xz[j]] += w * sz[i] * sz[j] * nt[i] * nt[j];
        }
}

static void add_lumped(double L, double x, double w, double m[144])
{
    double s = fmin(fmax(x / L, 0.0), 1.0);
    for (int c = 0; c < 3; c++) {
        m[13 * c] += w * (1.0 - s);
        m[13 * (6 + c)] += w * s;
    }
}

void ef_elem_m_add_translational(double L, const ef_bload *mass, bool lumped, double m[144])
{
    if (mass->kind == EF_BLOAD_POINT) {
        if (lumped) add_lumped(L, mass->a, mass->q[0][0], m);
        else add_point(L, mass->a, mass->q[0][0], m);
        return;
    }
    if (mass->kind != EF_BLOAD_DIST) return;
    /* 4-point Gauss-Legendre on [a, b] (Abramowitz & Stegun, Table 25.4) */
    static const double gx[4] = {-0.8611363115940526, -0.3399810435848563,
                                 0.3399810435848563, 0.8611363115940526};
    static const double gw[4] = {0.3478548451374538, 0.6521451548625461,
                                 0.6521451548625461, 0.3478548451374538};
    double a = mass->a, b = mass->b, h = 0.5 * (b - a);
    if (!(h > 0.0)) return;
    for (int g = 0; g < 4; g++) {
        double t = 0.5 * (gx[g] + 1.0);                  /* 0..1 along [a, b] */
        double x = a + h * (gx[g] + 1.0);
        double mu = mass->q[0][0] + t * (mass->q[1][0] - mass->q[0][0]);
        if (lumped) add_lumped(L, x, gw[g] * h * mu, m);
        else add_point(L, x, gw[g] * h * mu, m);
    }
}
