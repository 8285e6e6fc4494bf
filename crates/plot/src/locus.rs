//! The fracture-locus chart: fracture strain ε_f against triaxiality η, model curves and
//! calibration points with optional error bars.

use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

use crate::PlotError;
use crate::chart::{Chart, Extent, Figure, axes, checked, clip_y, no_data};
use crate::error::OrDraw;
use crate::style::{
    INK, LegendEntry, MUTED, Stroke, TextMode, colour, draw_legend, draw_line, draw_marker, font,
    marker, page, stroke, text,
};

/// One model curve: ε_f against η along a fixed condition (e.g. θ̄ = 0).
#[derive(Debug, Clone, PartialEq)]
pub struct LocusCurve {
    /// Legend label, e.g. `θ̄ = −1` or `Johnson–Cook`.
    pub label: String,
    /// Points (η, ε_f), η dimensionless, ε_f the equivalent plastic strain at fracture
    /// (dimensionless), in drawing order. Points above the chart's top are clipped.
    pub points: Vec<(f64, f64)>,
}

/// One calibration point (a specimen).
#[derive(Debug, Clone, PartialEq)]
pub struct LocusPoint {
    /// Label written beside the marker (the specimen name).
    pub label: String,
    /// η_avg (dimensionless).
    pub triaxiality: f64,
    /// ε_f (dimensionless).
    pub eqps_f: f64,
    /// Horizontal error bar (η low, η high), e.g. the η range over the last part of the path.
    pub triaxiality_band: Option<(f64, f64)>,
    /// Vertical error bar (ε_f low, ε_f high), e.g. the scatter of repeated tests.
    pub eqps_f_band: Option<(f64, f64)>,
}

/// The data of a fracture-locus chart.
#[derive(Debug, Clone, PartialEq)]
pub struct LocusChartData {
    /// Chart title, e.g. `Fracture locus: modified Mohr–Coulomb`.
    pub title: String,
    /// Model curves (may be empty).
    pub curves: Vec<LocusCurve>,
    /// Calibration points (may be empty).
    pub points: Vec<LocusPoint>,
}

/// The fracture-locus chart: ε_f against η with the model curves, the calibration points
/// (labelled) and their error bars; the ε_f axis starts at 0.
///
/// The top of the chart holds every point and error bar and the curves up to twice the
/// largest calibration value (curves above are clipped), so a steep branch does not flatten
/// the data. Errors: non-finite or out-of-range values. No curve and no point give a chart
/// with a "no data" note.
pub fn locus_chart(data: &LocusChartData) -> Result<Chart, PlotError> {
    Chart::new(Figure::Locus(data.clone()))
}

pub(crate) fn validate(d: &LocusChartData) -> Result<(), PlotError> {
    for c in &d.curves {
        let what = format!("locus curve \"{}\"", c.label);
        for (i, &(x, y)) in c.points.iter().enumerate() {
            checked(&format!("{what}: η"), Some(i), x)?;
            checked(&format!("{what}: ε_f"), Some(i), y)?;
        }
    }
    for p in &d.points {
        let what = format!("calibration point \"{}\"", p.label);
        checked(&format!("{what}: η"), None, p.triaxiality)?;
        checked(&format!("{what}: ε_f"), None, p.eqps_f)?;
        for (name, band) in [("η band", p.triaxiality_band), ("ε_f band", p.eqps_f_band)] {
            if let Some((lo, hi)) = band {
                checked(&format!("{what}: {name} low"), None, lo)?;
                checked(&format!("{what}: {name} high"), None, hi)?;
            }
        }
    }
    Ok(())
}

