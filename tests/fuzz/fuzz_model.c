/* fuzz_model.c - libFuzzer target for psik_init + evaluation (and a small
 * psik_fit) on arbitrary bytes.
 *
 * Byte 0 picks the kind (every kind of the table, plus unknown ones) and
 * the mode; parameters come from the next bytes either as raw doubles
 * (any bit pattern: NaN, inf, subnormal, negative) or mapped into the
 * kind's psik_param_range (to reach valid models often). The remaining
 * bytes are heads, raw or mapped to +-10^[-3, 7].
 * Invariants (DESIGN.md semantics), trapped on violation:
 * - psik_init fails exactly when psik_check fails, and then the model
 *   evaluates to NaN;
 * - for a valid model and finite h: theta_r <= theta <= theta_s,
 *   0 <= Se, Kr <= 1, K = ks Kr within rounding, C >= 0, dK/dh >= 0, all
 *   finite; NaN h gives NaN; psik_eval agrees with the single functions.
 * - psik_fit on up to 10 points from the bytes returns a status; on
 *   PSIK_OK the SSE is finite and >= 0 and each estimate is inside its bounds.
 * Build and run: make fuzz. */
#include <math.h>
#include <stddef.h>
#include <stdint.h>
#include <string.h>

#include "psik.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static double take(const uint8_t **p, size_t *n)
{
    double v = 0.0;
    if (*n >= 8) {
        memcpy(&v, *p, 8);
        *p += 8;
        *n -= 8;
    } else if (*n > 0) {
        v = (double)(**p) / 255.0;
        *p += *n;
        *n = 0;
    }
    return v;
}

static double unit(const uint8_t **p, size_t *n)
{
    uint16_t u = 0;
    if (*n >= 2) {
        memcpy(&u, *p, 2);
        *p += 2;
        *n -= 2;
    } else if (*n == 1) {
        u = **p;
        *p += 1;
        *n = 0;
    }
    return (double)u / 65535.0;
}

static int same(double a, double b)
{
    return a == b || (isnan(a) && isnan(b)) || fabs(a - b) <= 1e-12 * fabs(b);
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    const uint8_t *p = data;
    size_t n = size;
    psik_model m;
    psik_kind kind;
    double par[PSIK_MAX_PARAMS];
    int np, i, raw_par, raw_h, do_fit;
    char msg[256];
    psik_status st, ck;
    if (n < 1)
        return 0;
    kind = (psik_kind)(p[0] % 16);
    raw_par = (p[0] >> 4) & 1;
    raw_h = (p[0] >> 5) & 1;
    do_fit = (p[0] >> 6) == 3;     /* a quarter of the inputs: fits are slow */
    p++; n--;
    np = psik_param_count(kind);
    if (np < 0) {
        double z[PSIK_MAX_PARAMS] = {0};
        if (psik_init(&m, kind, z) != PSIK_EINVAL)
            __builtin_trap();
        if (!isnan(psik_theta(&m, -1.0)))
            __builtin_trap();
        return 0;
    }
    for (i = 0; i < np; i++) {
        if (raw_par) {
            par[i] = take(&p, &n);
        } else {
            double lo, hi, u = unit(&p, &n);
            psik_param_range(kind, i, &lo, &hi);
            par[i] = lo + u * (hi - lo);
            if (lo > 0.0 && hi > 1e3 * lo)
                par[i] = lo * pow(hi / lo, u);
        }
    }
    ck = psik_check(kind, par, msg, sizeof msg);
    st = psik_init(&m, kind, par);
    if ((ck == PSIK_OK) != (st == PSIK_OK))
        __builtin_trap();
    if (st != PSIK_OK) {
        if (msg[0] == '\0' || !isnan(psik_theta(&m, -1.0)) || !isnan(psik_k(&m, -1.0)))
            __builtin_trap();
        return 0;
    }
    if (!isnan(psik_theta(&m, NAN)) || !isnan(psik_k(&m, NAN)))
        __builtin_trap();
    while (n > 0) {
        double h, th, se, kr, k, c, dk;
        psik_state s;
        if (raw_h) {
            h = take(&p, &n);
            if (isnan(h))
                continue;
        } else {
            double u = unit(&p, &n);
            h = -pow(10.0, -3.0 + 10.0 * u);
            if (u < 0.02) h = -h;
        }
        th = psik_theta(&m, h);
        se = psik_se(&m, h);
        kr = psik_kr(&m, h);
        k = psik_k(&m, h);
        c = psik_capacity(&m, h);
        dk = psik_dk_dh(&m, h);
        if (!(th >= m.theta_r && th <= m.theta_s))
            __builtin_trap();
        if (!(se >= 0.0 && se <= 1.0) || !(kr >= 0.0 && kr <= 1.0))
            __builtin_trap();
        if (!(isfinite(k) && k >= 0.0 && k <= m.ks * (1.0 + 1e-15)))
            __builtin_trap();
        if (!(isfinite(c) && c >= 0.0) || !(isfinite(dk) && dk >= 0.0))
            __builtin_trap();
        psik_eval(&m, h, &s);
        if (!same(s.theta, th) || !same(s.k, k) || !same(s.se, se) || !same(s.kr, kr))
            __builtin_trap();
    }
    if (do_fit) {
        /* a small fit on data from the model itself, with perturbed water contents */
        double hh[10], tt[10];
        psik_fit_options o;
        psik_fit_result r;
        psik_fit_data d;
        int j;
        for (j = 0; j < 10; j++) {
            hh[j] = -pow(10.0, -1.0 + 0.5 * j);
            tt[j] = psik_theta(&m, hh[j]) + 0.01 * sin(3.0 * j + data[0]);
            if (tt[j] < 0.0) tt[j] = 0.0;
            if (tt[j] > 1.0) tt[j] = 1.0;
        }
        memset(&d, 0, sizeof d);
        d.n_theta = 10; d.h_theta = hh; d.theta = tt;
        psik_fit_defaults(&o);
        o.starts = 1;
        o.samples = 16;
        o.max_iter = 20;
        st = psik_fit(kind, &d, &o, &r, msg, sizeof msg);
        if (st == PSIK_OK) {
            if (!(isfinite(r.sse) && r.sse >= 0.0))
                __builtin_trap();
            for (j = 0; j < r.npar; j++) {
                double lo, hi;
                psik_param_range(kind, j, &lo, &hi);
                if (!(r.flag[j] & (PSIK_FIT_FIXED | PSIK_FIT_AUTOFIXED)) &&
                    !(r.par[j] >= lo && r.par[j] <= hi))
                    __builtin_trap();
            }
        } else if (msg[0] == '\0') {
            __builtin_trap();
        }
    }
    return 0;
}
