//! The [`Chart`] value: a figure's data kept with its SVG rendering, re-rendered on demand
//! to PNG or to SVG at another size; and the helpers every figure shares (value checks,
//! axis ranges, axes, the "no data" note).

use plotters::coord::types::RangedCoordf64;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

use crate::damage::DamageSeries;
use crate::error::OrDraw;
use crate::locus::LocusChartData;
use crate::path::PathData;
use crate::plane::NamedPath;
use crate::style::{GRID, GRID_BOLD, INK, MUTED, Page, TextMode, font, text};
use crate::{PlotError, format, init_fonts};

/// Size of [`Chart::svg`] in pixels (width, height).
pub const DEFAULT_SIZE: (u32, u32) = (800, 520);
/// Smallest accepted image side in pixels.
pub const MIN_SIDE: u32 = 200;
/// Largest accepted image side in pixels.
pub const MAX_SIDE: u32 = 8192;
/// Largest magnitude of a plotted value; larger finite values give [`PlotError::OutOfRange`].
pub const MAX_ABS: f64 = 1e12;

/// A rendered chart: the SVG at [`DEFAULT_SIZE`] and the data to render it again.
#[derive(Debug, Clone, PartialEq)]
pub struct Chart {
    /// The chart as a standalone SVG document (800 × 520 pixels, text as `<text>` in
    /// the `sans-serif` family).
    pub svg: String,
    figure: Figure,
}

/// The data of one chart.
#[derive(Debug, Clone, PartialEq)]
pub(crate) enum Figure {
    Path(PathData),
    Plane(Vec<NamedPath>),
    Locus(LocusChartData),
    Damage(Vec<DamageSeries>),
}

impl Figure {
    fn validate(&self) -> Result<(), PlotError> {
        match self {
            Figure::Path(d) => crate::path::validate(d),
            Figure::Plane(d) => crate::plane::validate(d),
            Figure::Locus(d) => crate::locus::validate(d),
            Figure::Damage(d) => crate::damage::validate(d),
        }
    }

    fn title(&self) -> String {
        match self {
            Figure::Path(d) => d.name.clone(),
            Figure::Plane(_) => crate::plane::TITLE.to_string(),
            Figure::Locus(d) => d.title.clone(),
            Figure::Damage(_) => crate::damage::TITLE.to_string(),
        }
    }

    fn draw<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, plotters::coord::Shift>,
        mode: TextMode,
    ) -> Result<(), PlotError> {
        match self {
            Figure::Path(d) => crate::path::draw(d, root, mode),
            Figure::Plane(d) => crate::plane::draw(d, root, mode),
            Figure::Locus(d) => crate::locus::draw(d, root, mode),
            Figure::Damage(d) => crate::damage::draw(d, root, mode),
        }
    }
}

impl Chart {
    /// Validates the figure's data and renders the SVG.
    pub(crate) fn new(figure: Figure) -> Result<Self, PlotError> {
        figure.validate()?;
        let svg = render_svg(&figure, DEFAULT_SIZE)?;
        Ok(Self { svg, figure })
    }

    /// The chart title (the specimen name for a path chart).
    pub fn title(&self) -> String {
        self.figure.title()
    }

    /// The chart as SVG at `width` × `height` pixels.
    pub fn svg_sized(&self, width: u32, height: u32) -> Result<String, PlotError> {
        check_size(width, height)?;
        render_svg(&self.figure, (width, height))
    }

