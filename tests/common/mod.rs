//! Shared helpers of the top-level integration tests.

#![allow(dead_code, clippy::unwrap_used)]

use std::path::PathBuf;

/// The bundled campaign's study file.
pub fn campaign_study() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("fixtures/campaign/study.toml")
}

/// The array names the bundled campaign's study maps for its results (the `fields` table of
/// its first specimen; every specimen uses the same), as command-line options such as
/// `--stress NAME --eqps NAME --displacement NAME`. The results keep the solver's own array
/// names; ductrace's detection uses general names only, so tests name them as the study does.
pub fn campaign_field_options() -> Vec<String> {
    let text = std::fs::read_to_string(campaign_study()).unwrap();
    let v: toml::Value = toml::from_str(&text).unwrap();
    let fields = v["specimen"][0]["fields"].as_table().unwrap();
    let mut out = Vec::new();
    for (key, value) in fields {
        out.push(format!("--{}", key.replace('_', "-")));
        out.push(value.as_str().unwrap().to_string());
    }
    out
}
