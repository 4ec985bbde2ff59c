#!/usr/bin/env bash
# Runs every Criterion test program in BUILD/tests under valgrind (memcheck,
# full leak check, children traced: Criterion runs each test in a forked
# child), then the golden CLI cases (tests/cli/run.sh) with the program
# wrapped in valgrind. A program is clean when it exits 0 and none of its
# processes reports a memory error or a definite/indirect leak.
# Prints "valgrind: N programs clean, M with errors" and exits non-zero on
# any error.
#
# Usage: bash tests/run_valgrind.sh [BUILD]
# Environment: VALGRIND_JOBS (Criterion --jobs; by default Criterion, seeing
#   valgrind, runs one test at a time, which keeps the logs readable),
#   VALGRIND_TIMEOUT (seconds per program, default 3600),
#   VALGRIND_KEEP_LOGS=1 (keep the log folder and print its path),
#   VALGRIND_ONLY (a pattern: run only the test programs whose name contains
#   it; "cli" names the golden CLI cases).
set -u
build=${1:-build}
here=$(cd "$(dirname "$0")/.." && pwd)
case $build in /*) ;; *) build="$here/$build" ;; esac

if ! command -v valgrind >/dev/null 2>&1; then
  echo "valgrind: not installed (apt-get install valgrind)" >&2
  exit 2
fi

vg_exit=97 # valgrind's exit status for a process with errors (distinct from test failures)
jobs=()
[ -n "${VALGRIND_JOBS:-}" ] && jobs=(--jobs="$VALGRIND_JOBS")
limit=${VALGRIND_TIMEOUT:-3600}
logs=$(mktemp -d "$build/valgrind-logs.XXXXXX") # under the build folder, not a shared /tmp
cleanup() { [ "${VALGRIND_KEEP_LOGS:-0}" = 1 ] && echo "valgrind: logs kept in $logs" || rm -rf "$logs"; }
trap cleanup EXIT

opts=(--tool=memcheck --leak-check=full --errors-for-leak-kinds=definite,indirect
      --show-leak-kinds=definite,indirect --error-exitcode=$vg_exit --trace-children=yes
      --child-silent-after-fork=no --num-callers=30)
[ -f "$here/tests/valgrind.supp" ] && opts+=(--suppressions="$here/tests/valgrind.supp")

clean=0; bad=0; bad_names=()

# Logs of one program (one file per process) with an error or a leak.
faulty_logs() {
  grep -lE 'ERROR SUMMARY: [1-9]|definitely lost: [1-9]|indirectly lost: [1-9]' "$1"/*.log 2>/dev/null
}

# Prints the first faulty log's error and leak reports (a program's detail).
show() {
  local f
  for f in $(faulty_logs "$1" | head -n 2); do
    echo "---- $f"
    sed -n '/Invalid\|uninitialised\|Mismatched\|definitely lost in\|indirectly lost in\|Syscall param\|Source and destination/,/^==[0-9]*== $/p' "$f" | head -n 60
    grep -E 'ERROR SUMMARY|definitely lost:|indirectly lost:' "$f"
  done
}

record() { # name dir status
  local name=$1 dir=$2 rc=$3 why=""
  [ -n "$(faulty_logs "$dir")" ] && why="memory errors or leaks"
  [ "$rc" -eq $vg_exit ] && why="memory errors or leaks"
  [ "$rc" -eq 124 ] && why="timed out after ${limit}s"
  [ -z "$why" ] && [ "$rc" -ne 0 ] && why="exit status $rc"
  if [ -z "$why" ]; then
    clean=$((clean + 1))
    echo "valgrind: $name clean ($(ls "$dir"/*.log 2>/dev/null | wc -l) processes)"
  else
    bad=$((bad + 1)); bad_names+=("$name")
    echo "valgrind: $name: $why"
    [ -f "$dir/out" ] && tail -n 30 "$dir/out"
    show "$dir"
  fi
}

for t in "$build"/tests/test_*; do
  [ -f "$t" ] && [ -x "$t" ] || continue
  name=$(basename "$t")
  if [ -n "${VALGRIND_ONLY:-}" ]; then
    case $name in *${VALGRIND_ONLY}*) ;; *) continue ;; esac
  fi
  dir="$logs/$name"; mkdir -p "$dir"
  (cd "$here" && timeout "$limit" valgrind "${opts[@]}" --log-file="$dir/%p.log" "$t" "${jobs[@]}") \
    >"$dir/out" 2>&1
  rc=$?
  # A run that died without any memory report (the test runner itself aborted,
  # e.g. its socket lost under heavy load) is tried once more before it counts.
  if [ "$rc" -ne 0 ] && [ "$rc" -ne $vg_exit ] && [ "$rc" -ne 124 ] && [ -z "$(faulty_logs "$dir")" ]; then
    echo "valgrind: $name: exit status $rc without a memory report; running it once more"
    rm -rf "$dir"; mkdir -p "$dir"
    (cd "$here" && timeout "$limit" valgrind "${opts[@]}" --log-file="$dir/%p.log" "$t" "${jobs[@]}") \
      >"$dir/out" 2>&1
    rc=$?
  fi
  record "$name" "$dir" $rc
done

# The golden CLI cases, each run of the program under valgrind through the
# runner's SG_CLI_WRAP. The wrapper keeps the program's own exit status (no
# --error-exitcode) so the cases still check it; memory errors and leaks are
# found in the logs.
only_cli=yes
[ -n "${VALGRIND_ONLY:-}" ] && case cli in *${VALGRIND_ONLY}*) ;; *) only_cli=no ;; esac
if [ "$only_cli" = yes ] && [ -f "$here/tests/cli/run.sh" ] && [ -x "$build/sedgrade" ]; then
  dir="$logs/cli"; mkdir -p "$dir"
  wrap="valgrind"
  for o in "${opts[@]}"; do
    case $o in --error-exitcode=*) ;; *) wrap+=" $(printf '%q' "$o")" ;; esac
  done
  wrap+=" --log-file=$(printf '%q' "$dir/%p.log")"
  (cd "$here" && SG_CLI_WRAP="$wrap" timeout "$limit" bash tests/cli/run.sh "$build/sedgrade") >"$dir/out" 2>&1
  rc=$?
  passed=$(grep -Eo '^cli: [0-9]+ passed, [0-9]+ failed' "$dir/out" || echo 'cli: no tally')
  record "sedgrade CLI cases ($passed; $(ls "$dir"/*.log 2>/dev/null | wc -l) runs)" "$dir" $rc
fi

echo "valgrind: $clean programs clean, $bad with errors${bad_names[*]:+ (${bad_names[*]})}"
[ "$bad" -eq 0 ]
