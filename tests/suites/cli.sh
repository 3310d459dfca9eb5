#!/bin/sh
# cli.sh - the psik tool (examples/cli): commands, JSON, errors naming
# file:line:column, exit codes, atomic output files, compare.
# Usage: sh tests/suites/cli.sh BUILD_DIR
B=${1:-build}
P=$B/bin/psik
D=examples/data
pass=0; fail=0
ok()  { pass=$((pass + 1)); echo "ok   $1"; }
bad() { fail=$((fail + 1)); echo "FAIL $1"; }
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
PY=/usr/bin/python3

# expect CODE "what" command...: exit status and stderr kept in $tmp/err
expect() {
    code=$1; what=$2; shift 2
    "$@" > "$tmp/out" 2> "$tmp/err"; st=$?
    if [ "$st" -eq "$code" ]; then ok "$what (exit $st)"; else bad "$what: exit $st, want $code; stderr: $(head -3 "$tmp/err")"; fi
}
has() {   # has FILE PATTERN what
    if grep -q -- "$2" "$1"; then ok "$3"; else bad "$3: no '$2' in: $(head -3 "$1")"; fi
}

[ -x "$P" ] || { echo "FAIL $P missing"; echo "cli: 0 passed, 1 failed"; exit 1; }

expect 0 "--help" "$P" --help
has "$tmp/out" "Exit codes" "--help documents the exit codes"
expect 1 "no command" "$P"
expect 1 "unknown command" "$P" frobnicate

# ---- fit, JSON
expect 0 "fit vgm --json" "$P" fit $D/orrin_flats_of7_b2_retention.csv --conductivity $D/orrin_flats_of7_b2_conductivity.csv --json
cp "$tmp/out" "$tmp/fit.json"
if $PY -c "
import json,sys,math
d=json.load(open('$tmp/fit.json'))
assert d['model']=='vgm' and set(d['parameters'])=={'theta_r','theta_s','alpha','n','ks','l'}
assert d['sse']>0 and math.isfinite(d['sse'])
f=d['fits'][0]
for k,(lo,hi) in f['confidence_interval'].items():
    assert lo<=f['parameters'][k]<=hi, k
print('# vgm sse', d['sse'])
" > "$tmp/py" 2>&1; then ok "fit JSON parses with model, parameters, sse, intervals around estimates ($(cat "$tmp/py"))"; else bad "fit JSON: $(tail -2 "$tmp/py")"; fi

expect 0 "fit --model all --json" "$P" fit $D/orrin_flats_of7_b2_retention.csv --conductivity $D/orrin_flats_of7_b2_conductivity.csv --model all --json
cp "$tmp/out" "$tmp/all.json"
"$P" models > "$tmp/models"
nk=$(grep -c '^[a-z]' "$tmp/models")
if $PY -c "
import json
d=json.load(open('$tmp/all.json'))
n=len(d['fits'])+len(d['skipped'])
assert n==$nk, (n,$nk)
a=[f['aicc'] for f in d['fits']]
assert a==sorted(a)
assert abs(sum(f['akaike_weight'] for f in d['fits'])-1)<1e-12
assert d['model']==d['fits'][0]['model']
print(len(d['fits']),'fitted of',n)
" > "$tmp/py" 2>&1; then ok "--model all: every kind of 'psik models' tried, ranked by AICc ($(cat "$tmp/py"))"; else bad "--model all: $(tail -2 "$tmp/py")"; fi

# no K data: ks and l held and said so
expect 0 "fit without K data" "$P" fit $D/orrin_flats_of7_b2_retention.csv
has "$tmp/out" "held: not determined by the data" "ks, l reported as held without K data"

# --fix
expect 0 "fit --fix theta_r=0.05" "$P" fit $D/orrin_flats_of7_b2_retention.csv --fix theta_r=0.05 --json
has "$tmp/out" '"theta_r": 0.050000000000000003' "--fix holds theta_r at 0.05"
expect 1 "--fix unknown parameter" "$P" fit $D/orrin_flats_of7_b2_retention.csv --fix nope=1
has "$tmp/err" "no parameter 'nope'" "--fix names the unknown parameter"
expect 1 "unknown option" "$P" fit $D/orrin_flats_of7_b2_retention.csv --frob
expect 1 "unknown model" "$P" fit $D/orrin_flats_of7_b2_retention.csv --model nomodel
has "$tmp/err" "unknown model 'nomodel'" "unknown model named"

