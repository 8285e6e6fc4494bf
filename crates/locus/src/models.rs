//! Fracture-locus models: ε_f as a function of stress triaxiality η and Lode angle
//! parameter θ̄.
//!
//! Owns the three calibrated models — Johnson–Cook's stress-state part ([`JohnsonCook`]),
//! the modified Mohr–Coulomb locus ([`ModifiedMohrCoulomb`]) and the Hosford–Coulomb locus
//! ([`HosfordCoulomb`]) — the [`FractureLocus`] trait through which callers evaluate any
//! of them, the closed [`Locus`] enum and [`ModelKind`] ids (`jc`, `mmc`, `hc`) used by the
//! fit and the command line, and two uncalibrated indicators (Rice–Tracey void growth,
//! normalised Cockcroft–Latham integrand).
//!
//! Every evaluation is total: where a model is undefined or gives a non-positive or
//! non-finite strain (e.g. beyond the cut-off in high compression) the result is `None`,
//! never a NaN. θ̄ must lie in [−1, 1] for the Lode-dependent models.

use std::f64::consts::PI;
use std::fmt;

use crate::LocusError;

/// A fracture locus: the equivalent plastic strain to fracture under a proportional
/// loading path at constant (η, θ̄).
pub trait FractureLocus {
    /// Model id: `"jc"`, `"mmc"` or `"hc"` for the models of this crate.
    fn id(&self) -> &'static str;

    /// Fracture strain ε_f(η, θ̄), or `None` where the model is undefined there or its
    /// value is not a finite positive number.
    fn fracture_strain(&self, eta: f64, theta_bar: f64) -> Option<f64>;

    /// The parameters by name, in the model's canonical order.
    fn parameters(&self) -> Vec<(&'static str, f64)>;

    /// Whether ε_f depends on θ̄. `false` lets a full-field pass skip computing θ̄; a model
    /// that answers `false` must return the same ε_f whatever θ̄ it is given, NaN included.
    fn uses_lode_angle(&self) -> bool {
        true
    }
}

/// Returns `Some(x)` when `x` is finite and positive.
fn positive(x: f64) -> Option<f64> {
    (x.is_finite() && x > 0.0).then_some(x)
}

fn lode_in_range(theta_bar: f64) -> bool {
    (-1.0..=1.0).contains(&theta_bar)
}

/// The three calibrated models, by id.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum ModelKind {
    /// Johnson–Cook stress-state part, id `jc`, parameters `D1, D2, D3`.
    JohnsonCook,
    /// Modified Mohr–Coulomb, id `mmc`, parameters `A, n, c1, c2, c_theta_s, c_theta_t, c_theta_c`.
    ModifiedMohrCoulomb,
    /// Hosford–Coulomb, id `hc`, parameters `a, b, c, n`.
    HosfordCoulomb,
}

impl ModelKind {
    /// All models, in id order jc, mmc, hc.
    pub const ALL: [ModelKind; 3] = [
        ModelKind::JohnsonCook,
        ModelKind::ModifiedMohrCoulomb,
        ModelKind::HosfordCoulomb,
    ];

    /// The model id: `"jc"`, `"mmc"` or `"hc"`.
    pub fn id(self) -> &'static str {
        match self {
            ModelKind::JohnsonCook => "jc",
            ModelKind::ModifiedMohrCoulomb => "mmc",
            ModelKind::HosfordCoulomb => "hc",
        }
    }

    /// The model from its id (exact, lower case).
    pub fn from_id(id: &str) -> Result<ModelKind, LocusError> {
        ModelKind::ALL
            .into_iter()
            .find(|k| k.id() == id)
            .ok_or_else(|| LocusError::UnknownModel(id.to_string()))
    }

    /// Parameter names in canonical order.
    pub fn parameter_names(self) -> &'static [&'static str] {
        match self {
            ModelKind::JohnsonCook => &JohnsonCook::NAMES,
            ModelKind::ModifiedMohrCoulomb => &ModifiedMohrCoulomb::NAMES,
            ModelKind::HosfordCoulomb => &HosfordCoulomb::NAMES,
        }
    }

    /// Human-readable model name with its source.
    pub fn title(self) -> &'static str {
        match self {
            ModelKind::JohnsonCook => "Johnson-Cook stress-state part (Johnson & Cook 1985)",
            ModelKind::ModifiedMohrCoulomb => "modified Mohr-Coulomb (Bai & Wierzbicki 2010)",
            ModelKind::HosfordCoulomb => "Hosford-Coulomb (Mohr & Marcadet 2015)",
        }
    }
}

impl fmt::Display for ModelKind {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.id())
    }
}

