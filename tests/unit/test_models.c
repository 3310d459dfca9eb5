/* test_models.c - the Brooks-Corey, Kosugi, Durner and Gardner kinds and
 * the texture-class presets: refused inputs and their messages, extreme
 * sweeps, Campbell (1974) as a special case, Gardner's exact steady
 * upward-flux profile, derivatives against differences, inverse round
 * trips and worst cases of the Durner inverse.
 *
 * (Accuracy against the mpmath tables is in test_accuracy.c; the van
 * Genuchten sweeps are in test_sweeps.c.) Every test prints what it
 * measured.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <float.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "psik.h"
#include "refcheck.h"

typedef struct pset {
    psik_kind kind;
    double par[PSIK_MAX_PARAMS];
} pset;

/* Parameter sets spanning the admitted ranges, extremes included. */
static const pset sets[] = {
    {PSIK_BCM, {0.05, 0.45, -20.0, 0.4, 10.0, 0.5}},
    {PSIK_BCM, {0.0, 0.40, -1e-3, 10.0, 1e3, -2.19}},       /* l near -(2 + 2/lambda) */
    {PSIK_BCM, {0.1, 0.30, -1e4, 0.01, 1e-3, 50.0}},
    {PSIK_BCB, {0.02, 0.40, -35.0, 0.25, 5.0}},
    {PSIK_BCB, {0.0, 0.50, -1e-2, 8.0, 1.0}},
    {PSIK_BCB, {0.0, 0.35, -3e3, 0.02, 1e-2}},
    {PSIK_KOSUGI, {0.05, 0.45, -30.0, 1.5, 10.0, 0.5}},
    {PSIK_KOSUGI, {0.0, 0.40, -1e3, 0.05, 1.0, -2.0}},
    {PSIK_KOSUGI, {0.0, 0.40, -1e-3, 8.0, 1.0, 10.0}},
    {PSIK_KOSUGI, {0.1, 0.50, -1e5, 0.3, 1e-4, -1.5}},
    {PSIK_DURNER2, {0.05, 0.45, 0.3, 0.1, 3.0, 0.001, 1.4, 10.0, 0.5}},
    {PSIK_DURNER2, {0.0, 0.50, 0.999, 100.0, 20.0, 1e-5, 1.001, 1.0, -2.0}},
    {PSIK_DURNER2, {0.0, 0.50, 0.5, 1.0, 10.0, 1e-6, 10.0, 1.0, 0.5}},
    {PSIK_DURNER3, {0.0, 0.50, 0.2, 1.0, 6.0, 0.3, 0.01, 2.0, 1e-4, 1.2, 1.0, -1.0}},
    {PSIK_DURNER3, {0.02, 0.45, 0.001, 50.0, 1.05, 0.998, 0.5, 15.0, 1e-5, 3.0, 5.0, 3.0}},
    {PSIK_GARDNER, {0.01, 0.40, 0.02, 5.0}},
    {PSIK_GARDNER, {0.0, 0.45, 1e-5, 1e3}},
    {PSIK_GARDNER, {0.0, 0.45, 100.0, 1e-3}},
};
#define NSETS (sizeof sets / sizeof sets[0])

static void init_set(const pset *p, psik_model *m)
{
    char msg[256];
    psik_status st = psik_check(p->kind, p->par, msg, sizeof msg);
    if (st != PSIK_OK)
        printf("# unexpected refusal of a %s set: %s\n", psik_kind_name(p->kind), msg);
    assert_int_equal(st, PSIK_OK);
    assert_int_equal(psik_init(m, p->kind, p->par), PSIK_OK);
}

/* ------------------------------------------------------------ refused */

typedef struct bad {
    psik_kind kind;
    double par[PSIK_MAX_PARAMS];
    const char *expect;      /* part of the message */
} bad;

/* The rules of DESIGN.md and the brief: heads are pressure heads,
 * lambda, sigma, alpha_i > 0, n_i > 1, weights in (0,1) with a positive
 * last weight, l above the bound that keeps dK/dh >= 0. */
