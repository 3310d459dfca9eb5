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

/* Continued fraction of B_x(a,b) / (x^a y^b / a), modified Lentz.
 * Converges quickly for x < (a+1)/(a+b+2), slowly but surely elsewhere. */
static double beta_cf(double a, double b, double x, int maxit)
{
    const double tiny = 1e-300;
    double qab = a + b, qap = a + 1.0, qam = a - 1.0;
    double c = 1.0, d = 1.0 - qab * x / qap, h;
    int k;
    if (fabs(d) < tiny)
        d = tiny;
    d = 1.0 / d;
    h = d;
    for (k = 1; k <= maxit; k++) {
        double kk = (double)k, k2 = 2.0 * kk, aa, del;
        aa = kk * (b - kk) * x / ((qam + k2) * (a + k2));
        d = 1.0 + aa * d;
        if (fabs(d) < tiny) d = tiny;
        c = 1.0 + aa / c;
        if (fabs(c) < tiny) c = tiny;
        d = 1.0 / d;
        h *= d * c;
        aa = -(a + kk) * (qab + kk) * x / ((a + k2) * (qap + k2));
        d = 1.0 + aa * d;
        if (fabs(d) < tiny) d = tiny;
        c = 1.0 + aa / c;
        if (fabs(c) < tiny) c = tiny;
        d = 1.0 / d;
        del = d * c;
        h *= del;
        if (fabs(del - 1.0) < 0.5 * DBL_EPSILON)
            break;
    }
    return h;
}

/* Complete beta B(a,b), a, b > 0 finite.
 * Method: B = x0^a y0^b [cf(a,b,x0)/a + cf(b,a,y0)/b] at the split point
 * x0 = (a+1)/(a+b+2) of the two continued fractions: a sum of two positive
 * terms, each a few ulp, and consistent with psik__ibeta so that
 * I_x + (1 - I_x) = 1 to rounding. Used once per model in psik_init. */
PSIK_HIDDEN double psik__beta(double a, double b)
{
    double x0 = (a + 1.0) / (a + b + 2.0);
    double y0 = (b + 1.0) / (a + b + 2.0);
    double front = exp(a * log(x0) + b * log(y0));
    return front * (beta_cf(a, b, x0, 2000) / a + beta_cf(b, a, y0, 2000) / b);
}

/* Regularized incomplete beta I_x(a,b), a, b > 0, 0 <= x <= 1, y = 1 - x
 * (given separately so the caller keeps the digits of whichever is small),
 * front = x^a y^b / B(a,b).
 * Special cases: x = 0 -> 0; y = 0 -> 1.
 * Method: continued fraction on the side x < (a+1)/(a+b+2) (else on
 * I_y(b,a) = 1 - I_x(a,b)); the small one of I and 1 - I is computed
 * directly, the other as 1 minus it. Error: a few ulp in the directly
 * computed value plus the error of front. */
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
        if (v > 1.0) v = 1.0;
        *comp = 1.0 - v;
        return v;
    }
    v = front * beta_cf(b, a, y, 500) / b;
    if (v > 1.0) v = 1.0;
    *comp = v;
    return 1.0 - v;
}
