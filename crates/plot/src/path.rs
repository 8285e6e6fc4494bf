//! The path chart of one specimen: triaxiality η and Lode angle parameter θ̄ against the
//! equivalent plastic strain ε̄p at the critical point, with their averages and the stop.

use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

use crate::chart::{Chart, Extent, Figure, axes, checked, checked_opt, no_data, runs};
use crate::style::{
    INK, LegendEntry, Marker, Stroke, TextMode, colour, draw_legend, draw_line, draw_marker, font,
    page, text,
};
use crate::{PlotError, format};

/// The history of one specimen at its critical point, one entry per output increment.
#[derive(Debug, Clone, PartialEq)]
pub struct PathData {
    /// Specimen name; the chart title.
    pub name: String,
    /// Equivalent plastic strain ε̄p per increment (dimensionless).
    pub eqps: Vec<f64>,
    /// Triaxiality η = σ_h/σ_vm per increment (dimensionless); `None` where undefined
    /// (σ_vm = 0), drawn as a gap. Same length as `eqps`.
    pub triaxiality: Vec<Option<f64>>,
    /// Lode angle parameter θ̄ = 1 − (2/π) arccos ξ per increment, in [−1, 1]; `None` where
    /// undefined, drawn as a gap. Same length as `eqps`.
    pub lode_angle_param: Vec<Option<f64>>,
    /// η_avg, the ε̄p-weighted average up to the stop (dashed line); `None`: not drawn.
    pub triaxiality_avg: Option<f64>,
    /// θ̄_avg, the ε̄p-weighted average up to the stop (dashed line); `None`: not drawn.
    pub lode_angle_param_avg: Option<f64>,
    /// ε̄p at the stop, the fracture strain ε_f (vertical line).
    pub eqps_f: f64,
}

/// The path chart of one specimen: η and θ̄ against ε̄p, dashed lines at η_avg and θ̄_avg,
/// a vertical line at ε_f; titled with the specimen name.
///
/// Errors: a non-finite or out-of-range value ([`PlotError::NonFinite`],
/// [`PlotError::OutOfRange`]), series of unequal length ([`PlotError::LengthMismatch`]).
/// A path without any defined point gives a chart with a "no data" note.
pub fn path_chart(data: &PathData) -> Result<Chart, PlotError> {
    Chart::new(Figure::Path(data.clone()))
}

pub(crate) fn validate(d: &PathData) -> Result<(), PlotError> {
    let n = d.eqps.len();
    for (what, len) in [
        ("triaxiality", d.triaxiality.len()),
        ("lode_angle_param", d.lode_angle_param.len()),
    ] {
        if len != n {
            return Err(PlotError::LengthMismatch {
                what: format!("path \"{}\": {what}", d.name),
                expected: n,
                found: len,
            });
        }
    }
    let name = |f: &str| format!("path \"{}\": {f}", d.name);
    for (i, &v) in d.eqps.iter().enumerate() {
        checked(&name("eqps"), Some(i), v)?;
    }
    for (i, &v) in d.triaxiality.iter().enumerate() {
        checked_opt(&name("triaxiality"), Some(i), v)?;
    }
    for (i, &v) in d.lode_angle_param.iter().enumerate() {
        checked_opt(&name("lode_angle_param"), Some(i), v)?;
    }
    checked_opt(&name("triaxiality_avg"), None, d.triaxiality_avg)?;
    checked_opt(&name("lode_angle_param_avg"), None, d.lode_angle_param_avg)?;
    checked(&name("eqps_f"), None, d.eqps_f)?;
    Ok(())
}

