//! Numeric edge cases of the stress-state measures: σ_vm → 0 (states approaching the
//! hydrostatic axis), ξ at ±1 ± round-off, huge and tiny magnitudes, Float32-rounded
//! inputs, and the property that no finite input yields a NaN anywhere (in the single-tensor
//! path and in the batch kernels).
//!
//! References: the definitions of η (Bao & Wierzbicki 2004), ξ and θ̄ (Bai & Wierzbicki
//! 2008) as in FIELD-NOTES §1; the closed-form values of uniaxial tension (η = 1/3, θ̄ = 1),
//! equibiaxial tension (η = 2/3, θ̄ = −1) and pure shear (η = 0, θ̄ = 0) from the same papers;
//! the homogeneity of the measures (η, ξ, θ̄ are ratios of invariants of equal degree, so
//! they do not change when the tensor is scaled by k > 0; σ_h and σ_vm scale with k):
//! common practice. Float32 resolution: IEEE 754 binary32 has a unit round-off of 2^−24
//! ≈ 6e−8 (IEEE 754-2008).

#![allow(clippy::unwrap_used)]

use std::f64::consts::PI;

use ductrace_tensor::{
    ComponentOrder, DEGENERATE_REL_TOL, Shape, Stress, StressState, Undefined, batch,
};
use nalgebra::{Rotation3, Unit, Vector3};
use proptest::prelude::*;

/// Every number a state exposes, for the "no NaN" checks.
fn all_numbers(s: &Stress) -> Vec<f64> {
    let st = s.state();
    let mut v = vec![st.sigma_h, st.sigma_vm, st.j2(), st.j3(), s.hydrostatic()];
    v.extend(s.principal());
    if let Some(l) = st.lode() {
        v.extend([l.triaxiality, l.xi, l.lode_angle_param, l.lode_param]);
    }
    v
}

fn assert_shape_in_range(st: &StressState, what: &str) {
    if let Some(l) = st.lode() {
        assert!(l.triaxiality.is_finite(), "{what}: η {l:?}");
        assert!((-1.0..=1.0).contains(&l.xi), "{what}: ξ {l:?}");
        assert!(
            (-1.0..=1.0).contains(&l.lode_angle_param),
            "{what}: θ̄ {l:?}"
        );
        assert!((-1.0..=1.0).contains(&l.lode_param), "{what}: μ {l:?}");
    }
}

// ---------------------------------------------------------------------------------------
// σ_vm → 0: a fixed hydrostatic part plus a vanishing deviatoric part.
// ---------------------------------------------------------------------------------------

/// p·I + t·D with D = diag(2, −1, −1)/3·... : the deviator of uniaxial tension (θ̄ = 1,
/// Bai & Wierzbicki 2008) and of pure shear diag(1, 0, −1) (θ̄ = 0). σ_vm of t·D is t·σ_vm(D);
/// the measures stay defined and finite while σ_vm > DEGENERATE_REL_TOL · max|σ_ij| and are
/// typed `Hydrostatic` below it (the documented tolerance, crates/tensor/src/state.rs).
#[test]
fn approaching_the_hydrostatic_axis() {
    let p = 100.0;
    // (deviator, its σ_vm at t = 1, expected θ̄)
    let cases = [
        ([2.0, -1.0, -1.0], 3.0, 1.0),
        ([1.0, 0.0, -1.0], 3f64.sqrt(), 0.0),
    ];
    for (d, vm_d, theta) in cases {
        for k in 0..40 {
            let t = 10f64.powf(-(k as f64) / 2.0);
            let s = Stress::diagonal(p + t * d[0], p + t * d[1], p + t * d[2]).unwrap();
            let st = s.state();
            let scale = s.vtk6().iter().fold(0.0_f64, |a, v| a.max(v.abs()));
            let vm = t * vm_d;
            let what = format!("deviator {d:?} t = {t:e}");
            assert!(st.sigma_vm.is_finite() && st.sigma_vm >= 0.0, "{what}");
            assert!(
                (st.sigma_h - p).abs() <= 1e-12 * p + t,
                "{what}: σ_h {}",
                st.sigma_h
            );
            if vm > 1e3 * DEGENERATE_REL_TOL * scale {
                // Clearly above the tolerance: defined, and close to the exact values.
                let l = st.lode().unwrap_or_else(|| panic!("{what}: undefined"));
                // relative accuracy of σ_vm: the deviator is formed from numbers of size p,
                // so its absolute error is a few ulps of p (about 1e-14 here).
                assert!(
                    (st.sigma_vm - vm).abs() <= 1e-13 * p + 1e-12 * vm,
                    "{what}: σ_vm {} vs {vm}",
                    st.sigma_vm
                );
                let eta = p / vm;
                assert!(
                    (l.triaxiality - eta).abs() <= 1e-6 * eta,
                    "{what}: η {} vs {eta}",
                    l.triaxiality
                );
                // θ̄ near ±1 is limited by arccos to about sqrt of the relative error of ξ.
                let rel = (1e-14 * p / vm).max(1e-16);
                let tol_theta = 1e-9 + 2.0 * rel.sqrt();
                assert!(
                    (l.lode_angle_param - theta).abs() <= tol_theta,
                    "{what}: θ̄ {} vs {theta} (tol {tol_theta:e})",
                    l.lode_angle_param
                );
                assert_shape_in_range(&st, &what);
            } else if vm < 1e-3 * DEGENERATE_REL_TOL * scale {
                // Clearly below: typed undefined, never a NaN or an infinite η.
                assert_eq!(
                    st.undefined(),
                    Some(Undefined::Hydrostatic),
                    "{what}: {st:?}"
                );
            } else {
                // Within three decades of the tolerance either answer is allowed, but a
                // defined one must be finite and in range.
                assert_shape_in_range(&st, &what);
            }
            for x in all_numbers(&s) {
                assert!(x.is_finite(), "{what}: {x}");
            }
        }
    }
}

