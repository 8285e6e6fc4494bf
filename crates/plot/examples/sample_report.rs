//! Writes /tmp/sample_report.html, a campaign report of INVENTED data (fictitious alloy,
//! specimens and test results), and the charts as PNG in /tmp/sample_charts/, to look at
//! the layout. Nothing here is a measurement or a calibration of a real material.

use ductrace_plot::report::{
    DamageRow, DamageSection, FitSection, Footer, JobSection, ParameterRow, ReportCharts,
    ReportData, ResidualKind, ResidualRow, TableRow,
};
use ductrace_plot::{
    DamageSeries, LocusChartData, LocusCurve, LocusPoint, NamedPath, PathData, damage_chart,
    locus_chart, path_chart, state_plane_chart,
};

/// An invented specimen: the shape of its path and its invented test result.
struct Invented {
    name: &'static str,
    eta: (f64, f64),
    lode: (f64, f64),
    eqps_f: f64,
    gauge_f: f64,
    bridgman: Option<f64>,
    area: Option<f64>,
}

const SPECIMENS: [Invented; 6] = [
    Invented {
        name: "smooth bar",
        eta: (0.334, 0.47),
        lode: (1.0, 0.99),
        eqps_f: 0.92,
        gauge_f: 6.1,
        bridgman: None,
        area: Some(0.81),
    },
    Invented {
        name: "notched bar R10",
        eta: (0.52, 0.64),
        lode: (1.0, 0.98),
        eqps_f: 0.64,
        gauge_f: 2.9,
        bridgman: Some(0.516),
        area: Some(0.58),
    },
    Invented {
        name: "notched bar R4",
        eta: (0.74, 0.88),
        lode: (1.0, 0.97),
        eqps_f: 0.47,
        gauge_f: 1.55,
        bridgman: Some(0.739),
        area: Some(0.44),
    },
    Invented {
        name: "notched bar R2",
        eta: (1.02, 1.16),
        lode: (0.99, 0.96),
        eqps_f: 0.34,
        gauge_f: 0.98,
        bridgman: Some(1.027),
        area: Some(0.31),
    },
    Invented {
        name: "grooved plate R2",
        eta: (0.80, 0.91),
        lode: (0.06, 0.01),
        eqps_f: 0.36,
        gauge_f: 0.74,
        bridgman: None,
        area: None,
    },
    Invented {
        name: "shear ligament",
        eta: (0.03, 0.11),
        lode: (0.08, 0.21),
        eqps_f: 1.05,
        gauge_f: 1.32,
        bridgman: None,
        area: None,
    },
];

/// Invented stand-in for a fitted locus (not a published model): ε_f = 1.9 exp(−1.6 η) ×
/// (0.62 + 0.12 θ̄ + 0.38 θ̄²).
fn invented_locus(eta: f64, lode: f64) -> f64 {
    1.9 * (-1.6 * eta).exp() * (0.62 + 0.12 * lode + 0.38 * lode * lode)
}

