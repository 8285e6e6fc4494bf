//! Charts and the report from a campaign: the conversion from ductrace's results to the
//! plain data of the plot crate.

use ductrace_locus::{FractureLocus, Locus, ModelKind};
use ductrace_plot::report::{
    DamageRow, DamageSection, FitSection, Footer, JobSection, ParameterRow, ReportCharts,
    ReportData, ResidualKind, ResidualRow, TableRow,
};
use ductrace_plot::{
    Chart, DamageSeries, LocusChartData, LocusCurve, LocusPoint, NamedPath, PathData, damage_chart,
    locus_chart, path_chart, state_plane_chart,
};
use serde_json::Value;

use crate::cmd::damage::SpecimenDamage;
use crate::cmd::table::Campaign;
use crate::failure::Failure;

fn plot_err(what: &str) -> impl Fn(ductrace_plot::PlotError) -> Failure + '_ {
    move |e| Failure::data(format!("{what} chart: {e}"))
}

/// One path chart per specimen that succeeded.
pub fn path_charts(c: &Campaign) -> Result<Vec<(String, Chart)>, Failure> {
    let mut out = Vec::new();
    for (spec, r) in &c.results {
        let Ok(h) = r else { continue };
        let mut eqps: Vec<f64> = h.rows.iter().map(|r| r.eqps).collect();
        let mut eta: Vec<Option<f64>> = h.rows.iter().map(|r| r.triaxiality).collect();
        let mut theta: Vec<Option<f64>> = h.rows.iter().map(|r| r.lode_angle_param).collect();
        if h.summary.stop_increment > (h.rows.len() - 1) as f64 {
            eqps.push(h.summary.eqps);
            eta.push(h.summary.triaxiality);
            theta.push(h.summary.lode_angle_param);
        }
        let chart = path_chart(&PathData {
            name: spec.name.clone(),
            eqps,
            triaxiality: eta,
            lode_angle_param: theta,
            triaxiality_avg: h.summary.triaxiality_avg,
            lode_angle_param_avg: h.summary.lode_angle_param_avg,
            eqps_f: h.summary.eqps,
        })
        .map_err(plot_err(&spec.name))?;
        out.push((spec.name.clone(), chart));
    }
    Ok(out)
}

/// All paths in the (η, θ̄) plane.
pub fn plane_chart(c: &Campaign) -> Result<Chart, Failure> {
    let paths: Vec<NamedPath> = c
        .results
        .iter()
        .filter_map(|(s, r)| r.as_ref().ok().map(|h| (s, h)))
        .map(|(s, h)| NamedPath {
            name: s.name.clone(),
            triaxiality: h.rows.iter().map(|r| r.triaxiality).collect(),
            lode_angle_param: h.rows.iter().map(|r| r.lode_angle_param).collect(),
            triaxiality_avg: h.summary.triaxiality_avg,
            lode_angle_param_avg: h.summary.lode_angle_param_avg,
        })
        .collect();
    state_plane_chart(&paths).map_err(plot_err("state plane"))
}

