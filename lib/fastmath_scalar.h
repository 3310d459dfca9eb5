/* fastmath_scalar.h - exp, expm1, log and log1p for one point at a time
 * (lib/point_vg.c), built for a short dependency chain rather than for the
 * vectoriser (not installed).
 *
 * fastmath.h serves the vector loops: no table lookups where fused
 * multiply-adds exist (a lookup becomes a gather), a degree-14 polynomial
 * instead, and selects through the bits of doubles. One point at a time
 * pays for those in latency. The functions here use tables (a load costs
 * what one multiply does and runs beside the arithmetic), short
 * polynomials, and reductions that are exact by construction:
 *
 *   log: x = 2^k z, z in [0.709, 1.418) from the bits; the piece i of z
 *        (bits 45..51 of bits(x) - OFF) gives 1/c with 8 significant bits
 *        and log c = lch + lcl (fastmath_scalar_tables.h, generated and
 *        checked by tools/gen_scalar_tables.py); r = z/c - 1 = z (1/c) - 1
 *        is exact in one fused multiply-add (|r| <= 0.0059 and at most 53
 *        significant bits), or in two exact steps without one; log1p(r)
 *        to r^8 (truncation below 2^-62 relative); k ln2_hi + lch exact.
 *        The result is a pair hi + lo that is not renormalised (that would
 *        cost two more dependent additions): lo holds -r^2/2 and smaller
 *        terms. Absolute error below 2^-61 (relative, below 2^-58, near
 *        x = 1, where c = 1).
 *   exp: k = round(128 x / ln 2), r = x - k ln2/128 + lo (|r| <= 0.0029;
 *        x - k ln2_hi/128 exact, the rest rounded once: below 2^-62), e^r
 *        - 1 to r^6 (truncation below 2^-62), 2^(j/128) from fastmath.h's
 *        table in two parts, scaled by 2^e before the last two operations.
 *        The low part may be as large as the log's (it enters r before
 *        the polynomial). For -700 <= x <= 708 (every caller's range):
 *        within 1 ulp (the final rounding plus about 2^-60).
 *   expm1 (with exp, one reduction): (2^e thi - 1) + (2^e thi (e^r - 1) +
 *        2^e tlo + the reduction's rounding error), the first difference
 *        exact where cancellation could hurt.
 *   log1p(exp(x)) (x <= 0, the softplus step of the van Genuchten point):
 *        one reduction x = -q ln2/32 + rho, log1p(2^(-q/32)) from a table
 *        (or a series past it), and the rest as a series in rho whose
 *        coefficients are the cumulants of a Bernoulli variable; see the
 *        function.
 *
 * Measured against glibc's long double functions by
 * tests/unit/test_fastmath_scalar.c, built with and without fused
 * multiply-adds: log pair 2^-64 absolute (the reference's limit), exp 0.74
 * ulp, expm1 1.12 ulp, log1p 0.87 ulp, log1p(exp) pair 2^-57.7 relative.
 *
 * Selects: psik__sc_sel_le(x, y, a, b) = x <= y ? a : b, a plain ternary
 * that compilers make a blend or a branch as they judge. Blends forced
 * through vector masks measured slower here (AMD Zen 5, GCC 12: 46 against
 * 40 ns a vgm point on make bench's heads, and no faster on heads in
 * random order without repetition), so the choice is left to the
 * compiler; lib/point_vg.c forms the wet/dry sign with copysign instead,
 * where the branch GCC chose cost 10 % on random heads.
 */
#ifndef PSIK_FASTMATH_SCALAR_H
#define PSIK_FASTMATH_SCALAR_H

#include "fastmath.h"
#include "fastmath_scalar_tables.h"


/* a b + c: one rounding where the instruction set has fused multiply-adds
 * (the FMA variants), two elsewhere; every use tolerates either. */
#if defined(__FMA__)
#  define PSIK_SC_MAD(a, b, c) __builtin_fma((a), (b), (c))
#else
#  define PSIK_SC_MAD(a, b, c) ((a) * (b) + (c))
#endif

/* x <= y ? a : b (see the note above; psik__fm_sel's bit operations take
 * a round trip through integer registers outside a vector loop). */
PSIK_FM double psik__sc_sel_le(double x, double y, double a, double b)
{
    return x <= y ? a : b;
}


/* The log core: log(x + xl) as hi + lo for normal finite x > 0 and |xl|
 * <= ulp(x) (xl enters as xl 2^-k (1/c) (1 - r); has_xl = 0, a constant
 * after inlining, drops that term). The pair is not
 * renormalised: hi = k ln2_hi + log c + r and lo carries the rest (-r^2/2
 * + r^3/3 - ..., |lo| < 1.8e-5), which every caller folds in before
 * rounding (psik__sc_exp_dd takes such a low part exactly); hi + lo has
 * absolute error below 2^-60, and relative near x = 1 (where c = 1). */
