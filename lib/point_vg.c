/* point_vg.c - the fused van Genuchten point that psik_eval, psik_kr,
 * psik_capacity and psik_dk_dh use (vgm, vgm_ae, vgb).
 *
 * Same method as the batch kernel (batch_vg.c, which explains it): with p =
 * alpha s, lp = log p in two doubles, t = n lp, a = exp(-|t|), b =
 * log1p(a),
 *   ln Se  = -m b            (wet, t <= 0)      -k lp - m b   (dry)
 *   ln y^m = k lp - m b      (wet)              -m b          (dry)
 * the exponents in double-double, Se = exp(ln Se), g = 1 - y^m =
 * -expm1(ln y^m), Se^l = sqrt(Se) for l = 1/2, and the derivatives from
 * y = x/(1+x) and r = 1/(1+x). One difference in the algebra: the exponent
 * that is not -m b is the same expression, sign(t) k lp - m b, on both
 * sides, so it is formed once and the two exponents are swapped by a
 * select on the wet/dry side.
 *
 * What differs from the batch kernel is the arithmetic: this code runs one
 * point at a time, so its cost is the length of its dependency chain, and
 * it uses fastmath_scalar.h (table-driven, exact reductions, short
 * polynomials). a and b come from one step, psik__sc_log1p_exp_dd, not
 * from an exp and then a log1p: the chain is log, log1p(exp), exp. b is a
 * pair good to 2^-57 relative (its uses need less: m b enters ln Se and ln
 * y^m as an absolute error, and g ~ m b where y^m -> 1 keeps b's relative
 * error). Its values meet
 * the same accuracy goal (tests/unit/test_accuracy.c measures psik_eval and
 * psik_eval_batch separately) and agree with the batch kernel's to a few
 * ulp (tests/unit/test_isa.c checks 1e-14 relative); they are not the same
 * bits.
 *
 * Compiled once per instruction set (isa.h) like the batch kernels: the
 * FMA variants form the exact products and the log reduction in one
 * instruction each. -ffp-contract=off as there.
 */
#include "fast_vg.h"
#include "fastmath_scalar.h"
#include "isa.h"

#include <float.h>
#include <math.h>

/* c * (xh + xl) as an unnormalised double-double (c, xh moderate). */
PSIK_FM void sc_mul(double c, double xh, double xl, double *ph, double *pl)
{
    double e;
    psik__fm_two_prod(c, xh, ph, &e);
    *pl = PSIK_SC_MAD(c, xl, e);
}

/* The exponents, shared by the whole point and by Se alone: t = n log p
 * (th + tl), a = e^(-|t|), and ln Se = eS, ln y^m = eY as unnormalised
 * pairs. Returns 0 outside the core's range (p not normal, |t| > 700). */
typedef struct sc_exps {
    double th, a, eSh, eSl, eYh, eYl;
} sc_exps;

PSIK_FM int sc_exponents(const double *aux, double s, sc_exps *o)
{
    const double n = aux[PSIK_VGA_N], m = aux[PSIK_VGA_M], k = aux[PSIK_VGA_K];
    double p = aux[PSIK_VGA_ALPHA] * s;
    double lph, lpl, th, tl, ah, al, a, bh, bl, mbh, mbl, kh, kl, dh, dl, sg;
    if (!(p >= DBL_MIN && p <= DBL_MAX))
        return 0;
    lph = psik__sc_log_dd(p, &lpl);
    sc_mul(n, lph, lpl, &th, &tl);
    if (!(th >= -700.0 && th <= 700.0))
        return 0;
    /* -|t| in two parts, with sg = +1 on the wet side (t <= 0), -1 on the
     * dry side (exact products) */
    sg = copysign(1.0, -th);
    ah = -fabs(th);
    al = tl * sg;
    bh = psik__sc_log1p_exp_dd(ah, al, &a, &bl);   /* b = log1p(a), a = e^(-|t|) */
    sc_mul(m, bh, bl, &mbh, &mbl);                  /* m b */
    sc_mul(k * sg, lph, lpl, &kh, &kl);            /* sign(-t) k lp */
    psik__fm_two_sum(kh, -mbh, &dh, &dl);
    dl = dl + (kl - mbl);
    /* wet: ln Se = -m b, ln y^m = d; dry: ln Se = d, ln y^m = -m b */
    o->th = th;
    o->a = a;
    o->eSh = psik__sc_sel_le(th, 0.0, -mbh, dh);
    o->eSl = psik__sc_sel_le(th, 0.0, -mbl, dl);
    o->eYh = psik__sc_sel_le(th, 0.0, dh, -mbh);
    o->eYl = psik__sc_sel_le(th, 0.0, dl, -mbl);
    return 1;
}

