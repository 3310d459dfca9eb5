/* test_table.c - the tabulated fast path (psik_table_*).
 *
 * Sources of truth: psik_eval (itself checked against mpmath tables by
 * test_accuracy.c) for the values; the derivative checks compare the
 * table's C and dK/dh with central differences of its own theta and K
 * (they must be the interpolants' exact derivatives), and the
 * monotonicity checks are the Fritsch-Carlson property. Soils: the
 * Carsel & Parrish (1988) class means of MODELS.md (from memory), plus one
 * model of every other kind with invented round parameters.
 * Goals (issue): at the default density theta within 1e-9 and K within
 * 1e-7 relative; the reported bounds are never exceeded.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <float.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "psik.h"

#define H_DRY (-1e6)
#define H_WET (-1e-3)

static uint64_t rng = 0x2545f4914f6cdd1dULL;
static double uni(void)
{
    rng ^= rng << 13; rng ^= rng >> 7; rng ^= rng << 17;
    return (double)(rng >> 11) / 9007199254740992.0;
}

/* Carsel & Parrish (1988) class means (from memory; MODELS.md), cm, cm/day. */
static const double soils[][5] = {
    {0.045, 0.43, 0.145, 2.68, 712.8},   /* sand */
    {0.057, 0.41, 0.124, 2.28, 350.2},   /* loamy sand */
    {0.065, 0.41, 0.075, 1.89, 106.1},   /* sandy loam */
    {0.078, 0.43, 0.036, 1.56, 24.96},   /* loam */
    {0.034, 0.46, 0.016, 1.37, 6.00},    /* silt */
    {0.095, 0.41, 0.019, 1.31, 6.24},    /* clay loam */
    {0.068, 0.38, 0.008, 1.09, 4.80},    /* clay */
};

/* Largest relative error of the table against psik_eval at `per` random
 * log-uniform heads per knot interval. */
static void measure(const psik_model *m, const psik_table *t, size_t knots, int per,
                    double *eth, double *ek)
{
    double lo = log(-H_WET), hi = log(-H_DRY);
    size_t n = (knots - 1) * (size_t)per, i;
    *eth = 0.0;
    *ek = 0.0;
    for (i = 0; i < n; i++) {
        double h = -exp(lo + (hi - lo) * uni());
        psik_state a, b;
        double e;
        psik_table_eval(t, h, &a);
        psik_eval(m, h, &b);
        e = fabs(a.theta - b.theta) / b.theta;
        if (e > *eth) *eth = e;
        if (b.k > m->ks * 1e-280) {
            e = fabs(a.k - b.k) / b.k;
            if (e > *ek) *ek = e;
        }
    }
}

static psik_table *build(const psik_model *m, double density, size_t *knots,
                         psik_table_error *err, void **mem)
{
    size_t n = psik_table_knots(H_DRY, H_WET, density), bytes = psik_table_bytes(n);
    psik_table *t = NULL;
    assert_true(n > 2 && bytes > 0);
    *mem = malloc(bytes);
    assert_non_null(*mem);
    assert_int_equal(psik_table_build(m, H_DRY, H_WET, n, *mem, bytes, &t, err), PSIK_OK);
    assert_non_null(t);
    *knots = n;
    return t;
}