/// Exactly hydrostatic and exactly zero states are the two typed cases (state.rs docs).
#[test]
fn hydrostatic_and_zero_are_typed() {
    for p in [-1e30, -1.0, 1e-30, 5e-324, 1.0, 1e30] {
        let st = Stress::diagonal(p, p, p).unwrap().state();
        assert_eq!(st.undefined(), Some(Undefined::Hydrostatic), "p = {p:e}");
        assert_eq!(st.sigma_vm, 0.0, "p = {p:e}");
        assert_eq!(st.triaxiality(), None);
    }
    let st = Stress::diagonal(0.0, 0.0, -0.0).unwrap().state();
    assert_eq!(st.undefined(), Some(Undefined::ZeroStress));
}

// ---------------------------------------------------------------------------------------
// ξ at ±1 ± round-off.
// ---------------------------------------------------------------------------------------

fn rotation(axis: [f64; 3], angle: f64) -> nalgebra::Matrix3<f64> {
    let a = Vector3::new(axis[0], axis[1], axis[2]);
    let a = if a.norm() < 1e-9 { Vector3::z() } else { a };
    Rotation3::from_axis_angle(&Unit::new_normalize(a), angle).into_inner()
}

proptest! {
    /// Rotated uniaxial tension/compression and equibiaxial states have |ξ| = 1 exactly
    /// in exact arithmetic (Bai & Wierzbicki 2008); after a rotation, round-off may push
    /// 27 J3 / (2 σ_vm³) past ±1. ξ must be clamped into [−1, 1] and θ̄ finite, in
    /// [−1, 1] and within √ε-scale (arccos conditioning, state.rs docs) of ±1.
    #[test]
    fn xi_at_plus_minus_one_is_clamped(
        ax in prop::array::uniform3(-1.0f64..1.0),
        angle in -PI..PI,
        mag in prop_oneof![Just(1e-30), Just(1.0), Just(250.0), Just(1e30)],
        hydro in -3.0f64..3.0,
    ) {
        let r = rotation(ax, angle);
        // (principal values, expected θ̄)
        let cases = [
            ([1.0, 0.0, 0.0], 1.0),    // uniaxial tension: ξ = 1
            ([0.0, 0.0, -1.0], -1.0),  // uniaxial compression: ξ = −1
            ([1.0, 1.0, 0.0], -1.0),   // equibiaxial tension: ξ = −1
            ([0.0, -1.0, -1.0], 1.0),  // equibiaxial compression: ξ = 1
        ];
        for (pr, theta) in cases {
            let s = Stress::diagonal(
                mag * (pr[0] + hydro),
                mag * (pr[1] + hydro),
                mag * (pr[2] + hydro),
            )
            .unwrap()
            .rotated(&r);
            let st = s.state();
            let l = st.lode().unwrap();
            prop_assert!((-1.0..=1.0).contains(&l.xi), "ξ {}", l.xi);
            prop_assert!(l.lode_angle_param.is_finite());
            prop_assert!((-1.0..=1.0).contains(&l.lode_angle_param));
            // ξ is off by a few ulps (relative to the magnitude incl. the hydrostatic
            // part); θ̄ by about (2/π)·sqrt(2·δξ).
            let tol = 1e-6;
            prop_assert!(
                (l.lode_angle_param - theta).abs() <= tol,
                "{pr:?}: θ̄ {} vs {theta}", l.lode_angle_param
            );
            prop_assert!((l.xi.abs() - 1.0).abs() <= 1e-10, "ξ {}", l.xi);
        }
    }
}

