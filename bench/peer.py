#!/usr/bin/env python3
"""The peer of ductrace's performance harness: the script a user would write on the VTK library's own XML reader
(its Python wheel) and vectorised numpy, doing the same computations on the same files and printing the same
answers as JSON.

Tasks (same formulas as ductrace; the project's field notes §1, §2, §4):
  history SERIES.pvd            the cell with the largest eqps at the last increment (ties: lowest id), its five
                                runners-up, its history (eqps, sigma_h, sigma_vm, eta, thetabar) and the trapezoid
                                averages of eta and thetabar over eqps (Bao & Wierzbicki 2004).
  damage SERIES.pvd FIT.json    linear damage D = integral of d(eqps)/eps_f, trapezoid on 1/eps_f over each
                                increment (Johnson & Cook 1985), eps_f = D1 + D2 exp(D3 eta), at every cell and
                                increment; the first cell to reach D = 1 (linear interpolation in D), the largest D
                                and five runners-up.
  export SERIES.pvd OUTDIR [FIT.json]  writes sigma_h, sigma_vm, triaxiality, lode_angle_param, eqps (and damage)
                                per increment as appended-raw VTU files with a .pvd.

Measures: sigma_h = tr(sigma)/3, J2 = s:s/2, J3 = det s, sigma_vm = sqrt(3 J2), eta = sigma_h/sigma_vm,
thetabar = 1 - (2/pi) arccos(clamp(27/2 J3/sigma_vm^3, -1, 1)) (Bai & Wierzbicki 2008). The reader is told to load
only the arrays each task needs (vtkXMLReader array selection), as a careful user would.
"""

import json
import math
import os
import sys
import xml.etree.ElementTree as ET

import numpy as np
import vtk
from vtkmodules.util import numpy_support as ns

STRESS, EQPS, DISP = "stress", "eqps", "displacement"


def series(pvd):
    root = ET.parse(pvd).getroot()
    d = os.path.dirname(os.path.abspath(pvd))
    items = [(float(ds.get("timestep")), os.path.join(d, ds.get("file"))) for ds in root.iter("DataSet")]
    items.sort(key=lambda t: t[0])
    return items


class Reader:
    def __init__(self, cell_arrays, point_arrays=()):
        self.r = vtk.vtkXMLUnstructuredGridReader()
        self.cell_arrays = cell_arrays
        self.point_arrays = point_arrays

    def read(self, path):
        r = self.r
        r.SetFileName(path)
        r.UpdateInformation()
        cs, ps = r.GetCellDataArraySelection(), r.GetPointDataArraySelection()
        cs.DisableAllArrays()
        ps.DisableAllArrays()
        for a in self.cell_arrays:
            cs.EnableArray(a)
        for a in self.point_arrays:
            ps.EnableArray(a)
        r.Update()
        return r.GetOutput()


def cell_array(grid, name):
    return ns.vtk_to_numpy(grid.GetCellData().GetArray(name))


def measures(s):
    """sigma_h, sigma_vm, eta, thetabar, defined for an (N, 6) array in VTK order XX, YY, ZZ, XY, YZ, XZ."""
    xx, yy, zz, xy, yz, xz = (s[:, i] for i in range(6))
    sh = (xx + yy + zz) / 3.0
    dx, dy, dz = xx - sh, yy - sh, zz - sh
    j2 = 0.5 * (dx * dx + dy * dy + dz * dz) + xy * xy + yz * yz + xz * xz
    svm = np.sqrt(3.0 * j2)
    j3 = dx * (dy * dz - yz * yz) - xy * (xy * dz - yz * xz) + xz * (xy * yz - dy * xz)
    scale = np.max(np.abs(s), axis=1)
    ok = svm > 1e-10 * scale
    with np.errstate(divide="ignore", invalid="ignore"):
        eta = np.where(ok, sh / svm, 0.0)
        xi = np.clip(np.where(ok, 13.5 * j3 / (svm * svm * svm), 0.0), -1.0, 1.0)
    theta = np.where(ok, 1.0 - (2.0 / math.pi) * np.arccos(xi), 0.0)
    return sh, svm, eta, theta, ok


