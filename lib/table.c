/* table.c - the tabulated fast path (psik_table_*): ln Se and ln K of any
 * model as monotone piecewise cubics over suction s = -h.
 *
 * Knots: every octave [2^e, 2^(e+1)) of suction from the one holding -h_wet
 * to the one holding -h_dry is cut into N = 2^k equal intervals, knots
 * s = 2^e (1 + i/N) (relative spacing 1/N to 1/(2N), like a log grid of
 * N / log10(2) knots per decade). An evaluation then finds its interval and
 * its position f in [0, 1) from the bits of s alone (exponent and top k
 * significand bits; the rest is f exactly): no log, no division.
 * At each knot psik_eval gives Se, K and their exact slopes in x = ln s
 * (d ln Se/dx = -s C / ((theta_s - theta_r) Se), d ln K/dx = -s (dK/dh) / K),
 * turned into slopes per unit f (dx/df = 1/(N + i + f)). ln Se rather than
 * theta: theta = theta_r + (theta_s - theta_r) e^(ln Se) then keeps its
 * relative accuracy, and C keeps its own where theta is within rounding of
 * theta_s or theta_r. Cubic Hermite pieces with exact slopes are
 * O(N^-4); the Fritsch-Carlson (1980) limiter then scales an interval's two
 * slopes where alpha^2 + beta^2 > 9 (alpha, beta = slope / secant) and
 * zeroes them where the secant is 0, which makes every piece monotone, so
 * C >= 0 and dK/dh >= 0 everywhere. Each interval stores its eight cubic
 * coefficients (ln Se, ln K) in f: an evaluation is two cubics and two exps.
 * C and dK/dh are the exact derivatives of the interpolants (a
 * mass-conservative scheme that integrates C stays consistent with
 * theta), not the model's own.
 *
 * Error report: the interpolants are compared with psik_eval at 7 points
 * inside every interval (f = 1/8 ... 7/8); the largest relative errors,
 * times 1.25 for the peaks between samples, are the reported bounds.
 * tests/unit/test_table.c checks them with 64 random points per interval.
 * K below 1e-280 ks is left out of the K bound (ln K and ln Se are clamped
 * at ln(1e-300) so that an underflowed value does not poison its
 * neighbours).
 *
 * Outside [h_dry, h_wet] (and for NaN, saturated heads) every evaluator
 * returns psik_eval's values, so a table is never less safe than the model.
 */
#include "psik_internal.h"
#include "fast_table.h"
#include "fastmath.h"

#include <float.h>
#include <math.h>
#include <stdint.h>
#include <string.h>

#define TABLE_MAGIC 0x7073746bu   /* "pstk" */
#define TABLE_ALIGN 64
#define LNK_FLOOR (-690.7755278982137)   /* ln(1e-300) */

struct psik_table {
    unsigned int magic;
    unsigned int abi_size;
    size_t knots;
    uint64_t e0;                  /* biased exponent of the first octave */
    uint64_t lg;                  /* N = 2^lg knots per octave */
    uint64_t nint;                /* knots - 1 intervals */
    double h_dry, h_wet;
    double tr, dts, ts, ks;
    double err_theta, err_k;
    psik_model model;
    /* then, at header_bytes() from the start, 8 (knots - 1) coefficients */
};

static size_t header_bytes(void);
static double *coef_of(struct psik_table *t);
static const double *ccoef_of(const struct psik_table *t);

static size_t header_bytes(void)
{
    return (sizeof(struct psik_table) + TABLE_ALIGN - 1) / TABLE_ALIGN * TABLE_ALIGN;
}

static double *coef_of(struct psik_table *t)
{
    return (double *)(void *)((unsigned char *)t + header_bytes());
}

static const double *ccoef_of(const struct psik_table *t)
{
    return (const double *)(const void *)((const unsigned char *)t + header_bytes());
}

/* Biased exponent of s > 0 normal. */
static uint64_t bexp(double s)
{
    return psik__fm_bits(s) >> 52;
}

