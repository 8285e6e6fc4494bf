//! Throughput of the stress-invariant kernels over one increment of 2·10⁵ cells: the full
//! [`StressState`] per tuple (with the Lode parameter) against [`batch::measures_of`] (σ_h,
//! σ_vm, η, θ̄ only), sequential and in parallel chunks with rayon. Invented stress data.

#![allow(missing_docs, clippy::unwrap_used)]

use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use ductrace_tensor::{ComponentOrder, batch};
use rayon::prelude::*;
use std::hint::black_box;

const CELLS: usize = 200_000;

fn stress() -> Vec<f64> {
    (0..CELLS * 6)
        .map(|i| {
            let c = (i / 6) as f64;
            let k = (i % 6) as f64;
            300.0 * (1.0 + 0.1 * k) * (0.5 + ((c * 0.37 + k * 1.3).sin()))
        })
        .collect()
}

fn bench(c: &mut Criterion) {
    let s = stress();
    let order = ComponentOrder::VTK;
    let mut out = vec![0.0f64; CELLS * 2];
    let mut g = c.benchmark_group("stress_measures");
    g.throughput(Throughput::Elements(CELLS as u64));
    g.bench_function("state_of_serial", |b| {
        b.iter(|| {
            for (o, t) in out.chunks_exact_mut(2).zip(s.chunks_exact(6)) {
                let st = batch::state_of(t, &order).unwrap();
                o[0] = st.sigma_vm;
                o[1] = st.triaxiality().unwrap_or(0.0) + st.lode_angle_param().unwrap_or(0.0);
            }
            black_box(&out);
        })
    });
    g.bench_function("measures_of_serial", |b| {
        b.iter(|| {
            for (o, t) in out.chunks_exact_mut(2).zip(s.chunks_exact(6)) {
                let m = batch::measures_of(t, &order).unwrap();
                o[0] = m.sigma_vm;
                o[1] = m
                    .shape
                    .map_or(0.0, |l| l.triaxiality + l.lode_angle_param());
            }
            black_box(&out);
        })
    });
    g.bench_function("measures_of_serial_without_lode_angle", |b| {
        b.iter(|| {
            for (o, t) in out.chunks_exact_mut(2).zip(s.chunks_exact(6)) {
                let m = batch::measures_of(t, &order).unwrap();
                o[0] = m.sigma_vm;
                o[1] = m.shape.map_or(0.0, |l| l.triaxiality);
            }
            black_box(&out);
        })
    });
    g.bench_function("measures_of_parallel", |b| {
        b.iter(|| {
            out.par_chunks_mut(2 * batch::CHUNK)
                .zip(s.par_chunks(6 * batch::CHUNK))
                .for_each(|(o, s)| {
                    for (o, t) in o.chunks_exact_mut(2).zip(s.chunks_exact(6)) {
                        let m = batch::measures_of(t, &order).unwrap();
                        o[0] = m.sigma_vm;
                        o[1] = m
                            .shape
                            .map_or(0.0, |l| l.triaxiality + l.lode_angle_param());
                    }
                });
            black_box(&out);
        })
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
