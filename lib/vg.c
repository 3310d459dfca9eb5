/* vg.c - the van Genuchten (1980) retention family: four rows of the kinds
 * table (vgm, vgm_ae, vg_free_m, vgb).
 *
 * Notation: s = -h > 0 suction, p = alpha s, x = p^n, m the shape exponent,
 * k = m n, Se = (1 + x)^-m, y = x/(1+x) = 1 - Se^(1/m), r = 1/(1+x),
 * g = 1 - y^m (the Mualem integral ratio for m = 1 - 1/n).
 *
 * Method (shared by every function here):
 * - Wet branch p <= 1: x = pow(p, n) without overflow, Se = exp(-m log1p x)
 *   (argument below m log 2, so the exponential adds no error growth).
 * - Dry branch p > 1: u = 1/x = pow(p, -n), B = log1p(u), and
 *   Se = p^-k (1+u)^-m for the restricted forms, where k = n - 1 or n - 2 is
 *   an exact double. The textbook exp(-m log(1 + x)) would carry an error of
 *   |log Se| ulp at the dry end; this form stays within a few ulp down to
 *   the smallest double.
 * - g = 1 - y^m as 1 - y^m when y^m < 1/2 and as -expm1(m log y) otherwise,
 *   which keeps every digit when m is small (n near 1) and at both ends.
 * - Derivatives in the same variables: dlnSe/dh = k alpha p^(n-1)/(1+x),
 *   dg/dh = k alpha y^m/(p (1+x)); the near-saturation singularity of
 *   dKr/dh for n < 2 comes out as the finite power p^(n-2).
 * - From Se (inverse, K(theta), D(theta)): x = Se^(-1/m) - 1 with the
 *   exponent 1/m carried in two doubles (psik__pow2), p = x^(1/n) likewise,
 *   then the same formulas: no round trip through a rounded head.
 * Error: see README.md (measured against mpmath, 600 digits).
 */
#include "psik_internal.h"
#include "fast_vg.h"

#include <float.h>
#include <math.h>

/* aux slots */
#define A_ALPHA PSIK_VGA_ALPHA
#define A_N     PSIK_VGA_N
#define A_M     PSIK_VGA_M
#define A_K     PSIK_VGA_K   /* m n */
#define A_IM_HI 4   /* 1/m */
#define A_IM_LO 5
#define A_IN_HI 6   /* 1/n */
#define A_IN_LO 7
#define A_L     PSIK_VGA_L   /* pore connectivity (Mualem kinds) */
#define A_KEXACT 9  /* 1 when k = m n is exact (m = 1 - 1/n or 1 - 2/n) */
#define A_SC    PSIK_VGA_SC  /* vgm_ae: Se of the unrestricted curve at h_e */
#define A_GE    PSIK_VGA_GE  /* vgm_ae: g at h_e */
#define A_SE    12  /* vgm_ae: suction at entry, -h_e */
#define A_XE    PSIK_VGA_XE  /* vgm_ae: x at entry */
#define A_FA    10  /* vg_free_m: a = m + 1/n */
#define A_FB    11  /* vg_free_m: b = 1 - 1/n */
#define A_BAB   12  /* vg_free_m: B(a, b) */
#define A_K_LO  13  /* vg_free_m: m n - fl(m n) */
#define A_IK_HI 14  /* 1/k = 1/(m n) */
#define A_IK_LO 15

typedef struct vg_pt {
    double p;     /* alpha s */
    double x;     /* (alpha s)^n on the wet branch */
    double u;     /* 1/x on the dry branch */
    double r;     /* 1/(1+x) */
    double y;     /* x/(1+x) */
    double se;    /* (1+x)^-m */
    double ym;    /* y^m */
    double g;     /* 1 - y^m */
    double dls;   /* d ln Se / dh */
    double dg;    /* d g / dh */
    double ps;    /* p 2^512 when p is below DBL_MIN (subnormal suction) */
    int wet;
    int tiny;     /* p < DBL_MIN: powers of p through ps */
} vg_pt;

#define TWO512 1.3407807929942597e+154   /* 2^512, exactly */

/* p^e, exact-exponent powers of p. For p below DBL_MIN (suctions within
 * 1e-308 of saturation) p has lost digits or is 0, so the power is taken
 * of the scaled ps = alpha (s 2^512) and rescaled by 2^(-512 e), whose
 * argument is exact. */
