//! Damage accumulation along equivalent-plastic-strain histories, for one path
//! ([`accumulate`]) and for whole fields one increment at a time ([`update_cells`]).
//!
//! Owns the two rules ([`DamageRule`]): the linear rule of Johnson & Cook (1985) and the
//! power-law rule of Xue (2007), the trapezoid integration of 1/ε_f over ε̄p they share,
//! and the first crossing of D = 1 ([`Crossing`]).
//!
//! Integration (both rules): with Φ = ∫ dε̄p/ε_f(η, θ̄) integrated by the trapezoid rule
//! on 1/ε_f over each output increment,
//!
//! Φ_{k} = Φ_{k−1} + Δε̄p_k · ½ [1/ε_f(η_{k−1}, θ̄_{k−1}) + 1/ε_f(η_k, θ̄_k)],
//!
//! the linear rule gives D = Φ and the power-law rule D = Φ^m. An increment with
//! Δε̄p = 0 adds nothing, even where the stress state is undefined (an unloaded first
//! row); a positive Δε̄p with an undefined stress state or fracture strain at either end
//! is an error naming the increment. Damage starts at 0 at the first row whatever ε̄p is
//! there. Rows are numbered from 0; increment k runs from row k − 1 to row k.

use crate::{FractureLocus, LocusError};

/// How damage grows with the integral Φ = ∫ dε̄p/ε_f(η, θ̄).
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum DamageRule {
    /// Linear rule (Johnson & Cook 1985, Eng. Fract. Mech. 21:31–48): dD = dε̄p/ε_f,
    /// D = Φ; D = ε̄p/ε_f on a proportional path.
    Linear,
    /// Power-law rule (Xue 2007, Int. J. Solids Struct. 44:5163–5181; exact form from
    /// memory in the project's field notes): dD = m D^((m−1)/m) dε̄p/ε_f, integrated
    /// exactly through D = Φ^m, so D = (ε̄p/ε_f)^m on a proportional path. m > 0.
    PowerLaw {
        /// The exponent m (> 0, finite).
        exponent: f64,
    },
}

impl DamageRule {
    /// Checks the exponent of the power-law rule.
    pub fn validate(&self) -> Result<(), LocusError> {
        match *self {
            DamageRule::Linear => Ok(()),
            DamageRule::PowerLaw { exponent } => {
                if exponent.is_finite() && exponent > 0.0 {
                    Ok(())
                } else {
                    Err(LocusError::InvalidExponent(exponent))
                }
            }
        }
    }

    /// D from Φ: Φ (linear) or Φ^m (power law).
    #[inline]
    pub fn damage_from_integral(&self, integral: f64) -> f64 {
        match *self {
            DamageRule::Linear => integral,
            DamageRule::PowerLaw { exponent } => integral.powf(exponent),
        }
    }
}

/// The first crossing of D = 1, located by linear interpolation in D within the
/// increment where it happens: fraction = (1 − D_{k−1})/(D_k − D_{k−1}); ε̄p at the
/// crossing interpolated linearly with the same fraction. (For the power-law rule this
/// interpolates D, not Φ; the two agree to first order in the increment.)
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Crossing {
    /// The row before the crossing: the crossing lies in increment `row + 1`.
    pub row: usize,
    /// Position within the increment, in (0, 1]; 1 means exactly at row `row + 1`.
    pub fraction: f64,
    /// Equivalent plastic strain at the crossing.
    pub eqps: f64,
}

impl Crossing {
    /// Fractional row index of the crossing: `row + fraction`.
    pub fn position(&self) -> f64 {
        self.row as f64 + self.fraction
    }
}

/// D = 1 crossing within an increment from `d_prev` to `d_new`, as a fraction.
#[inline]
fn crossing_fraction(d_prev: f64, d_new: f64) -> Option<f64> {
    (d_prev < 1.0 && d_new >= 1.0).then(|| ((1.0 - d_prev) / (d_new - d_prev)).clamp(0.0, 1.0))
}

