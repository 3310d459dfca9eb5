/* fit.c - parameter estimation: weighted nonlinear least squares for any
 * kind of the table, with uncertainty, and the Student t quantile.
 *
 * Outline (the method and its accuracy are documented in psik.h):
 *   check data and options -> decide free / held parameters ->
 *   sample starts (Halton points, theta_r/theta_s/log ks projected) ->
 *   Levenberg-Marquardt from the best distinct samples (projected bounds,
 *   damped step through a one-sided Jacobi SVD) -> statistics.
 * Nothing in this file switches on a list of kinds: every kind is reached
 * through the family table; PSIK_VGM alone gets an analytic Jacobian in
 * its shape parameters, and every other parameter that is not theta_r,
 * theta_s or ks is differentiated numerically.
 */
#include "psik_internal.h"

#include <float.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define LN10 2.302585092994045684

/* ------------------------------------------------------------ t quantile */

/* ln Gamma(a + 1/2) - ln Gamma(a): lgamma for moderate a, the asymptotic
 * series 0.5 ln a - 1/(8a) + 1/(192 a^3) - 1/(640 a^5) + 17/(14336 a^7)
 * for large a, where the difference of two large lgamma values would lose
 * digits (series checked against mpmath at 40 digits: the error is below
 * 1e-17 for a >= 40). */
static double lgamma_half_ratio(double a)
{
    if (a < 40.0)
        return lgamma(a + 0.5) - lgamma(a);
    {
        double r = 1.0 / a, r2 = r * r;
        return 0.5 * log(a) - r / 8.0
               + r * r2 * (1.0 / 192.0 - r2 * (1.0 / 640.0 - r2 * (17.0 / 14336.0)));
    }
}

/* Upper tail P(T > t) for t >= 0 and its density, dof v. */
static double t_tail(double t, double v, double *dens)
{
    double a = 0.5 * v, t2 = t * t;
    double x, y, lx, ly, lnB, front, comp, I;
    /* ln B(a, 1/2) = ln Gamma(1/2) + ln Gamma(a) - ln Gamma(a + 1/2) */
    lnB = 0.5723649429247000870717137 - lgamma_half_ratio(a);
    if (dens != NULL)
        *dens = exp(-(0.5 * v + 0.5) * log1p(t2 / v) - lnB - 0.5 * log(v));
    if (t == 0.0)
        return 0.5;
    x = v / (v + t2);
    y = t2 / (v + t2);
    lx = -log1p(t2 / v);
    ly = log(t2) - log(v + t2);
    front = exp(a * lx + 0.5 * ly - lnB);
    I = psik__ibeta(a, 0.5, x, y, front, &comp);
    return 0.5 * I;
}

/* Normal quantile start, Abramowitz & Stegun 26.2.23 (|error| < 4.5e-4),
 * for the upper tail probability 0 < q <= 0.5. */
static double z_start(double q)
{
    double t = sqrt(-2.0 * log(q));
    return t - (2.515517 + t * (0.802853 + t * 0.010328))
               / (1.0 + t * (1.432788 + t * (0.189269 + t * 0.001308)));
}

PSIK_API double psik_t_quantile(double p, double dof)
{
    double q, t, lo, hi, z, v = dof, z2;
    int sgn, it;
    if (!(p >= 0.0 && p <= 1.0) || !(dof > 0.0))
        return NAN;
    if (p == 0.0)
        return -INFINITY;
    if (p == 1.0)
        return INFINITY;
    if (p == 0.5)
        return 0.0;
    sgn = p > 0.5 ? 1 : -1;
    q = p > 0.5 ? 1.0 - p : p;          /* upper tail of |t| */
    if (v == 1.0)
        return sgn / tan(3.14159265358979323846 * q);
    if (v == 2.0) {
        double a = 4.0 * q * (1.0 - q);
        return -sgn * (2.0 * q - 1.0) * sqrt(2.0 / a);
    }
    /* Cornish-Fisher (Fisher 1925) expansion around the normal quantile. */
    z = z_start(q);
    z2 = z * z;
    t = z + z * (z2 + 1.0) / (4.0 * v)
          + z * ((5.0 * z2 + 16.0) * z2 + 3.0) / (96.0 * v * v);
    if (!(t > 0.0) || !isfinite(t))
        t = z > 0.0 ? z : 1.0;
    /* Bracket [lo, hi] with tail(lo) >= q >= tail(hi). */
    lo = 0.0;
    hi = t;
    for (it = 0; it < 2000 && t_tail(hi, v, NULL) > q; it++) {
        lo = hi;
        hi *= 2.0;
    }
    for (it = 0; it < 200; it++) {
        double dens, g = t_tail(t, v, &dens) - q, tn;
        if (g > 0.0)
            lo = t;           /* tail too large: t too small */
        else
            hi = t;
        if (g == 0.0)
            break;
        tn = (dens > 0.0) ? t + g / dens : 0.5 * (lo + hi);
        if (!(tn > lo && tn < hi))
            tn = (hi > 4.0 * lo && lo > 0.0) ? sqrt(lo * hi) : 0.5 * (lo + hi);
        if (fabs(tn - t) <= 4.0 * DBL_EPSILON * t) {
            t = tn;
            break;
        }
        t = tn;
    }
    return sgn * t;
}

/* ------------------------------------------------------------ small linear algebra */

/* One-sided Jacobi (Hestenes) SVD of the m x n column-major matrix A
 * (m >= 1, n <= PSIK_MAX_PARAMS). On return A's columns are U_j s_j,
 * s[j] = singular values (unsorted), V (n x n, column-major) the right
 * singular vectors. Converges to full precision: rotations stop when every
 * pair is orthogonal to 1e-15 relative. */
static void jacobi_svd(double *A, size_t m, int n, double *s, double *V)
{
    int i, j, k, sweep;
    for (i = 0; i < n * n; i++)
        V[i] = 0.0;
    for (i = 0; i < n; i++)
        V[i * n + i] = 1.0;
    for (sweep = 0; sweep < 80; sweep++) {
        int rotated = 0;
        for (j = 0; j < n - 1; j++) {
            for (k = j + 1; k < n; k++) {
                double *aj = A + (size_t)j * m, *ak = A + (size_t)k * m;
                double al = 0.0, be = 0.0, ga = 0.0, zeta, t, c, sn;
                size_t r;
                for (r = 0; r < m; r++) {
                    al += aj[r] * aj[r];
                    be += ak[r] * ak[r];
                    ga += aj[r] * ak[r];
                }
                if (ga == 0.0 || fabs(ga) <= 1e-15 * sqrt(al * be))
                    continue;
                rotated = 1;
                zeta = (be - al) / (2.0 * ga);
                t = (zeta >= 0.0 ? 1.0 : -1.0) / (fabs(zeta) + sqrt(1.0 + zeta * zeta));
                c = 1.0 / sqrt(1.0 + t * t);
                sn = c * t;
                for (r = 0; r < m; r++) {
                    double x = aj[r], y = ak[r];
                    aj[r] = c * x - sn * y;
                    ak[r] = sn * x + c * y;
                }
                for (i = 0; i < n; i++) {
                    double x = V[j * n + i], y = V[k * n + i];
                    V[j * n + i] = c * x - sn * y;
                    V[k * n + i] = sn * x + c * y;
                }
            }
        }
        if (!rotated)
            break;
    }
    for (j = 0; j < n; j++) {
        double *aj = A + (size_t)j * m, ss = 0.0;
        size_t r;
        for (r = 0; r < m; r++)
            ss += aj[r] * aj[r];
        s[j] = sqrt(ss);
    }
}

