/* batch_kosugi.c - fused and vectorised Kosugi (1996) lognormal evaluation
 * with Mualem conductivity: the point that psik_eval uses where it can, and
 * the psik_eval_batch kernel (notation of kosugi.c).
 *
 * Method. z = ln(s/s_m)/sigma in two doubles (fastmath.h's double-double
 * log of s minus ln s_m in two parts, times 1/sigma in two parts), w = z +
 * sigma. At each of v = z, w, with t = |v| (fastmath_normal.h): the
 * density phi(t) as an unrounded exponential, the Mills ratio M(t) in two
 * parts, and from them
 *   Q(v) = phi M (v >= 0)  or  1 - phi M (v < 0), each rounded once;
 *   ln Q(v) = -t^2/2 - ln sqrt(2 pi) + ln M  or  ln(1 - phi M), in two
 *   parts (one double-double log);
 *   H(v) = phi/Q = 1/M  or  phi / Q.
 * Then Se = Q(z); Kr = (sqrt(Se) Q(w)) Q(w) for L = 1/2 (the usual value;
 * products exact, one rounding at the end, no logs of Q needed), otherwise
 * Kr = exp(L ln Q(z) + 2 ln Q(w)) with the exponent in two parts (so Kr
 * rounds about once whatever L); dSe/dh = phi(z)/(sigma s) as a quotient
 * with its exact remainder, dKr/dh = Kr (L H(z) + 2 H(w)) / (sigma s),
 * written (L + 2) H(z) + 2 (H(w) - H(z)) for L < 0.
 * Work per point: one log (three for L != 1/2), two exps (three), one
 * square root, two table polynomials (12 lookups each), three divisions.
 * Measured against the mpmath tables by tests/unit/test_accuracy.c
 * (batch(all) and eval(all) rows of kosugi).
 *
 * Lanes the core does not take: suction not a positive normal finite
 * double, z < -30 (the wet tail, where kosugi.c keeps the density's scale
 * factor apart), w > 37 (Q leaving the normal range), and L < 0 where
 * H(w) < 2 H(z) (the difference H(w) - H(z) would cancel; kosugi.c
 * integrates it). They are flagged and recomputed by psik_eval, so they get
 * exactly the scalar path's values; psik_eval itself calls the same core
 * (psik__kos_point_fast) first, so every head gets the same bits from
 * either. The clamps are eval.c's, as selects.
 *
 * Instruction sets (isa.h): compiled once per variant, chosen by
 * psik__isa(); fused multiply-adds only where fastmath.h uses them, no
 * contraction elsewhere: the variants with FMA give identical bits, those
 * without identical bits among themselves; the point psik_eval uses is
 * the AVX2 variant wherever the batch loop is AVX2 or AVX-512, so batch
 * and psik_eval agree bit for bit at every level.
 */
/* The AVX-512 variant: 512-bit vectors, and gathers for the table lookups
 * (the generic tuning loads table entries one by one; this loop has about
 * 30 lookups per lane and runs 1.5 times faster with gathers). */
#if defined(__AVX512F__) && defined(__GNUC__) && !defined(__clang__)
#pragma GCC target("tune=icelake-server,prefer-vector-width=512")
#endif

#include "fast_block.h"
#include "fastmath.h"
#include "fastmath_normal.h"
#include "isa.h"

#include <float.h>
#include <math.h>


/* kosugi.c's aux layout (kos_prepare). */
#define KB_SIG    1
#define KB_L      2
#define KB_C_HI   4
#define KB_LSM_HI 8
#define KB_LSM_LO 9
#define KB_RS_HI  10
#define KB_RS_LO  11

/* Q(v), ln Q(v) = *lh + *ll, H(v) and phi(v) at v = vh + vl,
 * -30 <= v <= 38 (garbage elsewhere). */
