//! Fuzz target: arbitrary bytes (as UTF-8 text) as a study file, `Study::parse`; on success
//! every specimen's result path is resolved.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    if let Ok(study) =
        ductrace_campaign::Study::parse(text, std::path::Path::new("fuzz/study.toml"))
    {
        for s in &study.specimens {
            let _ = study.result_path(s);
        }
    }
});
