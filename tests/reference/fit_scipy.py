#!/usr/bin/python3
"""Reference fits for tests/unit/test_fit.c, computed with SciPy.

Writes tests/data/fit_scipy.txt: synthetic retention sets (and one set with
conductivity data) for van Genuchten-Mualem (PSIK_VGM), the best of many
scipy.optimize.least_squares starts (method 'trf', bounds = psik's default
bounds, written into the file so the test can check they still agree), and
the Jacobian-based 95 % intervals with scipy.stats.t.ppf.
Also writes tests/data/t_quantile.txt: scipy.stats.t.ppf and mpmath (50
digits, root of the regularized incomplete beta tail) at a grid of p, dof.

Generating points: texture-class means of Carsel & Parrish (1988) as listed
in MODELS.md (from memory), heads from 0 to -15000 (cm). Noise: normal,
sd 0.004, numpy default_rng(seed); fixed seeds, so the file is reproducible.

Run: /usr/bin/python3 tests/reference/fit_scipy.py   (from the repository root)
"""
import sys
import numpy as np
import scipy
from scipy.optimize import least_squares
from scipy.stats import t as student_t
import mpmath as mp

LN10 = np.log(10.0)
# psik's default bounds for vgm (lib/vg.c vgm_param); test_fit.c checks
# psik_param_range still returns these.
LO = np.array([0.0, 0.05, 1e-5, 1.001, 1e-6, -5.0])
HI = np.array([0.5, 1.0, 100.0, 20.0, 1e5, 10.0])
NAMES = ["theta_r", "theta_s", "alpha", "n", "ks", "l"]

def vg_parts(p, h):
    tr, ts, al, n = p[0], p[1], p[2], p[3]
    s = np.maximum(-h, 0.0)
    sat = ~(h < 0)
    with np.errstate(divide="ignore", invalid="ignore"):
        lx = n * np.log(al * np.where(sat, 1.0, s))
    m = 1.0 - 1.0 / n
    L1 = np.where(lx > 0, lx + np.log1p(np.exp(-np.abs(lx))), np.log1p(np.exp(np.minimum(lx, 0))))
    lnSe = np.where(sat, 0.0, -m * L1)
    lny = np.where(lx > 0, -np.log1p(np.exp(-np.abs(lx))), lx - L1)
    return lnSe, lny, m, sat

def theta(p, h):
    lnSe, _, _, _ = vg_parts(p, h)
    return p[0] + (p[1] - p[0]) * np.exp(lnSe)

def log10k(p, h):
    lnSe, lny, m, sat = vg_parts(p, h)
    g = -np.expm1(m * lny)
    lkr = np.where(sat, 0.0, (p[5] * lnSe + 2.0 * np.log(np.where(sat, 1.0, g))) / LN10)
    return np.log10(p[4]) + lkr

def fit_set(ht, th, hk, kk, free, held, rng, nstarts=300):
    """Best of nstarts least_squares runs over the free parameters."""
    free = list(free)
    def full(x):
        p = held.copy()
        p[free] = x
        return p
    def resid(x):
        p = full(x)
        r = theta(p, ht) - th
        if len(hk):
            r = np.concatenate([r, log10k(p, hk) - np.log10(kk)])
        return r
    lo, hi = LO[free], HI[free]
    best = None
    for i in range(nstarts):
        x0 = np.empty(len(free))
        for j, f in enumerate(free):
            if f in (2, 4):   # log-uniform for alpha, ks
                x0[j] = np.exp(rng.uniform(np.log(LO[f]), np.log(HI[f])))
            elif f == 3:
                x0[j] = 1.0 + np.exp(rng.uniform(np.log(0.01), np.log(5.0)))
            elif f == 0:
                x0[j] = rng.uniform(0.0, 0.8 * th.min())
            elif f == 1:
                x0[j] = rng.uniform(th.max(), min(1.0, th.max() + 0.1))
            else:
                x0[j] = rng.uniform(-1.0, 3.0)
        try:
            r = least_squares(resid, x0, bounds=(lo, hi), method="trf", x_scale="jac",
                              ftol=1e-15, xtol=1e-15, gtol=1e-15, max_nfev=4000)
        except ValueError:
            continue
        sse = float(np.sum(r.fun ** 2))
        if best is None or sse < best[0]:
            best = (sse, r.x.copy())
    sse, x = best
    # Jacobian at the optimum by 5-point central differences (step 1e-4 rel),
    # accurate to ~1e-12, far below the 1e-3 tolerance on the intervals.
    J = np.empty((len(resid(x)), len(free)))
    for j in range(len(free)):
        hstep = 1e-4 * max(abs(x[j]), 1e-2)
        def rr(d):
            y = x.copy(); y[j] += d; return resid(y)
        J[:, j] = (8 * (rr(hstep) - rr(-hstep)) - (rr(2 * hstep) - rr(-2 * hstep))) / (12 * hstep)
    U, S, Vt = np.linalg.svd(J, full_matrices=False)
    cov = (Vt.T / S ** 2) @ Vt
    dof = len(resid(x)) - len(free)
    s2 = sse / dof
    se = np.sqrt(np.diag(cov) * s2)
    tq = student_t.ppf(0.975, dof)
    return sse, full(x), free, se, tq * se, tq

