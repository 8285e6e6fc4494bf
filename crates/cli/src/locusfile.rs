//! The fit file (`FIT.json`): what `ductrace fit` writes and `--locus FIT.json` reads.
//!
//! ```json
//! {"model": "jc"|"mmc"|"hc", "objective": "average"|"damage",
//!  "parameters": {"D1": .., ...}, "standard_errors": {"D1": ..|null, ...},
//!  "fixed": ["..."], "residuals": [{"specimen": .., "eqps_f": .., "model": ..|null}],
//!  "rms": .., "termination": "..", "converged": true, ...}
//! ```
//! Only `model` and `parameters` are needed to read a locus back.

use std::path::Path;

use ductrace_locus::{FitReport, Locus, ModelKind};
use serde_json::{Map, Value, json};

use crate::failure::Failure;

/// The JSON document of a fit report.
pub fn to_json(r: &FitReport, source: &str) -> Value {
    let mut params = Map::new();
    let mut errors = Map::new();
    let mut fixed = Vec::new();
    for p in &r.parameters {
        params.insert(p.name.to_string(), json!(p.value));
        errors.insert(
            p.name.to_string(),
            p.standard_error.map_or(Value::Null, |e| json!(e)),
        );
        if p.fixed {
            fixed.push(p.name);
        }
    }
    let residuals: Vec<Value> = r
        .points
        .iter()
        .map(|p| {
            let mut m = Map::new();
            m.insert("specimen".into(), json!(p.name));
            m.insert("eqps_f".into(), json!(p.eqps_test));
            m.insert(
                "model".into(),
                p.eqps_model.map_or(Value::Null, |v| json!(v)),
            );
            m.insert(
                "log_residual".into(),
                p.log_residual.map_or(Value::Null, |v| json!(v)),
            );
            if let Some(d) = p.damage_at_end {
                m.insert("damage_end".into(), json!(d));
            }
            Value::Object(m)
        })
        .collect();
    json!({
        "model": r.model.id(),
        "model_name": r.model.title(),
        "objective": r.objective.id(),
        "parameters": params,
        "standard_errors": errors,
        "fixed": fixed,
        "residuals": residuals,
        "rms": r.rms_log_residual,
        "residual_variance": r.residual_variance,
        "termination": r.termination,
        "converged": r.converged,
        "evaluations": r.total_evaluations,
        "starts": r.starts,
        "source": source,
        "residual_definition": "ln(eps_f model / eps_f test); for the damage objective ln(D at the fracture instant)",
    })
}

/// Reads a locus from a fit file.
pub fn read(path: &Path) -> Result<Locus, Failure> {
    let text = std::fs::read_to_string(path).map_err(|e| Failure::io(path, "read", e))?;
    let v: Value = serde_json::from_str(&text)
        .map_err(|e| Failure::data(format!("{}: not a fit file: {e}", path.display())))?;
    let model = v["model"].as_str().ok_or_else(|| {
        Failure::data(format!(
            "{}: no \"model\" key (expected jc, mmc or hc)",
            path.display()
        ))
    })?;
    let kind =
        ModelKind::from_id(model).map_err(|e| Failure::data(format!("{}: {e}", path.display())))?;
    let params = v["parameters"]
        .as_object()
        .ok_or_else(|| Failure::data(format!("{}: no \"parameters\" object", path.display())))?;
    let mut given = Vec::new();
    for (k, val) in params {
        let x = val.as_f64().ok_or_else(|| {
            Failure::data(format!(
                "{}: parameter {k} is not a number: {val}",
                path.display()
            ))
        })?;
        given.push((k.clone(), x));
    }
    Locus::from_parameters(kind, given)
        .map_err(|e| Failure::data(format!("{}: {e}", path.display())))
}
