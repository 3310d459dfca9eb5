/* svg.c - see svg.h. */
#include "svg.h"

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#define W 1000.0
#define H 520.0
#define ML 90.0
#define MR 270.0
#define MT 50.0
#define MB 80.0

static const char *colors[] = {"#1b5e9e", "#c0392b", "#2e8b57", "#8e44ad", "#d68910",
                               "#17a2b8", "#6d4c41", "#e91e63", "#555555", "#7cb342"};

static void esc(FILE *f, const char *s)
{
    for (; s && *s; s++) {
        if (*s == '<') fputs("&lt;", f);
        else if (*s == '>') fputs("&gt;", f);
        else if (*s == '&') fputs("&amp;", f);
        else fputc(*s, f);
    }
}

static double tx(double v, int lg) { return lg ? log10(v) : v; }

/* A "nice" step for about n intervals over span. */
static double nice_step(double span, int n)
{
    double raw = span / n, p = pow(10.0, floor(log10(raw))), r = raw / p;
    return (r < 1.5 ? 1.0 : r < 3.0 ? 2.0 : r < 7.0 ? 5.0 : 10.0) * p;
}

static int usable(double x, double y, const svg_chart *c)
{
    if (!isfinite(x) || !isfinite(y)) return 0;
    if (c->xlog && !(x > 0.0)) return 0;
    if (c->ylog && !(y > 0.0)) return 0;
    return 1;
}

