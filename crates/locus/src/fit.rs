//! Fitting a fracture locus to calibration data by Levenberg–Marquardt on log residuals.
//!
//! Owns the fit specification ([`FitSpec`]: which parameters are free, fixed values and
//! starts, the bounds-enforcing reparametrisation [`Transform`]), the two objectives
//! ([`fit_average`] on [`CalibrationPoint`]s, [`fit_damage`] on [`SpecimenPath`]s), the
//! multi-start driver and the [`FitReport`] with standard errors.
//!
//! Residuals are log-strain-like and dimensionless:
//! * objective "average": r_i = ln(ε_f,model(η_avg,i, θ̄_avg,i) / ε_f,test,i);
//! * objective "damage": r_i = −ln D_i, D_i the linear damage (trapezoid on 1/ε_f, see
//!   [`crate::damage`]) along specimen i's path up to its fracture instant (the last row).
//!   On a proportional path −ln D = ln(ε_f,model/ε_f,test) exactly, so both objectives
//!   measure the same thing there. (Fitting D = 1 also fits the power-law rule: D = Φ^m
//!   is 1 exactly where Φ is.)
//!
//! Minimisation: the `levenberg-marquardt` crate (MINPACK-style trust region) over
//! unconstrained internal variables q, mapped to physical parameters p by [`Transform`]
//! (Log: p = e^q > 0; OnePlusExp: p = 1 + e^q > 1; Identity). The Jacobian is analytic
//! (chain rule through the model gradients and the transforms). Several deterministic
//! starts (a small grid per model, the scale parameter matched to the data in closed
//! form) are run and the converged one with the least sum of squares is kept. A trial
//! step where the model is undefined at a point gets a large residual (so it is
//! rejected); the kept fit is checked to be defined everywhere.
//!
//! Standard errors: Cov(q) = s² (JᵀJ)⁻¹ with s² = SSR/(m − p), mapped to the physical
//! parameters by the delta method, se(p_j) = |dp_j/dq_j| √Cov(q)_jj; `None` when m ≤ p
//! or JᵀJ is numerically singular. They describe the scatter of the data about the
//! model, not model-form error.
//!
//! Caution: a fitted locus is only as good as its calibration tests and their
//! interpretation; validate predictions against tests outside the calibration set.
//! Local codes and licensed engineering practice govern any use for safety decisions.

use levenberg_marquardt::{LeastSquaresProblem, LevenbergMarquardt, TerminationReason};
use nalgebra::{DMatrix, DVector, Dyn, Owned};

use crate::damage::{DamageRule, accumulate};
use crate::{HosfordCoulomb, Locus, LocusError, ModelKind};

/// Residual assigned to a point where the model is undefined during a trial step. No
/// genuine log residual comes near it, so such steps are always rejected.
const UNDEFINED_PENALTY: f64 = 1.0e4;

/// One specimen reduced to its averages (objective "average").
#[derive(Debug, Clone, PartialEq)]
pub struct CalibrationPoint {
    /// Specimen name, echoed in the report.
    pub name: String,
    /// Equivalent plastic strain at fracture ε_f (> 0).
    pub eqps_f: f64,
    /// Average triaxiality η_avg up to fracture.
    pub triaxiality_avg: f64,
    /// Average Lode angle parameter θ̄_avg up to fracture, in [−1, 1].
    pub lode_angle_param_avg: f64,
}

/// One specimen's critical-point history up to its fracture instant (objective
/// "damage"). The last row is the fracture instant.
#[derive(Debug, Clone, PartialEq)]
pub struct SpecimenPath {
    /// Specimen name, echoed in the report.
    pub name: String,
    /// Equivalent plastic strain per row, finite and non-decreasing, last value > 0.
    pub eqps: Vec<f64>,
    /// Triaxiality per row; `None` where undefined (allowed only where Δε̄p = 0 on both
    /// sides of the row).
    pub triaxiality: Vec<Option<f64>>,
    /// Lode angle parameter per row; `None` where undefined (same rule).
    pub lode_angle_param: Vec<Option<f64>>,
}

/// Which objective a fit used.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Objective {
    /// ε_f,model(η_avg, θ̄_avg) vs ε_f,test per specimen.
    Average,
    /// Linear damage D = 1 at each specimen's fracture instant.
    Damage,
}

impl Objective {
    /// `"average"` or `"damage"`.
    pub fn id(self) -> &'static str {
        match self {
            Objective::Average => "average",
            Objective::Damage => "damage",
        }
    }
}

/// Map from an unconstrained internal variable q to a physical parameter p.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Transform {
    /// p = q (unbounded).
    Identity,
    /// p = e^q (p > 0).
    Log,
    /// p = 1 + e^q (p > 1).
    OnePlusExp,
}

impl Transform {
    /// p(q).
    pub fn to_physical(self, q: f64) -> f64 {
        match self {
            Transform::Identity => q,
            Transform::Log => q.exp(),
            Transform::OnePlusExp => 1.0 + q.exp(),
        }
    }

    /// q(p), `None` outside the transform's range.
    pub fn to_internal(self, p: f64) -> Option<f64> {
        let q = match self {
            Transform::Identity => p,
            Transform::Log => p.ln(),
            Transform::OnePlusExp => (p - 1.0).ln(),
        };
        q.is_finite().then_some(q)
    }

