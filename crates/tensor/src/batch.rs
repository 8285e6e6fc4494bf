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
    fn shape_errors() {
        let mut out = vec![StressState::from_vtk6(&[0.0; 6]); 2];
        assert!(states(&[0.0; 11], 6, &ComponentOrder::VTK, &mut out).is_err());
        assert!(states(&[0.0; 8], 4, &ComponentOrder::VTK, &mut out).is_err());
        assert!(states(&[0.0; 18], 9, &ComponentOrder::VTK, &mut out).is_ok());
    }
}
