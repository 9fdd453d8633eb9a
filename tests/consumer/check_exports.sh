#!/usr/bin/env bash
# The shared library exports the public API, all of it and nothing else:
# - every defined dynamic symbol of code or data (nm types T, D, B, R, G,
#   S, V, W, i, u) starts with hyp_ and none with hyp__ (internal);
#   absolute symbols (A: symbol-version nodes) are neither and not checked;
# - every function the public headers declare (hypsolev.h through the
#   preprocessor, comments gone; static inline ones excepted) is exported,
#   so a declaration that lacks HYP_API is found.
# Holds once every public declaration carries HYP_API and the library is
# compiled with HYP_HIDDEN_VISIBILITY=ON, the only build that registers it.
# usage: check_exports.sh LIBHYPSOLEV.so C_COMPILER INCLUDE_DIR
set -euo pipefail
lib=$1 cc=$2 inc=$3
syms=$(nm -D --defined-only "$lib") || { echo "check_exports: nm -D failed on $lib" >&2; exit 1; }
bad=$(awk '$2 ~ /^[TDBRGSVWiu]$/ && ($3 !~ /^hyp_/ || $3 ~ /^hyp__/) {print "  " $2 " " $3}' <<<"$syms")
if [ -n "$bad" ]; then
    echo "check_exports: $lib exports $(wc -l <<<"$bad") symbol(s) outside the public API (hyp_, not hyp__):" >&2
    echo "$bad" >&2
    exit 1
fi
declared=$("$cc" -E -P -I"$inc" "$inc/hypsolev/hypsolev.h" | grep -vw static |
           grep -oE '\bhyp_[a-z0-9_]+[[:space:]]*\(' | tr -d ' \t(' | sort -u)
[ -n "$declared" ] || { echo "check_exports: no function found in $inc/hypsolev/hypsolev.h" >&2; exit 1; }
exported=$(awk '$2 ~ /^[TDBRGSVWiu]$/ {print $3}' <<<"$syms" | sort -u)
missing=$(comm -23 <(echo "$declared") <(echo "$exported"))
if [ -n "$missing" ]; then
    echo "check_exports: declared in the public headers but not exported by $lib (HYP_API missing?):" >&2
    sed 's/^/  /' <<<"$missing" >&2
    exit 1
fi
echo "check_exports: $(wc -l <<<"$exported") symbols exported, the $(wc -l <<<"$declared") public functions, none internal"
