#!/usr/bin/env bash
# A worked comparison on generated demo conditions: three "wild-type-like" movies whose length fluctuates 4x more
# than width (variance ratio 4) against three "knockout-like" movies with isotropic shape noise (ratio 1), then a plan.
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/ensure-deps.sh
dotnet build src/ShapeNoise.Cli -c Release -nologo -v quiet >/dev/null
sn=(dotnet src/ShapeNoise.Cli/bin/Release/net10.0/shapenoise.dll)
out=runs/compare-demo
# Replace only a folder this script made (it leaves a marker); anything else there is the user's and is kept.
marker="$out/.made-by-$(basename "$0")"
if [ -e "$out" ] && [ ! -f "$marker" ]; then
  echo "$(basename "$0"): $out exists and was not made by this script; move it away first" >&2; exit 3
fi
rm -rf "$out"; mkdir -p "$out"; touch "$marker"
echo "condition,replicate,path" > "$out/conditions.csv"
for i in 1 2 3; do
  "${sn[@]}" synth ellipses --out "$out/movies/wt-$i" --cells 24 --frames 40 --sigma-along 1.0 --sigma-across 0.5 --seed $((10 + i)) >/dev/null
  "${sn[@]}" synth ellipses --out "$out/movies/ko-$i" --cells 24 --frames 40 --sigma-along 0.7 --sigma-across 0.7 --seed $((20 + i)) >/dev/null
  "${sn[@]}" analyze "$out/movies/wt-$i/labels.tif" --out "$out/pilot-wt/movie-$i" --quiet
  "${sn[@]}" analyze "$out/movies/ko-$i/labels.tif" --out "$out/pilot-ko/movie-$i" --quiet
  echo "wt,$i,pilot-wt/movie-$i" >> "$out/conditions.csv"
  echo "ko,$i,pilot-ko/movie-$i" >> "$out/conditions.csv"
done
"${sn[@]}" compare "$out/conditions.csv" --out "$out/compare"
"${sn[@]}" plan "$out/pilot-wt" "$out/pilot-ko" --effect 0.2 --out "$out/plan"
