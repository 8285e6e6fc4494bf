//! A calibration campaign: the study file, one calibration point per specimen, the table.
//!
//! A *study* (TOML, [`Study::load`]) names the material and, per specimen, the result
//! folder, the critical-point selector, the gauge and the fracture instant from the test,
//! with optional notch geometry and measured sizes. [`evaluate`] runs one specimen's
//! history ([`ductrace_track::extract`]) and [`Point`] is its row of the campaign table:
//! (η_avg, θ̄_avg, ε_f) and their context, with Bridgman's estimate of the initial notch
//! triaxiality ([`estimates::bridgman`]) and the area-based fracture strain
//! ([`estimates::area_strain`]) where the geometry is given.
//!
//! Architecture invariant: no terminal, no output format; the command line prints.
#![deny(missing_docs)]

mod error;
pub mod estimates;
mod study;

use std::path::PathBuf;

pub use error::StudyError;
pub use study::{Fields, Kind, Material, Measured, Notch, SpecimenSpec, StopSpec, Study};

use ductrace_track::{History, HistoryRequest};
use ductrace_vtk::Series;

/// One row of the campaign table: a specimen's calibration point.
#[derive(Debug, Clone, PartialEq)]
pub struct Point {
    /// Specimen name.
    pub specimen: String,
    /// Specimen kind.
    pub kind: Kind,
    /// `point` or `cell`.
    pub location: String,
    /// Entity id.
    pub id: usize,
    /// ε̄p at the fracture instant: the local fracture strain ε_f.
    pub eqps_f: f64,
    /// η_avg up to the fracture instant.
    pub triaxiality_avg: Option<f64>,
    /// θ̄_avg up to the fracture instant.
    pub lode_angle_param_avg: Option<f64>,
    /// η at the fracture instant.
    pub triaxiality_f: Option<f64>,
    /// θ̄ at the fracture instant.
    pub lode_angle_param_f: Option<f64>,
    /// The fracture instant as a fractional increment.
    pub stop_increment: f64,
    /// Segments with plastic flow in the averages.
    pub increments_integrated: usize,
    /// Bridgman's estimate of the initial triaxiality at the notch centre.
    pub bridgman: Option<f64>,
    /// Area-based fracture strain from the measured sizes.
    pub eps_f_area: Option<f64>,
    /// Gauge signal at the fracture instant.
    pub gauge_f: Option<f64>,
}

/// Runs one specimen of a study: opens its result and extracts the history to its stop.
pub fn evaluate(study: &Study, spec: &SpecimenSpec) -> Result<History, StudyError> {
    let req: HistoryRequest = spec.request()?;
    let path: PathBuf = study.result_path(spec);
    let series = Series::open(&path).map_err(|e| StudyError::Specimen {
        specimen: spec.name.clone(),
        message: e.to_string(),
    })?;
    ductrace_track::extract(&series, &req).map_err(|e| StudyError::Specimen {
        specimen: spec.name.clone(),
        message: e.to_string(),
    })
}

/// The table row of a specimen from its history.
pub fn point(spec: &SpecimenSpec, h: &History) -> Point {
    let s = &h.summary;
    Point {
        specimen: spec.name.clone(),
        kind: spec.kind,
        location: h.point.location.to_string(),
        id: h.point.id,
        eqps_f: s.eqps,
        triaxiality_avg: s.triaxiality_avg,
        lode_angle_param_avg: s.lode_angle_param_avg,
        triaxiality_f: s.triaxiality,
        lode_angle_param_f: s.lode_angle_param,
        stop_increment: s.stop_increment,
        increments_integrated: s.increments_integrated,
        bridgman: spec.notch.and_then(|n| estimates::bridgman(spec.kind, &n)),
        eps_f_area: spec
            .measured
            .and_then(|m| estimates::area_strain(spec.kind, &m)),
        gauge_f: s.gauge,
    }
}
