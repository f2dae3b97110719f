/* vec3.h: 3-vector helpers (private), header-only. */
#ifndef EF_VEC3_H
#define EF_VEC3_H

static inline double ef_dot3(const double a[3], const double b[3])
{
    return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

/* c = a × b (c may not alias a or b) */
static inline void ef_cross3(const double a[3], const double b[3], double c[3])
{
    c[0] = a[1] * b[2] - a[2] * b[1];
    c[1] = a[2] * b[0] - a[0] * b[2];
    c[2] = a[0] * b[1] - a[1] * b[0];
}

#endif /* EF_VEC3_H */