    /// dp/dq at physical value p.
    pub fn derivative(self, p: f64) -> f64 {
        match self {
            Transform::Identity => 1.0,
            Transform::Log => p,
            Transform::OnePlusExp => p - 1.0,
        }
    }

    fn requirement(self) -> &'static str {
        match self {
            Transform::Identity => "finite",
            Transform::Log => "> 0 for a free parameter (the fit keeps it > 0)",
            Transform::OnePlusExp => "> 1 for a free parameter (the fit keeps it > 1)",
        }
    }
}

/// How one parameter enters a fit.
#[derive(Debug, Clone, PartialEq)]
pub struct ParameterSpec {
    /// Parameter name (canonical, see [`ModelKind::parameter_names`]).
    pub name: &'static str,
    /// Free (fitted) or fixed.
    pub free: bool,
    /// The fixed value, or the start of a free one (`None`: the default starts).
    pub value: Option<f64>,
    /// Reparametrisation used while free.
    pub transform: Transform,
    /// Default start values when free and `value` is `None` (empty: a value is needed).
    pub default_starts: &'static [f64],
}

/// Options of the minimiser.
#[derive(Debug, Clone, Copy, PartialEq)]
#[non_exhaustive]
pub struct FitOptions {
    /// Evaluation budget per start is `patience · (free parameters + 1)`.
    pub patience: usize,
    /// Relative tolerance on the sum of squares, the step and the gradient (the crate's
    /// ftol = xtol = gtol).
    pub tolerance: f64,
}

impl Default for FitOptions {
    fn default() -> Self {
        FitOptions {
            patience: 200,
            tolerance: 30.0 * f64::EPSILON,
        }
    }
}

/// Which parameters of a model are free, the fixed values and the starts.
///
/// Defaults ([`FitSpec::new`]), chosen so each default fit is identifiable:
/// * `jc`: D1, D2, D3 free (D1, D3 unbounded; D2 > 0 in the fit).
/// * `mmc`: c1, c2, c_theta_s, c_theta_c free; A and n fixed and *required* (from the
///   hardening fit σ = A ε^n, set them with [`FitSpec::fix`]); c_theta_t fixed at 1.
///   (A and c2 enter only as A/c2, so freeing both is not identifiable.)
/// * `hc`: a, b, c free (a > 1, b > 0, c > 0 in the fit); n fixed at 0.1.
///
/// All free parameters of `mmc` and `hc` are kept positive by a log transform (c1 and
/// c > 0: a true value of exactly 0 is approached, not reached).
#[derive(Debug, Clone, PartialEq)]
pub struct FitSpec {
    model: ModelKind,
    parameters: Vec<ParameterSpec>,
    /// Minimiser options.
    pub options: FitOptions,
}

fn spec(
    name: &'static str,
    free: bool,
    value: Option<f64>,
    transform: Transform,
    default_starts: &'static [f64],
) -> ParameterSpec {
    ParameterSpec {
        name,
        free,
        value,
        transform,
        default_starts,
    }
}

impl FitSpec {
    /// The default specification of `model` (see the type documentation).
    pub fn new(model: ModelKind) -> FitSpec {
        use Transform::*;
        let parameters = match model {
            ModelKind::JohnsonCook => vec![
                spec("D1", true, None, Identity, &[0.0, 0.2]),
                spec("D2", true, None, Log, &[1.0]),
                spec("D3", true, None, Identity, &[-0.5, -1.5, -3.0]),
            ],
            ModelKind::ModifiedMohrCoulomb => vec![
                spec("A", false, None, Log, &[]),
                spec("n", false, None, Log, &[0.1, 0.2]),
                spec("c1", true, None, Log, &[0.02, 0.1, 0.3]),
                spec("c2", true, None, Log, &[]),
                spec("c_theta_s", true, None, Log, &[0.9, 1.0]),
                spec("c_theta_t", false, Some(1.0), Log, &[1.0]),
                spec("c_theta_c", true, None, Log, &[1.0, 1.2]),
            ],
            ModelKind::HosfordCoulomb => vec![
                spec("a", true, None, OnePlusExp, &[1.3, 2.0, 4.0]),
                spec("b", true, None, Log, &[1.0]),
                spec("c", true, None, Log, &[0.02, 0.1, 0.3]),
                spec("n", false, Some(HosfordCoulomb::DEFAULT_N), Log, &[0.1]),
            ],
        };
        FitSpec {
            model,
            parameters,
            options: FitOptions::default(),
        }
    }

    /// The model.
    pub fn model(&self) -> ModelKind {
        self.model
    }

    /// The parameter specifications in canonical order.
    pub fn parameters(&self) -> &[ParameterSpec] {
        &self.parameters
    }

    /// Number of free parameters.
    pub fn free_count(&self) -> usize {
        self.parameters.iter().filter(|p| p.free).count()
    }

    fn find(&mut self, name: &str) -> Result<&mut ParameterSpec, LocusError> {
        let model = self.model;
        self.parameters
            .iter_mut()
            .find(|p| p.name == name)
            .ok_or_else(|| LocusError::UnknownParameter {
                model: model.id(),
                name: name.to_string(),
                known: model.parameter_names().join(", "),
            })
    }

