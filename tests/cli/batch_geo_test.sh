#!/usr/bin/env bash
# A batch lends each worker's PROJ set-up (geoid, last projection) to its
# rovers in turn: with one worker, rovers in UTM zone 32, then 31, then 32
# again, with geoid conversions, must give each the table a run of that
# rover alone gives (byte for byte), and the zone-31 rover the easting and
# northing cs2cs gives.
#   batch_geo_test.sh HYPSOLEV DATA_DIR WORK_DIR
set -u
exe=$1 data=$2 work=$3
fails=0
bad() { echo "FAIL: $*"; fails=$((fails + 1)); }
rm -rf "$work" && mkdir -p "$work/in" "$work/out" "$work/one"
# a and c: the fixture at 46.8 N 9.9 E (zone 32); b moved to 2.4 E (zone 31)
cp "$data/rover.gpx" "$work/in/a.gpx"
sed 's/lon="9\.9/lon="2.4/' "$data/rover.gpx" > "$work/in/b.gpx"
cp "$data/rover.gpx" "$work/in/c.gpx"
opts=(--base "$data/base.csv" --base-height 812 --crs utm --gnss-heights ellipsoidal -q)
"$exe" correct "$work/in" "${opts[@]}" --out-dir "$work/out" -j 1 2> /dev/null || bad "batch: exit $?"
for t in a b c; do
  "$exe" correct "$work/in/$t.gpx" "${opts[@]}" -o "$work/one/$t.gpx" --table "$work/one/$t.csv" -j 1 2> /dev/null ||
      bad "$t alone: exit $?"
  cmp -s "$work/out/$t.csv" "$work/one/$t.csv" || bad "$t: the batch's table differs from the rover's own run"
  cmp -s "$work/out/$t.gpx" "$work/one/$t.gpx" || bad "$t: the batch's GPX differs from the rover's own run"
done
# first row of b: easting, northing in EPSG:32631, from
#   echo "46.8 2.4" | cs2cs -f "%.3f" EPSG:4326 EPSG:32631   ->  454214.769  5183113.985
# (PROJ 9 cs2cs; in zone 32 the same point would be -3567.492 5204127.425)
hdr=$(head -1 "$work/out/b.csv")
row=$(sed -n 2p "$work/out/b.csv")
col() { echo "$hdr" | tr , '\n' | grep -nx "$1" | cut -d: -f1; }
e=$(echo "$row" | cut -d, -f"$(col easting)")
n=$(echo "$row" | cut -d, -f"$(col northing)")
[ "$e" = 454214.769 ] && [ "$n" = 5183113.985 ] || bad "b: easting, northing $e, $n; expected 454214.769, 5183113.985 (cs2cs)"
grep -q "32631" "$work/out/b.report.txt" || bad "b: its report does not name EPSG:32631"
grep -q "32632" "$work/out/c.report.txt" || bad "c: its report does not name EPSG:32632"
echo "batch_geo: $((fails == 0 ? 1 : 0)) passed, $((fails == 0 ? 0 : 1)) failed"
[ $fails -eq 0 ]
