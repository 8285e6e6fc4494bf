//! Fuzz target: arbitrary bytes as a `.pvtu` file in a temporary folder that also holds
//! three valid pieces (`block_0.vtu` .. `block_2.vtu`, copies of fixtures/vtk/good/pvtu);
//! the result is opened and every array of every piece decoded.
#![no_main]

use libfuzzer_sys::fuzz_target;

#[path = "common/series.rs"]
mod series;

const PIECES: &[(&str, &[u8])] = &[
    (
        "block_0.vtu",
        include_bytes!("../../fixtures/vtk/good/pvtu/block_0.vtu"),
    ),
    (
        "block_1.vtu",
        include_bytes!("../../fixtures/vtk/good/pvtu/block_1.vtu"),
    ),
    (
        "block_2.vtu",
        include_bytes!("../../fixtures/vtk/good/pvtu/block_2.vtu"),
    ),
];

fuzz_target!(|data: &[u8]| {
    series::run("pvtu", PIECES, "input.pvtu", data);
});