# ---- bad input: file, line, column
printf '# comment\nh,theta\n-1,0.40\n-10,43\n-100,0.2\n' > "$tmp/pct.csv"
expect 2 "theta above 1" "$P" fit "$tmp/pct.csv"
has "$tmp/err" "pct.csv:4:2: theta = 43 is outside 0..1" "theta above 1: file:line:column"
printf 'h,theta\n-1,0.40\n-10,nan\n' > "$tmp/nan.csv"
expect 2 "NaN field" "$P" fit "$tmp/nan.csv"
has "$tmp/err" "nan.csv:3:2: not a finite number" "NaN: file:line:column"
printf 'h,theta\n-1,0.40\n-10,0.3,7\n' > "$tmp/extra.csv"
expect 2 "extra field" "$P" fit "$tmp/extra.csv"
has "$tmp/err" "extra.csv:3:3: more fields" "extra field: line and column"
printf 'h,theta\n-1,0.40\n-10,abc\n' > "$tmp/txt.csv"
expect 2 "text in a number field" "$P" fit "$tmp/txt.csv"
has "$tmp/err" "txt.csv:3:2: not a number: 'abc'" "text field named"
printf 'head,theta\n-1,0.4\n' > "$tmp/col.csv"
expect 2 "unknown column" "$P" fit "$tmp/col.csv"
has "$tmp/err" "column 1 'head'" "unknown column named"
printf 'h,theta\n-1,-0.1\n' > "$tmp/neg.csv"
expect 2 "negative theta" "$P" fit "$tmp/neg.csv"
printf 'h,theta\n-1,0.4\n-10,0.3\n-100,0.2\n' > "$tmp/few.csv"
expect 2 "too few points" "$P" fit "$tmp/few.csv"
has "$tmp/err" "need at least 5 points" "too few points explained"
printf 'h,theta\n-5,0.4\n-5,0.3\n-5,0.2\n-5,0.35\n-5,0.31\n-5,0.33\n' > "$tmp/one.csv"
expect 2 "all at one head" "$P" fit "$tmp/one.csv"
has "$tmp/err" "one head" "all at one head explained"
printf 'h,k\n0,10\n-10,0\n' > "$tmp/k0.csv"
expect 2 "K = 0" "$P" fit $D/orrin_flats_of7_b2_retention.csv --conductivity "$tmp/k0.csv"
has "$tmp/err" "k0.csv:3:2: k = 0 must be greater than 0" "K <= 0: file:line:column"
expect 2 "missing file" "$P" fit "$tmp/none.csv"
has "$tmp/err" "none.csv: cannot open" "missing file named"
# documented behaviour: unsorted, duplicated, positive heads and a suction column
printf 'suction,theta\n100,0.30\n0,0.45\n1000,0.17\n10,0.42\n10,0.419\n15000,0.095\n330,0.225\n3,0.445\n' > "$tmp/uns.csv"
expect 0 "unsorted heads, replicates, suction column" "$P" fit "$tmp/uns.csv"
printf 'h,theta\n5,0.452\n0,0.45\n-10,0.42\n-100,0.30\n-1000,0.17\n-15000,0.095\n-330,0.225\n' > "$tmp/pos.csv"
expect 0 "positive heads are saturated points" "$P" fit "$tmp/pos.csv"

