//! Stress-state measures of ductile fracture, computed from one Cauchy stress tensor.
//!
//! This crate is the numerical core of ductrace. It owns:
//!
//! * [`Stress`]: a symmetric Cauchy stress tensor (tension positive), built from the
//!   component layouts solvers write: VTK's symmetric 6-order (`XX, YY, ZZ, XY, YZ, XZ`),
//!   any other named 6-order ([`ComponentOrder`]), or a full row-major 9-component tensor
//!   checked for symmetry.
//! * [`StressState`]: hydrostatic stress σ_h, von Mises stress σ_vm, the deviatoric
//!   invariants J2 and J3, and the [`Shape`] of the state: triaxiality η, the normalised
//!   third invariant ξ, the Lode angle parameter θ̄ and the Lode parameter μ — or the
//!   reason they are undefined ([`Undefined`]), never a NaN.
//! * [`Stress::principal`]: principal stresses σ1 ≥ σ2 ≥ σ3.
//! * [`batch`]: the same over whole arrays (one increment's cells), splittable by rayon,
//!   with no allocation per cell.
//! * [`strain`]: the equivalent plastic strain increment of a plastic strain tensor increment.
//!
//! Architecture invariant: no I/O, no file formats, no terminal. Inputs are numbers, outputs
//! are numbers or typed "undefined" values. Every function is total: a non-finite component
//! is an error value, a degenerate state is a typed case.
//!
//! Formulas and sources (see each item): Bao & Wierzbicki (2004) for η, Bai & Wierzbicki
//! (2008) for ξ and θ̄, Lode (1926) for μ.
//!
//! ```
//! use ductrace_tensor::Stress;
//! // Uniaxial tension of 100 (any unit), VTK order XX, YY, ZZ, XY, YZ, XZ.
//! let s = Stress::from_vtk6([100.0, 0.0, 0.0, 0.0, 0.0, 0.0]).unwrap();
//! let state = s.state();
//! assert!((state.sigma_vm - 100.0).abs() < 1e-12);
//! assert!((state.triaxiality().unwrap() - 1.0 / 3.0).abs() < 1e-12);
//! assert!((state.lode_angle_param().unwrap() - 1.0).abs() < 1e-12);
//! let [s1, s2, s3] = s.principal();
//! assert!((s1 - 100.0).abs() < 1e-12 && s2.abs() < 1e-12 && s3.abs() < 1e-12);
//! ```
#![deny(missing_docs)]

pub mod batch;
mod error;
mod order;
mod state;
pub mod strain;
mod stress;

pub use error::TensorError;
pub use order::{Component, ComponentOrder};
pub use state::{DEGENERATE_REL_TOL, Lode, Shape, StressState, Undefined};
pub use stress::{SYMMETRY_REL_TOL, Stress};
