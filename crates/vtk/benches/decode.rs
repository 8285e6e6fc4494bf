//! Decoding speed of one large Float64 cell array in the three main encodings: appended raw,
//! inline base64 and appended zlib (default 32 KiB blocks). Data are generated in memory, written
//! to a temporary file and read through the public API (`Increment::read`), so the figures include
//! the mapping and the checks. Run: `cargo bench -p ductrace-vtk --bench decode`.

#![allow(missing_docs)] // criterion_group! generates undocumented items

use std::hint::black_box;

use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use ductrace_vtk::testenc::{self, Arr, Comp, Enc, Format, Piece};
use ductrace_vtk::{Location, Series};

/// Cells in the benchmark mesh; the stress array has 6 values per cell (48 bytes).
const CELLS: usize = 400_000;

fn file(enc: Enc, dir: &std::path::Path, name: &str) -> std::path::PathBuf {
    // one long row of hexahedra; stress values vary smoothly (compressible like real results)
    let mut p = Piece::hex_row(CELLS, 0.0);
    let stress: Vec<f64> = (0..CELLS * 6)
        .map(|i| 100.0 * ((i as f64) * 1e-4).sin() + (i % 6) as f64)
        .collect();
    p.cell_data.push(Arr::f64("stress", 6, stress));
    let path = dir.join(name);
    std::fs::write(&path, testenc::vtu(&enc, &[p], None)).expect("write bench file");
    path
}

fn bench(c: &mut Criterion) {
    let dir = tempfile::tempdir().expect("temp dir");
    let cases = [
        (
            "appended_raw_f64",
            Enc {
                format: Format::AppendedRaw,
                ..Enc::default()
            },
        ),
        (
            "inline_base64_f64",
            Enc {
                format: Format::InlineOneRun,
                ..Enc::default()
            },
        ),
        (
            "appended_zlib_f64",
            Enc {
                format: Format::AppendedRaw,
                comp: Comp::Zlib,
                ..Enc::default()
            },
        ),
    ];
    let mut g = c.benchmark_group("decode_stress");
    g.throughput(Throughput::Bytes((CELLS * 6 * 8) as u64));
    g.sample_size(20);
    for (name, enc) in cases {
        let path = file(enc, dir.path(), &format!("{name}.vtu"));
        let series = Series::open(&path).expect("open");
        let inc = series.increment(0).expect("increment");
        let mut buf = Vec::new();
        g.bench_function(name, |b| {
            b.iter(|| {
                inc.read("stress", Location::Cell, &mut buf).expect("read");
                black_box(buf.len())
            })
        });
        if name == "inline_base64_f64" {
            // the base64 engine alone over text of the same size, for comparison
            use base64::Engine as _;
            let raw = vec![0x5au8; CELLS * 6 * 8];
            let text = base64::engine::general_purpose::STANDARD.encode(&raw);
            let mut out = vec![0u8; raw.len() + 3];
            g.bench_function("base64_engine_alone", |b| {
                b.iter(|| {
                    let n = base64::engine::general_purpose::STANDARD
                        .decode_slice(text.as_bytes(), &mut out)
                        .expect("decode");
                    black_box(n)
                })
            });
        }
        if name == "appended_zlib_f64" {
            // the decompressor alone over the same blocks, for comparison
            let raw: Vec<u8> = testenc::raw_bytes(
                &(0..CELLS * 6)
                    .map(|i| 100.0 * ((i as f64) * 1e-4).sin() + (i % 6) as f64)
                    .collect::<Vec<_>>(),
                ductrace_vtk::ScalarType::Float64,
                false,
            );
            let blocks: Vec<Vec<u8>> = raw
                .chunks(32768)
                .map(|b| testenc::compress(Comp::Zlib, b))
                .collect();
            let mut out = vec![0u8; 32768];
            g.bench_function("zlib_alone_serial", |b| {
                b.iter(|| {
                    for blk in &blocks {
                        let mut d = flate2::Decompress::new(true);
                        let _ = d.decompress(blk, &mut out, flate2::FlushDecompress::Finish);
                    }
                    black_box(out[0])
                })
            });
        }
    }
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
