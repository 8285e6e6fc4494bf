//! Checks of the fracture-locus formulas against published values and identities.

#![allow(clippy::unwrap_used)] // tests may unwrap

use approx::assert_relative_eq;
use ductrace_locus::{
    FractureLocus, HosfordCoulomb, JohnsonCook, Locus, ModelKind, ModifiedMohrCoulomb,
    johnson_cook_rate_temperature_factor, mmc_first_bracket,
};
use proptest::prelude::*;

/// Johnson–Cook stress-state part at η = 0, 1/3, 0.5, 1.0 for the published constants of
/// 4340 steel (0.05, 3.44, −2.12) and OFHC copper (0.54, 4.89, −3.03) (Johnson & Cook
/// 1985, Eng. Fract. Mech. 21:31–48; constants and values as quoted in the project's
/// field notes §4, constants from memory there). Values are given to 3 decimals.
#[test]
fn johnson_cook_published_constants() {
    let cases = [
        ((0.05, 3.44, -2.12), [3.490, 1.747, 1.242, 0.463]),
        ((0.54, 4.89, -3.03), [5.430, 2.321, 1.615, 0.776]),
    ];
    for ((d1, d2, d3), expected) in cases {
        let jc = JohnsonCook::new(d1, d2, d3).unwrap();
        for (eta, want) in [0.0, 1.0 / 3.0, 0.5, 1.0].into_iter().zip(expected) {
            let got = jc.fracture_strain(eta, 0.0).unwrap();
            assert!(
                (got - want).abs() <= 5e-4,
                "D = ({d1}, {d2}, {d3}), eta {eta}: {got} vs {want}"
            );
        }
    }
}

/// Johnson & Cook (1985): the factor is 1 at the reference rate (ε̇* = 1) and room
/// temperature (T* = 0), and [1 + D4 ln ε̇*][1 + D5 T*] otherwise (4340 D4 = 0.002,
/// D5 = 0.61 as quoted in the field notes, from memory there).
#[test]
fn johnson_cook_rate_temperature() {
    let f = johnson_cook_rate_temperature_factor(0.002, 0.61, 1.0, 0.0).unwrap();
    assert_relative_eq!(f, 1.0, epsilon = 1e-15);
    let f = johnson_cook_rate_temperature_factor(0.002, 0.61, 1000.0, 0.5).unwrap();
    assert_relative_eq!(
        f,
        (1.0 + 0.002 * 1000f64.ln()) * (1.0 + 0.305),
        epsilon = 1e-14
    );
    assert_eq!(
        johnson_cook_rate_temperature_factor(0.002, 0.61, 0.0, 0.0),
        None
    );
}

/// Uniaxial tension (η = 1/3, θ̄ = 1) and equibiaxial tension (η = 2/3, θ̄ = −1), the two
/// states of the field notes' table (§1), give ε_f = b for any a, c, n (Mohr & Marcadet
/// 2015, Int. J. Solids Struct. 67–68:40–55).
#[test]
fn hosford_coulomb_tension_identity_example() {
    let hc = HosfordCoulomb::new(1.6, 0.9, 0.05, 0.1).unwrap();
    assert_relative_eq!(
        hc.fracture_strain(1.0 / 3.0, 1.0).unwrap(),
        0.9,
        epsilon = 1e-12
    );
    assert_relative_eq!(
        hc.fracture_strain(2.0 / 3.0, -1.0).unwrap(),
        0.9,
        epsilon = 1e-12
    );
    // Hosford term is 1 in uniaxial tension for any a (its normalisation).
    assert_relative_eq!(hc.hosford_term(1.0).unwrap(), 1.0, epsilon = 1e-14);
}

/// With a = 2 the Hosford term is the von Mises norm of the unit deviator, hence 1 at
/// every θ̄ (Hosford 1972, J. Appl. Mech. 39:607–609, from memory: a = 2 recovers von
/// Mises).
#[test]
fn hosford_a2_is_von_mises() {
    let hc = HosfordCoulomb::new(2.0, 1.0, 0.1, 0.1).unwrap();
    for k in 0..=20 {
        let th = -1.0 + 0.1 * k as f64;
        assert_relative_eq!(hc.hosford_term(th).unwrap(), 1.0, epsilon = 1e-12);
    }
}

