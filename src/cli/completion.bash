# SPDX-License-Identifier: GPL-3.0-or-later
#
# completion.bash - bash completion for the keel command, installed as
# $datadir/bash-completion/completions/keel.  It completes the commands,
# each command's options (the ones 'keel help COMMAND' lists), the values
# of options that take one of a few words, roster files (*.yaml, *.yml) and
# census files (*.csv), with the directories to reach them.  It needs only
# bash itself, not the bash-completion package's helpers.
# tests/install/check_completion.sh checks it against 'keel --help' and
# 'keel help COMMAND', so a new command or option must be added here too.

# The options of each command.
_keel_options() {
    case $1 in
    assign)
        echo "-f --format -m --method -t --time-limit -e --explain --best-effort -o --output"
        echo "--history --names --deidentify -h --help"
        ;;
    check) echo "-f --format -t --time-limit --names -o --output -h --help" ;;
    rebalance)
        echo "-f --format --at --max-handoffs --handoffs --min-gain -t --time-limit -o --output"
        echo "-h --help"
        ;;
    new) echo "--type --table --unit --shift -o --output -h --help" ;;
    import) echo "--roster --map --type --table --unit --shift -o --output -h --help" ;;
    audit)
        echo "-f --format --no-best -t --time-limit -j --jobs --min-shifts --shard --merge"
        echo "-o --output -h --help"
        ;;
    esac
}

# The options that take a value (the value is the next word).
_keel_takes_value() {
    case $1 in
    -f | --format | -m | --method | -t | --time-limit | -o | --output) return 0 ;;
    --type | --table | --unit | --shift | --roster | --map) return 0 ;;
    -j | --jobs | --min-shifts | --shard) return 0 ;;
    --at | --max-handoffs | --handoffs | --min-gain) return 0 ;;
    esac
    return 1
}

# The report formats of each command.
_keel_formats() {
    case $1 in
    assign) echo "text yaml json html csv csv-nurses" ;;
    rebalance) echo "text yaml json html" ;;
    check) echo "text json html csv csv-nurses" ;;
    audit) echo "text json html csv csv-nurse-shifts csv-nurses csv-nurse-groups csv-violations" ;;
    esac
}

# Adds each line that the command "$@" prints to COMPREPLY (names with
# spaces stay whole).
_keel_add() {
    local line
    while IFS= read -r line; do
        COMPREPLY+=("$line")
    done < <("$@")
}

# Adds the words of $1 that start with $2 to COMPREPLY.
_keel_add_words() {
    local IFS=$' \t\n'
    _keel_add compgen -W "$1" -- "$2"
}

# Adds the files that start with $1 and end in one of the suffixes $2...,
# and directories, to COMPREPLY.
_keel_add_files() {
    local prefix=$1 suffix
    shift
    compopt -o filenames 2>/dev/null
    _keel_add compgen -d -- "$prefix"
    for suffix in "$@"; do
        _keel_add compgen -f -X "!*.$suffix" -- "$prefix"
    done
}

_keel() {
    local cur=${COMP_WORDS[COMP_CWORD]}
    local prev=${COMP_WORDS[COMP_CWORD - 1]}
    local cword=$COMP_CWORD
    COMPREPLY=()

    # "--format=js": bash splits the word at '=', so the option is two
    # words back.
    if [[ $cur == = ]]; then
        prev=${COMP_WORDS[COMP_CWORD - 1]}
        cur=
    elif [[ $prev == = && $cword -ge 3 ]]; then
        prev=${COMP_WORDS[COMP_CWORD - 2]}
    fi

    if ((cword == 1)); then
        if [[ $cur == -* ]]; then
            _keel_add_words "-h --help --version" "$cur"
        else
            _keel_add_words "assign check rebalance new import audit help" "$cur"
        fi
        return 0
    fi

    local cmd=${COMP_WORDS[1]}
    case $cmd in
    help)
        ((cword == 2)) && _keel_add_words "assign check rebalance new import audit help" "$cur"
        return 0
        ;;
    assign | check | rebalance | new | import | audit) ;;
    *) return 0 ;;
    esac

    case $prev in
    -f | --format)
        _keel_add_words "$(_keel_formats "$cmd")" "$cur"
        return 0
        ;;
    -m | --method)
        [[ $cmd == assign ]] && _keel_add_words "ilp greedy" "$cur"
        return 0
        ;;
    -t | --time-limit | --unit | --map | -j | --jobs | --min-shifts | --shard | --at | --max-handoffs | --handoffs | --min-gain)
        return 0 # a number of seconds, a name, field=Header pairs, a count, I/N, a number
        ;;
    --type)
        _keel_add_words "icu step-down telemetry med-surg pediatrics emergency oncology \
            psychiatric labor-delivery postpartum pacu burn nicu other" "$cur"
        return 0
        ;;
    --table)
        _keel_add_words "california queensland" "$cur"
        return 0
        ;;
    --shift)
        _keel_add_words "day evening night" "$cur"
        return 0
        ;;
    --roster)
        _keel_add_files "$cur" yaml yml
        return 0
        ;;
    -o | --output)
        compopt -o filenames 2>/dev/null
        _keel_add compgen -f -- "$cur"
        return 0
        ;;
    esac

    if [[ $cur == -* ]]; then
        _keel_add_words "$(_keel_options "$cmd")" "$cur"
        return 0
    fi

    # One file per command (new takes none; audit takes many): offer files
    # only until it is given.
    [[ $cmd == new ]] && return 0
    if [[ $cmd == audit ]]; then
        _keel_add_files "$cur" yaml yml txt
        return 0
    fi
    local i word files=0
    for ((i = 2; i < cword; i++)); do
        word=${COMP_WORDS[i]}
        if _keel_takes_value "$word"; then
            # Skip the value: "--format json", or "--format = json".
            if [[ ${COMP_WORDS[i + 1]} == = ]]; then
                i=$((i + 2))
            else
                i=$((i + 1))
            fi
        elif [[ $word != -* ]]; then
            files=$((files + 1))
        fi
    done
    if ((files == 0)); then
        if [[ $cmd == import ]]; then
            _keel_add_files "$cur" csv
        else
            _keel_add_files "$cur" yaml yml
        fi
    fi
    return 0
}

complete -F _keel keel