/// Reads `names` from a name→value list: every name once, no unknown names.
fn collect_values<I, S>(
    model: &'static str,
    names: &'static [&'static str],
    given: I,
) -> Result<Vec<f64>, LocusError>
where
    I: IntoIterator<Item = (S, f64)>,
    S: AsRef<str>,
{
    let mut values: Vec<Option<f64>> = vec![None; names.len()];
    for (name, value) in given {
        let name = name.as_ref();
        let Some(index) = names.iter().position(|n| *n == name) else {
            return Err(LocusError::UnknownParameter {
                model,
                name: name.to_string(),
                known: names.join(", "),
            });
        };
        if values[index].replace(value).is_some() {
            return Err(LocusError::DuplicateParameter {
                model,
                name: name.to_string(),
            });
        }
    }
    values
        .into_iter()
        .zip(names)
        .map(|(v, name)| v.ok_or(LocusError::MissingParameter { model, name }))
        .collect()
}

fn check(
    model: &'static str,
    name: &'static str,
    value: f64,
    ok: bool,
    requirement: &'static str,
) -> Result<(), LocusError> {
    if value.is_finite() && ok {
        Ok(())
    } else {
        Err(LocusError::OutOfDomain {
            model,
            name,
            value,
            requirement,
        })
    }
}

// ---------------------------------------------------------------------------------------
// Johnson–Cook
// ---------------------------------------------------------------------------------------

/// Johnson–Cook fracture strain, stress-state part (Johnson & Cook 1985, Eng. Fract.
/// Mech. 21:31–48): ε_f = D1 + D2 exp(D3 η), at the reference strain rate and room
/// temperature. Independent of θ̄.
///
/// Parameters `D1, D2, D3`, any finite values. `None` where D1 + D2 e^{D3 η} ≤ 0 or is
/// not finite. The rate and temperature factors are in
/// [`johnson_cook_rate_temperature_factor`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct JohnsonCook {
    d1: f64,
    d2: f64,
    d3: f64,
}

impl JohnsonCook {
    /// Parameter names in canonical order.
    pub const NAMES: [&'static str; 3] = ["D1", "D2", "D3"];

    /// Builds the model; every parameter must be finite.
    pub fn new(d1: f64, d2: f64, d3: f64) -> Result<Self, LocusError> {
        for (name, v) in Self::NAMES.into_iter().zip([d1, d2, d3]) {
            check("jc", name, v, true, "finite")?;
        }
        Ok(JohnsonCook { d1, d2, d3 })
    }

    /// D1.
    pub fn d1(&self) -> f64 {
        self.d1
    }
    /// D2.
    pub fn d2(&self) -> f64 {
        self.d2
    }
    /// D3.
    pub fn d3(&self) -> f64 {
        self.d3
    }

    /// ln ε_f and its gradient ∂ ln ε_f/∂(D1, D2, D3) written into `gradient[..3]`:
    /// (1, e^{D3 η}, D2 η e^{D3 η}) / ε_f. `None` where ε_f is undefined or `gradient`
    /// is shorter than 3.
    pub fn log_strain_gradient(&self, eta: f64, gradient: &mut [f64]) -> Option<f64> {
        let e = (self.d3 * eta).exp();
        let strain = positive(self.d1 + self.d2 * e)?;
        let g = gradient.get_mut(..3)?;
        g[0] = 1.0 / strain;
        g[1] = e / strain;
        g[2] = self.d2 * eta * e / strain;
        Some(strain.ln())
    }
}

impl FractureLocus for JohnsonCook {
    fn id(&self) -> &'static str {
        "jc"
    }

    fn fracture_strain(&self, eta: f64, _theta_bar: f64) -> Option<f64> {
        if !eta.is_finite() {
            return None;
        }
        positive(self.d1 + self.d2 * (self.d3 * eta).exp())
    }

    fn uses_lode_angle(&self) -> bool {
        false
    }

    fn parameters(&self) -> Vec<(&'static str, f64)> {
        Self::NAMES
            .into_iter()
            .zip([self.d1, self.d2, self.d3])
            .collect()
    }
}

/// Johnson–Cook strain-rate and temperature factor (Johnson & Cook 1985):
/// [1 + D4 ln ε̇*] [1 + D5 T*], with ε̇* = ε̇/ε̇₀ the strain-rate ratio to the reference
/// rate and T* = (T − T_room)/(T_melt − T_room) the homologous temperature. Multiply the
/// stress-state part by it. `None` when ε̇* ≤ 0, an input is not finite or the factor is
/// not positive. (The original form; variants that cap ε̇* below 1 exist — apply them
/// before calling if wanted.)
pub fn johnson_cook_rate_temperature_factor(
    d4: f64,
    d5: f64,
    strain_rate_ratio: f64,
    homologous_temperature: f64,
) -> Option<f64> {
    if positive(strain_rate_ratio).is_none() || !homologous_temperature.is_finite() {
        return None;
    }
    positive((1.0 + d4 * strain_rate_ratio.ln()) * (1.0 + d5 * homologous_temperature))
}

