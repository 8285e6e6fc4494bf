//! Stress-state measures over whole arrays: one increment's cells or points.
//!
//! Input arrays hold tuples of 6 components (in a [`ComponentOrder`]) or 9 (row-major), one
//! tuple after the other, as a reader decodes them. Output goes into caller-owned slices, so
//! a loop over increments reuses its buffers and nothing is allocated per cell. Work is split
//! across threads with rayon in chunks of [`CHUNK`] tuples.

use rayon::prelude::*;

use crate::{ComponentOrder, Stress, StressState, TensorError};

/// Tuples per parallel work item: large enough to amortise scheduling, small enough to
/// balance two to a few dozen threads on 10^5–10^6 cells.
pub const CHUNK: usize = 4096;

/// Evaluates one tuple of 6 (in `order`) or 9 (row-major) components.
#[inline]
pub fn state_of(values: &[f64], order: &ComponentOrder) -> Result<StressState, TensorError> {
    if order.is_vtk() && values.len() == 6 {
        // Fast path: no permutation; finiteness checked here.
        let mut c = [0.0; 6];
        c.copy_from_slice(values);
        return Ok(Stress::from_vtk6(c)?.state());
    }
    Ok(Stress::from_slice(values, order)?.state())
}

/// The measures a full-field pass needs from one tuple: σ_h, σ_vm and, where defined, η and ξ
/// (θ̄ on request, [`ShapeMeasures::lode_angle_param`]).
///
/// The same quantities as [`StressState`] (FIELD-NOTES §1: σ_h = tr σ/3, σ_vm = √(3 J2),
/// η = σ_h/σ_vm (Bao & Wierzbicki 2004), θ̄ = 1 − (2/π) arccos ξ with ξ = (27/2) J3/σ_vm³
/// clamped to [−1, 1] (Bai & Wierzbicki 2008)), computed by the same function as
/// [`StressState::from_vtk6`], so every value is bit-identical to it; the Lode
/// parameter μ (one `tan` per tuple) is left out, and θ̄ (one `acos`) is computed only by
/// callers that ask for it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Measures {
    /// Hydrostatic stress σ_h.
    pub sigma_h: f64,
    /// Von Mises stress σ_vm.
    pub sigma_vm: f64,
    /// η and θ̄; `None` for a zero or purely hydrostatic tensor (σ_vm vanishes).
    pub shape: Option<ShapeMeasures>,
}

/// Triaxiality and the normalised third invariant of a tuple whose σ_vm does not vanish;
/// the Lode angle parameter follows on request, so a pass whose locus ignores it (Johnson–Cook)
/// does not pay its `acos`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ShapeMeasures {
    /// Triaxiality η = σ_h/σ_vm.
    pub triaxiality: f64,
    /// ξ = (27/2) J3/σ_vm³, clamped to [−1, 1].
    pub xi: f64,
}

impl ShapeMeasures {
    /// θ̄ = 1 − (2/π) arccos ξ ∈ [−1, 1] (Bai & Wierzbicki 2008), bit-identical to
    /// [`StressState::lode_angle_param`].
    #[inline]
    pub fn lode_angle_param(&self) -> f64 {
        crate::state::lode_angle_param_of(self.xi)
    }
}

/// [`Measures`] of six finite components in VTK's order `XX, YY, ZZ, XY, YZ, XZ`; the
/// finiteness of `c` is the caller's to check (see [`measures_of`]).
#[inline]
pub fn measures_vtk6(c: &[f64; 6]) -> Measures {
    let core = crate::state::invariants(c);
    Measures {
        sigma_h: core.sigma_h,
        sigma_vm: core.sigma_vm,
        shape: core.shape.ok().map(|s| ShapeMeasures {
            triaxiality: s.triaxiality,
            xi: s.xi,
        }),
    }
}

