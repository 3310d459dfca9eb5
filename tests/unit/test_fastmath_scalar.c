/* test_fastmath_scalar.c - the one-point exp, expm1, log and log1p of
 * lib/fastmath_scalar.h against glibc's long double functions (expl,
 * expm1l, logl, log1pl: x87 extended precision, 64-bit significand, good
 * to about 2^-63 relative).
 *
 * What the header claims, and what is checked here, over each function's
 * stated domain (the ranges lib/point_vg.c uses):
 *   log pair hi + lo: absolute error below 2^-61 (relative, 2^-58, near
 *     x = 1), the low part below 2e-5 in magnitude (so that exp can take
 *     it); the reference is logl(z) + k ln 2 with x = 2^k z, formed so that
 *     long double's own rounding of |log x| up to 745 does not hide it;
 *   exp of a pair x + lo (-700 <= x <= 708): within 1 ulp, also with a low
 *     part as large as the log's;
 *   expm1 (-700 <= x <= 0): within 1.5 ulp (its two roundings beside a
 *     product as large as the result, next to the reduction's boundaries);
 *   log1p rounded to double: within 1 ulp;
 *   log1p(exp) as a pair (-700 <= x <= 0): within 2^-57 relative, and the
 *     exp it returns within 1 ulp;
 *   the log table's exactness claim: r = z (1/c) - 1 is exact (checked by
 *     recomputing it in long double).
 * The program is built twice (Makefile: test_fastmath_scalar and, on x86-64,
 * test_fastmath_scalar_fma with the FMA variants' flags), since the two
 * builds take different code.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <float.h>
#include <math.h>
#include <stdio.h>

#include "fastmath_scalar.h"

/* Error of got in ulps of the double nearest to want (long double). */
static double ulps_ld(double got, long double want)
{
    double w = (double)want, u;
    if (got == w) return 0.0;
    if (!isfinite(got) || !isfinite(w)) return INFINITY;
    u = fabs(w) < DBL_MIN ? 4.9406564584124654e-324 : nextafter(fabs(w), INFINITY) - fabs(w);
    return (double)(fabsl((long double)got - want) / (long double)u);
}

static uint64_t rng = 0x2545f4914f6cdd1dULL;
static double uni(void)   /* [0, 1) */
{
    rng ^= rng << 13; rng ^= rng >> 7; rng ^= rng << 17;
    return (double)(rng >> 11) / 9007199254740992.0;
}

static void test_log_pair(void **state)
{
    double worst = 0.0, at = 0.0, worst_rel = 0.0, at_rel = 0.0, big_lo = 0.0;
    long i;
    (void)state;
    for (i = 0; i < 1200000; i++) {
        double x, lo, hi;
        long double ref, err;
        if (i < 600000)
            x = pow(10.0, -307.0 + 615.0 * uni());          /* the normal range */
        else if (i < 1000000)
            x = 0.5 + 1.5 * uni();                          /* every table piece */
        else
            x = 1.0 + (uni() - 0.5) * 0.02;                 /* near 1: relative */
        hi = psik__sc_log_dd(x, &lo);
        ref = logl((long double)x);
        {   /* error = (hi - k ln2_hi) + lo - (logl(z) + k ln2_lo), each step
             * exact or far below 2^-61 in long double */
            int k = ilogb(x);
            long double z = (long double)ldexp(x, -k);
            long double khi = (long double)k * (long double)PSIK_SC_LN2HI;
            /* ln 2 - ln2_hi - ln2_lo, from mpmath at 60 digits */
            long double klo = (long double)k * ((long double)PSIK_SC_LN2LO +
                                                 (long double)0x1.f97b57a079a19p-103);
            err = fabsl((((long double)hi - khi) + (long double)lo) - (logl(z) + klo));
            if (fabsl(ref) < 0.01L)   /* near 1: logl(x) directly, relative */
                err = fabsl(((long double)hi + (long double)lo) - ref);
        }
        if ((double)err > worst) { worst = (double)err; at = x; }
        if (ref != 0.0L && fabsl(ref) < 0.01L && (double)(err / fabsl(ref)) > worst_rel) {
            worst_rel = (double)(err / fabsl(ref));
            at_rel = x;
        }
        if (fabs(lo) > big_lo) big_lo = fabs(lo);
    }
    printf("# log pair: max absolute error %.3g (2^%.1f) at x = %.17g; near 1 max relative "
           "%.3g (2^%.1f) at %.17g; largest |lo| %.3g\n", worst, log2(worst), at, worst_rel,
           log2(worst_rel), at_rel, big_lo);
    assert_true(worst < 0x1p-61);
    assert_true(worst_rel < 0x1p-58);
    assert_true(big_lo < 2e-5);
    {
        double lo, hi = psik__sc_log_dd(1.0, &lo);
        assert_true(hi == 0.0 && lo == 0.0);
    }
}