PSIK_FM int sc_core(const double *aux, double s, int half, int model, psik_point *out)
{
    const double alpha = aux[PSIK_VGA_ALPHA], m = aux[PSIK_VGA_M];
    const double k = aux[PSIK_VGA_K], ka = k * alpha;
    const double l = model == PSIK_VGC_BURDINE ? 0.5 : aux[PSIK_VGA_L];
    double p = alpha * s;
    double S, ym, em1, g, inv, y, r, invp, dls, dg, se, G, dG, seL, kr, dkr;
    sc_exps e;
    if (!sc_exponents(aux, s, &e))
        return 0;
    S = psik__sc_exp_dd(e.eSh, e.eSl);
    psik__sc_exp_expm1_dd(e.eYh, e.eYl, &ym, &em1);
    g = -em1;
    inv = 1.0 / (1.0 + e.a);
    y = psik__sc_sel_le(e.th, 0.0, e.a * inv, inv);
    r = psik__sc_sel_le(e.th, 0.0, inv, e.a * inv);
    invp = 1.0 / p;
    dls = ka * y * invp;
    dg = ka * ym * r * invp;
    se = S;
    G = g;
    dG = dg;
    if (model == PSIK_VGC_MUALEM_AE) {
        /* Se = S / Sc; near the entry head on the wet side as
         * exp(-m log1p((x - xe) / (1 + xe))), which keeps 1 - Se. */
        double xe = aux[PSIK_VGA_XE];
        if (e.th <= 0.0 && xe <= 1.0) {
            double wh, wl, vh, vl;
            wh = psik__sc_log1p_dd((e.a - xe) / (1.0 + xe), &wl);
            sc_mul(-m, wh, wl, &vh, &vl);
            se = psik__sc_exp_dd(vh, vl);
        } else {
            se = S / aux[PSIK_VGA_SC];
        }
        G = g / aux[PSIK_VGA_GE];
        dG = dg / aux[PSIK_VGA_GE];
    }
    seL = 1.0;
    if (model != PSIK_VGC_BURDINE) {
        if (half) {
            seL = sqrt(se);
        } else {
            double lh, ll, esh, esl;
            if (model == PSIK_VGC_MUALEM_AE) {
                if (!(se >= DBL_MIN))
                    return 0;
                esh = psik__sc_log_dd(se, &esl);
            } else {
                esh = e.eSh;
                esl = e.eSl;
            }
            sc_mul(l, esh, esl, &lh, &ll);
            if (!(lh <= 708.0 && lh >= -700.0))
                return 0;
            seL = psik__sc_exp_dd(lh, ll);
        }
    }
    psik__vg_kr_from(model, l, se, seL, G, dG, dls, &kr, &dkr);
    out->se = se;
    out->kr = kr;
    out->dse = dls * se;
    out->dkr = dkr;
    return 1;
}

PSIK_FM int sc_dispatch(const double *aux, int model, double s, psik_point *out)
{
    int half = aux[PSIK_VGA_L] == 0.5;
    if (model == PSIK_VGC_MUALEM)
        return half ? sc_core(aux, s, 1, PSIK_VGC_MUALEM, out)
                    : sc_core(aux, s, 0, PSIK_VGC_MUALEM, out);
    if (model == PSIK_VGC_MUALEM_AE)
        return half ? sc_core(aux, s, 1, PSIK_VGC_MUALEM_AE, out)
                    : sc_core(aux, s, 0, PSIK_VGC_MUALEM_AE, out);
    return sc_core(aux, s, 1, PSIK_VGC_BURDINE, out);   /* l = 1/2 by definition */
}

PSIK_HIDDEN int PSIK_ISA_FN(psik__vg_point_sc)(const double *aux, int model, double s,
                                               psik_point *out);
PSIK_HIDDEN int PSIK_ISA_FN(psik__vg_point_sc)(const double *aux, int model, double s,
                                               psik_point *out)
{
    return sc_dispatch(aux, model, s, out);
}

/* Se alone (psik_se, psik_theta of vgm, vgb and vgm_ae's curve; see
 * fast_vg.h): the exponents and one exp, Se = exp(eS) in (0, 1]. Returns 0
 * where sc_exponents does. */
