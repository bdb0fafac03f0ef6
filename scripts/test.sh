#!/usr/bin/env bash
# Builds the solution and runs the default test suite (well under 10 minutes on 2 cores).
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/ensure-deps.sh
dotnet test ShapeNoise.sln -c Release --logger "console;verbosity=normal" "$@"
