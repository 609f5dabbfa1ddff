#!/usr/bin/env bash
# Installs missing Debian packages, builds Release, and runs machcut on the bundled invented
# demo aircraft (models/demo). Results go to out/demo/.
# Usage: bash scripts/demo.sh
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/install-deps.sh
cmake -S . -B build/release -DCMAKE_BUILD_TYPE=Release >/dev/null
cmake --build build/release -j"$(nproc)" --target machcut machcut-view
MC=build/release/slicing/machcut
BASE=(models/demo/baseline/*.obj)
REV=(models/demo/revised/*.obj)
OUT=out/demo
mkdir -p "$OUT"

echo "== 1. Health of the baseline demo aircraft"
"$MC" inspect "${BASE[@]}" --json "$OUT/inspect.json"

echo
echo "== 2. Area distributions: normal cuts (M = 1) and Mach planes (M = 1.4, roll 0°)"
"$MC" area "${BASE[@]}" -q --mach 1 --stations 201 --csv "$OUT/area_m1.csv" --json "$OUT/area_m1.json"
"$MC" area "${BASE[@]}" -q --mach 1.4 --roll 0 --stations 201 --csv "$OUT/area_m1.4_roll0.csv"
echo "written: $OUT/area_m1.csv, $OUT/area_m1.json, $OUT/area_m1.4_roll0.csv"

echo
echo "== 3. Zero-lift wave drag D/q against Mach (nacelles flow-through: capture area subtracted)"
"$MC" drag "${BASE[@]}" -q --mach 1.0:2.0:0.1 --capture nacelles.obj \
  --json "$OUT/drag.json" --csv "$OUT/drag.csv" || echo "(drag: see the message above)"

echo
echo "== 4. Area jumps at M = 1.6"
"$MC" jumps "${BASE[@]}" -q --mach 1.6 --json "$OUT/jumps.json"

echo
echo "== 5. Baseline against the area-ruled revision"
"$MC" compare "${BASE[@]}" -- "${REV[@]}" -q --mach 1.2,1.6,2 --capture nacelles.obj \
  --json "$OUT/compare.json"

echo
echo "== 6. Report on the revision → $OUT/report/index.html"
"$MC" report "${REV[@]}" -q --out "$OUT/report" --mach 1.2,1.6,2 --capture nacelles.obj \
  --fix 6 --max-area 8

echo
echo "== 7. Where to push the surface in or out at M 1.4 → $OUT/sensitivity_M1.4.csv, .ply"
"$MC" sensitivity "${BASE[@]}" -q --mach 1.4 --capture nacelles.obj \
  --csv "$OUT/sensitivity_M1.4.csv" --ply "$OUT/sensitivity_M1.4.ply"

echo
echo "== 8. The fuselage reshaped for least D/q at M 1.4 (canopy station 7.3 m kept) → $OUT/reshaped/"
"$MC" reshape "${BASE[@]}" -q --part fuselage.obj --mach 1.4 --keep 7.3 --capture nacelles.obj \
  --out "$OUT/reshaped" || echo "(reshape: see the message above)"

echo
echo "== 9. Viewer screenshots → $OUT/viewer.png, $OUT/viewer_sensitivity.png"
build/release/viewer/machcut-view --screenshot "$OUT/viewer.png" --mach 1.4 --capture nacelles.obj "${BASE[@]}" \
  || echo "(viewer screenshot failed: see the message above)"
build/release/viewer/machcut-view --screenshot "$OUT/viewer_sensitivity.png" --mach 1.4 --capture nacelles.obj \
  --show sensitivity "${BASE[@]}" || echo "(viewer screenshot failed: see the message above)"

echo
echo "Results in $OUT/. Preliminary design estimates only (linear theory, zero lift):"
echo "confirm them with validated analysis, test and the applicable codes and licensed practice."
