/* csv.c - see csv.h. */
#include "csv.h"

#include <ctype.h>
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define CSV_MAXFILE (64L * 1024 * 1024)

static int fail(char *err, size_t cap, const char *fname, long line, int col,
                const char *what, const char *tok, size_t toklen)
{
    if (err != NULL && cap > 0) {
        if (tok != NULL)
            snprintf(err, cap, "%s:%ld:%d: %s '%.*s'", fname, line, col, what,
                     (int)(toklen > 40 ? 40 : toklen), tok);
        else if (col > 0)
            snprintf(err, cap, "%s:%ld:%d: %s", fname, line, col, what);
        else
            snprintf(err, cap, "%s:%ld: %s", fname, line, what);
    }
    return -1;
}

void csv_free(csv_table *t)
{
    if (t == NULL)
        return;
    free(t->v);
    free(t->line);
    memset(t, 0, sizeof *t);
}

int csv_col(const csv_table *t, const char *name)
{
    int i;
    for (i = 0; i < t->ncol; i++)
        if (strcmp(t->name[i], name) == 0)
            return i;
    return -1;
}

/* [s, e) trimmed of blanks */
static void trim(const char **s, const char **e)
{
    while (*s < *e && (**s == ' ' || **s == '\t'))
        (*s)++;
    while (*e > *s && ((*e)[-1] == ' ' || (*e)[-1] == '\t' || (*e)[-1] == '\r'))
        (*e)--;
}

int csv_parse(const char *buf, size_t len, const char *fname, csv_table *t,
              char *err, size_t cap)
{
    const char *p = buf, *end = buf + len;
    long line = 0;
    size_t rcap = 0;
    int have_header = 0;
    if (err != NULL && cap > 0)
        err[0] = '\0';
    memset(t, 0, sizeof *t);
    if (fname == NULL)
        fname = "(input)";
    while (p < end) {
        const char *ls = p, *le, *q;
        int col;
        line++;
        while (p < end && *p != '\n')
            p++;
        le = p;
        if (p < end)
            p++;                       /* skip '\n' */
        q = ls;
        while (q < le && (*q == ' ' || *q == '\t' || *q == '\r'))
            q++;
        if (q == le || *q == '#')
            continue;
        if (memchr(ls, '\0', (size_t)(le - ls)) != NULL) {
            csv_free(t);
            return fail(err, cap, fname, line, 0, "contains a NUL byte (not a text file)", NULL, 0);
        }
        if (!have_header) {
            const char *fs = ls;
            col = 0;
            for (;;) {
                const char *fe = fs, *a, *b;
                size_t n, k;
                while (fe < le && *fe != ',')
                    fe++;
                a = fs; b = fe;
                trim(&a, &b);
                col++;
                if (col > CSV_MAXCOL) {
                    csv_free(t);
                    return fail(err, cap, fname, line, col, "too many columns (at most 16)", NULL, 0);
                }
                n = (size_t)(b - a);
                if (n == 0) {
                    csv_free(t);
                    return fail(err, cap, fname, line, col, "empty column name in the header", NULL, 0);
                }
                if (n >= CSV_NAMELEN) {
                    csv_free(t);
                    return fail(err, cap, fname, line, col, "column name too long", a, n);
                }
                for (k = 0; k < n; k++) {
                    unsigned char ch = (unsigned char)a[k];
                    if (!(isalnum(ch) || ch == '_')) {
                        csv_free(t);
                        return fail(err, cap, fname, line, col,
                                    "column names use letters, digits and '_'; got", a, n);
                    }
                    t->name[col - 1][k] = (char)tolower(ch);
                }
                t->name[col - 1][n] = '\0';
                for (k = 0; k + 1 < (size_t)col; k++)
                    if (strcmp(t->name[k], t->name[col - 1]) == 0) {
                        csv_free(t);
                        return fail(err, cap, fname, line, col, "duplicate column name", a, n);
                    }
                if (fe >= le)
                    break;
                fs = fe + 1;
            }
            t->ncol = col;
            have_header = 1;
            continue;
        }
        if (t->nrow == rcap) {
            size_t nc = rcap ? 2 * rcap : 64;
            double *nv;
            long *nl;
            if (nc > ((size_t)-1) / (sizeof(double) * CSV_MAXCOL)) {
                csv_free(t);
                return fail(err, cap, fname, line, 0, "too many rows", NULL, 0);
            }
            nv = (double *)realloc(t->v, nc * (size_t)t->ncol * sizeof(double));
            if (nv == NULL) {
                csv_free(t);
                return fail(err, cap, fname, line, 0, "out of memory", NULL, 0);
            }
            t->v = nv;
            nl = (long *)realloc(t->line, nc * sizeof(long));
            if (nl == NULL) {
                csv_free(t);
                return fail(err, cap, fname, line, 0, "out of memory", NULL, 0);
            }
            t->line = nl;
            rcap = nc;
        }
        {
            const char *fs = ls;
            col = 0;
            for (;;) {
                const char *fe = fs, *a, *b;
                char tmp[64], *stop;
                size_t n;
                double v;
                while (fe < le && *fe != ',')
                    fe++;
                a = fs; b = fe;
                trim(&a, &b);
                col++;
                if (col > t->ncol) {
                    csv_free(t);
                    return fail(err, cap, fname, line, col, "more fields than the header has columns",
                                NULL, 0);
                }
                n = (size_t)(b - a);
                if (n == 0) {
                    csv_free(t);
                    return fail(err, cap, fname, line, col, "empty field (every column needs a number)",
                                NULL, 0);
                }
                if (n >= sizeof tmp) {
                    csv_free(t);
                    return fail(err, cap, fname, line, col, "not a number:", a, n);
                }
                memcpy(tmp, a, n);
                tmp[n] = '\0';
                errno = 0;
                v = strtod(tmp, &stop);
                if (stop == tmp || *stop != '\0') {
                    csv_free(t);
                    return fail(err, cap, fname, line, col, "not a number:", a, n);
                }
                if (!isfinite(v) || errno == ERANGE) {
                    if (!isfinite(v) || fabs(v) > 1.0) {
                        csv_free(t);
                        return fail(err, cap, fname, line, col, "not a finite number:", a, n);
                    }
                }
                t->v[t->nrow * (size_t)t->ncol + (size_t)(col - 1)] = v;
                if (fe >= le)
                    break;
                fs = fe + 1;
            }
            if (col < t->ncol) {
                char what[96];
                snprintf(what, sizeof what, "%d fields where the header has %d columns", col, t->ncol);
                csv_free(t);
                return fail(err, cap, fname, line, col, what, NULL, 0);
            }
            t->line[t->nrow++] = line;
        }
    }
    if (!have_header) {
        csv_free(t);
        return fail(err, cap, fname, line > 0 ? line : 1, 0, "no header row (the file is empty or only comments)",
                    NULL, 0);
    }
    return 0;
}

