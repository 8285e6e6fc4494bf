//! Charts and the campaign report of ductrace.
//!
//! Four charts, each a [`Chart`] (its SVG at 800 × 520 pixels in [`Chart::svg`], PNG on
//! request with [`Chart::png`]):
//! - [`path_chart`]: one specimen's η and θ̄ against ε̄p, with averages and the stop;
//! - [`state_plane_chart`]: every path in the (η, θ̄) plane over the plane-stress curve and
//!   the standard states;
//! - [`locus_chart`]: fracture strain against η, model curves and calibration points;
//! - [`damage_chart`]: damage against gauge elongation, with the measured fracture values.
//!
//! [`report::render`] writes the campaign report: one self-contained HTML file (inline CSS
//! and SVG, no script, no external asset) from a [`report::ReportData`].
//!
//! The inputs are plain data types of this crate (no dependency on the other ductrace
//! crates); the command line converts. Text is laid out with the embedded DejaVu Sans
//! ([`init_fonts`]); no system font library is used.
//!
//! Architecture invariant: no computation of stress measures, averages, fits or damage here;
//! this crate draws what it is given, and refuses NaN and infinite values with an error
//! naming the series and index.
//!
//! ```
//! use ductrace_plot::{PathData, path_chart};
//! let chart = path_chart(&PathData {
//!     name: "bar R4 (invented)".into(),
//!     eqps: vec![0.0, 0.2, 0.4],
//!     triaxiality: vec![None, Some(0.55), Some(0.62)],
//!     lode_angle_param: vec![None, Some(0.99), Some(0.97)],
//!     triaxiality_avg: Some(0.59),
//!     lode_angle_param_avg: Some(0.98),
//!     eqps_f: 0.4,
//! })?;
//! assert!(chart.svg.contains("bar R4 (invented)"));
//! assert!(chart.png(800, 520)?.starts_with(b"\x89PNG"));
//! # Ok::<(), ductrace_plot::PlotError>(())
//! ```
#![deny(missing_docs)]

mod chart;
mod damage;
mod error;
mod fonts;
pub mod format;
mod locus;
mod path;
mod plane;
pub mod report;
mod style;

pub use chart::{Chart, DEFAULT_SIZE, MAX_ABS, MAX_SIDE, MIN_SIDE};
pub use damage::{DamageSeries, damage_chart};
pub use error::PlotError;
pub use fonts::{FAMILY, init_fonts};
pub use locus::{LocusChartData, LocusCurve, LocusPoint, locus_chart};
pub use path::{PathData, path_chart};
pub use plane::{NamedPath, STANDARD_STATES, plane_stress_lode_angle_param, state_plane_chart};
pub use style::PALETTE;
