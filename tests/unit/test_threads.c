/* test_threads.c - many threads evaluating shared models and tables.
 *
 * The library promises no global state (psik.h, "Thread safety"): a model
 * or a table is plain data that any number of threads may read at once.
 * This test builds one model of every kind in the table and one table per
 * model, computes every result serially first, then runs NTHREADS threads
 * that each evaluate all of them repeatedly through every evaluator
 * (single functions, psik_eval, psik_eval_batch on overlapping slices,
 * psik_table_eval, psik_table_eval_batch, psik_head) and compares each
 * value with the serial one bit for bit (the source of truth: the same
 * library, one thread). make check-tsan runs it under ThreadSanitizer,
 * which reports any data race even where the values happen to agree.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <math.h>
#include <pthread.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "psik.h"

#define NTHREADS 8
#define NPT 512
#define ROUNDS 4
#define MAXM 16

typedef struct shared {
    int nm;
    psik_model m[MAXM];
    psik_table *t[MAXM];
    void *mem[MAXM];
    double h[NPT];
    /* serial results: [model][point] */
    double th[MAXM][NPT], k[MAXM][NPT], c[MAXM][NPT], dk[MAXM][NPT];
    /* serial psik_eval_batch (equal to psik_eval bit for bit but for the vG
     * kinds and Gardner, whose psik_eval has one-point code of its own) */
    double bth[MAXM][NPT], bk[MAXM][NPT], bc[MAXM][NPT], bdk[MAXM][NPT];
    double tth[MAXM][NPT], tk[MAXM][NPT], tc[MAXM][NPT], tdk[MAXM][NPT];
    double head[MAXM][NPT];
    double sth[MAXM][NPT];      /* serial psik_theta (its own path) */
} shared;

typedef struct worker {
    const shared *sh;
    int id;
    long checked, mismatches;
} worker;

static int same(double a, double b)
{
    return memcmp(&a, &b, sizeof a) == 0 || (isnan(a) && isnan(b));
}

static void *work(void *arg)
{
    worker *w = (worker *)arg;
    const shared *sh = w->sh;
    double th[NPT], k[NPT], c[NPT], dk[NPT];
    int r, j, i;
    for (r = 0; r < ROUNDS; r++) {
        for (j = 0; j < sh->nm; j++) {
            /* each thread starts at its own offset so slices overlap in time */
            int mj = (j + w->id) % sh->nm;
            const psik_model *m = &sh->m[mj];
            size_t off = (size_t)((w->id * 37 + r * 11) % 64);
            psik_eval_batch(m, NPT - off, sh->h + off, th + off, k + off, c + off, dk + off);
            for (i = (int)off; i < NPT; i++) {
                w->mismatches += !same(th[i], sh->bth[mj][i]) + !same(k[i], sh->bk[mj][i]) +
                                 !same(c[i], sh->bc[mj][i]) + !same(dk[i], sh->bdk[mj][i]);
                w->checked += 4;
            }
            for (i = 0; i < NPT; i += 3) {
                psik_state st;
                psik_eval(m, sh->h[i], &st);
                w->mismatches += !same(st.theta, sh->th[mj][i]) + !same(st.k, sh->k[mj][i]) +
                                 !same(psik_theta(m, sh->h[i]), sh->sth[mj][i]) +
                                 !same(psik_head(m, sh->th[mj][i]), sh->head[mj][i]);
                w->checked += 4;
            }
            if (sh->t[mj] != NULL) {
                psik_table_eval_batch(sh->t[mj], NPT, sh->h, th, k, c, dk);
                for (i = 0; i < NPT; i++) {
                    w->mismatches += !same(th[i], sh->tth[mj][i]) + !same(k[i], sh->tk[mj][i]) +
                                     !same(c[i], sh->tc[mj][i]) + !same(dk[i], sh->tdk[mj][i]);
                    w->checked += 4;
                }
                for (i = 1; i < NPT; i += 5) {
                    psik_state st;
                    psik_table_eval(sh->t[mj], sh->h[i], &st);
                    w->mismatches += !same(st.theta, sh->tth[mj][i]) + !same(st.dk_dh, sh->tdk[mj][i]);
                    w->checked += 2;
                }
            }
        }
    }
    return NULL;
}

