#!/usr/bin/env bash
# Run every fuzz target (cargo-fuzz / libFuzzer, nightly toolchain) for a bounded time each.
# Usage: scripts/fuzz.sh [seconds-per-target, default 60] [target ...]
# The committed seed corpus (fuzz/corpus/<target>) is copied into a working corpus under the
# target dir, so new inputs found by a run do not land in the source tree. A crash leaves its
# input in fuzz/artifacts/<target>/; after fixing it, copy that file into
# tests/data/fuzz-regressions/<target>/ so `cargo test` replays it.
set -euo pipefail
cd "$(dirname "$0")/.."
secs="${1:-60}"
shift || true
targets=("$@")
[ ${#targets[@]} -gt 0 ] || targets=(model_toml series_text psd_csv c_api)
export CARGO_TARGET_DIR="${CARGO_TARGET_DIR:-$(pwd)/target}"
work="$CARGO_TARGET_DIR/fuzz-corpus"
status=0
for t in "${targets[@]}"; do
  mkdir -p "$work/$t"
  cp -n fuzz/corpus/"$t"/* "$work/$t"/ 2>/dev/null || true
  echo "== $t: ${secs}s"
  # -rss_limit_mb and -timeout turn memory blow-ups and hangs into reported failures too.
  if ! cargo +nightly fuzz run --fuzz-dir fuzz "$t" "$work/$t" -- \
      -max_total_time="$secs" -max_len=8192 -timeout=10 -rss_limit_mb=2048 -print_final_stats=1; then
    echo "!! $t found a failure (see fuzz/artifacts/$t/)"
    status=1
  fi
  echo "   working corpus: $(ls "$work/$t" | wc -l) inputs"
done
exit $status
