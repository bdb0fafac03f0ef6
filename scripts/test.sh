#!/usr/bin/env bash
# Builds the solution and runs the default test suite (well under 10 minutes on 2 cores).
# Ends with one plain line "tests: N passed, N failed" read from the TRX results.
set -uo pipefail
cd "$(dirname "$0")/.."
bash scripts/ensure-test-deps.sh || exit 1
results="$(pwd)/TestResults"
rm -rf "$results"
# One test project per src project, so one TRX per test assembly: LogFilePrefix makes each name unique
# (prefix_framework_timestamp.trx, vstest's own uniqueness rule); a fixed LogFileName would be overwritten by whichever
# assembly finished last. The final line sums the counters of every TRX of this run.
dotnet test ShapeNoise.sln -c Release --results-directory "$results" \
  --logger "trx;LogFilePrefix=tests" --logger "console;verbosity=normal" "$@"
rc=$?
passed=0; failed=0; found=0
while IFS= read -r -d '' trx; do
  found=$((found + 1))
  counters=$(grep -o '<Counters [^>]*' "$trx")
  p=$(printf '%s' "$counters" | grep -o ' passed="[0-9]*"' | grep -o '[0-9]*')
  f=$(printf '%s' "$counters" | grep -o ' failed="[0-9]*"' | grep -o '[0-9]*')
  dll=$(grep -o -m1 'codeBase="[^"]*"' "$trx" | head -1 | sed 's#.*/##; s#\.dll"##')
  echo "${dll:-$(basename "$trx")}: ${p:-0} passed, ${f:-0} failed"
  passed=$((passed + ${p:-0})); failed=$((failed + ${f:-0}))
done < <(find "$results" -name 'tests_*.trx' -print0 | sort -z)
if [ "$found" -gt 0 ]; then
  echo "tests: $passed passed, $failed failed"
fi
exit $rc
