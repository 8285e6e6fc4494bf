#!/usr/bin/env python3
"""ductrace's performance harness: checks that ductrace and the peer (bench/peer.py, the VTK wheel's reader +
numpy) give the same answers on the same files, then times both (hyperfine, whole process, median and spread of
RUNS runs after one warm-up), measures peak RSS (/usr/bin/time -v) and the floors (reading every file's bytes from
the page cache with cat; for zlib files, inflating the needed arrays' blocks alone, bench/zfloor-rs and
bench/zfloor.py).

No time is reported for a task whose answers disagree: the run stops with the differences.

Usage (see bench/README.md):
    /work/venv/bin/python bench/run.py --data /work/bench-data/n200k_k20 --out bench/results/n200k_k20.json
options: --encodings raw,b64,zlib  --tasks history,damage,export  --runs 5  --bin PATH  --no-peer
         --threads (also time damage with RAYON_NUM_THREADS=1 and 2)  --zfloor DIR (folder with zfloor binaries)
"""

import argparse
import glob
import json
import math
import os
import platform
import re
import shutil
import subprocess
import sys
import tempfile
import time

HERE = os.path.dirname(os.path.abspath(__file__))
PY = sys.executable
PEER = os.path.join(HERE, "peer.py")
ZFLOOR_PY = os.path.join(HERE, "zfloor.py")
REL, ABS = 1e-9, 1e-12


def sh(cmd, env=None, check=True):
    r = subprocess.run(cmd, capture_output=True, text=True, env=env)
    if check and r.returncode != 0:
        sys.exit(f"command failed ({r.returncode}): {' '.join(cmd)}\n{r.stderr[-2000:]}")
    return r


def machine():
    cpu = ""
    try:
        for line in open("/proc/cpuinfo"):
            if line.startswith("model name"):
                cpu = line.split(":", 1)[1].strip()
                break
    except OSError:
        pass
    mem = ""
    try:
        mem = open("/proc/meminfo").readline().split(":", 1)[1].strip()
    except OSError:
        pass
    return dict(
        date=time.strftime("%Y-%m-%d %H:%M:%S UTC", time.gmtime()), cpu=cpu, cores=os.cpu_count(), memory=mem,
        kernel=platform.release(), load_before=open("/proc/loadavg").read().split()[:3],
        openblas_env={k: v for k, v in os.environ.items() if k.startswith("OPENBLAS")},
        rayon_env=os.environ.get("RAYON_NUM_THREADS"),
    )


# ---------------------------------------------------------------------------------------------------------------
# answers


def close(a, b):
    if a is None or b is None:
        return a is None and b is None
    return abs(a - b) <= ABS + REL * max(abs(a), abs(b))


class Diff:
    def __init__(self):
        self.items = []

    def num(self, what, a, b):
        if not close(a, b):
            self.items.append(f"{what}: ductrace {a!r}, peer {b!r}")

    def eq(self, what, a, b):
        if a != b:
            self.items.append(f"{what}: ductrace {a!r}, peer {b!r}")


def compare_history(d, p):
    x = Diff()
    x.eq("cell", d["point"]["id"], p["id"])
    x.num("max eqps", d["selection"]["value"], p["value"])
    x.eq("runners-up", [r["id"] for r in d["selection"]["runners_up"]], [r["id"] for r in p["runners_up"]])
    for r, q in zip(d["selection"]["runners_up"], p["runners_up"]):
        x.num(f"runner-up {q['id']} eqps", r["value"], q["value"])
    x.eq("rows", len(d["rows"]), len(p["rows"]))
    for r, q in zip(d["rows"], p["rows"]):
        for key in ("eqps", "sigma_h", "sigma_vm", "triaxiality", "lode_angle_param", "time"):
            x.num(f"row {r['increment']} {key}", r[key], q[key])
    for key in ("eqps", "triaxiality_avg", "lode_angle_param_avg"):
        x.num(f"summary {key}", d["summary"][key], p["summary"][key])
    return x.items


