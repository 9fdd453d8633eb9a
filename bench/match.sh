#!/usr/bin/env bash
# Benchmark (not a test): matching benchmarks to a track (issue 15). Runs
# bench/match_bench.c (the former geodesic per benchmark and sample against
# the index, same track and benchmarks, in this one run, CPU times), then
# times `hypsolev correct` end to end on a track of the same shape with that
# many benchmarks (median of three runs, wall time).
#   bench/match.sh [POINTS] [BENCHMARKS] [BUILD_DIR]   (default 3600 10000 build)
set -euo pipefail
n=${1:-3600}
m=${2:-10000}
# shellcheck source=bench_lib.sh
. "$(dirname "$0")/bench_lib.sh"
bench_setup "${3:-}"
cc -O2 -D_DEFAULT_SOURCE -I"$top/include" -I"$top/src" -o "$work/match_bench" "$top/bench/match_bench.c" \
  "$top/src/near_index.c" "$top/src/geo.c" "$top/src/error.c" -lproj -lm
"$work/match_bench" "$n" "$m"
"$work/gentrack" "$n" "$work/track.gpx" "$work/base.csv"
# benchmarks over a 5 km square about the track (invented names)
awk -v m="$m" 'BEGIN { srand(7); print "name,lat,lon,height,sigma,note"
  for (k = 0; k < m; k++) printf "BM%d,%.7f,%.7f,%.2f,,\n", k, 46.78 + 0.045 * rand(), 9.88 + 0.065 * rand(), 800 + 600 * rand() }' \
  > "$work/bm.csv"
run=(correct "$work/track.gpx" --base "$work/base.csv" --base-height 800 --benchmarks "$work/bm.csv"
     -o "$work/out.gpx" -q --no-gnss-anchor)
walls=()
for k in 1 2 3; do
  rm -f "$work/out.gpx"
  read -r _ w < <(bench_measure "$exe" "${run[@]}")
  walls+=("$w")
done
printf 'hypsolev correct, %s points, %s benchmarks: %s s (median of 3 runs: %s s; target: seconds at most)\n' "$n" "$m" \
  "$(bench_median "${walls[@]}")" "${walls[*]}"
