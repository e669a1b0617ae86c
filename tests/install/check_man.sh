#!/bin/sh
# SPDX-License-Identifier: GPL-3.0-or-later
#
# Man page test (suite 'install'), as a TAP stream for meson.
# Usage: check_man.sh MAN KEEL ROSTER_FORMAT_MD SRC_KEEL_1 SRC_KEEL_ROSTER_5 \
#                     BUILT_KEEL_1 BUILT_KEEL_ROSTER_5
#
# 1. Lint: 'man --warnings -l PAGE' (groff's macro warnings, man-db's
#    default) and 'man --warnings=w -l PAGE' (every groff warning) must print
#    nothing on stderr, for the sources and for the copies the build installs.
# 2. Coverage, against the keel command itself: every command 'keel --help'
#    lists has its section in keel(1); every option 'keel help COMMAND' lists
#    is an entry under that command's options, and no entry names an option
#    keel does not have; every exit code 'keel --help' lists is an entry
#    under EXIT STATUS; keel(1) carries the caution.
# 3. keel-roster(5) has an entry for every key in the key tables of
#    docs/roster-format.md, and the built pages name keel's release.
# Without man (Debian: man-db, with groff-base) the test is skipped (77).
set -u
man=$1 keel=$(cd "$(dirname "$2")" && pwd)/$(basename "$2") format_md=$3
src1=$4 src5=$5 built1=$6 built5=$7
if [ -z "$man" ] || ! command -v "$man" >/dev/null 2>&1; then
    echo "1..0 # SKIP man is not installed (Debian: man-db, groff-base)"
    exit 77
fi
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
n=0
failed=0
ok() { n=$((n + 1)); echo "ok $n - $1"; }
not_ok() { n=$((n + 1)); failed=$((failed + 1)); echo "not ok $n - $1"; }
show() { sed 's/^/# /' "$@" | head -40; }

# render PAGE: the page as plain text, 80 columns, ASCII.
render() { LC_ALL=C MANWIDTH=80 "$man" -l "$1" 2>/dev/null; }

# 1. Lint.
for page in "$src1" "$src5" "$built1" "$built5"; do
    for warnings in --warnings --warnings=w; do
        LC_ALL=C.UTF-8 MANWIDTH=80 "$man" "$warnings" -l "$page" >/dev/null 2>"$work/err"
        code=$?
        if [ "$code" -eq 0 ] && [ ! -s "$work/err" ]; then
            ok "man $warnings -l $page: no warnings"
        else
            not_ok "man $warnings -l $page: no warnings (exit $code)"
            show "$work/err"
        fi
    done
done

# 2. keel(1) against the keel command.
render "$src1" >"$work/keel.1.txt"
# section TITLE: the rendered lines of one section or subsection, up to the
# next heading at the same or a higher level.
section() {
    awk -v title="$1" '
        function level(line) {
            if (line ~ /^[A-Z]/) return 1
            if (line ~ /^   [^ ]/) return 2
            return 0
        }
        inside && level($0) && level($0) <= lvl { exit }
        inside { print }
        !inside && (($0 == title) || ($0 == "   " title)) { inside = 1; lvl = level($0) }
    ' "$work/keel.1.txt"
}
# options FILE: the option names (-x, --long-name) in FILE, one per line, sorted.
options() { grep -oE -- '(^|[][ ,(|])--?[a-z][a-z-]*' "$1" | sed 's/^[][ ,(|]//' | sort -u; }

"$keel" --help >"$work/help"
awk '/^Commands:/ { on = 1; next } on && /^$/ { exit } on { print $1 }' "$work/help" \
    >"$work/commands"
if [ ! -s "$work/commands" ]; then not_ok "keel --help lists commands"; fi
while read -r cmd; do
    if grep -q "^\.SS \"keel $cmd" "$src1"; then ok "keel(1) has a section for '$cmd'"; else
        not_ok "keel(1) has a section for '$cmd'"; fi
    [ "$cmd" = help ] && continue
    "$keel" help "$cmd" >"$work/usage.$cmd"
    options "$work/usage.$cmd" >"$work/help-options"
    # The entries of the command's options: tag lines at the entry indent.
    section "Options of keel $cmd" | grep -E '^       -' >"$work/entries"
    options "$work/entries" >"$work/man-options"
    missing=$(comm -23 "$work/help-options" "$work/man-options" | tr '\n' ' ')
    if [ -z "$missing" ]; then ok "keel(1) documents every option of '$cmd'"; else
        not_ok "keel(1) documents every option of '$cmd'; missing: $missing"; fi
    extra=$(comm -13 "$work/help-options" "$work/man-options" | grep -vxE -- '-h|--help' |
        tr '\n' ' ')
    if [ -z "$extra" ]; then ok "keel(1) documents no option '$cmd' lacks"; else
        not_ok "keel(1) documents no option '$cmd' lacks; extra: $extra"; fi
done <"$work/commands"

awk '/^Exit codes:/ { on = 1 } on && /^$/ { exit } on' "$work/help" |
    grep -oE '(^|[ ,:])[0-9]+ [a-z]' | grep -oE '[0-9]+' | sort -u >"$work/help-codes"
section "EXIT STATUS" | sed -n 's/^       \([0-9][0-9]*\)  .*/\1/p' | sort -u >"$work/man-codes"
if [ -s "$work/help-codes" ] && cmp -s "$work/help-codes" "$work/man-codes"; then
    ok "EXIT STATUS has an entry for each exit code keel lists ($(tr '\n' ' ' <"$work/help-codes"))"
else
    not_ok "EXIT STATUS has an entry for each exit code keel lists"
    diff "$work/help-codes" "$work/man-codes" | show
fi

caution=$(tail -n 1 "$work/help")
section "CAUTION" | tr -s ' \n' '  ' >"$work/caution"
if grep -qi "decision support only" "$work/caution" &&
    grep -qF "${caution#Decision support only: }" "$work/caution"; then
    ok "keel(1) carries the caution"
else
    not_ok "keel(1) carries the caution: $caution"
    show "$work/caution"
fi

# 3. keel-roster(5): every key of the format's key tables (the tables whose
# header starts "| key |") is an entry (.TP then .B key).
awk '/^\| key \|/ { on = 1; next } on && !/^\|/ { on = 0 }
     on && /^\| `/ { split($0, cell, "`"); print cell[2] }' "$format_md" | sort -u >"$work/md-keys"
awk 'tp && /^\.B / { print $2 } { tp = ($0 == ".TP") }' "$src5" | sort -u >"$work/man-keys"
if [ "$(wc -l <"$work/md-keys")" -lt 20 ]; then
    not_ok "found the key tables of $format_md ($(wc -l <"$work/md-keys") keys)"
fi
missing=$(comm -23 "$work/md-keys" "$work/man-keys" | tr '\n' ' ')
if [ -z "$missing" ]; then
    ok "keel-roster(5) has an entry for every key ($(wc -l <"$work/md-keys"))"
else
    not_ok "keel-roster(5) has an entry for every key; missing: $missing"
fi

version=$("$keel" --version | sed -n 's/^keel //p')
for page in "$built1" "$built5"; do
    if grep -q "^\.TH .*\"keel $version\"" "$page" && ! grep -q '@KEEL_VERSION@' "$page"; then
        ok "$(basename "$page") names keel $version"
    else
        not_ok "$(basename "$page") names keel $version"
    fi
done

echo "1..$n"
[ "$failed" -eq 0 ]
