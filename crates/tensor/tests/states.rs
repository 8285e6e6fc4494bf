//! Checks of the stress-state measures against published values and independent
//! computations. Each check names its source.

#![allow(clippy::unwrap_used, clippy::collapsible_if)]

use std::f64::consts::PI;

use ductrace_tensor::{ComponentOrder, Stress, StressState, Undefined, batch};
use nalgebra::{Matrix3, Rotation3, Vector3};
use proptest::prelude::*;

/// Expected measures of one state: (η, θ̄, μ), or `None` when undefined.
type Expect = Option<(f64, f64, f64)>;

/// Checks one principal state, unrotated and under a set of rotations, against the
/// expected measures to `tol` absolute.
fn check(name: &str, principal: [f64; 3], expect: Expect, tol: f64) {
    let base = Stress::diagonal(principal[0], principal[1], principal[2]).unwrap();
    for (k, r) in rotations().iter().enumerate() {
        let s = base.rotated(r);
        let st = s.state();
        match expect {
            None => assert!(
                st.lode().is_none(),
                "{name} rotation {k}: expected undefined, got {st:?}"
            ),
            Some((eta, theta, mu)) => {
                let l = st
                    .lode()
                    .unwrap_or_else(|| panic!("{name} rotation {k}: undefined"));
                assert!(
                    (l.triaxiality - eta).abs() < tol,
                    "{name} rot {k}: η {} vs {eta}",
                    l.triaxiality
                );
                assert!(
                    (l.lode_angle_param - theta).abs() < tol,
                    "{name} rot {k}: θ̄ {} vs {theta}",
                    l.lode_angle_param
                );
                assert!(
                    (l.lode_param - mu).abs() < tol,
                    "{name} rot {k}: μ {} vs {mu}",
                    l.lode_param
                );
            }
        }
    }
}

/// The identity and a deterministic set of rotations about skew axes.
fn rotations() -> Vec<Matrix3<f64>> {
    let mut out = vec![Matrix3::identity()];
    let mut seed: u64 = 0x9E37_79B9_7F4A_7C15;
    let mut next = || {
        seed ^= seed << 13;
        seed ^= seed >> 7;
        seed ^= seed << 17;
        (seed >> 11) as f64 / (1u64 << 53) as f64
    };
    for _ in 0..24 {
        let axis = Vector3::new(next() - 0.5, next() - 0.5, next() - 0.5);
        let angle = 2.0 * PI * next();
        let r = Rotation3::from_axis_angle(&nalgebra::Unit::new_normalize(axis), angle);
        out.push(*r.matrix());
    }
    out
}

// Standard states, FIELD-NOTES §1 table (textbook values, common practice; η from Bao &
// Wierzbicki 2004, θ̄ from Bai & Wierzbicki 2008, μ from Lode 1926).
// Round-off of the rotations limits agreement to ~1e-8 where ξ = ±1 (arccos conditioning).
const TOL: f64 = 1e-7;

#[test]
fn uniaxial_tension() {
    check(
        "uniaxial tension",
        [250.0, 0.0, 0.0],
        Some((1.0 / 3.0, 1.0, -1.0)),
        TOL,
    );
}

#[test]
fn uniaxial_compression() {
    check(
        "uniaxial compression",
        [0.0, 0.0, -250.0],
        Some((-1.0 / 3.0, -1.0, 1.0)),
        TOL,
    );
}

#[test]
fn pure_shear() {
    check(
        "pure shear",
        [120.0, 0.0, -120.0],
        Some((0.0, 0.0, 0.0)),
        TOL,
    );
}

#[test]
fn plane_strain_tension() {
    check(
        "plane-strain tension",
        [400.0, 200.0, 0.0],
        Some((1.0 / 3.0_f64.sqrt(), 0.0, 0.0)),
        TOL,
    );
}

#[test]
fn equibiaxial_tension() {
    check(
        "equibiaxial tension",
        [300.0, 300.0, 0.0],
        Some((2.0 / 3.0, -1.0, 1.0)),
        TOL,
    );
}

/// Axisymmetric triaxial tension (1, a, a), a < 1: the state at a notched-bar centre.
/// η = (1 + 2a) / (3 (1 − a)) (from σ_h = (1+2a)/3, σ_vm = 1 − a), θ̄ = +1, μ = −1.
#[test]
fn axisymmetric_triaxial_tension() {
    for a in [0.0, 0.2, 0.45, 0.7] {
        let eta = (1.0 + 2.0 * a) / (3.0 * (1.0 - a));
        check(
            "axisymmetric",
            [500.0, 500.0 * a, 500.0 * a],
            Some((eta, 1.0, -1.0)),
            TOL,
        );
    }
}