// ---------------------------------------------------------------------------------------
// Huge and tiny magnitudes.
// ---------------------------------------------------------------------------------------

/// η, ξ, θ̄ are homogeneous of degree 0 in σ and σ_h, σ_vm of degree 1 (common practice,
/// from the definitions): the same state at 1e−300 … 1e300 gives the same shape to
/// round-off, and σ_vm / k the same value.
#[test]
fn magnitudes_from_1e_minus_300_to_1e300() {
    let base = [310.0, -45.0, 120.0, 80.0, -20.0, 35.0];
    let reference = StressState::from_vtk6(&base);
    let rl = *reference.lode().unwrap();
    for e in [-300, -200, -100, -30, -10, 10, 30, 100, 200, 300] {
        let k = 10f64.powi(e);
        let c = base.map(|v| v * k);
        let s = Stress::from_vtk6(c).unwrap();
        let st = s.state();
        let l = st.lode().unwrap();
        assert!(
            (l.triaxiality - rl.triaxiality).abs() < 1e-12,
            "k = {k:e}: η {}",
            l.triaxiality
        );
        assert!((l.xi - rl.xi).abs() < 1e-12, "k = {k:e}");
        assert!((l.lode_angle_param - rl.lode_angle_param).abs() < 1e-12);
        assert!((st.sigma_vm / k - reference.sigma_vm).abs() < 1e-12 * reference.sigma_vm);
        assert!((st.sigma_h / k - reference.sigma_h).abs() < 1e-12 * reference.sigma_h.abs());
        let p = s.principal();
        let p0 = Stress::from_vtk6(base).unwrap().principal();
        for i in 0..3 {
            assert!((p[i] / k - p0[i]).abs() < 1e-12 * 400.0, "k = {k:e}: {p:?}");
        }
        for x in all_numbers(&s) {
            // J2 ~ k², J3 ~ k³ may leave the f64 range (documented): only check NaN.
            assert!(!x.is_nan(), "k = {k:e}");
        }
    }
}

/// Beyond the f64 range of the invariants: subnormal components (down to 5e−324) and
/// components near f64::MAX. The shape must stay defined and finite; σ_vm, J2 and J3 may
/// overflow to infinity near f64::MAX (documented in state.rs) but none is ever a NaN.
#[test]
fn subnormal_and_near_max_components() {
    let tiny = f64::from_bits(1); // 4.9e−324, the smallest subnormal
    let states = [
        [tiny, 0.0, 0.0, 0.0, 0.0, 0.0],
        [tiny, -tiny, 0.0, 0.0, 0.0, 0.0],
        [0.0, 0.0, 0.0, tiny, 0.0, 0.0],
        [f64::MAX, 0.0, 0.0, 0.0, 0.0, 0.0],
        [f64::MAX, -f64::MAX, 0.0, 0.0, 0.0, 0.0],
        [f64::MAX, 0.0, -f64::MAX, 0.0, 0.0, 0.0],
        [f64::MAX, f64::MAX, f64::MAX, f64::MAX, f64::MAX, f64::MAX],
        [-f64::MAX, 0.0, 0.0, f64::MAX, -f64::MAX, f64::MAX],
        [1e300, 1e-300, tiny, -1e300, 0.0, 5e-324],
    ];
    for c in states {
        let s = Stress::from_vtk6(c).unwrap();
        let st = s.state();
        assert_shape_in_range(&st, &format!("{c:?}"));
        for x in all_numbers(&s) {
            assert!(!x.is_nan(), "{c:?}: {st:?}");
        }
    }
    // Uniaxial tension at the smallest subnormal is still uniaxial tension (η = 1/3,
    // θ̄ = 1; Bao & Wierzbicki 2004): the scaling by the largest component keeps it exact.
    let st = Stress::from_vtk6([tiny, 0.0, 0.0, 0.0, 0.0, 0.0])
        .unwrap()
        .state();
    let l = st.lode().unwrap();
    assert!((l.triaxiality - 1.0 / 3.0).abs() < 1e-15);
    assert!((l.lode_angle_param - 1.0).abs() < 1e-12);
    // Pure shear at f64::MAX: σ_vm = √3·τ overflows, the shape does not (η = 0, θ̄ = 0).
    let st = Stress::from_vtk6([0.0, 0.0, 0.0, f64::MAX, 0.0, 0.0])
        .unwrap()
        .state();
    let l = st.lode().unwrap();
    assert!(l.triaxiality.abs() < 1e-15 && l.lode_angle_param.abs() < 1e-12);
    assert!(
        !st.j3().is_nan(),
        "J3 of pure shear at f64::MAX: {}",
        st.j3()
    );
}