def main():
    out = []
    ver = scipy.__version__
    out.append("# Reference fits for tests/unit/test_fit.c")
    out.append("# generator: tests/reference/fit_scipy.py with SciPy %s (scipy.optimize.least_squares, "
               "method trf, best of 300 starts; intervals scipy.stats.t.ppf(0.975, dof) x Jacobian errors)" % ver)
    out.append("# bounds (psik vgm defaults): lo %s hi %s" % (" ".join(repr(v) for v in LO), " ".join(repr(v) for v in HI)))
    out.append("bounds " + " ".join(repr(v) for v in LO) + " " + " ".join(repr(v) for v in HI))
    heads = -np.array([0.0, 1, 3, 6, 10, 20, 33, 60, 100, 200, 330, 600, 1000, 3000, 15000])
    classes = [  # name, theta_r theta_s alpha n (Carsel & Parrish 1988, MODELS.md, from memory)
        ("sand", [0.045, 0.43, 0.145, 2.68]),
        ("sandy_loam", [0.065, 0.41, 0.075, 1.89]),
        ("loam", [0.078, 0.43, 0.036, 1.56]),
        ("silt_loam", [0.067, 0.45, 0.020, 1.41]),
        ("clay_loam", [0.095, 0.41, 0.019, 1.31]),
        ("silty_clay", [0.070, 0.36, 0.005, 1.09]),
    ]
    rng = np.random.default_rng(20261201)
    sets = []
    for name, g in classes:
        gen = np.array(g + [1.0, 0.5])
        clean = theta(gen, heads)
        noisy = np.clip(clean + rng.normal(0.0, 0.004, heads.size), 0.0, 1.0)
        sets.append((name + "_noisy", gen, heads, noisy, np.array([]), np.array([]), 0.004))
    for name, g in classes[1:4]:
        gen = np.array(g + [1.0, 0.5])
        sets.append((name + "_exact", gen, heads, theta(gen, heads), np.array([]), np.array([]), 0.0))
    # loam with conductivity: ks and l free (log10 K residuals, weight 1)
    gen = np.array([0.078, 0.43, 0.036, 1.56, 24.96, 0.5])
    hk = -np.array([0.0, 5, 20, 60, 150, 400])
    kk = 10 ** (log10k(gen, hk) + rng.normal(0.0, 0.05, hk.size))
    th = np.clip(theta(gen, heads) + rng.normal(0.0, 0.004, heads.size), 0, 1)
    sets.append(("loam_with_k", gen, heads, th, hk, kk, 0.004))
    fitrng = np.random.default_rng(7)
    for name, gen, ht, th, hk, kk, sd in sets:
        free = [0, 1, 2, 3] + ([4, 5] if len(hk) else [])
        held = gen.copy()
        held[4], held[5] = (gen[4], gen[5]) if len(hk) else (1.0, 0.5)
        sse, p, free, se, half, tq = fit_set(ht, th, hk, kk, free, held, fitrng)
        out.append("set %s vgm %d %d noise %r" % (name, len(ht), len(hk), sd))
        out.append("gen " + " ".join(repr(float(v)) for v in gen))
        for h, v in zip(ht, th):
            out.append("theta %r %r" % (float(h), float(v)))
        for h, v in zip(hk, kk):
            out.append("k %r %r" % (float(h), float(v)))
        out.append("free " + " ".join(str(f) for f in free))
        out.append("sse %r" % sse)
        out.append("par " + " ".join(repr(float(v)) for v in p))
        out.append("stderr " + " ".join(repr(float(v)) for v in se))
        out.append("ci_half " + " ".join(repr(float(v)) for v in half))
        out.append("tq %r" % float(tq))
        out.append("end")
        print("%-18s sse %.12g  par %s" % (name, sse, " ".join("%.6g" % v for v in p)), file=sys.stderr)
    with open("tests/data/fit_scipy.txt", "w") as f:
        f.write("\n".join(out) + "\n")

    # Student t quantiles
    mp.mp.dps = 50
    lines = ["# Student t quantiles for tests/unit/test_fit.c",
             "# generator: tests/reference/fit_scipy.py; columns: p dof scipy.stats.t.ppf(p, dof) (SciPy %s) "
             "mpmath (50 digits, findroot on betainc tail)" % ver]
    ps = [1e-10, 1e-6, 1e-3, 0.025, 0.1, 0.3, 0.6, 0.9, 0.975, 0.995, 1 - 1e-6]
    vs = [1, 1.5, 2, 3, 4, 5, 7.5, 10, 17, 30, 100, 1000, 1e4, 1e5, 1e6]
    for p in ps:
        for v in vs:
            sp = float(student_t.ppf(p, v))
            q = mp.mpf(p) if p < 0.5 else 1 - mp.mpf(p)
            vv = mp.mpf(v)
            tail = lambda tt: mp.betainc(vv / 2, mp.mpf(1) / 2, 0, vv / (vv + tt * tt), regularized=True) / 2 - q
            r = mp.findroot(tail, abs(sp), tol=mp.mpf(10) ** -45)
            if p < 0.5:
                r = -r
            lines.append("%r %r %r %s" % (p, v, sp, mp.nstr(r, 25)))
    with open("tests/data/t_quantile.txt", "w") as f:
        f.write("\n".join(lines) + "\n")

if __name__ == "__main__":
    main()