/// The fitted locus against η — one curve for Johnson–Cook, slices at θ̄ = −1, 0, 1
/// otherwise — with the calibration points and, where a band was asked for, their ranges.
pub fn locus_plot(c: &Campaign, locus: &Locus) -> Result<Chart, Failure> {
    let points: Vec<LocusPoint> = c
        .results
        .iter()
        .filter_map(|(s, r)| r.as_ref().ok().map(|h| (s, h)))
        .filter_map(|(s, h)| {
            let eta = h.summary.triaxiality_avg?;
            let band = h.band.as_ref();
            Some(LocusPoint {
                label: s.name.clone(),
                triaxiality: eta,
                eqps_f: h.summary.eqps,
                triaxiality_band: band
                    .and_then(|b| b.triaxiality_avg)
                    .map(|[lo, hi]| (lo, hi)),
                eqps_f_band: band.and_then(|b| b.eqps).map(|[lo, hi]| (lo, hi)),
            })
        })
        .collect();
    let hi = points
        .iter()
        .map(|p| p.triaxiality_band.map_or(p.triaxiality, |b| b.1))
        .fold(2.0 / 3.0, f64::max)
        + 0.25;
    let lo = -1.0 / 3.0;
    let n = 240;
    let sample = |theta: f64| -> Vec<(f64, f64)> {
        (0..=n)
            .filter_map(|i| {
                let eta = lo + (hi - lo) * i as f64 / n as f64;
                locus.fracture_strain(eta, theta).map(|e| (eta, e))
            })
            .collect()
    };
    let kind = locus.kind();
    let curves = if kind == ModelKind::JohnsonCook {
        vec![LocusCurve {
            label: "Johnson–Cook".into(),
            points: sample(0.0),
        }]
    } else {
        [(-1.0, "θ̄ = −1"), (0.0, "θ̄ = 0"), (1.0, "θ̄ = +1")]
            .iter()
            .map(|&(t, label)| LocusCurve {
                label: label.into(),
                points: sample(t),
            })
            .collect()
    };
    locus_chart(&LocusChartData {
        title: format!("Fracture locus: {}", kind.title()),
        curves,
        points,
    })
    .map_err(plot_err("locus"))
}

/// D against gauge elongation per specimen.
pub fn damage_plot(checks: &[(String, Result<SpecimenDamage, String>)]) -> Result<Chart, Failure> {
    let series: Vec<DamageSeries> = checks
        .iter()
        .filter_map(|(_, r)| r.as_ref().ok())
        .map(|d| DamageSeries {
            label: d.specimen.clone(),
            points: d.curve.clone(),
            measured_gauge_f: d.gauge_measured,
        })
        .collect();
    damage_chart(&series).map_err(plot_err("damage"))
}

/// Seconds since the epoch as `YYYY-MM-DD HH:MM UTC` (proleptic Gregorian calendar;
/// days-from-civil inverse after H. Hinnant's public-domain algorithm).
pub fn utc_now() -> String {
    let secs = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map(|d| d.as_secs() as i64)
        .unwrap_or(0);
    let days = secs.div_euclid(86_400);
    let rem = secs.rem_euclid(86_400);
    let z = days + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z - era * 146_097;
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let y = yoe + era * 400;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = doy - (153 * mp + 2) / 5 + 1;
    let m = if mp < 10 { mp + 3 } else { mp - 9 };
    let y = if m <= 2 { y + 1 } else { y };
    format!(
        "{y:04}-{m:02}-{d:02} {:02}:{:02} UTC",
        rem / 3600,
        (rem % 3600) / 60
    )
}

/// The fit section of a report from a fit file's JSON (what `ductrace fit --format json`
/// writes).
pub fn fit_section(v: &Value) -> FitSection {
    let names: Vec<String> = v["parameters"]
        .as_object()
        .map(|m| m.keys().cloned().collect())
        .unwrap_or_default();
    let fixed: Vec<&str> = v["fixed"]
        .as_array()
        .map(|a| a.iter().filter_map(Value::as_str).collect())
        .unwrap_or_default();
    // Keep the model's canonical parameter order when the model is known.
    let order: Vec<String> = v["model"]
        .as_str()
        .and_then(|m| ModelKind::from_id(m).ok())
        .map(|k| k.parameter_names().iter().map(|s| s.to_string()).collect())
        .unwrap_or(names);
    FitSection {
        model: v["model_name"]
            .as_str()
            .or(v["model"].as_str())
            .unwrap_or("?")
            .to_string(),
        objective: v["objective"].as_str().unwrap_or("?").to_string(),
        residual_kind: if v["objective"].as_str() == Some("damage") {
            ResidualKind::Damage
        } else {
            ResidualKind::LogRatio
        },
        parameters: order
            .iter()
            .filter_map(|n| {
                Some(ParameterRow {
                    name: n.clone(),
                    value: v["parameters"][n].as_f64()?,
                    standard_error: v["standard_errors"][n].as_f64(),
                    fixed: fixed.contains(&n.as_str()),
                    unit: (n == "A").then(|| "stress unit of the results".to_string()),
                })
            })
            .collect(),
        residuals: v["residuals"]
            .as_array()
            .map(|a| {
                a.iter()
                    .map(|r| ResidualRow {
                        specimen: r["specimen"].as_str().unwrap_or("?").to_string(),
                        eqps_test: r["eqps_f"].as_f64().unwrap_or(0.0),
                        eqps_model: r["model"].as_f64(),
                        log_residual: r["log_residual"].as_f64(),
                    })
                    .collect()
            })
            .unwrap_or_default(),
        rms_log_residual: v["rms"].as_f64().unwrap_or(0.0),
        termination: v["termination"].as_str().unwrap_or("").to_string(),
        converged: v["converged"].as_bool().unwrap_or(false),
    }
}

