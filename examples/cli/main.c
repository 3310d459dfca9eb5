/* psik - command-line tool: fit parameters to laboratory data, tabulate a
 * model for a solver, and compare someone else's table against psik.
 * Run `psik --help` for the commands, options and exit codes. */
#include "csv.h"
#include "svg.h"
#include "psik.h"

#include <errno.h>
#include <float.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define EX_OK     0
#define EX_USAGE  1
#define EX_INPUT  2
#define EX_FAIL   3
#define EX_OUTPUT 4

#define MAXKINDS 64

static const char *usage_text =
"psik - hydraulic functions of unsaturated soil (library version %s)\n"
"\n"
"Usage:\n"
"  psik fit FILE.csv [--conductivity FILE.csv] [--model NAME|all] [--fix name=value]...\n"
"           [--bound name=lo:hi]... [--k-weight W] [--confidence C] [--units h=U,k=U]\n"
"           [--plot PREFIX [--plot-models N]] [--table-out FILE.csv [--from H --to H --points N]] [--json]\n"
"  psik table --model NAME --par name=value,... [--from H --to H --points N]\n"
"           [--units h=U,k=U] [--out FILE.csv] [--json]\n"
"  psik compare --model NAME --par name=value,... FILE.csv [--tol T] [--json]\n"
"  psik models            list the model kinds and their parameters\n"
"  psik --help | --version\n"
"\n"
"Input tables (CSV): '#' lines are comments; the first other line names the\n"
"columns; then one number per column and row. Columns:\n"
"  h         pressure head (negative when unsaturated; h >= 0 is saturated)\n"
"  suction   instead of h: suction s = -h >= 0\n"
"  theta     volumetric water content (m3/m3, 0..1)\n"
"  k         hydraulic conductivity (> 0, the unit of ks)\n"
"  weight    optional weight of the row (>= 0; 0 drops it)\n"
"  compare also reads: se, kr, capacity (d theta/dh), dk_dh\n"
"Rows need not be sorted; repeated heads are replicates.\n"
"\n"
"fit: weighted least squares of theta and of log10 K (conductivity file),\n"
"  --model all fits every kind and ranks them by AICc. Parameters that the\n"
"  data cannot determine (ks, l without K data) are held and reported.\n"
"  --fix name=value holds a parameter; --bound name=lo:hi overrides a bound;\n"
"  --k-weight W weights the log10 K residuals against theta (default 1);\n"
"  --plot PREFIX writes PREFIX-retention.svg and PREFIX-conductivity.svg\n"
"  with the curves of the best N models (--plot-models N, default 5);\n"
"  --table-out FILE writes the property table (h, theta, k, capacity, dk_dh)\n"
"  of the best model for a solver.\n"
"table: properties of a model at heads from --from to --to (pressure heads,\n"
"  default -0.01 to -1e5; log-spaced in suction when both are negative,\n"
"  else even), --points N (default 41). --out writes CSV.\n"
"compare: reads a table made by other code and reports, per column, the\n"
"  largest relative difference from psik and the row where it occurs;\n"
"  --tol T makes the exit code 3 when any column exceeds T.\n"
"--units h=cm,k=cm/d declares the units of the data (labels only: psik does\n"
"  not convert); parameters are labelled from them (alpha in 1/cm, ks in cm/d).\n"
"--json prints one JSON object instead of tables.\n"
"Files are written to NAME.tmp and renamed, never left half-written.\n"
"\n"
"Exit codes: 0 success; 1 usage error (unknown option, model or parameter);\n"
"  2 input error (unreadable file, bad CSV, unusable data: the message names\n"
"  file, line and column); 3 fit failed or compare exceeded --tol;\n"
"  4 an output file could not be written.\n";

static void usage(FILE *f)
{
    fprintf(f, usage_text, psik_version());
}

static int die(int code, const char *fmt, const char *a, const char *b)
{
    fprintf(stderr, "psik: ");
    fprintf(stderr, fmt, a ? a : "", b ? b : "");
    fprintf(stderr, "\n");
    return code;
}

/* Split at sep: returns the next token of *s (NULL at the end). */
static char *next_tok(char **s, char sep)
{
    char *t = *s, *e;
    if (t == NULL)
        return NULL;
    e = strchr(t, sep);
    if (e != NULL) {
        *e = '\0';
        *s = e + 1;
    } else {
        *s = NULL;
    }
    return t;
}

/* ------------------------------------------------------------ units */

typedef struct units {
    char h[32], k[32];
} units;

static int parse_units(const char *s, units *u)
{
    char buf[200], *tok, *save = buf;
    if (strlen(s) >= sizeof buf)
        return -1;
    strcpy(buf, s);
    for (tok = next_tok(&save, ','); tok; tok = next_tok(&save, ',')) {
        char *eq = strchr(tok, '=');
        if (eq == NULL || strlen(eq + 1) == 0 || strlen(eq + 1) >= 32)
            return -1;
        *eq = '\0';
        if (strcmp(tok, "h") == 0)
            strcpy(u->h, eq + 1);
        else if (strcmp(tok, "k") == 0)
            strcpy(u->k, eq + 1);
        else
            return -1;
    }
    return 0;
}

/* Unit label of a parameter, derived from its name and the declared units. */
static void param_unit(const char *name, const units *u, char *out, size_t cap)
{
    if (strncmp(name, "theta", 5) == 0)
        snprintf(out, cap, "m3/m3");
    else if (strncmp(name, "alpha", 5) == 0)
        snprintf(out, cap, u->h[0] ? "1/%s" : "1/[h]", u->h);
    else if (strncmp(name, "h_", 2) == 0)
        snprintf(out, cap, "%s", u->h[0] ? u->h : "[h]");
    else if (strcmp(name, "ks") == 0)
        snprintf(out, cap, "%s", u->k[0] ? u->k : "[K]");
    else
        snprintf(out, cap, "-");
}

/* ------------------------------------------------------------ output files */

static FILE *out_open(const char *path, char *tmp, size_t cap)
{
    if (strlen(path) + 5 > cap)
        return NULL;
    snprintf(tmp, cap, "%s.tmp", path);
    return fopen(tmp, "w");
}

static int out_close(FILE *f, const char *tmp, const char *path)
{
    int bad = ferror(f);
    bad |= fclose(f);
    if (bad || rename(tmp, path) != 0) {
        fprintf(stderr, "psik: %s: cannot write: %s\n", path, strerror(errno));
        remove(tmp);
        return EX_OUTPUT;
    }
    return EX_OK;
}

/* ------------------------------------------------------------ JSON */

static void jnum(FILE *f, double v)
{
    if (isfinite(v))
        fprintf(f, "%.17g", v);
    else
        fputs("null", f);
}

static void jstr(FILE *f, const char *s)
{
    fputc('"', f);
    for (; s && *s; s++) {
        unsigned char c = (unsigned char)*s;
        if (c == '"' || c == '\\') fprintf(f, "\\%c", c);
        else if (c < 0x20) fprintf(f, "\\u%04x", c);
        else fputc(c, f);
    }
    fputc('"', f);
}

/* A JSON object mapping the parameter names of kind to n values. */
static void jparams(FILE *f, psik_kind kind, int n, const double *v)
{
    int j;
    fputc('{', f);
    for (j = 0; j < n; j++) {
        fprintf(f, "%s", j ? ", " : "");
        jstr(f, psik_param_name(kind, j));
        fprintf(f, ": ");
        jnum(f, v[j]);
    }
    fputc('}', f);
}

