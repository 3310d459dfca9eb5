/* test_fit.c - parameter estimation (lib/fit.c) against SciPy and mpmath.
 *
 * Sources of the expected values:
 * - tests/data/fit_scipy.txt: scipy.optimize.least_squares (method trf,
 *   best of 300 starts) on synthetic van Genuchten-Mualem sets, with
 *   Jacobian-based 95 % intervals (scipy.stats.t.ppf), written by
 *   tests/reference/fit_scipy.py.
 * - tests/data/t_quantile.txt: scipy.stats.t.ppf and mpmath (50 digits).
 * Every check prints what it measured.
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <cmocka.h>

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "psik.h"

#define MAXP 64

typedef struct ref_set {
    char name[64];
    int nt, nk;
    double noise;
    double gen[6];
    double ht[MAXP], th[MAXP], hk[MAXP], kk[MAXP];
    int free[6], nfree;
    double sse, par[6], stderr_[6], half[6], tq;
} ref_set;

static ref_set sets[32];
static int nsets;
static double blo[6], bhi[6];

static const char *data_dir(void)
{
    const char *d = getenv("PSIK_DATA_DIR");
    return d ? d : "tests/data";
}

static int load_sets(void)
{
    char path[512], line[4096];
    FILE *f;
    ref_set *s = NULL;
    snprintf(path, sizeof path, "%s/fit_scipy.txt", data_dir());
    f = fopen(path, "r");
    if (f == NULL) {
        printf("cannot open %s\n", path);
        return -1;
    }
    nsets = 0;
    while (fgets(line, sizeof line, f)) {
        char *tok = strtok(line, " \n"), *q;
        int i;
        if (tok == NULL || tok[0] == '#')
            continue;
        if (strcmp(tok, "bounds") == 0) {
            for (i = 0; i < 6; i++) blo[i] = strtod(strtok(NULL, " \n"), NULL);
            for (i = 0; i < 6; i++) bhi[i] = strtod(strtok(NULL, " \n"), NULL);
        } else if (strcmp(tok, "set") == 0) {
            s = &sets[nsets++];
            memset(s, 0, sizeof *s);
            snprintf(s->name, sizeof s->name, "%s", strtok(NULL, " \n"));
            strtok(NULL, " \n");                       /* kind */
            strtok(NULL, " \n");                       /* nt */
            strtok(NULL, " \n");                       /* nk */
            strtok(NULL, " \n");                       /* "noise" */
            s->noise = strtod(strtok(NULL, " \n"), NULL);
        } else if (s != NULL && strcmp(tok, "gen") == 0) {
            for (i = 0; i < 6; i++) s->gen[i] = strtod(strtok(NULL, " \n"), NULL);
        } else if (s != NULL && strcmp(tok, "theta") == 0) {
            s->ht[s->nt] = strtod(strtok(NULL, " \n"), NULL);
            s->th[s->nt++] = strtod(strtok(NULL, " \n"), NULL);
        } else if (s != NULL && strcmp(tok, "k") == 0) {
            s->hk[s->nk] = strtod(strtok(NULL, " \n"), NULL);
            s->kk[s->nk++] = strtod(strtok(NULL, " \n"), NULL);
        } else if (s != NULL && strcmp(tok, "free") == 0) {
            while ((q = strtok(NULL, " \n")) != NULL)
                s->free[s->nfree++] = atoi(q);
        } else if (s != NULL && strcmp(tok, "sse") == 0) {
            s->sse = strtod(strtok(NULL, " \n"), NULL);
        } else if (s != NULL && strcmp(tok, "par") == 0) {
            for (i = 0; i < 6; i++) s->par[i] = strtod(strtok(NULL, " \n"), NULL);
        } else if (s != NULL && strcmp(tok, "stderr") == 0) {
            for (i = 0; i < s->nfree; i++) s->stderr_[i] = strtod(strtok(NULL, " \n"), NULL);
        } else if (s != NULL && strcmp(tok, "ci_half") == 0) {
            for (i = 0; i < s->nfree; i++) s->half[i] = strtod(strtok(NULL, " \n"), NULL);
        } else if (s != NULL && strcmp(tok, "tq") == 0) {
            s->tq = strtod(strtok(NULL, " \n"), NULL);
        }
    }
    fclose(f);
    return nsets > 0 ? 0 : -1;
}

