//! The symmetric Cauchy stress tensor and its construction from solver layouts.

use nalgebra::Matrix3;

use crate::{Component, ComponentOrder, StressState, TensorError};

/// Relative tolerance for the symmetry check of a 9-component tensor:
/// `|a_ij − a_ji| ≤ SYMMETRY_REL_TOL · max_kl |a_kl|`.
///
/// 1e-6 admits tensors stored in single precision (Float32 carries about 7 significant
/// digits) while rejecting tensors that are not stresses at all.
pub const SYMMETRY_REL_TOL: f64 = 1e-6;

/// A symmetric Cauchy (true) stress tensor, tension positive (FIELD-NOTES §1).
///
/// Components are stored in VTK's symmetric order `XX, YY, ZZ, XY, YZ, XZ`. All are finite:
/// every constructor checks.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Stress {
    c: [f64; 6],
}

impl Stress {
    /// Builds a tensor from six components in VTK's order `XX, YY, ZZ, XY, YZ, XZ`.
    ///
    /// Errors when a component is NaN or infinite.
    pub fn from_vtk6(c: [f64; 6]) -> Result<Stress, TensorError> {
        for (value, comp) in c.iter().zip(Component::ALL) {
            if !value.is_finite() {
                return Err(TensorError::NonFinite {
                    component: comp.label(),
                    value: *value,
                });
            }
        }
        Ok(Stress { c })
    }

    /// Builds a tensor from six components in a named order.
    pub fn from_ordered(c: [f64; 6], order: &ComponentOrder) -> Result<Stress, TensorError> {
        Self::from_vtk6(order.to_vtk(c))
    }

    /// Builds a tensor from nine components, row-major
    /// `[xx, xy, xz, yx, yy, yz, zx, zy, zz]` (the layout of VTK's 9-component tensors).
    ///
    /// The tensor must be symmetric within [`SYMMETRY_REL_TOL`] relative to its largest
    /// component; the off-diagonal pairs are then averaged.
    pub fn from_full9(m: [f64; 9]) -> Result<Stress, TensorError> {
        Self::from_full9_tol(m, SYMMETRY_REL_TOL)
    }

    /// As [`Stress::from_full9`] with an explicit relative symmetry tolerance.
    pub fn from_full9_tol(m: [f64; 9], tol: f64) -> Result<Stress, TensorError> {
        const LABELS: [&str; 9] = ["xx", "xy", "xz", "yx", "yy", "yz", "zx", "zy", "zz"];
        for (value, label) in m.iter().zip(LABELS) {
            if !value.is_finite() {
                return Err(TensorError::NonFinite {
                    component: label,
                    value: *value,
                });
            }
        }
        let scale = m.iter().fold(0.0_f64, |acc, v| acc.max(v.abs()));
        for (upper, lower) in [(1, 3), (2, 6), (5, 7)] {
            let (a, b) = (m[upper], m[lower]);
            if (a - b).abs() > tol * scale {
                return Err(TensorError::NotSymmetric {
                    upper: LABELS[upper],
                    lower: LABELS[lower],
                    a,
                    b,
                    tol,
                });
            }
        }
        Self::from_vtk6([
            m[0],
            m[4],
            m[8],
            0.5 * (m[1] + m[3]),
            0.5 * (m[5] + m[7]),
            0.5 * (m[2] + m[6]),
        ])
    }

    /// Builds a tensor from a slice of 6 components (in `order`) or 9 components (row-major).
    pub fn from_slice(values: &[f64], order: &ComponentOrder) -> Result<Stress, TensorError> {
        match *values {
            [a, b, c, d, e, f] => Self::from_ordered([a, b, c, d, e, f], order),
            [a, b, c, d, e, f, g, h, i] => Self::from_full9([a, b, c, d, e, f, g, h, i]),
            _ => Err(TensorError::ComponentCount(values.len())),
        }
    }

    /// The six components in VTK's order `XX, YY, ZZ, XY, YZ, XZ`.
    pub fn vtk6(&self) -> [f64; 6] {
        self.c
    }

    /// The full symmetric matrix.
    pub fn matrix(&self) -> Matrix3<f64> {
        let [xx, yy, zz, xy, yz, xz] = self.c;
        Matrix3::new(xx, xy, xz, xy, yy, yz, xz, yz, zz)
    }

    /// Hydrostatic (mean) stress σ_h = tr σ / 3 (FIELD-NOTES §1). Tension positive: a
    /// solver's pressure is p = −σ_h.
    #[inline]
    pub fn hydrostatic(&self) -> f64 {
        let sum = self.c[0] + self.c[1] + self.c[2];
        if sum.is_finite() {
            sum / 3.0
        } else {
            // the sum of finite components overflowed (near f64::MAX): divide first
            self.c[0] / 3.0 + self.c[1] / 3.0 + self.c[2] / 3.0
        }
    }

