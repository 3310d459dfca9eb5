/* fastmath.h - branch-free exp, expm1, log, log1p for the fused and batch
 * kernels (not installed). Every function is static inline so that a loop
 * calling it can be vectorised by the compiler: no branches (only selects,
 * which become blends), no integer/float conversions the base x86-64
 * instruction set lacks (integers travel through the bits of doubles), no
 * libm calls except sqrt; table lookups only into two small constant
 * tables (fastmath_tables.h, generated with mpmath), which become gathers
 * (neither exp nor log needs them where fused multiply-adds exist).
 *
 * Error bounds (measured by tests/unit/test_fastmath.c against glibc's long
 * double functions, 64-bit significand, over millions of arguments):
 * psik__fm_exp < 1 ulp, psik__fm_expm1 < 1 ulp portable and < 1.1 ulp in
 * the FMA build (its table-free reduction leaves |r| up to 0.35; measured
 * 0.52 and 1.06), psik__fm_log and psik__fm_log1p < 1 ulp; the test runs
 * both builds (test_fastmath, test_fastmath_fma) and prints the largest
 * error it saw. The double-double forms
 * (psik__fm_log_dd, psik__fm_exp_dd) carry about 60 bits, which is what
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

#include "fastmath_tables.h"

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

/* s + e = a + b exactly when |a| >= |b| or a = 0 (Dekker's fast form). */
PSIK_FM void psik__fm_fast_two_sum(double a, double b, double *s, double *e)
{
    double t = a + b;
    *s = t;
    *e = b - (t - a);
}

/* p + e = a * b exactly (Dekker, Veltkamp split; |a|, |b| < 2^995; one
 * fused multiply-add where the instruction set has it, same bits). */
PSIK_FM void psik__fm_two_prod(double a, double b, double *p, double *e)
{
#if defined(__FMA__)
    /* the same exact pair in two instructions */
    double pp = a * b;
    *p = pp;
    *e = __builtin_fma(a, b, -pp);
#else
    const double split = 134217729.0;   /* 2^27 + 1 */
    double ca = split * a, cb = split * b;
    double ah = ca - (ca - a), al = a - ah;
    double bh = cb - (cb - b), bl = b - bh;
    double pp = a * b;
    *p = pp;
    *e = ((ah * bh - pp) + ah * bl + al * bh) + al * bl;
#endif
}

/* c * (xh + xl) as a double-double (c, xh moderate). */
PSIK_FM void psik__fm_mul_dd(double c, double xh, double xl, double *ph, double *pl)
{
    double p, e;
    psik__fm_two_prod(c, xh, &p, &e);
    psik__fm_fast_two_sum(p, e + c * xl, ph, pl);
}

#define PSIK_FM_LN2HI 6.93147180369123816490e-01   /* 0x3fe62e42fee00000: 32 bits */
#define PSIK_FM_LN2LO 1.90821492927058770002e-10
#define PSIK_FM_SHIFT 6755399441055744.0            /* 0x1.8p52 */

#if defined(__FMA__)
/* With fused multiply-adds (the AVX2 and AVX-512 variants, isa.h) the core
 * needs no table and so no gathers: k = round(x / ln 2), r = x - k ln 2 +
 * lo in the same Cody-Waite form (|r| <= 0.347), e^r - 1 = r + ql with
 * ql = q + rl (1 + r + q), q = r^2 (1/2! + r/3! + ... + r^12/14!) by Estrin's scheme in fused
 * multiply-adds (truncation below 2^-62 relative), thi = 1, tlo = 0; the
 * callers below are the same. Results differ from the table form by rounding only (both
 * below 1 ulp, tests/unit/test_fastmath.c measures each build). */