// ---------------------------------------------------------------------------------------
// Modified Mohr–Coulomb
// ---------------------------------------------------------------------------------------

/// √3/(2 − √3), the factor of the Lode bracket of the modified Mohr–Coulomb locus.
const MMC_K: f64 = 1.732_050_807_568_877_2 / (2.0 - 1.732_050_807_568_877_2);

/// Modified Mohr–Coulomb fracture locus (Bai & Wierzbicki 2010, Int. J. Fract. 161:1–20)
/// for power-law hardening σ = A ε^n:
///
/// ε_f = { (A/c2) · [c_θ^s + (√3/(2 − √3)) (c_θ^ax − c_θ^s) (sec(π θ̄/6) − 1)]
///         · [√((1 + c1²)/3) cos(π θ̄/6) + c1 (η + sin(π θ̄/6)/3)] }^(−1/n),
///
/// with c_θ^ax = c_θ^t for θ̄ ≥ 0 and c_θ^c for θ̄ < 0 ([`Self::first_bracket`] is the
/// first bracket). Parameters `A, n, c1, c2, c_theta_s, c_theta_t, c_theta_c`; A, n, c2
/// and the three c_θ must be > 0, c1 ≥ 0. `None` where the second bracket is ≤ 0 (the
/// cut-off in high compression) or θ̄ ∉ [−1, 1].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ModifiedMohrCoulomb {
    a: f64,
    n: f64,
    c1: f64,
    c2: f64,
    c_theta_s: f64,
    c_theta_t: f64,
    c_theta_c: f64,
}

impl ModifiedMohrCoulomb {
    /// Parameter names in canonical order.
    pub const NAMES: [&'static str; 7] =
        ["A", "n", "c1", "c2", "c_theta_s", "c_theta_t", "c_theta_c"];

    /// Builds the model, checking A, n, c2, c_theta_s, c_theta_t, c_theta_c > 0, c1 ≥ 0.
    pub fn new(
        a: f64,
        n: f64,
        c1: f64,
        c2: f64,
        c_theta_s: f64,
        c_theta_t: f64,
        c_theta_c: f64,
    ) -> Result<Self, LocusError> {
        let m = "mmc";
        check(m, "A", a, a > 0.0, "> 0")?;
        check(m, "n", n, n > 0.0, "> 0")?;
        check(m, "c1", c1, c1 >= 0.0, ">= 0")?;
        check(m, "c2", c2, c2 > 0.0, "> 0")?;
        check(m, "c_theta_s", c_theta_s, c_theta_s > 0.0, "> 0")?;
        check(m, "c_theta_t", c_theta_t, c_theta_t > 0.0, "> 0")?;
        check(m, "c_theta_c", c_theta_c, c_theta_c > 0.0, "> 0")?;
        Ok(ModifiedMohrCoulomb {
            a,
            n,
            c1,
            c2,
            c_theta_s,
            c_theta_t,
            c_theta_c,
        })
    }

    /// c_θ^ax: c_theta_t for θ̄ ≥ 0, c_theta_c for θ̄ < 0.
    pub fn c_theta_ax(&self, theta_bar: f64) -> f64 {
        if theta_bar >= 0.0 {
            self.c_theta_t
        } else {
            self.c_theta_c
        }
    }

    /// The first (Lode) bracket c_θ^s + (√3/(2 − √3))(c_θ^ax − c_θ^s)(sec(π θ̄/6) − 1)
    /// (Bai & Wierzbicki 2010). Equals c_theta_s at θ̄ = 0 and c_θ^ax at θ̄ = ±1. `None`
    /// for θ̄ ∉ [−1, 1].
    pub fn first_bracket(&self, theta_bar: f64) -> Option<f64> {
        mmc_first_bracket(theta_bar, self.c_theta_s, self.c_theta_ax(theta_bar))
    }

    /// The second (Mohr–Coulomb) bracket √((1 + c1²)/3) cos(π θ̄/6) + c1 (η + sin(π θ̄/6)/3),
    /// possibly ≤ 0. `None` for θ̄ ∉ [−1, 1] or non-finite η.
    pub fn second_bracket(&self, eta: f64, theta_bar: f64) -> Option<f64> {
        if !lode_in_range(theta_bar) || !eta.is_finite() {
            return None;
        }
        let phi = PI * theta_bar / 6.0;
        Some(
            ((1.0 + self.c1 * self.c1) / 3.0).sqrt() * phi.cos()
                + self.c1 * (eta + phi.sin() / 3.0),
        )
    }

    /// ln ε_f and ∂ ln ε_f/∂p for the 7 parameters in canonical order, written into
    /// `gradient[..7]`. With P = (A/c2)·B1·B2 and ln ε_f = −ln P / n:
    /// ∂/∂A = −1/(nA), ∂/∂n = ln P/n², ∂/∂c1 = −B2'/(n B2), ∂/∂c2 = 1/(n c2),
    /// ∂/∂c_s = −(1 − K)/(n B1), ∂/∂c_ax = −K/(n B1) with K = (√3/(2 − √3))(sec − 1).
    pub fn log_strain_gradient(
        &self,
        eta: f64,
        theta_bar: f64,
        gradient: &mut [f64],
    ) -> Option<f64> {
        if !lode_in_range(theta_bar) || !eta.is_finite() {
            return None;
        }
        let phi = PI * theta_bar / 6.0;
        let k = MMC_K * (1.0 / phi.cos() - 1.0);
        let c_ax = self.c_theta_ax(theta_bar);
        let b1 = self.c_theta_s + (c_ax - self.c_theta_s) * k;
        let root = ((1.0 + self.c1 * self.c1) / 3.0).sqrt();
        let tail = eta + phi.sin() / 3.0;
        let b2 = root * phi.cos() + self.c1 * tail;
        if positive(b1).is_none() || positive(b2).is_none() {
            return None;
        }
        let ln_p = (self.a / self.c2).ln() + b1.ln() + b2.ln();
        let ln_strain = -ln_p / self.n;
        positive(ln_strain.exp())?;
        let g = gradient.get_mut(..7)?;
        let inv_n = 1.0 / self.n;
        let db2_dc1 = self.c1 / (3.0 * (1.0 + self.c1 * self.c1)).sqrt() * phi.cos() + tail;
        g[0] = -inv_n / self.a;
        g[1] = ln_p * inv_n * inv_n;
        g[2] = -inv_n * db2_dc1 / b2;
        g[3] = inv_n / self.c2;
        g[4] = -inv_n * (1.0 - k) / b1;
        let d_ax = -inv_n * k / b1;
        if theta_bar >= 0.0 {
            g[5] = d_ax;
            g[6] = 0.0;
        } else {
            g[5] = 0.0;
            g[6] = d_ax;
        }
        Some(ln_strain)
    }
}

/// The first (Lode) bracket of the modified Mohr–Coulomb locus (Bai & Wierzbicki 2010):
/// c_s + (√3/(2 − √3)) (c_ax − c_s) (sec(π θ̄/6) − 1). `None` for θ̄ ∉ [−1, 1] or
/// non-finite inputs.
pub fn mmc_first_bracket(theta_bar: f64, c_theta_s: f64, c_theta_ax: f64) -> Option<f64> {
    if !lode_in_range(theta_bar) || !c_theta_s.is_finite() || !c_theta_ax.is_finite() {
        return None;
    }
    let sec = 1.0 / (PI * theta_bar / 6.0).cos();
    Some(c_theta_s + MMC_K * (c_theta_ax - c_theta_s) * (sec - 1.0))
}

impl FractureLocus for ModifiedMohrCoulomb {
    fn id(&self) -> &'static str {
        "mmc"
    }