/* ------------------------------------------------------------ the problem */

typedef struct fit_ctx {
    const psik_family *f;
    psik_kind kind;
    int np;
    size_t nt, nk, N;          /* retention, conductivity, total rows */
    const double *ht, *th, *hk;
    double *sw;                /* N sqrt weights (k_weight folded in) */
    double *lk;                /* nk log10 K data */
    double lo[PSIK_MAX_PARAMS], hi[PSIK_MAX_PARAMS];
    int tr[PSIK_MAX_PARAMS];   /* 0 linear, 1 log (p > 0), -1 log (p < 0) */
    int nf;
    int fi[PSIK_MAX_PARAMS];   /* free parameter indices */
    double held[PSIK_MAX_PARAMS]; /* full vector: held values */
    int evals;
} fit_ctx;

/* Residuals at full parameter vector p; 0 on success, -1 when p is not a
 * valid parameter vector of the kind. */
static int residuals(fit_ctx *c, const double *p, double *r)
{
    psik_model m;
    size_t i;
    if (psik_init(&m, c->kind, p) != PSIK_OK)
        return -1;
    c->evals++;
    for (i = 0; i < c->nt; i++)
        r[i] = c->sw[i] * (psik_theta(&m, c->ht[i]) - c->th[i]);
    for (i = 0; i < c->nk; i++) {
        double k = psik_k(&m, c->hk[i]);
        if (!(k > 1e-300))
            k = 1e-300;
        r[c->nt + i] = c->sw[c->nt + i] * (log10(k) - c->lk[i]);
    }
    return 0;
}

static double sumsq(const double *r, size_t n)
{
    double s = 0.0;
    size_t i;
    for (i = 0; i < n; i++)
        s += r[i] * r[i];
    return s;
}

/* Analytic columns of PSIK_VGM (theta_r theta_s alpha n ks l): d r / d p
 * for every parameter, written into jac (N x 6, row-major). */
static void jac_vgm(const fit_ctx *c, const double *p, double *jac)
{
    const double tr = p[0], ts = p[1], al = p[2], n = p[3], ks = p[4], l = p[5];
    const double m = 1.0 - 1.0 / n, dth = ts - tr;
    size_t i;
    for (i = 0; i < c->N; i++) {
        int isk = i >= c->nt;
        double h = isk ? c->hk[i - c->nt] : c->ht[i];
        double *row = jac + i * 6, w = c->sw[i];
        double s, lp, lx, t, L1, lnSe, Se, dls_a, dls_n, lny, mly, ym, g, dg_a, dg_n;
        int j;
        for (j = 0; j < 6; j++)
            row[j] = 0.0;
        if (!(h < 0.0)) {
            if (isk)
                row[4] = w / (ks * LN10);
            else
                row[1] = w;
            continue;
        }
        s = -h;
        lp = log(al * s);
        lx = n * lp;
        if (lx > 0.0) {
            double e = exp(-lx);
            t = 1.0 / (1.0 + e);
            L1 = lx + log1p(e);
            lny = -log1p(e);
        } else {
            double e = exp(lx);
            t = e / (1.0 + e);
            L1 = log1p(e);
            lny = lx - L1;
        }
        lnSe = -m * L1;
        Se = exp(lnSe);
        dls_a = -m * n * t / al;
        dls_n = -L1 / (n * n) - m * t * lp;
        if (!isk) {
            row[0] = w * (1.0 - Se);
            row[1] = w * Se;
            row[2] = w * dth * Se * dls_a;
            row[3] = w * dth * Se * dls_n;
            continue;
        }
        mly = m * lny;
        ym = exp(mly);
        g = -expm1(mly);
        /* d ln g = -y^m d(m ln y) / g */
        dg_a = -ym * (m * n * (1.0 - t) / al) / g;
        dg_n = -ym * (lny / (n * n) + m * (1.0 - t) * lp) / g;
        if (!(g > 0.0)) {
            dg_a = 0.0;
            dg_n = 0.0;
        }
        row[2] = w * (l * dls_a + 2.0 * dg_a) / LN10;
        row[3] = w * (l * dls_n + 2.0 * dg_n) / LN10;
        row[4] = w / (ks * LN10);
        row[5] = w * lnSe / LN10;
    }
}

/* Column j of d r / d p by central differences with one Richardson
 * extrapolation: D(s) = (r(p+s) - r(p-s)) / 2s, (4 D(s/2) - D(s)) / 3,
 * truncation O(s^4). Falls back to a one-sided extrapolated difference
 * when one side leaves the domain. work: 4N doubles. Returns 0 or -1. */
static int jac_numeric_col(fit_ctx *c, const double *p, int j, double *jac, int ld,
                           double *work)
{
    double q[PSIK_MAX_PARAMS];
    double *a = work, *b = work + c->N, *e = work + 2 * c->N, *d = work + 3 * c->N;
    double st = 1e-3 * (fabs(p[j]) > 1e-2 ? fabs(p[j]) : 1e-2);
    size_t i;
    int tries, k;
    memcpy(q, p, sizeof(double) * (size_t)c->np);
    for (tries = 0; tries < 4; tries++, st *= 0.1) {
        int ok = 1;
        q[j] = p[j] + st;       ok = ok && residuals(c, q, a) == 0;
        q[j] = p[j] - st;       ok = ok && residuals(c, q, b) == 0;
        q[j] = p[j] + 0.5 * st; ok = ok && residuals(c, q, e) == 0;
        q[j] = p[j] - 0.5 * st; ok = ok && residuals(c, q, d) == 0;
        q[j] = p[j];
        if (ok) {
            for (i = 0; i < c->N; i++) {
                double D1 = (a[i] - b[i]) / (2.0 * st);
                double D2 = (e[i] - d[i]) / st;
                jac[i * (size_t)ld + (size_t)j] = (4.0 * D2 - D1) / 3.0;
            }
            return 0;
        }
    }
    /* One side: D(s) = (r(p + sg s) - r(p)) / (sg s), 2 D(s/2) - D(s). */
    st = 1e-6 * (fabs(p[j]) > 1e-2 ? fabs(p[j]) : 1e-2);
    for (k = 0; k < 2; k++) {
        double sg = k == 0 ? 1.0 : -1.0;
        int ok = 1;
        ok = ok && residuals(c, p, a) == 0;
        q[j] = p[j] + sg * st;       ok = ok && residuals(c, q, b) == 0;
        q[j] = p[j] + sg * 0.5 * st; ok = ok && residuals(c, q, e) == 0;
        q[j] = p[j];
        if (ok) {
            for (i = 0; i < c->N; i++) {
                double D1 = (b[i] - a[i]) / (sg * st);
                double D2 = (e[i] - a[i]) / (sg * 0.5 * st);
                jac[i * (size_t)ld + (size_t)j] = 2.0 * D2 - D1;
            }
            return 0;
        }
    }
    return -1;
}

/* Full Jacobian d r / d p (N x np, row-major) at valid p. Columns in
 * want[] only (NULL: all). work: 4N doubles. */
