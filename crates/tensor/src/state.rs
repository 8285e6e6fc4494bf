//! Stress-state measures: σ_h, σ_vm, J2, J3, and the shape of the state (η, ξ, θ̄, μ).
//!
//! Definitions (FIELD-NOTES §1), with σ the Cauchy stress, tension positive, and
//! s = σ − σ_h I its deviator:
//!
//! * σ_h = tr σ / 3; J2 = s:s / 2; J3 = det s; σ_vm = √(3 J2).
//! * Triaxiality η = σ_h / σ_vm (Bao & Wierzbicki 2004, Int. J. Mech. Sci. 46:81–98).
//! * ξ = (27/2) J3 / σ_vm³ = cos 3θ, clamped to [−1, 1] against round-off; θ̄ = 1 − (2/π) arccos ξ
//!   (Bai & Wierzbicki 2008, Int. J. Plasticity 24:1071–1096).
//! * Lode parameter μ = (2σ2 − σ1 − σ3)/(σ1 − σ3) (Lode 1926, Z. Physik 36), evaluated through the
//!   identity μ = −√3 tan(π θ̄ / 6) so no eigen-solve is needed; the tests check the identity
//!   against principal stresses.
//!
//! η, ξ, θ̄ and μ are undefined when σ_vm vanishes: a zero tensor or a purely hydrostatic one.
//! [`Shape`] says which, so no NaN ever leaves this module.
//!
//! Numerics: all invariants are computed on the tensor scaled by its largest component, so
//! magnitudes from 1e−300 to 1e300 neither underflow nor overflow. ξ → θ̄ goes through arccos,
//! whose conditioning near ξ = ±1 limits θ̄ to about 1.5e−8 absolute (√ε) there.

use std::f64::consts::PI;

/// Relative tolerance below which σ_vm counts as zero: the state is hydrostatic when
/// σ_vm ≤ `DEGENERATE_REL_TOL` · max_ij |σ_ij|.
///
/// A hydrostatic state assembled in double precision carries a spurious σ_vm of about
/// 1e−16 of its magnitude; 1e−10 leaves a wide margin while any deviatoric part a solver
/// would resolve (single precision resolves 1e−7) is kept.
pub const DEGENERATE_REL_TOL: f64 = 1e-10;

/// Why the shape measures (η, ξ, θ̄, μ) of a state are undefined.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Undefined {
    /// All components are zero.
    ZeroStress,
    /// The stress is purely hydrostatic (σ_vm is zero relative to the stress magnitude).
    Hydrostatic,
}

impl Undefined {
    /// A short phrase for messages, e.g. `"zero stress"`.
    pub fn describe(self) -> &'static str {
        match self {
            Undefined::ZeroStress => "zero stress",
            Undefined::Hydrostatic => "purely hydrostatic stress",
        }
    }
}

/// The shape measures of a stress state with σ_vm > 0.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Lode {
    /// Triaxiality η = σ_h / σ_vm (Bao & Wierzbicki 2004).
    pub triaxiality: f64,
    /// Normalised third invariant ξ = (27/2) J3 / σ_vm³ ∈ [−1, 1] (Bai & Wierzbicki 2008).
    pub xi: f64,
    /// Lode angle parameter θ̄ = 1 − (2/π) arccos ξ ∈ [−1, 1] (Bai & Wierzbicki 2008).
    pub lode_angle_param: f64,
    /// Lode parameter μ = (2σ2 − σ1 − σ3)/(σ1 − σ3) = −√3 tan(π θ̄/6) ∈ [−1, 1] (Lode 1926).
    pub lode_param: f64,
}

/// The shape of a stress state: its measures, or why they are undefined.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Shape {
    /// σ_vm > 0: every measure is defined.
    Defined(Lode),
    /// σ_vm = 0 relative to the stress magnitude.
    Undefined(Undefined),
}

/// The stress-state measures of one tensor.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StressState {
    /// Hydrostatic (mean) stress σ_h = tr σ / 3, tension positive, in the input's unit.
    pub sigma_h: f64,
    /// Von Mises equivalent stress σ_vm = √(3 J2), in the input's unit.
    pub sigma_vm: f64,
    /// η, ξ, θ̄, μ, or why they are undefined.
    pub shape: Shape,
}

impl StressState {
    /// Evaluates a tensor given in VTK's symmetric order `XX, YY, ZZ, XY, YZ, XZ`.
    ///
    /// The components must be finite (the [`crate::Stress`] constructors check; batch
    /// functions check too). With non-finite input the result is unspecified but this
    /// function does not panic.
    #[inline]
    pub fn from_vtk6(c: &[f64; 6]) -> StressState {
        let core = invariants(c);
        let shape = match core.shape {
            Ok(s) => {
                let lode_angle_param = s.lode_angle_param();
                let lode_param = -(3.0_f64.sqrt()) * (PI * lode_angle_param / 6.0).tan();
                Shape::Defined(Lode {
                    triaxiality: s.triaxiality,
                    xi: s.xi,
                    lode_angle_param,
                    lode_param: lode_param.clamp(-1.0, 1.0),
                })
            }
            Err(u) => Shape::Undefined(u),
        };
        StressState {
            sigma_h: core.sigma_h,
            sigma_vm: core.sigma_vm,
            shape,
        }
    }