/// [`Measures`] of one tuple of 6 (in `order`) or 9 (row-major) components; errors as
/// [`state_of`] (a non-finite component, a non-symmetric 9-component tensor, a bad width).
#[inline]
pub fn measures_of(values: &[f64], order: &ComponentOrder) -> Result<Measures, TensorError> {
    if order.is_vtk() && values.len() == 6 && values.iter().all(|v| v.is_finite()) {
        let mut c = [0.0; 6];
        c.copy_from_slice(values);
        return Ok(measures_vtk6(&c));
    }
    let s = state_of(values, order)?;
    Ok(Measures {
        sigma_h: s.sigma_h,
        sigma_vm: s.sigma_vm,
        shape: s.lode().map(|l| ShapeMeasures {
            triaxiality: l.triaxiality,
            xi: l.xi,
        }),
    })
}

/// Evaluates every tuple of `values` (width 6 or 9) into `out`, in parallel.
///
/// `out.len()` tuples are read, so `values.len()` must equal `out.len() * width`. On
/// failure the error names the lowest failing tuple index ([`TensorError::AtTuple`]); `out`
/// is then partly written.
pub fn states(
    values: &[f64],
    width: usize,
    order: &ComponentOrder,
    out: &mut [StressState],
) -> Result<(), TensorError> {
    if width != 6 && width != 9 {
        return Err(TensorError::ComponentCount(width));
    }
    if values.len() != out.len() * width {
        return Err(TensorError::BatchShape {
            len: values.len(),
            width,
            tuples: out.len(),
        });
    }
    let first_error = out
        .par_chunks_mut(CHUNK)
        .zip(values.par_chunks(CHUNK * width))
        .enumerate()
        .filter_map(|(chunk, (out, values))| {
            for (i, (slot, tuple)) in out.iter_mut().zip(values.chunks_exact(width)).enumerate() {
                match state_of(tuple, order) {
                    Ok(s) => *slot = s,
                    Err(e) => return Some((chunk * CHUNK + i, e)),
                }
            }
            None
        })
        .min_by_key(|(index, _)| *index);
    match first_error {
        None => Ok(()),
        Some((index, source)) => Err(TensorError::AtTuple {
            index,
            source: Box::new(source),
        }),
    }
}