PSIK_FM void psik__fm_exp_core(double x, double lo, double *thi_o, double *tlo_o,
                               double *r_o, double *ql_o, double *s1, double *s2)
{
    double xc = psik__fm_sel(x > 710.0, 710.0, x);
    double sh, k, r0, c, r, rl, p, ql;
    uint64_t e2, k1, k2;
    xc = psik__fm_sel(xc < -746.0, -746.0, xc);
    sh = __builtin_fma(xc, 1.4426950408889634, PSIK_FM_SHIFT);   /* 1 / ln 2 */
    e2 = psik__fm_bits(sh) - psik__fm_bits(PSIK_FM_SHIFT) + 2048u;   /* k + 2048 */
    k = sh - PSIK_FM_SHIFT;
    r0 = xc - k * PSIK_FM_LN2HI;                                  /* exact */
    c = k * PSIK_FM_LN2LO;
    psik__fm_two_sum(r0, -c, &r, &rl);
    rl = rl + lo;
    {   /* Estrin's scheme: short dependency chains for the scalar callers */
        double r2 = r * r, r4 = r2 * r2, r8 = r4 * r4;
        double p01 = __builtin_fma(1.0 / 6.0, r, 0.5);
        double p23 = __builtin_fma(1.0 / 120.0, r, 1.0 / 24.0);
        double p45 = __builtin_fma(1.0 / 5040.0, r, 1.0 / 720.0);
        double p67 = __builtin_fma(1.0 / 362880.0, r, 1.0 / 40320.0);
        double p89 = __builtin_fma(1.0 / 39916800.0, r, 1.0 / 3628800.0);
        double pab = __builtin_fma(1.0 / 6227020800.0, r, 1.0 / 479001600.0);
        double q0 = __builtin_fma(p23, r2, p01), q1 = __builtin_fma(p67, r2, p45);
        double q2 = __builtin_fma(pab, r2, p89), q3 = 1.0 / 87178291200.0;   /* 1/14! */
        p = __builtin_fma(__builtin_fma(q3, r4, q2), r8, __builtin_fma(q1, r4, q0));
    }
    /* rl e^r in full: with |r| up to 0.35 the r^2/2 term of a low part
     * 2^-40 |x| is still worth ulps */
    p = r * r * p;
    ql = p + rl * (1.0 + (r + p));
    *thi_o = 1.0;
    *tlo_o = 0.0;
    *r_o = r;
    *ql_o = ql;
    k1 = e2 >> 1;
    k2 = e2 - k1;
    *s1 = psik__fm_double((k1 - 1u) << 52);                /* 2^(k1 - 1024) */
    /* below -745.14 the result rounds to 0: a zero scale gives it without
     * an underflowing multiply (which costs a microcode assist on some
     * processors, ~100 cycles, for every lane of the vector) */
    *s2 = psik__fm_sel(x < -745.14, 0.0, psik__fm_double((k2 - 1u) << 52));
}
#else
/* The shared core of exp and expm1 at x + lo (|lo| <= 2^-40 |x| or tiny).
 * x is first clamped to [-746, 710] (NaN stays NaN); k = round(128 x / ln 2)
 * through the 1.5 * 2^52 shift, k = 128 e + j; r = x - k ln2/128 + lo in
 * Cody-Waite form (|r| <= 0.0028, carried as r + rl); e^r - 1 = r + ql by
 * the Taylor series to r^6 (truncation below 2^-70); 2^(j/128) from the
 * table in two parts; 2^e as the product of two powers of two s1 s2 with
 * normal exponents, so that the final multiply by s2 is the only rounding
 * also when the result is subnormal. Outputs: 2^(j/128) = thi + tlo,
 * e^(r + rl) - 1 = r + ql, and s1, s2. */
PSIK_FM void psik__fm_exp_core(double x, double lo, double *thi_o, double *tlo_o,
                               double *r_o, double *ql_o, double *s1, double *s2)
{
    double xc = psik__fm_sel(x > 710.0, 710.0, x);
    double sh, k, r0, c, r, rl, p, ql, thi, tlo;
    uint64_t ku, j, e2, k1, k2;
    xc = psik__fm_sel(xc < -746.0, -746.0, xc);
    sh = xc * 184.66496523378731 + PSIK_FM_SHIFT;        /* 128 / ln 2 */
    ku = psik__fm_bits(sh) - psik__fm_bits(PSIK_FM_SHIFT) + (2048u << 7);
    k = sh - PSIK_FM_SHIFT;
    r0 = xc - k * (PSIK_FM_LN2HI / 128.0);                 /* exact */
    c = k * (PSIK_FM_LN2LO / 128.0);
    psik__fm_two_sum(r0, -c, &r, &rl);
    rl = rl + lo;
    {
        double r2 = r * r;
        p = (0.5 + r * (1.0 / 6.0)) + r2 * ((1.0 / 24.0 + r * (1.0 / 120.0)) + r2 * (1.0 / 720.0));
        ql = r2 * p + rl * (1.0 + r);
    }
    j = ku & 127u;
    e2 = ku >> 7;                                          /* e + 2048 */
    thi = psik__fm_exp_tab[2 * j];
    tlo = psik__fm_exp_tab[2 * j + 1];
    *thi_o = thi;
    *tlo_o = tlo;
    *r_o = r;
    *ql_o = ql;
    k1 = e2 >> 1;
    k2 = e2 - k1;
    *s1 = psik__fm_double((k1 - 1u) << 52);                /* 2^(k1 - 1024) */
    /* below -745.14 the result rounds to 0: a zero scale gives it without
     * an underflowing multiply (which costs a microcode assist on some
     * processors, ~100 cycles, for every lane of the vector) */
    *s2 = psik__fm_sel(x < -745.14, 0.0, psik__fm_double((k2 - 1u) << 52));
}
#endif

