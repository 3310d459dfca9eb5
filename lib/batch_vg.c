/* batch_vg.c - fused and vectorised van Genuchten evaluation (vgm, vgm_ae,
 * vgb): the psik_eval_batch kernels (psik_eval has one-point code of its
 * own with the same method, lib/point_vg.c).
 *
 * Method. With p = alpha s and lp = log p carried in two doubles
 * (fastmath.h), t = n lp, a = exp(-|t|) (x on the wet side p <= 1, 1/x on
 * the dry side) and b = log1p(a):
 *   ln Se  = -m b            (wet)      -k lp - m b   (dry)
 *   ln y^m = k lp - m b      (wet)      -m b          (dry)
 * with k = m n exact, each exponent formed in double-double, so that
 * Se = exp(ln Se), y^m and g = 1 - y^m = -expm1(ln y^m) (one shared
 * reduction) keep a few ulp at both ends, exactly as the pow-based forms in
 * vg.c do; Se^l is sqrt(Se) for l = 1/2 (the usual value) and exp(l ln Se)
 * otherwise. Then dlnSe/dh = k alpha y / p and dg/dh = k alpha y^m r / p
 * with y = x/(1+x), r = 1/(1+x) from a. Transcendentals per point: two
 * logs and three exps (four for l != 1/2); vgm_ae adds one log1p and one
 * exp for the entry-corrected Se.
 *
 * Special cases without breaking the vector loop: every lane is computed
 * branch-free; lanes at or above h_sat, NaN, infinite, or outside the
 * core's range |t| <= 700 (heads 1e300 times beyond any soil's) are
 * flagged and recomputed afterwards by psik_eval, so they get exactly the
 * scalar path's values. The clamps are eval.c's, as selects.
 *
 * Instruction sets (isa.h): this file is compiled once per variant
 * (portable, SSE4.2, AVX2 with FMA, AVX-512 with FMA) and psik__isa() picks
 * one per call. The FMA variants use the table-free exp and log of
 * fastmath.h, so their bits differ from the portable ones by rounding
 * (both within the accuracy goal), and the batch agrees with psik_eval to
 * a few ulp (test_isa: 1e-14). No contraction into fused multiply-adds
 * beyond the explicit ones (-ffp-contract=off, pragma for clang).
 */
#include "fast_block.h"
#include "fast_vg.h"
#include "fastmath.h"
#include "isa.h"

#include <float.h>
#include <math.h>

/* Kinds whose core values need no clamping (see the end of vg_core). */
#define VG_PURE(half, model) ((half) && (model) != PSIK_VGC_MUALEM_AE)

/* The fused point. half: l == 1/2 (a constant after inlining). Returns
 * the "in range" flag; the values are garbage where it is 0. */
