/* point_gardner.c - the Gardner (1958) point for one head at a time: what
 * psik_eval (through psik_family.eval), psik_se, psik_theta, psik_kr and
 * psik_k use.
 *
 * Se = Kr = exp(-alpha s) with alpha s = p + e exact (one fused
 * multiply-add, or the exact split) and the exponential of
 * fastmath_scalar.h (table-driven, a short polynomial: within 1 ulp, 0.74
 * measured), where the batch kernel (batch_gardner.c) takes fastmath.h's
 * table-free exponential built for the vectoriser, which costs a single
 * point about twice as much. The two agree to 1 ulp or so, not bit for bit
 * (tests/unit/test_isa.c checks 1e-14). For alpha s > 700 (Se < 1e-304)
 * this code declines and the batch kernel's point, which handles
 * underflow, answers. Compiled once per instruction set (isa.h),
 * -ffp-contract=off as the kernels.
 */
#include "fast_simple.h"
#include "fastmath_scalar.h"
#include "isa.h"

PSIK_FM int g_sc(double alpha, double s, double *se)
{
    double p, e;
    psik__fm_two_prod(alpha, s, &p, &e);
    if (!(p <= 700.0))   /* far dry, infinite or NaN suction */
        return 0;
    *se = psik__sc_exp_dd(-p, -e);
    return 1;
}

PSIK_HIDDEN int PSIK_ISA_FN(psik__g_point_sc)(double alpha, double s, psik_point *out);
PSIK_HIDDEN int PSIK_ISA_FN(psik__g_point_sc)(double alpha, double s, psik_point *out)
{
    double se;
    if (!g_sc(alpha, s, &se))
        return 0;
    out->se = se;
    out->kr = se;
    out->dse = alpha * se;
    out->dkr = alpha * se;
    return 1;
}

/* psik_eval's unsaturated case: the point assembled as eval.c does (same
 * bits; Se = exp(-p) lies in [0, 1], so eval.c's clamps on the point are
 * the identity). */
PSIK_HIDDEN int PSIK_ISA_FN(psik__gardner_eval)(const psik_model *m, double s, psik_state *out);
PSIK_HIDDEN int PSIK_ISA_FN(psik__gardner_eval)(const psik_model *m, double s, psik_state *out)
{
    double alpha = m->aux[0], se;
    if (!g_sc(alpha, s, &se))
        return 0;
    psik__state_of(m, se, se, alpha * se, alpha * se, out);
    return 1;
}

#if PSIK_ISA_BASE
typedef int g_point_sc_t(double alpha, double s, psik_point *out);
typedef int g_eval_t(const psik_model *m, double s, psik_state *out);
PSIK_ISA_SELECT(g_point_sc_t, psik__g_point_sc)
PSIK_ISA_SELECT(g_eval_t, psik__gardner_eval)

PSIK_HIDDEN int psik__gardner_point_scalar(double alpha, double s, psik_point *out)
{
    return psik__g_point_sc_pick()(alpha, s, out);
}

PSIK_HIDDEN int psik__gardner_eval_scalar(const psik_model *m, double s, psik_state *out)
{
    return psik__gardner_eval_pick()(m, s, out);
}
#endif