/// MMC with c_theta_s = c_theta_t = c_theta_c = 1 and c1 = 0 is pressure-independent:
/// ε_f = (A/c2 · cos(πθ̄/6)/√3)^(−1/n), which at θ̄ = 0 is (A/(√3 c2))^(−1/n) for every η
/// (Bai & Wierzbicki 2010, formula of the field notes §4 evaluated by hand).
#[test]
fn mmc_closed_form_pure_shear() {
    let (a, n, c2) = (900.0, 0.12, 450.0);
    let mmc = ModifiedMohrCoulomb::new(a, n, 0.0, c2, 1.0, 1.0, 1.0).unwrap();
    let want = (a / c2 / 3f64.sqrt()).powf(-1.0 / n);
    assert_relative_eq!(
        mmc.fracture_strain(0.0, 0.0).unwrap(),
        want,
        max_relative = 1e-13
    );
    assert_relative_eq!(
        mmc.fracture_strain(0.7, 0.0).unwrap(),
        want,
        max_relative = 1e-13
    );
}

/// The first bracket equals c_theta_s at θ̄ = 0 and c_ax at θ̄ = ±1 (Bai & Wierzbicki
/// 2010), with c_ax = c_theta_t for θ̄ ≥ 0 and c_theta_c for θ̄ < 0.
#[test]
fn mmc_first_bracket_example() {
    let mmc = ModifiedMohrCoulomb::new(800.0, 0.15, 0.1, 400.0, 0.93, 1.02, 1.13).unwrap();
    assert_relative_eq!(mmc.first_bracket(0.0).unwrap(), 0.93, epsilon = 1e-14);
    assert_relative_eq!(mmc.first_bracket(1.0).unwrap(), 1.02, epsilon = 1e-14);
    assert_relative_eq!(mmc.first_bracket(-1.0).unwrap(), 1.13, epsilon = 1e-14);
    assert_eq!(mmc.first_bracket(1.0 + 1e-9), None);
}

#[test]
fn parameter_lists_round_trip() {
    let models = [
        Locus::from_parameters(
            ModelKind::JohnsonCook,
            [("D1", 0.54), ("D2", 4.89), ("D3", -3.03)],
        )
        .unwrap(),
        Locus::from_parameters(
            ModelKind::ModifiedMohrCoulomb,
            [
                ("A", 800.0),
                ("n", 0.15),
                ("c1", 0.1),
                ("c2", 400.0),
                ("c_theta_s", 0.95),
                ("c_theta_t", 1.0),
                ("c_theta_c", 1.1),
            ],
        )
        .unwrap(),
        Locus::from_parameters(
            ModelKind::HosfordCoulomb,
            [("a", 1.5), ("b", 0.7), ("c", 0.02)],
        )
        .unwrap(),
    ];
    for m in models {
        let names: Vec<&str> = m.parameters().iter().map(|(n, _)| *n).collect();
        assert_eq!(names, m.kind().parameter_names());
        let again = Locus::from_parameters(m.kind(), m.parameters()).unwrap();
        assert_eq!(again, m);
        assert_eq!(m.id(), m.kind().id());
    }
}

#[test]
fn out_of_domain_values_are_errors() {
    assert!(HosfordCoulomb::new(0.99, 1.0, 0.1, 0.1).is_err());
    assert!(HosfordCoulomb::new(1.5, 0.0, 0.1, 0.1).is_err());
    assert!(HosfordCoulomb::new(1.5, 1.0, -0.1, 0.1).is_err());
    assert!(HosfordCoulomb::new(1.5, 1.0, 0.1, 0.0).is_err());
    assert!(ModifiedMohrCoulomb::new(0.0, 0.1, 0.1, 1.0, 1.0, 1.0, 1.0).is_err());
    assert!(ModifiedMohrCoulomb::new(1.0, -0.1, 0.1, 1.0, 1.0, 1.0, 1.0).is_err());
    assert!(ModifiedMohrCoulomb::new(1.0, 0.1, -0.1, 1.0, 1.0, 1.0, 1.0).is_err());
    assert!(JohnsonCook::new(f64::NAN, 1.0, 1.0).is_err());
    let e = HosfordCoulomb::new(0.5, 1.0, 0.1, 0.1)
        .unwrap_err()
        .to_string();
    assert!(e.contains("a = 0.5") && e.contains(">= 1"), "{e}");
}

