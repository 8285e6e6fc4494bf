//! The state plane: every specimen's path in the (η, θ̄) plane over the plane-stress curve
//! and the standard stress states, each specimen's average point marked.

use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

use crate::PlotError;
use crate::chart::{Chart, Extent, Figure, axes, checked_opt, no_data, runs};
use crate::path::PathData;
use crate::style::{
    INK, LegendEntry, MUTED, Marker, Stroke, TextMode, colour, draw_legend, draw_line, draw_marker,
    font, marker, page, text,
};

/// Title of the state-plane chart.
pub const TITLE: &str = "Stress-state paths in the (η, θ̄) plane";

/// One specimen's path in the state plane.
#[derive(Debug, Clone, PartialEq)]
pub struct NamedPath {
    /// Specimen name (legend).
    pub name: String,
    /// Triaxiality η per increment (dimensionless); `None` where undefined (gap).
    pub triaxiality: Vec<Option<f64>>,
    /// Lode angle parameter θ̄ per increment, in [−1, 1]; `None` where undefined (gap).
    /// Paired with `triaxiality` by index; a point needs both.
    pub lode_angle_param: Vec<Option<f64>>,
    /// η_avg (average marker; drawn when both averages are defined).
    pub triaxiality_avg: Option<f64>,
    /// θ̄_avg (average marker; drawn when both averages are defined).
    pub lode_angle_param_avg: Option<f64>,
}

impl From<&PathData> for NamedPath {
    fn from(p: &PathData) -> Self {
        Self {
            name: p.name.clone(),
            triaxiality: p.triaxiality.clone(),
            lode_angle_param: p.lode_angle_param.clone(),
            triaxiality_avg: p.triaxiality_avg,
            lode_angle_param_avg: p.lode_angle_param_avg,
        }
    }
}

/// A standard stress state: name, η, θ̄ (textbook values, e.g. Bai & Wierzbicki 2008).
pub const STANDARD_STATES: [(&str, f64, f64); 5] = [
    ("uniaxial tension", 1.0 / 3.0, 1.0),
    ("pure shear", 0.0, 0.0),
    ("plane-strain tension", 0.577_350_269_189_625_8, 0.0),
    ("equibiaxial tension", 2.0 / 3.0, -1.0),
    ("uniaxial compression", -1.0 / 3.0, -1.0),
];

/// θ̄ on the plane-stress curve (σ3 = 0) at triaxiality `eta`, for |η| ≤ 2/3:
/// ξ = −(27/2) η (η² − 1/3), θ̄ = 1 − (2/π) arccos ξ (Bai & Wierzbicki 2008, Int. J.
/// Plasticity 24:1071–1096). ξ is clamped to [−1, 1] against round-off; `None` outside
/// |η| ≤ 2/3 or for non-finite η.
pub fn plane_stress_lode_angle_param(eta: f64) -> Option<f64> {
    if !eta.is_finite() || eta.abs() > 2.0 / 3.0 + 1e-12 {
        return None;
    }
    let xi = (-13.5 * eta * (eta * eta - 1.0 / 3.0)).clamp(-1.0, 1.0);
    Some(1.0 - 2.0 / std::f64::consts::PI * xi.acos())
}

/// The state-plane chart of all specimens: each path (η horizontal, θ̄ vertical) in its own
/// colour, its average point (η_avg, θ̄_avg) with its own marker, over the plane-stress
/// curve and the five standard states.
///
/// Errors: a non-finite or out-of-range value, series of unequal length. No specimens or
/// no defined points give a chart with a "no data" note.
pub fn state_plane_chart(paths: &[NamedPath]) -> Result<Chart, PlotError> {
    Chart::new(Figure::Plane(paths.to_vec()))
}

pub(crate) fn validate(paths: &[NamedPath]) -> Result<(), PlotError> {
    for p in paths {
        let name = |f: &str| format!("path \"{}\": {f}", p.name);
        if p.lode_angle_param.len() != p.triaxiality.len() {
            return Err(PlotError::LengthMismatch {
                what: name("lode_angle_param"),
                expected: p.triaxiality.len(),
                found: p.lode_angle_param.len(),
            });
        }
        for (i, &v) in p.triaxiality.iter().enumerate() {
            checked_opt(&name("triaxiality"), Some(i), v)?;
        }
        for (i, &v) in p.lode_angle_param.iter().enumerate() {
            checked_opt(&name("lode_angle_param"), Some(i), v)?;
        }
        checked_opt(&name("triaxiality_avg"), None, p.triaxiality_avg)?;
        checked_opt(&name("lode_angle_param_avg"), None, p.lode_angle_param_avg)?;
    }
    Ok(())
}

fn points(p: &NamedPath) -> Vec<Option<(f64, f64)>> {
    p.triaxiality
        .iter()
        .zip(&p.lode_angle_param)
        .map(|(e, l)| e.zip(*l))
        .collect()
}

