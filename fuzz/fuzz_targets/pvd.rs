//! Fuzz target: arbitrary bytes as a `.pvd` collection in a temporary folder that also holds
//! four valid increments (`steps/s0.vtu` .. `steps/s3.vtu`, copies of
//! fixtures/vtk/good/series_pvd) and a legacy file (`legacy.vtk`); the series is opened
//! and every array of every increment decoded.
#![no_main]

use libfuzzer_sys::fuzz_target;

#[path = "common/series.rs"]
mod series;

const FILES: &[(&str, &[u8])] = &[
    (
        "steps/s0.vtu",
        include_bytes!("../../fixtures/vtk/good/series_pvd/steps/s0.vtu"),
    ),
    (
        "steps/s1.vtu",
        include_bytes!("../../fixtures/vtk/good/series_pvd/steps/s1.vtu"),
    ),
    (
        "steps/s2.vtu",
        include_bytes!("../../fixtures/vtk/good/series_pvd/steps/s2.vtu"),
    ),
    (
        "steps/s3.vtu",
        include_bytes!("../../fixtures/vtk/good/series_pvd/steps/s3.vtu"),
    ),
    (
        "legacy.vtk",
        include_bytes!("../../fixtures/vtk/good/legacy_ascii_51.vtk"),
    ),
];

fuzz_target!(|data: &[u8]| {
    series::run("pvd", FILES, "input.pvd", data);
});
