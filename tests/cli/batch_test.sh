#!/usr/bin/env bash
# Batch runs: several tracks on different days against a folder of base
# logs (each matched by time), one broken track and one no base covers;
# then a run interrupted by SIGINT. Checks exit status, outputs, the
# summary, and that an interrupted run leaves no partial or temporary file
# and the previous outputs intact.
# usage: batch_test.sh HYPSOLEV HYPSIM WORK_DIR
set -u
exe=$1 sim=$2 work=$3
rm -rf "$work" && mkdir -p "$work"/{rovers,bases,out,sim}
fails=0
bad() { echo "FAIL: $*"; fails=$((fails + 1)); }
day=86400
t0=1781766000
for d in 0 1 2; do
  "$sim" demo "$work/sim/d$d" --t0 $((t0 + d * day)) --seed $d > /dev/null 2>&1 || { mkdir -p "$work/sim/d$d"; "$sim" demo "$work/sim/d$d" --t0 $((t0 + d * day)) --seed $d; }
  cp "$work/sim/d$d/rover.gpx" "$work/rovers/walk-day$d.gpx"
done
# bases for days 0 and 1 only: day 2 is covered by none
cp "$work/sim/d0/base.csv" "$work/bases/hut-0618.csv"
cp "$work/sim/d1/base.csv" "$work/bases/hut-0619.csv"
printf 'file,height,lat,lon\nhut-0618.csv,812.4,46.80,9.90\nhut-0619.csv,812.4,46.80,9.90\n' > "$work/bases/bases.csv"
head -c 5000 "$work/rovers/walk-day0.gpx" > "$work/rovers/broken.gpx"

"$exe" correct "$work/rovers" --base-dir "$work/bases" --out-dir "$work/out" -j 2 --summary "$work/out/summary.csv" \
    > "$work/stdout" 2> "$work/stderr"
rc=$?
[ $rc -eq 1 ] || bad "batch exit status $rc, expected 1 (one broken, one uncovered)"
for d in 0 1; do
  [ -s "$work/out/walk-day$d.gpx" ] && [ -s "$work/out/walk-day$d.csv" ] || bad "day $d outputs missing"
done
[ -e "$work/out/walk-day2.gpx" ] && bad "day 2 has an output though no base covers it"
grep -q "not for aviation or navigation" "$work/out/walk-day0.report.txt" 2>/dev/null || bad "day 0 report missing or without its footer"
grep -q "method    single base" "$work/out/walk-day0.report.txt" 2>/dev/null || bad "day 0 report without the summary"
[ -e "$work/out/broken.gpx" ] && bad "the broken track has an output"
grep -q "broken.gpx:[0-9]*: the file ends with" "$work/stderr" || bad "broken track not reported: $(grep broken "$work/stderr" | head -2)"
grep -q "walk-day2.gpx: no base log in .* covers the track's" "$work/stderr" || bad "uncovered track not reported"
s="$work/out/summary.csv"
[ "$(wc -l < "$s")" -eq 5 ] || bad "summary has $(wc -l < "$s") lines, expected 5"
grep -q '^".*walk-day0.gpx",3458,3458,single base,2,[0-9.]*,0,"ok"$' "$s" || bad "summary row for day 0: $(grep day0 "$s")"
grep -q '^".*walk-day2.gpx",3458,0,.*,1,"no base log in' "$s" || bad "summary row for day 2: $(grep day2 "$s")"
grep -q '^".*broken.gpx",.*,1,".*the file ends with' "$s" || bad "summary row for the broken track: $(grep broken "$s")"
grep -q "hypsolev correct: 4 files" "$work/stderr" || bad "no summary table on stderr"

# a second run skips what exists, --overwrite replaces it
"$exe" correct "$work/rovers/walk-day0.gpx" --base-dir "$work/bases" --out-dir "$work/out" -q 2> "$work/stderr2"
[ $? -eq 0 ] || bad "re-run exit status"
grep -q "skipped: .*walk-day0.gpx exists (--overwrite replaces it)" "$work/stderr2" || bad "re-run did not skip: $(cat "$work/stderr2")"

# JSON summary
"$exe" correct "$work/rovers/walk-day1.gpx" --base-dir "$work/bases" --out-dir "$work/out" --overwrite -q \
    --summary "$work/out/s.json" 2> /dev/null || bad "JSON run failed"
grep -q '"status": "ok"' "$work/out/s.json" || bad "JSON summary: $(cat "$work/out/s.json")"

# devices and pipes: /dev/null as every output is written to, never replaced
# (a rename over it would turn the device into a file); a pipe as an input is
# refused at once instead of blocking
"$exe" correct "$work/rovers/walk-day0.gpx" --base-dir "$work/bases" -o /dev/null --table /dev/null \
    --summary /dev/null --report /dev/null -q || bad "outputs to /dev/null failed"
