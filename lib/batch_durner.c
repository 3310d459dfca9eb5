/* batch_durner.c - fused and vectorised Durner evaluation (durner2,
 * durner3): the point that psik_eval uses, and the psik_eval_batch
 * kernels.
 *
 * Method. Each mode as one van Genuchten curve (batch_vg.c): with
 * p = alpha s and lp = log p carried in two doubles (fastmath.h),
 * t = n lp, a = exp(-|t|) (x on the wet side p <= 1, 1/x on the dry side)
 * and b = log1p(a):
 *   ln S   = -m b            (wet)      -k lp - m b   (dry)
 *   ln y^m = k lp - m b      (wet)      -m b          (dry)
 * with k = n - 1 exact, each exponent in double-double; one reduction
 * gives S and 1 - S = -expm1(ln S), another y^m and g = 1 - y^m, so both
 * the values and their complements keep a few ulp at both ends (the
 * pow/expm1 forms of durner.c). With y = x/(1+x), r = 1/(1+x) from a, the
 * scaled derivatives are s dlnS/dh = k y and s dg/dh = k y^m r. The sums
 * are durner.c's (positive terms only):
 *   Se = sum w S   (1 - sum w (1 - S) where that is above 1/2)
 *   G  = sum c g   (1 - sum c y^m where that is above 1/2)
 *   s dSe/dh = sum w S k y,  s dG/dh = sum c k y^m r,
 *   Kr = Se^l G^2 as (sqrt(Se) G) G for l = 1/2 (the usual value), else
 *   exp(l ln Se + 2 ln G) with both logarithms in double-double (that of a
 *   complement-formed value as log(u) + e/u, e the rounding remainder of
 *   u = 1 - sum), which cannot overflow for l < 0;
 *   dKr/dh = Kr (l (s dSe/dh)/Se + 2 (s dG/dh)/G) / s.
 * Transcendentals per point: two logs and three exps per mode, and for
 * l != 1/2 two logs and one exp more.
 *
 * Special cases without breaking the vector loop: every lane is computed
 * branch-free; lanes at or above h_sat, NaN, infinite, with suction below
 * the normal range, with some mode outside |t| <= 700 (heads 1e300 times
 * beyond any soil's), or with a sum below 2^-960 (where a subnormal term
 * could have lost digits) are flagged and recomputed afterwards by
 * psik_eval, which then takes durner.c's own path for them, so they get
 * exactly the scalar values. The clamps are eval.c's, as selects.
 *
 * Instruction sets (isa.h): compiled once per variant; psik__isa() picks
 * one per call, the same for the batch loop and for the single point
 * psik_eval uses, so that the two give identical bits. Fused
 * multiply-adds appear only where fastmath.h puts them; no contraction
 * elsewhere.
 * The mode count is a constant of each block function, so the mode loop
 * is unrolled. The single point runs the modes side by side instead (a
 * vectorised loop over four lanes), then the same sums in the same order,
 * so it gives the block loop's bits at about the cost of one mode.
 */
#include "fast_durner.h"
#include "fast_block.h"
#include "fastmath.h"
#include "isa.h"

#include <float.h>
#include <math.h>

#define DN_TINY 0x1p-960

/* log(u + e) as hi + lo, u > 0 normal, |e| <= ulp(u): log(u) + e/u. */
PSIK_FM double dn_log_sum(double u, double e, double *lo)
{
    double l, hi = psik__fm_log_dd(u, &l), s, t;
    psik__fm_two_sum(hi, l + e / u, &s, &t);
    *lo = t;
    return s;
}

/* (ah + al)(bh + bl) as a double-double (first-order terms). */
PSIK_FM void dn_mul2(double ah, double al, double bh, double bl, double *ph, double *pl)
{
    double p, e;
    psik__fm_two_prod(ah, bh, &p, &e);
    psik__fm_fast_two_sum(p, e + (ah * bl + al * bh), ph, pl);
}

/* (*sh + *sl) += (ph + pl), the low part left unnormalised. */
PSIK_FM void dn_acc2(double *sh, double *sl, double ph, double pl)
{
    double t, e;
    psik__fm_two_sum(*sh, ph, &t, &e);
    *sh = t;
    *sl = *sl + (e + pl);
}

