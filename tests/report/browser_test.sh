#!/usr/bin/env bash
# Each demo survey's HTML report opened by headless Chromium (Debian's
# chromium, installed by .ci/run): no console message, every figure in the
# DOM, a screenshot that is not blank, and a page of plausible height.
#   browser_test.sh HYPSOLEV PNG_CHECK SOURCE_DIR WORK_DIR
# Exit 77 (CTest: skipped) where Chromium is not installed.
set -euo pipefail
exe=$1 png_check=$2 src=$3 work=$4
chromium=$(command -v chromium || true)
if [ -z "$chromium" ]; then
  echo "report_browser: SKIP: chromium is not installed (apt-get install chromium; .ci/run does)"
  exit 77
fi
rm -rf "$work" && mkdir -p "$work/results"
cd "$src"
fail() { echo "report_browser: FAIL: $*"; exit 1; }

# The demo surveys' commands from their READMEs, with an HTML report.
"$exe" correct surveys/quenwick-tor/rover.gpx --base surveys/quenwick-tor/base.csv --base-height 812.4 \
  --base-at 46.80,9.90 -o "$work/results/quenwick-tor.gpx" --table "$work/results/quenwick-tor.csv" \
  --report "$work/results/quenwick-tor.html" -q
"$exe" correct surveys/ulmbrae-two-base/rover.gpx \
  --base surveys/ulmbrae-two-base/base.csv --base-height 812.4 --base-at 46.80,9.90 \
  --base surveys/ulmbrae-two-base/base2.csv --base-height 1745 --base-at 46.831475,9.961743 \
  --bases-colocated 2026-06-18T05:00:00Z/2026-06-18T05:29:00Z --out-dir "$work/results" --report-html -q 2> /dev/null

# The station network demo (Skelvorn Moor README's command) with an HTML report.
sk=surveys/skelvorn-moor
"$exe" adjust $sk/ra-day1.gpx $sk/rb-day1.gpx $sk/ra-day2.gpx $sk/rb-day2.gpx --stations $sk/stations.csv \
  --base-dir $sk --occupations $sk/fieldbook.csv -o "$work/results/skelvorn.csv" \
  --report "$work/results/skelvorn-moor.html" -q

# No network, no profile, nothing but the page; a fresh profile each run.
browse() {   # browse PAGE OUT_STDOUT OUT_STDERR ARGS...
  local page=$1 out=$2 err=$3 prof
  shift 3
  prof=$(mktemp -d "$work/profile.XXXXXX")
  timeout 120 "$chromium" --headless --no-sandbox --disable-gpu --disable-quic --no-first-run \
    --disable-background-networking --disable-component-update --disable-sync --hide-scrollbars \
    --user-data-dir="$prof" "$@" "file://$page" > "$out" 2> "$err" || fail "chromium failed on $page: $(tail -3 "$err")"
  rm -rf "$prof"
}

for page in "$work/results/quenwick-tor.html" "$work/results/rover.report.html" "$work/results/skelvorn-moor.html"; do
  [ -s "$page" ] || fail "$page was not written"
  name=$(basename "$page" .html)
  # console messages (errors, warnings, logs) come out as INFO:CONSOLE lines
  browse "$page" "$work/$name.dom" "$work/$name.log" --enable-logging=stderr --v=0 --dump-dom
  if grep -q "CONSOLE" "$work/$name.log"; then
    grep "CONSOLE" "$work/$name.log"
    fail "$name: console messages"
  fi
  figures=$(grep -o '<svg ' "$work/$name.dom" | wc -l)
  [ "$figures" -ge 8 ] || fail "$name: $figures figures in the DOM, expected 8 or more"
  # the screenshot: not blank (many colours, some ink on the background)
  browse "$page" /dev/null "$work/$name.shot.log" --screenshot="$work/$name.png" --window-size=1200,4000
  read -r w h colours inked last < <("$png_check" "$work/$name.png") || fail "$name: screenshot unreadable"
  echo "report_browser: $name: ${w}x$h screenshot, $colours colours (counted to 256), $inked per mille inked"
  [ "$w" = 1200 ] && [ "$h" = 4000 ] || fail "$name: screenshot ${w}x$h, expected 1200x4000"
  [ "$colours" -ge 32 ] || fail "$name: $colours colours: blank or nearly"
  [ "$inked" -ge 20 ] || fail "$name: $inked per mille of the screenshot inked: blank or nearly"
  # the page's height: the last inked row of a window taller than the page
  browse "$page" /dev/null "$work/$name.tall.log" --screenshot="$work/$name-tall.png" --window-size=1200,16000
  read -r _ _ _ _ last < <("$png_check" "$work/$name-tall.png")
  echo "report_browser: $name: the page ends at $last px"
  # eight figures of 300 to 640 px with captions and the tables: 4000 to
  # 12000 px at 1200 px wide (what the demo pages measure, 6000 to 7000,
  # with room either way)
  [ "$last" -ge 4000 ] && [ "$last" -le 12000 ] || fail "$name: page height $last px, expected 4000 to 12000"
done
echo "report_browser: ok"