PSIK_FM int vg_core(const psik_vgc *c, double s, int half, int model,
                    double *se_o, double *kr_o, double *dse_o, double *dkr_o)
{
    const double n = c->n, m = c->m, k = c->k, ka = c->k * c->alpha;
    double p = c->alpha * s;
    double lph, lpl, th, tl, a, b, bl, kh, kl, mb, mbl, e1h, e1l, e2h, e2l, t1, t2;
    double S, ym, em1, g, inv, y, r, invp, dls, dg, se, seL, G, dG, kr, dkr;
    int wet, ok;
    lph = psik__fm_log_dd_nrm(p, 0.0, &lpl);   /* p >= DBL_MIN where ok */
    psik__fm_mul_dd(n, lph, lpl, &th, &tl);
    wet = th <= 0.0;
    t1 = -th;
    t2 = -tl;
    a = psik__fm_exp_dd(psik__fm_sel(wet, th, t1), psik__fm_sel(wet, tl, t2));
    b = psik__fm_log1p_dd(a, &bl);
    /* k lp = n lp - (n - k) lp, with n - k = 1 or 2 exactly */
    psik__fm_two_sum(th, -(n - k) * lph, &kh, &kl);
    kl = kl + (tl - (n - k) * lpl);
    psik__fm_mul_dd(m, b, bl, &mb, &mbl);
    t1 = -kh;
    psik__fm_two_sum(psik__fm_sel(wet, 0.0, t1), -mb, &e1h, &t1);
    t2 = -kl;
    e1l = (t1 - mbl) + psik__fm_sel(wet, 0.0, t2);
    psik__fm_two_sum(psik__fm_sel(wet, kh, 0.0), -mb, &e2h, &t2);
    e2l = (t2 - mbl) + psik__fm_sel(wet, kl, 0.0);
    S = psik__fm_exp_dd(e1h, e1l);
    psik__fm_exp_expm1_dd(e2h, e2l, &ym, &em1);
    g = -em1;
    inv = 1.0 / (1.0 + a);
    t1 = a * inv;
    y = psik__fm_sel(wet, t1, inv);
    r = psik__fm_sel(wet, inv, t1);
    invp = 1.0 / p;
    dls = ka * y * invp;
    dg = ka * ym * r * invp;
    se = S;
    G = g;
    dG = dg;
    if (model == PSIK_VGC_MUALEM_AE) {
        /* Se = S / Sc; near the entry head on the wet side as
         * exp(-m log1p((x - xe) / (1 + xe))), which keeps 1 - Se. */
        double xe = c->xe;
        double sw = psik__fm_exp(-m * psik__fm_log1p_fin((a - xe) / (1.0 + xe)));
        double sq = S / c->sc;
        se = psik__fm_sel(wet & (xe <= 1.0), sw, sq);
        G = g / c->ge;
        dG = dg / c->ge;
    }
    seL = 1.0;
    if (model != PSIK_VGC_BURDINE) {
        if (half) {
            seL = sqrt(se);
        } else {
            double lh, ll, esh, esl;
            if (model == PSIK_VGC_MUALEM_AE) {
                esh = psik__fm_log_dd(se, &esl);
            } else {
                esh = e1h;
                esl = e1l;
            }
            psik__fm_mul_dd(c->l, esh, esl, &lh, &ll);
            seL = psik__fm_exp_dd(lh, ll);
        }
    }
    psik__vg_kr_from(model, c->l, se, seL, G, dG, dls, &kr, &dkr);
    if (model != PSIK_VGC_BURDINE && !half) {   /* se^l overflows for l < 0 at the dry end */
        ok = (seL <= DBL_MAX) & (G > 0.0);
        kr = psik__fm_sel(ok, kr, 0.0);
        dkr = psik__fm_sel(ok, dkr, 0.0);
    }
    *se_o = se;
    *kr_o = kr;
    *dse_o = dls * se;
    *dkr_o = dkr;
    ok = (p >= DBL_MIN) & (p <= DBL_MAX) & (th >= -700.0) & (th <= 700.0);
    if (VG_PURE(half, model))
        /* se = exp(<= 0) and kr = sqrt(se) g^2 (or se^2 g) lie in [0, 1] by
         * construction; the derivatives are >= 0 and, where these hold,
         * finite: eval.c's clamps are then the identity and the block loop
         * skips them (a lane that fails goes to the scalar fix-up). */
        ok &= (dls * se <= 1e300) & (dkr <= 1e300);
    return ok;
}

/* The model's constants a block reads, in locals (the compiler cannot
 * know the output stores leave them alone). */
typedef struct vg_blk {
    psik_vgc c;
    double h_sat, tr, ts, dts, ks;
} vg_blk;

/* One head of a block: the same assembly as psik_eval in eval.c. */
PSIK_FM void vg_lane(const vg_blk *b, int half, int model, int i,
                     const double *restrict h, double *restrict th, double *restrict kk,
                     double *restrict cc, double *restrict dk)
{
    double hi = h[i], se, kr, dse, dkr, t;
    int ok = vg_core(&b->c, -hi, half, model, &se, &kr, &dse, &dkr);
    if (!VG_PURE(half, model)) {
        se = psik__fb_01(se);
        kr = psik__fb_01(kr);
        dse = psik__fb_pos(dse);
        dkr = psik__fb_pos(dkr);
    }
    t = b->tr + b->dts * se;                 /* psik__fb_theta */
    t = psik__fm_sel(t > b->ts, b->ts, t);
    /* a lane to redo is marked by a NaN theta (fast_block.h) */
    th[i] = psik__fm_sel(!(hi < b->h_sat) | !ok, NAN, t);
    kk[i] = b->ks * kr;
    cc[i] = VG_PURE(half, model) ? b->dts * dse : psik__fb_pos(b->dts * dse);
    dk[i] = psik__fb_pos(b->ks * dkr);
}

/* One block (psik_block_fn, coef the psik_vgc). The core is one long chain
 * of dependent operations (log, exp, log1p, exp, expm1), longer than the
 * processor's reorder window: one vector of it per iteration leaves the
 * units waiting on latencies. In the FMA variants the block goes in chunks
 * of VG_IL x 8 heads, each iteration taking VG_IL heads 8 apart: VG_IL
 * independent vectors, which the compiler interleaves (its scheduling pass before
 * register allocation is on for these variants, Makefile ISA_SCHED): vgm
 * 14 -> 10 ns a point with AVX-512 here. With SSE4.2's 16 registers of two
 * lanes the extra chains only spill. */