static int jacobian(fit_ctx *c, const double *p, const int *want, int numeric,
                    double *jac, double *work)
{
    const int np = c->np, ksi = c->f->ks_index;
    psik_model m;
    size_t i;
    int j;
    if (psik_init(&m, c->kind, p) != PSIK_OK)
        return -1;
    if (c->kind == PSIK_VGM && !numeric) {
        jac_vgm(c, p, jac);
        return 0;
    }
    /* theta_r, theta_s (every kind: theta = theta_r + (theta_s - theta_r) Se)
     * and ks (every kind: K = ks Kr with Kr free of ks). */
    for (i = 0; i < c->N; i++) {
        double *row = jac + i * (size_t)np;
        for (j = 0; j < np; j++)
            row[j] = 0.0;
        if (i < c->nt) {
            double se = psik_se(&m, c->ht[i]);
            row[0] = c->sw[i] * (1.0 - se);
            row[1] = c->sw[i] * se;
        } else {
            row[ksi] = c->sw[i] / (p[ksi] * LN10);
        }
    }
    for (j = 2; j < np; j++) {
        if (j == ksi || (want != NULL && !want[j]))
            continue;
        if (jac_numeric_col(c, p, j, jac, np, work) != 0)
            return -1;
    }
    return 0;
}

/* internal variable <-> parameter */
static double to_u(const fit_ctx *c, int j, double p)
{
    if (c->tr[j] > 0) return log(p);
    if (c->tr[j] < 0) return log(-p);
    return p;
}
static double to_p(const fit_ctx *c, int j, double u)
{
    if (c->tr[j] > 0) return exp(u);
    if (c->tr[j] < 0) return -exp(u);
    return u;
}

/* Full parameter vector from free internal variables. */
static void expand(const fit_ctx *c, const double *u, double *p)
{
    int k;
    memcpy(p, c->held, sizeof(double) * (size_t)c->np);
    for (k = 0; k < c->nf; k++) {
        int j = c->fi[k];
        double v = to_p(c, j, u[k]);
        /* exp(log(lo)) may round to just outside the bound */
        p[j] = v < c->lo[j] ? c->lo[j] : (v > c->hi[j] ? c->hi[j] : v);
    }
}

/* ------------------------------------------------------------ Levenberg-Marquardt */

typedef struct lm_ws {
    double *r, *rn, *J, *A, *jfull, *work;   /* N, N, N*nf, N*nf, N*np, 4N */
} lm_ws;

typedef struct lm_out {
    double u[PSIK_MAX_PARAMS];
    double f;
    int iter, stop;
} lm_out;

static void lm_run(fit_ctx *c, const double *u0, double tol, int max_iter,
                   lm_ws *w, lm_out *o)
{
    const int nf = c->nf;
    const size_t N = c->N;
    double u[PSIK_MAX_PARAMS], un[PSIK_MAX_PARAMS], p[PSIK_MAX_PARAMS];
    double ulo[PSIK_MAX_PARAMS], uhi[PSIK_MAX_PARAMS], D[PSIK_MAX_PARAMS];
    double s[PSIK_MAX_PARAMS], V[PSIK_MAX_PARAMS * PSIK_MAX_PARAMS];
    double cu[PSIK_MAX_PARAMS];
    int act[PSIK_MAX_PARAMS], want[PSIK_MAX_PARAMS];
    double f, lambda = -1.0, nu = 2.0;
    int k, iter;
    size_t i;

    for (k = 0; k < nf; k++) {
        int j = c->fi[k];
        double a = to_u(c, j, c->lo[j]), b = to_u(c, j, c->hi[j]);
        ulo[k] = a < b ? a : b;
        uhi[k] = a < b ? b : a;
        u[k] = u0[k] < ulo[k] ? ulo[k] : (u0[k] > uhi[k] ? uhi[k] : u0[k]);
        D[k] = 0.0;
    }
    for (k = 0; k < c->np; k++)
        want[k] = 0;
    for (k = 0; k < nf; k++)
        want[c->fi[k]] = 1;
    expand(c, u, p);
    o->iter = 0;
    o->stop = PSIK_FIT_STOP_STALLED;
    if (residuals(c, p, w->r) != 0) {
        o->f = INFINITY;
        memcpy(o->u, u, sizeof u);
        return;
    }
    f = sumsq(w->r, N);
    for (iter = 0; iter < max_iter; iter++) {
        int nfa, idx[PSIK_MAX_PARAMS], accepted = 0;
        double gmax = 0.0, smax = 0.0;
        if (f == 0.0) {
            o->stop = PSIK_FIT_STOP_EXACT;
            break;
        }
        if (jacobian(c, p, want, 0, w->jfull, w->work) != 0)
            break;
        /* J in internal variables, column-major N x nf; Moré's scaling. */
        for (k = 0; k < nf; k++) {
            int j = c->fi[k];
            double dp = c->tr[j] != 0 ? p[j] : 1.0, nrm = 0.0, gg = 0.0;
            for (i = 0; i < N; i++) {
                double v = w->jfull[i * (size_t)c->np + (size_t)j] * dp;
                w->J[(size_t)k * N + i] = v;
                nrm += v * v;
                gg += v * w->r[i];
            }
            nrm = sqrt(nrm);
            if (nrm > D[k])
                D[k] = nrm;
            /* active: at a bound with the descent direction pointing out */
            act[k] = (u[k] <= ulo[k] && gg > 0.0) || (u[k] >= uhi[k] && gg < 0.0);
            if (!act[k]) {
                double cosg = nrm > 0.0 ? fabs(gg) / (nrm * sqrt(f)) : 0.0;
                if (cosg > gmax)
                    gmax = cosg;
            }
        }
        for (k = 0, nfa = 0; k < nf; k++)
            if (!act[k] && D[k] > 0.0)
                idx[nfa++] = k;
        if (nfa == 0 || gmax <= tol) {
            o->stop = PSIK_FIT_STOP_GRADIENT;
            break;
        }
        /* Scaled reduced matrix and its SVD. */
        for (k = 0; k < nfa; k++)
            for (i = 0; i < N; i++)
                w->A[(size_t)k * N + i] = w->J[(size_t)idx[k] * N + i] / D[idx[k]];
        jacobi_svd(w->A, N, nfa, s, V);
        for (k = 0; k < nfa; k++) {
            double dot = 0.0;
            const double *a = w->A + (size_t)k * N;
            for (i = 0; i < N; i++)
                dot += a[i] * w->r[i];
            cu[k] = s[k] > 0.0 ? dot / s[k] : 0.0;   /* u_k^T r */
            if (s[k] > smax)
                smax = s[k];
        }
        if (lambda < 0.0)
            lambda = 1e-3 * smax * smax;
        for (;;) {
            double fn, pred, rho, stepmax = 0.0;
            int q;
            for (k = 0; k < nf; k++)
                un[k] = u[k];
            for (q = 0; q < nfa; q++) {
                double ds = 0.0;
                int kk;
                for (kk = 0; kk < nfa; kk++)
                    ds -= V[kk * nfa + q] * (s[kk] / (s[kk] * s[kk] + lambda)) * cu[kk];
                k = idx[q];
                un[k] = u[k] + ds / D[k];
                if (un[k] < ulo[k]) un[k] = ulo[k];
                if (un[k] > uhi[k]) un[k] = uhi[k];
            }
            /* predicted: f - |r + J du|^2 */
            pred = 0.0;
            for (i = 0; i < N; i++) {
                double v = w->r[i];
                for (k = 0; k < nf; k++)
                    v += w->J[(size_t)k * N + i] * (un[k] - u[k]);
                pred += v * v;
            }
            pred = f - pred;
            for (k = 0; k < nf; k++) {
                double dd = fabs(un[k] - u[k]) / (fabs(u[k]) + 1.0);
                if (dd > stepmax)
                    stepmax = dd;
            }
            expand(c, un, p);
            if (residuals(c, p, w->rn) == 0)
                fn = sumsq(w->rn, N);
            else
                fn = INFINITY;
            rho = pred > 0.0 ? (f - fn) / pred : -1.0;
            if (fn < f && rho > 1e-4) {
                double red = (f - fn) / f, t3 = 2.0 * rho - 1.0;
                double fac = 1.0 - t3 * t3 * t3;
                lambda *= fac > 1.0 / 3.0 ? fac : 1.0 / 3.0;
                nu = 2.0;
                memcpy(u, un, sizeof(double) * (size_t)nf);
                {
                    double *t = w->r; w->r = w->rn; w->rn = t;
                }
                f = fn;
                accepted = 1;
                if (stepmax <= 100.0 * tol)
                    o->stop = PSIK_FIT_STOP_STEP;
                else if (red <= tol)
                    o->stop = PSIK_FIT_STOP_REDUCTION;
                else
                    o->stop = 0;
                break;
            }
            if (stepmax <= 100.0 * tol * 1e-2 || fn == f) {
                o->stop = PSIK_FIT_STOP_STEP;
                break;
            }
            lambda *= nu;
            nu *= 2.0;
            if (lambda > 1e30 * (smax * smax + 1e-300)) {
                o->stop = PSIK_FIT_STOP_STALLED;
                break;
            }
        }
        expand(c, u, p);
        if (!accepted || o->stop != 0)
            break;
    }
    o->iter = iter + (iter < max_iter ? 1 : 0);
    if (iter >= max_iter)
        o->stop = PSIK_FIT_STOP_MAXITER;
    o->f = f;
    memcpy(o->u, u, sizeof(double) * (size_t)nf);
}