def top(values, count):
    """Indices of the `count` largest values, largest first, ties to the lowest id."""
    count = min(count, values.size)
    part = np.argpartition(-values, count - 1)[:count] if count < values.size else np.arange(values.size)
    # ties at the partition boundary: widen to every index whose value equals the smallest kept value
    kth = values[part].min()
    cand = np.nonzero(values >= kth)[0]
    order = np.lexsort((cand, -values[cand]))
    return cand[order][:count]


def history(pvd):
    items = series(pvd)
    last = Reader([EQPS]).read(items[-1][1])
    e_last = cell_array(last, EQPS).astype(np.float64)
    ranked = top(e_last, 6)
    cid = int(ranked[0])
    rd = Reader([STRESS, EQPS])
    rows = []
    for t, path in items:
        g = rd.read(path)
        s = cell_array(g, STRESS)[cid : cid + 1].astype(np.float64)
        e = float(cell_array(g, EQPS)[cid])
        sh, svm, eta, th, ok = measures(s)
        rows.append(dict(time=t, eqps=e, sigma_h=float(sh[0]), sigma_vm=float(svm[0]),
                         triaxiality=float(eta[0]) if ok[0] else None,
                         lode_angle_param=float(th[0]) if ok[0] else None))
    ie = it = 0.0
    for a, b in zip(rows, rows[1:]):
        de = b["eqps"] - a["eqps"]
        if de > 0.0:
            ie += 0.5 * (a["triaxiality"] + b["triaxiality"]) * de
            it += 0.5 * (a["lode_angle_param"] + b["lode_angle_param"]) * de
    ef = rows[-1]["eqps"]
    return dict(
        task="history", id=cid, value=float(e_last[cid]),
        runners_up=[dict(id=int(i), value=float(e_last[i])) for i in ranked[1:]],
        rows=rows,
        summary=dict(eqps=ef, triaxiality_avg=ie / ef if ef > 0 else None,
                     lode_angle_param_avg=it / ef if ef > 0 else None),
    )


def jc_inverse(fit, eta, ok):
    p = fit["parameters"]
    ef = p["D1"] + p["D2"] * np.exp(p["D3"] * eta)
    good = ok & np.isfinite(ef) & (ef > 0.0)
    with np.errstate(divide="ignore"):
        return np.where(good, 1.0 / np.where(good, ef, 1.0), 0.0)


class Damage:
    """Linear damage over every cell, one increment at a time."""

    def __init__(self, fit):
        if fit.get("model") != "jc":
            sys.exit("the peer implements the Johnson-Cook locus only")
        self.fit = fit
        self.k = 0

    def step(self, eqps, eta, ok):
        inv = jc_inverse(self.fit, eta, ok)
        if self.k == 0:
            self.eqps, self.inv = eqps.copy(), inv
            self.phi = np.zeros_like(eqps)
            self.cross = np.full_like(eqps, -1.0)
        else:
            de = eqps - self.eqps
            if np.any(de < 0.0):
                sys.exit(f"eqps decreases at increment {self.k}")
            plastic = de > 0.0
            if np.any(plastic & ((self.inv <= 0.0) | (inv <= 0.0))):
                sys.exit(f"plastic increment {self.k} with an undefined fracture strain")
            old = self.phi
            new = old + np.where(plastic, de * 0.5 * (self.inv + inv), 0.0)
            hit = (self.cross < 0.0) & (old < 1.0) & (new >= 1.0)
            if np.any(hit):
                f = np.clip((1.0 - old[hit]) / (new[hit] - old[hit]), 0.0, 1.0)
                self.cross[hit] = (self.k - 1) + f
            self.phi, self.eqps, self.inv = new, eqps.copy(), inv
        self.k += 1


