/* durner.c - the Durner (1994) multimodal van Genuchten retention model
 * with Mualem conductivity in the closed form of Priesack & Durner (2006):
 * two rows of the kinds table (durner2, durner3).
 *
 * Notation: s = -h > 0 suction; for each mode i: p_i = alpha_i s,
 * x_i = p_i^n_i, m_i = 1 - 1/n_i, S_i = (1 + x_i)^-m_i, y_i = x_i/(1 + x_i),
 * g_i = 1 - y_i^m_i (the Mualem integral ratio of the mode).
 *   Se = sum w_i S_i,  G = sum w_i alpha_i g_i / sum w_i alpha_i,
 *   Kr = Se^L G^2,  dKr/dh = Kr (L (dSe/dh)/Se + 2 (dG/dh)/G).
 * Weights: durner2 w1, w2 = 1 - w1; durner3 w1, w2, w3 = 1 - w1 - w2.
 *
 * Method:
 * - Each mode as in vg.c: on the wet branch (p <= 1) x = p^n and
 *   S = exp(-m log1p x); on the dry branch u = p^-n and
 *   S = p^-(n-1) (1 + u)^-m with the exact exponent n - 1, so the dry end
 *   keeps its digits; g as 1 - y^m or -expm1(m ln y), whichever keeps
 *   them. Every sum has positive terms only: no cancellation.
 * - Kr = (Se^(L/2) G)^2: no overflow of Se^L for L < 0.
 * - Inverse (no closed form): bracketed, safeguarded Newton's method on
 *   F(t) = ln Se(e^t) - ln Se*, t = ln s, with the iterate kept as s itself
 *   (multiplicative steps s exp(dt)), so that the answer carries no
 *   |ln s| ulp from a rounded logarithm. The bracket comes from the modes:
 *   each S_i is decreasing, so Se(min_i s_i) >= Se* >= Se(max_i s_i)
 *   where S_i(s_i) = Se* (closed form). A Newton step that leaves the
 *   bracket or fails to halve |F| is replaced by bisection in t; every
 *   evaluation narrows the bracket. At most 200 evaluations (bisection
 *   alone needs ~70 for the widest bracket a double allows), typically 5-8.
 *   The result is accurate to the condition number of the inverse: where
 *   the curve is nearly flat between modes Se barely changes with s and
 *   any s on the flat stretch reproduces Se* to a few ulp.
 * - psik_eval, psik_se and psik_eval_batch go through the fused core of
 *   batch_durner.c (the same formulas with double-double exponents and
 *   sums, branch-free and vectorised, identical bits in the single point
 *   and the batch); mode_add below serves the heads outside its range and
 *   the -DPSIK_EXTENDED build.
 * Error: measured against mpmath tables (tests/unit/test_accuracy.c);
 * inverse worst cases in tests/unit/test_models.c.
 */
#include "fast_durner.h"
#include "psik_internal.h"

#include <float.h>
#include <math.h>

/* aux layout: 4 slots per mode (alpha, n, c, w), then l, mode count, the
 * remainder of the last weight */
#define A_ALPHA(i) (4 * (i) + 0)
#define A_N(i)     (4 * (i) + 1)
#define A_C(i)     (4 * (i) + 2)  /* w_i alpha_i / sum_j w_j alpha_j */
#define A_W(i)     (4 * (i) + 3)
#define A_L        12
#define A_FREE     13
#define A_NMODES   14
#define A_WLO      15  /* the last weight, 1 - sum of the others, is
                          w + A_WLO exactly (two parts) */

#define MAX_ITER 200

/* The per-mode terms and the sums over the modes are carried in acc_t:
 * double by default; with -DPSIK_EXTENDED (and where long double is wider
 * than double, e.g. the x87 80-bit format) long double, so that weighting,
 * summing and the powers of Se add no rounding of their own before the one
 * at the end (2 ulp instead of up to 6 in dK/dh, at about 20 times the
 * cost: the long double transcendentals are slow). */