PSIK_FM void kb_tail(double vh, double vl, int want_log, double *q, double *qh_o,
                     double *ql_o, double *lh, double *ll, double *hz, double *phi_h,
                     double *phi_l, double *sc1, double *sc2)
{
    int pos = vh >= 0.0;
    double t = psik__fm_sel(pos, vh, -vh), tl = psik__fm_sel(pos, vl, -vl);
    double x, lo, th, tlx, s1, s2, mh, ml, ph, pe, qpos, qneg, sc, uh, ue, ul;
    double A, Al, rA, la, lal, sh, se, ph_v, p2, e2, e3;
    psik__fmn_phi_exponent(t, tl, &x, &lo);
    psik__fmn_exp_parts(x, lo, &th, &tlx, &s1, &s2);
    psik__fmn_mills_dd(t, tl, &mh, &ml);
    /* Q(t) = (th + tlx)(mh + ml) 2^e in two parts (tlx need not be small
     * beside th: both products exact), then rounded once */
    psik__fm_two_prod(th, mh, &ph, &pe);
    psik__fm_two_prod(tlx, mh, &p2, &e2);
    psik__fm_fast_two_sum(ph, p2, &ph, &e3);            /* |tlx| < th */
    pe = e3 + ((pe + e2) + (th + tlx) * ml);
    psik__fm_fast_two_sum(ph, pe, &ph, &pe);
    /* 2^e is normal for t <= 37 (the core's range): one scaling */
    sc = s1 * s2;
    qpos = (ph + pe) * sc;
    ph_v = (th + tlx) * sc;
    /* 1 - Q(t) for v < 0 */
    psik__fm_fast_two_sum(1.0, -(ph * sc), &uh, &ue);   /* Q(t) <= 1/2 */
    ul = ue - pe * sc;
    qneg = uh + ul;
    A = psik__fm_sel(pos, mh, uh);
    rA = 1.0 / A;                      /* H: 1/M, or phi/Q below */
    if (want_log) {
        /* ln Q: one double-double log of M or of 1 - Q(t) */
        Al = psik__fm_sel(pos, ml, ul);
        la = psik__fm_log_dd(A, &lal);
        lal = lal + Al * rA;
        psik__fm_two_sum(x, la, &sh, &se);
        se = se + (lo + lal);
        psik__fm_two_sum(sh, se, &sh, &se);
        *lh = psik__fm_sel(pos, sh, la);
        *ll = psik__fm_sel(pos, se, lal);
    } else {
        *lh = *ll = 0.0;
    }
    *q = psik__fm_sel(pos, qpos, qneg);
    *qh_o = psik__fm_sel(pos, ph * sc, uh);
    *ql_o = psik__fm_sel(pos, pe * sc, ul);
    *hz = psik__fm_sel(pos, rA, ph_v * rA);
    *phi_h = th;
    *phi_l = tlx;
    *sc1 = s1;
    *sc2 = s2;
}

/* The fused point at suction s. Returns 1 where every value is the
 * core's; *se_ok is 1 where Se is (its range is wider); the values are
 * garbage where they are not the core's. */
