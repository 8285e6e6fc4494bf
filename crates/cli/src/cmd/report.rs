//! `ductrace report STUDY --locus FIT.json -o report.html` and `ductrace plot`: the
//! campaign's pictures, and one self-contained HTML file with the table, the fit, the
//! damage check and the charts.
//!
//! Both work on a campaign that has been run once ([`table::run_campaign`]) and, with a
//! locus, on its damage check ([`check_study`]), so the demo can share them.

use std::path::{Path, PathBuf};

use ductrace_campaign::Study;
use ductrace_locus::{DamageRule, Locus};
use serde_json::Value;

use crate::args::{PlotArgs, ReportArgs};
use crate::cmd::damage::{SpecimenDamage, check_study};
use crate::cmd::table::{self, Campaign};
use crate::cmd::visual;
use crate::failure::Failure;
use crate::locusfile;
use crate::output;

/// The damage check of every specimen: name and outcome.
pub type Checks = Vec<(String, Result<SpecimenDamage, String>)>;

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

/// Reads a fit file as JSON (for the report's fit section) and as a locus.
pub fn read_fit(path: &Path) -> Result<(Value, Locus), Failure> {
    let locus = locusfile::read(path)?;
    let json: Value = serde_json::from_str(
        &std::fs::read_to_string(path).map_err(|e| Failure::io(path, "read", e))?,
    )
    .map_err(|e| Failure::data(format!("{}: not JSON: {e}", path.display())))?;
    Ok((json, locus))
}

/// The HTML report of a campaign with its fit and damage check.
pub fn report_html(
    campaign: &Campaign,
    fit_json: &Value,
    locus: &Locus,
    checks: &Checks,
    command: String,
) -> Result<String, Failure> {
    let data = visual::report_data(
        campaign,
        Some(fit_json),
        Some(locus),
        Some(checks),
        is_invented(&campaign.study),
        command,
    )?;
    Ok(ductrace_plot::report::render(&data))
}

/// Runs `ductrace report`.
pub fn run(args: &ReportArgs, quiet: bool) -> Result<(), Failure> {
    let command = format!(
        "ductrace report {} --locus {} -o {}",
        args.study.display(),
        args.locus.display(),
        args.output.display()
    );
    let (fit_json, locus) = read_fit(&args.locus)?;
    let campaign = table::run_campaign(Study::load(&args.study)?, quiet);
    let checks = check_study(&campaign, &locus, DamageRule::Linear);
    let html = report_html(&campaign, &fit_json, &locus, &checks, command)?;
    output::emit(
        html.as_bytes(),
        Some(&args.output),
        &[&args.study, &args.locus],
    )?;
    if !quiet {
        eprintln!("ductrace: wrote {}", args.output.display());
    }
    Ok(())
}

/// Writes the charts of a campaign (and of a locus with its damage check, when given) into
/// a folder; returns the files written.
pub fn write_plots(
    campaign: &Campaign,
    fit: Option<(&Locus, &Checks)>,
    dir: &Path,
    png: bool,
) -> Result<Vec<PathBuf>, Failure> {
    std::fs::create_dir_all(dir).map_err(|e| Failure::io(dir, "create", e))?;
    let mut charts: Vec<(String, ductrace_plot::Chart)> = Vec::new();
    charts.push(("state-plane".into(), visual::plane_chart(campaign)?));
    for (name, c) in visual::path_charts(campaign)? {
        charts.push((format!("path-{name}"), c));
    }
    if let Some((locus, checks)) = fit {
        charts.push(("locus".into(), visual::locus_plot(campaign, locus)?));
        charts.push(("damage".into(), visual::damage_plot(checks)?));
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
    let campaign = table::run_campaign(Study::load(&args.study)?, quiet);
    let fit = match &args.locus {
        Some(p) => {
            let locus = locusfile::read(p)?;
            let checks = check_study(&campaign, &locus, DamageRule::Linear);
            Some((locus, checks))
        }
        None => None,
    };
    let written = write_plots(
        &campaign,
        fit.as_ref().map(|(l, c)| (l, c)),
        &args.output,
        args.png,
    )?;
    if !quiet {
        for p in &written {
            eprintln!("ductrace: wrote {}", p.display());
        }
    }
    Ok(())
}