PSIK_FM double psik__sc_log_core(double x, double xl, int has_xl, double *lo)
{
    uint64_t ix = psik__fm_bits(x);
    uint64_t tmp = ix - PSIK_SC_LOG_OFF;
    uint64_t i = (tmp >> 45) & 127u;
    uint64_t kk = (tmp + 0x8000000000000000ULL) >> 52;              /* k + 2048 */
    double z = psik__fm_double(ix - (tmp & 0xfff0000000000000ULL));
    double kd = (double)((int64_t)kk - 2048);
    double sk = psik__fm_double((3071u - kk) << 52);                 /* 2^-k */
    const double *t = psik__sc_log_tab + 3 * i;
    double invc = t[0], lch = t[1], lcl = t[2];
    double r, A, B, e1, ar2, r2, P, cr;
#if defined(__FMA__)
    r = __builtin_fma(z, invc, -1.0);                                /* exact */
#else
    {   /* z = zh + zl with zh of 45 bits: zh/c - 1 and zl/c exact */
        double zh = psik__fm_double(psik__fm_bits(z) & 0xffffffffffffff00ULL);
        r = (zh * invc - 1.0) + (z - zh) * invc;   /* one rounding, below 2^-61 */
    }
#endif
    A = kd * PSIK_SC_LN2HI + lch;                                    /* exact */
    /* ordered: |A| >= |r| (A = 0, or |lch| >= |r| for k = 0, checked by
     * the table's generator, or |A| > 0.34) */
    psik__fm_fast_two_sum(A, r, &B, &e1);
    ar2 = (-0.5 * r) * r;
    r2 = r * r;
    P = PSIK_SC_MAD(r2 * r2, PSIK_SC_MAD(r, -0.125, 1.0 / 7.0),
                    PSIK_SC_MAD(r2, PSIK_SC_MAD(r, -1.0 / 6.0, 0.2),
                                PSIK_SC_MAD(r, -0.25, 1.0 / 3.0)));
    cr = has_xl ? ((xl * sk) * invc) * (1.0 - r) : 0.0;
    *lo = ((e1 + ar2) + PSIK_SC_MAD(kd, PSIK_SC_LN2LO, lcl)) + PSIK_SC_MAD(r * r2, P, cr);
    return B;
}

/* log(x) as hi + lo (psik__sc_log_core's pair), normal finite x > 0. */
PSIK_FM double psik__sc_log_dd(double x, double *lo)
{
    return psik__sc_log_core(x, 0.0, 0, lo);
}

/* log1p(x) as hi + lo (the same pair) for finite x > -1 with 1 + x
 * normal: log(u + e), u = fl(1 + x), e its exact rounding error. */
PSIK_FM double psik__sc_log1p_dd(double x, double *lo)
{
    double u = 1.0 + x;
    double e1 = 1.0 - (u - x), e0 = x - (u - 1.0);
    double e = psik__sc_sel_le(1.0, x, e1, e0);
    return psik__sc_log_core(u, e, 1, lo);
}

/* log1p(x) rounded to double (same domain). */
PSIK_FM double psik__sc_log1p(double x)
{
    double lo, hi = psik__sc_log1p_dd(x, &lo);
    return hi + lo;
}

#define PSIK_SC_INVLN2_128 184.66496523378731    /* 128 / ln 2 */

/* The reduction both exp steps share: x + lo = k ln2 / 2^b + r0 + w with k
 * = round(x inv), inv = 2^b / ln 2; r0 = x - k ln2_hi / 2^b
 * exact (ln2_hi has 32 bits, |k| < 2^17), w = lo - k ln2_lo / 2^b; ku = k +
 * 1023 2^b, so that ku >> b is the biased exponent of 2^floor(k / 2^b)
 * and ku & (2^b - 1) the table index. */
PSIK_FM void psik__sc_reduce(double x, double lo, double inv, unsigned b, uint64_t *ku,
                             double *k, double *r0, double *w)
{
#if defined(__FMA__)
    double sh = __builtin_fma(x, inv, PSIK_FM_SHIFT);
#else
    double sh = x * inv + PSIK_FM_SHIFT;
#endif
    double kd = sh - PSIK_FM_SHIFT;
    *ku = psik__fm_bits(sh) - psik__fm_bits(PSIK_FM_SHIFT) + ((uint64_t)1023u << b);
    *k = kd;
    *r0 = PSIK_SC_MAD(-kd, PSIK_FM_LN2HI / (double)(1u << b), x);
    *w = PSIK_SC_MAD(-kd, PSIK_FM_LN2LO / (double)(1u << b), lo);
}