// ---------------------------------------------------------------------------------------
// Float32 inputs.
// ---------------------------------------------------------------------------------------

fn round32(c: [f64; 6]) -> [f64; 6] {
    c.map(|v| v as f32 as f64)
}

proptest! {
    /// A tensor stored as Float32 (each component rounded to binary32, relative error
    /// ≤ 2^−24) gives measures close to the Float64 ones. Stated tolerances, for states
    /// with σ_vm ≥ 0.05·max|σ_ij| (away from the hydrostatic axis, where η is
    /// ill-conditioned): |Δη| ≤ 2e−5·(1 + |η|), |Δσ_vm| ≤ 2e−6·max|σ_ij|, |Δξ| ≤ 2e−5, and
    /// |Δθ̄| ≤ 1e−4 where |ξ| ≤ 0.99, ≤ 5e−3 otherwise (arccos conditioning near ±1).
    #[test]
    fn float32_rounded_inputs_are_close(
        c in prop::array::uniform6(-1000.0f64..1000.0),
    ) {
        let s64 = StressState::from_vtk6(&c);
        let s32 = StressState::from_vtk6(&round32(c));
        let scale = c.iter().fold(0.0_f64, |a, v| a.max(v.abs()));
        prop_assume!(scale > 1e-3 && s64.sigma_vm >= 0.05 * scale);
        let (a, b) = (s64.lode().unwrap(), s32.lode().unwrap());
        prop_assert!((a.triaxiality - b.triaxiality).abs() <= 2e-5 * (1.0 + a.triaxiality.abs()));
        prop_assert!((s64.sigma_vm - s32.sigma_vm).abs() <= 2e-6 * scale);
        prop_assert!((a.xi - b.xi).abs() <= 2e-5, "ξ {} vs {}", a.xi, b.xi);
        let tol = if a.xi.abs() <= 0.99 { 1e-4 } else { 5e-3 };
        prop_assert!((a.lode_angle_param - b.lode_angle_param).abs() <= tol);
    }

    /// No finite input yields a NaN anywhere: σ_h, σ_vm, J2, J3, principal stresses and,
    /// when defined, η, ξ, θ̄, μ; the shape measures are also finite and in range; the
    /// batch kernel agrees with the single-tensor path.
    #[test]
    fn no_finite_input_yields_nan(
        c in prop::array::uniform6(
            prop::num::f64::NORMAL | prop::num::f64::SUBNORMAL | prop::num::f64::ZERO
                | prop::num::f64::NEGATIVE | prop::num::f64::POSITIVE
        ),
        rescale in prop_oneof![Just(1.0), Just(1e-300), Just(1e300)],
    ) {
        let c = c.map(|v| { let w = v * rescale; if w.is_finite() { w } else { v } });
        prop_assume!(c.iter().all(|v| v.is_finite()));
        let s = Stress::from_vtk6(c).unwrap();
        let st = s.state();
        for x in all_numbers(&s) {
            prop_assert!(!x.is_nan(), "{c:?} -> {st:?}");
        }
        prop_assert!(st.sigma_vm >= 0.0);
        assert_shape_in_range(&st, &format!("{c:?}"));
        if let Shape::Undefined(u) = st.shape {
            prop_assert!(matches!(u, Undefined::Hydrostatic | Undefined::ZeroStress));
        }
        let b = batch::state_of(&c, &ComponentOrder::VTK).unwrap();
        prop_assert_eq!(b, st);
        // the fused full-field kernel gives the same numbers on the same extreme inputs
        let m = batch::measures_vtk6(&c);
        prop_assert_eq!(m.sigma_h, st.sigma_h);
        prop_assert_eq!(m.sigma_vm, st.sigma_vm);
        match (m.shape, st.lode()) {
            (Some(a), Some(l)) => {
                prop_assert_eq!(a.triaxiality, l.triaxiality);
                prop_assert_eq!(a.lode_angle_param(), l.lode_angle_param);
            }
            (None, None) => {}
            (a, l) => prop_assert!(false, "kernel {a:?} vs state {l:?}"),
        }
    }
}
