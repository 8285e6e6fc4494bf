//! Fuzz target: arbitrary bytes as a VTK XML file (header parse, then every array decoded).
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let _ = ductrace_vtk::fuzz_xml(data);
});
