#!/usr/bin/env bash
# Failure paths on purpose, with an LD_PRELOAD shim (failshim.c):
#  1. every ~300th allocation of a run fails in turn: exit status 0, 1 or 2
#     (never a signal), a failed run leaves the previous output intact and no
#     temporary file;
#  2. writes that fail part-way and an fsync that fails: exit 1 with a
#     message, previous output intact, no temporary file;
#  3. SIGKILL at random moments while writing: the final name holds either
#     the previous output or the complete new one, never a truncated file;
#     the staging files a killed run leaves are removed by the next run.
# Every run writes a GPX, a table and a report: one output set, all of
# whose files change together or not at all.
# usage: run_faults.sh HYPSOLEV SHIM.so HYPSIM DATA_DIR WORK_DIR
set -u
exe=$1 shim=$2 sim=$3 data=$4 work=$5
rm -rf "$work" && mkdir -p "$work"
fails=0
bad() { echo "FAIL: $*"; fails=$((fails + 1)); }
args=(correct "$data/rover.gpx" --base "$data/base.csv" --base-height 812.4 --base-at 46.8,9.9
      -o "$work/out.gpx" --table "$work/out.csv" --report "$work/out.txt" -q)
reset() { echo old > "$work/out.gpx"; echo old > "$work/out.csv"; echo old > "$work/out.txt"; }
check_failed_run() {   # $1 label
  [ "$(cat "$work/out.gpx")" = old ] || bad "$1: previous GPX output changed"
  [ "$(cat "$work/out.csv")" = old ] || bad "$1: previous table changed"
  [ "$(cat "$work/out.txt")" = old ] || bad "$1: previous report changed"
  ls "$work" | grep -q 'hyp-tmp-' && bad "$1: staging file left: $(ls "$work")"
}

# 1. allocation failures
reset
total=$(HYP_FAIL_COUNT=1 LD_PRELOAD=$shim "$exe" "${args[@]}" 2>&1 >/dev/null | sed -n 's/^allocations: //p')
[ -n "$total" ] && [ "$total" -gt 100 ] || bad "could not count allocations ($total)"
step=$(( ${total:-300} / 300 + 1 ))
n_fail=0
for ((n = 1; n <= ${total:-0}; n += step)); do
  reset
  HYP_FAIL_MALLOC_AT=$n LD_PRELOAD=$shim "$exe" "${args[@]}" 2> "$work/err"
  rc=$?
  if [ $rc -gt 2 ]; then bad "allocation $n of $total: exit $rc: $(head -c 300 "$work/err")"; continue; fi
  if [ $rc -ne 0 ]; then
    n_fail=$((n_fail + 1))
    grep -q . "$work/err" || bad "allocation $n: exit $rc without a message"
    check_failed_run "allocation $n"
  fi
done
echo "allocation failures: $total allocations, every ${step}th failed in turn, $n_fail runs refused cleanly"

# 2. write failures
for b in 0 100 8000; do
  reset
  HYP_FAIL_FWRITE_AFTER=$b LD_PRELOAD=$shim "$exe" "${args[@]}" 2> "$work/err"
  rc=$?
  [ $rc -eq 1 ] || bad "fwrite failing after $b bytes: exit $rc, expected 1"
  grep -q "write error" "$work/err" || bad "fwrite failing after $b bytes: message: $(cat "$work/err")"
  check_failed_run "fwrite after $b"
done
reset
HYP_FAIL_FSYNC=1 LD_PRELOAD=$shim "$exe" "${args[@]}" 2> "$work/err"
rc=$?
[ $rc -eq 1 ] || bad "fsync failing: exit $rc, expected 1"
grep -q "write failed: Input/output error; the previous file (if any) is unchanged" "$work/err" || bad "fsync message: $(cat "$work/err")"
check_failed_run fsync
# a batch commits its rovers in groups with one syncfs(2): when that fails,
# no rover's outputs are renamed into place and no staging file is left
mkdir -p "$work/rovers" "$work/bout"
cp "$data/rover.gpx" "$work/rovers/a.gpx"; cp "$data/rover.gpx" "$work/rovers/b.gpx"
for r in a b; do for x in gpx csv report.txt; do echo old > "$work/bout/$r.$x"; done; done
HYP_FAIL_FSYNC=1 LD_PRELOAD=$shim "$exe" correct "$work/rovers" --base "$data/base.csv" --base-height 812.4 \
    --base-at 46.8,9.9 --out-dir "$work/bout" --overwrite -q 2> "$work/err"
rc=$?
[ $rc -eq 1 ] || bad "batch, syncfs failing: exit $rc, expected 1"
grep -q "write failed: Input/output error; the previous file (if any) is unchanged" "$work/err" || bad "batch syncfs message: $(cat "$work/err")"
for r in a b; do for x in gpx csv report.txt; do
  [ "$(cat "$work/bout/$r.$x")" = old ] || bad "batch, syncfs failing: $r.$x changed"