static const bad bads[] = {
    {PSIK_BCM, {0.05, 0.45, 20.0, 0.4, 10.0, 0.5}, "h_b must be negative: it is a pressure head"},
    {PSIK_BCM, {0.05, 0.45, 0.0, 0.4, 10.0, 0.5}, "h_b must be negative: it is a pressure head"},
    {PSIK_BCM, {0.05, 0.45, -20.0, 0.0, 10.0, 0.5}, "lambda must be greater than 0"},
    {PSIK_BCM, {0.05, 0.45, -20.0, -1.0, 10.0, 0.5}, "lambda must be greater than 0"},
    {PSIK_BCM, {0.05, 0.45, -20.0, 0.5, 10.0, -6.0}, "l must be greater than -(2 + 2/lambda) = -6"},
    {PSIK_BCM, {0.05, 0.45, -20.0, 0.5, 0.0, 0.5}, "ks must be greater than 0"},
    {PSIK_BCM, {0.45, 0.45, -20.0, 0.5, 1.0, 0.5}, "theta_r must be less than theta_s"},
    {PSIK_BCM, {0.05, 0.45, NAN, 0.5, 1.0, 0.5}, "h_b must be a finite number"},
    {PSIK_BCB, {0.05, 0.45, 1e-300, 0.4, 10.0}, "h_b must be negative: it is a pressure head"},
    {PSIK_BCB, {0.05, 0.45, -20.0, -0.0, 10.0}, "lambda must be greater than 0"},
    {PSIK_BCB, {0.05, 1.2, -20.0, 0.3, 10.0}, "theta_s must be at most 1"},
    {PSIK_KOSUGI, {0.05, 0.45, 30.0, 1.5, 10.0, 0.5}, "h_m must be negative: it is a pressure head"},
    {PSIK_KOSUGI, {0.05, 0.45, -30.0, 0.0, 10.0, 0.5}, "sigma must be greater than 0"},
    {PSIK_KOSUGI, {0.05, 0.45, -30.0, 1.0, 10.0, -2.5}, "l must be at least -2"},
    {PSIK_KOSUGI, {0.05, 0.45, -30.0, INFINITY, 10.0, 0.5}, "sigma must be a finite number"},
    {PSIK_DURNER2, {0.0, 0.5, 0.0, 0.1, 3.0, 0.001, 1.4, 10.0, 0.5}, "w1 must be between 0 and 1"},
    {PSIK_DURNER2, {0.0, 0.5, 1.0, 0.1, 3.0, 0.001, 1.4, 10.0, 0.5}, "w1 must be between 0 and 1"},
    {PSIK_DURNER2, {0.0, 0.5, 0.3, 0.0, 3.0, 0.001, 1.4, 10.0, 0.5}, "alpha1 must be greater than 0"},
    {PSIK_DURNER2, {0.0, 0.5, 0.3, 0.1, 3.0, -0.001, 1.4, 10.0, 0.5}, "alpha2 must be greater than 0"},
    {PSIK_DURNER2, {0.0, 0.5, 0.3, 0.1, 1.0, 0.001, 1.4, 10.0, 0.5}, "n1 must be greater than 1"},
    {PSIK_DURNER2, {0.0, 0.5, 0.3, 0.1, 3.0, 0.001, 0.9, 10.0, 0.5}, "n2 must be greater than 1"},
    {PSIK_DURNER2, {0.0, 0.5, 0.3, 0.1, 3.0, 0.001, 1.4, 10.0, -2.01}, "l must be at least -2"},
    {PSIK_DURNER3, {0.0, 0.5, 0.6, 1.0, 6.0, 0.4, 0.01, 2.0, 1e-4, 1.2, 1.0, 0.5},
     "w1 + w2 must be less than 1"},
    {PSIK_DURNER3, {0.0, 0.5, 0.6, 1.0, 6.0, 0.0, 0.01, 2.0, 1e-4, 1.2, 1.0, 0.5},
     "w2 must be between 0 and 1"},
    {PSIK_DURNER3, {0.0, 0.5, 0.2, 1.0, 6.0, 0.3, 0.01, 2.0, 0.0, 1.2, 1.0, 0.5},
     "alpha3 must be greater than 0"},
    {PSIK_DURNER3, {0.0, 0.5, 0.2, 1.0, 6.0, 0.3, 0.01, 2.0, 1e-4, 1.0, 1.0, 0.5},
     "n3 must be greater than 1"},
    {PSIK_GARDNER, {0.0, 0.5, 0.0, 1.0}, "alpha must be greater than 0"},
    {PSIK_GARDNER, {0.0, 0.5, -0.1, 1.0}, "alpha must be greater than 0"},
    {PSIK_GARDNER, {0.0, 0.5, 0.1, -1.0}, "ks must be greater than 0"},
};