/* ------------------------------------------------------------ models and parameters */

static psik_kind kind_arg(const char *name)
{
    return psik_kind_from_name(name);
}

static void list_kinds(FILE *f)
{
    int k, j;
    for (k = 1; k < MAXKINDS; k++) {
        const char *nm = psik_kind_name((psik_kind)k);
        if (nm == NULL)
            continue;
        fprintf(f, "%-10s", nm);
        for (j = 0; j < psik_param_count((psik_kind)k); j++)
            fprintf(f, " %s", psik_param_name((psik_kind)k, j));
        fprintf(f, "\n           %s\n", psik_kind_title((psik_kind)k));
    }
}

/* --par name=value,...: l may be left out (0.5, Mualem 1976). */
static int parse_par(psik_kind kind, const char *s, double *par)
{
    char buf[1024], *tok, *save = buf;
    int np = psik_param_count(kind), seen[PSIK_MAX_PARAMS] = {0}, j;
    if (strlen(s) >= sizeof buf) {
        fprintf(stderr, "psik: --par is too long\n");
        return EX_USAGE;
    }
    strcpy(buf, s);
    for (tok = next_tok(&save, ','); tok; tok = next_tok(&save, ',')) {
        char *eq = strchr(tok, '='), *end;
        int i;
        double v;
        if (eq == NULL) {
            fprintf(stderr, "psik: --par: '%s' is not name=value\n", tok);
            return EX_USAGE;
        }
        *eq = '\0';
        i = psik_param_index(kind, tok);
        if (i < 0) {
            fprintf(stderr, "psik: --par: %s has no parameter '%s' (it has:", psik_kind_name(kind), tok);
            for (j = 0; j < np; j++) fprintf(stderr, " %s", psik_param_name(kind, j));
            fprintf(stderr, ")\n");
            return EX_USAGE;
        }
        errno = 0;
        v = strtod(eq + 1, &end);
        if (end == eq + 1 || *end != '\0' || !isfinite(v)) {
            fprintf(stderr, "psik: --par: %s = '%s' is not a finite number\n", tok, eq + 1);
            return EX_USAGE;
        }
        par[i] = v;
        seen[i] = 1;
    }
    for (j = 0; j < np; j++)
        if (!seen[j]) {
            if (strcmp(psik_param_name(kind, j), "l") == 0) {
                par[j] = 0.5;
                continue;
            }
            fprintf(stderr, "psik: --par: %s needs %s (missing)\n", psik_kind_name(kind),
                    psik_param_name(kind, j));
            return EX_USAGE;
        }
    {
        char msg[256];
        if (psik_check(kind, par, msg, sizeof msg) != PSIK_OK) {
            fprintf(stderr, "psik: --par: %s\n", msg);
            return EX_USAGE;
        }
    }
    return EX_OK;
}

/* ------------------------------------------------------------ data */

typedef struct dataset {
    const char *path;
    size_t n;
    double *h, *v, *w;
    long *line;
    int vcol;         /* column (1-based) of the value, for messages */
} dataset;

static void dataset_free(dataset *d)
{
    free(d->h);
    free(d->v);
    free(d->w);
    free(d->line);
    memset(d, 0, sizeof *d);
}

/* Read h (or suction), the value column and an optional weight. */
static int load_set(const char *path, const char *vname, dataset *d)
{
    csv_table t;
    char err[512];
    int ch, cs, cv, cw, i;
    size_t r;
    static const char *known[] = {"h", "suction", "theta", "k", "weight", NULL};
    memset(d, 0, sizeof *d);
    d->path = path;
    if (csv_read_file(path, &t, err, sizeof err) != 0) {
        fprintf(stderr, "psik: %s\n", err);
        return EX_INPUT;
    }
    for (i = 0; i < t.ncol; i++) {
        int j, ok = 0;
        for (j = 0; known[j]; j++)
            if (strcmp(t.name[i], known[j]) == 0) ok = 1;
        if (!ok) {
            fprintf(stderr, "psik: %s: column %d '%s' is not one of h, suction, theta, k, weight\n",
                    path, i + 1, t.name[i]);
            csv_free(&t);
            return EX_INPUT;
        }
    }
    ch = csv_col(&t, "h");
    cs = csv_col(&t, "suction");
    cv = csv_col(&t, vname);
    cw = csv_col(&t, "weight");
    if ((ch < 0) == (cs < 0) || cv < 0) {
        fprintf(stderr, "psik: %s: the header needs %s and one of h or suction (has:", path,
                vname);
        for (i = 0; i < t.ncol; i++) fprintf(stderr, " %s", t.name[i]);
        fprintf(stderr, ")\n");
        csv_free(&t);
        return EX_INPUT;
    }
    if (t.nrow == 0) {
        fprintf(stderr, "psik: %s: no data rows after the header\n", path);
        csv_free(&t);
        return EX_INPUT;
    }
    d->n = t.nrow;
    d->h = (double *)malloc(t.nrow * sizeof(double));
    d->v = (double *)malloc(t.nrow * sizeof(double));
    d->w = (double *)malloc(t.nrow * sizeof(double));
    d->line = (long *)malloc(t.nrow * sizeof(long));
    d->vcol = cv + 1;
    if (!d->h || !d->v || !d->w || !d->line) {
        csv_free(&t);
        dataset_free(d);
        fprintf(stderr, "psik: out of memory\n");
        return EX_INPUT;
    }
    for (r = 0; r < t.nrow; r++) {
        const double *row = t.v + r * (size_t)t.ncol;
        long ln = t.line[r];
        double v = row[cv];
        if (cs >= 0 && row[cs] < 0.0) {
            fprintf(stderr, "psik: %s:%ld:%d: suction %g is negative (suction is -h >= 0; "
                    "use an h column for pressure heads)\n", path, ln, cs + 1, row[cs]);
            goto bad;
        }
        d->h[r] = ch >= 0 ? row[ch] : -row[cs];
        d->v[r] = v;
        d->w[r] = cw >= 0 ? row[cw] : 1.0;
        d->line[r] = ln;
        if (strcmp(vname, "theta") == 0 && (v < 0.0 || v > 1.0)) {
            fprintf(stderr, "psik: %s:%ld:%d: theta = %g is outside 0..1 (volumetric water "
                    "content as a fraction; divide percentages by 100)\n", path, ln, cv + 1, v);
            goto bad;
        }
        if (strcmp(vname, "k") == 0 && !(v > 0.0)) {
            fprintf(stderr, "psik: %s:%ld:%d: k = %g must be greater than 0 (it is fitted as "
                    "log10 K)\n", path, ln, cv + 1, v);
            goto bad;
        }
        if (cw >= 0 && row[cw] < 0.0) {
            fprintf(stderr, "psik: %s:%ld:%d: weight %g is negative\n", path, ln, cw + 1, row[cw]);
            goto bad;
        }
    }
    csv_free(&t);
    return EX_OK;
bad:
    csv_free(&t);
    dataset_free(d);
    return EX_INPUT;
}

/* Library messages name "retention point N" / "conductivity point N":
 * prefix them with file:line. */