static void test_default_density_vgm(void **state)
{
    size_t s;
    double worst_th = 0.0, worst_k = 0.0;
    (void)state;
    for (s = 0; s < sizeof soils / sizeof soils[0]; s++) {
        psik_model m;
        psik_table_error err;
        size_t knots;
        void *mem;
        double eth, ek;
        psik_table *t;
        assert_int_equal(psik_vgm(&m, soils[s][0], soils[s][1], soils[s][2], soils[s][3],
                                  soils[s][4]), PSIK_OK);
        t = build(&m, 0.0, &knots, &err, &mem);
        measure(&m, t, knots, 64, &eth, &ek);
        printf("# vgm n = %-5g %zu knots: theta %.2e (bound %.2e), K %.2e (bound %.2e)\n",
               soils[s][3], knots, eth, err.theta_rel, ek, err.k_rel);
        assert_true(eth <= err.theta_rel);
        assert_true(ek <= err.k_rel);
        assert_true(err.theta_rel <= 1e-9);
        assert_true(err.k_rel <= 1e-7);
        if (eth > worst_th) worst_th = eth;
        if (ek > worst_k) worst_k = ek;
        free(mem);
    }
    printf("# default density %.0f knots/decade: largest theta error %.2e, K error %.2e\n",
           PSIK_TABLE_DENSITY, worst_th, worst_k);
}

/* Every kind in the table: the bounds hold (whatever they are). */
static void test_every_kind_bounds(void **state)
{
    static const struct { const char *name; double par[12]; } models[] = {
        {"vgm_ae", {0.078, 0.43, 0.036, 1.56, 24.96, 0.5, -2.0}},
        {"vg_free_m", {0.078, 0.43, 0.036, 1.56, 0.4, 24.96, 0.5}},
        {"vgb", {0.045, 0.43, 0.145, 2.68, 712.8}},
        {"bcm", {0.05, 0.41, -15.0, 0.6, 50.0, 0.5}},
        {"bcb", {0.05, 0.41, -15.0, 0.6, 50.0}},
        {"kosugi", {0.06, 0.42, -80.0, 1.4, 20.0, 0.5}},
        {"durner2", {0.05, 0.45, 0.7, 0.05, 2.2, 0.004, 1.4, 30.0, 0.5}},
        {"gardner", {0.05, 0.40, 0.02, 15.0}},
    };
    size_t i;
    (void)state;
    for (i = 0; i < sizeof models / sizeof models[0]; i++) {
        psik_kind kind = psik_kind_from_name(models[i].name);
        psik_model m;
        psik_table_error err;
        size_t knots;
        void *mem;
        double eth, ek;
        psik_table *t;
        if (kind == 0) {
            printf("# %s: not in this build's kinds table, skipped\n", models[i].name);
            continue;
        }
        assert_int_equal(psik_init(&m, kind, models[i].par), PSIK_OK);
        t = build(&m, 0.0, &knots, &err, &mem);
        measure(&m, t, knots, 16, &eth, &ek);
        printf("# %-9s %zu knots: theta %.2e (bound %.2e), K %.2e (bound %.2e)\n",
               models[i].name, knots, eth, err.theta_rel, ek, err.k_rel);
        assert_true(eth <= err.theta_rel);
        assert_true(ek <= err.k_rel);
        free(mem);
    }
}

/* C and dK/dh are the derivatives of the table's own theta and K; theta
 * and K are monotone; batch equals scalar bit for bit. */
