//! `ductrace fit TABLE|STUDY --model MODEL`: a fracture locus from the calibration points.

use std::path::Path;

use ductrace_campaign::Study;
use ductrace_locus::{
    CalibrationPoint, FitReport, FitSpec, LocusError, ModelKind, Objective, SpecimenPath,
    fit_average, fit_damage,
};
use ductrace_track::History;
use serde_json::Value;

use crate::args::{FitArgs, ObjectiveArg};
use crate::cmd::table::{self, Campaign};
use crate::failure::Failure;
use crate::locusfile;
use crate::output::{self, Format};

/// The path of a history up to its stop: the rows through the increment at or before the
/// stop, then the interpolated stop itself (the fracture instant is the last row).
pub fn path_to_stop(name: &str, h: &History) -> SpecimenPath {
    let mut eqps: Vec<f64> = h.rows.iter().map(|r| r.eqps).collect();
    let mut eta: Vec<Option<f64>> = h.rows.iter().map(|r| r.triaxiality).collect();
    let mut theta: Vec<Option<f64>> = h.rows.iter().map(|r| r.lode_angle_param).collect();
    let s = &h.summary;
    if s.stop_increment > (h.rows.len() - 1) as f64 {
        eqps.push(s.eqps);
        eta.push(s.triaxiality);
        theta.push(s.lode_angle_param);
    }
    SpecimenPath {
        name: name.to_string(),
        eqps,
        triaxiality: eta,
        lode_angle_param: theta,
    }
}

/// Calibration points and, when the file has it, the hardening (A, n).
type TableInput = (Vec<CalibrationPoint>, Option<(f64, f64)>);

/// Calibration points and hardening read from a table file (CSV or JSON as `table` writes).
fn read_table(path: &Path) -> Result<TableInput, Failure> {
    let text = std::fs::read_to_string(path).map_err(|e| Failure::io(path, "read", e))?;
    let is_json = path
        .extension()
        .is_some_and(|e| e.eq_ignore_ascii_case("json"));
    parse_table(&text, is_json, &path.display().to_string())
}

/// Parses table text (CSV, or JSON when `is_json`); `name` names the file in messages.
pub fn parse_table(text: &str, is_json: bool, name: &str) -> Result<TableInput, Failure> {
    let bad = |m: String| Failure::data(format!("{name}: {m}"));
    if is_json {
        let v: Value = serde_json::from_str(text).map_err(|e| bad(format!("not JSON: {e}")))?;
        let rows = v["rows"]
            .as_array()
            .or_else(|| v.as_array())
            .ok_or_else(|| bad("no \"rows\" array".into()))?;
        let mut points = Vec::new();
        for (i, r) in rows.iter().enumerate() {
            let num = |k: &str| {
                r[k].as_f64()
                    .ok_or_else(|| bad(format!("row {i}: {k} is missing or not a number")))
            };
            points.push(CalibrationPoint {
                name: r["specimen"]
                    .as_str()
                    .map(str::to_string)
                    .unwrap_or_else(|| format!("row {i}")),
                eqps_f: num("eqps_f")?,
                triaxiality_avg: num("triaxiality_avg")?,
                lode_angle_param_avg: num("lode_angle_param_avg")?,
            });
        }
        let hardening = match (
            v["material"]["hardening"]["A"].as_f64(),
            v["material"]["hardening"]["n"].as_f64(),
        ) {
            (Some(a), Some(n)) => Some((a, n)),
            _ => None,
        };
        return Ok((points, hardening));
    }
    let mut reader = csv::ReaderBuilder::new()
        .comment(Some(b'#'))
        .trim(csv::Trim::All)
        .from_reader(text.as_bytes());
    let headers = reader
        .headers()
        .map_err(|e| bad(format!("cannot read the CSV header: {e}")))?
        .clone();
    let col = |name: &str| {
        headers
            .iter()
            .position(|h| h == name)
            .ok_or_else(|| bad(format!("no column {name:?} (needed: specimen, eqps_f, triaxiality_avg, lode_angle_param_avg)")))
    };
    let (cs, ce, ct, cl) = (
        col("specimen")?,
        col("eqps_f")?,
        col("triaxiality_avg")?,
        col("lode_angle_param_avg")?,
    );
    let mut points = Vec::new();
    for (i, rec) in reader.records().enumerate() {
        let rec = rec.map_err(|e| bad(format!("line {}: {e}", i + 2)))?;
        let num = |c: usize, what: &str| -> Result<f64, Failure> {
            let t = rec.get(c).unwrap_or("");
            t.parse::<f64>().map_err(|_| {
                bad(format!(
                    "row {} ({}): {what} {t:?} is not a number",
                    i + 1,
                    rec.get(cs).unwrap_or("?")
                ))
            })
        };
        points.push(CalibrationPoint {
            name: rec.get(cs).unwrap_or("").to_string(),
            eqps_f: num(ce, "eqps_f")?,
            triaxiality_avg: num(ct, "triaxiality_avg")?,
            lode_angle_param_avg: num(cl, "lode_angle_param_avg")?,
        });
    }
    Ok((points, None))
}

