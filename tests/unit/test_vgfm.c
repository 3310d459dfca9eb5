/* test_vgfm.c - the vg_free_m batch kernel (lib/batch_vgfm.c).
 *
 * Checked: psik_eval_batch equals psik_eval bit for bit for every compiled
 * instruction-set variant (psik__isa_limit), over realistic and corner
 * models, heads from 1e-300 to 1e300 with NaN, +-0, +-inf and saturated
 * heads mixed in, counts that are not a multiple of the block size, and
 * NULL outputs; the variants agree with each other to 1e-14 relative
 * (bit for bit unless fastmath.h rounds differently with FMA); and the fused core
 * (not the scalar fix-up) takes every head of the bench soil from 1e-6 to
 * 1e10 cm. Accuracy against mpmath is test_accuracy's (batch(all)).
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "psik.h"
#include "psik_internal.h"
#include "isa.h"

PSIK_HIDDEN int psik__vgfm_point_fast(const double *cst, double s, psik_point *out);

#define NPT 2600   /* ten full blocks and a partial one */

/* theta_r theta_s alpha n m ks l: soils, then corners of the domain. */
static const double models[][7] = {
    {0.078, 0.43, 0.036, 1.56, 0.4, 24.96, 0.5},   /* the bench soil */
    {0.065, 0.41, 0.075, 1.89, 0.47, 106.1, 0.5},
    {0.1, 0.46, 0.016, 1.37, 0.27, 6.24, -1.0},
    {0.05, 0.45, 0.02, 1.2, 0.9, 1.0, 2.0},
    {0.0, 0.4, 0.5, 3.0, 0.2, 10.0, 0.5},
    {0.0, 1.0, 1e-5, 1.001, 0.01, 1.0, 0.5},
    {0.0, 1.0, 100.0, 20.0, 10.0, 1.0, 0.5},
    {0.05, 0.45, 0.02, 1.05, 3.0, 1.0, 0.5},
    {0.05, 0.45, 0.02, 1.5, 0.5, 1.0, -2.5},       /* l near its lower bound */
    {0.05, 0.45, 0.02, 8.0, 1.0, 1.0, 10.0},
};
#define NMOD (sizeof models / sizeof models[0])

static double heads[NPT];

static void make_heads(void)
{
    unsigned long long lcg = 19801976ULL;
    int i;
    for (i = 0; i < NPT; i++) {
        double u;
        lcg = lcg * 6364136223846793005ULL + 1442695040888963407ULL;
        u = (double)(lcg >> 11) / 9007199254740992.0;
        if (i % 101 == 0) heads[i] = NAN;
        else if (i % 103 == 0) heads[i] = 0.5;
        else if (i % 107 == 0) heads[i] = -0.0;
        else if (i % 109 == 0) heads[i] = -INFINITY;
        else if (i % 113 == 0) heads[i] = INFINITY;
        else if (i % 127 == 0) heads[i] = -4.9406564584124654e-324;
        else if (i % 3 == 0) heads[i] = -pow(10.0, -300.0 + 600.0 * u);
        else heads[i] = -pow(10.0, -4.0 + 11.0 * u);   /* 1e-4 .. 1e7 cm */
    }
}

static int same(double a, double b)
{
    return memcmp(&a, &b, sizeof a) == 0 || (isnan(a) && isnan(b));
}

/* Batch vs psik_eval at one variant cap; the values go to out[4][NPT]. */
static long check_model(const psik_model *m, double (*out)[NPT])
{
    static double th[NPT], k[NPT], c[NPT], dk[NPT], k2[NPT], c2[NPT];
    long bad = 0;
    int i;
    psik_eval_batch(m, NPT, heads, th, k, c, dk);
    for (i = 0; i < NPT; i++) {
        psik_state st;
        psik_eval(m, heads[i], &st);
        bad += !same(th[i], st.theta) + !same(k[i], st.k) + !same(c[i], st.capacity) +
               !same(dk[i], st.dk_dh);
        out[0][i] = th[i];
        out[1][i] = k[i];
        out[2][i] = c[i];
        out[3][i] = dk[i];
    }
    /* some outputs NULL, an odd start and count */
    psik_eval_batch(m, NPT - 7, heads + 7, NULL, k2, c2, NULL);
    for (i = 7; i < NPT; i++)
        bad += !same(k2[i - 7], k[i]) + !same(c2[i - 7], c[i]);
    return bad;
}

static void test_batch_equals_eval(void **state)
{
    static double ref[4][NPT], cur[4][NPT];
    long bad = 0, cross = 0;
    double worst = 0.0;
    int id, old;
    size_t j;
    (void)state;
    make_heads();
    old = psik__isa_limit(PSIK_ISA_ID_AVX512);
    for (j = 0; j < NMOD; j++) {
        psik_model m;
        int first = 1;
        assert_int_equal(psik_init(&m, PSIK_VG_FREE_M, models[j]), PSIK_OK);
        for (id = PSIK_ISA_ID_BASE; id <= PSIK_ISA_ID_AVX512; id++) {
            int i, q;
            psik__isa_limit(id);
            if (psik__isa() != id)
                continue;   /* not compiled in or not supported here */
            bad += check_model(&m, first ? ref : cur);
            if (!first)
                for (q = 0; q < 4; q++)
                    for (i = 0; i < NPT; i++) {
                        double d = fabs(cur[q][i] - ref[q][i]), s = fabs(ref[q][i]);
                        if (same(cur[q][i], ref[q][i]))
                            continue;
                        cross++;
                        d = s > 1e-300 ? d / s : d / 1e-300;
                        if (!(d <= worst))
                            worst = d;
                    }
            first = 0;
        }
    }
    psik__isa_limit(old);
    printf("# vg_free_m batch: %zu models x %d heads, every variant here: %ld values differ "
           "from psik_eval; between variants %ld differ, by %.3g relative at most\n",
           NMOD, NPT, bad, cross, worst);
    assert_int_equal(bad, 0);
    assert_true(worst <= 1e-14);
}

/* The fused core takes every head of the bench soil (no scalar fix-up). */
static void test_core_coverage(void **state)
{
    psik_model m;
    double cst[9];
    int i, taken = 0, n = 20001;
    (void)state;
    assert_int_equal(psik_init(&m, PSIK_VG_FREE_M, models[0]), PSIK_OK);
    /* vg.c's order (vg_free_m_consts) from its aux slots */
    cst[0] = m.aux[0];    /* alpha */
    cst[1] = m.aux[1];    /* n */
    cst[2] = m.aux[2];    /* m */
    cst[3] = m.aux[3];    /* k = m n, hi */
    cst[4] = m.aux[13];   /* k, lo */
    cst[5] = m.aux[8];    /* l */
    cst[6] = m.aux[10];   /* a */
    cst[7] = m.aux[11];   /* b */
    cst[8] = m.aux[12];   /* B(a, b) */
    assert_true(cst[1] == 1.56 && cst[2] == 0.4 && cst[5] == 0.5);
    for (i = 0; i < n; i++) {
        psik_point p;
        taken += psik__vgfm_point_fast(cst, pow(10.0, -6.0 + 16.0 * i / (n - 1)), &p);
    }
    printf("# bench soil, suction 1e-6 .. 1e10 cm: fused core takes %d of %d heads\n", taken, n);
    assert_int_equal(taken, n);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_batch_equals_eval),
        cmocka_unit_test(test_core_coverage),
    };
    return cmocka_run_group_tests_name("vg_free_m batch kernel", tests, NULL, NULL);
}
