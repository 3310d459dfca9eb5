/* baseline.c - the yardstick for make bench: the textbook formulas of each
 * kind written the plain way, with pow(), exp() and erfc() from libm, as a
 * solver author would type them from the papers (MODELS.md). They share
 * the obvious subexpressions (x and Se are computed once per point) and
 * nothing more. bench.c checks that they agree with psik to 1e-6, so the
 * ratios compare like with like.
 */
#include "bench.h"

#include <math.h>

/* ---- van Genuchten pieces (van Genuchten 1980; Mualem 1976) -------------- */

/* Regularised incomplete beta I_x(a,b): the textbook continued fraction
 * (modified Lentz) with the symmetry I_x(a,b) = 1 - I_{1-x}(b,a). */
static double cf_beta(double a, double b, double x)
{
    double c = 1.0, d = 1.0 - (a + b) * x / (a + 1.0), h;
    int i;
    if (fabs(d) < 1e-300) d = 1e-300;
    d = 1.0 / d;
    h = d;
    for (i = 1; i < 300; i++) {
        double m2 = 2.0 * i, aa = i * (b - i) * x / ((a - 1.0 + m2) * (a + m2)), del;
        d = 1.0 + aa * d; if (fabs(d) < 1e-300) d = 1e-300;
        c = 1.0 + aa / c; if (fabs(c) < 1e-300) c = 1e-300;
        d = 1.0 / d; h *= d * c;
        aa = -(a + i) * (a + b + i) * x / ((a + m2) * (a + 1.0 + m2));
        d = 1.0 + aa * d; if (fabs(d) < 1e-300) d = 1e-300;
        c = 1.0 + aa / c; if (fabs(c) < 1e-300) c = 1e-300;
        d = 1.0 / d; del = d * c; h *= del;
        if (fabs(del - 1.0) < 1e-15) break;
    }
    return h;
}

static double betai(double a, double b, double x)
{
    double front;
    if (x <= 0.0) return 0.0;
    if (x >= 1.0) return 1.0;
    front = exp(lgamma(a + b) - lgamma(a) - lgamma(b) + a * log(x) + b * log(1.0 - x));
    if (x < (a + 1.0) / (a + b + 2.0))
        return front * cf_beta(a, b, x) / a;
    return 1.0 - front * cf_beta(b, a, 1.0 - x) / b;
}

typedef struct vgp { double tr, ts, al, n, m, ks, l, he; } vgp;

static vgp vg_par(const bench_model *bm)
{
    const double *p = bm->par;
    vgp v = {0};
    v.tr = p[0]; v.ts = p[1]; v.al = p[2]; v.n = p[3];
    switch (bm->kind) {
    case PSIK_VGM:      v.m = 1.0 - 1.0 / v.n; v.ks = p[4]; v.l = p[5]; break;
    case PSIK_VGM_AE:   v.m = 1.0 - 1.0 / v.n; v.ks = p[4]; v.l = p[5]; v.he = p[6]; break;
    case PSIK_VG_FREE_M: v.m = p[4]; v.ks = p[5]; v.l = p[6]; break;
    case PSIK_VGB:      v.m = 1.0 - 2.0 / v.n; v.ks = p[4]; break;
    default: break;
    }
    return v;
}

/* One van Genuchten-Mualem point: theta, K, C, dK/dh. */
static void vgm_all(const vgp *v, double h, double *th, double *k, double *c, double *dk)
{
    double s, x, se, sm, g, kr, dse, dkr;
    if (h >= 0.0) { *th = v->ts; *k = v->ks; *c = 0.0; *dk = 0.0; return; }
    s = -h;
    x = pow(v->al * s, v->n);
    se = pow(1.0 + x, -v->m);
    sm = pow(se, 1.0 / v->m);
    g = 1.0 - pow(1.0 - sm, v->m);
    kr = pow(se, v->l) * g * g;
    dse = v->al * v->m * v->n * pow(v->al * s, v->n - 1.0) * pow(1.0 + x, -v->m - 1.0);
    dkr = pow(se, v->l - 1.0) * g * (v->l * g + 2.0 * pow(1.0 - sm, v->m - 1.0) * sm) * dse;
    *th = v->tr + (v->ts - v->tr) * se;
    *k = v->ks * kr;
    *c = (v->ts - v->tr) * dse;
    *dk = v->ks * dkr;
}