/// Parses `NAME=VALUE`.
fn name_value(text: &str) -> Result<(String, f64), Failure> {
    let (n, v) = text
        .split_once('=')
        .ok_or_else(|| Failure::usage(format!("--fix {text:?}: expected NAME=VALUE")))?;
    let v: f64 = v
        .trim()
        .parse()
        .map_err(|_| Failure::usage(format!("--fix {text:?}: {v:?} is not a number")))?;
    Ok((n.trim().to_string(), v))
}

/// The fit specification: model defaults, hardening for MMC, the user's `--fix`/`--free`.
pub fn spec(
    kind: ModelKind,
    hardening: Option<(f64, f64)>,
    fix: &[String],
    free: &[String],
) -> Result<FitSpec, Failure> {
    let mut spec = FitSpec::new(kind);
    let loc = |e: LocusError| Failure::usage(e.to_string());
    if kind == ModelKind::ModifiedMohrCoulomb
        && let Some((a, n)) = hardening
    {
        spec.fix("A", a).map_err(loc)?;
        spec.fix("n", n).map_err(loc)?;
    }
    for f in fix {
        for part in f.split(',') {
            let (n, v) = name_value(part)?;
            spec.fix(&n, v).map_err(loc)?;
        }
    }
    for f in free {
        match f.split_once('=') {
            Some(_) => {
                let (n, v) = name_value(f)?;
                spec.free(&n, Some(v)).map_err(loc)?;
            }
            None => {
                spec.free(f.trim(), None).map_err(loc)?;
            }
        }
    }
    if kind == ModelKind::ModifiedMohrCoulomb
        && spec
            .parameters()
            .iter()
            .any(|p| (p.name == "A" || p.name == "n") && !p.free && p.value.is_none())
    {
        return Err(Failure::usage(
            "the modified Mohr–Coulomb model needs the hardening A and n: give them in the study's \
             [material] hardening, in the table's JSON, or with --fix A=...,n=...",
        ));
    }
    Ok(spec)
}

/// For the modified Mohr–Coulomb model, c_theta_c acts only where θ̄ < 0: when no specimen
/// reaches θ̄ < 0 it cannot be identified, so unless the user freed it, it is fixed at 1
/// and a note says so. Returns the note.
fn pin_unidentifiable(
    spec: &mut FitSpec,
    thetas: &[f64],
    free: &[String],
) -> Result<Option<String>, Failure> {
    if spec.model() != ModelKind::ModifiedMohrCoulomb
        || thetas.iter().any(|&t| t < 0.0)
        || free
            .iter()
            .any(|f| f.split('=').next().map(str::trim) == Some("c_theta_c"))
        || spec
            .parameters()
            .iter()
            .any(|p| p.name == "c_theta_c" && !p.free)
    {
        return Ok(None);
    }
    spec.fix("c_theta_c", 1.0)
        .map_err(|e| Failure::usage(e.to_string()))?;
    Ok(Some(
        "c_theta_c fixed at 1: no specimen reaches a Lode angle parameter below 0, where it acts \
         (free it with --free c_theta_c to override)"
            .to_string(),
    ))
}

/// The best attempt of a fit that did not converge is still worth showing; `run` exits 1
/// after printing it.
fn settle(result: Result<FitReport, LocusError>, input: &Path) -> Result<FitReport, Failure> {
    match result {
        Ok(r) => Ok(r),
        Err(LocusError::NotConverged(best)) => Ok(*best),
        Err(e) => Err(Failure::data(format!("{}: {e}", input.display()))),
    }
}

/// Fits a campaign that has been run (either objective); every specimen must have succeeded.
pub fn fit_campaign(
    campaign: &Campaign,
    kind: ModelKind,
    objective: Objective,
    fix: &[String],
    free: &[String],
    quiet: bool,
) -> Result<FitReport, Failure> {
    if let Some((name, e)) = campaign.failures().first() {
        return Err(Failure::data(format!(
            "specimen {name} failed, so the campaign cannot be fitted: {e}"
        )));
    }
    let mut spec = spec(kind, campaign.study.material.hardening, fix, free)?;
    let thetas: Vec<f64> = match objective {
        Objective::Average => campaign
            .points()
            .iter()
            .filter_map(|p| p.lode_angle_param_avg)
            .collect(),
        Objective::Damage => campaign
            .results
            .iter()
            .filter_map(|(_, r)| r.as_ref().ok())
            .flat_map(|h| h.rows.iter().filter_map(|r| r.lode_angle_param))
            .collect(),
    };
    if let Some(note) = pin_unidentifiable(&mut spec, &thetas, free)?
        && !quiet
    {
        eprintln!("ductrace: {note}");
    }
    let result = match objective {
        Objective::Average => {
            let points: Vec<CalibrationPoint> = campaign
                .points()
                .iter()
                .map(|p| {
                    Ok(CalibrationPoint {
                        name: p.specimen.clone(),
                        eqps_f: p.eqps_f,
                        triaxiality_avg: p.triaxiality_avg.ok_or_else(|| {
                            Failure::data(format!(
                                "specimen {}: no plastic strain before the stop, no average",
                                p.specimen
                            ))
                        })?,
                        lode_angle_param_avg: p.lode_angle_param_avg.unwrap_or(0.0),
                    })
                })
                .collect::<Result<_, Failure>>()?;
            fit_average(&spec, &points)
        }
        Objective::Damage => {
            let paths: Vec<SpecimenPath> = campaign
                .results
                .iter()
                .filter_map(|(s, r)| r.as_ref().ok().map(|h| path_to_stop(&s.name, h)))
                .collect();
            fit_damage(&spec, &paths)
        }
    };
    settle(result, &campaign.study.path)
}

