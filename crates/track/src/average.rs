//! Averages of the stress state against equivalent plastic strain, up to a fractional stop.
//!
//! η_avg = (1/ε_f) ∫₀^{ε_f} η dε̄p and θ̄_avg likewise (Bao & Wierzbicki 2004; Bai &
//! Wierzbicki 2008; FIELD-NOTES §2), by the trapezoid rule over output increments:
//! each segment k → k+1 adds ½(η_k + η_{k+1}) Δε̄p. The stop may lie inside a segment at
//! fraction f; the values there are interpolated linearly between the segment's ends and the
//! last segment is integrated from increment k to the interpolated stop.
//!
//! Undefined values: a segment with Δε̄p = 0 adds nothing, whatever its η (so the unloaded
//! first increment, whose η is undefined, is harmless). A segment with Δε̄p > 0 needs η and θ̄
//! at both ends, with one exception: a segment that starts from an unstressed state
//! (zero stress and zero ε̄p, as at the start of a run written with a coarse first increment)
//! takes the value at its end for the whole segment. Anything else is an error naming the
//! increment.

/// One increment's values at the tracked location.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Sample {
    /// Equivalent plastic strain ε̄p.
    pub eqps: f64,
    /// Triaxiality η, `None` where undefined.
    pub triaxiality: Option<f64>,
    /// Lode angle parameter θ̄, `None` where undefined.
    pub lode_angle_param: Option<f64>,
    /// True when the stress tensor is exactly zero.
    pub zero_stress: bool,
}

/// A position in a series: increment `index` plus a fraction of the way to `index + 1`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StopAt {
    /// The increment at or before the stop.
    pub index: usize,
    /// Fraction in [0, 1) of the way to the next increment (0 when the stop is on `index`).
    pub fraction: f64,
}

impl StopAt {
    /// The fractional increment `index + fraction`.
    pub fn position(&self) -> f64 {
        self.index as f64 + self.fraction
    }
}

/// The name of the integration rule, as printed in outputs.
pub const RULE: &str = "trapezoid";

/// Averages up to a stop.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Averages {
    /// ε̄p at the stop: the local fracture strain when the stop is the fracture instant.
    pub eqps: f64,
    /// η_avg, `None` when no plastic strain accumulates before the stop.
    pub triaxiality_avg: Option<f64>,
    /// θ̄_avg, `None` when no plastic strain accumulates before the stop.
    pub lode_angle_param_avg: Option<f64>,
    /// η at the stop (interpolated).
    pub triaxiality: Option<f64>,
    /// θ̄ at the stop (interpolated).
    pub lode_angle_param: Option<f64>,
    /// Number of segments with a positive plastic increment that entered the integral
    /// (the partial last segment counts as one).
    pub increments_integrated: usize,
}

/// Why an average could not be formed.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum AverageError {
    /// The stop lies outside the samples.
    #[error("stop at increment {0} is outside the {1} increments")]
    StopOutside(f64, usize),
    /// Plastic strain accumulates over a segment where η or θ̄ is undefined.
    #[error(
        "triaxiality is undefined at increment {increment} while the equivalent plastic strain grows by {delta:e} between increments {from} and {to}"
    )]
    UndefinedUnderFlow {
        /// The increment where the state is undefined.
        increment: usize,
        /// Segment start.
        from: usize,
        /// Segment end.
        to: usize,
        /// Δε̄p over the segment.
        delta: f64,
    },
}

fn lerp(a: f64, b: f64, f: f64) -> f64 {
    a + f * (b - a)
}

fn lerp_opt(a: Option<f64>, b: Option<f64>, f: f64) -> Option<f64> {
    if f == 0.0 {
        return a;
    }
    match (a, b) {
        (Some(a), Some(b)) => Some(lerp(a, b, f)),
        _ => None,
    }
}

/// The sample at a fractional stop: every value interpolated linearly between the two
/// increments around it (values, not tensors; FIELD-NOTES §2 integrates values too).
pub fn sample_at(samples: &[Sample], stop: StopAt) -> Option<Sample> {
    let a = samples.get(stop.index)?;
    if stop.fraction == 0.0 {
        return Some(*a);
    }
    let b = samples.get(stop.index + 1)?;
    let f = stop.fraction;
    Some(Sample {
        eqps: lerp(a.eqps, b.eqps, f),
        triaxiality: lerp_opt(a.triaxiality, b.triaxiality, f),
        lode_angle_param: lerp_opt(a.lode_angle_param, b.lode_angle_param, f),
        zero_stress: a.zero_stress && b.zero_stress,
    })
}

