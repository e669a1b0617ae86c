#!/bin/sh
# SPDX-License-Identifier: GPL-3.0-or-later
#
# Install test (suite 'install'), as a TAP stream for meson: installs the
# build with 'meson install --destdir' into a temporary directory, checks
# what was installed, then builds examples/use_library.c the way a user
# would, with the flags of the installed keel.pc, once against the shared
# library and once against the static one, and runs both on
# examples/icu-night.yaml.  Every figure the program prints must equal the
# installed keel command's json report for the same roster, and its exit
# codes must equal keel's on bad input and on a roster with no valid
# assignment.
#
# meson passes everything in the environment (tests/install/meson.build):
#   KEEL_MESON      the meson command         KEEL_BUILD_DIR  the build directory
#   KEEL_SOURCE     the source root           KEEL_PKG_CONFIG pkg-config
#   KEEL_CC         the C compiler            KEEL_SANITIZE   b_sanitize ('none' or a list)
#   KEEL_BINDIR, KEEL_LIBDIR, KEEL_INCLUDEDIR, KEEL_DATADIR, KEEL_MANDIR
#                   the absolute install directories
#   KEEL_USE_LIBRARY  use_library as the build made it (against the in-tree library)
set -u
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
dest=$work/dest
n=0
failed=0

ok() { n=$((n + 1)); echo "ok $n - $1"; }
not_ok() { n=$((n + 1)); failed=$((failed + 1)); echo "not ok $n - $1"; }
# check NAME COMMAND...: ok when the command succeeds.
check() {
    check_name=$1
    shift
    if "$@"; then ok "$check_name"; else not_ok "$check_name"; fi
}
show() { sed 's/^/# /' "$@" | head -40; }

src=$KEEL_SOURCE
bindir=$dest$KEEL_BINDIR
libdir=$dest$KEEL_LIBDIR
includedir=$dest$KEEL_INCLUDEDIR
datadir=$dest$KEEL_DATADIR
mandir=$dest$KEEL_MANDIR
roster=$src/examples/icu-night.yaml

# 1. meson install into a temporary root.
if $KEEL_MESON install -C "$KEEL_BUILD_DIR" --destdir "$dest" --no-rebuild \
    >"$work/install.log" 2>&1; then
    ok "meson install --destdir"
else
    not_ok "meson install --destdir"
    show "$work/install.log"
    echo "1..$n"
    exit 1
fi

# 2. What was installed.
version=$("$bindir/keel" --version | sed -n 's/^keel //p')
check "the installed keel runs and names its release" test -n "$version"
check "keel in bindir" test -x "$bindir/keel"
check "the shared library, with its ABI version" test -f "$libdir/libkeel.so.$version"
check "libkeel.so.0 (the soname) is a link" test -L "$libdir/libkeel.so.0"
check "libkeel.so (for -lkeel) is a link" test -L "$libdir/libkeel.so"
check "the static library" test -f "$libdir/libkeel.a"
check "keel.pc" test -f "$libdir/pkgconfig/keel.pc"
check "keel(1)" test -f "$mandir/man1/keel.1"
check "keel-roster(5)" test -f "$mandir/man5/keel-roster.5"
check "the bash completion" test -f "$datadir/bash-completion/completions/keel"
if grep -q '@KEEL_VERSION@' "$mandir/man1/keel.1" "$mandir/man5/keel-roster.5"; then
    not_ok "the installed man pages name the release"
else
    check "the installed man pages name the release" grep -q "keel $version" "$mandir/man1/keel.1"
fi

# Every public header, and nothing else, under include/keel.
(cd "$src/include/keel" && ls) >"$work/headers.src"
(cd "$includedir/keel" 2>/dev/null && ls) >"$work/headers.installed"
if cmp -s "$work/headers.src" "$work/headers.installed"; then
    ok "every header of include/keel is installed, and only those"
else
    not_ok "every header of include/keel is installed, and only those"
    diff "$work/headers.src" "$work/headers.installed" | show
