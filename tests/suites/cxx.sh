#!/bin/sh
# cxx.sh - psik from C++: the wrapper test (tests/cxx/test_wrapper.cpp) and the
# example examples/cxx/horizons.cpp, built with g++ -Wall -Wextra -Wpedantic
# -Werror as C++11 and C++17 against libpsik.a, and as C++20 on the
# single header with PSIK_STATIC; the example's output must be the same in
# every build.
B=${1:-build}
CXX=${CXX:-g++}
W="-Wall -Wextra -Wpedantic -Werror"
pass=0; fail=0
ok()  { pass=$((pass + 1)); echo "ok   $1"; }
bad() { fail=$((fail + 1)); echo "FAIL $1"; }
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
/usr/bin/python3 tools/mksingle.py -o "$tmp/psik_single.h" 2>/dev/null || bad "tools/mksingle.py failed"

for std in c++11 c++17; do
    if $CXX -std=$std $W -Iinclude -Iexamples/cxx -o "$tmp/wrap-$std" tests/cxx/test_wrapper.cpp \
            "$B/lib/libpsik.a" -lm 2> "$tmp/cc.log"; then
        "$tmp/wrap-$std" > "$tmp/wrap-$std.out" 2>&1; st=$?
        p=$(sed -n 's/^cxx-wrapper: \([0-9]*\) passed.*/\1/p' "$tmp/wrap-$std.out")
        f=$(sed -n 's/^cxx-wrapper: [0-9]* passed, \([0-9]*\) failed/\1/p' "$tmp/wrap-$std.out")
        grep -E '^(FAIL|# )' "$tmp/wrap-$std.out" | sed "s/^/[$std] /"
        pass=$((pass + ${p:-0})); fail=$((fail + ${f:-0}))
        [ "$st" -ne 0 ] && [ "${f:-0}" -eq 0 ] && bad "test_wrapper ($std) exited with $st"
    else
        bad "test_wrapper does not build as $std:"; head -15 "$tmp/cc.log"
    fi
    if $CXX -std=$std $W -Iinclude -Iexamples/cxx -o "$tmp/hz-$std" examples/cxx/horizons.cpp \
            "$B/lib/libpsik.a" -lm 2> "$tmp/cc.log" && "$tmp/hz-$std" > "$tmp/hz-$std.out"; then
        rows=$(grep -c '^ *-[0-9]' "$tmp/hz-$std.out")
        [ "$rows" -eq 7 ] && grep -q '^refused: n must be greater than 1 (got 0.8)$' "$tmp/hz-$std.out" \
            && ok "horizons ($std, libpsik.a): $rows rows and the refusal sentence" \
            || bad "horizons ($std) output unexpected: $(cat "$tmp/hz-$std.out")"
    else
        bad "horizons does not build or run as $std:"; head -15 "$tmp/cc.log"
    fi
done
if $CXX -std=c++20 $W -DPSIK_HPP_SINGLE_HEADER -DPSIK_STATIC -I"$tmp" -Iexamples/cxx -o "$tmp/hz-single" \
        examples/cxx/horizons.cpp -lm 2> "$tmp/cc.log" && "$tmp/hz-single" > "$tmp/hz-single.out"; then
    cmp -s "$tmp/hz-c++11.out" "$tmp/hz-single.out" \
        && ok "horizons from the single header (C++20, PSIK_STATIC) prints what the library build prints" \
        || { bad "single-header horizons differs:"; diff "$tmp/hz-c++11.out" "$tmp/hz-single.out" | head; }
else
    bad "horizons does not build from the single header:"; head -15 "$tmp/cc.log"
fi
echo "cxx: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