    /// Fixes `name` at `value` (finite).
    pub fn fix(&mut self, name: &str, value: f64) -> Result<&mut Self, LocusError> {
        let model = self.model.id();
        let p = self.find(name)?;
        if !value.is_finite() {
            return Err(LocusError::OutOfDomain {
                model,
                name: p.name,
                value,
                requirement: "finite",
            });
        }
        p.free = false;
        p.value = Some(value);
        Ok(self)
    }

    /// Frees `name`, starting from `start` (or the default starts when `None`). The
    /// start must lie in the parameter's transform range (e.g. > 0 for a log transform).
    pub fn free(&mut self, name: &str, start: Option<f64>) -> Result<&mut Self, LocusError> {
        let model = self.model.id();
        let p = self.find(name)?;
        if let Some(v) = start
            && p.transform.to_internal(v).is_none()
        {
            return Err(LocusError::OutOfDomain {
                model,
                name: p.name,
                value: v,
                requirement: p.transform.requirement(),
            });
        }
        p.free = true;
        p.value = start;
        Ok(self)
    }
}

/// One parameter of a fit result.
#[derive(Debug, Clone, PartialEq)]
pub struct FittedParameter {
    /// Parameter name.
    pub name: &'static str,
    /// Value (fitted, or the fixed value echoed).
    pub value: f64,
    /// True when the parameter was fixed.
    pub fixed: bool,
    /// Standard error (delta method); `None` for fixed parameters, when there are no
    /// more data points than free parameters, or when JᵀJ is singular.
    pub standard_error: Option<f64>,
}

/// One data point (specimen) of a fit result.
#[derive(Debug, Clone, PartialEq)]
pub struct PointResult {
    /// Specimen name.
    pub name: String,
    /// Test fracture strain (average objective: ε_f; damage objective: ε̄p at the last row).
    pub eqps_test: f64,
    /// Model fracture strain: ε_f,model(η_avg, θ̄_avg) (average objective), or ε̄p where
    /// the linear damage along the path reaches 1 (damage objective; `None` if D < 1 at
    /// the path's end). `None` where the model is undefined.
    pub eqps_model: Option<f64>,
    /// Linear damage at the fracture instant (damage objective only).
    pub damage_at_end: Option<f64>,
    /// The residual r_i (see the module documentation); `None` where the model is
    /// undefined (only in the report of [`LocusError::UndefinedAtFit`]).
    pub log_residual: Option<f64>,
}

/// The result of a fit.
#[derive(Debug, Clone, PartialEq)]
pub struct FitReport {
    /// The model.
    pub model: ModelKind,
    /// The objective.
    pub objective: Objective,
    /// The fitted model, ready to evaluate.
    pub locus: Locus,
    /// All parameters in canonical order, fixed ones echoed.
    pub parameters: Vec<FittedParameter>,
    /// Per point (in input order).
    pub points: Vec<PointResult>,
    /// Sum of squared residuals Σ r_i² (an undefined point counts with the penalty
    /// residual 10⁴, which only the report of [`LocusError::UndefinedAtFit`] can carry).
    pub sum_of_squares: f64,
    /// √(Σ r_i² / m), dimensionless (a log strain ratio).
    pub rms_log_residual: f64,
    /// s² = SSR/(m − p), `None` when m ≤ p.
    pub residual_variance: Option<f64>,
    /// Why the minimiser stopped (for the kept start).
    pub termination: String,
    /// True when the kept start converged.
    pub converged: bool,
    /// Residual evaluations of the kept start.
    pub evaluations: usize,
    /// Residual evaluations over all starts.
    pub total_evaluations: usize,
    /// Starts run (those with the model defined at every point).
    pub starts: usize,
}

impl FitReport {
    /// The parameter called `name`, if the model has it.
    pub fn parameter(&self, name: &str) -> Option<&FittedParameter> {
        self.parameters.iter().find(|p| p.name == name)
    }
}

// ---------------------------------------------------------------------------------------
// Prepared data
// ---------------------------------------------------------------------------------------

/// A point of the average objective.
#[derive(Debug, Clone)]
struct AvgPoint {
    eta: f64,
    theta_bar: f64,
    ln_test: f64,
}

/// A path of the damage objective: rows with weight w_k > 0 in D = Σ w_k/ε_f,k.
#[derive(Debug, Clone)]
struct PathRows {
    rows: Vec<(f64, f64, f64)>,
}

#[derive(Debug, Clone)]
enum Data {
    Average(Vec<AvgPoint>),
    Damage(Vec<PathRows>),
}

impl Data {
    fn len(&self) -> usize {
        match self {
            Data::Average(p) => p.len(),
            Data::Damage(p) => p.len(),
        }
    }