fi

# Internal pieces stay in the build.
(cd "$dest" && find . -type f -o -type l) | sort >"$work/installed"
if grep -E 'keel_internal|/test_|use_library|keel_config' "$work/installed" >"$work/extra"; then
    not_ok "nothing internal is installed"
    show "$work/extra"
else
    ok "nothing internal is installed"
fi
echo "# installed:"
sed 's/^\./# /' "$work/installed"

# 3. keel.pc, read through a sysroot (pkg-config prefixes its paths with
# the temporary root): the flags a user of the installed keel gets.
pc() {
    PKG_CONFIG_PATH=$libdir/pkgconfig PKG_CONFIG_SYSROOT_DIR=$dest "$KEEL_PKG_CONFIG" "$@" keel
}
check "pkg-config knows keel $version" test "$(pc --modversion)" = "$version"
pc --print-requires-private >"$work/requires" 2>&1
check "Requires.private: yaml-0.1" grep -q '^yaml-0.1' "$work/requires"
# has WORDS WORD: WORD is one of the words.
has() { case " $1 " in *" $2 "*) return 0 ;; esac; return 1; }
libs_static=$(pc --static --libs)
libs_shared=$(pc --libs)
echo "# pkg-config --libs: $libs_shared; --static --libs: $libs_static"
check "Libs.private: -lglpk" has "$libs_static" -lglpk
check "Libs.private: -lm" has "$libs_static" -lm
if has "$libs_shared" -lglpk; then
    not_ok "a shared link needs no -lglpk"
else
    ok "a shared link needs no -lglpk"
fi

# 4. Build examples/use_library.c as a user would, warnings as errors: the
# installed headers must be clean C11 for the library's users too.
sanitize=
if [ "$KEEL_SANITIZE" != none ]; then sanitize="-fsanitize=$KEEL_SANITIZE"; fi
cflags="-std=c11 -Wall -Wextra -Wpedantic -Werror $sanitize"
# The flags are lists of words: they are split on purpose.
# shellcheck disable=SC2046,SC2086
if $KEEL_CC $cflags -o "$work/use_shared" "$src/examples/use_library.c" $(pc --cflags) \
    $(pc --libs) -Wl,-rpath,"$libdir" >"$work/cc.log" 2>&1; then
    ok "use_library.c builds against the installed shared library"
else
    not_ok "use_library.c builds against the installed shared library"
    show "$work/cc.log"
fi
# A directory that holds only libkeel.a makes -lkeel pick the static library.
mkdir "$work/static"
ln -s "$libdir/libkeel.a" "$work/static/libkeel.a"
# shellcheck disable=SC2046,SC2086
if $KEEL_CC $cflags -o "$work/use_static" "$src/examples/use_library.c" $(pc --cflags) \
    -L"$work/static" $(pc --static --libs) >"$work/cc.log" 2>&1; then
    ok "use_library.c builds against the installed static library"
else
    not_ok "use_library.c builds against the installed static library"
    show "$work/cc.log"
fi
needed() { LC_ALL=C readelf -d "$1" 2>/dev/null | sed -n 's/.*(NEEDED).*\[\(.*\)\]/\1/p'; }
if [ -x "$work/use_shared" ]; then
    if needed "$work/use_shared" | grep -qx 'libkeel\.so\.0'; then
        ok "the shared build loads libkeel.so.0"
    else
        not_ok "the shared build loads libkeel.so.0"
    fi
fi
if [ -x "$work/use_static" ]; then
    if needed "$work/use_static" | grep -q libkeel; then
        not_ok "the static build does not load libkeel"
    else
        ok "the static build does not load libkeel"
    fi
fi

