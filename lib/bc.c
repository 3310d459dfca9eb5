/* bc.c - the Brooks & Corey (1964) retention model with Mualem (1976) or
 * Burdine (1953) conductivity: two rows of the kinds table (bcm, bcb).
 *
 * Notation: s = -h suction, s_b = -h_b > 0 the air-entry suction,
 * r = s_b / s in (0, 1) below air entry, lambda the pore-size index.
 *   Se = r^lambda,  Kr = Se^(L + 2 + 2/lambda) = r^(lambda (L + 2) + 2)
 *   (Mualem; Burdine is the same with L = 1: Se^(3 + 2/lambda)),
 *   dSe/dh = lambda Se / s,  dKr/dh = (lambda (L + 2) + 2) Kr / s.
 * Saturated for h >= h_b (m->h_sat = h_b); C jumps from 0 at h_b.
 *
 * Method:
 * - r = s_b/s is one rounding (its error is amplified only by the
 *   exponent, which is the condition number itself). The exponents of Kr
 *   are carried in two doubles (psik__pow2), so their rounding costs no
 *   |log r| ulp at the dry end. Where s_b/s would be subnormal the power
 *   is taken of a normal mantissa quotient and of powers of two apart.
 * - From Se (inverse, K(theta), D(theta)): s/s_b = Se^(-1/lambda) and
 *   Kr = Se^(L + 2 + 2/lambda), both exponents in two parts: no round trip
 *   through a rounded head.
 * - psik_eval, psik_kr and the batch take the fused point of batch_bc.c
 *   (the same error model in branch-free form) wherever it applies; the
 *   forms here cover the rest (s_b/s subnormal, infinite s).
 * Error: measured against mpmath tables (tests/unit/test_accuracy.c).
 */
#include "psik_internal.h"
#include "fast_simple.h"

#include <float.h>
#include <math.h>

#define P_HB  2
#define P_LAM 3
#define P_L   5

#define A_SB    0   /* s_b = -h_b */
#define A_LAM   1   /* lambda */
#define A_IL_HI 2   /* 1/lambda in two parts */
#define A_IL_LO 3
#define A_EK_HI 4   /* exponent of r in Kr: lambda (L + 2) + 2 */
#define A_EK_LO 5
#define A_ES_HI 6   /* exponent of Se in Kr: L + 2 + 2/lambda */
#define A_ES_LO 7

static void two_sum(double a, double b, double *s, double *e)
{
    double t = a + b, bb = t - a;
    *s = t;
    *e = (a - (t - bb)) + (b - bb);
}

/* (sb/s)^(eh + el) for 0 < sb < s, s finite. */
static double ratio_pow(double sb, double s, double eh, double el)
{
    int ea, eb, k;
    double fa = frexp(sb, &ea), fb = frexp(s, &eb), q, v;
    q = fa / fb;               /* in (1/2, 2) */
    k = ea - eb;
    if (k >= -1020)
        return psik__pow2(ldexp(q, k), eh, el);
    /* s_b/s below the normal range: (q 2^(k + 600 j)) (2^-600)^j */
    v = 1.0;
    while (k < -1020) {
        v *= psik__pow2(0x1p-600, eh, el);
        k += 600;
    }
    return psik__pow2(ldexp(q, k), eh, el) * v;
}

static psik_bcc bc_coef(const psik_model *m)
{
    psik_bcc c;
    c.sb = m->aux[A_SB];
    c.lam = m->aux[A_LAM];
    c.ek_hi = m->aux[A_EK_HI];
    c.ek_lo = m->aux[A_EK_LO];
    return c;
}

/* The fused point (batch_bc.c) where it applies, else the forms below. */
static void bc_point(const psik_model *m, double s, psik_point *out)
{
    const double *a = m->aux;
    double se, kr;
    psik_bcc c = bc_coef(m);
    if (psik__bc_point_fast(&c, s, out))
        return;
    if (isinf(s)) {
        out->se = out->kr = out->dse = out->dkr = 0.0;
        return;
    }
    se = ratio_pow(a[A_SB], s, a[A_LAM], 0.0);
    kr = ratio_pow(a[A_SB], s, a[A_EK_HI], a[A_EK_LO]);
    out->se = se;
    out->kr = kr;
    out->dse = a[A_LAM] * se / s;
    out->dkr = a[A_EK_HI] * kr / s;
}

/* Se and Kr from the point, so that psik_se and psik_kr equal psik_eval's
 * values bit for bit. */
static double bc_se(const psik_model *m, double s)
{
    psik_point p;
    bc_point(m, s, &p);
    return p.se;
}

static double bc_kr(const psik_model *m, double s)
{
    psik_point p;
    bc_point(m, s, &p);
    return p.kr;
}

static void bc_batch(const psik_model *m, size_t count, const double *h,
                     double *theta, double *k, double *capacity, double *dk_dh)
{
    psik_bcc c = bc_coef(m);
    psik__bc_batch(m, &c, count, h, theta, k, capacity, dk_dh);
}