static double vg_powp(const vg_pt *q, double e)
{
    if (q->tiny)
        return pow(q->ps, e) * exp2(-512.0 * e);
    return pow(q->p, e);
}

static double vg_logp(const vg_pt *q)
{
    if (q->tiny)
        return log(q->ps) - 512.0 * 0.69314718055994530942;
    return log(q->p);
}

static void vg_finish(const double *a, vg_pt *q)
{
    const double alpha = a[A_ALPHA], n = a[A_N], mm = a[A_M], k = a[A_K];
    const int kexact = a[A_KEXACT] != 0.0;
    if (q->wet) {
        if (kexact || q->y < DBL_MIN)
            q->ym = vg_powp(q, k) * q->se;          /* y^m = p^(mn) Se */
        else
            q->ym = pow(q->y, mm);
        if (q->ym < 0.5) {
            q->g = 1.0 - q->ym;
        } else {
            /* ln y; when x has underflowed, from ln p (y = x / (1 + x)) */
            double lny = q->y >= DBL_MIN ? log(q->y) : n * vg_logp(q) - log1p(q->x);
            q->g = -expm1(mm * lny);
        }
        q->dls = k * alpha * vg_powp(q, n - 1.0) * q->r;
        if (kexact || q->tiny)
            q->dg = k * alpha * vg_powp(q, k - 1.0) * q->se * q->r;
        else
            q->dg = k * alpha * (q->ym / q->p) * q->r;
    } else {
        double b = log1p(q->u);
        q->ym = exp(-mm * b);
        q->g = -expm1(-mm * b);
        q->dls = k * alpha * q->y / q->p;
        q->dg = k * alpha * q->ym * q->r / q->p;
    }
}

/* The point at suction s > 0 (s may be +inf). */
static void vg_from_s(const double *a, double s, vg_pt *q)
{
    const double alpha = a[A_ALPHA], n = a[A_N], mm = a[A_M], k = a[A_K];
    double p = alpha * s;
    q->p = p;
    q->tiny = p < DBL_MIN;
    q->ps = q->tiny ? alpha * (s * TWO512) : p;
    if (p <= 1.0) {
        double x = vg_powp(q, n);
        q->wet = 1;
        q->x = x;
        q->u = 1.0 / x;
        q->r = 1.0 / (1.0 + x);
        q->y = x * q->r;
        q->se = exp(-mm * log1p(x));
    } else {
        double u = pow(p, -n), b = log1p(u);
        q->wet = 0;
        q->u = u;
        q->x = 1.0 / u;
        q->y = 1.0 / (1.0 + u);
        q->r = u * q->y;
        if (a[A_KEXACT] != 0.0)
            q->se = pow(p, -k) * exp(-mm * b);
        else   /* the same with k = m n carried in two doubles */
            q->se = psik__pow2(p, -k, -a[A_K_LO]) * exp(-mm * b);
    }
    vg_finish(a, q);
}

/* The point at 0 < S < 1 of the unrestricted curve. */
static void vg_from_se(const double *a, double S, vg_pt *q)
{
    const double n = a[A_N];
    const double im_hi = a[A_IM_HI], im_lo = a[A_IM_LO];
    const double in_hi = a[A_IN_HI], in_lo = a[A_IN_LO];
    double t = -log(S);                   /* > 0 */
    q->se = S;
    q->tiny = 0;
    if (t * im_hi <= 0.6931471805599453) {   /* x <= 1 */
        double x = expm1(t * im_hi + t * im_lo);
        q->wet = 1;
        q->x = x;
        q->u = 1.0 / x;
        q->p = psik__pow2(x, in_hi, in_lo);
        q->r = 1.0 / (1.0 + x);
        q->y = x * q->r;
    } else {
        double X = psik__pow2(S, -im_hi, -im_lo);   /* 1 + x */
        q->wet = 0;
        if (X < 1.0 / DBL_EPSILON) {
            double x = X - 1.0;
            q->x = x;
            q->u = 1.0 / x;
            q->p = psik__pow2(x, in_hi, in_lo);
        } else {
            /* x >= 2^52: p = Se^(-1/k) (1 + u)^(-1/n) with (1 + u)^(-1/n)
             * = 1 - u/n to rounding; no power of a huge intermediate. */
            double p = psik__pow2(S, -a[A_IK_HI], -a[A_IK_LO]);
            double u = isfinite(X) ? 1.0 / X : pow(p, -n);
            q->p = p - p * (u / n);
            q->u = u;
            q->x = 1.0 / u;
        }
        q->y = 1.0 / (1.0 + q->u);
        q->r = q->u * q->y;
    }
    vg_finish(a, q);
}

