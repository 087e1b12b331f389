#!/usr/bin/env bash
# `cmake --install` of the build tree into a temporary prefix, then a
# consumer project (tests/install/consumer) built against it with
# find_package(Shellwright), run, and its output checked; and the installed
# CLI run from the prefix.
#
#   bash tests/install/install_test.sh BUILD_DIR
set -euo pipefail
build="$(cd "$1" && pwd)"
here="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
tmp="$(mktemp -d)"
trap 'rm -rf "$tmp"' EXIT

cmake --install "$build" --prefix "$tmp/prefix" >"$tmp/install.log"
for f in bin/shellwright bin/shellwrightd libexec/shellwright/shellwright-remote \
         include/engine/composition.h \
         lib/cmake/Shellwright/ShellwrightConfig.cmake \
         share/shellwright/data/elements.tsv \
         share/shellwright/proto/shellwright/v1/electron_structure.proto; do
  [[ -e "$tmp/prefix/$f" ]] || { echo "not installed: $f"; exit 1; }
done
[[ ! -e "$tmp/prefix/include/engine/internal" ]] ||
  { echo "engine/internal must stay private"; exit 1; }

cmake -S "$here/consumer" -B "$tmp/consumer" -G Ninja \
  -DCMAKE_BUILD_TYPE=Release -DCMAKE_PREFIX_PATH="$tmp/prefix" >/dev/null
cmake --build "$tmp/consumer" >/dev/null
out="$("$tmp/consumer/consumer")"
# Fe3+ is [Ar] 3d5 with five unpaired electrons, and Fe3O4 holds Fe2+ and
# Fe3+ in 1:2 (Greenwood and Earnshaw, Chemistry of the Elements, from
# memory).
expected="Fe3+ [Ar] 3d5 unpaired 5
c1 Fe3O4 valid 1 states Fe2:1 Fe3:2 O-2:4"
if [[ "$out" != "$expected" ]]; then
  printf 'consumer printed:\n%s\nexpected:\n%s\n' "$out" "$expected"
  exit 1
fi
"$tmp/prefix/bin/shellwright" atom Fe3+ --json | grep -q '"unpaired_electrons": 5' ||
  { echo "installed CLI: unexpected output"; exit 1; }
# With --server the installed shellwright runs its twin from
# libexec/shellwright/: port 1 has no server, so the twin's connection
# error shows that it was found and ran (not "--server needs ...").
set +e
remote_err="$("$tmp/prefix/bin/shellwright" --server 127.0.0.1:1 --timeout 5 \
  atom Fe3+ 2>&1 >/dev/null)"
remote_rc=$?
set -e
if [[ $remote_rc -eq 0 || "$remote_err" != *"cannot reach shellwrightd"* ]]; then
  printf 'installed shellwright --server (exit %d) said:\n%s\n' \
    "$remote_rc" "$remote_err"
  exit 1
fi
echo "install test passed"