static void data_of(const ref_set *s, psik_fit_data *d)
{
    memset(d, 0, sizeof *d);
    d->n_theta = (size_t)s->nt;
    d->h_theta = s->ht;
    d->theta = s->th;
    d->n_k = (size_t)s->nk;
    d->h_k = s->hk;
    d->k = s->kk;
}

/* The bounds SciPy used are psik's defaults (else the comparison is void). */
static void test_bounds_match(void **state)
{
    int i;
    (void)state;
    assert_int_equal(load_sets(), 0);
    for (i = 0; i < 6; i++) {
        double lo, hi;
        assert_int_equal(psik_param_range(PSIK_VGM, i, &lo, &hi), PSIK_OK);
        assert_true(lo == blo[i] && hi == bhi[i]);
    }
    printf("# %d SciPy reference sets; bounds equal psik_param_range(PSIK_VGM)\n", nsets);
}

/* SSE no worse than SciPy's best of 300 starts (relative 1e-6), noisy sets;
 * intervals within 1e-3 relative of SciPy's Jacobian-based ones. */
static void test_against_scipy(void **state)
{
    int i, j, n = 0;
    double worst_sse = -INFINITY, worst_ci = 0.0, worst_t = 0.0;
    const char *wsse = "", *wci = "";
    (void)state;
    assert_int_equal(load_sets(), 0);
    for (i = 0; i < nsets; i++) {
        const ref_set *s = &sets[i];
        psik_fit_data d;
        psik_fit_result r;
        char msg[256];
        double rel;
        if (s->noise == 0.0)
            continue;
        data_of(s, &d);
        assert_int_equal(psik_fit(PSIK_VGM, &d, NULL, &r, msg, sizeof msg), PSIK_OK);
        assert_int_equal(r.n_free, s->nfree);
        rel = (r.sse - s->sse) / s->sse;   /* scipy.optimize.least_squares */
        printf("# %-16s SSE psik %.12e SciPy %.12e  (psik - SciPy)/SciPy = %+.2e, %d starts %d iterations\n",
               s->name, r.sse, s->sse, rel, r.starts, r.iterations);
        if (rel > worst_sse) { worst_sse = rel; wsse = s->name; }
        assert_true(rel <= 1e-6);
        /* t quantile used: scipy.stats.t.ppf(0.975, dof) */
        {
            double e = fabs(r.t_value - s->tq) / s->tq;
            if (e > worst_t) worst_t = e;
        }
        for (j = 0; j < s->nfree; j++) {
            int p = s->free[j];
            double half = 0.5 * (r.ci_hi[p] - r.ci_lo[p]);
            double e = fabs(half - s->half[j]) / s->half[j];   /* SciPy Jacobian-based CI */
            if (r.flag[p] & (PSIK_FIT_AT_LOWER | PSIK_FIT_AT_UPPER))
                continue;
            if (e > worst_ci) { worst_ci = e; wci = s->name; }
            assert_true(e <= 1e-3);
            n++;
        }
    }
    printf("# largest (SSE psik - SciPy)/SciPy: %+.3e (%s); largest relative CI half-width "
           "difference: %.3e (%s) over %d intervals; t quantile vs scipy.stats.t.ppf: %.2e\n",
           worst_sse, wsse, worst_ci, wci, n, worst_t);
    assert_true(n > 20);
}

