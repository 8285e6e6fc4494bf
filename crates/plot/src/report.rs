//! The campaign report: one self-contained HTML5 file (inline CSS and inline SVG, no
//! script, no external asset) from plain data, [`ReportData`], by [`render`].
//!
//! Sections, in order: title with the caution box (and the invented-data notice), the job,
//! the calibration table, the fit, the damage check, the charts, the footer. Every string
//! from the data is HTML-escaped; undefined numbers print as "—".

use std::fmt::Write as _;

use crate::Chart;
use crate::format::{UNDEFINED, escape_html as esc, fixed, significant, significant_opt};

/// Everything the report shows. Strings are plain text (escaped on output).
#[derive(Debug, Clone, PartialEq)]
pub struct ReportData {
    /// Campaign title (page title and heading).
    pub title: String,
    /// True when the data are an invented demonstration; the report says so prominently.
    pub invented: bool,
    /// What was computed and from what.
    pub job: JobSection,
    /// The calibration table, one row per specimen.
    pub table: Vec<TableRow>,
    /// The locus fit; `None`: section says no fit was run.
    pub fit: Option<FitSection>,
    /// The damage check; `None`: section says no damage check was run.
    pub damage: Option<DamageSection>,
    /// The charts, rendered by this crate's chart functions.
    pub charts: ReportCharts,
    /// Provenance.
    pub footer: Footer,
}

/// The job in one paragraph: the fixed conventions are written by the report; these fields
/// fill in the campaign's own choices.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct JobSection {
    /// Material name, e.g. `invented alloy DT-1`; `None`: not named.
    pub material: Option<String>,
    /// Where the results came from, e.g. `CalculiX results converted to VTU, 51 increments
    /// per specimen`.
    pub results: String,
    /// The critical-point rule, e.g. `the integration point of largest ε̄p in the minimum
    /// section`.
    pub critical_point: String,
    /// How the fracture instant was chosen, e.g. `the gauge elongation at the force drop
    /// of each test`.
    pub fracture_instant: String,
    /// Further remarks, one list item each (mesh size at the critical point, runners-up…).
    pub notes: Vec<String>,
}

/// One row of the calibration table (a specimen's calibration point).
#[derive(Debug, Clone, PartialEq)]
pub struct TableRow {
    /// Specimen name.
    pub specimen: String,
    /// ε_f: ε̄p at the fracture instant (dimensionless).
    pub eqps_f: f64,
    /// η_avg up to the fracture instant (dimensionless).
    pub triaxiality_avg: Option<f64>,
    /// θ̄_avg up to the fracture instant, in [−1, 1].
    pub lode_angle_param_avg: Option<f64>,
    /// η at the fracture instant.
    pub triaxiality_f: Option<f64>,
    /// θ̄ at the fracture instant.
    pub lode_angle_param_f: Option<f64>,
    /// Bridgman's estimate of the initial triaxiality at the notch centre (dimensionless).
    pub bridgman_triaxiality: Option<f64>,
    /// Area-based fracture strain from the measured sizes of the broken specimen.
    pub eqps_f_area: Option<f64>,
    /// The fracture instant as a fractional output increment (e.g. 37.42).
    pub stop_increment: f64,
}

/// The locus fit.
#[derive(Debug, Clone, PartialEq)]
pub struct FitSection {
    /// Model name, e.g. `modified Mohr–Coulomb`.
    pub model: String,
    /// The objective in words, e.g. `ln(ε_f,model(η_avg, θ̄_avg) / ε_f) per specimen`.
    pub objective: String,
    /// Parameters in the model's order, fixed ones included.
    pub parameters: Vec<ParameterRow>,
    /// What the residuals are.
    pub residual_kind: ResidualKind,
    /// Residual per specimen.
    pub residuals: Vec<ResidualRow>,
    /// √(Σ r_i² / m), the root-mean-square log residual (dimensionless).
    pub rms_log_residual: f64,
    /// Why the minimiser stopped.
    pub termination: String,
    /// True when the minimiser reported convergence.
    pub converged: bool,
}

