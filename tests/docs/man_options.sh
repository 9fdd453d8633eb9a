#!/usr/bin/env bash
# The man page and the program agree on the long options: every entry of
# a getopt_long table in src/cli/*.c ({"name", ..._argument, ...}) is
# documented in the page's OPTIONS (a .TP entry naming \-\-name), and every
# option the page documents exists (in a table, or compared by hand in
# main.c: "--version"). Keeps the page from falling behind the program.
# usage: man_options.sh SOURCE_DIR
set -euo pipefail
src=$1
page=$src/docs/hypsolev.1
# entries written out, through the table's SET/FLAG/BASE("name") macros, or
# the settings catalogue's V("name", and F("name", (src/settings.c)
opts_of() {
    grep -oE '\{"[a-z][a-z0-9-]*", *(required|no|optional)_argument|\b(SET|FLAG|BASE)\("[a-z][a-z0-9-]*"\)|\b[VF]\("[a-z][a-z0-9-]*",' "$@" |
        sed -E 's/^[^"]*"([^"]*)".*/--\1/'
}
correct=$(opts_of "$src/src/cli/cmd_correct.c" "$src/src/cli/options.c" "$src/src/settings.c" | sort -u)
# a pattern that stopped matching would make the check pass on nothing
[ "$(wc -l <<<"$correct")" -ge 20 ] || { echo "man_options: found only: $correct in cmd_correct.c and options.c; have the option tables changed shape?" >&2; exit 1; }
program=$( { echo "$correct"
             opts_of "$src"/src/cli/*.c
             grep -ohE '"--[a-z][a-z0-9-]*"' "$src/src/cli/main.c" | tr -d '"'; } | sort -u)
# options named on the line after each .TP (the tag of an entry), unescaped
documented=$(awk 'tag { print; tag = 0 } /^\.TP/ { tag = 1 }' "$page" |
             grep -oE '\\-\\-[a-z][a-z0-9]*(\\-[a-z0-9]+)*' | sed 's/\\-/-/g' | sort -u)
[ -n "$documented" ] || { echo "man_options: no option entry found in $page" >&2; exit 1; }
rc=0
missing=$(comm -23 <(echo "$program") <(echo "$documented"))
if [ -n "$missing" ]; then
    echo "man_options: options of the program not documented in $page:" >&2
    sed 's/^/  /' <<<"$missing" >&2
    rc=1
fi
stale=$(comm -13 <(echo "$program") <(echo "$documented"))
if [ -n "$stale" ]; then
    echo "man_options: $page documents options the program does not have:" >&2
    sed 's/^/  /' <<<"$stale" >&2
    rc=1
fi
[ $rc -ne 0 ] || echo "man_options: all $(wc -l <<<"$program") long options documented, none stale"
exit $rc
