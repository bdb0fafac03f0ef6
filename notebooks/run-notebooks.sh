#!/usr/bin/env bash
# Executes every notebook with `jupyter nbconvert --execute` (Debian's jupyter-nbconvert and python3-ipykernel; the
# kernel is /usr/bin/python3 with python3-pandas and python3-matplotlib) against real outputs: 01 on the ellipse demo,
# 02 on the monolayer demo, 03 on the worked comparison (made by scripts/compare-demo.sh when it is not there yet).
# A notebook that raises fails this script. Cells tagged skip-execution (the napari viewer) are not run; the script
# checks that every other code cell ran. The executed copies go to a temporary folder; the notebooks stay unchanged.
# Usage: bash notebooks/run-notebooks.sh [ELLIPSES_RUN] [MONOLAYER_RUN] [COMPARISON_DIR]
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/ensure-python-deps.sh
ell=$(realpath "${1:-runs/demo-ellipses}"); mono=$(realpath "${2:-runs/demo-monolayer}"); comp=${3:-runs/compare-demo/compare}
for d in "$ell" "$mono"; do
  [ -f "$d/summary.json" ] || { echo "run-notebooks: $d is not an analysis folder (run bash scripts/demo.sh first)" >&2; exit 1; }
done
if [ ! -f "$comp/differences.csv" ]; then
  [ $# -ge 3 ] && { echo "run-notebooks: $comp is not a comparison folder" >&2; exit 1; }
  echo "run-notebooks: making the worked comparison (bash scripts/compare-demo.sh)"
  bash scripts/compare-demo.sh >/dev/null
fi
comp=$(realpath "$comp")
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
export MPLBACKEND=Agg PYDEVD_DISABLE_FILE_VALIDATION=1
for nb in notebooks/*.ipynb; do
  name=$(basename "$nb" .ipynb)
  case "$name" in 01-*) run="$ell";; 02-*) run="$mono";; 03-*) run="$comp";; *) run="$mono";; esac
  echo "notebook $nb against $run"
  if ! SHAPENOISE_RUN="$run" jupyter nbconvert --to notebook --execute --ExecutePreprocessor.timeout=300 \
      --output-dir "$work" --output "$name" "$nb" >"$work/$name.log" 2>&1; then
    cat "$work/$name.log" >&2; echo "run-notebooks: $nb failed" >&2; exit 1
  fi
  /usr/bin/python3 - "$work/$name.ipynb" <<'PY'
import json, sys
nb = json.load(open(sys.argv[1]))
for i, c in enumerate(nb["cells"]):
    if c["cell_type"] != "code": continue
    skipped = "skip-execution" in c.get("metadata", {}).get("tags", [])
    ran = c.get("execution_count") is not None
    if skipped == ran: sys.exit(f"{sys.argv[1]}: code cell {i} {'ran though tagged skip-execution' if ran else 'did not run'}")
    for o in c.get("outputs", []):
        if o.get("output_type") == "stream" and o.get("name") == "stdout": print("   ", "".join(o["text"]).rstrip().replace("\n", "\n    "))
PY
done
echo "notebooks: all ran"