/// One fitted (or fixed) parameter.
#[derive(Debug, Clone, PartialEq)]
pub struct ParameterRow {
    /// Name, e.g. `c1`.
    pub name: String,
    /// Value, in `unit`.
    pub value: f64,
    /// Standard error, in `unit`; `None` for fixed parameters or when not estimable.
    pub standard_error: Option<f64>,
    /// True when the parameter was held fixed.
    pub fixed: bool,
    /// Unit, e.g. `MPa`; `None`: dimensionless.
    pub unit: Option<String>,
}

/// What the residual of a fit measures (the fit's objective).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ResidualKind {
    /// r = ln(ε_f,model(η_avg, θ̄_avg) / ε_f,test): the model at the specimen's averages.
    LogRatio,
    /// r = −ln D, D the linear damage at the test's fracture instant along the specimen's path
    /// (Johnson & Cook 1985); the model's ε_f is ε̄p where D reaches 1 on the path, undefined
    /// where D stays below 1 up to the test's fracture. On a proportional path −ln D equals the
    /// log ratio.
    Damage,
}

/// The fit residual of one specimen.
#[derive(Debug, Clone, PartialEq)]
pub struct ResidualRow {
    /// Specimen name.
    pub specimen: String,
    /// Test fracture strain ε_f (dimensionless).
    pub eqps_test: f64,
    /// Model fracture strain; `None` where the model is undefined (see [`ResidualKind`]).
    pub eqps_model: Option<f64>,
    /// Residual r (dimensionless, see [`ResidualKind`]); `None` where undefined.
    pub log_residual: Option<f64>,
}

/// The damage check.
#[derive(Debug, Clone, PartialEq)]
pub struct DamageSection {
    /// The accumulation rule in words, e.g. `linear: D = ∫ dε̄p / ε_f(η, θ̄)`.
    pub rule: String,
    /// One row per specimen.
    pub rows: Vec<DamageRow>,
}

/// The damage check of one specimen.
#[derive(Debug, Clone, PartialEq)]
pub struct DamageRow {
    /// Specimen name.
    pub specimen: String,
    /// D at the measured fracture instant (dimensionless; 1 means the model fails the
    /// specimen exactly when the test did).
    pub damage_at_fracture: Option<f64>,
    /// Gauge elongation where D reaches 1, mm; `None` when D stays below 1.
    pub gauge_predicted: Option<f64>,
    /// Gauge elongation at fracture measured in the test, mm.
    pub gauge_measured: Option<f64>,
}

impl DamageRow {
    /// Predicted − measured gauge elongation, mm.
    pub fn difference(&self) -> Option<f64> {
        Some(self.gauge_predicted? - self.gauge_measured?).filter(|d| d.is_finite())
    }

    /// [`DamageRow::difference`] as a percentage of the measured value; `None` when the
    /// measured value is zero or missing.
    pub fn difference_percent(&self) -> Option<f64> {
        let m = self.gauge_measured?;
        if m == 0.0 {
            return None;
        }
        Some(100.0 * self.difference()? / m).filter(|p| p.is_finite())
    }
}

/// The charts of the report (each rendered SVG is embedded inline).
#[derive(Debug, Clone, PartialEq, Default)]
pub struct ReportCharts {
    /// [`crate::state_plane_chart`] of all specimens.
    pub state_plane: Option<Chart>,
    /// [`crate::locus_chart`] of the fitted model.
    pub locus: Option<Chart>,
    /// [`crate::damage_chart`].
    pub damage: Option<Chart>,
    /// One [`crate::path_chart`] per specimen.
    pub paths: Vec<Chart>,
}

