#!/usr/bin/python3
"""Time scipy.optimize.least_squares on the sets of tests/data/fit_scipy.txt
(the same model, residuals, bounds and tolerances as the reference
generator tests/reference/fit_scipy.py): one run from a data-driven start,
and the best of 8 runs (psik's default number of starts) from the first 8
seeded random starts. Prints "set NAME scipy1_us T1 scipy8_us T8 sse S"."""
import os, sys, time
import numpy as np
sys.path.insert(0, os.path.join(os.path.dirname(__file__), "..", "..", "reference"))
from fit_scipy import theta, log10k, LO, HI   # noqa: E402
from scipy.optimize import least_squares       # noqa: E402

def load(path):
    sets, cur = [], None
    for line in open(path):
        t = line.split()
        if not t or t[0].startswith("#"):
            continue
        if t[0] == "set":
            cur = {"name": t[1], "ht": [], "th": [], "hk": [], "kk": []}
        elif cur is not None and t[0] == "theta":
            cur["ht"].append(float(t[1])); cur["th"].append(float(t[2]))
        elif cur is not None and t[0] == "k":
            cur["hk"].append(float(t[1])); cur["kk"].append(float(t[2]))
        elif cur is not None and t[0] == "end":
            sets.append({k: (np.array(v) if isinstance(v, list) else v) for k, v in cur.items()})
            cur = None
    return sets

def run(s, starts):
    ht, th, hk, kk = s["ht"], s["th"], s["hk"], s["kk"]
    free = [0, 1, 2, 3] + ([4, 5] if len(hk) else [])
    held = np.array([0, 0, 0, 0, 1.0, 0.5])
    def resid(x):
        p = held.copy(); p[free] = x
        r = theta(p, ht) - th
        if len(hk):
            r = np.concatenate([r, log10k(p, hk) - np.log10(kk)])
        return r
    best = np.inf
    for x0 in starts:
        r = least_squares(resid, x0[:len(free)], bounds=(LO[free], HI[free]), method="trf",
                          x_scale="jac", ftol=1e-15, xtol=1e-15, gtol=1e-15, max_nfev=4000)
        best = min(best, float(np.sum(r.fun ** 2)))
    return best

def timed(fn, mintime=0.3):
    n, t0 = 0, time.perf_counter()
    while True:
        v = fn(); n += 1
        t = time.perf_counter() - t0
        if t >= mintime:
            return 1e6 * t / n, v

def main():
    path = sys.argv[1] if len(sys.argv) > 1 else "tests/data/fit_scipy.txt"
    for s in load(path):
        th = s["th"]
        ks0 = float(np.max(s["kk"])) if len(s["kk"]) else 1.0
        x_data = np.array([max(0.0, th.min() * 0.5), min(1.0, th.max()), 0.02, 1.5, ks0, 0.5])
        rng = np.random.default_rng(3)
        rand = []
        for _ in range(8):
            rand.append(np.array([rng.uniform(0, 0.8 * th.min()), rng.uniform(th.max(), min(1, th.max() + 0.1)),
                                  np.exp(rng.uniform(np.log(1e-4), np.log(1.0))), 1 + np.exp(rng.uniform(np.log(0.05), np.log(3))),
                                  ks0, 0.5]))
        t1, sse1 = timed(lambda: run(s, [x_data]))
        t8, sse8 = timed(lambda: run(s, rand))
        print("set %s scipy1_us %.1f scipy8_us %.1f sse %.12e sse1 %.12e" % (s["name"], t1, t8, sse8, sse1))

if __name__ == "__main__":
    main()
