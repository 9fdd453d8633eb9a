# shellcheck shell=bash
# bench_lib.sh - what the benchmark scripts (bench/run.sh, bench/match.sh)
# share; sourced, not run. Not a test.

# bench_setup [BUILD_DIR]: sets top (the tree), build (BUILD_DIR, default
# top/build), exe (the program there) and work (a scratch folder removed
# when the script exits), and builds $work/gentrack and $work/peakrss.
bench_setup() {
  top=$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)
  build=${1:-$top/build}
  # shellcheck disable=SC2034  # for the caller
  exe=$build/hypsolev
  work=$(mktemp -d)
  trap 'rm -rf "$work"' EXIT
  cc -O2 -o "$work/gentrack" "$top/bench/gentrack.c" -lm
  cc -O2 -o "$work/peakrss" "$top/bench/peakrss.c"
}

# bench_measure COMMAND...: runs it under peakrss, its output thrown
# away; prints "rss_kib wall_s" (peak resident memory in KiB, wall time in
# s).
bench_measure() {
  "$work/peakrss" "$@" 2>&1 >/dev/null | sed -n 's/^peak_rss_kib \([0-9]*\) wall_s \([0-9.]*\) cpu_s.*$/\1 \2/p'
}

# bench_median LINE...: the middle one of the lines (an odd number of
# them), ordered by their first number.
bench_median() {
  printf '%s\n' "$@" | sort -n | sed -n "$((($# + 1) / 2))p"
}
