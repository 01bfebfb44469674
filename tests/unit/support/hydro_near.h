/* Double-precision closeness check for cmocka tests. cmocka 1.1.5's
 * assert_float_equal casts to float (about 7 digits), too coarse for
 * science checks. Include after <cmocka.h>. */
#ifndef HYDRO_NEAR_H
#define HYDRO_NEAR_H

#include <math.h>
#include <stdio.h>

#define assert_near(actual, expected, tol)                                              \
    do {                                                                                \
        double near_a_ = (actual), near_e_ = (expected), near_t_ = (tol);               \
        if (!(fabs(near_a_ - near_e_) <= near_t_)) {                                    \
            print_error("%s = %.12g, expected %.12g within %.3g\n", #actual, near_a_,   \
                        near_e_, near_t_);                                              \
            fail();                                                                     \
        }                                                                               \
    } while (0)

#endif
