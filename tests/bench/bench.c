/* bench.c - make bench: nanoseconds per point of psik's evaluators beside
 * a hand-written pow()-based baseline of the same formulas (baseline.c),
 * measured in the same process.
 *
 * Method: NPT heads, log-uniform in suction over [1e-2, 1e5] in a
 * pseudo-random order (all unsaturated; a solver's nodes are mostly there).
 * Each measurement repeats one loop over the heads until at least MIN_NS
 * of this thread's CPU time have passed (CLOCK_THREAD_CPUTIME_ID, so time
 * spent descheduled on a shared machine does not count) and divides by the
 * points done. Every round measures the
 * baseline and psik back to back, alternating which goes first; the figure
 * printed is the median over ROUNDS rounds, and the ratio is the median
 * baseline time over the median psik time. The cost of one libm exp() call
 * is measured the same way and printed as the unit. This is a benchmark,
 * not a test: it never fails on speed (it fails only if psik and the
 * baseline disagree, which would make the ratios meaningless).
 */
#define _POSIX_C_SOURCE 200809L
#include "bench.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#define NPT 2048
#define ROUNDS 7
#define MIN_NS 2.0e6

static double h_pts[NPT], o_th[NPT], o_k[NPT], o_c[NPT], o_dk[NPT];
static volatile double sink;

static double now_ns(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_THREAD_CPUTIME_ID, &ts);
    return (double)ts.tv_sec * 1e9 + (double)ts.tv_nsec;
}

typedef struct job {
    const bench_model *bm;
    const psik_model *m;
    const psik_table *t;
} job;

typedef void (*loop_fn)(const job *j);

static void run_exp(const job *j)
{
    int i;
    double acc = 0.0;
    (void)j;
    for (i = 0; i < NPT; i++)
        acc += exp(h_pts[i] * 1e-3);
    sink = acc;
}
static void run_empty(const job *j)
{
    int i;
    double acc = 0.0;
    (void)j;
    for (i = 0; i < NPT; i++)
        acc += h_pts[i] * 1e-3;
    sink = acc;
}

static void base_theta(const job *j)
{
    int i;
    for (i = 0; i < NPT; i++) o_th[i] = baseline_theta(j->bm, h_pts[i]);
}
static void base_k(const job *j)
{
    int i;
    for (i = 0; i < NPT; i++) o_k[i] = baseline_k(j->bm, h_pts[i]);
}
static void base_all(const job *j)
{
    int i;
    for (i = 0; i < NPT; i++)
        baseline_point(j->bm, h_pts[i], &o_th[i], &o_k[i], &o_c[i], &o_dk[i]);
}
static void psik_theta_loop(const job *j)
{
    int i;
    for (i = 0; i < NPT; i++) o_th[i] = psik_theta(j->m, h_pts[i]);
}
static void psik_k_loop(const job *j)
{
    int i;
    for (i = 0; i < NPT; i++) o_k[i] = psik_k(j->m, h_pts[i]);
}
static void psik_eval_loop(const job *j)
{
    int i;
    psik_state st;
    for (i = 0; i < NPT; i++) {
        psik_eval(j->m, h_pts[i], &st);
        o_th[i] = st.theta; o_k[i] = st.k; o_c[i] = st.capacity; o_dk[i] = st.dk_dh;
    }
}
static void psik_batch_loop(const job *j)
{
    psik_eval_batch(j->m, NPT, h_pts, o_th, o_k, o_c, o_dk);
}
static void psik_table_loop(const job *j)
{
    psik_table_eval_batch(j->t, NPT, h_pts, o_th, o_k, o_c, o_dk);
}

/* ns per point of one loop, repeated until MIN_NS. */
static double measure(loop_fn f, const job *j)
{
    double t0 = now_ns(), t;
    long reps = 0;
    do {
        f(j);
        reps++;
        t = now_ns() - t0;
    } while (t < MIN_NS);
    return t / ((double)reps * NPT);
}

