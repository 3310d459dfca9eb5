/* special.c - special functions: incomplete beta, two-part exponents.
 *
 * Each function lists its special cases first, then the method and the
 * error it achieves (measured by tests/unit/test_special.c against mpmath).
 */
#include "psik_internal.h"

#include <float.h>
#include <math.h>

/* Split num/den into hi + lo, hi = fl(num/den), lo the rounding remainder
 * divided by den (exact up to one more rounding: |error| <= 2^-104 |q|). */
PSIK_HIDDEN void psik__recip2(double num, double den, double *hi, double *lo)
{
    double q = num / den;
    *hi = q;
    *lo = fma(-q, den, num) / den;
}

/* x^(e_hi + e_lo).
 * Special cases: x = 0, x = inf, e_lo = 0 -> pow(x, e_hi).
 * Method: pow(x, e_hi) (glibc: < 1 ulp) times 1 + e_lo log x, the first
 * order term of exp(e_lo log x); |e_lo log x| < 1e-13 for the exponents
 * used here, so the neglected term is below 1e-26. Error < 1.5 ulp, and,
 * unlike pow(x, fl(e)), independent of |log x|. */
PSIK_HIDDEN double psik__pow2(double x, double e_hi, double e_lo)
{
    double p = pow(x, e_hi);
    if (e_lo == 0.0 || x == 0.0 || isinf(x) || p == 0.0 || isinf(p))
        return p;
    return p + p * (e_lo * log(x));
}

/* Partial numerator d_j of the continued fraction
 * B_x(a,b) = (x^a y^b / a) / (1 + d_1/(1 + d_2/(1 + ...))):
 * d_(2i+1) = -(a+i)(a+b+i) x / ((a+2i)(a+2i+1)),
 * d_(2i)   = i (b-i) x / ((a+2i-1)(a+2i)). */
static double beta_d(double a, double b, double x, int j)
{
    double i = (double)(j / 2);
    if (j % 2 == 1)
        return -(a + i) * (a + b + i) * x / ((a + 2.0 * i) * (a + 2.0 * i + 1.0));
    return i * (b - i) * x / ((a + 2.0 * i - 1.0) * (a + 2.0 * i));
}

/* 1/(1 + d_1/(1 + d_2/(1 + ...))) for the incomplete beta function.
 * Method: modified Lentz forward only to find the depth at which the
 * fraction has converged, then evaluation backward from that depth (plus
 * a margin), where rounding errors are damped instead of accumulated:
 * a few ulp even when hundreds of terms are needed. Converges quickly for
 * x < (a+1)/(a+b+2), slowly but surely for x < 1. */
static double beta_cf(double a, double b, double x, int maxit)
{
    const double tiny = 1e-300;
    double c = 1.0, d = 0.0, t;   /* Lentz: C0 = b0 = 1, D0 = 0 */
    int j, depth = 2 * maxit;
    for (j = 1; j <= 2 * maxit; j++) {
        double aa = beta_d(a, b, x, j), del;
        d = 1.0 + aa * d;
        if (fabs(d) < tiny) d = tiny;
        c = 1.0 + aa / c;
        if (fabs(c) < tiny) c = tiny;
        d = 1.0 / d;
        del = d * c;
        if (fabs(del - 1.0) < 0.25 * DBL_EPSILON) {
            depth = j;
            break;
        }
    }
    depth += 8;
    t = 0.0;
    for (j = depth; j >= 1; j--)
        t = beta_d(a, b, x, j) / (1.0 + t);
    return 1.0 / (1.0 + t);
}

static double beta_by_fractions(double a, double b);

/* Complete beta B(a,b), a, b > 0 finite.
 * Method: Gamma(a) Gamma(b) / Gamma(a+b) in long double where that type is
 * wider than double; otherwise (and as a fallback)
 * B = x0^a y0^b [cf(a,b,x0)/a + cf(b,a,y0)/b] at the split point
 * x0 = (a+1)/(a+b+2) of the two continued fractions: a sum of two positive
 * terms, each a few ulp (8 ulp measured). Used once per model in psik_init. */
