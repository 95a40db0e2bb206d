#!/usr/bin/env bash
# Build and run the C soak of the streaming monitor (tests/c/soak.c): a script, not a test.
# usage: bash bindings-c/tests/soak.sh [n_samples]   (default 1e8; CARGO_TARGET_DIR is honoured)
set -euo pipefail
here=$(cd "$(dirname "$0")/.." && pwd)
tgt=${CARGO_TARGET_DIR:-$here/../target}
cargo build --release -p stillsky-c --manifest-path "$here/Cargo.toml"
cc -std=c11 -O2 -Wall -Wextra -Wpedantic -Werror -I "$here/include" "$here/tests/c/soak.c" \
    "$tgt/release/libstillsky.a" -lpthread -ldl -lm -o "$tgt/release/stillsky-soak"
"$tgt/release/stillsky-soak" "$@"