/* Air-entry form (Vogel et al. 2001; Ippisch et al. 2006). */
static void vgm_ae_all(const vgp *v, double h, double *th, double *k, double *c, double *dk)
{
    double s, x, sc, se, S, F, Fc, g, kr, dS, dse, dF, dkr;
    if (h >= v->he) { *th = v->ts; *k = v->ks; *c = 0.0; *dk = 0.0; return; }
    s = -h;
    sc = pow(1.0 + pow(-v->al * v->he, v->n), -v->m);
    x = pow(v->al * s, v->n);
    S = pow(1.0 + x, -v->m);
    se = S / sc;
    F = pow(1.0 - pow(S, 1.0 / v->m), v->m);
    Fc = pow(1.0 - pow(sc, 1.0 / v->m), v->m);
    g = (1.0 - F) / (1.0 - Fc);
    kr = pow(se, v->l) * g * g;
    dS = v->al * v->m * v->n * pow(v->al * s, v->n - 1.0) * pow(1.0 + x, -v->m - 1.0);
    dse = dS / sc;
    dF = pow(1.0 - pow(S, 1.0 / v->m), v->m - 1.0) * pow(S, 1.0 / v->m - 1.0) * dS;
    dkr = v->l * pow(se, v->l - 1.0) * dse * g * g + 2.0 * pow(se, v->l) * g * dF / (1.0 - Fc);
    *th = v->tr + (v->ts - v->tr) * se;
    *k = v->ks * kr;
    *c = (v->ts - v->tr) * dse;
    *dk = v->ks * dkr;
}

static void vg_free_m_all(const vgp *v, double h, double *th, double *k, double *c, double *dk)
{
    double s, x, se, z, I, kr, dse, dI, a = v->m + 1.0 / v->n, b = 1.0 - 1.0 / v->n, dkr;
    if (h >= 0.0) { *th = v->ts; *k = v->ks; *c = 0.0; *dk = 0.0; return; }
    s = -h;
    x = pow(v->al * s, v->n);
    se = pow(1.0 + x, -v->m);
    z = pow(se, 1.0 / v->m);
    I = betai(a, b, z);
    kr = pow(se, v->l) * I * I;
    dse = v->al * v->m * v->n * pow(v->al * s, v->n - 1.0) * pow(1.0 + x, -v->m - 1.0);
    /* dI/dz = z^(a-1) (1-z)^(b-1) / B(a,b); dz/dSe = z / (m Se) */
    dI = exp(lgamma(a + b) - lgamma(a) - lgamma(b)) * pow(z, a - 1.0) * pow(1.0 - z, b - 1.0)
         * z / (v->m * se) * dse;
    dkr = v->l * pow(se, v->l - 1.0) * dse * I * I + 2.0 * pow(se, v->l) * I * dI;
    *th = v->tr + (v->ts - v->tr) * se;
    *k = v->ks * kr;
    *c = (v->ts - v->tr) * dse;
    *dk = v->ks * dkr;
}

static void vgb_all(const vgp *v, double h, double *th, double *k, double *c, double *dk)
{
    double s, x, se, sm, g, kr, dse, dkr;
    if (h >= 0.0) { *th = v->ts; *k = v->ks; *c = 0.0; *dk = 0.0; return; }
    s = -h;
    x = pow(v->al * s, v->n);
    se = pow(1.0 + x, -v->m);
    sm = pow(se, 1.0 / v->m);
    g = 1.0 - pow(1.0 - sm, v->m);
    kr = se * se * g;
    dse = v->al * v->m * v->n * pow(v->al * s, v->n - 1.0) * pow(1.0 + x, -v->m - 1.0);
    dkr = (2.0 * se * g + se * se * pow(1.0 - sm, v->m - 1.0) * sm / se) * dse;
    *th = v->tr + (v->ts - v->tr) * se;
    *k = v->ks * kr;
    *c = (v->ts - v->tr) * dse;
    *dk = v->ks * dkr;
}

