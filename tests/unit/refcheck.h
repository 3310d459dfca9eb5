/* refcheck.h - reading the mpmath reference tables (tests/data/ref_*.txt)
 * and measuring errors in ulps relative to the condition number. */
#ifndef REFCHECK_H
#define REFCHECK_H

#include <stddef.h>
#include "psik.h"

/* Columns of one reference row, in file order after the parameters. */
enum { RC_SE, RC_THETA, RC_KR, RC_K, RC_CAP, RC_DK, RC_DIFF, RC_NVAL };
enum { RC_C_SE, RC_C_THETA, RC_C_KR, RC_C_K, RC_C_CAP, RC_C_DK, RC_C_HEAD,
       RC_C_HEAD_SE, RC_C_KTHETA, RC_C_DIFF, RC_NCOND };

typedef struct rc_row {
    psik_kind kind;
    int npar;
    double par[PSIK_MAX_PARAMS];
    double h;
    double v[RC_NVAL];
    double c[RC_NCOND];
    int line;
} rc_row;

typedef struct rc_table {
    rc_row *rows;
    size_t n;
    char path[256];
} rc_table;

/* Load tests/data/ref_<name>.txt (directory from $PSIK_DATA_DIR, default
 * tests/data). Returns 0 on success; prints why and returns -1 otherwise. */
int rc_load(const char *name, rc_table *t);
void rc_free(rc_table *t);

/* |got - want| in units of the last place of want (subnormal-aware).
 * Both zero -> 0; NaN or inf where want is finite -> +inf. */
double rc_ulps(double got, double want);

/* Largest error seen for one function, with where it happened. */
typedef struct rc_max {
    const char *what;
    double worst;      /* ulps / max(1, cond) */
    double worst_ulps; /* raw ulps at that row */
    double cond;
    int line;
    double h;
    long count;
} rc_max;

void rc_max_init(rc_max *m, const char *what);
void rc_max_add(rc_max *m, double got, double want, double cond, const rc_row *r);
/* The same, first forgiving an absolute error abs_tol (for results that
 * underflow into the subnormal range, where a product with a scale such as
 * ks carries that much absolute error by IEEE rounding alone). */
void rc_max_add_tol(rc_max *m, double got, double want, double cond, double abs_tol,
                    const rc_row *r);
/* Print "# <kind> <what>: max <x> ulp/max(1,cond) (<y> ulp raw, cond <c>) at line L, h = H, N points" */
void rc_max_print(const rc_max *m, const char *kind);

#endif