int svg_write(const char *path, const svg_chart *c, const svg_series *s, int ns,
              char *err, size_t cap)
{
    char tmp[1100];
    FILE *f;
    double x0, x1, y0, y1, pw = W - ML - MR, ph = H - MT - MB;
    int i;
    size_t k;
    x0 = c->xmin; x1 = c->xmax; y0 = c->ymin; y1 = c->ymax;
    /* data range */
    {
        double a = INFINITY, b = -INFINITY, d = INFINITY, e = -INFINITY;
        for (i = 0; i < ns; i++)
            for (k = 0; k < s[i].n; k++)
                if (usable(s[i].x[k], s[i].y[k], c)) {
                    double X = tx(s[i].x[k], c->xlog), Y = tx(s[i].y[k], c->ylog);
                    if (X < a) a = X;
                    if (X > b) b = X;
                    if (Y < d) d = Y;
                    if (Y > e) e = Y;
                }
        if (!(a <= b)) { a = 0; b = 1; d = 0; e = 1; }
        if (isnan(x0)) x0 = c->xlog ? floor(a) : a; else x0 = tx(x0, c->xlog);
        if (isnan(x1)) x1 = c->xlog ? ceil(b) : b; else x1 = tx(x1, c->xlog);
        if (isnan(y0)) y0 = c->ylog ? floor(d) : d; else y0 = tx(y0, c->ylog);
        if (isnan(y1)) y1 = c->ylog ? ceil(e) : e; else y1 = tx(y1, c->ylog);
        if (!(x1 > x0)) { x0 -= 0.5; x1 += 0.5; }
        if (!(y1 > y0)) { y0 -= 0.5; y1 += 0.5; }
        if (!c->ylog) {
            double st = nice_step(y1 - y0, 6);
            if (isnan(c->ymin)) y0 = floor(y0 / st) * st;
            if (isnan(c->ymax)) y1 = ceil((y1 + 0.02 * (y1 - y0)) / st) * st;
        }
    }
    if (strlen(path) > 1000) {
        snprintf(err, cap, "%s: path too long", path);
        return -1;
    }
    snprintf(tmp, sizeof tmp, "%s.tmp", path);
    f = fopen(tmp, "w");
    if (f == NULL) {
        snprintf(err, cap, "%s: cannot write: %s", tmp, strerror(errno));
        return -1;
    }
#define PX(X) (ML + ((X) - x0) / (x1 - x0) * pw)
#define PY(Y) (MT + ph - ((Y) - y0) / (y1 - y0) * ph)
    fprintf(f, "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
               "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"%g\" height=\"%g\" "
               "viewBox=\"0 0 %g %g\" font-family=\"DejaVu Sans, Helvetica, Arial, sans-serif\">\n",
            W, H, W, H);
    fprintf(f, "<rect width=\"100%%\" height=\"100%%\" fill=\"white\"/>\n");
    fprintf(f, "<text x=\"%g\" y=\"28\" font-size=\"17\" text-anchor=\"middle\" font-weight=\"bold\">",
            ML + pw / 2);
    esc(f, c->title);
    fprintf(f, "</text>\n");
    /* grid and ticks */
    fprintf(f, "<g font-size=\"13\" fill=\"black\">\n");
    if (c->xlog) {
        int d;
        for (d = (int)floor(x0); d <= (int)ceil(x1); d++) {
            int m;
            for (m = 1; m <= 9; m++) {
                double X = d + log10((double)m);
                if (X < x0 - 1e-9 || X > x1 + 1e-9) continue;
                fprintf(f, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\" stroke=\"%s\" stroke-width=\"1\"/>\n",
                        PX(X), MT, PX(X), MT + ph, m == 1 ? "#d0d0d0" : "#eeeeee");
                fprintf(f, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\" stroke=\"black\"/>\n",
                        PX(X), MT + ph, PX(X), MT + ph + (m == 1 ? 7 : 4));
                if (m == 1)
                    fprintf(f, "<text x=\"%.2f\" y=\"%.2f\" text-anchor=\"middle\">10<tspan dy=\"-6\" font-size=\"10\">%d</tspan></text>\n",
                            PX(X), MT + ph + 24, d);
            }
        }
    } else {
        double st = nice_step(x1 - x0, 7), X;
        for (X = ceil(x0 / st) * st; X <= x1 + 1e-9 * st; X += st) {
            fprintf(f, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\" stroke=\"#d0d0d0\"/>\n",
                    PX(X), MT, PX(X), MT + ph);
            fprintf(f, "<text x=\"%.2f\" y=\"%.2f\" text-anchor=\"middle\">%g</text>\n",
                    PX(X), MT + ph + 22, fabs(X) < 1e-12 * st ? 0.0 : X);
        }
    }
    if (c->ylog) {
        int d;
        for (d = (int)floor(y0); d <= (int)ceil(y1); d++) {
            int m;
            for (m = 1; m <= 9; m++) {
                double Y = d + log10((double)m);
                if (Y < y0 - 1e-9 || Y > y1 + 1e-9) continue;
                if (m != 1 && y1 - y0 > 8) continue;
                fprintf(f, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\" stroke=\"%s\"/>\n",
                        ML, PY(Y), ML + pw, PY(Y), m == 1 ? "#d0d0d0" : "#eeeeee");
                fprintf(f, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\" stroke=\"black\"/>\n",
                        ML - (m == 1 ? 7 : 4), PY(Y), ML, PY(Y));
                if (m == 1 && ((d % (y1 - y0 > 12 ? 2 : 1)) == 0))
                    fprintf(f, "<text x=\"%.2f\" y=\"%.2f\" text-anchor=\"end\">10<tspan dy=\"-6\" font-size=\"10\">%d</tspan></text>\n",
                            ML - 10, PY(Y) + 5, d);
            }
        }
    } else {
        double st = nice_step(y1 - y0, 6), Y;
        for (Y = ceil(y0 / st - 1e-9) * st; Y <= y1 + 1e-9 * st; Y += st) {
            fprintf(f, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\" stroke=\"#d0d0d0\"/>\n",
                    ML, PY(Y), ML + pw, PY(Y));
            fprintf(f, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\" stroke=\"black\"/>\n",
                    ML - 6, PY(Y), ML, PY(Y));
            fprintf(f, "<text x=\"%.2f\" y=\"%.2f\" text-anchor=\"end\">%g</text>\n",
                    ML - 10, PY(Y) + 5, fabs(Y) < 1e-12 * st ? 0.0 : Y);
        }
    }
    fprintf(f, "</g>\n<rect x=\"%g\" y=\"%g\" width=\"%g\" height=\"%g\" fill=\"none\" stroke=\"black\"/>\n",
            ML, MT, pw, ph);
    /* axis labels */
    fprintf(f, "<text x=\"%g\" y=\"%g\" font-size=\"14\" text-anchor=\"middle\">", ML + pw / 2, H - MB + 52);
    esc(f, c->xlabel);
    fprintf(f, "</text>\n<text transform=\"translate(24 %g) rotate(-90)\" font-size=\"14\" text-anchor=\"middle\">",
            MT + ph / 2);
    esc(f, c->ylabel);
    fprintf(f, "</text>\n");
    if (c->caption) {
        fprintf(f, "<text x=\"%g\" y=\"%g\" font-size=\"11\" fill=\"#555\">", ML, H - 8);
        esc(f, c->caption);
        fprintf(f, "</text>\n");
    }
    /* series, clipped to the plot area */
    fprintf(f, "<defs><clipPath id=\"area\"><rect x=\"%g\" y=\"%g\" width=\"%g\" height=\"%g\"/></clipPath></defs>\n",
            ML, MT, pw, ph);
    fprintf(f, "<g clip-path=\"url(#area)\">\n");
    for (i = 0; i < ns; i++) {
        const char *col = colors[i % 10];
        if (s[i].markers) {
            continue;   /* drawn after the lines, unclipped */
        } else {
            int open = 0;
            for (k = 0; k < s[i].n; k++) {
                if (!usable(s[i].x[k], s[i].y[k], c)) {
                    if (open) fprintf(f, "\"/>\n");
                    open = 0;
                    continue;
                }
                if (!open)
                    fprintf(f, "<polyline fill=\"none\" stroke=\"%s\" stroke-width=\"2\"%s points=\"",
                            col, s[i].dashed ? " stroke-dasharray=\"7 4\"" : "");
                open = 1;
                fprintf(f, "%.2f,%.2f ", PX(tx(s[i].x[k], c->xlog)), PY(tx(s[i].y[k], c->ylog)));
            }
            if (open) fprintf(f, "\"/>\n");
        }
    }
    fprintf(f, "</g>\n");
    for (i = 0; i < ns; i++) {
        const char *col = colors[i % 10];
        if (!s[i].markers)
            continue;
        for (k = 0; k < s[i].n; k++)
            if (usable(s[i].x[k], s[i].y[k], c)) {
                double X = tx(s[i].x[k], c->xlog), Y = tx(s[i].y[k], c->ylog);
                if (X < x0 || X > x1 || Y < y0 || Y > y1)
                    continue;
                fprintf(f, "<circle cx=\"%.2f\" cy=\"%.2f\" r=\"4.5\" fill=\"white\" stroke=\"%s\" stroke-width=\"2\"/>\n",
                        PX(X), PY(Y), col);
            }
    }
    /* legend, right of the plot */
    {
        double lw = MR - 25, lh = 22.0 * ns + 10, lx = ML + pw + 15, ly = MT;
        fprintf(f, "<g font-size=\"13\"><rect x=\"%g\" y=\"%g\" width=\"%g\" height=\"%g\" fill=\"white\" fill-opacity=\"0.9\" stroke=\"#888\"/>\n",
                lx, ly, lw, lh);
        for (i = 0; i < ns; i++) {
            const char *col = colors[i % 10];
            double yy = ly + 18 + 22.0 * i;
            if (s[i].markers)
                fprintf(f, "<circle cx=\"%g\" cy=\"%g\" r=\"4.5\" fill=\"white\" stroke=\"%s\" stroke-width=\"2\"/>\n",
                        lx + 22, yy - 4, col);
            else
                fprintf(f, "<line x1=\"%g\" y1=\"%g\" x2=\"%g\" y2=\"%g\" stroke=\"%s\" stroke-width=\"2\"%s/>\n",
                        lx + 8, yy - 4, lx + 36, yy - 4, col, s[i].dashed ? " stroke-dasharray=\"7 4\"" : "");
            fprintf(f, "<text x=\"%g\" y=\"%g\">", lx + 44, yy);
            esc(f, s[i].label);
            fprintf(f, "</text>\n");
        }
        fprintf(f, "</g>\n");
    }
    fprintf(f, "</svg>\n");
#undef PX
#undef PY
    if (ferror(f) | fclose(f)) {
        snprintf(err, cap, "%s: write failed: %s", tmp, strerror(errno));
        remove(tmp);
        return -1;
    }
    if (rename(tmp, path) != 0) {
        snprintf(err, cap, "%s: cannot rename to %s: %s", tmp, path, strerror(errno));
        remove(tmp);
        return -1;
    }
    return 0;
}
