#!/usr/bin/env python3
"""gen_mills.py - the Mills-ratio table of lib/fastmath_normal.h.

The Mills ratio of the standard normal law, M(t) = Q(t)/phi(t) =
sqrt(pi/2) exp(t^2/2) erfc(t/sqrt 2), is approximated on [0, 38] by one
polynomial per interval [j/4, (j+1)/4] (j = 0 .. 151) in d = t - c_j,
c_j = (j + 1/2)/4, of degree 10: the Chebyshev interpolant at 11 nodes,
computed with mpmath at 60 digits and rewritten in powers of d. The value at
the centre (the constant term) is written as hi + lo (two doubles), the
other coefficients as the nearest doubles.

    /usr/bin/python3 tests/reference/gen_mills.py          # rewrite the table in lib/fastmath_normal.h
    /usr/bin/python3 tests/reference/gen_mills.py --check  # truncation error per interval only
    /usr/bin/python3 tests/reference/gen_mills.py --ref F  # reference values for tests/unit/test_normal_tail.c

The truncation error of the polynomials (before rounding of the
coefficients) is printed; the evaluation in double (fastmath_normal.h) is
measured against the --ref values by tests/unit/test_normal_tail.c.
Reference values: M(t) from mpmath.erfc at 60 digits, checked at 120.
"""
import os
import random
import sys

import mpmath as mp

NI = 152          # intervals
PER = 4           # intervals per unit of t
DEG = 10
HERE = os.path.dirname(os.path.abspath(__file__))
HEADER = os.path.join(HERE, '..', '..', 'lib', 'fastmath_normal.h')
BEGIN = '/* BEGIN TABLE (tests/reference/gen_mills.py) */'
END = '/* END TABLE */'


def mills(t):
    t = mp.mpf(t)
    return mp.sqrt(mp.pi / 2) * mp.exp(t * t / 2) * mp.erfc(t / mp.sqrt(2))


def fit(j):
    a = mp.mpf(j) / PER
    h = mp.mpf(1) / (2 * PER)
    c = a + h
    n = DEG + 1
    nodes = [mp.cos(mp.pi * (k + mp.mpf(1) / 2) / n) for k in range(n)]
    vals = [mills(c + u * h) for u in nodes]
    ch = []
    for i in range(n):
        s = mp.fsum(vals[k] * mp.cos(mp.pi * i * (k + mp.mpf(1) / 2) / n) for k in range(n))
        ch.append(2 * s / n)
    ch[0] /= 2
    # Chebyshev polynomials T_i in monomials of u
    T = [[mp.mpf(1)], [mp.mpf(0), mp.mpf(1)]]
    for i in range(2, n):
        a2 = [mp.mpf(0)] + [2 * x for x in T[-1]]
        b2 = T[-2] + [mp.mpf(0)] * (len(a2) - len(T[-2]))
        T.append([a2[k] - b2[k] for k in range(len(a2))])
    mono = [mp.mpf(0)] * n
    for i in range(n):
        for k, x in enumerate(T[i]):
            mono[k] += ch[i] * x
    return c, [mono[k] / h ** k for k in range(n)]   # powers of d = t - c


def trunc_err(j, co, c):
    worst = mp.mpf(0)
    for k in range(33):
        t = mp.mpf(j) / PER + mp.mpf(k) / (32 * PER)
        d = t - c
        p = mp.mpf(0)
        for x in reversed(co):
            p = p * d + x
        worst = max(worst, abs(p / mills(t) - 1))
    return worst


def table():
    rows, worst = [], mp.mpf(0)
    for j in range(NI):
        c, co = fit(j)
        worst = max(worst, trunc_err(j, co, c))
        hi = float(co[0])
        lo = float(co[0] - mp.mpf(hi))
        rows.append([hi, lo] + [float(x) for x in co[1:]])
    return rows, worst


def main():
    mp.mp.dps = 60
    args = sys.argv[1:]
    if args[:1] == ['--ref']:
        out = args[1]
        rnd = random.Random(19621996)
        ts = [k / 16.0 for k in range(0, 38 * 16 + 1)]
        ts += [rnd.uniform(0.0, 38.0) for _ in range(2000)]
        ts += [rnd.uniform(0.0, 1.0) for _ in range(500)]
        with open(out, 'w') as f:
            f.write('# Mills ratio M(t) = sqrt(pi/2) exp(t^2/2) erfc(t/sqrt 2) of the standard normal law\n')
            f.write('# generator: tests/reference/gen_mills.py --ref; mpmath %s at 60 digits, '
                    'checked at 120 (agreement below 1e-40)\n' % mp.__version__)
            f.write('# columns: t (an exact double) and M(t) correctly rounded, then the '
                    'rounding residue M(t) - fl(M(t))\n')
            for t in ts:
                mp.mp.dps = 60
                v = mills(t)
                mp.mp.dps = 120
                v2 = mills(t)
                assert abs(v2 / v - 1) < mp.mpf(10) ** -40
                mp.mp.dps = 60
                vd = float(v)
                f.write('%r %r %r\n' % (t, vd, float(v - mp.mpf(vd))))
        return
    rows, worst = table()
    sys.stderr.write('largest truncation error %s (relative, %s ulp)\n'
                     % (mp.nstr(worst, 3), mp.nstr(worst / mp.mpf(2) ** -53, 3)))
    if args[:1] == ['--check']:
        return
    lines = [BEGIN,
             '/* %d intervals of width 1/%d on [0, %d]; per interval: M(c_j) as hi, lo, then the'
             % (NI, PER, NI // PER),
             ' * coefficients of d^1 .. d^%d. Largest truncation error %s relative. */'
             % (DEG, mp.nstr(worst, 2)),
             '#define PSIK_FMN_NI %d' % NI,
             '#define PSIK_FMN_PER %d.0' % PER,
             '#define PSIK_FMN_NC %d' % (DEG + 2),
             'static const double psik__fmn_mills_tab[%d] = {' % (NI * (DEG + 2))]
    for r in rows:
        lines.append('    ' + ', '.join('%.17g' % x for x in r) + ',')
    lines.append('};')
    lines.append(END)
    with open(HEADER) as f:
        text = f.read()
    i, k = text.index(BEGIN), text.index(END) + len(END)
    with open(HEADER, 'w') as f:
        f.write(text[:i] + '\n'.join(lines) + text[k:])


if __name__ == '__main__':
    main()
