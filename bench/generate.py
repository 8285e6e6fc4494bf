#!/usr/bin/env python3
"""Generate a large, realistic VTU series for ductrace's performance harness.

A hexahedral grid of NX x NY x NZ cells over a 1.0 x 0.5 x 0.4 box (invented geometry, nominal mm), K increments,
each written by the VTK library itself (its Python wheel, vtkXMLUnstructuredGridWriter) with a .pvd collection
(written here as text: the wheel has no .pvd writer). Per increment:

* cell data "stress": 6 components, Float64, VTK order XX, YY, ZZ, XY, YZ, XZ (nominal MPa);
* cell data "eqps": equivalent plastic strain, Float64, non-decreasing over increments;
* point data "displacement": 3 components, Float64.

The stress field is built from an invented triaxiality field eta(x), Lode angle parameter field thetabar(x) and von
Mises stress, rotated by a spatially varying rotation so all six components are non-zero. A Gaussian zone centred
off the grid's symmetry planes carries high triaxiality (about 1.1) and the largest plastic strain, so the cell
with the largest eqps and the first cell to reach D = 1 under the Johnson-Cook locus of 4340 steel are unique. A
fixed per-cell perturbation (seeded) breaks remaining ties. Increment 0 is an elastic preload: eqps = 0 and a
small, defined stress state everywhere (a plastic first increment needs a defined state at both ends).

Encodings (one folder each under OUT): appended raw ("raw"), appended base64 ("b64"), appended raw with zlib
compression ("zlib", VTK's default 32 KiB blocks). Any subset with --encodings.

The data are invented for benchmarking; they model no real material or test.

Usage:
    /work/venv/bin/python bench/generate.py --cells 200000 --increments 20 --out /work/bench-data/n200k_k20
"""

import argparse
import json
import math
import os
import sys
import time

import numpy as np
import vtk
from vtkmodules.util import numpy_support as ns

BOX = (1.0, 0.5, 0.4)
ZONE = np.array([0.537, 0.263, 0.211])  # off the grid's symmetry planes
ZONE_WIDTH = 0.08