PSIK_HIDDEN double psik__beta(double a, double b)
{
#if LDBL_MANT_DIG >= 64
    /* With an extended long double, tgammal carries 11+ spare bits: the
     * quotient rounds to the correctly rounded B(a,b) but in rare cases
     * (1 ulp measured; tests/unit/test_ibeta.c). */
    long double la = a, lb = b;
    double v = (double)(tgammal(la) * tgammal(lb) / tgammal(la + lb));
    if (isfinite(v) && v > 0.0)
        return v;
#endif
    return beta_by_fractions(a, b);
}

/* B(a,b) from the two continued fractions (see psik__beta). */
static double beta_by_fractions(double a, double b)
{
    double x0 = (a + 1.0) / (a + b + 2.0), y0;
    double front;
    /* x0 + y0 = 1 exactly: the larger one is rounded, the smaller exact
     * (1 - y0 is exact for y0 >= 1/2) */
    y0 = 1.0 - x0;
    if (x0 < 0.5)
        x0 = 1.0 - y0;
    front = pow(x0, a) * pow(y0, b);
    return front * (beta_cf(a, b, x0, 2000) / a + beta_cf(b, a, y0, 2000) / b);
}

/* sum_k (1-b)_k x^k / (k! (a+k)), so that B_x(a,b) = x^a times it: for
 * b < 1 every term is positive, so the sum keeps its relative accuracy
 * (compensated; the term recurrence adds ~sqrt(k) ulp to late, small
 * terms). Used past the split point where I is small (b << 1), x <= 0.97:
 * at most ~1300 terms. */
static double beta_series(double a, double b, double x)
{
    double t = 1.0, sum = 1.0 / a, c = 0.0;
    int k;
    for (k = 0; k < 4000; k++) {
        double term, y2, s2;
        t *= ((double)k + 1.0 - b) / ((double)k + 1.0) * x;
        term = t / (a + (double)k + 1.0);
        y2 = term - c;
        s2 = sum + y2;
        c = (s2 - sum) - y2;
        sum = s2;
        if (term < 0.25 * DBL_EPSILON * sum)
            break;
    }
    return sum;
}

/* Regularized incomplete beta I_x(a,b), a, b > 0, 0 <= x <= 1, y = 1 - x
 * (given separately so the caller keeps the digits of whichever is small),
 * front = x^a y^b / B(a,b).
 * Special cases: x = 0 -> 0; y = 0 -> 1.
 * Method: continued fraction on the side x < (a+1)/(a+b+2) (else on
 * I_y(b,a) = 1 - I_x(a,b)); when that gives the larger of I and 1 - I, the
 * smaller is computed by its own (slower) fraction rather than as 1 minus
 * the other, so both keep their relative accuracy. Error: a few ulp plus
 * the error of front (measured in tests/unit/test_ibeta.c). */
PSIK_HIDDEN double psik__ibeta(double a, double b, double x, double y,
                               double front, double *comp)
{
    double v;
    if (x <= 0.0) {
        *comp = 1.0;
        return 0.0;
    }
    if (y <= 0.0) {
        *comp = 0.0;
        return 1.0;
    }
    if (x < (a + 1.0) / (a + b + 2.0)) {
        v = front * beta_cf(a, b, x, 500) / a;
        *comp = 1.0 - v;
        return v;
    }
    v = front * beta_cf(b, a, y, 500) / b;     /* 1 - I */
    *comp = v;
    if (v > 0.25 && b < 1.0 && x <= 0.97)
        return front * beta_series(a, b, x) / pow(y, b);
    return 1.0 - v;
}

/* ------------------------------------------------------------------
 * The normal distribution and the inverse complementary error function.
 *
 * Arguments and results that feed a further exponential are carried as
 * two doubles (hi + lo) so that the rounding of z or x does not cost
 * |z|^2 ulp in exp(-z^2/2): the lo part enters through the first-order
 * term, which is exact to far below the last place because |lo| <= ulp(hi).
 */

/* 1/sqrt(2), sqrt(2), 1/sqrt(2 pi), 2/sqrt(pi) and ln sqrt(2 pi), each as
 * hi + lo (hi the correctly rounded double). */
#define RSQRT2_HI  0.70710678118654757
#define RSQRT2_LO  -4.8336466567264567e-17
#define SQRT2_HI   1.4142135623730951
#define SQRT2_LO   -9.6672933134529135e-17
#define RSQRT2PI_HI 0.3989422804014327
#define RSQRT2PI_LO -2.4923272022777433e-17
#define M_2_SQRTPI_ 1.1283791670955126
#define SQRTPI_2   0.88622692545275805   /* sqrt(pi)/2 */
#define LNSQRT2PI  0.91893853320467278
#define LN2_HI     6.93147180369123816490e-01  /* 32 significant bits */
#define LN2_LO     1.90821492927058770002e-10

