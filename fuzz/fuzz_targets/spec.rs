//! Fuzz target: arbitrary bytes (as UTF-8 text) through the command line's small languages:
//! `str::parse` of `Selector` (--at), `Stop` (--until) and `GaugeSpec` (--gauge). Each
//! parse is checked to round-trip through its `Display` where it succeeds (`Selector`, `Stop`).
#![no_main]

use libfuzzer_sys::fuzz_target;

use ductrace_track::{GaugeSpec, Selector, Stop};

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    if let Ok(s) = text.parse::<Selector>() {
        assert_eq!(
            s.to_string().parse::<Selector>().ok(),
            Some(s.clone()),
            "{text:?}"
        );
    }
    if let Ok(s) = text.parse::<Stop>() {
        assert_eq!(s.to_string().parse::<Stop>().ok(), Some(s), "{text:?}");
    }
    let _ = text.parse::<GaugeSpec>();
});
