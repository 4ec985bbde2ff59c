#!/usr/bin/env bash
# fuzz/run.sh [SECONDS] - builds every fuzz/fuzz_*.c as a libFuzzer target
# (clang -fsanitize=fuzzer,address,undefined) against the library sources,
# seeds build-fuzz/corpus-<name>/, runs each target for SECONDS seconds
# (default 60) and prints its executions. Exits 1 if any target crashed
# (the input is kept under build-fuzz/crashes-<name>/), 2 if it cannot build.
# Environment: CC (default clang), LIBCSV_SRC=path/to/libcsv.c to build
# libcsv into the targets for coverage of the splitter itself.
set -u
secs=${1:-60}
case $secs in '' | *[!0-9]*) echo "usage: fuzz/run.sh [SECONDS]" >&2; exit 2 ;; esac
root=$(cd "$(dirname "$0")/.." && pwd)
cd "$root" || exit 2
out=build-fuzz
cc=${CC:-clang}
case $cc in cc | gcc*) cc=clang ;; esac # the Makefile's default CC cannot build libFuzzer targets
command -v "$cc" >/dev/null || { echo "fuzz: '$cc' not found (apt-get install clang libclang-rt-14-dev)" >&2; exit 2; }

pkgs="gsl cairo"
common=(-std=c11 -D_POSIX_C_SOURCE=200809L -DSG_VERSION="\"$(cat VERSION 2>/dev/null || echo 0.0.0)\""
        -Iinclude -Isrc $(pkg-config --cflags $pkgs) -g -O1 -fno-omit-frame-pointer -pthread)
san=address,undefined
libs=($(pkg-config --libs $pkgs) -lm -pthread)

mkdir -p "$out/obj"
rm -f "$out/obj/"*.o "$out/libsedgrade-fuzz.a"

# The library, instrumented for coverage but without libFuzzer's main().
srcs=(src/*.c src/io/*.c)
csv_lib=(-lcsv)
if [ -n "${LIBCSV_SRC:-}" ]; then
  [ -f "$LIBCSV_SRC" ] || { echo "fuzz: LIBCSV_SRC=$LIBCSV_SRC not found" >&2; exit 2; }
  srcs+=("$LIBCSV_SRC")
  csv_lib=()
fi
fail=0
pids=()
for s in "${srcs[@]}"; do
  o="$out/obj/$(echo "$s" | tr '/' '_' | sed 's/\.c$/.o/')"
  "$cc" "${common[@]}" -fsanitize=fuzzer-no-link,$san -fno-sanitize-recover=undefined -c "$s" -o "$o" &
  pids+=($!)
  if [ "${#pids[@]}" -ge "$(nproc)" ]; then
    wait "${pids[0]}" || fail=1
    pids=("${pids[@]:1}")
  fi
done
for p in "${pids[@]}"; do wait "$p" || fail=1; done
n_obj=$(ls "$out/obj/"*.o 2>/dev/null | wc -l)
if [ "$fail" -ne 0 ] || [ "$n_obj" -ne "${#srcs[@]}" ]; then
  echo "fuzz: the library did not build with $cc" >&2; exit 2
fi
ar rcs "$out/libsedgrade-fuzz.a" "$out/obj/"*.o

# Seed folders per target; a target without an entry gets all of them.
seeds_for() {
  case $1 in
    record) echo demo/records tests/data/records tests/data/malformed ;;
    calib) echo calibration tests/data/register ;;
    *) echo demo/records tests/data/records tests/data/malformed calibration tests/data/register ;;
  esac
}

crashed=()
total=0
for h in fuzz/fuzz_*.c; do
  [ -f "$h" ] || continue
  name=$(basename "$h" .c); name=${name#fuzz_}
  bin="$out/fuzz_$name"
  if ! "$cc" "${common[@]}" -fsanitize=fuzzer,$san -fno-sanitize-recover=undefined "$h" \
         "$out/libsedgrade-fuzz.a" "${csv_lib[@]}" "${libs[@]}" -o "$bin"; then
    echo "fuzz: $h did not build" >&2; exit 2
  fi
  corpus="$out/corpus-$name"; crashes="$out/crashes-$name"
  mkdir -p "$corpus" "$crashes"
  for d in $(seeds_for "$name"); do
    [ -d "$d" ] || continue
    for f in "$d"/*; do
      [ -f "$f" ] || continue
      cp -f "$f" "$corpus/seed-$(echo "$d" | tr '/' '_')-$(basename "$f")"
    done
  done
  log="$out/fuzz_$name.log"
  echo "fuzz: $name for ${secs}s ($(ls "$corpus" | wc -l) inputs in $corpus)"
  "$bin" -max_total_time="$secs" -timeout=10 -rss_limit_mb=2048 -max_len=8192 -print_final_stats=1 \
         -artifact_prefix="$crashes/" "$corpus" >"$log" 2>&1
  rc=$?
  execs=$(grep -Eo 'stat::number_of_executed_units: *[0-9]+' "$log" | grep -Eo '[0-9]+$' | tail -1)
  execs=${execs:-0}
  total=$((total + execs))
  if [ "$rc" -ne 0 ] || ls "$crashes" 2>/dev/null | grep -q .; then
    crashed+=("$name")
    echo "fuzz: $name: $execs executions, CRASH (exit $rc); see $log and $crashes/"
    grep -E 'ERROR|SUMMARY|runtime error' "$log" | head -5
  else
    echo "fuzz: $name: $execs executions, no crash"
  fi
done
echo "fuzz: $total executions in all, ${#crashed[@]} target(s) crashed"
[ "${#crashed[@]}" -eq 0 ]
