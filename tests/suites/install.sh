#!/bin/sh
# install.sh - `make install` into temporary prefixes (directly, and staged
# through DESTDIR), then programs built against the installed copy through
# pkg-config only: C against libpsik.so and libpsik.a, C++ (examples/cxx), C
# from the installed single header. Their output must equal that of the same
# program built in the tree. Ends with `make uninstall`.
B=${1:-build}
MK=${MAKE:-make}
W="-std=c99 -Wall -Wextra -Wpedantic -Werror"
pass=0; fail=0
ok()  { pass=$((pass + 1)); echo "ok   $1"; }
bad() { fail=$((fail + 1)); echo "FAIL $1"; }
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
command -v pkg-config >/dev/null || { echo "FAIL pkg-config missing (tests/deps.sh installs pkgconf)"; echo "install: 0 passed, 1 failed"; exit 1; }
abi=$(sed -n 's/^#define PSIK_ABI_VERSION \([0-9]*\)/\1/p' include/psik.h)
ver=$(sed -n 's/^#define PSIK_VERSION "\(.*\)"/\1/p' include/psik.h)
sover="$abi.${ver#*.}"

# the in-tree reference output (tests/single/check.c prints every kind's values)
cc $W -Iinclude -o "$tmp/ref" tests/single/check.c "$B/lib/libpsik.a" -lm && "$tmp/ref" > "$tmp/ref.out" 2>/dev/null \
    || bad "in-tree reference program failed"
# the single header carries the portable kernels: its reference is that variant
cc $W -Iinclude -DREF_PORTABLE -o "$tmp/refp" tests/single/check.c "$B/lib/libpsik.a" -lm && "$tmp/refp" > "$tmp/refp.out" 2>/dev/null \
    || bad "in-tree portable reference program failed"

# 1. direct install into a prefix
P=$tmp/prefix
if $MK -s --no-print-directory install PREFIX="$P" B="$B" > "$tmp/install.log" 2>&1; then
    ok "make install PREFIX=$P"
else
    bad "make install failed:"; tail -15 "$tmp/install.log"
    echo "install: $pass passed, $fail failed"; exit 1
fi
missing=""
for f in include/psik.h include/psik_single.h lib/libpsik.a lib/libpsik.so.$sover \
         lib/pkgconfig/psik.pc share/psik/fortran/psik.f90; do
    [ -f "$P/$f" ] || missing="$missing $f"
done
[ -z "$missing" ] && ok "headers, libraries, psik.pc and the Fortran module source are installed" \
    || bad "not installed:$missing"
[ "$(readlink "$P/lib/libpsik.so")" = "libpsik.so.$abi" ] && [ "$(readlink "$P/lib/libpsik.so.$abi")" = "libpsik.so.$sover" ] \
    && ok "links libpsik.so -> libpsik.so.$abi -> libpsik.so.$sover (relative)" \
    || bad "installed links: $(ls -l "$P/lib" | grep libpsik.so)"

export PKG_CONFIG_PATH="$P/lib/pkgconfig"
pv=$(pkg-config --modversion psik)
[ "$pv" = "$ver" ] && ok "pkg-config --modversion psik = $pv" || bad "pkg-config --modversion psik = '$pv', want $ver"
cflags=$(pkg-config --cflags psik); libs=$(pkg-config --libs psik); libdir=$(pkg-config --variable=libdir psik)
case "$(pkg-config --static --libs psik)" in *-lm*) ok "pkg-config --static --libs adds -lm";; *) bad "static libs lack -lm";; esac

# C against the shared library, run through the rpath only
if cc $W $cflags -o "$tmp/c_shared" tests/single/check.c $libs -Wl,-rpath,"$libdir" 2> "$tmp/cc.log"; then
    need=$(readelf -d "$tmp/c_shared" | sed -n 's/.*Shared library: \[\(libpsik[^]]*\)\].*/\1/p')
    [ "$need" = "libpsik.so.$abi" ] && ok "program records NEEDED $need (the SONAME)" || bad "NEEDED is '$need'"
    if env -u LD_LIBRARY_PATH "$tmp/c_shared" > "$tmp/c_shared.out" 2>/dev/null && cmp -s "$tmp/ref.out" "$tmp/c_shared.out"; then
        ok "C against installed libpsik.so: $(wc -l < "$tmp/ref.out") lines equal the in-tree build"
    else
        bad "C against installed libpsik.so: output differs or the program failed"
    fi
