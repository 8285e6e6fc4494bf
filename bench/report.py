#!/usr/bin/env python3
"""Markdown tables from bench/run.py result files (for docs/PERFORMANCE.md).

Usage: python bench/report.py bench/results/n200k_k20.json [more.json ...]
"""

import json
import sys


def s(x):
    return f"{x:.3f}"


def task_table(r):
    out = [f"**{r['data_dir']}** — {r['data']['cells']:,} cells × {r['data']['increments']} increments, "
           f"{r['runs']} timed runs after 1 warm-up, ductrace commit `{r['commit']}`, taken {r['machine']['date']}, "
           f"load average {' '.join(r['machine']['load_before'])} before, {' '.join(r['machine']['load_after'])} after.",
           ""]
    if "peer_startup" in r:
        p = r["peer_startup"]
        out += [f"Peer start-up alone (`{p['command']}`): median {s(p['median'])} s [{s(p['min'])}–{s(p['max'])}] "
                "(included in the peer's whole-process times).", ""]
    out += ["| encoding | task | ductrace median [min–max] s | CPU s | peak RSS MB | peer median [min–max] s | CPU s "
            "| peak RSS MB | speed-up (wall) | speed-up (CPU) |",
            "|---|---|---|---|---|---|---|---|---|---|"]
    for enc, er in r["encodings"].items():
        for task, t in er["tasks"].items():
            d = t["ductrace"]
            row = (f"| {enc} | {task} | {s(d['median'])} [{s(d['min'])}–{s(d['max'])}] | {d['user'] + d['system']:.2f} "
                   f"| {d['peak_rss_kb'] / 1024:.0f} |")
            if "peer" in t:
                p = t["peer"]
                row += (f" {s(p['median'])} [{s(p['min'])}–{s(p['max'])}] | {p['user'] + p['system']:.2f} "
                        f"| {p['peak_rss_kb'] / 1024:.0f} | {t['speedup']:.1f}× "
                        f"| {(p['user'] + p['system']) / (d['user'] + d['system']):.1f}× |")
            else:
                row += " – | – | – | – | – |"
            out.append(row)
    out += ["", "| encoding | files | MB | floor | median [min–max] s | ductrace task (b) ÷ floor |", "|---|---|---|---|---|---|"]
    for enc, er in r["encodings"].items():
        for name, f in er["floors"].items():
            ratio = er.get("damage_over_floor", {}).get(name)
            out.append(f"| {enc} | {er['files']} | {er['bytes'] / 1e6:.0f} | {name} | {s(f['median'])} "
                       f"[{s(f['min'])}–{s(f['max'])}] | {'' if ratio is None else f'{ratio:.2f}'} |")
    th = [(enc, er["tasks"]["damage"]["threads"]) for enc, er in r["encodings"].items()
          if "damage" in er["tasks"] and "threads" in er["tasks"]["damage"]]
    if th:
        out += ["", "| encoding | task (b), RAYON_NUM_THREADS=1 | RAYON_NUM_THREADS=2 | 1 thread ÷ 2 threads |",
                "|---|---|---|---|"]
        for enc, t in th:
            out.append(f"| {enc} | {s(t['1']['median'])} [{s(t['1']['min'])}–{s(t['1']['max'])}] "
                       f"| {s(t['2']['median'])} [{s(t['2']['min'])}–{s(t['2']['max'])}] | {t['ratio_1_over_2']:.2f} |")
    return "\n".join(out)


def commands(r):
    out = []
    for enc, er in r["encodings"].items():
        for task, t in er["tasks"].items():
            out.append(f"    {t['ductrace_command']}")
            if "peer" in t:
                out.append(f"    {t['peer_command']}")
        for name, f in er["floors"].items():
            out.append(f"    {f['command']}")
    return "\n".join(out)


if __name__ == "__main__":
    for path in [a for a in sys.argv[1:] if not a.startswith("--")]:
        r = json.load(open(path))
        print(task_table(r))
        print()
        if "--commands" in sys.argv:
            print(commands(r))
            print()