/* exp(x + lo): error < 1 ulp (normal results), < 1 ulp of the smallest
 * subnormal below; 0 below -745.2, +inf above 709.8, NaN for NaN. */
/* 2^(j/128) e^(r + rl) before the scaling by 2^e: thi + [tlo + (thi +
 * tlo)(r + ql)] from the table; 1 + r + ql without one (1 + r summed
 * exactly, which keeps the error near half an ulp with |r| up to 0.35). */
PSIK_FM double psik__fm_exp_join(double th, double tlo, double r, double ql)
{
#if defined(__FMA__)
    double s, e;
    (void)th;
    (void)tlo;
    psik__fm_fast_two_sum(1.0, r, &s, &e);
    return s + (e + ql);
#else
    return th + (tlo + (th + tlo) * (r + ql));
#endif
}

PSIK_FM double psik__fm_exp_dd(double x, double lo)
{
    double th, tlo, r, ql, s1, s2;
    psik__fm_exp_core(x, lo, &th, &tlo, &r, &ql, &s1, &s2);
    return (psik__fm_exp_join(th, tlo, r, ql) * s1) * s2;
}

PSIK_FM double psik__fm_exp(double x)
{
    return psik__fm_exp_dd(x, 0.0);
}

/* exp(x + lo) and expm1(x + lo) together (one reduction, one polynomial):
 * expm1 = (2^e thi - 1) + 2^e thi r + 2^e [thi ql + tlo (1 + r + ql)], with
 * the first two terms, which cancel for small |x|, summed exactly (two_sum,
 * exact product), so the error stays below 1 ulp; above x = 40
 * expm1 = exp to rounding. */
PSIK_FM void psik__fm_exp_expm1_dd(double x, double lo, double *e, double *em1)
{
    double th, tlo, r, ql, s1, s2, two_k, ex, em;
    psik__fm_exp_core(x, lo, &th, &tlo, &r, &ql, &s1, &s2);
    ex = (psik__fm_exp_join(th, tlo, r, ql) * s1) * s2;
    two_k = s1 * s2;
    {
        double sa, ea, p, pe, u, ue;
        psik__fm_two_sum(two_k * th, -1.0, &sa, &ea);      /* 2^e thi - 1 */
        psik__fm_two_prod(th, r, &p, &pe);                  /* thi r */
        psik__fm_two_sum(sa, two_k * p, &u, &ue);
        em = u + (ue + (ea + two_k * (pe + (th * ql + tlo * (1.0 + (r + ql))))));
    }
    *e = ex;
    *em1 = psik__fm_sel(x > 40.0, ex, em);
}

/* expm1(x): error < 2 ulp; -1 below -37.5, +inf above 709.8, NaN for NaN. */
PSIK_FM double psik__fm_expm1(double x)
{
    double e, em1;
    psik__fm_exp_expm1_dd(x, 0.0, &e, &em1);
    return psik__fm_sel(x == 0.0, x, em1);       /* keeps the sign of -0 */
}

/* The reduction both forms of psik__fm_log_dd_nrm start from: x = 2^k z
 * with z in [sqrt(2)/2, sqrt(2)) from the bits (normal finite x > 0), k
 * as a double, and sk = 2^-k for the low part (k of a normal x is in
 * [-1022, 1023]: 2^-k is normal except at k = 1023, where xl 2^-k only
 * loses digits far below the result's ulp). */