static void test_derivatives_monotone_batch(void **state)
{
    psik_model m;
    psik_table_error err;
    size_t knots, i, n = 20000;
    void *mem;
    psik_table *t;
    double *h = malloc(n * sizeof *h), *th = malloc(n * sizeof *th), *kk = malloc(n * sizeof *kk);
    double *cc = malloc(n * sizeof *cc), *dk = malloc(n * sizeof *dk);
    double at_c = 0.0, worst_c = 0.0, worst_dk = 0.0, prev_th = INFINITY, prev_k = INFINITY;
    int nonmono = 0, differ = 0;
    (void)state;
    assert_true(h && th && kk && cc && dk);
    assert_int_equal(psik_vgm(&m, 0.065, 0.41, 0.075, 1.89, 106.1), PSIK_OK);  /* sandy loam */
    t = build(&m, 0.0, &knots, &err, &mem);
    for (i = 0; i < n; i++)   /* wet to dry, through every interval */
        h[i] = -exp(log(-H_WET) + (log(-H_DRY) - log(-H_WET)) * (double)i / (double)(n - 1));
    psik_table_eval_batch(t, n, h, th, kk, cc, dk);
    for (i = 0; i < n; i++) {
        psik_state a, p, q;
        double dh = fabs(h[i]) * 1e-5, fd, noise;
        psik_table_eval(t, h[i], &a);
        if (memcmp(&a.theta, &th[i], sizeof(double)) || memcmp(&a.k, &kk[i], sizeof(double)) ||
            memcmp(&a.capacity, &cc[i], sizeof(double)) || memcmp(&a.dk_dh, &dk[i], sizeof(double)))
            differ++;
        if (a.theta > prev_th || a.k > prev_k)
            nonmono++;
        prev_th = a.theta;
        prev_k = a.k;
        assert_true(a.capacity >= 0.0 && a.dk_dh >= 0.0);
        if (h[i] - dh < H_DRY || h[i] + dh > H_WET)
            continue;
        psik_table_eval(t, h[i] + dh, &p);
        psik_table_eval(t, h[i] - dh, &q);
        /* error of the difference quotient: truncation ~ (dh/h)^2 = 1e-10
         * relative, rounding ~ 4 eps f / dh absolute (which is measured in
         * units of) */
        fd = (p.theta - q.theta) / (2.0 * dh);
        noise = 4.0 * DBL_EPSILON * a.theta / dh;
        if (fabs(fd - a.capacity) / (a.capacity + noise) > worst_c) {
            worst_c = fabs(fd - a.capacity) / (a.capacity + noise);
            at_c = h[i];
        }
        fd = (p.k - q.k) / (2.0 * dh);
        noise = 4.0 * DBL_EPSILON * a.k / dh;
        if (a.k > 1e-250 && fabs(fd - a.dk_dh) / (a.dk_dh + noise) > worst_dk)
            worst_dk = fabs(fd - a.dk_dh) / (a.dk_dh + noise);
    }
    printf("# derivative of the interpolants vs central differences "
           "(relative to value + rounding noise): C %.2e (at h = %g), dK/dh %.2e\n",
           worst_c, at_c, worst_dk);
    printf("# %d non-monotone steps, %d batch/scalar differences in %zu heads\n",
           nonmono, differ, n);
    /* 1e-3: the difference quotient of theta near saturation, where theta
     * changes by a few thousand ulps over 2 dh, is that noisy; a wrong
     * derivative (the model's instead of the interpolant's, or a missed
     * chain-rule factor) would be off by far more. */
    assert_true(worst_c < 1e-3);
    assert_true(worst_dk < 1e-6);
    assert_int_equal(nonmono, 0);
    assert_int_equal(differ, 0);
    free(h); free(th); free(kk); free(cc); free(dk); free(mem);
}

/* Outside the range, NaN and saturated heads: psik_eval's values. */
static void test_outside_and_special(void **state)
{
    psik_model m;
    psik_table_error err;
    size_t knots, i;
    void *mem;
    psik_table *t;
    const double hs[] = {-2e6, -1e300, -INFINITY, 0.0, -0.0, 5.0, -1e-4, NAN};
    double th[8], kk[8], cc[8], dk[8];
    (void)state;
    assert_int_equal(psik_vgm(&m, 0.078, 0.43, 0.036, 1.56, 24.96), PSIK_OK);
    t = build(&m, 0.0, &knots, &err, &mem);
    psik_table_eval_batch(t, 8, hs, th, kk, cc, dk);
    for (i = 0; i < 8; i++) {
        psik_state a, b;
        psik_table_eval(t, hs[i], &a);
        psik_eval(&m, hs[i], &b);
        if (isnan(hs[i])) {
            assert_true(isnan(a.theta) && isnan(a.k) && isnan(th[i]) && isnan(dk[i]));
            continue;
        }
        assert_true(a.theta == b.theta && a.k == b.k && a.capacity == b.capacity &&
                    a.dk_dh == b.dk_dh);
        assert_true(th[i] == b.theta && kk[i] == b.k && cc[i] == b.capacity &&
                    dk[i] == b.dk_dh);
    }
    /* NULL outputs are skipped */
    psik_table_eval_batch(t, 8, hs, NULL, kk, NULL, NULL);
    assert_true(kk[0] == psik_k(&m, hs[0]));
    free(mem);
}

