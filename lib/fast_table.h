/* fast_table.h - the interpolation kernel of the table path
 * (lib/batch_table.c), called from lib/table.c. Not installed. */
#ifndef PSIK_FAST_TABLE_H
#define PSIK_FAST_TABLE_H

#include "psik_internal.h"

#include <stdint.h>

/* The constants an evaluation reads, copied out of the table so that the
 * compiler knows the output stores cannot change them. */
typedef struct tb_par {
    const double *coef;
    uint64_t e0, lg, nint;
    double fn, tr, ts, dts, ks;   /* fn = N */
    double h_dry, h_wet;          /* the table's range */
} tb_par;

/* The interpolated state at a head h_dry <= h <= h_wet (psik_table_eval). */
PSIK_HIDDEN void psik__table_point(const tb_par *t, double h, double *th, double *kk,
                                   double *cc, double *dk);

/* The same over n <= 256 heads, vectorised, bit for bit the point's values
 * inside the range; returns nonzero if some head is outside it (or NaN),
 * whose values the caller replaces. */
PSIK_HIDDEN int psik__table_block(const tb_par *t, size_t n, const double *h, double *th,
                                  double *kk, double *cc, double *dk);

#endif
