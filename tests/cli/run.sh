#!/usr/bin/env bash
# Golden end-to-end cases for the sedgrade program. Each folder in
# tests/cli/cases/ is one case:
#   cmd              shell command line, run from the repository root with
#                    $SEDGRADE (the program) and $OUT (a fresh empty folder) set
#   expected_exit    the exit status
#   expected_stderr  optional: fragments (one per line) that must appear on stderr
#   expected_stdout  optional: fragments that must appear on stdout
#   expected_files   optional: paths relative to $OUT that must exist
#   absent_files     optional: paths relative to $OUT that must not exist
#   expected/        optional: files that must equal $OUT/<same path> byte for byte
#                    (SG_CLI_REGEN=1 rewrites them from the current output)
# SG_CLI_WRAP (e.g. "valgrind -q --error-exitcode=99") runs the program under a wrapper.
# Prints "cli: N passed, M failed" and exits non-zero when a case fails.
set -u
prog=$(cd "$(dirname "${1:-build/sedgrade}")" && pwd)/$(basename "${1:-build/sedgrade}")
root=$(cd "$(dirname "$0")/../.." && pwd)
cases=${SG_CLI_CASES:-$root/tests/cli/cases}
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
if [ -n "${SG_CLI_WRAP:-}" ]; then
  printf '#!/usr/bin/env bash\nexec %s %q "$@"\n' "$SG_CLI_WRAP" "$prog" > "$tmp/wrap"
  chmod +x "$tmp/wrap"
  prog=$tmp/wrap
fi
pass=0; fail=0
for dir in "$cases"/*/; do
  name=$(basename "$dir")
  [ -f "$dir/cmd" ] || continue
  out=$tmp/$name.out; mkdir -p "$out"
  ( cd "$root" && SEDGRADE=$prog OUT=$out bash -c "$(cat "$dir/cmd")" ) >"$tmp/$name.stdout" 2>"$tmp/$name.stderr"
  rc=$?
  want=$(cat "$dir/expected_exit" 2>/dev/null || echo 0)
  problems=()
  [ "$rc" = "$want" ] || problems+=("exit $rc, expected $want")
  if [ -f "$dir/expected_stderr" ]; then
    while IFS= read -r frag || [ -n "$frag" ]; do
      [ -z "$frag" ] && continue
      grep -qF -- "$frag" "$tmp/$name.stderr" || problems+=("stderr lacks: $frag")
    done < "$dir/expected_stderr"
  fi
  if [ -f "$dir/expected_stdout" ]; then
    while IFS= read -r frag || [ -n "$frag" ]; do
      [ -z "$frag" ] && continue
      grep -qF -- "$frag" "$tmp/$name.stdout" || problems+=("stdout lacks: $frag")
    done < "$dir/expected_stdout"
  fi
  if [ -f "$dir/expected_files" ]; then
    while IFS= read -r f || [ -n "$f" ]; do
      [ -z "$f" ] && continue
      [ -e "$out/$f" ] || problems+=("missing file: $f")
    done < "$dir/expected_files"
  fi
  if [ -f "$dir/absent_files" ]; then
    while IFS= read -r f || [ -n "$f" ]; do
      [ -z "$f" ] && continue
      compgen -G "$out/$f" >/dev/null && problems+=("unexpected file: $f")
    done < "$dir/absent_files"
  fi
  if [ -d "$dir/expected" ]; then
    while IFS= read -r -d '' f; do
      rel=${f#"$dir/expected/"}
      if [ "${SG_CLI_REGEN:-0}" = 1 ] && [ -f "$out/$rel" ]; then cp "$out/$rel" "$f"; continue; fi
      cmp -s "$f" "$out/$rel" || problems+=("differs: $rel ($(diff "$f" "$out/$rel" 2>&1 | head -3 | tr '\n' ' '))")
    done < <(find "$dir/expected" -type f -print0)
  fi
  if [ ${#problems[@]} -eq 0 ]; then
    pass=$((pass + 1))
  else
    fail=$((fail + 1))
    echo "FAIL $name:"; printf '  %s\n' "${problems[@]}"
    echo "  --- stderr:"; head -n 15 "$tmp/$name.stderr" | sed 's/^/  /'
  fi
done
echo "cli: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
