#!/usr/bin/env bash
# One logger's file given twice under two names (the Velmoray leapfrog demo
# survey with ra.gpx copied to rc.gpx and given as a third rover). Before,
# rc was adjusted as a third instrument: exit 0, no word, and LF01's sigma
# shrank from 0.385 m to 0.260 m on no new evidence. Now the run is
# refused as a usage error (exit 2) naming both files, and writes nothing.
#   adjust_same_file_test.sh HYPSOLEV SURVEY_DIR WORK_DIR
set -u
exe=$1 survey=$2 work=$3
rm -rf "$work" && mkdir -p "$work"
cp "$survey"/ra.gpx "$survey"/rb.gpx "$survey"/stations.csv "$survey"/fieldbook.csv "$work"/
cp "$work"/ra.gpx "$work"/rc.gpx
cd "$work"
"$exe" adjust ra.gpx rb.gpx rc.gpx --stations stations.csv --occupations fieldbook.csv -o out.csv > out.txt 2>&1
rc=$?
fail=0
[ "$rc" -eq 2 ] || { echo "FAIL: exit $rc, expected 2 (usage: a file given twice)"; fail=1; }
grep -q 'ra.gpx and rc.gpx hold the same data byte for byte' out.txt || { echo "FAIL: no message naming both files"; fail=1; }
[ -e out.csv ] && { echo "FAIL: out.csv written"; fail=1; }
# a real second instrument (rb, not a copy) is still taken
"$exe" adjust ra.gpx rb.gpx --stations stations.csv --occupations fieldbook.csv -o out2.csv > out2.txt 2>&1
rc2=$?
[ "$rc2" -eq 0 ] || { echo "FAIL: the demo survey itself exits $rc2, expected 0 (its README)"; fail=1; }
grep -Eiq '(^|[^a-z])(nan|inf)([^a-z]|$)' out.txt out2.txt && { echo "FAIL: nan or inf shown"; fail=1; }
[ "$fail" -eq 0 ] || { cat out.txt; exit 1; }
echo "ok: a file given twice refused (exit 2), the survey itself runs"
