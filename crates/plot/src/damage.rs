//! The damage chart: damage D against the gauge signal per specimen, the measured fracture
//! gauge value and the fracture level D = 1.

use plotters::coord::Shift;
use plotters::prelude::*;

use crate::PlotError;
use crate::chart::{Chart, Extent, Figure, axes, checked, checked_opt, no_data};
use crate::style::{
    INK, LegendEntry, MUTED, Stroke, TextMode, colour, draw_legend, draw_line, draw_marker, marker,
    page,
};

/// Title of the damage chart.
pub const TITLE: &str = "Damage check: D against gauge elongation";

/// One specimen's damage history.
#[derive(Debug, Clone, PartialEq)]
pub struct DamageSeries {
    /// Specimen name (legend).
    pub label: String,
    /// Points (gauge elongation in mm, damage D dimensionless) in increment order.
    pub points: Vec<(f64, f64)>,
    /// The gauge elongation at fracture measured in the test, mm (dashed vertical line in
    /// the series' colour); `None`: not drawn.
    pub measured_gauge_f: Option<f64>,
}

/// The damage chart: D against gauge elongation per specimen, a dashed vertical line at
/// each measured fracture gauge value in the specimen's colour, and the level D = 1.
///
/// Errors: non-finite or out-of-range values. No series gives a chart with a "no data" note.
pub fn damage_chart(series: &[DamageSeries]) -> Result<Chart, PlotError> {
    Chart::new(Figure::Damage(series.to_vec()))
}

pub(crate) fn validate(series: &[DamageSeries]) -> Result<(), PlotError> {
    for d in series {
        let what = format!("damage series \"{}\"", d.label);
        for (i, &(g, v)) in d.points.iter().enumerate() {
            checked(&format!("{what}: gauge"), Some(i), g)?;
            checked(&format!("{what}: D"), Some(i), v)?;
        }
        checked_opt(
            &format!("{what}: measured_gauge_f"),
            None,
            d.measured_gauge_f,
        )?;
    }
    Ok(())
}

pub(crate) fn draw<DB: DrawingBackend>(
    series: &[DamageSeries],
    root: &DrawingArea<DB, Shift>,
    mode: TextMode,
) -> Result<(), PlotError> {
    let pg = page(root, TITLE, mode)?;
    let s = pg.scale;
    let mut xe = Extent::new();
    let mut ye = Extent::new();
    xe.add(0.0);
    ye.add(0.0);
    ye.add(1.15);
    for d in series {
        for &(g, v) in &d.points {
            xe.add(g);
            ye.add(v);
        }
        d.measured_gauge_f.into_iter().for_each(|g| xe.add(g));
    }
    let (x0, x1) = xe.padded(0.03, (0.0, 1.0));
    let (y0, y1) = ye.padded(0.03, (0.0, 1.2));
    let chart = axes(
        &pg,
        (x0, x1),
        (y0, y1),
        "gauge elongation (mm)",
        "D (damage)",
    )?;
    let area = chart.plotting_area();
    let mut legend = Vec::new();
    draw_line(
        area,
        &[(x0, 1.0), (x1, 1.0)],
        Stroke::Dashed,
        INK.stroke_width((1.4 * s).max(1.0) as u32),
        s,
    )?;
    for (i, d) in series.iter().enumerate() {
        let c = colour(i);
        if let Some(g) = d.measured_gauge_f {
            draw_line(
                area,
                &[(g, y0), (g, y1)],
                Stroke::Dashed,
                c.stroke_width((1.6 * s).max(1.0) as u32),
                s,
            )?;
        }
        draw_line(
            area,
            &d.points,
            Stroke::Solid,
            c.stroke_width((2.4 * s).max(1.0) as u32),
            s,
        )?;
        if let Some(&last) = d.points.last() {
            draw_marker(area, last, marker(i), 5.5 * s, Some(c), INK)?;
        }
        legend.push(
            LegendEntry::line(d.label.clone(), c, Stroke::Solid).with_marker(marker(i), Some(c)),
        );
    }
    legend.push(LegendEntry::line(
        "measured at fracture",
        MUTED,
        Stroke::Dashed,
    ));
    legend.push(LegendEntry::line("D = 1 (fracture)", INK, Stroke::Dashed));
    if series.iter().all(|d| d.points.is_empty()) {
        no_data(&chart, "no damage histories to plot", &pg)?;
    }
    draw_legend(&pg, &legend)
}