    fn fracture_strain(&self, eta: f64, theta_bar: f64) -> Option<f64> {
        if !lode_in_range(theta_bar) || !eta.is_finite() {
            return None;
        }
        let (sin, cos) = (PI * theta_bar / 6.0).sin_cos();
        let c_s = self.c_theta_s;
        let b1 = c_s + MMC_K * (self.c_theta_ax(theta_bar) - c_s) * (1.0 / cos - 1.0);
        let b2 = ((1.0 + self.c1 * self.c1) / 3.0).sqrt() * cos + self.c1 * (eta + sin / 3.0);
        let p = self.a / self.c2 * b1 * b2;
        positive(p)?;
        positive((-p.ln() / self.n).exp())
    }

    fn parameters(&self) -> Vec<(&'static str, f64)> {
        Self::NAMES
            .into_iter()
            .zip([
                self.a,
                self.n,
                self.c1,
                self.c2,
                self.c_theta_s,
                self.c_theta_t,
                self.c_theta_c,
            ])
            .collect()
    }
}

// ---------------------------------------------------------------------------------------
// Hosford–Coulomb
// ---------------------------------------------------------------------------------------

/// Hosford–Coulomb fracture locus (Mohr & Marcadet 2015, Int. J. Solids Struct.
/// 67–68:40–55; formula as in the project's field notes, recalled from memory there):
///
/// ε_f = b (1 + c)^(1/n) { [((f1 − f2)^a + (f2 − f3)^a + (f1 − f3)^a)/2]^(1/a)
///                         + c (2η + f1 + f3) }^(−1/n),
///
/// f1 = (2/3) cos(π(1 − θ̄)/6), f2 = (2/3) cos(π(3 + θ̄)/6), f3 = −(2/3) cos(π(1 + θ̄)/6).
/// Parameters `a, b, c, n` with a ≥ 1, b > 0, c ≥ 0, n > 0. ε_f(1/3, +1) = ε_f(2/3, −1)
/// = b. `None` where the brace is ≤ 0 (cut-off in high compression) or θ̄ ∉ [−1, 1].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct HosfordCoulomb {
    a: f64,
    b: f64,
    c: f64,
    n: f64,
}

