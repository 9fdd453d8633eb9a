#!/usr/bin/env bash
# Every hypsolev command the README and the demo surveys' READMEs give is
# run here as a user would run it (from the top of a checkout, after
# building), must exit 0, and the figure the README states for it is
# checked: "RMSE about X m" / "within X m RMS" against the simulator's
# truth.csv, from the table the command writes (or, for a command that
# writes none, a table this script adds with --table; for adjust, the
# stations it writes with -o).
# usage: readme_commands.sh SOURCE_DIR BUILD_DIR WORK_DIR
set -euo pipefail
src=$1 build=$2 work=$3
rm -rf "$work" && mkdir -p "$work"
ln -s "$src/surveys" "$work/surveys"
ln -s "$build" "$work/build"
fails=0 ran=0
bad() { echo "FAIL: $*"; fails=$((fails + 1)); }

# The commands of a markdown file: indented or fenced lines, backslash
# continuations joined, split at "&&"; only hypsolev runs and mkdir kept.
commands() {
  awk '/^```/ { fence = !fence; next }
       fence || /^    / { sub(/^    /, ""); line = line $0;
                           if (line ~ /\\$/) { sub(/\\$/, "", line); next } print line; line = "" }' "$1" |
    sed 's/ && /\n/g' | grep -E '^ *(\./build/hypsolev|mkdir) ' || true
}

# RMSE (m) of a table's heights against truth.csv (same rows, in order).
rmse() {   # table truth
  paste -d, <(cut -d, -f5 "$1" | tail -n +2) <(cut -d, -f4 "$2" | tail -n +2) |
    awk -F, '$1 != "" { d = $1 - $2; s += d * d; n++ } END { if (n) printf "%.3f\n", sqrt(s / n); else print "none" }'
}

# An adjust command runs; where its README states an RMSE and its survey
# has truth.csv, the RMSE of the stations it determined (control marks
# left out) is taken from its -o table, by station name, and checked.
adjust_figure() {   # rel cmd stated
  local out dir got
  (cd "$work" && eval "$2" > "$work/out" 2> "$work/err") || { bad "$1: \"$2\" exit $?: $(tail -3 "$work/err")"; return 0; }
  out=$(grep -oE -- '(-o|--output) [^ ]+' <<<"$2" | head -1 | cut -d' ' -f2 || true)
  dir=$(grep -oE 'surveys/[^/ ]+' <<<"$2" | head -1 || true)
  if [ -z "$3" ] || [ -z "$out" ] || [ ! -f "$src/$dir/truth.csv" ]; then echo "$1: adjust: exit 0"; return 0; fi
  got=$(awk -F, 'NR == FNR { if (FNR > 1) h[$1] = $2; next }
    FNR == 1 { for (i = 1; i <= NF; i++) c[$i] = i; next }
    { gsub(/"/, "", $c["name"]) }
    $c["control"] == "no" && $c["height"] != "" { d = $c["height"] - h[$c["name"]]; s += d * d; n++ }
    END { if (n) printf "%.3f\n", sqrt(s / n); else print "none" }' "$src/$dir/truth.csv" "$work/$out")
  awk -v g="$got" -v s="$3" 'BEGIN { exit !(g != "none" && g <= s * 1.1 + 0.02 && g >= s * 0.9 - 0.02) }' ||
    bad "$1: states $3 m, the adjustment gives station RMSE $got m"
  echo "$1: adjust: station RMSE $got m (the README states $3 m)"
}

for md in "$src/README.md" "$src"/surveys/*/README.md; do
  rel=${md#"$src"/}
  stated=$(tr '\n' ' ' < "$md" | grep -oE 'RMSE +about +[0-9.]+ m|within +[0-9.]+ m +RMS' | head -1 | grep -oE '[0-9.]+' || true)
  n=0
  while IFS= read -r cmd; do
    n=$((n + 1))
    case "$cmd" in *" correct "*) ;; *" adjust "*) adjust_figure "$rel" "$cmd" "$stated"; continue ;;
      *) (cd "$work" && eval "$cmd") || bad "$rel: \"$cmd\" failed"; continue ;; esac
    table=$(grep -oE -- '--table [^ ]+' <<<"$cmd" | cut -d' ' -f2 || true)
    extra=()
    if [ -z "$table" ]; then table=check-$n.csv; extra=(--table "$table"); fi
    ran=$((ran + 1))
    (cd "$work" && eval "$cmd ${extra[*]:-}" > "$work/out" 2> "$work/err") || { bad "$rel: \"$cmd\" exit $?: $(tail -3 "$work/err")"; continue; }
    dir=$(grep -oE 'surveys/[^/ ]+' <<<"$cmd" | head -1)
    if [ -n "$stated" ] && [ -f "$src/$dir/truth.csv" ]; then
      got=$(rmse "$work/$table" "$src/$dir/truth.csv")
      awk -v g="$got" -v s="$stated" 'BEGIN { exit !(g != "none" && g <= s * 1.1 + 0.02 && g >= s * 0.9 - 0.02) }' ||
        bad "$rel: states $stated m, the command gives RMSE $got m"
      echo "$rel: command $n: RMSE $got m (the README states $stated m)"
    else
      echo "$rel: command $n: exit 0"
    fi
  done < <(commands "$md")
done
[ $ran -gt 0 ] || bad "no command found in the READMEs"
echo "readme_commands: $((fails == 0 ? 1 : 0)) passed, $((fails == 0 ? 0 : 1)) failed"
[ $fails -eq 0 ]