/// Integrates η and θ̄ against ε̄p up to `stop` by the trapezoid rule (see the module doc).
pub fn average(samples: &[Sample], stop: StopAt) -> Result<Averages, AverageError> {
    let n = samples.len();
    let end = sample_at(samples, stop).ok_or(AverageError::StopOutside(stop.position(), n))?;
    let mut int_eta = 0.0;
    let mut int_theta = 0.0;
    let mut integrated = 0;
    let mut eps_total = 0.0;
    let last_full = stop.index;
    let segments = (0..last_full)
        .map(|k| (k, samples[k], samples[k + 1]))
        .chain((stop.fraction > 0.0).then_some((last_full, samples[last_full], end)));
    for (k, a, b) in segments {
        let d = b.eqps - a.eqps;
        if d <= 0.0 {
            continue;
        }
        let to = k + 1;
        let undefined_at = |inc: usize| AverageError::UndefinedUnderFlow {
            increment: inc,
            from: k,
            to,
            delta: d,
        };
        let (eb, tb) = match (b.triaxiality, b.lode_angle_param) {
            (Some(e), Some(t)) => (e, t),
            _ => return Err(undefined_at(to)),
        };
        let (ea, ta) = match (a.triaxiality, a.lode_angle_param) {
            (Some(e), Some(t)) => (e, t),
            _ if a.zero_stress && a.eqps == 0.0 => (eb, tb),
            _ => return Err(undefined_at(k)),
        };
        int_eta += 0.5 * (ea + eb) * d;
        int_theta += 0.5 * (ta + tb) * d;
        eps_total += d;
        integrated += 1;
    }
    let (tri_avg, lode_avg) = if eps_total > 0.0 {
        (Some(int_eta / eps_total), Some(int_theta / eps_total))
    } else {
        (None, None)
    };
    Ok(Averages {
        eqps: end.eqps,
        // Normalising by the accumulated increments (not ε̄p at the stop) keeps the average a
        // weighted mean even when ε̄p starts above zero; both agree when it starts at zero.
        triaxiality_avg: tri_avg,
        lode_angle_param_avg: lode_avg,
        triaxiality: end.triaxiality,
        lode_angle_param: end.lode_angle_param,
        increments_integrated: integrated,
    })
}

/// Where a signal first reaches `target`, scanning forward: the first k with
/// s_k ≤ target ≤ s_{k+1} (or the reverse, for a falling signal), with the fraction by linear
/// interpolation. `None` when the signal never reaches the target.
///
/// A target equal to the first value stops at increment 0; equal to a later value, at that
/// increment with fraction 0.
pub fn first_crossing(signal: &[f64], target: f64) -> Option<StopAt> {
    let first = *signal.first()?;
    if first == target {
        return Some(StopAt {
            index: 0,
            fraction: 0.0,
        });
    }
    for k in 0..signal.len().saturating_sub(1) {
        let (a, b) = (signal[k], signal[k + 1]);
        let inside = (a <= target && target <= b) || (b <= target && target <= a);
        if inside && a != b {
            let f = (target - a) / (b - a);
            return Some(if f >= 1.0 {
                StopAt {
                    index: k + 1,
                    fraction: 0.0,
                }
            } else {
                StopAt {
                    index: k,
                    fraction: f.max(0.0),
                }
            });
        }
    }
    None
}

#[cfg(test)]
mod tests {
    use super::*;

    fn s(eqps: f64, eta: f64, theta: f64) -> Sample {
        Sample {
            eqps,
            triaxiality: Some(eta),
            lode_angle_param: Some(theta),
            zero_stress: false,
        }
    }

    fn zero() -> Sample {
        Sample {
            eqps: 0.0,
            triaxiality: None,
            lode_angle_param: None,
            zero_stress: true,
        }
    }

    /// Proportional loading: constant η ⇒ η_avg = η exactly (Bao & Wierzbicki 2004: the
    /// average of a constant).
    #[test]
    fn constant_state_averages_to_itself() {
        let samples: Vec<Sample> = (0..10).map(|k| s(0.05 * k as f64, 0.4, 0.7)).collect();
        let a = average(
            &samples,
            StopAt {
                index: 9,
                fraction: 0.0,
            },
        )
        .unwrap();
        assert!((a.triaxiality_avg.unwrap() - 0.4).abs() < 1e-15);
        assert!((a.lode_angle_param_avg.unwrap() - 0.7).abs() < 1e-15);
        assert!((a.eqps - 0.45).abs() < 1e-15);
        assert_eq!(a.increments_integrated, 9);
    }