#if defined(PSIK_EXTENDED) && LDBL_MANT_DIG >= 64
typedef long double acc_t;
#  define AF(f) f##l
#else
typedef double acc_t;
#  define AF(f) f
#endif

typedef struct dur_sum {
    acc_t se;     /* sum w S */
    acc_t dse;    /* sum w dS/dh */
    acc_t g;      /* sum c g = G */
    acc_t dg;     /* sum c dg/dh */
    acc_t cse;    /* sum w (1 - S), kept exactly where S is near 1 */
    acc_t cg;     /* sum c (1 - g) = sum c y^m = 1 - G */
    acc_t sdse;   /* s dSe/dh = sum w S k y (no underflow of 1/s factors) */
    acc_t sdg;    /* s dG/dh = sum c k y^m r */
} dur_sum;

/* One mode at suction s (finite, > 0), accumulated into *acc; in acc_t
 * (long double) throughout, so that each mode's terms reach the sums with
 * errors far below a double's last place. */
static void mode_add(const double *a, int i, double s, dur_sum *acc)
{
    const acc_t alpha = a[A_ALPHA(i)], n = a[A_N(i)], w = a[A_W(i)], c = a[A_C(i)];
    const acc_t mm = (n - 1.0) / n;
    const acc_t k = n - 1.0;     /* exact for n >= 1 */
    acc_t p = alpha * s, S, cS, g, dls, dg, ym, ky, kr_;
    if (p <= 1.0) {
        acc_t x = AF(pow)(p, n), r = 1.0 / (1.0 + x), y = x * r, l1 = AF(log1p)(x);
        S = AF(exp)(-mm * l1);
        cS = -AF(expm1)(-mm * l1);
        ym = AF(pow)(p, k) * S;                   /* y^m = p^(m n) Se */
        g = ym < 0.5 ? 1.0 - ym : -AF(expm1)(mm * AF(log)(y));
        dls = k * alpha * AF(pow)(p, n - 1.0) * r;
        dg = k * alpha * AF(pow)(p, k - 1.0) * AF(exp)(-(mm + 1.0) * l1);   /* S r in one */
        ky = k * y;
        kr_ = k * ym * r;
    } else if (p < (acc_t)INFINITY) {
        acc_t u = AF(pow)(p, -n), b = AF(log1p)(u), y = 1.0 / (1.0 + u);
        ym = AF(exp)(-mm * b);
        S = AF(pow)(p, -k) * ym;
        cS = S > 0.25 ? -AF(expm1)(-mm * (n * AF(log)(p) + b)) : 1.0 - S;
        g = -AF(expm1)(-mm * b);
        dls = k * alpha * y / p;
        dg = k * alpha * (u * AF(exp)(-(mm + 1.0) * b)) / p;           /* ym u y in one */
        ky = k * y;
        kr_ = k * ym * (u * y);
    } else {
        /* alpha s beyond the range (only where long double is double) */
        acc_t lp = AF(log)(alpha) + AF(log)((acc_t)s);
        ym = 1.0;
        S = AF(exp)(-k * lp);
        cS = 1.0;
        g = mm * AF(exp)(-n * lp);
        dls = k / s;
        dg = 0.0;
        ky = k;
        kr_ = 0.0;
    }
    {
        /* the last weight carries its rounding remainder */
        acc_t wt = w + (i == (int)a[A_NMODES] - 1 ? a[A_WLO] : 0.0);
        acc_t wS = wt * S;
        acc->se += wS;
        acc->dse += wS * dls;
        acc->g += c * g;
        acc->dg += c * dg;
        acc->cse += wt * cS;
        acc->cg += c * ym;
        acc->sdse += wS * ky;
        acc->sdg += c * kr_;
    }
}

/* Se from the sums: 1 - sum w (1 - S) near saturation (the weights add up
 * to 1 exactly, the last one in two parts), the plain sum elsewhere. */
static acc_t se_of(const dur_sum *q)
{
    return q->cse < 0.5 ? 1.0 - q->cse : q->se;
}

