#!/usr/bin/env bash
# Surveys without a base logger (issue 13): the simulator's leapfrog
# traverses and single-instrument loops (tests/sim/leapfrog.c), then
# `hypsolev adjust` with no --base on them, scored against truth.
#
# Part 1, the simulator: the same seed gives the same files; the files
# agree with each other (bookings inside the true windows, GNSS fixes near
# the station, control heights = true heights); the leapfrog design is as
# described (interior stations once each, alternating instruments, side by
# side at both ends, every leg read simultaneously); the pressures give the
# true heights through the hypsometric equation; --index-error and
# --singular change only what they say.
#
# Part 2, the adjustment (skipped, exit 77, only while `hypsolev adjust`
# still refuses tracks because no base is given, i.e. before the leapfrog
# engine is merged): station RMSE against truth.csv over several seeds
# within a regression bound, 2-sigma coverage, the singular loop refused
# with a message naming what is missing, and a constant index error that
# does not accumulate along the traverse.
#
# The published yardstick: leapfrog (and multi-base) barometric levelling
# gives heights to +-3 to 5 ft (0.9 to 1.5 m) overall (Gruendler, Thomack &
# Clapp, "Barometric Leveling Analysis", Journal of the Surveying and
# Mapping Division, ASCE 98(1), 1972, as cited in issue 13). The regression
# bounds below are far tighter: they are set from the figures this script
# measured (printed when it runs; recorded beside each bound) with a margin,
# and only catch the adjustment getting worse.
# usage: leapfrog_test.sh HYPSIM HYPSOLEV WORK_DIR [GPX_XSD_DIR]
set -u
sim=$1 exe=$2 work=$3 xsd=${4:-}
rm -rf "$work" && mkdir -p "$work"
fails=0
bad() { echo "FAIL: $*"; fails=$((fails + 1)); }

# ---------------------------------------------------------------- part 1
"$sim" leapfrog "$work/a" --seed 11 || bad "hypsim leapfrog exit status $?"
"$sim" leapfrog "$work/b" --seed 11 || bad "second run"
"$sim" leapfrog "$work/s" --seed 12 || bad "run with another seed"
"$sim" leapfrog "$work/i" --seed 11 --index-error 50 || bad "run with --index-error"
"$sim" loop "$work/l" --seed 11 || bad "hypsim loop exit status $?"
"$sim" loop "$work/g" --seed 11 --singular || bad "run with --singular"

diff -r "$work/a" "$work/b" > /dev/null || bad "the same seed gave different files"
cmp -s "$work/a/ra.gpx" "$work/s/ra.gpx" && bad "another seed gave the same track"
for f in stations.csv truth.csv fieldbook.csv occupations-truth.csv weather-truth.csv scenario.txt ra.gpx rb.gpx; do
  [ -s "$work/a/$f" ] || bad "leapfrog: $f missing or empty"
  [ "$f" = rb.gpx ] || [ -s "$work/l/$f" ] || bad "loop: $f missing or empty"
done
[ -e "$work/l/rb.gpx" ] && bad "loop: a second instrument's track"

# Bad options: a clear message, exit status 2.
for opt in "leapfrog --seed x" "leapfrog --index-error" "leapfrog --index-error 1e9" "leapfrog --singular" \
           "loop --index-error 5" "loop --colour blue"; do
  set -- $opt
  "$sim" "$1" "$work/x" "${@:2}" 2> "$work/err"
  rc=$?
  [ $rc -eq 2 ] && grep -q "hypsim: " "$work/err" || bad "'$opt': exit $rc, message: $(cat "$work/err")"
done