/// Runs a fit on a study (either objective) or a table (average objective).
pub fn fit_input(
    input: &Path,
    kind: ModelKind,
    objective: Objective,
    fix: &[String],
    free: &[String],
    quiet: bool,
) -> Result<FitReport, Failure> {
    let is_study = input
        .extension()
        .is_some_and(|e| e.eq_ignore_ascii_case("toml"));
    if is_study {
        let campaign = table::run_campaign(Study::load(input)?, quiet);
        return fit_campaign(&campaign, kind, objective, fix, free, quiet);
    }
    if objective == Objective::Damage {
        return Err(Failure::usage(
            "--objective damage needs the specimens' histories: give the study file, not a table",
        ));
    }
    let (points, hardening) = read_table(input)?;
    let mut spec = spec(kind, hardening, fix, free)?;
    let thetas: Vec<f64> = points.iter().map(|p| p.lode_angle_param_avg).collect();
    if let Some(note) = pin_unidentifiable(&mut spec, &thetas, free)?
        && !quiet
    {
        eprintln!("ductrace: {note}");
    }
    settle(fit_average(&spec, &points), input)
}

/// The fit as text.
pub fn to_text(r: &FitReport) -> String {
    let d = |v: Option<f64>| output::num_text(v, 5);
    let mut out = format!(
        "{} fitted with the {} objective\n\n",
        r.model.title(),
        r.objective.id()
    );
    let rows: Vec<Vec<String>> = r
        .parameters
        .iter()
        .map(|p| {
            vec![
                p.name.to_string(),
                d(Some(p.value)),
                if p.fixed {
                    "fixed".to_string()
                } else {
                    d(p.standard_error)
                },
            ]
        })
        .collect();
    out.push_str(&output::table(
        &["parameter", "value", "standard error"],
        &rows,
    ));
    out.push('\n');
    let rows: Vec<Vec<String>> = r
        .points
        .iter()
        .map(|p| {
            vec![
                p.name.clone(),
                d(Some(p.eqps_test)),
                d(p.eqps_model),
                d(p.damage_at_end),
                d(p.log_residual),
            ]
        })
        .collect();
    out.push_str(&output::table(
        &[
            "specimen",
            "ε_f test",
            "ε_f model",
            "D at fracture",
            "ln residual",
        ],
        &rows,
    ));
    out.push_str(&format!(
        "\nRMS of log residuals {}; {} ({} evaluations, {} starts)\n",
        d(Some(r.rms_log_residual)),
        r.termination,
        r.total_evaluations,
        r.starts
    ));
    out
}

/// Runs `ductrace fit`.
pub fn run(args: &FitArgs, quiet: bool) -> Result<(), Failure> {
    let kind = ModelKind::from_id(&args.model).map_err(|e| Failure::usage(e.to_string()))?;
    let objective = match args.objective {
        ObjectiveArg::Average => Objective::Average,
        ObjectiveArg::Damage => Objective::Damage,
    };
    output::check_target(args.output.as_deref(), &[&args.input])?;
    let report = fit_input(&args.input, kind, objective, &args.fix, &args.free, quiet)?;
    let text = match args.format {
        Format::Json | Format::Csv => {
            if args.format == Format::Csv {
                return Err(Failure::usage("fit writes text or json, not csv"));
            }
            let doc = locusfile::to_json(&report, &args.input.display().to_string());
            let mut s = serde_json::to_string_pretty(&doc)
                .map_err(|e| Failure::data(format!("cannot encode JSON: {e}")))?;
            s.push('\n');
            s
        }
        Format::Text => to_text(&report),
    };
    output::emit(text.as_bytes(), args.output.as_deref(), &[&args.input])?;
    if report.converged {
        Ok(())
    } else {
        Err(Failure::data(format!(
            "{}: the fit did not converge ({}); the data may not determine the model's parameters \
             (a triaxiality-only model such as jc cannot follow Lode-angle effects): look at the \
             residuals, fix a parameter or try another model",
            args.input.display(),
            report.termination
        )))
    }
}