static void report_fit_error(const char *msg, const dataset *ret, const dataset *con)
{
    unsigned long pt;
    const char *p;
    if ((p = strstr(msg, "retention point ")) != NULL && sscanf(p + 16, "%lu", &pt) == 1 &&
        pt >= 1 && pt <= ret->n) {
        fprintf(stderr, "psik: %s:%ld: %s\n", ret->path, ret->line[pt - 1], msg);
        return;
    }
    if (con != NULL && (p = strstr(msg, "conductivity point ")) != NULL &&
        sscanf(p + 19, "%lu", &pt) == 1 && pt >= 1 && pt <= con->n) {
        fprintf(stderr, "psik: %s:%ld: %s\n", con->path, con->line[pt - 1], msg);
        return;
    }
    fprintf(stderr, "psik: %s: %s\n", ret->path, msg);
}

/* ------------------------------------------------------------ heads */

static int make_heads(double from, double to, int n, double *h)
{
    int i;
    if (n < 2)
        return -1;
    for (i = 0; i < n; i++) {
        double t = (double)i / (double)(n - 1);
        if (from < 0.0 && to < 0.0)
            h[i] = -exp(log(-from) + t * (log(-to) - log(-from)));
        else
            h[i] = from + t * (to - from);
    }
    h[0] = from;
    h[n - 1] = to;
    return 0;
}

/* Property table of a model as CSV (for a solver). */
static void write_property_csv(FILE *f, const psik_model *m, const double *h, int n,
                               const units *u, const char *origin)
{
    int i, j;
    psik_kind kind = (psik_kind)m->kind;
    fprintf(f, "# psik %s property table: %s\n", psik_version(), origin);
    fprintf(f, "# model %s:", psik_kind_name(kind));
    for (j = 0; j < m->npar; j++)
        fprintf(f, " %s=%.17g", psik_param_name(kind, j), m->par[j]);
    fprintf(f, "\n# units: h %s, k %s, capacity 1/%s, dk_dh %s/%s\n",
            u->h[0] ? u->h : "[h]", u->k[0] ? u->k : "[K]", u->h[0] ? u->h : "[h]",
            u->k[0] ? u->k : "[K]", u->h[0] ? u->h : "[h]");
    fprintf(f, "h,theta,k,capacity,dk_dh\n");
    for (i = 0; i < n; i++) {
        psik_state s;
        psik_eval(m, h[i], &s);
        fprintf(f, "%.17g,%.17g,%.17g,%.17g,%.17g\n", h[i], s.theta, s.k, s.capacity, s.dk_dh);
    }
}

typedef struct range_opt {
    double from, to;
    int points;
} range_opt;

static int parse_double(const char *opt, const char *s, double *v)
{
    char *end;
    errno = 0;
    *v = strtod(s, &end);
    if (end == s || *end != '\0' || !isfinite(*v)) {
        fprintf(stderr, "psik: %s: '%s' is not a finite number\n", opt, s);
        return EX_USAGE;
    }
    return EX_OK;
}

/* ------------------------------------------------------------ fit */

typedef struct fit_one {
    psik_kind kind;
    psik_fit_result r;
    int ok;
    char msg[256];
} fit_one;

/* Chart series for a plot: the measured points (n of them at suctions dx,
 * values dv) and the curve f(model, h) of each of the best nplot fits over
 * the suctions xs. Returns the number of series written into ser. */
static int plot_series(const fit_one *fits, const int *map, const size_t *order, int nok,
                       int nplot, const double *dx, const double *dv, size_t n,
                       const double *xs, int npts, double *ys, char (*labels)[96],
                       svg_series *ser, double (*f)(const psik_model *, double))
{
    int m, s, ns = 1;
    ser[0].label = "measured";
    ser[0].n = n; ser[0].x = dx; ser[0].y = dv; ser[0].markers = 1;
    for (m = 0; m < nok && m < nplot; m++) {
        const fit_one *fo = &fits[map[order[m]]];
        psik_model mod;
        double *y = ys + (size_t)m * (size_t)npts;
        if (psik_init(&mod, fo->kind, fo->r.par) != PSIK_OK)
            continue;
        for (s = 0; s < npts; s++)
            y[s] = f(&mod, -xs[s]);
        snprintf(labels[ns], 96, "%s (AICc %.1f)", psik_kind_name(fo->kind), fo->r.aicc);
        ser[ns].label = labels[ns];
        ser[ns].n = (size_t)npts; ser[ns].x = xs; ser[ns].y = y; ser[ns].dashed = m > 0 && m % 2 == 1;
        ns++;
    }
    return ns;
}

static const char *flag_word(int fl)
{
    if (fl & PSIK_FIT_AUTOFIXED) return "held: not determined by the data";
    if (fl & PSIK_FIT_FIXED) return "held (--fix)";
    if (fl & PSIK_FIT_AT_LOWER) return "at lower bound";
    if (fl & PSIK_FIT_AT_UPPER) return "at upper bound";
    if (fl & PSIK_FIT_UNDEFINED) return "error undefined";
    return "";
}

static void print_fit_text(const fit_one *fo, const units *u, int rank)
{
    const psik_fit_result *r = &fo->r;
    int j, k, np = r->npar;
    char un[48];
    printf("\n%d. %s - %s\n", rank, psik_kind_name(fo->kind), psik_kind_title(fo->kind));
    printf("   %-9s %14s %12s   %-30s %-8s %s\n", "parameter", "estimate", "std. error",
           "95% confidence interval", "unit", "");
    for (j = 0; j < np; j++) {
        char ci[64];
        int fl = r->flag[j];
        param_unit(psik_param_name(fo->kind, j), u, un, sizeof un);
        if (fl & (PSIK_FIT_FIXED | PSIK_FIT_AUTOFIXED) || !isfinite(r->std_err[j]))
            snprintf(ci, sizeof ci, "-");
        else
            snprintf(ci, sizeof ci, "[%.6g, %.6g]", r->ci_lo[j], r->ci_hi[j]);
        if (fl & (PSIK_FIT_FIXED | PSIK_FIT_AUTOFIXED))
            printf("   %-9s %14.6g %12s   %-30s %-8s %s\n", psik_param_name(fo->kind, j),
                   r->par[j], "-", ci, un, flag_word(fl));
        else
            printf("   %-9s %14.6g %12.4g   %-30s %-8s %s\n", psik_param_name(fo->kind, j),
                   r->par[j], r->std_err[j], ci, un, flag_word(fl));
    }
    printf("   SSE %.6g (theta %.4g, log10 K %.4g)  RMSE %.4g  R2(theta) %.5f",
           r->sse, r->sse_theta, r->sse_logk, r->rmse, r->r2);
    if (isfinite(r->r2_logk))
        printf("  R2(log10 K) %.4f", r->r2_logk);
    printf("\n   AIC %.3f  AICc %.3f  BIC %.3f  N %d  free %d  dof %d\n", r->aic, r->aicc, r->bic,
           r->n_obs, r->n_free, r->dof);
    printf("   %d iterations in %d starts; stopped: %s\n", r->iterations, r->starts,
           psik_fit_stop_name(r->stop));
    if (r->note[0])
        printf("   note: %s\n", r->note);
    if (r->n_free > 1) {
        printf("   correlation:\n   %-9s", "");
        for (k = 0; k < np; k++)
            if (!(r->flag[k] & (PSIK_FIT_FIXED | PSIK_FIT_AUTOFIXED)))
                printf(" %8s", psik_param_name(fo->kind, k));
        printf("\n");
        for (j = 0; j < np; j++) {
            if (r->flag[j] & (PSIK_FIT_FIXED | PSIK_FIT_AUTOFIXED))
                continue;
            printf("   %-9s", psik_param_name(fo->kind, j));
            for (k = 0; k < np; k++)
                if (!(r->flag[k] & (PSIK_FIT_FIXED | PSIK_FIT_AUTOFIXED)))
                    printf(" %8.4f", r->corr[j][k]);
            printf("\n");
        }
    }
}