pub(crate) fn draw<DB: DrawingBackend>(
    d: &PathData,
    root: &DrawingArea<DB, Shift>,
    mode: TextMode,
) -> Result<(), PlotError> {
    let pg = page(root, &d.name, mode)?;
    let s = pg.scale;
    let eta: Vec<Option<(f64, f64)>> = d
        .eqps
        .iter()
        .zip(&d.triaxiality)
        .map(|(&e, v)| v.map(|v| (e, v)))
        .collect();
    let lode: Vec<Option<(f64, f64)>> = d
        .eqps
        .iter()
        .zip(&d.lode_angle_param)
        .map(|(&e, v)| v.map(|v| (e, v)))
        .collect();
    let has_data = eta.iter().chain(&lode).any(Option::is_some);

    let mut xe = Extent::new();
    xe.add(0.0);
    d.eqps.iter().for_each(|&v| xe.add(v));
    xe.add(d.eqps_f);
    let (x0, x1) = xe.padded(0.0, (0.0, 1.0));
    let x1 = x1 + 0.04 * (x1 - x0).max(1e-9);
    let mut ye = Extent::new();
    // The common range of the two measures (brief: θ̄ ∈ [−1, 1], η of interest up to 1.5).
    ye.add(-1.0);
    ye.add(1.5);
    for p in eta.iter().chain(&lode).flatten() {
        ye.add(p.1);
    }
    d.triaxiality_avg
        .into_iter()
        .chain(d.lode_angle_param_avg)
        .for_each(|v| ye.add(v));
    let (y0, y1) = ye.padded(0.04, (-1.0, 1.5));

    let chart = axes(
        &pg,
        (x0, x1),
        (y0, y1),
        "ε̄p (equivalent plastic strain)",
        "η (triaxiality), θ̄ (Lode angle parameter)",
    )?;
    let area = chart.plotting_area();
    let w = (2.4 * s).max(1.0) as u32;
    let (c_eta, c_lode) = (colour(0), colour(1));
    let mut legend = Vec::new();

    // The stop first, so the series are drawn over it.
    draw_line(
        area,
        &[(d.eqps_f, y0), (d.eqps_f, y1)],
        Stroke::Solid,
        INK.stroke_width((1.5 * s).max(1.0) as u32),
        s,
    )?;
    // The label hangs beside the line at the top, on the side with more room.
    let left_side = d.eqps_f - x0 > 0.3 * (x1 - x0);
    let (h, dx) = if left_side {
        (HPos::Right, -(5.0 * s) as i32)
    } else {
        (HPos::Left, (5.0 * s) as i32)
    };
    let (px, py) = area.map_coordinate(&(d.eqps_f, y1));
    text(
        &area.use_screen_coord(),
        pg.mode,
        &format!("ε_f = {}", format::significant(d.eqps_f, 3)),
        &font(15.0 * s, INK),
        (h, VPos::Top),
        (px + dx, py + (5.0 * s) as i32),
    )?;

    if let Some(a) = d.triaxiality_avg {
        draw_line(
            area,
            &[(x0, a), (x1, a)],
            Stroke::Dashed,
            c_eta.stroke_width(w.max(2) - 1),
            s,
        )?;
    }
    if let Some(a) = d.lode_angle_param_avg {
        draw_line(
            area,
            &[(x0, a), (x1, a)],
            Stroke::Dashed,
            c_lode.stroke_width(w.max(2) - 1),
            s,
        )?;
    }
    let marks = d.eqps.len() <= 80;
    for (series, c, shape) in [
        (&eta, c_eta, Marker::Circle),
        (&lode, c_lode, Marker::Square),
    ] {
        for run in runs(series.iter().copied()) {
            draw_line(area, &run, Stroke::Solid, c.stroke_width(w), s)?;
            if marks {
                for p in &run {
                    draw_marker(area, *p, shape, 2.6 * s, Some(c), c)?;
                }
            }
        }
    }
    legend.push(
        LegendEntry::line("η (triaxiality)", c_eta, Stroke::Solid)
            .with_marker(Marker::Circle, Some(c_eta)),
    );
    legend.push(
        LegendEntry::line("θ̄ (Lode angle parameter)", c_lode, Stroke::Solid)
            .with_marker(Marker::Square, Some(c_lode)),
    );
    if let Some(a) = d.triaxiality_avg {
        legend.push(LegendEntry::line(
            format!("η_avg = {}", format::significant(a, 3)),
            c_eta,
            Stroke::Dashed,
        ));
    }
    if let Some(a) = d.lode_angle_param_avg {
        legend.push(LegendEntry::line(
            format!("θ̄_avg = {}", format::significant(a, 3)),
            c_lode,
            Stroke::Dashed,
        ));
    }
    legend.push(LegendEntry::line(
        format!("stop: ε_f = {}", format::significant(d.eqps_f, 3)),
        INK,
        Stroke::Solid,
    ));
    if !has_data {
        no_data(&chart, "no defined η or θ̄ values to plot", &pg)?;
    }
    draw_legend(&pg, &legend)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn sample() -> PathData {
        PathData {
            name: "bar R4 (invented)".into(),
            eqps: vec![0.0, 0.1, 0.2, 0.3],
            triaxiality: vec![None, Some(0.6), Some(0.7), Some(0.75)],
            lode_angle_param: vec![None, Some(1.0), Some(0.98), Some(0.97)],
            triaxiality_avg: Some(0.68),
            lode_angle_param_avg: Some(0.98),
            eqps_f: 0.3,
        }
    }

    #[test]
    fn lengths_must_match() {
        let mut d = sample();
        d.triaxiality.pop();
        assert!(matches!(
            path_chart(&d),
            Err(PlotError::LengthMismatch {
                expected: 4,
                found: 3,
                ..
            })
        ));
    }

    #[test]
    fn nan_names_the_series_and_index() {
        let mut d = sample();
        d.eqps[2] = f64::NAN;
        let e = path_chart(&d).unwrap_err();
        assert!(e.to_string().contains("eqps at index 2"), "{e}");
    }
}
