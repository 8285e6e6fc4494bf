//! `ductrace table STUDY`: one calibration point per specimen.

use ductrace_campaign::{Point, SpecimenSpec, Study, StudyError};
use ductrace_track::History;
use rayon::prelude::*;
use serde_json::{Value, json};

use crate::args::TableArgs;
use crate::failure::Failure;
use crate::output::{self, Format};
use crate::progress;

/// The CSV columns of the table, in order.
pub const COLUMNS: [&str; 14] = [
    "specimen",
    "location",
    "id",
    "eqps_f",
    "triaxiality_avg",
    "lode_angle_param_avg",
    "triaxiality_f",
    "lode_angle_param_f",
    "stop_increment",
    "increments_integrated",
    "bridgman",
    "eps_f_area",
    "kind",
    "gauge_f",
];

/// The outcome of every specimen of a study, in file order.
pub struct Campaign {
    /// The study.
    pub study: Study,
    /// Per specimen, its history or its error.
    pub results: Vec<(SpecimenSpec, Result<History, StudyError>)>,
}

impl Campaign {
    /// The table rows of the specimens that succeeded.
    pub fn points(&self) -> Vec<Point> {
        self.results
            .iter()
            .filter_map(|(s, r)| r.as_ref().ok().map(|h| ductrace_campaign::point(s, h)))
            .collect()
    }

    /// The failures: specimen name and message (the message without the specimen's name,
    /// which the caller puts in front).
    pub fn failures(&self) -> Vec<(String, String)> {
        self.results
            .iter()
            .filter_map(|(s, r)| {
                r.as_ref().err().map(|e| {
                    let message = match e {
                        StudyError::Specimen { message, .. } => message.clone(),
                        other => other.to_string(),
                    };
                    (s.name.clone(), message)
                })
            })
            .collect()
    }
}

/// Evaluates every specimen of a study in parallel, with a progress bar.
pub fn run_campaign(study: Study, quiet: bool) -> Campaign {
    let pb = progress::bar(study.specimens.len() as u64, "specimens", quiet);
    let results: Vec<(SpecimenSpec, Result<History, StudyError>)> = study
        .specimens
        .par_iter()
        .map(|spec| {
            let r = guarded(&spec.name, || ductrace_campaign::evaluate(&study, spec));
            pb.inc(1);
            (spec.clone(), r)
        })
        .collect();
    pb.finish_and_clear();
    Campaign { study, results }
}

/// Runs one specimen's evaluation so that a panic (a bug) in it becomes that specimen's
/// failure instead of taking the other specimens' rows down with it.
fn guarded(
    name: &str,
    f: impl FnOnce() -> Result<History, StudyError>,
) -> Result<History, StudyError> {
    std::panic::catch_unwind(std::panic::AssertUnwindSafe(f)).unwrap_or_else(|payload| {
        let what = payload
            .downcast_ref::<&str>()
            .map(|s| s.to_string())
            .or_else(|| payload.downcast_ref::<String>().cloned())
            .unwrap_or_else(|| "unknown panic".to_string());
        Err(StudyError::Specimen {
            specimen: name.to_string(),
            message: format!("internal error while evaluating ({what}); please report it"),
        })
    })
}

fn values(p: &Point) -> Vec<String> {
    let n = output::num;
    vec![
        output::csv_field(&p.specimen),
        p.location.clone(),
        p.id.to_string(),
        n(Some(p.eqps_f)),
        n(p.triaxiality_avg),
        n(p.lode_angle_param_avg),
        n(p.triaxiality_f),
        n(p.lode_angle_param_f),
        n(Some(p.stop_increment)),
        p.increments_integrated.to_string(),
        n(p.bridgman),
        n(p.eps_f_area),
        p.kind.name().to_string(),
        n(p.gauge_f),
    ]
}

/// The table as CSV (failures as `#` comment lines at the end).
pub fn to_csv(c: &Campaign) -> String {
    let mut out = COLUMNS.join(",");
    out.push('\n');
    for p in c.points() {
        out.push_str(&values(&p).join(","));
        out.push('\n');
    }
    for (name, e) in c.failures() {
        out.push_str(&format!("# failed: {name}: {e}\n"));
    }
    out
}

fn opt(v: Option<f64>) -> Value {
    v.map_or(Value::Null, |x| json!(x))
}

