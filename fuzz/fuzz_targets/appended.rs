//! Fuzz target: arbitrary bytes as the appended data of a fixed header; the first byte picks
//! raw/base64, UInt32/UInt64 header, compressor, byte order and value type.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let _ = ductrace_vtk::fuzz_appended(data);
});
