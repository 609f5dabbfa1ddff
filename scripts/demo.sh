#!/usr/bin/env bash
# Installs missing Debian packages, builds Release, and runs machcut on the bundled invented
# demo aircraft. Results go to out/demo/.
# Usage: bash scripts/demo.sh
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/install-deps.sh
cmake -S . -B build/release -DCMAKE_BUILD_TYPE=Release >/dev/null
cmake --build build/release -j"$(nproc)" --target machcut
MC=build/release/slicing/machcut
BASE=(models/demo/baseline/*.obj)
REV=(models/demo/revised/*.obj)
OUT=out/demo
mkdir -p "$OUT"

echo "== Health of the baseline demo aircraft"
"$MC" inspect "${BASE[@]}" --json "$OUT/inspect.json"

echo "== Normal-cut area distribution (M = 1) → $OUT/area_m1.csv"
"$MC" area "${BASE[@]}" --mach 1 --stations 201 --csv "$OUT/area_m1.csv" --json "$OUT/area_m1.json"
echo "== Mach-plane area distribution (M = 1.4, roll 0°) → $OUT/area_m1.4_roll0.csv"
"$MC" area "${BASE[@]}" --mach 1.4 --roll 0 --stations 201 --csv "$OUT/area_m1.4_roll0.csv"
echo
echo "Results in $OUT/. Preliminary design estimates only: confirm with validated analysis and test."