    /// The chart as a PNG image (8-bit RGB) of `width` × `height` pixels, text drawn with
    /// the embedded DejaVu Sans.
    pub fn png(&self, width: u32, height: u32) -> Result<Vec<u8>, PlotError> {
        check_size(width, height)?;
        init_fonts()?;
        let len = (width as usize) * (height as usize) * 3;
        let mut rgb = vec![0u8; len];
        {
            let backend = BitMapBackend::<plotters::backend::RGBPixel>::with_buffer_and_format(
                &mut rgb,
                (width, height),
            )
            .map_err(|e| PlotError::Draw(e.to_string()))?;
            let root = backend.into_drawing_area();
            self.figure.draw(&root, TextMode::Bitmap)?;
            root.present().or_draw()?;
        }
        let image = image::RgbImage::from_raw(width, height, rgb)
            .ok_or_else(|| PlotError::Encode("pixel buffer does not match the size".into()))?;
        let mut out = std::io::Cursor::new(Vec::new());
        image
            .write_to(&mut out, image::ImageFormat::Png)
            .map_err(|e| PlotError::Encode(e.to_string()))?;
        Ok(out.into_inner())
    }
}

fn check_size(width: u32, height: u32) -> Result<(), PlotError> {
    let ok = |v: u32| (MIN_SIDE..=MAX_SIDE).contains(&v);
    if ok(width) && ok(height) {
        Ok(())
    } else {
        Err(PlotError::Size { width, height })
    }
}

fn render_svg(figure: &Figure, size: (u32, u32)) -> Result<String, PlotError> {
    init_fonts()?;
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, size).into_drawing_area();
        figure.draw(&root, TextMode::Svg)?;
        root.present().or_draw()?;
    }
    Ok(svg)
}

/// `v` if it is finite and within ±[`MAX_ABS`]; otherwise the matching error naming `what`.
pub(crate) fn checked(what: &str, index: Option<usize>, v: f64) -> Result<f64, PlotError> {
    if !v.is_finite() {
        Err(PlotError::NonFinite {
            what: what.to_string(),
            index,
            value: v,
        })
    } else if v.abs() > MAX_ABS {
        Err(PlotError::OutOfRange {
            what: what.to_string(),
            index,
            value: v,
        })
    } else {
        Ok(v)
    }
}

/// [`checked`] over an optional value.
pub(crate) fn checked_opt(
    what: &str,
    index: Option<usize>,
    v: Option<f64>,
) -> Result<(), PlotError> {
    v.map_or(Ok(()), |v| checked(what, index, v).map(|_| ()))
}

/// The smallest interval holding every included value.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Extent {
    lo: f64,
    hi: f64,
}

impl Extent {
    pub(crate) fn new() -> Self {
        Self {
            lo: f64::INFINITY,
            hi: f64::NEG_INFINITY,
        }
    }

    /// Includes `v` (non-finite values are ignored).
    pub(crate) fn add(&mut self, v: f64) {
        if v.is_finite() {
            self.lo = self.lo.min(v);
            self.hi = self.hi.max(v);
        }
    }

    pub(crate) fn is_empty(&self) -> bool {
        self.lo > self.hi
    }

    /// The interval widened by `pad` × its width on both sides; an empty extent gives
    /// `fallback`, a single value a unit-wide interval around it.
    pub(crate) fn padded(&self, pad: f64, fallback: (f64, f64)) -> (f64, f64) {
        if self.is_empty() {
            return fallback;
        }
        let width = self.hi - self.lo;
        if width <= 0.0 || !width.is_finite() {
            let half = (self.lo.abs() * 0.1).max(0.5);
            return (self.lo - half, self.hi + half);
        }
        (self.lo - pad * width, self.hi + pad * width)
    }
}

/// The cartesian axes of a chart.
pub(crate) type Axes<'a, DB> = ChartContext<'a, DB, Cartesian2d<RangedCoordf64, RangedCoordf64>>;

