#!/usr/bin/python3
"""Reference values for the normal-distribution and erfcinv helpers of
lib/special.c, computed with mpmath at 60 digits (checked at 120: a value
whose two results differ beyond 1e-30 relative is refused).

Writes tests/data/special_ref.txt, read by tests/unit/test_special.c.
Every argument is an exact double (written with repr), so the reference is
the function at that double.

Rows:  erfcinv t value
       normq   z Q(z) phi(z) mills(z)       (Q = erfc(z/sqrt 2)/2)
       qinv    p z                          (Q(z) = p)
Usage: /usr/bin/python3 tests/reference/gen_special.py > tests/data/special_ref.txt
"""
import random
import sys

import mpmath as mp


def both(f):
    """f evaluated at 60 and 120 digits; refuse if they disagree."""
    with mp.workdps(60):
        a = f()
    with mp.workdps(120):
        b = f()
    if b != 0 and abs((a - b) / b) > mp.mpf(10) ** -30:
        raise SystemExit("precision check failed")
    return b


def erfcinv(t):
    """erfcinv of the exact double t in (0, 2), at the working precision:
    erfinv(1 - t) where 1 - t is exact and not tiny, otherwise the root of
    ln erfc(x) = ln t (Newton, mpmath findroot) from the asymptotic start."""
    t = mp.mpf(t)
    if t >= mp.mpf(0.25):
        return mp.erfinv(1 - t)
    y = -mp.log(t)
    x0 = mp.sqrt(y - mp.log(mp.pi * y) / 2)
    return mp.findroot(lambda x: mp.log(mp.erfc(x)) - mp.log(t), x0)


def fmt(v):
    with mp.workdps(40):
        return mp.nstr(v, 25, min_fixed=0, max_fixed=0)


def main():
    rnd = random.Random(20261201)
    out = sys.stdout
    out.write("# special_ref.txt: reference values for lib/special.c\n")
    out.write("# generator: tests/reference/gen_special.py (mpmath %s, 60 digits,"
              " checked at 120)\n" % mp.__version__)
    ts = set()
    for k in range(-323, 1):
        for m in (1.0, 2.5, 5.0, 7.5):
            t = m * 10.0 ** k
            if 0 < t < 2:
                ts.add(t)
    ts.update([5e-324, 1e-320, 2.2250738585072014e-308, 0.5, 1.0, 1.5])
    for k in range(1, 54):
        ts.add(1.0 - 2.0 ** -k)
        ts.add(1.0 + 2.0 ** -k)
        ts.add(2.0 - 2.0 ** -k)
    for _ in range(600):
        ts.add(rnd.uniform(0.0, 2.0))
    for t in sorted(ts):
        if not (0 < t < 2):
            continue
        v = both(lambda: erfcinv(t))
        out.write("erfcinv %r %s\n" % (t, fmt(v)))
    zs = set()
    for i in range(-380, 401):
        zs.add(i / 10.0)
    for _ in range(600):
        zs.add(rnd.uniform(-38.0, 40.0))
    for z in sorted(zs):
        zz = mp.mpf(z)
        q = both(lambda: mp.erfc(zz / mp.sqrt(2)) / 2)
        ph = both(lambda: mp.exp(-zz * zz / 2) / mp.sqrt(2 * mp.pi))
        mi = both(lambda: (mp.erfc(zz / mp.sqrt(2)) / 2) / (mp.exp(-zz * zz / 2) / mp.sqrt(2 * mp.pi)))
        out.write("normq %r %s %s %s\n" % (z, fmt(q), fmt(ph), fmt(mi)))
    ps = set()
    for k in range(-320, 0):
        ps.add(10.0 ** k)
        ps.add(3.0 * 10.0 ** k)
    for k in range(1, 54):
        ps.add(0.5 - 2.0 ** -k)
        ps.add(0.5 + 2.0 ** -(k + 1))
        ps.add(1.0 - 2.0 ** -k)
    for _ in range(400):
        ps.add(rnd.uniform(0.0, 1.0))
    for p in sorted(ps):
        if not (0 < p < 1):
            continue
        pp = mp.mpf(p)
        z = both(lambda: mp.sqrt(2) * erfcinv(2 * pp))
        out.write("qinv %r %s\n" % (p, fmt(z)))


if __name__ == "__main__":
    main()
