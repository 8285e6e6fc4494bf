//! `ductrace report STUDY --locus FIT.json -o report.html` and `ductrace plot`: the
//! campaign's pictures, and one self-contained HTML file with the table, the fit, the
//! damage check and the charts.

use std::path::Path;

use ductrace_campaign::Study;
use ductrace_locus::DamageRule;
use ductrace_track::History;

use crate::args::{PlotArgs, ReportArgs};
use crate::cmd::damage::check_study;
use crate::cmd::{table, visual};
use crate::failure::Failure;
use crate::locusfile;
use crate::output;

/// True when the study says it is invented (its title or material name does).
pub fn is_invented(study: &Study) -> bool {
    let text = format!(
        "{} {}",
        study.title.clone().unwrap_or_default(),
        study.material.name
    )
    .to_ascii_lowercase();
    text.contains("invented")
}

fn histories(c: &table::Campaign) -> Vec<(String, Result<History, String>)> {
    c.results
        .iter()
        .map(|(s, r)| {
            (
                s.name.clone(),
                match r {
                    Ok(h) => Ok(h.clone()),
                    Err(e) => Err(e.to_string()),
                },
            )
        })
        .collect()
}

/// Writes the HTML report of a study with a fit file.
pub fn write_report(
    study_path: &Path,
    fit_path: &Path,
    out: &Path,
    quiet: bool,
    command: String,
) -> Result<(), Failure> {
    let study = Study::load(study_path)?;
    let locus = locusfile::read(fit_path)?;
    let fit_json: serde_json::Value = serde_json::from_str(
        &std::fs::read_to_string(fit_path).map_err(|e| Failure::io(fit_path, "read", e))?,
    )
    .map_err(|e| Failure::data(format!("{}: not JSON: {e}", fit_path.display())))?;
    let invented = is_invented(&study);
    let campaign = table::run_campaign(study.clone(), quiet);
    let checks = check_study(&study, &histories(&campaign), &locus, DamageRule::Linear);
    let data = visual::report_data(
        &campaign,
        Some(&fit_json),
        Some(&locus),
        Some(&checks),
        invented,
        command,
    )?;
    let html = ductrace_plot::report::render(&data);
    output::emit(html.as_bytes(), Some(out), &[study_path, fit_path])
}

/// Runs `ductrace report`.
pub fn run(args: &ReportArgs, quiet: bool) -> Result<(), Failure> {
    let command = format!(
        "ductrace report {} --locus {} -o {}",
        args.study.display(),
        args.locus.display(),
        args.output.display()
    );
    write_report(&args.study, &args.locus, &args.output, quiet, command)?;
    if !quiet {
        eprintln!("ductrace: wrote {}", args.output.display());
    }
    Ok(())
}

/// Writes the charts of a study (and of a fit, when given) into a folder; returns the
/// files written.
pub fn write_plots(
    study_path: &Path,
    fit_path: Option<&Path>,
    dir: &Path,
    png: bool,
    quiet: bool,
) -> Result<Vec<std::path::PathBuf>, Failure> {
    let study = Study::load(study_path)?;
    let campaign = table::run_campaign(study.clone(), quiet);
    std::fs::create_dir_all(dir).map_err(|e| Failure::io(dir, "create", e))?;
    let mut charts: Vec<(String, ductrace_plot::Chart)> = Vec::new();
    charts.push(("state-plane".into(), visual::plane_chart(&campaign)?));
    for (name, c) in visual::path_charts(&campaign)? {
        charts.push((format!("path-{name}"), c));
    }
    if let Some(fp) = fit_path {
        let locus = locusfile::read(fp)?;
        charts.push(("locus".into(), visual::locus_plot(&campaign, &locus)?));
        let checks = check_study(&study, &histories(&campaign), &locus, DamageRule::Linear);
        charts.push(("damage".into(), visual::damage_plot(&checks)?));
    }
    let mut written = Vec::new();
    for (name, chart) in &charts {
        let p = dir.join(format!("{name}.svg"));
        output::write_atomic(&p, chart.svg.as_bytes())?;
        written.push(p);
        if png {
            let bytes = chart
                .png(1200, 780)
                .map_err(|e| Failure::data(format!("{name} chart: {e}")))?;
            let p = dir.join(format!("{name}.png"));
            output::write_atomic(&p, &bytes)?;
            written.push(p);
        }
    }
    Ok(written)
}

/// Runs `ductrace plot`.
pub fn run_plot(args: &PlotArgs, quiet: bool) -> Result<(), Failure> {
    let written = write_plots(
        &args.study,
        args.locus.as_deref(),
        &args.output,
        args.png,
        quiet,
    )?;
    if !quiet {
        for p in &written {
            eprintln!("ductrace: wrote {}", p.display());
        }
    }
    Ok(())
}
