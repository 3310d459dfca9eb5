/* bench_fit.c - time of psik_fit (default options: 8 Levenberg-Marquardt
 * starts) per data set of tests/data/fit_scipy.txt, printed as
 * "set NAME psik_us T sse S" lines for tests/bench/fit/run.sh. Each set is
 * fitted repeatedly for at least 0.3 s and the mean time is reported. */
#define _POSIX_C_SOURCE 199309L
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "psik.h"

static double now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

int main(int argc, char **argv)
{
    const char *path = argc > 1 ? argv[1] : "tests/data/fit_scipy.txt";
    FILE *f = fopen(path, "r");
    char line[4096], name[64] = "";
    double ht[64], th[64], hk[64], kk[64];
    int nt = 0, nk = 0, inset = 0;
    if (f == NULL) {
        fprintf(stderr, "bench_fit: cannot open %s\n", path);
        return 1;
    }
    while (fgets(line, sizeof line, f)) {
        if (strncmp(line, "set ", 4) == 0) {
            sscanf(line + 4, "%63s", name);
            nt = nk = 0;
            inset = 1;
        } else if (inset && strncmp(line, "theta ", 6) == 0 && nt < 64) {
            sscanf(line + 6, "%lf %lf", &ht[nt], &th[nt]);
            nt++;
        } else if (inset && strncmp(line, "k ", 2) == 0 && nk < 64) {
            sscanf(line + 2, "%lf %lf", &hk[nk], &kk[nk]);
            nk++;
        } else if (inset && strncmp(line, "end", 3) == 0) {
            psik_fit_data d;
            psik_fit_result r;
            double t0, t1;
            long reps = 0;
            memset(&d, 0, sizeof d);
            d.n_theta = (size_t)nt; d.h_theta = ht; d.theta = th;
            d.n_k = (size_t)nk; d.h_k = hk; d.k = kk;
            t0 = now();
            do {
                if (psik_fit(PSIK_VGM, &d, NULL, &r, NULL, 0) != PSIK_OK) {
                    fprintf(stderr, "bench_fit: %s failed\n", name);
                    return 1;
                }
                reps++;
                t1 = now();
            } while (t1 - t0 < 0.3);
            printf("set %s psik_us %.1f sse %.12e starts %d iterations %d evaluations %d\n", name,
                   1e6 * (t1 - t0) / (double)reps, r.sse, r.starts, r.iterations, r.evaluations);
            inset = 0;
        }
    }
    fclose(f);
    return 0;
}
