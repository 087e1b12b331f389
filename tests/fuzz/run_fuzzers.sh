#!/usr/bin/env bash
# Fuzzes every target in a build tree for a bounded time and fails on any
# crash, sanitizer report, broken property, slow input (-timeout) or memory
# blow-up (-rss_limit_mb).
#
#   tests/fuzz/run_fuzzers.sh BUILD_DIR [TOTAL_SECONDS]   # default 60
#
# Each target starts from a scratch copy of its committed inputs
# (corpus/NAME and regressions/NAME), so the checkout is never written to.
# A failing input is kept under BUILD_DIR/fuzz-artifacts/ and printed in
# hex: add it to regressions/NAME/ under a name that says what broke.
set -uo pipefail

here="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
build="$(cd "${1:?usage: run_fuzzers.sh BUILD_DIR [TOTAL_SECONDS]}" && pwd)"
total="${2:-60}"
targets=(formula_fuzzer species_fuzzer configuration_fuzzer
  term_symbol_fuzzer composition_fuzzer record_line_fuzzer)
per_target=$((total / ${#targets[@]}))
((per_target >= 1)) || per_target=1

artifacts="$build/fuzz-artifacts"
scratch="$(mktemp -d)"
trap 'rm -rf "$scratch"' EXIT
mkdir -p "$artifacts"

failed=()
for t in "${targets[@]}"; do
  exe="$build/tests/fuzz/$t"
  if [[ ! -x "$exe" ]]; then
    echo "run_fuzzers: $exe is missing (configure with" \
      "-DSHELLWRIGHT_BUILD_FUZZERS=ON and build shellwright_fuzzers)" >&2
    exit 2
  fi
  mkdir -p "$scratch/$t"
  for d in "$here/corpus/$t" "$here/regressions/$t"; do
    [[ -d "$d" ]] && cp "$d"/* "$scratch/$t"/ 2>/dev/null
  done
  log="$scratch/$t.log"
  # -timeout: seconds per input under ASan and coverage, far above the
  # per-record budget, so only a real blow-up trips it.
  "$exe" "$scratch/$t" -max_total_time="$per_target" -timeout=5 \
    -rss_limit_mb=2048 -max_len=2048 -print_final_stats=1 \
    -artifact_prefix="$artifacts/$t-" >"$log" 2>&1
  rc=$?
  runs="$(grep -o 'stat::number_of_executed_units: *[0-9]*' "$log" |
    grep -o '[0-9]*$')"
  if ((rc != 0)); then
    failed+=("$t")
    echo "run_fuzzers: $t FAILED (exit $rc)"
    grep -v '^#[0-9]' "$log" | tail -40
    for a in "$artifacts/$t-"*; do
      [[ -f "$a" ]] || continue
      echo "--- $a"
      od -A d -c "$a" | head -20
    done
  else
    echo "run_fuzzers: $t ok, ${runs:-?} inputs in ${per_target}s"
  fi
done
if ((${#failed[@]})); then
  echo "run_fuzzers: ${#failed[@]} target(s) failed: ${failed[*]}" >&2
  exit 1
fi
echo "run_fuzzers: ${#targets[@]} targets ran without a finding"
