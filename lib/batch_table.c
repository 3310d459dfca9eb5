/* batch_table.c - the table path's interpolation (table.c): one point and
 * the vectorised block, compiled once per instruction set (isa.h) so that
 * both use the same variant's code (and bits) on one machine; in the FMA
 * variants the two exps are fastmath.h's table-free ones. */
#include "fast_table.h"
#include "fastmath.h"
#include "isa.h"

/* The interpolated state at a head inside the table; the same arithmetic
 * for psik_table_eval and the batch loop. From the bits of s = -h: the
 * octave (exponent), the interval i (top lg bits of the significand) and
 * f in [0, 1) (the rest, exactly); no log, no conversion instruction. */
PSIK_FM void interp(const tb_par *t, double h, double *th, double *kk, double *cc, double *dk)
{
    double s = -h;
    uint64_t b = psik__fm_bits(s), eb = b >> 52, man = b & 0xfffffffffffffULL;
    uint64_t q = ((eb - t->e0) << t->lg) + (man >> (52 - t->lg));
    uint64_t rest = (man << t->lg) & 0xfffffffffffffULL;
    double f = psik__fm_double(0x3ff0000000000000ULL | rest) - 1.0;
    double scale = psik__fm_double((2046u - eb) << 52) * t->fn;   /* N 2^-e */
    double v, dv, lk, dlk, k, se, vt;
    double c0, c1, c2, c3, c4, c5, c6, c7;
    const double *c = t->coef;
    q = q < t->nint ? q : t->nint - 1;     /* out-of-range lanes: any valid row */
    q *= 8;
    c0 = c[q]; c1 = c[q + 1]; c2 = c[q + 2]; c3 = c[q + 3];
    c4 = c[q + 4]; c5 = c[q + 5]; c6 = c[q + 6]; c7 = c[q + 7];
    v = c0 + f * (c1 + f * (c2 + f * c3));
    dv = c1 + f * (2.0 * c2 + f * (3.0 * c3));
    lk = c4 + f * (c5 + f * (c6 + f * c7));
    dlk = c5 + f * (2.0 * c6 + f * (3.0 * c7));
    se = psik__fm_exp(v);
    k = psik__fm_exp(lk);
    se = psik__fm_sel(se > 1.0, 1.0, se);
    vt = t->tr + t->dts * se;
    *th = psik__fm_sel(vt > t->ts, t->ts, vt);
    *kk = psik__fm_sel(k > t->ks, t->ks, k);
    /* d/dh = -(d/ds) = -(N 2^-e) d/df */
    *cc = psik__fm_sel(dv < 0.0, -dv * scale * (t->dts * se), 0.0);
    *dk = psik__fm_sel(dlk < 0.0, -dlk * scale * k, 0.0);
}

typedef void tb_point_t(const tb_par *t, double h, double *th, double *kk, double *cc,
                        double *dk);
typedef int tb_block_t(const tb_par *t, size_t n, const double *h, double *th, double *kk,
                       double *cc, double *dk);

PSIK_HIDDEN tb_point_t PSIK_ISA_FN(psik__tb_point);
PSIK_HIDDEN void PSIK_ISA_FN(psik__tb_point)(const tb_par *t, double h, double *th, double *kk,
                                             double *cc, double *dk)
{
    interp(t, h, th, kk, cc, dk);
}

PSIK_HIDDEN tb_block_t PSIK_ISA_FN(psik__tb_block);
PSIK_HIDDEN int PSIK_ISA_FN(psik__tb_block)(const tb_par *tq, size_t n,
                                            const double *restrict h, double *restrict th,
                                            double *restrict kk, double *restrict cc,
                                            double *restrict dk)
{
    const tb_par t = *tq;
    size_t i;
    int out = 0;
    for (i = 0; i < n; i++) {
        double a, b, c, d, hi = h[i];
        interp(&t, hi, &a, &b, &c, &d);
        th[i] = a;
        kk[i] = b;
        cc[i] = c;
        dk[i] = d;
        out |= !(hi >= t.h_dry) | !(hi <= t.h_wet);
    }
    return out;
}

#if PSIK_ISA_BASE
PSIK_ISA_SELECT(tb_point_t, psik__tb_point)
PSIK_ISA_SELECT(tb_block_t, psik__tb_block)

PSIK_HIDDEN void psik__table_point(const tb_par *t, double h, double *th, double *kk,
                                   double *cc, double *dk)
{
    psik__tb_point_pick()(t, h, th, kk, cc, dk);
}

PSIK_HIDDEN int psik__table_block(const tb_par *t, size_t n, const double *h, double *th,
                                  double *kk, double *cc, double *dk)
{
    return psik__tb_block_pick()(t, n, h, th, kk, cc, dk);
}
#endif /* PSIK_ISA_BASE */
