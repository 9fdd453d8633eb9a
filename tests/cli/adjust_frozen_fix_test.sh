#!/usr/bin/env bash
# A rover whose positions froze beside the base (the Skelvorn Moor demo
# survey with every fix of rb-day2 set to the base's mark, BM-HOLM at
# 46.95 N 10.40 E, stations.csv): the field book puts it on GR08, GR09,
# GR02 and BM-RIGG, kilometres away. Before, the whole day was taken as one
# co-location with the base (4 h, a sigma of 37 m) and every booking inside
# it dropped as "beside the base": GR09, booked only by rb-day2, came out
# with no height, a note "occupied by no rover" and exit 0. Now the book is
# used, with a warning naming its line, and the co-location is left out.
#   adjust_frozen_fix_test.sh HYPSOLEV SURVEY_DIR WORK_DIR
set -u
exe=$1 survey=$2 work=$3
rm -rf "$work" && mkdir -p "$work"
cp "$survey"/*.gpx "$survey"/*.csv "$work"/
sed -i 's/<trkpt lat="[^"]*" lon="[^"]*">/<trkpt lat="46.9500000" lon="10.4000000">/' "$work"/rb-day2.gpx
cmp -s "$survey"/rb-day2.gpx "$work"/rb-day2.gpx && { echo "FAIL: the track was not changed"; exit 1; }
cd "$work"
"$exe" adjust ra-day1.gpx rb-day1.gpx ra-day2.gpx rb-day2.gpx --stations stations.csv --base-dir . \
  --occupations fieldbook.csv -o out.csv --residuals res.csv > out.txt 2>&1
rc=$?
fail=0
check() { grep -q -- "$2" "$1" || { echo "FAIL: $1 lacks: $2"; fail=1; }; }
[ "$rc" -eq 0 ] || [ "$rc" -eq 3 ] || { echo "FAIL: exit $rc, expected 0 or 3 (it ran)"; fail=1; }
# line 23 of the field book: GR08 by rb-day2, the first booking off the base
check out.txt 'fieldbook.csv:23: rb-day2: the book has GR08, [0-9]* m from where the track.s positions put the rover beside the base'
check res.csv 'not used: the field book (line 23) puts the rover on GR08'
grep -q 'station GR09: occupied by no rover' out.txt && { echo "FAIL: GR09's booking was dropped"; fail=1; }
# GR09 must have a height within 2 sigma of the simulator's truth
# (truth.csv: 499.129 m; the simulator tests/sim/network.c, seed 0)
t=$(awk -F, '$1=="GR09"{print $2}' truth.csv)
awk -F, -v t="$t" '$1=="\"GR09\"" { found=1; if ($4=="" || $5=="") { print "FAIL: GR09 has no height"; exit 1 }
    d=$4-t; if (d<0) d=-d; if (d>2*$5) { print "FAIL: GR09 " $4 " m, truth " t " m, sigma " $5 " m"; exit 1 } }
    END { if (!found) { print "FAIL: no GR09 row"; exit 1 } }' out.csv || fail=1
grep -Eiq '(^|[^a-z])(nan|inf)([^a-z]|$)' out.txt out.csv && { echo "FAIL: nan or inf shown"; fail=1; }
[ "$fail" -eq 0 ] || { cat out.txt; exit 1; }
echo "ok: the book's stations used over a frozen position, GR09 solved within 2 sigma of the truth"