PSIK_HIDDEN int PSIK_ISA_FN(psik__vg_se_sc)(const double *aux, double s, double *se);
PSIK_HIDDEN int PSIK_ISA_FN(psik__vg_se_sc)(const double *aux, double s, double *se)
{
    sc_exps e;
    if (!sc_exponents(aux, s, &e))
        return 0;
    *se = psik__sc_exp_dd(e.eSh, e.eSl);
    return 1;
}

/* psik_eval's unsaturated case (psik_family.eval): the point, clamped and
 * assembled exactly as eval.c does, without the copies between. For the
 * kinds whose values lie in range by construction (Se = exp of a
 * non-positive number, Kr = Se^(1/2) g^2 or Se^2 g with 0 <= g = -expm1(<=
 * 0) <= 1, dSe/dh finite: p >= DBL_MIN only on the wet side, where y/p =
 * p^(n-1)/(1+x)) the clamps on the point's Se, Kr and dSe/ds are the
 * identity and are left out; dKr/ds, which overflows near saturation for
 * n < 2, is clamped, and psik__state_of clamps C and dK/dh as eval.c. */
PSIK_FM int sc_eval(const psik_model *m, double s, int half, int model, psik_state *out)
{
    psik_point p;
    int pure = half && model != PSIK_VGC_MUALEM_AE;
    if (!sc_core(m->aux, s, half, model, &p))
        return 0;
    psik__state_of(m, pure ? p.se : psik__clamp01(p.se), pure ? p.kr : psik__clamp01(p.kr),
                   pure ? p.dse : psik__clamp_pos(p.dse), psik__clamp_pos(p.dkr), out);
    return 1;
}

PSIK_HIDDEN psik_eval_fn PSIK_ISA_FN(psik__vgm_eval), PSIK_ISA_FN(psik__vgm_ae_eval),
    PSIK_ISA_FN(psik__vgb_eval);
PSIK_HIDDEN int PSIK_ISA_FN(psik__vgm_eval)(const psik_model *m, double s, psik_state *out)
{
    return m->aux[PSIK_VGA_L] == 0.5 ? sc_eval(m, s, 1, PSIK_VGC_MUALEM, out)
                                     : sc_eval(m, s, 0, PSIK_VGC_MUALEM, out);
}
PSIK_HIDDEN int PSIK_ISA_FN(psik__vgm_ae_eval)(const psik_model *m, double s, psik_state *out)
{
    return m->aux[PSIK_VGA_L] == 0.5 ? sc_eval(m, s, 1, PSIK_VGC_MUALEM_AE, out)
                                     : sc_eval(m, s, 0, PSIK_VGC_MUALEM_AE, out);
}
PSIK_HIDDEN int PSIK_ISA_FN(psik__vgb_eval)(const psik_model *m, double s, psik_state *out)
{
    return sc_eval(m, s, 1, PSIK_VGC_BURDINE, out);
}

#if PSIK_ISA_BASE
typedef int vg_point_sc_t(const double *aux, int model, double s, psik_point *out);
PSIK_ISA_SELECT(vg_point_sc_t, psik__vg_point_sc)
PSIK_ISA_SELECT(psik_eval_fn, psik__vgm_eval)
PSIK_ISA_SELECT(psik_eval_fn, psik__vgm_ae_eval)
PSIK_ISA_SELECT(psik_eval_fn, psik__vgb_eval)

PSIK_HIDDEN int psik__vg_point_scalar(const double *aux, int model, double s, psik_point *out)
{
    return psik__vg_point_sc_pick()(aux, model, s, out);
}

typedef int vg_se_sc_t(const double *aux, double s, double *se);
PSIK_ISA_SELECT(vg_se_sc_t, psik__vg_se_sc)

PSIK_HIDDEN int psik__vg_se_scalar(const double *aux, double s, double *se)
{
    return psik__vg_se_sc_pick()(aux, s, se);
}

PSIK_HIDDEN int psik__vgm_eval_scalar(const psik_model *m, double s, psik_state *out)
{
    return psik__vgm_eval_pick()(m, s, out);
}

PSIK_HIDDEN int psik__vgm_ae_eval_scalar(const psik_model *m, double s, psik_state *out)
{
    return psik__vgm_ae_eval_pick()(m, s, out);
}

PSIK_HIDDEN int psik__vgb_eval_scalar(const psik_model *m, double s, psik_state *out)
{
    return psik__vgb_eval_pick()(m, s, out);
}
#endif