/* ------------------------------------------------------------ starts */

static double halton(unsigned int i, unsigned int base)
{
    double f = 1.0, r = 0.0;
    while (i > 0) {
        f /= (double)base;
        r += f * (double)(i % base);
        i /= base;
    }
    return r;
}

static const unsigned int primes[PSIK_MAX_PARAMS] = {
    2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43, 47, 53};

/* Given shape parameters in p, solve theta_r, theta_s (when free) and
 * log10 ks (when free and K data exist) by linear least squares, clipped
 * to their bounds. se/kr: scratch of nt and nk doubles. Returns 0 or -1. */
static int project(fit_ctx *c, const int *isfree, double *p, double *se, double *kr)
{
    psik_model m;
    size_t i;
    const int ksi = c->f->ks_index;
    double q[PSIK_MAX_PARAMS];
    memcpy(q, p, sizeof q);
    if (isfree[0]) q[0] = 0.0;
    if (isfree[1]) q[1] = 1.0;
    if (isfree[ksi]) q[ksi] = 1.0;
    if (psik_init(&m, c->kind, q) != PSIK_OK)
        return -1;
    for (i = 0; i < c->nt; i++)
        se[i] = psik_se(&m, c->ht[i]);
    for (i = 0; i < c->nk; i++)
        kr[i] = psik_kr(&m, c->hk[i]);
    if (isfree[0] || isfree[1]) {
        double s11 = 0, s12 = 0, s22 = 0, b1 = 0, b2 = 0, a, b;
        int pass;
        for (i = 0; i < c->nt; i++) {
            double w2 = c->sw[i] * c->sw[i], u = 1.0 - se[i], v = se[i];
            s11 += w2 * u * u; s12 += w2 * u * v; s22 += w2 * v * v;
            b1 += w2 * u * c->th[i]; b2 += w2 * v * c->th[i];
        }
        a = p[0];
        b = p[1];
        if (isfree[0] && isfree[1]) {
            double det = s11 * s22 - s12 * s12;
            if (det > 1e-12 * s11 * s22) {
                a = (b1 * s22 - b2 * s12) / det;
                b = (s11 * b2 - s12 * b1) / det;
            }
        }
        for (pass = 0; pass < 3; pass++) {
            if (isfree[0]) {
                if (pass > 0 || !isfree[1]) {
                    if (s11 > 0) a = (b1 - s12 * b) / s11;
                }
                if (a < c->lo[0]) a = c->lo[0];
                if (a > c->hi[0]) a = c->hi[0];
            }
            if (isfree[1]) {
                if (pass > 0 || !isfree[0]) {
                    if (s22 > 0) b = (b2 - s12 * a) / s22;
                }
                if (b < c->lo[1]) b = c->lo[1];
                if (b > c->hi[1]) b = c->hi[1];
            }
        }
        if (!(a < b))
            return -1;
        p[0] = a;
        p[1] = b;
    }
    if (isfree[ksi]) {
        double sw = 0.0, sl = 0.0, lks;
        for (i = 0; i < c->nk; i++) {
            double w2 = c->sw[c->nt + i] * c->sw[c->nt + i];
            double k = kr[i] > 1e-300 ? kr[i] : 1e-300;
            sw += w2;
            sl += w2 * (c->lk[i] - log10(k));
        }
        lks = sw > 0.0 ? sl / sw : 0.0;
        p[ksi] = pow(10.0, lks);
        if (p[ksi] < c->lo[ksi]) p[ksi] = c->lo[ksi];
        if (p[ksi] > c->hi[ksi]) p[ksi] = c->hi[ksi];
    }
    return 0;
}

/* ------------------------------------------------------------ public */

PSIK_API void psik_fit_defaults(psik_fit_options *o)
{
    int i;
    if (o == NULL)
        return;
    memset(o, 0, sizeof *o);
    for (i = 0; i < PSIK_MAX_PARAMS; i++) {
        o->fixed[i] = 0;
        o->value[i] = NAN;
        o->lo[i] = NAN;
        o->hi[i] = NAN;
    }
    o->starts = 8;
    o->samples = 0;
    o->max_iter = 400;
    o->tol = 1e-14;
    o->confidence = 0.95;
}

PSIK_API const char *psik_fit_stop_name(int stop)
{
    switch (stop) {
    case PSIK_FIT_STOP_STEP:      return "relative step below tolerance";
    case PSIK_FIT_STOP_REDUCTION: return "relative SSE reduction below tolerance";
    case PSIK_FIT_STOP_GRADIENT:  return "projected gradient below tolerance";
    case PSIK_FIT_STOP_EXACT:     return "SSE reached zero";
    case PSIK_FIT_STOP_MAXITER:   return "iteration limit reached";
    case PSIK_FIT_STOP_STALLED:   return "no damping gave a decrease";
    }
    return "unknown stop reason";
}

static void note_add(psik_fit_result *r, const char *s)
{
    size_t n = strlen(r->note), k = strlen(s);
    if (n + k + 2 >= sizeof r->note)
        return;
    if (n > 0) {
        r->note[n++] = ' ';
        r->note[n] = '\0';
    }
    memcpy(r->note + n, s, k + 1);
}