/* log2 N for a density in knots per decade: the power of two at or above. */
static int lg_of(double density)
{
    int lg = 0;
    double per_octave = density * 0.30102999566398120;
    while ((double)(1 << lg) < per_octave && lg < 20)
        lg++;
    return lg;
}

PSIK_API size_t psik_table_knots(double h_dry, double h_wet, double density)
{
    uint64_t oct;
    if (!(density > 0.0))
        density = PSIK_TABLE_DENSITY;
    if (!(h_dry < h_wet && h_wet < 0.0) || !isfinite(h_dry) || !(density < 1e6) ||
        -h_wet < DBL_MIN)
        return 0;
    oct = bexp(-h_dry) - bexp(-h_wet) + 1;
    if (oct << lg_of(density) > ((uint64_t)1 << 27))
        return 0;
    return (size_t)(oct << lg_of(density)) + 1;
}

PSIK_API size_t psik_table_bytes(size_t knots)
{
    if (knots < 2 || knots > (size_t)1 << 27)
        return 0;
    return header_bytes() + 8 * (knots - 1) * sizeof(double) + TABLE_ALIGN;
}

/* Knot values of ln Se and ln K with their slopes in x = ln s. */
static void knot(const psik_model *m, double s, double *th, double *dth, double *lk, double *dlk)
{
    psik_state st;
    psik_eval(m, -s, &st);
    if (st.se > 1e-300) {
        *th = log(st.se);
        *dth = -s * st.capacity / ((m->theta_s - m->theta_r) * st.se);
    } else {
        *th = LNK_FLOOR;
        *dth = 0.0;
    }
    if (st.k > m->ks * 1e-300) {
        *lk = log(st.k);
        *dlk = -s * st.dk_dh / st.k;
    } else {
        *lk = LNK_FLOOR + log(m->ks);
        *dlk = 0.0;
    }
}

/* Fritsch-Carlson on interval slopes d0, d1 with secant delta (decreasing
 * or increasing data alike). */
static void limit(double delta, double *d0, double *d1)
{
    double a, b, r;
    if (delta == 0.0 || !isfinite(delta)) {
        *d0 = 0.0;
        *d1 = 0.0;
        return;
    }
    a = *d0 / delta;
    b = *d1 / delta;
    if (!(a >= 0.0)) { *d0 = 0.0; a = 0.0; }
    if (!(b >= 0.0)) { *d1 = 0.0; b = 0.0; }
    r = a * a + b * b;
    if (r > 9.0) {
        double tau = 3.0 / sqrt(r);
        *d0 = tau * a * delta;
        *d1 = tau * b * delta;
    }
}

static void cubic(double f0, double f1, double d0, double d1, double dx, double *c)
{
    double df = f1 - f0, m0 = d0 * dx, m1 = d1 * dx;
    c[0] = f0;
    c[1] = m0;
    c[2] = 3.0 * df - 2.0 * m0 - m1;
    c[3] = m0 + m1 - 2.0 * df;
}

static tb_par tb_par_of(const struct psik_table *t)
{
    tb_par p;
    p.coef = ccoef_of(t);
    p.e0 = t->e0;
    p.lg = t->lg;
    p.nint = t->nint;
    p.fn = (double)((uint64_t)1 << t->lg);
    p.tr = t->tr;
    p.ts = t->ts;
    p.dts = t->dts;
    p.ks = t->ks;
    p.h_dry = t->h_dry;
    p.h_wet = t->h_wet;
    return p;
}

static int inside(const struct psik_table *t, double h)
{
    return h >= t->h_dry && h <= t->h_wet;
}