static void dur_sums(const double *a, double s, dur_sum *acc)
{
    int i, nm = (int)a[A_NMODES];
    acc->se = acc->dse = acc->g = acc->dg = acc->cse = acc->cg = 0.0;
    acc->sdse = acc->sdg = 0.0;
    for (i = 0; i < nm; i++)
        mode_add(a, i, s, acc);
}

/* The fused core (batch_durner.c) for psik_eval and psik_eval_batch
 * alike, so that both give the same bits; not in a PSIK_EXTENDED build,
 * whose long double sums are the point of that build. */
#if defined(PSIK_EXTENDED) && LDBL_MANT_DIG >= 64
#  define DUR_FUSED 0
#else
#  define DUR_FUSED 1
#endif

#if DUR_FUSED
/* Constants of the fused point and batch kernels (batch_durner.c). */
static psik_durc dur_coef(const psik_model *m)
{
    const double *a = m->aux;
    int i, nm = (int)a[A_NMODES];
    psik_durc c;
    for (i = 0; i < 3; i++) {
        int j = i < nm ? i : nm - 1;
        double n = a[A_N(j)];
        c.alpha[i] = a[A_ALPHA(j)];
        c.n[i] = n;
        c.m[i] = (n - 1.0) / n;
        c.k[i] = n - 1.0;
        /* the last weight with its remainder, as mode_add sums it */
        c.w[i] = a[A_W(j)] + (j == nm - 1 ? a[A_WLO] : 0.0);
        c.c[i] = a[A_C(j)];
    }
    c.l = a[A_L];
    c.nm = nm;
    return c;
}
#endif

static void dur_point(const psik_model *m, double s, psik_point *out)
{
    const double *a = m->aux;
    const acc_t L = a[A_L];
    dur_sum q;
    acc_t kr;
#if DUR_FUSED
    {
        psik_durc c = dur_coef(m);
        if (psik__dur_point_fast(&c, s, out))
            return;
    }
#endif
    if (isinf(s)) {
        out->se = out->kr = out->dse = out->dkr = 0.0;
        return;
    }
    dur_sums(a, s, &q);
    q.se = se_of(&q);
    out->se = (double)q.se;
    /* the scaled sums for s >= 1, where w S dS/dh may underflow term by
     * term; the direct ones for s < 1, where 1/s may overflow */
    out->dse = (double)(s >= 1.0 ? q.sdse / s : q.dse);
    if (!(q.se > 0.0) || !(q.g > 0.0)) {
        out->kr = out->dkr = 0.0;
        return;
    }
    if (q.cse < 0.5 && q.cg < 0.5) {
        /* near saturation: from the complements, which keep the digits
         * that Se and G ~ 1 have lost */
        kr = AF(exp)(L * AF(log1p)(-q.cse) + 2.0 * AF(log1p)(-q.cg));
    } else if (L >= 0.0 || q.se > 1e-150L) {
        /* (Se^L G) G: for L < 0 the first product lifts G before the
         * second, so G^2 does not underflow on its own */
        kr = (AF(pow)(q.se, L) * q.g) * q.g;
    } else {
        /* Se^L could overflow: the square root of Kr stays in range */
        acc_t r = AF(pow)(q.se, 0.5 * L) * q.g;
        kr = r * r;
    }
    out->kr = (double)kr;
    if (!(out->kr > 0.0))
        out->dkr = 0.0;
    else if (s >= 1.0)
        out->dkr = (double)(kr * ((L * (q.sdse / q.se) + 2.0 * (q.sdg / q.g)) / s));
    else
        out->dkr = (double)(kr * (L * (q.dse / q.se) + 2.0 * (q.dg / q.g)));
}

/* Se alone: the same path as dur_point (the fused core where it applies,
 * else the same sums), so psik_se and psik_eval agree to the last bit. */
static double dur_se(const psik_model *m, double s)
{
    dur_sum q;
#if DUR_FUSED
    {
        psik_durc c = dur_coef(m);
        psik_point p;
        if (psik__dur_point_fast(&c, s, &p))
            return p.se;
    }
#endif
    if (isinf(s))
        return 0.0;
    dur_sums(m->aux, s, &q);
    return (double)se_of(&q);
}

