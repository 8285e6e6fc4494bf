//! `ductrace state`: the measures of one stress tensor.

use ductrace_tensor::{ComponentOrder, Stress};
use serde::Serialize;

use crate::args::StateArgs;
use crate::failure::Failure;
use crate::output::{self, Format};

/// The measures of one tensor as printed; `None` is null in JSON, empty in CSV, `—` in text.
#[derive(Debug, Serialize)]
struct StateRecord {
    /// Hydrostatic stress σ_h, input unit.
    sigma_h: f64,
    /// Von Mises stress σ_vm, input unit.
    sigma_vm: f64,
    /// Triaxiality η = σ_h/σ_vm.
    triaxiality: Option<f64>,
    /// Lode angle parameter θ̄.
    lode_angle_param: Option<f64>,
    /// Lode parameter μ.
    lode_param: Option<f64>,
    /// ξ = (27/2) J3/σ_vm³.
    xi: Option<f64>,
    /// [σ1, σ2, σ3], σ1 ≥ σ2 ≥ σ3, input unit.
    principal: [f64; 3],
}

/// Parses a comma-separated list of numbers.
pub fn parse_components(text: &str) -> Result<Vec<f64>, Failure> {
    text.split(',')
        .map(|t| {
            let t = t.trim();
            t.parse::<f64>().map_err(|_| {
                Failure::usage(format!("invalid stress component {t:?}: not a number"))
            })
        })
        .collect()
}

/// Runs `ductrace state`.
pub fn run(args: &StateArgs) -> Result<(), Failure> {
    let order: ComponentOrder = args
        .order
        .parse()
        .map_err(|e: ductrace_tensor::TensorError| Failure::usage(format!("--order: {e}")))?;
    let values = parse_components(&args.components)?;
    if values.len() != 6 && values.len() != 9 {
        return Err(Failure::usage(format!(
            "expected 6 or 9 stress components, got {}",
            values.len()
        )));
    }
    let stress = Stress::from_slice(&values, &order)?;
    let state = stress.state();
    let rec = StateRecord {
        sigma_h: state.sigma_h,
        sigma_vm: state.sigma_vm,
        triaxiality: state.triaxiality(),
        lode_angle_param: state.lode_angle_param(),
        lode_param: state.lode_param(),
        xi: state.xi(),
        principal: stress.principal(),
    };
    let text = match args.format {
        Format::Json => {
            let mut s = serde_json::to_string_pretty(&rec)
                .map_err(|e| Failure::data(format!("cannot encode JSON: {e}")))?;
            s.push('\n');
            s
        }
        Format::Csv => {
            let header = "sigma_h,sigma_vm,triaxiality,lode_angle_param,lode_param,xi,sigma_1,sigma_2,sigma_3\n";
            let row = [
                Some(rec.sigma_h),
                Some(rec.sigma_vm),
                rec.triaxiality,
                rec.lode_angle_param,
                rec.lode_param,
                rec.xi,
                Some(rec.principal[0]),
                Some(rec.principal[1]),
                Some(rec.principal[2]),
            ]
            .map(output::num)
            .join(",");
            format!("{header}{row}\n")
        }
        Format::Text => {
            let d = |v| output::num_text(v, 6);
            let mut rows = vec![
                vec!["hydrostatic stress σ_h".to_string(), d(Some(rec.sigma_h))],
                vec!["von Mises stress σ_vm".to_string(), d(Some(rec.sigma_vm))],
                vec!["triaxiality η".to_string(), d(rec.triaxiality)],
                vec![
                    "Lode angle parameter θ̄".to_string(),
                    d(rec.lode_angle_param),
                ],
                vec!["Lode parameter μ".to_string(), d(rec.lode_param)],
                vec!["ξ = cos 3θ".to_string(), d(rec.xi)],
            ];
            for (i, p) in rec.principal.iter().enumerate() {
                rows.push(vec![format!("principal σ{}", i + 1), d(Some(*p))]);
            }
            let mut s = output::table(&["measure", "value"], &rows);
            if let Some(u) = state.undefined() {
                s.push_str(&format!(
                    "note: {}: triaxiality and Lode measures are undefined\n",
                    u.describe()
                ));
            }
            s
        }
    };
    output::emit(text.as_bytes(), args.output.as_deref(), &[])
}