/// The Lode-dependent terms of the Hosford–Coulomb locus at θ̄.
struct HcTerms {
    /// f1 − f2, f2 − f3, f1 − f3, each ≥ 0.
    d: [f64; 3],
    /// f1 + f3.
    f13: f64,
}

fn hc_terms(theta_bar: f64) -> HcTerms {
    // With φ = π θ̄/6: cos(π(1 − θ̄)/6) = cos(π/6 − φ), cos(π(3 + θ̄)/6) = −sin φ,
    // cos(π(1 + θ̄)/6) = cos(π/6 + φ); one sin_cos gives all three.
    let (sin, cos) = (PI * theta_bar / 6.0).sin_cos();
    let (c6, s6) = (0.866_025_403_784_438_6, 0.5); // cos(π/6), sin(π/6)
    let f1 = 2.0 / 3.0 * (c6 * cos + s6 * sin);
    let f2 = -2.0 / 3.0 * sin;
    let f3 = -2.0 / 3.0 * (c6 * cos - s6 * sin);
    // The differences are ≥ 0 for θ̄ ∈ [−1, 1]; clamp round-off so powers stay real.
    HcTerms {
        d: [(f1 - f2).max(0.0), (f2 - f3).max(0.0), (f1 - f3).max(0.0)],
        f13: f1 + f3,
    }
}

impl HosfordCoulomb {
    /// Parameter names in canonical order.
    pub const NAMES: [&'static str; 4] = ["a", "b", "c", "n"];

    /// The exponent n used when none is given (Mohr & Marcadet 2015 use n = 0.1; common
    /// practice).
    pub const DEFAULT_N: f64 = 0.1;

    /// Builds the model, checking a ≥ 1, b > 0, c ≥ 0, n > 0.
    pub fn new(a: f64, b: f64, c: f64, n: f64) -> Result<Self, LocusError> {
        let m = "hc";
        check(m, "a", a, a >= 1.0, ">= 1")?;
        check(m, "b", b, b > 0.0, "> 0")?;
        check(m, "c", c, c >= 0.0, ">= 0")?;
        check(m, "n", n, n > 0.0, "> 0")?;
        Ok(HosfordCoulomb { a, b, c, n })
    }

    /// The Hosford equivalent stress of the unit-von-Mises deviator,
    /// [((f1 − f2)^a + (f2 − f3)^a + (f1 − f3)^a)/2]^(1/a) (1 in uniaxial tension).
    /// `None` for θ̄ ∉ [−1, 1].
    pub fn hosford_term(&self, theta_bar: f64) -> Option<f64> {
        if !lode_in_range(theta_bar) {
            return None;
        }
        Some(self.hosford_of(&hc_terms(theta_bar)))
    }

    fn hosford_of(&self, t: &HcTerms) -> f64 {
        let s: f64 = t.d.iter().map(|d| d.powf(self.a)).sum();
        (s / 2.0).powf(1.0 / self.a)
    }

    /// ln ε_f and ∂ ln ε_f/∂(a, b, c, n) written into `gradient[..4]`. With G the Hosford
    /// term, S = Σ dᵢ^a, H = 2η + f1 + f3 and Q = G + cH:
    /// ∂/∂a = −G'/(nQ), G' = G[−ln(S/2)/a² + Σ dᵢ^a ln dᵢ/(aS)]; ∂/∂b = 1/b;
    /// ∂/∂c = (1/(1 + c) − H/Q)/n; ∂/∂n = −(ln(1 + c) − ln Q)/n².
    pub fn log_strain_gradient(
        &self,
        eta: f64,
        theta_bar: f64,
        gradient: &mut [f64],
    ) -> Option<f64> {
        if !lode_in_range(theta_bar) || !eta.is_finite() {
            return None;
        }
        let t = hc_terms(theta_bar);
        let mut s = 0.0;
        let mut s_log = 0.0;
        for d in t.d {
            if d > 0.0 {
                let p = d.powf(self.a);
                s += p;
                s_log += p * d.ln();
            }
        }
        positive(s)?;
        let g_term = (s / 2.0).powf(1.0 / self.a);
        let h = 2.0 * eta + t.f13;
        let q = g_term + self.c * h;
        positive(q)?;
        let inv_n = 1.0 / self.n;
        let ln_strain = self.b.ln() + inv_n * (self.c.ln_1p() - q.ln());
        positive(ln_strain.exp())?;
        let g = gradient.get_mut(..4)?;
        let dg_da = g_term * (-(s / 2.0).ln() / (self.a * self.a) + s_log / (self.a * s));
        g[0] = -inv_n * dg_da / q;
        g[1] = 1.0 / self.b;
        g[2] = inv_n * (1.0 / (1.0 + self.c) - h / q);
        g[3] = -inv_n * inv_n * (self.c.ln_1p() - q.ln());
        Some(ln_strain)
    }
}

impl FractureLocus for HosfordCoulomb {
    fn id(&self) -> &'static str {
        "hc"
    }

