//! The crate's error type: every failure of model construction, fitting and damage
//! accumulation is a value of [`LocusError`], with a lower-case message naming the model,
//! parameter, point, path, increment or cell and the offending value.

use crate::fit::FitReport;

/// Everything that can go wrong in this crate.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum LocusError {
    /// A model id other than `jc`, `mmc` or `hc`.
    #[error("unknown fracture-locus model '{0}' (known: jc, mmc, hc)")]
    UnknownModel(String),

    /// A parameter name the model does not have.
    #[error("model {model} has no parameter '{name}' (its parameters: {known})")]
    UnknownParameter {
        /// Model id.
        model: &'static str,
        /// The name given.
        name: String,
        /// The model's parameter names, comma-separated.
        known: String,
    },

    /// A parameter named twice.
    #[error("model {model}: parameter '{name}' is given more than once")]
    DuplicateParameter {
        /// Model id.
        model: &'static str,
        /// The repeated name.
        name: String,
    },

    /// A parameter the model needs was not given.
    #[error("model {model}: parameter '{name}' is missing")]
    MissingParameter {
        /// Model id.
        model: &'static str,
        /// The missing name.
        name: &'static str,
    },

    /// A parameter value outside the model's domain.
    #[error("model {model}: parameter {name} = {value} is out of range (must be {requirement})")]
    OutOfDomain {
        /// Model id.
        model: &'static str,
        /// Parameter name.
        name: &'static str,
        /// The value given.
        value: f64,
        /// The condition it violates, e.g. "> 0".
        requirement: &'static str,
    },

    /// A list of values whose length does not match the model's parameter count.
    #[error("model {model} has {expected} parameters, {given} values were given")]
    ValueCount {
        /// Model id.
        model: &'static str,
        /// Parameters of the model.
        expected: usize,
        /// Values given.
        given: usize,
    },

    /// A fit with fewer data points than free parameters.
    #[error(
        "fit of model {model} has {free} free parameters and needs at least {free} data points; {given} given"
    )]
    TooFewPoints {
        /// Model id.
        model: &'static str,
        /// Number of free parameters.
        free: usize,
        /// Number of points or paths given.
        given: usize,
    },

    /// A fit with no free parameter.
    #[error("fit of model {model} has no free parameter: free at least one")]
    NothingToFit {
        /// Model id.
        model: &'static str,
    },

    /// A fixed parameter, or a free one without a default start, that has no value.
    #[error("fit of model {model}: parameter {name} needs a value ({hint})")]
    MissingValue {
        /// Model id.
        model: &'static str,
        /// Parameter name.
        name: &'static str,
        /// How to give it.
        hint: &'static str,
    },

    /// A calibration point with an unusable value.
    #[error("calibration point '{name}': {reason}")]
    InvalidPoint {
        /// Point (specimen) name.
        name: String,
        /// What is wrong, with the value.
        reason: String,
    },

    /// A specimen path with an unusable row.
    #[error("specimen path '{name}', row {row}: {reason}")]
    InvalidPath {
        /// Path (specimen) name.
        name: String,
        /// Row index (0-based).
        row: usize,
        /// What is wrong, with the value.
        reason: String,
    },

    /// No starting point of the fit had the model defined at every data point.
    #[error(
        "fit of model {model}: no starting point has the model defined at every data point (points in high compression beyond the locus cut-off?)"
    )]
    NoValidStart {
        /// Model id.
        model: &'static str,
    },

    /// No start of the fit converged; the best (lowest sum of squares) report is carried.
    #[error("fit of model {} did not converge ({}); best sum of squares {}", .0.model.id(), .0.termination, .0.sum_of_squares)]
    NotConverged(Box<FitReport>),

    /// The best fit leaves the model undefined at a data point.
    #[error("fit of model {}: the model is undefined at point '{point}' with the fitted parameters", .report.model.id())]
    UndefinedAtFit {
        /// The point (specimen) name.
        point: String,
        /// The best report.
        report: Box<FitReport>,
    },

    /// A full-field row without the Lode angle parameter given to a locus that depends on it.
    #[error(
        "row {row}: the fracture locus {model} depends on the Lode angle parameter, which this pass did not compute"
    )]
    MissingLodeAngle {
        /// Row index.
        row: usize,
        /// Model id.
        model: &'static str,
    },

    /// Arrays of one path or one increment whose lengths differ.
    #[error("array lengths differ: {what}")]
    LengthMismatch {
        /// Which arrays and their lengths.
        what: String,
    },

    /// A non-finite equivalent plastic strain.
    #[error("equivalent plastic strain is not finite ({value}) at {at}")]
    NonFiniteStrain {
        /// Where: "row k" or "cell c of row k".
        at: String,
        /// The value.
        value: f64,
    },

    /// The equivalent plastic strain decreases.
    #[error("equivalent plastic strain decreases from {from} to {to} at {at}")]
    DecreasingStrain {
        /// Where: "increment k (rows k-1 to k)" or with a cell index.
        at: String,
        /// Previous value.
        from: f64,
        /// New value.
        to: f64,
    },

    /// A plastic increment where the stress state is undefined at one of its ends.
    #[error(
        "{at}: plastic strain increment {increment} > 0 where the stress state (triaxiality or lode angle parameter) is undefined"
    )]
    UndefinedStressState {
        /// Δε̄p of the increment.
        increment: f64,
        /// Where.
        at: String,
    },

    /// A plastic increment where the fracture strain is undefined or not positive.
    #[error(
        "{at}: plastic strain increment {increment} > 0 where the fracture locus is undefined (triaxiality {eta}{}: beyond the locus cut-off or out of range)",
        lode_note(.theta_bar)
    )]
    UndefinedFractureStrain {
        /// Δε̄p of the increment.
        increment: f64,
        /// Where.
        at: String,
        /// Triaxiality there.
        eta: f64,
        /// Lode angle parameter there; `None` when the pass did not compute it because the
        /// locus does not depend on it.
        theta_bar: Option<f64>,
    },

    /// A plastic increment whose starting row (the previous state of a cell) has no
    /// defined fracture strain.
    #[error(
        "{at}: plastic strain increment {increment} > 0 but the stress state or the fracture strain is undefined at the start of the increment"
    )]
    UndefinedAtStart {
        /// Δε̄p of the increment.
        increment: f64,
        /// Where.
        at: String,
    },

    /// A damage exponent that is not finite and positive.
    #[error("damage exponent {0} is out of range (must be finite and > 0)")]
    InvalidExponent(f64),
}

/// ", lode angle parameter θ̄" for the message of [`LocusError::UndefinedFractureStrain`].
fn lode_note(theta_bar: &Option<f64>) -> String {
    theta_bar.map_or_else(String::new, |t| format!(", lode angle parameter {t}"))
}
