#!/usr/bin/env bash
# The simulator's station surveys (hypsim network, network-hard): the same
# seed gives the same files; the files agree with each other (every booked
# station exists, every track covers its bookings, the GNSS fixes of each
# true occupation lie near the station, waypoints fall in occupations, the
# control marks' published heights are their true heights); co-locations
# show the rover offsets and drifts scenario.txt states; the pressures give
# the true heights through the hypsometric equation; --mislabel changes
# exactly one field-book line, as truth-mislabel.txt says; GPX 1.1 schema.
# usage: network_test.sh HYPSIM WORK_DIR [GPX_XSD_DIR]
set -u
sim=$1 work=$2 xsd=${3:-}
rm -rf "$work" && mkdir -p "$work"
fails=0
bad() { echo "FAIL: $*"; fails=$((fails + 1)); }

"$sim" network "$work/a" --seed 11 || bad "hypsim network exit status $?"
"$sim" network "$work/b" --seed 11 || bad "second run"
"$sim" network "$work/m" --seed 11 --mislabel || bad "run with --mislabel"
"$sim" network "$work/s" --seed 12 || bad "run with another seed"
"$sim" network-hard "$work/h" --seed 3 || bad "hypsim network-hard exit status $?"

diff -r "$work/a" "$work/b" > /dev/null || bad "the same seed gave different files"
cmp -s "$work/a/ra-day1.gpx" "$work/s/ra-day1.gpx" && bad "another seed gave the same track"
for f in stations.csv truth.csv bases.csv fieldbook.csv occupations-truth.csv scenario.txt \
         ra-day1.gpx ra-day2.gpx rb-day1.gpx rb-day2.gpx base-day1.csv base-day2.csv; do
  [ -s "$work/a/$f" ] || bad "network: $f missing or empty"
done
[ -e "$work/a/truth-mislabel.txt" ] && bad "truth-mislabel.txt written without --mislabel"

# Bad options: a clear message, exit status 2, no crash.
for opt in "--days 0" "--rovers 27" "--stations x" "--dt" "--colour blue" "--stations 300 --days 1 --rovers 1"; do
  # shellcheck disable=SC2086
  "$sim" network "$work/x" $opt 2> "$work/err"
  rc=$?
  [ $rc -eq 2 ] && grep -q "hypsim: " "$work/err" || bad "option '$opt': exit $rc, message: $(cat "$work/err")"
done

# --mislabel where no booking can be sent to a wrong station: exit 1, a
# message, and no file written
"$sim" network "$work/y" --stations 3 --days 1 --rovers 1 --mislabel 2> "$work/err"
rc=$?
[ $rc -eq 1 ] && grep -q "can be mislabelled" "$work/err" && [ -z "$(ls -A "$work/y")" ] ||
  bad "impossible --mislabel: exit $rc, message: $(cat "$work/err"), files: $(ls "$work/y" | head -3)"

# --- consistency of one survey folder ---
# awk_lib, sim_folder_start: tests/sim/sim_checks.sh
# shellcheck source=sim_checks.sh
. "$(dirname "$0")/sim_checks.sh"

