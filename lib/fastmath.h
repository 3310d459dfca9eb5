/* fastmath.h - branch-free exp, expm1, log, log1p for the fused and batch
 * kernels (not installed). Every function is static inline so that a loop
 * calling it can be vectorised by the compiler: no table lookups, no
 * branches (only selects, which become blends), no integer/float
 * conversions the base x86-64 instruction set lacks (integers travel through
 * the bits of doubles), no libm calls except sqrt.
 *
 * Error bounds (measured by tests/unit/test_fastmath.c against glibc's long
 * double functions, 64-bit significand, over millions of arguments):
 * psik__fm_exp, psik__fm_expm1 <= 2 ulp, psik__fm_log, psik__fm_log1p <= 1 ulp;
 * the test prints the largest error it saw. The double-double forms
 * (psik__fm_log_dd, psik__fm_exp_dd) carry about 58 bits, which is what
 * pow-like products c * log(p) need: their error in Se must not grow with
 * |log p|.
 *
 * Selects between computed values go through psik__fm_sel (an operation
 * inside a ?: arm could trap, so the compiler would keep the branch).
 * Arithmetic is plain IEEE double with no contraction into fused
 * multiply-adds (the kernels that include this file are compiled with
 * -ffp-contract=off, and clang obeys the pragma below), so a vectorised
 * loop gives exactly the bits the scalar call gives.
 */
#ifndef PSIK_FASTMATH_H
#define PSIK_FASTMATH_H

#include <float.h>
#include <math.h>
#include <stdint.h>
#include <string.h>

#if defined(__clang__)
#pragma STDC FP_CONTRACT OFF
#endif

#if defined(__GNUC__)
#  define PSIK_FM static inline __attribute__((always_inline))
#else
#  define PSIK_FM static inline
#endif

PSIK_FM uint64_t psik__fm_bits(double x)
{
    uint64_t u;
    memcpy(&u, &x, sizeof u);
    return u;
}

PSIK_FM double psik__fm_double(uint64_t u)
{
    double x;
    memcpy(&x, &u, sizeof x);
    return x;
}

/* c ? a : b through the bits: both operands are computed on every path, so
 * the compiler cannot sink an operation into a branch (which it would keep,
 * since the operation could trap) and the loop stays vectorisable. */
PSIK_FM double psik__fm_sel(int c, double a, double b)
{
    uint64_t m = (uint64_t)0 - (uint64_t)(c != 0);
    return psik__fm_double((psik__fm_bits(a) & m) | (psik__fm_bits(b) & ~m));
}

/* s + e = a + b exactly (Knuth). */
PSIK_FM void psik__fm_two_sum(double a, double b, double *s, double *e)
{
    double t = a + b, bb = t - a;
    *s = t;
    *e = (a - (t - bb)) + (b - bb);
}

/* p + e = a * b exactly (Dekker, Veltkamp split; |a|, |b| < 2^995). */
PSIK_FM void psik__fm_two_prod(double a, double b, double *p, double *e)
{
    const double split = 134217729.0;   /* 2^27 + 1 */
    double ca = split * a, cb = split * b;
    double ah = ca - (ca - a), al = a - ah;
    double bh = cb - (cb - b), bl = b - bh;
    double pp = a * b;
    *p = pp;
    *e = ((ah * bh - pp) + ah * bl + al * bh) + al * bl;
}

/* c * (xh + xl) as a double-double (c, xh moderate). */
PSIK_FM void psik__fm_mul_dd(double c, double xh, double xl, double *ph, double *pl)
{
    double p, e;
    psik__fm_two_prod(c, xh, &p, &e);
    psik__fm_two_sum(p, e + c * xl, ph, pl);
}

#define PSIK_FM_LN2HI 6.93147180369123816490e-01   /* 0x3fe62e42fee00000: 32 bits */
#define PSIK_FM_LN2LO 1.90821492927058770002e-10
#define PSIK_FM_INVLN2 1.44269504088896338700e+00
#define PSIK_FM_SHIFT 6755399441055744.0            /* 0x1.8p52 */

/* The shared core of exp and expm1 at x + lo (|lo| <= 2^-40 |x| or tiny).
 * x is first clamped to [-746, 710] (NaN stays NaN), k = round(x / ln 2)
 * through the 1.5 * 2^52 shift, r = x - k ln 2 + lo in Cody-Waite form
 * (|r| <= 0.347), q = e^r - 1 by its Taylor series to r^13 (truncation
 * below 2^-57 relative), and 2^k as the product of two powers of two
 * s1 s2 with normal exponents, so that the final multiply by s2 is the
 * only rounding also when the result is subnormal. */