static void test_refused(void **state)
{
    size_t i;
    (void)state;
    for (i = 0; i < sizeof bads / sizeof bads[0]; i++) {
        char msg[256];
        psik_model m;
        psik_status st = psik_check(bads[i].kind, bads[i].par, msg, sizeof msg);
        printf("# %-8s refused: %s\n", psik_kind_name(bads[i].kind), msg);
        assert_int_equal(st, PSIK_EDOMAIN);
        if (strstr(msg, bads[i].expect) == NULL) {
            printf("# expected the message to contain \"%s\"\n", bads[i].expect);
            fail();
        }
        memset(&m, 0x5a, sizeof m);
        assert_int_equal(psik_init(&m, bads[i].kind, bads[i].par), PSIK_EDOMAIN);
        assert_int_equal(m.kind, 0);
        assert_true(isnan(psik_theta(&m, -1.0)));
    }
    /* NULL vector and a short buffer: still a NUL-terminated message */
    {
        char tiny[8];
        assert_int_equal(psik_check(PSIK_KOSUGI, NULL, tiny, sizeof tiny), PSIK_EINVAL);
        assert_true(strlen(tiny) < sizeof tiny);
    }
    printf("# %zu refused parameter vectors, each with its message\n",
           sizeof bads / sizeof bads[0]);
}

/* The kinds table: names, counts, parameter names in DESIGN.md order. */
static void test_table(void **state)
{
    static const struct { psik_kind k; const char *name; const char *pars; } t[] = {
        {PSIK_BCM, "bcm", "theta_r theta_s h_b lambda ks l"},
        {PSIK_BCB, "bcb", "theta_r theta_s h_b lambda ks"},
        {PSIK_KOSUGI, "kosugi", "theta_r theta_s h_m sigma ks l"},
        {PSIK_DURNER2, "durner2", "theta_r theta_s w1 alpha1 n1 alpha2 n2 ks l"},
        {PSIK_DURNER3, "durner3", "theta_r theta_s w1 alpha1 n1 w2 alpha2 n2 alpha3 n3 ks l"},
        {PSIK_GARDNER, "gardner", "theta_r theta_s alpha ks"},
    };
    size_t i;
    (void)state;
    for (i = 0; i < sizeof t / sizeof t[0]; i++) {
        char buf[256] = "";
        int j, n = psik_param_count(t[i].k);
        assert_string_equal(psik_kind_name(t[i].k), t[i].name);
        assert_int_equal(psik_kind_from_name(t[i].name), t[i].k);
        assert_non_null(psik_kind_title(t[i].k));
        for (j = 0; j < n; j++) {
            double lo, hi;
            if (j) strcat(buf, " ");
            strcat(buf, psik_param_name(t[i].k, j));
            assert_int_equal(psik_param_index(t[i].k, psik_param_name(t[i].k, j)), j);
            assert_int_equal(psik_param_range(t[i].k, j, &lo, &hi), PSIK_OK);
            assert_true(lo < hi);
        }
        assert_string_equal(buf, t[i].pars);
        printf("# %-8s %2d parameters: %s\n", t[i].name, n, buf);
    }
}

/* ------------------------------------------------------------- sweeps */

static int n_sweep_points;

/* Batch against the one-point functions: bit for bit where they share a
 * kernel's code, within 1e-14 relative (absolutely below 1e-300) for the
 * kinds whose one-point code is their own (lib/point_vg.c,
 * lib/point_gardner.c), the bound for the vectorised path. */
static int own_point(psik_kind kind)
{
    return kind == PSIK_VGM || kind == PSIK_VGM_AE || kind == PSIK_VGB || kind == PSIK_GARDNER;
}

static int batch_agrees(psik_kind kind, double b, double s)
{
    if (b == s)
        return 1;
    if (!own_point(kind))
        return 0;
    return fabs(b - s) <= 1e-14 * fmax(fabs(b), fabs(s)) || fabs(b - s) < 1e-300;
}

static void sweep_one(const psik_model *m, double h, double *prev_se, double *prev_k)
{
    psik_state st;
    double se = psik_se(m, h), th = psik_theta(m, h), kr = psik_kr(m, h), k = psik_k(m, h);
    double c = psik_capacity(m, h), dk = psik_dk_dh(m, h);
    double th_b, k_b, c_b, dk_b;
    n_sweep_points++;
    assert_true(se >= 0.0 && se <= 1.0);
    assert_true(th >= m->theta_r && th <= m->theta_s);
    assert_true(kr >= 0.0 && kr <= 1.0);
    assert_true(k >= 0.0 && k <= m->ks);
    assert_true(c >= 0.0 && isfinite(c));
    assert_true(dk >= 0.0 && isfinite(dk));
    /* monotone in h (the grid is increasing) */
    assert_true(se >= *prev_se);
    assert_true(k >= *prev_k);
    *prev_se = se;
    *prev_k = k;
    /* psik_eval and the batch path give the same values */
    psik_eval(m, h, &st);
    assert_true(st.se == se && st.theta == th && st.kr == kr && st.k == k);
    assert_true(st.capacity == c && st.dk_dh == dk);
    psik_eval_batch(m, 1, &h, &th_b, &k_b, &c_b, &dk_b);
    assert_true(batch_agrees(m->kind, th_b, th) && batch_agrees(m->kind, k_b, k));
    assert_true(batch_agrees(m->kind, c_b, c) && batch_agrees(m->kind, dk_b, dk));
}