/// Builds the axes in `page`'s plot area with ranges `x` and `y`, grid and labels.
pub(crate) fn axes<'a, DB: DrawingBackend + 'a>(
    page: &'a Page<DB>,
    x: (f64, f64),
    y: (f64, f64),
    x_desc: &str,
    y_desc: &str,
) -> Result<Axes<'a, DB>, PlotError> {
    let s = page.scale;
    let (x, y) = (sane(x), sane(y));
    let mut chart = ChartBuilder::on(&page.plot)
        .margin_top((30.0 * s) as u32)
        .margin_right((14.0 * s) as u32)
        .margin_left((4.0 * s) as u32)
        .margin_bottom((26.0 * s) as u32)
        .x_label_area_size((30.0 * s) as u32)
        .y_label_area_size((56.0 * s) as u32)
        .build_cartesian_2d(x.0..x.1, y.0..y.1)
        .or_draw()?;
    let (xs, ys) = (x.1 - x.0, y.1 - y.0);
    let xf = move |v: &f64| format::tick(*v, xs);
    let yf = move |v: &f64| format::tick(*v, ys);
    chart
        .configure_mesh()
        .max_light_lines(1)
        .x_labels(9)
        .y_labels(9)
        .x_label_formatter(&xf)
        .y_label_formatter(&yf)
        .label_style(font(15.0 * s, INK))
        .light_line_style(GRID)
        .bold_line_style(GRID_BOLD)
        .axis_style(INK.stroke_width(1))
        .draw()
        .or_draw()?;
    // Axis descriptions drawn level (no head tilting): x centred below the tick labels,
    // y above the top of the vertical axis.
    let (xr, yr) = chart.plotting_area().get_pixel_range();
    let screen = page.plot.use_screen_coord();
    let desc = font(17.0 * s, INK);
    let (_, plot_bottom) = {
        let (x0, y0) = page.plot.get_base_pixel();
        let (w, h) = page.plot.dim_in_pixel();
        (x0 + w as i32, y0 + h as i32)
    };
    text(
        &screen,
        page.mode,
        x_desc,
        &desc,
        (HPos::Center, VPos::Bottom),
        ((xr.start + xr.end) / 2, plot_bottom - (4.0 * s) as i32),
    )?;
    text(
        &screen,
        page.mode,
        y_desc,
        &desc,
        (HPos::Left, VPos::Bottom),
        (xr.start - (40.0 * s) as i32, yr.start - (9.0 * s) as i32),
    )?;
    Ok(chart)
}

/// A strictly increasing finite range.
fn sane((lo, hi): (f64, f64)) -> (f64, f64) {
    if lo.is_finite() && hi.is_finite() && hi > lo {
        (lo, hi)
    } else if lo.is_finite() {
        (lo - 0.5, lo + 0.5)
    } else {
        (0.0, 1.0)
    }
}

/// Writes `message` in the middle of the plotting area (for charts without data).
pub(crate) fn no_data<DB: DrawingBackend>(
    chart: &Axes<'_, DB>,
    message: &str,
    page: &Page<DB>,
) -> Result<(), PlotError> {
    let scale = page.scale;
    let area = chart.plotting_area().strip_coord_spec();
    let (w, h) = area.dim_in_pixel();
    let style = font(18.0 * scale, MUTED);
    let (tw, th) = area
        .estimate_text_size(message, &style)
        .unwrap_or((200, 16));
    // Low in the plot, where the reference marks of the state plane leave room.
    let (cx, cy) = (w as i32 / 2, (f64::from(h) * 0.82) as i32);
    let (hw, hh) = (
        tw as i32 / 2 + (12.0 * scale) as i32,
        th as i32 / 2 + (8.0 * scale) as i32,
    );
    let corners = [(cx - hw, cy - hh), (cx + hw, cy + hh)];
    area.draw(&Rectangle::new(corners, WHITE.filled()))
        .or_draw()?;
    area.draw(&Rectangle::new(corners, GRID_BOLD.stroke_width(1)))
        .or_draw()?;
    text(
        &area,
        page.mode,
        message,
        &style,
        (HPos::Center, VPos::Center),
        (cx, cy),
    )
}

/// Splits a series of optional points into runs without gaps.
pub(crate) fn runs(points: impl IntoIterator<Item = Option<(f64, f64)>>) -> Vec<Vec<(f64, f64)>> {
    let mut out = Vec::new();
    let mut current = Vec::new();
    for p in points {
        match p {
            Some(p) => current.push(p),
            None => {
                if !current.is_empty() {
                    out.push(std::mem::take(&mut current));
                }
            }
        }
    }
    if !current.is_empty() {
        out.push(current);
    }
    out
}