# ---- output files: atomic, and failures exit 4 without a file
expect 4 "--table-out into a missing directory" "$P" fit $D/orrin_flats_of7_b2_retention.csv --table-out "$tmp/no/dir/t.csv"
[ ! -e "$tmp/no/dir/t.csv" ] && ok "no output file after a failed write" || bad "a file was left"
expect 0 "fit --plot --table-out" "$P" fit $D/orrin_flats_of7_b2_retention.csv --conductivity $D/orrin_flats_of7_b2_conductivity.csv --model vgm,kosugi --plot "$tmp/p" --table-out "$tmp/props.csv" --points 31
[ -s "$tmp/p-retention.svg" ] && [ -s "$tmp/p-conductivity.svg" ] && [ -s "$tmp/props.csv" ] && ok "plots and property table written" || bad "outputs missing"
ls "$tmp"/*.tmp >/dev/null 2>&1 && bad "a .tmp file was left" || ok "no .tmp files left"
if $PY -c "
import xml.dom.minidom as m
for f in ['$tmp/p-retention.svg','$tmp/p-conductivity.svg']:
    d=m.parse(f); t=' '.join(n.firstChild.data for n in d.getElementsByTagName('text') if n.firstChild and n.firstChild.nodeType==3)
    assert 'suction' in t and 'measured' in t and 'vgm' in t, t[:200]
" 2>"$tmp/py"; then ok "SVGs are well-formed XML with axis labels and legend"; else bad "SVG: $(tail -1 "$tmp/py")"; fi
rows=$(grep -c '^-' "$tmp/props.csv")
[ "$rows" -eq 31 ] && ok "property table has 31 rows" || bad "property table has $rows rows"

# ---- table and compare
expect 0 "table --out" "$P" table --model vgm --par theta_r=0.078,theta_s=0.43,alpha=0.036,n=1.56,ks=24.96 --from -0.1 --to -1e4 --points 21 --out "$tmp/t.csv"
expect 0 "compare psik's own table" "$P" compare --model vgm --par theta_r=0.078,theta_s=0.43,alpha=0.036,n=1.56,ks=24.96 "$tmp/t.csv" --tol 0
has "$tmp/out" "theta *0.000e+00" "own table: zero difference"
expect 1 "table without --par" "$P" table --model vgm
expect 1 "table with a missing parameter" "$P" table --model vgm --par theta_r=0.078,theta_s=0.43,alpha=0.036
has "$tmp/err" "needs n (missing)" "missing parameter named"
expect 1 "table with an invalid parameter" "$P" table --model vgm --par theta_r=0.078,theta_s=0.43,alpha=0.036,n=0.9,ks=1
# someone else's constitutive code: the textbook vG-Mualem formulas in NumPy
$PY - "$tmp/theirs.csv" <<'PYEOF'
import sys, numpy as np
tr, ts, a, n, ks, l = 0.078, 0.43, 0.036, 1.56, 24.96, 0.5
m = 1 - 1 / n
h = -np.logspace(-1, 3, 17)
se = (1 + (a * -h) ** n) ** -m
th = tr + (ts - tr) * se
k = ks * se ** l * (1 - (1 - se ** (1 / m)) ** m) ** 2
th[7] *= 1.001            # a planted error in row 7 (file line 10)
with open(sys.argv[1], "w") as f:
    f.write("# textbook formulas, NumPy float64\nh,theta,k\n")
    for r in zip(h, th, k):
        f.write("%.17g,%.17g,%.17g\n" % r)
PYEOF
expect 3 "compare finds the planted error beyond --tol" "$P" compare --model vgm --par theta_r=0.078,theta_s=0.43,alpha=0.036,n=1.56,ks=24.96,l=0.5 "$tmp/theirs.csv" --tol 1e-6
has "$tmp/out" "theta *1.[0-9]*e-03 *10 " "compare reports the largest theta error at line 10"
kerr=$(awk '$1 == "k" { print $2 }' "$tmp/out")
echo "# textbook NumPy K vs psik: largest relative difference $kerr"
if $PY -c "import sys; sys.exit(0 if float('$kerr') < 1e-9 else 1)"; then ok "K of the textbook formulas within 1e-9 of psik ($kerr; numpy float64, moderate suctions)"; else bad "K difference $kerr"; fi
expect 0 "compare --json" "$P" compare --model vgm --par theta_r=0.078,theta_s=0.43,alpha=0.036,n=1.56,ks=24.96 "$tmp/theirs.csv" --json
if $PY -c "
import json; d=json.load(open('$tmp/out'))
assert d['model']=='vgm' and 'theta' in d['columns'] and d['columns']['theta']['line']==10
" 2>"$tmp/py"; then ok "compare JSON names the column, line and value"; else bad "compare JSON: $(tail -1 "$tmp/py")"; fi

echo "cli: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
