//! Stress-state histories at the critical point of a fracture specimen, and their averages.
//!
//! This crate turns a result series ([`ductrace_vtk::Series`]) into what a calibration needs
//! from one specimen:
//!
//! * [`spec`]: the selector (`cell:ID`, `point:ID`, `near:X,Y,Z`, `max:FIELD`), stop
//!   (`increment:N`, `time:T`, `eqps:E`, `gauge:U`) and gauge (`X1,Y1,Z1:X2,Y2,Z2`,
//!   `X,Y,Z/AXIS`) syntax;
//! * [`fields`]: which arrays serve as stress, equivalent plastic strain and displacement;
//! * [`locate`]: the reference configuration, nearest entities, bounding boxes;
//! * [`history`]: streaming the increments at one entity, rows of measures, the stop, and
//!   [`history::extract`], the whole job;
//! * [`average`]: the pure averaging core — trapezoid integration of η and θ̄ against ε̄p up
//!   to a fractional stop (Bao & Wierzbicki 2004; Bai & Wierzbicki 2008).
//!
//! Architecture invariant: this crate knows nothing of terminals or output formats; it
//! reads through the reader's API only, one increment at a time, and a single-entity
//! history decodes only that entity's tuples.
#![deny(missing_docs)]

pub mod average;
mod error;
pub mod fields;
pub mod history;
pub mod locate;
pub mod spec;

pub use error::{Result, TrackError};
pub use fields::FieldOptions;
pub use history::{History, HistoryRequest, Row, Summary, extract};
pub use spec::{Axis, GaugeSpec, Selector, Stop};