/* Se^L, with 0^L = 0 (the dry limit of Kr, which tends to 0 for every
 * admitted l). */
static double se_pow(double se, double L)
{
    if (se <= 0.0)
        return 0.0;
    return pow(se, L);
}

/* Mualem: Kr = Se^L G^2, dKr/dh = Se^L G (L G dlnSe/dh + 2 dG/dh). */
static void mualem_out(double se, double L, double G, double dls, double dG,
                       psik_point *out)
{
    double seL = se_pow(se, L);
    double kr;
    if (!isfinite(seL) || G <= 0.0) {
        /* Se^L overflows only for l < 0 and Se below 1e-300, where G has
         * underflowed: the product is far below the smallest double. */
        out->kr = 0.0;
        out->dkr = 0.0;
        return;
    }
    kr = seL * G * G;
    out->kr = kr;
    out->dkr = seL * G * (L * G * dls + 2.0 * dG);
}

static void set_common(const double *par, double *a, double n, double mm)
{
    a[A_ALPHA] = par[2];
    a[A_N] = n;
    a[A_M] = mm;
    psik__recip2(1.0, n, &a[A_IN_HI], &a[A_IN_LO]);
}

/* ------------------------------------------------------------------ vgm */

/* Plausible ranges (heads in cm) shared by the rows below. */
#define VG_P_THETA {"theta_r", 0.0, 0.5}, {"theta_s", 0.05, 1.0}, {"alpha", 1e-5, 100.0}
#define VG_P_KS    {"ks", 1e-6, 1e5}
#define VG_P_L     {"l", -5.0, 10.0}

static const psik_param_info vgm_param[] = {
    VG_P_THETA, {"n", 1.001, 20.0}, VG_P_KS, VG_P_L,
};

static psik_status check_alpha_n(const double *par, double nmin, const char *why,
                                 char *msg, size_t cap)
{
    if (!(par[2] > 0.0))
        return psik__fail(msg, cap, PSIK_EDOMAIN,
                          "alpha must be greater than 0 (got %g)", par[2]);
    if (!(par[3] > nmin))
        return psik__fail(msg, cap, PSIK_EDOMAIN,
                          "n must be greater than %g%s (got %g)", nmin, why, par[3]);
    return PSIK_OK;
}

/* l > -2/m keeps dKr/dh >= 0 for m = 1 - 1/n: with y in (0,1),
 * L g y + 2 y^m (1-y) >= 0 iff -L <= 2 y^(m-1)(1-y)/(1-y^m), whose
 * infimum (y -> 1) is 2/m by the mean value theorem. At l = -2/m exactly
 * Kr tends to m^2, not 0, in dry soil, so the bound is strict. */
static psik_status check_l(double L, double lmin, char *msg, size_t cap)
{
    if (!(L > lmin))
        return psik__fail(msg, cap, PSIK_EDOMAIN,
                          "l must be greater than %.6g for this n (otherwise K would "
                          "not fall to 0 as the soil dries) (got %g)", lmin, L);
    return PSIK_OK;
}

static psik_status vgm_check(const double *par, char *msg, size_t cap)
{
    psik_status st = check_alpha_n(par, 1.0, "", msg, cap);
    if (st != PSIK_OK)
        return st;
    return check_l(par[5], -2.0 * par[3] / (par[3] - 1.0), msg, cap);
}

static void vgm_prepare(psik_model *m)
{
    double *a = m->aux, n = m->par[3];
    set_common(m->par, a, n, (n - 1.0) / n);   /* n - 1 is exact for n >= 1 */
    a[A_K] = n - 1.0;
    psik__recip2(n, n - 1.0, &a[A_IM_HI], &a[A_IM_LO]);
    psik__recip2(1.0, n - 1.0, &a[A_IK_HI], &a[A_IK_LO]);
    a[A_L] = m->par[5];
    a[A_KEXACT] = 1.0;
}