/* The sums of durner.c over the modes, each in two doubles, so that the
 * weighting and summing add nothing of their own before the last
 * rounding (the per-mode values keep theirs, below an ulp). */
typedef struct dn_acc {
    double se, se_l, cse, cse_l, gs, gs_l, cg, cg_l, sdse, sdse_l, sdg;
} dn_acc;

/* The values of one mode at suction s that the sums need. */
typedef struct dn_mv {
    double S, em1, ym, em2, ih, il, ayh, ayl, wet, ok;
} dn_mv;

/* One mode (alpha, n, m = (n - 1)/n; k = n - 1 implicitly) at suction s. */
PSIK_FM void dn_mode_vals(double alpha, double n, double m, double s, dn_mv *v)
{
    double p = alpha * s;
    double lph, lpl, th, tl, a, b, bl, kh, kl, mb, mbl, e1h, e1l, e2h, e2l, t1, t2;
    double u, ue, q0, pq, pqe, rem;
    int wet;
    lph = psik__fm_log_dd(p, &lpl);
    psik__fm_mul_dd(n, lph, lpl, &th, &tl);
    wet = th <= 0.0;
    t1 = -th;
    t2 = -tl;
    a = psik__fm_exp_dd(psik__fm_sel(wet, th, t1), psik__fm_sel(wet, tl, t2));
    b = psik__fm_log1p_dd(a, &bl);
    /* k lp = n lp - lp (n - k = 1 exactly) */
    psik__fm_two_sum(th, -lph, &kh, &kl);
    kl = kl + (tl - lpl);
    psik__fm_mul_dd(m, b, bl, &mb, &mbl);
    t1 = -kh;
    psik__fm_two_sum(psik__fm_sel(wet, 0.0, t1), -mb, &e1h, &t1);
    t2 = -kl;
    e1l = (t1 - mbl) + psik__fm_sel(wet, 0.0, t2);
    psik__fm_two_sum(psik__fm_sel(wet, kh, 0.0), -mb, &e2h, &t2);
    e2l = (t2 - mbl) + psik__fm_sel(wet, kl, 0.0);
    psik__fm_exp_expm1_dd(e1h, e1l, &v->S, &v->em1);      /* S, S - 1 */
    psik__fm_exp_expm1_dd(e2h, e2l, &v->ym, &v->em2);     /* y^m, -g */
    /* 1/(1 + a) in two doubles: q0 = fl(1/u), u + ue = 1 + a exactly,
     * 1/(u + ue) = q0 (1 + rem) to first order, rem = 1 - q0 (u + ue) */
    psik__fm_fast_two_sum(1.0, a, &u, &ue);
    q0 = 1.0 / u;
    psik__fm_two_prod(q0, u, &pq, &pqe);
    rem = ((1.0 - pq) - pqe) - q0 * ue;
    v->ih = q0;
    v->il = q0 * rem;
    /* a/(1 + a) */
    psik__fm_two_prod(a, q0, &t1, &t2);
    v->ayh = t1;
    v->ayl = t2 + a * v->il;
    v->wet = psik__fm_sel(wet, 1.0, 0.0);
    v->ok = psik__fm_sel((p >= DBL_MIN) & (p <= DBL_MAX) & (th >= -700.0) & (th <= 700.0),
                         1.0, 0.0);
}

/* Mode i's values added into *q (weight w, conductivity weight cc). */
PSIK_FM void dn_mode_add(const dn_mv *v, double w, double cc, double k, dn_acc *q)
{
    int wet = v->wet != 0.0;
    double yh, yl, kyh, kyl, wsh, wsl, ph, pl;
    /* y = a/(1 + a) wet, 1/(1 + a) dry; r the other one */
    yh = psik__fm_sel(wet, v->ayh, v->ih);
    yl = psik__fm_sel(wet, v->ayl, v->il);
    psik__fm_two_prod(w, v->S, &wsh, &wsl);
    dn_acc2(&q->se, &q->se_l, wsh, wsl);
    psik__fm_two_prod(w, -v->em1, &ph, &pl);
    dn_acc2(&q->cse, &q->cse_l, ph, pl);
    psik__fm_two_prod(cc, -v->em2, &ph, &pl);
    dn_acc2(&q->gs, &q->gs_l, ph, pl);
    psik__fm_two_prod(cc, v->ym, &ph, &pl);
    dn_acc2(&q->cg, &q->cg_l, ph, pl);
    psik__fm_mul_dd(k, yh, yl, &kyh, &kyl);
    dn_mul2(wsh, wsl, kyh, kyl, &ph, &pl);
    dn_acc2(&q->sdse, &q->sdse_l, ph, pl);
    q->sdg += cc * ((k * v->ym) * psik__fm_sel(wet, v->ih, v->ayh));
}

