//! The look shared by every chart: palette, marker shapes, line strokes, the page frame
//! (title band, plot area, legend panel) and the legend itself.
//!
//! The qualitative palette is this project's own: six hues chosen so that every pair stays
//! apart under simulated protan, deutan and tritan vision (checked in the tests with the
//! simulation matrices of Machado, Oliveira & Fernandes 2009). Colour is never the only
//! cue: series also differ by marker shape and line stroke.

use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

use crate::PlotError;
use crate::error::OrDraw;
use crate::fonts::FAMILY;

/// The series palette, in the order series receive it (sRGB).
pub const PALETTE: [(u8, u8, u8); 6] = [
    (0x1E, 0x5A, 0xA8), // deep blue
    (0xE3, 0x92, 0x2A), // amber
    (0x1F, 0x9E, 0x89), // teal
    (0x8E, 0x26, 0x50), // wine
    (0x8F, 0xC5, 0xEC), // sky
    (0x4F, 0x3F, 0x12), // umber
];

/// Text and axis ink.
pub(crate) const INK: RGBColor = RGBColor(0x22, 0x26, 0x2B);
/// Secondary ink: reference curves, notes.
pub(crate) const MUTED: RGBColor = RGBColor(0x6A, 0x70, 0x78);
/// Grid lines.
pub(crate) const GRID: RGBColor = RGBColor(0xE8, 0xEA, 0xED);
/// Coarse grid lines.
pub(crate) const GRID_BOLD: RGBColor = RGBColor(0xD3, 0xD7, 0xDC);

/// Series colour `i` (cycling).
pub(crate) fn colour(i: usize) -> RGBColor {
    let (r, g, b) = PALETTE[i % PALETTE.len()];
    RGBColor(r, g, b)
}

/// Marker shapes, in the order series receive them.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Marker {
    Circle,
    Square,
    Diamond,
    TriangleUp,
    TriangleDown,
    Pentagon,
    Hexagon,
}

const MARKERS: [Marker; 7] = [
    Marker::Circle,
    Marker::Square,
    Marker::Diamond,
    Marker::TriangleUp,
    Marker::TriangleDown,
    Marker::Pentagon,
    Marker::Hexagon,
];

/// Marker shape `i` (cycling).
pub(crate) fn marker(i: usize) -> Marker {
    MARKERS[i % MARKERS.len()]
}

impl Marker {
    /// Polygon vertices (pixel offsets from the centre) of a marker of nominal radius `r`.
    fn outline(self, r: f64) -> Vec<(i32, i32)> {
        let regular = |n: usize, r: f64, phase: f64| -> Vec<(i32, i32)> {
            (0..n)
                .map(|k| {
                    let a = phase + std::f64::consts::TAU * k as f64 / n as f64;
                    ((r * a.cos()).round() as i32, (r * a.sin()).round() as i32)
                })
                .collect()
        };
        use std::f64::consts::FRAC_PI_2;
        match self {
            Marker::Circle => regular(20, r, 0.0),
            Marker::Square => regular(4, r * 1.2, std::f64::consts::FRAC_PI_4),
            Marker::Diamond => regular(4, r * 1.3, 0.0),
            Marker::TriangleUp => regular(3, r * 1.35, -FRAC_PI_2),
            Marker::TriangleDown => regular(3, r * 1.35, FRAC_PI_2),
            Marker::Pentagon => regular(5, r * 1.15, -FRAC_PI_2),
            Marker::Hexagon => regular(6, r * 1.1, 0.0),
        }
    }
}

/// Draws marker `shape` of radius `r` pixels at `at` (in `area`'s coordinates), filled with
/// `fill` (hollow when `None`) and edged with `edge`.
pub(crate) fn draw_marker<DB: DrawingBackend, CT: CoordTranslate>(
    area: &DrawingArea<DB, CT>,
    at: CT::From,
    shape: Marker,
    r: f64,
    fill: Option<RGBColor>,
    edge: RGBColor,
) -> Result<(), PlotError>
where
    CT::From: Clone,
{
    let pts = shape.outline(r.max(1.0));
    let mut ring = pts.clone();
    if let Some(first) = pts.first() {
        ring.push(*first);
    }
    if let Some(fill) = fill {
        area.draw(&(EmptyElement::at(at.clone()) + Polygon::new(pts, fill.filled())))
            .or_draw()?;
    } else {
        area.draw(&(EmptyElement::at(at.clone()) + Polygon::new(pts, WHITE.filled())))
            .or_draw()?;
    }
    area.draw(&(EmptyElement::at(at) + PathElement::new(ring, edge.stroke_width(1))))
        .or_draw()
}

