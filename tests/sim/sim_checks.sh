# shellcheck shell=bash
# sim_checks.sh - what the checks of the simulator's surveys with several
# standings (network_test.sh, leapfrog_test.sh) share. Sourced, after the
# caller has defined bad() (prints FAIL and counts a failure).
#
# awk_lib: awk functions for an awk program's front ("awk "$awk_lib"'...'").
#
# Times are ISO 8601 UTC of one fixed width, so they compare as strings;
# iso2s turns them into Unix seconds (days from the civil date: the
# algorithm of H. Hinnant, "chrono-Compatible Low-Level Date Algorithms").
#
# dist_m: distance in m on a sphere of 6371 km (equirectangular: far better
# than a metre over a few km).
#
# hyps_dz(p_ref, p, tv): the height (m) of pressure p above pressure p_ref
# (same unit) from the hypsometric equation, dz = Rd Tv / g0 ln(p_ref / p)
# (Wallace & Hobbs, Atmospheric Science, 2nd ed., 2006, eq. 3.29, number
# from memory; Rd = 287.0 J/(kg K), g0 = 9.80665 m/s2 standard gravity),
# tv the mean virtual temperature (K).
#
# The occupation checks keep their state in global arrays named occ_*.
# occ_window(tag, line, b, t) takes one line of fieldbook.csv (b, split)
# and of occupations-truth.csv (t, split): the booking inside the true
# window, in whole minutes; then keeps the window (occ_n counts them).
# occ_point() takes a line of sim_points (rover time lat lon ...): each
# rover's first and last time and its points. occ_report(tag, min_inside,
# la, lo) at the END: every booking inside its rover's track, at least
# min_inside points in each true window and every GNSS fix of it within
# 15 m of the station (la, lo: station latitude and longitude by name);
# returns the largest such distance, m.
#
# heights_report(tag, ref_h, none, n, os, orv, oa, dz, c, h) at the END of
# a heights check: for each of n occupations (station os, rover orv, true
# start oa), the mean height dz/c above ref_h must lie within 2 m of the
# true height h[station]; none says what a missing sample means. Returns
# the largest error, m.
# shellcheck disable=SC2034,SC2016  # for the caller; awk code, not shell
awk_lib='
function iso2s(t,   y, m, d, era, yoe, doy, doe) {
  y = substr(t, 1, 4) + 0; m = substr(t, 6, 2) + 0; d = substr(t, 9, 2) + 0
  if (m <= 2) y--
  era = int(y / 400); yoe = y - era * 400
  doy = int((153 * (m + (m > 2 ? -3 : 9)) + 2) / 5) + d - 1
  doe = yoe * 365 + int(yoe / 4) - int(yoe / 100) + doy
  return (era * 146097 + doe - 719468) * 86400 + substr(t, 12, 2) * 3600 + substr(t, 15, 2) * 60 + substr(t, 18, 2)
}
function dist_m(la1, lo1, la2, lo2,   r) {
  r = 3.141592653589793 / 180
  return 6371000 * sqrt(((la1 - la2) * r) ^ 2 + ((lo1 - lo2) * r * cos(la1 * r)) ^ 2)
}
function hyps_dz(p_ref, p, tv) {
  return 287.0 * tv / 9.80665 * log(p_ref / p)
}
function occ_window(tag, line, b, t) {
  if (!(b[3] >= t[3] && b[4] <= t[4] && b[3] < b[4]))
    print "FAIL: " tag ": line " line ": booked " b[3] "-" b[4] " not inside the true " t[3] "-" t[4]
  if (substr(b[3], 18, 2) != "00" || substr(b[4], 18, 2) != "00") print "FAIL: " tag ": line " line ": booked times not whole minutes"
  occ_n++
  occ_st[occ_n] = t[1]; occ_rv[occ_n] = t[2]; occ_a[occ_n] = t[3]; occ_b[occ_n] = t[4]; occ_bs[occ_n] = b[3]; occ_be[occ_n] = b[4]
}
function occ_point() {
  if (!($1 in occ_first) || $2 < occ_first[$1]) occ_first[$1] = $2
  if (!($1 in occ_last) || $2 > occ_last[$1]) occ_last[$1] = $2
  occ_pts[$1, ++occ_np[$1]] = $2 " " $3 " " $4
}
function occ_report(tag, min_inside, la, lo,   k, r, i, p, inside, worst, dd, all_worst) {
  all_worst = 0
  for (k = 1; k <= occ_n; k++) {
    r = occ_rv[k]
    if (!(r in occ_first)) { print "FAIL: " tag ": occupation " k ": no track " r ".gpx"; continue }
    if (occ_first[r] > occ_bs[k] || occ_last[r] < occ_be[k])
      print "FAIL: " tag ": track " r " (" occ_first[r] "-" occ_last[r] ") does not cover " occ_bs[k] "-" occ_be[k]
    inside = 0; worst = 0
    for (i = 1; i <= occ_np[r]; i++) {
      split(occ_pts[r, i], p, " ")
      if (p[1] < occ_a[k] || p[1] > occ_b[k]) continue
      inside++; dd = dist_m(p[2], p[3], la[occ_st[k]], lo[occ_st[k]])
      if (dd > worst) worst = dd
    }
    if (inside < min_inside) print "FAIL: " tag ": occupation " k " (" occ_st[k] ", " r "): " inside " points in its window"
    if (worst > 15) print "FAIL: " tag ": occupation " k " (" occ_st[k] ", " r "): a GNSS fix " worst " m from the station"
    if (worst > all_worst) all_worst = worst
  }
  return all_worst
}
function heights_report(tag, ref_h, none, n, os, orv, oa, dz, c, h,   k, e, worst) {
  worst = 0
  for (k = 1; k <= n; k++) {
    if (!c[k]) { print "FAIL: " tag ": " os[k] " " orv[k] ": no sample at " none; continue }
    e = ref_h + dz[k] / c[k] - h[os[k]]; if (e < 0) e = -e
    if (e > 2) print "FAIL: " tag ": " os[k] " " orv[k] " " oa[k] ": hypsometric height " e " m from the truth"
    if (e > worst) worst = e
  }
  return worst
}'

# sim_points DIR GLOB: one line per track point of the GPX files DIR/GLOB:
# rover time lat lon pressure_hPa temperature_degC (rover: the file's name
# without .gpx).
sim_points() {
  local g
  for g in "$1"/$2; do
    sed -n 's|.*<trkpt lat="\([^"]*\)" lon="\([^"]*\)"><ele>[^<]*</ele><time>\([^<]*\)</time>.*unit="hPa">\([^<]*\)<.*unit="degC">\([^<]*\)<.*|\3 \1 \2 \4 \5|p' "$g" |
      sed "s|^|$(basename "$g" .gpx) |"
  done
}

# sim_folder_start DIR TAG GLOB: the start of a folder's checks. Writes
# DIR.points (sim_points DIR GLOB), failing with status 1 when there is no
# point; checks the header lines of stations.csv, truth.csv and
# fieldbook.csv.
sim_folder_start() {
  sim_points "$1" "$3" > "$1.points"
  [ -s "$1.points" ] || { bad "$2: no track points read"; return 1; }
  [ "$(head -1 "$1/stations.csv")" = "name,lat,lon,height,sigma" ] || bad "$2: stations.csv header"
  [ "$(head -1 "$1/truth.csv")" = "name,height" ] || bad "$2: truth.csv header"
  [ "$(head -1 "$1/fieldbook.csv")" = "station,rover,start,end" ] || bad "$2: fieldbook.csv header"
  return 0
}
