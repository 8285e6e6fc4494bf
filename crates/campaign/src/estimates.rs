//! Closed-form estimates from specimen geometry: Bridgman's notch triaxiality and the
//! area-based fracture strain.
//!
//! * Round notched bar, centre of the minimum section, a = minimum-section radius, R = notch
//!   radius: η = 1/3 + ln(1 + a/(2R)) (Bridgman 1952, Studies in Large Plastic Flow and
//!   Fracture; FIELD-NOTES §3).
//! * Flat-grooved plane-strain plate, t = ligament thickness, R = groove radius:
//!   η = (1/√3)[1 + 2 ln(1 + t/(4R))] (Bai, Teng & Wierzbicki 2009, J. Eng. Mater. Technol.
//!   131:021002; formula from memory in FIELD-NOTES §3).
//! * Fracture strain from the broken sample: round bar ε_f = ln(A0/Af) = 2 ln(d0/df); plate
//!   ε_f = (2/√3) ln(t0/tf) (common practice; FIELD-NOTES §5). These are averages over the
//!   neck: the centre strain is higher.
//!
//! The notch formulas hold at the initial geometry; the finite-element values at the centre
//! drift as the notch deforms. They are sanity bounds, not oracles.

use crate::{Kind, Measured, Notch};

/// Bridgman's estimate of the initial triaxiality at the notch centre, for round bars and
/// plane-strain plates; `None` for other kinds, missing or non-positive dimensions.
pub fn bridgman(kind: Kind, notch: &Notch) -> Option<f64> {
    match (kind, notch) {
        (Kind::RoundBar, Notch::Round { a, r }) if *a > 0.0 && *r > 0.0 => {
            Some(1.0 / 3.0 + (1.0 + a / (2.0 * r)).ln())
        }
        (Kind::Plate, Notch::Plate { t, r }) if *t > 0.0 && *r > 0.0 => {
            Some((1.0 + 2.0 * (1.0 + t / (4.0 * r)).ln()) / 3.0_f64.sqrt())
        }
        _ => None,
    }
}

/// The variant with a factor √2 on the logarithm, closer to finite-element values at the
/// centre of round bars (Bai, Teng & Wierzbicki 2009; factor from memory in FIELD-NOTES §3).
pub fn bridgman_sqrt2(a: f64, r: f64) -> Option<f64> {
    (a > 0.0 && r > 0.0).then(|| 1.0 / 3.0 + 2.0_f64.sqrt() * (1.0 + a / (2.0 * r)).ln())
}

/// The area-based fracture strain from measured sizes; `None` when the sizes do not fit the
/// kind or are not positive.
pub fn area_strain(kind: Kind, m: &Measured) -> Option<f64> {
    match (kind, m) {
        (Kind::RoundBar, Measured::Diameters { d0, df }) if *d0 > 0.0 && *df > 0.0 => {
            Some(2.0 * (d0 / df).ln())
        }
        (Kind::Plate, Measured::Thicknesses { t0, tf }) if *t0 > 0.0 && *tf > 0.0 => {
            Some(2.0 / 3.0_f64.sqrt() * (t0 / tf).ln())
        }
        _ => None,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// FIELD-NOTES §3 arithmetic: a = 4, R = 4 → 0.7388 (√2 variant 0.9067); a = 4, R = 2 →
    /// 1.0265 (1.3136); a = 4, R = 10 → 0.5157 (0.5912); plate t = 2, R = 2 → 0.8350;
    /// t = 2, R = 1 → 1.0455.
    #[test]
    fn notch_check_values() {
        let round = |a, r| bridgman(Kind::RoundBar, &Notch::Round { a, r }).unwrap();
        assert!((round(4.0, 4.0) - 0.7388).abs() < 5e-5);
        assert!((round(4.0, 2.0) - 1.0265).abs() < 5e-5);
        assert!((round(4.0, 10.0) - 0.5157).abs() < 5e-5);
        assert!((bridgman_sqrt2(4.0, 4.0).unwrap() - 0.9067).abs() < 5e-5);
        assert!((bridgman_sqrt2(4.0, 2.0).unwrap() - 1.3136).abs() < 5e-5);
        assert!((bridgman_sqrt2(4.0, 10.0).unwrap() - 0.5912).abs() < 5e-5);
        let plate = |t, r| bridgman(Kind::Plate, &Notch::Plate { t, r }).unwrap();
        assert!((plate(2.0, 2.0) - 0.8350).abs() < 5e-5);
        assert!((plate(2.0, 1.0) - 1.0455).abs() < 5e-5);
        assert!(bridgman(Kind::Shear, &Notch::Round { a: 1.0, r: 1.0 }).is_none());
        assert!(bridgman(Kind::RoundBar, &Notch::Round { a: 1.0, r: 0.0 }).is_none());
    }

    /// ε_f = 2 ln(d0/df) (common practice): d0 = 8, df = 8/e gives 2.
    #[test]
    fn area_strains() {
        let d = Measured::Diameters {
            d0: 8.0,
            df: 8.0 / std::f64::consts::E,
        };
        assert!((area_strain(Kind::RoundBar, &d).unwrap() - 2.0).abs() < 1e-12);
        let t = Measured::Thicknesses { t0: 2.0, tf: 1.0 };
        let want = 2.0 / 3.0_f64.sqrt() * 2.0_f64.ln();
        assert!((area_strain(Kind::Plate, &t).unwrap() - want).abs() < 1e-12);
        assert!(area_strain(Kind::Plate, &d).is_none());
    }
}