/// How a line is stroked.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Stroke {
    Solid,
    Dashed,
    Dotted,
    DashDot,
}

const STROKES: [Stroke; 4] = [
    Stroke::Solid,
    Stroke::Dashed,
    Stroke::DashDot,
    Stroke::Dotted,
];

/// Stroke `i` (cycling).
pub(crate) fn stroke(i: usize) -> Stroke {
    STROKES[i % STROKES.len()]
}

/// Draws a polyline with `stroke`. Dash patterns are laid out here, in pixels, so they
/// look the same in SVG and PNG.
pub(crate) fn draw_line<DB: DrawingBackend, CT: CoordTranslate>(
    area: &DrawingArea<DB, CT>,
    points: &[CT::From],
    stroke: Stroke,
    style: ShapeStyle,
    scale: f64,
) -> Result<(), PlotError>
where
    CT::From: Clone,
{
    if points.len() < 2 {
        return Ok(());
    }
    let pattern: &[f64] = match stroke {
        Stroke::Solid => {
            return area
                .draw(&PathElement::new(points.to_vec(), style))
                .or_draw();
        }
        Stroke::Dashed => &[9.0, 5.0],
        Stroke::Dotted => &[2.0, 4.0],
        Stroke::DashDot => &[10.0, 4.0, 2.0, 4.0],
    };
    let pixels: Vec<(f64, f64)> = points
        .iter()
        .map(|p| {
            let (x, y) = area.map_coordinate(p);
            (f64::from(x), f64::from(y))
        })
        .collect();
    let pattern: Vec<f64> = pattern.iter().map(|v| v * scale.max(0.3)).collect();
    let root = area.use_screen_coord();
    let mut phase = 0usize;
    let mut left = pattern[0];
    let mut current: Vec<(i32, i32)> = Vec::new();
    let to_px = |x: f64, y: f64| (x.round() as i32, y.round() as i32);
    for w in pixels.windows(2) {
        let (mut x0, mut y0) = w[0];
        let (x1, y1) = w[1];
        let mut seg = ((x1 - x0).powi(2) + (y1 - y0).powi(2)).sqrt();
        if !seg.is_finite() {
            continue;
        }
        while seg > 0.0 {
            let step = left.min(seg);
            let t = step / seg;
            let (xn, yn) = (x0 + (x1 - x0) * t, y0 + (y1 - y0) * t);
            if phase.is_multiple_of(2) {
                if current.is_empty() {
                    current.push(to_px(x0, y0));
                }
                current.push(to_px(xn, yn));
            }
            seg -= step;
            left -= step;
            x0 = xn;
            y0 = yn;
            if left <= 1e-9 {
                if phase.is_multiple_of(2) && current.len() >= 2 {
                    root.draw(&PathElement::new(std::mem::take(&mut current), style))
                        .or_draw()?;
                }
                current.clear();
                phase = (phase + 1) % pattern.len();
                left = pattern[phase];
            }
        }
    }
    if phase.is_multiple_of(2) && current.len() >= 2 {
        root.draw(&PathElement::new(current, style)).or_draw()?;
    }
    Ok(())
}

/// A text style in the chart family at `size` (plotters units: 1.24 × the CSS pixel size).
pub(crate) fn font(size: f64, colour: RGBColor) -> TextStyle<'static> {
    (FAMILY, size.max(4.0)).into_font().color(&colour)
}

/// Bold [`font`].
pub(crate) fn bold(size: f64, colour: RGBColor) -> TextStyle<'static> {
    (FAMILY, size.max(4.0), FontStyle::Bold)
        .into_font()
        .color(&colour)
}

/// `text` shortened with an ellipsis so that it fits `max_px` pixels in `style`.
pub(crate) fn fit_text<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    text: &str,
    style: &TextStyle<'_>,
    max_px: u32,
) -> String {
    let width = |s: &str| {
        area.estimate_text_size(s, style)
            .map(|(w, _)| w)
            .unwrap_or(0)
    };
    if width(text) <= max_px {
        return text.to_string();
    }
    let chars: Vec<char> = text.chars().collect();
    let mut n = chars.len();
    while n > 1 {
        n -= 1;
        let candidate: String = chars[..n].iter().collect::<String>() + "…";
        if width(&candidate) <= max_px {
            return candidate;
        }
    }
    "…".to_string()
}

