#!/usr/bin/env bash
# Runs the main job on the bundled demo movies:
#  - demo-data/ellipses  (isolated fluctuating cells with known truth) -> runs/demo-ellipses
#  - demo-data/monolayer (confluent tissue with 12 moving +1/2 / -1/2 defect pairs) -> runs/demo-monolayer
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/ensure-deps.sh
dotnet build src/ShapeNoise.Cli -c Release -nologo -v quiet >/dev/null
tool=(dotnet src/ShapeNoise.Cli/bin/Release/net10.0/shapenoise.dll)
"${tool[@]}" analyze demo-data/ellipses/labels.tif --out runs/demo-ellipses --overwrite "$@"
"${tool[@]}" analyze demo-data/monolayer/labels.tif --out runs/demo-monolayer --overwrite --coarse-sweep 1R0,2R0,3R0,4R0 "$@"
