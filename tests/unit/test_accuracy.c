/* test_accuracy.c - every evaluator against the mpmath reference tables.
 *
 * Source of the reference values: tests/data/ref_<kind>.txt, written by
 * tests/reference/gen_reference.py with mpmath at 600 digits and checked at
 * 1200 (see each file's header). Goal (core issue): relative error at most
 * 4 ulp x max(1, kappa), kappa the condition number in the argument, for
 * every function on the whole grid. Each test prints the largest error it
 * measured per function, over every instruction-set variant this processor
 * runs (lib/isa.h: the grid is evaluated once per variant, capped with
 * psik__isa_limit), since the variants round differently.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "psik.h"
#include "refcheck.h"
#include "isa.h"

#define GOAL_ULPS 4.0

/* Where the goal is not met, the measured bound and the reason; the test
 * fails above these. Everything not listed is held to GOAL_ULPS. */
static const struct { const char *kind, *fn; double limit; const char *why; } known[] = {
    {"vgm_ae", "kr", 8.0, "Kr = Se^l (g/g_e)^2: the ratio of two rounded values, squared, "
                          "near h_e where kappa is small"},
    {"vgm_ae", "k", 8.0, "as kr"},
    {"vgm_ae", "eval(all)", 8.0, "as kr"},
    {"vgm_ae", "batch(all)", 8.0, "as kr"},
    {"vgm_ae", "diffusivity", 8.0, "K/C from Se near h_e, both few-ulp values"},
    {"durner2", "kr", 8.0, "a weighted sum of two modes, each a few ulp, rounded in double "
                           "(a -DPSIK_EXTENDED build sums in long double: 2 ulp, ~20x slower)"},
    {"durner2", "dk_dh", 8.0, "as kr"},
    {"durner2", "eval(all)", 8.0, "as kr"},
    {"durner2", "batch(all)", 8.0, "as kr"},
    {"durner3", "kr", 8.0, "as durner2, three modes"},
    {"durner3", "k", 8.0, "as kr"},
    {"durner3", "dk_dh", 8.0, "as kr"},
    {"durner3", "eval(all)", 8.0, "as kr"},
    {"durner3", "batch(all)", 8.0, "as kr"},
    {"vg_free_m", "kr", 48.0, "n near 1 (b = 1 - 1/n << 1) very near saturation: I_z(a,b) is "
                              "small although z > 0.97, past the split point and beyond the "
                              "positive series' reach, so it is 1 minus the continued fraction "
                              "of the complement (relative error ~ (1-I)/I ulp)"},
    {"vg_free_m", "k", 48.0, "as kr"},
    {"vg_free_m", "dk_dh", 24.0, "as kr"},
    {"vg_free_m", "eval(all)", 48.0, "as kr"},
    {"vg_free_m", "batch(all)", 48.0, "as kr"},
};

static double limit_for(const char *kind, const char *fn, const char **why)
{
    size_t i;
    for (i = 0; i < sizeof known / sizeof known[0]; i++)
        if (strcmp(known[i].kind, kind) == 0 && strcmp(known[i].fn, fn) == 0) {
            *why = known[i].why;
            return known[i].limit;
        }
    *why = NULL;
    return GOAL_ULPS;
}

enum { F_SE, F_THETA, F_KR, F_K, F_CAP, F_DK, F_EVAL, F_HEAD, F_HEAD_SE,
       F_KTHETA, F_DIFF, F_BATCH, NF };
static const char *fname[NF] = {
    "se", "theta", "kr", "k", "capacity", "dk_dh", "eval(all)", "head",
    "head_se", "k_theta", "diffusivity", "batch(all)" };

