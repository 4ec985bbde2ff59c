#!/usr/bin/env bash
# Runs every Criterion test program in BUILD/tests, then the golden CLI cases.
# Prints a closing line "N passed, N failed" and exits non-zero on any failure.
set -u
build=${1:-build}
here=$(cd "$(dirname "$0")/.." && pwd)
pass=0; fail=0; failed=()
for t in "$build"/tests/test_*; do
  [ -x "$t" ] || continue
  log=$(mktemp)
  if "$t" --jobs=2 >"$log" 2>&1; then
    n=$(grep -o 'Passing: [0-9]*' "$log" | tail -1 | awk '{print $2}')
    pass=$((pass + ${n:-0}))
  else
    n=$(grep -o 'Passing: [0-9]*' "$log" | tail -1 | awk '{print $2}')
    f=$(grep -Eo '(Failing|Crashing): [0-9]*' "$log" | awk '{s+=$2} END {print s+0}')
    pass=$((pass + ${n:-0})); fail=$((fail + (f > 0 ? f : 1)))
    failed+=("$t"); cat "$log"
  fi
  grep -h 'Synthesis' "$log" | sed "s|^|$(basename "$t"): |"
  rm -f "$log"
done
if [ -f "$here/tests/cli/run.sh" ]; then
  out=$(bash "$here/tests/cli/run.sh" "$build/sedgrade" 2>&1); rc=$?
  echo "$out" | tail -n 20
  p=$(echo "$out" | grep -Eo '^cli: [0-9]+ passed' | grep -Eo '[0-9]+' | head -1)
  f=$(echo "$out" | grep -Eo '[0-9]+ failed$' | grep -Eo '[0-9]+' | tail -1)
  pass=$((pass + ${p:-0})); fail=$((fail + ${f:-0}))
  [ $rc -eq 0 ] || { [ "${f:-0}" -gt 0 ] || fail=$((fail + 1)); failed+=("tests/cli"); }
fi
echo "${pass} passed, ${fail} failed"
[ "$fail" -eq 0 ]