done; done
ls "$work/bout" | grep -q 'hyp-tmp-' && bad "batch, syncfs failing: staging file left: $(ls "$work/bout")"
# and without the failure the same batch replaces them all
"$exe" correct "$work/rovers" --base "$data/base.csv" --base-height 812.4 --base-at 46.8,9.9 \
    --out-dir "$work/bout" --overwrite -q 2> "$work/err" || bad "batch without failure: $(cat "$work/err")"
for r in a b; do for x in gpx csv report.txt; do
  [ "$(head -c 3 "$work/bout/$r.$x")" != old ] || bad "batch without failure: $r.$x not replaced"
done; done
echo "write failures: checked"

# 3. SIGKILL while writing a larger track
mkdir -p "$work/sim" && "$sim" demo "$work/sim" > /dev/null || bad "simulator failed"
kargs=(correct "$work/sim/rover.gpx" --base "$work/sim/base.csv" --base-height 812.4 --base-at 46.8,9.9 -q)
"$exe" "${kargs[@]}" -o "$work/ref.gpx" --table "$work/ref.csv" || bad "reference run failed"
left=0
for i in $(seq 1 25); do
  echo old > "$work/k.gpx"; echo old > "$work/k.csv"
  "$exe" "${kargs[@]}" -o "$work/k.gpx" --table "$work/k.csv" & pid=$!
  sleep "0.$(printf %03d $(( RANDOM % 130 )))" 2>/dev/null || sleep 0.01   # a run takes about 0.1 s
  kill -9 $pid 2>/dev/null
  wait $pid 2>/dev/null
  old_g=$([ "$(head -c 3 "$work/k.gpx")" = old ] && echo 1 || echo 0)
  old_c=$([ "$(head -c 3 "$work/k.csv")" = old ] && echo 1 || echo 0)
  [ $old_g = 1 ] || cmp -s "$work/k.gpx" "$work/ref.gpx" || bad "kill $i: truncated or foreign GPX under the final name"
  [ $old_c = 1 ] || cmp -s "$work/k.csv" "$work/ref.csv" || bad "kill $i: truncated or foreign table under the final name"
  left=$((left + $(ls "$work" | grep -c 'hyp-tmp-' || true)))
done
echo "kill -9 while writing: 25 runs checked; $left staging files left by them (each run removes those of the runs before)"
# a plain staging-like name of a living process and a foreign file stay
sleep 300 & live=$!
echo keep > "$work/k.gpx.hyp-tmp-$live-abcdef"; echo keep > "$work/k.gpx.notours"
"$exe" "${kargs[@]}" -o "$work/k.gpx" --table "$work/k.csv" || bad "run after the kills failed"
kill $live 2>/dev/null
cmp -s "$work/k.gpx" "$work/ref.gpx" || bad "run after the kills: wrong GPX"
stale=$(ls "$work" | grep 'hyp-tmp-' | grep -v "hyp-tmp-$live-abcdef" || true)
[ -z "$stale" ] || bad "stale staging files not removed by the next run: $stale"
[ -f "$work/k.gpx.hyp-tmp-$live-abcdef" ] || bad "a living process's staging file was removed"
[ -f "$work/k.gpx.notours" ] || bad "a file not of our pattern was removed"
echo "the next run removed the stale staging files of killed runs, and nothing else"
# 4. allocation failures with the HTML report (its page, figures and
#    thinning allocate on their own): the same rules
hargs=("${args[@]/out.txt/out.html}")
hreset() { reset; echo old > "$work/out.html"; }
hreset
total=$(HYP_FAIL_COUNT=1 LD_PRELOAD=$shim "$exe" "${hargs[@]}" 2>&1 >/dev/null | sed -n 's/^allocations: //p')
step=$(( ${total:-150} / 150 + 1 ))
n_fail=0
for ((n = 1; n <= ${total:-0}; n += step)); do
  hreset
  HYP_FAIL_MALLOC_AT=$n LD_PRELOAD=$shim "$exe" "${hargs[@]}" 2> "$work/err"
  rc=$?
  if [ $rc -gt 2 ]; then bad "HTML report, allocation $n of $total: exit $rc: $(head -c 300 "$work/err")"; continue; fi
  if [ $rc -ne 0 ]; then
    n_fail=$((n_fail + 1))
    grep -q . "$work/err" || bad "HTML report, allocation $n: exit $rc without a message"
    [ "$(cat "$work/out.html")" = old ] || bad "HTML report, allocation $n: previous report changed"
    check_failed_run "HTML report, allocation $n"
  elif ! grep -q '</html>' "$work/out.html"; then
    bad "HTML report, allocation $n: exit 0 with an incomplete page"
  fi
done
echo "HTML report allocation failures: $total allocations, every ${step}th failed in turn, $n_fail runs refused cleanly"
echo "faults: $((fails == 0 ? 1 : 0)) passed, $((fails == 0 ? 0 : 1)) failed"
[ $fails -eq 0 ]
