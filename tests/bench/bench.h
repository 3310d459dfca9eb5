/* bench.h - shared by the make bench program (tests/bench/). */
#ifndef PSIK_BENCH_H
#define PSIK_BENCH_H

#include "psik.h"

typedef struct bench_model {
    psik_kind kind;
    double par[PSIK_MAX_PARAMS];
} bench_model;

/* 1 when baseline.c has the textbook formulas of this kind. */
int baseline_has(psik_kind kind);
/* theta, K, C, dK/dh at head h, the textbook way (pow, exp, erfc). */
void baseline_point(const bench_model *bm, double h, double *th, double *k, double *c, double *dk);
double baseline_theta(const bench_model *bm, double h);
double baseline_k(const bench_model *bm, double h);

#endif
