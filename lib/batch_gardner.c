/* batch_gardner.c - fused and vectorised Gardner (1958) evaluation: the
 * point psik_eval uses and the psik_eval_batch kernel.
 *
 * Se = Kr = exp(-alpha s) with the product alpha s carried in two doubles
 * (one fused multiply-add, or the exact split), so the only error is the
 * exponential's (< 1 ulp) whatever alpha s is; dSe/dh = dKr/dh = alpha Se.
 * Se is the exponential of a non-positive number, so eval.c's clamps are
 * the identity. Heads at or above h_sat = 0, infinite and NaN go to
 * psik_eval. Compiled per instruction set
 * (isa.h); on one machine psik_eval and psik_eval_batch give equal bits.
 */
#include "fast_block.h"
#include "fast_simple.h"
#include "fastmath.h"
#include "isa.h"

PSIK_FM double g_core(double alpha, double s)
{
    double p, e;
    psik__fm_two_prod(alpha, s, &p, &e);
    e = psik__fm_sel(p < 1e3, e, 0.0);   /* exp underflows anyway; inf s: e NaN */
    return psik__fm_exp_dd(-p, -e);
}

typedef void g_point_t(double alpha, double s, psik_point *out);
PSIK_HIDDEN g_point_t PSIK_ISA_FN(psik__g_point);
PSIK_HIDDEN void PSIK_ISA_FN(psik__g_point)(double alpha, double s, psik_point *out)
{
    double se = g_core(alpha, s);
    out->se = se;
    out->kr = se;
    out->dse = alpha * se;
    out->dkr = alpha * se;
}

PSIK_HIDDEN psik_block_range_t PSIK_ISA_FN(psik__g_block);
PSIK_HIDDEN int PSIK_ISA_FN(psik__g_block)(const psik_model *mo, const void *coef,
                                           double h_lo, double h_hi, int cnt,
                                           const double *restrict h, double *restrict th,
                                           double *restrict kk, double *restrict cc,
                                           double *restrict dk)
{
    const double alpha = *(const double *)coef;
    const double dts = mo->theta_s - mo->theta_r, ks = mo->ks;
    int i, out = 0;
    for (i = 0; i < cnt; i++) {
        double hi = h[i], se = g_core(alpha, -hi), d = alpha * se;
        th[i] = psik__fb_theta(mo, se);
        kk[i] = ks * se;
        cc[i] = dts * d;
        dk[i] = psik__fb_pos(ks * d);
        out |= !(hi > h_lo) | !(hi < h_hi);
    }
    return out;
}

#if PSIK_ISA_BASE
PSIK_ISA_SELECT(g_point_t, psik__g_point)
PSIK_ISA_SELECT(psik_block_range_t, psik__g_block)

PSIK_HIDDEN void psik__gardner_point_fast(double alpha, double s, psik_point *out)
{
    psik__g_point_pick()(alpha, s, out);
}

PSIK_HIDDEN void psik__gardner_batch(const psik_model *m, size_t count, const double *h,
                                     double *theta, double *k, double *capacity,
                                     double *dk_dh)
{
    double alpha = m->aux[0];
    psik__blocks_run_range(m, &alpha, psik__g_block_pick(), -DBL_MAX, m->h_sat, count, h,
                           theta, k, capacity, dk_dh);
}
#endif /* PSIK_ISA_BASE */