/* Noise-free data recover the generating parameters to 1e-8 relative. */
static void test_exact_recovery(void **state)
{
    int i, j, n = 0;
    double worst = 0.0;
    (void)state;
    assert_int_equal(load_sets(), 0);
    for (i = 0; i < nsets; i++) {
        const ref_set *s = &sets[i];
        psik_fit_data d;
        psik_fit_result r;
        double w = 0.0;
        if (s->noise != 0.0)
            continue;
        data_of(s, &d);
        assert_int_equal(psik_fit(PSIK_VGM, &d, NULL, &r, NULL, 0), PSIK_OK);
        for (j = 0; j < 4; j++) {
            double e = fabs(r.par[j] - s->gen[j]) / fabs(s->gen[j]);
            if (e > w) w = e;
        }
        printf("# %-16s noise-free: largest relative parameter error %.2e, SSE %.2e, stop: %s\n",
               s->name, w, r.sse, psik_fit_stop_name(r.stop));
        if (w > worst) worst = w;
        assert_true(w <= 1e-8);
        n++;
    }
    /* and data made by psik itself, for every texture point with K data too */
    {
        static const double gp[3][6] = {{0.045, 0.43, 0.145, 2.68, 712.8, 0.5},
                                        {0.078, 0.43, 0.036, 1.56, 24.96, 0.5},
                                        {0.095, 0.41, 0.019, 1.31, 6.24, 1.5}};
        double ht[15], th[15], hk[6], kk[6];
        for (i = 0; i < 3; i++) {
            psik_model m;
            psik_fit_data d;
            psik_fit_result r;
            double w = 0.0;
            assert_int_equal(psik_init(&m, PSIK_VGM, gp[i]), PSIK_OK);
            for (j = 0; j < 15; j++) {
                ht[j] = -pow(10.0, -0.5 + 4.7 * j / 14.0);
                th[j] = psik_theta(&m, ht[j]);
            }
            for (j = 0; j < 6; j++) {
                hk[j] = j == 0 ? 0.0 : -pow(10.0, 0.5 * j);
                kk[j] = psik_k(&m, hk[j]);
            }
            memset(&d, 0, sizeof d);
            d.n_theta = 15; d.h_theta = ht; d.theta = th;
            d.n_k = 6; d.h_k = hk; d.k = kk;
            assert_int_equal(psik_fit(PSIK_VGM, &d, NULL, &r, NULL, 0), PSIK_OK);
            for (j = 0; j < 6; j++) {
                double e = fabs(r.par[j] - gp[i][j]) / fabs(gp[i][j]);
                if (e > w) w = e;
            }
            printf("# psik-made set %d with K: largest relative parameter error %.2e (6 free)\n", i, w);
            if (w > worst) worst = w;
            assert_true(w <= 1e-8);
            n++;
        }
    }
    printf("# noise-free recovery: largest relative error %.2e over %d sets\n", worst, n);
}

/* Student t quantile: scipy.stats.t.ppf to 1e-8 (SciPy's own inversion
 * stops near 2e-9 at some points, which mpmath shows) and mpmath to 1e-11. */
static void test_t_quantile(void **state)
{
    char path[512], line[512];
    FILE *f;
    double worst_sp = 0.0, worst_mp = 0.0, wp = 0, wv = 0;
    int n = 0;
    (void)state;
    snprintf(path, sizeof path, "%s/t_quantile.txt", data_dir());
    f = fopen(path, "r");
    assert_non_null(f);
    while (fgets(line, sizeof line, f)) {
        double p, v, sp, mpv, got, e1, e2;
        if (line[0] == '#' || sscanf(line, "%lf %lf %lf %lf", &p, &v, &sp, &mpv) != 4)
            continue;
        got = psik_t_quantile(p, v);
        e1 = fabs(got - sp) / fabs(sp);     /* scipy.stats.t.ppf */
        e2 = fabs(got - mpv) / fabs(mpv);   /* mpmath, 50 digits */
        if (e1 > worst_sp) worst_sp = e1;
        if (e2 > worst_mp) { worst_mp = e2; wp = p; wv = v; }
        n++;
    }
    fclose(f);
    printf("# t quantile, %d points: largest relative difference from scipy.stats.t.ppf %.2e, "
           "from mpmath %.2e (p = %g, dof = %g)\n", n, worst_sp, worst_mp, wp, wv);
    assert_true(n >= 150);
    assert_true(worst_sp <= 1e-8);
    assert_true(worst_mp <= 1e-11);
    assert_true(isnan(psik_t_quantile(0.5, 0.0)));
    assert_true(isnan(psik_t_quantile(1.5, 3.0)));
    assert_true(psik_t_quantile(1.0, 3.0) == INFINITY);
    assert_true(psik_t_quantile(0.0, 3.0) == -INFINITY);
    assert_true(psik_t_quantile(0.5, 7.0) == 0.0);
}

