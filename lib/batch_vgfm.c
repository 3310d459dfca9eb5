/* batch_vgfm.c - the fused point and the psik_eval_batch kernel of
 * vg_free_m (van Genuchten retention with free m, Mualem conductivity
 * Kr = Se^l I_z(a,b)^2, z = 1/(1 + x), a = m + 1/n, b = 1 - 1/n).
 *
 * Retention part as in batch_vg.c: lp = log p in two doubles, t = n lp,
 * A = exp(-|t|) (x wet, 1/x dry), ln Se = -m log1p(A) (wet) or
 * -k lp - m log1p(A) (dry) with k = m n carried as kh + kl, so Se keeps a
 * few ulp at both ends; y = x/(1+x) = 1 - z and r = 1/(1+x) = z from A.
 * The front factor z^a y^b / B(a,b) is Se y / (p B(a,b)) exactly (vg.c).
 *
 * Incomplete beta. a and b are fixed per model, so the partial numerators
 * d_j = c_j w of the continued fraction
 *   B_w(p,q) = (w^p (1-w)^q / p) / (1 + d_1/(1 + d_2/(1 + ...)))
 * have constant factors c_j, tabulated once per call on both sides: (a, b)
 * at w = z below the split point z < (a+1)/(a+b+2), else (b, a) at w = y
 * for 1 - I. Every lane evaluates J = 32 terms by the forward (Wallis)
 * recurrence P_j = P_(j-1) + d_j P_(j-2) (likewise Q), no division per
 * term, the side's c_j picked by a select; the fraction is Q_J/P_J. The
 * last two convergents differ by prod|d_j| / (Q_J P_(J-1)) relative
 * (determinant formula), with prod|d_j| = w^J prod|c_j| by five squarings:
 * a lane whose fraction has not settled below 2^-58 by then is flagged.
 * The partial numerators tend to -w/4 and the convergents stay between
 * 2^-J and 1, so no rescaling is needed.
 *
 * Lanes the core does not take (flagged, then recomputed by psik_eval,
 * whose point goes to the scalar path of vg.c for exactly these heads, so
 * batch and psik_eval give the same bits everywhere):
 * - at or above h_sat, NaN, or outside |n ln(alpha s)| <= 700;
 * - the fraction not settled in J terms (near the split point when a is
 *   large: m above ~1.2);
 * - 1 - I from the y side above 3/4 (b small, n near 1: I would lose its
 *   relative accuracy in 1 - v; vg.c sums the positive series there);
 * - a front factor below 1e-290 (Se near underflow: I would be subnormal);
 * - m log1p(A) above 1 (m above 1.44 only): psik_se's cheaper path
 *   exp(-m log1p(A)) carries about that many ulp, and Se from psik_se and
 *   from psik_eval must agree within 4 ulp (tests/unit/test_sweeps.c).
 * For the bench soil (n = 1.56, m = 0.4) and heads 1e-2..1e5 cm no lane is
 * flagged.
 *
 * Instruction sets (isa.h) and rounding: as batch_vg.c. No contraction;
 * fused multiply-adds only where fastmath.h uses them. psik__isa() picks
 * one variant for the batch loop and for the single point alike, so batch
 * and psik_eval give the same bits (variants with and without FMA may
 * differ by rounding, tests/unit/test_vgfm.c); the per-call tables use
 * + - * / only.
 */
#include "fast_block.h"
#include "fastmath.h"
#include "isa.h"

#include <float.h>
#include <math.h>
#include <stddef.h>

#define VGFM_J 32          /* terms of the fraction; vgfm_core's w^J assumes 32 */

/* The model constants, in the order vg.c fills them. */
enum { VGFM_ALPHA, VGFM_N, VGFM_M, VGFM_KH, VGFM_KL, VGFM_L, VGFM_A, VGFM_B, VGFM_BAB, VGFM_NC };

/* What a call precomputes from them. */
typedef struct vgfm_k {
    double alpha, n, m, kh, kl, l, ka, na, ibab, split, a, b, ia, ib;
    double pc1, pc2;                  /* prod |c_j|, j = 1..J, per side */
    double c1[VGFM_J], c2[VGFM_J];    /* c_(j+1): side (a, b) and side (b, a) */
} vgfm_k;

