#!/usr/bin/env bash
# Steady-state instructions per AnalyzeComposition record, counted by
# callgrind (docs/performance.md, "Instructions per record, steady state").
# Runs the driver tests/engine/composition_instructions, which analyses the
# first 5,000 of the composition benchmark's distinct formulas once to warm
# the caches and again with collection on, and prints the second pass's
# instructions divided by its records.
#
#   tests/perf/instructions_per_record.sh [--bin DRIVER] [--keep FILE]
#                                         [driver options...]
#
# --bin: the driver (default build/tests/engine/composition_instructions).
# --keep: keep callgrind's output there, for callgrind_annotate.
# Other options go to the driver: --count N, --alternatives N,
# --formulas FILE (one formula a line instead of the benchmark's).
set -euo pipefail

root="$(cd "$(dirname "$0")/../.." && pwd)"
bin="${root}/build/tests/engine/composition_instructions"
keep=""
args=()
while [[ $# -gt 0 ]]; do
  case "$1" in
    --bin) bin="$2"; shift 2 ;;
    --keep) keep="$2"; shift 2 ;;
    *) args+=("$1"); shift ;;
  esac
done
if [[ ! -x "${bin}" ]]; then
  echo "no driver at ${bin} (built when valgrind/callgrind.h is found)" >&2
  exit 1
fi
command -v valgrind >/dev/null || { echo "valgrind not found" >&2; exit 1; }

out="${keep:-$(mktemp)}"
log="$(mktemp)"
trap 'rm -f "${log}"; [[ -n "${keep}" ]] || rm -f "${out}"' EXIT

nice -n 15 valgrind --tool=callgrind --collect-atstart=no \
  --callgrind-out-file="${out}" "${bin}" "${args[@]}" >"${log}" 2>/dev/null

records="$(awk '$1 == "records" { print $2 }' "${log}")"
instructions="$(awk '$1 == "summary:" || $1 == "totals:" { print $2; exit }' \
  "${out}")"
if [[ -z "${records}" || -z "${instructions}" ]]; then
  echo "no count: driver output was:" >&2
  cat "${log}" >&2
  exit 1
fi
awk -v i="${instructions}" -v r="${records}" 'BEGIN {
  printf "records %d\ninstructions %d\ninstructions per record %.0f\n",
         r, i, i / r
}'
