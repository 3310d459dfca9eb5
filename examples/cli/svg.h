/* svg.h - small SVG line/point charts for the psik tool (no dependencies).
 * Axes with ticks and labels, optional log10 axes (decade ticks labelled
 * 10^k, minor ticks at 2..9), a legend, and series drawn as lines or
 * markers. Written to a temporary file and renamed, so a reader never
 * sees half a picture. */
#ifndef PSIK_CLI_SVG_H
#define PSIK_CLI_SVG_H

#include <stddef.h>

typedef struct svg_series {
    const char *label;
    size_t n;
    const double *x, *y;   /* points with a non-finite coordinate (or <= 0 on a log axis) are skipped */
    int markers;           /* 1: circles, 0: polyline */
    int dashed;
} svg_series;

typedef struct svg_chart {
    const char *title;
    const char *xlabel, *ylabel;
    int xlog, ylog;
    double xmin, xmax, ymin, ymax;   /* NaN: from the data */
    const char *caption;             /* one line under the plot, may be NULL */
} svg_chart;

/* Returns 0, or -1 with a message in err. */
int svg_write(const char *path, const svg_chart *c, const svg_series *s, int ns,
              char *err, size_t cap);

#endif