/* r = z (1/c) - 1 exact: the product minus 1, formed in long double (64
 * bits hold it: z has 53, 1/c 8), is representable in double, so the
 * single rounding of a fused multiply-add (or the two exact steps without
 * one) loses nothing. */
static void test_log_reduction_exact(void **state)
{
    long i, bad = 0;
    (void)state;
    for (i = 0; i < 300000; i++) {
        double x = 0.70 + 0.72 * uni();
        uint64_t ix = psik__fm_bits(x), tmp = ix - PSIK_SC_LOG_OFF;
        uint64_t j = (tmp >> 45) & 127u;
        double z = psik__fm_double(ix - (tmp & 0xfff0000000000000ULL));
        long double r = (long double)z * (long double)psik__sc_log_tab[3 * j] - 1.0L;
        if ((long double)(double)r != r)
            bad++;
    }
    printf("# log reduction: %ld of 300000 products z/c - 1 not exact in double\n", bad);
    assert_int_equal(bad, 0);
}

static void test_exp_pair(void **state)
{
    double worst = 0.0, at = 0.0;
    long i;
    (void)state;
    for (i = 0; i < 1200000; i++) {
        double x, lo, got;
        long double ref;
        if (i < 500000)
            x = -700.0 + 1408.0 * uni();
        else if (i < 900000)
            x = -2.0 + 4.0 * uni();
        else
            x = (uni() - 0.5) * 1e-3;
        /* low parts: a rounding error's size, and the log pair's size */
        lo = (i & 1) ? x * 0x1p-53 * (uni() - 0.5) : 2e-5 * (uni() - 0.5);
        got = psik__sc_exp_dd(x, lo);
        ref = expl((long double)x + (long double)lo);
        {
            double e = ulps_ld(got, ref);
            if (e > worst) { worst = e; at = x; }
        }
    }
    printf("# exp pair: max %.3f ulp at x = %.17g (1.2e6 arguments in [-700, 708])\n", worst, at);
    assert_true(worst <= 1.0);
    assert_true(psik__sc_exp_dd(0.0, 0.0) == 1.0);
}

static void test_expm1(void **state)
{
    double worst = 0.0, at = 0.0, worst_e = 0.0;
    long i;
    (void)state;
    for (i = 0; i < 1000000; i++) {
        double x, e, em1;
        long double ref;
        if (i < 400000)
            x = -700.0 * uni();
        else if (i < 800000)
            x = -pow(10.0, -300.0 + 302.0 * uni());      /* log-uniform to -100 */
        else
            x = -0.05 * uni();                           /* the reduction boundaries */
        psik__sc_exp_expm1_dd(x, 0.0, &e, &em1);
        ref = expm1l((long double)x);
        {
            double d = ulps_ld(em1, ref), d2 = ulps_ld(e, expl((long double)x));
            if (d > worst) { worst = d; at = x; }
            if (d2 > worst_e) worst_e = d2;
        }
    }
    printf("# expm1: max %.3f ulp at x = %.17g; its exp %.3f ulp\n", worst, at, worst_e);
    assert_true(worst <= 1.5);
    assert_true(worst_e <= 1.0);
}

/* log1p(exp(x + xl)) as a pair, with exp(x + xl) beside it (lib/point_vg.c's
 * softplus step): the pair within 2^-57 relative (the header states about
 * 2^-58), renormalised (|lo| <= ulp(hi)), the exponential within 1 ulp;
 * sampled over the whole domain, densely where the table ends (q = 447 to
 * 448, x near -9.70) and near 0, with low parts up to half an ulp.
 * The reference, log1pl(expl(x + xl)), is good to about 2^-63. */