/// Clips a polyline to `lo ≤ y ≤ hi`, interpolating where it leaves and re-enters the
/// band; returns the visible pieces.
pub(crate) fn clip_y(points: &[(f64, f64)], lo: f64, hi: f64) -> Vec<Vec<(f64, f64)>> {
    let inside = |y: f64| (lo..=hi).contains(&y);
    let cross = |a: (f64, f64), b: (f64, f64), level: f64| {
        let t = (level - a.1) / (b.1 - a.1);
        (a.0 + t * (b.0 - a.0), level)
    };
    let mut out = Vec::new();
    let mut current: Vec<(f64, f64)> = Vec::new();
    for (k, &p) in points.iter().enumerate() {
        if k > 0 {
            let q = points[k - 1];
            match (inside(q.1), inside(p.1)) {
                (true, false) => {
                    let level = if p.1 > hi { hi } else { lo };
                    current.push(cross(q, p, level));
                    out.push(std::mem::take(&mut current));
                }
                (false, true) => {
                    let level = if q.1 > hi { hi } else { lo };
                    current.push(cross(q, p, level));
                }
                (false, false) if (q.1 > hi && p.1 < lo) || (q.1 < lo && p.1 > hi) => {
                    let (first, second) = if q.1 > hi { (hi, lo) } else { (lo, hi) };
                    out.push(vec![cross(q, p, first), cross(q, p, second)]);
                }
                _ => {}
            }
        }
        if inside(p.1) {
            current.push(p);
        }
    }
    if !current.is_empty() {
        out.push(current);
    }
    out.retain(|piece| piece.len() >= 2);
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn runs_split_at_gaps() {
        let r = runs([
            Some((0.0, 1.0)),
            None,
            Some((1.0, 2.0)),
            Some((2.0, 3.0)),
            None,
        ]);
        assert_eq!(r, vec![vec![(0.0, 1.0)], vec![(1.0, 2.0), (2.0, 3.0)]]);
        assert!(runs([None, None]).is_empty());
    }

    #[test]
    fn clipping_interpolates_the_crossings() {
        let pieces = clip_y(&[(0.0, 0.5), (1.0, 1.5), (2.0, 0.5)], 0.0, 1.0);
        assert_eq!(
            pieces,
            vec![vec![(0.0, 0.5), (0.5, 1.0)], vec![(1.5, 1.0), (2.0, 0.5)]]
        );
        let through = clip_y(&[(0.0, 2.0), (1.0, -1.0)], 0.0, 1.0);
        assert_eq!(through.len(), 1);
        assert!((through[0][0].0 - 1.0 / 3.0).abs() < 1e-12);
        assert!((through[0][1].0 - 2.0 / 3.0).abs() < 1e-12);
        assert!(clip_y(&[(0.0, 5.0), (1.0, 6.0)], 0.0, 1.0).is_empty());
    }

    #[test]
    fn extents() {
        let mut e = Extent::new();
        assert_eq!(e.padded(0.1, (0.0, 1.0)), (0.0, 1.0));
        e.add(2.0);
        assert_eq!(e.padded(0.1, (0.0, 1.0)), (1.5, 2.5));
        e.add(4.0);
        e.add(f64::NAN);
        let (lo, hi) = e.padded(0.1, (0.0, 1.0));
        assert!((lo - 1.8).abs() < 1e-12 && (hi - 4.2).abs() < 1e-12);
    }

    #[test]
    fn sizes_are_checked() {
        assert!(check_size(800, 520).is_ok());
        assert_eq!(
            check_size(0, 520),
            Err(PlotError::Size {
                width: 0,
                height: 520
            })
        );
        assert!(check_size(800, MAX_SIDE + 1).is_err());
    }
}
