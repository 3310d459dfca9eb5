#!/bin/sh
# Run every test program and print one closing line "N passed, N failed".
# cmocka programs report "[  PASSED  ] N test(s)." and "[  FAILED  ] N test(s)";
# other suites (Python, Fortran, shell) print a line "suite: N passed, N failed".
B=${1:-build}
passed=0; failed=0
log=$B/tests/last_run.log
mkdir -p $B/tests; : > $log
count() {   # $1 = name, $2 = output file, $3 = exit status
    p=$(sed -n 's/^\[  PASSED  \] \([0-9]*\) test.*/\1/p' "$2" | tail -1)
    f=$(sed -n 's/^\[  FAILED  \] \([0-9]*\) test.*/\1/p' "$2" | tail -1)
    if [ -z "$p$f" ]; then
        p=$(sed -n 's/^[a-z0-9_-]*: \([0-9]*\) passed, \([0-9]*\) failed.*/\1/p' "$2" | tail -1)
        f=$(sed -n 's/^[a-z0-9_-]*: \([0-9]*\) passed, \([0-9]*\) failed.*/\2/p' "$2" | tail -1)
    fi
    p=${p:-0}; f=${f:-0}
    if [ "$3" -ne 0 ] && [ "$f" -eq 0 ]; then f=1; fi   # crashed or failed outside a test
    if [ "$p" -eq 0 ] && [ "$f" -eq 0 ]; then f=1; echo "$1: ran no test"; fi
    passed=$((passed + p)); failed=$((failed + f))
    echo "$1: $p passed, $f failed" >> $log
}
run() {     # $1 = name, rest = command
    name=$1; shift
    out=$B/tests/$name.out
    echo "== $name"
    "$@" > "$out" 2>&1; st=$?
    grep -E '^(#|\[  FAILED|\[  ERROR|ERROR|FAIL|.*: [0-9]+ passed)' "$out" | grep -v '^\[  FAILED  \] 0' || true
    [ $st -ne 0 ] && tail -20 "$out"
    count "$name" "$out" $st
}
for t in $B/tests/test_*; do
    [ -x "$t" ] || continue
    run "$(basename $t)" "$t"
done
for t in $B/asan/test_*; do
    [ -x "$t" ] || continue
    run "asan-$(basename $t)" env ASAN_OPTIONS=detect_leaks=1 UBSAN_OPTIONS=print_stacktrace=1 "$t"
done
for t in $B/tests/cxx_header $B/tests/c11_header; do
    [ -x "$t" ] && run "$(basename $t)" "$t"
done
for s in tests/suites/*.sh; do
    [ -f "$s" ] && run "$(basename $s .sh)" sh "$s" "$B"
done
echo "$passed passed, $failed failed"
[ "$failed" -eq 0 ]