/// Allocates and evaluates: convenience for tests and one-off use; loops should call
/// [`states`] with a reused buffer.
pub fn states_vec(
    values: &[f64],
    width: usize,
    order: &ComponentOrder,
) -> Result<Vec<StressState>, TensorError> {
    if width == 0 || !values.len().is_multiple_of(width) {
        return Err(TensorError::BatchShape {
            len: values.len(),
            width,
            tuples: 0,
        });
    }
    let zero = StressState::from_vtk6(&[0.0; 6]);
    let mut out = vec![zero; values.len() / width];
    states(values, width, order, &mut out)?;
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn batch_equals_one_by_one_and_reports_the_first_bad_tuple() {
        let n = 3 * CHUNK + 17;
        let mut values = Vec::with_capacity(n * 6);
        for i in 0..n {
            let x = i as f64;
            values.extend_from_slice(&[x, 0.5 * x, -x, 0.1 * x, 0.0, 1.0]);
        }
        let all = states_vec(&values, 6, &ComponentOrder::VTK).unwrap();
        for (i, s) in all.iter().enumerate() {
            let one = state_of(&values[i * 6..i * 6 + 6], &ComponentOrder::VTK).unwrap();
            assert_eq!(*s, one);
        }
        values[6 * (2 * CHUNK + 5) + 2] = f64::NAN;
        values[6 * (CHUNK + 3) + 4] = f64::INFINITY;
        let e = states_vec(&values, 6, &ComponentOrder::VTK).unwrap_err();
        match e {
            TensorError::AtTuple { index, .. } => assert_eq!(index, CHUNK + 3),
            other => panic!("unexpected {other}"),
        }
    }

    #[test]
    fn measures_are_bit_identical_to_stress_state() {
        // Reference: StressState::from_vtk6, the crate's definition (FIELD-NOTES §1).
        let mut seed = 0x2545_f491_4f6c_dd1d_u64;
        let mut next = || {
            seed ^= seed << 13;
            seed ^= seed >> 7;
            seed ^= seed << 17;
            (seed >> 11) as f64 / (1u64 << 53) as f64 * 2.0 - 1.0
        };
        let mut cases: Vec<[f64; 6]> = vec![
            [0.0; 6],
            [5.0, 5.0, 5.0, 0.0, 0.0, 0.0],
            [1.0, 0.0, 0.0, 0.0, 0.0, 0.0],
            [0.0, 0.0, -1.0, 0.0, 0.0, 0.0],
            [1e-300, 0.0, 0.0, 1e-300, 0.0, 0.0],
            [1e300, -1e300, 0.0, 0.0, 0.0, 0.0],
            [4e-320, 0.0, -1e-320, 3e-321, 0.0, 0.0],
            [
                f64::MIN_POSITIVE,
                0.0,
                0.0,
                0.0,
                f64::MIN_POSITIVE / 2.0,
                0.0,
            ],
            [f64::MAX, 0.0, -f64::MAX / 2.0, 0.0, 1e307, 0.0],
            [1.0, 1.0, 1.0, 1e-12, 0.0, 0.0],
            [0.0, 0.0, 0.0, 1e150, 0.0, 0.0],
        ];
        for i in 0..20_000 {
            let m = 10f64.powi((i % 41) * 15 - 300);
            cases.push([0; 6].map(|_| m * next()));
        }
        for c in cases {
            let s = StressState::from_vtk6(&c);
            let m = measures_vtk6(&c);
            assert_eq!(m.sigma_h.to_bits(), s.sigma_h.to_bits(), "{c:?}");
            assert_eq!(m.sigma_vm.to_bits(), s.sigma_vm.to_bits(), "{c:?}");
            match (m.shape, s.lode()) {
                (Some(a), Some(b)) => {
                    assert_eq!(a.triaxiality.to_bits(), b.triaxiality.to_bits(), "{c:?}");
                    assert_eq!(a.xi.to_bits(), b.xi.to_bits(), "{c:?}");
                    assert_eq!(a.lode_angle_param().to_bits(), b.lode_angle_param.to_bits());
                }
                (None, None) => {}
                other => panic!("{c:?}: {other:?}"),
            }
            let via = measures_of(&c, &ComponentOrder::VTK).unwrap();
            assert_eq!(via, m);
        }
    }

    #[test]
    fn measures_of_refuses_what_state_of_refuses() {
        let order = ComponentOrder::VTK;
        assert!(measures_of(&[1.0, f64::NAN, 0.0, 0.0, 0.0, 0.0], &order).is_err());
        assert!(measures_of(&[1.0, 0.0, 0.0, 0.0, f64::INFINITY, 0.0], &order).is_err());
        assert!(measures_of(&[1.0, 2.0, 3.0, 4.0], &order).is_err());
        // 9 components, not symmetric
        assert!(measures_of(&[1.0, 2.0, 0.0, 0.0, 1.0, 0.0, 0.0, 0.0, 1.0], &order).is_err());
        // 9 components, symmetric: the same as the 6-component form
        let nine = measures_of(&[3.0, 1.0, 0.5, 1.0, -2.0, 0.25, 0.5, 0.25, 1.0], &order).unwrap();
        let six = measures_vtk6(&[3.0, -2.0, 1.0, 1.0, 0.25, 0.5]);
        assert_eq!(nine, six);
    }

    #[test]
    fn shape_errors() {
        let mut out = vec![StressState::from_vtk6(&[0.0; 6]); 2];
        assert!(states(&[0.0; 11], 6, &ComponentOrder::VTK, &mut out).is_err());
        assert!(states(&[0.0; 8], 4, &ComponentOrder::VTK, &mut out).is_err());
        assert!(states(&[0.0; 18], 9, &ComponentOrder::VTK, &mut out).is_ok());
    }
}
