#!/usr/bin/env bash
# Publishes the command with ReadyToRun code for the libraries that are not hot (see the comment in
# src/ShapeNoise.Cli/ShapeNoise.Cli.csproj and bench/README.md): about 0.2-0.3 s less per run than the plain build.
# Usage: bash scripts/publish.sh [OUT_DIR]   (default dist/shapenoise; run it as: dotnet OUT_DIR/shapenoise.dll ...)
set -euo pipefail
cd "$(dirname "$0")/.."
out="${1:-dist/shapenoise}"
bash scripts/ensure-deps.sh
dotnet publish src/ShapeNoise.Cli -c Release -r linux-x64 --self-contained false -p:PublishReadyToRun=true -o "$out" -nologo -v quiet >/dev/null
echo "published: dotnet $out/shapenoise.dll"
