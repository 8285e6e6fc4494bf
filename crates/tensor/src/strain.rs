//! Equivalent plastic strain from plastic strain tensor increments.
//!
//! Δε̄p = √(2/3 Δεp:Δεp) (common practice; FIELD-NOTES §2). Summed over increments this is
//! the accumulated equivalent plastic strain; taken on the total tensor it is not, under
//! non-proportional loading. Solvers store the shear components either as tensor
//! components ε_xy or as engineering shears γ_xy = 2 ε_xy: [`Shear`] says which.

use crate::{ComponentOrder, TensorError};

/// How a strain file stores its shear components.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Shear {
    /// Tensor components ε_xy, ε_yz, ε_xz.
    #[default]
    Tensor,
    /// Engineering shears γ = 2 ε.
    Engineering,
}

/// Δε̄p = √(2/3 Δε:Δε) of a symmetric strain increment in VTK's order
/// `XX, YY, ZZ, XY, YZ, XZ`, with shear components stored as `shear` says.
///
/// The double contraction counts each off-diagonal term twice:
/// Δε:Δε = Δε_xx² + Δε_yy² + Δε_zz² + 2(Δε_xy² + Δε_yz² + Δε_xz²).
#[inline]
pub fn equivalent_increment(d: &[f64; 6], shear: Shear) -> f64 {
    let k = match shear {
        Shear::Tensor => 1.0,
        Shear::Engineering => 0.5,
    };
    let (xy, yz, xz) = (d[3] * k, d[4] * k, d[5] * k);
    let contraction = d[0] * d[0] + d[1] * d[1] + d[2] * d[2] + 2.0 * (xy * xy + yz * yz + xz * xz);
    (2.0 / 3.0 * contraction).sqrt()
}

/// Reads a strain tuple (6 components in `order`, or 9 row-major) into VTK order.
///
/// A 9-component tensor is symmetrised; non-finite components are errors.
pub fn strain_to_vtk6(values: &[f64], order: &ComponentOrder) -> Result<[f64; 6], TensorError> {
    for (i, v) in values.iter().enumerate() {
        if !v.is_finite() {
            let component = if values.len() == 6 {
                order.components()[i].label()
            } else {
                ["xx", "xy", "xz", "yx", "yy", "yz", "zx", "zy", "zz"]
                    .get(i)
                    .copied()
                    .unwrap_or("?")
            };
            return Err(TensorError::NonFinite {
                component,
                value: *v,
            });
        }
    }
    match *values {
        [a, b, c, d, e, f] => Ok(order.to_vtk([a, b, c, d, e, f])),
        [xx, xy, xz, yx, yy, yz, zx, zy, zz] => Ok([
            xx,
            yy,
            zz,
            0.5 * (xy + yx),
            0.5 * (yz + zy),
            0.5 * (xz + zx),
        ]),
        _ => Err(TensorError::ComponentCount(values.len())),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Uniaxial plastic flow, incompressible: Δε = (e, −e/2, −e/2) gives Δε̄p = e
    /// (common practice: the definition is normalised so).
    #[test]
    fn uniaxial_incompressible_flow_gives_the_axial_strain() {
        let e = 0.0123;
        let d = [e, -e / 2.0, -e / 2.0, 0.0, 0.0, 0.0];
        assert!((equivalent_increment(&d, Shear::Tensor) - e).abs() < 1e-15);
    }

    /// Simple shear γ: tensor ε_xy = γ/2 gives Δε̄p = γ/√3 (common practice).
    #[test]
    fn simple_shear_in_both_shear_conventions() {
        let g = 0.02;
        let tensor = [0.0, 0.0, 0.0, g / 2.0, 0.0, 0.0];
        let engineering = [0.0, 0.0, 0.0, g, 0.0, 0.0];
        let want = g / 3.0_f64.sqrt();
        assert!((equivalent_increment(&tensor, Shear::Tensor) - want).abs() < 1e-15);
        assert!((equivalent_increment(&engineering, Shear::Engineering) - want).abs() < 1e-15);
    }

    #[test]
    fn nine_components_and_errors() {
        let v = strain_to_vtk6(
            &[1.0, 2.0, 3.0, 2.0, 4.0, 5.0, 3.0, 5.0, 6.0],
            &ComponentOrder::VTK,
        )
        .unwrap();
        assert_eq!(v, [1.0, 4.0, 6.0, 2.0, 5.0, 3.0]);
        assert!(strain_to_vtk6(&[0.0; 5], &ComponentOrder::VTK).is_err());
        assert!(strain_to_vtk6(&[f64::NAN; 6], &ComponentOrder::VTK).is_err());
    }
}