/* Terms of the continued fraction below: enough for x >= 3.5 (z >= 5)
 * to the last place (checked against mpmath, tests/unit/test_special.c). */
#define CF_TERMS 40

/* erfcx(x) = exp(x^2) erfc(x) for x >= 3.5: Laplace's continued fraction
 * 1/(sqrt(pi) (x + (1/2)/(x + 1/(x + (3/2)/(x + ...))))), evaluated
 * backward from a fixed depth. All terms positive: no cancellation,
 * error about 1 ulp. */
static double erfcx_cf(double x)
{
    double t = x;
    int k;
    for (k = CF_TERMS; k >= 1; k--)
        t = x + (0.5 * (double)k) / t;
    return 1.0 / (t * 1.7724538509055160);
}

/* exp(-(x^2)) with the square exact: exp(-a) (1 - a_lo), a = fl(x^2). */
static double exp_mx2(double x)
{
    double a = x * x, a_lo;
    if (!(a < 800.0))
        return 0.0;
    a_lo = fma(x, x, -a);
    return exp(-a) * (1.0 - a_lo);
}

/* exp(+(x^2)) likewise (callers keep x^2 below 700). */
static double exp_px2(double x)
{
    double a = x * x, a_lo = fma(x, x, -a);
    return exp(a) * (1.0 + a_lo);
}

/* ln t as hi + lo for 0 < t (finite, subnormals included): t = f 2^k with
 * f in [sqrt(1/2), sqrt(2)); k ln 2 is carried in two parts (k LN2_HI is
 * exact for |k| < 2^21) and ln f, below 0.35 in magnitude, by log1p of
 * the exact f - 1. Absolute error below 1e-16 whatever the size of ln t. */
static void log_dd(double t, double *hi, double *lo)
{
    int k;
    double f = frexp(t, &k), a, b, s;
    if (f < 0.70710678118654752) {
        f *= 2.0;
        k -= 1;
    }
    a = (double)k * LN2_HI;
    b = (double)k * LN2_LO + log1p(f - 1.0);
    s = a + b;
    *hi = s;
    *lo = b - (s - a);
}

/* ln erfc(x) for x > 0, one double (used inside the iteration only). */
static double log_erfc(double x)
{
    if (x < 26.0)
        return log(erfc(x));
    return -(x * x) + log(erfcx_cf(x));
}

/* erfcx(x) for x > 0 (one double). */
static double erfcx_any(double x)
{
    if (x >= 3.5)
        return erfcx_cf(x);
    return erfc(x) * exp_px2(x);
}

/* x = erfcinv(t) as hi + lo for 0 < t <= 1.
 * Method:
 * - t >= 1/2: erfinv of u = 1 - t (exact, Sterbenz), so that x ~ u keeps
 *   its relative accuracy as t -> 1. Start from three terms of the
 *   series of erfinv (relative error < 1e-3 for u <= 1/2), three Newton
 *   steps on erf(x) = u.
 * - t < 1/2: Newton's method on G(x) = ln erfc(x) - ln t. erfc is
 *   log-concave, so from any start the iterates after the first lie right
 *   of the root and fall to it monotonically (no safeguard needed); the
 *   start sqrt(y - ln(pi y)/2), y = -ln t, from the asymptotic expansion,
 *   is within a few percent. The iteration stops when a step is below
 *   1e-9 x (the next one is below 1e-18 x).
 * - Finally one more Newton correction is kept apart as lo: from the
 *   residual erfc(x) - t (erf(x) - u) with the exact square in exp(x^2),
 *   or, for t below 2^-1000 where erfc(x) is near underflow, from the
 *   two-part logarithms of both sides.
 * Error: |hi + lo - erfcinv(t)| is about ulp(t) / |erfc'(x)|, the
 * condition-limited bound; hi alone is within about 1 ulp. */