/// The damage history of one path.
#[derive(Debug, Clone, PartialEq)]
pub struct DamageHistory {
    /// The rule used.
    pub rule: DamageRule,
    /// Φ = ∫ dε̄p/ε_f at each row (0 at row 0).
    pub integral: Vec<f64>,
    /// D at each row (0 at row 0).
    pub damage: Vec<f64>,
    /// The first crossing of D = 1, if any.
    pub crossing: Option<Crossing>,
}

impl DamageHistory {
    /// D at the last row (0 for an empty path).
    pub fn final_damage(&self) -> f64 {
        self.damage.last().copied().unwrap_or(0.0)
    }
}

/// Damage along one path of rows (ε̄p, η, θ̄), with `None` for an undefined stress
/// state. See the module documentation for the rule and the errors. Arrays must have
/// equal lengths; ε̄p must be finite and non-decreasing.
///
/// ```
/// use ductrace_locus::{accumulate, DamageRule, JohnsonCook};
/// let jc = JohnsonCook::new(0.05, 3.44, -2.12).unwrap();
/// let h = accumulate(&jc, DamageRule::Linear, &[0.0, 1.0, 2.0],
///     &[None, Some(1.0 / 3.0), Some(1.0 / 3.0)], &[None, Some(1.0), Some(1.0)]);
/// // Δε̄p = 1 from an undefined first row: an error naming increment 1.
/// assert!(h.unwrap_err().to_string().contains("increment 1"));
/// ```
pub fn accumulate<L: FractureLocus + ?Sized>(
    locus: &L,
    rule: DamageRule,
    eqps: &[f64],
    eta: &[Option<f64>],
    theta_bar: &[Option<f64>],
) -> Result<DamageHistory, LocusError> {
    rule.validate()?;
    if eta.len() != eqps.len() || theta_bar.len() != eqps.len() {
        return Err(LocusError::LengthMismatch {
            what: format!(
                "eqps has {} rows, triaxiality {}, lode angle parameter {}",
                eqps.len(),
                eta.len(),
                theta_bar.len()
            ),
        });
    }
    let n = eqps.len();
    let mut integral = Vec::with_capacity(n);
    let mut damage = Vec::with_capacity(n);
    let mut crossing = None;
    if n == 0 {
        return Ok(DamageHistory {
            rule,
            integral,
            damage,
            crossing,
        });
    }
    let inverse = |k: usize, increment: f64| -> Result<f64, LocusError> {
        let at = || format!("increment {} (row {k})", k.max(1));
        let (Some(e), Some(t)) = (eta[k], theta_bar[k]) else {
            return Err(LocusError::UndefinedStressState {
                increment,
                at: at(),
            });
        };
        match locus.fracture_strain(e, t) {
            Some(f) => Ok(1.0 / f),
            None => Err(LocusError::UndefinedFractureStrain {
                increment,
                at: at(),
                eta: e,
                theta_bar: Some(t),
            }),
        }
    };
    if !eqps[0].is_finite() {
        return Err(LocusError::NonFiniteStrain {
            at: "row 0".into(),
            value: eqps[0],
        });
    }
    integral.push(0.0);
    damage.push(0.0);
    let mut phi = 0.0;
    let mut d_prev = 0.0;
    // 1/ε_f at the previous row, evaluated only when an increment needs it.
    let mut inv_prev: Option<f64> = None;
    for k in 1..n {
        let (e0, e1) = (eqps[k - 1], eqps[k]);
        if !e1.is_finite() {
            return Err(LocusError::NonFiniteStrain {
                at: format!("row {k}"),
                value: e1,
            });
        }
        let de = e1 - e0;
        if de < 0.0 {
            return Err(LocusError::DecreasingStrain {
                at: format!("increment {k} (rows {} to {k})", k - 1),
                from: e0,
                to: e1,
            });
        }
        if de > 0.0 {
            let a = match inv_prev {
                Some(a) => a,
                None => inverse(k - 1, de).map_err(|e| relabel(e, k))?,
            };
            let b = inverse(k, de)?;
            phi += de * 0.5 * (a + b);
            inv_prev = Some(b);
        } else {
            inv_prev = None;
        }
        let d = rule.damage_from_integral(phi);
        if crossing.is_none()
            && let Some(fraction) = crossing_fraction(d_prev, d)
        {
            crossing = Some(Crossing {
                row: k - 1,
                fraction,
                eqps: e0 + fraction * de,
            });
        }
        d_prev = d;
        integral.push(phi);
        damage.push(d);
    }
    Ok(DamageHistory {
        rule,
        integral,
        damage,
        crossing,
    })
}