/* |h| from 1e-300 to 1e300 (and subnormal), +-0, +-inf, NaN: finite, in
 * range, monotone (DESIGN.md semantics). */
static void test_sweeps(void **state)
{
    size_t i;
    (void)state;
    for (i = 0; i < NSETS; i++) {
        psik_model m;
        double prev_se = 0.0, prev_k = 0.0, e, prev_h = -INFINITY, se;
        int j;
        init_set(&sets[i], &m);
        sweep_one(&m, -INFINITY, &prev_se, &prev_k);
        assert_true(psik_se(&m, -INFINITY) == 0.0 && psik_k(&m, -INFINITY) == 0.0);
        assert_true(psik_theta(&m, -INFINITY) == m.theta_r);
        for (e = 300.0; e >= -300.0; e -= 0.0625)
            sweep_one(&m, -pow(10.0, e), &prev_se, &prev_k);
        sweep_one(&m, -4.9406564584124654e-324, &prev_se, &prev_k);
        sweep_one(&m, -0.0, &prev_se, &prev_k);
        sweep_one(&m, 0.0, &prev_se, &prev_k);
        sweep_one(&m, 4.9406564584124654e-324, &prev_se, &prev_k);
        sweep_one(&m, 1e300, &prev_se, &prev_k);
        sweep_one(&m, INFINITY, &prev_se, &prev_k);
        assert_true(psik_se(&m, 0.0) == 1.0 && psik_k(&m, -0.0) == m.ks);
        assert_true(psik_capacity(&m, 0.0) == 0.0 && psik_dk_dh(&m, 0.0) == 0.0);
        assert_true(isnan(psik_se(&m, NAN)) && isnan(psik_theta(&m, NAN)));
        assert_true(isnan(psik_k(&m, NAN)) && isnan(psik_capacity(&m, NAN)));
        assert_true(isnan(psik_dk_dh(&m, NAN)) && isnan(psik_head(&m, NAN)));
        assert_true(isnan(psik_k_theta(&m, NAN)) && isnan(psik_diffusivity(&m, NAN)));
        /* inverse: monotone in Se, at most the saturation head, exact ends */
        assert_true(psik_head_se(&m, 1.0) == 0.0);
        assert_true(psik_head_se(&m, 0.0) == -INFINITY);
        assert_true(psik_head(&m, m.theta_s) == 0.0);
        assert_true(psik_head(&m, m.theta_r) == -INFINITY);
        for (j = 0; j <= 4000; j++) {
            double h, t = (double)j / 4000.0;
            /* Se from 1e-300 through 1/2 to 1 - 1e-16, both ends densely */
            se = t < 0.5 ? pow(10.0, -300.0 * (1.0 - 2.0 * t)) * 0.5
                         : 1.0 - 0.5 * pow(10.0, -16.0 * (2.0 * t - 1.0));
            if (!(se < 1.0))
                continue;   /* rounds to 1: head 0 by contract */
            h = psik_head_se(&m, se);
            assert_false(isnan(h));
            assert_true(h <= m.h_sat);
            assert_true(h >= prev_h);
            prev_h = h;
            assert_true(psik_k_theta(&m, m.theta_r + (m.theta_s - m.theta_r) * se) >= 0.0);
            assert_true(psik_diffusivity(&m, m.theta_r + (m.theta_s - m.theta_r) * se) >= 0.0);
        }
    }
    printf("# sweeps: %zu parameter sets, %d heads each checked (finite, in range, "
           "monotone, eval = single functions, batch equal or within 1e-14), inverse monotone "
           "over 4001 Se\n",
           NSETS, n_sweep_points / (int)NSETS);
}

/* -------------------------------------------------- derivatives, inverse */