def dims_for(cells):
    """Grid dimensions with NY = NX/2 and NZ = 0.4 NX (roughly the box aspect), exact product."""
    presets = {50_000: (50, 25, 40), 200_000: (100, 50, 40), 1_000_000: (125, 100, 80)}
    if cells in presets:
        return presets[cells]
    nx = max(1, round((cells / 0.2) ** (1.0 / 3.0)))
    ny = max(1, round(nx / 2))
    nz = max(1, cells // (nx * ny))
    return nx, ny, nz


def build_grid(nx, ny, nz):
    xs = np.linspace(0.0, BOX[0], nx + 1)
    ys = np.linspace(0.0, BOX[1], ny + 1)
    zs = np.linspace(0.0, BOX[2], nz + 1)
    # point id = i + (nx+1) * (j + (ny+1) * k)
    Z, Y, X = np.meshgrid(zs, ys, xs, indexing="ij")
    pts = np.column_stack([X.ravel(), Y.ravel(), Z.ravel()])
    i, j, k = np.meshgrid(np.arange(nx), np.arange(ny), np.arange(nz), indexing="ij")
    i, j, k = (a.transpose(2, 1, 0).ravel() for a in (i, j, k))  # cell id = i + nx*(j + ny*k)
    px, pxy = nx + 1, (nx + 1) * (ny + 1)
    base = i + px * j + pxy * k
    conn = np.column_stack(
        [base, base + 1, base + 1 + px, base + px,
         base + pxy, base + 1 + pxy, base + 1 + px + pxy, base + px + pxy]
    ).astype(np.int64)
    centroids = np.column_stack(
        [(i + 0.5) * BOX[0] / nx, (j + 0.5) * BOX[1] / ny, (k + 0.5) * BOX[2] / nz]
    )
    grid = vtk.vtkUnstructuredGrid()
    p = vtk.vtkPoints()
    p.SetData(ns.numpy_to_vtk(pts, deep=True))
    grid.SetPoints(p)
    n = conn.shape[0]
    offsets = np.arange(0, 8 * n + 1, 8, dtype=np.int64)
    ca = vtk.vtkCellArray()
    ca.SetData(ns.numpy_to_vtkIdTypeArray(offsets, deep=True), ns.numpy_to_vtkIdTypeArray(conn.ravel(), deep=True))
    grid.SetCells(vtk.VTK_HEXAHEDRON, ca)
    return grid, pts, centroids


def rotations(c):
    """Per-cell rotation matrices (N, 3, 3): about z by a(x), then about x by b(y)."""
    a = 0.6 * c[:, 0] + 0.3 * c[:, 2]
    b = 0.9 * c[:, 1] - 0.2
    ca, sa, cb, sb = np.cos(a), np.sin(a), np.cos(b), np.sin(b)
    n = c.shape[0]
    rz = np.zeros((n, 3, 3))
    rz[:, 0, 0], rz[:, 0, 1], rz[:, 1, 0], rz[:, 1, 1], rz[:, 2, 2] = ca, -sa, sa, ca, 1.0
    rx = np.zeros((n, 3, 3))
    rx[:, 0, 0], rx[:, 1, 1], rx[:, 1, 2], rx[:, 2, 1], rx[:, 2, 2] = 1.0, cb, -sb, sb, cb
    return np.einsum("nij,njk->nik", rx, rz)


class Fields:
    """The invented fields: evaluated per increment from the cell centroids."""

    def __init__(self, centroids, points, increments, seed=7):
        self.c = centroids
        self.p = points
        self.k = increments
        rng = np.random.default_rng(seed)
        r2 = np.sum((centroids - ZONE) ** 2, axis=1) / ZONE_WIDTH**2
        self.g = np.exp(-r2)
        x, y, z = centroids[:, 0], centroids[:, 1], centroids[:, 2]
        self.noise = rng.normal(0.0, 1e-3, size=centroids.shape[0])
        self.eta0 = 0.30 + 0.80 * self.g + 0.05 * x - 0.03 * y + 0.02 * z + self.noise
        self.theta0 = np.clip(0.85 - 0.55 * self.g + 0.10 * np.sin(3.0 * x) - 0.05 * z, -1.0, 1.0)
        self.strain0 = (0.20 + 0.02 * x + 0.01 * y + 0.80 * self.g) * (1.0 + 0.5 * self.noise)
        self.rot = rotations(centroids)

    def at(self, k):
        lam = k / max(1, self.k - 1)
        if k == 0:
            eqps = np.zeros_like(self.g)
            svm = 120.0 + 10.0 * self.g
            eta = self.eta0 * 0.95
            theta = self.theta0
        else:
            eqps = lam**1.3 * self.strain0
            svm = 400.0 * (1.0 + eqps) ** 0.15 + 5.0 * self.g
            eta = self.eta0 * (0.90 + 0.10 * lam)  # slightly non-proportional path
            theta = np.clip(self.theta0 - 0.05 * lam * self.g, -1.0, 1.0)
        xi = np.sin(0.5 * math.pi * theta)
        th = np.arccos(np.clip(xi, -1.0, 1.0)) / 3.0
        sh = eta * svm
        pr = np.column_stack(
            [np.cos(th), np.cos(th - 2.0 * math.pi / 3.0), np.cos(th + 2.0 * math.pi / 3.0)]
        ) * (2.0 / 3.0 * svm)[:, None] + sh[:, None]
        m = np.einsum("nik,nk,njk->nij", self.rot, pr, self.rot)
        stress = np.column_stack([m[:, 0, 0], m[:, 1, 1], m[:, 2, 2], m[:, 0, 1], m[:, 1, 2], m[:, 0, 2]])
        x, y, z = self.p[:, 0], self.p[:, 1], self.p[:, 2]
        disp = lam * np.column_stack([0.02 * x, -0.004 * y + 0.001 * x * z, -0.003 * z])
        return lam, stress, eqps, disp


ENCODINGS = {
    "raw": dict(encode=0, zlib=False),
    "b64": dict(encode=1, zlib=False),
    "zlib": dict(encode=0, zlib=True),
}


def writer_for(enc):
    w = vtk.vtkXMLUnstructuredGridWriter()
    w.SetDataModeToAppended()
    w.SetEncodeAppendedData(ENCODINGS[enc]["encode"])
    if ENCODINGS[enc]["zlib"]:
        w.SetCompressorTypeToZLib()
    else:
        w.SetCompressorTypeToNone()
    return w


def write_pvd(path, entries):
    with open(path, "w") as f:
        f.write('<?xml version="1.0"?>\n<VTKFile type="Collection" version="0.1" byte_order="LittleEndian">\n')
        f.write("  <Collection>\n")
        for t, name in entries:
            f.write(f'    <DataSet timestep="{t!r}" group="" part="0" file="{name}"/>\n')
        f.write("  </Collection>\n</VTKFile>\n")


def main():
    ap = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    ap.add_argument("--cells", type=int, default=200_000)
    ap.add_argument("--increments", type=int, default=20)
    ap.add_argument("--out", required=True)
    ap.add_argument("--encodings", default="raw,b64,zlib")
    args = ap.parse_args()
    encs = [e for e in args.encodings.split(",") if e]
    for e in encs:
        if e not in ENCODINGS:
            sys.exit(f"unknown encoding {e!r}: use raw, b64, zlib")
    nx, ny, nz = dims_for(args.cells)
    t0 = time.time()
    grid, pts, centroids = build_grid(nx, ny, nz)
    fields = Fields(centroids, pts, args.increments)
    dirs = {}
    for e in encs:
        d = os.path.join(args.out, e)
        os.makedirs(d, exist_ok=True)
        dirs[e] = d
    entries = []
    for k in range(args.increments):
        lam, stress, eqps, disp = fields.at(k)
        cd, pd = grid.GetCellData(), grid.GetPointData()
        for name in ("stress", "eqps"):
            cd.RemoveArray(name)
        pd.RemoveArray("displacement")
        s = ns.numpy_to_vtk(np.ascontiguousarray(stress), deep=True)
        s.SetName("stress")
        cd.AddArray(s)
        q = ns.numpy_to_vtk(np.ascontiguousarray(eqps), deep=True)
        q.SetName("eqps")
        cd.AddArray(q)
        u = ns.numpy_to_vtk(np.ascontiguousarray(disp), deep=True)
        u.SetName("displacement")
        pd.AddArray(u)
        name = f"inc_{k:04d}.vtu"
        for e, d in dirs.items():
            w = writer_for(e)
            w.SetFileName(os.path.join(d, name))
            w.SetInputData(grid)
            if w.Write() != 1:
                sys.exit(f"vtk writer failed on {d}/{name}")
        entries.append((lam, name))
        print(f"increment {k + 1}/{args.increments} written ({time.time() - t0:.1f} s)", file=sys.stderr)
    for e, d in dirs.items():
        write_pvd(os.path.join(d, "series.pvd"), entries)
    meta = dict(
        cells=nx * ny * nz, dims=[nx, ny, nz], points=int(pts.shape[0]), increments=args.increments,
        encodings=encs, zone_centre=ZONE.tolist(), zone_width=ZONE_WIDTH, vtk=vtk.vtkVersion.GetVTKVersion(),
        numpy=np.__version__, seconds=round(time.time() - t0, 1),
    )
    with open(os.path.join(args.out, "meta.json"), "w") as f:
        json.dump(meta, f, indent=1)
    print(json.dumps(meta))


if __name__ == "__main__":
    main()