/// Names increment `k` in an error raised while evaluating its starting row.
fn relabel(e: LocusError, k: usize) -> LocusError {
    let at = format!("increment {k} (row {})", k - 1);
    match e {
        LocusError::UndefinedStressState { increment, .. } => {
            LocusError::UndefinedStressState { increment, at }
        }
        LocusError::UndefinedFractureStrain {
            increment,
            eta,
            theta_bar,
            ..
        } => LocusError::UndefinedFractureStrain {
            increment,
            at,
            eta,
            theta_bar,
        },
        other => other,
    }
}

// ---------------------------------------------------------------------------------------
// Full-field kernel
// ---------------------------------------------------------------------------------------

/// The damage state of one cell after some row: 32 bytes, `Copy`, no heap.
///
/// Holds ε̄p, 1/ε_f at that row (if defined), Φ and the first crossing of D = 1.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CellDamage {
    eqps: f64,
    /// 1/ε_f at the last row; 0.0 encodes "undefined" (1/ε_f > 0 wherever defined).
    inverse_strain: f64,
    integral: f64,
    /// Fractional row index of the first crossing; negative encodes "none".
    crossing: f64,
}

impl Default for CellDamage {
    fn default() -> Self {
        CellDamage::new()
    }
}

impl CellDamage {
    /// An unloaded cell: ε̄p = 0, undefined stress state, Φ = 0, no crossing.
    pub const fn new() -> Self {
        CellDamage {
            eqps: 0.0,
            inverse_strain: 0.0,
            integral: 0.0,
            crossing: -1.0,
        }
    }

    /// ε̄p at the last row.
    pub fn eqps(&self) -> f64 {
        self.eqps
    }

    /// 1/ε_f at the last row, if defined.
    pub fn inverse_fracture_strain(&self) -> Option<f64> {
        (self.inverse_strain > 0.0).then_some(self.inverse_strain)
    }

    /// Φ = ∫ dε̄p/ε_f so far.
    pub fn integral(&self) -> f64 {
        self.integral
    }

    /// D under `rule` (Φ or Φ^m).
    pub fn damage(&self, rule: DamageRule) -> f64 {
        rule.damage_from_integral(self.integral)
    }

    /// Fractional row index of the first crossing of D = 1 (see [`Crossing`]), if any.
    pub fn crossing(&self) -> Option<f64> {
        (self.crossing >= 0.0).then_some(self.crossing)
    }
}

/// One row of full-field data: per-cell ε̄p, η and θ̄ with a mask saying where the
/// stress state is defined (values under a `false` mask are ignored). θ̄ may be left out
/// ([`IncrementFields::without_lode_angle`]) for a locus that does not depend on it
/// ([`FractureLocus::uses_lode_angle`]); the kernels refuse such a row for any other locus.
#[derive(Debug, Clone, Copy)]
pub struct IncrementFields<'a> {
    row: usize,
    eqps: &'a [f64],
    eta: &'a [f64],
    theta_bar: Option<&'a [f64]>,
    defined: &'a [bool],
}

