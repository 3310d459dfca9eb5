/* psik_internal.h - the kinds table and helpers shared by lib/ (not installed).
 *
 * A model family fills one psik_family row. Every function pointer below
 * works on the unsaturated branch only: the dispatch in eval.c has already
 * handled NaN, NULL models and heads at or above m->h_sat, so a family sees
 * a suction s = -h with s > -h_sat (s may be +inf), or an effective
 * saturation 0 < se < 1.
 */
#ifndef PSIK_INTERNAL_H
#define PSIK_INTERNAL_H

#include "psik.h"

#include <float.h>

/* Internal helpers are static in the single-header build (which defines
 * PSIK_HIDDEN itself, see tools/mksingle.py), hidden otherwise. */
#ifndef PSIK_HIDDEN
#if defined(PSIK_STATIC) || defined(PSIK_SINGLE)
#  define PSIK_HIDDEN static
#elif defined(__GNUC__)
#  define PSIK_HIDDEN __attribute__((visibility("hidden")))
#else
#  define PSIK_HIDDEN
#endif
#endif

/* One parameter of a kind. lo/hi: the plausible range psik_param_range()
 * reports (default fitting bounds). Validation rules live in check(). */
typedef struct psik_param_info {
    const char *name;
    double lo, hi;
} psik_param_info;

/* Values at one point of the unsaturated branch. */
typedef struct psik_point {
    double se;    /* effective saturation */
    double kr;    /* relative conductivity */
    double dse;   /* d Se / d h  (>= 0) */
    double dkr;   /* d Kr / d h  (>= 0) */
} psik_point;

typedef struct psik_family {
    psik_kind kind;
    const char *name;             /* short name, e.g. "vgm" */
    const char *title;            /* one line with the reference */
    int npar;
    const psik_param_info *param; /* npar entries */
    int ks_index;                 /* index of ks in par */
    /* Kind-specific rules, after the common ones (finite values,
     * 0 <= theta_r < theta_s <= 1, ks > 0) have passed. Writes msg. */
    psik_status (*check)(const double *par, char *msg, size_t cap);
    /* Fill m->aux and m->h_sat from m->par (already validated). */
    void (*prepare)(psik_model *m);
    /* All four values at suction s (fused). */
    void (*point)(const psik_model *m, double s, psik_point *out);
    /* Optional (NULL: point, then eval.c's assembly). psik_eval's whole
     * unsaturated case at suction s in one step, for kinds whose one-point
     * code is worth the saved copies (lib/point_vg.c): fills out exactly
     * as point plus eval.c's assembly would, or returns 0 without writing,
     * and psik_eval takes the general path. */
    int (*eval)(const psik_model *m, double s, psik_state *out);
    /* Single values at suction s. */
    double (*se)(const psik_model *m, double s);
    double (*kr)(const psik_model *m, double s);
    /* All four values at effective saturation 0 < se < 1, computed from se
     * directly (k_theta, diffusivity); out->se = se. */
    void (*point_se)(const psik_model *m, double se, psik_point *out);
    /* Suction at effective saturation 0 < se < 1. */
    double (*suction)(const psik_model *m, double se);
    /* Optional (NULL: psik_eval_batch loops over psik_eval). The whole of
     * psik_eval_batch for this kind, h != NULL and m valid: every special
     * case (NaN, saturated, NULL outputs) is the batch function's to
     * handle, and its values must equal psik_eval's (lib/batch_*.c). */
    void (*batch)(const psik_model *m, size_t count, const double *h,
                  double *theta, double *k, double *capacity, double *dk_dh);
} psik_family;

/* eval.c's clamps, shared with the code that assembles a psik_state
 * itself. Finite and non-negative: an overflowed derivative becomes
 * DBL_MAX, a negative rounding residue (or NaN from 0 * inf) 0; Se and Kr
 * into [0, 1]. Written as selects of computed values, which compilers make
 * branch-free (a min, then a masked blend). */
static inline double psik__clamp_pos(double v)
{
    double t = v < DBL_MAX ? v : DBL_MAX;
    return v >= 0.0 ? t : 0.0;
}

static inline double psik__clamp01(double v)
{
    double t = v < 1.0 ? v : 1.0;
    return v > 0.0 ? t : 0.0;
}

