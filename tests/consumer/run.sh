#!/usr/bin/env bash
# Installs the build into a temporary prefix and builds a client of it, as
# a user would: (a) with pkg-config against libhypsolev.so (run with
# LD_LIBRARY_PATH) and against libhypsolev.a (--static), (b) with
# find_package(hypsolev CONFIG) in a CMake project linking
# hypsolev::hypsolev. Each client corrects the demo survey; all must
# report corrected points and write the same GPX bytes.
# usage: run.sh SOURCE_DIR BUILD_DIR WORK_DIR CMAKE C_COMPILER SANITIZE_FLAGS
# (SANITIZE_FLAGS: the -fsanitize options of the build, "" for none). Exit 77
# (skip) only when pkg-config is absent, after part (b) has passed.
set -euo pipefail
src=$1 build=$2 work=$3 cmake=$4 cc=$5 san=${6:-}
survey=$src/surveys/quenwick-tor

fail() { echo "consumer: FAIL: $*" >&2; exit 1; }

rm -rf "$work"
mkdir -p "$work"
prefix=$work/prefix
"$cmake" --install "$build" --prefix "$prefix" >"$work/install.log" || fail "cmake --install (see $work/install.log)"
pc=$(find "$prefix" -name hypsolev.pc)
[ -n "$pc" ] || fail "no hypsolev.pc installed under $prefix"
libdir=$(dirname "$(dirname "$pc")")
[ -e "$libdir/libhypsolev.so.0" ] || fail "no libhypsolev.so.0 in $libdir"
cflags=(-std=c11 -Wall -Wextra -Wpedantic -Werror $san)

# run NAME EXE [env...]: runs a client on the demo survey; checks its
# report and that its GPX is written and holds the added elements.
run() {
    local name=$1 exe=$2 out=$work/$1.gpx
    shift 2
    env "$@" "$exe" "$survey" "$out" >"$work/$name.out" || fail "$name: exit status $? ($(cat "$work/$name.out"))"
    grep -Eq '^corrected [1-9][0-9]* of [0-9]+ points$' "$work/$name.out" || fail "$name: $(cat "$work/$name.out")"
    [ -s "$out" ] || fail "$name: $out not written"
    grep -q '<hyp:sigma>' "$out" || fail "$name: $out has no hyp:sigma"
    echo "$name: $(cat "$work/$name.out")"
}

# needs FILE LIB: FILE records LIB (a soname) among its DT_NEEDED, or not (!).
needs() {
    readelf -d "$1" | grep -q "(NEEDED).*\[$2\]"
}

# (b) find_package: the rpath CMake writes for an imported library finds
# the installed libhypsolev.so.0 without LD_LIBRARY_PATH.
"$cmake" -S "$src/tests/consumer" -B "$work/cmake-build" -DCMAKE_PREFIX_PATH="$prefix" \
    -DCMAKE_C_COMPILER="$cc" -DCMAKE_C_FLAGS="${cflags[*]}" >"$work/cmake.log" 2>&1 ||
    fail "find_package(hypsolev) project did not configure: $(tail -20 "$work/cmake.log")"
"$cmake" --build "$work/cmake-build" >>"$work/cmake.log" 2>&1 || fail "CMake client did not build: $(tail -20 "$work/cmake.log")"
needs "$work/cmake-build/consumer" libhypsolev.so.0 || fail "CMake client does not load libhypsolev.so.0"
ldd "$work/cmake-build/consumer" | grep "libhypsolev.so.0 => $libdir/" > /dev/null || fail "CMake client loads another libhypsolev: $(ldd "$work/cmake-build/consumer" | grep hypsolev)"
run find_package "$work/cmake-build/consumer"

if ! command -v pkg-config >/dev/null; then
    echo "consumer: SKIP: find_package passed, but pkg-config is absent (apt-get install pkgconf)"
    exit 77
fi
export PKG_CONFIG_PATH=$libdir/pkgconfig

# (a) pkg-config, shared: plain --libs is enough.
read -ra pcflags <<<"$(pkg-config --cflags hypsolev)"
read -ra pclibs <<<"$(pkg-config --libs hypsolev)"
"$cc" "${cflags[@]}" "$src/tests/consumer/consumer.c" "${pcflags[@]}" "${pclibs[@]}" -o "$work/consumer-pc" ||
    fail "pkg-config --cflags --libs hypsolev: $cc ${pcflags[*]} ${pclibs[*]} did not build"
needs "$work/consumer-pc" libhypsolev.so.0 || fail "pkg-config client does not load libhypsolev.so.0"
run pkg_config_shared "$work/consumer-pc" LD_LIBRARY_PATH="$libdir"

# (a') pkg-config --static against libhypsolev.a (system libraries stay
# shared: Debian ships no libproj.a). The static closure of Debian's own
# proj.pc names, through libcurl.pc, libraries whose -dev packages need
# not be installed (-lnghttp2, -lrtmp, ...) and that the shared libproj
# does not need at link time; those the compiler cannot find are dropped,
# and said. Everything hypsolev.pc itself names must be there.
read -ra slibs <<<"$(pkg-config --static --libs hypsolev)"
own=" $(sed -n 's/^Libs\(\.private\)\{0,1\}: *//p' "$pc" | tr '\n' ' ') "
link=() dropped=()
for f in "${slibs[@]}"; do
    if [ "$f" = -lhypsolev ]; then
        link+=(-Wl,-Bstatic -lhypsolev -Wl,-Bdynamic)
    elif [[ $f == -l* && $own != *" $f "* ]] &&
         [ "$("$cc" -print-file-name="lib${f#-l}.so")" = "lib${f#-l}.so" ] &&
         [ "$("$cc" -print-file-name="lib${f#-l}.a")" = "lib${f#-l}.a" ]; then
        dropped+=("$f")
    else
        link+=("$f")
    fi
done
[ ${#dropped[@]} -eq 0 ] || echo "pkg_config_static: not installed, dropped: ${dropped[*]}"
"$cc" "${cflags[@]}" "$src/tests/consumer/consumer.c" "${pcflags[@]}" "${link[@]}" -o "$work/consumer-static" ||
    fail "pkg-config --static --libs hypsolev: the static client did not link"
! needs "$work/consumer-static" libhypsolev.so.0 || fail "static client loads libhypsolev.so.0"
run pkg_config_static "$work/consumer-static"

for n in pkg_config_shared pkg_config_static; do
    cmp "$work/find_package.gpx" "$work/$n.gpx" || fail "$n wrote other bytes than find_package"
done
echo "consumer: all clients built, ran and wrote the same GPX"