/* C and dK/dh against a fourth-order central difference of theta and K
 * in ln s (Richardson, step 1e-3 relative): agreement to 1e-8 where the
 * functions are smooth and not underflowed. The reference is the
 * difference quotient, independent of the analytic formulas. */
static void test_derivatives(void **state)
{
    size_t i;
    double worst_c = 0.0, worst_k = 0.0;
    (void)state;
    for (i = 0; i < NSETS; i++) {
        psik_model m;
        double e;
        init_set(&sets[i], &m);
        for (e = -2.0; e <= 6.0; e += 0.25) {
            double s = pow(10.0, e), d, h = -s, kap;
            double f[4], g[4], dc, dk;
            int j;
            static const double off[4] = {-2.0, -1.0, 1.0, 2.0};
            if (h >= m.h_sat * (1.0 + 4e-3) || psik_se(&m, h) < 1e-250 ||
                psik_se(&m, h) > 1.0 - 1e-6)
                continue;
            /* step: 1e-3 in ln s, smaller where K or theta varies fast
             * (kappa = |d ln K / d ln s|), so the O(d^4) term stays small */
            kap = fabs(s * psik_dk_dh(&m, h) / psik_k(&m, h));
            d = 1e-3 / (kap > 1.0 ? kap : 1.0);
            for (j = 0; j < 4; j++) {
                double hh = -s * exp(off[j] * d);
                f[j] = psik_theta(&m, hh);
                g[j] = psik_k(&m, hh);
            }
            /* d/dln s with O(d^4) error; dh = -s dln s */
            dc = (f[0] - 8.0 * f[1] + 8.0 * f[2] - f[3]) / (12.0 * d) / (-s);
            dk = (g[0] - 8.0 * g[1] + 8.0 * g[2] - g[3]) / (12.0 * d) / (-s);
            {
                double c = psik_capacity(&m, h), k = psik_dk_dh(&m, h);
                double ec = fabs(c - dc) / (fabs(dc) + 1e-300);
                double ek = fabs(k - dk) / (fabs(dk) + 1e-300);
                /* skip where the difference quotient itself has no digits */
                if (fabs(dc) * s > 1e-4 * (m.theta_s - m.theta_r) && ec > worst_c)
                    worst_c = ec;
                if (fabs(dk) * s > 1e-4 * psik_k(&m, h) && psik_k(&m, h) > 1e-250 &&
                    ek > worst_k)
                    worst_k = ek;
            }
        }
    }
    printf("# derivatives vs 4th-order differences: max rel. difference C %.3g, dK/dh %.3g\n",
           worst_c, worst_k);
    assert_true(worst_c < 1e-7);
    assert_true(worst_k < 1e-7);
}

/* head(theta(h)) = h and k_theta(theta(h)) = K(h), measured in ulp over
 * max(1, kappa): kappa of the round trip is the conditioning of theta
 * (theta/(h C)) because theta is rounded once in between. */
static void test_round_trip(void **state)
{
    size_t i;
    double worst = 0.0, worst_k = 0.0;
    (void)state;
    for (i = 0; i < NSETS; i++) {
        psik_model m;
        double e;
        init_set(&sets[i], &m);
        for (e = -2.0; e <= 7.0; e += 0.125) {
            double h = -pow(10.0, e), se = psik_se(&m, h), c, hb, cond, u;
            if (h >= m.h_sat || se <= 1e-300 || se >= 1.0)
                continue;
            c = psik_capacity(&m, h) / (m.theta_s - m.theta_r);   /* dSe/dh */
            if (!(c > 0.0))
                continue;
            hb = psik_head_se(&m, se);
            cond = fabs(se / (h * c));
            if (cond > 1e12)
                continue;   /* flat: any head on the plateau is as good (see
                               test_durner_inverse for the backward error) */
            u = rc_ulps(hb, h) / (cond > 1.0 ? cond : 1.0);
            if (u > worst)
                worst = u;
            u = rc_ulps(psik_k_theta(&m, m.theta_r + (m.theta_s - m.theta_r) * se), psik_k(&m, h));
            /* Kr changes by (dlnK/dlnSe) x (rounding of theta) */
            {
                double kk = psik_k(&m, h), dk = psik_dk_dh(&m, h);
                double ck = kk > 0.0 ? fabs(dk * se / (c * kk)) : 0.0;
                double th = m.theta_r + (m.theta_s - m.theta_r) * se;
                double ct = th / (se * (m.theta_s - m.theta_r));   /* theta rounding -> Se */
                ck *= ct;
                u /= (ck > 1.0 ? ck : 1.0);
                /* only where theta still carries Se to 1e-13 */
                if (kk > 1e-300 && ct < 1e3 && u > worst_k)
                    worst_k = u;
            }
        }
    }
    printf("# round trip head_se(se(h)): max %.3f ulp/max(1,cond); k_theta(theta(h)) vs k(h): "
           "max %.3f ulp/max(1,cond)\n", worst, worst_k);
    assert_true(worst <= 8.0);
    assert_true(worst_k <= 16.0);
}

