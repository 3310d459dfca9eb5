/* fast_durner.h - the fused Durner point and its batch kernels
 * (lib/batch_durner.c), called from the rows in lib/durner.c. Not
 * installed. */
#ifndef PSIK_FAST_DURNER_H
#define PSIK_FAST_DURNER_H

#include "psik_internal.h"

/* The constants of the fused point, in the notation of durner.c: per mode
 * alpha, n, m = (n - 1)/n, k = n - 1 (exact), the retention weight w (the
 * last one with its rounding remainder added, as durner.c sums it) and
 * the conductivity weight c = w alpha / sum w alpha. */
typedef struct psik_durc {
    double alpha[3], n[3], m[3], k[3], w[3], c[3];
    double l;                /* pore connectivity */
    int nm;                  /* number of modes: 2 or 3 */
} psik_durc;

/* The point at suction s through the fused core. Returns 0, writing
 * nothing, where the core does not apply (s not positive, normal and
 * finite; |n_i log(alpha_i s)| > 700 for some mode; or a sum of the
 * model so small that its terms could have lost digits to underflow):
 * the caller then uses its own path. Where it returns 1 the values keep
 * the accuracy goal (tests/unit/test_accuracy.c) and equal the batch
 * kernel's bit for bit, on every instruction set. */
PSIK_HIDDEN int psik__dur_point_fast(const psik_durc *c, double s, psik_point *out);

/* psik_eval_batch for a Durner row (see psik_family.batch). */
PSIK_HIDDEN void psik__dur_batch(const psik_model *m, const psik_durc *c, size_t count,
                                 const double *h, double *theta, double *k,
                                 double *capacity, double *dk_dh);

#endif
