/* test_api.c - the API contract of DESIGN.md: status strings, the kinds
 * table, validation with its messages, NULL handling, batch semantics. */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "psik.h"

static void test_strings(void **state)
{
    int s;
    (void)state;
    for (s = PSIK_OK; s <= PSIK_EABI; s++) {
        const char *t = psik_strerror((psik_status)s);
        assert_non_null(t);
        assert_true(strlen(t) > 5);
    }
    assert_string_equal(psik_strerror((psik_status)999), "unknown status code");
    assert_string_equal(psik_version(), PSIK_VERSION);
}

static void test_kind_names(void **state)
{
    /* The short names are fixed by DESIGN.md. */
    static const struct { psik_kind k; const char *name; int npar; } known[] = {
        {PSIK_VGM, "vgm", 6}, {PSIK_VGM_AE, "vgm_ae", 7},
        {PSIK_VG_FREE_M, "vg_free_m", 7}, {PSIK_VGB, "vgb", 5},
    };
    size_t i;
    (void)state;
    for (i = 0; i < sizeof known / sizeof known[0]; i++) {
        assert_string_equal(psik_kind_name(known[i].k), known[i].name);
        assert_int_equal(psik_kind_from_name(known[i].name), known[i].k);
        assert_int_equal(psik_param_count(known[i].k), known[i].npar);
        assert_non_null(psik_kind_title(known[i].k));
        assert_string_equal(psik_param_name(known[i].k, 0), "theta_r");
        assert_string_equal(psik_param_name(known[i].k, 1), "theta_s");
        assert_null(psik_param_name(known[i].k, known[i].npar));
        assert_null(psik_param_name(known[i].k, -1));
    }
    assert_int_equal(psik_kind_from_name("VGM"), 0);
    assert_int_equal(psik_kind_from_name(""), 0);
    assert_int_equal(psik_kind_from_name(NULL), 0);
    assert_null(psik_kind_name((psik_kind)0));
    assert_null(psik_kind_name((psik_kind)1000));
    assert_int_equal(psik_param_count((psik_kind)-3), -1);
    /* parameter order of DESIGN.md */
    assert_string_equal(psik_param_name(PSIK_VGM, 2), "alpha");
    assert_string_equal(psik_param_name(PSIK_VGM, 5), "l");
    assert_string_equal(psik_param_name(PSIK_VGM_AE, 6), "h_e");
    assert_string_equal(psik_param_name(PSIK_VG_FREE_M, 4), "m");
    assert_int_equal(psik_param_index(PSIK_VG_FREE_M, "ks"), 5);
    assert_int_equal(psik_param_index(PSIK_VGB, "l"), -1);
    assert_int_equal(psik_param_index(PSIK_VGB, NULL), -1);
    {
        double lo, hi;
        assert_int_equal(psik_param_range(PSIK_VGM, 3, &lo, &hi), PSIK_OK);
        assert_true(lo > 1.0 && hi > lo);
        assert_int_equal(psik_param_range(PSIK_VGM, 6, &lo, &hi), PSIK_EINVAL);
        assert_int_equal(psik_param_range(PSIK_VGM, 0, NULL, &hi), PSIK_EINVAL);
    }
}

/* One refused vector: status, and the message names the parameter and rule. */
static void refuse(psik_kind k, const double *par, psik_status want, const char *words)
{
    char msg[160];
    psik_model m;
    psik_status st = psik_check(k, par, msg, sizeof msg);
    printf("# refused %-9s: %s\n", psik_kind_name(k) ? psik_kind_name(k) : "?", msg);
    assert_int_equal(st, want);
    if (strstr(msg, words) == NULL)
        fail_msg("message '%s' lacks '%s'", msg, words);
    memset(&m, 0x5a, sizeof m);
    assert_int_equal(psik_init(&m, k, par), want);
    assert_int_equal(m.kind, 0);                 /* nothing half-built */
    assert_true(isnan(psik_theta(&m, -10.0)));   /* and unusable */
}