    /// Residual i, with ∂r_i/∂p (all parameters, physical) in `grad` and `scratch` as
    /// workspace (both of the model's parameter count). `None` where undefined.
    fn residual(
        &self,
        locus: &Locus,
        i: usize,
        grad: &mut [f64],
        scratch: &mut [f64],
    ) -> Option<f64> {
        match self {
            Data::Average(points) => {
                let p = &points[i];
                let ln = locus.log_strain_gradient(p.eta, p.theta_bar, grad)?;
                Some(ln - p.ln_test)
            }
            Data::Damage(paths) => {
                // D = Σ w/ε; −ln D; ∂(−ln D)/∂p = (1/D) Σ (w/ε) ∂ln ε/∂p.
                grad.fill(0.0);
                let mut d = 0.0;
                for &(w, eta, th) in &paths[i].rows {
                    let ln = locus.log_strain_gradient(eta, th, scratch)?;
                    let term = w * (-ln).exp();
                    d += term;
                    for (g, s) in grad.iter_mut().zip(scratch.iter()) {
                        *g += term * s;
                    }
                }
                if !(d > 0.0 && d.is_finite()) {
                    return None;
                }
                for g in grad.iter_mut() {
                    *g /= d;
                }
                let r = -d.ln();
                r.is_finite().then_some(r)
            }
        }
    }
}

fn prepare_points(points: &[CalibrationPoint]) -> Result<Data, LocusError> {
    let mut out = Vec::with_capacity(points.len());
    for p in points {
        let bad = |reason: String| LocusError::InvalidPoint {
            name: p.name.clone(),
            reason,
        };
        if !(p.eqps_f.is_finite() && p.eqps_f > 0.0) {
            return Err(bad(format!(
                "fracture strain {} is not finite and positive",
                p.eqps_f
            )));
        }
        if !p.triaxiality_avg.is_finite() {
            return Err(bad(format!(
                "average triaxiality {} is not finite",
                p.triaxiality_avg
            )));
        }
        if !(-1.0..=1.0).contains(&p.lode_angle_param_avg) {
            return Err(bad(format!(
                "average lode angle parameter {} is outside [-1, 1]",
                p.lode_angle_param_avg
            )));
        }
        out.push(AvgPoint {
            eta: p.triaxiality_avg,
            theta_bar: p.lode_angle_param_avg,
            ln_test: p.eqps_f.ln(),
        });
    }
    Ok(Data::Average(out))
}

fn prepare_paths(paths: &[SpecimenPath]) -> Result<Data, LocusError> {
    let mut out = Vec::with_capacity(paths.len());
    for p in paths {
        let bad = |row: usize, reason: String| LocusError::InvalidPath {
            name: p.name.clone(),
            row,
            reason,
        };
        let n = p.eqps.len();
        if p.triaxiality.len() != n || p.lode_angle_param.len() != n {
            return Err(bad(
                0,
                format!(
                    "eqps has {n} rows, triaxiality {}, lode angle parameter {}",
                    p.triaxiality.len(),
                    p.lode_angle_param.len()
                ),
            ));
        }
        if n < 2 {
            return Err(bad(0, format!("a path needs at least 2 rows, {n} given")));
        }
        for (k, e) in p.eqps.iter().enumerate() {
            if !e.is_finite() {
                return Err(bad(
                    k,
                    format!("equivalent plastic strain {e} is not finite"),
                ));
            }
            if k > 0 && *e < p.eqps[k - 1] {
                return Err(bad(
                    k,
                    format!(
                        "equivalent plastic strain decreases from {} to {e}",
                        p.eqps[k - 1]
                    ),
                ));
            }
        }
        let mut rows = Vec::new();
        for k in 0..n {
            let before = if k > 0 {
                p.eqps[k] - p.eqps[k - 1]
            } else {
                0.0
            };
            let after = if k + 1 < n {
                p.eqps[k + 1] - p.eqps[k]
            } else {
                0.0
            };
            let w = 0.5 * (before + after);
            if w <= 0.0 {
                continue;
            }
            let (Some(eta), Some(th)) = (p.triaxiality[k], p.lode_angle_param[k]) else {
                return Err(bad(
                    k,
                    "stress state undefined next to a plastic increment".to_string(),
                ));
            };
            if !eta.is_finite() || !(-1.0..=1.0).contains(&th) {
                return Err(bad(
                    k,
                    format!("triaxiality {eta} or lode angle parameter {th} out of range"),
                ));
            }
            rows.push((w, eta, th));
        }
        if rows.is_empty() {
            return Err(bad(n - 1, "no plastic strain along the path".to_string()));
        }
        out.push(PathRows { rows });
    }
    Ok(Data::Damage(out))
}

// ---------------------------------------------------------------------------------------
// The least-squares problem
// ---------------------------------------------------------------------------------------

/// The problem seen by the minimiser: internal variables q of the free parameters.
#[derive(Debug, Clone)]
struct Problem<'a> {
    data: &'a Data,
    kind: ModelKind,
    /// Physical values of all parameters (fixed ones set; free ones follow q).
    values: Vec<f64>,
    /// Free parameters: (index in canonical order, transform).
    free: Vec<(usize, Transform)>,
    q: DVector<f64>,
    locus: Option<Locus>,
}

impl<'a> Problem<'a> {
    fn new(
        data: &'a Data,
        kind: ModelKind,
        values: Vec<f64>,
        free: Vec<(usize, Transform)>,
    ) -> Self {
        let q = DVector::from_iterator(
            free.len(),
            free.iter()
                .map(|&(j, t)| t.to_internal(values[j]).unwrap_or(0.0)),
        );
        let mut p = Problem {
            data,
            kind,
            values,
            free,
            q: q.clone(),
            locus: None,
        };
        p.set_params(&q);
        p
    }

