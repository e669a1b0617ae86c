#!/bin/sh
# SPDX-License-Identifier: GPL-3.0-or-later
#
# Replays docs/tutorial.md: every ```console block holds one command ("$ ...")
# and the output it prints; each command runs in a copy of
# examples/tutorial/ with keel on the PATH, and its output (stdout, then
# stderr) must match the block, except for the seconds of solver time.
# TAP output.  Usage: run_tutorial.sh KEEL TUTORIAL.md EXAMPLES_TUTORIAL_DIR
set -u
keel_dir=$(cd "$(dirname "$1")" && pwd)
doc=$2
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
cp "$3"/* "$work"/
PATH="$keel_dir:$PATH"
export PATH

# Split the document into block files: N.cmd and N.expected.
awk -v dir="$work" '
    /^```console$/ { inblock = 1; n++; next }
    /^```$/ && inblock { inblock = 0; next }
    inblock && /^\$ / && !havecmd[n] { print substr($0, 3) > (dir "/" n ".cmd"); havecmd[n] = 1; printf "" > (dir "/" n ".expected"); next }
    inblock { print > (dir "/" n ".expected") }
' "$doc"

normalise() { sed -E 's/[0-9]+\.[0-9]+ s\b/N s/g'; }
n=0
failed=0
i=1
while [ -f "$work/$i.cmd" ]; do
    cmd=$(cat "$work/$i.cmd")
    (cd "$work" && sh -c "$cmd" > "$work/$i.out" 2>&1)
    n=$((n + 1))
    normalise < "$work/$i.expected" > "$work/$i.expected.n"
    if normalise < "$work/$i.out" | diff -u "$work/$i.expected.n" - > "$work/$i.diff"; then
        printf 'ok %s - tutorial: %s\n' "$n" "$cmd"
    else
        failed=$((failed + 1))
        printf 'not ok %s - tutorial: %s\n' "$n" "$cmd"
        sed 's/^/# /' "$work/$i.diff"
    fi
    i=$((i + 1))
done
if [ "$n" -lt 5 ]; then
    echo "not ok $((n + 1)) - the tutorial has its console blocks"
    failed=$((failed + 1))
    n=$((n + 1))
fi
echo "1..$n"
[ "$failed" -eq 0 ]