/// One legend line: a stroke sample, a marker sample, or both, and the label.
#[derive(Debug, Clone)]
pub(crate) struct LegendEntry {
    pub label: String,
    pub colour: RGBColor,
    pub stroke: Option<Stroke>,
    pub marker: Option<(Marker, Option<RGBColor>)>,
}

impl LegendEntry {
    pub(crate) fn line(label: impl Into<String>, colour: RGBColor, stroke: Stroke) -> Self {
        Self {
            label: label.into(),
            colour,
            stroke: Some(stroke),
            marker: None,
        }
    }

    pub(crate) fn with_marker(mut self, shape: Marker, fill: Option<RGBColor>) -> Self {
        self.marker = Some((shape, fill));
        self
    }
}

/// How text reaches the output: as SVG `<text>` (laid out by the viewer) or rasterised by
/// the drawing library's simple glyph placement.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum TextMode {
    Svg,
    Bitmap,
}

/// `text` prepared for the bitmap rasteriser, which places every glyph at the pen position
/// and ignores the negative bearing of combining marks: a mark written after its base letter
/// would land on the next letter. Macrons and overlines (U+0304, U+0305) are removed and
/// returned as the indices (in characters of the returned text) of the letters they belong
/// over, to be drawn as bars by [`text`]; any other combining mark is moved before its base.
pub(crate) fn split_bars(text: &str) -> (String, Vec<usize>) {
    let combining = |c: char| matches!(c, '\u{0300}'..='\u{036F}');
    let mut out: Vec<char> = Vec::with_capacity(text.len());
    let mut bars = Vec::new();
    for c in text.chars() {
        if !combining(c) {
            out.push(c);
            continue;
        }
        let base = out.iter().rposition(|&b| !combining(b));
        match (c, base) {
            ('\u{0304}' | '\u{0305}', Some(base)) => bars.push(base),
            (_, Some(base)) => out.insert(base, c),
            (_, None) => out.push(c),
        }
    }
    (out.into_iter().collect(), bars)
}

/// Draws `text` anchored at `pos` on `area`. SVG output keeps the text as it is (the viewer
/// shapes combining marks); bitmap output draws macrons as bars over their letters, placed
/// from the rasteriser's measured metrics (baseline at 0.50, 0.10 and −0.31 × size below
/// the anchor for top, centre and bottom anchors; tall letters reach 0.67 × size above it).
pub(crate) fn text<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    mode: TextMode,
    content: &str,
    style: &TextStyle<'static>,
    (h, v): (HPos, VPos),
    pos: (i32, i32),
) -> Result<(), PlotError> {
    let style = style.pos(Pos::new(h, v));
    if mode == TextMode::Svg {
        return area.draw(&Text::new(content, pos, style)).or_draw();
    }
    let (base, bars) = split_bars(content);
    area.draw(&Text::new(base.as_str(), pos, style.clone()))
        .or_draw()?;
    if bars.is_empty() {
        return Ok(());
    }
    let width = |s: &str| {
        area.estimate_text_size(s, &style)
            .map(|(w, _)| f64::from(w))
            .unwrap_or(0.0)
    };
    let size = style.font.get_size();
    let total = width(&base);
    let left = f64::from(pos.0)
        - match h {
            HPos::Left => 0.0,
            HPos::Center => total / 2.0,
            HPos::Right => total,
        };
    let baseline = f64::from(pos.1)
        + size
            * match v {
                VPos::Top => 0.50,
                VPos::Center => 0.10,
                VPos::Bottom => -0.31,
            };
    let y = (baseline - 0.75 * size).round() as i32;
    let thick = (0.055 * size).round().max(1.0) as i32;
    let chars: Vec<char> = base.chars().collect();
    let colour = style.color;
    let ink = RGBColor(colour.rgb.0, colour.rgb.1, colour.rgb.2);
    for k in bars {
        let before: String = chars[..k].iter().collect();
        let letter: String = chars[k..=k].iter().collect();
        let (x0, wc) = (left + width(&before), width(&letter));
        let (a, b) = (
            (x0 + 0.12 * wc).round() as i32,
            (x0 + 0.88 * wc).round() as i32,
        );
        area.draw(&Rectangle::new(
            [(a, y), (b.max(a + 1), y + thick)],
            ink.filled(),
        ))
        .or_draw()?;
    }
    Ok(())
}