pub(crate) fn draw<DB: DrawingBackend>(
    paths: &[NamedPath],
    root: &DrawingArea<DB, Shift>,
    mode: TextMode,
) -> Result<(), PlotError> {
    let pg = page(root, TITLE, mode)?;
    let s = pg.scale;
    let all: Vec<Vec<Option<(f64, f64)>>> = paths.iter().map(points).collect();
    let mut xe = Extent::new();
    let mut ye = Extent::new();
    // Room for the standard states and their labels.
    for v in [-0.8, 1.0] {
        xe.add(v);
    }
    for v in [-1.0, 1.0] {
        ye.add(v);
    }
    for (x, y) in all.iter().flatten().flatten() {
        xe.add(*x);
        ye.add(*y);
    }
    for p in paths {
        p.triaxiality_avg.into_iter().for_each(|v| xe.add(v));
        p.lode_angle_param_avg.into_iter().for_each(|v| ye.add(v));
    }
    let (x0, x1) = xe.padded(0.03, (-0.8, 1.0));
    let (y0, y1) = ye.padded(0.1, (-1.2, 1.2));
    let chart = axes(
        &pg,
        (x0, x1),
        (y0, y1),
        "η (triaxiality)",
        "θ̄ (Lode angle parameter)",
    )?;
    let area = chart.plotting_area();

    // Plane-stress curve, sampled densely: it is steep where ξ = ±1.
    let n = 1200;
    let curve: Vec<(f64, f64)> = (0..=n)
        .filter_map(|k| {
            let eta = -2.0 / 3.0 + 4.0 / 3.0 * k as f64 / n as f64;
            plane_stress_lode_angle_param(eta).map(|l| (eta, l))
        })
        .collect();
    draw_line(
        area,
        &curve,
        Stroke::Dashed,
        MUTED.stroke_width((1.6 * s).max(1.0) as u32),
        s,
    )?;

    let mut legend = Vec::new();
    let mut any = false;
    for (i, (p, pts)) in paths.iter().zip(&all).enumerate() {
        let c = colour(i);
        for run in runs(pts.iter().copied()) {
            any = true;
            if run.len() == 1 {
                draw_marker(area, run[0], Marker::Circle, 2.0 * s, Some(c), c)?;
            }
            draw_line(
                area,
                &run,
                Stroke::Solid,
                c.stroke_width((2.2 * s).max(1.0) as u32),
                s,
            )?;
        }
        let avg = p.triaxiality_avg.zip(p.lode_angle_param_avg);
        if let Some(a) = avg {
            any = true;
            draw_marker(area, a, marker(i), 6.5 * s, Some(c), INK)?;
        }
        let entry = LegendEntry::line(p.name.clone(), c, Stroke::Solid);
        legend.push(if avg.is_some() {
            entry.with_marker(marker(i), Some(c))
        } else {
            entry
        });
    }

    // Standard states on top, labelled beside the marker where the label has room.
    for (name, eta, lode) in STANDARD_STATES {
        if eta < x0 || eta > x1 {
            continue;
        }
        draw_marker(area, (eta, lode), Marker::Circle, 4.5 * s, None, INK)?;
        let (h, v, dx, dy) = match name {
            "uniaxial tension" => (HPos::Right, VPos::Bottom, -8, -4),
            "pure shear" => (HPos::Right, VPos::Bottom, -6, -6),
            "plane-strain tension" => (HPos::Left, VPos::Top, 6, 6),
            "equibiaxial tension" => (HPos::Right, VPos::Bottom, -8, -4),
            _ => (HPos::Left, VPos::Bottom, 6, -6),
        };
        let d = |v: i32| (f64::from(v) * s) as i32;
        let (px, py) = area.map_coordinate(&(eta, lode));
        text(
            &area.use_screen_coord(),
            pg.mode,
            name,
            &font(14.0 * s, INK),
            (h, v),
            (px + d(dx), py + d(dy)),
        )?;
    }
    legend.push(LegendEntry::line(
        "plane stress (σ3 = 0)",
        MUTED,
        Stroke::Dashed,
    ));
    legend.push(LegendEntry {
        label: "standard state".into(),
        colour: INK,
        stroke: None,
        marker: Some((Marker::Circle, None)),
    });
    legend.push(LegendEntry {
        label: "large marker: average".into(),
        colour: INK,
        stroke: None,
        marker: Some((Marker::Diamond, Some(MUTED))),
    });
    if !any {
        no_data(&chart, "no specimen paths to plot", &pg)?;
    }
    draw_legend(&pg, &legend)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// θ̄ from principal stresses through the invariants (definitions in Bai & Wierzbicki
    /// 2008): s = σ − σ_h, J2 = s:s/2, J3 = det s, ξ = (27/2) J3/σ_vm³, θ̄ = 1 − (2/π) arccos ξ.
    fn from_stresses(s1: f64, s2: f64, s3: f64) -> (f64, f64) {
        let h = (s1 + s2 + s3) / 3.0;
        let (a, b, c) = (s1 - h, s2 - h, s3 - h);
        let j2 = (a * a + b * b + c * c) / 2.0;
        let j3 = a * b * c;
        let vm = (3.0 * j2).sqrt();
        let xi = (13.5 * j3 / vm.powi(3)).clamp(-1.0, 1.0);
        (h / vm, 1.0 - 2.0 / std::f64::consts::PI * xi.acos())
    }

    #[test]
    fn standard_states_lie_on_the_plane_stress_curve() {
        // Table of textbook values (common practice; Bai & Wierzbicki 2008).
        for (name, eta, lode) in STANDARD_STATES {
            let got = plane_stress_lode_angle_param(eta).unwrap();
            assert!((got - lode).abs() < 1e-6, "{name}: {got} vs {lode}");
        }
    }

    #[test]
    fn curve_matches_invariants_of_plane_stress_states() {
        // σ3 = 0, σ1 = cos φ, σ2 = sin φ sweeps every plane-stress state.
        for k in 0..360 {
            let phi = (k as f64 + 0.5).to_radians();
            let (eta, lode) = from_stresses(phi.cos(), phi.sin(), 0.0);
            let got = plane_stress_lode_angle_param(eta).unwrap();
            assert!(
                (got - lode).abs() < 1e-6,
                "φ = {k}°: η {eta}, {got} vs {lode}"
            );
        }
    }

    #[test]
    fn outside_the_plane_stress_range_is_undefined() {
        assert_eq!(plane_stress_lode_angle_param(0.7), None);
        assert_eq!(plane_stress_lode_angle_param(f64::NAN), None);
    }
}