    /// Residuals and, if `jac` is given, the Jacobian ∂r/∂q. Undefined points get the
    /// penalty residual and a zero Jacobian row; the count of them is returned.
    fn evaluate(&self, mut jac: Option<&mut DMatrix<f64>>) -> (DVector<f64>, usize) {
        let m = self.data.len();
        let mut r = DVector::from_element(m, UNDEFINED_PENALTY);
        let Some(locus) = &self.locus else {
            return (r, m);
        };
        let k = self.values.len();
        let mut grad = vec![0.0; k];
        let mut scratch = vec![0.0; k];
        let mut undefined = 0;
        for i in 0..m {
            match self.data.residual(locus, i, &mut grad, &mut scratch) {
                Some(ri) => {
                    r[i] = ri;
                    if let Some(j) = jac.as_deref_mut() {
                        for (c, &(idx, t)) in self.free.iter().enumerate() {
                            j[(i, c)] = grad[idx] * t.derivative(self.values[idx]);
                        }
                    }
                }
                None => {
                    undefined += 1;
                    if let Some(j) = jac.as_deref_mut() {
                        j.row_mut(i).fill(0.0);
                    }
                }
            }
        }
        (r, undefined)
    }
}

impl LeastSquaresProblem<f64, Dyn, Dyn> for Problem<'_> {
    type ResidualStorage = Owned<f64, Dyn>;
    type JacobianStorage = Owned<f64, Dyn, Dyn>;
    type ParameterStorage = Owned<f64, Dyn>;

    fn set_params(&mut self, q: &DVector<f64>) {
        self.q.copy_from(q);
        for (c, &(j, t)) in self.free.iter().enumerate() {
            self.values[j] = t.to_physical(q[c]);
        }
        self.locus = Locus::from_values(self.kind, &self.values).ok();
    }

    fn params(&self) -> DVector<f64> {
        self.q.clone()
    }

    fn residuals(&self) -> Option<DVector<f64>> {
        Some(self.evaluate(None).0)
    }

    fn jacobian(&self) -> Option<DMatrix<f64>> {
        let mut j = DMatrix::zeros(self.data.len(), self.free.len());
        self.evaluate(Some(&mut j));
        Some(j)
    }
}

fn describe(t: &TerminationReason) -> String {
    match t {
        TerminationReason::ResidualsZero => "converged: residuals are zero".into(),
        TerminationReason::Orthogonal => {
            "converged: residuals orthogonal to the jacobian columns (gradient tolerance)".into()
        }
        TerminationReason::Converged { ftol, xtol } => match (ftol, xtol) {
            (true, true) => "converged: sum of squares and step below tolerance".into(),
            (true, false) => {
                "converged: relative reduction of the sum of squares below tolerance".into()
            }
            _ => "converged: relative step below tolerance".into(),
        },
        TerminationReason::NoImprovementPossible(what) => {
            format!("converged to machine precision ({what} tolerance cannot be met)")
        }
        TerminationReason::LostPatience => "stopped: evaluation limit reached".into(),
        TerminationReason::User(what) => {
            format!("stopped: the model could not be evaluated ({what})")
        }
        TerminationReason::Numerical(what) => format!("stopped: non-finite value in the {what}"),
        other => format!("stopped: {other:?}"),
    }
}

fn is_converged(t: &TerminationReason) -> bool {
    t.was_successful() || matches!(t, TerminationReason::NoImprovementPossible(_))
}

/// The result of one start.
struct Run {
    values: Vec<f64>,
    q: DVector<f64>,
    sum_of_squares: f64,
    termination: String,
    converged: bool,
    evaluations: usize,
    undefined: usize,
}

/// Fits `spec`'s model to averaged calibration points (objective "average").
///
/// Errors: an invalid point; fewer points than free parameters (the message says how
/// many are needed); no start with the model defined at all points; no converged start
/// ([`LocusError::NotConverged`] carries the best report); the model undefined at a
/// point at the best fit ([`LocusError::UndefinedAtFit`]).
pub fn fit_average(spec: &FitSpec, points: &[CalibrationPoint]) -> Result<FitReport, LocusError> {
    let data = prepare_points(points)?;
    let names: Vec<(String, f64)> = points.iter().map(|p| (p.name.clone(), p.eqps_f)).collect();
    run_fit(spec, &data, Objective::Average, &names, None)
}

/// Fits `spec`'s model so that the linear damage along each specimen path equals 1 at
/// its last row (objective "damage"). Errors as [`fit_average`], plus invalid paths
/// (mismatched lengths, fewer than 2 rows, decreasing or non-finite ε̄p, an undefined
/// stress state next to a plastic increment, no plastic strain).
pub fn fit_damage(spec: &FitSpec, paths: &[SpecimenPath]) -> Result<FitReport, LocusError> {
    let data = prepare_paths(paths)?;
    let names: Vec<(String, f64)> = paths
        .iter()
        .map(|p| (p.name.clone(), p.eqps.last().copied().unwrap_or(0.0)))
        .collect();
    run_fit(spec, &data, Objective::Damage, &names, Some(paths))
}

/// Index of the parameter scaled to match the data at each start: D2 (jc), c2 (mmc),
/// b (hc).
fn scale_index(kind: ModelKind) -> usize {
    match kind {
        ModelKind::JohnsonCook => 1,
        ModelKind::ModifiedMohrCoulomb => 3,
        ModelKind::HosfordCoulomb => 1,
    }
}