/* The exp core at x + lo, |x| <= 708, |lo| <= 1e-4 (any pair the log core
 * or a product of one gives): k = round(128 x / ln 2), r = (x - k ln2_hi /
 * 128) + (lo - k ln2_lo / 128) with the first part exact; e^r = 1 + s;
 * the result is (2^e thi) + (2^e thi) s + 2^e tlo with sh = 2^e thi and
 * sl = 2^e tlo exact scalings (e is in the normal range). */
PSIK_FM void psik__sc_exp_core(double x, double lo, double *sh_o, double *sl_o, double *s_o,
                               double *rl_o)
{
    uint64_t ku;
    double k, r0, w, r, r2, p1, p2, p3, P, bb;
    psik__sc_reduce(x, lo, PSIK_SC_INVLN2_128, 7, &ku, &k, &r0, &w);
    r = r0 + w;
    uint64_t j = ku & 127u;
    double scale = psik__fm_double((ku >> 7) << 52);              /* 2^e, normal */
    r2 = r * r;
    p1 = PSIK_SC_MAD(r, 1.0 / 6.0, 0.5);
    p2 = PSIK_SC_MAD(r, 1.0 / 120.0, 1.0 / 24.0);
    p3 = PSIK_SC_MAD(r2, 1.0 / 720.0, p2);
    P = PSIK_SC_MAD(r2, p3, p1);
    *s_o = PSIK_SC_MAD(r2, P, r);                                 /* e^r - 1 */
    bb = r - r0;
    *rl_o = (r0 - (r - bb)) + (w - bb);     /* r0 + w - r exactly (for expm1) */
    *sh_o = psik__fm_exp_tab[2 * j] * scale;
    *sl_o = psik__fm_exp_tab[2 * j + 1] * scale;
}

/* exp(x + lo) for -700 <= x <= 708 and lo as psik__sc_exp_core takes it
 * (below -700 the table's low part, scaled, becomes subnormal and the
 * result near 2^-1022 can be 1.05 ulp off). */
PSIK_FM double psik__sc_exp_dd(double x, double lo)
{
    double sh, sl, s, rl;
    psik__sc_exp_core(x, lo, &sh, &sl, &s, &rl);
    (void)rl;
    return sh + PSIK_SC_MAD(sh, s, sl);
}

#define PSIK_SC_32_LN2 46.166241308446828    /* 32 / ln 2 */

/* log1p(exp(x + xl)) as hi + *lo, and *ea = exp(x + xl), for -700 <= x <=
 * 0 and |xl| <= ulp(x) (the softplus of a van Genuchten exponent; one step
 * where log1p(exp(.)) would be two on the dependency chain).
 *
 * x + xl = -q ln2/32 + rho, |rho| <= ln2/64 (q = round(-32 x / ln 2),
 * rho formed as the exp core forms its r). With c = 2^(-q/32) and v = c /
 * (1 + c),
 *   log1p(e^(x+xl)) = log1p(c) + log(1 - v + v e^rho)
 * and the second term is the cumulant generating function of a Bernoulli
 * variable of mean v at rho: sum over j of kappa_j rho^j / j!, kappa_1 = v,
 * kappa_2 = w = v (1 - v), kappa_3 = w d (d = 1 - 2v), kappa_4 = w (1 -
 * 6w), kappa_5 = w d (1 - 12w), kappa_6 = w (1 - 30w + 120w^2), kappa_7 = w
 * d (1 - 60w + 360w^2) (checked against mpmath's Taylor coefficients by
 * tests/unit/test_fastmath_scalar.c's reference, which is independent of
 * them); to rho^7 the truncation is below 2^-66 relative (|kappa_8| <=
 * 1.07, and kappa_8 ~ v where v is small). log1p(c) and v come from the
 * table for c >= 2^-14 (q < PSIK_SC_L1PE_N) and from series in c = ch + cl
 * (2^(-q/32) from fastmath.h's exp table) below: log1p(c) = c - c^2/2 +
 * c^3/3 - c^4/4 + c^5/5 (next term below 2^-70 relative), v = c (1 - c (1 -
 * c (1 - c))) (error c^4 <= 2^-56 relative to v, which enters the result
 * multiplied by |rho| <= 2^-6.5). Every term beyond log1p(c) is at most
 * 1.1 % of the result, so the sum has no cancellation, and the result
 * keeps its relative accuracy down to x = -700 (where it equals e^x): hi +
 * lo within 2^-57 relative (measured 2^-57.7, just past the table's end).
 * e^(x+xl) = c e^rho with e^rho - 1 to rho^7, within 1 ulp. */