static int cmp_d(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

static double median(double *v, int n)
{
    qsort(v, (size_t)n, sizeof *v, cmp_d);
    return n % 2 ? v[n / 2] : 0.5 * (v[n / 2 - 1] + v[n / 2]);
}

/* Median ns of baseline and psik over ROUNDS alternating rounds. */
static void pair(loop_fn base, loop_fn mine, const job *j, double *nb, double *np)
{
    double b[ROUNDS], p[ROUNDS];
    int r;
    for (r = 0; r < ROUNDS; r++) {
        if (r % 2 == 0) {
            b[r] = measure(base, j);
            p[r] = measure(mine, j);
        } else {
            p[r] = measure(mine, j);
            b[r] = measure(base, j);
        }
    }
    *nb = median(b, ROUNDS);
    *np = median(p, ROUNDS);
}

/* Largest relative difference |a - b| / max(|b|, tiny). */
static double reldiff(const double *a, const double *b, int n)
{
    double w = 0.0;
    int i;
    for (i = 0; i < n; i++) {
        double d = fabs(a[i] - b[i]), s = fabs(b[i]);
        double r = d / (s > 1e-200 ? s : 1e-200);
        if (!(r <= w)) w = r;
    }
    return w;
}

/* The bench model of each kind (units cm and cm/day; values from
 * MODELS.md's loam where they exist, invented round values elsewhere). */
static int bench_params(psik_kind kind, double *p)
{
    static const double vgm[] = {0.078, 0.43, 0.036, 1.56, 24.96, 0.5};
    static const double vgm_ae[] = {0.078, 0.43, 0.036, 1.56, 24.96, 0.5, -2.0};
    static const double vg_free_m[] = {0.078, 0.43, 0.036, 1.56, 0.4, 24.96, 0.5};
    static const double vgb[] = {0.045, 0.43, 0.145, 2.68, 712.8};
    static const double bcm[] = {0.05, 0.41, -15.0, 0.6, 50.0, 0.5};
    static const double bcb[] = {0.05, 0.41, -15.0, 0.6, 50.0};
    static const double kosugi[] = {0.06, 0.42, -80.0, 1.4, 20.0, 0.5};
    static const double durner2[] = {0.05, 0.45, 0.7, 0.05, 2.2, 0.004, 1.4, 30.0, 0.5};
    static const double durner3[] = {0.05, 0.45, 0.5, 0.08, 2.5, 0.3, 0.01, 1.6, 0.001, 1.3, 30.0, 0.5};
    static const double gardner[] = {0.05, 0.40, 0.02, 15.0};
    const double *src = NULL;
    size_t n = 0;
#define PICK(a) do { src = a; n = sizeof a / sizeof a[0]; } while (0)
    switch (kind) {
    case PSIK_VGM: PICK(vgm); break;
    case PSIK_VGM_AE: PICK(vgm_ae); break;
    case PSIK_VG_FREE_M: PICK(vg_free_m); break;
    case PSIK_VGB: PICK(vgb); break;
    case PSIK_BCM: PICK(bcm); break;
    case PSIK_BCB: PICK(bcb); break;
    case PSIK_KOSUGI: PICK(kosugi); break;
    case PSIK_DURNER2: PICK(durner2); break;
    case PSIK_DURNER3: PICK(durner3); break;
    case PSIK_GARDNER: PICK(gardner); break;
    }
#undef PICK
    if (src == NULL || (int)n != psik_param_count(kind))
        return -1;
    memcpy(p, src, n * sizeof *p);
    return 0;
}

/* Optional arguments: kind names to bench (all kinds when none). */
static int wanted(int argc, char **argv, const char *name)
{
    int a;
    if (argc < 2)
        return 1;
    for (a = 1; a < argc; a++)
        if (strcmp(argv[a], name) == 0)
            return 1;
    return 0;
}

int main(int argc, char **argv)
{
    unsigned long long lcg = 88172645463325252ULL;
    double t_exp, t_empty, nb, np;
    int i, kind, bad = 0;
    static unsigned char table_mem[1 << 20];

    for (i = 0; i < NPT; i++) {
        double u;
        lcg = lcg * 6364136223846793005ULL + 1442695040888963407ULL;
        u = (double)(lcg >> 11) / 9007199254740992.0;
        h_pts[i] = -pow(10.0, -2.0 + 7.0 * u);
    }
    {
        double e[ROUNDS], z[ROUNDS];
        for (i = 0; i < ROUNDS; i++) {
            e[i] = measure(run_exp, NULL);
            z[i] = measure(run_empty, NULL);
        }
        t_exp = median(e, ROUNDS);
        t_empty = median(z, ROUNDS);
    }
    printf("psik %s bench: %d heads log-uniform in suction [1e-2, 1e5], median of %d rounds\n",
           psik_version(), NPT, ROUNDS);
    printf("unit: one libm exp() = %.2f ns (loop overhead %.2f ns); 'exps' = ns / that\n\n",
           t_exp, t_empty);
    printf("%-10s %-8s %10s %10s %8s %8s %8s\n", "kind", "path", "base ns", "psik ns",
           "ratio", "exps", "agree");

    for (kind = 1; kind <= 64; kind++) {
        bench_model bm;
        psik_model m;
        psik_table *t = NULL;
        job j;
        const char *name = psik_kind_name((psik_kind)kind);
        double bth[NPT], bk[NPT], bc[NPT], bdk[NPT], agree;
        struct { const char *path; loop_fn base, mine; } rows[] = {
            {"theta", base_theta, psik_theta_loop},
            {"k", base_k, psik_k_loop},
            {"eval", base_all, psik_eval_loop},
            {"batch", base_all, psik_batch_loop},
            {"table", base_all, psik_table_loop},
        };
        size_t r;
        if (name == NULL || !wanted(argc, argv, name))
            continue;
        memset(&bm, 0, sizeof bm);
        bm.kind = (psik_kind)kind;
        if (bench_params(bm.kind, bm.par) != 0 || !baseline_has(bm.kind)) {
            printf("%-10s (no bench model or baseline for this kind)\n", name);
            continue;
        }
        if (psik_init(&m, bm.kind, bm.par) != PSIK_OK) {
            printf("%-10s (psik_init refused the bench model)\n", name);
            continue;
        }
        {
            size_t knots = psik_table_knots(-1e5, -1e-2, 0.0);
            size_t need = psik_table_bytes(knots);
            if (need <= sizeof table_mem)
                psik_table_build(&m, -1e5, -1e-2, knots, table_mem, sizeof table_mem, &t, NULL);
        }
        j.bm = &bm; j.m = &m; j.t = t;
        base_all(&j);
        memcpy(bth, o_th, sizeof bth); memcpy(bk, o_k, sizeof bk);
        memcpy(bc, o_c, sizeof bc); memcpy(bdk, o_dk, sizeof bdk);
        for (r = 0; r < sizeof rows / sizeof rows[0]; r++) {
            if (rows[r].mine == psik_table_loop && t == NULL) {
                printf("%-10s %-8s (table could not be built)\n", name, rows[r].path);
                continue;
            }
            rows[r].mine(&j);
            agree = 0.0;
            if (r != 1) {
                double a = reldiff(o_th, bth, NPT);
                if (a > agree) agree = a;
            }
            if (r != 0) {
                double a = reldiff(o_k, bk, NPT);
                if (a > agree) agree = a;
            }
            if (r >= 2) {
                double a = reldiff(o_c, bc, NPT), b2 = reldiff(o_dk, bdk, NPT);
                if (a > agree) agree = a;
                if (b2 > agree) agree = b2;
            }
            pair(rows[r].base, rows[r].mine, &j, &nb, &np);
            printf("%-10s %-8s %10.2f %10.2f %7.1fx %8.2f %8.1e%s\n", name, rows[r].path,
                   nb, np, nb / np, np / t_exp, agree,
                   agree > 1e-3 ? "  DISAGREES" : "");
            if (agree > 1e-3)
                bad++;
        }
    }
    printf("\nratio = baseline ns / psik ns (higher is faster); agree = largest relative\n"
           "difference from the baseline over theta, K, C, dK/dh, values below 1e-200\n"
           "counted absolutely (the baseline's own rounding dominates it at the dry\n"
           "end; the table path's own error is what psik_table_build reports).\n");
    return bad ? 1 : 0;
}