/// The exponent k such that multiplying the scale parameter by λ^k multiplies ε_f by λ:
/// 1 for D2 (with D1 scaled too) and b; n for c2, since ε_f ∝ c2^(1/n).
fn scale_power(kind: ModelKind, values: &[f64]) -> f64 {
    match kind {
        ModelKind::ModifiedMohrCoulomb => values[1],
        _ => 1.0,
    }
}

fn run_fit(
    spec: &FitSpec,
    data: &Data,
    objective: Objective,
    names: &[(String, f64)],
    paths: Option<&[SpecimenPath]>,
) -> Result<FitReport, LocusError> {
    let kind = spec.model;
    let model = kind.id();
    let p = spec.free_count();
    if p == 0 {
        return Err(LocusError::NothingToFit { model });
    }
    let m = data.len();
    if m < p {
        return Err(LocusError::TooFewPoints {
            model,
            free: p,
            given: m,
        });
    }

    // Fixed values and start candidates.
    let mut base = vec![0.0; spec.parameters.len()];
    let mut free = Vec::new();
    let mut candidates: Vec<Vec<f64>> = Vec::new();
    let scale_index = scale_index(kind);
    // Seed of the scale parameter before matching: 1, or A for the mmc c2 (A/c2 ≈ 1).
    let scale_seed = match kind {
        ModelKind::ModifiedMohrCoulomb => spec.parameters[0].value.unwrap_or(1.0),
        _ => 1.0,
    };
    for (j, ps) in spec.parameters.iter().enumerate() {
        if ps.free {
            free.push((j, ps.transform));
            let starts: Vec<f64> = match ps.value {
                Some(v) => vec![v],
                None if j == scale_index => vec![scale_seed],
                None if ps.default_starts.is_empty() => {
                    return Err(LocusError::MissingValue {
                        model,
                        name: ps.name,
                        hint: "give a start value",
                    });
                }
                None => ps.default_starts.to_vec(),
            };
            for &v in &starts {
                if ps.transform.to_internal(v).is_none() {
                    return Err(LocusError::OutOfDomain {
                        model,
                        name: ps.name,
                        value: v,
                        requirement: ps.transform.requirement(),
                    });
                }
            }
            candidates.push(starts);
        } else {
            match ps.value {
                Some(v) => base[j] = v,
                None => {
                    return Err(LocusError::MissingValue {
                        model,
                        name: ps.name,
                        hint: if kind == ModelKind::ModifiedMohrCoulomb {
                            "fix A and n from the hardening fit sigma = A eps^n"
                        } else {
                            "fix it or free it"
                        },
                    });
                }
            }
        }
    }
    let scale_free =
        spec.parameters[scale_index].free && spec.parameters[scale_index].value.is_none();
    let lm = LevenbergMarquardt::new()
        .with_patience(spec.options.patience.max(1))
        .with_tol(spec.options.tolerance.max(0.0));

    let mut runs: Vec<Run> = Vec::new();
    let mut total_evaluations = 0;
    let mut combo = vec![0usize; candidates.len()];
    loop {
        let mut values = base.clone();
        for (c, &(j, _)) in free.iter().enumerate() {
            values[j] = candidates[c][combo[c]];
        }
        if let Some(values) = start_values(kind, data, values, &free, scale_free, scale_index) {
            let problem = Problem::new(data, kind, values, free.clone());
            let (solved, report) = lm.minimize(problem);
            total_evaluations += report.number_of_evaluations;
            let (r, undefined) = solved.evaluate(None);
            runs.push(Run {
                values: solved.values.clone(),
                q: solved.q.clone(),
                sum_of_squares: r.norm_squared(),
                termination: describe(&report.termination),
                converged: is_converged(&report.termination),
                evaluations: report.number_of_evaluations,
                undefined,
            });
        }
        // Next combination (odometer).
        let mut c = 0;
        loop {
            if c == combo.len() {
                break;
            }
            combo[c] += 1;
            if combo[c] < candidates[c].len() {
                break;
            }
            combo[c] = 0;
            c += 1;
        }
        if c == combo.len() {
            break;
        }
    }
    if runs.is_empty() {
        return Err(LocusError::NoValidStart { model });
    }
    let starts = runs.len();
    // Preference: converged and defined everywhere, then defined everywhere, then any;
    // the least sum of squares within the first non-empty class.
    let best_of = |keep: &dyn Fn(&Run) -> bool| {
        runs.iter()
            .filter(|r| keep(r))
            .min_by(|a, b| a.sum_of_squares.total_cmp(&b.sum_of_squares))
    };
    let Some(best) = best_of(&|r| r.converged && r.undefined == 0)
        .or_else(|| best_of(&|r| r.undefined == 0))
        .or_else(|| best_of(&|_| true))
    else {
        return Err(LocusError::NoValidStart { model });
    };
    let converged = best.converged;
    let report = build_report(
        spec,
        data,
        objective,
        names,
        paths,
        best,
        &free,
        total_evaluations,
        starts,
    )?;
    if best.undefined > 0 {
        let point = report
            .points
            .iter()
            .find(|p| p.log_residual.is_none())
            .map(|p| p.name.clone())
            .unwrap_or_default();
        return Err(LocusError::UndefinedAtFit {
            point,
            report: Box::new(report),
        });
    }
    if !converged {
        return Err(LocusError::NotConverged(Box::new(report)));
    }
    Ok(report)
}

