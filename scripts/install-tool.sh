#!/usr/bin/env bash
# Checks the packaged command the way the README installs it: packs src/ShapeNoise.Cli into a NuGet package, installs it
# with `dotnet tool install --tool-path DIR --add-source NUPKG_DIR ShapeNoise.Cli --version V` (V pinned to this
# checkout's version, so no other source's package can be picked), then runs `shapenoise --version` (must print V) and
# the demo (both bundled movies) through the installed command. Everything goes to a temporary folder, removed at the end.
# Usage: bash scripts/install-tool.sh
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/ensure-deps.sh
version=$(sed -n 's:.*<Version>\(.*\)</Version>.*:\1:p' Directory.Build.props | head -1)
[ -n "$version" ] || { echo "install-tool: no <Version> in Directory.Build.props" >&2; exit 1; }
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
nupkg="$work/nupkg"; tools="$work/tools"
# The README's install lines, with NUPKG_DIR and DIR in the temporary folder:
dotnet pack src/ShapeNoise.Cli -c Release -o "$nupkg" -nologo -v quiet >/dev/null
dotnet tool install --tool-path "$tools" --add-source "$nupkg" ShapeNoise.Cli --version "$version"
shown=$("$tools/shapenoise" --version)
[ "$shown" = "$version" ] || { echo "install-tool: 'shapenoise --version' printed '$shown', expected '$version'" >&2; exit 1; }
echo "installed shapenoise --version: $shown"
for movie in ellipses monolayer; do
  out="$work/demo-$movie"
  "$tools/shapenoise" analyze "demo-data/$movie/labels.tif" --out "$out" > "$work/$movie.log"
  grep -q "report: $out/report.html" "$work/$movie.log" || { cat "$work/$movie.log"; echo "install-tool: the installed command did not print the report path" >&2; exit 1; }
  [ -f "$out/summary.json" ] && [ -f "$out/cells.csv" ] || { echo "install-tool: $out is incomplete" >&2; exit 1; }
  echo "installed shapenoise analyze demo-data/$movie/labels.tif: $(grep -c . "$out/cells.csv") lines in cells.csv, report written"
done
echo "install-tool: packed, installed and ran the demo through the installed command"