/* ---- Brooks & Corey (1964) ------------------------------------------------ */
static void bc_all(const bench_model *bm, double h, double *th, double *k, double *c, double *dk)
{
    const double *p = bm->par;
    double tr = p[0], ts = p[1], hb = p[2], lam = p[3], ks = p[4];
    double eta = bm->kind == PSIK_BCM ? p[5] + 2.0 + 2.0 / lam : 3.0 + 2.0 / lam;
    double se, dse;
    if (h >= hb) { *th = ts; *k = ks; *c = 0.0; *dk = 0.0; return; }
    se = pow(hb / h, lam);
    dse = lam * se / (-h);
    *th = tr + (ts - tr) * se;
    *k = ks * pow(se, eta);
    *c = (ts - tr) * dse;
    *dk = ks * eta * pow(se, eta - 1.0) * dse;
}

/* ---- Kosugi (1996) -------------------------------------------------------- */
static void kosugi_all(const bench_model *bm, double h, double *th, double *k, double *c, double *dk)
{
    const double *p = bm->par;
    double tr = p[0], ts = p[1], hm = p[2], sg = p[3], ks = p[4], l = p[5];
    const double r2 = 1.4142135623730951, rpi2 = 2.5066282746310002;
    double s, z, se, q, phi, phi2, dse;
    if (h >= 0.0) { *th = ts; *k = ks; *c = 0.0; *dk = 0.0; return; }
    s = -h;
    z = log(s / -hm) / sg;
    se = 0.5 * erfc(z / r2);
    q = 0.5 * erfc((z + sg) / r2);
    phi = exp(-0.5 * z * z) / rpi2;
    phi2 = exp(-0.5 * (z + sg) * (z + sg)) / rpi2;
    dse = phi / (sg * s);
    *th = tr + (ts - tr) * se;
    *k = ks * pow(se, l) * q * q;
    *c = (ts - tr) * dse;
    *dk = ks * (l * pow(se, l - 1.0) * phi * q * q + 2.0 * pow(se, l) * q * phi2) / (sg * s);
}

/* ---- Durner (1994), Mualem form of Priesack & Durner (2006) --------------- */
static void durner_all(const bench_model *bm, double h, double *th, double *k, double *c, double *dk)
{
    const double *p = bm->par;
    double w[3], al[3], n[3], tr = p[0], ts = p[1], ks, l;
    double se = 0.0, dse = 0.0, num = 0.0, dnum = 0.0, den = 0.0, kr, dkr, s;
    int i, modes;
    if (bm->kind == PSIK_DURNER2) {
        modes = 2;
        w[0] = p[2]; al[0] = p[3]; n[0] = p[4];
        w[1] = 1.0 - p[2]; al[1] = p[5]; n[1] = p[6];
        ks = p[7]; l = p[8];
    } else {
        modes = 3;
        w[0] = p[2]; al[0] = p[3]; n[0] = p[4];
        w[1] = p[5]; al[1] = p[6]; n[1] = p[7];
        w[2] = 1.0 - p[2] - p[5]; al[2] = p[8]; n[2] = p[9];
        ks = p[10]; l = p[11];
    }
    if (h >= 0.0) { *th = ts; *k = ks; *c = 0.0; *dk = 0.0; return; }
    s = -h;
    for (i = 0; i < modes; i++) {
        double m = 1.0 - 1.0 / n[i], x = pow(al[i] * s, n[i]);
        double S = pow(1.0 + x, -m), sm = pow(S, 1.0 / m);
        double dS = al[i] * m * n[i] * pow(al[i] * s, n[i] - 1.0) * pow(1.0 + x, -m - 1.0);
        se += w[i] * S;
        dse += w[i] * dS;
        num += w[i] * al[i] * (1.0 - pow(1.0 - sm, m));
        /* d/dh of 1 - (1 - S^(1/m))^m */
        dnum += w[i] * al[i] * pow(1.0 - sm, m - 1.0) * pow(S, 1.0 / m - 1.0) * dS;
        den += w[i] * al[i];
    }
    kr = pow(se, l) * num * num / (den * den);
    dkr = (l * pow(se, l - 1.0) * dse * num * num + 2.0 * pow(se, l) * num * dnum) / (den * den);
    *th = tr + (ts - tr) * se;
    *k = ks * kr;
    *c = (ts - tr) * dse;
    *dk = ks * dkr;
}