/// Provenance printed at the foot of the report.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Footer {
    /// ductrace version, e.g. `0.1.0`.
    pub version: String,
    /// When the report was generated, as the caller formats it (e.g. RFC 3339, UTC).
    pub generated: String,
    /// The command line that reproduces the report.
    pub command: String,
}

/// The caution shown at the top of every report.
pub const CAUTION: [&str; 6] = [
    "These results feed fracture predictions, and a wrong fracture prediction can hurt people.",
    "A calibration is only as good as the tests behind it, the mesh of each simulation and \
     the choice of the critical point; another reasonable choice gives other numbers.",
    "The averages η_avg and θ̄_avg reduce a whole loading path to two numbers and hide how far \
     it was from proportional: read the path charts before trusting a point.",
    "Once strain localises, the simulated strains depend on the element size: ε_f from a finer \
     or coarser mesh will differ.",
    "Validate any calibrated model against tests it was not fitted to before relying on it.",
    "Local codes, standards and licensed engineering practice govern any use in design; this \
     report does not replace them.",
];

/// The notice shown when [`ReportData::invented`] is true.
pub const INVENTED_NOTICE: &str = "INVENTED DEMONSTRATION: the material, specimens and test \
     results in this report are fictitious. They describe no real material and must not be \
     used in any calculation.";