PSIK_FM double psik__fm_log_split(double x, double *k, double *sk)
{
    uint64_t ix = psik__fm_bits(x);
    uint64_t tmp = ix - 0x3fe6a09e667f3bcdULL + 0x8000000000000000ULL;
    uint64_t kk = tmp >> 52;                              /* k + 2048 */
    *k = psik__fm_double(0x4330000000000000ULL | kk) - 4503599627370496.0 - 2048.0;
    *sk = psik__fm_double((3071u - kk) << 52);
    return psik__fm_double(ix - ((kk - 2048u) << 52));
}

#if defined(__FMA__)
/* log(x + xl) as hi + lo for normal finite x > 0 and |xl| <= ulp(x),
 * absolute error below 2^-58 (and relative below 2^-58 when 0.707 < x <
 * 1.414). Zero, subnormal, negative, infinite and NaN x give garbage:
 * callers select. Both forms take x = 2^k z with z in [sqrt(2)/2,
 * sqrt(2)) from the bits and add k ln 2 in two parts at the end.
 *
 * With fused multiply-adds (the AVX2 and AVX-512 variants) there is no
 * table, so no gathers (each costs about as much as a dozen multiply-adds
 * on the processors these variants are for): s = (z - 1)/(z + 1) as sh +
 * sl, |s| <= 0.1716, through one reciprocal and the exact remainder (z - 1
 * and the parts of z + 1 exact; xl enters as xl 2^-k in both); log z = 2
 * atanh(s) = 2 sh + 2 sl (1 + sh^2) + 2 sh^3 (1/3 + sh^2 Q), Q the series
 * to s^23/23 by Estrin's scheme (truncation below 2^-65 relative); 2 sh^3
 * and its third are carried in two parts (exact products in fused
 * multiply-adds, 1/3 in two doubles) and the third summed exactly into
 * the result, so that what is rounded is below 2^-14 of it. */
PSIK_FM double psik__fm_log_dd_nrm(double x, double xl, double *lo)
{
    double k, sk, z = psik__fm_log_split(x, &k, &sk);
    double f = z - 1.0;                                   /* exact */
    double d = z + 1.0, dl = z - (d - 1.0);               /* d + dl = z + 1 exactly */
    double zl = xl * sk;
    double invd = 1.0 / d;
    double sh = f * invd;
    double rem = __builtin_fma(-sh, d, f);                /* f - sh d, to 2^-53 of itself */
    /* 2 sl, 2 ((f + zl)/(d + dl + zl) - sh); 2 invd exact, so that a
     * subnormal zl (log1p of a subnormal) is not halved and doubled */
    double sl2 = ((rem - sh * (dl + zl)) + zl) * (2.0 * invd);
    double t = 2.0 * sh, s2 = sh * sh, s2l = __builtin_fma(sh, sh, -s2);
    double uh = t * s2, ul = __builtin_fma(t, s2, -uh) + t * s2l;   /* 2 sh^3 */
    double u3 = uh * (1.0 / 3.0);
    double u3l = __builtin_fma(uh, 1.0 / 3.0, -u3) + uh * 1.850371707708594e-17;  /* 1/3 - fl(1/3) */
    double s4 = s2 * s2, s8 = s4 * s4, Q, H2, e2, H3, e3, l, hi;
    {
        double p0 = __builtin_fma(1.0 / 7.0, s2, 1.0 / 5.0);
        double p1 = __builtin_fma(1.0 / 11.0, s2, 1.0 / 9.0);
        double p2 = __builtin_fma(1.0 / 15.0, s2, 1.0 / 13.0);
        double p3 = __builtin_fma(1.0 / 19.0, s2, 1.0 / 17.0);
        double p4 = __builtin_fma(1.0 / 23.0, s2, 1.0 / 21.0);
        double q0 = __builtin_fma(p1, s4, p0), q1 = __builtin_fma(p3, s4, p2);
        Q = s2 * __builtin_fma(p4, s8 * s8, __builtin_fma(q1, s8, q0));
    }
    /* |k ln2| >= |2 sh| (or k = 0), and |2 sh| > |2 sh^3 / 3| */
    psik__fm_fast_two_sum(k * PSIK_FM_LN2HI, t, &H2, &e2);
    psik__fm_fast_two_sum(H2, u3, &H3, &e3);
    l = (e2 + e3) + (k * PSIK_FM_LN2LO
                     + (u3l + (ul * (1.0 / 3.0) + (__builtin_fma(sl2, s2, sl2) + uh * Q))));
    hi = H3 + l;
    *lo = l - (hi - H3);
    return hi;
}
#else
/* The same without fused multiply-adds (portable, SSE4.2), from a table:
 * c = j/128 the nearest multiple of 1/128 (z - c exact, Sterbenz); r =
 * (z - c)/c as rh + rl (rh = (z - c) * fl(1/c) from the table, rl from the
 * exact remainder: c has 8 bits; xl enters rl as xl 2^-k (1 - rh) / c,
 * to second order, with no division); log z = log c + log1p(r) with log c in two
 * parts from the table and log1p(r) = r - r^2/2 + r^3 (1/3 - r/4 + ... +
 * r^4/7) for |r| <= 0.0055 (truncation below 2^-63). */
