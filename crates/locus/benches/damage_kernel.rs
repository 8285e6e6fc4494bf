//! Throughput of the full-field damage kernel ([`update_cells`]): one increment over
//! 10⁵ cells for each model and rule, sequential and split across threads with rayon.
//! Invented field data.

#![allow(missing_docs, clippy::unwrap_used)]

use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use ductrace_locus::{
    CellDamage, DamageRule, HosfordCoulomb, IncrementFields, JohnsonCook, Locus,
    ModifiedMohrCoulomb, start_cells, update_cells,
};
use rayon::prelude::*;
use std::hint::black_box;

const CELLS: usize = 100_000;
const CHUNK: usize = 4096;

fn fields(scale: f64) -> (Vec<f64>, Vec<f64>, Vec<f64>, Vec<bool>) {
    let eqps = (0..CELLS)
        .map(|c| scale * (1.0 + (c % 13) as f64 * 0.05))
        .collect();
    let eta = (0..CELLS)
        .map(|c| 0.3 + 0.4 * ((c % 101) as f64 / 100.0))
        .collect();
    let th = (0..CELLS)
        .map(|c| -1.0 + 2.0 * ((c % 97) as f64 / 96.0))
        .collect();
    let ok = (0..CELLS).map(|c| c % 1000 != 0).collect();
    (eqps, eta, th, ok)
}

fn bench(c: &mut Criterion) {
    let models = [
        (
            "jc",
            Locus::JohnsonCook(JohnsonCook::new(0.05, 3.44, -2.12).unwrap()),
        ),
        (
            "mmc",
            Locus::ModifiedMohrCoulomb(
                ModifiedMohrCoulomb::new(800.0, 0.15, 0.1, 400.0, 0.95, 1.0, 1.1).unwrap(),
            ),
        ),
        (
            "hc",
            Locus::HosfordCoulomb(HosfordCoulomb::new(1.6, 0.9, 0.05, 0.1).unwrap()),
        ),
    ];
    let (e0, h0, t0, ok0) = fields(0.0);
    let (e1, h1, t1, _) = fields(0.01);
    let ok1 = vec![true; CELLS];
    // Cells undefined at row 0 stay unloaded (Δε̄p = 0) in the measured increment.
    let e1: Vec<f64> = e1
        .iter()
        .zip(&ok0)
        .map(|(e, ok)| if *ok { *e } else { 0.0 })
        .collect();
    let row0 = IncrementFields::new(0, &e0, &h0, &t0, &ok0).unwrap();
    let row1 = IncrementFields::new(1, &e1, &h1, &t1, &ok1).unwrap();
    let mut group = c.benchmark_group("update_cells");
    group.throughput(Throughput::Elements(CELLS as u64));
    for (id, locus) in &models {
        let mut start = vec![CellDamage::new(); CELLS];
        start_cells(locus, &row0, 0, &mut start).unwrap();
        for (rule_id, rule) in [
            ("linear", DamageRule::Linear),
            ("power2", DamageRule::PowerLaw { exponent: 2.0 }),
        ] {
            let mut cells = start.clone();
            group.bench_function(format!("{id}/{rule_id}/sequential"), |b| {
                b.iter(|| {
                    cells.copy_from_slice(&start);
                    update_cells(locus, rule, black_box(&row1), 0, &mut cells).unwrap();
                })
            });
            group.bench_function(format!("{id}/{rule_id}/rayon"), |b| {
                b.iter(|| {
                    cells.copy_from_slice(&start);
                    cells
                        .par_chunks_mut(CHUNK)
                        .enumerate()
                        .try_for_each(|(i, chunk)| {
                            let part = row1.window(i * CHUNK, chunk.len());
                            update_cells(locus, rule, black_box(&part), i * CHUNK, chunk)
                        })
                        .unwrap();
                })
            });
        }
    }
    group.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
