#!/usr/bin/env bash
# Builds the fuzz targets, seeds their corpora from the fixtures and runs each for a bounded
# time; exits non-zero on any crash, hang (-timeout), or memory blow-up (-rss_limit_mb).
# Used by .ci/run; see DEVELOPERS.md, "Fuzzing".
#
# Usage: mzcore/fuzz/run.sh [SECONDS_SCALE]   (1 = the CI budget below; 0.5 halves it)
# Environment: MZSIFT_BIN (optional) a built `mzsift`, for the default configuration seed.
set -euo pipefail
cd "$(dirname "$0")"
scale=${1:-1}
# Only the stable toolchain is available: RUSTC_BOOTSTRAP lets it accept the -Z flags that
# cargo-fuzz passes (sanitizer, coverage instrumentation).
export RUSTC_BOOTSTRAP=1
command -v cargo-fuzz >/dev/null 2>&1 || cargo install cargo-fuzz --locked
start=$SECONDS
cargo fuzz build
echo "fuzz build: $((SECONDS - start)) s"
python3 seed_corpus.py ../.. ${MZSIFT_BIN:-}
# Seconds per target (every [[bin]] of Cargo.toml runs; 20 s unless listed): the
# whole-document reader is the slowest per input and the most exposed.
declare -A budget=([mzml_document]=60 [mzml_spectrum]=40 [binary_decoder]=30)
failed=0
for t in $(cargo fuzz list); do
  secs=$(awk -v s="${budget[$t]:-20}" -v k="$scale" 'BEGIN { printf "%d", s * k < 1 ? 1 : s * k }')
  log=$(mktemp)
  if cargo fuzz run "$t" -- -max_total_time="$secs" -timeout=10 -rss_limit_mb=1024 \
      -print_final_stats=1 >"$log" 2>&1; then
    runs=$(sed -n 's/^stat::number_of_executed_units: *//p' "$log" | tail -n 1)
    cov=$(sed -n 's/^#[0-9]*[[:space:]]*DONE[[:space:]]*cov: \([0-9]*\).*/\1/p' "$log" | tail -n 1)
    echo "fuzz $t: ${runs:-?} executions in ${secs} s, coverage ${cov:-?} edges, no crash"
  else
    echo "fuzz $t: FAILED (crash, hang or memory limit); log follows"
    tail -n 60 "$log"
    ls artifacts/"$t" 2>/dev/null || true
    failed=1
  fi
  rm -f "$log"
done
echo "fuzz step: $((SECONDS - start)) s"
exit $failed