/* Check one data set; returns PSIK_OK or PSIK_EDATA with a message. */
static psik_status check_set(const char *set, size_t n, const double *h, const double *v,
                             const double *w, int is_k, char *msg, size_t cap, size_t *used)
{
    size_t i;
    *used = 0;
    if (n > 0 && (h == NULL || v == NULL))
        return psik__fail(msg, cap, PSIK_EINVAL, "%s data: NULL array with %lu points",
                          set, (unsigned long)n);
    for (i = 0; i < n; i++) {
        const char *vn = is_k ? "K" : "theta";
        if (!isfinite(h[i]))
            return psik__fail(msg, cap, PSIK_EDATA, "%s point %lu: h is not a finite number (%g)",
                              set, (unsigned long)(i + 1), h[i]);
        if (!isfinite(v[i]))
            return psik__fail(msg, cap, PSIK_EDATA, "%s point %lu (h = %g): %s is not a finite number",
                              set, (unsigned long)(i + 1), h[i], vn);
        if (!is_k && v[i] < 0.0)
            return psik__fail(msg, cap, PSIK_EDATA,
                              "%s point %lu (h = %g): theta = %g is negative",
                              set, (unsigned long)(i + 1), h[i], v[i]);
        if (!is_k && v[i] > 1.0)
            return psik__fail(msg, cap, PSIK_EDATA,
                              "%s point %lu (h = %g): theta = %g is above 1 (volumetric "
                              "water content is a fraction; percent values must be divided by 100)",
                              set, (unsigned long)(i + 1), h[i], v[i]);
        if (is_k && !(v[i] > 0.0))
            return psik__fail(msg, cap, PSIK_EDATA,
                              "%s point %lu (h = %g): K = %g must be greater than 0 "
                              "(it is fitted as log10 K)",
                              set, (unsigned long)(i + 1), h[i], v[i]);
        if (w != NULL && !(isfinite(w[i]) && w[i] >= 0.0))
            return psik__fail(msg, cap, PSIK_EDATA,
                              "%s point %lu (h = %g): weight %g must be a finite number >= 0",
                              set, (unsigned long)(i + 1), h[i], w[i]);
        if (w == NULL || w[i] > 0.0)
            (*used)++;
    }
    return PSIK_OK;
}

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

typedef struct cand {
    double f;
    double u[PSIK_MAX_PARAMS];
} cand;

static int cmp_cand(const void *a, const void *b)
{
    double x = ((const cand *)a)->f, y = ((const cand *)b)->f;
    return (x > y) - (x < y);
}

