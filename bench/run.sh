#!/usr/bin/env bash
# Benchmark (not a test): hypsolev correct against xmllint --stream on one
# large track, peak memory per point, the cost of an HTML report, and the
# batch speed-up of -j 2 over -j 1. Prints the figures with the targets; every ratio comes from pairs
# of runs made back to back in this one run of the script (the median of
# five pairs), as a noisy machine allows nothing finer.
#   bench/run.sh [POINTS] [BUILD_DIR]     (default 1000000, build)
# The last part, an archive of small tracks (300 of 5000 points, --out-dir,
# -j 1 and -j 2), compares CPU time (user + system) with xmllint --stream
# over the same files; HYP_BENCH_ONLY=archive runs only that part.
set -euo pipefail
n=${1:-1000000}
# shellcheck source=bench_lib.sh
. "$(dirname "$0")/bench_lib.sh"
bench_setup "${2:-}"
command -v xmllint > /dev/null || { echo "xmllint missing: apt-get install libxml2-utils"; exit 1; }
measure() { bench_measure "$@"; }   # prints "rss_kib wall_s"
cpu() {   # prints "cpu_s user_s" (user + system, and user alone)
  "$work/peakrss" "$@" 2>&1 >/dev/null | sed -n 's/^peak_rss_kib .* cpu_s \([0-9.]*\) user_s \([0-9.]*\)$/\1 \2/p'
}
archive() {
  # An archive of small tracks: many rovers, each read, corrected and
  # written (GPX, table, report) with its own output set. Five rounds for
  # each of -j 1 and -j 2: xmllint --stream over the same files then
  # hypsolev, back to back; the median round's CPU-time ratio is the figure.
  # Each round then frees the outputs, waits as long as xmllint took, and
  # has dd write as many bytes into one file of the same folder: the
  # machine's own cost of putting those bytes in the page cache, which on a
  # virtual machine that hands freed memory back to its host is far from
  # constant (docs/performance.md). The figures beside the ratio say how
  # much of hypsolev's CPU time is its user time and how much dd needed.
  local k=300 m=5000
  mkdir -p "$work/arch"
  "$work/gentrack" "$m" "$work/arch/t0000.gpx" "$work/arch-base.csv"
  for i in $(seq 1 $((k - 1))); do cp "$work/arch/t0000.gpx" "$work/arch/t$(printf %04d "$i").gpx"; done
  local cmd=(correct "$work/arch" --base "$work/arch-base.csv" --base-height 800 --offset 0 -q --no-gnss-anchor)
  cpu xmllint --stream --noout "$work"/arch/*.gpx > /dev/null   # warm the page cache
  for j in 1 2; do
    local rs=()
    for p in 1 2 3 4 5; do
      rm -rf "$work/arch-out" && mkdir "$work/arch-out"
      local x xu h hu d bytes
      read -r x xu < <(cpu xmllint --stream --noout "$work"/arch/*.gpx)
      read -r h hu < <(cpu "$exe" "${cmd[@]}" --out-dir "$work/arch-out" -j "$j")
      bytes=$(du -sb "$work/arch-out" | cut -f1)
      rm -rf "$work/arch-out" && mkdir "$work/arch-out"
      cpu xmllint --stream --noout "$work"/arch/*.gpx > /dev/null   # the same pause as before hypsolev
      read -r d _ < <(cpu dd if=/dev/zero of="$work/arch-out/dd.bin" bs=256k count=$((bytes / 262144)) status=none)
      rs+=("$(awk -v h="$h" -v x="$x" -v hu="$hu" -v d="$d" -v b="$bytes" \
        'BEGIN { printf "%.3f %.2f %.2f %.2f %.2f %.0f", h / x, h, x, hu, d, b / 1048576 }')")
    done
    local r hs xs hus ds mib
    read -r r hs xs hus ds mib < <(bench_median "${rs[@]}")
    printf 'archive -j %d rounds (ratio, hypsolev CPU s, xmllint CPU s, hypsolev user s, dd CPU s, MiB written):\n' "$j"
    printf '  %s\n' "${rs[@]}"
    printf 'archive of %d x %d points, -j %d: hypsolev %.2f CPU s (user %.2f s), xmllint --stream %.2f CPU s, ratio %.2f (median of 5 rounds; target <= 1.5); dd writing the same %s MiB: %.2f CPU s\n' \
      "$k" "$m" "$j" "$hs" "$hus" "$xs" "$r" "$mib" "$ds"
  done
  rm -rf "$work/arch" "$work/arch-out"
}
if [ "${HYP_BENCH_ONLY:-}" = archive ]; then
  archive
  exit 0
fi
"$work/gentrack" "$n" "$work/track.gpx" "$work/base.csv"
run=(correct "$work/track.gpx" --base "$work/base.csv" --base-height 800 --offset 0 -o "$work/out.gpx" -q --no-gnss-anchor)
measure xmllint --stream --noout "$work/track.gpx" > /dev/null   # warm the page cache
# Five pairs, each xmllint then hypsolev on the same file back to back;
# the median pair's ratio is the figure (a noisy machine moves single ones).
ratios=()
for k in 1 2 3 4 5; do
  read -r _ x_s < <(measure xmllint --stream --noout "$work/track.gpx")
  rm -f "$work/out.gpx"
  read -r h_rss h_s < <(measure "$exe" "${run[@]}")
  ratios+=("$(awk -v h="$h_s" -v x="$x_s" 'BEGIN { printf "%.3f %.2f %.2f", h / x, h, x }')")
done
read -r ratio h_s x_s < <(bench_median "${ratios[@]}")
# The HTML report's cost: the same run without and with --report x.html,
# back to back, five pairs; the median pair's ratio is the figure.
reps=()
for k in 1 2 3 4 5; do
  rm -f "$work/out.gpx" "$work/r.html"
  read -r _ a_s < <(measure "$exe" "${run[@]}")
  rm -f "$work/out.gpx"
  read -r r_rss b_s < <(measure "$exe" "${run[@]}" --report "$work/r.html")
  reps+=("$(awk -v a="$a_s" -v b="$b_s" -v m="$r_rss" 'BEGIN { printf "%.3f %.2f %.2f %d", b / a, a, b, m }')")
done
read -r rep_ratio rep_a rep_b rep_rss < <(bench_median "${reps[@]}")
rep_size=$(stat -c %s "$work/r.html")
# the fixed part of the memory: the same command on a 1000-point track
"$work/gentrack" 1000 "$work/small.gpx" "$work/small.csv"
small=(correct "$work/small.gpx" --base "$work/small.csv" --base-height 800 --offset 0 -o "$work/small-out.gpx" -q --no-gnss-anchor)
read -r s_rss _ < <(measure "$exe" "${small[@]}")
size=$(stat -c %s "$work/track.gpx")
echo "track: $n points, $((size / 1048576)) MiB"
printf 'pairs (ratio, hypsolev s, xmllint s): %s | %s | %s | %s | %s\n' "${ratios[@]}"
awk -v hs="$h_s" -v xs="$x_s" -v r="$ratio" -v n="$n" -v hr="$h_rss" -v sr="$s_rss" 'BEGIN {
  printf "hypsolev correct: %.2f s, xmllint --stream: %.2f s, ratio %.2f (median of 5 pairs; target <= 1.3)\n", hs, xs, r
  printf "points per second: %.0f\n", n / hs
  printf "peak RSS: %.1f MiB, %.0f bytes per point (target <= 80)\n", hr / 1024, hr * 1024 / n
  printf "  of which fixed (a 1000-point run): %.1f MiB; above it %.0f bytes per point\n", sr / 1024, (hr - sr) * 1024 / (n - 1000) }'
printf 'report pairs (ratio, without s, with s, peak KiB with): %s | %s | %s | %s | %s\n' "${reps[@]}"
awk -v r="$rep_ratio" -v a="$rep_a" -v b="$rep_b" -v z="$rep_size" -v m="$rep_rss" -v n="$n" 'BEGIN {
  printf "--report x.html: %.2f s against %.2f s without, ratio %.3f (median of 5 pairs; target <= 1.10)\n", b, a, r
  printf "  report %.2f MiB; peak RSS with it %.1f MiB, %.0f bytes per point\n", z / 1048576, m / 1024, m * 1024 / n }'
# batch: 8 tracks of a tenth of the size each
m=$((n / 10))
mkdir -p "$work/many" "$work/o1" "$work/o2"
"$work/gentrack" "$m" "$work/many/t0.gpx" "$work/base2.csv"
for i in 1 2 3 4 5 6 7; do cp "$work/many/t0.gpx" "$work/many/t$i.gpx"; done
batch=(correct "$work/many" --base "$work/base2.csv" --base-height 800 --offset 0 -q --no-gnss-anchor)
# five pairs again, the median pair's speed-up is the figure
ups=()
for k in 1 2 3 4 5; do
  rm -rf "$work/o1" "$work/o2" && mkdir -p "$work/o1" "$work/o2"
  read -r _ j1 < <(measure "$exe" "${batch[@]}" --out-dir "$work/o1" -j 1)
  read -r _ j2 < <(measure "$exe" "${batch[@]}" --out-dir "$work/o2" -j 2)
  ups+=("$(awk -v a="$j1" -v b="$j2" 'BEGIN { printf "%.3f %.2f %.2f", a / b, a, b }')")
done
read -r up j1 j2 < <(bench_median "${ups[@]}")
printf 'batch pairs (speed-up, -j 1 s, -j 2 s): %s | %s | %s | %s | %s\n' "${ups[@]}"
awk -v a="$j1" -v b="$j2" -v u="$up" 'BEGIN { printf "batch of 8: -j 1 %.2f s, -j 2 %.2f s, speed-up %.2f (median of 5 pairs; target >= 1.6)\n", a, b, u }'
archive