impl<'a> IncrementFields<'a> {
    /// Borrows one row's arrays; all must have the same length. `row` is the row index
    /// (0 for the first output row), used for crossings and error messages.
    pub fn new(
        row: usize,
        eqps: &'a [f64],
        eta: &'a [f64],
        theta_bar: &'a [f64],
        defined: &'a [bool],
    ) -> Result<Self, LocusError> {
        let n = eqps.len();
        if eta.len() != n || theta_bar.len() != n || defined.len() != n {
            return Err(LocusError::LengthMismatch {
                what: format!(
                    "row {row}: eqps has {n} cells, triaxiality {}, lode angle parameter {}, mask {}",
                    eta.len(),
                    theta_bar.len(),
                    defined.len()
                ),
            });
        }
        Ok(IncrementFields {
            row,
            eqps,
            eta,
            theta_bar: Some(theta_bar),
            defined,
        })
    }

    /// Borrows one row's arrays without θ̄, for a locus that does not depend on it (Johnson–Cook's
    /// stress-state part): a full-field pass then skips one `acos` per cell. All arrays must
    /// have the same length.
    pub fn without_lode_angle(
        row: usize,
        eqps: &'a [f64],
        eta: &'a [f64],
        defined: &'a [bool],
    ) -> Result<Self, LocusError> {
        let n = eqps.len();
        if eta.len() != n || defined.len() != n {
            return Err(LocusError::LengthMismatch {
                what: format!(
                    "row {row}: eqps has {n} cells, triaxiality {}, mask {}",
                    eta.len(),
                    defined.len()
                ),
            });
        }
        Ok(IncrementFields {
            row,
            eqps,
            eta,
            theta_bar: None,
            defined,
        })
    }

    /// Number of cells.
    pub fn len(&self) -> usize {
        self.eqps.len()
    }

    /// True when there are no cells.
    pub fn is_empty(&self) -> bool {
        self.eqps.is_empty()
    }

    /// The row index.
    pub fn row(&self) -> usize {
        self.row
    }

    /// The cells `start..start + len` (clamped to the available cells), for splitting
    /// work into chunks.
    pub fn window(&self, start: usize, len: usize) -> IncrementFields<'a> {
        let s = start.min(self.len());
        let e = start.saturating_add(len).min(self.len());
        IncrementFields {
            row: self.row,
            eqps: &self.eqps[s..e],
            eta: &self.eta[s..e],
            theta_bar: self.theta_bar.map(|t| &t[s..e]),
            defined: &self.defined[s..e],
        }
    }
}

/// Sets `cells` to the state at the first row: ε̄p and 1/ε_f from `fields`, Φ = 0, no
/// crossing. An undefined stress state or fracture strain is recorded, not an error
/// (it matters only if the next increment is plastic).
///
/// Needed when the first row already carries plastic strain (damage before it is
/// unknown and taken as 0, as in [`accumulate`]). When the first row has ε̄p = 0,
/// starting from [`CellDamage::new`] and calling [`update_cells`] on it is the same.
pub fn start_cells<L: FractureLocus + ?Sized>(
    locus: &L,
    fields: &IncrementFields<'_>,
    first_cell: usize,
    cells: &mut [CellDamage],
) -> Result<(), LocusError> {
    check_len(locus, fields, cells)?;
    for (i, cell) in cells.iter_mut().enumerate() {
        let e = fields.eqps[i];
        if !e.is_finite() {
            return Err(LocusError::NonFiniteStrain {
                at: format!("cell {} of row {}", first_cell + i, fields.row),
                value: e,
            });
        }
        *cell = CellDamage {
            eqps: e,
            inverse_strain: inverse_at(locus, fields, i),
            integral: 0.0,
            crossing: -1.0,
        };
    }
    Ok(())
}