static void bc_point_se(const psik_model *m, double se, psik_point *out)
{
    const double *a = m->aux;
    double x = psik__pow2(se, -a[A_IL_HI], -a[A_IL_LO]);   /* s / s_b */
    double s = a[A_SB] * x;
    out->se = se;
    out->kr = psik__pow2(se, a[A_ES_HI], a[A_ES_LO]);
    if (s < INFINITY) {
        out->dse = a[A_LAM] * se / s;
        out->dkr = a[A_EK_HI] * out->kr / s;
    } else {
        out->dse = 0.0;     /* below the smallest double */
        out->dkr = 0.0;
    }
}

static double bc_suction(const psik_model *m, double se)
{
    return m->aux[A_SB] * psik__pow2(se, -m->aux[A_IL_HI], -m->aux[A_IL_LO]);
}

static psik_status check_hb_lambda(const double *par, char *msg, size_t cap)
{
    if (!(par[P_HB] < 0.0))
        return psik__fail(msg, cap, PSIK_EDOMAIN,
                          "h_b must be negative: it is a pressure head (the air-entry "
                          "suction is -h_b) (got %g)", par[P_HB]);
    if (!(par[P_LAM] > 0.0))
        return psik__fail(msg, cap, PSIK_EDOMAIN,
                          "lambda must be greater than 0 (got %g)", par[P_LAM]);
    return PSIK_OK;
}

/* l > -(2 + 2/lambda) keeps dKr/dh > 0: Kr = r^e with e = lambda (L + 2) + 2
 * and dKr/dh = e Kr / s, so dK/dh >= 0 everywhere iff e >= 0, i.e.
 * L >= -(2 + 2/lambda). Equality gives e = 0, Kr = 1 at every head (a
 * conductivity that never falls as the soil dries, and 0^0 at the dry
 * limit), so the bound is taken strict. */
static psik_status bcm_check(const double *par, char *msg, size_t cap)
{
    psik_status st = check_hb_lambda(par, msg, cap);
    double lmin;
    if (st != PSIK_OK)
        return st;
    lmin = -(2.0 + 2.0 / par[P_LAM]);
    if (!(par[P_L] > lmin))
        return psik__fail(msg, cap, PSIK_EDOMAIN,
                          "l must be greater than -(2 + 2/lambda) = %.6g for this lambda "
                          "(otherwise K would not fall as the soil dries) (got %g)",
                          lmin, par[P_L]);
    return PSIK_OK;
}

static void bc_prepare_l(psik_model *m, double L)
{
    double *a = m->aux, lam = m->par[P_LAM];
    double t_hi, t_lo, p_hi, p_lo, q_hi, q_lo, s, e;
    a[A_SB] = -m->par[P_HB];
    a[A_LAM] = lam;
    psik__recip2(1.0, lam, &a[A_IL_HI], &a[A_IL_LO]);
    /* L + 2 exactly as two parts */
    two_sum(L, 2.0, &t_hi, &t_lo);
    /* lambda (L + 2) + 2 */
    p_hi = lam * t_hi;
    p_lo = fma(lam, t_hi, -p_hi) + lam * t_lo;
    two_sum(p_hi, 2.0, &s, &e);
    two_sum(s, e + p_lo, &a[A_EK_HI], &a[A_EK_LO]);
    /* L + 2 + 2/lambda */
    psik__recip2(2.0, lam, &q_hi, &q_lo);
    two_sum(t_hi, q_hi, &s, &e);
    two_sum(s, e + t_lo + q_lo, &a[A_ES_HI], &a[A_ES_LO]);
    m->h_sat = m->par[P_HB];
}

static void bcm_prepare(psik_model *m)
{
    bc_prepare_l(m, m->par[P_L]);
}

/* Burdine: Se^(3 + 2/lambda), the Mualem form with L = 1. */
static void bcb_prepare(psik_model *m)
{
    bc_prepare_l(m, 1.0);
}

static const psik_param_info bcm_param[] = {
    {"theta_r", 0.0, 0.5},
    {"theta_s", 0.05, 1.0},
    {"h_b", -1e4, -1e-2},
    {"lambda", 0.05, 10.0},
    {"ks", 1e-6, 1e5},
    {"l", -2.0, 10.0},
};

static const psik_param_info bcb_param[] = {
    {"theta_r", 0.0, 0.5},
    {"theta_s", 0.05, 1.0},
    {"h_b", -1e4, -1e-2},
    {"lambda", 0.05, 10.0},
    {"ks", 1e-6, 1e5},
};

const psik_family psik__fam_bcm = {
    .kind = PSIK_BCM,
    .name = "bcm",
    .title = "Brooks & Corey (1964) retention with Mualem (1976) conductivity",
    .npar = 6,
    .param = bcm_param,
    .ks_index = 4,
    .check = bcm_check,
    .prepare = bcm_prepare,
    .point = bc_point,
    .se = bc_se,
    .kr = bc_kr,
    .point_se = bc_point_se,
    .suction = bc_suction,
    .batch = bc_batch,
};

const psik_family psik__fam_bcb = {
    .kind = PSIK_BCB,
    .name = "bcb",
    .title = "Brooks & Corey (1964) retention with Burdine (1953) conductivity",
    .npar = 5,
    .param = bcb_param,
    .ks_index = 4,
    .check = check_hb_lambda,
    .prepare = bcb_prepare,
    .point = bc_point,
    .se = bc_se,
    .kr = bc_kr,
    .point_se = bc_point_se,
    .suction = bc_suction,
    .batch = bc_batch,
};