/* The Richardson-extrapolated numerical Jacobian against the analytic one
 * of PSIK_VGM (retention and conductivity rows). */
static void test_jacobian(void **state)
{
    static const double par[6] = {0.078, 0.43, 0.036, 1.56, 24.96, 0.5};
    double ht[12], th[12], hk[6], kk[6], ja[18 * 6], jn[18 * 6], worst = 0.0, scale[6] = {0};
    psik_fit_data d;
    int i, j;
    (void)state;
    for (i = 0; i < 12; i++) { ht[i] = -pow(10.0, -1.0 + 0.5 * i); th[i] = 0.3; }
    for (i = 0; i < 6; i++) { hk[i] = -pow(10.0, 0.6 * i) + 1.0; kk[i] = 1.0; }
    memset(&d, 0, sizeof d);
    d.n_theta = 12; d.h_theta = ht; d.theta = th; d.n_k = 6; d.h_k = hk; d.k = kk;
    assert_int_equal(psik_fit_jacobian(PSIK_VGM, &d, par, 0, ja), PSIK_OK);
    assert_int_equal(psik_fit_jacobian(PSIK_VGM, &d, par, 1, jn), PSIK_OK);
    for (i = 0; i < 18; i++)
        for (j = 0; j < 6; j++)
            if (fabs(ja[i * 6 + j]) > scale[j]) scale[j] = fabs(ja[i * 6 + j]);
    for (i = 0; i < 18; i++)
        for (j = 0; j < 6; j++) {
            double e = fabs(ja[i * 6 + j] - jn[i * 6 + j]) / scale[j];
            if (e > worst) worst = e;
        }
    printf("# numerical (Richardson) vs analytic vgm Jacobian: largest difference %.2e "
           "relative to the column's largest entry\n", worst);
    assert_true(worst < 1e-9);
    assert_int_equal(psik_fit_jacobian(PSIK_VGM, NULL, par, 0, ja), PSIK_EINVAL);
}

/* Every kind of the table fits data from a vG-Mualem loam; nested kinds
 * (a kind that contains vgm as a special case) must reach an SSE no larger
 * than vgm's (a property of nested least squares). */
