#!/usr/bin/env bash
# Run every fuzz target (or those named after the seconds) for SECONDS each, one after another.
# Usage: fuzz/run.sh SECONDS [TARGET...]   (needs `cargo install cargo-fuzz` and a nightly toolchain)
# Findings land in fuzz/artifacts/TARGET/; the growing corpus stays in fuzz/target/corpus/TARGET/
# so the committed seeds in fuzz/corpus/ stay small.
set -euo pipefail
cd "$(dirname "$0")/.."
seconds="${1:?usage: fuzz/run.sh SECONDS [TARGET...]}"
shift
targets=("$@")
if [ ${#targets[@]} -eq 0 ]; then
  targets=(parse_value part_file board_file)
fi
failed=()
for t in "${targets[@]}"; do
  work="fuzz/target/corpus/$t"
  mkdir -p "$work"
  dict=()
  if [ "$t" != parse_value ]; then
    dict=(-dict=fuzz/dict/json.dict)
  fi
  echo "== $t for ${seconds}s"
  # -a: debug assertions (overflow checks) on; the seed folder is read, the work folder written.
  # A crash stops that target only; the others still run, and the script fails at the end.
  if ! cargo +nightly fuzz run -a "$t" "$work" "fuzz/corpus/$t" -- \
    -max_total_time="$seconds" -timeout=10 -rss_limit_mb=2048 -print_final_stats=1 "${dict[@]}"; then
    failed+=("$t")
  fi
done
if [ ${#failed[@]} -gt 0 ]; then
  echo "findings in: ${failed[*]} (see fuzz/artifacts/)" >&2
  exit 1
fi
