/* support.h: helpers shared by the cmocka unit tests. */
#ifndef EF_TEST_SUPPORT_H
#define EF_TEST_SUPPORT_H

#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <cmocka.h>

/* |got - want| <= rtol * |want| (or <= rtol when want == 0); NaN and Inf must match
 * exactly (as GSL's gsl_test_rel). cmocka 1.1.5's assert_float_equal goes through float. */
static inline int ef_rel_close(double got, double want, double rtol)
{
    if (isnan(want)) return isnan(got);
    if (isinf(want)) return got == want;
    if (!isfinite(got)) return 0;
    double scale = fabs(want) > 0.0 ? fabs(want) : 1.0;
    return fabs(got - want) <= rtol * scale;
}

#define assert_rel_close(got, want, rtol)                                              \
    do {                                                                               \
        double g_ = (got), w_ = (want), r_ = (rtol);                                   \
        if (!ef_rel_close(g_, w_, r_))                                                 \
            fail_msg("%s = %.12g, expected %.12g (rel. error %.3g > %.3g)", #got, g_,   \
                     w_, fabs(w_) > 0 ? fabs(g_ - w_) / fabs(w_) : fabs(g_), r_);      \
    } while (0)

/* |got - want| <= atol */
#define assert_abs_close(got, want, atol)                                              \
    do {                                                                               \
        double g_ = (got), w_ = (want), a_ = (atol);                                   \
        if (!(fabs(g_ - w_) <= a_))                                                    \
            fail_msg("%s = %.12g, expected %.12g (abs. error %.3g > %.3g)", #got, g_,   \
                     w_, fabs(g_ - w_), a_);                                           \
    } while (0)

#endif /* EF_TEST_SUPPORT_H */