/* Durner inverse, worst cases constructed on purpose: a plateau of five
 * decades between two steep modes (Se ~ w1 barely changes), modes with
 * n near 1, a tiny weight, three modes, targets at the wet end
 * (1 - 1e-16) and far dry end (1e-300), and targets on the plateau.
 * Checked: the answer is finite, reproduces the target (backward error
 * within 8 ulp of Se, or within what one ulp of s changes Se by where
 * the curve is steep), and the inverse is monotone. */
static void test_durner_inverse(void **state)
{
    static const pset hard[] = {
        {PSIK_DURNER2, {0.0, 0.5, 0.5, 1.0, 10.0, 1e-6, 10.0, 1.0, 0.5}},
        {PSIK_DURNER2, {0.0, 0.5, 0.5, 1.0, 20.0, 1e-8, 20.0, 1.0, 0.5}},
        {PSIK_DURNER2, {0.0, 0.5, 0.999, 100.0, 20.0, 1e-5, 1.001, 1.0, 0.5}},
        {PSIK_DURNER2, {0.0, 0.5, 1e-6, 1.0, 1.002, 1e-3, 8.0, 1.0, 0.5}},
        {PSIK_DURNER2, {0.0, 0.5, 0.3, 0.1, 3.0, 0.1, 3.0, 1.0, 0.5}},   /* equal modes */
        {PSIK_DURNER3, {0.0, 0.5, 0.3, 10.0, 12.0, 0.3, 1e-3, 12.0, 1e-7, 12.0, 1.0, 0.5}},
        {PSIK_DURNER3, {0.02, 0.45, 0.001, 50.0, 1.05, 0.998, 0.5, 15.0, 1e-5, 3.0, 5.0, 3.0}},
    };
    size_t i;
    double worst = 0.0;
    int count = 0;
    (void)state;
    for (i = 0; i < sizeof hard / sizeof hard[0]; i++) {
        psik_model m;
        double prev = -INFINITY, w1 = hard[i].par[2];
        int j;
        init_set(&hard[i], &m);
        for (j = 0; j <= 3000; j++) {
            double t = (double)j / 3000.0, se, h, back, c, slack, err;
            if (j < 1000)
                se = pow(10.0, -300.0 + 300.0 * t * 3.0) * 0.999;        /* 1e-300 .. 1 */
            else if (j < 2000)
                se = w1 * (1.0 + (t * 3.0 - 1.5) * 1e-6);                 /* the plateau */
            else
                se = 1.0 - pow(10.0, -16.0 * (t * 3.0 - 2.0)) * 0.999;    /* wet end */
            if (!(se > 0.0 && se < 1.0))
                continue;
            h = psik_head_se(&m, se);
            assert_false(isnan(h));
            if (!isfinite(h))
                continue;       /* beyond the largest double (far dry end) */
            back = psik_se(&m, h);
            /* unit: ulp(Se) (1 + kappa), kappa = |h dSe/dh / Se| the
             * condition number of Se: one ulp of h moves Se by kappa ulp,
             * and evaluating Se at h carries that much rounding too */
            c = psik_capacity(&m, h) / (m.theta_s - m.theta_r);
            slack = fabs(h) * c / se;
            if (!(c > DBL_MIN))     /* C underflows at the far dry end: difference */
                slack = fabs(log(psik_se(&m, h * (1.0 + 1e-7)) / back)) * 1e7;
            err = rc_ulps(back, se) / (1.0 + slack);
            if (err > worst)
                worst = err;
            count++;
        }
        /* monotone over a fine grid through the plateau */
        for (j = 0; j <= 2000; j++) {
            double se = (double)j / 2000.0 * 0.998 + 0.001, h = psik_head_se(&m, se);
            assert_true(h >= prev);
            prev = h;
        }
    }
    printf("# durner inverse: %d targets on %zu hard curves, max backward error %.3f "
           "ulp(Se) x (1 + kappa)\n", count,
           sizeof hard / sizeof hard[0], worst);
    assert_true(worst <= 8.0);
}

/* ----------------------------------------------------- Campbell (1974) */

