#!/bin/sh
# Runs every fuzz target for SECONDS (default 120) each, one after the other, at the lowest
# priority, with libFuzzer's memory and per-input time limits. New inputs go to
# corpus-work/<target> (not committed); the committed seeds in corpus/<target> are read only.
# Usage: sh run-all.sh [SECONDS] [TARGET...]
set -u
secs=${1:-120}
[ $# -gt 0 ] && shift
targets=${*:-"vtu_header appended legacy pvtu pvd study spec table"}
mkdir -p logs
for t in $targets; do
    mkdir -p "corpus-work/$t"
    nice -n 19 cargo +nightly fuzz run -O "$t" "corpus-work/$t" "corpus/$t" -- \
        -rss_limit_mb=1024 -timeout=1 -max_total_time="$secs" -print_final_stats=1 \
        > "logs/$t.log" 2>&1
    echo "$t: exit $? ($(grep -E '^(#[0-9]+|Done)' "logs/$t.log" | tail -1))"
done
