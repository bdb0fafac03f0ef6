#!/usr/bin/env bash
# Publishes the command compiled ahead of time into one native executable (see the comment in
# src/ShapeNoise.Cli/ShapeNoise.Cli.csproj and bench/README.md, "Eighth pass"): no compilation during a run. Needs a C
# toolchain for the final link (gcc and zlib1g-dev, installed here when missing); the publish itself takes about 1.5 minutes.
# Usage: bash scripts/publish.sh [OUT_DIR]   (default dist/shapenoise; run it as: OUT_DIR/shapenoise ...)
# scripts/check-native.sh checks that the native command writes the same bytes as the JIT-compiled one.
set -euo pipefail
cd "$(dirname "$0")/.."
out="${1:-dist/shapenoise}"
bash scripts/ensure-deps.sh
bash scripts/apt-install-missing.sh gcc zlib1g-dev
log=$(mktemp)
trap 'rm -f "$log"' EXIT
if ! dotnet publish src/ShapeNoise.Cli -c Release -r linux-x64 -p:ShapeNoiseNative=true -o "$out" -nologo >"$log" 2>&1; then
  grep -E "error" "$log" | sort -u >&2 || cat "$log" >&2
  echo "publish: failed" >&2; exit 1
fi
echo "published: $out/shapenoise"
