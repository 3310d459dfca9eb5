#!/usr/bin/python3
"""close.py A B TOL - two outputs of tests/single/check.c agree: the same
lines with the same words, and every number within TOL relative
(absolutely below 1e-300). Prints a one-line summary; exit status 1 on a
difference."""
import re
import sys

NUM = re.compile(r'[-+]?(?:\d+\.?\d*(?:[eE][-+]?\d+)?|inf|nan)')


def main():
    a = open(sys.argv[1]).read().split('\n')
    b = open(sys.argv[2]).read().split('\n')
    tol = float(sys.argv[3])
    if len(a) != len(b):
        print('%d lines vs %d' % (len(a), len(b)))
        return 1
    worst, nnum, ndiff = 0.0, 0, 0
    for i, (la, lb) in enumerate(zip(a, b)):
        if NUM.sub('#', la) != NUM.sub('#', lb):
            print('line %d differs in its words: %r vs %r' % (i + 1, la[:80], lb[:80]))
            return 1
        for x, y in zip(NUM.findall(la), NUM.findall(lb)):
            nnum += 1
            if x == y:
                continue
            u, v = float(x), float(y)
            ndiff += 1
            s = max(abs(u), abs(v))
            e = abs(u - v) if s < 1e-300 else abs(u - v) / s
            worst = max(worst, e)
            if not e <= tol:
                print('line %d: %s vs %s (%.3g relative, above %g)' % (i + 1, x, y, e, tol))
                return 1
    print('%d numbers, %d differ in the last digits, at most %.3g relative (bound %g)'
          % (nnum, ndiff, worst, tol))
    return 0


if __name__ == '__main__':
    sys.exit(main())