#[test]
fn hydrostatic_and_zero_are_undefined() {
    check("hydrostatic", [180.0, 180.0, 180.0], None, 0.0);
    let zero = Stress::from_vtk6([0.0; 6]).unwrap().state();
    assert_eq!(zero.undefined(), Some(Undefined::ZeroStress));
    let hyd = Stress::diagonal(-7e5, -7e5, -7e5).unwrap().state();
    assert_eq!(hyd.undefined(), Some(Undefined::Hydrostatic));
    assert!((hyd.sigma_h + 7e5).abs() < 1e-9);
    assert!(hyd.triaxiality().is_none() && hyd.lode_param().is_none());
}

/// Tiny and huge magnitudes keep their shape (no underflow/overflow in the invariants).
#[test]
fn extreme_magnitudes_keep_the_shape() {
    for k in [1e-300, 1e-30, 1e30, 1e300] {
        let st = Stress::diagonal(k, 0.5 * k, 0.0).unwrap().state();
        let l = st.lode().unwrap();
        assert!((l.triaxiality - 1.0 / 3.0_f64.sqrt()).abs() < 1e-12, "{k}");
        assert!(l.lode_angle_param.abs() < 1e-12, "{k}");
        assert!(((st.sigma_vm / k) - 0.75_f64.sqrt()).abs() < 1e-12, "{k}");
    }
}

/// Principal stresses, σ_h and σ_vm against numpy.linalg.eigvalsh on 60 random tensors
/// (fixtures/tensor/make_principal.py; values committed in principal.json).
#[test]
fn principal_stresses_match_numpy() {
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/../../fixtures/tensor/principal.json"
    ))
    .unwrap();
    let json: serde_json::Value = serde_json::from_str(&text).unwrap();
    let cases = json["cases"].as_array().unwrap();
    assert_eq!(cases.len(), 60);
    for (i, case) in cases.iter().enumerate() {
        let c: Vec<f64> = case["vtk6"]
            .as_array()
            .unwrap()
            .iter()
            .map(|v| v.as_f64().unwrap())
            .collect();
        let want: Vec<f64> = case["principal"]
            .as_array()
            .unwrap()
            .iter()
            .map(|v| v.as_f64().unwrap())
            .collect();
        let s = Stress::from_slice(&c, &ComponentOrder::VTK).unwrap();
        let scale = c.iter().fold(0.0_f64, |a, v| a.max(v.abs()));
        let got = s.principal();
        for k in 0..3 {
            assert!(
                (got[k] - want[k]).abs() <= 1e-12 * scale,
                "case {i}: σ{} = {} vs numpy {}",
                k + 1,
                got[k],
                want[k]
            );
        }
        let st = s.state();
        let h = case["sigma_h"].as_f64().unwrap();
        let vm = case["sigma_vm"].as_f64().unwrap();
        assert!((st.sigma_h - h).abs() <= 1e-12 * scale, "case {i}: σ_h");
        assert!((st.sigma_vm - vm).abs() <= 1e-12 * scale, "case {i}: σ_vm");
    }
}

fn arb_stress() -> impl Strategy<Value = Stress> {
    proptest::array::uniform6(-1000.0..1000.0f64).prop_map(|c| Stress::from_vtk6(c).unwrap())
}

fn arb_rotation() -> impl Strategy<Value = Matrix3<f64>> {
    (proptest::array::uniform3(-1.0..1.0f64), 0.0..(2.0 * PI))
        .prop_filter("axis not degenerate", |(a, _)| {
            a[0] * a[0] + a[1] * a[1] + a[2] * a[2] > 1e-4
        })
        .prop_map(|(a, angle)| {
            let axis = nalgebra::Unit::new_normalize(Vector3::new(a[0], a[1], a[2]));
            *Rotation3::from_axis_angle(&axis, angle).matrix()
        })
}

/// Lode 1926 definition from principal stresses.
fn lode_from_principal(p: [f64; 3]) -> f64 {
    (2.0 * p[1] - p[0] - p[2]) / (p[0] - p[2])
}

fn close(a: f64, b: f64, tol: f64) -> bool {
    (a - b).abs() <= tol
}

/// Cases away from ξ = ±1 where θ̄ is well conditioned; near ±1 arccos amplifies round-off
/// to √ε, so invariance holds to 1e-6 there.
fn theta_tol(st: &StressState) -> f64 {
    match st.xi() {
        Some(xi) if xi.abs() > 0.999_999 => 1e-6,
        _ => 1e-9,
    }
}

