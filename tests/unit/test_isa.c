/* test_isa.c - every kind's batch kernel at every instruction-set variant
 * this processor runs (lib/isa.h: portable, SSE4.2, AVX2+FMA, AVX-512+FMA).
 *
 * For each variant: psik_eval_batch equals psik_eval bit for bit where they
 * share the variant's code (every kind but the van Genuchten ones), and
 * agrees with it to 1e-14 relative where psik_eval has a one-point code of
 * its own (vgm, vgm_ae, vgb: lib/point_vg.c; gardner: lib/point_gardner.c),
 * over heads from 1e-6 to
 * 1e300 in suction, the saturated side, -0, +-inf and NaN, in a count that
 * is not a multiple of the block (256) and with NULL outputs.
 * Across variants: the values agree to 1e-14 relative (values below 1e-300
 * absolutely), the bound for the vectorised path against the
 * scalar one (the FMA variants round differently, each within the accuracy
 * goal that test_accuracy measures in whichever variant the machine picks).
 * The models are realistic points (the bench's; texture-class means of
 * Carsel & Parrish 1988 for vG, values from memory as in MODELS.md).
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
#include "isa.h"

#define NH 1000

/* own: psik_eval has its own one-point code (agreement to 1e-14, not bits) */
static const struct { psik_kind kind; int own; double par[12]; } sets[] = {
    {PSIK_VGM, 1, {0.078, 0.43, 0.036, 1.56, 24.96, 0.5}},
    {PSIK_VGM, 1, {0.1, 0.38, 0.008, 1.09, 4.8, -1.2}},          /* clay-like, l != 1/2 */
    {PSIK_VGM_AE, 1, {0.078, 0.43, 0.036, 1.56, 24.96, 0.5, -2.0}},
    {PSIK_VGM_AE, 1, {0.1, 0.38, 0.008, 1.09, 4.8, -1.2, -40.0}},
    {PSIK_VG_FREE_M, 0, {0.078, 0.43, 0.036, 1.56, 0.4, 24.96, 0.5}},
    {PSIK_VGB, 1, {0.045, 0.43, 0.145, 2.68, 712.8}},
    {PSIK_BCM, 0, {0.05, 0.41, -15.0, 0.6, 50.0, 0.5}},
    {PSIK_BCB, 0, {0.05, 0.41, -15.0, 0.6, 50.0}},
    {PSIK_KOSUGI, 0, {0.06, 0.42, -80.0, 1.4, 20.0, 0.5}},
    {PSIK_DURNER2, 0, {0.05, 0.45, 0.7, 0.05, 2.2, 0.004, 1.4, 30.0, 0.5}},
    {PSIK_DURNER3, 0, {0.05, 0.45, 0.5, 0.08, 2.5, 0.3, 0.01, 1.6, 0.001, 1.3, 30.0, 0.5}},
    {PSIK_GARDNER, 1, {0.05, 0.40, 0.02, 15.0}},
};
#define NSETS (sizeof sets / sizeof sets[0])

static double heads[NH];

static void make_heads(void)
{
    int i;
    for (i = 0; i < NH; i++)   /* suction 1e-6 .. 1e300, shuffled by a stride */
        heads[(i * 389) % NH] = -pow(10.0, -6.0 + 306.0 * (double)i / (NH - 1));
    heads[0] = NAN;
    heads[1] = 0.0;
    heads[2] = -0.0;
    heads[3] = 3.0;
    heads[4] = -INFINITY;
    heads[5] = INFINITY;
    heads[6] = -1e-300;
    heads[7] = -4.9406564584124654e-324;
}

static int same(double a, double b)
{
    return (isnan(a) && isnan(b)) || memcmp(&a, &b, sizeof a) == 0;
}