PSIK_FM double psik__sc_log1p_exp_dd(double x, double xl, double *ea, double *lo)
{
    /* k = round(32 x / ln 2) = -q; ku = 32 (E + 1023) + j, c = 2^E 2^(j/32) */
    uint64_t ku, iq;
    double k, r0, w0, rho;
    psik__sc_reduce(x, xl, PSIK_SC_32_LN2, 5, &ku, &k, &r0, &w0);
    iq = (1023u << 5) - ku;                                           /* q >= 0 */
    rho = r0 + w0;
    uint64_t j = ku & 31u;
    double scale = psik__fm_double((ku >> 5) << 52);                 /* 2^E, normal */
    double ch = psik__fm_exp_tab[8 * j] * scale, cl = psik__fm_exp_tab[8 * j + 1] * scale;
    /* row min(q, N - 1), in bounds; past the table the series below
     * replace its values */
    const double *t = psik__sc_l1pe_tab + 3 * (iq < PSIK_SC_L1PE_N ? iq : PSIK_SC_L1PE_N - 1);
    double c2 = ch * ch;
    double sl = PSIK_SC_MAD(c2, PSIK_SC_MAD(ch, PSIK_SC_MAD(ch, PSIK_SC_MAD(ch, 0.2, -0.25),
                                                            1.0 / 3.0), -0.5), cl);
    double sv = ch * PSIK_SC_MAD(-ch, PSIK_SC_MAD(-ch, PSIK_SC_MAD(-ch, 1.0, 1.0), 1.0), 1.0);
    /* the table for q < N (c >= 2^-14); -k = q as a double */
    double lh = psik__sc_sel_le(-k, PSIK_SC_L1PE_N - 1.0, t[0], ch);
    double ll = psik__sc_sel_le(-k, PSIK_SC_L1PE_N - 1.0, t[1], sl);
    double v = psik__sc_sel_le(-k, PSIK_SC_L1PE_N - 1.0, t[2], sv);
    double w = PSIK_SC_MAD(-v, v, v), d = PSIK_SC_MAD(-2.0, v, 1.0);
    double wd = w * d;
    double k2 = 0.5 * w;
    double k3 = wd * (1.0 / 6.0);
    double k4 = w * PSIK_SC_MAD(w, -0.25, 1.0 / 24.0);
    double k5 = wd * PSIK_SC_MAD(w, -0.1, 1.0 / 120.0);
    double k6 = w * PSIK_SC_MAD(w, PSIK_SC_MAD(w, 1.0 / 6.0, -1.0 / 24.0), 1.0 / 720.0);
    double k7 = wd * PSIK_SC_MAD(w, PSIK_SC_MAD(w, 1.0 / 14.0, -1.0 / 84.0), 1.0 / 5040.0);
    double r2 = rho * rho, r4 = r2 * r2;
    double P = PSIK_SC_MAD(r2, PSIK_SC_MAD(r2, PSIK_SC_MAD(rho, k7, k6), PSIK_SC_MAD(rho, k5, k4)),
                           PSIK_SC_MAD(rho, k3, k2));
    double X = PSIK_SC_MAD(rho, v, PSIK_SC_MAD(r2, P, ll));
    double s = PSIK_SC_MAD(r4, PSIK_SC_MAD(r2, PSIK_SC_MAD(rho, 1.0 / 5040.0, 1.0 / 720.0),
                                           PSIK_SC_MAD(rho, 1.0 / 120.0, 1.0 / 24.0)),
                           PSIK_SC_MAD(r2, PSIK_SC_MAD(rho, 1.0 / 6.0, 0.5), rho));
    double hi = lh + X;
    *lo = (lh - hi) + X;                 /* ordered: |X| <= 0.011 lh */
    *ea = ch + PSIK_SC_MAD(ch, s, cl);
    return hi;
}

/* exp(x + lo) and expm1(x + lo) for -700 <= x <= 0: expm1 = (sh - 1) +
 * (sh s + (sl + sh rl)), rl the rounding error of the reduced argument
 * (worth half an ulp of expm1 near 0 otherwise; sl s is below 2^-60 of
 * the result and left out). Where k = 0, sh = 1 and sl = 0, so expm1 = s
 * + rl in one rounding. Elsewhere |x| >= ln 2 / 256, sh - 1 is exact (sh in
 * [1/2, 1)) or rounded by at most half an ulp of the result (sh < 1/2, the
 * result near -1), and |sh s| <= 2^-8.5 is at most as large as the result:
 * the two remaining roundings keep the error near 1 ulp (measured by
 * tests/unit/test_fastmath_scalar.c), without the exact sums a full
 * double-double expm1 would add to the dependency chain. */
PSIK_FM void psik__sc_exp_expm1_dd(double x, double lo, double *e, double *em1)
{
    double sh, sl, s, rl;
    psik__sc_exp_core(x, lo, &sh, &sl, &s, &rl);
    *e = sh + PSIK_SC_MAD(sh, s, sl);
    *em1 = (sh - 1.0) + PSIK_SC_MAD(sh, s, PSIK_SC_MAD(sh, rl, sl));
}

#endif