static void vgm_fill(const double *a, const vg_pt *q, psik_point *out)
{
    out->se = q->se;
    out->dse = q->dls * q->se;
    mualem_out(q->se, a[A_L], q->g, q->dls, q->dg, out);
}

/* Constants of the fused point and batch kernels (batch_vg.c). */
static psik_vgc vg_coef(const psik_model *m, int model)
{
    const double *a = m->aux;
    psik_vgc c;
    c.alpha = a[A_ALPHA];
    c.n = a[A_N];
    c.m = a[A_M];
    c.k = a[A_K];
    c.l = model == PSIK_VGC_BURDINE ? 0.5 : a[A_L];
    c.sc = model == PSIK_VGC_MUALEM_AE ? a[A_SC] : 1.0;
    c.ge = model == PSIK_VGC_MUALEM_AE ? a[A_GE] : 1.0;
    c.xe = model == PSIK_VGC_MUALEM_AE ? a[A_XE] : 0.0;
    c.model = model;
    return c;
}

/* The fused point where it applies (all realistic heads), else vg_from_s. */
static void vgm_point(const psik_model *m, double s, psik_point *out)
{
    vg_pt q;
    if (psik__vg_point_scalar(m->aux, PSIK_VGC_MUALEM, s, out))
        return;
    vg_from_s(m->aux, s, &q);
    vgm_fill(m->aux, &q, out);
}

static void vgm_batch(const psik_model *m, size_t count, const double *h,
                      double *theta, double *k, double *capacity, double *dk_dh)
{
    psik_vgc c = vg_coef(m, PSIK_VGC_MUALEM);
    psik__vg_batch(m, &c, count, h, theta, k, capacity, dk_dh);
}

static void vgm_point_se(const psik_model *m, double se, psik_point *out)
{
    vg_pt q;
    vg_from_se(m->aux, se, &q);
    vgm_fill(m->aux, &q, out);
}

/* Se alone (psik_se, psik_theta): where k = m n is exact in a double
 * (vgm, vgb, and vgm_ae's unrestricted curve; not vg_free_m, whose k needs
 * two parts) through point_vg.c's code (log, log1p(exp), exp: the same
 * bits as psik_eval's Se for vgm and vgb); elsewhere, and where that code
 * does not apply (|n log(alpha s)| > 700, alpha s not normal), the first
 * half of vg_from_s, two or three libm calls. Both meet the
 * accuracy goal (tests/unit/test_accuracy.c) and agree within a few ulp
 * (tests/unit/test_sweeps.c). */
static double vg_se(const psik_model *m, double s)
{
    const double *a = m->aux;
    const double n = a[A_N], mm = a[A_M];
    double p = a[A_ALPHA] * s, se;
    if (a[A_KEXACT] != 0.0 && psik__vg_se_scalar(a, s, &se))
        return se;
    if (p <= 1.0)
        return exp(-mm * log1p(pow(p, n)));
    if (a[A_KEXACT] != 0.0)
        return pow(p, -a[A_K]) * exp(-mm * log1p(pow(p, -n)));
    {
        vg_pt q;
        vg_from_s(a, s, &q);
        return q.se;
    }
}

static double vgm_kr(const psik_model *m, double s)
{
    psik_point out;
    vgm_point(m, s, &out);
    return out.kr;
}

static double vg_suction(const psik_model *m, double se)
{
    vg_pt q;
    vg_from_se(m->aux, se, &q);
    return q.p / m->aux[A_ALPHA];
}

const psik_family psik__fam_vgm = {
    .kind = PSIK_VGM,
    .name = "vgm",
    .title = "van Genuchten (1980) retention with Mualem (1976) conductivity, m = 1 - 1/n",
    .npar = 6,
    .param = vgm_param,
    .ks_index = 4,
    .check = vgm_check,
    .prepare = vgm_prepare,
    .point = vgm_point,
    .eval = psik__vgm_eval_scalar,
    .se = vg_se,
    .kr = vgm_kr,
    .point_se = vgm_point_se,
    .suction = vg_suction,
    .batch = vgm_batch,
};

/* ---------------------------------------------------------------- vgm_ae */

static const psik_param_info vgm_ae_param[] = {
    VG_P_THETA, {"n", 1.001, 20.0}, VG_P_KS, VG_P_L, {"h_e", -100.0, 0.0},
};