static double rel(double a, double b)
{
    double d = fabs(a - b), s = fabs(a) > fabs(b) ? fabs(a) : fabs(b);
    if (isnan(a) || isnan(b))
        return isnan(a) && isnan(b) ? 0.0 : INFINITY;
    if (a == b)
        return 0.0;
    return s < 1e-300 ? d : d / s;
}

typedef struct run { double th[NH], k[NH], c[NH], dk[NH]; } run;

static void test_variants(void **state)
{
    static run ref[NSETS], cur;
    size_t j;
    int isa, best = psik__isa(), old, levels = 0;
    double worst = 0.0, worst_own = 0.0;
    (void)state;
    make_heads();
    old = psik__isa_limit(PSIK_ISA_ID_AVX512);
    for (isa = PSIK_ISA_ID_BASE; isa <= best; isa++) {
        psik__isa_limit(isa);
        if (psik__isa() != isa)
            continue;
        levels++;
        for (j = 0; j < NSETS; j++) {
            psik_model m;
            int i;
            double kk[NH];
            assert_int_equal(psik_init(&m, sets[j].kind, sets[j].par), PSIK_OK);
            psik_eval_batch(&m, NH, heads, cur.th, cur.k, cur.c, cur.dk);
            for (i = 0; i < NH; i++) {
                psik_state st;
                psik_eval(&m, heads[i], &st);
                if (sets[j].own) {
                    double e = rel(st.theta, cur.th[i]), f;
                    f = rel(st.k, cur.k[i]); if (f > e) e = f;
                    f = rel(st.capacity, cur.c[i]); if (f > e) e = f;
                    f = rel(st.dk_dh, cur.dk[i]); if (f > e) e = f;
                    if (e > worst_own)
                        worst_own = e;
                    if (!(e <= 1e-14))
                        fail_msg("%s (set %zu), variant %d, h = %.17g: batch vs psik_eval %.3g "
                                 "relative", psik_kind_name(sets[j].kind), j, isa, heads[i], e);
                    continue;
                }
                if (!(same(st.theta, cur.th[i]) && same(st.k, cur.k[i]) &&
                      same(st.capacity, cur.c[i]) && same(st.dk_dh, cur.dk[i])))
                    fail_msg("%s (set %zu), variant %d, h = %.17g: batch %.17g %.17g %.17g %.17g"
                             " vs psik_eval %.17g %.17g %.17g %.17g",
                             psik_kind_name(sets[j].kind), j, isa, heads[i], cur.th[i],
                             cur.k[i], cur.c[i], cur.dk[i], st.theta, st.k, st.capacity,
                             st.dk_dh);
            }
            /* one output, an odd count: the same values */
            psik_eval_batch(&m, NH - 3, heads + 3, NULL, kk, NULL, NULL);
            for (i = 3; i < NH; i++)
                assert_true(same(kk[i - 3], cur.k[i]));
            if (isa == PSIK_ISA_ID_BASE) {
                ref[j] = cur;
                continue;
            }
            for (i = 0; i < NH; i++) {
                double e = rel(cur.th[i], ref[j].th[i]), f;
                f = rel(cur.k[i], ref[j].k[i]); if (f > e) e = f;
                f = rel(cur.c[i], ref[j].c[i]); if (f > e) e = f;
                f = rel(cur.dk[i], ref[j].dk[i]); if (f > e) e = f;
                if (e > worst)
                    worst = e;
                if (!(e <= 1e-14))
                    fail_msg("%s (set %zu), variant %d vs portable at h = %.17g: %.3g relative",
                             psik_kind_name(sets[j].kind), j, isa, heads[i], e);
            }
        }
    }
    psik__isa_limit(old);
    printf("# %d instruction-set variants run (widest here: %d); batch == psik_eval bit for "
           "bit in each where they share code, within %.3g relative for the kinds' own "
           "one-point code (van Genuchten, Gardner); largest difference from the portable variant %.3g "
           "relative\n", levels, best, worst_own, worst);
    assert_true(levels >= 1);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_variants),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