# --index-error 50: only rb.gpx (every pressure 0.50 hPa higher) and
# scenario.txt (rb's offset, index_error_pa) differ.
for f in "$work"/a/*; do
  n=$(basename "$f")
  case $n in rb.gpx|scenario.txt) continue ;; esac
  cmp -s "$f" "$work/i/$n" || bad "--index-error changed $n"
done
paste -d' ' <(sed -n 's|.*unit="hPa">\([^<]*\)<.*|\1|p' "$work/a/rb.gpx") \
            <(sed -n 's|.*unit="hPa">\([^<]*\)<.*|\1|p' "$work/i/rb.gpx") |
  awk '{ d = $2 - $1 - 0.50; if (d < 0) d = -d; if (d > 0.005) b++; n++ }
       END { if (!n || b) { print "FAIL: --index-error 50: " b + 0 " of " n + 0 " rb pressures not 0.50 hPa higher"; exit 1 }
             print "--index-error 50: all " n " rb pressures 0.50 hPa higher, nothing else changed" }' ||
  fails=$((fails + 1))
# --singular: only stations.csv (no height at all) and scenario.txt differ.
for f in "$work"/l/*; do
  n=$(basename "$f")
  case $n in stations.csv|scenario.txt) continue ;; esac
  cmp -s "$f" "$work/g/$n" || bad "--singular changed $n"
done
[ "$(cut -d, -f4,5 "$work/g/stations.csv" | tail -n +2 | sort -u)" = "," ] || bad "--singular: a height in stations.csv"
diff <(cut -d, -f1-3 "$work/l/stations.csv") <(cut -d, -f1-3 "$work/g/stations.csv") > /dev/null ||
  bad "--singular moved or renamed a station"

# awk_lib, sim_folder_start: tests/sim/sim_checks.sh
# shellcheck source=sim_checks.sh
. "$(dirname "$0")/sim_checks.sh"

# The files of one folder agree: headers, control heights = truth, every
# booking inside its true window and its track, the GNSS fixes of each true
# window within 15 m of the station (2 m a component plus up to 2 m aside:
# over 5 sigma, as network_test.sh).
check_folder() {
  local d=$1 tag=$2
  # $d.points: rover time lat lon pressure_hPa temperature_degC
  sim_folder_start "$d" "$tag" 'r?.gpx' || return
  awk "$awk_lib"'
    FNR == 1 && FILENAME !~ /points$/ { next }
    FILENAME ~ /\/truth.csv$/ { h[$1] = $2; next }
    FILENAME ~ /stations.csv$/ { la[$1] = $2; lo[$1] = $3; n_st++
      if ($4 != "") { n_ctl++; if ($4 != h[$1]) print "FAIL: " tag ": control " $1 " published " $4 " m, true " h[$1] " m" }
      next }
    FILENAME ~ /fieldbook.csv$/ { fb[FNR] = $0; next }
    FILENAME ~ /occupations-truth.csv$/ {
      split(fb[FNR], b, ","); split($0, t, ",")
      if (b[1] != t[1] || b[2] != t[2]) print "FAIL: " tag ": line " FNR ": fieldbook " b[1] " " b[2] ", truth " t[1] " " t[2]
      if (!(t[1] in la)) print "FAIL: " tag ": line " FNR ": station " t[1] " not in stations.csv"
      occ_window(tag, FNR, b, t)
      next
    }
    { occ_point() }   # points: rover time lat lon p T
    END {
      if (length(h) != n_st) print "FAIL: " tag ": truth.csv has " length(h) " stations, stations.csv " n_st
      all_worst = occ_report(tag, 30, la, lo)
      printf "%s: %d stations (%d control), %d occupations, GNSS fixes at most %.1f m from their station\n",
             tag, n_st, n_ctl, occ_n, all_worst
    }' tag="$tag" FS=, "$d/truth.csv" "$d/stations.csv" "$d/fieldbook.csv" "$d/occupations-truth.csv" \
       FS=' ' "$d.points" | tee "$d.log"
  ! grep -q FAIL "$d.log" || fails=$((fails + 1))
}

# The pressures carry the true heights: each occupation's height above the
# first known mark from the hypsometric equation, dz = Rd Tv / g0
# ln(p_mark / p_rover) (Wallace & Hobbs, Atmospheric Science, 2nd ed.,
# 2006, eq. 3.29, number from memory; Rd = 287.0 J/(kg K), g0 = 9.80665
# m/s2 standard gravity), p_mark the true pressure on the mark at the same
# second (weather-truth.csv), the rover's reading corrected by its stated
# offset and drift and by the stated horizontal gradient (scaled by p/p_sl,
# the gradient being given at sea level), Tv the mean of the two
# temperatures + 1.5 K for the humidity (common practice, no source). The
# bound 2 m (measured at most 1.2 m, seed 11: mostly that allowance, about
# twice the real one on this cool day) allows it, the thermometer's body
# warming and gravity's change with latitude (common practice, no source);
# a wrong height, station, offset or unit is metres to tens of metres off.
check_heights() {
  local d=$1 tag=$2
  awk "$awk_lib"'
    FILENAME ~ /scenario.txt$/ { par[$1] = $2; next }
    FILENAME ~ /\/truth.csv$/ { split($0, t, ","); h[t[1]] = t[2]; if (FNR == 2) mark = t[1]; next }
    FILENAME ~ /stations.csv$/ { split($0, t, ","); la[t[1]] = t[2]; lo[t[1]] = t[3]; next }
    FILENAME ~ /occupations-truth.csv$/ {
      split($0, t, ","); if (FNR > 1) { n++; os[n] = t[1]; orv[n] = t[2]; oa[n] = t[3]; ob[n] = t[4] }; next
    }
    FILENAME ~ /weather-truth.csv$/ { split($0, f, ","); wp[f[1]] = f[2]; wt[f[1]] = f[3]; next }
    {
      for (k = 1; k <= n; k++)
        if ($1 == orv[k] && $2 >= oa[k] && $2 <= ob[k] && ($2 in wp)) {
          hr = (iso2s($2) - iso2s(par[$1 "_start"])) / 3600
          de = (lo[os[k]] - lo[mark]) * 111.2 * cos(par["lat0"] * 3.141592653589793 / 180); dn = (la[os[k]] - la[mark]) * 111.2
          pr = 100 * $5 - par[$1 "_offset_pa"] - par[$1 "_drift_pa_per_h"] * hr
          pr -= (par["gradient_east_pa_per_km"] * de + par["gradient_north_pa_per_km"] * dn) * pr / par["sea_level_pressure_pa"]
          tv = 273.15 + ($6 + wt[$2]) / 2 + 1.5
          dz[k] += hyps_dz(100 * wp[$2], pr, tv); c[k]++
        }
    }
    END {
      worst = heights_report(tag, h[mark], "a whole minute", n, os, orv, oa, dz, c, h)
      printf "%s: %d occupations: hypsometric heights within %.2f m of the truth\n", tag, n, worst
    }' tag="$tag" "$d/scenario.txt" FS=, "$d/truth.csv" "$d/stations.csv" "$d/occupations-truth.csv" \
       "$d/weather-truth.csv" FS=' ' "$d.points" | tee "$d.hyps"
  ! grep -q FAIL "$d.hyps" || fails=$((fails + 1))
}

# The leapfrog design: both instruments side by side on each known mark
# (both booked there, overlapping 15 minutes or more); every interior
# station occupied once, ra on the odd and rb on the even ones in order;
# the 11 legs (LF01-BM-QUARN, LF01-LF02, LF03-LF02, ...) each read
# simultaneously for 5 minutes or more; no other overlap.
check_leapfrog_design() {
  local d=$1 tag=$2
  awk "$awk_lib"'
    FNR == 1 { next }
    { n++; s[n] = $1; r[n] = $2; a[n] = iso2s($3); b[n] = iso2s($4); cnt[$1]++ }
    END {
      for (i = 1; i <= n; i++) {
        if (s[i] ~ /^LF/) {
          k = substr(s[i], 3) + 0
          if (cnt[s[i]] != 1) print "FAIL: " tag ": " s[i] " occupied " cnt[s[i]] " times"
          if (r[i] != (k % 2 ? "ra" : "rb")) print "FAIL: " tag ": " s[i] " occupied by " r[i]
        } else if (cnt[s[i]] != 2) print "FAIL: " tag ": known mark " s[i] " occupied " cnt[s[i]] " times"
        for (j = i + 1; j <= n; j++) {
          if (r[i] == r[j]) continue
          c = (b[i] < b[j] ? b[i] : b[j]) - (a[i] > a[j] ? a[i] : a[j])
          if (c <= 0) continue
          if (s[i] == s[j]) { sbs++; if (c < 900) print "FAIL: " tag ": side by side on " s[i] " for " c " s" }
          else { legs++; if (c < 300) print "FAIL: " tag ": leg " s[i] "-" s[j] " read together " c " s" }
        }
      }
      if (sbs != 2 || legs != 11) print "FAIL: " tag ": " sbs + 0 " side-by-side comparisons and " legs + 0 " legs, expected 2 and 11"
      printf "%s: %d side-by-side comparisons, %d legs read simultaneously\n", tag, sbs, legs
    }' tag="$tag" FS=, "$d/occupations-truth.csv" | tee "$d.design"
  ! grep -q FAIL "$d.design" || fails=$((fails + 1))
}

check_folder "$work/a" leapfrog
check_heights "$work/a" leapfrog
check_leapfrog_design "$work/a" leapfrog
check_folder "$work/l" loop
check_heights "$work/l" loop
# the loop: one instrument, two known marks, stations occupied twice
awk -F, 'FNR > 1 { c[$1]++ } END { for (x in c) if (x ~ /^LP/ && c[x] == 2) rep++
  if (rep != 6) { print "FAIL: loop: " rep + 0 " stations occupied twice, expected 6"; exit 1 }
  print "loop: " rep " stations occupied twice" }' "$work/l/fieldbook.csv" || fails=$((fails + 1))

if [ -n "$xsd" ] && [ -f "$xsd/gpx-1.1.xsd" ] && command -v xmllint > /dev/null; then
  xmllint --noout --schema "$xsd/gpx-1.1.xsd" "$work"/a/r?.gpx "$work/l/ra.gpx" 2> "$work/xmllint" ||
    bad "GPX schema: $(head -3 "$work/xmllint")"
  echo "GPX 1.1 schema: the tracks are valid"
else
  echo "GPX schema check skipped (no xmllint or no gpx-1.1.xsd in '${xsd}')"
fi

if [ $fails -ne 0 ]; then
  echo "leapfrog: $fails failure(s) in the simulator's checks"
  exit 1
fi
echo "leapfrog: the simulator's checks passed"

# ---------------------------------------------------------------- part 2
# adjust DIR OUT ROVER...: the adjustment without a base, as a user runs it
adjust() {
  local d=$1 out=$2
  shift 2
  local tracks=()
  for r in "$@"; do tracks+=("$d/$r.gpx"); done
  "$exe" adjust "${tracks[@]}" --stations "$d/stations.csv" --occupations "$d/fieldbook.csv" \
    -o "$out.csv" -q > "$out.out" 2> "$out.err"
  echo $? > "$out.rc"
  if grep -qiE '(^|[^a-z])(nan|inf)([^a-z]|$)' "$out.out" "$out.err"; then bad "$out: nan or inf in the output"; fi
}

# The stations of an adjustment's CSV beside the truth, by the header's
# names: "name error_m sigma_m method" per determined (not control)
# station (method "-" where the column is absent).
errors() {   # stations.csv truth.csv
  awk -F, 'NR == FNR { if (FNR > 1) h[$1] = $2; next }
    FNR == 1 { for (i = 1; i <= NF; i++) col[$i] = i; next }
    { gsub(/"/, "", $col["name"]) }
    $col["control"] == "no" && $col["height"] != "" { m = "method" in col ? $col["method"] : "-"
      printf "%s %.4f %s %s\n", $col["name"], $col["height"] - h[$col["name"]], $col["sigma"], m }' "$2" "$1"
}

mkdir -p "$work/adj"
adjust "$work/a" "$work/adj/lf-11" ra rb
if grep -q "no base station given" "$work/adj/lf-11.err"; then
  echo "SKIP: adjust without a base not built (hypsolev adjust says: $(grep -m1 "no base station given" "$work/adj/lf-11.err"))"
  exit 77
fi

# Leapfrog and loop over seeds 1-6 (plus 11 above): pooled RMSE and 2-sigma
# coverage of the determined stations.
: > "$work/adj/lf.err" && : > "$work/adj/lp.err"
for seed in 1 2 3 4 5 6; do
  "$sim" leapfrog "$work/lf$seed" --seed $seed > /dev/null || bad "hypsim leapfrog --seed $seed"
  "$sim" loop "$work/lp$seed" --seed $seed > /dev/null || bad "hypsim loop --seed $seed"
  adjust "$work/lf$seed" "$work/adj/lf-$seed" ra rb
  adjust "$work/lp$seed" "$work/adj/lp-$seed" ra
  for k in lf lp; do
    rc=$(cat "$work/adj/$k-$seed.rc")
    [ "$rc" = 0 ] || [ "$rc" = 3 ] || { bad "$k seed $seed: adjust exit $rc: $(tail -2 "$work/adj/$k-$seed.err")"; continue; }
    errors "$work/adj/$k-$seed.csv" "$work/$k$seed/truth.csv" | sed "s/^/$seed /" >> "$work/adj/$k.err"
  done
done
# Each station's method (the stations CSV's last column) must name the
# survey's kind: "leapfrog" or "loop".
score() {   # file label n_expected rmse_max
  awk -v what="$2" -v n_exp="$3" -v rmax="$4" '
    { e = $3; s += e * e; n++; if (e < 0) e = -e; if (e <= 2 * $4) c++; if (e > worst) worst = e
      if ($5 != what) { printf "FAIL: %s: seed %s station %s: method \"%s\"\n", what, $1, $2, $5; bad = 1 } }
    END {
      if (bad) exit 1
      if (n != n_exp) { printf "FAIL: %s: %d stations determined, expected %d\n", what, n, n_exp; exit 1 }
      rms = sqrt(s / n); cov = c / n
      printf "%s: %d stations over 6 seeds: RMSE %.3f m (bound %.2f m), largest error %.3f m, %.0f %% within 2 sigma (bound 80 %%)\n", what, n, rms, rmax, worst, 100 * cov
      if (rms > rmax) { printf "FAIL: %s: RMSE %.3f m over the bound %.2f m\n", what, rms, rmax; exit 1 }
      if (cov < 0.8) { printf "FAIL: %s: 2-sigma coverage %.2f under 0.80\n", what, cov; exit 1 }
    }' "$1"
}
# The bounds: the RMSE measured here (seeds 1-6, leapfrog-core 745ee01
# merged) with about 25 % margin: leapfrog 0.32 m (largest error 0.63 m),
# loop 0.55 m (largest error 1.28 m); both well within the yardstick
# above. The 2-sigma coverage bound 0.8: for 60 and 36 stations an honest
# 0.95 falls under it with a probability far below 1 % (binomial; the
# choice of 0.8 is common practice, no source).
LF_RMSE_MAX=0.4   # measured 0.32 m
LP_RMSE_MAX=0.7   # measured 0.55 m
score "$work/adj/lf.err" "leapfrog" 60 $LF_RMSE_MAX || fails=$((fails + 1))
score "$work/adj/lp.err" "loop" 36 $LP_RMSE_MAX || fails=$((fails + 1))

# The singular loop (no known mark): refused, saying what is missing, no
# output written.
adjust "$work/g" "$work/adj/singular" ra
rc=$(cat "$work/adj/singular.rc")
[ "$rc" = 1 ] || bad "singular loop: exit $rc, expected 1 (an input could not be used)"
grep -qiE "known|control" "$work/adj/singular.err" ||
  bad "singular loop: the message does not say a known mark or control height is missing: $(tail -2 "$work/adj/singular.err")"
[ -e "$work/adj/singular.csv" ] && bad "singular loop: an output was written"
echo "singular loop: exit $rc: $(grep -m1 -iE "known|control" "$work/adj/singular.err")"

# A constant index error of 50 Pa on rb (seed 11): its height equivalent,
# 50 Pa / (rho g) with rho = p / (Rd T) on the first mark (the hypsometric
# relation as above), is about 4.3 m. Legs that alternate cancel it: a
# station's height comes from the difference of two legs read with the
# same pair of instruments, so it does not accumulate along the traverse,
# and the side-by-side comparisons observe it. The heights may move by at
# most a tenth of it (common practice, no source).
adjust "$work/i" "$work/adj/lf-11-index" ra rb
equiv=$(awk -F, 'NR == 2 { printf "%.3f\n", 50 / (100 * $2 / (287.0 * ($3 + 273.15)) * 9.80665) }' "$work/a/weather-truth.csv")
awk -v eq="$equiv" 'NR == FNR { h[$1] = $2; next }
  { d = $2 - h[$1]; if (d < 0) d = -d; if (d > worst) { worst = d; at = $1 }; n++ }
  END {
    printf "index error 50 Pa (%.2f m of height): %d stations, heights moved at most %.3f m (%s), bound %.2f m\n", eq, n, worst, at, eq / 10
    if (n != 10 || worst > eq / 10) { print "FAIL: the index error accumulates or stations are missing"; exit 1 }
  }' <(errors "$work/adj/lf-11.csv" "$work/a/truth.csv") <(errors "$work/adj/lf-11-index.csv" "$work/a/truth.csv") ||
  fails=$((fails + 1))

# The demo survey's README (surveys/velmoray-leapfrog): its adjust command
# exits 0 and all ten stations lie within 2 sigma of truth.csv, as it
# states (its RMSE is checked by tests/docs/readme_commands.sh).
demo=$(dirname "$0")/../../surveys/velmoray-leapfrog
cmd=$(awk '/hypsolev adjust/ { on = 1 } on { line = line $0; if ($0 !~ /\\$/) { print line; exit } sub(/\\$/, "", line) }' \
  "$demo/README.md" | sed -e 's|^ *\./build/hypsolev|"$exe"|' -e "s|surveys/|$demo/../|g" -e "s|results/|$work/adj/|g")
if [ -z "$cmd" ]; then bad "no adjust command in the demo's README"; else
  eval "$cmd -q"
  rc=$?
  [ $rc -eq 0 ] || bad "the demo README's adjust command exits $rc, the README says 0"
  read -r n in2 < <(errors "$work/adj/velmoray-leapfrog-stations.csv" "$demo/truth.csv" |
    awk '{ n++; e = $2 < 0 ? -$2 : $2; if (e <= 2 * $3) c++ } END { print n + 0, c + 0 }')
  echo "demo survey: exit $rc, $n stations, $in2 within 2 sigma (README: 0, 10, 10)"
  [ "$n" = 10 ] && [ "$in2" = 10 ] || bad "demo survey: $n stations, $in2 within 2 sigma; the README says ten, all ten"
fi

[ $fails -eq 0 ] && echo "leapfrog: all checks passed" || echo "leapfrog: $fails failure(s)"
[ $fails -eq 0 ]