/// The areas of a chart page: the plot area (axes go inside) and the legend panel.
pub(crate) struct Page<DB: DrawingBackend> {
    pub plot: DrawingArea<DB, Shift>,
    pub legend: DrawingArea<DB, Shift>,
    /// Size factor relative to the nominal 800 × 520 page.
    pub scale: f64,
    /// How text is output.
    pub mode: TextMode,
}

/// Clears `root`, draws the title band and splits the rest into plot area and legend panel.
pub(crate) fn page<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    title: &str,
    mode: TextMode,
) -> Result<Page<DB>, PlotError> {
    root.fill(&WHITE).or_draw()?;
    let (w, h) = root.dim_in_pixel();
    // Text and strokes grow with the page; below the nominal size they shrink more slowly
    // (square root), so small images stay legible.
    let ratio = (f64::from(w) / 800.0).min(f64::from(h) / 520.0);
    let scale = if ratio < 1.0 { ratio.sqrt() } else { ratio }.clamp(0.4, 10.0);
    let title_style = bold(24.0 * scale, INK);
    let pad = (14.0 * scale) as i32;
    let title_text = fit_text(root, title, &title_style, w.saturating_sub(2 * pad as u32));
    text(
        root,
        mode,
        &title_text,
        &title_style,
        (HPos::Left, VPos::Top),
        (pad, (10.0 * scale) as i32),
    )?;
    let top = (44.0 * scale) as u32;
    let body = root.margin(top, (6.0 * scale) as u32, (4.0 * scale) as u32, 0);
    let (bw, _) = body.dim_in_pixel();
    let legend_w = ((f64::from(w) * 0.28).clamp(130.0 * scale, 250.0 * scale) as u32).min(bw / 2);
    let (plot, legend) = body.split_horizontally(bw.saturating_sub(legend_w));
    Ok(Page {
        plot,
        legend,
        scale,
        mode,
    })
}