/// Completes a start: matches the scale parameter to the data in closed form and checks
/// the model is defined at every point. `None` if it is not.
fn start_values(
    kind: ModelKind,
    data: &Data,
    mut values: Vec<f64>,
    free: &[(usize, Transform)],
    scale_free: bool,
    scale_index: usize,
) -> Option<Vec<f64>> {
    let residuals = |values: &[f64]| -> Option<Vec<f64>> {
        let locus = Locus::from_values(kind, values).ok()?;
        let k = values.len();
        let (mut g, mut s) = (vec![0.0; k], vec![0.0; k]);
        (0..data.len())
            .map(|i| data.residual(&locus, i, &mut g, &mut s))
            .collect()
    };
    if scale_free {
        // ε_f → λ ε_f with λ = exp(−mean r): the log residuals then average zero.
        let r = residuals(&values)?;
        let mean = r.iter().sum::<f64>() / r.len() as f64;
        let lambda = (-mean).exp();
        values[scale_index] *= lambda.powf(scale_power(kind, &values));
        if kind == ModelKind::JohnsonCook && free.iter().any(|&(j, _)| j == 0) {
            values[0] *= lambda;
        }
        if !values[scale_index].is_finite() || values[scale_index] <= 0.0 {
            return None;
        }
    }
    residuals(&values)?;
    Some(values)
}