static void test_log1p_exp(void **state)
{
    double worst = 0.0, at = 0.0, worst_a = 0.0, at_a = 0.0, worst_lo = 0.0;
    long i;
    (void)state;
    for (i = 0; i < 1200000; i++) {
        double x, xl, a, lo, hi;
        long double xx, ref, err;
        if (i < 400000)
            x = -700.0 * uni();
        else if (i < 800000)
            x = -12.0 * uni();
        else if (i < 1000000)
            x = -9.0 - 1.5 * uni();                      /* the table's end */
        else
            x = -pow(10.0, -300.0 + 300.0 * uni());      /* near 0 */
        /* a low part below ulp(x)/2 whose last bit lies within long
         * double's 64 bits of x, so that x + xl is exact in the reference */
        xl = ((i & 1) && x != 0.0) ? ldexp(floor((uni() - 0.5) * 2048.0), ilogb(x) - 63) : 0.0;
        hi = psik__sc_log1p_exp_dd(x, xl, &a, &lo);
        xx = (long double)x + (long double)xl;
        ref = log1pl(expl(xx));
        err = fabsl(((long double)hi + (long double)lo - ref) / ref);
        if ((double)err > worst) { worst = (double)err; at = x; }
        {
            double e = ulps_ld(a, expl(xx));
            if (e > worst_a) { worst_a = e; at_a = x; }
        }
        {
            double u = nextafter(fabs(hi), INFINITY) - fabs(hi);
            if (fabs(lo) / u > worst_lo) worst_lo = fabs(lo) / u;
        }
    }
    printf("# log1p(exp) pair: max relative error %.3g (2^%.1f) at x = %.17g; |lo| <= %.2f "
           "ulp(hi); its exp %.3f ulp at %.17g\n", worst, log2(worst), at, worst_lo, worst_a,
           at_a);
    assert_true(worst < 0x1p-57);
    assert_true(worst_lo <= 1.0);
    assert_true(worst_a <= 1.0);
    {
        double a, lo, hi = psik__sc_log1p_exp_dd(0.0, 0.0, &a, &lo);
        /* log 2 as a pair, from mpmath: 0x1.62e42fefa39efp-1 + 0x1.abc9e3b39803fp-56 */
        assert_true(a == 1.0);
        assert_true(hi == 0x1.62e42fefa39efp-1);
        assert_true(fabs(lo - 0x1.abc9e3b39803fp-56) < 0x1p-100);
    }
}

static void test_log1p(void **state)
{
    double worst = 0.0, at = 0.0;
    long i;
    (void)state;
    for (i = 0; i < 1000000; i++) {
        double x;
        if (i < 400000)
            x = pow(10.0, -300.0 + 301.0 * uni());       /* (0, 10]: b = log1p(a) */
        else if (i < 700000)
            x = -pow(10.0, -300.0 + 299.99 * uni());     /* (-0.98, 0) */
        else
            x = 1e300 * pow(uni(), 40.0);
        {
            double d = ulps_ld(psik__sc_log1p(x), log1pl((long double)x));
            if (d > worst) { worst = d; at = x; }
        }
    }
    printf("# log1p: max %.3f ulp at x = %.17g\n", worst, at);
    assert_true(worst <= 1.0);
    assert_true(psik__sc_log1p(0.0) == 0.0);
}

int main(void)
{
#if defined(__FMA__) && defined(__x86_64__) && defined(__GNUC__)
    if (!(__builtin_cpu_supports("avx2") && __builtin_cpu_supports("fma"))) {
        printf("# this processor has no AVX2/FMA: the FMA build is not run\n");
        return 0;
    }
    printf("# built with fused multiply-adds (the FMA variants' code)\n");
#endif
    {
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_log_pair),
        cmocka_unit_test(test_log_reduction_exact),
        cmocka_unit_test(test_exp_pair),
        cmocka_unit_test(test_expm1),
        cmocka_unit_test(test_log1p),
        cmocka_unit_test(test_log1p_exp),
    };
    return cmocka_run_group_tests_name("one-point fastmath against long double libm", tests,
                                       NULL, NULL);
    }
}
