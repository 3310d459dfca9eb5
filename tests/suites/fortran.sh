#!/bin/sh
# fortran.sh - the Fortran module (bindings/fortran/psik.f90) with gfortran:
# builds the module, runs tests/fortran/test_binding.f90 against values the C
# library writes (tests/fortran/ref_values.c), and runs the drainage example
# (examples/fortran/drainage.f90), checking its initial storage against C and
# its mass balance.
B=${1:-build}
FC=${FC:-gfortran}
FFLAGS="-std=f2018 -Wall -Wextra -pedantic -Werror"
O=$B/fortran
pass=0; fail=0
ok()  { pass=$((pass + 1)); echo "ok   $1"; }
bad() { fail=$((fail + 1)); echo "FAIL $1"; }
mkdir -p "$O"
if ! command -v "$FC" >/dev/null; then
    echo "FAIL $FC is missing (tests/deps.sh installs gfortran)"; echo "fortran: 0 passed, 1 failed"; exit 1
fi

if $FC $FFLAGS -J "$O" -c bindings/fortran/psik.f90 -o "$O/psik.o" 2> "$O/module.log"; then
    ok "module psik builds ($FC $FFLAGS)"
else
    bad "module psik does not build:"; head -20 "$O/module.log"
    echo "fortran: $pass passed, $fail failed"; exit 1
fi

# binding test against the C library's own values
if cc -std=c99 -Wall -Wextra -Wpedantic -Werror -Iinclude -o "$O/ref_values" tests/fortran/ref_values.c \
        "$B/lib/libpsik.a" -lm && "$O/ref_values" > "$O/ref.txt" \
   && $FC $FFLAGS -Wno-compare-reals -I"$O" -o "$O/test_binding" tests/fortran/test_binding.f90 \
        "$O/psik.o" "$B/lib/libpsik.a" -lm 2> "$O/test.log"; then
    "$O/test_binding" "$O/ref.txt" > "$O/test.out" 2>&1; st=$?
    grep -E '^(FAIL|# )' "$O/test.out"
    p=$(sed -n 's/^fortran-binding: \([0-9]*\) passed, \([0-9]*\) failed/\1/p' "$O/test.out")
    f=$(sed -n 's/^fortran-binding: \([0-9]*\) passed, \([0-9]*\) failed/\2/p' "$O/test.out")
    pass=$((pass + ${p:-0})); fail=$((fail + ${f:-0}))
    [ "$st" -ne 0 ] && [ "${f:-0}" -eq 0 ] && bad "test_binding exited with $st"
    echo "# binding test: ${p:-0} passed, ${f:-0} failed"
else
    bad "binding test does not build:"; head -20 "$O/test.log"
fi

# the drainage example, also linked against the shared library
if $FC $FFLAGS -I"$O" -o "$O/drainage" examples/fortran/drainage.f90 "$O/psik.o" \
        -L"$B/lib" -lpsik -Wl,-rpath,"$(cd "$B/lib" && pwd)" 2> "$O/drainage.log"; then
    ok "examples/fortran/drainage.f90 builds against libpsik.so"
    if "$O/drainage" > "$O/drainage.out" 2>&1; then
        ok "drainage runs ($(sed -n 's/^steps \(.*\)/\1/p' "$O/drainage.out"))"
        # initial storage: 20 cells x 5 cm x theta(-15) from C
        cat > "$O/storage.c" <<'CEOF'
#include <stdio.h>
#include "psik.h"
int main(void) {
    const double par[6] = { 0.067, 0.45, 0.02, 1.41, 10.8, 0.5 };
    psik_model m; double s = 0; int i;
    if (psik_init(&m, PSIK_VGM, par) != PSIK_OK) return 1;
    for (i = 0; i < 20; i++) s += psik_theta(&m, -15.0) * 5.0;
    printf("%.6f\n", s); return 0; }
CEOF
        cs=$(cc -std=c99 -Iinclude -o "$O/storage" "$O/storage.c" "$B/lib/libpsik.a" -lm && "$O/storage")
        fs=$(sed -n 's/^initial storage *\([0-9.]*\) cm/\1/p' "$O/drainage.out")
        [ -n "$cs" ] && [ "$cs" = "$fs" ] && ok "initial storage $fs cm = C's $cs cm" \
            || bad "initial storage: Fortran '$fs', C '$cs'"
        mb=$(sed -n 's/^mass balance error *\(.*\)/\1/p' "$O/drainage.out")
        awk -v e="$mb" 'BEGIN { exit !(e != "" && e + 0 < 1e-10 && e + 0 > -1e-10) }' \
            && ok "mass balance error $mb (limit 1e-10: mixed form + Newton conserves mass)" \
            || bad "mass balance error '$mb' (limit 1e-10)"
        # drainage slows down monotonically and storage falls: a free-draining sealed column
        awk '/^ *[0-9]+\.[0-9]+ +[0-9.E+-]+ +[0-9.]+ +[0-9.]+$/ {
                 if (n && ($2 >= q || $4 >= s)) bad = 1; q = $2; s = $4; n++ }
             END { exit !(n == 10 && !bad) }' "$O/drainage.out" \
            && ok "10 daily reports, outflow and storage decrease every day" \
            || bad "daily reports are not monotone (see $O/drainage.out)"
        sed -n '/^final storage/p; /^drained/p' "$O/drainage.out" | sed 's/^/# /'
    else
        bad "drainage failed:"; tail -5 "$O/drainage.out"
    fi
else
    bad "drainage example does not build:"; head -20 "$O/drainage.log"
fi
# coverage (information): exported C functions without a Fortran interface
unbound=""
for f in $(grep -v '^#' tests/abi/exported_symbols.txt | sed 's/@.*//'); do
    grep -q "name=\"$f\"" bindings/fortran/psik.f90 || grep -qi "function $f(" bindings/fortran/psik.f90 \
        || unbound="$unbound $f"
done
echo "# C functions without a Fortran interface:${unbound:- none}"
echo "fortran: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
