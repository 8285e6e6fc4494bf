//! Property: a weighted mean lies between the extremes of what it averages (elementary;
//! the trapezoid weights ½Δε̄p are non-negative).

#![allow(clippy::unwrap_used)]

use ductrace_track::average::{Sample, StopAt, average, sample_at};
use proptest::prelude::*;

fn path() -> impl Strategy<Value = (Vec<Sample>, StopAt)> {
    proptest::collection::vec((0.0..0.05f64, -1.0..2.0f64, -1.0..1.0f64), 2..40).prop_flat_map(
        |steps| {
            let n = steps.len();
            let mut eqps = 0.0;
            let samples: Vec<Sample> = steps
                .iter()
                .map(|&(d, eta, theta)| {
                    eqps += d;
                    Sample {
                        eqps,
                        triaxiality: Some(eta),
                        lode_angle_param: Some(theta),
                        zero_stress: false,
                    }
                })
                .collect();
            (Just(samples), 0..n - 1, 0.0..1.0f64)
                .prop_map(|(s, index, fraction)| (s, StopAt { index, fraction }))
        },
    )
}

proptest! {
    #[test]
    fn averages_lie_between_the_extremes((samples, stop) in path()) {
        let a = average(&samples, stop).unwrap();
        let end = sample_at(&samples, stop).unwrap();
        let mut used: Vec<Sample> = samples[..=stop.index].to_vec();
        used.push(end);
        let lo_e = used.iter().map(|s| s.triaxiality.unwrap()).fold(f64::INFINITY, f64::min);
        let hi_e = used.iter().map(|s| s.triaxiality.unwrap()).fold(f64::NEG_INFINITY, f64::max);
        let lo_t = used.iter().map(|s| s.lode_angle_param.unwrap()).fold(f64::INFINITY, f64::min);
        let hi_t = used.iter().map(|s| s.lode_angle_param.unwrap()).fold(f64::NEG_INFINITY, f64::max);
        if let Some(e) = a.triaxiality_avg {
            prop_assert!(e >= lo_e - 1e-12 && e <= hi_e + 1e-12, "{} not in [{}, {}]", e, lo_e, hi_e);
        }
        if let Some(t) = a.lode_angle_param_avg {
            prop_assert!(t >= lo_t - 1e-12 && t <= hi_t + 1e-12);
        }
        prop_assert!(a.eqps >= samples[stop.index].eqps - 1e-15);
    }
}
