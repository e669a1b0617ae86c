#!/bin/bash
# SPDX-License-Identifier: GPL-3.0-or-later
#
# Bash completion test (suite 'install'), as a TAP stream for meson.
# Usage: check_completion.sh COMPLETION_SCRIPT KEEL EXAMPLES_DIR
#
# Loads the completion script into this bash and calls its function the way
# bash does (COMP_WORDS, COMP_CWORD), then checks the answers against the
# keel command itself: the commands 'keel --help' lists, the options each
# 'keel help COMMAND' lists (the completion may add only -h and --help),
# and that every value it offers for an option is one keel accepts.  Roster
# and census files are completed by suffix in a scratch directory.
set -u
script=$1 keel=$(cd "$(dirname "$2")" && pwd)/$(basename "$2") examples=$3
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
n=0
failed=0
ok() { n=$((n + 1)); echo "ok $n - $1"; }
not_ok() { n=$((n + 1)); failed=$((failed + 1)); echo "not ok $n - $1"; }

# shellcheck source=/dev/null
if source "$script" && [[ $(complete -p keel 2>/dev/null) == *"-F _keel keel"* ]]; then
    ok "the script registers a completion for keel"
else
    not_ok "the script registers a completion for keel"
    echo "1..$n"
    exit 1
fi

# complete_words WORD...: completes the last word (give "" for an empty
# one); prints the answers sorted, one per line.  Like bash, '=' is its own
# word: "--format=j" is given as --format = j.
complete_words() {
    COMP_WORDS=("$@")
    COMP_CWORD=$((${#COMP_WORDS[@]} - 1))
    COMP_LINE="$*"
    COMP_POINT=${#COMP_LINE}
    COMPREPLY=()
    _keel keel "${COMP_WORDS[COMP_CWORD]}" "${COMP_WORDS[COMP_CWORD - 1]}"
    printf '%s\n' "${COMPREPLY[@]}" | sed '/^$/d' | sort -u
}
# expect NAME WANTED WORD...: the answers are exactly WANTED (words).
expect() {
    local name=$1 wanted got
    # shellcheck disable=SC2086 # the words, one per line
    wanted=$(printf '%s\n' $2 | sed '/^$/d' | sort -u)
    shift 2
    got=$(complete_words "$@")
    if [[ $got == "$wanted" ]]; then
        ok "$name"
    else
        not_ok "$name"
        echo "# wanted: ${wanted//$'\n'/ }"
        echo "# got:    ${got//$'\n'/ }"
    fi
}
# options FILE: the option names (-x, --long-name) in FILE, sorted.
options() { grep -oE -- '(^|[][ ,(|])--?[a-z][a-z-]*' "$1" | sed 's/^[][ ,(|]//' | sort -u; }

# Commands, from 'keel --help'.
"$keel" --help >"$work/help"
commands=$(awk '/^Commands:/ { on = 1; next } on && /^$/ { exit } on { print $1 }' "$work/help")
expect "'keel ' offers every command keel lists" "$commands" keel ""
expect "'keel a' offers assign and audit" "assign audit" keel a
expect "'keel au' offers audit" "audit" keel au
expect "'keel -' offers keel's own options" "-h --help --version" keel -
expect "'keel help ' offers every command, help too (keel help help)" "$commands" keel help ""

# Options, from 'keel help COMMAND'.
for cmd in $commands; do
    [[ $cmd == help ]] && continue
    "$keel" help "$cmd" >"$work/usage"
    expect "'keel $cmd -' offers exactly the options of 'keel help $cmd', -h and --help" \
        "$(options "$work/usage") -h --help" keel "$cmd" -
done
expect "'keel assign --b' offers --best-effort" "--best-effort" keel assign --b
if complete_words keel check -- | grep -qx -- --explain; then
    not_ok "'keel check --' offers no --explain (assign's option)"
else
    ok "'keel check --' offers no --explain (assign's option)"
fi

# Values: each offered value is one keel accepts (and keel refuses a made-up
# one, so that the check can tell).
roster=$examples/icu-night.yaml
accepts() { # accepts NAME VALUES COMMAND...: the command exits 0 with each value for @
    local name=$1 values=$2 v bad=
    shift 2
    for v in $values; do
        "${@/@/$v}" >/dev/null 2>&1 || bad="$bad $v"
    done
    "${@/@/not-a-value}" >/dev/null 2>&1 && bad="$bad (a made-up value was accepted)"
    if [[ -z $values ]]; then
        not_ok "$name: nothing offered"
    elif [[ -z $bad ]]; then
        ok "$name: ${values//$'\n'/ }"
    else
        not_ok "$name: refused:$bad"
    fi
}
accepts "assign --format values" "$(complete_words keel assign "$roster" --format "")" \
    "$keel" assign "$roster" --method greedy --format @
accepts "check --format values" "$(complete_words keel check "$roster" -f "")" \
    "$keel" check "$roster" --format @
accepts "assign --method values" "$(complete_words keel assign "$roster" --method "")" \
    "$keel" assign "$roster" --method @
accepts "new --type values" "$(complete_words keel new --type "")" "$keel" new --type @
accepts "new --table values" "$(complete_words keel new --type med-surg --table "")" \
    "$keel" new --type med-surg --table @
accepts "new --shift values" "$(complete_words keel new --shift "")" "$keel" new --shift @
expect "'--format=j' completes after the '='" "json" keel assign "$roster" --format = j
expect "'--format=' offers every format" "text yaml json html csv csv-nurses" keel assign "$roster" --format =

# Files, in a scratch directory.
mkdir "$work/files"
cd "$work/files" || exit 1
mkdir sub
touch a.yaml b.yml c.txt d.csv
expect "a roster: *.yaml, *.yml and directories" "a.yaml b.yml sub" keel assign ""
expect "a roster after options and their values" "a.yaml b.yml sub" keel check -f json -t 5 ""
expect "a roster after '--format=json'" "a.yaml b.yml sub" keel assign --format = json ""
expect "no second roster" "" keel assign a.yaml ""
expect "-o takes any file" "a.yaml b.yml c.txt d.csv sub" keel assign a.yaml -o ""
expect "a census: *.csv and directories" "d.csv sub" keel import ""
expect "--roster takes a roster" "a.yaml b.yml sub" keel import d.csv --roster ""
expect "new takes no file" "" keel new ""

echo "1..$n"
[ "$failed" -eq 0 ]
