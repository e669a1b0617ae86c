#!/bin/sh
# SPDX-License-Identifier: GPL-3.0-or-later
#
# Builds keel's libFuzzer harnesses with clang under AddressSanitizer and
# UndefinedBehaviorSanitizer (build dir build-fuzz) and runs each for
# SECONDS (default 60: the CI smoke; a campaign runs 1800 or more), from a
# seed corpus made of the golden rosters and censuses.  Every crash,
# leak or timeout stops the run with exit 1 and leaves its input under
# build-fuzz/findings/; keep it as a golden case in tests/data/bad/ once
# fixed.  Usage: tests/fuzz/run_fuzz.sh [SECONDS] [HARNESS...]
set -eu
cd "$(dirname "$0")/../.."
seconds=${1:-60}
[ $# -gt 0 ] && shift
harnesses=${*:-fuzz_roster fuzz_census fuzz_solve}
if [ ! -f build-fuzz/build.ninja ]; then
    CC=clang meson setup build-fuzz -Dfuzz=true -Dtests=disabled \
        -Db_sanitize=address,undefined -Db_lundef=false \
        -Dc_args="-fsanitize=fuzzer-no-link -fno-sanitize-recover=all" >/dev/null
fi
targets=""
for h in $harnesses; do targets="$targets tests/fuzz/$h"; done
ninja -C build-fuzz $targets >/dev/null
mkdir -p build-fuzz/findings
for h in $harnesses; do
    corpus=build-fuzz/corpus/$h
    mkdir -p "$corpus"
    case $h in
    fuzz_census) cp tests/cli/*.csv tests/data/bad-census/*.csv examples/tutorial/*.csv "$corpus"/ 2>/dev/null || true ;;
    *) cp tests/data/bad/*.yaml tests/data/*.yaml tests/cli/*.yaml examples/*.yaml \
           examples/tutorial/*.yaml "$corpus"/ 2>/dev/null || true ;;
    esac
    echo "== $h: $seconds s"
    UBSAN_OPTIONS=halt_on_error=1:print_stacktrace=1 \
    ASAN_OPTIONS=detect_leaks=1 \
        "build-fuzz/tests/fuzz/$h" "$corpus" -max_total_time="$seconds" -timeout=30 -rss_limit_mb=2048 \
        -max_len=65536 -artifact_prefix="build-fuzz/findings/$h-" -print_final_stats=1 \
        2>&1 | grep -E "^(#[0-9]+ *DONE|stat::number_of_executed_units|stat::peak_rss_mb|==[0-9]+==ERROR|SUMMARY|artifact_prefix|Test unit written)" || true
    if ls build-fuzz/findings/"$h"-* >/dev/null 2>&1; then
        echo "$h: findings in build-fuzz/findings/" >&2
        exit 1
    fi
done