static psik_status vgm_ae_check(const double *par, char *msg, size_t cap)
{
    psik_status st = vgm_check(par, msg, cap);
    if (st != PSIK_OK)
        return st;
    if (!(par[6] <= 0.0))
        return psik__fail(msg, cap, PSIK_EDOMAIN,
                          "h_e must be at most 0: it is a pressure head (got %g)", par[6]);
    return PSIK_OK;
}

static void vgm_ae_prepare(psik_model *m)
{
    double *a = m->aux;
    vg_pt q;
    vgm_prepare(m);
    m->h_sat = m->par[6] == 0.0 ? 0.0 : m->par[6];   /* no -0 */
    a[A_SE] = -m->h_sat;
    vg_from_s(a, a[A_SE], &q);
    a[A_SC] = q.se;
    a[A_GE] = q.g;
    a[A_XE] = q.wet ? q.x : INFINITY;
}

/* Se = S / Sc; on the wet branch as exp(-m log1p((x - xe)/(1 + xe))). */
static void vgm_ae_fill(const double *a, const vg_pt *q, double se, psik_point *out)
{
    double ge = a[A_GE];
    out->se = se;
    out->dse = q->dls * se;
    mualem_out(se, a[A_L], q->g / ge, q->dls, q->dg / ge, out);
}

/* Se on the wet branch with x <= 1 at h_e too: exp(-m log1p((x - xe)/(1 + xe))),
 * which keeps the digits of 1 - Se that S / Sc would lose. */
static double vgm_ae_se_wet(const double *a, double x)
{
    return exp(-a[A_M] * log1p((x - a[A_XE]) / (1.0 + a[A_XE])));
}

static double vgm_ae_se_of(const double *a, const vg_pt *q)
{
    if (q->wet && a[A_XE] <= 1.0)
        return vgm_ae_se_wet(a, q->x);
    return q->se / a[A_SC];
}

static void vgm_ae_point(const psik_model *m, double s, psik_point *out)
{
    vg_pt q;
    if (psik__vg_point_scalar(m->aux, PSIK_VGC_MUALEM_AE, s, out))
        return;
    vg_from_s(m->aux, s, &q);
    vgm_ae_fill(m->aux, &q, vgm_ae_se_of(m->aux, &q), out);
}

static void vgm_ae_point_se(const psik_model *m, double se, psik_point *out)
{
    vg_pt q;
    vg_from_se(m->aux, se * m->aux[A_SC], &q);
    vgm_ae_fill(m->aux, &q, se, out);
}

/* Se alone: vgm_ae_se_of's forms without the derivatives. */
static double vgm_ae_se(const psik_model *m, double s)
{
    const double *a = m->aux;
    double p = a[A_ALPHA] * s;
    if (p <= 1.0 && a[A_XE] <= 1.0)
        return vgm_ae_se_wet(a, pow(p, a[A_N]));
    return vg_se(m, s) / a[A_SC];
}

static void vgm_ae_batch(const psik_model *m, size_t count, const double *h,
                         double *theta, double *k, double *capacity, double *dk_dh)
{
    psik_vgc c = vg_coef(m, PSIK_VGC_MUALEM_AE);
    psik__vg_batch(m, &c, count, h, theta, k, capacity, dk_dh);
}

static double vgm_ae_kr(const psik_model *m, double s)
{
    psik_point out;
    vgm_ae_point(m, s, &out);
    return out.kr;
}

static double vgm_ae_suction(const psik_model *m, double se)
{
    vg_pt q;
    vg_from_se(m->aux, se * m->aux[A_SC], &q);
    return q.p / m->aux[A_ALPHA];
}

const psik_family psik__fam_vgm_ae = {
    .kind = PSIK_VGM_AE,
    .name = "vgm_ae",
    .title = "van Genuchten-Mualem with air-entry head h_e " "(Vogel, van Genuchten & Cislerova 2001; Ippisch, Vogel & Bastian 2006)",
    .npar = 7,
    .param = vgm_ae_param,
    .ks_index = 4,
    .check = vgm_ae_check,
    .prepare = vgm_ae_prepare,
    .point = vgm_ae_point,
    .eval = psik__vgm_ae_eval_scalar,
    .se = vgm_ae_se,
    .kr = vgm_ae_kr,
    .point_se = vgm_ae_point_se,
    .suction = vgm_ae_suction,
    .batch = vgm_ae_batch,
};