PSIK_FM int kb_core(const double *a, double s, int half, double *se_o, double *kr_o,
                    double *dse_o, double *dkr_o, int *se_ok_o)
{
    const double sig = a[KB_SIG], L = a[KB_L];
    double lsh, lsl, dh, dl, zh, zl, e, wh, wl;
    double qz, lzh, lzl, hz, fh, fl, f1, f2, qw, lwh, lwl, hw, eh, el, kh, kl, kr, b1, b2;
    double P, Pe, inv, qh, p1, pe1, r, u1, u2, u3, u4, qwh, qwl, u5, u6;
    int in_s, se_ok;
    lsh = psik__fm_log_dd_nrm(s, 0.0, &lsl);   /* s < DBL_MIN: flagged */
    psik__fm_two_sum(lsh, -a[KB_LSM_HI], &dh, &e);
    dl = e + (lsl - a[KB_LSM_LO]);
    psik__fm_two_prod(dh, a[KB_RS_HI], &zh, &e);
    zl = e + (dh * a[KB_RS_LO] + dl * a[KB_RS_HI]);
    psik__fm_fast_two_sum(zh, zl, &zh, &zl);
    psik__fm_two_sum(zh, sig, &wh, &e);
    wl = e + zl;
    kb_tail(zh, zl, !half, &qz, &u5, &u6, &lzh, &lzl, &hz, &fh, &fl, &f1, &f2);
    kb_tail(wh, wl, !half, &qw, &qwh, &qwl, &lwh, &lwl, &hw, &u1, &u2, &u3, &u4);
    if (half) {
        /* L = 1/2: Kr = (sqrt(Se) Q(w)) Q(w), the products exact, one
         * rounding at the end */
        double sq = sqrt(qz), m1, m1e, m2, m2e;
        psik__fm_two_prod(sq, qwh, &m1, &m1e);
        m1e = m1e + sq * qwl;
        psik__fm_two_prod(m1, qwh, &m2, &m2e);
        kr = m2 + (m2e + (m1e * qwh + m1 * qwl));
    } else {
        /* Kr = exp(L ln Q(z) + 2 ln Q(w)) */
        psik__fm_mul_dd(L, lzh, lzl, &eh, &el);
        psik__fm_two_sum(eh, 2.0 * lwh, &kh, &kl);
        kl = kl + (el + 2.0 * lwl);
        kr = psik__fm_exp_dd(kh, kl);
    }
    b1 = (2.0 * a[KB_C_HI]) * hz + 2.0 * (hw - hz);
    b2 = L * hz + 2.0 * hw;
    /* 1/(sigma s) with sigma s = P + Pe exactly; dSe/dh = phi/(sigma s)
     * from phi = (fh + fl) 2^e unrounded: quotient and exact remainder */
    psik__fm_two_prod(sig, s, &P, &Pe);
    inv = 1.0 / P;
    psik__fm_fast_two_sum(fh, fl, &fh, &fl);
    qh = fh * inv;
    psik__fm_two_prod(qh, P, &p1, &pe1);
    r = ((fh - p1) - pe1) + (fl - qh * Pe);
    *se_o = qz;
    *kr_o = kr;
    *dse_o = ((qh + r * inv) * f1) * f2;
    *dkr_o = kr * psik__fm_sel(L < 0.0, b1, b2) * inv;
    in_s = (s >= DBL_MIN) & (s <= DBL_MAX);
    se_ok = in_s & (zh >= -30.0) & (zh <= 37.0);
    *se_ok_o = se_ok;
    return se_ok & (wh <= 37.0) & ((L >= 0.0) | (hw >= 2.0 * hz));
}

PSIK_HIDDEN int PSIK_ISA_FN(psik__kos_point)(const double *a, double s, psik_point *out);
PSIK_HIDDEN int PSIK_ISA_FN(psik__kos_point)(const double *a, double s, psik_point *out)
{
    double se, kr, dse, dkr;
    int se_ok, ok;
    if (a[KB_L] == 0.5)
        ok = kb_core(a, s, 1, &se, &kr, &dse, &dkr, &se_ok);
    else
        ok = kb_core(a, s, 0, &se, &kr, &dse, &dkr, &se_ok);
    if (se_ok)
        out->se = se;
    if (ok) {
        out->kr = kr;
        out->dse = dse;
        out->dkr = dkr;
    }
    return se_ok + (se_ok & ok);
}

/* The constants of one block loop. */
typedef struct kb_blk {
    const double *a;
    double h_sat, tr, dts, ts, ks;
} kb_blk;

/* One block: outputs (none NULL here) and a flag per lane for the scalar
 * fix-up. The same assembly as psik_eval in eval.c. half: L == 1/2 (a
 * constant after inlining). */
PSIK_FM void kb_block_body(const kb_blk *bk, int half, int cnt, const double *restrict h,
                           double *restrict th, double *restrict kk, double *restrict cc,
                           double *restrict dk, uint64_t *restrict bad)
{
    const double h_sat = bk->h_sat, tr = bk->tr, dts = bk->dts, ts = bk->ts, ks = bk->ks;
    const double *a = bk->a;
    int i;
    for (i = 0; i < cnt; i++) {
        double hi = h[i], se, kr, dse, dkr;
        int se_ok, ok = kb_core(a, -hi, half, &se, &kr, &dse, &dkr, &se_ok);
        psik__fb_lane(tr, dts, ts, ks, se, kr, dse, dkr, th + i, kk + i, cc + i, dk + i);
        bad[i] = (uint64_t)(!(hi < h_sat) | !ok);
    }
}

