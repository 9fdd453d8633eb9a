#!/usr/bin/env bash
# Waypoints corrected: the demo walk (surveys/quenwick-tor, track
# 07:00:00-11:48:05Z every 5 s, base 06:30-12:18Z) with waypoints added
# inside the span (with and without <ele>, between samples and on one),
# outside it, without time, and a <wpt .../>. Checks the summary's counts,
# the table's waypoint rows against linear interpolation of its own track
# rows (the documented rule, docs/formats.md), that the GPX differs from the
# input only in the documented bytes (namespace, vertical reference, track
# points, the corrected waypoints' ele and extensions), and that it is
# valid against the GPX 1.1 schema and ours (xmllint --schema; the GPX
# schema skipped with a message where ../shared/gpx is absent).
# usage: waypoints_test.sh HYPSOLEV SOURCE_DIR WORK_DIR
set -u
exe=$1 src=$2 work=$3
rm -rf "$work" && mkdir -p "$work"
fails=0
bad() { echo "FAIL: $*"; fails=$((fails + 1)); }
demo=$src/surveys/quenwick-tor
in=$work/walk.gpx
# the waypoints go after <metadata>, before <trk>: the GPX 1.1 schema's order
W1='  <wpt lat="46.8010000" lon="9.9010000"><ele>900.0</ele><time>2026-06-18T08:00:02Z</time><name>W1 spring</name><extensions><lg:note>cairn</lg:note></extensions></wpt>'
W2='  <wpt lat="46.8020000" lon="9.9020000"><time>2026-06-18T09:30:00Z</time><name>W2 gate</name></wpt>'
W3='  <wpt lat="46.8030000" lon="9.9030000"><ele>850.5</ele><time>2026-06-18T06:00:00Z</time><name>W3 before</name></wpt>'
W4='  <wpt lat="46.8040000" lon="9.9040000"><ele>860.0</ele><name>W4 no time</name></wpt>'
W5='  <wpt lat="46.8050000" lon="9.9050000"/>'
W6='  <wpt lat="46.8060000" lon="9.9060000"><ele>870.0</ele><time>2026-06-18T13:00:00Z</time></wpt>'
awk -v a="$W1" -v b="$W2" -v c="$W3" -v d="$W4" -v e="$W5" -v f="$W6" \
    '{print} /<metadata>/ {print a; print b; print c; print d; print e; print f}' "$demo/rover.gpx" > "$in"
cp "$in" "$work/walk.orig"
"$exe" correct "$in" --base "$demo/base.csv" --base-height 812.4 --base-at 46.80,9.90 \
    -o "$work/out.gpx" --table "$work/out.csv" > "$work/stdout" 2> "$work/stderr"
rc=$?
[ $rc -eq 0 ] || { bad "exit status $rc"; cat "$work/stderr"; }
cmp -s "$in" "$work/walk.orig" || bad "the input changed"
# the summary goes to standard error when the outputs are files
grep -q "waypoints: 2 corrected, 2 outside the span, 2 without time" "$work/stderr" ||
    bad "summary line: $(grep waypoints "$work/stderr")"