/* ------------------------------------------------------------- vg_free_m */

static const psik_param_info vg_free_m_param[] = {
    VG_P_THETA, {"n", 1.001, 20.0}, {"m", 0.01, 10.0}, VG_P_KS, VG_P_L,
};

/* l > -(2 + 2/(m n)) keeps dKr/dh >= 0 (and Kr -> 0 when dry): d ln I_z(a,b)/d ln z >= a because
 * (1-t)^(b-1) increases in t for b < 1, and d ln z / d ln Se = 1/m. */
static psik_status vg_free_m_check(const double *par, char *msg, size_t cap)
{
    psik_status st = check_alpha_n(par, 1.0, "", msg, cap);
    if (st != PSIK_OK)
        return st;
    if (!(par[4] > 0.0))
        return psik__fail(msg, cap, PSIK_EDOMAIN,
                          "m must be greater than 0 (got %g)", par[4]);
    return check_l(par[6], -(2.0 + 2.0 / (par[4] * par[3])), msg, cap);
}

static void vg_free_m_prepare(psik_model *m)
{
    double *a = m->aux, n = m->par[3], mm = m->par[4];
    set_common(m->par, a, n, mm);
    a[A_K] = mm * n;
    psik__recip2(1.0, mm, &a[A_IM_HI], &a[A_IM_LO]);
    {   /* 1/k with k = m n carried as k + dk */
        double dk = fma(mm, n, -a[A_K]);
        a[A_K_LO] = dk;
        psik__recip2(1.0, a[A_K], &a[A_IK_HI], &a[A_IK_LO]);
        a[A_IK_LO] -= a[A_IK_HI] * (dk / a[A_K]);
    }
    a[A_L] = m->par[6];
    a[A_KEXACT] = 0.0;
    a[A_FA] = mm + a[A_IN_HI];
    a[A_FB] = (n - 1.0) / n;
    a[A_BAB] = psik__beta(a[A_FA], a[A_FB]);
}

/* Kr = Se^L I_z(a,b)^2 with z = 1/(1+x), 1 - z = y and
 * z^a y^b = Se y / p exactly, so the front factor needs no pow at all;
 * dI/dh = n alpha z^a y^b / (p B(a,b)). */
static void vg_free_m_fill(const double *a, const vg_pt *q, psik_point *out)
{
    double front = q->se * q->y / (q->p * a[A_BAB]), comp;
    double I = psik__ibeta(a[A_FA], a[A_FB], q->r, q->y, front, &comp);
    double dI = a[A_N] * a[A_ALPHA] * front / q->p;
    out->se = q->se;
    out->dse = q->dls * q->se;
    if (q->wet && q->p < DBL_MIN)
        dI = a[A_N] * a[A_ALPHA] * vg_powp(q, a[A_N] - 2.0) * q->r * q->se / a[A_BAB];
    mualem_out(q->se, a[A_L], I, q->dls, dI, out);
}

/* The fused point and batch kernel (lib/batch_vgfm.c), with the model's
 * constants in this order: alpha, n, m, k = m n as hi and lo, l, a, b,
 * B(a, b). */
PSIK_HIDDEN int psik__vgfm_point_fast(const double *cst, double s, psik_point *out);
PSIK_HIDDEN void psik__vgfm_batch(const psik_model *m, const double *cst, size_t count,
                                  const double *h, double *theta, double *k,
                                  double *capacity, double *dk_dh);

static void vg_free_m_consts(const psik_model *m, double *cst)
{
    const double *a = m->aux;
    cst[0] = a[A_ALPHA];
    cst[1] = a[A_N];
    cst[2] = a[A_M];
    cst[3] = a[A_K];
    cst[4] = a[A_K_LO];
    cst[5] = a[A_L];
    cst[6] = a[A_FA];
    cst[7] = a[A_FB];
    cst[8] = a[A_BAB];
}

/* The fused point where it applies (realistic heads), else vg_from_s and
 * psik__ibeta; psik_eval_batch takes the same two paths per head. */
static void vg_free_m_point(const psik_model *m, double s, psik_point *out)
{
    vg_pt q;
    double cst[9];
    vg_free_m_consts(m, cst);
    if (psik__vgfm_point_fast(cst, s, out))
        return;
    vg_from_s(m->aux, s, &q);
    vg_free_m_fill(m->aux, &q, out);
}