/* c_j of the fraction for B_w(p, q): d_(2i+1) = -(p+i)(p+q+i) w / ((p+2i)(p+2i+1)),
 * d_(2i) = i (q-i) w / ((p+2i-1)(p+2i)). */
static double vgfm_c(double p, double q, int j)
{
    double i = (double)(j / 2);
    if (j % 2 == 1)
        return -((p + i) * (p + q + i)) / ((p + 2.0 * i) * (p + 2.0 * i + 1.0));
    return (i * (q - i)) / ((p + 2.0 * i - 1.0) * (p + 2.0 * i));
}

/* The constants; the tables (batch calls) only if tables != 0. */
static void vgfm_setup(const double *cst, vgfm_k *K, int tables)
{
    const double a = cst[VGFM_A], b = cst[VGFM_B];
    int j;
    K->alpha = cst[VGFM_ALPHA];
    K->n = cst[VGFM_N];
    K->m = cst[VGFM_M];
    K->kh = cst[VGFM_KH];
    K->kl = cst[VGFM_KL];
    K->l = cst[VGFM_L];
    K->ka = cst[VGFM_KH] * cst[VGFM_ALPHA];
    K->na = cst[VGFM_N] * cst[VGFM_ALPHA];
    K->ibab = 1.0 / cst[VGFM_BAB];
    K->split = (a + 1.0) / (a + b + 2.0);
    K->a = a;
    K->b = b;
    K->ia = 1.0 / a;
    K->ib = 1.0 / b;
    K->pc1 = 1.0;
    K->pc2 = 1.0;
    for (j = 0; j < VGFM_J && tables; j++) {
        K->c1[j] = vgfm_c(a, b, j + 1);
        K->c2[j] = vgfm_c(b, a, j + 1);
        K->pc1 *= fabs(K->c1[j]);
        K->pc2 *= fabs(K->c2[j]);
    }
}

#if defined(__clang__)
#  define VGFM_UNROLL _Pragma("unroll")
#elif defined(__GNUC__)
#  define VGFM_UNROLL _Pragma("GCC unroll 32")
#else
#  define VGFM_UNROLL
#endif

/* The fused point at suction s. half: l == 1/2. tab: c_j from K's tables
 * (batch), else computed here for the lane's side only (single point; the
 * same expressions, so the same bits). Returns 1 when the lane is the
 * core's (see the top of the file); the values are garbage otherwise. */
