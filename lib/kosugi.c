/* kosugi.c - the Kosugi (1996) lognormal retention model with Mualem (1976)
 * conductivity: one row of the kinds table (kosugi).
 *
 * Notation: s = -h > 0 suction, s_m = -h_m the median suction, sigma the
 * standard deviation of ln s, z = ln(s/s_m)/sigma, w = z + sigma,
 * Q the upper tail of the standard normal distribution, phi its density,
 * M = Q/phi the Mills ratio and H = 1/M the hazard function.
 *   Se = Q(z),  Kr = Se^L Q(w)^2,  dSe/dh = phi(z)/(sigma s),
 *   dKr/dh = Kr (L H(z) + 2 H(w)) / (sigma s).
 *
 * Method:
 * - z is carried in two doubles: ln(s/s_m) from psik__log_ratio (absolute
 *   error ~1e-16 whatever the size of s/s_m, no quotient formed), then the
 *   division by sigma with its exact remainder. The tail and density take
 *   the two parts (special.c), so no error grows like z^2 ~ |ln s|^2.
 * - Kr = (Se^L Q(w)) Q(w), or (Se^(L/2) Q(w))^2 where Se^L could overflow
 *   (L < 0, Se < 1e-150): Se^(L/2) <= 1/Se stays finite while Se is normal. Where Se
 *   or Q(w) leaves the normal range (z or w above 37) it is computed as
 *   exp(E) with E = (L/2 + 1) ln Q(z) - (z sigma + sigma^2/2)
 *   + ln(M(w)/M(z)), using Q(w)/Q(z) = exp(-(w^2 - z^2)/2) M(w)/M(z) and
 *   z sigma = ln(s/s_m) in two parts: Kr keeps its digits where Se has
 *   underflowed (L near -2 with small sigma gives Kr far above Se).
 * - From Se (inverse, K(theta), D(theta)): z = Q^-1(Se) in two parts
 *   (erfcinv, special.c, with erfcinv(2 - t) = -erfcinv(t) near Se = 1),
 *   s = s_m exp(sigma z) with sigma z in two parts; then the formulas
 *   above at that z, so no round trip through a rounded head.
 * Error: measured against mpmath tables (tests/unit/test_accuracy.c).
 */
#include "psik_internal.h"
#include "fastmath.h"

#include <float.h>
#include <math.h>

#define P_HM  2
#define P_SIG 3
#define P_L   5

#define A_SM   0   /* s_m = -h_m */
#define A_SIG  1   /* sigma */
#define A_L    2   /* l */
#define A_HL   3   /* l / 2 */
#define A_C_HI 4   /* l/2 + 1 in two parts */
#define A_C_LO 5
#define A_S2_HI 6  /* sigma^2 / 2 in two parts */
#define A_S2_LO 7
#define A_LSM_HI 8 /* ln s_m in two parts (for batch_kosugi.c) */
#define A_LSM_LO 9
#define A_RS_HI 10 /* 1/sigma in two parts (for batch_kosugi.c) */
#define A_RS_LO 11

/* The fused point of batch_kosugi.c at suction s (aux as above): returns
 * 2 where it gives every value, 1 where it gives only Se (out->se), 0
 * where it gives none. */
PSIK_HIDDEN int psik__kos_point_fast(const double *a, double s, psik_point *out);
/* psik_eval_batch for this row (batch_kosugi.c). */
PSIK_HIDDEN void psik__kos_batch(const psik_model *m, size_t count, const double *h,
                                 double *theta, double *k, double *capacity,
                                 double *dk_dh);

/* The normal range is left below Q(37.5) ~ 4.6e-308. */
#define Z_FAR 37.0

static void two_sum(double a, double b, double *s, double *e)
{
    double t = a + b, bb = t - a;
    *s = t;
    *e = (a - (t - bb)) + (b - bb);
}

/* Q(zh + zl) in long double when built with -DPSIK_EXTENDED where that
 * type has at least 64 bits (x87; about 20 times slower, 1 ulp instead of
 * up to 4 in K):
 * erfcl at x = z/sqrt 2 with the rounding of x corrected to first order
 * (fmal remainder), so Q carries ~11 bits beyond a double and Se, Kr
 * round once at the end. Elsewhere, and past z = 37, psik__normq. */
#if defined(PSIK_EXTENDED) && LDBL_MANT_DIG >= 64
#  define KOS_LD 1
static long double q_ld(double zh, double zl)
{
    const long double rs = 0.707106781186547524400844362104849039L;   /* 1/sqrt 2 */
    const long double rsqpi = 0.564189583547756286948079451560772586L;  /* 1/sqrt pi */
    long double z = (long double)zh + zl, x, xc;
    if (!(zh <= 37.0))
        return psik__normq(zh, zl);
    x = z * rs;
    xc = fmal(z, rs, -x);
    return 0.5L * erfcl(x) - rsqpi * expl(-x * x) * xc;
}
#else
#  define KOS_LD 0
static long double q_ld(double zh, double zl)
{
    return psik__normq(zh, zl);
}
#endif

