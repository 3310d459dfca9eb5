/* refcheck.c - see refcheck.h. */
#include "refcheck.h"

#include <float.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

int rc_load(const char *name, rc_table *t)
{
    const char *dir = getenv("PSIK_DATA_DIR");
    FILE *fp;
    char line[8192];
    size_t cap = 0;
    int lineno = 0;
    memset(t, 0, sizeof *t);
    snprintf(t->path, sizeof t->path, "%s/ref_%s.txt", dir ? dir : "tests/data", name);
    fp = fopen(t->path, "r");
    if (fp == NULL) {
        fprintf(stderr, "refcheck: cannot open %s\n", t->path);
        return -1;
    }
    while (fgets(line, sizeof line, fp) != NULL) {
        rc_row r;
        char *p = line, *end;
        char kname[32];
        int i, used;
        lineno++;
        if (line[0] == '#' || line[0] == '\n')
            continue;
        memset(&r, 0, sizeof r);
        if (sscanf(p, "%31s%n", kname, &used) != 1)
            continue;
        p += used;
        r.kind = psik_kind_from_name(kname);
        r.npar = psik_param_count(r.kind);
        if (r.kind == 0 || r.npar <= 0) {
            fprintf(stderr, "refcheck: %s:%d: unknown kind '%s'\n", t->path, lineno, kname);
            fclose(fp);
            rc_free(t);
            return -1;
        }
        for (i = 0; i < r.npar + 1 + RC_NVAL + RC_NCOND; i++) {
            double v = strtod(p, &end);
            if (end == p) {
                fprintf(stderr, "refcheck: %s:%d: field %d is not a number\n",
                        t->path, lineno, i + 2);
                fclose(fp);
                rc_free(t);
                return -1;
            }
            p = end;
            if (i < r.npar) r.par[i] = v;
            else if (i == r.npar) r.h = v;
            else if (i < r.npar + 1 + RC_NVAL) r.v[i - r.npar - 1] = v;
            else r.c[i - r.npar - 1 - RC_NVAL] = v;
        }
        r.line = lineno;
        if (t->n == cap) {
            size_t nc = cap ? 2 * cap : 1024;
            rc_row *nr = realloc(t->rows, nc * sizeof *nr);
            if (nr == NULL) {
                fclose(fp);
                rc_free(t);
                return -1;
            }
            t->rows = nr;
            cap = nc;
        }
        t->rows[t->n++] = r;
    }
    fclose(fp);
    if (t->n == 0) {
        fprintf(stderr, "refcheck: %s has no data rows\n", t->path);
        return -1;
    }
    return 0;
}

void rc_free(rc_table *t)
{
    free(t->rows);
    t->rows = NULL;
    t->n = 0;
}

double rc_ulps(double got, double want)
{
    double u;
    if (got == want)
        return 0.0;
    if (!isfinite(got) || !isfinite(want))
        return INFINITY;
    u = fabs(want) < DBL_MIN ? 4.9406564584124654e-324
                             : nextafter(fabs(want), INFINITY) - fabs(want);
    return fabs(got - want) / u;
}

void rc_max_init(rc_max *m, const char *what)
{
    memset(m, 0, sizeof *m);
    m->what = what;
}

void rc_max_add(rc_max *m, double got, double want, double cond, const rc_row *r)
{
    rc_max_add_tol(m, got, want, cond, 0.0, r);
}

void rc_max_add_tol(rc_max *m, double got, double want, double cond, double abs_tol,
                    const rc_row *r)
{
    double e = rc_ulps(got, want);
    if (abs_tol > 0.0 && isfinite(got) && fabs(got - want) <= abs_tol)
        e = 0.0;
    double c = cond > 1.0 ? cond : 1.0;
    double s = e / c;
    m->count++;
    if (s > m->worst || (isnan(s) && !isnan(m->worst))) {
        m->worst = isnan(s) ? INFINITY : s;
        m->worst_ulps = e;
        m->cond = cond;
        m->line = r->line;
        m->h = r->h;
    }
}

void rc_max_print(const rc_max *m, const char *kind)
{
    printf("# %-9s %-12s max %7.3f ulp/max(1,cond)  (%.3g ulp raw, cond %.3g, line %d, h = %.6g; %ld points)\n",
           kind, m->what, m->worst, m->worst_ulps, m->cond, m->line, m->h, m->count);
}