static void test_bad_arguments(void **state)
{
    psik_model m, bad;
    unsigned char small[64];
    void *mem;
    psik_table *t = (psik_table *)small;
    size_t n = psik_table_knots(H_DRY, H_WET, 0.0), bytes = psik_table_bytes(n);
    psik_state st;
    (void)state;
    memset(&bad, 0, sizeof bad);
    assert_int_equal(psik_vgm(&m, 0.078, 0.43, 0.036, 1.56, 24.96), PSIK_OK);
    mem = malloc(bytes);
    assert_non_null(mem);
    assert_int_equal(psik_table_build(NULL, H_DRY, H_WET, n, mem, bytes, &t, NULL), PSIK_EINVAL);
    assert_null(t);
    assert_int_equal(psik_table_build(&bad, H_DRY, H_WET, n, mem, bytes, &t, NULL), PSIK_EINVAL);
    assert_int_equal(psik_table_build(&m, H_DRY, H_WET, n, NULL, bytes, &t, NULL), PSIK_EINVAL);
    assert_int_equal(psik_table_build(&m, H_DRY, H_WET, n, mem, bytes, NULL, NULL), PSIK_EINVAL);
    assert_int_equal(psik_table_build(&m, H_DRY, H_WET, 1, mem, bytes, &t, NULL), PSIK_EINVAL);
    assert_int_equal(psik_table_build(&m, H_WET, H_DRY, n, mem, bytes, &t, NULL), PSIK_EDOMAIN);
    assert_int_equal(psik_table_build(&m, -INFINITY, H_WET, n, mem, bytes, &t, NULL), PSIK_EDOMAIN);
    assert_int_equal(psik_table_build(&m, H_DRY, 1.0, n, mem, bytes, &t, NULL), PSIK_EDOMAIN);
    assert_int_equal(psik_table_build(&m, H_DRY, H_WET, n, mem, bytes - 1, &t, NULL), PSIK_ENOMEM);
    assert_null(t);
    assert_int_equal(psik_table_knots(H_WET, H_DRY, 0.0), 0);
    assert_int_equal(psik_table_bytes(1), 0);
    psik_table_eval(NULL, -10.0, &st);
    assert_true(isnan(st.theta) && isnan(st.k));
    memset(small, 0, sizeof small);   /* never built: NaN, not a crash */
    psik_table_eval((const psik_table *)small, -10.0, &st);
    assert_true(isnan(st.theta));
    /* an unaligned buffer works (the builder aligns inside it) */
    assert_int_equal(psik_table_build(&m, H_DRY, H_WET, n, (unsigned char *)mem + 1, bytes - 1,
                                      &t, NULL), PSIK_ENOMEM);
    free(mem);
    mem = malloc(bytes + 1);
    assert_non_null(mem);
    assert_int_equal(psik_table_build(&m, H_DRY, H_WET, n, (unsigned char *)mem + 1, bytes,
                                      &t, NULL), PSIK_OK);
    psik_table_eval(t, -100.0, &st);
    assert_true(fabs(st.theta - psik_theta(&m, -100.0)) < 1e-9 * st.theta);
    free(mem);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_default_density_vgm),
        cmocka_unit_test(test_every_kind_bounds),
        cmocka_unit_test(test_derivatives_monotone_batch),
        cmocka_unit_test(test_outside_and_special),
        cmocka_unit_test(test_bad_arguments),
    };
    return cmocka_run_group_tests_name("psik_table", tests, NULL, NULL);
}