#ifndef VG_IL
#  if defined(__FMA__)
#    define VG_IL 8
#  else
#    define VG_IL 1
#  endif
#endif
PSIK_FM void vg_block_body(const psik_model *mo, const psik_vgc *c, int half, int model,
                           int cnt, const double *restrict h, double *restrict th,
                           double *restrict kk, double *restrict cc,
                           double *restrict dk)
{
    vg_blk b;
    int i;
    b.c = *c;
    b.h_sat = mo->h_sat;
    b.tr = mo->theta_r;
    b.ts = mo->theta_s;
    b.dts = mo->theta_s - mo->theta_r;
    b.ks = mo->ks;
    i = 0;
#if VG_IL > 1
    {   /* chunks of VG_IL vectors of 8 heads; Q a constant, so that the
         * vectoriser sees the offsets */
        enum { Q = 8 };
        int c0, j;
        for (c0 = 0; c0 + VG_IL * Q <= cnt; c0 += VG_IL * Q)
            for (j = c0; j < c0 + Q; j++) {
                vg_lane(&b, half, model, j, h, th, kk, cc, dk);
                vg_lane(&b, half, model, j + Q, h, th, kk, cc, dk);
#if VG_IL > 2
                vg_lane(&b, half, model, j + 2 * Q, h, th, kk, cc, dk);
                vg_lane(&b, half, model, j + 3 * Q, h, th, kk, cc, dk);
#endif
#if VG_IL > 4
                vg_lane(&b, half, model, j + 4 * Q, h, th, kk, cc, dk);
                vg_lane(&b, half, model, j + 5 * Q, h, th, kk, cc, dk);
                vg_lane(&b, half, model, j + 6 * Q, h, th, kk, cc, dk);
                vg_lane(&b, half, model, j + 7 * Q, h, th, kk, cc, dk);
#endif
            }
        i = c0;
    }
#endif
    for (; i < cnt; i++)
        vg_lane(&b, half, model, i, h, th, kk, cc, dk);
}

#define VG_BLOCK_ARGS const psik_model *mo, const void *coef, int cnt, \
    const double *restrict h, double *restrict th, double *restrict kk, \
    double *restrict cc, double *restrict dk, void *restrict bad


typedef psik_block_fn vg_block_fn;

#define VG_VARIANTS(suffix, attr)                                                     \
    attr static void vgm_half_##suffix(VG_BLOCK_ARGS)                                 \
    { vg_block_body(mo, (const psik_vgc *)coef, 1, PSIK_VGC_MUALEM, cnt, h, th, kk, cc, dk); (void)bad; } \
    attr static void vgm_any_##suffix(VG_BLOCK_ARGS)                                  \
    { vg_block_body(mo, (const psik_vgc *)coef, 0, PSIK_VGC_MUALEM, cnt, h, th, kk, cc, dk); (void)bad; } \
    attr static void vgae_half_##suffix(VG_BLOCK_ARGS)                                \
    { vg_block_body(mo, (const psik_vgc *)coef, 1, PSIK_VGC_MUALEM_AE, cnt, h, th, kk, cc, dk); (void)bad; } \
    attr static void vgae_any_##suffix(VG_BLOCK_ARGS)                                 \
    { vg_block_body(mo, (const psik_vgc *)coef, 0, PSIK_VGC_MUALEM_AE, cnt, h, th, kk, cc, dk); (void)bad; } \
    attr static void vgb_##suffix(VG_BLOCK_ARGS)                                      \
    { vg_block_body(mo, (const psik_vgc *)coef, 1, PSIK_VGC_BURDINE, cnt, h, th, kk, cc, dk); (void)bad; } \
    static vg_block_fn pick_##suffix(const psik_vgc *c)                               \
    {                                                                                 \
        if (c->model == PSIK_VGC_BURDINE) return vgb_##suffix;                        \
        if (c->model == PSIK_VGC_MUALEM_AE)                                           \
            return c->l == 0.5 ? vgae_half_##suffix : vgae_any_##suffix;              \
        return c->l == 0.5 ? vgm_half_##suffix : vgm_any_##suffix;                    \
    }

#define VG_VARIANTS_OF(suffix) VG_VARIANTS(suffix, )
VG_VARIANTS_OF(PSIK_ISA_NAME)

PSIK_HIDDEN vg_block_fn PSIK_ISA_FN(psik__vg_pick)(const psik_vgc *c);
PSIK_HIDDEN vg_block_fn PSIK_ISA_FN(psik__vg_pick)(const psik_vgc *c)
{
    return PSIK_ISA_FN(pick)(c);
}

#if PSIK_ISA_BASE
typedef vg_block_fn vg_pick_t(const psik_vgc *c);
PSIK_ISA_SELECT(vg_pick_t, psik__vg_pick)

static vg_block_fn pick(const psik_vgc *c)
{
    return psik__vg_pick_pick()(c);
}

PSIK_HIDDEN void psik__vg_batch(const psik_model *m, const psik_vgc *c, size_t count,
                                const double *h, double *theta, double *k,
                                double *capacity, double *dk_dh)
{
    psik__blocks_run(m, c, pick(c), 0, count, h, theta, k, capacity, dk_dh);
}

#endif /* PSIK_ISA_BASE */
