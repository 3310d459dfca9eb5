#!/bin/sh
# abi.sh - the shared library's binary interface, checked against committed
# facts (tests/abi/exported_symbols.txt is the source of truth):
#   1. SONAME is libpsik.so.<PSIK_ABI_VERSION> and the version links exist;
#   2. the dynamic symbols defined by libpsik.so are exactly the list, each
#      with its version node (a new public function must be added there);
#   3. every PSIK_API function declared in include/psik.h is exported and
#      every exported symbol is declared there;
#   4. the library needs nothing but libc and libm at run time.
# To refresh the list after adding a public function on purpose:
#   PSIK_ABI_UPDATE=1 sh tests/suites/abi.sh build
B=${1:-build}
LIST=tests/abi/exported_symbols.txt
pass=0; fail=0
ok()  { pass=$((pass + 1)); echo "ok   $1"; }
bad() { fail=$((fail + 1)); echo "FAIL $1"; }
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT

so=$B/lib/libpsik.so
abi=$(sed -n 's/^#define PSIK_ABI_VERSION \([0-9]*\)/\1/p' include/psik.h)
ver=$(sed -n 's/^#define PSIK_VERSION "\(.*\)"/\1/p' include/psik.h)
if [ ! -f "$so" ]; then
    echo "FAIL $so is missing (run make)"; echo "abi: 0 passed, 1 failed"; exit 1
fi

# 1. SONAME and links
soname=$(readelf -d "$so" | sed -n 's/.*Library soname: \[\(.*\)\].*/\1/p')
[ "$soname" = "libpsik.so.$abi" ] && ok "SONAME is $soname" || bad "SONAME is '$soname', want libpsik.so.$abi"
real="libpsik.so.$abi.${ver#*.}"
[ "$(readlink "$B/lib/libpsik.so")" = "libpsik.so.$abi" ] && [ "$(readlink "$B/lib/libpsik.so.$abi")" = "$real" ] \
    && [ -f "$B/lib/$real" ] \
    && ok "links libpsik.so -> libpsik.so.$abi -> $real" \
    || bad "version links: libpsik.so -> $(readlink "$B/lib/libpsik.so"), libpsik.so.$abi -> $(readlink "$B/lib/libpsik.so.$abi"), want $real"

# 2. exported symbols (defined, dynamic; the version node entry itself is skipped)
nm -D --defined-only "$so" | awk '$2 != "A" { print $3 }' | LC_ALL=C sort > "$tmp/built"
if [ -n "$PSIK_ABI_UPDATE" ]; then
    { sed -n '/^#/p' "$LIST"; cat "$tmp/built"; } > "$tmp/new" && cp "$tmp/new" "$LIST"; echo "abi: wrote $LIST ($(wc -l < "$tmp/built") symbols)"
fi
grep -v '^#' "$LIST" | grep -v '^$' | LC_ALL=C sort > "$tmp/want"
n=$(wc -l < "$tmp/built")
if cmp -s "$tmp/want" "$tmp/built"; then
    ok "$n exported symbols match $LIST"
else
    bad "exported symbols differ from $LIST ('-' only in the list, '+' only in the library):"
    diff -u "$tmp/want" "$tmp/built" | sed -n '3,$p' | grep '^[-+]' | sed 's/^/     /'
    echo "     if the change is intended: PSIK_ABI_UPDATE=1 sh tests/suites/abi.sh $B"
fi
# every exported name is psik_* in version node PSIK_<major>...
odd=$(grep -v "^psik_[a-z0-9_]*@@\{0,1\}PSIK_$abi" "$tmp/built" || true)
[ -z "$odd" ] && ok "every symbol is psik_* in version node PSIK_$abi" || bad "symbols outside psik_*/PSIK_$abi: $odd"

# 3. header declarations vs exports
tr '\n' ' ' < include/psik.h | grep -o 'PSIK_API[^;{(]*(' \
    | sed -n 's/.*[^a-zA-Z0-9_]\(psik_[a-zA-Z0-9_]*\)[ ]*($/\1/p' | LC_ALL=C sort -u > "$tmp/decl"
sed 's/@.*//' "$tmp/built" | LC_ALL=C sort -u > "$tmp/names"
if cmp -s "$tmp/decl" "$tmp/names"; then
    ok "$(wc -l < "$tmp/decl") PSIK_API declarations in include/psik.h = exported names"
else
    bad "include/psik.h declarations vs exports ('-' declared only, '+' exported only):"
    diff -u "$tmp/decl" "$tmp/names" | sed -n '3,$p' | grep '^[-+]' | sed 's/^/     /'
fi

# 4. run-time dependencies
needed=$(readelf -d "$so" | sed -n 's/.*Shared library: \[\(.*\)\].*/\1/p' | tr '\n' ' ')
extra=$(echo "$needed" | tr ' ' '\n' | grep -v -E '^(libm\.so\.[0-9]+|libc\.so\.[0-9]+|)$' || true)
[ -z "$extra" ] && ok "run-time dependencies: $needed" || bad "unexpected run-time dependencies: $extra"

echo "abi: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