# the table: waypoint rows after the track's, kind last
head -1 "$work/out.csv" | grep -q ',status,kind$' || bad "table header has no kind column last"
nw=$(grep -c ',waypoint$' "$work/out.csv")
[ "$nw" -eq 6 ] || bad "$nw waypoint rows, expected 6"
# seconds of the day of an ISO time on the walk's day
sod() { echo "$1" | awk -F'[T:Z]' '{print $2 * 3600 + $3 * 60 + $4}'; }
# W1 at 08:00:02 lies 2 s into the 5 s step 08:00:00-08:00:05: height
# h0 + (h1 - h0) * 2 / 5, sigma the larger of the two (docs/formats.md)
row() { grep "^$1," "$work/out.csv" | grep ',track$'; }
r0=$(row 2026-06-18T08:00:00Z) r1=$(row 2026-06-18T08:00:05Z)
w1=$(grep '^2026-06-18T08:00:02Z,' "$work/out.csv")
# (the table's heights are rounded to 1 mm, so the two may differ by 1 mm)
ok=$(printf '%s\n%s\n%s\n' "$r0" "$r1" "$w1" | awk -F, 'NR==1{h=$5;s=$6} NR==2{e=h+($5-h)*2/5; m=($6>s?$6:s)}
     NR==3{d=$5-e; if (d<0) d=-d; print (d<=0.0015 && $6==m) ? "yes" : "no " $5 " " $6 " expected " e " " m}')
[ -n "$r0" ] && [ -n "$r1" ] && [ "$ok" = yes ] || bad "W1 height/sigma: $ok (interpolated)"
h1=$(echo "$w1" | cut -d, -f5) s1=$(echo "$w1" | cut -d, -f6)
w2=$(grep '^2026-06-18T09:30:00Z,' "$work/out.csv" | grep ',waypoint$')
r2=$(row 2026-06-18T09:30:00Z)
[ "$(echo "$w2" | cut -d, -f5,6)" = "$(echo "$r2" | cut -d, -f5,6)" ] || bad "W2 on a sample: not that sample's height"
h2=$(echo "$w2" | cut -d, -f5) s2=$(echo "$w2" | cut -d, -f6)
grep -q '^2026-06-18T06:00:00Z,.*,outside the corrected span, left as it is,waypoint$' "$work/out.csv" || bad "W3 row"
grep -q '^,46.80400000,.*,no time, left as it is,waypoint$' "$work/out.csv" || bad "W4 row"

# the GPX: only the documented bytes changed. Track points are checked by
# test_gpx; here every other line is compared with the input.
diff <(grep -v '<trkpt' "$in") <(grep -v '<trkpt' "$work/out.gpx") > "$work/diff"
# the demo's root tag ends on its own line, with the logger's namespace
grep '^[<>]' "$work/diff" | grep -v '<wpt' | grep -v 'xmlns:lg=' | grep -v '<metadata>' > "$work/other"
[ -s "$work/other" ] && bad "lines other than root, metadata and waypoints changed: $(head -3 "$work/other")"
grep -qxF '>      xmlns:lg="urn:example:field-logger:1" xmlns:hyp="urn:hypsolev:gpx:1">' "$work/diff" || bad "root line"
grep -q '^> .*<metadata><extensions><hyp:vertical_ref>' "$work/diff" || \
    grep -q '^> .*<metadata><name>.*</name><extensions><hyp:vertical_ref>' "$work/diff" || bad "metadata line"
E1=$(echo "$W1" | sed "s|<ele>900.0</ele>|<ele>$h1</ele>|; s|</lg:note>|</lg:note><hyp:ele_in>900.000</hyp:ele_in><hyp:sigma>$s1</hyp:sigma>|")
E2=$(echo "$W2" | sed "s|<wpt \([^>]*\)>|<wpt \1><ele>$h2</ele>|; s|</wpt>|<extensions><hyp:sigma>$s2</hyp:sigma></extensions></wpt>|")
grep -qxF -- "$E1" "$work/out.gpx" || bad "W1 line is not as documented: $(grep 'W1' "$work/out.gpx")"
grep -qxF -- "$E2" "$work/out.gpx" || bad "W2 line is not as documented: $(grep 'W2' "$work/out.gpx")"
for w in "$W3" "$W4" "$W5" "$W6"; do
  grep -qxF -- "$w" "$work/out.gpx" || bad "a waypoint not corrected changed: $w"
done
nchanged=$(grep -c '^> *<wpt' "$work/diff")
[ "$nchanged" -eq 2 ] || bad "$nchanged waypoint lines changed, expected 2"

# schemas: ours always; GPX 1.1 where the shared folder is
if command -v xmllint > /dev/null; then
  gpx_xsd=$src/../shared/gpx/gpx-1.1.xsd
  if [ -f "$gpx_xsd" ]; then
    gpx_imp="<xsd:import namespace=\"http://www.topografix.com/GPX/1/1\" schemaLocation=\"$(cd "$(dirname "$gpx_xsd")" && pwd)/gpx-1.1.xsd\"/>"
  else
    echo "GPX 1.1 schema check skipped: $gpx_xsd absent (the shared folder is not beside this checkout)"
    gpx_imp=""
  fi
  cat > "$work/wrap.xsd" <<XSD
<xsd:schema xmlns:xsd="http://www.w3.org/2001/XMLSchema">
$gpx_imp
<xsd:import namespace="urn:hypsolev:gpx:1" schemaLocation="$src/docs/hypsolev-gpx-1.xsd"/>
</xsd:schema>
XSD
  if [ -n "$gpx_imp" ]; then
    xmllint --noout --schema "$work/wrap.xsd" "$work/out.gpx" 2> "$work/xmllint" || bad "schema: $(head -3 "$work/xmllint")"
  fi
  # our elements on their own (the extensions' content), against our xsd
  for el in ele_in sigma; do
    grep -o "<hyp:$el>[^<]*</hyp:$el>" "$work/out.gpx" | head -50 | while read -r x; do
      printf '%s\n' "<hyp:$el xmlns:hyp=\"urn:hypsolev:gpx:1\">${x#*>}" > "$work/el.xml"
      xmllint --noout --schema "$src/docs/hypsolev-gpx-1.xsd" "$work/el.xml" 2> /dev/null || echo "$x"
    done > "$work/bad_el"
    [ -s "$work/bad_el" ] && bad "our xsd refuses: $(head -2 "$work/bad_el")"
  done
else
  echo "schema checks skipped: xmllint absent"
fi

# no nan/inf anywhere a user sees
grep -qiE '\b(nan|inf)\b' "$work/stdout" "$work/stderr" "$work/out.csv" "$work/out.gpx" && bad "nan or inf in an output"
[ $fails -eq 0 ] && echo "waypoints: all checks passed"
exit $((fails > 0))