static double dur_kr(const psik_model *m, double s)
{
    psik_point out;
    dur_point(m, s, &out);
    return out.kr;
}

/* ln s_i with S_i(s_i) = se: s_i = (1/alpha) (se^(-1/m) - 1)^(1/n), in
 * logarithms so that no power overflows (a bracket end, not the answer). */
static double mode_log_suction(const double *a, int i, double se)
{
    const double n = a[A_N(i)], mm = (n - 1.0) / n;
    double t = -log(se) / mm, lx;        /* ln(1 + x) */
    lx = t > 700.0 ? t + log(-expm1(-t)) : log(expm1(t));   /* ln x */
    return lx / n - log(a[A_ALPHA(i)]);
}

static double clamp_s(double ls)
{
    if (ls > 709.0)
        return DBL_MAX;
    if (ls < -744.0)
        return 4.9406564584124654e-324;
    return exp(ls);
}

/* F = ln(Se(s)/target) and dF/dln s = -s dSe/dh / Se. */
static double dur_residual(const double *a, double s, double target, double *dF)
{
    dur_sum q;
    dur_sums(a, s, &q);
    q.se = se_of(&q);
    if (!(q.se > 0.0)) {
        *dF = 0.0;
        return -INFINITY;
    }
    *dF = (double)(-(q.sdse / q.se));
    return (double)AF(log1p)((q.se - target) / target);
}

static double dur_suction(const psik_model *m, double se)
{
    const double *a = m->aux;
    int i, nm = (int)a[A_NMODES], it;
    double llo = INFINITY, lhi = -INFINITY, slo, shi, s, F, dF, Fprev = INFINITY;
    int final = 0;
    for (i = 0; i < nm; i++) {
        double ls = mode_log_suction(a, i, se);
        if (ls < llo) llo = ls;
        if (ls > lhi) lhi = ls;
    }
    /* widen by a rounding margin; beyond the doubles: clamp */
    slo = clamp_s(llo) * (1.0 - 1e-12);
    shi = clamp_s(lhi) * (1.0 + 1e-12);
    if (shi > DBL_MAX)
        shi = DBL_MAX;
    if (!(slo > 0.0))
        slo = 4.9406564584124654e-324;
    /* the root lies beyond the largest double: report infinity */
    if (dur_se(m, shi) > se && shi == DBL_MAX)
        return INFINITY;
    s = exp(0.5 * (log(slo) + log(shi)));
    for (it = 0; it < MAX_ITER; it++) {
        double dt = NAN, snew = NAN;
        int newton;
        F = dur_residual(a, s, se, &dF);
        if (F == 0.0)
            return s;
        if (F > 0.0)            /* Se too large: the root is drier */
            slo = s;
        else
            shi = s;
        if (final)
            break;
        if (dF < 0.0) {
            dt = -F / dF;
            snew = fabs(dt) < 1.0 ? s + s * expm1(dt) : s * exp(dt);
        }
        /* Newton when it stays in the bracket and converges (|F| halves,
         * or the step is already small); otherwise bisection in ln s */
        newton = snew >= slo && snew <= shi &&
                 (fabs(F) <= 0.5 * fabs(Fprev) || fabs(dt) <= 1e-3);
        if (!newton) {
            snew = exp(0.5 * (log(slo) + log(shi)));
            dt = INFINITY;
        }
        Fprev = F;
        if (snew == s)
            break;              /* the step is below the resolution of s */
        s = snew;
        if (fabs(dt) < 0x1p-45)
            final = 1;          /* one more Newton step reaches the noise level */
        if (shi - slo <= 4.0 * DBL_EPSILON * slo)
            break;
    }
    if (final && dF < 0.0) {
        double dt = -F / dF, snew = s + s * expm1(dt);
        if (snew >= slo && snew <= shi)
            s = snew;
    }
    return s;
}

