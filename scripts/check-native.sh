#!/usr/bin/env bash
# The natively compiled command (scripts/publish.sh) against the JIT-compiled one: every command run the same way with
# each, in its own folder with relative paths, and every file written, the standard output, the standard error and the exit
# code compared byte for byte. Only the absolute paths of the two folders and the finishing time may differ.
# Usage: bash scripts/check-native.sh [NATIVE_DIR]   (default: publish into a temporary folder first)
set -euo pipefail
cd "$(dirname "$0")/.."
root=$(pwd)
work=$(mktemp -d)
trap '[ -n "${KEEP:-}" ] || rm -rf "$work"' EXIT
bash scripts/ensure-deps.sh
dotnet build src/ShapeNoise.Cli -c Release -nologo -v quiet >/dev/null
native_dir=${1:-}
if [ -z "$native_dir" ]; then native_dir="$work/native-command"; bash scripts/publish.sh "$native_dir" >/dev/null; fi
native_dir=$(realpath "$native_dir")

# One scenario: small invented movies, every command, the error paths. $1 names the folder, the rest is the command.
scenario() {
  local dir=$1; shift
  mkdir -p "$dir"; cd "$dir"
  step() { local name=$1; shift; set +e; "$@" >"$name.out" 2>"$name.err"; echo $? >"$name.rc"; set -e; }
  step help "$@" --help
  step version "$@" --version
  step ell "$@" synth ellipses --out ell --cells 12 --frames 24 --raw --seed 3
  step mono "$@" synth monolayer --out mono --cells 120 --frames 8 --raw --seed 4
  step a-ell "$@" analyze ell/labels.tif --out a-ell --sim-format toml
  step a-mono "$@" analyze mono/labels.tif --out a-mono --coarse-sweep 1R0,2R0
  step seg "$@" segment mono/raw.tif --out seg
  step score "$@" score seg/labels.tif mono/labels.tif
  step raw "$@" analyze ell/raw.tif --raw --out a-raw
  echo "condition,replicate,path" > conditions.csv
  for i in 1 2 3; do
    step "wt-$i" "$@" synth ellipses --out "m/wt-$i" --cells 10 --frames 20 --sigma-along 1.0 --sigma-across 0.5 --seed $((10 + i))
    step "ko-$i" "$@" synth ellipses --out "m/ko-$i" --cells 10 --frames 20 --sigma-along 0.7 --sigma-across 0.7 --seed $((20 + i))
    step "a-wt-$i" "$@" analyze "m/wt-$i/labels.tif" --out "wt/movie-$i" --quiet
    step "a-ko-$i" "$@" analyze "m/ko-$i/labels.tif" --out "ko/movie-$i" --quiet
    echo "wt,$i,wt/movie-$i" >> conditions.csv; echo "ko,$i,ko/movie-$i" >> conditions.csv
  done
  step compare "$@" compare conditions.csv --out compare
  step plan "$@" plan wt ko --effect 0.2 --out plan
  step missing "$@" analyze missing.tif --out never
  step badopt "$@" analyze ell/labels.tif --out never --no-such-option
  step bad-rays "$@" analyze ell/labels.tif --out never --rays 3
  cd "$root"
}
scenario "$work/jit" dotnet "$root/src/ShapeNoise.Cli/bin/Release/net10.0/shapenoise.dll"
scenario "$work/native" "$native_dir/shapenoise"

# Compare: the same files, the same bytes. In the text files (json, toml, html, standard output and error) the two
# folders' absolute paths, the segmenter's temporary folder and the finishing time are masked, nothing else.
mask() { sed -e "s#$work/jit#ROOT#g; s#$work/native#ROOT#g; s#/tmp/shapenoise-seg-[0-9a-f-]*#TMPDIR#g" \
  -e 's#"finished_utc": "[^"]*"#"finished_utc": ""#; s#finished [0-9T:-]*Z#finished TIME#' "$1"; }
diffs=0; files=0
(cd "$work/jit" && find . -type f | sort) > "$work/jit.list"
(cd "$work/native" && find . -type f | sort) > "$work/native.list"
if ! cmp -s "$work/jit.list" "$work/native.list"; then
  echo "check-native: the two commands wrote different files:"; diff "$work/jit.list" "$work/native.list" | head -20; exit 1
fi
while read -r f; do
  files=$((files + 1))
  case "$f" in
    *.json|*.toml|*.html|*.out|*.err) cmp -s <(mask "$work/jit/$f") <(mask "$work/native/$f") || { echo "differs: $f"; diffs=$((diffs + 1)); } ;;
    *) cmp -s "$work/jit/$f" "$work/native/$f" || { echo "differs: $f"; diffs=$((diffs + 1)); } ;;
  esac
done < "$work/jit.list"
for need in a-ell/summary.json a-mono/summary.json a-ell/sim-params.toml seg/labels.tif a-raw/summary.json compare/differences.csv; do
  [ -f "$work/native/$need" ] || { echo "check-native: $need was not written"; exit 1; }
done
[ "$(cat "$work/native/missing.rc")" = 2 ] && [ "$(cat "$work/native/badopt.rc")" = 64 ] || { echo "check-native: wrong exit codes"; exit 1; }
if [ "$diffs" -gt 0 ]; then echo "check-native: $diffs of $files files differ"; exit 1; fi
echo "check-native: $files files the same byte for byte (native: $native_dir/shapenoise)"