static double kos_q(double zh, double zl)
{
    return (double)q_ld(zh, zl);
}

/* Hazard phi/Q at v = vh + vl. */
static double hazard(double vh, double vl)
{
    double q;
    if (vh >= 5.0)
        return 1.0 / psik__mills(vh, vl);
    q = kos_q(vh, vl);
    return q > 0.0 ? psik__normpdf(vh, vl) / q : 0.0;
}

/* c(t) = H(t) - t. For t >= 2 from the tail of the Mills-ratio continued
 * fraction 1/M = t + 1/(t + 2/(t + 3/(t + ...))) (40 terms reach the last
 * place for t >= 5, 120 for t >= 2; measured with mpmath): all terms
 * positive, so c ~ 1/t keeps its relative accuracy where 1/M - t would
 * cancel. Below 2 directly (H/c < 6.4 there, so at most 3 bits go). */
static double hazard_excess(double t)
{
    double T = t;
    int k;
    if (t < 2.0)
        return hazard(t, 0.0) - t;
    for (k = t >= 5.0 ? 40 : 120; k >= 2; k--)
        T = t + (double)k / T;
    return 1.0 / T;
}

/* 8-point Gauss-Legendre rule on [-1, 1] (half the nodes; symmetric). */
static const double gl_x[4] = {0.18343464249564980, 0.52553240991632899,
                               0.79666647741362674, 0.96028985649753623};
static const double gl_w[4] = {0.36268378337836198, 0.31370664587788729,
                               0.22238103445337447, 0.10122853629037626};

/* H(w) - H(z) for w = z + sigma, without cancellation:
 * z >= 5: sigma + c(w) - c(z) (c = H - t, small and slowly varying);
 * H(w) >= 2 H(z): the plain difference (at most one bit lost);
 * otherwise the integral of H' = H (H - t) = H c over [z, w] by the
 * 8-point Gauss-Legendre rule on panels of width <= 1/2 (H is entire in
 * the strip around the real axis that matters; the rule's error is far
 * below the last place at that width). */
static double hazard_diff(double sig, double zh, double zl, double wh, double wl)
{
    double hz, hw, sum = 0.0, half, len;
    int np, p, j;
    if (zh >= 5.0)
        return sig + (hazard_excess(wh) - hazard_excess(zh));
    hz = hazard(zh, zl);
    hw = hazard(wh, wl);
    if (hw >= 2.0 * hz)
        return hw - hz;
    /* integral over [zh, wh], then the ends moved by the lo parts */
    len = wh - zh;
    np = (int)ceil(len / 0.5);
    half = len / (2.0 * np);
    for (p = 0; p < np; p++) {
        double mid = zh + (2.0 * p + 1.0) * half, acc = 0.0;
        for (j = 0; j < 4; j++) {
            double t1 = mid - half * gl_x[j], t2 = mid + half * gl_x[j];
            acc += gl_w[j] * (hazard(t1, 0.0) * hazard_excess(t1) +
                              hazard(t2, 0.0) * hazard_excess(t2));
        }
        sum += acc * half;
    }
    return sum + (hazard(wh, 0.0) * hazard_excess(wh) * wl -
                  hazard(zh, 0.0) * hazard_excess(zh) * zl);
}

/* L H(z) + 2 H(w), the bracket of dKr/dh. For L < 0 it is written as
 * (L + 2) H(z) + 2 (H(w) - H(z)), two terms >= 0 (L >= -2, and 2 + L is
 * exact there), which removes the cancellation between L H(z) and 2 H(w)
 * as L -> -2. */
static double dkr_bracket(const double *a, double zh, double zl, double wh, double wl)
{
    const double L = a[A_L];
    if (L < 0.0)
        return 2.0 * a[A_C_HI] * hazard(zh, zl) + 2.0 * hazard_diff(a[A_SIG], zh, zl, wh, wl);
    return L * hazard(zh, zl) + 2.0 * hazard(wh, wl);
}

/* phi(t) f for t = th + tl far in the wet tail (|t| > 30), where phi
 * itself is near or below the smallest normal double and f (a factor
 * such as 1/(sigma s)) may be large: exp(-t^2/2) is taken as the product
 * of two halves exp(-t^2/4), each normal, with f in between, so that only
 * the last multiplication rounds into the subnormal range. */