check_folder() {
  local d=$1 tag=$2
  # $d.points: file time lat lon pressure_hPa temperature_degC; headers
  sim_folder_start "$d" "$tag" 'r*-day*.gpx' || return
  [ "$(head -1 "$d/bases.csv")" = "file,height,lat,lon,clock_offset,kind" ] || bad "$tag: bases.csv header"
  awk -F, -v tag="$tag" '
    FNR == 1 { next }
    FILENAME ~ /truth.csv$/ { truth[$1] = $2; next }
    FILENAME ~ /stations.csv$/ {
      if ($1 in st) print "FAIL: " tag ": station " $1 " twice in stations.csv"
      st[$1] = 1; n_st++
      if ($4 != "") {
        n_ctl++
        if (!($1 in truth) || truth[$1] != $4) print "FAIL: " tag ": control " $1 " published " $4 " m, true " truth[$1] " m"
        if ($5 + 0 <= 0) print "FAIL: " tag ": control " $1 " has no sigma"
      } else { todo[$1] = 1; if ($5 != "") print "FAIL: " tag ": " $1 " has a sigma but no height" }
      next
    }
    FILENAME ~ /fieldbook.csv$/ {
      if (!($1 in st)) print "FAIL: " tag ": fieldbook line " FNR ": station " $1 " is not in stations.csv"
      occ[$1]++
      split($2, rd, "-"); if (!(($1, rd[2]) in seen)) { seen[$1, rd[2]] = 1; days[$1]++ }
      if (!(($1, rd[1]) in seenr)) { seenr[$1, rd[1]] = 1; rovers[$1]++ }
    }
    END {
      if (length(truth) != n_st) print "FAIL: " tag ": truth.csv has " length(truth) " stations, stations.csv " n_st
      if (n_ctl < 2) print "FAIL: " tag ": " n_ctl " control marks, expected 2 or more"
      for (s in todo) if (!(s in occ)) print "FAIL: " tag ": station " s " is never occupied"
      for (s in st) if (!(s in todo) && !(s in occ)) print "FAIL: " tag ": control mark " s " is never visited"
      for (s in todo) if (occ[s] >= 2 && days[s] >= 2 && rovers[s] >= 2) n_rep++
      if (n_rep < 2) print "FAIL: " tag ": " n_rep + 0 " stations occupied again on another day by another rover, expected several"
      print tag ": " n_st " stations (" n_ctl " control), " n_rep " repeated on another day by another rover"
    }' "$d/truth.csv" "$d/stations.csv" "$d/fieldbook.csv" | tee "$d.log"
  # each booking inside its true window, inside its track; the GNSS fixes
  # of each true window within 15 m of the station (GNSS error 2 m a
  # component plus standing up to 2 m aside: 15 m is over 5 sigma)
  awk "$awk_lib"'
    FNR == 1 && FILENAME !~ /points$/ { next }
    FILENAME ~ /stations.csv$/ { la[$1] = $2; lo[$1] = $3; next }
    FILENAME ~ /fieldbook.csv$/ { fb[FNR] = $0; next }
    FILENAME ~ /occupations-truth.csv$/ {
      split(fb[FNR], b, ","); split($0, t, ",")
      if (b[2] != t[2]) print "FAIL: " tag ": line " FNR ": fieldbook rover " b[2] ", truth " t[2]
      occ_window(tag, FNR, b, t)
      next
    }
    { occ_point() }   # points: rover time lat lon p T
    END {
      all_worst = occ_report(tag, 5, la, lo)
      printf "%s: %d occupations, GNSS fixes at most %.1f m from their station\n", tag, occ_n, all_worst
    }' tag="$tag" FS=, "$d/stations.csv" "$d/fieldbook.csv" "$d/occupations-truth.csv" FS=' ' "$d.points" | tee -a "$d.log"
  # waypoints: a station's name, at a time inside a true occupation of it by
  # that rover; about half of the occupations away from the base have one
  for g in "$d"/r*-day*.gpx; do
    sed -n 's|.*<wpt lat="[^"]*" lon="[^"]*"><time>\([^<]*\)</time><name>\([^<]*\)</name></wpt>.*|'"$(basename "$g" .gpx)"' \1 \2|p' "$g"
  done > "$d.wpts"
  awk -v tag="$tag" -v base="$(awk '$1 == "base_mark" { print $2 }' "$d/scenario.txt")" '
    FILENAME ~ /truth.csv$/ { if (FNR > 1) { n++; s[n] = $1; r[n] = $2; a[n] = $3; b[n] = $4; away += $1 != base }; next }
    {
      ok = 0; for (k = 1; k <= n; k++) if (s[k] == $3 && r[k] == $1 && a[k] <= $2 && $2 <= b[k]) ok = 1
      if (!ok) print "FAIL: " tag ": waypoint " $3 " at " $2 " in " $1 " is in no occupation of that station"
      nw++
    }
    END {
      if (nw < 0.2 * away || nw > 0.8 * away) print "FAIL: " tag ": " nw + 0 " waypoints for " away " occupations away from the base"
      print tag ": " nw + 0 " waypoints for " away " occupations away from the base"
    }' FS=, "$d/occupations-truth.csv" FS=' ' "$d.wpts" | tee -a "$d.log"
  ! grep -q FAIL "$d.log" || fails=$((fails + 1))
}

