#!/bin/sh
# run.sh - run each libFuzzer target for a bounded time and report the
# executions. Usage: sh tests/fuzz/run.sh BUILD_DIR SECONDS
# Corpora grow in BUILD_DIR/fuzz/corpus-<target> (seeded from tests/fuzz/seeds/).
B=${1:-build}
T=${2:-60}
pass=0; fail=0
for t in fuzz_csv fuzz_model; do
    bin=$B/fuzz/$t
    seeds=tests/fuzz/seeds/${t#fuzz_}
    corpus=$B/fuzz/corpus-$t
    mkdir -p "$corpus"
    log=$B/fuzz/$t.log
    echo "== $t for ${T}s"
    "$bin" -max_total_time="$T" -timeout=20 -rss_limit_mb=2048 -print_final_stats=1 \
        "$corpus" "$seeds" > "$log" 2>&1
    st=$?
    runs=$(sed -n 's/^Done \([0-9]*\) runs in \([0-9]*\) second.*/\1 runs in \2 s/p' "$log" | tail -1)
    cov=$(grep -o 'cov: [0-9]*' "$log" | tail -1)
    if [ $st -eq 0 ]; then
        pass=$((pass + 1))
        echo "$t: ok, ${runs:-? runs}, $cov, corpus $(ls "$corpus" | wc -l) inputs"
    else
        fail=$((fail + 1))
        echo "$t: FAILED (exit $st); log $log; crash inputs:"
        ls crash-* leak-* timeout-* oom-* 2>/dev/null
        tail -40 "$log"
    fi
done
echo "fuzz: $pass passed, $fail failed"
[ $fail -eq 0 ]