PSIK_API psik_status psik_fit(psik_kind kind, const psik_fit_data *data,
                              const psik_fit_options *opt, psik_fit_result *res,
                              char *msg, size_t cap)
{
    const psik_family *f = psik__family((int)kind);
    psik_fit_options dflt;
    fit_ctx c;
    psik_status st;
    size_t ut = 0, uk = 0, i, N, nsamp, ncand = 0, total;
    double typ[PSIK_MAX_PARAMS], smin = INFINITY, smax = 0.0;
    int isfree[PSIK_MAX_PARAMS], konly[PSIK_MAX_PARAMS], j, k, np, nshape_theta = 0;
    int sdim[PSIK_MAX_PARAMS], nsd = 0, has_unsat_k = 0, distinct;
    double wlo[PSIK_MAX_PARAMS], whi[PSIK_MAX_PARAMS];
    double *mem, *se_s, *kr_s, *hs;
    cand *cands;
    lm_ws w;
    lm_out best, cur;
    char buf[200];
    double kw;

    if (msg != NULL && cap > 0)
        msg[0] = '\0';
    if (res != NULL)
        memset(res, 0, sizeof *res);
    if (f == NULL)
        return psik__fail(msg, cap, PSIK_EINVAL, "unknown model kind %d", (int)kind);
    if (data == NULL || res == NULL)
        return psik__fail(msg, cap, PSIK_EINVAL, "NULL data or result pointer");
    if (opt == NULL) {
        psik_fit_defaults(&dflt);
        opt = &dflt;
    }
    np = f->npar;
    memset(&c, 0, sizeof c);
    c.f = f;
    c.kind = kind;
    c.np = np;

    /* ---- data */
    if (data->n_theta == 0)
        return psik__fail(msg, cap, PSIK_EDATA, "no retention data: psik_fit needs water "
                          "contents at several heads");
    st = check_set("retention", data->n_theta, data->h_theta, data->theta, data->w_theta,
                   0, msg, cap, &ut);
    if (st != PSIK_OK)
        return st;
    st = check_set("conductivity", data->n_k, data->h_k, data->k, data->w_k, 1, msg, cap, &uk);
    if (st != PSIK_OK)
        return st;
    kw = data->k_weight;
    if (isnan(kw) || kw == 0.0)
        kw = 1.0;
    if (!(kw > 0.0 && isfinite(kw)))
        return psik__fail(msg, cap, PSIK_EINVAL, "k_weight must be a positive number (got %g)",
                          data->k_weight);
    c.nt = data->n_theta;
    c.nk = data->n_k;
    c.N = N = c.nt + c.nk;
    c.ht = data->h_theta;
    c.th = data->theta;
    c.hk = data->h_k;
    for (i = 0; i < c.nt; i++)
        if (c.ht[i] < 0.0 && (data->w_theta == NULL || data->w_theta[i] > 0.0)) {
            if (-c.ht[i] < smin) smin = -c.ht[i];
            if (-c.ht[i] > smax) smax = -c.ht[i];
        }
    if (!(smax > 0.0))
        return psik__fail(msg, cap, PSIK_EDATA, "every retention point is at a head >= 0 "
                          "(saturated): the shape of the curve cannot be fitted; heads are "
                          "pressure heads, negative in unsaturated soil");
    for (i = 0; i < c.nk; i++)
        if (c.hk[i] < 0.0 && (data->w_k == NULL || data->w_k[i] > 0.0))
            has_unsat_k = 1;

    /* ---- options and bounds */
    for (j = 0; j < np; j++) {
        double lo = f->param[j].lo, hi = f->param[j].hi;
        if (!isnan(opt->lo[j])) lo = opt->lo[j];
        if (!isnan(opt->hi[j])) hi = opt->hi[j];
        if (!(lo <= hi) || !isfinite(lo) || !isfinite(hi))
            return psik__fail(msg, cap, PSIK_EINVAL, "bounds of %s: need finite lo <= hi "
                              "(got %g, %g)", f->param[j].name, lo, hi);
        c.lo[j] = lo;
        c.hi[j] = hi;
        c.tr[j] = (lo > 0.0 && hi >= 1e3 * lo) ? 1 : (hi < 0.0 && lo <= 1e3 * hi) ? -1 : 0;
        typ[j] = c.tr[j] > 0 ? sqrt(lo * hi) : c.tr[j] < 0 ? -sqrt(lo * hi) : 0.5 * (lo + hi);
        if (strcmp(f->param[j].name, "l") == 0 && lo <= 0.5 && 0.5 <= hi)
            typ[j] = 0.5;   /* Mualem (1976) */
        isfree[j] = !opt->fixed[j];
        if (opt->fixed[j] && !isfinite(opt->value[j]))
            return psik__fail(msg, cap, PSIK_EINVAL, "%s is held but its value is not a "
                              "finite number", f->param[j].name);
    }
    if (!isfinite(opt->tol) || opt->tol < 0.0 || opt->starts < 0 || opt->samples < 0 ||
        opt->max_iter < 0 || (opt->confidence != 0.0 && !(opt->confidence > 0.0 && opt->confidence < 1.0)))
        return psik__fail(msg, cap, PSIK_EINVAL, "options: tol, starts, samples, max_iter "
                          "must be >= 0 and confidence in (0, 1)");
    /* a valid typical vector */
    {
        double q[PSIK_MAX_PARAMS];
        unsigned int h = 1;
        memcpy(q, typ, sizeof q);
        for (j = 0; j < np; j++)
            if (!isfree[j]) q[j] = opt->value[j];
        q[0] = isfree[0] ? (c.lo[0] < 0.5 * c.hi[1] ? c.lo[0] : q[0]) : q[0];
        while (psik_check(kind, q, NULL, 0) != PSIK_OK && h < 2000) {
            for (j = 0; j < np; j++)
                if (isfree[j])
                    q[j] = c.lo[j] + halton(h, primes[j]) * (c.hi[j] - c.lo[j]);
            h++;
        }
        if (psik_check(kind, q, buf, sizeof buf) != PSIK_OK)
            return psik__fail(msg, cap, PSIK_EINVAL, "no valid parameter vector inside the "
                              "bounds and held values: %s", buf);
        memcpy(typ, q, sizeof q);
        /* parameters that do not change theta (conductivity only) */
        for (j = 2; j < np; j++) {
            psik_model m0, m1;
            double q1[PSIK_MAX_PARAMS];
            double hprobe[4] = {-0.1 * smin, -smin, -smax, -10.0 * smax};
            int differs = 0, t;
            memcpy(q1, q, sizeof q1);
            q1[j] = q[j] != 0.0 ? q[j] * 1.1 : 0.1;
            if (psik_check(kind, q1, NULL, 0) != PSIK_OK)
                q1[j] = q[j] != 0.0 ? q[j] * 0.9 : -0.1;
            konly[j] = 0;
            if (psik_init(&m0, kind, q) != PSIK_OK || psik_init(&m1, kind, q1) != PSIK_OK)
                continue;
            for (t = 0; t < 4; t++)
                if (psik_se(&m0, hprobe[t]) != psik_se(&m1, hprobe[t]))
                    differs = 1;
            for (i = 0; i < c.nt && !differs; i++)
                if (psik_se(&m0, c.ht[i]) != psik_se(&m1, c.ht[i]))
                    differs = 1;
            konly[j] = !differs;
        }
        konly[0] = konly[1] = 0;
    }

    /* ---- free, held, auto-held */
    for (j = 0; j < np; j++) {
        res->flag[j] = isfree[j] ? PSIK_FIT_FREE : PSIK_FIT_FIXED;
        c.held[j] = isfree[j] ? typ[j] : opt->value[j];
        if (isfree[j] && konly[j] && (uk == 0 || (!has_unsat_k && j != f->ks_index))) {
            isfree[j] = 0;
            res->flag[j] = PSIK_FIT_AUTOFIXED;
            if (isfinite(opt->value[j]))
                c.held[j] = opt->value[j];
            snprintf(buf, sizeof buf, "%s held at %g: %s.", f->param[j].name, c.held[j],
                     uk == 0 ? "it changes only K and there is no conductivity data"
                             : "no conductivity point is unsaturated");
            note_add(res, buf);
        }
        if (isfree[j]) {
            c.fi[c.nf++] = j;
            if (!konly[j])
                nshape_theta++;
        }
    }
    if (psik_check(kind, c.held, buf, sizeof buf) != PSIK_OK) {
        /* held values must make a valid vector together with typical free ones */
        return psik__fail(msg, cap, PSIK_EINVAL, "held values: %s", buf);
    }
    if (ut + uk < (size_t)c.nf + 1)
        return psik__fail(msg, cap, PSIK_EDATA, "%lu data points cannot determine %d free "
                          "parameters of %s: need at least %d points (or hold some parameters)",
                          (unsigned long)(ut + uk), c.nf, f->name, c.nf + 1);

    /* ---- one allocation */
    if (opt->samples > 0)
        nsamp = (size_t)opt->samples;
    else
        nsamp = 0;
    for (k = 0; k < c.nf; k++) {
        j = c.fi[k];
        if (j == 0 || j == 1 || (j == f->ks_index && uk > 0))
            continue;
        sdim[nsd++] = k;
    }
    if (nsamp == 0) {
        nsamp = (size_t)(150 * nsd);
        if (nsamp > 4000) nsamp = 4000;
    }
    if (nsd == 0)
        nsamp = 0;
    total = N * 8 + N * (size_t)(2 * c.nf + np) + c.nt + (nsamp + 2) * (sizeof(cand) / sizeof(double) + 1);
    mem = (double *)malloc(total * sizeof(double));
    if (mem == NULL)
        return psik__fail(msg, cap, PSIK_ENOMEM, "cannot allocate %lu bytes for the fit",
                          (unsigned long)(total * sizeof(double)));
    c.sw = mem;
    c.lk = mem + N;
    w.r = c.lk + (c.nk > 0 ? c.nk : 0);
    w.rn = w.r + N;
    w.work = w.rn + N;                 /* 4N; also se/kr scratch */
    w.J = w.work + 4 * N;
    w.A = w.J + N * (size_t)c.nf;
    w.jfull = w.A + N * (size_t)c.nf;
    hs = w.jfull + N * (size_t)np;
    cands = (cand *)(void *)(hs + c.nt);
    se_s = w.work;
    kr_s = w.work + c.nt;
    for (i = 0; i < c.nt; i++)
        c.sw[i] = data->w_theta ? sqrt(data->w_theta[i]) : 1.0;
    for (i = 0; i < c.nk; i++) {
        c.sw[c.nt + i] = sqrt(kw * (data->w_k ? data->w_k[i] : 1.0));
        c.lk[i] = log10(data->k[i]);
    }
    /* distinct heads among used retention points */
    for (i = 0, k = 0; i < c.nt; i++)
        if (c.sw[i] > 0.0)
            hs[k++] = c.ht[i] < 0.0 ? c.ht[i] : 0.0;
    qsort(hs, (size_t)k, sizeof(double), cmp_double);
    for (i = 0, distinct = 0; i < (size_t)k; i++)
        if (i == 0 || hs[i] != hs[i - 1])
            distinct++;
    if (distinct < 2 || distinct < nshape_theta) {
        double h0 = hs[0];
        free(mem);
        if (distinct < 2)
            return psik__fail(msg, cap, PSIK_EDATA, "every retention point is at one head "
                              "(h = %g): a retention curve needs water contents at several heads",
                              h0);
        return psik__fail(msg, cap, PSIK_EDATA, "retention data at %d distinct heads cannot "
                          "determine %d free parameters that shape theta(h) in %s",
                          distinct, nshape_theta, f->name);
    }

    /* ---- sample starts */
    for (k = 0; k < c.nf; k++) {
        j = c.fi[k];
        wlo[k] = to_u(&c, j, c.lo[j]);
        whi[k] = to_u(&c, j, c.hi[j]);
        if (wlo[k] > whi[k]) { double t = wlo[k]; wlo[k] = whi[k]; whi[k] = t; }
        {
            const char *nm = f->param[j].name;
            double a = NAN, b = NAN;
            if (strncmp(nm, "alpha", 5) == 0) {
                a = 0.1 / smax; b = 10.0 / smin;
            } else if (strncmp(nm, "h_", 2) == 0) {
                a = -10.0 * smax; b = -0.1 * smin;
            }
            if (!isnan(a)) {
                double lo = a > c.lo[j] ? a : c.lo[j], hi = b < c.hi[j] ? b : c.hi[j];
                if (lo < hi) {
                    double ua = to_u(&c, j, lo), ub = to_u(&c, j, hi);
                    wlo[k] = ua < ub ? ua : ub;
                    whi[k] = ua < ub ? ub : ua;
                }
            }
        }
    }
    {
        double p[PSIK_MAX_PARAMS];
        unsigned int s;
        int given = 0;
        /* the caller's start, when every free value is given */
        for (k = 0, given = 1; k < c.nf; k++)
            if (!isfinite(opt->value[c.fi[k]])) given = 0;
        if (given) {
            {
                double q[PSIK_MAX_PARAMS];
                memcpy(q, c.held, sizeof q);
                for (k = 0; k < c.nf; k++)
                    q[c.fi[k]] = opt->value[c.fi[k]];
                if (residuals(&c, q, w.r) == 0) {
                    cands[ncand].f = sumsq(w.r, N);
                    for (k = 0; k < c.nf; k++)
                        cands[ncand].u[k] = to_u(&c, c.fi[k], q[c.fi[k]]);
                    ncand++;
                }
            }
        }
        for (s = 1; s <= (unsigned int)(nsamp > 0 ? nsamp : 1); s++) {
            memcpy(p, c.held, sizeof p);
            for (k = 0; k < c.nf; k++)
                p[c.fi[k]] = typ[c.fi[k]];
            for (k = 0; k < nsd; k++) {
                int kk = sdim[k];
                double t = nsamp > 0 ? halton(s, primes[k]) : 0.5;
                p[c.fi[kk]] = to_p(&c, c.fi[kk], wlo[kk] + t * (whi[kk] - wlo[kk]));
            }
            if (project(&c, isfree, p, se_s, kr_s) != 0)
                continue;
            if (residuals(&c, p, w.r) != 0)
                continue;
            cands[ncand].f = sumsq(w.r, N);
            for (k = 0; k < c.nf; k++)
                cands[ncand].u[k] = to_u(&c, c.fi[k], p[c.fi[k]]);
            if (isfinite(cands[ncand].f))
                ncand++;
        }
    }
    if (ncand == 0) {
        free(mem);
        return psik__fail(msg, cap, PSIK_ENOCONV, "no valid start for %s inside the bounds",
                          f->name);
    }
    qsort(cands, ncand, sizeof(cand), cmp_cand);

    /* ---- Levenberg-Marquardt from the best distinct starts */
    {
        int nst = opt->starts > 0 ? opt->starts : 8, done = 0;
        size_t a, chosen[64];
        int nch = 0;
        double tol = opt->tol > 0.0 ? opt->tol : 1e-14;
        int maxit = opt->max_iter > 0 ? opt->max_iter : 400;
        if (nst > 64) nst = 64;
        for (a = 0; a < ncand && nch < nst; a++) {
            int far = 1, b2;
            for (b2 = 0; b2 < nch && far; b2++) {
                double d2 = 0.0;
                for (k = 0; k < c.nf; k++) {
                    double wd = whi[k] - wlo[k], dd;
                    if (!(wd > 0.0)) wd = 1.0;
                    dd = (cands[a].u[k] - cands[chosen[b2]].u[k]) / wd;
                    d2 += dd * dd;
                }
                if (d2 < 0.05 * 0.05)
                    far = 0;
            }
            if (far)
                chosen[nch++] = a;
        }
        best.f = INFINITY;
        best.stop = 0;
        best.iter = 0;
        for (a = 0; a < (size_t)nch; a++) {
            lm_run(&c, cands[chosen[a]].u, tol, maxit, &w, &cur);
            res->iterations += cur.iter;
            done++;
            if (cur.f < best.f)
                best = cur;
        }
        res->starts = done;
    }
    if (!isfinite(best.f)) {
        free(mem);
        memset(res, 0, sizeof *res);
        return psik__fail(msg, cap, PSIK_ENOCONV, "no start of %s reached a finite SSE", f->name);
    }

    /* ---- result */
    {
        double p[PSIK_MAX_PARAMS], s[PSIK_MAX_PARAMS], V[PSIK_MAX_PARAMS * PSIK_MAX_PARAMS];
        double D[PSIK_MAX_PARAMS], cov[PSIK_MAX_PARAMS][PSIK_MAX_PARAMS];
        int undef[PSIK_MAX_PARAMS], want[PSIK_MAX_PARAMS], nf = c.nf, q, kk;
        double sst = 0.0, sw2 = 0.0, mean = 0.0, sstk = 0.0, swk = 0.0, meank = 0.0;
        double s2, smaxv = 0.0, t, Nd, kp, conf;
        expand(&c, best.u, p);
        residuals(&c, p, w.r);
        res->kind = (int)kind;
        res->npar = np;
        memcpy(res->par, p, sizeof(double) * (size_t)np);
        res->sse_theta = sumsq(w.r, c.nt);
        res->sse_logk = sumsq(w.r + c.nt, c.nk);
        res->sse = res->sse_theta + res->sse_logk;
        res->n_theta = (int)ut;
        res->n_k = (int)uk;
        res->n_obs = (int)(ut + uk);
        res->n_free = nf;
        res->dof = res->n_obs - nf;
        res->stop = best.stop;
        res->evaluations = c.evals;
        Nd = (double)res->n_obs;
        kp = (double)nf + 1.0;
        res->rmse = sqrt(res->sse / Nd);
        res->aic = Nd * log(res->sse / Nd) + 2.0 * kp;
        res->aicc = (Nd - kp - 1.0 > 0.0) ? res->aic + 2.0 * kp * (kp + 1.0) / (Nd - kp - 1.0)
                                           : INFINITY;
        res->bic = Nd * log(res->sse / Nd) + kp * log(Nd);
        for (i = 0; i < c.nt; i++) {
            double w2 = c.sw[i] * c.sw[i];
            sw2 += w2; mean += w2 * c.th[i];
        }
        mean /= sw2;
        for (i = 0; i < c.nt; i++)
            sst += c.sw[i] * c.sw[i] * (c.th[i] - mean) * (c.th[i] - mean);
        res->r2 = sst > 0.0 ? 1.0 - res->sse_theta / sst : NAN;
        if (c.nk > 0) {
            for (i = 0; i < c.nk; i++) {
                double w2 = c.sw[c.nt + i] * c.sw[c.nt + i];
                swk += w2; meank += w2 * c.lk[i];
            }
            meank = swk > 0.0 ? meank / swk : 0.0;
            for (i = 0; i < c.nk; i++)
                sstk += c.sw[c.nt + i] * c.sw[c.nt + i] * (c.lk[i] - meank) * (c.lk[i] - meank);
            res->r2_logk = sstk > 0.0 ? 1.0 - res->sse_logk / sstk : NAN;
        } else {
            res->r2_logk = NAN;
        }
        conf = opt->confidence > 0.0 ? opt->confidence : 0.95;
        res->confidence = conf;
        t = res->dof > 0 ? psik_t_quantile(1.0 - 0.5 * (1.0 - conf), (double)res->dof) : NAN;
        res->t_value = t;
        s2 = res->dof > 0 ? res->sse / (double)res->dof : NAN;
        /* covariance from the SVD of the column-scaled Jacobian in p */
        for (j = 0; j < np; j++)
            want[j] = 0;
        for (k = 0; k < nf; k++)
            want[c.fi[k]] = 1;
        for (k = 0; k < nf; k++)
            undef[k] = 0;
        memset(cov, 0, sizeof cov);
        if (nf > 0 && jacobian(&c, p, want, 0, w.jfull, w.work) == 0) {
            for (k = 0; k < nf; k++) {
                double nrm = 0.0;
                for (i = 0; i < N; i++) {
                    double v = w.jfull[i * (size_t)np + (size_t)c.fi[k]];
                    w.A[(size_t)k * N + i] = v;
                    nrm += v * v;
                }
                D[k] = nrm > 0.0 ? sqrt(nrm) : 1.0;
                for (i = 0; i < N; i++)
                    w.A[(size_t)k * N + i] /= D[k];
            }
            jacobi_svd(w.A, N, nf, s, V);
            for (k = 0; k < nf; k++)
                if (s[k] > smaxv) smaxv = s[k];
            for (q = 0; q < nf; q++) {
                if (s[q] > 1e-12 * smaxv)
                    continue;
                for (k = 0; k < nf; k++)
                    if (fabs(V[q * nf + k]) > 1e-8)
                        undef[k] = 1;
            }
            for (k = 0; k < nf; k++)
                for (kk = 0; kk < nf; kk++) {
                    double v = 0.0;
                    for (q = 0; q < nf; q++)
                        if (s[q] > 1e-12 * smaxv)
                            v += V[q * nf + k] * V[q * nf + kk] / (s[q] * s[q]);
                    cov[k][kk] = v / (D[k] * D[kk]);
                }
        } else {
            for (k = 0; k < nf; k++)
                undef[k] = 1;
        }
        for (j = 0; j < np; j++) {
            res->std_err[j] = 0.0;
            res->ci_lo[j] = res->ci_hi[j] = p[j];
        }
        for (k = 0; k < nf; k++) {
            double se, lo, hi;
            j = c.fi[k];
            se = undef[k] || !(s2 >= 0.0) ? NAN : sqrt(s2 * cov[k][k]);
            res->std_err[j] = se;
            res->ci_lo[j] = p[j] - t * se;
            res->ci_hi[j] = p[j] + t * se;
            if (!isfinite(se))
                res->flag[j] |= PSIK_FIT_UNDEFINED;
            lo = to_u(&c, j, c.lo[j]);
            hi = to_u(&c, j, c.hi[j]);
            if (lo > hi) { double tt = lo; lo = hi; hi = tt; }
            if (best.u[k] <= lo + 1e-12 * (fabs(lo) + 1.0)) {
                res->flag[j] |= c.tr[j] < 0 ? PSIK_FIT_AT_UPPER : PSIK_FIT_AT_LOWER;
            } else if (best.u[k] >= hi - 1e-12 * (fabs(hi) + 1.0)) {
                res->flag[j] |= c.tr[j] < 0 ? PSIK_FIT_AT_LOWER : PSIK_FIT_AT_UPPER;
            }
            if (res->flag[j] & (PSIK_FIT_AT_LOWER | PSIK_FIT_AT_UPPER)) {
                snprintf(buf, sizeof buf, "%s ended on its %s bound %g: its interval assumes "
                         "the bound is not active.", f->param[j].name,
                         (res->flag[j] & PSIK_FIT_AT_LOWER) ? "lower" : "upper", p[j]);
                note_add(res, buf);
            }
        }
        for (k = 0; k < nf; k++)
            for (kk = 0; kk < nf; kk++) {
                double d = sqrt(cov[k][k] * cov[kk][kk]);
                res->corr[c.fi[k]][c.fi[kk]] =
                    (undef[k] || undef[kk] || !(d > 0.0)) ? NAN : cov[k][kk] / d;
            }
        if (res->dof <= 0)
            note_add(res, "No degrees of freedom are left: errors are undefined.");
    }
    free(mem);
    return PSIK_OK;
}