# 5. Run them.  The expected lines come from the installed keel's json
# report (one nurse per line; field names are a contract, docs/output.md):
# id, patient count, load and capacity in minutes, utilisation in percent.
"$bindir/keel" assign "$roster" --format json >"$work/keel.json" 2>"$work/keel.err"
code=$?
check "the installed keel assigns the example (exit 0)" test "$code" -eq 0
awk '
    function field(name,    s) {
        if (!match($0, "\"" name "\": [^,}]*")) return ""
        s = substr($0, RSTART, RLENGTH); sub(/^[^:]*: /, "", s); gsub(/"/, "", s); return s
    }
    /^    \{"id": / && /"capacity_minutes"/ {
        np = 0
        if (match($0, /"patients": \[[^]]*\]/)) {
            list = substr($0, RSTART, RLENGTH); np = gsub(/"[^"]*",?/, "", list) - 1
        }
        printf "  nurse %s: %d patient%s, load %s of %s min, %.1f %%%s\n", field("id"), np,
            np == 1 ? "" : "s", field("load_minutes"), field("capacity_minutes"),
            100 * field("utilisation"), field("counted") == "true" ? "" : " (takes no patients)"
    }
    /^  "status": / { status = field("status") }
    /^  "imbalance": / {
        printf "heaviest %.1f %%, lightest %.1f %%\n", 100 * field("max_utilisation"),
            100 * field("min_utilisation")
    }
    /^  "bound": / {
        printf "Proven lower limit on the heaviest: %.1f %%\n", 100 * field("max_utilisation")
    }
    END { print "status " status }' "$work/keel.json" >"$work/expected"
check "the json report gives the expected figures" \
    test "$(grep -c '^  nurse ' "$work/expected")" -gt 0
caution=$(sed -n 's/^  "caution": "\(.*\)"$/\1/p' "$work/keel.json")
check "the json report carries the caution" test -n "$caution"

run_example() { # run_example NAME PROGRAM
    name=$1 prog=$2
    if [ ! -x "$prog" ]; then
        not_ok "$name: not built"
        return
    fi
    "$prog" "$roster" >"$work/out" 2>"$work/err"
    code=$?
    check "$name: exit 0" test "$code" -eq 0
    grep '^  nurse ' "$work/out" >"$work/got"
    if grep '^  nurse ' "$work/expected" | cmp -s - "$work/got"; then
        ok "$name: every nurse's patients, load, capacity and utilisation as keel reports them"
    else
        not_ok "$name: every nurse's patients, load, capacity and utilisation as keel reports them"
        grep '^  nurse ' "$work/expected" | diff - "$work/got" | show
    fi
    want=$(grep '^heaviest' "$work/expected")
    check "$name: heaviest and lightest as keel reports them" grep -qF "$want" "$work/out"
    want=$(grep '^Proven' "$work/expected")
    check "$name: the proven bound as keel reports it" grep -qF "$want" "$work/out"
    want=$(sed -n 's/^status //p' "$work/expected")
    check "$name: status $want" grep -qF "status $want (method ilp)" "$work/out"
    check "$name: ends with the caution" test "$(tail -n 1 "$work/out")" = "$caution"
    check "$name: nothing on stderr" test ! -s "$work/err"

    # Exit codes like keel's: usage, bad input, no valid assignment.
    "$prog" >/dev/null 2>&1
    check "$name: no roster is a usage error (exit 1)" test $? -eq 1
    for input in "$work/missing.yaml" "$src/tests/data/bad/many-problems.yaml" \
        "$src/tests/cli/infeasible-chemo.yaml"; do
        "$bindir/keel" assign "$input" >/dev/null 2>&1
        want=$?
        "$prog" "$input" >/dev/null 2>"$work/err"
        got=$?
        check "$name: $(basename "$input") exits $want as keel does" test "$got" -eq "$want"
    done
    check "$name: the reason for no valid assignment is printed" \
        grep -q '^  \[skill\] ' "$work/err"
}

run_example "installed, shared" "$work/use_shared"
run_example "installed, static" "$work/use_static"
run_example "in-tree build" "$KEEL_USE_LIBRARY"

echo "1..$n"
[ "$failed" -eq 0 ]
