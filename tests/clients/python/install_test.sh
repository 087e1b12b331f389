#!/usr/bin/env bash
# The documented install of the Python package, offline: a virtual
# environment that sees Debian's packages, `pip install
# --no-build-isolation` of clients/python (reusing the build tree through
# SHELLWRIGHT_BUILD_DIR, so nothing is compiled twice), and an import from
# outside the checkout.
#
#   bash tests/clients/python/install_test.sh PYTHON SOURCE_DIR BUILD_DIR
set -euo pipefail
python="$1"
source_dir="$(cd "$2" && pwd)"
build_dir="$(cd "$3" && pwd)"
tmp="$(mktemp -d)"
trap 'rm -rf "$tmp"' EXIT
unset PYTHONPATH

"$python" -m venv --system-site-packages "$tmp/env"
SHELLWRIGHT_BUILD_DIR="$build_dir" PIP_NO_INDEX=1 \
  "$tmp/env/bin/pip" install --no-build-isolation --no-index \
  --disable-pip-version-check "$source_dir/clients/python" >"$tmp/pip.log" 2>&1 ||
  { cat "$tmp/pip.log"; exit 1; }

cd "$tmp"
out="$("$tmp/env/bin/python" -c "import shellwright; print(shellwright.describe('Fe3+')['unpaired_electrons'])")"
# Fe3+ is high-spin d5 (Greenwood and Earnshaw, Chemistry of the Elements,
# from memory).
[[ "$out" == "5" ]] || { echo "printed '$out', expected 5"; exit 1; }
where="$("$tmp/env/bin/python" -c "import shellwright, shellwright.v1.electron_structure_pb2_grpc, shellwright._engine as e; print(e.__file__)")"
[[ "$where" == "$tmp/env/"* ]] ||
  { echo "imported from $where, not the environment"; exit 1; }
echo "installed and imported: $where"