PSIK_API psik_status psik_fit_jacobian(psik_kind kind, const psik_fit_data *data,
                                       const double *par, int numeric, double *jac)
{
    const psik_family *f = psik__family((int)kind);
    fit_ctx c;
    size_t i, N;
    double *mem;
    int rc;
    if (f == NULL || data == NULL || par == NULL || jac == NULL)
        return PSIK_EINVAL;
    if ((data->n_theta > 0 && (data->h_theta == NULL || data->theta == NULL)) ||
        (data->n_k > 0 && (data->h_k == NULL || data->k == NULL)))
        return PSIK_EINVAL;
    if (psik_check(kind, par, NULL, 0) != PSIK_OK)
        return PSIK_EDOMAIN;
    memset(&c, 0, sizeof c);
    c.f = f;
    c.kind = kind;
    c.np = f->npar;
    c.nt = data->n_theta;
    c.nk = data->n_k;
    c.N = N = c.nt + c.nk;
    c.ht = data->h_theta;
    c.th = data->theta;
    c.hk = data->h_k;
    if (N == 0)
        return PSIK_OK;
    mem = (double *)malloc((6 * N) * sizeof(double));
    if (mem == NULL)
        return PSIK_ENOMEM;
    c.sw = mem;
    c.lk = mem + N;
    {
        double kw = (isnan(data->k_weight) || data->k_weight == 0.0) ? 1.0 : data->k_weight;
        for (i = 0; i < c.nt; i++)
            c.sw[i] = data->w_theta ? sqrt(data->w_theta[i]) : 1.0;
        for (i = 0; i < c.nk; i++) {
            c.sw[c.nt + i] = sqrt(kw * (data->w_k ? data->w_k[i] : 1.0));
            c.lk[i] = data->k[i] > 0.0 ? log10(data->k[i]) : 0.0;
        }
    }
    rc = jacobian(&c, par, NULL, numeric, jac, mem + 2 * N);
    free(mem);
    return rc == 0 ? PSIK_OK : PSIK_EDOMAIN;
}