static double phi_times(double th, double tl, double f)
{
    double aa = th * th, a_lo = fma(th, th, -aa), e = 0.5 * a_lo + th * tl;
    double half = exp(-0.25 * aa);
    double c = (0.3989422804014327 - 0.3989422804014327 * e) - 2.4923272022777433e-17;
    return (half * (c * f)) * half;
}

/* Everything at z = zh + zl, suction s, with se = Q(z) already known. */
static void kos_core(const double *a, double zh, double zl, double s, long double se_l,
                     psik_point *out)
{
    const double sig = a[A_SIG], se = (double)se_l;
    double wh, wl, kr;
    two_sum(zh, sig, &wh, &wl);
    wl += zl;
    out->se = se;
    out->dse = psik__normpdf(zh, zl) / sig / s;
    if (zh <= 0.0 || (wh <= Z_FAR && zh <= Z_FAR)) {
        if (KOS_LD) {
            /* Se^L Q(w)^2 in long double (no overflow of Se^L there) */
            long double q = q_ld(wh, wl);
            kr = (double)(powl(se_l, (long double)a[A_L]) * q * q);
        } else {
            double qw = psik__normq(wh, wl);
            if (a[A_L] >= 0.0 || se > 1e-150) {
                kr = (pow(se, a[A_L]) * qw) * qw;   /* one rounding fewer than squaring */
            } else {
                double r = pow(se, a[A_HL]) * qw;
                kr = r * r;
            }
        }
    } else {
        /* E = c ln Q(z) - (z sigma + sigma^2/2) + ln(M(w)/M(z)), c = L/2+1 */
        double lq_hi, lq_lo, p, pl, e_hi, e_lo, t, u, mz, mw;
        psik__lognormq(zh, zl, &lq_hi, &lq_lo);
        p = zh * sig;
        pl = fma(zh, sig, -p) + zl * sig;
        e_hi = a[A_C_HI] * lq_hi;
        e_lo = fma(a[A_C_HI], lq_hi, -e_hi) + a[A_C_HI] * lq_lo + a[A_C_LO] * lq_hi;
        two_sum(e_hi, -p, &t, &u);
        e_lo += u - pl - a[A_S2_HI] - a[A_S2_LO];
        mz = psik__mills(zh, zl);
        mw = psik__mills(wh, wl);
        e_lo += log(mw / mz);
        two_sum(t, e_lo, &e_hi, &u);
        e_lo = u;
        if (e_hi < -800.0) {
            kr = 0.0;
        } else {
            double r = exp(e_hi) * (1.0 + e_lo);
            kr = r * r;
        }
    }
    out->kr = kr;
    if (zh < -30.0) {
        /* wet tail: Q(z), Q(w) ~ 1, H = phi/Q tiny; keep the scale factor
         * inside (see phi_times) */
        double f = 1.0 / sig / s;
        double fz = f / psik__normq(zh, zl), fw = kr * f / psik__normq(wh, wl);
        double hz = phi_times(zh, zl, kr * fz), hw = phi_times(wh, wl, fw);
        out->dse = phi_times(zh, zl, f);
        if (a[A_L] < 0.0)
            out->dkr = 2.0 * a[A_C_HI] * hz + 2.0 * (hw - hz);
        else
            out->dkr = a[A_L] * hz + 2.0 * hw;
        return;
    }
    if (kr > 0.0)
        out->dkr = kr * dkr_bracket(a, zh, zl, wh, wl) / sig / s;
    else
        out->dkr = 0.0;
}

/* z = ln(s/s_m)/sigma in two parts; s finite > 0. */
static void z_of_s(const double *a, double s, double *zh, double *zl)
{
    double lh, ll, q;
    psik__log_ratio(s, a[A_SM], &lh, &ll);
    q = lh / a[A_SIG];
    *zh = q;
    *zl = (fma(-q, a[A_SIG], lh) + ll) / a[A_SIG];
}

/* s = s_m exp(sigma z), sigma z in two parts. */
static double s_of_z(const double *a, double zh, double zl)
{
    double e = zh * a[A_SIG];
    double el = fma(zh, a[A_SIG], -e) + zl * a[A_SIG];
    double t;
    if (fabs(e) < 700.0) {
        t = a[A_SM] * exp(e);
        return t + t * el;
    }
    t = exp(0.5 * e);
    t = (a[A_SM] * t) * t;
    return t + t * el;
}

/* The fused point first (batch_kosugi.c: the batch kernel's values, bit
 * for bit); where it does not take s, the scalar path above, with the
 * fused Se where that is in its range, so that psik_se, psik_eval and
 * psik_eval_batch agree at every head. */