/* Campbell (1974): psi = psi_e (theta/theta_s)^-b, K = ks (theta/theta_s)^(2b+3),
 * the Brooks-Corey-Burdine kind with theta_r = 0, lambda = 1/b, h_b = psi_e.
 * Reference: those two formulas in long double. */
static void test_campbell(void **state)
{
    static const double bs[] = {2.0, 4.5, 7.75, 11.25};   /* sand .. clay-like (common practice) */
    size_t i;
    double worst_k = 0.0, worst_h = 0.0, worst_kt = 0.0;
    (void)state;
    for (i = 0; i < sizeof bs / sizeof bs[0]; i++) {
        double b = bs[i], par[5] = {0.0, 0.45, -15.0, 1.0 / b, 30.0};
        psik_model m;
        double e;
        assert_int_equal(psik_init(&m, PSIK_BCB, par), PSIK_OK);
        for (e = 1.2; e <= 6.0; e += 0.05) {
            double h = -pow(10.0, e), th = psik_theta(&m, h);
            long double r = (long double)th / 0.45L;
            long double kc = 30.0L * powl(r, 2.0L * (long double)b + 3.0L);
            long double hc = -15.0L * powl(r, -(long double)b);
            /* K(h) vs Campbell's K(theta(h)): theta's rounding scaled by 2b+3 */
            double u = rc_ulps(psik_k(&m, h), (double)kc) / (2.0 * b + 3.0);
            if (u > worst_k) worst_k = u;
            u = rc_ulps(psik_head(&m, th), (double)hc) / (b > 1.0 ? b : 1.0);
            if (u > worst_h) worst_h = u;
            u = rc_ulps(psik_k_theta(&m, th), (double)kc) / (2.0 * b + 3.0);
            if (u > worst_kt) worst_kt = u;
        }
    }
    printf("# Campbell (1974) as bcb with theta_r = 0: K(h) max %.3f, head(theta) max %.3f, "
           "k_theta max %.3f ulp/cond\n", worst_k, worst_h, worst_kt);
    assert_true(worst_k <= 4.0);
    assert_true(worst_h <= 4.0);
    assert_true(worst_kt <= 4.0);
}

/* ---------------------------------------- Gardner steady upward flux */

/* Steady upward flux q (evaporation) from a water table at z = 0, z up:
 * Darcy q = -K (dh/dz + 1) gives dz/dh = -K/(K + q), so
 * z(h) = int_h^0 K(h')/(K(h') + q) dh'. With K = ks exp(alpha h) the
 * integral is exact (Gardner 1958):
 * exp(alpha h) = (1 + q/ks) exp(-alpha z) - q/ks, i.e.
 * z = -(1/alpha) ln((exp(alpha h) + q/ks) / (1 + q/ks)).
 * Here the integral is computed with psik_k by composite 8-point
 * Gauss-Legendre quadrature (600 panels; abscissae and weights to 20
 * digits, from memory of the standard table, and checked by integrating
 * x^14 exactly below) and compared with the closed form: a check of K
 * over the whole profile, not of a solver. */
static const double gl_x[4] = {0.18343464249564980494, 0.52553240991632898582,
                               0.79666647741362673959, 0.96028985649753623168};
static const double gl_w[4] = {0.36268378337836198297, 0.31370664587788728734,
                               0.22238103445337447054, 0.10122853629037625915};

static double gl_integrate(double (*f)(double, const void *), const void *ctx,
                           double a, double b, int panels)
{
    double sum = 0.0, hw = (b - a) / (2.0 * panels);
    int p, j;
    for (p = 0; p < panels; p++) {
        double mid = a + (2.0 * p + 1.0) * hw, s = 0.0;
        for (j = 0; j < 4; j++)
            s += gl_w[j] * (f(mid - hw * gl_x[j], ctx) + f(mid + hw * gl_x[j], ctx));
        sum += s * hw;
    }
    return sum;
}

typedef struct flux_ctx { const psik_model *m; double q; } flux_ctx;

static double flux_integrand(double h, const void *ctx)
{
    const flux_ctx *c = (const flux_ctx *)ctx;
    double k = psik_k(c->m, h);
    return k / (k + c->q);
}

static double pow14(double x, const void *ctx)
{
    (void)ctx;
    return pow(x, 14.0);
}