# Co-locations: the rover stands beside the base logger at the start and end
# of each track; the mean of (rover - base) over the samples at the same
# second must be the offset + drift x hours that scenario.txt states. The
# bound 2 Pa is 3.5 sigma of that mean (rover noise 2-3 Pa, base 1.2 Pa,
# 1 Pa steps, 20 or more pairs).
check_coloc() {
  local d=$1 tag=$2
  for b in "$d"/base-day*.csv; do
    n=${b##*day}; n=${n%.csv}
    sed -n '3,$p' "$b" | sed "s/^/$n,/"
  done > "$d.base"
  awk "$awk_lib"'
    FILENAME ~ /scenario.txt$/ { par[$1] = $2; next }
    FILENAME ~ /occupations-truth.csv$/ {
      split($0, t, ","); if (FNR > 1 && t[1] == par["base_mark"]) { nc++; cr[nc] = t[2]; ca[nc] = t[3]; cb[nc] = t[4] }; next
    }
    FILENAME ~ /base$/ { split($0, f, ","); bp[f[2]] = f[3]; next }
    {   # points
      for (k = 1; k <= nc; k++)
        if ($1 == cr[k] && $2 >= ca[k] && $2 <= cb[k] && ($2 in bp)) {
          h = (iso2s($2) - iso2s(par[$1 "_start"])) / 3600
          sum[k] += 100 * ($5 - bp[$2]) - (par[$1 "_offset_pa"] + par[$1 "_drift_pa_per_h"] * h); cnt[k]++
        }
    }
    END {
      for (k = 1; k <= nc; k++) {
        if (cnt[k] < 15) { print "FAIL: " tag ": co-location " cr[k] " " ca[k] ": " cnt[k] + 0 " samples beside the base"; continue }
        e = sum[k] / cnt[k]; if (e < 0) e = -e
        if (e > 2) print "FAIL: " tag ": co-location " cr[k] " " ca[k] ": rover - base departs " e " Pa from the stated offset and drift"
        if (e > worst) worst = e
      }
      printf "%s: %d co-locations agree with the stated offsets and drifts within %.2f Pa\n", tag, nc, worst
    }' tag="$tag" "$d/scenario.txt" FS=' ' "$d/occupations-truth.csv" "$d.base" "$d.points" | tee "$d.coloc"
  ! grep -q FAIL "$d.coloc" || fails=$((fails + 1))
}

# The pressures carry the true heights: each occupation's height above the
# base mark from the hypsometric equation, dz = Rd Tv / g0 ln(p_base / p_rover)
# (Wallace & Hobbs, Atmospheric Science, 2nd ed., 2006, eq. 3.29, number
# from memory; Rd = 287.0 J/(kg K), g0 = 9.80665 m/s2 standard gravity),
# with the rover reading corrected by its stated offset and drift, Tv the
# mean of the two logged temperatures + 1.5 K for the humidity (a
# common-practice allowance, no source), against truth.csv. The bound 2 m
# (seeds 1-6 and 11: at most 1.0 m) allows the logged temperatures' error
# (body warming ~1 K), gravity's change with latitude and height and a weak
# pressure gradient over a few km (common practice, no source); a wrong
# height, station, offset or unit is metres to tens of metres off.
check_heights() {
  local d=$1 tag=$2
  awk "$awk_lib"'
    FILENAME ~ /scenario.txt$/ { par[$1] = $2; next }
    FILENAME ~ /\/truth.csv$/ { split($0, t, ","); h[t[1]] = t[2]; next }
    FILENAME ~ /occupations-truth.csv$/ {
      split($0, t, ","); if (FNR > 1 && t[1] != par["base_mark"]) { n++; os[n] = t[1]; orv[n] = t[2]; oa[n] = t[3]; ob[n] = t[4] }; next
    }
    FILENAME ~ /base$/ { split($0, f, ","); bp[f[2]] = f[3]; bt[f[2]] = f[4]; next }
    {
      for (k = 1; k <= n; k++)
        if ($1 == orv[k] && $2 >= oa[k] && $2 <= ob[k] && ($2 in bp)) {
          hr = (iso2s($2) - iso2s(par[$1 "_start"])) / 3600
          pr = 100 * $5 - par[$1 "_offset_pa"] - par[$1 "_drift_pa_per_h"] * hr
          tv = 273.15 + ($6 + bt[$2]) / 2 + 1.5
          dz[k] += hyps_dz(100 * bp[$2], pr, tv); c[k]++
        }
    }
    END {
      worst = heights_report(tag, par["base_height_m"], "a base time", n, os, orv, oa, dz, c, h)
      printf "%s: %d occupations: hypsometric heights within %.2f m of the truth\n", tag, n, worst
    }' tag="$tag" "$d/scenario.txt" "$d/truth.csv" FS=' ' "$d/occupations-truth.csv" "$d.base" "$d.points" | tee "$d.hyps"
  ! grep -q FAIL "$d.hyps" || fails=$((fails + 1))
}

# Track ends: beside the base (the last booking on the base mark) unless
# scenario.txt says the track is open; an open track ends on a control mark
# or on a station occupied again by another track, so its drift stays tied.
check_ends() {
  local d=$1 tag=$2
  awk -v tag="$tag" '
    FILENAME ~ /scenario.txt$/ { if ($1 ~ /_ends_beside_base$/) { r = $1; sub(/_ends_beside_base$/, "", r); closes[r] = $2 }
                                 if ($1 == "base_mark") base = $2; next }
    FILENAME ~ /stations.csv$/ { split($0, f, ","); if (FNR > 1 && f[4] != "") ctl[f[1]] = 1; next }
    FNR > 1 { split($0, f, ","); last[f[2]] = f[1]; n_by[f[1]]++ }
    END {
      for (r in closes) {
        if (!(r in last)) { print "FAIL: " tag ": no booking for " r; continue }
        if (closes[r] == 1 && last[r] != base) print "FAIL: " tag ": " r " should end beside the base, ends on " last[r]
        if (closes[r] == 0) {
          n_open++
          if (last[r] == base || !(last[r] in ctl || n_by[last[r]] >= 2)) print "FAIL: " tag ": open " r " ends on " last[r] ", not a tied station"
        }
      }
      print tag ": " length(closes) " tracks, " n_open + 0 " open"
    }' "$d/scenario.txt" "$d/stations.csv" "$d/fieldbook.csv" | tee "$d.ends"
  ! grep -q FAIL "$d.ends" || fails=$((fails + 1))
  if [ "$3" = open ]; then grep -q ", 0 open" "$d.ends" && bad "$tag: no open track"; fi
  if [ "$3" = closed ]; then grep -q ", 0 open" "$d.ends" || bad "$tag: open tracks where none were asked"; fi
}

check_folder "$work/a" network
check_ends "$work/a" network closed
check_coloc "$work/a" network
check_heights "$work/a" network
check_folder "$work/h" network-hard
check_coloc "$work/h" network-hard
check_ends "$work/h" network-hard open
"$sim" network "$work/o" --seed 11 --open-tracks || bad "run with --open-tracks"
check_ends "$work/o" network-open-tracks open

# --mislabel: every file as without it except fieldbook.csv, which differs in
# exactly the line truth-mislabel.txt names, booked to a station > 30 m away
# in height; the true station is still that of occupations-truth.csv
for f in "$work"/a/*; do
  n=$(basename "$f")
  [ "$n" = fieldbook.csv ] && continue
  cmp -s "$f" "$work/m/$n" || bad "--mislabel changed $n"
done
[ -s "$work/m/truth-mislabel.txt" ] || bad "--mislabel wrote no truth-mislabel.txt"
changed=$(diff <(cat -n "$work/a/fieldbook.csv") <(cat -n "$work/m/fieldbook.csv") | grep -c '^>')
[ "$changed" = 1 ] || bad "--mislabel changed $changed fieldbook lines, expected 1"
line=$(awk '$1 == "fieldbook_line" { print $2 }' "$work/m/truth-mislabel.txt")
booked=$(awk '$1 == "booked_station" { print $2 }' "$work/m/truth-mislabel.txt")
true_st=$(awk '$1 == "true_station" { print $2 }' "$work/m/truth-mislabel.txt")
[ "$(sed -n "${line:-0}p" "$work/m/fieldbook.csv" | cut -d, -f1)" = "$booked" ] || bad "truth-mislabel.txt line $line is not booked to $booked"
[ "$(sed -n "${line:-0}p" "$work/a/fieldbook.csv" | cut -d, -f1)" = "$true_st" ] || bad "line $line was not $true_st without --mislabel"
[ "$(sed -n "${line:-0}p" "$work/a/occupations-truth.csv" | cut -d, -f1)" = "$true_st" ] || bad "occupations-truth.csv line $line is not $true_st"
awk -F, -v a="$booked" -v b="$true_st" '$1 == a { ha = $2 } $1 == b { hb = $2 }
  END { d = ha - hb; if (d < 0) d = -d; if (d <= 30) { print "FAIL: mislabel height difference " d " m"; exit 1 }
        printf "mislabel: line %s booked to %s instead of %s, %.1f m apart\n", line, a, b, d }' \
  line="$line" "$work/a/truth.csv" || fails=$((fails + 1))
IFS=, read -r _ rv wa wb < <(sed -n "${line:-0}p" "$work/a/occupations-truth.csv")
sed -n 's|.*<wpt [^>]*><time>\([^<]*\)</time>.*|\1|p' "$work/m/$rv.gpx" |
  awk -v a="$wa" -v b="$wb" '$1 >= a && $1 <= b { found = 1 } END { exit !found }' &&
  bad "the mislabelled occupation ($rv $wa) has a waypoint, which would contradict the field book"

# GPX 1.1 schema (Topografix), where the schemas are beside the checkout
if [ -n "$xsd" ] && [ -f "$xsd/gpx-1.1.xsd" ] && command -v xmllint > /dev/null; then
  xmllint --noout --schema "$xsd/gpx-1.1.xsd" "$work"/a/*.gpx "$work"/h/ra-day2.gpx 2> "$work/xmllint" ||
    bad "GPX schema: $(head -3 "$work/xmllint")"
else
  echo "GPX schema check skipped (no xmllint or no gpx-1.1.xsd in '${xsd}')"
fi

[ $fails -eq 0 ] && echo "network: all checks passed" || echo "network: $fails failure(s)"
[ $fails -eq 0 ]
