#!/usr/bin/env bash
# Checks that the notebooks still run: their C# code cells are extracted into .NET 10 file-based programs
# (#r "nuget: X, V" becomes #:package X@V) and run with `dotnet run file.cs` against the demo output.
# Usage: bash notebooks/run-notebooks.sh [RUN_DIR_ELLIPSES] [RUN_DIR_MONOLAYER]
set -euo pipefail
cd "$(dirname "$0")"
ell=${1:-../runs/demo-ellipses}; mono=${2:-../runs/demo-monolayer}
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
for nb in *.ipynb; do
  name=${nb%.ipynb}
  python3 - "$nb" "$work/$name.cs" <<'PY'
import json, re, sys
nb = json.load(open(sys.argv[1]))
head, body = [], []
for c in nb["cells"]:
    if c["cell_type"] != "code": continue
    for line in "".join(c["source"]).splitlines():
        m = re.match(r'#r\s+"nuget:\s*([^,"]+)\s*,\s*([^"]+)"', line.strip())
        if m: head.append(f"#:package {m.group(1).strip()}@{m.group(2).strip()}")
        elif re.match(r'^using\s+(static\s+)?[\w.]+(\s*=\s*[\w.<>]+)?\s*;\s*$', line): head.append(line)
        else: body.append(line)
open(sys.argv[2], "w").write("\n".join(head + [""] + body) + "\n")
PY
  case "$name" in *spectrum*) run="$ell";; *) run="$mono";; esac
  echo "notebook $nb against $run"
  SHAPENOISE_RUN="$(cd .. && realpath "${run#../}")" dotnet run "$work/$name.cs"
done
echo "notebooks: all ran"
