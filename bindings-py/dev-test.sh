#!/usr/bin/env bash
# Build the stillsky wheel (release, abi3, workspace Cargo.lock), install it into a venv and run
# the Python tests (including the notebook). Usage: bindings-py/dev-test.sh [venv-dir]
# Environment: CARGO_TARGET_DIR (default: <repo>/target), STILLSKY_VENV (default: <repo>/target/venv-py).
set -euo pipefail
here="$(cd "$(dirname "$0")" && pwd)"
root="$(cd "$here/.." && pwd)"
venv="${1:-${STILLSKY_VENV:-$root/target/venv-py}}"
export CARGO_TARGET_DIR="${CARGO_TARGET_DIR:-$root/target}"

[ -x "$venv/bin/python" ] || python3 -m venv "$venv"
"$venv/bin/python" -m pip install --quiet -r "$here/requirements-test.txt"

dist="$CARGO_TARGET_DIR/wheels-py"
rm -rf "$dist"
"$venv/bin/maturin" build --release --locked --manifest-path "$here/Cargo.toml" --out "$dist"
"$venv/bin/python" -m pip install --quiet --force-reinstall --no-deps "$dist"/stillsky-*.whl

# Run from outside the source tree so the installed wheel is what gets imported.
cd "$here/tests"
cargo build --release --locked -p stillsky-cli --manifest-path "$root/Cargo.toml"
STILLSKY_BIN="$CARGO_TARGET_DIR/release/stillsky" "$venv/bin/python" -m pytest -q -p no:cacheprovider .