/* Mode i at suction s, added into *q; returns its "in range" flag. */
PSIK_FM int dn_mode(const psik_durc *c, int i, double s, dn_acc *q)
{
    dn_mv v;
    dn_mode_vals(c->alpha[i], c->n[i], c->m[i], s, &v);
    dn_mode_add(&v, c->w[i], c->c[i], c->k[i], q);
    return v.ok != 0.0;
}

/* 1 - (h + l) as a double-double, h in [0, 1/2). */
PSIK_FM void dn_one_minus(double h, double l, double *rh, double *rl)
{
    double u, e;
    psik__fm_fast_two_sum(1.0, -h, &u, &e);
    psik__fm_fast_two_sum(u, e - l, rh, rl);
}

/* The fused point. nm: the mode count, half: l == 1/2 (constants after
 * inlining); mv: the modes' values if computed already (the single point),
 * NULL to compute them here (the block loop). Returns the "in range" flag; the values are garbage where it
 * is 0. */
PSIK_FM int dn_core(const psik_durc *c, const dn_mv *mv, int nm, int half, double s,
                    double *se_o, double *kr_o, double *dse_o, double *dkr_o)
{
    dn_acc q = {0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0};
    double seh, sel, gh, gl, t1, t2, Se, G, kr, dkr, sdse;
    int ok = (s >= DBL_MIN) & (s <= DBL_MAX), nse, ng;
    if (mv == NULL) {
        ok &= dn_mode(c, 0, s, &q);
        ok &= dn_mode(c, 1, s, &q);
        if (nm == 3)
            ok &= dn_mode(c, 2, s, &q);
    } else {
        /* the same values computed beforehand, the same sums */
        dn_mode_add(&mv[0], c->w[0], c->c[0], c->k[0], &q);
        dn_mode_add(&mv[1], c->w[1], c->c[1], c->k[1], &q);
        ok &= (mv[0].ok != 0.0) & (mv[1].ok != 0.0);
        if (nm == 3) {
            dn_mode_add(&mv[2], c->w[2], c->c[2], c->k[2], &q);
            ok &= mv[2].ok != 0.0;
        }
    }
    ok &= (q.se >= DN_TINY) & (q.sdse >= DN_TINY) & (q.gs >= DN_TINY) & (q.sdg >= DN_TINY);
    /* Se and G from the complements above 1/2 (the weights add up to 1) */
    nse = q.cse < 0.5;
    ng = q.cg < 0.5;
    dn_one_minus(q.cse, q.cse_l, &t1, &t2);
    psik__fm_fast_two_sum(q.se, q.se_l, &seh, &sel);
    seh = psik__fm_sel(nse, t1, seh);
    sel = psik__fm_sel(nse, t2, sel);
    dn_one_minus(q.cg, q.cg_l, &t1, &t2);
    psik__fm_fast_two_sum(q.gs, q.gs_l, &gh, &gl);
    gh = psik__fm_sel(ng, t1, gh);
    gl = psik__fm_sel(ng, t2, gl);
    Se = seh;
    G = gh;
    if (half) {
        /* sqrt(Se) in two doubles (one correction step), then
         * (sqrt(Se) G) G with exact products */
        double r0 = sqrt(seh), p, pe, rh, rl, ah, al, bh, bl;
        psik__fm_two_prod(r0, r0, &p, &pe);
        psik__fm_fast_two_sum(r0, (((seh - p) - pe) + sel) / (2.0 * r0), &rh, &rl);
        dn_mul2(rh, rl, gh, gl, &ah, &al);
        dn_mul2(ah, al, gh, gl, &bh, &bl);
        kr = bh + bl;
    } else {
        double sh, sl, lh, ll, ph, pl, eh, el;
        sh = dn_log_sum(seh, sel, &sl);
        lh = dn_log_sum(gh, gl, &ll);
        psik__fm_mul_dd(c->l, sh, sl, &ph, &pl);
        psik__fm_two_sum(ph, 2.0 * lh, &eh, &el);
        el = el + (pl + 2.0 * ll);
        kr = psik__fm_exp_dd(eh, el);
    }
    kr = psik__fm_sel((Se > 0.0) & (G > 0.0), kr, 0.0);
    sdse = q.sdse + q.sdse_l;
    dkr = kr * ((c->l * (sdse / Se) + 2.0 * (q.sdg / G)) / s);
    dkr = psik__fm_sel(kr > 0.0, dkr, 0.0);
    *se_o = Se;
    *kr_o = kr;
    *dse_o = sdse / s;
    *dkr_o = dkr;
    return ok;
}

