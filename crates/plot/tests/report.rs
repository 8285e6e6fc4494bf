//! The HTML report: caution, invented-data notice, specimen rows, inline SVG, no external
//! asset, escaping, undefined cells, and balanced tags (a small stack checker of the HTML
//! syntax rules: void elements and `/>` close themselves, everything else needs its end tag).
#![allow(clippy::unwrap_used)] // tests may unwrap

use ductrace_plot::report::{
    CAUTION, DamageRow, DamageSection, FitSection, Footer, INVENTED_NOTICE, JobSection,
    ParameterRow, ReportCharts, ReportData, ResidualKind, ResidualRow, TableRow, render,
};
use ductrace_plot::{NamedPath, PathData, path_chart, state_plane_chart};

const NAMES: [&str; 3] = ["bar R10 <x>", "plate & groove", "shear \"S1\""];

fn path(name: &str) -> PathData {
    PathData {
        name: name.into(),
        eqps: vec![0.0, 0.2, 0.4],
        triaxiality: vec![None, Some(0.5), Some(0.6)],
        lode_angle_param: vec![None, Some(0.9), Some(0.8)],
        triaxiality_avg: Some(0.55),
        lode_angle_param_avg: Some(0.85),
        eqps_f: 0.4,
    }
}

fn data(invented: bool) -> ReportData {
    let paths: Vec<PathData> = NAMES.iter().map(|n| path(n)).collect();
    ReportData {
        title: "Campaign <T> & co".into(),
        invented,
        job: JobSection {
            material: Some("test alloy".into()),
            results: "VTU series".into(),
            critical_point: "largest ε̄p".into(),
            fracture_instant: "force drop".into(),
            notes: vec!["note one".into()],
        },
        table: NAMES
            .iter()
            .enumerate()
            .map(|(i, n)| TableRow {
                specimen: (*n).into(),
                eqps_f: 0.4 + 0.1 * i as f64,
                triaxiality_avg: Some(0.55),
                lode_angle_param_avg: (i != 1).then_some(0.85),
                triaxiality_f: Some(0.6),
                lode_angle_param_f: Some(0.8),
                bridgman_triaxiality: None,
                eqps_f_area: Some(0.38),
                stop_increment: 12.5,
            })
            .collect(),
        fit: Some(FitSection {
            model: "test model".into(),
            objective: "log ratio".into(),
            residual_kind: ResidualKind::LogRatio,
            parameters: vec![
                ParameterRow {
                    name: "c1".into(),
                    value: 0.12345,
                    standard_error: Some(0.01),
                    fixed: false,
                    unit: None,
                },
                ParameterRow {
                    name: "n".into(),
                    value: 0.1,
                    standard_error: None,
                    fixed: true,
                    unit: None,
                },
            ],
            residuals: NAMES
                .iter()
                .map(|n| ResidualRow {
                    specimen: (*n).into(),
                    eqps_test: 0.4,
                    eqps_model: Some(0.44),
                    log_residual: Some(0.0953),
                })
                .collect(),
            rms_log_residual: 0.0953,
            termination: "converged".into(),
            converged: true,
        }),
        damage: Some(DamageSection {
            rule: "linear".into(),
            rows: NAMES
                .iter()
                .map(|n| DamageRow {
                    specimen: (*n).into(),
                    damage_at_fracture: Some(0.97),
                    gauge_predicted: Some(2.1),
                    gauge_measured: Some(2.0),
                })
                .collect(),
        }),
        charts: ReportCharts {
            state_plane: Some(
                state_plane_chart(&paths.iter().map(NamedPath::from).collect::<Vec<_>>()).unwrap(),
            ),
            locus: None,
            damage: None,
            paths: paths.iter().map(|p| path_chart(p).unwrap()).collect(),
        },
        footer: Footer {
            version: "9.9.9".into(),
            generated: "2026-01-01T00:00:00Z".into(),
            command: "ductrace report study.toml --out r.html".into(),
        },
    }
}

/// Checks that every element opened is closed in order; returns the first problem.
fn balanced(html: &str) -> Result<(), String> {
    const VOID: [&str; 8] = ["meta", "br", "hr", "img", "link", "input", "col", "wbr"];
    let mut stack: Vec<String> = Vec::new();
    let mut rest = html;
    while let Some(start) = rest.find('<') {
        rest = &rest[start..];
        let end = rest.find('>').ok_or("unterminated tag")?;
        let tag = &rest[1..end];
        rest = &rest[end + 1..];
        if tag.starts_with('!') || tag.starts_with('?') {
            continue;
        }
        if let Some(name) = tag.strip_prefix('/') {
            let name = name.trim().to_ascii_lowercase();
            match stack.pop() {
                Some(open) if open == name => {}
                other => return Err(format!("</{name}> closes {other:?}")),
            }
            continue;
        }
        let name: String = tag
            .split(|c: char| c.is_whitespace() || c == '/')
            .next()
            .unwrap_or("")
            .to_ascii_lowercase();
        if tag.ends_with('/') || VOID.contains(&name.as_str()) {
            continue;
        }
        if name == "style" {
            // CSS holds no '<'; skip to the end tag.
            let close = rest.find("</style>").ok_or("unclosed style")?;
            rest = &rest[close + "</style>".len()..];
            continue;
        }
        stack.push(name);
    }
    if stack.is_empty() {
        Ok(())
    } else {
        Err(format!("unclosed: {stack:?}"))
    }
}