const CSS: &str = r#"
:root { --ink:#22262b; --muted:#5d646c; --line:#d3d7dc; --soft:#f4f6f8; --accent:#1e5aa8;
  --warn-bg:#fff6e5; --warn-line:#d98a1a; --inv-bg:#8e2650; }
* { box-sizing: border-box; }
html { background:#eef1f4; }
body { margin:0 auto; max-width:1120px; padding:28px 36px 40px; background:#fff; color:var(--ink);
  font:15px/1.55 "DejaVu Sans", "Noto Sans", "Liberation Sans", Arial, sans-serif; }
header h1 { font-size:27px; line-height:1.25; margin:6px 0 4px; }
header .sub { color:var(--muted); margin:0 0 18px; }
h2 { font-size:19px; margin:34px 0 10px; padding-bottom:5px; border-bottom:2px solid var(--line); }
h3 { font-size:16px; margin:20px 0 8px; }
p { margin:8px 0; max-width:82ch; }
.caution { border:1px solid var(--warn-line); border-left:8px solid var(--warn-line);
  background:var(--warn-bg); padding:12px 18px 10px; border-radius:4px; margin:10px 0 14px; }
.caution h2 { border:0; margin:0 0 4px; padding:0; font-size:17px; }
.caution ul { margin:4px 0 4px 0; padding-left:20px; }
.caution li { margin:3px 0; }
.invented { background:var(--inv-bg); color:#fff; font-weight:bold; padding:9px 16px;
  border-radius:4px; margin:10px 0; letter-spacing:0.01em; }
.scroll { overflow-x:auto; }
table { border-collapse:collapse; margin:8px 0 6px; font-variant-numeric:tabular-nums; }
th, td { padding:6px 11px; border-bottom:1px solid var(--line); }
th { background:var(--soft); text-align:center; vertical-align:bottom; font-weight:bold; }
th small { display:block; font-weight:normal; color:var(--muted); font-size:12px; }
td { text-align:right; white-space:nowrap; }
td.name, th.name { text-align:left; }
tbody tr:nth-child(even) td { background:#fafbfc; }
.undef { color:var(--muted); }
.bad { color:#8e2650; font-weight:bold; }
.kv { display:grid; grid-template-columns:max-content 1fr; gap:3px 18px; margin:8px 0; }
.kv dt { color:var(--muted); }
.kv dd { margin:0; }
.none { color:var(--muted); font-style:italic; }
.note { color:var(--muted); font-size:0.92em; max-width:46em; }
figure { margin:18px 0; }
figure svg { display:block; width:100%; height:auto; max-width:880px; border:1px solid var(--line);
  border-radius:4px; }
figcaption { color:var(--muted); font-size:13px; margin-top:4px; }
footer { margin-top:38px; padding-top:10px; border-top:2px solid var(--line); color:var(--muted);
  font-size:13px; }
footer code { display:block; margin:4px 0 8px; font-size:12.5px; background:var(--soft);
  padding:6px 9px; border-radius:3px; white-space:pre-wrap; overflow-wrap:anywhere; color:var(--ink); }
@media print { html { background:#fff; } body { padding:0; } figure, table { break-inside:avoid; } }
"#;

/// The report as one self-contained HTML5 document.
pub fn render(data: &ReportData) -> String {
    let mut h = String::with_capacity(64 * 1024 + charts_len(&data.charts));
    let title = esc(&data.title);
    let _ = write!(
        h,
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n\
         <meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n\
         <meta name=\"generator\" content=\"ductrace {}\">\n<title>{title}</title>\n<style>{CSS}</style>\n</head>\n<body>\n",
        esc(&data.footer.version)
    );
    header(&mut h, data, &title);
    job(&mut h, data);
    table(&mut h, &data.table);
    fit(&mut h, data.fit.as_ref());
    damage(&mut h, data.damage.as_ref());
    charts(&mut h, &data.charts);
    footer(&mut h, &data.footer);
    h.push_str("</body>\n</html>\n");
    h
}

fn charts_len(c: &ReportCharts) -> usize {
    [&c.state_plane, &c.locus, &c.damage]
        .into_iter()
        .flatten()
        .chain(&c.paths)
        .map(|c| c.svg.len())
        .sum()
}

fn header(h: &mut String, data: &ReportData, title: &str) {
    let _ = write!(
        h,
        "<header>\n<h1>{title}</h1>\n<p class=\"sub\">Ductile-fracture calibration report · {} specimen{}</p>\n",
        data.table.len(),
        if data.table.len() == 1 { "" } else { "s" }
    );
    if data.invented {
        let _ = writeln!(
            h,
            "<div class=\"invented\" role=\"note\">{}</div>",
            esc(INVENTED_NOTICE)
        );
    }
    h.push_str("<section class=\"caution\" id=\"caution\" aria-label=\"caution\">\n<h2>Read this before using any number below</h2>\n<ul>\n");
    for line in CAUTION {
        let _ = writeln!(h, "<li>{}</li>", esc(line));
    }
    h.push_str("</ul>\n</section>\n</header>\n");
}

fn job(h: &mut String, data: &ReportData) {
    let j = &data.job;
    let n = data.table.len();
    let material = j
        .material
        .as_ref()
        .map(|m| format!(" of {}", esc(m)))
        .unwrap_or_default();
    let or_unstated = |s: &str| {
        if s.trim().is_empty() {
            "not stated".to_string()
        } else {
            esc(s)
        }
    };
    let _ = write!(
        h,
        "<section id=\"job\">\n<h2>1. The job</h2>\n<p>For each of the {n} specimen{}{material}, ductrace read the \
         finite-element results ({}), followed the critical point ({}) through the output increments and \
         recorded the triaxiality η = σ<sub>h</sub>/σ<sub>vm</sub>, the Lode angle parameter \
         θ̄ = 1 − (2/π) arccos ξ with ξ = (27/2) J<sub>3</sub>/σ<sub>vm</sub><sup>3</sup>, and the equivalent \
         plastic strain ε̄<sub>p</sub>. Stresses are Cauchy stresses, tension positive; σ<sub>h</sub> is the \
         mean stress. Each history stops at the fracture instant ({}), where ε<sub>f</sub> is ε̄<sub>p</sub> \
         and η<sub>f</sub>, θ̄<sub>f</sub> are the values at that instant. The averages are \
         η<sub>avg</sub> = (1/ε<sub>f</sub>) ∫ η dε̄<sub>p</sub> and θ̄<sub>avg</sub> = \
         (1/ε<sub>f</sub>) ∫ θ̄ dε̄<sub>p</sub> from zero to ε<sub>f</sub>, by the trapezoid rule over the \
         output increments.{}{}</p>\n",
        if n == 1 { "" } else { "s" },
        or_unstated(&j.results),
        or_unstated(&j.critical_point),
        or_unstated(&j.fracture_instant),
        data.fit
            .as_ref()
            .map(|f| format!(
                " A {} locus was fitted to the calibration points.",
                esc(&f.model)
            ))
            .unwrap_or_default(),
        if data.damage.is_some() {
            " The fitted locus was then integrated along each path as a damage check."
        } else {
            ""
        },
    );
    if !j.notes.is_empty() {
        h.push_str("<ul>\n");
        for note in &j.notes {
            let _ = writeln!(h, "<li>{}</li>", esc(note));
        }
        h.push_str("</ul>\n");
    }
    h.push_str("</section>\n");
}

/// A table cell with a formatted number (class `undef` for "—").
fn num(text: String) -> String {
    if text == UNDEFINED {
        format!("<td class=\"undef\">{UNDEFINED}</td>")
    } else {
        format!("<td>{}</td>", esc(&text))
    }
}

fn table(h: &mut String, rows: &[TableRow]) {
    h.push_str("<section id=\"table\">\n<h2>2. Calibration table</h2>\n");
    if rows.is_empty() {
        h.push_str("<p class=\"none\">No calibration points.</p>\n</section>\n");
        return;
    }
    h.push_str(
        "<div class=\"scroll\">\n<table class=\"calibration\">\n<thead>\n<tr>\
         <th class=\"name\">specimen</th>\
         <th>ε<sub>f</sub><small>fracture strain</small></th>\
         <th>η<sub>avg</sub><small>average triaxiality</small></th>\
         <th>θ̄<sub>avg</sub><small>average Lode angle param.</small></th>\
         <th>η<sub>f</sub><small>at fracture</small></th>\
         <th>θ̄<sub>f</sub><small>at fracture</small></th>\
         <th>η<sub>Bridgman</sub><small>initial, notch centre</small></th>\
         <th>ε<sub>f,area</sub><small>from broken section</small></th>\
         <th>stop<small>increment</small></th></tr>\n</thead>\n<tbody>\n",
    );
    for r in rows {
        let _ = writeln!(
            h,
            "<tr data-specimen=\"{0}\"><td class=\"name\">{0}</td>{1}{2}{3}{4}{5}{6}{7}{8}</tr>",
            esc(&r.specimen),
            num(significant(r.eqps_f, 3)),
            num(significant_opt(r.triaxiality_avg, 3)),
            num(significant_opt(r.lode_angle_param_avg, 3)),
            num(significant_opt(r.triaxiality_f, 3)),
            num(significant_opt(r.lode_angle_param_f, 3)),
            num(significant_opt(r.bridgman_triaxiality, 3)),
            num(significant_opt(r.eqps_f_area, 3)),
            num(fixed(r.stop_increment, 2)),
        );
    }
    h.push_str("</tbody>\n</table>\n</div>\n</section>\n");
}

fn fit(h: &mut String, fit: Option<&FitSection>) {
    h.push_str("<section id=\"fit\">\n<h2>3. Locus fit</h2>\n");
    let Some(f) = fit else {
        h.push_str("<p class=\"none\">No fit in this report.</p>\n</section>\n");
        return;
    };
    let _ = writeln!(
        h,
        "<dl class=\"kv\"><dt>model</dt><dd>{}</dd><dt>objective</dt><dd>{}</dd>\
         <dt>RMS log residual</dt><dd>{}</dd><dt>termination</dt><dd>{}{}</dd></dl>",
        esc(&f.model),
        esc(&f.objective),
        esc(&significant(f.rms_log_residual, 3)),
        esc(&f.termination),
        if f.converged {
            String::new()
        } else {
            " <span class=\"bad\">(not converged: do not use these parameters)</span>".to_string()
        }
    );
    h.push_str(
        "<h3>Parameters</h3>\n<div class=\"scroll\">\n<table class=\"parameters\">\n<thead>\n<tr>\
         <th class=\"name\">parameter</th><th>value</th><th>standard error</th><th class=\"name\">unit</th>\
         <th class=\"name\">status</th></tr>\n</thead>\n<tbody>\n",
    );
    for p in &f.parameters {
        let se = match p.standard_error {
            Some(se) => format!("± {}", significant(se, 2)),
            None => UNDEFINED.to_string(),
        };
        let _ = writeln!(
            h,
            "<tr><td class=\"name\">{}</td>{}{}<td class=\"name\">{}</td><td class=\"name\">{}</td></tr>",
            esc(&p.name),
            num(significant(p.value, 4)),
            num(se),
            p.unit.as_deref().map_or_else(|| "—".to_string(), esc),
            if p.fixed { "fixed" } else { "fitted" }
        );
    }
    h.push_str("</tbody>\n</table>\n</div>\n");
    let r_label = match f.residual_kind {
        ResidualKind::LogRatio => "ln(model/test)",
        ResidualKind::Damage => "−ln D at fracture",
    };
    let _ = write!(
        h,
        "<h3>Residual per specimen</h3>\n<div class=\"scroll\">\n<table class=\"residuals\">\n<thead>\n<tr>\
         <th class=\"name\">specimen</th><th>ε<sub>f</sub><small>test</small></th>\
         <th>ε<sub>f</sub><small>model</small></th><th>r<small>{r_label}</small></th>\
         <th>model/test − 1<small>%</small></th></tr>\n</thead>\n<tbody>\n",
    );
    for r in &f.residuals {
        let pct = r
            .eqps_model
            .filter(|_| r.eqps_test != 0.0)
            .map(|m| 100.0 * (m / r.eqps_test - 1.0))
            .filter(|p| p.is_finite());
        let _ = writeln!(
            h,
            "<tr><td class=\"name\">{}</td>{}{}{}{}</tr>",
            esc(&r.specimen),
            num(significant(r.eqps_test, 3)),
            num(significant_opt(r.eqps_model, 3)),
            num(significant_opt(r.log_residual, 2)),
            num(pct.map_or_else(|| UNDEFINED.to_string(), |p| fixed(p, 1))),
        );
    }
    h.push_str("</tbody>\n</table>\n</div>\n");
    if f.residual_kind == ResidualKind::Damage {
        h.push_str(
            "<p class=\"note\">Damage objective: r = −ln D, D the linear damage at the test's \
             fracture instant along the specimen's path; ε<sub>f</sub> model is ε̄<sub>p</sub> where \
             D reaches 1 on the path, and — where D stays below 1 up to the test's fracture (the \
             model predicts fracture later than the test). On a proportional path −ln D equals \
             ln(model/test).</p>\n",
        );
    }
    h.push_str("</section>\n");
}

fn damage(h: &mut String, d: Option<&DamageSection>) {
    h.push_str("<section id=\"damage\">\n<h2>4. Damage check</h2>\n");
    let Some(d) = d else {
        h.push_str("<p class=\"none\">No damage check in this report.</p>\n</section>\n");
        return;
    };
    let _ = writeln!(
        h,
        "<p>Rule: {}. A specimen checks out when D reaches 1 near its measured fracture: the table \
         compares the gauge elongation at D = 1 with the test.</p>",
        esc(&d.rule)
    );
    h.push_str(
        "<div class=\"scroll\">\n<table class=\"damage\">\n<thead>\n<tr>\
         <th class=\"name\">specimen</th><th>D<small>at measured fracture</small></th>\
         <th>gauge at D = 1<small>mm</small></th><th>gauge measured<small>mm</small></th>\
         <th>difference<small>mm</small></th><th>difference<small>% of measured</small></th>\
         </tr>\n</thead>\n<tbody>\n",
    );
    for r in &d.rows {
        let _ = writeln!(
            h,
            "<tr><td class=\"name\">{}</td>{}{}{}{}{}</tr>",
            esc(&r.specimen),
            num(significant_opt(r.damage_at_fracture, 3)),
            num(significant_opt(r.gauge_predicted, 3)),
            num(significant_opt(r.gauge_measured, 3)),
            num(significant_opt(r.difference(), 2)),
            num(r
                .difference_percent()
                .map_or_else(|| UNDEFINED.to_string(), |p| fixed(p, 1))),
        );
    }
    h.push_str("</tbody>\n</table>\n</div>\n</section>\n");
}

/// The chart's SVG with an accessible name, ready to inline.
fn inline_svg(chart: &Chart) -> String {
    let label = esc(&chart.title());
    match chart.svg.find("<svg") {
        Some(at) => {
            let mut s = String::with_capacity(chart.svg.len() + label.len() + 32);
            s.push_str(&chart.svg[at..at + 4]);
            let _ = write!(s, " role=\"img\" aria-label=\"{label}\"");
            s.push_str(&chart.svg[at + 4..]);
            s
        }
        None => String::new(),
    }
}

fn figure(h: &mut String, chart: &Chart, caption: &str) {
    let _ = write!(
        h,
        "<figure>\n{}\n<figcaption>{}</figcaption>\n</figure>\n",
        inline_svg(chart),
        esc(caption)
    );
}

fn charts(h: &mut String, c: &ReportCharts) {
    h.push_str("<section id=\"charts\">\n<h2>5. Charts</h2>\n");
    let mut any = false;
    if let Some(ch) = &c.state_plane {
        any = true;
        figure(
            h,
            ch,
            "Paths of the critical points in the (η, θ̄) plane; large markers: averages. \
             Dashed: the plane-stress curve (σ3 = 0).",
        );
    }
    if let Some(ch) = &c.locus {
        any = true;
        figure(
            h,
            ch,
            "Fracture strain against triaxiality: model curves and calibration points.",
        );
    }
    if let Some(ch) = &c.damage {
        any = true;
        figure(
            h,
            ch,
            "Damage against gauge elongation; dashed verticals: measured fracture of each test.",
        );
    }
    if !c.paths.is_empty() {
        any = true;
        h.push_str("<h3>Paths per specimen</h3>\n");
        for ch in &c.paths {
            figure(
                h,
                ch,
                &format!("{}: η and θ̄ against ε̄p at the critical point.", ch.title()),
            );
        }
    }
    if !any {
        h.push_str("<p class=\"none\">No charts in this report.</p>\n");
    }
    h.push_str("</section>\n");
}

fn footer(h: &mut String, f: &Footer) {
    let _ = write!(
        h,
        "<footer>\n<p>ductrace {} · generated {} · reproduce with:</p>\n<code>{}</code>\n\
         <p>Self-contained file: no script, no external resources.</p>\n</footer>\n",
        esc(&f.version),
        esc(&f.generated),
        esc(&f.command)
    );
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn damage_differences() {
        let r = DamageRow {
            specimen: "a".into(),
            damage_at_fracture: Some(0.9),
            gauge_predicted: Some(2.2),
            gauge_measured: Some(2.0),
        };
        assert!((r.difference().unwrap() - 0.2).abs() < 1e-12);
        assert!((r.difference_percent().unwrap() - 10.0).abs() < 1e-9);
        let none = DamageRow {
            gauge_measured: Some(0.0),
            ..r.clone()
        };
        assert_eq!(none.difference_percent(), None);
        let missing = DamageRow {
            gauge_predicted: None,
            ..r
        };
        assert_eq!(missing.difference(), None);
    }
}
