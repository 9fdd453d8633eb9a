#!/usr/bin/env bash
# A leapfrog occupation booked at the wrong station (the demo survey's
# field book with ra's LF05 booked as LF07): the run must fail its tests
# (exit 3), say where the book and the track disagree, and not trade the
# wrong leg for a good one: before the w-tests' correlation was checked,
# snooping rejected one of LF06's two legs at random (equal |w|) and then
# the control height of BM-TOLVE (residual 6 mm), leaving LF06 to LF10
# about 80 m off with sigmas near 1 m.
#   leapfrog_misbooked_test.sh HYPSOLEV SURVEY_DIR WORK_DIR
set -u
exe=$1 survey=$2 work=$3
rm -rf "$work" && mkdir -p "$work"
cp "$survey"/ra.gpx "$survey"/rb.gpx "$survey"/stations.csv "$work"/
sed 's/^LF05,ra,/LF07,ra,/' "$survey"/fieldbook.csv > "$work"/fieldbook.csv
cmp -s "$survey"/fieldbook.csv "$work"/fieldbook.csv && { echo "FAIL: the field book was not changed"; exit 1; }
cd "$work"
"$exe" adjust ra.gpx rb.gpx --stations stations.csv --occupations fieldbook.csv -o out.csv > out.txt 2>&1
rc=$?
fail=0
check() { grep -q -- "$2" "$1" || { echo "FAIL: $1 lacks: $2"; fail=1; }; }
[ "$rc" -eq 3 ] || { echo "FAIL: exit $rc, expected 3 (ran, but a test failed)"; fail=1; }
check out.txt 'fieldbook.csv:5: ra was found standing on LF05 from .*, where the book has LF07'
check out.txt 'their w-tests correlate -1.000): the data cannot tell which is wrong; neither taken out'
check out.txt 'result    a test failed'
if grep -q 'control height of BM-TOLVE.*rejected' out.txt; then
  echo "FAIL: a control mark was rejected for a misbooked leg"; fail=1
fi
if grep -q 'data snooping: [1-9]' out.txt; then
  echo "FAIL: snooping rejected an observation it cannot tell from another"; fail=1
fi
grep -Eiq '(^|[^a-z])(nan|inf)([^a-z]|$)' out.txt out.csv && { echo "FAIL: nan or inf shown"; fail=1; }
[ "$fail" -eq 0 ] || { cat out.txt; exit 1; }
echo "ok: exit 3, the misbooked occupation reported, no rejection traded"