PSIK_FM void psik__fm_exp_core(double x, double lo, double *rh, double *ql, double *s1,
                               double *s2, double *kd)
{
    double xc = psik__fm_sel(x > 710.0, 710.0, x);
    double sh, k, r0, c, r, rl, p;
    uint64_t ku, k1, k2;
    xc = psik__fm_sel(xc < -746.0, -746.0, xc);
    sh = xc * PSIK_FM_INVLN2 + PSIK_FM_SHIFT;
    ku = psik__fm_bits(sh) - psik__fm_bits(PSIK_FM_SHIFT) + 2048u;   /* k + 2048 */
    k = sh - PSIK_FM_SHIFT;
    r0 = xc - k * PSIK_FM_LN2HI;               /* exact */
    c = k * PSIK_FM_LN2LO;
    psik__fm_two_sum(r0, -c, &r, &rl);
    rl = rl + lo;
    {   /* P(r) = sum 1/(j+2)! r^j, j = 0..11, Estrin's scheme (short chains) */
        double r2 = r * r, r4 = r2 * r2, r8 = r4 * r4;
        double p01 = 0.5 + r * (1.0 / 6.0);
        double p23 = 1.0 / 24.0 + r * (1.0 / 120.0);
        double p45 = 1.0 / 720.0 + r * (1.0 / 5040.0);
        double p67 = 1.0 / 40320.0 + r * (1.0 / 362880.0);
        double p89 = 1.0 / 3628800.0 + r * (1.0 / 39916800.0);
        double pab = 1.0 / 479001600.0 + r * (1.0 / 6227020800.0);
        double q0 = p01 + r2 * p23, q1 = p45 + r2 * p67, q2 = p89 + r2 * pab;
        p = (q0 + r4 * q1) + r8 * q2;
    }
    /* e^(r + rl) - 1 = r + [(r^2) p + rl (1 + r)] */
    *rh = r;
    *ql = (r * r) * p + rl * (1.0 + r);
    k1 = ku >> 1;
    k2 = ku - k1;
    *s1 = psik__fm_double((k1 - 1u) << 52);   /* 2^(k1 - 1024) */
    *s2 = psik__fm_double((k2 - 1u) << 52);   /* 2^(k2 - 1024) */
    *kd = k;
}

/* exp(x + lo): error < 1 ulp (normal results), < 1 ulp of the smallest
 * subnormal below; 0 below -745.2, +inf above 709.8, NaN for NaN. */
PSIK_FM double psik__fm_exp_dd(double x, double lo)
{
    double r, ql, s1, s2, k;
    psik__fm_exp_core(x, lo, &r, &ql, &s1, &s2, &k);
    return ((1.0 + (r + ql)) * s1) * s2;
}

PSIK_FM double psik__fm_exp(double x)
{
    return psik__fm_exp_dd(x, 0.0);
}

/* exp(x + lo) and expm1(x + lo) together (one reduction, one polynomial):
 * expm1 = ((2^k - 1) + 2^k r) + 2^k ql, where 2^k - 1 is exact for
 * |k| <= 53 and the first sum is exact where it cancels (k = 1, r < -1/4,
 * by Sterbenz), so the error stays below 1.5 ulp. */
PSIK_FM void psik__fm_exp_expm1_dd(double x, double lo, double *e, double *em1)
{
    double r, ql, s1, s2, k, two_k, ex, em;
    psik__fm_exp_core(x, lo, &r, &ql, &s1, &s2, &k);
    ex = ((1.0 + (r + ql)) * s1) * s2;
    two_k = s1 * s2;
    em = ((two_k - 1.0) + two_k * r) + two_k * ql;
    *e = ex;
    *em1 = psik__fm_sel(k > 60.0, ex, em);      /* large k: exp overflows or swamps the 1 */
}

/* expm1(x): error < 2 ulp; -1 below -37.5, +inf above 709.8, NaN for NaN. */
PSIK_FM double psik__fm_expm1(double x)
{
    double e, em1;
    psik__fm_exp_expm1_dd(x, 0.0, &e, &em1);
    return psik__fm_sel(x == 0.0, x, em1);       /* keeps the sign of -0 */
}