PSIK_FM int vgfm_core(const vgfm_k *K, double s, int half, int tab,
                      double *se_o, double *kr_o, double *dse_o, double *dkr_o)
{
    const double n = K->n, m = K->m;
    double p = K->alpha * s;
    double lph, lpl, th, tl, A, bh, bl, kph, kpl, mb, mbl, e1h, e1l, t1, t2;
    double S, inv, y, r, invp, dls, front, w, f, I, v, dI, seL, kr, dkr;
    double P1 = 1.0, P2 = 1.0, Q1 = 1.0, Q2 = 0.0, W, pc, pa, pb, pcs = 1.0;
    int wet, side1, ok, pos, j;
    lph = psik__fm_log_dd(p, &lpl);
    psik__fm_mul_dd(n, lph, lpl, &th, &tl);
    wet = th <= 0.0;
    t1 = -th;
    t2 = -tl;
    A = psik__fm_exp_dd(psik__fm_sel(wet, th, t1), psik__fm_sel(wet, tl, t2));
    bh = psik__fm_log1p_dd(A, &bl);
    /* k lp with k = kh + kl */
    psik__fm_mul_dd(K->kh, lph, lpl, &kph, &kpl);
    kpl = kpl + K->kl * lph;
    psik__fm_mul_dd(m, bh, bl, &mb, &mbl);
    t1 = -kph;
    psik__fm_two_sum(psik__fm_sel(wet, 0.0, t1), -mb, &e1h, &t2);
    t1 = -kpl;
    e1l = (t2 - mbl) + psik__fm_sel(wet, 0.0, t1);
    S = psik__fm_exp_dd(e1h, e1l);
    inv = 1.0 / (1.0 + A);
    t1 = A * inv;
    y = psik__fm_sel(wet, t1, inv);
    r = psik__fm_sel(wet, inv, t1);
    invp = 1.0 / p;
    dls = K->ka * y * invp;
    front = ((S * y) * invp) * K->ibab;
    /* the fraction on the lane's side */
    side1 = r < K->split;
    w = psik__fm_sel(side1, r, y);
    pa = psik__fm_sel(side1, K->a, K->b);
    pb = psik__fm_sel(side1, K->b, K->a);
    VGFM_UNROLL
    for (j = 0; j < VGFM_J; j++) {
        double c, d, P, Q;
        if (tab) {
            c = psik__fm_sel(side1, K->c1[j], K->c2[j]);
        } else {
            c = vgfm_c(pa, pb, j + 1);
            pcs *= fabs(c);
        }
        d = c * w;
        P = P1 + d * P2;
        Q = Q1 + d * Q2;
        P2 = P1;
        P1 = P;
        Q2 = Q1;
        Q1 = Q;
    }
    f = Q1 / P1;
    W = w * w;
    W = W * W;
    W = W * W;
    W = W * W;
    W = W * W;                              /* w^32 */
    pc = tab ? psik__fm_sel(side1, K->pc1, K->pc2) : pcs;
    ok = W * pc <= 0x1p-58 * (Q1 * P2);
    t1 = front * f;
    I = t1 * K->ia;
    v = t1 * K->ib;
    t2 = 1.0 - v;
    I = psik__fm_sel(side1, I, t2);
    ok = ok & (side1 | (v <= 0.75)) & (front >= 1e-290) & (mb <= 1.0);
    dI = K->na * front * invp;
    if (half) {
        seL = sqrt(S);
    } else {
        double lh, ll;
        psik__fm_mul_dd(K->l, e1h, e1l, &lh, &ll);
        seL = psik__fm_exp_dd(lh, ll);
    }
    t1 = seL * I;
    kr = t1 * I;
    dkr = t1 * (K->l * I * dls + 2.0 * dI);
    pos = (seL <= DBL_MAX) & (I > 0.0);
    kr = psik__fm_sel(pos, kr, 0.0);
    dkr = psik__fm_sel(pos, dkr, 0.0);
    *se_o = S;
    *kr_o = kr;
    *dse_o = dls * S;
    *dkr_o = dkr;
    return ok & (p >= DBL_MIN) & (p <= DBL_MAX) & (th >= -700.0) & (th <= 700.0);
}

PSIK_HIDDEN int PSIK_ISA_FN(psik__vgfm_point)(const double *cst, double s, psik_point *out);
PSIK_HIDDEN int PSIK_ISA_FN(psik__vgfm_point)(const double *cst, double s, psik_point *out)
{
    vgfm_k K;
    double se, kr, dse, dkr;
    int ok;
    vgfm_setup(cst, &K, 0);
    if (K.l == 0.5)
        ok = vgfm_core(&K, s, 1, 0, &se, &kr, &dse, &dkr);
    else
        ok = vgfm_core(&K, s, 0, 0, &se, &kr, &dse, &dkr);
    if (!ok)
        return 0;
    out->se = se;
    out->kr = kr;
    out->dse = dse;
    out->dkr = dkr;
    return 1;
}

/* The constants of one block loop. */
typedef struct vgfm_blk {
    const vgfm_k *K;
    double h_sat, tr, dts, ts, ks;
} vgfm_blk;

/* One block, eval.c's assembly and clamps as selects; a flag per lane for
 * the scalar fix-up. */
