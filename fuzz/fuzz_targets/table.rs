//! Fuzz target: arbitrary bytes as a calibration table, read both as CSV and as JSON by the
//! reader of `ductrace fit TABLE` (`ductrace_cli::fuzz_table`).
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let _ = ductrace_cli::fuzz_table(data);
});
