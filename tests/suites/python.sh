#!/bin/sh
# python.sh - the Python binding (bindings/python): its unittest suite under
# Debian's /usr/bin/python3, once with NumPy and once with NumPy hidden, then
# an offline `pip install` of the package into a temporary target, used
# against the built library through PSIK_LIBRARY.
B=${1:-build}
PY=/usr/bin/python3
export PYTHONDONTWRITEBYTECODE=1
pass=0; fail=0
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
lib=$(cd "$B/lib" && pwd)/libpsik.so.1

# C's offsetof/sizeof of every public struct, for the ctypes mirrors
cc -std=c99 -Wall -Wextra -Wpedantic -Werror -Iinclude -o "$tmp/layout" tests/abi/layout.c \
    && "$tmp/layout" > "$tmp/layout.txt" || { echo "FAIL tests/abi/layout.c"; fail=$((fail + 1)); }
export PSIK_LAYOUT_FILE="$tmp/layout.txt"

unit() {   # $1 = label, rest = extra args to run.py
    label=$1; shift
    PSIK_LIBRARY=$lib $PY bindings/python/tests/run.py "$@" > "$tmp/$label.log" 2>&1; st=$?
    n=$(sed -n 's/^Ran \([0-9]*\) test.*/\1/p' "$tmp/$label.log"); n=${n:-0}
    num() { v=$(tail -1 "$tmp/$label.log" | sed -n "s/.*$1=\([0-9]*\).*/\1/p"); echo "${v:-0}"; }
    f=$(( $(num failures) + $(num errors) )); s=$(num skipped)
    p=$((n - f - s))
    grep '^# ' "$tmp/$label.log" | sed "s/^# /# $label: /"
    if [ "$st" -ne 0 ] && [ "$f" -eq 0 ]; then f=1; fi
    if [ "$f" -ne 0 ]; then
        echo "FAIL $label:"; sed -n '/^=====/,$p' "$tmp/$label.log" | head -40 | sed 's/^/     /'
    fi
    echo "$label: $p ok, $f failed, $s skipped"
    pass=$((pass + p)); fail=$((fail + f))
}
unit with-numpy
unit no-numpy --no-numpy
grep -q "skipped 'NumPy hidden" "$tmp/no-numpy.log" && ! grep -q "skipped 'NumPy hidden" "$tmp/with-numpy.log" \
    && { pass=$((pass + 1)); echo "ok   NumPy tests ran in the first run and were skipped with NumPy hidden"; } \
    || { fail=$((fail + 1)); echo "FAIL NumPy was not present in the first run or not hidden in the second"; }

# offline install from a copy of the package (keeps the tree clean)
cp -r bindings/python "$tmp/src"
rm -rf "$tmp/src/build" "$tmp/src"/*.egg-info
if $PY -m pip install --no-index --no-build-isolation --no-deps --quiet --target "$tmp/site" "$tmp/src" \
        > "$tmp/pip.log" 2>&1; then
    out=$(cd "$tmp" && PYTHONPATH="$tmp/site" PSIK_LIBRARY=$lib $PY -c '
import psik
m = psik.Model("vgm", theta_r=0.078, theta_s=0.43, alpha=0.036, n=1.56, ks=24.96)
# installed copy is used, and it agrees with the library called directly
import ctypes
print(psik.__file__.startswith("'"$tmp/site"'"), m.theta(-100.0) == psik._c.psik_theta(ctypes.byref(m.c_model), -100.0), psik.version())
' 2>&1)
    case "$out" in
        "True True "*) pass=$((pass + 1)); echo "ok   pip install (offline, no build isolation) works: version ${out##* }";;
        *) fail=$((fail + 1)); echo "FAIL installed package: $out";;
    esac
else
    fail=$((fail + 1)); echo "FAIL pip install bindings/python offline:"; tail -15 "$tmp/pip.log" | sed 's/^/     /'
fi
# coverage (information): exported C functions not declared in bindings/python/psik/_lib.py
unbound=""
for f in $(grep -v '^#' tests/abi/exported_symbols.txt | sed 's/@.*//'); do
    grep -q "\"$f\"" bindings/python/psik/_lib.py || unbound="$unbound $f"
done
echo "# C functions not declared in bindings/python/psik/_lib.py:${unbound:- none}"
echo "python: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
