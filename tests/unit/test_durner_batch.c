/* test_durner_batch.c - the Durner batch kernel (lib/batch_durner.c).
 *
 * Checked: for every instruction-set variant compiled in and supported
 * here (psik__isa_limit), psik_eval_batch gives psik_eval's values bit
 * for bit, for bimodal and trimodal soils and corner parameter sets, over
 * heads from 1e-300 to 1e300 mixed with NaN, +-0, +-inf, saturated and
 * subnormal heads, a count that is not a multiple of the block size, an
 * odd start and NULL outputs; the variants agree with one another to
 * 1e-14 relative; and the fused core itself (not the scalar fix-up) takes
 * every suction of the bench soils from 1e-6 to 1e10 cm. Accuracy against
 * mpmath is test_accuracy's business (its batch(all) column).
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
#include "fast_durner.h"

#define NPT 2833   /* eleven full blocks of 256 and a partial one */

typedef struct dset {
    psik_kind kind;
    double par[12];
} dset;

/* Invented round parameter sets: the bench soils, then corners. */
static const dset sets[] = {
    {PSIK_DURNER2, {0.05, 0.45, 0.7, 0.05, 2.2, 0.004, 1.4, 30.0, 0.5}},
    {PSIK_DURNER3, {0.05, 0.45, 0.5, 0.08, 2.5, 0.3, 0.01, 1.6, 0.001, 1.3, 30.0, 0.5}},
    {PSIK_DURNER2, {0.05, 0.45, 0.3, 0.1, 3.0, 0.001, 1.4, 10.0, 1.7}},
    {PSIK_DURNER2, {0.0, 0.50, 0.999, 100.0, 20.0, 1e-5, 1.001, 1.0, -2.0}},
    {PSIK_DURNER2, {0.0, 0.50, 0.5, 1.0, 10.0, 1e-6, 10.0, 1.0, 0.5}},
    {PSIK_DURNER2, {0.02, 0.40, 0.01, 0.5, 1.05, 0.02, 6.0, 3.0, 4.0}},
    {PSIK_DURNER3, {0.0, 0.50, 0.2, 1.0, 6.0, 0.3, 0.01, 2.0, 1e-4, 1.2, 1.0, -1.0}},
    {PSIK_DURNER3, {0.02, 0.45, 0.001, 50.0, 1.05, 0.998, 0.5, 15.0, 1e-5, 3.0, 5.0, 3.0}},
    {PSIK_DURNER3, {0.05, 0.45, 0.25, 0.02, 1.8, 0.25, 0.02, 1.8, 0.02, 1.8, 2.0, 0.5}},
};
#define NSET (sizeof sets / sizeof sets[0])

static double heads[NPT];

static void make_heads(void)
{
    unsigned long long x = 0x2545F4914F6CDD1DULL;
    int i;
    for (i = 0; i < NPT; i++) {
        double u;
        x ^= x << 13;
        x ^= x >> 7;
        x ^= x << 17;
        u = (double)(x >> 11) / 9007199254740992.0;
        if (i % 97 == 0) heads[i] = NAN;
        else if (i % 89 == 0) heads[i] = 2.0;
        else if (i % 83 == 0) heads[i] = -0.0;
        else if (i % 79 == 0) heads[i] = 0.0;
        else if (i % 73 == 0) heads[i] = -INFINITY;
        else if (i % 71 == 0) heads[i] = INFINITY;
        else if (i % 67 == 0) heads[i] = -4.9406564584124654e-324;
        else if (i % 61 == 0) heads[i] = -1e-310;
        else if (i % 4 == 0) heads[i] = -pow(10.0, -300.0 + 600.0 * u);
        else heads[i] = -pow(10.0, -5.0 + 12.0 * u);   /* 1e-5 .. 1e7 cm */
    }
}

static int same(double a, double b)
{
    return memcmp(&a, &b, sizeof a) == 0 || (isnan(a) && isnan(b));
}

/* Batch against psik_eval under the current variant cap; the batch values
 * go to out[4][NPT]. Returns the number of values that differ. */
