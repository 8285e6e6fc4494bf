//! `ductrace demo [OUT_DIR]`: the bundled, invented campaign end to end.
//!
//! The campaign lives in the source tree (fixtures/campaign/): real CalculiX runs of invented
//! specimens of a fictional steel, with invented test results. The demo writes the campaign
//! table and each specimen's critical-point history to OUT_DIR and prints where they are.

use std::path::{Path, PathBuf};

use ductrace_campaign::Study;

use crate::args::{CAUTION, DemoArgs};
use crate::cmd::{history, table};
use crate::failure::Failure;
use crate::output;

/// The bundled study, located from the source tree this binary was built from.
pub fn bundled_study() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("../../fixtures/campaign/study.toml")
        .components()
        .collect()
}

/// Prepares the output folder: created if missing; an existing non-empty one is refused
/// unless `force`.
pub fn prepare_out_dir(dir: &Path, force: bool) -> Result<(), Failure> {
    if dir.exists() {
        if !dir.is_dir() {
            return Err(Failure::usage(format!(
                "{}: exists and is not a folder",
                dir.display()
            )));
        }
        let non_empty = std::fs::read_dir(dir)
            .map_err(|e| Failure::io(dir, "read", e))?
            .next()
            .is_some();
        if non_empty && !force {
            return Err(Failure::usage(format!(
                "{}: folder exists and is not empty; use --force to write into it",
                dir.display()
            )));
        }
    }
    std::fs::create_dir_all(dir).map_err(|e| Failure::io(dir, "create", e))
}

/// Runs `ductrace demo`.
pub fn run(args: &DemoArgs, quiet: bool) -> Result<(), Failure> {
    let study_path = args.study.clone().unwrap_or_else(bundled_study);
    if !study_path.exists() {
        return Err(Failure::data(format!(
            "{}: the bundled study is not there (the demo runs from a source checkout); name a study with --study",
            study_path.display()
        )));
    }
    prepare_out_dir(&args.out_dir, args.force)?;
    let study = Study::load(&study_path)?;
    let title = study.title.clone().unwrap_or_else(|| "campaign".into());
    let campaign = table::run_campaign(study, quiet);
    let out = &args.out_dir;
    let mut written = Vec::new();
    let mut write = |name: &str, text: &str| -> Result<(), Failure> {
        let p = out.join(name);
        output::write_atomic(&p, text.as_bytes())?;
        written.push(p);
        Ok(())
    };
    write("table.csv", &table::to_csv(&campaign))?;
    let json = serde_json::to_string_pretty(&table::to_json(&campaign))
        .map_err(|e| Failure::data(format!("cannot encode JSON: {e}")))?;
    write("table.json", &(json + "\n"))?;
    let table_text = table::to_text(&campaign);
    write("table.txt", &table_text)?;
    let hist_dir = out.join("histories");
    std::fs::create_dir_all(&hist_dir).map_err(|e| Failure::io(&hist_dir, "create", e))?;
    for (spec, result) in &campaign.results {
        if let Ok(h) = result {
            let with_gauge = spec.gauge.is_some();
            write(
                &format!("histories/{}.csv", spec.name),
                &history::to_csv(h, with_gauge),
            )?;
        }
    }
    if !quiet {
        eprintln!("ductrace demo: {title}");
        eprintln!("INVENTED scenario: fictional material, specimens and test results.\n");
        eprint!("{table_text}");
        eprintln!("\nwritten:");
        for p in &written {
            eprintln!("  {}", p.display());
        }
        eprintln!("\n{CAUTION}");
    }
    let failures = campaign.failures();
    if failures.is_empty() {
        Ok(())
    } else {
        for (name, e) in &failures {
            eprintln!("ductrace: error: specimen {name}: {e}");
        }
        Err(Failure::data(format!(
            "{} specimens failed",
            failures.len()
        )))
    }
}