fn check_len<L: FractureLocus + ?Sized>(
    locus: &L,
    fields: &IncrementFields<'_>,
    cells: &[CellDamage],
) -> Result<(), LocusError> {
    if fields.theta_bar.is_none() && locus.uses_lode_angle() {
        return Err(LocusError::MissingLodeAngle {
            row: fields.row,
            model: locus.id(),
        });
    }
    if fields.len() != cells.len() {
        return Err(LocusError::LengthMismatch {
            what: format!(
                "row {}: {} cells of data, {} cell states",
                fields.row,
                fields.len(),
                cells.len()
            ),
        });
    }
    Ok(())
}

/// 1/ε_f at cell `i`, 0.0 when undefined. Without θ̄ (a locus that ignores it, checked by
/// `check_len`), NaN stands in for it: were a locus to read it anyway, its ε_f would be
/// undefined and the kernel would fail loudly rather than use a made-up θ̄.
#[inline(always)]
fn inverse_at<L: FractureLocus + ?Sized>(locus: &L, fields: &IncrementFields<'_>, i: usize) -> f64 {
    if fields.defined[i] {
        let theta_bar = fields.theta_bar.map_or(f64::NAN, |t| t[i]);
        match locus.fracture_strain(fields.eta[i], theta_bar) {
            Some(f) => 1.0 / f,
            None => 0.0,
        }
    } else {
        0.0
    }
}

/// Advances every cell of `cells` from its state at the previous row to row
/// `fields.row()`, in place: the hot loop of full-field damage checks.
///
/// Per cell: Δε̄p = ε̄p_new − ε̄p_old; if Δε̄p > 0, Φ += Δε̄p · ½ (1/ε_f,old + 1/ε_f,new)
/// (trapezoid, Johnson & Cook 1985); the first crossing of D = 1 under `rule` is stored
/// as the fractional row index `(row − 1) + fraction` (linear interpolation in D).
/// `first_cell` is the global index of `cells[0]`, used in error messages, so the caller
/// can split the work:
///
/// ```
/// use ductrace_locus::{update_cells, CellDamage, DamageRule, IncrementFields, JohnsonCook};
/// let jc = JohnsonCook::new(0.05, 3.44, -2.12).unwrap();
/// let mut cells = vec![CellDamage::new(); 10];
/// let (eqps, eta, th, ok) = (vec![0.1; 10], vec![0.5; 10], vec![0.0; 10], vec![true; 10]);
/// let row1 = IncrementFields::new(1, &eqps, &eta, &th, &ok).unwrap();
/// // Chunks of 4 cells (with rayon: cells.par_chunks_mut(4).enumerate()...).
/// for (c, chunk) in cells.chunks_mut(4).enumerate() {
///     let part = row1.window(c * 4, chunk.len());
///     // The unloaded initial state has no defined stress state: a plastic first
///     // increment is an error naming the cell.
///     assert!(update_cells(&jc, DamageRule::Linear, &part, c * 4, chunk).is_err());
/// }
/// ```
///
/// A plastic increment whose start or end has no defined fracture strain is an error
/// naming the first such cell of the slice; cells before it are already updated.
/// Nothing is allocated on the success path.
pub fn update_cells<L: FractureLocus + ?Sized>(
    locus: &L,
    rule: DamageRule,
    fields: &IncrementFields<'_>,
    first_cell: usize,
    cells: &mut [CellDamage],
) -> Result<(), LocusError> {
    rule.validate()?;
    check_len(locus, fields, cells)?;
    let row = fields.row;
    let base = row.saturating_sub(1) as f64;
    for (i, cell) in cells.iter_mut().enumerate() {
        let e_new = fields.eqps[i];
        let de = e_new - cell.eqps;
        let inv_new = inverse_at(locus, fields, i);
        if de.is_nan() || de < 0.0 {
            return Err(cell_error_strain(cell.eqps, e_new, row, first_cell + i));
        }
        if de > 0.0 {
            if !e_new.is_finite() {
                return Err(cell_error_strain(cell.eqps, e_new, row, first_cell + i));
            }
            if cell.inverse_strain <= 0.0 {
                return Err(LocusError::UndefinedAtStart {
                    increment: de,
                    at: format!("cell {} of increment {row}", first_cell + i),
                });
            }
            if inv_new <= 0.0 {
                return Err(cell_error_end(fields, i, de, first_cell));
            }
            let phi_old = cell.integral;
            let phi_new = phi_old + de * 0.5 * (cell.inverse_strain + inv_new);
            cell.integral = phi_new;
            // D = Φ^m crosses 1 exactly where Φ does (m > 0): test Φ, raise to m only
            // in the crossing increment.
            if cell.crossing < 0.0 && phi_old < 1.0 && phi_new >= 1.0 {
                let (d_old, d_new) = match rule {
                    DamageRule::Linear => (phi_old, phi_new),
                    DamageRule::PowerLaw { exponent } => {
                        (phi_old.powf(exponent), phi_new.powf(exponent))
                    }
                };
                if let Some(f) = crossing_fraction(d_old, d_new) {
                    cell.crossing = base + f;
                }
            }
        }
        cell.eqps = e_new;
        cell.inverse_strain = inv_new;
    }
    Ok(())
}

