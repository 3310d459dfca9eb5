/* fast_block.h - what the batch kernels (lib/batch_*.c) share: the block
 * driver (lib/blocks.c) and eval.c's clamps as selects. Not installed.
 *
 * A kernel computes every lane of a block branch-free and flags the lanes
 * it cannot vouch for (saturated, NaN, infinite, outside its core's range);
 * the driver recomputes those with psik_eval, so they get exactly the
 * scalar path's values.
 */
#ifndef PSIK_FAST_BLOCK_H
#define PSIK_FAST_BLOCK_H

#include "psik_internal.h"
#include "fastmath.h"

#include <float.h>

#define PSIK_BLK 256


/* One block: cnt <= PSIK_BLK heads, every output written (none NULL), and
 * a flag per head in bad (unsigned char or uint64_t, as the kernel chose:
 * the width that keeps its loop fastest), nonzero where psik_eval must redo
 * head i; or no flags at all (bad unused) and th[i] NaN where head i must
 * be redone, which keeps the loop to doubles only (a byte array beside
 * them makes the vectoriser take 64 lanes at a time, and spill). coef is
 * the kernel's own. */
typedef void psik_block_t(const psik_model *m, const void *coef, int cnt,
                          const double *h, double *th, double *kk, double *cc,
                          double *dk, void *bad);
typedef psik_block_t *psik_block_fn;

/* A block whose lanes are good exactly for h_lo < h < h_hi (bounds the
 * caller knows from the model): instead of flags it returns whether any
 * head of the block is outside (an OR reduction inside its vector loop),
 * so its loop holds doubles only (a byte array beside them makes the
 * vectoriser take 32 lanes at a time, and spill). */
typedef int psik_block_range_t(const psik_model *m, const void *coef, double h_lo,
                               double h_hi, int cnt, const double *h, double *th,
                               double *kk, double *cc, double *dk);

/* psik_eval_batch through blocks of fn (h != NULL, m valid): NULL outputs
 * go to scratch space; fn NULL means psik_eval head by head. flag_bytes is
 * the size of fn's flags: 1 (unsigned char) or 8 (uint64_t), or 0 for a
 * kernel that marks its bad lanes by a NaN theta. */
PSIK_HIDDEN void psik__blocks_run(const psik_model *m, const void *coef, psik_block_fn fn,
                                  size_t flag_bytes, size_t count, const double *h,
                                  double *theta, double *k, double *capacity,
                                  double *dk_dh);

/* The same for a range block: heads outside (h_lo, h_hi), and NaN, go to
 * psik_eval. */
PSIK_HIDDEN void psik__blocks_run_range(const psik_model *m, const void *coef,
                                        psik_block_range_t *fn, double h_lo, double h_hi,
                                        size_t count, const double *h, double *theta,
                                        double *k, double *capacity, double *dk_dh);

/* eval.c's clamps, as selects. */
PSIK_FM double psik__fb_pos(double v)
{
    v = psik__fm_sel(v >= 0.0, v, 0.0);
    return psik__fm_sel(v > DBL_MAX, DBL_MAX, v);
}

PSIK_FM double psik__fb_01(double v)
{
    v = psik__fm_sel(v > 0.0, v, 0.0);
    return psik__fm_sel(v > 1.0, 1.0, v);
}

/* theta = theta_r + (theta_s - theta_r) Se, at most theta_s (eval.c). */
PSIK_FM double psik__fb_theta(const psik_model *m, double se)
{
    double t = m->theta_r + (m->theta_s - m->theta_r) * se;
    return psik__fm_sel(t > m->theta_s, m->theta_s, t);
}

/* eval.c's clamps and assembly of one lane (psik_eval's values from the
 * point's Se, Kr and derivatives): theta, K, C and dK/dh. tr, dts, ts and
 * ks are the model's theta_r, theta_s - theta_r, theta_s and ks, held in
 * locals by the block outside its loop. */
PSIK_FM void psik__fb_lane(double tr, double dts, double ts, double ks, double se, double kr,
                           double dse, double dkr, double *th, double *kk, double *cc,
                           double *dk)
{
    double t;
    se = psik__fb_01(se);
    kr = psik__fb_01(kr);
    dse = psik__fb_pos(dse);
    dkr = psik__fb_pos(dkr);
    t = tr + dts * se;
    *th = psik__fm_sel(t > ts, ts, t);
    *kk = ks * kr;
    *cc = psik__fb_pos(dts * dse);
    *dk = psik__fb_pos(ks * dkr);
}

#endif