PSIK_HIDDEN int PSIK_ISA_FN(psik__dur_point)(const psik_durc *c, double s, psik_point *out);
PSIK_HIDDEN int PSIK_ISA_FN(psik__dur_point)(const psik_durc *c, double s, psik_point *out)
{
    /* the modes side by side (a loop over 4 lanes, the last ones copies
     * of the first): one vector pass instead of two or three scalar ones */
    double al[4], nn[4], mm[4];
    dn_mv mv[4];
    double se, kr, dse, dkr;
    int ok, i;
    for (i = 0; i < 4; i++) {
        int j = i < c->nm ? i : 0;
        al[i] = c->alpha[j];
        nn[i] = c->n[j];
        mm[i] = c->m[j];
    }
    {
        /* structure of arrays for the vector loop */
        double S[4], em1[4], ym[4], em2[4], ih[4], il[4], ayh[4], ayl[4], wt[4], okf[4];
#if defined(__GNUC__) && !defined(__clang__)
#pragma GCC unroll 1
#endif
        for (i = 0; i < 4; i++) {
            dn_mv v;
            dn_mode_vals(al[i], nn[i], mm[i], s, &v);
            S[i] = v.S; em1[i] = v.em1; ym[i] = v.ym; em2[i] = v.em2; ih[i] = v.ih;
            il[i] = v.il; ayh[i] = v.ayh; ayl[i] = v.ayl; wt[i] = v.wet; okf[i] = v.ok;
        }
        for (i = 0; i < 4; i++) {
            mv[i].S = S[i]; mv[i].em1 = em1[i]; mv[i].ym = ym[i]; mv[i].em2 = em2[i];
            mv[i].ih = ih[i]; mv[i].il = il[i]; mv[i].ayh = ayh[i]; mv[i].ayl = ayl[i];
            mv[i].wet = wt[i]; mv[i].ok = okf[i];
        }
    }
    if (c->nm == 2)
        ok = c->l == 0.5 ? dn_core(c, mv, 2, 1, s, &se, &kr, &dse, &dkr)
                         : dn_core(c, mv, 2, 0, s, &se, &kr, &dse, &dkr);
    else
        ok = c->l == 0.5 ? dn_core(c, mv, 3, 1, s, &se, &kr, &dse, &dkr)
                         : dn_core(c, mv, 3, 0, s, &se, &kr, &dse, &dkr);
    if (!ok)
        return 0;
    out->se = se;
    out->kr = kr;
    out->dse = dse;
    out->dkr = dkr;
    return 1;
}

/* The constants of one block loop. */
typedef struct dn_blk {
    const psik_durc *c;
    double h_sat, tr, dts, ts, ks;
} dn_blk;

/* One block: outputs (none NULL here) and a flag per lane for the
 * scalar fix-up (a double, 1 or 0: with only doubles in the loop the
 * AVX-512 variant gets 512-bit vectors without byte instructions). The
 * same assembly as psik_eval in eval.c. */
PSIK_FM void dn_block_body(const dn_blk *bk, int nm, int half, int cnt,
                           const double *restrict h, double *restrict th,
                           double *restrict kk, double *restrict cc,
                           double *restrict dk, uint64_t *restrict bad)
{
    const double h_sat = bk->h_sat, tr = bk->tr, dts = bk->dts, ts = bk->ts, ks = bk->ks;
    int i;
    for (i = 0; i < cnt; i++) {
        double hi = h[i], se, kr, dse, dkr;
        int ok = dn_core(bk->c, NULL, nm, half, -hi, &se, &kr, &dse, &dkr);
        psik__fb_lane(tr, dts, ts, ks, se, kr, dse, dkr, th + i, kk + i, cc + i, dk + i);
        bad[i] = (uint64_t)(!(hi < h_sat) | !ok);
    }
}