static void erfcinv_dd(double t, double *hi, double *lo)
{
    double x, d;
    int i;
    if (t >= 0.5) {
        double u = 1.0 - t, u2 = u * u;
        if (u == 0.0) {
            *hi = 0.0;
            *lo = 0.0;
            return;
        }
        x = SQRTPI_2 * u * (1.0 + u2 * (0.26179938779914943 + u2 * 0.14393173084921979));
        for (i = 0; i < 3; i++)
            x -= (erf(x) - u) * SQRTPI_2 * exp_px2(x);
        d = -(erf(x) - u) * SQRTPI_2 * exp_px2(x);
    } else {
        double y = -log(t), lt_hi, lt_lo, x2;
        x2 = y - 0.5 * log(3.14159265358979324 * y);
        x = sqrt(x2 > 0.01 ? x2 : 0.01);
        log_dd(t, &lt_hi, &lt_lo);
        for (i = 0; i < 100; i++) {
            d = SQRTPI_2 * erfcx_any(x) * (log_erfc(x) - lt_hi);
            x += d;
            if (fabs(d) <= 1e-9 * x)
                break;
        }
        if (t >= 0x1p-1000) {
            d = (erfc(x) - t) * SQRTPI_2 * exp_px2(x);
        } else {
            /* G = -x^2 + ln erfcx(x) - ln t, the large parts exactly:
             * -a - lt_hi cancels without rounding (both near -ln t). */
            double a = x * x, a_lo = fma(x, x, -a);
            double g = (-a - lt_hi) - (a_lo + lt_lo) + log(erfcx_cf(x));
            d = SQRTPI_2 * erfcx_cf(x) * g;
        }
    }
    *hi = x + d;
    *lo = d - (*hi - x);
}

/* erfcinv(t): the x with erfc(x) = t.
 * Special cases: NaN -> NaN; t < 0 or t > 2 -> NaN; 0 -> +inf; 2 -> -inf;
 * 1 -> 0.
 * Method: erfcinv_dd above on (0, 1]; on (1, 2) the symmetry
 * erfcinv(t) = -erfcinv(2 - t), with 2 - t exact (Sterbenz), so that the
 * digits of t near 2 (Se near 1) are kept.
 * Error: within 2 ulp of mpmath over (0, 2), subnormal t included
 * (tests/unit/test_special.c prints the largest error measured). */
PSIK_HIDDEN double psik__erfcinv(double t)
{
    double hi, lo;
    if (isnan(t) || t < 0.0 || t > 2.0)
        return NAN;
    if (t == 0.0)
        return INFINITY;
    if (t == 2.0)
        return -INFINITY;
    if (t <= 1.0) {
        erfcinv_dd(t, &hi, &lo);
        return hi + lo;
    }
    erfcinv_dd(2.0 - t, &hi, &lo);
    return -(hi + lo);
}

/* Standard normal density phi(zh + zl) = exp(-z^2/2)/sqrt(2 pi).
 * Special cases: |z| > 40 -> 0 (the value is below the smallest double).
 * Method: z^2 = a + a_lo exactly (fma), the cross term 2 zh zl to first
 * order, exp of the exactly halved hi part, the constant in two parts.
 * Error: about 1.5 ulp. */
PSIK_HIDDEN double psik__normpdf(double zh, double zl)
{
    double a, a_lo, e;
    if (!(fabs(zh) <= 40.0))
        return isnan(zh) ? zh : 0.0;
    a = zh * zh;
    a_lo = fma(zh, zh, -a);
    e = 0.5 * a_lo + zh * zl;
    return exp(-0.5 * a) * ((RSQRT2PI_HI - RSQRT2PI_HI * e) + RSQRT2PI_LO);
}

/* Mills ratio M(z) = Q(z) / phi(z) at z = zh + zl, zh >= 5: the
 * continued fraction 1/(z + 1/(z + 2/(z + 3/(z + ...)))) at zh (all terms
 * positive, about 1 ulp) and the first-order term M'(z) zl, M' = z M - 1. */
static double mills_cf(double zh, double zl)
{
    double t = zh, m;
    int k;
    for (k = CF_TERMS; k >= 1; k--)
        t = zh + (double)k / t;
    m = 1.0 / t;
    return m + (zh * m - 1.0) * zl;
}

/* Upper tail Q(z) = P(Z > z) = erfc(z / sqrt 2) / 2 at z = zh + zl.
 * Special cases: NaN -> NaN; -inf -> 1; +inf -> 0.
 * Method: z >= 5: phi(z) M(z) (both above). z < 5: erfc at x = z/sqrt(2)
 * carried as x_hi + x_lo (the division rounded apart) and the first-order
 * term -2/sqrt(pi) exp(-x_hi^2) x_lo; glibc's erfc is within 1.5 ulp here.
 * Error: about 3 ulp, independent of |z| (no z^2 ulp loss from the
 * rounding of z or z/sqrt 2). */
