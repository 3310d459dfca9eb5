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
static double beta_cf(double a, double b, double x, int maxit, int *converged)
{
    const double tiny = 1e-300;
    double c = 1.0, d = 0.0, t;   /* Lentz: C0 = b0 = 1, D0 = 0 */
    int j, depth = 2 * maxit;
    *converged = 0;
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
            *converged = 1;
            break;
        }
    }
    depth += 8;
    t = 0.0;
    for (j = depth; j >= 1; j--)
        t = beta_d(a, b, x, j) / (1.0 + t);
    return 1.0 / (1.0 + t);
}

/* Complete beta B(a,b), a, b > 0 finite.
 * Method: B = x0^a y0^b [cf(a,b,x0)/a + cf(b,a,y0)/b] at the split point
 * x0 = (a+1)/(a+b+2) of the two continued fractions: a sum of two positive
 * terms, each a few ulp, and consistent with psik__ibeta so that
 * I_x + (1 - I_x) = 1 to rounding. Used once per model in psik_init. */
PSIK_HIDDEN double psik__beta(double a, double b)
{
    double x0 = (a + 1.0) / (a + b + 2.0), y0;
    double front;
    int ok;
    /* x0 + y0 = 1 exactly: the larger one is rounded, the smaller exact */
    if (x0 >= 0.5) {
        y0 = 1.0 - x0;
    } else {
        y0 = 1.0 - x0;
        x0 = 1.0 - y0;
    }
    front = pow(x0, a) * pow(y0, b);
    return front * (beta_cf(a, b, x0, 2000, &ok) / a + beta_cf(b, a, y0, 2000, &ok) / b);
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
    int ok;
    if (x <= 0.0) {
        *comp = 1.0;
        return 0.0;
    }
    if (y <= 0.0) {
        *comp = 0.0;
        return 1.0;
    }
    if (x < (a + 1.0) / (a + b + 2.0)) {
        v = front * beta_cf(a, b, x, 500, &ok) / a;
        *comp = 1.0 - v;
        return v;
    }
    v = front * beta_cf(b, a, y, 500, &ok) / b;     /* 1 - I */
    *comp = v;
    return 1.0 - v;
}
