#!/bin/sh
# SPDX-License-Identifier: GPL-3.0-or-later
#
# Valgrind's memcheck on the keel command: the examples through every
# command and format, and bad rosters and censuses, must show zero errors
# and zero leaks (definite, indirect, possible and reachable).  TAP output.
# Usage: run_valgrind.sh VALGRIND KEEL CLI_DATA_DIR EXAMPLES_DIR
set -u
valgrind=$1
keel=$2
data=$(cd "$3" && pwd)
examples=$(cd "$4" && pwd)
bad=$(cd "$data/../data/bad" && pwd)
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
n=0
failed=0
check() { # check NAME -- COMMAND...: memcheck finds nothing (keel's own exit code aside)
    name=$1
    shift 2
    "$valgrind" --tool=memcheck --leak-check=full --show-leak-kinds=all \
        --errors-for-leak-kinds=all --error-exitcode=99 -q "$@" >"$work/out" 2>"$work/err"
    got=$?
    n=$((n + 1))
    if [ "$got" -ne 99 ] && ! grep -q "^==[0-9]*==" "$work/err"; then
        echo "ok $n - $name"
    else
        failed=$((failed + 1))
        echo "not ok $n - $name"
        grep "^==[0-9]*==" "$work/err" | head -30 | sed 's/^/# /'
    fi
}
cd "$work" || exit 1
cp "$examples"/tutorial/* "$work"/
for roster in "$examples"/icu-night.yaml "$examples"/medsurg-day.yaml "$examples"/medsurg-day-clock.yaml; do
    base=$(basename "$roster")
    for format in text json yaml html csv csv-nurses; do
        check "assign $base --format $format" -- "$keel" assign "$roster" --time-limit 1 --format "$format"
    done
    check "check $base" -- "$keel" check "$roster" --time-limit 1
    check "rebalance $base" -- "$keel" rebalance "$roster" --time-limit 1
done
check "assign a roster without a plan, best effort" -- "$keel" assign "$data/infeasible-chemo.yaml" --best-effort
check "rebalance --at" -- "$keel" rebalance "$data/rebalance-midshift.yaml" --at 09:30 --format html
check "audit" -- "$keel" audit "$work/history.yaml" --no-best --format html
check "audit with the best possible, two threads" -- "$keel" audit "$data/audit-clean.yaml" --jobs 2
check "import a census" -- "$keel" import "$work/census.csv" --roster "$work/unit.yaml"
check "import a bad census" -- "$keel" import "$data/census-bad.csv" --roster "$work/unit.yaml"
check "new" -- "$keel" new --type med-surg --table california
for f in wrong-types alias-bomb too-many-patients binary-garbage long-string deep-nesting many-problems; do
    check "bad roster $f" -- "$keel" check "$bad/$f.yaml"
done
check "a report to a full disk" -- "$keel" assign "$examples/medsurg-day.yaml" --time-limit 1 -o /dev/full
echo "1..$n"
[ "$failed" -eq 0 ]