    /// The shape measures when defined.
    #[inline]
    pub fn lode(&self) -> Option<&Lode> {
        match &self.shape {
            Shape::Defined(l) => Some(l),
            Shape::Undefined(_) => None,
        }
    }

    /// Why the shape measures are undefined, if they are.
    pub fn undefined(&self) -> Option<Undefined> {
        match self.shape {
            Shape::Defined(_) => None,
            Shape::Undefined(u) => Some(u),
        }
    }

    /// Triaxiality η = σ_h / σ_vm; `None` when σ_vm = 0.
    #[inline]
    pub fn triaxiality(&self) -> Option<f64> {
        self.lode().map(|l| l.triaxiality)
    }

    /// ξ = (27/2) J3 / σ_vm³; `None` when σ_vm = 0.
    pub fn xi(&self) -> Option<f64> {
        self.lode().map(|l| l.xi)
    }

    /// Lode angle parameter θ̄; `None` when σ_vm = 0.
    #[inline]
    pub fn lode_angle_param(&self) -> Option<f64> {
        self.lode().map(|l| l.lode_angle_param)
    }

    /// Lode parameter μ; `None` when σ_vm = 0.
    pub fn lode_param(&self) -> Option<f64> {
        self.lode().map(|l| l.lode_param)
    }

    /// J2 = σ_vm² / 3. May overflow to infinity for stresses beyond about 1e154.
    pub fn j2(&self) -> f64 {
        self.sigma_vm * self.sigma_vm / 3.0
    }

    /// J3 = (2/27) ξ σ_vm³ (0 when σ_vm = 0). May overflow to infinity for stresses beyond
    /// about 1e102.
    pub fn j3(&self) -> f64 {
        match self.xi() {
            // ξ = 0 (pure shear) gives 0 even when σ_vm³ overflows (never 0 · ∞ = NaN).
            Some(xi) if xi != 0.0 => 2.0 / 27.0 * xi * self.sigma_vm.powi(3),
            _ => 0.0,
        }
    }
}

/// σ_h, σ_vm, η, ξ and θ̄ of one tensor: the computation shared by [`StressState`] and the
/// batch kernels ([`crate::batch::measures_vtk6`]), so both give bit-identical values.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Invariants {
    pub(crate) sigma_h: f64,
    pub(crate) sigma_vm: f64,
    pub(crate) shape: Result<ShapeCore, Undefined>,
}

/// η and ξ of a tensor with σ_vm > 0; θ̄ follows from ξ on request (one `acos`).
#[derive(Debug, Clone, Copy)]
pub(crate) struct ShapeCore {
    pub(crate) triaxiality: f64,
    pub(crate) xi: f64,
}

impl ShapeCore {
    /// θ̄ = 1 − (2/π) arccos ξ (Bai & Wierzbicki 2008).
    #[inline]
    pub(crate) fn lode_angle_param(&self) -> f64 {
        lode_angle_param_of(self.xi)
    }
}

/// θ̄ = 1 − (2/π) arccos ξ for ξ ∈ [−1, 1] (Bai & Wierzbicki 2008): the one place the crate
/// turns ξ into θ̄, so every path gives the same bits.
#[inline]
pub(crate) fn lode_angle_param_of(xi: f64) -> f64 {
    1.0 - (2.0 / PI) * xi.acos()
}

/// The invariants of six components in VTK's order (see the module doc for the formulas and
/// the scaling); finite input is the caller's to ensure, non-finite input gives a value
/// without panicking.
#[inline(always)]
pub(crate) fn invariants(c: &[f64; 6]) -> Invariants {
    let scale = c.iter().fold(0.0_f64, |acc, v| acc.max(v.abs()));
    if scale == 0.0 || !scale.is_finite() {
        return Invariants {
            sigma_h: 0.0,
            sigma_vm: 0.0,
            shape: Err(Undefined::ZeroStress),
        };
    }
    // Multiplying by 1/scale is exact enough in the normal range; outside it 1/scale
    // overflows (subnormal scale) or is itself subnormal (scale near f64::MAX), so divide.
    let [xx, yy, zz, xy, yz, xz] = if (1e-300..=1e300).contains(&scale) {
        let inv = 1.0 / scale;
        c.map(|v| v * inv)
    } else {
        c.map(|v| v / scale)
    };
    let h = (xx + yy + zz) / 3.0;
    let (dx, dy, dz) = (xx - h, yy - h, zz - h);
    // J2 = s:s/2 with the off-diagonal terms counted twice.
    let j2 = 0.5 * (dx * dx + dy * dy + dz * dz) + xy * xy + yz * yz + xz * xz;
    let vm = (3.0 * j2).sqrt();
    let sigma_h = h * scale;
    let sigma_vm = vm * scale;
    if vm <= DEGENERATE_REL_TOL {
        return Invariants {
            sigma_h,
            sigma_vm,
            shape: Err(Undefined::Hydrostatic),
        };
    }
    // J3 = det s.
    let j3 = dx * (dy * dz - yz * yz) - xy * (xy * dz - yz * xz) + xz * (xy * yz - dy * xz);
    let xi = (13.5 * j3 / (vm * vm * vm)).clamp(-1.0, 1.0);
    Invariants {
        sigma_h,
        sigma_vm,
        shape: Ok(ShapeCore {
            triaxiality: h / vm,
            xi,
        }),
    }
}