/// Draws the legend entries top-down in the legend panel; entries that do not fit are
/// summarised as "… n more".
pub(crate) fn draw_legend<DB: DrawingBackend>(
    page: &Page<DB>,
    entries: &[LegendEntry],
) -> Result<(), PlotError> {
    let area = &page.legend;
    let s = page.scale;
    let (w, h) = area.dim_in_pixel();
    let row = (24.0 * s).max(8.0);
    let sample = (30.0 * s) as i32;
    let x0 = (10.0 * s) as i32;
    let text_x = x0 + sample + (8.0 * s) as i32;
    let style = font(15.0 * s, INK);
    let max_rows = ((f64::from(h) - 16.0 * s) / row).floor().max(1.0) as usize;
    let shown = if entries.len() > max_rows {
        max_rows.saturating_sub(1)
    } else {
        entries.len()
    };
    let box_h = (row * (shown.max(1) as f64 + if shown < entries.len() { 1.0 } else { 0.0 })
        + 12.0 * s) as i32;
    area.draw(&Rectangle::new(
        [(2, 2), (w as i32 - 2, box_h.min(h as i32 - 2))],
        GRID_BOLD.stroke_width(1),
    ))
    .or_draw()?;
    let max_text = (w as i32 - text_x - (6.0 * s) as i32).max(10) as u32;
    for (k, e) in entries.iter().take(shown).enumerate() {
        let y = (8.0 * s + row * (k as f64 + 0.5)) as i32;
        if let Some(st) = e.stroke {
            draw_line(
                area,
                &[(x0, y), (x0 + sample, y)],
                st,
                e.colour.stroke_width((2.0 * s).max(1.0) as u32),
                s,
            )?;
        }
        if let Some((shape, fill)) = e.marker {
            draw_marker(area, (x0 + sample / 2, y), shape, 5.0 * s, fill, INK)?;
        }
        let label = fit_text(area, &e.label, &style, max_text);
        text(
            area,
            page.mode,
            &label,
            &style,
            (HPos::Left, VPos::Center),
            (text_x, y),
        )?;
    }
    if shown < entries.len() {
        let y = (8.0 * s + row * (shown as f64 + 0.5)) as i32;
        let more = format!("… {} more", entries.len() - shown);
        text(
            area,
            page.mode,
            &more,
            &font(15.0 * s, MUTED),
            (HPos::Left, VPos::Center),
            (text_x, y),
        )?;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    /// sRGB (0–255) to linear RGB.
    fn linear(c: (u8, u8, u8)) -> [f64; 3] {
        let f = |v: u8| {
            let v = f64::from(v) / 255.0;
            if v <= 0.04045 {
                v / 12.92
            } else {
                ((v + 0.055) / 1.055).powf(2.4)
            }
        };
        [f(c.0), f(c.1), f(c.2)]
    }

    /// Linear RGB (D65) to CIE L*a*b* (CIE 1976 formulas).
    fn lab(rgb: [f64; 3]) -> [f64; 3] {
        let m = [
            [0.4124, 0.3576, 0.1805],
            [0.2126, 0.7152, 0.0722],
            [0.0193, 0.1192, 0.9505],
        ];
        let white = [0.95047, 1.0, 1.08883];
        let mut t = [0.0; 3];
        for i in 0..3 {
            t[i] = (m[i][0] * rgb[0] + m[i][1] * rgb[1] + m[i][2] * rgb[2]) / white[i];
        }
        let f = |t: f64| {
            let d: f64 = 6.0 / 29.0;
            if t > d.powi(3) {
                t.cbrt()
            } else {
                t / (3.0 * d * d) + 4.0 / 29.0
            }
        };
        let (fx, fy, fz) = (f(t[0]), f(t[1]), f(t[2]));
        [116.0 * fy - 16.0, 500.0 * (fx - fy), 200.0 * (fy - fz)]
    }

    #[test]
    fn palette_pairs_stay_apart_under_simulated_colour_vision_deficiency() {
        // Severity-1.0 simulation matrices on linear RGB, Machado, Oliveira & Fernandes
        // 2009 (IEEE TVCG 15:1291–1298), values from memory.
        let sims: [(&str, [[f64; 3]; 3]); 4] = [
            (
                "normal",
                [[1.0, 0.0, 0.0], [0.0, 1.0, 0.0], [0.0, 0.0, 1.0]],
            ),
            (
                "protan",
                [
                    [0.152286, 1.052583, -0.204868],
                    [0.114503, 0.786281, 0.099216],
                    [-0.003882, -0.048116, 1.051998],
                ],
            ),
            (
                "deutan",
                [
                    [0.367322, 0.860646, -0.227968],
                    [0.280085, 0.672501, 0.047413],
                    [-0.011820, 0.042940, 0.968881],
                ],
            ),
            (
                "tritan",
                [
                    [1.255528, -0.076749, -0.178779],
                    [-0.078411, 0.930809, 0.147602],
                    [0.004733, 0.691367, 0.303900],
                ],
            ),
        ];
        for (name, m) in sims {
            let labs: Vec<[f64; 3]> = PALETTE
                .iter()
                .map(|&c| {
                    let l = linear(c);
                    let mut s = [0.0; 3];
                    for i in 0..3 {
                        s[i] = (m[i][0] * l[0] + m[i][1] * l[1] + m[i][2] * l[2]).clamp(0.0, 1.0);
                    }
                    lab(s)
                })
                .collect();
            for i in 0..labs.len() {
                for j in i + 1..labs.len() {
                    let d = (0..3)
                        .map(|k| (labs[i][k] - labs[j][k]).powi(2))
                        .sum::<f64>()
                        .sqrt();
                    // ΔE*ab ≥ 15: clearly different at a glance (common practice threshold).
                    assert!(
                        d >= 15.0,
                        "{name}: colours {i} and {j} only ΔE {d:.1} apart"
                    );
                }
            }
        }
    }

    #[test]
    fn palette_is_dark_enough_for_lines_on_white() {
        for (i, &c) in PALETTE.iter().enumerate() {
            let l = lab(linear(c))[0];
            assert!(l < 80.0, "colour {i} too light: L* {l:.0}");
        }
    }

    #[test]
    fn macrons_become_bars_for_bitmaps() {
        assert_eq!(split_bars("θ̄_avg"), ("θ_avg".to_string(), vec![0]));
        assert_eq!(
            split_bars("η, θ̄ and ε̄p"),
            ("η, θ and εp".to_string(), vec![3, 9])
        );
        assert_eq!(split_bars("a\u{0301}"), ("\u{0301}a".to_string(), vec![]));
        assert_eq!(split_bars("\u{0304}x"), ("\u{0304}x".to_string(), vec![]));
    }

    #[test]
    fn marker_outlines_are_closed_polygons_around_the_centre() {
        for k in 0..MARKERS.len() {
            let pts = marker(k).outline(6.0);
            assert!(pts.len() >= 3);
            assert!(pts.iter().all(|&(x, y)| x.abs() <= 9 && y.abs() <= 9));
        }
    }
}
