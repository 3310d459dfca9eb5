#!/usr/bin/python3
"""Reference values of the regularized incomplete beta function I_x(a, b)
and of the complete beta function B(a, b), for tests/unit/test_ibeta.c.

Source: mpmath.betainc(a, b, 0, x, regularized=True) and mpmath.beta at
100 significant digits, checked at 200 (a row is refused when the two
differ beyond 1e-30 relative). Arguments are doubles; x and y = 1 - x are
written as separate doubles and the exact y is used (the library takes both),
adjusted so that x + y = 1 exactly (x = 1 - fl(1 - x) when x < 1/2). The a, b ranges cover what vg_free_m needs:
a = m + 1/n in (0, 40], b = 1 - 1/n in (0, 1).

Usage: /usr/bin/python3 tests/reference/gen_ibeta.py > tests/data/ibeta.txt
"""
import random
import mpmath as mp

def ibeta(a, b, x, y, dps):
    mp.mp.dps = dps
    a, b, x, y = mp.mpf(a), mp.mpf(b), mp.mpf(x), mp.mpf(y)
    # integrate from the nearer end so a tiny y keeps its digits
    if x <= mp.mpf(1) / 2:
        i = mp.betainc(a, b, 0, x, regularized=True)
        c = 1 - i
    else:
        c = mp.betainc(b, a, 0, y, regularized=True)
        i = 1 - c
    B = mp.beta(a, b)
    return i, c, B, x ** a * y ** b / B

def main():
    rnd = random.Random(20261201)
    rows = []
    avals = [1e-3, 0.05, 0.3, 1.0, 1.7, 3.0, 10.0, 39.0]
    bvals = [1e-3, 0.05, 0.5, 0.9, 0.999]
    for a in avals:
        for b in bvals:
            for e in range(-12, 0, 2):
                for x in (10.0 ** e, 1.0 - 10.0 ** e, 0.5, 0.1, 0.9):
                    rows.append((a, b, x))
    for _ in range(400):
        a = 10 ** rnd.uniform(-3, 1.6)
        b = rnd.uniform(1e-3, 0.999)
        x = rnd.random() if rnd.random() < 0.5 else 10 ** rnd.uniform(-15, 0)
        if rnd.random() < 0.3:
            x = 1.0 - x
        if 0.0 < x < 1.0:
            rows.append((a, b, x))
    print("# generator: tests/reference/gen_ibeta.py (mpmath %s, 100 and 200 digits)" % mp.__version__)
    print("# source: mpmath.betainc(regularized=True), mpmath.beta")
    print("# columns: a b x y I_x(a,b) 1-I_x(a,b) B(a,b) x^a*y^b/B(a,b)")
    for a, b, x in rows:
        y = 1.0 - x                             # exact when x >= 1/2
        x = 1.0 - y                             # exact: y >= 1/2 or x unchanged
        assert mp.mpf(x) + mp.mpf(y) == 1
        lo = ibeta(a, b, x, y, 100)
        hi = ibeta(a, b, x, y, 200)
        for u, v in zip(lo, hi):
            if v != 0 and abs((u - v) / v) > mp.mpf("1e-30"):
                raise SystemExit("precision check failed at a=%r b=%r x=%r" % (a, b, x))
        mp.mp.dps = 200
        print(" ".join(repr(float(t)) for t in (a, b, x, y) + hi))

if __name__ == "__main__":
    main()
