#!/usr/bin/env bash
# Runs the main job on the bundled demo movie (demo-data/ellipses), writing runs/demo.
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/ensure-deps.sh
dotnet run --project src/ShapeNoise.Cli -c Release -- analyze demo-data/ellipses/labels.tif --out runs/demo "$@"