def damage(pvd, fitpath):
    with open(fitpath) as f:
        fit = json.load(f)
    items = series(pvd)
    rd = Reader([STRESS, EQPS])
    dm = Damage(fit)
    times = []
    for t, path in items:
        g = rd.read(path)
        s = cell_array(g, STRESS).astype(np.float64)
        e = cell_array(g, EQPS).astype(np.float64)
        _, _, eta, _, ok = measures(s)
        dm.step(e, eta, ok)
        times.append(t)
    first = None
    crossed = np.nonzero(dm.cross >= 0.0)[0]
    if crossed.size:
        order = np.lexsort((crossed, dm.cross[crossed]))
        i = int(crossed[order[0]])
        x = float(dm.cross[i])
        k = int(math.floor(x))
        fr = x - k
        time = times[k] + fr * (times[k + 1] - times[k]) if k + 1 < len(times) else times[k]
        first = dict(id=i, increment=x, time=time)
    ranked = top(dm.phi, 6)
    return dict(
        task="damage", first=first,
        max=dict(id=int(ranked[0]), damage=float(dm.phi[ranked[0]])),
        runners_up=[dict(id=int(i), damage=float(dm.phi[i])) for i in ranked[1:]],
        increments=len(times), entities=int(dm.phi.size),
    )


def export(pvd, outdir, fitpath=None):
    items = series(pvd)
    fit = None
    if fitpath:
        with open(fitpath) as f:
            fit = json.load(f)
    os.makedirs(outdir, exist_ok=True)
    rd = Reader([STRESS, EQPS], [DISP])
    dm = Damage(fit) if fit else None
    out = vtk.vtkUnstructuredGrid()
    entries = []
    for k, (t, path) in enumerate(items):
        g = rd.read(path)
        s = cell_array(g, STRESS).astype(np.float64)
        e = cell_array(g, EQPS).astype(np.float64)
        sh, svm, eta, th, ok = measures(s)
        if k == 0:
            out.SetPoints(g.GetPoints())
            out.SetCells(g.GetCellTypes(), g.GetCells())
        cd, pd = out.GetCellData(), out.GetPointData()
        arrays = [("stress", s), ("sigma_h", sh), ("sigma_vm", svm),
                  ("triaxiality", np.where(ok, eta, np.nan)), ("lode_angle_param", np.where(ok, th, np.nan)),
                  ("eqps", e)]
        if dm:
            dm.step(e, eta, ok)
            arrays.append(("damage", dm.phi))
        for name, a in arrays:
            cd.RemoveArray(name)
            v = ns.numpy_to_vtk(np.ascontiguousarray(a), deep=True)
            v.SetName(name)
            cd.AddArray(v)
        pd.RemoveArray(DISP)
        pd.AddArray(g.GetPointData().GetArray(DISP))
        w = vtk.vtkXMLUnstructuredGridWriter()
        w.SetDataModeToAppended()
        w.SetEncodeAppendedData(0)
        w.SetCompressorTypeToNone()
        name = f"derived_{k:04d}.vtu"
        w.SetFileName(os.path.join(outdir, name))
        w.SetInputData(out)
        if w.Write() != 1:
            sys.exit(f"writer failed on {name}")
        entries.append((t, name))
    with open(os.path.join(outdir, "derived.pvd"), "w") as f:
        f.write('<?xml version="1.0"?>\n<VTKFile type="Collection" version="0.1">\n  <Collection>\n')
        for t, name in entries:
            f.write(f'    <DataSet timestep="{t!r}" part="0" file="{name}"/>\n')
        f.write("  </Collection>\n</VTKFile>\n")
    return dict(task="export", increments=len(entries), files=[n for _, n in entries])


def main():
    a = sys.argv[1:]
    if len(a) >= 2 and a[0] == "history":
        r = history(a[1])
    elif len(a) >= 3 and a[0] == "damage":
        r = damage(a[1], a[2])
    elif len(a) >= 3 and a[0] == "export":
        r = export(a[1], a[2], a[3] if len(a) > 3 else None)
    else:
        sys.exit(__doc__)
    json.dump(r, sys.stdout, indent=1)
    sys.stdout.write("\n")


if __name__ == "__main__":
    main()