PSIK_FM void vgfm_block_body(const vgfm_blk *bk, int half, int cnt,
                             const double *restrict h, double *restrict th,
                             double *restrict kk, double *restrict cc,
                             double *restrict dk, unsigned char *restrict bad)
{
    const vgfm_k *K = bk->K;
    const double h_sat = bk->h_sat, tr = bk->tr, dts = bk->dts, ts = bk->ts, ks = bk->ks;
    int i;
    for (i = 0; i < cnt; i++) {
        double hi = h[i], se, kr, dse, dkr;
        int ok = vgfm_core(K, -hi, half, 1, &se, &kr, &dse, &dkr);
        psik__fb_lane(tr, dts, ts, ks, se, kr, dse, dkr, th + i, kk + i, cc + i, dk + i);
        bad[i] = (unsigned char)(!(hi < h_sat) | !ok);
    }
}

/* psik_block_t: coef is the vgfm_blk, the flags unsigned char (fast_block.h) */
#define VGFM_BLOCK_ARGS const psik_model *mo, const void *coef, int cnt, const double *restrict h, \
    double *restrict th, double *restrict kk, double *restrict cc,         \
    double *restrict dk, void *restrict bad

typedef psik_block_fn vgfm_block_fn;

/* The two loops of this variant, vgfm_half_<isa> and vgfm_any_<isa> (by a
 * macro, so that tools/mksingle.py sees plain names). */
#define VGFM_VARIANTS(suffix)                                                   \
    static void vgfm_half_##suffix(VGFM_BLOCK_ARGS)                             \
    { (void)mo; vgfm_block_body((const vgfm_blk *)coef, 1, cnt, h, th, kk, cc, dk, (unsigned char *)bad); }                    \
    static void vgfm_any_##suffix(VGFM_BLOCK_ARGS)                              \
    { (void)mo; vgfm_block_body((const vgfm_blk *)coef, 0, cnt, h, th, kk, cc, dk, (unsigned char *)bad); }
#define VGFM_VARIANTS_OF(suffix) VGFM_VARIANTS(suffix)
VGFM_VARIANTS_OF(PSIK_ISA_NAME)

PSIK_HIDDEN vgfm_block_fn PSIK_ISA_FN(psik__vgfm_pick)(double l);
PSIK_HIDDEN vgfm_block_fn PSIK_ISA_FN(psik__vgfm_pick)(double l)
{
    return l == 0.5 ? PSIK_ISA_FN(vgfm_half) : PSIK_ISA_FN(vgfm_any);
}

#if PSIK_ISA_BASE
typedef vgfm_block_fn vgfm_pick_t(double l);
typedef int vgfm_point_t(const double *cst, double s, psik_point *out);
PSIK_ISA_SELECT(vgfm_pick_t, psik__vgfm_pick)
PSIK_ISA_SELECT(vgfm_point_t, psik__vgfm_point)

static vgfm_block_fn vgfm_choose(double l)
{
    return psik__vgfm_pick_pick()(l);
}

/* The point psik_eval uses (vg.c), in the variant the batch loop uses; 0
 * for the heads the core does not take. */
PSIK_HIDDEN int psik__vgfm_point_fast(const double *cst, double s, psik_point *out);
PSIK_HIDDEN int psik__vgfm_point_fast(const double *cst, double s, psik_point *out)
{
    return psik__vgfm_point_pick()(cst, s, out);
}

/* psik_eval_batch for vg_free_m: block loop, then psik_eval for the
 * flagged lanes. */
PSIK_HIDDEN void psik__vgfm_batch(const psik_model *m, const double *cst, size_t count,
                                  const double *h, double *theta, double *k,
                                  double *capacity, double *dk_dh);
PSIK_HIDDEN void psik__vgfm_batch(const psik_model *m, const double *cst, size_t count,
                                  const double *h, double *theta, double *k,
                                  double *capacity, double *dk_dh)
{
    vgfm_k K;
    vgfm_blk bk;
    vgfm_block_fn fn;
    vgfm_setup(cst, &K, 1);
    fn = vgfm_choose(K.l);
    bk.K = &K;
    bk.h_sat = m->h_sat;
    bk.tr = m->theta_r;
    bk.ts = m->theta_s;
    bk.dts = m->theta_s - m->theta_r;
    bk.ks = m->ks;
    psik__blocks_run(m, &bk, fn, 1, count, h, theta, k, capacity, dk_dh);
}
#endif /* PSIK_ISA_BASE */