PSIK_API psik_status psik_table_build(const psik_model *m, double h_dry, double h_wet,
                                      size_t knots, void *mem, size_t bytes,
                                      psik_table **table, psik_table_error *err)
{
    struct psik_table *t;
    uintptr_t addr;
    size_t need = psik_table_bytes(knots), i, pad;
    double th0, dth0, lk0, dlk0, eth = 0.0, ek = 0.0, fn, s_wet;
    uint64_t e0, oct, lg;
    tb_par tp;
    if (table != NULL)
        *table = NULL;
    if (m == NULL || psik__family(m->kind) == NULL || mem == NULL || table == NULL)
        return PSIK_EINVAL;
    if (knots < 2 || need == 0)
        return PSIK_EINVAL;
    if (!(h_dry < h_wet && h_wet < 0.0) || !isfinite(h_dry))
        return PSIK_EDOMAIN;
    if (bytes < need)
        return PSIK_ENOMEM;
    s_wet = -h_wet;
    if (s_wet < DBL_MIN)
        return PSIK_EDOMAIN;
    /* knots must come from psik_table_knots for this range: N a power of 2 */
    e0 = bexp(s_wet);
    oct = bexp(-h_dry) - e0 + 1;
    if ((knots - 1) % oct != 0)
        return PSIK_EINVAL;
    for (lg = 0; ((uint64_t)1 << lg) < (knots - 1) / oct; lg++)
        ;
    if (((uint64_t)1 << lg) != (knots - 1) / oct || lg > 20)
        return PSIK_EINVAL;
    fn = (double)((uint64_t)1 << lg);
    /* The table answers for unsaturated heads only (the knots below the
     * saturation head take the model's left limit there). */
    if (h_wet >= m->h_sat)
        h_wet = m->h_sat * (1.0 + 4.0 * DBL_EPSILON);
    if (!(h_dry < h_wet && h_wet < 0.0))
        return PSIK_EDOMAIN;
    addr = (uintptr_t)mem;
    pad = (TABLE_ALIGN - addr % TABLE_ALIGN) % TABLE_ALIGN;
    t = (struct psik_table *)(void *)((unsigned char *)mem + pad);
    memset(t, 0, header_bytes());
    t->knots = knots;
    t->e0 = e0;
    t->lg = lg;
    t->nint = knots - 1;
    t->h_wet = h_wet;
    t->h_dry = h_dry;
    t->tr = m->theta_r;
    t->ts = m->theta_s;
    t->dts = m->theta_s - m->theta_r;
    t->ks = m->ks;
    t->model = *m;
    /* Knot values (ln Se, its slope in x = ln s, ln K, its slope) in slots
     * 0..3 of the row of the interval that starts there (the last knot's go
     * to a local buffer); then, interval by interval, the slopes per unit f
     * (ds/df / s = 1/(N + i') at the left end, 1/(N + i' + 1) at the right),
     * the Fritsch-Carlson limiter on that interval's two slopes, and the
     * coefficients, which overwrite the row once its knot has been read. */
    {
        double last[4];
        double *co = coef_of(t);
        const size_t mask = ((size_t)1 << lg) - 1;
        for (i = 0; i < knots; i++) {
            double *slot = i + 1 < knots ? co + 8 * i : last;
            /* s = 2^e (1 + i'/N): octave e = e0 + i / N, i' = i mod N */
            double s = ldexp(1.0 + (double)(i & mask) / fn, (int)(e0 + (i >> lg)) - 1023);
            if (s <= -m->h_sat)   /* left limit at the saturation head */
                s = -m->h_sat * (1.0 + 4.0 * DBL_EPSILON);
            knot(m, s, &slot[0], &slot[1], &slot[2], &slot[3]);
        }
        th0 = co[0]; dth0 = co[1]; lk0 = co[2]; dlk0 = co[3];
        for (i = 0; i + 1 < knots; i++) {
            double *c = co + 8 * i;
            const double *b = i + 2 < knots ? co + 8 * (i + 1) : last;
            double th1 = b[0], dth1 = b[1], lk1 = b[2], dlk1 = b[3];
            double w0 = 1.0 / (fn + (double)(i & mask)), w1 = 1.0 / (fn + (double)(i & mask) + 1.0);
            double a0 = dth0 * w0, a1 = dth1 * w1, k0 = dlk0 * w0, k1 = dlk1 * w1;
            limit(th1 - th0, &a0, &a1);
            limit(lk1 - lk0, &k0, &k1);
            cubic(th0, th1, a0, a1, 1.0, c);
            cubic(lk0, lk1, k0, k1, 1.0, c + 4);
            th0 = th1; dth0 = dth1; lk0 = lk1; dlk0 = dlk1;
        }
    }
    t->magic = TABLE_MAGIC;
    t->abi_size = (unsigned int)sizeof(psik_model);
    /* error estimate: 7 points inside every interval */
    tp = tb_par_of(t);
    for (i = 0; i + 1 < knots; i++) {
        int q;
        double s0 = ldexp(1.0 + (double)(i & (((size_t)1 << lg) - 1)) / fn,
                          (int)(e0 + (i >> lg)) - 1023);
        double ds = ldexp(1.0 / fn, (int)(e0 + (i >> lg)) - 1023);
        for (q = 1; q < 8; q++) {
            double h = -(s0 + ds * (q / 8.0));
            double th, kk, cc, dk, e;
            psik_state st;
            if (!inside(t, h))
                continue;
            psik__table_point(&tp, h, &th, &kk, &cc, &dk);
            psik_eval(m, h, &st);
            e = fabs(th - st.theta) / st.theta;
            if (e > eth) eth = e;
            if (st.k > m->ks * 1e-280) {
                e = fabs(kk - st.k) / st.k;
                if (e > ek) ek = e;
            }
        }
    }
    t->err_theta = 1.25 * eth;
    t->err_k = 1.25 * ek;
    if (err != NULL) {
        err->theta_rel = t->err_theta;
        err->k_rel = t->err_k;
    }
    *table = t;
    return PSIK_OK;
}