static void test_gardner_flux(void **state)
{
    static const double alphas[] = {0.005, 0.05, 0.8};
    static const double qs[] = {0.01, 0.3, 5.0};
    size_t i, j;
    double worst = 0.0;
    (void)state;
    /* the rule integrates x^14 on [0,1] to 1/15 exactly (degree 15) */
    assert_true(fabs(gl_integrate(pow14, NULL, 0.0, 1.0, 1) - 1.0 / 15.0) < 1e-15);
    for (i = 0; i < 3; i++)
        for (j = 0; j < 3; j++) {
            double par[4] = {0.02, 0.42, alphas[i], 8.0}, e;
            psik_model m;
            flux_ctx c;
            assert_int_equal(psik_init(&m, PSIK_GARDNER, par), PSIK_OK);
            c.m = &m;
            c.q = qs[j];
            for (e = -1.0; e <= 2.5; e += 0.5) {
                double h = -pow(10.0, e) / alphas[i] * 0.1;   /* alpha |h| 0.01 .. 31 */
                double qk = qs[j] / 8.0;
                double z_exact = -log((exp(alphas[i] * h) + qk) / (1.0 + qk)) / alphas[i];
                double z_num = gl_integrate(flux_integrand, &c, h, 0.0, 600);
                double rel = fabs(z_num - z_exact) / z_exact;
                if (rel > worst)
                    worst = rel;
            }
        }
    printf("# Gardner steady upward flux: z(h) by quadrature of psik_k vs exact profile, "
           "max rel. difference %.3g\n", worst);
    assert_true(worst < 1e-12);
}

/* ------------------------------------------------------------ presets */

/* Carsel & Parrish (1988) class means (from memory, MODELS.md); -330 cm
 * and -15000 cm are the field-capacity and wilting-point heads (common
 * practice). A preset must initialise, give theta between theta_r and
 * theta_s at both heads, and sand must hold less water than clay there. */
static void test_presets(void **state)
{
    int i;
    psik_model m, sand, clay;
    (void)state;
    for (i = 0; psik_preset_name(i) != NULL; i++) {
        const char *name = psik_preset_name(i);
        double fc, wp;
        assert_int_equal(psik_preset(&m, name), PSIK_OK);
        assert_int_equal(m.kind, PSIK_VGM);
        assert_true(m.par[5] == 0.5);
        fc = psik_theta(&m, -330.0);
        wp = psik_theta(&m, -15000.0);
        printf("# preset %-16s theta(-330 cm) = %.4f  theta(-15000 cm) = %.4f  ks = %g cm/day\n",
               name, fc, wp, m.ks);
        assert_true(fc > m.theta_r && fc < m.theta_s);
        assert_true(wp > m.theta_r && wp < m.theta_s);
        assert_true(wp < fc);
    }
    assert_int_equal(i, 12);
    assert_null(psik_preset_name(-1));
    assert_int_equal(psik_preset(&sand, "sand"), PSIK_OK);
    assert_int_equal(psik_preset(&clay, "clay"), PSIK_OK);
    assert_true(psik_theta(&sand, -330.0) < psik_theta(&clay, -330.0));
    assert_true(psik_theta(&sand, -15000.0) < psik_theta(&clay, -15000.0));
    /* the table values themselves (MODELS.md): loam */
    assert_int_equal(psik_preset(&m, "Silty_Clay-loam"), PSIK_OK);
    assert_true(m.par[2] == 0.010 && m.par[3] == 1.23 && m.ks == 1.68);
    assert_int_equal(psik_preset(&m, "loam"), PSIK_OK);
    assert_true(m.theta_r == 0.078 && m.theta_s == 0.43 && m.par[2] == 0.036 &&
                m.par[3] == 1.56 && m.ks == 24.96);
    /* refused: unknown, NULL */
    assert_int_equal(psik_preset(&m, "loamy clay"), PSIK_EINVAL);
    assert_int_equal(m.kind, 0);
    assert_int_equal(psik_preset(&m, NULL), PSIK_EINVAL);
    assert_int_equal(psik_preset(NULL, "sand"), PSIK_EINVAL);
    assert_int_equal(psik_preset(&m, "sand "), PSIK_EINVAL);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_table),
        cmocka_unit_test(test_refused),
        cmocka_unit_test(test_sweeps),
        cmocka_unit_test(test_derivatives),
        cmocka_unit_test(test_round_trip),
        cmocka_unit_test(test_durner_inverse),
        cmocka_unit_test(test_campbell),
        cmocka_unit_test(test_gardner_flux),
        cmocka_unit_test(test_presets),
    };
    return cmocka_run_group_tests_name("Brooks-Corey, Kosugi, Durner, Gardner, presets",
                                       tests, NULL, NULL);
}
