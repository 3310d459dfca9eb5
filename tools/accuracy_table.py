#!/usr/bin/python3
"""accuracy_table.py - the README's accuracy table from the output of
build/tests/test_accuracy (the largest error per kind and function, in
ulp / max(1, kappa)).

    build/tests/test_accuracy | /usr/bin/python3 tools/accuracy_table.py
"""
import re
import sys

COLS = ['se', 'theta', 'kr', 'k', 'capacity', 'dk_dh', 'head', 'head_se',
        'k_theta', 'diffusivity', 'batch(all)']
LINE = re.compile(r'^# (\S+)\s+(\S+)\s+max\s+([0-9.]+) ulp/max\(1,cond\)')


def main():
    rows, order = {}, []
    for line in sys.stdin:
        m = LINE.match(line)
        if not m:
            continue
        kind, fn, v = m.group(1), m.group(2), float(m.group(3))
        if kind not in rows:
            rows[kind] = {}
            order.append(kind)
        rows[kind][fn] = v
    print('| kind | ' + ' | '.join(COLS) + ' |')
    print('|---' * (len(COLS) + 1) + '|')
    for kind in order:
        cells = ['%.1f' % rows[kind][c] if c in rows[kind] else '-' for c in COLS]
        print('| %s | %s |' % (kind, ' | '.join(cells)))
    return 0 if order else 1


if __name__ == '__main__':
    sys.exit(main())
