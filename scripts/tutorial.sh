#!/usr/bin/env bash
# The tutorial of docs/tutorial.md, end to end: raw junction-marker movies -> segmentation -> analysis -> comparison -> plan.
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/ensure-deps.sh
dotnet build src/ShapeNoise.Cli -c Release -nologo -v quiet >/dev/null
sn=(dotnet src/ShapeNoise.Cli/bin/Release/net10.0/shapenoise.dll)
t=runs/tutorial
# Replace only a folder this script made (it leaves a marker); anything else there is the user's and is kept.
marker="$t/.made-by-$(basename "$0")"
if [ -e "$t" ] && [ ! -f "$marker" ]; then
  echo "$(basename "$0"): $t exists and was not made by this script; move it away first" >&2; exit 3
fi
rm -rf "$t"; mkdir -p "$t"; touch "$marker"
echo "condition,replicate,path" > "$t/conditions.csv"
for i in 1 2 3; do
  # Two invented conditions: anisotropic shape noise (12 % along vs 6 % across the long axis) and isotropic (8 % both).
  "${sn[@]}" synth monolayer --out "$t/movies/wt-$i" --cells 300 --frames 24 --sigma-along 0.12 --sigma-across 0.06 --seed $((30 + i)) --raw >/dev/null
  "${sn[@]}" synth monolayer --out "$t/movies/ko-$i" --cells 300 --frames 24 --sigma-along 0.08 --sigma-across 0.08 --seed $((40 + i)) --raw >/dev/null
done
"${sn[@]}" segment "$t/movies/wt-1/raw.tif" --out "$t/seg-wt-1" --cell-diameter 8.9
"${sn[@]}" score "$t/seg-wt-1/labels.tif" "$t/movies/wt-1/labels.tif"
for c in wt ko; do for i in 1 2 3; do
  "${sn[@]}" analyze "$t/movies/$c-$i/raw.tif" --raw --cell-diameter 8.9 --out "$t/runs/$c/movie-$i" --quiet
  echo "$c,$i,runs/$c/movie-$i" >> "$t/conditions.csv"
done; done
"${sn[@]}" compare "$t/conditions.csv" --out "$t/compare"
"${sn[@]}" plan "$t/runs/wt" "$t/runs/ko" --effect 0.2 --out "$t/plan"