#[cold]
fn cell_error_strain(from: f64, to: f64, row: usize, cell: usize) -> LocusError {
    let at = format!("cell {cell} of increment {row}");
    if to.is_finite() {
        LocusError::DecreasingStrain { at, from, to }
    } else {
        LocusError::NonFiniteStrain { at, value: to }
    }
}

#[cold]
fn cell_error_end(
    fields: &IncrementFields<'_>,
    i: usize,
    de: f64,
    first_cell: usize,
) -> LocusError {
    let at = format!("cell {} of increment {}", first_cell + i, fields.row);
    if fields.defined[i] {
        LocusError::UndefinedFractureStrain {
            increment: de,
            at,
            eta: fields.eta[i],
            theta_bar: fields.theta_bar.map(|t| t[i]),
        }
    } else {
        LocusError::UndefinedStressState { increment: de, at }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::JohnsonCook;

    #[test]
    fn kernel_matches_path_function() {
        // The same three-cell history through both entry points.
        let jc = JohnsonCook::new(0.05, 3.44, -2.12).unwrap();
        let eqps = [
            [0.0, 0.0, 0.0],
            [0.0, 0.2, 0.1],
            [0.3, 0.5, 0.4],
            [0.9, 1.5, 2.0],
        ];
        let eta = [
            [0.0, 0.3, 0.5],
            [0.2, 0.4, 0.6],
            [0.3, 0.5, 0.7],
            [0.4, 0.6, 0.9],
        ];
        let th = [0.0; 3];
        let mut defined = [[true; 3]; 4];
        defined[0][0] = false; // unloaded first row of cell 0: harmless (Δε̄p = 0 next)
        let mut cells = [CellDamage::new(); 3];
        let f0 = IncrementFields::new(0, &eqps[0], &eta[0], &th, &defined[0]).unwrap();
        start_cells(&jc, &f0, 0, &mut cells).unwrap();
        for r in 1..4 {
            let f = IncrementFields::new(r, &eqps[r], &eta[r], &th, &defined[r]).unwrap();
            update_cells(&jc, DamageRule::Linear, &f, 0, &mut cells).unwrap();
        }
        for c in 0..3 {
            let e: Vec<f64> = (0..4).map(|r| eqps[r][c]).collect();
            let h: Vec<Option<f64>> = (0..4).map(|r| defined[r][c].then_some(eta[r][c])).collect();
            let t: Vec<Option<f64>> = (0..4).map(|r| defined[r][c].then_some(0.0)).collect();
            let hist = accumulate(&jc, DamageRule::Linear, &e, &h, &t).unwrap();
            assert!((hist.final_damage() - cells[c].damage(DamageRule::Linear)).abs() < 1e-15);
            assert_eq!(
                hist.crossing.map(|x| x.position()),
                cells[c].crossing(),
                "cell {c}"
            );
        }
    }

    #[test]
    fn rows_without_lode_angle_serve_only_loci_that_ignore_it() {
        // Johnson–Cook's stress-state part does not depend on θ̄ (Johnson & Cook 1985): the
        // same cells with and without θ̄ give the same bits; a Hosford–Coulomb locus (which
        // depends on θ̄, Mohr & Marcadet 2015) refuses a row without it.
        let jc = JohnsonCook::new(0.05, 3.44, -2.12).unwrap();
        let eqps = [[0.0, 0.0], [0.2, 0.1], [0.5, 0.9]];
        let eta = [[0.3, 0.5], [0.4, 0.6], [0.5, 1.1]];
        let th = [0.7, -0.3];
        let ok = [true, true];
        let mut with = [CellDamage::new(); 2];
        let mut without = [CellDamage::new(); 2];
        for r in 0..3 {
            let a = IncrementFields::new(r, &eqps[r], &eta[r], &th, &ok).unwrap();
            let b = IncrementFields::without_lode_angle(r, &eqps[r], &eta[r], &ok).unwrap();
            if r == 0 {
                start_cells(&jc, &a, 0, &mut with).unwrap();
                start_cells(&jc, &b, 0, &mut without).unwrap();
            } else {
                update_cells(&jc, DamageRule::Linear, &a, 0, &mut with).unwrap();
                update_cells(&jc, DamageRule::Linear, &b, 0, &mut without).unwrap();
            }
        }
        for c in 0..2 {
            assert_eq!(
                with[c].integral().to_bits(),
                without[c].integral().to_bits()
            );
            assert_eq!(with[c].crossing(), without[c].crossing());
        }
        let hc = crate::HosfordCoulomb::new(1.3, 0.85, 0.05, 0.1).unwrap();
        let b = IncrementFields::without_lode_angle(1, &eqps[1], &eta[1], &ok).unwrap();
        let e = update_cells(&hc, DamageRule::Linear, &b, 0, &mut with).unwrap_err();
        assert!(
            matches!(
                e,
                LocusError::MissingLodeAngle {
                    row: 1,
                    model: "hc"
                }
            ),
            "{e}"
        );
        assert!(e.to_string().contains("Lode angle parameter"), "{e}");
        let e = start_cells(&hc, &b, 0, &mut with).unwrap_err();
        assert!(matches!(e, LocusError::MissingLodeAngle { .. }), "{e}");
        assert!(
            IncrementFields::without_lode_angle(0, &[0.0; 2], &[0.0; 3], &ok).is_err(),
            "length mismatch"
        );
    }

    #[test]
    fn kernel_errors_name_cell() {
        let jc = JohnsonCook::new(0.05, 3.44, -2.12).unwrap();
        let mut cells = [CellDamage::new(); 2];
        let f0 =
            IncrementFields::new(0, &[0.0, 0.0], &[0.3, 0.3], &[0.0, 0.0], &[true, true]).unwrap();
        start_cells(&jc, &f0, 10, &mut cells).unwrap();
        let f1 =
            IncrementFields::new(1, &[0.1, 0.1], &[0.3, 0.3], &[0.0, 0.0], &[true, false]).unwrap();
        let e = update_cells(&jc, DamageRule::Linear, &f1, 10, &mut cells).unwrap_err();
        assert!(e.to_string().contains("cell 11 of increment 1"), "{e}");
        let f2 =
            IncrementFields::new(2, &[0.05, 0.1], &[0.3, 0.3], &[0.0, 0.0], &[true, true]).unwrap();
        let e = update_cells(&jc, DamageRule::Linear, &f2, 10, &mut cells).unwrap_err();
        assert!(matches!(e, LocusError::DecreasingStrain { .. }), "{e}");
        assert!(
            update_cells(
                &jc,
                DamageRule::PowerLaw { exponent: 0.0 },
                &f2,
                0,
                &mut cells
            )
            .is_err()
        );
    }
}