PSIK_HIDDEN double psik__normq(double zh, double zl)
{
    double xh, xl;
    if (isnan(zh))
        return zh;
    if (zh >= 5.0) {
        if (zh > 40.0)
            return 0.0;
        return psik__normpdf(zh, zl) * mills_cf(zh, zl);
    }
    if (zh < -40.0)
        return 1.0;
    xh = zh * RSQRT2_HI;
    xl = fma(zh, RSQRT2_HI, -xh) + zh * RSQRT2_LO + zl * RSQRT2_HI;
    return 0.5 * (erfc(xh) - M_2_SQRTPI_ * exp_mx2(xh) * xl);
}

/* Mills ratio Q(z)/phi(z) (1 / hazard) at z = zh + zl for -37 <= z:
 * continued fraction for z >= 5, the quotient of the two above otherwise. */
PSIK_HIDDEN double psik__mills(double zh, double zl)
{
    if (zh >= 5.0)
        return mills_cf(zh, zl);
    return psik__normq(zh, zl) / psik__normpdf(zh, zl);
}

/* ln Q(z) as hi + lo at z = zh + zl, for any z > -37 (Q may underflow).
 * z >= 5: -z^2/2 exactly in two parts plus -ln sqrt(2 pi) + ln M(z);
 * z < 5: log of psik__normq. Absolute error a few 1e-16 for z < 5 and
 * about 1e-16 (ln M(z) + 1) otherwise, whatever the size of z^2. */
PSIK_HIDDEN void psik__lognormq(double zh, double zl, double *hi, double *lo)
{
    double a, a_lo, big, small, s;
    if (zh < 5.0) {
        *hi = log(psik__normq(zh, zl));
        *lo = 0.0;
        return;
    }
    a = zh * zh;
    a_lo = fma(zh, zh, -a);
    big = -0.5 * a;
    small = -(0.5 * a_lo + zh * zl) - LNSQRT2PI + log(mills_cf(zh, zl));
    s = big + small;
    *hi = s;
    *lo = small - (s - big);
}

/* The z with Q(z) = p, 0 < p < 1, as hi + lo: z = sqrt(2) erfcinv(2p),
 * or -sqrt(2) erfcinv(2(1 - p)) for p > 1/2 (1 - p exact), with the
 * product by sqrt(2) carried in two parts. Error about ulp(p)/phi(z), the
 * condition-limited bound, in hi + lo. */
PSIK_HIDDEN void psik__normq_inv(double p, double *hi, double *lo)
{
    double xh, xl, zh, zl, sgn = 1.0;
    if (p <= 0.5) {
        erfcinv_dd(2.0 * p, &xh, &xl);
    } else {
        erfcinv_dd(2.0 * (1.0 - p), &xh, &xl);
        sgn = -1.0;
    }
    zh = xh * SQRT2_HI;
    zl = fma(xh, SQRT2_HI, -zh) + xh * SQRT2_LO + xl * SQRT2_HI;
    *hi = sgn * zh;
    *lo = sgn * zl;
}

/* ln(a / b) as hi + lo for finite a, b > 0, without forming a / b (which
 * may overflow): exponents apart, the quotient of the mantissas with its
 * exact remainder. Absolute error about 1e-16 whatever the size. */
PSIK_HIDDEN void psik__log_ratio(double a, double b, double *hi, double *lo)
{
    int ea, eb, k;
    double fa = frexp(a, &ea), fb = frexp(b, &eb);
    double q = fa / fb, r = fma(-q, fb, fa) / fb;   /* fa/fb = q + r */
    double x, y, s;
    k = ea - eb;
    if (q < 0.70710678118654752) {
        q *= 2.0;
        r *= 2.0;
        k -= 1;
    } else if (q > 1.4142135623730951) {
        q *= 0.5;
        r *= 0.5;
        k += 1;
    }
    x = (double)k * LN2_HI;
    y = (double)k * LN2_LO + log1p(q - 1.0) + r / q;
    s = x + y;
    *hi = s;
    *lo = y - (s - x);
}
