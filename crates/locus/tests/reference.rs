//! Fits checked against an open reference library: SciPy's `curve_fit` (MINPACK
//! Levenberg–Marquardt; Virtanen et al. 2020, SciPy 1.0, Nature Methods 17:261–272) on
//! the same invented noisy points and the same log residuals. Parameters must agree to
//! 1e-6 (relative) and standard errors (pcov = s² (JᵀJ)⁻¹, absolute_sigma=False) to 1e-4.
//! Data: `tests/data/scipy_fits.txt`, made by `tests/data/generate.py`.

#![allow(clippy::unwrap_used)] // tests may unwrap

use ductrace_locus::{CalibrationPoint, FitSpec, ModelKind, fit_average};

struct Case {
    model: ModelKind,
    points: Vec<CalibrationPoint>,
    params: Vec<(String, f64, f64)>,
    fixed: Vec<(String, f64)>,
}

fn load() -> Vec<Case> {
    let text = include_str!("data/scipy_fits.txt");
    let mut cases: Vec<Case> = Vec::new();
    for line in text
        .lines()
        .filter(|l| !l.starts_with('#') && !l.trim().is_empty())
    {
        let f: Vec<&str> = line.split_whitespace().collect();
        match f[0] {
            "model" => cases.push(Case {
                model: ModelKind::from_id(f[1]).unwrap(),
                points: Vec::new(),
                params: Vec::new(),
                fixed: Vec::new(),
            }),
            "fixed" => cases
                .last_mut()
                .unwrap()
                .fixed
                .push((f[1].to_string(), f[2].parse().unwrap())),
            "point" => {
                let c = cases.last_mut().unwrap();
                let n = c.points.len();
                c.points.push(CalibrationPoint {
                    name: format!("invented-{n}"),
                    triaxiality_avg: f[1].parse().unwrap(),
                    lode_angle_param_avg: f[2].parse().unwrap(),
                    eqps_f: f[3].parse().unwrap(),
                });
            }
            "param" => cases.last_mut().unwrap().params.push((
                f[1].to_string(),
                f[2].parse().unwrap(),
                f[3].parse().unwrap(),
            )),
            other => panic!("unknown record {other}"),
        }
    }
    cases
}

#[test]
fn fits_agree_with_scipy_curve_fit() {
    let cases = load();
    assert_eq!(cases.len(), 3);
    for case in cases {
        let mut spec = FitSpec::new(case.model);
        for (name, value) in &case.fixed {
            spec.fix(name, *value).unwrap();
        }
        let report = fit_average(&spec, &case.points).unwrap();
        for (name, value, se) in &case.params {
            let p = report.parameter(name).unwrap();
            assert!(
                (p.value - value).abs() <= 1e-6 * value.abs(),
                "{} {name}: {} vs scipy {value}",
                case.model,
                p.value
            );
            let ours = p.standard_error.unwrap();
            assert!(
                (ours - se).abs() <= 1e-4 * se,
                "{} {name}: se {ours} vs scipy {se}",
                case.model
            );
        }
    }
}