    fn fracture_strain(&self, eta: f64, theta_bar: f64) -> Option<f64> {
        if !eta.is_finite() || !lode_in_range(theta_bar) {
            return None;
        }
        let t = hc_terms(theta_bar);
        let q = self.hosford_of(&t) + self.c * (2.0 * eta + t.f13);
        positive(q)?;
        positive(self.b * ((self.c.ln_1p() - q.ln()) / self.n).exp())
    }

    fn parameters(&self) -> Vec<(&'static str, f64)> {
        Self::NAMES
            .into_iter()
            .zip([self.a, self.b, self.c, self.n])
            .collect()
    }
}

// ---------------------------------------------------------------------------------------
// The closed set
// ---------------------------------------------------------------------------------------

/// Any of the calibrated models: what the fit produces and the command line evaluates.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Locus {
    /// Johnson–Cook stress-state part.
    JohnsonCook(JohnsonCook),
    /// Modified Mohr–Coulomb.
    ModifiedMohrCoulomb(ModifiedMohrCoulomb),
    /// Hosford–Coulomb.
    HosfordCoulomb(HosfordCoulomb),
}

impl Locus {
    /// Builds a model from a name→value list. Every parameter of the model must be given
    /// exactly once, except two with conventional values that default when absent: the
    /// Hosford–Coulomb `n` ([`HosfordCoulomb::DEFAULT_N`] = 0.1) and the modified
    /// Mohr–Coulomb `c_theta_t` (1, Bai & Wierzbicki 2010's usual choice). Unknown or
    /// repeated names are errors.
    ///
    /// ```
    /// use ductrace_locus::{FractureLocus, Locus, ModelKind};
    /// let jc = Locus::from_parameters(
    ///     ModelKind::JohnsonCook,
    ///     [("D1", 0.05), ("D2", 3.44), ("D3", -2.12)],
    /// ).unwrap();
    /// assert!((jc.fracture_strain(0.0, 0.0).unwrap() - 3.49).abs() < 1e-12);
    /// ```
    pub fn from_parameters<I, S>(kind: ModelKind, given: I) -> Result<Locus, LocusError>
    where
        I: IntoIterator<Item = (S, f64)>,
        S: AsRef<str>,
    {
        let mut given: Vec<(String, f64)> = given
            .into_iter()
            .map(|(s, v)| (s.as_ref().to_string(), v))
            .collect();
        let default = match kind {
            ModelKind::HosfordCoulomb => Some(("n", HosfordCoulomb::DEFAULT_N)),
            ModelKind::ModifiedMohrCoulomb => Some(("c_theta_t", 1.0)),
            ModelKind::JohnsonCook => None,
        };
        if let Some((name, value)) = default
            && !given.iter().any(|(s, _)| s == name)
        {
            given.push((name.to_string(), value));
        }
        let values = collect_values(kind.id(), kind.parameter_names(), given)?;
        Locus::from_values(kind, &values)
    }

    /// Builds a model from values in canonical order ([`ModelKind::parameter_names`]).
    pub fn from_values(kind: ModelKind, v: &[f64]) -> Result<Locus, LocusError> {
        let expected = kind.parameter_names().len();
        if v.len() != expected {
            return Err(LocusError::ValueCount {
                model: kind.id(),
                expected,
                given: v.len(),
            });
        }
        Ok(match kind {
            ModelKind::JohnsonCook => Locus::JohnsonCook(JohnsonCook::new(v[0], v[1], v[2])?),
            ModelKind::ModifiedMohrCoulomb => Locus::ModifiedMohrCoulomb(ModifiedMohrCoulomb::new(
                v[0], v[1], v[2], v[3], v[4], v[5], v[6],
            )?),
            ModelKind::HosfordCoulomb => {
                Locus::HosfordCoulomb(HosfordCoulomb::new(v[0], v[1], v[2], v[3])?)
            }
        })
    }

    /// The model kind.
    pub fn kind(&self) -> ModelKind {
        match self {
            Locus::JohnsonCook(_) => ModelKind::JohnsonCook,
            Locus::ModifiedMohrCoulomb(_) => ModelKind::ModifiedMohrCoulomb,
            Locus::HosfordCoulomb(_) => ModelKind::HosfordCoulomb,
        }
    }

    /// Parameter values in canonical order.
    pub fn values(&self) -> Vec<f64> {
        self.parameters().into_iter().map(|(_, v)| v).collect()
    }