proptest! {
    /// Mohr & Marcadet (2015): ε_f(1/3, +1) = ε_f(2/3, −1) = b for any a, c, n.
    #[test]
    fn hosford_coulomb_tension_identity(a in 1.0f64..8.0, b in 0.05f64..3.0,
                                        c in 0.0f64..0.6, n in 0.03f64..0.4) {
        let hc = HosfordCoulomb::new(a, b, c, n).unwrap();
        let t = hc.fracture_strain(1.0 / 3.0, 1.0).unwrap();
        let e = hc.fracture_strain(2.0 / 3.0, -1.0).unwrap();
        prop_assert!((t / b - 1.0).abs() < 1e-10, "uniaxial {t} vs b {b}");
        prop_assert!((e / b - 1.0).abs() < 1e-10, "equibiaxial {e} vs b {b}");
    }

    /// Bai & Wierzbicki (2010): the first bracket is c_s at θ̄ = 0, c_ax at θ̄ = ±1.
    #[test]
    fn mmc_bracket_identities(cs in 0.5f64..1.5, ct in 0.5f64..1.5, cc in 0.5f64..1.5) {
        let mmc = ModifiedMohrCoulomb::new(800.0, 0.15, 0.1, 400.0, cs, ct, cc).unwrap();
        prop_assert!((mmc.first_bracket(0.0).unwrap() - cs).abs() < 1e-13);
        prop_assert!((mmc.first_bracket(1.0).unwrap() - ct).abs() < 1e-13);
        prop_assert!((mmc.first_bracket(-1.0).unwrap() - cc).abs() < 1e-13);
        prop_assert!((mmc_first_bracket(1.0, cs, ct).unwrap() - ct).abs() < 1e-13);
    }

    /// Every model is total: any finite (η, θ̄) gives None or a finite positive strain.
    #[test]
    fn never_nan(eta in -10.0f64..10.0, th in -1.2f64..1.2,
                 a in 1.0f64..6.0, c in 0.0f64..0.5, c1 in 0.0f64..0.5) {
        let models = [
            Locus::JohnsonCook(JohnsonCook::new(-2.2, 5.43, -0.47).unwrap()),
            Locus::HosfordCoulomb(HosfordCoulomb::new(a, 0.8, c, 0.1).unwrap()),
            Locus::ModifiedMohrCoulomb(
                ModifiedMohrCoulomb::new(800.0, 0.15, c1, 400.0, 0.95, 1.0, 1.1).unwrap()),
        ];
        for m in &models {
            if let Some(e) = m.fracture_strain(eta, th) {
                prop_assert!(e.is_finite() && e > 0.0);
            }
            let mut g = [0.0; 7];
            if let Some(l) = m.log_strain_gradient(eta, th, &mut g) {
                prop_assert!(l.is_finite());
                prop_assert!(g.iter().all(|x| x.is_finite()));
            }
        }
    }

    /// Monotonic in triaxiality at fixed θ̄ where defined (all three loci with positive
    /// friction-like parameters decrease with η; Johnson & Cook 1985, Bai & Wierzbicki
    /// 2010, Mohr & Marcadet 2015).
    #[test]
    fn decreasing_in_triaxiality(eta in -0.5f64..1.5, th in -1.0f64..1.0) {
        let models = [
            Locus::JohnsonCook(JohnsonCook::new(0.05, 3.44, -2.12).unwrap()),
            Locus::HosfordCoulomb(HosfordCoulomb::new(1.6, 0.9, 0.05, 0.1).unwrap()),
            Locus::ModifiedMohrCoulomb(
                ModifiedMohrCoulomb::new(800.0, 0.15, 0.1, 400.0, 0.95, 1.0, 1.1).unwrap()),
        ];
        for m in &models {
            if let (Some(lo), Some(hi)) = (m.fracture_strain(eta, th), m.fracture_strain(eta + 0.01, th)) {
                prop_assert!(hi < lo, "{} at ({eta}, {th})", m.id());
            }
        }
    }
}
