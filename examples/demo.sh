#!/bin/sh
# demo.sh - the main job on the bundled (invented) data of sample OF7-B2,
# Orrin Flats research plot 7, measured at the Tamsin Hollow soil physics
# bench: fit every model to the drainage experiment and the conductivity
# points, rank by AICc, print the parameters with 95 % intervals, write the
# plots and the property table for a solver. Usage: sh examples/demo.sh BUILD_DIR
set -e
B=${1:-build}
OUT=$B/demo
mkdir -p "$OUT"
D=examples/data
echo "== psik fit: sample OF7-B2 (Orrin Flats plot 7, horizon B2, 35-40 cm), all models"
"$B/bin/psik" fit "$D/orrin_flats_of7_b2_retention.csv" \
    --conductivity "$D/orrin_flats_of7_b2_conductivity.csv" \
    --model all --units h=cm,k=cm/d \
    --plot "$OUT/of7_b2" --plot-models 6 \
    --table-out "$OUT/of7_b2_properties.csv" --from -0.01 --to -100000 --points 141
echo
echo "== the same fit for vgm alone, as JSON (first 400 characters)"
"$B/bin/psik" fit "$D/orrin_flats_of7_b2_retention.csv" \
    --conductivity "$D/orrin_flats_of7_b2_conductivity.csv" --model vgm --units h=cm,k=cm/d --json \
    | head -c 400; echo " ..."
echo
echo "== the C API on the same data (examples/fit_api.c)"
"$B/bin/fit_api"
echo
echo "== outputs"
ls -l "$OUT"
echo "property table (first rows):"
head -8 "$OUT/of7_b2_properties.csv"
