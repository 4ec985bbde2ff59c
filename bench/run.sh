#!/usr/bin/env bash
# make bench: batch reduction of generated archives (1,000 and 10,000 records,
# 12 readings and 8 sieves each) with the default per-test outputs and with
# --outputs none, best of 3 by wall time, with peak RSS; the time cp -r takes
# to create the same files (the file-system floor); then every other bench
# program in BUILD/bench. Targets (10,000 records, 2 cores): default outputs
# < 1.5 s, --outputs none < 0.3 s. Usage: bash bench/run.sh BUILD
# Environment: BENCH_SIZES (default "1000 10000"), BENCH_RUNS (default 3),
# BENCH_JOBS (default: sedgrade's own, the number of processors).
set -u
build=${1:-build}
root=$(cd "$(dirname "$0")/.." && pwd)
cd "$root" || exit 3
prog=$build/sedgrade
gen=$build/bench/gen_archive
out=bench/out
sizes=${BENCH_SIZES:-1000 10000}
runs=${BENCH_RUNS:-3}
jobs=()
[ -n "${BENCH_JOBS:-}" ] && jobs=(-j "$BENCH_JOBS")
target_default_s=1.5
target_none_s=0.3
target_n=10000
seed=20260101
register=calibration # the demo lab's register: half the hydrometer records name its instruments

for f in "$prog" "$gen"; do
  [ -x "$f" ] || { echo "bench: $f is missing (run make bench)" >&2; exit 3; }
done
[ -x /usr/bin/time ] || { echo "bench: /usr/bin/time is needed (apt-get install time)" >&2; exit 3; }
mkdir -p "$out"

# best_of OUTVAR CMD...: runs CMD $runs times, each into a new output folder
# (CMD's "@OUT@" argument); sets best_s, cpu_s (user + system seconds) and
# rss_kb (peak RSS) of the fastest run, last_rc, the folder of the last run
# in last_out, and the tally line of the last run in tally. CPU seconds
# tell the work apart from waiting when other jobs load the machine.
# Nothing is deleted between timed runs: ext4 steps over inodes freed in
# the last minutes when it allocates new ones, so deleting 30,000 files
# just before a run slows it down by seconds (all output folders go at the
# end of the benchmark). sync before each run writes back the previous one.
run_no=0
best_of() {
  best_s=; cpu_s=; rss_kb=; last_rc=0; tally=
  for _ in $(seq "$runs"); do
    run_no=$((run_no + 1))
    last_out=$out/run.$run_no
    local args=()
    for a in "$@"; do [ "$a" = "@OUT@" ] && args+=("$last_out") || args+=("$a"); done
    sync
    /usr/bin/time -f '%e %M %U %S' -o "$out/time.txt" "${args[@]}" 2>"$out/stderr.txt" >/dev/null
    last_rc=$?
    read -r s kb us ss < <(tail -n 1 "$out/time.txt")
    tally=$(grep -v '^Command exited' "$out/stderr.txt" | tail -n 1)
    if [ -z "$best_s" ] || awk -v a="$s" -v b="$best_s" 'BEGIN { exit !(a < b) }'; then
      best_s=$s; rss_kb=$kb; cpu_s=$(awk -v u="$us" -v y="$ss" 'BEGIN { printf "%.2f", u + y }')
    fi
  done
}

verdict() { # verdict N SECONDS TARGET
  if [ "$1" != "$target_n" ]; then echo "-"; return; fi
  awk -v s="$2" -v t="$3" 'BEGIN { if (s < t) print "meets < " t " s"; else print "MISSES < " t " s" }'
}

status=0
rows=()
rm -rf "$out"/run.* "$out/res" # left by an interrupted benchmark (before any timing)
echo "bench: $(nproc) processors, load average $(cut -d' ' -f1-3 /proc/loadavg), best of $runs runs"
for n in $sizes; do
  arch=$out/archive_$n
  stamp="$(cksum < "$gen") $n $seed"
  if [ "$(cat "$arch/.complete" 2>/dev/null)" != "$stamp" ]; then
    rm -rf "$arch"
    t0=$(date +%s.%N)
    "$gen" "$arch" "$n" "$seed" "$register" || { echo "bench: generating $n records failed" >&2; exit 3; }
    echo "$stamp" > "$arch/.complete"
    echo "bench: generated $n records in $arch ($(awk -v a="$t0" -v b="$(date +%s.%N)" 'BEGIN { printf "%.2f", b - a }') s)"
  fi

  best_of "$prog" reduce "$arch" -o @OUT@ --calibration "$register" "${jobs[@]}"
  [ "$last_rc" -le 2 ] || { echo "bench: sedgrade reduce failed (exit $last_rc)" >&2; cat "$out/stderr.txt" >&2; status=1; }
  nfiles=$(find "$last_out" -type f | wc -l)
  rows+=("$(printf '%-8s %-15s %7s %7s %7.1f  %-16s %s' "$n" "default" "$best_s" "$cpu_s" "$(awk -v k="$rss_kb" 'BEGIN { print k / 1024 }')" "$(verdict "$n" "$best_s" "$target_default_s")" "$tally")")

  # The floor: cp -r creating the very files the run wrote, into new folders too.
  floor_src=$last_out
  best_of cp -r "$floor_src" @OUT@
  rows+=("$(printf '%-8s %-15s %7s %7s %7s  %-16s %s' "$n" "cp -r (floor)" "$best_s" "$cpu_s" "-" "-" "$nfiles files")")

  best_of "$prog" reduce "$arch" -o @OUT@ --calibration "$register" --outputs none "${jobs[@]}"
  [ "$last_rc" -le 2 ] || { echo "bench: sedgrade reduce --outputs none failed (exit $last_rc)" >&2; status=1; }
  rows+=("$(printf '%-8s %-15s %7s %7s %7.1f  %-16s %s' "$n" "--outputs none" "$best_s" "$cpu_s" "$(awk -v k="$rss_kb" 'BEGIN { print k / 1024 }')" "$(verdict "$n" "$best_s" "$target_none_s")" "$tally")")
done
rm -rf "$out"/run.*

echo
printf '%-8s %-15s %7s %7s %7s  %-16s %s\n' records outputs wall_s cpu_s rss_MB target "tally / note"
printf '%s\n' "${rows[@]}"
rm -f "$out/time.txt" "$out/stderr.txt"

# Every other benchmark program.
for b in "$build"/bench/*; do
  [ -x "$b" ] && [ -f "$b" ] || continue
  case $(basename "$b") in gen_archive|*.d|*.o) continue ;; esac
  echo
  echo "== $(basename "$b")"
  "$b" || { echo "bench: $(basename "$b") failed" >&2; status=1; }
done
exit $status