static int valid(const psik_table *t)
{
    return t != NULL && t->magic == TABLE_MAGIC && t->abi_size == sizeof(psik_model);
}

PSIK_API void psik_table_eval(const psik_table *t, double h, psik_state *out)
{
    double th, kk, cc, dk;
    tb_par tp;
    if (out == NULL)
        return;
    if (!valid(t)) {
        out->se = out->theta = out->kr = out->k = out->capacity = out->dk_dh = NAN;
        return;
    }
    if (!inside(t, h)) {
        psik_eval(&t->model, h, out);
        return;
    }
    tp = tb_par_of(t);
    psik__table_point(&tp, h, &th, &kk, &cc, &dk);
    out->theta = th;
    out->se = (th - t->tr) / t->dts;
    out->k = kk;
    out->kr = kk / t->ks;
    out->capacity = cc;
    out->dk_dh = dk;
}

PSIK_API void psik_table_eval_batch(const psik_table *t, size_t count, const double *h,
                                    double *theta, double *k, double *capacity,
                                    double *dk_dh)
{
    enum { B = 256 };
    double s_th[B], s_k[B], s_c[B], s_dk[B];
    size_t i0;
    tb_par tp;
    if (!valid(t) || h == NULL) {
        psik__fill_nan(count, theta, k, capacity, dk_dh);
        return;
    }
    tp = tb_par_of(t);
    for (i0 = 0; i0 < count; i0 += B) {
        size_t n = count - i0 < (size_t)B ? count - i0 : (size_t)B, i;
        double *th = theta ? theta + i0 : s_th;
        double *kk = k ? k + i0 : s_k;
        double *cc = capacity ? capacity + i0 : s_c;
        double *dk = dk_dh ? dk_dh + i0 : s_dk;
        if (!psik__table_block(&tp, n, h + i0, th, kk, cc, dk))
            continue;
        for (i = 0; i < n; i++) {
            if (!inside(t, h[i0 + i])) {
                psik_state st;
                psik_eval(&t->model, h[i0 + i], &st);
                th[i] = st.theta;
                kk[i] = st.k;
                cc[i] = st.capacity;
                dk[i] = st.dk_dh;
            }
        }
    }
}
