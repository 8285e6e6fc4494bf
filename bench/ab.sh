#!/bin/sh
# A/B timing of whole commands in one hyperfine invocation (so they share the machine's
# conditions), printing each command's median, minimum and mean user/system CPU.
# usage: bench/ab.sh RUNS -n NAME1 "CMD1" -n NAME2 "CMD2" ...
set -e
runs=$1; shift
out="${TMPDIR:-/tmp}/ab.json"
hyperfine -N --warmup 2 --runs "$runs" --export-json "$out" "$@" > /dev/null 2>&1
python3 - "$out" <<'PY'
import json, statistics, sys
for r in json.load(open(sys.argv[1]))["results"]:
    t = r["times"]
    print(f"{r['command']:10s} median {statistics.median(t) * 1000:7.1f} ms  min {min(t) * 1000:7.1f}"
          f"  user {r['user'] * 1000:6.1f}  sys {r['system'] * 1000:6.1f}")
PY
