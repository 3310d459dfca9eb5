/* fast_simple.h - the fused points and batch kernels of the Brooks-Corey
 * and Gardner kinds (lib/batch_bc.c, lib/batch_gardner.c,
 * lib/point_gardner.c), called from the rows in lib/bc.c and
 * lib/gardner.c. Not installed. */
#ifndef PSIK_FAST_SIMPLE_H
#define PSIK_FAST_SIMPLE_H

#include "psik_internal.h"

/* Brooks-Corey: s_b = -h_b, lambda, and the exponent of r = s_b/s in Kr,
 * lambda (L + 2) + 2, in two parts (bc.c's aux). */
typedef struct psik_bcc {
    double sb, lam, ek_hi, ek_lo;
} psik_bcc;

/* The point at suction s > s_b: returns 0, writing nothing, where the
 * kernel does not apply (s infinite or NaN, s_b/s below the normal range);
 * where it returns 1 the values keep the accuracy goal and equal the batch
 * kernel's bit for bit. */
PSIK_HIDDEN int psik__bc_point_fast(const psik_bcc *c, double s, psik_point *out);
PSIK_HIDDEN void psik__bc_batch(const psik_model *m, const psik_bcc *c, size_t count,
                                const double *h, double *theta, double *k,
                                double *capacity, double *dk_dh);

/* Gardner: Se = Kr = exp(-alpha s) for every s >= 0 (infinite s gives 0);
 * the batch kernel's point. */
PSIK_HIDDEN void psik__gardner_point_fast(double alpha, double s, psik_point *out);
/* The one-point code (lib/point_gardner.c) for 0 <= alpha s <= 700: 1 and
 * the point (or psik_eval's whole result), else 0 writing nothing. Within
 * 1 ulp; agrees with the batch kernel's to 1e-14, not bit for bit. */
PSIK_HIDDEN int psik__gardner_point_scalar(double alpha, double s, psik_point *out);
PSIK_HIDDEN int psik__gardner_eval_scalar(const psik_model *m, double s, psik_state *out);
PSIK_HIDDEN void psik__gardner_batch(const psik_model *m, size_t count, const double *h,
                                     double *theta, double *k, double *capacity,
                                     double *dk_dh);

#endif