/* psik_block_t: coef is the kb_blk, the flags uint64_t (fast_block.h) */
#define KB_BLOCK_ARGS const psik_model *mo, const void *coef, int cnt, \
    const double *restrict h, double *restrict th, double *restrict kk, \
    double *restrict cc, double *restrict dk, void *restrict bad
typedef psik_block_fn kb_block_fn;

/* The two loops of this variant, kb_half_<isa> and kb_any_<isa> (named
 * through a macro, as the single-header generator reads static names). */
#define KB_VARIANTS(suffix)                                                           \
    static void kb_half_##suffix(KB_BLOCK_ARGS)                                       \
    { (void)mo; kb_block_body((const kb_blk *)coef, 1, cnt, h, th, kk, cc, dk, (uint64_t *)bad); }                            \
    static void kb_any_##suffix(KB_BLOCK_ARGS)                                        \
    { (void)mo; kb_block_body((const kb_blk *)coef, 0, cnt, h, th, kk, cc, dk, (uint64_t *)bad); }
#define KB_VARIANTS_OF(suffix) KB_VARIANTS(suffix)
KB_VARIANTS_OF(PSIK_ISA_NAME)

/* The block loop for these constants. */
PSIK_HIDDEN kb_block_fn PSIK_ISA_FN(psik__kos_pick)(const double *a);
PSIK_HIDDEN kb_block_fn PSIK_ISA_FN(psik__kos_pick)(const double *a)
{
    return a[KB_L] == 0.5 ? PSIK_ISA_FN(kb_half) : PSIK_ISA_FN(kb_any);
}

#if PSIK_ISA_BASE
#if PSIK_ISA_HAVE
PSIK_HIDDEN kb_block_fn psik__kos_pick_sse42(const double *a);
PSIK_HIDDEN kb_block_fn psik__kos_pick_avx2(const double *a);
PSIK_HIDDEN kb_block_fn psik__kos_pick_avx512(const double *a);
PSIK_HIDDEN int psik__kos_point_avx2(const double *a, double s, psik_point *out);
#endif

static kb_block_fn kb_pick(const double *a)
{
#if PSIK_ISA_HAVE
    switch (psik__isa()) {
    case PSIK_ISA_ID_AVX512: return psik__kos_pick_avx512(a);
    case PSIK_ISA_ID_AVX2: return psik__kos_pick_avx2(a);
    case PSIK_ISA_ID_SSE42: return psik__kos_pick_sse42(a);
    default: break;
    }
#endif
    return psik__kos_pick_base(a);
}

/* The fused point (see kb_core for the return value). */
PSIK_HIDDEN int psik__kos_point_fast(const double *a, double s, psik_point *out);
PSIK_HIDDEN int psik__kos_point_fast(const double *a, double s, psik_point *out)
{
#if PSIK_ISA_HAVE
    if (psik__isa() >= PSIK_ISA_ID_AVX2)
        return psik__kos_point_avx2(a, s, out);
#endif
    return psik__kos_point_base(a, s, out);
}

/* psik_eval_batch for the kosugi row (see psik_family.batch). */
PSIK_HIDDEN void psik__kos_batch(const psik_model *m, size_t count, const double *h,
                                 double *theta, double *k, double *capacity,
                                 double *dk_dh);
PSIK_HIDDEN void psik__kos_batch(const psik_model *m, size_t count, const double *h,
                                 double *theta, double *k, double *capacity,
                                 double *dk_dh)
{
    kb_blk bk;
    kb_block_fn fn = kb_pick(m->aux);
    bk.a = m->aux;
    bk.h_sat = m->h_sat;
    bk.tr = m->theta_r;
    bk.ts = m->theta_s;
    bk.dts = m->theta_s - m->theta_r;
    bk.ks = m->ks;
    /* flags as wide as a double: one vector per lane group */
    psik__blocks_run(m, &bk, fn, sizeof(uint64_t), count, h, theta, k, capacity, dk_dh);
}
#endif /* PSIK_ISA_BASE */