/// The table as JSON: `{"title", "material", "rows": [...], "failed": [...]}`.
pub fn to_json(c: &Campaign) -> Value {
    let rows: Vec<Value> = c
        .points()
        .iter()
        .map(|p| {
            json!({
                "specimen": p.specimen,
                "location": p.location,
                "id": p.id,
                "eqps_f": p.eqps_f,
                "triaxiality_avg": opt(p.triaxiality_avg),
                "lode_angle_param_avg": opt(p.lode_angle_param_avg),
                "triaxiality_f": opt(p.triaxiality_f),
                "lode_angle_param_f": opt(p.lode_angle_param_f),
                "stop_increment": p.stop_increment,
                "increments_integrated": p.increments_integrated,
                "bridgman": opt(p.bridgman),
                "eps_f_area": opt(p.eps_f_area),
                "kind": p.kind.name(),
                "gauge_f": opt(p.gauge_f),
            })
        })
        .collect();
    json!({
        "title": c.study.title,
        "material": {
            "name": c.study.material.name,
            "hardening": c.study.material.hardening.map(|(a, n)| json!({"A": a, "n": n})),
        },
        "rule": "trapezoid",
        "rows": rows,
        "failed": c.failures().iter().map(|(n, e)| json!({"specimen": n, "error": e})).collect::<Vec<_>>(),
    })
}

/// The table as aligned text.
pub fn to_text(c: &Campaign) -> String {
    let d = |v: Option<f64>| output::num_text(v, 4);
    let rows: Vec<Vec<String>> = c
        .points()
        .iter()
        .map(|p| {
            vec![
                p.specimen.clone(),
                format!("{} {}", p.location, p.id),
                d(Some(p.eqps_f)),
                d(p.triaxiality_avg),
                d(p.lode_angle_param_avg),
                d(p.triaxiality_f),
                d(p.lode_angle_param_f),
                d(Some(p.stop_increment)),
                p.increments_integrated.to_string(),
                d(p.bridgman),
                d(p.eps_f_area),
            ]
        })
        .collect();
    let mut out = String::new();
    if let Some(t) = &c.study.title {
        out.push_str(&format!("{t}\n"));
    }
    out.push_str(&format!("material: {}\n\n", c.study.material.name));
    out.push_str(&output::table(
        &[
            "specimen",
            "at",
            "ε_f",
            "η_avg",
            "θ̄_avg",
            "η_f",
            "θ̄_f",
            "stop inc",
            "n",
            "Bridgman η",
            "ε_f area",
        ],
        &rows,
    ));
    out.push_str(
        "\nε_f: equivalent plastic strain at the fracture instant; η_avg, θ̄_avg: averages against it \
         (trapezoid rule); n: increments with plastic flow in the averages.\n",
    );
    for (name, e) in c.failures() {
        out.push_str(&format!("failed: {name}: {e}\n"));
    }
    out
}

/// Runs `ductrace table`.
pub fn run(args: &TableArgs, quiet: bool) -> Result<(), Failure> {
    let study = Study::load(&args.study)?;
    let inputs: Vec<std::path::PathBuf> = study
        .specimens
        .iter()
        .map(|s| study.result_path(s))
        .collect();
    let mut refs: Vec<&std::path::Path> = inputs.iter().map(|p| p.as_path()).collect();
    refs.push(&args.study);
    output::check_target(args.output.as_deref(), &refs)?;
    let campaign = run_campaign(study, quiet);
    let text = match args.format {
        Format::Csv => to_csv(&campaign),
        Format::Json => {
            let mut s = serde_json::to_string_pretty(&to_json(&campaign))
                .map_err(|e| Failure::data(format!("cannot encode JSON: {e}")))?;
            s.push('\n');
            s
        }
        Format::Text => to_text(&campaign),
    };
    output::emit(text.as_bytes(), args.output.as_deref(), &refs)?;
    let failures = campaign.failures();
    for (name, e) in &failures {
        eprintln!("ductrace: error: specimen {name}: {e}");
    }
    if failures.is_empty() {
        Ok(())
    } else {
        Err(Failure::data(format!(
            "{} of {} specimens failed",
            failures.len(),
            campaign.results.len()
        )))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_panicking_specimen_becomes_its_failure() {
        // (the default hook prints the panic on the test's stderr)
        let r = guarded("nrb-r4", || panic!("index out of bounds"));
        let e = r.err().map(|e| e.to_string()).unwrap_or_default();
        assert!(
            e.contains("nrb-r4") && e.contains("index out of bounds"),
            "{e}"
        );
    }
}