#if DUR_FUSED
static void dur_batch(const psik_model *m, size_t count, const double *h,
                      double *theta, double *k, double *capacity, double *dk_dh)
{
    psik_durc c = dur_coef(m);
    psik__dur_batch(m, &c, count, h, theta, k, capacity, dk_dh);
}
#  define DUR_BATCH dur_batch
#else
#  define DUR_BATCH NULL  /* psik_eval_batch loops over psik_eval */
#endif

/* ------------------------------------------------------------ validation */

static psik_status check_mode(const double *par, int ia, int in, int mode,
                              char *msg, size_t cap)
{
    if (!(par[ia] > 0.0))
        return psik__fail(msg, cap, PSIK_EDOMAIN,
                          "alpha%d must be greater than 0 (got %g)", mode, par[ia]);
    if (!(par[in] > 1.0))
        return psik__fail(msg, cap, PSIK_EDOMAIN,
                          "n%d must be greater than 1 (got %g)", mode, par[in]);
    return PSIK_OK;
}

static psik_status check_weight(double w, const char *name, char *msg, size_t cap)
{
    if (!(w > 0.0 && w < 1.0))
        return psik__fail(msg, cap, PSIK_EDOMAIN,
                          "%s must be between 0 and 1, both excluded: it is the share "
                          "of a pore system (got %g)", name, w);
    return PSIK_OK;
}

/* l >= -2 keeps dKr/dh >= 0, for any number of modes. The closed form G
 * is the Mualem ratio Gamma(Se) = I(Se)/I(1), I(S) = int_0^S dS'/s(S')
 * (Priesack & Durner 2006), so dKr/dSe = Se^(L-1) Gamma (L Gamma +
 * 2 Se Gamma'(Se)) with Gamma'(Se) = 1/(s(Se) I(1)). As s(S') >= s(Se)
 * for S' <= Se, I(Se) <= Se/s(Se), i.e. Se Gamma'/Gamma >= 1: the bracket
 * is >= (L + 2) Gamma >= 0 for L >= -2. (The dry end alone would allow
 * down to -2/m of the mode with the smallest n; between modes the ratio
 * can dip lower, and -2 is the bound that holds for every weight.) */
static psik_status check_l(double L, char *msg, size_t cap)
{
    if (!(L >= -2.0))
        return psik__fail(msg, cap, PSIK_EDOMAIN,
                          "l must be at least -2 for the Durner model (otherwise K "
                          "could decrease as the soil wets) (got %g)", L);
    return PSIK_OK;
}

static psik_status d2_check(const double *par, char *msg, size_t cap)
{
    psik_status st;
    if ((st = check_weight(par[2], "w1", msg, cap)) != PSIK_OK)
        return st;
    if ((st = check_mode(par, 3, 4, 1, msg, cap)) != PSIK_OK)
        return st;
    if ((st = check_mode(par, 5, 6, 2, msg, cap)) != PSIK_OK)
        return st;
    return check_l(par[8], msg, cap);
}

static psik_status d3_check(const double *par, char *msg, size_t cap)
{
    psik_status st;
    if ((st = check_weight(par[2], "w1", msg, cap)) != PSIK_OK)
        return st;
    if ((st = check_weight(par[5], "w2", msg, cap)) != PSIK_OK)
        return st;
    if (!((1.0 - par[2]) - par[5] > 0.0))
        return psik__fail(msg, cap, PSIK_EDOMAIN,
                          "w1 + w2 must be less than 1: the third weight is "
                          "1 - w1 - w2 and must be positive (got w1 = %g, w2 = %g)",
                          par[2], par[5]);
    if ((st = check_mode(par, 3, 4, 1, msg, cap)) != PSIK_OK)
        return st;
    if ((st = check_mode(par, 6, 7, 2, msg, cap)) != PSIK_OK)
        return st;
    if ((st = check_mode(par, 8, 9, 3, msg, cap)) != PSIK_OK)
        return st;
    return check_l(par[11], msg, cap);
}

static void set_mode(double *a, int i, double alpha, double n, double w)
{
    a[A_ALPHA(i)] = alpha;
    a[A_N(i)] = n;
    a[A_W(i)] = w;
}