static void kos_point(const psik_model *m, double s, psik_point *out)
{
    double zh, zl, se = 0.0;
    int r = 0;
    if (isinf(s)) {
        out->se = out->kr = out->dse = out->dkr = 0.0;
        return;
    }
    if (!KOS_LD) {
        r = psik__kos_point_fast(m->aux, s, out);
        if (r == 2)
            return;
        se = out->se;
    }
    z_of_s(m->aux, s, &zh, &zl);
    kos_core(m->aux, zh, zl, s, q_ld(zh, zl), out);
    if (!KOS_LD && r == 1)
        out->se = se;
}

static double kos_se(const psik_model *m, double s)
{
    double zh, zl;
    psik_point p;
    if (isinf(s))
        return 0.0;
    if (!KOS_LD && psik__kos_point_fast(m->aux, s, &p) >= 1)
        return p.se;
    z_of_s(m->aux, s, &zh, &zl);
    return kos_q(zh, zl);
}

static double kos_kr(const psik_model *m, double s)
{
    psik_point out;
    kos_point(m, s, &out);
    return out.kr;
}

static void kos_point_se(const psik_model *m, double se, psik_point *out)
{
    double zh, zl, s;
    psik__normq_inv(se, &zh, &zl);
    s = s_of_z(m->aux, zh, zl);
    if (!(s < INFINITY)) {
        /* beyond the largest double: every value is below the smallest */
        out->se = se;
        out->kr = out->dse = out->dkr = 0.0;
        return;
    }
    kos_core(m->aux, zh, zl, s, se, out);
}

static double kos_suction(const psik_model *m, double se)
{
    double zh, zl;
    psik__normq_inv(se, &zh, &zl);
    return s_of_z(m->aux, zh, zl);
}

static const psik_param_info kos_param[] = {
    {"theta_r", 0.0, 0.5},
    {"theta_s", 0.05, 1.0},
    {"h_m", -1e5, -1e-2},
    {"sigma", 0.05, 5.0},
    {"ks", 1e-6, 1e5},
    {"l", -2.0, 10.0},
};

/* l >= -2 keeps dKr/dh >= 0 for every sigma: dKr/dh has the sign of
 * L H(z) + 2 H(z + sigma). The normal hazard H = phi/Q is positive and
 * strictly increasing (the normal law is log-concave), so
 * H(z + sigma)/H(z) > 1, and it tends to 1 as z -> +inf (H(z) ~ z).
 * Hence the sum is >= 0 for all z iff -L <= 2 inf H(z+sigma)/H(z) = 2.
 * (Then also Kr = Se^(L+2) (Q(w)/Q(z))^2 <= 1.) */
static psik_status kos_check(const double *par, char *msg, size_t cap)
{
    if (!(par[P_HM] < 0.0))
        return psik__fail(msg, cap, PSIK_EDOMAIN,
                          "h_m must be negative: it is a pressure head (the median "
                          "suction is -h_m) (got %g)", par[P_HM]);
    if (!(par[P_SIG] > 0.0))
        return psik__fail(msg, cap, PSIK_EDOMAIN,
                          "sigma must be greater than 0 (got %g)", par[P_SIG]);
    if (!(par[P_L] >= -2.0))
        return psik__fail(msg, cap, PSIK_EDOMAIN,
                          "l must be at least -2 for the Kosugi model (otherwise K "
                          "would decrease as the soil wets) (got %g)", par[P_L]);
    return PSIK_OK;
}

static void kos_prepare(psik_model *m)
{
    double *a = m->aux, sig = m->par[P_SIG], L = m->par[P_L];
    a[A_SM] = -m->par[P_HM];
    a[A_SIG] = sig;
    a[A_L] = L;
    a[A_HL] = 0.5 * L;
    two_sum(0.5 * L, 1.0, &a[A_C_HI], &a[A_C_LO]);
    a[A_S2_HI] = 0.5 * (sig * sig);
    a[A_S2_LO] = 0.5 * fma(sig, sig, -(sig * sig));
    a[A_LSM_HI] = psik__fm_log_dd(a[A_SM], &a[A_LSM_LO]);
    a[A_RS_HI] = 1.0 / sig;
    a[A_RS_LO] = -fma(a[A_RS_HI], sig, -1.0) / sig;
    m->h_sat = 0.0;
}

const psik_family psik__fam_kosugi = {
    .kind = PSIK_KOSUGI,
    .name = "kosugi",
    .title = "Kosugi (1996) lognormal retention with Mualem (1976) conductivity",
    .npar = 6,
    .param = kos_param,
    .ks_index = 4,
    .check = kos_check,
    .prepare = kos_prepare,
    .point = kos_point,
    .se = kos_se,
    .kr = kos_kr,
    .point_se = kos_point_se,
    .suction = kos_suction,
    .batch = KOS_LD ? NULL : psik__kos_batch,   /* extended: psik_eval per head */
};
