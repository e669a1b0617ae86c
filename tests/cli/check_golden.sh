#!/bin/sh
# SPDX-License-Identifier: GPL-3.0-or-later
#
# Golden files: the text and html reports of the examples whose solve is
# proven within the time limit (icu-night, medsurg-day), byte for byte with
# the solver's seconds masked ("0.02 s" -> "N s").  medsurg-day-clock ends
# at the time limit, so its plan may differ from run to run; it is checked
# by the verdict, csv and browser tests instead.  TAP output.
# Usage: check_golden.sh KEEL GOLDEN_DIR EXAMPLES_DIR
# With UPDATE=1 the golden files are written instead (review the diff).
set -u
keel=$1
golden=$2
examples=$3
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
n=0
failed=0
mask() { sed -E 's/[0-9]+\.[0-9]+ s\b/N s/g'; }
for name in icu-night medsurg-day; do
    for format in text html; do
        ext=$([ "$format" = text ] && echo txt || echo html)
        "$keel" assign "$examples/$name.yaml" --format "$format" 2>/dev/null | mask > "$work/out"
        n=$((n + 1))
        if [ "${UPDATE:-0}" = 1 ]; then
            cp "$work/out" "$golden/$name.$ext"
            echo "ok $n - $name.$ext written"
        elif cmp -s "$work/out" "$golden/$name.$ext"; then
            echo "ok $n - $name $format matches $name.$ext"
        else
            failed=$((failed + 1))
            echo "not ok $n - $name $format matches $name.$ext"
            diff "$golden/$name.$ext" "$work/out" | head -20 | sed 's/^/# /'
        fi
    done
done
echo "1..$n"
[ "$failed" -eq 0 ]