#[allow(clippy::too_many_arguments)]
fn build_report(
    spec: &FitSpec,
    data: &Data,
    objective: Objective,
    names: &[(String, f64)],
    paths: Option<&[SpecimenPath]>,
    run: &Run,
    free: &[(usize, Transform)],
    total_evaluations: usize,
    starts: usize,
) -> Result<FitReport, LocusError> {
    let kind = spec.model;
    let locus = Locus::from_values(kind, &run.values)?;
    let problem = {
        let mut p = Problem::new(data, kind, run.values.clone(), free.to_vec());
        p.set_params(&run.q);
        p
    };
    let m = data.len();
    let np = free.len();
    let mut jac = DMatrix::zeros(m, np);
    let (r, _) = problem.evaluate(Some(&mut jac));
    let ssr = r.norm_squared();
    let variance = (m > np).then(|| ssr / (m - np) as f64);
    let covariance = variance.and_then(|s2| {
        let jtj = jac.transpose() * &jac;
        let eig = jtj.clone().symmetric_eigen();
        let max = eig.eigenvalues.iter().fold(0.0f64, |a, &b| a.max(b.abs()));
        let min = eig.eigenvalues.iter().fold(f64::INFINITY, |a, &b| a.min(b));
        if max.is_nan() || max <= 0.0 || min.is_nan() || min <= 1e-12 * max {
            return None;
        }
        jtj.try_inverse().map(|inv| inv * s2)
    });
    let mut parameters = Vec::with_capacity(run.values.len());
    for (j, ps) in spec.parameters.iter().enumerate() {
        let c = free.iter().position(|&(idx, _)| idx == j);
        let standard_error = match (c, &covariance) {
            (Some(c), Some(cov)) => {
                let var = cov[(c, c)];
                (var >= 0.0).then(|| ps.transform.derivative(run.values[j]).abs() * var.sqrt())
            }
            _ => None,
        };
        parameters.push(FittedParameter {
            name: ps.name,
            value: run.values[j],
            fixed: c.is_none(),
            standard_error,
        });
    }
    let mut points = Vec::with_capacity(m);
    let k = run.values.len();
    let (mut g, mut s) = (vec![0.0; k], vec![0.0; k]);
    for (i, (name, eqps_test)) in names.iter().enumerate() {
        let residual = data.residual(&locus, i, &mut g, &mut s);
        let (eqps_model, damage_at_end) = match (objective, paths) {
            (Objective::Damage, Some(paths)) => {
                let path = &paths[i];
                match residual {
                    Some(ri) => {
                        let crossing = accumulate(
                            &locus,
                            DamageRule::Linear,
                            &path.eqps,
                            &path.triaxiality,
                            &path.lode_angle_param,
                        )
                        .ok()
                        .and_then(|h| h.crossing);
                        (crossing.map(|c| c.eqps), Some((-ri).exp()))
                    }
                    None => (None, None),
                }
            }
            _ => (residual.map(|ri| eqps_test * ri.exp()), None),
        };
        points.push(PointResult {
            name: name.clone(),
            eqps_test: *eqps_test,
            eqps_model,
            damage_at_end,
            log_residual: residual,
        });
    }
    Ok(FitReport {
        model: kind,
        objective,
        locus,
        parameters,
        points,
        sum_of_squares: ssr,
        rms_log_residual: (ssr / m as f64).sqrt(),
        residual_variance: variance,
        termination: run.termination.clone(),
        converged: run.converged,
        evaluations: run.evaluations,
        total_evaluations,
        starts,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;
    use levenberg_marquardt::differentiate_numerically;

    fn jc_points() -> Vec<CalibrationPoint> {
        // Invented test data.
        [(0.0, 1.8), (0.33, 0.9), (0.5, 0.7), (0.8, 0.4), (1.1, 0.3)]
            .iter()
            .enumerate()
            .map(|(i, &(eta, e))| CalibrationPoint {
                name: format!("s{i}"),
                eqps_f: e,
                triaxiality_avg: eta,
                lode_angle_param_avg: 1.0 - 0.3 * i as f64,
            })
            .collect()
    }

    fn path(name: &str, eta0: f64, eta1: f64, th0: f64, th1: f64, end: f64) -> SpecimenPath {
        let n = 12;
        let mut p = SpecimenPath {
            name: name.into(),
            eqps: vec![0.0],
            triaxiality: vec![None],
            lode_angle_param: vec![None],
        };
        for k in 0..n {
            let s = k as f64 / (n - 1) as f64;
            p.eqps.push(end * s);
            p.triaxiality.push(Some(eta0 + (eta1 - eta0) * s));
            p.lode_angle_param.push(Some(th0 + (th1 - th0) * s));
        }
        p
    }

    fn check_jacobian(
        data: &Data,
        kind: ModelKind,
        values: Vec<f64>,
        free: Vec<(usize, Transform)>,
    ) {
        let mut problem = Problem::new(data, kind, values, free);
        let numeric = differentiate_numerically(&mut problem).unwrap();
        let analytic = problem.jacobian().unwrap();
        assert_eq!(numeric.shape(), analytic.shape());
        for (a, n) in analytic.iter().zip(numeric.iter()) {
            assert!(
                (a - n).abs() <= 1e-6 * (1.0 + n.abs()),
                "analytic {a} numeric {n}"
            );
        }
    }

    #[test]
    fn jacobian_matches_crate_numerical_differentiation() {
        // Checked against levenberg_marquardt::differentiate_numerically, both objectives.
        let avg = prepare_points(&jc_points()).unwrap();
        let paths = vec![
            path("p1", 0.3, 0.6, 1.0, 0.2, 0.5),
            path("p2", 0.0, 0.1, 0.0, -0.4, 0.9),
            path("p3", 0.6, 0.7, -1.0, -0.6, 0.3),
        ];
        let dmg = prepare_paths(&paths).unwrap();
        use Transform::*;
        for data in [&avg, &dmg] {
            check_jacobian(
                data,
                ModelKind::JohnsonCook,
                vec![0.1, 2.0, -1.5],
                vec![(0, Identity), (1, Log), (2, Identity)],
            );
            check_jacobian(
                data,
                ModelKind::HosfordCoulomb,
                vec![1.7, 0.8, 0.08, 0.1],
                vec![(0, OnePlusExp), (1, Log), (2, Log), (3, Log)],
            );
            check_jacobian(
                data,
                ModelKind::ModifiedMohrCoulomb,
                vec![800.0, 0.15, 0.1, 400.0, 0.95, 1.0, 1.1],
                vec![(1, Log), (2, Log), (3, Log), (4, Log), (5, Log), (6, Log)],
            );
        }
    }

    #[test]
    fn too_few_points_says_how_many() {
        let spec = FitSpec::new(ModelKind::JohnsonCook);
        let e = fit_average(&spec, &jc_points()[..2]).unwrap_err();
        assert!(
            matches!(
                e,
                LocusError::TooFewPoints {
                    free: 3,
                    given: 2,
                    ..
                }
            ),
            "{e}"
        );
        assert!(e.to_string().contains("at least 3"), "{e}");
    }

    #[test]
    fn mmc_needs_hardening_parameters() {
        let spec = FitSpec::new(ModelKind::ModifiedMohrCoulomb);
        let e = fit_average(&spec, &jc_points()).unwrap_err();
        assert!(
            matches!(e, LocusError::MissingValue { name: "A", .. }),
            "{e}"
        );
    }

    #[test]
    fn invalid_inputs_are_named() {
        let spec = FitSpec::new(ModelKind::JohnsonCook);
        let mut pts = jc_points();
        pts[2].eqps_f = -1.0;
        let e = fit_average(&spec, &pts).unwrap_err();
        assert!(e.to_string().contains("'s2'"), "{e}");
        let mut p = path("bad", 0.3, 0.6, 1.0, 0.2, 0.5);
        p.triaxiality[1] = None; // row 1 borders the plastic increment 1→2
        let e = fit_damage(&spec, &[p.clone(), p.clone(), p]).unwrap_err();
        assert!(e.to_string().contains("row 1"), "{e}");
    }

    #[test]
    fn fixed_parameters_are_echoed() {
        let mut spec = FitSpec::new(ModelKind::JohnsonCook);
        spec.fix("D1", 0.05).unwrap();
        let r = fit_average(&spec, &jc_points()).unwrap();
        assert_eq!(r.parameters[0].value, 0.05);
        assert!(r.parameters[0].fixed);
        assert!(r.parameters[0].standard_error.is_none());
        assert!(r.parameters[1].standard_error.is_some());
        // Model strain and residual agree.
        for p in &r.points {
            assert_relative_eq!(
                p.log_residual.unwrap(),
                (p.eqps_model.unwrap() / p.eqps_test).ln(),
                epsilon = 1e-12
            );
        }
        assert!(spec.fix("D9", 1.0).is_err());
    }
}