/* psik_block_t: coef is the dn_blk, the flags uint64_t (fast_block.h) */
#define DN_BLOCK_ARGS const psik_model *mo, const void *coef, int cnt, \
    const double *restrict h, double *restrict th, double *restrict kk, \
    double *restrict cc, double *restrict dk, void *restrict bad

typedef psik_block_fn dn_block_fn;

/* The AVX-512 variant's block loops on 512-bit vectors (measured faster
 * here than 256-bit ones: the loop is long and compute-bound). */
#if defined(__AVX512F__) && defined(__GNUC__) && !defined(__clang__)
#  define DN_WIDE __attribute__((target("prefer-vector-width=512")))
#else
#  define DN_WIDE
#endif

#define DN_VARIANTS(suffix)                                                           \
    DN_WIDE static void dn2_half_##suffix(DN_BLOCK_ARGS)                              \
    { (void)mo; dn_block_body((const dn_blk *)coef, 2, 1, cnt, h, th, kk, cc, dk, (uint64_t *)bad); }                         \
    DN_WIDE static void dn2_any_##suffix(DN_BLOCK_ARGS)                               \
    { (void)mo; dn_block_body((const dn_blk *)coef, 2, 0, cnt, h, th, kk, cc, dk, (uint64_t *)bad); }                         \
    DN_WIDE static void dn3_half_##suffix(DN_BLOCK_ARGS)                              \
    { (void)mo; dn_block_body((const dn_blk *)coef, 3, 1, cnt, h, th, kk, cc, dk, (uint64_t *)bad); }                         \
    DN_WIDE static void dn3_any_##suffix(DN_BLOCK_ARGS)                               \
    { (void)mo; dn_block_body((const dn_blk *)coef, 3, 0, cnt, h, th, kk, cc, dk, (uint64_t *)bad); }                         \
    static dn_block_fn dn_pick_##suffix(const psik_durc *c)                           \
    {                                                                                 \
        if (c->nm == 2) return c->l == 0.5 ? dn2_half_##suffix : dn2_any_##suffix;    \
        return c->l == 0.5 ? dn3_half_##suffix : dn3_any_##suffix;                    \
    }

#define DN_VARIANTS_OF(suffix) DN_VARIANTS(suffix)
DN_VARIANTS_OF(PSIK_ISA_NAME)

PSIK_HIDDEN dn_block_fn PSIK_ISA_FN(psik__dur_pick)(const psik_durc *c);
PSIK_HIDDEN dn_block_fn PSIK_ISA_FN(psik__dur_pick)(const psik_durc *c)
{
    return PSIK_ISA_FN(dn_pick)(c);
}

#if PSIK_ISA_BASE
typedef dn_block_fn dn_pick_t(const psik_durc *c);
typedef int dn_point_t(const psik_durc *c, double s, psik_point *out);
PSIK_ISA_SELECT(dn_pick_t, psik__dur_pick)
PSIK_ISA_SELECT(dn_point_t, psik__dur_point)

static dn_block_fn dn_pick(const psik_durc *c)
{
    return psik__dur_pick_pick()(c);
}

/* The single point in the variant the batch loop uses (the variants may
 * round differently where fastmath.h uses fused multiply-adds). */
PSIK_HIDDEN int psik__dur_point_fast(const psik_durc *c, double s, psik_point *out)
{
    return psik__dur_point_pick()(c, s, out);
}

PSIK_HIDDEN void psik__dur_batch(const psik_model *m, const psik_durc *c, size_t count,
                                 const double *h, double *theta, double *k,
                                 double *capacity, double *dk_dh)
{
    dn_blk bk;
    dn_block_fn fn = dn_pick(c);
    bk.c = c;
    bk.h_sat = m->h_sat;
    bk.tr = m->theta_r;
    bk.ts = m->theta_s;
    bk.dts = m->theta_s - m->theta_r;
    bk.ks = m->ks;
    psik__blocks_run(m, &bk, fn, sizeof(uint64_t), count, h, theta, k, capacity, dk_dh);
}
#endif /* PSIK_ISA_BASE */