PSIK_FM double psik__fm_log_dd_nrm(double x, double xl, double *lo)
{
    double k, sk, z = psik__fm_log_split(x, &k, &sk);
    double jd = z * 128.0 + PSIK_FM_SHIFT;
    uint64_t j = (psik__fm_bits(jd) - psik__fm_bits(PSIK_FM_SHIFT)) - PSIK_FM_LOG_J0;
    double c = (jd - PSIK_FM_SHIFT) * (1.0 / 128.0);
    double d = z - c;                                     /* exact */
    double invc = psik__fm_log_tab[3 * j];
    double lch = psik__fm_log_tab[3 * j + 1], lcl = psik__fm_log_tab[3 * j + 2];
    double rh = d * invc, ph, pl, rl, r2, P, H, e1, H2, e2, l, hi;
    psik__fm_two_prod(rh, c, &ph, &pl);                  /* rh c exactly */
    rl = ((d - ph) - pl) * invc + ((xl * sk) * invc) * (1.0 - rh);
    r2 = rh * rh;
    P = (1.0 / 3.0 - rh * 0.25) + r2 * ((0.2 - rh * (1.0 / 6.0)) + r2 * (1.0 / 7.0));
    /* |lch| >= |rh| (lch = 0 at c = 1) and |k ln2| >= |H|: the fast sums */
    psik__fm_fast_two_sum(lch, rh, &H, &e1);
    psik__fm_fast_two_sum(k * PSIK_FM_LN2HI, H, &H2, &e2);
    l = e2 + (e1 + (k * PSIK_FM_LN2LO + (lcl + (rl + (r2 * (rh * P) - 0.5 * r2)))));
    hi = H2 + l;
    *lo = l - (hi - H2);
    return hi;
}
#endif

/* log(x) as hi + lo for finite x > 0, normal or subnormal (scaled by
 * 2^54 first), with psik__fm_log_dd_nrm's error. */
PSIK_FM double psik__fm_log_dd(double x, double *lo)
{
    int sub = x < DBL_MIN;
    double xs = psik__fm_sel(sub, x * 18014398509481984.0, x);    /* 2^54 */
    double koff = psik__fm_sel(sub, 54.0 * PSIK_FM_LN2HI, 0.0);
    double koffl = psik__fm_sel(sub, 54.0 * PSIK_FM_LN2LO, 0.0);
    double l0, h0 = psik__fm_log_dd_nrm(xs, 0.0, &l0), hi, t;
    psik__fm_fast_two_sum(h0, -koff, &hi, &t);   /* |h0| > 671 > koff when sub */
    *lo = t + (l0 - koffl);
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

/* log1p(x) for x > -1, finite: log(u + e) with u = fl(1 + x) and e the
 * rounding error of that sum (exact by Sterbenz on both sides of 1). */
PSIK_FM double psik__fm_log1p_fin(double x)
{
    double u = 1.0 + x, lo, hi;
    double e1 = 1.0 - (u - x), e0 = x - (u - 1.0);
    double e = psik__fm_sel(x >= 1.0, e1, e0);
    hi = psik__fm_log_dd_nrm(u, e, &lo);
    return hi + lo;
}

/* log1p(x) as hi + lo for finite x > -1 (relative error about 2^-60). */
PSIK_FM double psik__fm_log1p_dd(double x, double *lo)
{
    double u = 1.0 + x, l, hi, s, t;
    double e1 = 1.0 - (u - x), e0 = x - (u - 1.0);
    double e = psik__fm_sel(x >= 1.0, e1, e0);
    hi = psik__fm_log_dd_nrm(u, e, &l);
    psik__fm_fast_two_sum(hi, l, &s, &t);
    *lo = t;
    return s;
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