    /// The measures of the stress state: σ_h, σ_vm, J2, J3 and the [`crate::Shape`].
    #[inline]
    pub fn state(&self) -> StressState {
        StressState::from_vtk6(&self.c)
    }

    /// Principal stresses σ1 ≥ σ2 ≥ σ3.
    ///
    /// Computed by nalgebra's symmetric eigen-solver (Householder tridiagonalisation and
    /// implicit QR), which stays accurate for repeated eigenvalues, unlike the closed-form
    /// trigonometric solution whose error near ξ = ±1 grows like √ε.
    pub fn principal(&self) -> [f64; 3] {
        // Scale to unit magnitude so extreme magnitudes (1e±300) neither overflow nor
        // underflow inside the solver.
        let scale = self.c.iter().fold(0.0_f64, |acc, v| acc.max(v.abs()));
        if scale == 0.0 {
            return [0.0; 3];
        }
        // (component-wise division: 1/scale would overflow for a subnormal scale)
        let m = self.matrix().map(|v| v / scale);
        let ev = m.symmetric_eigenvalues();
        let mut p = [ev[0] * scale, ev[1] * scale, ev[2] * scale];
        p.sort_by(|a, b| b.total_cmp(a));
        p
    }

    /// The tensor plus a hydrostatic part `p·I` (tension positive).
    pub fn plus_hydrostatic(&self, p: f64) -> Stress {
        let mut c = self.c;
        c[0] += p;
        c[1] += p;
        c[2] += p;
        Stress { c }
    }

    /// The tensor multiplied by a finite scalar.
    pub fn scaled(&self, k: f64) -> Stress {
        Stress {
            c: self.c.map(|v| v * k),
        }
    }

    /// The rotated tensor R σ Rᵀ for a rotation (or any orthogonal) matrix R.
    pub fn rotated(&self, r: &Matrix3<f64>) -> Stress {
        let m = r * self.matrix() * r.transpose();
        Stress {
            c: [
                m[(0, 0)],
                m[(1, 1)],
                m[(2, 2)],
                0.5 * (m[(0, 1)] + m[(1, 0)]),
                0.5 * (m[(1, 2)] + m[(2, 1)]),
                0.5 * (m[(0, 2)] + m[(2, 0)]),
            ],
        }
    }

    /// A diagonal tensor with the given principal values along x, y, z.
    pub fn diagonal(s1: f64, s2: f64, s3: f64) -> Result<Stress, TensorError> {
        Self::from_vtk6([s1, s2, s3, 0.0, 0.0, 0.0])
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn nine_components_symmetric_and_not() {
        let s = Stress::from_full9([1.0, 2.0, 3.0, 2.0, 4.0, 5.0, 3.0, 5.0, 6.0]).unwrap();
        assert_eq!(s.vtk6(), [1.0, 4.0, 6.0, 2.0, 5.0, 3.0]);
        let e = Stress::from_full9([1.0, 2.0, 3.0, 2.5, 4.0, 5.0, 3.0, 5.0, 6.0]).unwrap_err();
        assert!(
            matches!(e, TensorError::NotSymmetric { upper: "xy", .. }),
            "{e}"
        );
    }

    #[test]
    fn non_finite_is_an_error_naming_the_component() {
        let e = Stress::from_vtk6([0.0, 0.0, 0.0, f64::NAN, 0.0, 0.0]).unwrap_err();
        assert!(e.to_string().contains("xy"), "{e}");
        let e = Stress::from_full9([0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, f64::INFINITY])
            .unwrap_err();
        assert!(e.to_string().contains("zz"), "{e}");
    }

    #[test]
    fn slice_lengths() {
        let o = ComponentOrder::VTK;
        assert!(Stress::from_slice(&[0.0; 6], &o).is_ok());
        assert!(Stress::from_slice(&[0.0; 9], &o).is_ok());
        assert_eq!(
            Stress::from_slice(&[0.0; 4], &o).unwrap_err(),
            TensorError::ComponentCount(4)
        );
    }

    #[test]
    fn principal_of_extreme_magnitudes() {
        for k in [1e-300, 1e-30, 1.0, 1e30, 1e300] {
            let s = Stress::diagonal(3.0 * k, -k, 2.0 * k).unwrap();
            let p = s.principal();
            assert!((p[0] / k - 3.0).abs() < 1e-12, "{k}: {p:?}");
            assert!((p[1] / k - 2.0).abs() < 1e-12, "{k}: {p:?}");
            assert!((p[2] / k + 1.0).abs() < 1e-12, "{k}: {p:?}");
        }
    }
}