static void test_validation(void **state)
{
    const double ok[7] = {0.078, 0.43, 0.036, 1.56, 24.96, 0.5, -2.0};
    double p[7];
    (void)state;
#define WITH(i, v) (memcpy(p, ok, sizeof p), p[i] = (v), p)
    refuse(PSIK_VGM, WITH(0, -0.01), PSIK_EDOMAIN, "theta_r must be at least 0 (got -0.01)");
    refuse(PSIK_VGM, WITH(1, 1.2), PSIK_EDOMAIN, "theta_s must be at most 1");
    refuse(PSIK_VGM, WITH(0, 0.43), PSIK_EDOMAIN, "theta_r must be less than theta_s");
    refuse(PSIK_VGM, WITH(2, 0.0), PSIK_EDOMAIN, "alpha must be greater than 0 (got 0)");
    refuse(PSIK_VGM, WITH(2, -0.036), PSIK_EDOMAIN, "alpha must be greater than 0");
    refuse(PSIK_VGM, WITH(3, 0.9), PSIK_EDOMAIN, "n must be greater than 1 (got 0.9)");
    refuse(PSIK_VGM, WITH(3, 1.0), PSIK_EDOMAIN, "n must be greater than 1 (got 1)");
    refuse(PSIK_VGM, WITH(4, 0.0), PSIK_EDOMAIN, "ks must be greater than 0");
    refuse(PSIK_VGM, WITH(5, -6.0), PSIK_EDOMAIN, "l must be greater than");
    refuse(PSIK_VGM, WITH(2, NAN), PSIK_EDOMAIN, "alpha must be a finite number");
    refuse(PSIK_VGM, WITH(4, INFINITY), PSIK_EDOMAIN, "ks must be a finite number");
    refuse(PSIK_VGM_AE, WITH(6, 2.0), PSIK_EDOMAIN, "h_e must be at most 0: it is a pressure head (got 2)");
    refuse(PSIK_VGB, WITH(3, 1.8), PSIK_EDOMAIN, "n must be greater than 2 for the Burdine form");
    {
        double fm[7] = {0.078, 0.43, 0.036, 1.56, 0.0, 24.96, 0.5};
        refuse(PSIK_VG_FREE_M, fm, PSIK_EDOMAIN, "m must be greater than 0 (got 0)");
        fm[4] = 0.3;
        fm[6] = -10.0;
        refuse(PSIK_VG_FREE_M, fm, PSIK_EDOMAIN, "l must be greater than");
    }
    refuse((psik_kind)0, ok, PSIK_EINVAL, "unknown model kind 0");
    refuse((psik_kind)77, ok, PSIK_EINVAL, "unknown model kind 77");
    refuse(PSIK_VGM, NULL, PSIK_EINVAL, "the parameter vector is NULL");
#undef WITH
    /* the vector itself is fine */
    assert_int_equal(psik_check(PSIK_VGM, ok, NULL, 0), PSIK_OK);
    assert_int_equal(psik_check(PSIK_VGM_AE, ok, NULL, 0), PSIK_OK);
    /* a short buffer is truncated and terminated */
    {
        char small[8];
        double bad[6] = {0.078, 0.43, 0.036, 0.5, 24.96, 0.5};
        assert_int_equal(psik_check(PSIK_VGM, bad, small, sizeof small), PSIK_EDOMAIN);
        assert_int_equal(strlen(small), 7);
        assert_int_equal(psik_check(PSIK_VGM, bad, small, 0), PSIK_EDOMAIN);
    }
    assert_int_equal(psik_init(NULL, PSIK_VGM, ok), PSIK_EINVAL);
    assert_int_equal(psik_vgm(NULL, 0.078, 0.43, 0.036, 1.56, 24.96), PSIK_EINVAL);
}

static void test_null_and_uninitialised(void **state)
{
    psik_model z;
    psik_state st;
    double h = -10.0, out = 1.0;
    (void)state;
    memset(&z, 0, sizeof z);
    assert_true(isnan(psik_se(NULL, h)) && isnan(psik_theta(NULL, h)));
    assert_true(isnan(psik_kr(NULL, h)) && isnan(psik_k(NULL, h)));
    assert_true(isnan(psik_capacity(NULL, h)) && isnan(psik_dk_dh(NULL, h)));
    assert_true(isnan(psik_head(NULL, 0.2)) && isnan(psik_head_se(NULL, 0.5)));
    assert_true(isnan(psik_k_theta(NULL, 0.2)) && isnan(psik_diffusivity(NULL, 0.2)));
    assert_true(isnan(psik_theta(&z, h)));
    psik_eval(&z, h, &st);
    assert_true(isnan(st.theta) && isnan(st.dk_dh));
    psik_eval(&z, h, NULL);                      /* ignored */
    psik_eval_batch(NULL, 1, &h, &out, NULL, NULL, NULL);
    assert_true(isnan(out));
    out = 1.0;
    psik_eval_batch(&z, 1, NULL, &out, NULL, NULL, NULL);
    assert_true(isnan(out));
    psik_eval_batch(&z, 0, NULL, NULL, NULL, NULL, NULL);   /* nothing to do */
    assert_int_equal(psik_model_params(NULL, NULL), 0);
    assert_int_equal(psik_model_params(&z, NULL), 0);
}

static void test_batch(void **state)
{
    psik_model m;
    double h[64], th[64], k[64], c[64], d[64], k2[64];
    size_t i;
    (void)state;
    /* sandy loam, Carsel & Parrish (1988) class mean (from memory) */
    assert_int_equal(psik_vgm(&m, 0.065, 0.41, 0.075, 1.89, 106.1), PSIK_OK);
    for (i = 0; i < 64; i++)
        h[i] = i == 0 ? NAN : i == 1 ? 5.0 : -pow(10.0, -6.0 + 13.0 * (double)i / 63.0);
    psik_eval_batch(&m, 64, h, th, k, c, d);
    for (i = 0; i < 64; i++) {
        psik_state st;
        psik_eval(&m, h[i], &st);
        if (i == 0) {
            assert_true(isnan(th[0]) && isnan(k[0]) && isnan(c[0]) && isnan(d[0]));
            continue;
        }
        /* vgm's psik_eval has one-point code of its own (lib/point_vg.c):
         * the batch agrees to 1e-14 relative (psik.h), not bit for bit */
        assert_true(fabs(th[i] - st.theta) <= 1e-14 * fabs(st.theta) &&
                    fabs(k[i] - st.k) <= 1e-14 * fabs(st.k) &&
                    fabs(c[i] - st.capacity) <= 1e-14 * fabs(st.capacity) &&
                    fabs(d[i] - st.dk_dh) <= 1e-14 * fabs(st.dk_dh));
    }
    for (i = 0; i < 64; i++)
        k2[i] = -1.0;
    psik_eval_batch(&m, 64, h, NULL, k2, NULL, NULL);      /* one output only */
    for (i = 1; i < 64; i++)
        assert_true(k2[i] == k[i]);
    {
        double par[6];
        assert_int_equal(psik_model_params(&m, par), 6);
        assert_true(par[3] == 1.89 && par[5] == 0.5);   /* psik_vgm: l = 0.5 */
    }
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_strings),
        cmocka_unit_test(test_kind_names),
        cmocka_unit_test(test_validation),
        cmocka_unit_test(test_null_and_uninitialised),
        cmocka_unit_test(test_batch),
    };
    return cmocka_run_group_tests_name("API contract", tests, NULL, NULL);
}
