//! Fracture-locus models, their calibration and damage accumulation for ductrace.
//!
//! This crate owns three things:
//!
//! * [`models`]: fracture loci ε_f(η, θ̄) of triaxiality η and Lode angle parameter θ̄ —
//!   Johnson–Cook's stress-state part ([`JohnsonCook`], Johnson & Cook 1985), modified
//!   Mohr–Coulomb ([`ModifiedMohrCoulomb`], Bai & Wierzbicki 2010) and Hosford–Coulomb
//!   ([`HosfordCoulomb`], Mohr & Marcadet 2015) — behind the [`FractureLocus`] trait and
//!   the closed [`Locus`] enum with ids `jc`, `mmc`, `hc` ([`ModelKind`]).
//! * [`fit`]: Levenberg–Marquardt calibration on log residuals, either against averaged
//!   points ([`fit_average`]) or so that damage reaches 1 at each specimen's fracture
//!   instant ([`fit_damage`]); a [`FitSpec`] says which parameters are free; the
//!   [`FitReport`] carries all parameters, standard errors and per-point residuals.
//! * [`damage`]: linear (Johnson & Cook 1985) and power-law (Xue 2007) damage along a
//!   path ([`accumulate`]) and over whole fields one increment at a time
//!   ([`update_cells`], allocation-free and splittable across threads).
//!
//! Architecture invariant: pure numerics. No I/O, no file formats, no serialisation, no
//! terminal; the command line keeps serialisable mirrors of these types. Every function
//! is total: undefined values are `None` or an error value ([`LocusError`]), never a NaN
//! or a panic.
//!
//! Caution: fracture predictions can hurt people when wrong. A fitted locus is valid
//! only within the stress states and materials of its calibration tests; validate it
//! against tests it was not fitted to. Local codes and licensed engineering practice
//! govern any use for design or safety decisions.
//!
//! ```
//! use ductrace_locus::{
//!     accumulate, fit_average, CalibrationPoint, DamageRule, FitSpec, FractureLocus,
//!     JohnsonCook, ModelKind,
//! };
//!
//! // Invented calibration data generated from Johnson–Cook constants 0.05, 3.44, −2.12
//! // (4340 steel, Johnson & Cook 1985, as quoted in the project's field notes).
//! let truth = JohnsonCook::new(0.05, 3.44, -2.12)?;
//! let points: Vec<CalibrationPoint> = [0.0, 0.2, 1.0 / 3.0, 0.5, 0.8, 1.1]
//!     .iter()
//!     .map(|&eta| CalibrationPoint {
//!         name: format!("invented-{eta:.2}"),
//!         eqps_f: truth.fracture_strain(eta, 0.0).unwrap(),
//!         triaxiality_avg: eta,
//!         lode_angle_param_avg: 0.0,
//!     })
//!     .collect();
//! let report = fit_average(&FitSpec::new(ModelKind::JohnsonCook), &points)?;
//! assert!((report.parameters[2].value - (-2.12)).abs() < 1e-6);
//!
//! // Damage along a proportional path at η = 1/3 reaches 1 at ε_f(1/3).
//! let ef = report.locus.fracture_strain(1.0 / 3.0, 1.0).unwrap();
//! let eqps: Vec<f64> = (0..=10).map(|k| ef * k as f64 / 10.0).collect();
//! let eta = vec![Some(1.0 / 3.0); eqps.len()];
//! let theta = vec![Some(1.0); eqps.len()];
//! let history = accumulate(&report.locus, DamageRule::Linear, &eqps, &eta, &theta)?;
//! assert!((history.final_damage() - 1.0).abs() < 1e-6);
//! # Ok::<(), ductrace_locus::LocusError>(())
//! ```

#![deny(missing_docs)]

pub mod damage;
mod error;
pub mod fit;
pub mod models;

pub use damage::{
    CellDamage, Crossing, DamageHistory, DamageRule, IncrementFields, accumulate, start_cells,
    update_cells,
};
pub use error::LocusError;
pub use fit::{
    CalibrationPoint, FitOptions, FitReport, FitSpec, FittedParameter, Objective, ParameterSpec,
    PointResult, SpecimenPath, Transform, fit_average, fit_damage,
};
pub use models::{
    FractureLocus, HosfordCoulomb, JohnsonCook, Locus, ModelKind, ModifiedMohrCoulomb,
    cockcroft_latham_integrand, johnson_cook_rate_temperature_factor, mmc_first_bracket,
    rice_tracey_growth_rate,
};