#[test]
fn holds_caution_names_rows_and_inline_svg() {
    let html = render(&data(true));
    assert!(html.starts_with("<!DOCTYPE html>"));
    for line in CAUTION {
        let escaped = line.replace('&', "&amp;");
        assert!(html.contains(&escaped), "caution line missing: {line}");
    }
    assert!(html.contains("licensed engineering practice"));
    assert!(html.contains(INVENTED_NOTICE));
    for n in NAMES {
        let e = ductrace_plot::format::escape_html(n);
        assert!(
            html.contains(&format!("<tr data-specimen=\"{e}\">")),
            "row of {n}"
        );
        assert!(
            html.matches(&e).count() >= 4,
            "{n} appears in table, fit, damage and charts"
        );
    }
    assert_eq!(html.matches("<tr data-specimen=").count(), NAMES.len());
    assert!(html.contains("<svg"));
    assert_eq!(html.matches("<svg").count(), 1 + NAMES.len());
    assert!(html.contains("ductrace 9.9.9"));
    assert!(html.contains("ductrace report study.toml --out r.html"));
    assert!(html.contains("2026-01-01T00:00:00Z"));
}

#[test]
fn invented_notice_only_for_invented_data() {
    assert!(!render(&data(false)).contains(INVENTED_NOTICE));
}

#[test]
fn strings_are_escaped() {
    let html = render(&data(true));
    assert!(html.contains("<title>Campaign &lt;T&gt; &amp; co</title>"));
    assert!(!html.contains("bar R10 <x>"));
    assert!(!html.contains("<T>"));
}

#[test]
fn undefined_cells_show_a_dash() {
    let html = render(&data(true));
    // Bridgman η is None in every row; θ̄_avg is None in the second.
    let start = html.find("<table class=\"calibration\">").unwrap();
    let end = start + html[start..].find("</table>").unwrap();
    let cells = html[start..end]
        .matches("<td class=\"undef\">—</td>")
        .count();
    assert_eq!(cells, NAMES.len() + 1);
}

#[test]
fn no_external_assets_or_scripts() {
    let html = render(&data(true));
    let without_ns = html.replace("xmlns=\"http://www.w3.org/2000/svg\"", "");
    assert!(!without_ns.contains("http://"));
    assert!(!without_ns.contains("https://"));
    assert!(!html.contains("<script"));
    assert!(!html.contains("<link"));
    assert!(!html.contains(" src="));
}

#[test]
fn tags_are_balanced_and_sections_closed() {
    for d in [data(true), {
        let mut d = data(false);
        d.fit = None;
        d.damage = None;
        d.charts = ReportCharts::default();
        d.table.clear();
        d
    }] {
        let html = render(&d);
        balanced(&html).unwrap();
        assert_eq!(
            html.matches("<section").count(),
            html.matches("</section>").count()
        );
        assert_eq!(html.matches("<section").count(), 6);
        assert!(html.trim_end().ends_with("</html>"));
    }
}

#[test]
fn the_checker_itself_catches_errors() {
    assert!(balanced("<p><b>x</p></b>").is_err());
    assert!(balanced("<section><p>x</p>").is_err());
    assert!(balanced("<p>x<br></p><svg><line/></svg>").is_ok());
}

#[test]
fn fit_marks_fixed_parameters_and_non_convergence() {
    let mut d = data(true);
    let html = render(&d);
    assert!(html.contains("<td class=\"name\">fixed</td>"));
    assert!(html.contains("± 0.010"));
    assert!(html.contains("0.1235"));
    if let Some(f) = d.fit.as_mut() {
        f.converged = false;
    }
    assert!(render(&d).contains("not converged"));
}

#[test]
fn the_residual_column_says_what_the_objective_measured() {
    let mut d = data(true);
    let html = render(&d);
    assert!(html.contains("<small>ln(model/test)</small>"));
    assert!(!html.contains("Damage objective"));
    if let Some(f) = d.fit.as_mut() {
        f.residual_kind = ResidualKind::Damage;
    }
    let html = render(&d);
    assert!(html.contains("<small>−ln D at fracture</small>"), "header");
    assert!(html.contains("Damage objective: r = −ln D"), "note");
    balanced(&html).unwrap();
}

#[test]
fn damage_difference_in_mm_and_percent() {
    let html = render(&data(true));
    // 2.1 − 2.0 = 0.10 mm, 5.0 % of 2.0 mm.
    assert!(
        html.contains("<td>0.10</td><td>5.0</td>"),
        "difference cells"
    );
}