static void finish_prepare(psik_model *m, int nm, double L)
{
    /* the normalized conductivity weights c_i = w_i alpha_i / sum, each
     * rounded once (long double sum at init: no error in the sum itself
     * reaches G beyond the rounding of c_i) */
    double *a = m->aux;
    acc_t sum = 0.0;
    int i;
    for (i = 0; i < nm; i++)
        sum += (acc_t)a[A_W(i)] * a[A_ALPHA(i)];
    sum += (acc_t)a[A_WLO] * a[A_ALPHA(nm - 1)];
    for (i = 0; i < nm; i++) {
        acc_t w = a[A_W(i)];
        if (i == nm - 1)
            w += a[A_WLO];
        a[A_C(i)] = (double)(w * a[A_ALPHA(i)] / sum);
    }
    a[A_FREE] = 0.0;
    a[A_L] = L;
    a[A_NMODES] = (double)nm;
    m->h_sat = 0.0;
}

static void d2_prepare(psik_model *m)
{
    const double *p = m->par;
    set_mode(m->aux, 0, p[3], p[4], p[2]);
    set_mode(m->aux, 1, p[5], p[6], 1.0 - p[2]);
    m->aux[A_WLO] = (1.0 - m->aux[A_W(1)]) - p[2];   /* exact remainder */
    finish_prepare(m, 2, p[8]);
}

static void d3_prepare(psik_model *m)
{
    const double *p = m->par;
    set_mode(m->aux, 0, p[3], p[4], p[2]);
    set_mode(m->aux, 1, p[6], p[7], p[5]);
    {
        /* w3 = (1 - w1) - w2 in two parts: each difference's remainder */
        double t = 1.0 - p[2], e1 = (1.0 - t) - p[2];
        double w3 = t - p[5], e2 = (t - w3) - p[5];
        set_mode(m->aux, 2, p[8], p[9], w3);
        m->aux[A_WLO] = e1 + e2;
    }
    finish_prepare(m, 3, p[11]);
}

static const psik_param_info d2_param[] = {
    {"theta_r", 0.0, 0.5},
    {"theta_s", 0.05, 1.0},
    {"w1", 0.01, 0.99},
    {"alpha1", 1e-5, 100.0},
    {"n1", 1.001, 20.0},
    {"alpha2", 1e-5, 100.0},
    {"n2", 1.001, 20.0},
    {"ks", 1e-6, 1e5},
    {"l", -2.0, 10.0},
};

static const psik_param_info d3_param[] = {
    {"theta_r", 0.0, 0.5},
    {"theta_s", 0.05, 1.0},
    {"w1", 0.01, 0.98},
    {"alpha1", 1e-5, 100.0},
    {"n1", 1.001, 20.0},
    {"w2", 0.01, 0.98},
    {"alpha2", 1e-5, 100.0},
    {"n2", 1.001, 20.0},
    {"alpha3", 1e-5, 100.0},
    {"n3", 1.001, 20.0},
    {"ks", 1e-6, 1e5},
    {"l", -2.0, 10.0},
};

const psik_family psik__fam_durner2 = {
    .kind = PSIK_DURNER2,
    .name = "durner2",
    .title = "Durner (1994) bimodal van Genuchten retention with Mualem conductivity "
             "(Priesack & Durner 2006)",
    .npar = 9,
    .param = d2_param,
    .ks_index = 7,
    .check = d2_check,
    .prepare = d2_prepare,
    .point = dur_point,
    .se = dur_se,
    .kr = dur_kr,
    .point_se = NULL,
    .suction = dur_suction,
    .batch = DUR_BATCH,
};

const psik_family psik__fam_durner3 = {
    .kind = PSIK_DURNER3,
    .name = "durner3",
    .title = "Durner (1994) trimodal van Genuchten retention with Mualem conductivity "
             "(Priesack & Durner 2006)",
    .npar = 12,
    .param = d3_param,
    .ks_index = 10,
    .check = d3_check,
    .prepare = d3_prepare,
    .point = dur_point,
    .se = dur_se,
    .kr = dur_kr,
    .point_se = NULL,
    .suction = dur_suction,
    .batch = DUR_BATCH,
};