PSIK_API psik_status psik_fit_rank(const psik_fit_result *fits, size_t count,
                                   size_t *order, double *weight)
{
    size_t i, j;
    double best = INFINITY, sum = 0.0;
    if (fits == NULL || order == NULL || count == 0)
        return PSIK_EINVAL;
    for (i = 0; i < count; i++)
        if (fits[i].n_obs != fits[0].n_obs)
            return PSIK_EINVAL;
    for (i = 0; i < count; i++)
        order[i] = i;
    /* insertion sort by AICc (NaN last), stable */
    for (i = 1; i < count; i++) {
        size_t v = order[i];
        double a = fits[v].aicc;
        j = i;
        while (j > 0) {
            double b = fits[order[j - 1]].aicc;
            int after = isnan(a) ? 0 : (isnan(b) || a < b);
            if (!after)
                break;
            order[j] = order[j - 1];
            j--;
        }
        order[j] = v;
    }
    for (i = 0; i < count; i++)
        if (fits[i].aicc < best)
            best = fits[i].aicc;
    if (weight != NULL) {
        for (i = 0; i < count; i++) {
            double d = fits[i].aicc - best;
            weight[i] = (isfinite(best) && !isnan(d)) ? exp(-0.5 * d) : (fits[i].aicc == best ? 1.0 : 0.0);
            sum += weight[i];
        }
        for (i = 0; i < count; i++)
            weight[i] = sum > 0.0 ? weight[i] / sum : NAN;
    }
    return PSIK_OK;
}
