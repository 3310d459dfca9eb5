/* test_ibeta.c - the incomplete and complete beta functions of special.c
 * against mpmath (tests/data/ibeta.txt from tests/reference/gen_ibeta.py,
 * mpmath.betainc / mpmath.beta at 100 and 200 digits). */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <math.h>
#include <stdio.h>
#include <stdlib.h>

#include "psik_internal.h"
#include "refcheck.h"

static void test_ibeta_table(void **state)
{
    const char *dir = getenv("PSIK_DATA_DIR");
    char path[256], line[1024];
    FILE *fp;
    double worst_i = 0, worst_c = 0, worst_b = 0, worst_p = 0, worst_s = 0;
    int nser = 0;
    int n = 0, wline = 0;
    (void)state;
    snprintf(path, sizeof path, "%s/ibeta.txt", dir ? dir : "tests/data");
    fp = fopen(path, "r");
    assert_non_null(fp);
    while (fgets(line, sizeof line, fp)) {
        double a, b, x, y, I, C, B, front, gi, gc, gb, e;
        if (line[0] == '#')
            continue;
        assert_int_equal(sscanf(line, "%lf %lf %lf %lf %lf %lf %lf %lf",
                                &a, &b, &x, &y, &I, &C, &B, &front), 8);
        n++;
        gi = psik__ibeta(a, b, x, y, front, &gc);
        gb = psik__beta(a, b);
        /* the side computed by the continued fraction is promised to a few
         * ulp; the other is 1 minus it (absolute error ~1 ulp of 1) */
        if (x < (a + 1.0) / (a + b + 2.0)) {
            e = rc_ulps(gi, I);
            if (e > worst_i) { worst_i = e; wline = n; }
        } else {
            e = rc_ulps(gc, C);
            if (e > worst_c) { worst_c = e; wline = n; }
        }
        /* past the split with I < 3/4, b < 1, x <= 0.97: I from the
         * positive power series, promised to relative accuracy too */
        if (!(x < (a + 1.0) / (a + b + 2.0)) && I < 0.75 && C > 0.25 && b < 1.0 && x <= 0.97) {
            e = rc_ulps(gi, I);
            nser++;
            if (e > worst_s) worst_s = e;
        }
        e = rc_ulps(gb, B);
        if (e > worst_b) worst_b = e;
        e = fabs((x < (a + 1.0) / (a + b + 2.0) ? gc - C : gi - I)) / 2.220446049250313e-16;
        if (e > worst_p) worst_p = e;
    }
    fclose(fp);
    printf("# ibeta: %d points from %s; worst %.2f ulp (I by its fraction), %.2f ulp "
           "(1-I by its fraction), the complement %.2f eps absolute; beta %.2f ulp (last bad row %d)\n",
           n, path, worst_i, worst_c, worst_p, worst_b, wline);
    printf("# ibeta: power-series side (x past the split, I < 3/4, b < 1, x <= 0.97): "
           "%d points, worst %.2f ulp\n", nser, worst_s);
    assert_true(n > 1000);
    assert_true(nser > 10 && worst_s <= 16.0);
    assert_true(worst_i <= 8.0 && worst_c <= 8.0);
    assert_true(worst_p <= 2.0);
    assert_true(worst_b <= 8.0);
}

static void test_pow2(void **state)
{
    /* x^(1/3) with 1/3 carried in two doubles, at x = 2^-3000/... : the exact
     * result of (2^-999)^(1/3) is 2^-333 (a power of two, exact). */
    double hi, lo, v;
    (void)state;
    psik__recip2(1.0, 3.0, &hi, &lo);
    v = psik__pow2(ldexp(1.0, -999), hi, lo);
    printf("# pow2: (2^-999)^(1/3) = 2^-333 * (1 %+.3g)\n", v / ldexp(1.0, -333) - 1.0);
    assert_true(rc_ulps(v, ldexp(1.0, -333)) <= 1.0);
    /* pow alone with fl(1/3) is off by |log x| * 2^-54 ~ 1.9e-14 relative */
    assert_true(rc_ulps(pow(ldexp(1.0, -999), 1.0 / 3.0), ldexp(1.0, -333)) > 10.0);
    assert_true(psik__pow2(0.0, hi, lo) == 0.0);
    assert_true(isinf(psik__pow2(INFINITY, hi, lo)));
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_ibeta_table),
        cmocka_unit_test(test_pow2),
    };
    return cmocka_run_group_tests_name("special functions: beta", tests, NULL, NULL);
}