static void test_every_kind(void **state)
{
    psik_fit_result fits[32];
    size_t order[32], nk = 0;
    double wts[32];
    int kind;
    (void)state;
    assert_int_equal(load_sets(), 0);
    {
        const ref_set *s = NULL;
        int i;
        for (i = 0; i < nsets; i++)
            if (strcmp(sets[i].name, "loam_with_k") == 0) s = &sets[i];
        assert_non_null(s);
        for (kind = 1; kind < 64; kind++) {
            psik_fit_data d;
            char msg[256];
            psik_status st;
            if (psik_kind_name((psik_kind)kind) == NULL)
                continue;
            data_of(s, &d);
            st = psik_fit((psik_kind)kind, &d, NULL, &fits[nk], msg, sizeof msg);
            printf("# %-10s status %d SSE %.6e (theta %.3e, log K %.3e) AICc %8.2f R2 %.5f "
                   "starts %d iterations %d %s\n", psik_kind_name((psik_kind)kind), st,
                   fits[nk].sse, fits[nk].sse_theta, fits[nk].sse_logk, fits[nk].aicc,
                   fits[nk].r2, fits[nk].starts, fits[nk].iterations, msg);
            assert_int_equal(st, PSIK_OK);
            assert_true(isfinite(fits[nk].sse) && fits[nk].r2 > 0.9);
            nk++;
        }
    }
    assert_true(nk >= 4);
    /* vg_free_m and vgm_ae contain vgm (m = 1 - 1/n; h_e = 0). */
    {
        size_t i, ivgm = 0;
        for (i = 0; i < nk; i++)
            if (fits[i].kind == PSIK_VGM) ivgm = i;
        for (i = 0; i < nk; i++)
            if (fits[i].kind == PSIK_VG_FREE_M || fits[i].kind == PSIK_VGM_AE) {
                printf("# nested %s: SSE %.9e <= vgm %.9e\n", psik_kind_name((psik_kind)fits[i].kind),
                       fits[i].sse, fits[ivgm].sse);
                assert_true(fits[i].sse <= fits[ivgm].sse * (1.0 + 1e-9));
            }
    }
    assert_int_equal(psik_fit_rank(fits, nk, order, wts), PSIK_OK);
    {
        size_t i;
        double sum = 0.0;
        for (i = 1; i < nk; i++)
            assert_true(fits[order[i - 1]].aicc <= fits[order[i]].aicc);
        for (i = 0; i < nk; i++) sum += wts[i];
        printf("# ranking by AICc: best %s (weight %.3f); weights sum to %.15f\n",
               psik_kind_name((psik_kind)fits[order[0]].kind), wts[order[0]], sum);
        assert_true(fabs(sum - 1.0) < 1e-12);
    }
    fits[1].n_obs++;
    assert_int_equal(psik_fit_rank(fits, nk, order, NULL), PSIK_EINVAL);
}

/* Held and auto-held parameters, and the note that says so. */
static void test_held(void **state)
{
    psik_fit_data d;
    psik_fit_result r;
    psik_fit_options o;
    const ref_set *s;
    (void)state;
    assert_int_equal(load_sets(), 0);
    s = &sets[2];   /* loam_noisy: no K data */
    data_of(s, &d);
    assert_int_equal(psik_fit(PSIK_VGM, &d, NULL, &r, NULL, 0), PSIK_OK);
    assert_int_equal(r.flag[4], PSIK_FIT_AUTOFIXED);
    assert_int_equal(r.flag[5], PSIK_FIT_AUTOFIXED);
    assert_true(r.par[5] == 0.5);
    assert_non_null(strstr(r.note, "no conductivity data"));
    printf("# auto-held without K data: %s\n", r.note);
    psik_fit_defaults(&o);
    o.fixed[0] = 1;
    o.value[0] = 0.05;
    assert_int_equal(psik_fit(PSIK_VGM, &d, &o, &r, NULL, 0), PSIK_OK);
    assert_true(r.par[0] == 0.05 && r.flag[0] == PSIK_FIT_FIXED && r.n_free == 3);
    assert_true(r.std_err[0] == 0.0);
    /* Only a saturated K point: ks free, l held. */
    {
        double hk[1] = {0.0}, kk[1] = {20.0};
        d.n_k = 1; d.h_k = hk; d.k = kk;
        assert_int_equal(psik_fit(PSIK_VGM, &d, NULL, &r, NULL, 0), PSIK_OK);
        assert_int_equal(r.flag[4] & PSIK_FIT_AUTOFIXED, 0);
        assert_int_equal(r.flag[5], PSIK_FIT_AUTOFIXED);
        assert_true(fabs(r.par[4] - 20.0) < 1e-9 * 20.0);
        printf("# one saturated K point: ks = %.12g (data 20), note: %s\n", r.par[4], r.note);
    }
}