int csv_read_file(const char *path, csv_table *t, char *err, size_t cap)
{
    FILE *f;
    char *buf = NULL;
    size_t n = 0, bcap = 0;
    int rc, is_stdin = strcmp(path, "-") == 0;
    memset(t, 0, sizeof *t);
    f = is_stdin ? stdin : fopen(path, "rb");
    if (f == NULL) {
        snprintf(err, cap, "%s: cannot open: %s", path, strerror(errno));
        return -1;
    }
    for (;;) {
        size_t got;
        if (n == bcap) {
            char *nb;
            bcap = bcap ? 2 * bcap : 65536;
            if ((long)bcap > CSV_MAXFILE + 65536) {
                snprintf(err, cap, "%s: larger than 64 MiB: not a laboratory table", path);
                free(buf);
                if (!is_stdin) fclose(f);
                return -1;
            }
            nb = (char *)realloc(buf, bcap);
            if (nb == NULL) {
                snprintf(err, cap, "%s: out of memory", path);
                free(buf);
                if (!is_stdin) fclose(f);
                return -1;
            }
            buf = nb;
        }
        got = fread(buf + n, 1, bcap - n, f);
        n += got;
        if (got == 0)
            break;
    }
    if (ferror(f)) {
        snprintf(err, cap, "%s: read error", path);
        free(buf);
        if (!is_stdin) fclose(f);
        return -1;
    }
    if (!is_stdin)
        fclose(f);
    rc = csv_parse(buf, n, path, t, err, cap);
    free(buf);
    return rc;
}