static void vg_free_m_batch(const psik_model *m, size_t count, const double *h,
                            double *theta, double *k, double *capacity, double *dk_dh)
{
    double cst[9];
    vg_free_m_consts(m, cst);
    psik__vgfm_batch(m, cst, count, h, theta, k, capacity, dk_dh);
}

static void vg_free_m_point_se(const psik_model *m, double se, psik_point *out)
{
    vg_pt q;
    vg_from_se(m->aux, se, &q);
    vg_free_m_fill(m->aux, &q, out);
}

static double vg_free_m_kr(const psik_model *m, double s)
{
    psik_point out;
    vg_free_m_point(m, s, &out);
    return out.kr;
}

const psik_family psik__fam_vg_free_m = {
    .kind = PSIK_VG_FREE_M,
    .name = "vg_free_m",
    .title = "van Genuchten (1980) retention with free m, Mualem (1976) conductivity " "through the incomplete beta function",
    .npar = 7,
    .param = vg_free_m_param,
    .ks_index = 5,
    .check = vg_free_m_check,
    .prepare = vg_free_m_prepare,
    .point = vg_free_m_point,
    .se = vg_se,
    .kr = vg_free_m_kr,
    .point_se = vg_free_m_point_se,
    .suction = vg_suction,
    .batch = vg_free_m_batch,
};

/* ------------------------------------------------------------------- vgb */

static const psik_param_info vgb_param[] = {
    VG_P_THETA, {"n", 2.001, 20.0}, VG_P_KS,
};

static psik_status vgb_check(const double *par, char *msg, size_t cap)
{
    return check_alpha_n(par, 2.0, " for the Burdine form (m = 1 - 2/n must be positive)",
                         msg, cap);
}

static void vgb_prepare(psik_model *m)
{
    double *a = m->aux, n = m->par[3];
    set_common(m->par, a, n, (n - 2.0) / n);   /* n - 2 is exact for n >= 2 */
    a[A_K] = n - 2.0;
    psik__recip2(n, n - 2.0, &a[A_IM_HI], &a[A_IM_LO]);
    psik__recip2(1.0, n - 2.0, &a[A_IK_HI], &a[A_IK_LO]);
    a[A_KEXACT] = 1.0;
}

/* Burdine: Kr = Se^2 g, dKr/dh = Se^2 (2 g dlnSe/dh + dg/dh). */
static void vgb_fill(const vg_pt *q, psik_point *out)
{
    double se2 = q->se * q->se;
    out->se = q->se;
    out->dse = q->dls * q->se;
    out->kr = se2 * q->g;
    out->dkr = se2 * (2.0 * q->g * q->dls + q->dg);
}

static void vgb_point(const psik_model *m, double s, psik_point *out)
{
    vg_pt q;
    if (psik__vg_point_scalar(m->aux, PSIK_VGC_BURDINE, s, out))
        return;
    vg_from_s(m->aux, s, &q);
    vgb_fill(&q, out);
}

static void vgb_point_se(const psik_model *m, double se, psik_point *out)
{
    vg_pt q;
    vg_from_se(m->aux, se, &q);
    vgb_fill(&q, out);
}

static void vgb_batch(const psik_model *m, size_t count, const double *h,
                      double *theta, double *k, double *capacity, double *dk_dh)
{
    psik_vgc c = vg_coef(m, PSIK_VGC_BURDINE);
    psik__vg_batch(m, &c, count, h, theta, k, capacity, dk_dh);
}

static double vgb_kr(const psik_model *m, double s)
{
    psik_point out;
    vgb_point(m, s, &out);
    return out.kr;
}

const psik_family psik__fam_vgb = {
    .kind = PSIK_VGB,
    .name = "vgb",
    .title = "van Genuchten (1980) retention with Burdine (1953) conductivity, m = 1 - 2/n",
    .npar = 5,
    .param = vgb_param,
    .ks_index = 4,
    .check = vgb_check,
    .prepare = vgb_prepare,
    .point = vgb_point,
    .eval = psik__vgb_eval_scalar,
    .se = vg_se,
    .kr = vgb_kr,
    .point_se = vgb_point_se,
    .suction = vg_suction,
    .batch = vgb_batch,
};
