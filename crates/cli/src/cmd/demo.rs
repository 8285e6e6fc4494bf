//! `ductrace demo [OUT_DIR]`: the bundled, invented campaign end to end.
//!
//! The campaign lives in the source tree (fixtures/campaign/): real CalculiX runs of invented
//! specimens of a fictional steel, with invented test results. The demo runs the whole job —
//! table → fit (Hosford–Coulomb with both objectives, modified Mohr–Coulomb) → damage check →
//! charts → report — writes everything to OUT_DIR and prints where it is.

use std::path::{Path, PathBuf};

use ductrace_campaign::Study;

use ductrace_locus::{ModelKind, Objective};

use crate::args::{CAUTION, DemoArgs};
use crate::cmd::{damage, fit, history, report, table};
use crate::failure::Failure;
use crate::locusfile;
use crate::output;

/// The bundled study, located from the source tree this binary was built from (the `..`
/// resolved, so messages and the report show the plain path).
pub fn bundled_study() -> PathBuf {
    let mut path = PathBuf::new();
    for c in Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("../../fixtures/campaign/study.toml")
        .components()
    {
        match c {
            std::path::Component::ParentDir => {
                path.pop();
            }
            other => path.push(other),
        }
    }
    path
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
    // Fits: the study's calibration points (average objective) and its histories (damage
    // objective, the better one for non-proportional paths).
    let mut fits = Vec::new();
    for (kind, objective, file) in [
        (
            ModelKind::HosfordCoulomb,
            Objective::Average,
            "fit-hc-average.json",
        ),
        (
            ModelKind::HosfordCoulomb,
            Objective::Damage,
            "fit-hc-damage.json",
        ),
        (
            ModelKind::ModifiedMohrCoulomb,
            Objective::Average,
            "fit-mmc-average.json",
        ),
    ] {
        let r = fit::fit_campaign(&campaign, kind, objective, &[], &[], true)?;
        let doc = locusfile::to_json(&r, &study_path.display().to_string());
        let text = serde_json::to_string_pretty(&doc)
            .map_err(|e| Failure::data(format!("cannot encode JSON: {e}")))?;
        write(file, &(text + "\n"))?;
        fits.push((file, fit::to_text(&r)));
    }
    let chosen = out.join("fit-hc-damage.json");
    // Damage check with the damage-objective fit, read back from the file just written.
    let (fit_json, locus) = report::read_fit(&chosen)?;
    let rule = ductrace_locus::DamageRule::Linear;
    let checks = damage::check_study(&campaign, &locus, rule);
    let dj = serde_json::to_string_pretty(&damage::study_json(&checks, rule))
        .map_err(|e| Failure::data(format!("cannot encode JSON: {e}")))?;
    write("damage.json", &(dj + "\n"))?;
    let damage_text = damage::study_text(&checks, rule);
    write("damage.txt", &damage_text)?;
    // Charts and the report.
    let plots = report::write_plots(&campaign, Some((&locus, &checks)), &out.join("plots"), true)?;
    let report_path = out.join("report.html");
    let html = report::report_html(
        &campaign,
        &fit_json,
        &locus,
        &checks,
        format!(
            "ductrace demo {}  (equivalently: ductrace report {} --locus {} -o {})",
            out.display(),
            study_path.display(),
            chosen.display(),
            report_path.display()
        ),
    )?;
    output::write_atomic(&report_path, html.as_bytes())?;
    written.push(report_path.clone());
    if !quiet {
        eprintln!("ductrace demo: {title}");
        eprintln!("INVENTED scenario: fictional material, specimens and test results.\n");
        eprint!("{table_text}");
        for (file, text) in &fits {
            eprintln!("\n{file}:\n{text}");
        }
        eprintln!("{damage_text}");
        eprintln!("\nwritten:");
        for p in &written {
            eprintln!("  {}", p.display());
        }
        eprintln!(
            "  {} ({} charts, SVG and PNG)",
            out.join("plots").display(),
            plots.len() / 2
        );
        eprintln!(
            "\nopen {} in a browser for the whole campaign.",
            report_path.display()
        );
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
