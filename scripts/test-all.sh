#!/usr/bin/env bash
# Runs every test of the project from a fresh clone: Rust (fmt, clippy, unit, reference, C ABI),
# Python (builds the wheel into a private venv, then pytest against numpy/scipy/ObsPy/Dask and the
# notebook), loads the demo's HTML report in a headless browser (tests/browser), and compiles the
# benches. Needs Rust and Python 3; installs the rest (the chromium package with apt-get when run as root).
set -euo pipefail
cd "$(dirname "$0")/.."
root=$(pwd)
# Incremental caches double the size of target/ and buy nothing on a one-shot run.
export CARGO_INCREMENTAL="${CARGO_INCREMENTAL:-0}"
disk() { echo "-- disk: $(df -h "$root" | awk 'NR==2 {print $4" free"}'), target/ $(du -sh "$root/target" 2>/dev/null | cut -f1)"; }
disk

echo "== Rust: format, lint, tests"
cargo fmt --all --check
cargo clippy --workspace --all-targets --locked -- -D warnings
cargo test --workspace --locked
disk

echo "== Python: venv, wheel, pytest"
venv="${STILLSKY_VENV:-$root/target/venv}"
[ -x "$venv/bin/python" ] || python3 -m venv "$venv"
"$venv/bin/python" -m pip install --quiet --upgrade pip
"$venv/bin/python" -m pip install --quiet -r "$root/bindings-py/requirements-test.txt"
CARGO_TARGET_DIR="$root/target" "$venv/bin/python" -m pip install --quiet --force-reinstall --no-deps "$root/bindings-py"
# The Python tests that compare with the command line run this one binary.
cargo build --release --locked -p stillsky-cli
STILLSKY_BIN="$root/target/release/stillsky" "$venv/bin/python" -m pytest -q "$root/bindings-py/tests"

echo "== Browser: the demo's HTML report in a headless browser"
# Installs the distribution's chromium package when missing (as root); fails without it unless
# STILLSKY_BROWSER_OPTIONAL=1.
"$venv/bin/python" "$root/tests/browser/check_report.py" --bin "$root/target/release/stillsky"

disk
echo "== Benches compile"
cargo bench --workspace --no-run --locked
echo "all test stages passed"