def compare_damage(d, p):
    x = Diff()
    if d["first"] is None or p["first"] is None:
        x.eq("first", d["first"], p["first"])
    else:
        x.eq("first cell", d["first"]["id"], p["first"]["id"])
        x.num("first increment", d["first"]["increment"], p["first"]["increment"])
        x.num("first time", d["first"]["time"], p["first"]["time"])
    x.eq("max cell", d["max"]["id"], p["max"]["id"])
    x.num("max damage", d["max"]["damage"], p["max"]["damage"])
    x.eq("runners-up", [r["id"] for r in d["runners_up"]], [r["id"] for r in p["runners_up"]])
    for r, q in zip(d["runners_up"], p["runners_up"]):
        x.num(f"runner-up {q['id']} damage", r["damage"], q["damage"])
    x.eq("entities", d["entities"], p["entities"])
    x.eq("increments", d["increments"], p["increments"])
    return x.items


def compare_export(dir_d, dir_p):
    """Every derived array of the first, a middle and the last increment, read back with the VTK reader."""
    import numpy as np
    import vtk
    from vtkmodules.util import numpy_support as ns

    sys.path.insert(0, HERE)
    import peer

    pd_ = glob.glob(os.path.join(dir_d, "*.pvd"))
    pp_ = glob.glob(os.path.join(dir_p, "*.pvd"))
    if len(pd_) != 1 or len(pp_) != 1:
        return [f"expected one .pvd in each output ({len(pd_)}, {len(pp_)})"]
    sd, sp = peer.series(pd_[0]), peer.series(pp_[0])
    x = Diff()
    x.eq("increments", len(sd), len(sp))
    names = ["stress", "sigma_h", "sigma_vm", "triaxiality", "lode_angle_param", "eqps", "damage"]
    for k in sorted({0, len(sd) // 2, len(sd) - 1}):
        x.num(f"time of increment {k}", sd[k][0], sp[k][0])
        arrays = {}
        for tag, path in (("d", sd[k][1]), ("p", sp[k][1])):
            r = vtk.vtkXMLUnstructuredGridReader()
            r.SetFileName(path)
            r.Update()
            cd = r.GetOutput().GetCellData()
            arrays[tag] = {n: ns.vtk_to_numpy(cd.GetArray(n)) for n in names if cd.GetArray(n) is not None}
        for n in names:
            a, b = arrays["d"].get(n), arrays["p"].get(n)
            if a is None or b is None:
                x.items.append(f"increment {k}: array {n} missing (ductrace {a is not None}, peer {b is not None})")
                continue
            a, b = a.astype(np.float64), b.astype(np.float64)
            same_nan = np.array_equal(np.isnan(a), np.isnan(b))
            ok = np.isclose(a, b, rtol=REL, atol=ABS, equal_nan=True)
            if not same_nan or not ok.all():
                bad = np.argwhere(~ok)
                x.items.append(f"increment {k}: {n} differs at {len(bad)} values, first {bad[0].tolist()}")
    return x.items


# ---------------------------------------------------------------------------------------------------------------
# timing


def hyperfine(cmds, runs, env=None, prepare=None, warmup=1):
    with tempfile.NamedTemporaryFile(suffix=".json", delete=False) as f:
        out = f.name
    args = ["hyperfine", "-N", "--warmup", str(warmup), "--runs", str(runs), "--export-json", out, "--style", "none"]
    if prepare:
        args += ["--prepare", prepare]
    for name, c in cmds:
        args += ["-n", name, c]
    sh(args, env=env)
    res = json.load(open(out))["results"]
    os.unlink(out)
    rows = []
    for r in res:
        t = sorted(r["times"])
        rows.append(dict(
            name=r["command"], median=r["median"], min=t[0], max=t[-1], stddev=r.get("stddev"), runs=len(t),
            user=r["user"], system=r["system"], times=t,
        ))
    return rows


def peak_rss_kb(cmd, env=None):
    r = sh(["/usr/bin/time", "-v"] + cmd, env=env)
    m = re.search(r"Maximum resident set size \(kbytes\): (\d+)", r.stderr)
    return int(m.group(1)) if m else None


def quote(a):
    return "'" + a.replace("'", "'\\''") + "'" if re.search(r"[^\w@%+=:,./-]", a) else a


def line(cmd):
    return " ".join(quote(a) for a in cmd)


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--data", required=True)
    ap.add_argument("--out", required=True)
    ap.add_argument("--encodings", default="raw,b64,zlib")
    ap.add_argument("--tasks", default="history,damage,export")
    ap.add_argument("--runs", type=int, default=5)
    ap.add_argument("--bin", default="/work/targets/b/release/ductrace")
    ap.add_argument("--locus", default=os.path.join(HERE, "jc4340.json"))
    ap.add_argument("--scratch", default="/work/bench-data/out")
    ap.add_argument("--no-peer", action="store_true")
    ap.add_argument("--threads", action="store_true")
    ap.add_argument("--zfloor", default="/work/targets/b")
    args = ap.parse_args()
    encs = [e for e in args.encodings.split(",") if e]
    tasks = [t for t in args.tasks.split(",") if t]
    meta = json.load(open(os.path.join(args.data, "meta.json")))
    result = dict(machine=machine(), data=meta, data_dir=args.data, runs=args.runs, binary=args.bin,
                  commit=sh(["git", "-C", HERE, "rev-parse", "--short", "HEAD"], check=False).stdout.strip(),
                  encodings={})
    os.makedirs(args.scratch, exist_ok=True)
    if not args.no_peer:
        # the peer's fixed cost: interpreter start and imports (part of its whole-process times)
        start = line([PY, "-c", "import vtk, numpy"])
        result["peer_startup"] = hyperfine([("peer start-up", start)], args.runs)[0]
        result["peer_startup"]["command"] = start
    for enc in encs:
        d = os.path.join(args.data, enc)
        pvd = os.path.join(d, "series.pvd")
        files = sorted(glob.glob(os.path.join(d, "*.vtu")))
        er = dict(bytes=sum(os.path.getsize(f) for f in files), files=len(files), tasks={}, floors={})
        result["encodings"][enc] = er
        # warm the page cache, then the floors
        subprocess.run(["cat"] + files, stdout=subprocess.DEVNULL)
        floors = [("cat all files", line(["cat"] + files))]
        if enc == "zlib":
            for b in ("zfloor-miniz", "zfloor-zlibrs"):
                p = os.path.join(args.zfloor, b)
                if os.path.exists(p):
                    floors.append((f"inflate stress+eqps blocks ({b}, 2 threads)", line([p, "stress,eqps"] + files)))
            floors.append(("inflate stress+eqps blocks (python zlib, 2 processes)",
                           line([PY, ZFLOOR_PY, "stress,eqps"] + files)))
        for name, c in floors:
            r = hyperfine([(name, c)], args.runs)[0]
            r["command"] = c if len(c) < 300 else c[:300] + " ..."
            er["floors"][name] = r
            print(f"[{enc}] floor {name}: median {r['median']:.3f} s", file=sys.stderr)
        for task in tasks:
            out_d = os.path.join(args.scratch, f"{enc}_ductrace")
            out_p = os.path.join(args.scratch, f"{enc}_peer")
            if task == "history":
                cd = [args.bin, "history", pvd, "--at", "max:eqps", "--format", "json", "-q"]
                cp = [PY, PEER, "history", pvd]
            elif task == "damage":
                cd = [args.bin, "damage", pvd, "--locus", args.locus, "--format", "json", "-q"]
                cp = [PY, PEER, "damage", pvd, args.locus]
            elif task == "export":
                cd = [args.bin, "export", pvd, "-o", out_d, "--locus", args.locus, "-q"]
                cp = [PY, PEER, "export", pvd, out_p, args.locus]
            else:
                sys.exit(f"unknown task {task}")
            tr = dict(ductrace_command=line(cd), peer_command=line(cp))
            # answers first
            t0 = time.time()
            rd = sh(cd)
            if not args.no_peer:
                rp = sh(cp)
                if task == "history":
                    diffs = compare_history(json.loads(rd.stdout), json.loads(rp.stdout))
                elif task == "damage":
                    diffs = compare_damage(json.loads(rd.stdout), json.loads(rp.stdout))
                else:
                    diffs = compare_export(out_d, out_p)
                if diffs:
                    sys.exit(f"[{enc}] {task}: answers differ:\n  " + "\n  ".join(diffs[:20]))
                tr["answers_agree"] = True
                if task != "export":
                    tr["answer"] = json.loads(rd.stdout) if task == "damage" else {
                        "cell": json.loads(rd.stdout)["point"]["id"],
                        "summary": json.loads(rd.stdout)["summary"]}
            state = "ran (no peer)" if args.no_peer else "answers agree"
            print(f"[{enc}] {task}: {state} ({time.time() - t0:.1f} s)", file=sys.stderr)
            cmds = [("ductrace", line(cd))] + ([] if args.no_peer else [("peer", line(cp))])
            prep = None
            if task == "export":
                prep = f"rm -rf {out_d} {out_p}"
            timed = hyperfine(cmds, args.runs, prepare=prep)
            tr["ductrace"] = timed[0]
            tr["ductrace"]["peak_rss_kb"] = peak_rss_kb(cd)
            if not args.no_peer:
                tr["peer"] = timed[1]
                tr["peer"]["peak_rss_kb"] = peak_rss_kb(cp)
                tr["speedup"] = timed[1]["median"] / timed[0]["median"]
                # CPU time (user + system, hyperfine means): less sensitive to other load on the machine
                cpu_d = timed[0]["user"] + timed[0]["system"]
                cpu_p = timed[1]["user"] + timed[1]["system"]
                tr["cpu_ratio"] = cpu_p / cpu_d if cpu_d > 0 else None
            if args.threads and task == "damage":
                th = {}
                for n in (1, 2):
                    env = dict(os.environ, RAYON_NUM_THREADS=str(n))
                    th[str(n)] = hyperfine([(f"ductrace {n} thread(s)", line(cd))], args.runs, env=env)[0]
                th["ratio_1_over_2"] = th["1"]["median"] / th["2"]["median"]
                tr["threads"] = th
            er["tasks"][task] = tr
            msg = f"[{enc}] {task}: ductrace {timed[0]['median']:.3f} s"
            if not args.no_peer:
                msg += f", peer {timed[1]['median']:.3f} s, speedup {tr['speedup']:.1f}x"
            print(msg, file=sys.stderr)
        if "damage" in er["tasks"]:
            dt = er["tasks"]["damage"]["ductrace"]["median"]
            er["damage_over_floor"] = {name: dt / f["median"] for name, f in er["floors"].items()}
        shutil.rmtree(os.path.join(args.scratch, f"{enc}_ductrace"), ignore_errors=True)
        shutil.rmtree(os.path.join(args.scratch, f"{enc}_peer"), ignore_errors=True)
    result["machine"]["load_after"] = open("/proc/loadavg").read().split()[:3]
    os.makedirs(os.path.dirname(os.path.abspath(args.out)), exist_ok=True)
    with open(args.out, "w") as f:
        json.dump(result, f, indent=1)
    print(summary(result))


def summary(r):
    out = [f"{r['data_dir']}: {r['data']['cells']} cells x {r['data']['increments']} increments, "
           f"{r['runs']} runs, load {r['machine']['load_before']} -> {r['machine']['load_after']}"]
    if "peer_startup" in r:
        out.append(f"  peer start-up (python, import vtk, numpy): {r['peer_startup']['median']:.3f} s")
    for enc, er in r["encodings"].items():
        out.append(f"  {enc}: {er['files']} files, {er['bytes'] / 1e6:.0f} MB")
        for name, f in er["floors"].items():
            out.append(f"    floor {name}: {f['median']:.3f} s [{f['min']:.3f}-{f['max']:.3f}]")
        for task, t in er["tasks"].items():
            d = t["ductrace"]
            s = (f"    {task}: ductrace {d['median']:.3f} s [{d['min']:.3f}-{d['max']:.3f}] "
                 f"user {d['user']:.2f} sys {d['system']:.2f} rss {d['peak_rss_kb'] / 1024:.0f} MB")
            if "peer" in t:
                p = t["peer"]
                s += (f" | peer {p['median']:.3f} s [{p['min']:.3f}-{p['max']:.3f}] user {p['user']:.2f} "
                      f"sys {p['system']:.2f} rss {p['peak_rss_kb'] / 1024:.0f} MB | {t['speedup']:.1f}x"
                      f" (cpu {(p['user'] + p['system']) / (d['user'] + d['system']):.1f}x)")
            out.append(s)
            if "threads" in t:
                th = t["threads"]
                out.append(f"      threads: 1 -> {th['1']['median']:.3f} s, 2 -> {th['2']['median']:.3f} s, "
                           f"ratio {th['ratio_1_over_2']:.2f}")
        for name, v in er.get("damage_over_floor", {}).items():
            out.append(f"    damage / floor ({name}): {v:.2f}")
    return "\n".join(out)


if __name__ == "__main__":
    if len(sys.argv) > 1 and sys.argv[1] == "--summary":
        print(summary(json.load(open(sys.argv[2]))))
    else:
        main()