else
    bad "C build through pkg-config failed: cc $cflags ... $libs"; head -10 "$tmp/cc.log"
fi
# C against the static archive
if cc $W $cflags -o "$tmp/c_static" tests/single/check.c "$libdir/libpsik.a" $(pkg-config --static --libs-only-l psik | sed 's/-lpsik//') 2> "$tmp/cc.log" \
   && "$tmp/c_static" > "$tmp/c_static.out" 2>/dev/null && cmp -s "$tmp/ref.out" "$tmp/c_static.out"; then
    readelf -d "$tmp/c_static" | grep -q 'libpsik' && bad "static program still needs libpsik.so" \
        || ok "C against installed libpsik.a: no libpsik.so needed, same output"
else
    bad "C against installed libpsik.a failed"; head -10 "$tmp/cc.log"
fi
# C++ example
if command -v g++ >/dev/null; then
    if g++ -std=c++11 -Wall -Wextra -Wpedantic -Werror $cflags -Iexamples/cxx -o "$tmp/hz" examples/cxx/horizons.cpp $libs \
           -Wl,-rpath,"$libdir" 2> "$tmp/cc.log" && "$tmp/hz" > "$tmp/hz.out"; then
        g++ -std=c++11 -Iinclude -Iexamples/cxx -o "$tmp/hz_tree" examples/cxx/horizons.cpp "$B/lib/libpsik.a" -lm \
            && "$tmp/hz_tree" > "$tmp/hz_tree.out"
        cmp -s "$tmp/hz.out" "$tmp/hz_tree.out" && ok "examples/cxx/horizons.cpp through pkg-config: same table as in the tree" \
            || bad "horizons output differs between installed and in-tree builds"
    else
        bad "C++ example through pkg-config failed"; head -10 "$tmp/cc.log"
    fi
fi
# installed single header, no library at all
if cc $W $cflags -DUSE_SINGLE -Itests/single -o "$tmp/single" tests/single/check.c -lm 2> "$tmp/cc.log" \
   && "$tmp/single" > "$tmp/single.out" 2>/dev/null && cmp -s "$tmp/refp.out" "$tmp/single.out"; then
    ok "installed psik_single.h builds a program with the library's values"
else
    bad "installed single header failed"; head -10 "$tmp/cc.log"
fi
# uninstall leaves no file behind
$MK -s --no-print-directory uninstall PREFIX="$P" B="$B" > /dev/null 2>&1
left=$(find "$P" -type f -o -type l | sed "s|$P/||" | tr '\n' ' ')
[ -z "$left" ] && ok "make uninstall removes every installed file" || bad "left after uninstall: $left"

# 2. staged install (DESTDIR): nothing outside the stage, paths say PREFIX
S=$tmp/stage; SP=/opt/psik-staged-test
if $MK -s --no-print-directory install PREFIX="$SP" DESTDIR="$S" B="$B" > "$tmp/stage.log" 2>&1 \
   && [ -f "$S$SP/lib/libpsik.so.$sover" ] && [ ! -e "$SP" ]; then
    grep -q "^prefix=$SP\$" "$S$SP/lib/pkgconfig/psik.pc" && ok "DESTDIR install: files under the stage, psik.pc names $SP" \
        || bad "staged psik.pc: $(grep ^prefix "$S$SP/lib/pkgconfig/psik.pc")"
    if PKG_CONFIG_PATH="$S$SP/lib/pkgconfig" PKG_CONFIG_SYSROOT_DIR="$S" sh -c \
        'cc '"$W"' $(pkg-config --cflags psik) -o "$0" tests/single/check.c $(pkg-config --libs psik)' "$tmp/c_stage" 2> "$tmp/cc.log" \
       && LD_LIBRARY_PATH="$S$SP/lib" "$tmp/c_stage" > "$tmp/c_stage.out" 2>/dev/null && cmp -s "$tmp/ref.out" "$tmp/c_stage.out"; then
        ok "program built from the stage (PKG_CONFIG_SYSROOT_DIR) gives the in-tree values"
    else
        bad "build from the stage failed"; head -10 "$tmp/cc.log"
    fi
else
    bad "staged install failed:"; tail -10 "$tmp/stage.log"
fi
echo "install: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