static void print_fit_json_one(FILE *f, const fit_one *fo, int rank, double weight)
{
    const psik_fit_result *r = &fo->r;
    int j, k, np = r->npar;
    fprintf(f, "{\"model\": ");
    jstr(f, psik_kind_name(fo->kind));
    fprintf(f, ", \"rank\": %d, \"akaike_weight\": ", rank);
    jnum(f, weight);
    fprintf(f, ", \"parameters\": ");
    jparams(f, fo->kind, np, r->par);
    fprintf(f, ", \"std_err\": ");
    jparams(f, fo->kind, np, r->std_err);
    fprintf(f, ", \"confidence_interval\": {");
    for (j = 0; j < np; j++) {
        fprintf(f, "%s", j ? ", " : "");
        jstr(f, psik_param_name(fo->kind, j));
        fprintf(f, ": [");
        jnum(f, r->ci_lo[j]);
        fprintf(f, ", ");
        jnum(f, r->ci_hi[j]);
        fprintf(f, "]");
    }
    fprintf(f, "}, \"status\": {");
    for (j = 0; j < np; j++) {
        int fl = r->flag[j];
        fprintf(f, "%s", j ? ", " : "");
        jstr(f, psik_param_name(fo->kind, j));
        fprintf(f, ": ");
        jstr(f, (fl & PSIK_FIT_AUTOFIXED) ? "auto-held" : (fl & PSIK_FIT_FIXED) ? "held"
                : (fl & PSIK_FIT_AT_LOWER) ? "lower-bound" : (fl & PSIK_FIT_AT_UPPER) ? "upper-bound"
                : (fl & PSIK_FIT_UNDEFINED) ? "undefined-error" : "free");
    }
    fprintf(f, "}, \"correlation\": [");
    for (j = 0; j < np; j++) {
        fprintf(f, "%s[", j ? ", " : "");
        for (k = 0; k < np; k++) {
            fprintf(f, "%s", k ? ", " : "");
            jnum(f, (r->flag[j] | r->flag[k]) & (PSIK_FIT_FIXED | PSIK_FIT_AUTOFIXED) ? NAN : r->corr[j][k]);
        }
        fprintf(f, "]");
    }
    fprintf(f, "], \"confidence\": ");
    jnum(f, r->confidence);
    fprintf(f, ", \"t_value\": "); jnum(f, r->t_value);
    fprintf(f, ", \"sse\": "); jnum(f, r->sse);
    fprintf(f, ", \"sse_theta\": "); jnum(f, r->sse_theta);
    fprintf(f, ", \"sse_logk\": "); jnum(f, r->sse_logk);
    fprintf(f, ", \"rmse\": "); jnum(f, r->rmse);
    fprintf(f, ", \"r2\": "); jnum(f, r->r2);
    fprintf(f, ", \"r2_logk\": "); jnum(f, r->r2_logk);
    fprintf(f, ", \"aic\": "); jnum(f, r->aic);
    fprintf(f, ", \"aicc\": "); jnum(f, r->aicc);
    fprintf(f, ", \"bic\": "); jnum(f, r->bic);
    fprintf(f, ", \"n_obs\": %d, \"n_free\": %d, \"dof\": %d, \"iterations\": %d, \"starts\": %d, \"stop\": ",
            r->n_obs, r->n_free, r->dof, r->iterations, r->starts);
    jstr(f, psik_fit_stop_name(r->stop));
    fprintf(f, ", \"note\": ");
    jstr(f, r->note);
    fprintf(f, "}");
}

static int apply_name_value(psik_kind kind, const char *spec, int is_bound, psik_fit_options *o,
                            int strict)
{
    char buf[128], *eq, *end;
    int i;
    if (strlen(spec) >= sizeof buf)
        return EX_USAGE;
    strcpy(buf, spec);
    eq = strchr(buf, '=');
    if (eq == NULL) {
        fprintf(stderr, "psik: %s '%s': expected name=%s\n", is_bound ? "--bound" : "--fix", spec,
                is_bound ? "lo:hi" : "value");
        return EX_USAGE;
    }
    *eq = '\0';
    i = psik_param_index(kind, buf);
    if (i < 0) {
        if (strict) {
            fprintf(stderr, "psik: %s: model %s has no parameter '%s'\n",
                    is_bound ? "--bound" : "--fix", psik_kind_name(kind), buf);
            return EX_USAGE;
        }
        return EX_OK;
    }
    if (is_bound) {
        char *colon = strchr(eq + 1, ':');
        double lo, hi;
        if (colon == NULL) {
            fprintf(stderr, "psik: --bound '%s': expected name=lo:hi\n", spec);
            return EX_USAGE;
        }
        *colon = '\0';
        lo = strtod(eq + 1, &end);
        if (end == eq + 1 || *end != '\0' || !isfinite(lo)) {
            fprintf(stderr, "psik: --bound '%s': lower bound is not a number\n", spec);
            return EX_USAGE;
        }
        hi = strtod(colon + 1, &end);
        if (end == colon + 1 || *end != '\0' || !isfinite(hi) || !(lo <= hi)) {
            fprintf(stderr, "psik: --bound '%s': upper bound is not a number >= the lower\n", spec);
            return EX_USAGE;
        }
        o->lo[i] = lo;
        o->hi[i] = hi;
    } else {
        double v = strtod(eq + 1, &end);
        if (end == eq + 1 || *end != '\0' || !isfinite(v)) {
            fprintf(stderr, "psik: --fix '%s': value is not a finite number\n", spec);
            return EX_USAGE;
        }
        o->fixed[i] = 1;
        o->value[i] = v;
    }
    return EX_OK;
}

