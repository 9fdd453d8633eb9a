#!/usr/bin/env bash
# The man page renders without a warning: groff with all warnings (-ww)
# through the man macros, else man-db's --warnings; skip (77) when neither
# is installed (Debian packages groff-base, man-db).
# usage: man_lint.sh PAGE
set -euo pipefail
page=$1
[ -r "$page" ] || { echo "man_lint: $page: cannot read" >&2; exit 1; }
if command -v groff >/dev/null; then
    out=$(LC_ALL=C.UTF-8 groff -man -ww -z "$page" 2>&1) || { echo "man_lint: groff failed: $out" >&2; exit 1; }
    tool=groff
elif command -v man >/dev/null; then
    out=$(LC_ALL=C.UTF-8 man --warnings -l "$page" 2>&1 >/dev/null) || { echo "man_lint: man failed: $out" >&2; exit 1; }
    tool=man
else
    echo "man_lint: SKIP: neither groff nor man is installed (apt-get install groff-base)"
    exit 77
fi
if [ -n "$out" ]; then
    echo "man_lint: $tool warns about $page:" >&2
    echo "$out" >&2
    exit 1
fi
echo "man_lint: $page renders with no warning ($tool)"