/* Bad data: each case gives PSIK_EDATA (or EINVAL) with a message naming it. */
static void test_bad_data(void **state)
{
    double h[6] = {-1, -10, -100, -1000, -10000, -30}, t[6] = {0.4, 0.35, 0.25, 0.15, 0.1, 0.3};
    double hb[6], tb[6], kk[2] = {10.0, 0.0}, hk[2] = {0.0, -10.0};
    psik_fit_data d;
    psik_fit_result r;
    char msg[256];
    int i;
    (void)state;
#define RESET() do { memcpy(hb, h, sizeof h); memcpy(tb, t, sizeof t); memset(&d, 0, sizeof d); \
        d.n_theta = 6; d.h_theta = hb; d.theta = tb; } while (0)
#define EXPECT(st, text) do { psik_status s_ = psik_fit(PSIK_VGM, &d, NULL, &r, msg, sizeof msg); \
        printf("# %-22s -> %d: %s\n", #text, s_, msg); assert_int_equal(s_, st); \
        assert_non_null(strstr(msg, text)); } while (0)
    RESET(); tb[2] = NAN;            EXPECT(PSIK_EDATA, "point 3");
    RESET(); tb[1] = -0.1;           EXPECT(PSIK_EDATA, "negative");
    RESET(); tb[0] = 40.0;           EXPECT(PSIK_EDATA, "above 1");
    RESET(); hb[4] = INFINITY;       EXPECT(PSIK_EDATA, "h is not a finite");
    RESET(); d.n_theta = 4;          EXPECT(PSIK_EDATA, "need at least 5 points");
    RESET(); for (i = 0; i < 6; i++) hb[i] = -50.0; EXPECT(PSIK_EDATA, "one head");
    RESET(); for (i = 0; i < 6; i++) hb[i] = i < 3 ? -50.0 : -500.0; EXPECT(PSIK_EDATA, "2 distinct heads");
    RESET(); for (i = 0; i < 6; i++) hb[i] = 10.0 * i; EXPECT(PSIK_EDATA, "saturated");
    RESET(); d.n_k = 2; d.h_k = hk; d.k = kk; EXPECT(PSIK_EDATA, "K = 0 must be greater than 0");
    RESET(); d.theta = NULL;         EXPECT(PSIK_EINVAL, "NULL array");
    RESET(); d.n_theta = 0;          EXPECT(PSIK_EDATA, "no retention data");
    assert_int_equal(psik_fit((psik_kind)99, &d, NULL, &r, msg, sizeof msg), PSIK_EINVAL);
    assert_int_equal(psik_fit(PSIK_VGM, NULL, NULL, &r, msg, sizeof msg), PSIK_EINVAL);
    /* Documented behaviour: unsorted, duplicated and positive heads are
     * accepted; order does not change the result. */
    {
        double h2[8] = {-100, -1, 5.0, -1000, -10, -10, -10000, 0.0};
        double t2[8] = {0.25, 0.40, 0.41, 0.15, 0.35, 0.352, 0.10, 0.409};
        double h3[8], t3[8];
        psik_fit_result r2;
        int perm[8] = {7, 3, 0, 6, 1, 5, 2, 4};
        for (i = 0; i < 8; i++) { h3[i] = h2[perm[i]]; t3[i] = t2[perm[i]]; }
        memset(&d, 0, sizeof d);
        d.n_theta = 8; d.h_theta = h2; d.theta = t2;
        assert_int_equal(psik_fit(PSIK_VGM, &d, NULL, &r, msg, sizeof msg), PSIK_OK);
        d.h_theta = h3; d.theta = t3;
        assert_int_equal(psik_fit(PSIK_VGM, &d, NULL, &r2, msg, sizeof msg), PSIK_OK);
        printf("# unsorted/duplicate/positive heads accepted: SSE %.10e, permuted %.10e\n",
               r.sse, r2.sse);
        assert_true(fabs(r.sse - r2.sse) <= 1e-9 * r.sse);
    }
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_bounds_match),
        cmocka_unit_test(test_against_scipy),
        cmocka_unit_test(test_exact_recovery),
        cmocka_unit_test(test_t_quantile),
        cmocka_unit_test(test_jacobian),
        cmocka_unit_test(test_every_kind),
        cmocka_unit_test(test_held),
        cmocka_unit_test(test_bad_data),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