/// The report's data from a campaign, an optional fit (its JSON) with its locus, and an
/// optional damage check.
pub fn report_data(
    c: &Campaign,
    fit: Option<&Value>,
    locus: Option<&Locus>,
    checks: Option<&[(String, Result<SpecimenDamage, String>)]>,
    invented: bool,
    command: String,
) -> Result<ReportData, Failure> {
    let table = c
        .points()
        .into_iter()
        .map(|p| TableRow {
            specimen: p.specimen,
            eqps_f: p.eqps_f,
            triaxiality_avg: p.triaxiality_avg,
            lode_angle_param_avg: p.lode_angle_param_avg,
            triaxiality_f: p.triaxiality_f,
            lode_angle_param_f: p.lode_angle_param_f,
            bridgman_triaxiality: p.bridgman,
            eqps_f_area: p.eps_f_area,
            stop_increment: p.stop_increment,
        })
        .collect();
    let fit_section = fit.map(fit_section);
    let damage = checks.map(|checks| DamageSection {
        rule: "linear (Johnson & Cook 1985): D = ∫ dε̄p / ε_f(η, θ̄), trapezoid rule".into(),
        rows: checks
            .iter()
            .filter_map(|(_, r)| r.as_ref().ok())
            .map(|d| DamageRow {
                specimen: d.specimen.clone(),
                damage_at_fracture: Some(d.damage_end),
                gauge_predicted: d.gauge_at_failure,
                gauge_measured: d.gauge_measured,
            })
            .collect(),
    });
    let mut charts = ReportCharts {
        state_plane: Some(plane_chart(c)?),
        locus: None,
        damage: None,
        paths: path_charts(c)?.into_iter().map(|(_, ch)| ch).collect(),
    };
    if let Some(l) = locus {
        charts.locus = Some(locus_plot(c, l)?);
    }
    if let Some(checks) = checks {
        charts.damage = Some(damage_plot(checks)?);
    }
    let n_inc: Vec<usize> = c
        .results
        .iter()
        .filter_map(|(_, r)| r.as_ref().ok().map(|h| h.rows.len()))
        .collect();
    let rules: Vec<String> = c
        .results
        .iter()
        .map(|(s, _)| format!("{}: {}", s.name, s.selector))
        .collect();
    let stops: Vec<String> = c
        .results
        .iter()
        .map(|(s, _)| {
            format!(
                "{}: {}",
                s.name,
                s.stop
                    .map(|t| t.to_string())
                    .unwrap_or_else(|| "last increment".into())
            )
        })
        .collect();
    let mut notes = Vec::new();
    for (name, e) in c.failures() {
        notes.push(format!("specimen {name} failed: {e}"));
    }
    Ok(ReportData {
        title: c
            .study
            .title
            .clone()
            .unwrap_or_else(|| "Fracture calibration campaign".into()),
        invented,
        job: JobSection {
            material: Some(c.study.material.name.clone()),
            results: format!(
                "{} specimens from {}, {} to {} output increments up to the fracture instant",
                c.results.len(),
                c.study.path.display(),
                n_inc.iter().min().copied().unwrap_or(0),
                n_inc.iter().max().copied().unwrap_or(0)
            ),
            critical_point: rules.join("; "),
            fracture_instant: stops.join("; "),
            notes,
        },
        table,
        fit: fit_section,
        damage,
        charts,
        footer: Footer {
            version: env!("CARGO_PKG_VERSION").to_string(),
            generated: utc_now(),
            command,
        },
    })
}