static long batch_vs_eval(const psik_model *m, double (*out)[NPT])
{
    static double th[NPT], k[NPT], c[NPT], dk[NPT], k2[NPT], th2[NPT];
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
    psik_eval_batch(m, NPT - 5, heads + 5, th2, k2, NULL, NULL);
    for (i = 5; i < NPT; i++)
        bad += !same(th2[i - 5], th[i]) + !same(k2[i - 5], k[i]);
    return bad;
}

static void test_batch_is_eval(void **state)
{
    static double first[4][NPT], cur[4][NPT];
    long bad = 0, differ = 0;
    int nvar = 0;
    double worst = 0.0;
    size_t j;
    int id, cap;
    (void)state;
    make_heads();
    cap = psik__isa_limit(PSIK_ISA_ID_AVX512);
    for (j = 0; j < NSET; j++) {
        psik_model m;
        int have = 0;
        assert_int_equal(psik_init(&m, sets[j].kind, sets[j].par), PSIK_OK);
        for (id = PSIK_ISA_ID_BASE; id <= PSIK_ISA_ID_AVX512; id++) {
            int q, i;
            psik__isa_limit(id);
            if (psik__isa() != id)
                continue;   /* not compiled in, or not supported by this processor */
            if (j == 0)
                nvar++;
            bad += batch_vs_eval(&m, have ? cur : first);
            if (have)
                for (q = 0; q < 4; q++)
                    for (i = 0; i < NPT; i++) {
                        double a = cur[q][i], b = first[q][i], d;
                        if (same(a, b))
                            continue;
                        differ++;
                        d = fabs(a - b) / (fabs(b) > 1e-300 ? fabs(b) : 1e-300);
                        if (!(d <= worst))
                            worst = d;
                    }
            have = 1;
        }
    }
    psik__isa_limit(cap);
    printf("# durner batch: %zu parameter sets x %d heads, %d variants here: %ld values "
           "differ from psik_eval; %ld differ between variants, by %.3g relative at most\n",
           NSET, NPT, nvar, bad, differ, worst);
    assert_int_equal(bad, 0);
    assert_true(worst <= 1e-14);
}

/* The constants of durner.c's fused point, from its aux slots (4 per
 * mode: alpha, n, c, w; then l at 12, the mode count at 14, the last
 * weight's remainder at 15). */
static psik_durc coef_of(const psik_model *m)
{
    psik_durc c;
    int i, nm = (int)m->aux[14];
    memset(&c, 0, sizeof c);
    for (i = 0; i < nm; i++) {
        double n = m->aux[4 * i + 1];
        c.alpha[i] = m->aux[4 * i];
        c.n[i] = n;
        c.m[i] = (n - 1.0) / n;
        c.k[i] = n - 1.0;
        c.c[i] = m->aux[4 * i + 2];
        c.w[i] = m->aux[4 * i + 3] + (i == nm - 1 ? m->aux[15] : 0.0);
    }
    c.l = m->aux[12];
    c.nm = nm;
    return c;
}

/* The fused core takes every suction of the bench soils: the batch runs
 * in the vector loop, not in the scalar fix-up. */
static void test_core_takes_the_soil_range(void **state)
{
    size_t j;
    (void)state;
    for (j = 0; j < 2; j++) {
        psik_model m;
        psik_durc c;
        int i, taken = 0, n = 16001;
        assert_int_equal(psik_init(&m, sets[j].kind, sets[j].par), PSIK_OK);
        c = coef_of(&m);
        assert_true(c.nm == (j == 0 ? 2 : 3) && c.l == 0.5);
        for (i = 0; i < n; i++) {
            psik_point p, q;
            double s = pow(10.0, -6.0 + 16.0 * i / (n - 1));
            int ok = psik__dur_point_fast(&c, s, &p);
            taken += ok;
            if (ok) {
                /* and it is what psik_eval reports (before eval.c's clamps) */
                psik_state st;
                psik_eval(&m, -s, &st);
                q.se = st.se;
                q.kr = st.kr;
                assert_true(same(p.se, q.se) && same(p.kr, q.kr));
            }
        }
        printf("# %s, suction 1e-6 .. 1e10 cm: fused core takes %d of %d\n",
               psik_kind_name(sets[j].kind), taken, n);
        assert_int_equal(taken, n);
    }
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_batch_is_eval),
        cmocka_unit_test(test_core_takes_the_soil_range),
    };
    return cmocka_run_group_tests_name("durner batch kernel", tests, NULL, NULL);
}
