#!/usr/bin/env bash
# Builds the solution and runs the default test suite (well under 10 minutes on 2 cores).
# Ends with one plain line "tests: N passed, N failed" read from the TRX results.
set -uo pipefail
cd "$(dirname "$0")/.."
bash scripts/ensure-test-deps.sh || exit 1
results="$(pwd)/TestResults"
rm -rf "$results"
dotnet test ShapeNoise.sln -c Release --results-directory "$results" \
  --logger "trx;LogFileName=tests.trx" --logger "console;verbosity=normal" "$@"
rc=$?
trx=$(find "$results" -name tests.trx | head -1)
if [ -n "$trx" ]; then
  passed=$(grep -o '<Counters [^>]*' "$trx" | grep -o 'passed="[0-9]*"' | grep -o '[0-9]*')
  failed=$(grep -o '<Counters [^>]*' "$trx" | grep -o 'failed="[0-9]*"' | grep -o '[0-9]*')
  echo "tests: ${passed:-0} passed, ${failed:-0} failed"
fi
exit $rc