/* One model of each kind (invented round parameters; the loam of MODELS.md). */
static int add_models(shared *sh)
{
    static const struct { const char *name; double par[12]; } models[] = {
        {"vgm", {0.078, 0.43, 0.036, 1.56, 24.96, 0.5}},
        {"vgm", {0.045, 0.43, 0.145, 2.68, 712.8, 1.0}},
        {"vgm_ae", {0.078, 0.43, 0.036, 1.56, 24.96, 0.5, -2.0}},
        {"vg_free_m", {0.078, 0.43, 0.036, 1.56, 0.4, 24.96, 0.5}},
        {"vgb", {0.045, 0.43, 0.145, 2.68, 712.8}},
        {"bcm", {0.05, 0.41, -15.0, 0.6, 50.0, 0.5}},
        {"bcb", {0.05, 0.41, -15.0, 0.6, 50.0}},
        {"kosugi", {0.06, 0.42, -80.0, 1.4, 20.0, 0.5}},
        {"durner2", {0.05, 0.45, 0.7, 0.05, 2.2, 0.004, 1.4, 30.0, 0.5}},
        {"durner3", {0.05, 0.45, 0.5, 0.08, 2.5, 0.3, 0.01, 1.6, 0.001, 1.3, 30.0, 0.5}},
        {"gardner", {0.05, 0.40, 0.02, 15.0}},
    };
    size_t i;
    for (i = 0; i < sizeof models / sizeof models[0] && sh->nm < MAXM; i++) {
        psik_kind kind = psik_kind_from_name(models[i].name);
        if (kind == 0)
            continue;
        if (psik_init(&sh->m[sh->nm], kind, models[i].par) != PSIK_OK)
            return -1;
        sh->nm++;
    }
    return 0;
}

static void test_threads_agree_with_serial(void **state)
{
    shared *sh = calloc(1, sizeof *sh);
    pthread_t tid[NTHREADS];
    worker w[NTHREADS];
    long checked = 0, bad = 0;
    int i, j;
    (void)state;
    assert_non_null(sh);
    assert_int_equal(add_models(sh), 0);
    assert_true(sh->nm >= 4);
    for (i = 0; i < NPT; i++) {   /* saturated, NaN, and 1e-4 .. 1e7 suction */
        if (i % 97 == 0) sh->h[i] = 0.5;
        else if (i % 131 == 0) sh->h[i] = NAN;
        else sh->h[i] = -pow(10.0, -4.0 + 11.0 * (double)i / NPT);
    }
    for (j = 0; j < sh->nm; j++) {
        size_t kn = psik_table_knots(-1e6, -1e-3, 0.0), bytes = psik_table_bytes(kn);
        sh->mem[j] = malloc(bytes);
        assert_non_null(sh->mem[j]);
        assert_int_equal(psik_table_build(&sh->m[j], -1e6, -1e-3, kn, sh->mem[j], bytes,
                                          &sh->t[j], NULL), PSIK_OK);
        for (i = 0; i < NPT; i++) {
            psik_state st;
            psik_eval(&sh->m[j], sh->h[i], &st);
            sh->th[j][i] = st.theta;
            sh->k[j][i] = st.k;
            sh->c[j][i] = st.capacity;
            sh->dk[j][i] = st.dk_dh;
            sh->head[j][i] = psik_head(&sh->m[j], st.theta);
            sh->sth[j][i] = psik_theta(&sh->m[j], sh->h[i]);
            psik_table_eval(sh->t[j], sh->h[i], &st);
            sh->tth[j][i] = st.theta;
            sh->tk[j][i] = st.k;
            sh->tc[j][i] = st.capacity;
            sh->tdk[j][i] = st.dk_dh;
        }
        psik_eval_batch(&sh->m[j], NPT, sh->h, sh->bth[j], sh->bk[j], sh->bc[j], sh->bdk[j]);
    }
    for (i = 0; i < NTHREADS; i++) {
        w[i].sh = sh;
        w[i].id = i;
        w[i].checked = w[i].mismatches = 0;
        assert_int_equal(pthread_create(&tid[i], NULL, work, &w[i]), 0);
    }
    for (i = 0; i < NTHREADS; i++) {
        assert_int_equal(pthread_join(tid[i], NULL), 0);
        checked += w[i].checked;
        bad += w[i].mismatches;
    }
    printf("# %d threads, %d models (every kind in the table), %ld values compared "
           "with the serial run: %ld differ\n", NTHREADS, sh->nm, checked, bad);
    for (j = 0; j < sh->nm; j++)
        free(sh->mem[j]);
    free(sh);
    assert_true(checked > 100000);
    assert_int_equal(bad, 0);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_threads_agree_with_serial),
    };
    return cmocka_run_group_tests_name("threads on shared models and tables", tests, NULL, NULL);
}
