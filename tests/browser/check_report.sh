#!/usr/bin/env bash
# Renders a ductrace HTML report in headless Chromium and checks what a reader would see:
# the DOM after parsing holds the title (page title and heading), the caution, every
# calibration-table row and every chart of the file; then takes a screenshot.
#
# Usage: tests/browser/check_report.sh REPORT.html [SCREENSHOT.png]
# Exits 0 with "skipped: chromium not installed" when no Chromium is on the PATH.
set -euo pipefail

report=${1:?usage: check_report.sh REPORT.html [SCREENSHOT.png]}
shot=${2:-${report%.html}.png}
[[ -f $report ]] || { echo "error: no such file: $report" >&2; exit 2; }

browser=$(command -v chromium || command -v chromium-browser || true)
if [[ -z $browser ]]; then
    echo "skipped: chromium not installed"
    exit 0
fi

profile=$(mktemp -d)
raw=$(mktemp)
dom=$(mktemp)
src=$(mktemp)
trap 'rm -rf "$profile" "$raw" "$dom" "$src"' EXIT
flags=(--headless --no-sandbox --disable-gpu --disable-quic --no-first-run
       --disable-background-networking --disable-component-update --disable-sync
       --user-data-dir="$profile")
abs=$(cd "$(dirname "$report")" && pwd)/$(basename "$report")

timeout 120 "$browser" "${flags[@]}" --dump-dom "file://$abs" >"$raw" 2>/dev/null

# Text nodes and attributes serialise quotes differently from the source: compare both
# sides with &quot; and &#39; decoded.
norm() { sed -e 's/&quot;/"/g' -e "s/&#39;/'/g" "$1"; }
norm "$raw" >"$dom"
norm "$report" >"$src"
fail=0
check() { # description, needle, haystack file
    if ! grep -qF -- "$2" "$3"; then
        echo "FAIL: $1: not found: $2" >&2
        fail=1
    fi
}

title=$(sed -n 's:.*<title>\(.*\)</title>.*:\1:p' "$src" | head -n 1)
[[ -n $title ]] || { echo "FAIL: the report file has no <title>" >&2; exit 1; }
check "page title" "<title>$title</title>" "$dom"
check "heading" "<h1>$title</h1>" "$dom"
check "caution" "Read this before using any number below" "$dom"

rows_file=$(grep -o '<tr data-specimen="[^"]*"' "$src" || true)
rows_dom=$(grep -o '<tr data-specimen="[^"]*"' "$dom" || true)
n_file=$(printf '%s' "$rows_file" | grep -c . || true)
n_dom=$(printf '%s' "$rows_dom" | grep -c . || true)
if [[ $n_file != "$n_dom" ]]; then
    echo "FAIL: calibration rows: $n_file in the file, $n_dom in the DOM" >&2
    fail=1
fi
while IFS= read -r row; do
    [[ -z $row ]] || check "calibration row" "$row" "$dom"
done <<<"$rows_file"

svg_file=$({ grep -o '<svg' "$src" || true; } | wc -l)
svg_dom=$({ grep -o '<svg' "$dom" || true; } | wc -l)
if [[ $svg_file != "$svg_dom" ]]; then
    echo "FAIL: charts: $svg_file in the file, $svg_dom in the DOM" >&2
    fail=1
fi

timeout 120 "$browser" "${flags[@]}" --screenshot="$shot" --window-size=1200,2400 \
    "file://$abs" >/dev/null 2>&1
if [[ $(head -c 8 "$shot" | od -An -tx1 | tr -d ' \n') != 89504e470d0a1a0a ]]; then
    echo "FAIL: no PNG screenshot at $shot" >&2
    fail=1
fi

if [[ $fail != 0 ]]; then
    exit 1
fi
echo "ok: \"$title\": $n_dom calibration rows, $svg_dom charts; screenshot $shot"
