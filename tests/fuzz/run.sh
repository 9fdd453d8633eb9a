#!/usr/bin/env bash
# Builds the libFuzzer harnesses with clang and runs each for SECONDS
# (default 30) on a scratch copy of its seed corpus; fails on any crash.
# Crash inputs are left in build-fuzz/crashes/ (keep them under
# tests/fuzz/regress/HARNESS/ once fixed).
set -euo pipefail
secs=${1:-30}
cd "$(dirname "$0")/../.."
CC=clang cmake -S . -B build-fuzz -DHYP_FUZZ=ON -DHYP_TESTS=OFF -DCMAKE_BUILD_TYPE=RelWithDebInfo > /dev/null
cmake --build build-fuzz -j2 > /dev/null
mkdir -p build-fuzz/crashes
for h in gpx csv time benchmarks tzif network; do
  work=$(mktemp -d)
  cp tests/fuzz/corpus/$h/* "$work"/
  [ -d tests/fuzz/regress/$h ] && cp tests/fuzz/regress/$h/* "$work"/ 2>/dev/null || true
  echo "fuzz_$h: ${secs} s"
  if ! build-fuzz/tests/fuzz/fuzz_$h -max_total_time="$secs" -max_len=20000 -timeout=10 \
        -artifact_prefix=build-fuzz/crashes/$h- "$work" > build-fuzz/fuzz_$h.log 2>&1; then
    tail -40 build-fuzz/fuzz_$h.log
    echo "fuzz_$h: crash (input in build-fuzz/crashes/)"
    exit 1
  fi
  grep -E '^Done' build-fuzz/fuzz_$h.log || true
  rm -rf "$work"
done
echo "fuzzing: 6 passed, 0 failed"
