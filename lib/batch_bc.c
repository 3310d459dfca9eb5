/* batch_bc.c - fused and vectorised Brooks & Corey evaluation (bcm, bcb):
 * the point psik_eval uses and the psik_eval_batch kernel.
 *
 * Method (bc.c's notation): r = s_b/s (one rounding, amplified only by the
 * exponents, which are the condition numbers), ln r in two doubles
 * (fastmath.h), Se = exp(lambda ln r) and Kr = exp((e_hi + e_lo) ln r)
 * with the products in double-double, so that neither loses |ln r| ulp at
 * the dry end; dSe/dh = lambda Se / s and dKr/dh = e Kr / s through one
 * reciprocal. One log and two exps per point, branch-free. Se and Kr are
 * exponentials of non-positive numbers and the derivatives are finite and
 * non-negative, so eval.c's clamps are the identity here (but for K' =
 * ks dKr/dh, clamped as there). Heads at or above h_b get the saturated
 * values by selects in the block (in the bench's log-uniform heads they
 * are nearly half, and psik_eval one by one cost more than the block);
 * NaN, infinite heads and those with s_b/s below the normal range
 * (suctions 1e308 times the air-entry value) are done by psik_eval.
 *
 * Compiled once per instruction set (isa.h), like batch_vg.c; on one
 * machine psik_eval and psik_eval_batch use the same variant's code.
 */
#include "fast_block.h"
#include "fast_simple.h"
#include "fastmath.h"
#include "isa.h"

#include <float.h>
#include <math.h>

PSIK_FM int bc_core(const psik_bcc *c, double s, double *se_o, double *kr_o,
                    double *dse_o, double *dkr_o)
{
    double r = c->sb / s, lh, ll, eh, el, p, e, kh, kl, se, kr, invs;
    lh = psik__fm_log_dd_nrm(r, 0.0, &ll);
    psik__fm_mul_dd(c->lam, lh, ll, &eh, &el);
    psik__fm_two_prod(c->ek_hi, lh, &p, &e);
    psik__fm_fast_two_sum(p, e + (c->ek_hi * ll + c->ek_lo * lh), &kh, &kl);
    se = psik__fm_exp_dd(eh, el);
    kr = psik__fm_exp_dd(kh, kl);
    invs = 1.0 / s;
    *se_o = se;
    *kr_o = kr;
    *dse_o = (c->lam * se) * invs;
    *dkr_o = (c->ek_hi * kr) * invs;
    return (r >= DBL_MIN) & (s <= DBL_MAX);
}

PSIK_HIDDEN int PSIK_ISA_FN(psik__bc_point)(const psik_bcc *c, double s, psik_point *out);
PSIK_HIDDEN int PSIK_ISA_FN(psik__bc_point)(const psik_bcc *c, double s, psik_point *out)
{
    double se, kr, dse, dkr;
    if (!bc_core(c, s, &se, &kr, &dse, &dkr))
        return 0;
    out->se = se;
    out->kr = kr;
    out->dse = dse;
    out->dkr = dkr;
    return 1;
}

PSIK_HIDDEN psik_block_range_t PSIK_ISA_FN(psik__bc_block);
PSIK_HIDDEN int PSIK_ISA_FN(psik__bc_block)(const psik_model *mo, const void *coef,
                                            double h_lo, double h_hi, int cnt,
                                            const double *restrict h, double *restrict th,
                                            double *restrict kk, double *restrict cc,
                                            double *restrict dk)
{
    const psik_bcc *c = (const psik_bcc *)coef;
    const double dts = mo->theta_s - mo->theta_r, ks = mo->ks;
    const double h_sat = mo->h_sat, ts = mo->theta_s;
    int i, out = 0;
    for (i = 0; i < cnt; i++) {
        double hi = h[i], se, kr, dse, dkr;
        int sat = hi >= h_sat;
        (void)bc_core(c, -hi, &se, &kr, &dse, &dkr);
        /* saturated heads as psik_eval gives them, here rather than
         * redone one by one (the core's values there are garbage) */
        th[i] = psik__fm_sel(sat, ts, psik__fb_theta(mo, se));
        kk[i] = psik__fm_sel(sat, ks, ks * kr);
        cc[i] = psik__fm_sel(sat, 0.0, dts * dse);
        dk[i] = psik__fm_sel(sat, 0.0, psik__fb_pos(ks * dkr));
        out |= !(hi > h_lo) | !(hi < h_hi);
    }
    return out;
}

#if PSIK_ISA_BASE
typedef int bc_point_t(const psik_bcc *c, double s, psik_point *out);
PSIK_ISA_SELECT(bc_point_t, psik__bc_point)
PSIK_ISA_SELECT(psik_block_range_t, psik__bc_block)

PSIK_HIDDEN int psik__bc_point_fast(const psik_bcc *c, double s, psik_point *out)
{
    return psik__bc_point_pick()(c, s, out);
}

PSIK_HIDDEN void psik__bc_batch(const psik_model *m, const psik_bcc *c, size_t count,
                                const double *h, double *theta, double *k,
                                double *capacity, double *dk_dh)
{
    /* the core holds for s_b < s < s_b / DBL_MIN (halved: a margin) */
    double s_max = c->sb * (0.5 / DBL_MIN);
    /* saturated heads the block does itself: only NaN, +inf and the
     * far dry end go to psik_eval */
    psik__blocks_run_range(m, c, psik__bc_block_pick(), s_max < DBL_MAX ? -s_max : -DBL_MAX,
                           HUGE_VAL, count, h, theta, k, capacity, dk_dh);
}
#endif /* PSIK_ISA_BASE */