static int cmd_fit(int argc, char **argv)
{
    const char *file = NULL, *kfile = NULL, *model = "vgm", *plot = NULL, *tout = NULL;
    const char *fixes[64], *bounds[64];
    int nfix = 0, nbound = 0, json = 0, i, nk = 0, code = EX_OK, nok = 0, nplot = 5;
    double kweight = 1.0, conf = 0.95;
    range_opt rg = {-0.01, -1e5, 41};
    units u;
    dataset ret, con;
    psik_kind kinds[MAXKINDS];
    fit_one *fits;
    memset(&u, 0, sizeof u);
    memset(&con, 0, sizeof con);
    for (i = 0; i < argc; i++) {
        const char *a = argv[i];
        const char *val = (i + 1 < argc) ? argv[i + 1] : NULL;
#define NEEDVAL() do { if (val == NULL) return die(EX_USAGE, "%s needs a value", a, NULL); i++; } while (0)
        if (strcmp(a, "--conductivity") == 0) { NEEDVAL(); kfile = val; }
        else if (strcmp(a, "--model") == 0) { NEEDVAL(); model = val; }
        else if (strcmp(a, "--fix") == 0) { NEEDVAL(); if (nfix < 64) fixes[nfix++] = val; }
        else if (strcmp(a, "--bound") == 0) { NEEDVAL(); if (nbound < 64) bounds[nbound++] = val; }
        else if (strcmp(a, "--k-weight") == 0) {
            NEEDVAL();
            if (parse_double(a, val, &kweight) || !(kweight > 0.0))
                return die(EX_USAGE, "--k-weight must be a positive number", NULL, NULL);
        }
        else if (strcmp(a, "--confidence") == 0) {
            NEEDVAL();
            if (parse_double(a, val, &conf) || !(conf > 0.0 && conf < 1.0))
                return die(EX_USAGE, "--confidence must be in (0, 1), e.g. 0.95", NULL, NULL);
        }
        else if (strcmp(a, "--units") == 0) {
            NEEDVAL();
            if (parse_units(val, &u) != 0)
                return die(EX_USAGE, "--units '%s': expected h=UNIT,k=UNIT (e.g. h=cm,k=cm/d)", val, NULL);
        }
        else if (strcmp(a, "--plot") == 0) { NEEDVAL(); plot = val; }
        else if (strcmp(a, "--plot-models") == 0) {
            NEEDVAL();
            nplot = atoi(val);
            if (nplot < 1 || nplot > MAXKINDS)
                return die(EX_USAGE, "--plot-models must be an integer in 1..64", NULL, NULL);
        }
        else if (strcmp(a, "--table-out") == 0) { NEEDVAL(); tout = val; }
        else if (strcmp(a, "--from") == 0) { NEEDVAL(); if (parse_double(a, val, &rg.from)) return EX_USAGE; }
        else if (strcmp(a, "--to") == 0) { NEEDVAL(); if (parse_double(a, val, &rg.to)) return EX_USAGE; }
        else if (strcmp(a, "--points") == 0) {
            NEEDVAL();
            rg.points = atoi(val);
            if (rg.points < 2 || rg.points > 1000000)
                return die(EX_USAGE, "--points must be an integer in 2..1000000", NULL, NULL);
        }
        else if (strcmp(a, "--json") == 0) json = 1;
        else if (a[0] == '-' && a[1] != '\0')
            return die(EX_USAGE, "fit: unknown option %s (see psik --help)", a, NULL);
        else if (file == NULL) file = a;
        else return die(EX_USAGE, "fit: more than one retention file (%s)", a, NULL);
#undef NEEDVAL
    }
    if (file == NULL)
        return die(EX_USAGE, "fit: give the retention data file (psik fit FILE.csv)", NULL, NULL);
    if (strcmp(model, "all") == 0) {
        int k;
        for (k = 1; k < MAXKINDS; k++)
            if (psik_kind_name((psik_kind)k) != NULL)
                kinds[nk++] = (psik_kind)k;
    } else {
        char buf[256], *tok, *save = buf;
        if (strlen(model) >= sizeof buf)
            return die(EX_USAGE, "--model: too long", NULL, NULL);
        strcpy(buf, model);
        for (tok = next_tok(&save, ','); tok && nk < MAXKINDS; tok = next_tok(&save, ',')) {
            psik_kind k = kind_arg(tok);
            if (k == 0) {
                fprintf(stderr, "psik: --model: unknown model '%s'; known models:\n", tok);
                list_kinds(stderr);
                return EX_USAGE;
            }
            kinds[nk++] = k;
        }
    }
    if (load_set(file, "theta", &ret) != EX_OK)
        return EX_INPUT;
    if (kfile != NULL && load_set(kfile, "k", &con) != EX_OK) {
        dataset_free(&ret);
        return EX_INPUT;
    }
    fits = (fit_one *)calloc((size_t)nk, sizeof(fit_one));
    if (fits == NULL) {
        dataset_free(&ret);
        dataset_free(&con);
        return die(EX_FAIL, "out of memory", NULL, NULL);
    }
    for (i = 0; i < nk; i++) {
        psik_fit_options o;
        psik_fit_data d;
        int j, strict = nk == 1;
        psik_status st;
        psik_fit_defaults(&o);
        o.confidence = conf;
        for (j = 0; j < nfix; j++)
            if (apply_name_value(kinds[i], fixes[j], 0, &o, strict) != EX_OK) { code = EX_USAGE; goto done; }
        for (j = 0; j < nbound; j++)
            if (apply_name_value(kinds[i], bounds[j], 1, &o, strict) != EX_OK) { code = EX_USAGE; goto done; }
        memset(&d, 0, sizeof d);
        d.n_theta = ret.n; d.h_theta = ret.h; d.theta = ret.v; d.w_theta = ret.w;
        d.n_k = con.n; d.h_k = con.h; d.k = con.v; d.w_k = con.w;
        d.k_weight = kweight;
        fits[i].kind = kinds[i];
        st = psik_fit(kinds[i], &d, &o, &fits[i].r, fits[i].msg, sizeof fits[i].msg);
        fits[i].ok = st == PSIK_OK;
        if (fits[i].ok) {
            nok++;
        } else if (nk == 1 || st == PSIK_EINVAL) {
            report_fit_error(fits[i].msg, &ret, kfile ? &con : NULL);
            code = st == PSIK_EDATA ? EX_INPUT : st == PSIK_EINVAL ? EX_USAGE : EX_FAIL;
            goto done;
        }
    }
    if (nok == 0) {
        fprintf(stderr, "psik: no model could be fitted:\n");
        for (i = 0; i < nk; i++)
            fprintf(stderr, "  %s: %s\n", psik_kind_name(kinds[i]), fits[i].msg);
        code = EX_FAIL;
        goto done;
    }
    {
        psik_fit_result *rs = (psik_fit_result *)malloc((size_t)nok * sizeof(psik_fit_result));
        size_t *order = (size_t *)malloc((size_t)nok * sizeof(size_t));
        double *wt = (double *)malloc((size_t)nok * sizeof(double));
        int *map = (int *)malloc((size_t)nok * sizeof(int)), m = 0, best;
        if (!rs || !order || !wt || !map) {
            free(rs); free(order); free(wt); free(map);
            code = EX_FAIL;
            goto done;
        }
        for (i = 0; i < nk; i++)
            if (fits[i].ok) { rs[m] = fits[i].r; map[m++] = i; }
        psik_fit_rank(rs, (size_t)nok, order, wt);
        best = map[order[0]];
        if (json) {
            const fit_one *b = &fits[best];
            int j;
            printf("{\"tool\": \"psik\", \"version\": ");
            jstr(stdout, psik_version());
            printf(", \"command\": \"fit\", \"retention_file\": ");
            jstr(stdout, file);
            printf(", \"conductivity_file\": ");
            if (kfile) jstr(stdout, kfile); else printf("null");
            printf(", \"units\": {\"h\": ");
            if (u.h[0]) jstr(stdout, u.h); else printf("null");
            printf(", \"k\": ");
            if (u.k[0]) jstr(stdout, u.k); else printf("null");
            printf("}, \"model\": ");
            jstr(stdout, psik_kind_name(b->kind));
            printf(", \"parameters\": ");
            jparams(stdout, b->kind, b->r.npar, b->r.par);
            printf(", \"sse\": ");
            jnum(stdout, b->r.sse);
            printf(", \"aicc\": ");
            jnum(stdout, b->r.aicc);
            printf(", \"fits\": [");
            for (m = 0; m < nok; m++) {
                printf("%s\n  ", m ? "," : "");
                print_fit_json_one(stdout, &fits[map[order[m]]], m + 1, wt[order[m]]);
            }
            printf("], \"skipped\": [");
            for (i = 0, j = 0; i < nk; i++)
                if (!fits[i].ok) {
                    printf("%s{\"model\": ", j++ ? ", " : "");
                    jstr(stdout, psik_kind_name(kinds[i]));
                    printf(", \"reason\": ");
                    jstr(stdout, fits[i].msg);
                    printf("}");
                }
            printf("]}\n");
        } else {
            printf("psik fit: %s (%lu retention rows)", file, (unsigned long)ret.n);
            if (kfile)
                printf(", %s (%lu conductivity rows)", kfile, (unsigned long)con.n);
            printf("\nunits: h %s, K %s%s\n", u.h[0] ? u.h : "[h]", u.k[0] ? u.k : "[K]",
                   (u.h[0] || u.k[0]) ? "" : " (declare them with --units h=cm,k=cm/d)");
            printf("\nRanking by AICc (N = %d observations)\n", fits[best].r.n_obs);
            printf("  %-4s %-10s %4s %13s %10s %9s %10s %8s %7s\n", "rank", "model", "free", "SSE",
                   "RMSE", "R2(theta)", "AICc", "dAICc", "weight");
            for (m = 0; m < nok; m++) {
                const psik_fit_result *r = &fits[map[order[m]]].r;
                printf("  %-4d %-10s %4d %13.6g %10.4g %9.5f %10.3f %8.3f %7.4f\n", m + 1,
                       psik_kind_name(fits[map[order[m]]].kind), r->n_free, r->sse, r->rmse, r->r2,
                       r->aicc, r->aicc - fits[best].r.aicc, wt[order[m]]);
            }
            for (i = 0; i < nk; i++)
                if (!fits[i].ok)
                    printf("  -    %-10s not fitted: %s\n", psik_kind_name(kinds[i]), fits[i].msg);
            for (m = 0; m < nok; m++)
                print_fit_text(&fits[map[order[m]]], &u, m + 1);
        }
        /* plots */
        if (plot != NULL) {
            char path[1024], err[512], cap1[256];
            int npts = 200, s, ns = 0;
            double smin = INFINITY, smax = 0.0, *xs, *ys;
            svg_series *ser = (svg_series *)calloc((size_t)nok + 2, sizeof(svg_series));
            double *dx = (double *)malloc((ret.n + con.n + 1) * sizeof(double));
            char (*labels)[96] = (char (*)[96])calloc((size_t)nok + 2, 96);
            size_t q;
            xs = (double *)malloc((size_t)npts * sizeof(double));
            ys = (double *)malloc((size_t)npts * (size_t)(nok + 1) * sizeof(double));
            if (!ser || !dx || !labels || !xs || !ys) {
                code = EX_FAIL;
                free(ser); free(dx); free(labels); free(xs); free(ys);
                free(rs); free(order); free(wt); free(map);
                goto done;
            }
            for (q = 0; q < ret.n; q++)
                if (ret.h[q] < 0.0) {
                    if (-ret.h[q] < smin) smin = -ret.h[q];
                    if (-ret.h[q] > smax) smax = -ret.h[q];
                }
            for (q = 0; q < con.n; q++)
                if (con.h[q] < 0.0) {
                    if (-con.h[q] < smin) smin = -con.h[q];
                    if (-con.h[q] > smax) smax = -con.h[q];
                }
            smin = pow(10.0, floor(log10(smin)) - 1.0);
            smax = pow(10.0, ceil(log10(smax)));
            for (s = 0; s < npts; s++)
                xs[s] = exp(log(smin) + (log(smax) - log(smin)) * s / (npts - 1.0));
            /* retention: theta against suction */
            for (q = 0; q < ret.n; q++)
                dx[q] = ret.h[q] < 0.0 ? -ret.h[q] : smin;   /* saturated rows at the left edge */
            ns = plot_series(fits, map, order, nok, nplot, dx, ret.v, ret.n, xs, npts, ys,
                             labels, ser, psik_theta);
            {
                char xl[96], yl[96];
                svg_chart ch;
                snprintf(xl, sizeof xl, "suction -h (%s)", u.h[0] ? u.h : "unit of h");
                snprintf(yl, sizeof yl, "water content theta (m3/m3)");
                snprintf(cap1, sizeof cap1, "%s; rows at h >= 0 are drawn at the left edge", file);
                ch.title = "Water retention: data and fitted curves";
                ch.xlabel = xl; ch.ylabel = yl; ch.xlog = 1; ch.ylog = 0;
                ch.xmin = smin; ch.xmax = smax; ch.ymin = 0.0; ch.ymax = NAN;
                ch.caption = cap1;
                snprintf(path, sizeof path, "%s-retention.svg", plot);
                if (svg_write(path, &ch, ser, ns, err, sizeof err) != 0) {
                    fprintf(stderr, "psik: %s\n", err);
                    code = EX_OUTPUT;
                } else if (!json)
                    printf("\nwrote %s\n", path);
            }
            /* conductivity: log K against log suction */
            if (con.n > 0) {
                for (q = 0; q < con.n; q++)
                    dx[q] = con.h[q] < 0.0 ? -con.h[q] : smin;
                ns = plot_series(fits, map, order, nok, nplot, dx, con.v, con.n, xs, npts, ys,
                                 labels, ser, psik_k);
                {
                    char xl[96], yl[96];
                    svg_chart ch;
                    double kmin = INFINITY, kmax = 0.0;
                    for (q = 0; q < con.n; q++) {
                        if (con.v[q] < kmin) kmin = con.v[q];
                        if (con.v[q] > kmax) kmax = con.v[q];
                    }
                    snprintf(xl, sizeof xl, "suction -h (%s)", u.h[0] ? u.h : "unit of h");
                    snprintf(yl, sizeof yl, "hydraulic conductivity K (%s)", u.k[0] ? u.k : "unit of ks");
                    snprintf(cap1, sizeof cap1, "%s; rows at h >= 0 are drawn at the left edge", kfile);
                    ch.title = "Hydraulic conductivity: data and fitted curves";
                    ch.xlabel = xl; ch.ylabel = yl; ch.xlog = 1; ch.ylog = 1;
                    ch.xmin = smin; ch.xmax = smax;
                    ch.ymin = pow(10.0, floor(log10(kmin)) - 3.0);
                    ch.ymax = pow(10.0, ceil(log10(kmax) + 0.3));
                    ch.caption = cap1;
                    snprintf(path, sizeof path, "%s-conductivity.svg", plot);
                    if (svg_write(path, &ch, ser, ns, err, sizeof err) != 0) {
                        fprintf(stderr, "psik: %s\n", err);
                        code = EX_OUTPUT;
                    } else if (!json)
                        printf("wrote %s\n", path);
                }
            }
            free(ser); free(dx); free(labels); free(xs); free(ys);
        }
        if (tout != NULL) {
            char tmp[1100], origin[1200];
            psik_model mod;
            double *hh = (double *)malloc((size_t)rg.points * sizeof(double));
            FILE *f;
            if (hh == NULL || make_heads(rg.from, rg.to, rg.points, hh) != 0) {
                free(hh);
                code = EX_USAGE;
            } else if (psik_init(&mod, fits[best].kind, fits[best].r.par) != PSIK_OK) {
                free(hh);
                code = EX_FAIL;
            } else if ((f = out_open(tout, tmp, sizeof tmp)) == NULL) {
                fprintf(stderr, "psik: %s: cannot write: %s\n", tout, strerror(errno));
                free(hh);
                code = EX_OUTPUT;
            } else {
                snprintf(origin, sizeof origin, "best model by AICc fitted to %s%s%s", file,
                         kfile ? " and " : "", kfile ? kfile : "");
                write_property_csv(f, &mod, hh, rg.points, &u, origin);
                free(hh);
                if (out_close(f, tmp, tout) != EX_OK)
                    code = EX_OUTPUT;
                else if (!json)
                    printf("wrote %s (%s, %d heads from %g to %g)\n", tout,
                           psik_kind_name(fits[best].kind), rg.points, rg.from, rg.to);
            }
        }
        free(rs); free(order); free(wt); free(map);
    }
done:
    free(fits);
    dataset_free(&ret);
    dataset_free(&con);
    return code;
}