static void check_kind(void **state)
{
    const char *name = (const char *)*state;
    rc_table t;
    rc_max mx[NF];
    size_t i;
    int f, bad = 0, isa, best = psik__isa(), cap, pass = 0;
    long saturated = 0, skipped_inverse = 0;

    assert_int_equal(rc_load(name, &t), 0);
    for (f = 0; f < NF; f++)
        rc_max_init(&mx[f], fname[f]);

    cap = psik__isa_limit(PSIK_ISA_ID_AVX512);
    for (isa = PSIK_ISA_ID_BASE; isa <= best; isa++) {
    psik__isa_limit(isa);
    if (psik__isa() != isa)
        continue;
    pass++;
    for (i = 0; i < t.n; i++) {
        const rc_row *r = &t.rows[i];
        psik_model m;
        psik_state st;
        double th, kk, cc, dk, subn;
        assert_int_equal(psik_init(&m, r->kind, r->par), PSIK_OK);

        rc_max_add(&mx[F_SE], psik_se(&m, r->h), r->v[RC_SE], r->c[RC_C_SE], r);
        rc_max_add(&mx[F_THETA], psik_theta(&m, r->h), r->v[RC_THETA], r->c[RC_C_THETA], r);
        rc_max_add(&mx[F_KR], psik_kr(&m, r->h), r->v[RC_KR], r->c[RC_C_KR], r);
        /* K = ks Kr and dK/dh = ks dKr/dh: when Kr underflows into the
         * subnormal range (below 2.2e-308) its rounding, 2^-1075 absolute,
         * is scaled by ks; that much is forgiven there (IEEE, not psik). */
        subn = (1.0 + m.ks) * 4.9406564584124654e-324;
        rc_max_add_tol(&mx[F_K], psik_k(&m, r->h), r->v[RC_K], r->c[RC_C_K], subn, r);
        rc_max_add(&mx[F_CAP], psik_capacity(&m, r->h), r->v[RC_CAP], r->c[RC_C_CAP], r);
        rc_max_add_tol(&mx[F_DK], psik_dk_dh(&m, r->h), r->v[RC_DK], r->c[RC_C_DK], subn, r);

        psik_eval(&m, r->h, &st);
        rc_max_add(&mx[F_EVAL], st.se, r->v[RC_SE], r->c[RC_C_SE], r);
        rc_max_add(&mx[F_EVAL], st.theta, r->v[RC_THETA], r->c[RC_C_THETA], r);
        rc_max_add(&mx[F_EVAL], st.kr, r->v[RC_KR], r->c[RC_C_KR], r);
        rc_max_add_tol(&mx[F_EVAL], st.k, r->v[RC_K], r->c[RC_C_K], subn, r);
        rc_max_add(&mx[F_EVAL], st.capacity, r->v[RC_CAP], r->c[RC_C_CAP], r);
        rc_max_add_tol(&mx[F_EVAL], st.dk_dh, r->v[RC_DK], r->c[RC_C_DK], subn, r);

        psik_eval_batch(&m, 1, &r->h, &th, &kk, &cc, &dk);
        rc_max_add(&mx[F_BATCH], th, r->v[RC_THETA], r->c[RC_C_THETA], r);
        rc_max_add_tol(&mx[F_BATCH], kk, r->v[RC_K], r->c[RC_C_K], subn, r);
        rc_max_add(&mx[F_BATCH], cc, r->v[RC_CAP], r->c[RC_C_CAP], r);
        rc_max_add_tol(&mx[F_BATCH], dk, r->v[RC_DK], r->c[RC_C_DK], subn, r);

        if (r->h >= m.h_sat) {
            saturated += pass == 1;
            continue;
        }
        /* Inverses and functions of theta: only where the reference theta
         * and Se are still distinguishable from saturation and dryness. */
        /* (A subnormal reference Se is itself rounded to ~1e-4 relative or
         * worse, far beyond what its condition number covers: the inverse
         * is checked only from normal Se.) */
        if (r->v[RC_SE] >= 2.2250738585072014e-308 && r->v[RC_SE] < 1.0) {
            rc_max_add(&mx[F_HEAD_SE], psik_head_se(&m, r->v[RC_SE]), r->h, r->c[RC_C_HEAD_SE], r);
        } else {
            skipped_inverse += pass == 1;
        }
        if (r->v[RC_THETA] > m.theta_r && r->v[RC_THETA] < m.theta_s) {
            rc_max_add(&mx[F_HEAD], psik_head(&m, r->v[RC_THETA]), r->h, r->c[RC_C_HEAD], r);
            rc_max_add_tol(&mx[F_KTHETA], psik_k_theta(&m, r->v[RC_THETA]), r->v[RC_K],
                           r->c[RC_C_KTHETA], subn, r);
            if (r->v[RC_DIFF] > 0.0)
                rc_max_add(&mx[F_DIFF], psik_diffusivity(&m, r->v[RC_THETA]),
                           r->v[RC_DIFF], r->c[RC_C_DIFF], r);
        }
    }
    }
    psik__isa_limit(cap);
    printf("# %s: %zu rows from %s (%ld saturated, %ld with Se rounding to 0 or 1), "
           "%d instruction-set variant(s)\n",
           name, t.n, t.path, saturated, skipped_inverse, pass);
    for (f = 0; f < NF; f++) {
        const char *why;
        double lim = limit_for(name, fname[f], &why);
        rc_max_print(&mx[f], name);
        if (!(mx[f].worst <= GOAL_ULPS))
            printf("#   above the goal of %g: %s\n", GOAL_ULPS,
                   why ? why : "NOT A KNOWN CASE");
        if (!(mx[f].worst <= lim)) {
            printf("# %s %s: FAILED, above its bound %g ulp/max(1,cond)\n", name, fname[f], lim);
            bad++;
        }
    }
    rc_free(&t);
    assert_int_equal(bad, 0);
}

int main(void)
{
    static const char *kinds[] = {
        "vgm", "vgm_ae", "vg_free_m", "vgb",
        "bcm", "bcb", "kosugi", "durner2", "durner3", "gardner",
    };
    struct CMUnitTest tests[sizeof kinds / sizeof kinds[0]];
    size_t i;
    for (i = 0; i < sizeof kinds / sizeof kinds[0]; i++) {
        struct CMUnitTest u = { kinds[i], check_kind, NULL, NULL, (void *)kinds[i] };
        tests[i] = u;
    }
    return cmocka_run_group_tests_name("accuracy against mpmath tables", tests, NULL, NULL);
}