[ -c /dev/null ] || bad "/dev/null is no longer a device"
mkfifo "$work/pipe.csv"
timeout 10 "$exe" correct "$work/rovers/walk-day0.gpx" --base "$work/pipe.csv" --base-height 800 -o "$work/p.gpx" \
    2> "$work/stderr4"
rc=$?
[ $rc -eq 1 ] || bad "a pipe as base: exit $rc, expected 1 (124 is a hang)"
grep -q "pipe.csv: not a regular file" "$work/stderr4" || bad "pipe message: $(cat "$work/stderr4")"

# interrupted: many copies, SIGINT (then SIGHUP) part-way; every rover's
# outputs (GPX, table, report) are all complete or all absent, the summary
# is written, and no staging file is left
mkdir -p "$work/many" "$work/out2"
for i in $(seq 1 60); do cp "$work/rovers/walk-day0.gpx" "$work/many/w$i.gpx"; done
"$exe" correct "$work/many/w1.gpx" --base-dir "$work/bases" -o "$work/ref.gpx" -q || bad "reference run"
for sig in INT HUP; do
  when='hyp-tmp-'
  [ $sig = HUP ] && when='\.report\.txt$'
  rm -rf "$work/out2" && mkdir -p "$work/out2"
  echo old > "$work/out2/w1.gpx"
  "$exe" correct "$work/many" --base-dir "$work/bases" --out-dir "$work/out2" --overwrite -j 2 -q \
      --summary "$work/sum-$sig.csv" 2> "$work/stderr3" &
  pid=$!
  # signal part-way: SIGINT once the first rover's outputs are staged
  # (nothing committed yet), SIGHUP once the first group is committed (a
  # loaded or sanitized run starts slowly; a fixed sleep could land before
  # the program has begun), or after 30 s at the latest
  for _ in $(seq 1 300); do
    [ "$(ls "$work/out2" | grep -cE "$when")" -ge 1 ] && break
    kill -0 $pid 2>/dev/null || break
    sleep 0.1
  done
  kill -$sig $pid
  wait $pid
  rc=$?
  want=$((128 + $(kill -l $sig)))
  [ $rc -eq $want ] || [ $rc -eq 0 ] || bad "SIG$sig: exit $rc, expected $want (or 0 if it had finished)"
  ls "$work/out2" | grep -qE 'hyp-tmp-' && bad "SIG$sig: staging files left: $(ls "$work/out2")"
  [ -s "$work/sum-$sig.csv" ] || bad "SIG$sig: no summary written"
  # a rover not started, or run but stopped before its group was committed
  # (the signal may also land after the last commit: then all are ok)
  nok=$(grep -c ',"ok"$' "$work/sum-$sig.csv")
  [ $rc -eq 0 ] || [ "$nok" -eq 60 ] ||
      grep -qE "not started \(interrupted\)|interrupted: nothing written" "$work/sum-$sig.csv" ||
      bad "SIG$sig: summary does not list the rovers not run or not written"
  # every rover the summary calls ok has its outputs, and no other has any
  while IFS=, read -r file _ _ _ _ _ _ status; do
    b="$work/out2/$(basename "${file//\"/}" .gpx)"
    case "$status" in
      '"ok"') [ -s "$b.csv" ] || bad "SIG$sig: $(basename "$b") is ok in the summary but has no table" ;;
      *) [ "$(head -c 3 "$b.gpx" 2>/dev/null)" != "<?x" ] || bad "SIG$sig: $(basename "$b") is not ok in the summary but was written" ;;
    esac
  done < <(tail -n +2 "$work/sum-$sig.csv")
  for f in "$work"/out2/*.gpx; do
    b=${f%.gpx}
    if [ "$(head -c 3 "$f")" = old ]; then
      [ ! -e "$b.csv" ] && [ ! -e "$b.report.txt" ] || bad "SIG$sig: $(basename "$b"): table or report without its GPX"
      continue
    fi
    cmp -s "$f" "$work/ref.gpx" || bad "SIG$sig: $(basename "$f") is neither complete nor the previous output"
    [ -s "$b.csv" ] && [ -s "$b.report.txt" ] || bad "SIG$sig: $(basename "$b"): GPX without its table or report"
  done
  echo "batch: $(ls "$work/out2" | wc -l) outputs after SIG$sig (exit $rc)"
done
echo "batch: $((fails == 0 ? 1 : 0)) passed, $((fails == 0 ? 0 : 1)) failed"
[ $fails -eq 0 ]
