/* gardner.c - the Gardner (1958) exponential model: one row of the kinds
 * table (gardner).
 *
 *   Se = Kr = exp(alpha h) = exp(-alpha s),  dSe/dh = dKr/dh = alpha Se,
 * the pair used by analytical infiltration and steady-flux solutions
 * (matric flux potential K/alpha exactly).
 *
 * Method: every evaluator takes the one-point code of point_gardner.c
 * (alpha s in two doubles, so about 1 ulp whatever alpha s; psik_eval
 * through .eval), or for alpha s > 700 the batch kernel's point of
 * batch_gardner.c; from Se (inverse, K(theta), D(theta)) s = -ln(Se)/alpha
 * and Kr = Se directly. Error: about 1 ulp x max(1, alpha s)
 * (tests/unit/test_accuracy.c); psik_eval_batch agrees to 1e-14.
 */
#include "psik_internal.h"
#include "fast_simple.h"

#include <math.h>

#define P_ALPHA 2
#define A_ALPHA 0

/* The one-point code, or the batch kernel's point where it declines. */
static void g_point(const psik_model *m, double s, psik_point *out)
{
    if (!psik__gardner_point_scalar(m->aux[A_ALPHA], s, out))
        psik__gardner_point_fast(m->aux[A_ALPHA], s, out);
}

/* Se = Kr, both from the point, so that the one-point evaluators agree bit
 * for bit. */
static double g_se(const psik_model *m, double s)
{
    psik_point p;
    g_point(m, s, &p);
    return p.se;
}

static void g_batch(const psik_model *m, size_t count, const double *h,
                    double *theta, double *k, double *capacity, double *dk_dh)
{
    psik__gardner_batch(m, count, h, theta, k, capacity, dk_dh);
}

static void g_point_se(const psik_model *m, double se, psik_point *out)
{
    double a = m->aux[A_ALPHA];
    out->se = se;
    out->kr = se;
    out->dse = a * se;
    out->dkr = a * se;
}

static double g_suction(const psik_model *m, double se)
{
    return -log(se) / m->aux[A_ALPHA];
}

static psik_status g_check(const double *par, char *msg, size_t cap)
{
    if (!(par[P_ALPHA] > 0.0))
        return psik__fail(msg, cap, PSIK_EDOMAIN,
                          "alpha must be greater than 0 (got %g)", par[P_ALPHA]);
    return PSIK_OK;
}

static void g_prepare(psik_model *m)
{
    m->aux[A_ALPHA] = m->par[P_ALPHA];
    m->h_sat = 0.0;
}

static const psik_param_info g_param[] = {
    {"theta_r", 0.0, 0.5},
    {"theta_s", 0.05, 1.0},
    {"alpha", 1e-5, 100.0},
    {"ks", 1e-6, 1e5},
};

const psik_family psik__fam_gardner = {
    .kind = PSIK_GARDNER,
    .name = "gardner",
    .title = "Gardner (1958) exponential, Se = Kr = exp(alpha h) (Srivastava & Yeh 1991 pairing)",
    .npar = 4,
    .param = g_param,
    .ks_index = 3,
    .check = g_check,
    .prepare = g_prepare,
    .point = g_point,
    .eval = psik__gardner_eval_scalar,
    .se = g_se,
    .kr = g_se,
    .point_se = g_point_se,
    .suction = g_suction,
    .batch = g_batch,
};