    /// ln ε_f(η, θ̄) and its gradient with respect to the parameters in canonical order,
    /// written into `gradient[..k]` (k = number of parameters). `None` where ε_f is
    /// undefined or `gradient` is too short. See each model's `log_strain_gradient`.
    pub fn log_strain_gradient(
        &self,
        eta: f64,
        theta_bar: f64,
        gradient: &mut [f64],
    ) -> Option<f64> {
        match self {
            Locus::JohnsonCook(m) => {
                if !eta.is_finite() {
                    return None;
                }
                m.log_strain_gradient(eta, gradient)
            }
            Locus::ModifiedMohrCoulomb(m) => m.log_strain_gradient(eta, theta_bar, gradient),
            Locus::HosfordCoulomb(m) => m.log_strain_gradient(eta, theta_bar, gradient),
        }
    }
}

impl FractureLocus for Locus {
    fn id(&self) -> &'static str {
        self.kind().id()
    }

    #[inline]
    fn fracture_strain(&self, eta: f64, theta_bar: f64) -> Option<f64> {
        match self {
            Locus::JohnsonCook(m) => m.fracture_strain(eta, theta_bar),
            Locus::ModifiedMohrCoulomb(m) => m.fracture_strain(eta, theta_bar),
            Locus::HosfordCoulomb(m) => m.fracture_strain(eta, theta_bar),
        }
    }

    fn parameters(&self) -> Vec<(&'static str, f64)> {
        match self {
            Locus::JohnsonCook(m) => m.parameters(),
            Locus::ModifiedMohrCoulomb(m) => m.parameters(),
            Locus::HosfordCoulomb(m) => m.parameters(),
        }
    }

    fn uses_lode_angle(&self) -> bool {
        match self {
            Locus::JohnsonCook(m) => m.uses_lode_angle(),
            Locus::ModifiedMohrCoulomb(m) => m.uses_lode_angle(),
            Locus::HosfordCoulomb(m) => m.uses_lode_angle(),
        }
    }
}

impl<L: FractureLocus + ?Sized> FractureLocus for &L {
    fn id(&self) -> &'static str {
        (**self).id()
    }
    fn fracture_strain(&self, eta: f64, theta_bar: f64) -> Option<f64> {
        (**self).fracture_strain(eta, theta_bar)
    }
    fn parameters(&self) -> Vec<(&'static str, f64)> {
        (**self).parameters()
    }
    fn uses_lode_angle(&self) -> bool {
        (**self).uses_lode_angle()
    }
}

// ---------------------------------------------------------------------------------------
// Uncalibrated indicators
// ---------------------------------------------------------------------------------------

/// Rice–Tracey void growth rate (Rice & Tracey 1969, J. Mech. Phys. Solids 17:201–217):
/// d ln(R/R₀)/dε̄p = 0.283 exp(1.5 η). Integrate over ε̄p for the void radius ratio.
/// `None` for non-finite η.
pub fn rice_tracey_growth_rate(eta: f64) -> Option<f64> {
    eta.is_finite()
        .then(|| 0.283 * (1.5 * eta).exp())
        .filter(|v| v.is_finite())
}