/* log(x) as hi + lo for finite x > 0 (normal or subnormal), absolute error
 * below 2^-58 (and relative below 2^-58 when 0.707 < x < 1.414).
 * Method: x = 2^k z with z in [sqrt(2)/2, sqrt(2)) from the bits,
 * f = z - 1 (exact), s = f / (2 + f) carried as sh + sl,
 * log z = 2 atanh s = 2s + 2 s^3 (1/3 + s^2/5 + ... + s^18/21) with
 * |s| <= 0.1716 (truncation below 2^-61), and k ln 2 in two parts.
 * Zero, negative, infinite and NaN x give garbage: callers select. */
PSIK_FM double psik__fm_log_dd(double x, double *lo)
{
    int sub = x < DBL_MIN;
    double xs = psik__fm_sel(sub, x * 18014398509481984.0, x);    /* 2^54 */
    double koff = psik__fm_sel(sub, 54.0, 0.0);
    uint64_t ix = psik__fm_bits(xs);
    uint64_t tmp = ix - 0x3fe6a09e667f3bcdULL + 0x8000000000000000ULL;
    uint64_t kk = tmp >> 52;                              /* k + 2048 */
    uint64_t iz = ix - ((kk - 2048u) << 52);
    double z = psik__fm_double(iz);
    double k = (psik__fm_double(0x4330000000000000ULL | kk) - 4503599627370496.0)
               - 2048.0 - koff;
    double f = z - 1.0;
    double dh = 2.0 + f, dl = (2.0 - dh) + f;
    double sh = f / dh, ph, pl, sl, s2, P, T, H, e1, l, hi;
    psik__fm_two_prod(sh, dh, &ph, &pl);
    sl = (((f - ph) - pl) - sh * dl) / dh;
    s2 = sh * sh;
    {   /* P = sum s2^j / (2j + 3), j = 0..9, Estrin's scheme */
        double z2 = s2 * s2, z4 = z2 * z2, z8 = z4 * z4;
        double p01 = 1.0 / 3.0 + s2 * (1.0 / 5.0);
        double p23 = 1.0 / 7.0 + s2 * (1.0 / 9.0);
        double p45 = 1.0 / 11.0 + s2 * (1.0 / 13.0);
        double p67 = 1.0 / 15.0 + s2 * (1.0 / 17.0);
        double p89 = 1.0 / 19.0 + s2 * (1.0 / 21.0);
        P = ((p01 + z2 * p23) + z4 * (p45 + z2 * p67)) + z8 * p89;
    }
    T = 2.0 * sh * s2 * P;
    psik__fm_two_sum(k * PSIK_FM_LN2HI, 2.0 * sh, &H, &e1);
    l = e1 + (k * PSIK_FM_LN2LO + (2.0 * sl + T));
    hi = H + l;
    *lo = l - (hi - H);
    return hi;
}

/* log(x): error < 1 ulp; -inf at 0, NaN below 0 and for NaN, +inf at +inf. */
PSIK_FM double psik__fm_log(double x)
{
    double lo, v = psik__fm_log_dd(x, &lo);
    v = psik__fm_sel(x == 0.0, -HUGE_VAL, v);
    v = psik__fm_sel(x > DBL_MAX, x, v);
    return psik__fm_sel(x >= 0.0, v, NAN);
}

/* log1p(x) for x > -1, finite: log(u) + e/u with u = fl(1 + x) and e the
 * rounding error of that sum (exact by Sterbenz on both sides of 1). */
PSIK_FM double psik__fm_log1p_fin(double x)
{
    double u = 1.0 + x, lo, hi;
    double e1 = 1.0 - (u - x), e0 = x - (u - 1.0);
    double e = psik__fm_sel(x >= 1.0, e1, e0);
    hi = psik__fm_log_dd(u, &lo);
    return hi + (lo + e / u);
}

/* log1p(x): error < 1 ulp; -inf at -1, NaN below -1 and for NaN, +inf at +inf. */
PSIK_FM double psik__fm_log1p(double x)
{
    double v = psik__fm_log1p_fin(x);
    v = psik__fm_sel(x == -1.0, -HUGE_VAL, v);
    v = psik__fm_sel(x > DBL_MAX, x, v);
    v = psik__fm_sel(x == 0.0, x, v);            /* keeps -0 */
    return psik__fm_sel(x >= -1.0, v, NAN);
}

#endif
