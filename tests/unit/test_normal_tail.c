/* test_normal_tail.c - the Mills ratio of lib/fastmath_normal.h (the
 * branch-free kernel helper behind the Kosugi batch path) against mpmath.
 *
 * Source of the reference values: tests/data/mills_ref.txt, written by
 * tests/reference/gen_mills.py --ref (mpmath erfc at 60 digits, checked at
 * 120): t, M(t) correctly rounded and the rounding residue, so the error of
 * the two-part result Mh + Ml is measured below one ulp, in units of
 * 2^-53 M (at least one ulp). Bound: 0.25 of that unit (the Kosugi kernel relies on M being well inside one ulp: Se, Kr
 * and dSe/dh round once after it).
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <math.h>
#include <stdio.h>
#include <stdlib.h>

#include "fastmath_normal.h"

static void test_mills(void **state)
{
    const char *dir = getenv("PSIK_DATA_DIR");
    char path[512], line[256];
    FILE *f;
    double worst = 0.0, worst_t = 0.0;
    long n = 0;
    (void)state;
    snprintf(path, sizeof path, "%s/mills_ref.txt", dir ? dir : "tests/data");
    f = fopen(path, "r");
    assert_non_null(f);
    while (fgets(line, sizeof line, f)) {
        double t, v, r, mh, ml, e;
        if (line[0] == '#')
            continue;
        assert_int_equal(sscanf(line, "%lf %lf %lf", &t, &v, &r), 3);
        psik__fmn_mills_dd(t, 0.0, &mh, &ml);
        /* (mh + ml) - (v + r), exactly enough: mh and v agree to a few ulp */
        e = fabs(((mh - v) + (ml - r)) / (v * (DBL_EPSILON / 2.0)));
        if (e > worst) {
            worst = e;
            worst_t = t;
        }
        n++;
    }
    fclose(f);
    printf("# Mills ratio: %ld points on [0, 38], largest error %.3f ulp at t = %.17g\n",
           n, worst, worst_t);
    assert_true(n > 3000);
    assert_true(worst <= 0.25);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_mills),
    };
    return cmocka_run_group_tests_name("normal tail helpers against mpmath", tests, NULL, NULL);
}