/// Normalised Cockcroft–Latham integrand (Cockcroft & Latham 1968, J. Inst. Metals
/// 96:33–39): max(σ1, 0)/σ_vm = max(η + (2/3) cos(π(1 − θ̄)/6), 0); 1 in uniaxial
/// tension, 1/√3 in pure shear. Integrate over ε̄p. `None` for θ̄ ∉ [−1, 1] or
/// non-finite η.
pub fn cockcroft_latham_integrand(eta: f64, theta_bar: f64) -> Option<f64> {
    if !eta.is_finite() || !lode_in_range(theta_bar) {
        return None;
    }
    Some((eta + 2.0 / 3.0 * (PI * (1.0 - theta_bar) / 6.0).cos()).max(0.0))
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn cockcroft_latham_reference_states() {
        // Field notes §4 (Cockcroft & Latham 1968, normalised form): 1 in uniaxial
        // tension (η = 1/3, θ̄ = 1), 1/√3 in shear (η = 0, θ̄ = 0).
        let t = cockcroft_latham_integrand(1.0 / 3.0, 1.0).unwrap();
        assert_relative_eq!(t, 1.0, epsilon = 1e-14);
        let s = cockcroft_latham_integrand(0.0, 0.0).unwrap();
        assert_relative_eq!(s, 1.0 / 3f64.sqrt(), epsilon = 1e-14);
        assert_eq!(cockcroft_latham_integrand(0.0, 1.5), None);
    }

    #[test]
    fn rice_tracey_rate() {
        // Rice & Tracey 1969: 0.283 exp(1.5 η); at η = 1/3 this is 0.283 e^0.5.
        let r = rice_tracey_growth_rate(1.0 / 3.0).unwrap();
        assert_relative_eq!(r, 0.283 * 0.5f64.exp(), epsilon = 1e-14);
        assert_eq!(rice_tracey_growth_rate(f64::NAN), None);
    }

    #[test]
    fn names_are_checked() {
        let e =
            Locus::from_parameters(ModelKind::JohnsonCook, [("D1", 0.1), ("D2", 1.0)]).unwrap_err();
        assert!(e.to_string().contains("D3"), "{e}");
        let e = Locus::from_parameters(
            ModelKind::JohnsonCook,
            [("D1", 0.1), ("D2", 1.0), ("D3", 1.0), ("D4", 0.0)],
        )
        .unwrap_err();
        assert!(e.to_string().contains("D4"), "{e}");
        let e = Locus::from_parameters(
            ModelKind::HosfordCoulomb,
            [("a", 0.5), ("b", 1.0), ("c", 0.1)],
        )
        .unwrap_err();
        assert!(
            matches!(e, LocusError::OutOfDomain { name: "a", .. }),
            "{e}"
        );
        let e = Locus::from_parameters(
            ModelKind::HosfordCoulomb,
            [("a", 1.5), ("b", 1.0), ("b", 1.0), ("c", 0.1)],
        )
        .unwrap_err();
        assert!(matches!(e, LocusError::DuplicateParameter { .. }), "{e}");
        assert!(ModelKind::from_id("gtn").is_err());
        for k in ModelKind::ALL {
            assert_eq!(ModelKind::from_id(k.id()).unwrap(), k);
        }
    }

    #[test]
    fn hc_default_n() {
        let hc = Locus::from_parameters(
            ModelKind::HosfordCoulomb,
            [("a", 1.5), ("b", 0.8), ("c", 0.1)],
        )
        .unwrap();
        assert_eq!(hc.parameters()[3], ("n", 0.1));
    }

    #[test]
    fn undefined_is_none_not_nan() {
        let jc = JohnsonCook::new(-2.2, 5.43, -0.47).unwrap();
        // D1 + D2 e^{D3 η} ≤ 0 for large η.
        assert_eq!(jc.fracture_strain(10.0, 0.0), None);
        let hc = HosfordCoulomb::new(1.5, 0.8, 0.2, 0.1).unwrap();
        assert_eq!(hc.fracture_strain(-5.0, 0.0), None);
        assert_eq!(hc.fracture_strain(0.3, 1.2), None);
        let mmc = ModifiedMohrCoulomb::new(800.0, 0.15, 0.1, 400.0, 0.95, 1.0, 1.1).unwrap();
        assert_eq!(mmc.fracture_strain(-20.0, 0.0), None);
        assert_eq!(mmc.fracture_strain(0.3, -1.01), None);
        assert_eq!(mmc.fracture_strain(f64::NAN, 0.0), None);
    }

    fn gradient_check(locus: &Locus, eta: f64, theta_bar: f64) {
        let k = locus.values().len();
        let mut g = vec![0.0; k];
        let ln0 = locus.log_strain_gradient(eta, theta_bar, &mut g).unwrap();
        assert_relative_eq!(
            ln0,
            locus.fracture_strain(eta, theta_bar).unwrap().ln(),
            epsilon = 1e-12
        );
        let v = locus.values();
        for j in 0..k {
            let h = 1e-6 * v[j].abs().max(1e-3);
            let mut up = v.clone();
            up[j] += h;
            let mut dn = v.clone();
            dn[j] -= h;
            let fu = Locus::from_values(locus.kind(), &up)
                .unwrap()
                .fracture_strain(eta, theta_bar)
                .unwrap()
                .ln();
            let fd = Locus::from_values(locus.kind(), &dn)
                .unwrap()
                .fracture_strain(eta, theta_bar)
                .unwrap()
                .ln();
            let num = (fu - fd) / (2.0 * h);
            assert!(
                (num - g[j]).abs() <= 1e-6 * (1.0 + num.abs()),
                "{} parameter {j} at ({eta}, {theta_bar}): analytic {} numeric {num}",
                locus.id(),
                g[j]
            );
        }
    }

    #[test]
    fn analytic_gradients_match_central_differences() {
        let models = [
            Locus::JohnsonCook(JohnsonCook::new(0.05, 3.44, -2.12).unwrap()),
            Locus::ModifiedMohrCoulomb(
                ModifiedMohrCoulomb::new(800.0, 0.15, 0.1, 400.0, 0.95, 1.05, 1.1).unwrap(),
            ),
            Locus::HosfordCoulomb(HosfordCoulomb::new(1.6, 0.9, 0.05, 0.12).unwrap()),
        ];
        for m in &models {
            for (eta, th) in [
                (0.0, 0.0),
                (0.4, 0.7),
                (0.6, -0.5),
                (0.9, -0.95),
                (0.2, 0.3),
            ] {
                gradient_check(m, eta, th);
            }
        }
    }
}