/* theta = theta_r + (theta_s - theta_r) Se, at most theta_s. */
static inline double psik__theta_of(const psik_model *m, double se)
{
    double t = m->theta_r + (m->theta_s - m->theta_r) * se;
    return t > m->theta_s ? m->theta_s : t;
}

/* psik_eval's result from a point whose Se and Kr lie in [0, 1] and whose
 * dSe/ds and dKr/ds are not negative: theta, K, and C and dK/dh clamped
 * (a product may overflow). eval.c and the one-point evals assemble
 * through this, so that their bits agree. */
static inline void psik__state_of(const psik_model *m, double se, double kr, double dse,
                                  double dkr, psik_state *out)
{
    out->se = se;
    out->theta = psik__theta_of(m, se);
    out->kr = kr;
    out->k = m->ks * kr;
    out->capacity = psik__clamp_pos((m->theta_s - m->theta_r) * dse);
    out->dk_dh = psik__clamp_pos(m->ks * dkr);
}

/* The table (kinds.c): psik__families[kind] for 0 < kind <
 * PSIK__NFAMILIES, NULL otherwise. */
#define PSIK__NFAMILIES 11
PSIK_HIDDEN const psik_family *psik__family(int kind);

/* Message helper: writes a formatted sentence into msg (snprintf). */
PSIK_HIDDEN psik_status psik__fail(char *msg, size_t cap, psik_status st,
                                   const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 4, 5)))
#endif
    ;

/* NaN into every non-NULL output of a batch call (eval.c). */
PSIK_HIDDEN void psik__fill_nan(size_t count, double *theta, double *k, double *capacity,
                                double *dk_dh);

/* Special functions (special.c). */
/* Regularized incomplete beta I_x(a,b) with y = 1 - x given separately (so
 * either end keeps its digits) and front = x^a y^b / B(a,b) computed by the
 * caller. Returns I_x(a,b); *comp = 1 - I_x(a,b). Continued fraction
 * (modified Lentz) on the side where it converges fast; a few ulp. */
PSIK_HIDDEN double psik__ibeta(double a, double b, double x, double y,
                               double front, double *comp);
/* Complete beta function B(a,b) for a, b > 0, from the same continued
 * fractions as psik__ibeta so that I_1 = 1 to rounding. */
PSIK_HIDDEN double psik__beta(double a, double b);
/* x^(e_hi + e_lo) for x > 0, with the exponent carried in two doubles so
 * that rounding of a derived exponent does not grow with |log x|. */
PSIK_HIDDEN double psik__pow2(double x, double e_hi, double e_lo);
/* Split 1/d into hi + lo with hi = fl(1/d). */
PSIK_HIDDEN void psik__recip2(double num, double den, double *hi, double *lo);
/* Inverse complementary error function, 0 <= t <= 2 (NaN outside;
 * +inf at 0, -inf at 2); within 2 ulp, erfcinv(2 - t) = -erfcinv(t) used
 * on (1, 2) so the digits of t near 2 are kept. */
PSIK_HIDDEN double psik__erfcinv(double t);
/* The standard normal distribution at z = zh + zl (|zl| <= ulp(zh), the
 * lo part entering to first order, so that rounding of z costs no
 * z^2 ulp): density, upper tail Q(z) = erfc(z/sqrt 2)/2, Mills ratio
 * Q/phi (z >= -37), ln Q as hi + lo (where Q underflows), each a few ulp. */
PSIK_HIDDEN double psik__normpdf(double zh, double zl);
PSIK_HIDDEN double psik__normq(double zh, double zl);
PSIK_HIDDEN double psik__mills(double zh, double zl);
PSIK_HIDDEN void psik__lognormq(double zh, double zl, double *hi, double *lo);
/* The z with Q(z) = p, 0 < p < 1, as hi + lo (condition-limited error). */
PSIK_HIDDEN void psik__normq_inv(double p, double *hi, double *lo);
/* ln(a/b) as hi + lo for finite a, b > 0 (absolute error ~1e-16). */
PSIK_HIDDEN void psik__log_ratio(double a, double b, double *hi, double *lo);

#endif