proptest! {
    /// σ_h, σ_vm, η, θ̄ are invariants: unchanged by rotation (common practice: they are
    /// functions of the principal values only).
    #[test]
    fn invariant_under_rotation(s in arb_stress(), r in arb_rotation()) {
        let a = s.state();
        let b = s.rotated(&r).state();
        let scale = s.vtk6().iter().fold(0.0_f64, |m, v| m.max(v.abs())).max(1.0);
        prop_assert!(close(a.sigma_h, b.sigma_h, 1e-10 * scale));
        prop_assert!(close(a.sigma_vm, b.sigma_vm, 1e-10 * scale));
        if let (Some(la), Some(lb)) = (a.lode(), b.lode()) {
            if a.sigma_vm > 1e-6 * scale {
                prop_assert!(close(la.triaxiality, lb.triaxiality, 1e-8 * scale / a.sigma_vm));
                prop_assert!(close(la.lode_angle_param, lb.lode_angle_param, theta_tol(&a)));
            }
        }
    }

    /// Adding a hydrostatic pressure leaves σ_vm and θ̄ unchanged (they depend on the deviator
    /// only; Bai & Wierzbicki 2008).
    #[test]
    fn pressure_changes_neither_vm_nor_lode(s in arb_stress(), p in -2000.0..2000.0f64) {
        let a = s.state();
        let b = s.plus_hydrostatic(p).state();
        prop_assert!(close(a.sigma_vm, b.sigma_vm, 1e-9 * (1.0 + p.abs() + a.sigma_vm)));
        if let (Some(la), Some(lb)) = (a.lode(), b.lode()) {
            if a.sigma_vm > 1e-3 {
                prop_assert!(close(la.lode_angle_param, lb.lode_angle_param, 1e-6));
                prop_assert!(close(b.sigma_h - a.sigma_h, p, 1e-9 * (1.0 + p.abs())));
            }
        }
    }

    /// Negating the tensor negates η and θ̄ (tension ↔ compression).
    #[test]
    fn negation_negates_eta_and_theta(s in arb_stress()) {
        let a = s.state();
        let b = s.scaled(-1.0).state();
        if let (Some(la), Some(lb)) = (a.lode(), b.lode()) {
            prop_assert!(close(la.triaxiality, -lb.triaxiality, 1e-12 * (1.0 + la.triaxiality.abs())));
            prop_assert!(close(la.lode_angle_param, -lb.lode_angle_param, 1e-12));
            prop_assert!(close(la.lode_param, -lb.lode_param, 1e-12));
        }
    }

    /// Principal stresses reproduce the trace and the determinant (characteristic polynomial).
    #[test]
    fn principal_reproduce_trace_and_determinant(s in arb_stress()) {
        let p = s.principal();
        prop_assert!(p[0] >= p[1] && p[1] >= p[2]);
        let m = s.matrix();
        let scale = s.vtk6().iter().fold(0.0_f64, |m, v| m.max(v.abs())).max(1.0);
        prop_assert!(close(p[0] + p[1] + p[2], m.trace(), 1e-10 * scale));
        prop_assert!(close(p[0] * p[1] * p[2], m.determinant(), 1e-9 * scale.powi(3)));
    }

    /// μ = −√3 tan(π θ̄ / 6) (FIELD-NOTES §1; Bai & Wierzbicki 2008), with μ taken from its
    /// definition on principal stresses (Lode 1926).
    #[test]
    fn lode_parameter_identity(s in arb_stress()) {
        let st = s.state();
        if let Some(l) = st.lode() {
            if st.sigma_vm > 1e-3 {
                let mu = lode_from_principal(s.principal());
                let tol = if l.xi.abs() > 0.999_999 { 1e-6 } else { 1e-8 };
                prop_assert!(close(mu, l.lode_param, tol), "μ {} vs {}", mu, l.lode_param);
                prop_assert!(close(mu, -(3.0_f64.sqrt()) * (PI * l.lode_angle_param / 6.0).tan(), tol));
            }
        }
    }

    /// Plane stress (σ3 = 0): ξ = −(27/2) η (η² − 1/3) (Bai & Wierzbicki 2008), for random
    /// in-plane states with any rotation.
    #[test]
    fn plane_stress_relation(sx in -500.0..500.0f64, sy in -500.0..500.0f64,
                             txy in -300.0..300.0f64, r in arb_rotation()) {
        let s = Stress::from_vtk6([sx, sy, 0.0, txy, 0.0, 0.0]).unwrap().rotated(&r);
        let st = s.state();
        if let Some(l) = st.lode() {
            if st.sigma_vm > 1e-3 {
                let eta = l.triaxiality;
                let want = -13.5 * eta * (eta * eta - 1.0 / 3.0);
                prop_assert!(close(l.xi, want, 1e-9), "ξ {} vs {}", l.xi, want);
            }
        }
    }

    /// Batch evaluation agrees with one-by-one evaluation for any named order.
    #[test]
    fn batch_matches_single(values in proptest::collection::vec(-100.0..100.0f64, 6..600)) {
        let n = values.len() / 6;
        let values = &values[..n * 6];
        let order = ComponentOrder::VOIGT;
        let all = batch::states_vec(values, 6, &order).unwrap();
        for (i, st) in all.iter().enumerate() {
            let mut t = [0.0; 6];
            t.copy_from_slice(&values[i * 6..i * 6 + 6]);
            prop_assert_eq!(*st, Stress::from_ordered(t, &order).unwrap().state());
        }
    }
}