/* ---- Gardner (1958) ------------------------------------------------------- */
static void gardner_all(const bench_model *bm, double h, double *th, double *k, double *c, double *dk)
{
    const double *p = bm->par;
    double tr = p[0], ts = p[1], al = p[2], ks = p[3], e;
    if (h >= 0.0) { *th = ts; *k = ks; *c = 0.0; *dk = 0.0; return; }
    e = exp(al * h);
    *th = tr + (ts - tr) * e;
    *k = ks * e;
    *c = (ts - tr) * al * e;
    *dk = ks * al * e;
}

int baseline_has(psik_kind kind)
{
    return kind >= PSIK_VGM && kind <= PSIK_GARDNER;
}

void baseline_point(const bench_model *bm, double h, double *th, double *k, double *c, double *dk)
{
    vgp v;
    switch (bm->kind) {
    case PSIK_VGM:       v = vg_par(bm); vgm_all(&v, h, th, k, c, dk); return;
    case PSIK_VGM_AE:    v = vg_par(bm); vgm_ae_all(&v, h, th, k, c, dk); return;
    case PSIK_VG_FREE_M: v = vg_par(bm); vg_free_m_all(&v, h, th, k, c, dk); return;
    case PSIK_VGB:       v = vg_par(bm); vgb_all(&v, h, th, k, c, dk); return;
    case PSIK_BCM: case PSIK_BCB: bc_all(bm, h, th, k, c, dk); return;
    case PSIK_KOSUGI:    kosugi_all(bm, h, th, k, c, dk); return;
    case PSIK_DURNER2: case PSIK_DURNER3: durner_all(bm, h, th, k, c, dk); return;
    case PSIK_GARDNER:   gardner_all(bm, h, th, k, c, dk); return;
    }
    *th = *k = *c = *dk = NAN;
}

/* Single-value baselines: theta alone and K alone, the two functions a
 * solver calls most; the textbook way is the same formula with only the
 * needed terms, which for vG-Mualem is four pow calls for K. */
double baseline_theta(const bench_model *bm, double h)
{
    const double *p = bm->par;
    double th, k, c, dk;
    if (bm->kind == PSIK_VGM || bm->kind == PSIK_VGB) {
        double n = p[3], m = bm->kind == PSIK_VGM ? 1.0 - 1.0 / n : 1.0 - 2.0 / n;
        if (h >= 0.0) return p[1];
        return p[0] + (p[1] - p[0]) * pow(1.0 + pow(-p[2] * h, n), -m);
    }
    baseline_point(bm, h, &th, &k, &c, &dk);
    return th;
}

double baseline_k(const bench_model *bm, double h)
{
    const double *p = bm->par;
    double th, k, c, dk;
    if (bm->kind == PSIK_VGM) {
        double n = p[3], m = 1.0 - 1.0 / n, se, g;
        if (h >= 0.0) return p[4];
        se = pow(1.0 + pow(-p[2] * h, n), -m);
        g = 1.0 - pow(1.0 - pow(se, 1.0 / m), m);
        return p[4] * pow(se, p[5]) * g * g;
    }
    baseline_point(bm, h, &th, &k, &c, &dk);
    return k;
}