    /// η linear in ε̄p: the trapezoid rule is exact and the average is the mid value.
    #[test]
    fn linear_path_averages_to_the_mid_value() {
        let samples: Vec<Sample> = (0..=20)
            .map(|k| {
                let e = 0.01 * k as f64;
                s(e, 0.3 + 2.0 * e, -0.5 + e)
            })
            .collect();
        let a = average(
            &samples,
            StopAt {
                index: 20,
                fraction: 0.0,
            },
        )
        .unwrap();
        assert!((a.triaxiality_avg.unwrap() - (0.3 + 0.2)).abs() < 1e-13);
        assert!((a.lode_angle_param_avg.unwrap() - (-0.5 + 0.1)).abs() < 1e-13);
    }

    /// A stop halfway through an increment integrates half of the last segment.
    #[test]
    fn stop_inside_an_increment() {
        let samples = vec![s(0.0, 0.3, 1.0), s(0.1, 0.5, 1.0), s(0.3, 0.9, 1.0)];
        let a = average(
            &samples,
            StopAt {
                index: 1,
                fraction: 0.5,
            },
        )
        .unwrap();
        // ε at stop 0.2, η at stop 0.7; ∫ = 0.1·0.4 + 0.1·0.6 = 0.1 → avg 0.5.
        assert!((a.eqps - 0.2).abs() < 1e-15);
        assert!((a.triaxiality.unwrap() - 0.7).abs() < 1e-15);
        assert!((a.triaxiality_avg.unwrap() - 0.5).abs() < 1e-15);
        assert_eq!(a.increments_integrated, 2);
    }

    #[test]
    fn unloaded_first_increment_is_harmless_but_undefined_under_flow_is_not() {
        let samples = vec![zero(), zero(), s(0.0, 0.33, 1.0), s(0.1, 0.33, 1.0)];
        let a = average(
            &samples,
            StopAt {
                index: 3,
                fraction: 0.0,
            },
        )
        .unwrap();
        assert!((a.triaxiality_avg.unwrap() - 0.33).abs() < 1e-15);
        // Plastic flow straight from the unstressed state uses the end value.
        let samples = vec![zero(), s(0.1, 0.5, 0.0), s(0.2, 0.7, 0.0)];
        let a = average(
            &samples,
            StopAt {
                index: 2,
                fraction: 0.0,
            },
        )
        .unwrap();
        assert!((a.triaxiality_avg.unwrap() - (0.05 + 0.06) / 0.2).abs() < 1e-15);
        // An undefined state in the middle of plastic flow is an error naming the increment.
        let mut bad = samples.clone();
        bad[1].triaxiality = None;
        let e = average(
            &bad,
            StopAt {
                index: 2,
                fraction: 0.0,
            },
        )
        .unwrap_err();
        assert!(
            matches!(e, AverageError::UndefinedUnderFlow { increment: 1, .. }),
            "{e}"
        );
    }

    #[test]
    fn no_plastic_strain_gives_undefined_averages() {
        let samples = vec![zero(), s(0.0, 0.3, 1.0)];
        let a = average(
            &samples,
            StopAt {
                index: 1,
                fraction: 0.0,
            },
        )
        .unwrap();
        assert_eq!(a.triaxiality_avg, None);
        assert_eq!(a.increments_integrated, 0);
        assert!(
            average(
                &samples,
                StopAt {
                    index: 1,
                    fraction: 0.5
                }
            )
            .is_err()
        );
    }

    #[test]
    fn crossings() {
        let g = [0.0, 0.1, 0.3, 0.6];
        assert_eq!(
            first_crossing(&g, 0.0),
            Some(StopAt {
                index: 0,
                fraction: 0.0
            })
        );
        let c = first_crossing(&g, 0.2).unwrap();
        assert_eq!(c.index, 1);
        assert!((c.fraction - 0.5).abs() < 1e-12);
        assert_eq!(
            first_crossing(&g, 0.3),
            Some(StopAt {
                index: 2,
                fraction: 0.0
            })
        );
        assert_eq!(
            first_crossing(&g, 0.6),
            Some(StopAt {
                index: 3,
                fraction: 0.0
            })
        );
        assert_eq!(first_crossing(&g, 0.7), None);
        assert_eq!(first_crossing(&[0.0, 0.0, 1.0], 0.5).unwrap().index, 1);
    }
}
