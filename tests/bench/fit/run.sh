#!/bin/sh
# run.sh - fit speed: psik_fit (8 starts, default options) per data set of
# tests/data/fit_scipy.txt, and SciPy's least_squares on the same sets when
# /usr/bin/python3 has SciPy, as ratios (SciPy time / psik time; above 1
# means psik is faster). Usage: sh tests/bench/fit/run.sh BUILD_DIR
B=${1:-build}
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
"$B/bench/bench_fit" tests/data/fit_scipy.txt > "$tmp/psik" || exit 1
if /usr/bin/python3 -c "import scipy" 2>/dev/null; then
    /usr/bin/python3 tests/bench/fit/scipy_time.py tests/data/fit_scipy.txt > "$tmp/scipy" || exit 1
else
    : > "$tmp/scipy"
    echo "bench-fit: SciPy not installed (python3-scipy): psik times only"
fi
awk 'NR == FNR { s1[$2] = $4; s8[$2] = $6; next }
     FNR == 1 { printf "%-18s %12s %14s %14s %12s %12s\n", "fit: data set", "psik (us)", "SciPy 1 run", "SciPy 8 runs", "ratio 1 run", "ratio 8 runs" }
     { n++; name = $2; t = $4;
       if (name in s1) { r1 = s1[name] / t; r8 = s8[name] / t; g1 += log(r1); g8 += log(r8); m++;
           printf "%-18s %12.1f %14.1f %14.1f %12.2f %12.2f\n", name, t, s1[name], s8[name], r1, r8 }
       else printf "%-18s %12.1f\n", name, t }
     END { if (m > 0) printf "fit: geometric mean ratio SciPy/psik: %.2f (one SciPy run vs the full psik fit), %.2f (8 runs vs 8 starts)\n", exp(g1 / m), exp(g8 / m) }' \
    "$tmp/scipy" "$tmp/psik"