pub(crate) fn draw<DB: DrawingBackend>(
    d: &LocusChartData,
    root: &DrawingArea<DB, Shift>,
    mode: TextMode,
) -> Result<(), PlotError> {
    let pg = page(root, &d.title, mode)?;
    let s = pg.scale;
    let mut xe = Extent::new();
    let mut pe = Extent::new();
    let mut ce = Extent::new();
    for c in &d.curves {
        for &(x, y) in &c.points {
            xe.add(x);
            ce.add(y);
        }
    }
    for p in &d.points {
        xe.add(p.triaxiality);
        pe.add(p.eqps_f);
        if let Some((a, b)) = p.triaxiality_band {
            xe.add(a);
            xe.add(b);
        }
        if let Some((a, b)) = p.eqps_f_band {
            pe.add(a);
            pe.add(b);
        }
    }
    let (x0, x1) = xe.padded(0.05, (-0.5, 1.0));
    let point_top = pe.padded(0.0, (0.0, 0.0)).1.max(0.0);
    let curve_top = ce.padded(0.0, (0.0, 0.0)).1.max(0.0);
    let top = if pe.is_empty() {
        curve_top
    } else {
        point_top.max(curve_top.min(2.0 * point_top))
    };
    let y1 = if top > 0.0 { top * 1.12 } else { 1.0 };
    // The axis starts at 0 unless a calibration value lies below it (which is then shown).
    let low = pe.padded(0.0, (0.0, 0.0)).0;
    let y0 = if low < 0.0 {
        low - 0.05 * (y1 - low)
    } else {
        0.0
    };
    let chart = axes(
        &pg,
        (x0, x1),
        (y0, y1),
        "η (triaxiality)",
        "ε_f (fracture strain)",
    )?;
    let area = chart.plotting_area();
    let mut legend = Vec::new();
    for (i, c) in d.curves.iter().enumerate() {
        let col = colour(i);
        for piece in clip_y(&c.points, y0, y1) {
            draw_line(
                area,
                &piece,
                stroke(i),
                col.stroke_width((2.4 * s).max(1.0) as u32),
                s,
            )?;
        }
        legend.push(LegendEntry::line(c.label.clone(), col, stroke(i)));
    }
    let bar = MUTED.stroke_width((1.4 * s).max(1.0) as u32);
    let cap = (4.0 * s) as i32;
    for p in &d.points {
        let at = (p.triaxiality, p.eqps_f);
        if let Some((a, b)) = p.triaxiality_band {
            area.draw(&PathElement::new(vec![(a, at.1), (b, at.1)], bar))
                .or_draw()?;
            for x in [a, b] {
                area.draw(
                    &(EmptyElement::at((x, at.1))
                        + PathElement::new(vec![(0, -cap), (0, cap)], bar)),
                )
                .or_draw()?;
            }
        }
        if let Some((a, b)) = p.eqps_f_band {
            area.draw(&PathElement::new(vec![(at.0, a), (at.0, b)], bar))
                .or_draw()?;
            for y in [a, b] {
                area.draw(
                    &(EmptyElement::at((at.0, y))
                        + PathElement::new(vec![(-cap, 0), (cap, 0)], bar)),
                )
                .or_draw()?;
            }
        }
    }
    let r = 6.0 * s;
    for (i, p) in d.points.iter().enumerate() {
        draw_marker(
            area,
            (p.triaxiality, p.eqps_f),
            marker(i),
            r,
            Some(INK),
            INK,
        )?;
    }
    // Labels: the first of eight places around the marker that stays inside the plot and
    // clear of the markers and labels placed so far (else the least crowded one).
    let style = font(14.0 * s, INK);
    let (xr, yr) = area.get_pixel_range();
    let mut taken: Vec<[i32; 4]> = d
        .points
        .iter()
        .map(|p| {
            let (x, y) = area.map_coordinate(&(p.triaxiality, p.eqps_f));
            let k = r.ceil() as i32 + 1;
            [x - k, y - k, x + k, y + k]
        })
        .collect();
    for p in &d.points {
        let label = p.label.clone();
        let (x, y) = area.map_coordinate(&(p.triaxiality, p.eqps_f));
        let (tw, th) = pg
            .plot
            .estimate_text_size(&label, &style)
            .unwrap_or((60, 12));
        let (tw, th) = (tw as i32, th as i32);
        let g = (r + 4.0 * s) as i32;
        let candidates = [
            (HPos::Left, VPos::Bottom, g, -g / 2),
            (HPos::Left, VPos::Top, g, g / 2),
            (HPos::Right, VPos::Bottom, -g, -g / 2),
            (HPos::Right, VPos::Top, -g, g / 2),
            (HPos::Center, VPos::Bottom, 0, -g),
            (HPos::Center, VPos::Top, 0, g),
            (HPos::Left, VPos::Bottom, g, -g - th),
            (HPos::Left, VPos::Top, g, g + th),
        ];
        let bbox = |(h, v, dx, dy): (HPos, VPos, i32, i32)| {
            let x0 = match h {
                HPos::Left => x + dx,
                HPos::Right => x + dx - tw,
                HPos::Center => x + dx - tw / 2,
            };
            let y0 = match v {
                VPos::Top => y + dy,
                VPos::Bottom => y + dy - th,
                VPos::Center => y + dy - th / 2,
            };
            [x0, y0, x0 + tw, y0 + th]
        };
        let overlap = |a: &[i32; 4], b: &[i32; 4]| {
            let w = (a[2].min(b[2]) - a[0].max(b[0])).max(0);
            let h = (a[3].min(b[3]) - a[1].max(b[1])).max(0);
            i64::from(w) * i64::from(h)
        };
        let cost = |c: (HPos, VPos, i32, i32)| {
            let b = bbox(c);
            let outside = b[0] < xr.start || b[2] > xr.end || b[1] < yr.start || b[3] > yr.end;
            let crowd: i64 = taken.iter().map(|t| overlap(&b, t)).sum();
            crowd + if outside { 1_000_000 } else { 0 }
        };
        let best = candidates
            .iter()
            .copied()
            .min_by_key(|&c| cost(c))
            .unwrap_or(candidates[0]);
        taken.push(bbox(best));
        let (h, v, dx, dy) = best;
        text(
            &area.use_screen_coord(),
            pg.mode,
            &label,
            &style,
            (h, v),
            (x + dx, y + dy),
        )?;
    }
    if !d.points.is_empty() {
        legend.push(LegendEntry {
            label: "calibration point".into(),
            colour: INK,
            stroke: None,
            marker: Some((marker(0), Some(INK))),
        });
    }
    if d.points
        .iter()
        .any(|p| p.triaxiality_band.is_some() || p.eqps_f_band.is_some())
    {
        legend.push(LegendEntry::line("band (error bar)", MUTED, Stroke::Solid));
    }
    if d.curves.iter().all(|c| c.points.is_empty()) && d.points.is_empty() {
        no_data(&chart, "no locus curve or calibration point to plot", &pg)?;
    }
    draw_legend(&pg, &legend)
}
