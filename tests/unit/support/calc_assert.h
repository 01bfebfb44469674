/* assert_near(actual, expected, tolerance) for cmocka 1.1.5, which has no
 * floating-point comparison; prints both values on failure. Include after
 * <cmocka.h>. */
#ifndef CALC_ASSERT_H
#define CALC_ASSERT_H

#include <math.h>

static inline void calc_assert_near(double actual, double expected, double tol,
                                    const char *file, int line)
{
    if (!(fabs(actual - expected) <= tol)) {
        print_error("%.15g differs from %.15g by %.3g (tolerance %.3g)\n", actual, expected,
                    fabs(actual - expected), tol);
        _fail(file, line);
    }
}

#define assert_near(a, e, tol) calc_assert_near((a), (e), (tol), __FILE__, __LINE__)

#endif