/* ------------------------------------------------------------ table */

static int cmd_table(int argc, char **argv)
{
    const char *model = NULL, *pars = NULL, *out = NULL;
    int json = 0, i, rc;
    range_opt rg = {-0.01, -1e5, 41};
    units u;
    psik_kind kind;
    double par[PSIK_MAX_PARAMS], *hh;
    psik_model m;
    memset(&u, 0, sizeof u);
    for (i = 0; i < argc; i++) {
        const char *a = argv[i], *val = (i + 1 < argc) ? argv[i + 1] : NULL;
#define NEEDVAL() do { if (val == NULL) return die(EX_USAGE, "%s needs a value", a, NULL); i++; } while (0)
        if (strcmp(a, "--model") == 0) { NEEDVAL(); model = val; }
        else if (strcmp(a, "--par") == 0) { NEEDVAL(); pars = val; }
        else if (strcmp(a, "--out") == 0) { NEEDVAL(); out = val; }
        else if (strcmp(a, "--from") == 0) { NEEDVAL(); if (parse_double(a, val, &rg.from)) return EX_USAGE; }
        else if (strcmp(a, "--to") == 0) { NEEDVAL(); if (parse_double(a, val, &rg.to)) return EX_USAGE; }
        else if (strcmp(a, "--points") == 0) {
            NEEDVAL();
            rg.points = atoi(val);
            if (rg.points < 2 || rg.points > 1000000)
                return die(EX_USAGE, "--points must be an integer in 2..1000000", NULL, NULL);
        }
        else if (strcmp(a, "--units") == 0) {
            NEEDVAL();
            if (parse_units(val, &u) != 0)
                return die(EX_USAGE, "--units '%s': expected h=UNIT,k=UNIT", val, NULL);
        }
        else if (strcmp(a, "--json") == 0) json = 1;
        else return die(EX_USAGE, "table: unknown argument %s (see psik --help)", a, NULL);
#undef NEEDVAL
    }
    if (model == NULL || pars == NULL)
        return die(EX_USAGE, "table needs --model NAME and --par name=value,...", NULL, NULL);
    kind = kind_arg(model);
    if (kind == 0) {
        fprintf(stderr, "psik: --model: unknown model '%s'; known models:\n", model);
        list_kinds(stderr);
        return EX_USAGE;
    }
    if ((rc = parse_par(kind, pars, par)) != EX_OK)
        return rc;
    psik_init(&m, kind, par);
    hh = (double *)malloc((size_t)rg.points * sizeof(double));
    if (hh == NULL)
        return die(EX_FAIL, "out of memory", NULL, NULL);
    make_heads(rg.from, rg.to, rg.points, hh);
    if (out != NULL) {
        char tmp[1100];
        FILE *f = out_open(out, tmp, sizeof tmp);
        if (f == NULL) {
            free(hh);
            fprintf(stderr, "psik: %s: cannot write: %s\n", out, strerror(errno));
            return EX_OUTPUT;
        }
        write_property_csv(f, &m, hh, rg.points, &u, "psik table");
        rc = out_close(f, tmp, out);
        if (rc != EX_OK) {
            free(hh);
            return rc;
        }
    }
    if (json) {
        printf("{\"tool\": \"psik\", \"command\": \"table\", \"model\": ");
        jstr(stdout, psik_kind_name(kind));
        printf(", \"parameters\": ");
        jparams(stdout, kind, psik_param_count(kind), par);
        printf(", \"columns\": [\"h\", \"theta\", \"se\", \"k\", \"kr\", \"capacity\", \"dk_dh\"], \"rows\": [");
        for (i = 0; i < rg.points; i++) {
            psik_state s;
            psik_eval(&m, hh[i], &s);
            printf("%s\n  [", i ? "," : "");
            jnum(stdout, hh[i]); printf(", "); jnum(stdout, s.theta); printf(", ");
            jnum(stdout, s.se); printf(", "); jnum(stdout, s.k); printf(", ");
            jnum(stdout, s.kr); printf(", "); jnum(stdout, s.capacity); printf(", ");
            jnum(stdout, s.dk_dh); printf("]");
        }
        printf("]}\n");
    } else if (out == NULL) {
        char hu[40], ku[40], cu[48], du[80];
        snprintf(hu, sizeof hu, "(%s)", u.h[0] ? u.h : "[h]");
        snprintf(ku, sizeof ku, "(%s)", u.k[0] ? u.k : "[K]");
        snprintf(cu, sizeof cu, "(1/%s)", u.h[0] ? u.h : "[h]");
        snprintf(du, sizeof du, "(%s/%s)", u.k[0] ? u.k : "[K]", u.h[0] ? u.h : "[h]");
        printf("%s:", psik_kind_name(kind));
        for (i = 0; i < psik_param_count(kind); i++)
            printf(" %s=%g", psik_param_name(kind, i), par[i]);
        printf("\n%14s %12s %12s %14s %12s %14s %14s\n", "h", "theta", "Se", "K", "Kr", "C", "dK/dh");
        printf("%14s %12s %12s %14s %12s %14s %14s\n", hu, "(m3/m3)", "(-)", ku, "(-)", cu, du);
        for (i = 0; i < rg.points; i++) {
            psik_state s;
            psik_eval(&m, hh[i], &s);
            printf("%14.6g %12.6f %12.6g %14.6g %12.6g %14.6g %14.6g\n", hh[i], s.theta, s.se, s.k,
                   s.kr, s.capacity, s.dk_dh);
        }
    } else {
        printf("wrote %s (%d heads)\n", out, rg.points);
    }
    free(hh);
    return EX_OK;
}

