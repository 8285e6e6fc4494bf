#!/usr/bin/env python3
"""Decompression floor for zlib-compressed appended VTU files: inflate only the blocks of the named cell arrays,
nothing else (no XML parser, no conversion to floating point, no arithmetic), with the C zlib library that ships
with Python, over WORKERS processes (default 2, one per core of the benchmark machine), one file per task.

Usage: python bench/zfloor.py [--workers N] ARRAY[,ARRAY...] FILE.vtu [FILE.vtu ...]
Prints the number of uncompressed bytes produced.

Layout (VTK's XML file formats, appended raw data): the <AppendedData> element's content starts with '_'; each
array's `offset` attribute counts bytes from just after it; a compressed array starts with a header of
UInt32 or UInt64 words (the file's `header_type`): number of blocks, block size, last block size, then one
compressed size per block, followed by the blocks.
"""

import mmap
import re
import struct
import sys
import zlib
from multiprocessing import Pool

ARRAY_RE = re.compile(rb"<DataArray\b[^>]*>")


def attr(tag, name):
    m = re.search(rb"\b" + name + rb'="([^"]*)"', tag)
    return m.group(1).decode() if m else None


def inflate_file(job):
    path, names = job
    with open(path, "rb") as f:
        mm = mmap.mmap(f.fileno(), 0, access=mmap.ACCESS_READ)
    app = mm.find(b"<AppendedData")
    head = mm[:app]
    start = mm.find(b"_", app) + 1
    header = attr(head[: head.find(b">", head.find(b"<VTKFile")) + 1], b"header_type") or "UInt32"
    w, fmt = (8, "<Q") if header == "UInt64" else (4, "<I")
    cell = head.find(b"<CellData")
    total = 0
    for tag in ARRAY_RE.findall(head, cell):
        if attr(tag, b"Name") not in names:
            continue
        off = start + int(attr(tag, b"offset"))
        nb, bs, last = (struct.unpack_from(fmt, mm, off + i * w)[0] for i in range(3))
        sizes = [struct.unpack_from(fmt, mm, off + (3 + i) * w)[0] for i in range(nb)]
        pos = off + (3 + nb) * w
        for c in sizes:
            total += len(zlib.decompress(mm[pos : pos + c]))
            pos += c
    mm.close()
    return total


def main():
    args = sys.argv[1:]
    workers = 2
    if args[:1] == ["--workers"]:
        workers = int(args[1])
        args = args[2:]
    names = set(args[0].split(","))
    files = args[1:]
    with Pool(workers) as p:
        total = sum(p.map(inflate_file, [(f, names) for f in files], chunksize=1))
    print(total)


if __name__ == "__main__":
    main()