fn path(s: &Invented) -> PathData {
    let n = 40;
    let eqps: Vec<f64> = (0..=n).map(|k| s.eqps_f * k as f64 / n as f64).collect();
    let shape = |(a, b): (f64, f64), t: f64| a + (b - a) * t * t;
    let eta: Vec<Option<f64>> = eqps
        .iter()
        .enumerate()
        .map(|(k, e)| (k > 0).then(|| shape(s.eta, e / s.eqps_f)))
        .collect();
    let lode: Vec<Option<f64>> = eqps
        .iter()
        .enumerate()
        .map(|(k, e)| (k > 0).then(|| shape(s.lode, e / s.eqps_f)))
        .collect();
    // Trapezoid averages over ε̄p; the first (undefined) value sits on a zero-width span
    // of plastic strain in this invented path, so start from the first defined value.
    let avg = |v: &[Option<f64>]| {
        let mut sum = 0.0;
        for k in 1..v.len() {
            let (a, b) = (v[k - 1].or(v[k]), v[k]);
            if let (Some(a), Some(b)) = (a, b) {
                sum += 0.5 * (a + b) * (eqps[k] - eqps[k - 1]);
            }
        }
        sum / s.eqps_f
    };
    PathData {
        name: s.name.to_string(),
        triaxiality_avg: Some(avg(&eta)),
        lode_angle_param_avg: Some(avg(&lode)),
        eqps: eqps.clone(),
        triaxiality: eta,
        lode_angle_param: lode,
        eqps_f: s.eqps_f,
    }
}

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let paths: Vec<PathData> = SPECIMENS.iter().map(path).collect();
    let named: Vec<NamedPath> = paths.iter().map(NamedPath::from).collect();

    let curves = [-1.0, 0.0, 1.0]
        .into_iter()
        .map(|lode| LocusCurve {
            label: format!("θ̄ = {lode}"),
            points: (0..=160)
                .map(|k| {
                    let eta = -0.2 + 1.6 * f64::from(k) / 160.0;
                    (eta, invented_locus(eta, lode))
                })
                .collect(),
        })
        .collect();
    let points = paths
        .iter()
        .zip(&SPECIMENS)
        .map(|(p, s)| LocusPoint {
            label: p.name.clone(),
            triaxiality: p.triaxiality_avg.unwrap_or(0.0),
            eqps_f: p.eqps_f,
            triaxiality_band: Some((s.eta.0, s.eta.1)),
            eqps_f_band: s.area.map(|a| (a.min(p.eqps_f), a.max(p.eqps_f))),
        })
        .collect();
    let locus = locus_chart(&LocusChartData {
        title: "Fracture locus (invented model)".into(),
        curves,
        points,
    })?;

    let mut damage_series = Vec::new();
    let mut damage_rows = Vec::new();
    let mut residuals = Vec::new();
    for (p, s) in paths.iter().zip(&SPECIMENS) {
        let model = invented_locus(
            p.triaxiality_avg.unwrap_or(0.0),
            p.lode_angle_param_avg.unwrap_or(0.0),
        );
        // Invented gauge response: elongation grows faster than ε̄p after necking.
        let gauge = |e: f64| s.gauge_f * (0.55 * e / s.eqps_f + 0.45 * (e / s.eqps_f).powi(3));
        let d_end = s.eqps_f / model;
        let pts: Vec<(f64, f64)> = (0..=60)
            .map(|k| {
                let e = 1.15 * s.eqps_f * f64::from(k) / 60.0;
                (gauge(e), e / model)
            })
            .take_while(|&(_, d)| d <= 1.08)
            .collect();
        let predicted = (model <= 1.15 * s.eqps_f).then(|| gauge(model));
        damage_series.push(DamageSeries {
            label: s.name.into(),
            points: pts,
            measured_gauge_f: Some(s.gauge_f),
        });
        damage_rows.push(DamageRow {
            specimen: s.name.into(),
            damage_at_fracture: Some(d_end),
            gauge_predicted: predicted,
            gauge_measured: Some(s.gauge_f),
        });
        residuals.push(ResidualRow {
            specimen: s.name.into(),
            eqps_test: s.eqps_f,
            eqps_model: Some(model),
            log_residual: Some((model / s.eqps_f).ln()),
        });
    }
    let rms = (residuals
        .iter()
        .filter_map(|r| r.log_residual)
        .map(|r| r * r)
        .sum::<f64>()
        / residuals.len() as f64)
        .sqrt();

    let table = paths
        .iter()
        .zip(&SPECIMENS)
        .map(|(p, s)| TableRow {
            specimen: p.name.clone(),
            eqps_f: p.eqps_f,
            triaxiality_avg: p.triaxiality_avg,
            lode_angle_param_avg: p.lode_angle_param_avg,
            triaxiality_f: p.triaxiality.last().copied().flatten(),
            lode_angle_param_f: p.lode_angle_param.last().copied().flatten(),
            bridgman_triaxiality: s.bridgman,
            eqps_f_area: s.area,
            stop_increment: 38.0 + s.eqps_f * 7.3,
        })
        .collect();

    let data = ReportData {
        title: "Invented alloy DT-1: ductile-fracture calibration (demonstration)".into(),
        invented: true,
        job: JobSection {
            material: Some("the invented alloy DT-1".into()),
            results: "invented histories generated by this example, 41 increments per specimen"
                .into(),
            critical_point: "the integration point of largest ε̄p in the minimum section".into(),
            fracture_instant: "the gauge elongation at the invented force drop of each test".into(),
            notes: vec![
                "Element size at the critical points: 0.10 mm (invented).".into(),
                "The locus below is an invented stand-in, not a published model.".into(),
            ],
        },
        table,
        fit: Some(FitSection {
            model: "invented exponential–Lode stand-in".into(),
            objective: "ln(ε_f,model(η_avg, θ̄_avg) / ε_f) per specimen".into(),
            residual_kind: ResidualKind::LogRatio,
            parameters: vec![
                ParameterRow {
                    name: "a".into(),
                    value: 1.9,
                    standard_error: Some(0.11),
                    fixed: false,
                    unit: None,
                },
                ParameterRow {
                    name: "b".into(),
                    value: 1.6,
                    standard_error: Some(0.083),
                    fixed: false,
                    unit: None,
                },
                ParameterRow {
                    name: "c".into(),
                    value: 0.38,
                    standard_error: None,
                    fixed: true,
                    unit: None,
                },
            ],
            residuals,
            rms_log_residual: rms,
            termination: "relative reduction below tolerance".into(),
            converged: true,
        }),
        damage: Some(DamageSection {
            rule: "linear, D = ∫ dε̄p / ε_f(η, θ̄)".into(),
            rows: damage_rows,
        }),
        charts: ReportCharts {
            state_plane: Some(state_plane_chart(&named)?),
            locus: Some(locus),
            damage: Some(damage_chart(&damage_series)?),
            paths: paths.iter().map(path_chart).collect::<Result<_, _>>()?,
        },
        footer: Footer {
            version: env!("CARGO_PKG_VERSION").into(),
            generated: "2026-12-01T23:30:00Z".into(),
            command: "cargo run -p ductrace-plot --example sample_report".into(),
        },
    };
    std::fs::write(
        "/tmp/sample_report.html",
        ductrace_plot::report::render(&data),
    )?;
    std::fs::create_dir_all("/tmp/sample_charts")?;
    let charts = &data.charts;
    let named_charts = [
        ("state_plane", charts.state_plane.as_ref()),
        ("locus", charts.locus.as_ref()),
        ("damage", charts.damage.as_ref()),
        ("path_0", charts.paths.first()),
        ("path_4", charts.paths.get(4)),
    ];
    for (name, chart) in named_charts {
        if let Some(c) = chart {
            std::fs::write(format!("/tmp/sample_charts/{name}.png"), c.png(800, 520)?)?;
            std::fs::write(format!("/tmp/sample_charts/{name}.svg"), &c.svg)?;
        }
    }
    println!("wrote /tmp/sample_report.html and /tmp/sample_charts/");
    Ok(())
}