/* ------------------------------------------------------------ compare */

static int cmd_compare(int argc, char **argv)
{
    const char *model = NULL, *pars = NULL, *file = NULL;
    int json = 0, i, rc, ch, cs, c, exceeded = 0, first = 1;
    double tol = NAN, par[PSIK_MAX_PARAMS];
    psik_kind kind;
    psik_model m;
    csv_table t;
    char err[512];
    static const char *cols[] = {"theta", "se", "k", "kr", "capacity", "dk_dh"};
    for (i = 0; i < argc; i++) {
        const char *a = argv[i], *val = (i + 1 < argc) ? argv[i + 1] : NULL;
#define NEEDVAL() do { if (val == NULL) return die(EX_USAGE, "%s needs a value", a, NULL); i++; } while (0)
        if (strcmp(a, "--model") == 0) { NEEDVAL(); model = val; }
        else if (strcmp(a, "--par") == 0) { NEEDVAL(); pars = val; }
        else if (strcmp(a, "--tol") == 0) {
            NEEDVAL();
            if (parse_double(a, val, &tol) || !(tol >= 0.0))
                return die(EX_USAGE, "--tol must be a number >= 0", NULL, NULL);
        }
        else if (strcmp(a, "--json") == 0) json = 1;
        else if (a[0] == '-' && a[1] != '\0')
            return die(EX_USAGE, "compare: unknown option %s (see psik --help)", a, NULL);
        else if (file == NULL) file = a;
        else return die(EX_USAGE, "compare: more than one file (%s)", a, NULL);
#undef NEEDVAL
    }
    if (model == NULL || pars == NULL || file == NULL)
        return die(EX_USAGE, "compare needs --model NAME --par name=value,... FILE.csv", NULL, NULL);
    kind = kind_arg(model);
    if (kind == 0) {
        fprintf(stderr, "psik: --model: unknown model '%s'; known models:\n", model);
        list_kinds(stderr);
        return EX_USAGE;
    }
    if ((rc = parse_par(kind, pars, par)) != EX_OK)
        return rc;
    psik_init(&m, kind, par);
    if (csv_read_file(file, &t, err, sizeof err) != 0) {
        fprintf(stderr, "psik: %s\n", err);
        return EX_INPUT;
    }
    ch = csv_col(&t, "h");
    cs = csv_col(&t, "suction");
    if ((ch < 0) == (cs < 0)) {
        fprintf(stderr, "psik: %s: the header needs one of h or suction\n", file);
        csv_free(&t);
        return EX_INPUT;
    }
    for (c = 0; c < t.ncol; c++) {
        int j, ok = c == ch || c == cs;
        for (j = 0; j < 6; j++)
            if (strcmp(t.name[c], cols[j]) == 0) ok = 1;
        if (!ok) {
            fprintf(stderr, "psik: %s: column %d '%s' is not one of h, suction, theta, se, k, kr, "
                    "capacity, dk_dh\n", file, c + 1, t.name[c]);
            csv_free(&t);
            return EX_INPUT;
        }
    }
    if (t.ncol < 2) {
        fprintf(stderr, "psik: %s: nothing to compare (no value columns)\n", file);
        csv_free(&t);
        return EX_INPUT;
    }
    if (json) {
        printf("{\"tool\": \"psik\", \"command\": \"compare\", \"file\": ");
        jstr(stdout, file);
        printf(", \"model\": ");
        jstr(stdout, psik_kind_name(kind));
        printf(", \"parameters\": ");
        jparams(stdout, kind, psik_param_count(kind), par);
        printf(", \"rows\": %lu, \"columns\": {", (unsigned long)t.nrow);
    } else {
        printf("psik compare: %s against %s (%lu rows)\n", file, psik_kind_name(kind),
               (unsigned long)t.nrow);
        printf("  %-9s %13s %8s %14s %22s %22s\n", "column", "max rel.err", "line", "h", "file value",
               "psik value");
    }
    for (c = 0; c < t.ncol; c++) {
        size_t r, worst_r = 0;
        double worst = -1.0;
        const char *nm = t.name[c];
        if (c == ch || c == cs)
            continue;
        for (r = 0; r < t.nrow; r++) {
            const double *row = t.v + r * (size_t)t.ncol;
            double h = ch >= 0 ? row[ch] : -row[cs], want, got = row[c], e;
            psik_state s;
            psik_eval(&m, h, &s);
            want = strcmp(nm, "theta") == 0 ? s.theta : strcmp(nm, "se") == 0 ? s.se
                 : strcmp(nm, "k") == 0 ? s.k : strcmp(nm, "kr") == 0 ? s.kr
                 : strcmp(nm, "capacity") == 0 ? s.capacity : s.dk_dh;
            if (got == want)
                e = 0.0;
            else if (want != 0.0)
                e = fabs(got - want) / fabs(want);
            else
                e = INFINITY;   /* psik says exactly 0, the file does not */
            if (e > worst) { worst = e; worst_r = r; }
        }
        {
            const double *row = t.v + worst_r * (size_t)t.ncol;
            double h = ch >= 0 ? row[ch] : -row[cs];
            psik_state s;
            double want;
            psik_eval(&m, h, &s);
            want = strcmp(nm, "theta") == 0 ? s.theta : strcmp(nm, "se") == 0 ? s.se
                 : strcmp(nm, "k") == 0 ? s.k : strcmp(nm, "kr") == 0 ? s.kr
                 : strcmp(nm, "capacity") == 0 ? s.capacity : s.dk_dh;
            if (!isnan(tol) && worst > tol)
                exceeded = 1;
            if (json) {
                printf("%s\"%s\": {\"max_rel_error\": ", first ? "" : ", ", nm);
                if (isinf(worst)) printf("\"inf\""); else jnum(stdout, worst);
                printf(", \"line\": %ld, \"h\": ", t.line[worst_r]);
                jnum(stdout, h);
                printf(", \"file_value\": ");
                jnum(stdout, row[c]);
                printf(", \"psik_value\": ");
                jnum(stdout, want);
                printf("}");
            } else {
                printf("  %-9s %13.3e %8ld %14.6g %22.15g %22.15g%s\n", nm, worst, t.line[worst_r], h,
                       row[c], want, (!isnan(tol) && worst > tol) ? "  exceeds --tol" : "");
            }
            first = 0;
        }
    }
    if (json)
        printf("}, \"tolerance\": %s, \"within_tolerance\": %s}\n", isnan(tol) ? "null" : "given",
               exceeded ? "false" : "true");
    csv_free(&t);
    return exceeded ? EX_FAIL : EX_OK;
}

int main(int argc, char **argv)
{
    if (argc < 2) {
        usage(stderr);
        return EX_USAGE;
    }
    if (strcmp(argv[1], "--help") == 0 || strcmp(argv[1], "-h") == 0 || strcmp(argv[1], "help") == 0) {
        usage(stdout);
        return EX_OK;
    }
    if (strcmp(argv[1], "--version") == 0) {
        printf("psik %s\n", psik_version());
        return EX_OK;
    }
    if (strcmp(argv[1], "models") == 0) {
        list_kinds(stdout);
        return EX_OK;
    }
    if (strcmp(argv[1], "fit") == 0)
        return cmd_fit(argc - 2, argv + 2);
    if (strcmp(argv[1], "table") == 0)
        return cmd_table(argc - 2, argv + 2);
    if (strcmp(argv[1], "compare") == 0)
        return cmd_compare(argc - 2, argv + 2);
    fprintf(stderr, "psik: unknown command '%s' (commands: fit, table, compare, models; see psik --help)\n",
            argv[1]);
    return EX_USAGE;
}
