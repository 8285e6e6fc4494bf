//! Chart rendering: titles and axis labels in the SVG, PNG signature and size (decoded by the
//! `image` crate, an independent PNG reader), typed errors for NaN, "no data" notes for
//! empty inputs, and no panic for any finite input (proptest).
#![allow(clippy::unwrap_used)] // tests may unwrap

use ductrace_plot::{
    Chart, DamageSeries, LocusChartData, LocusCurve, LocusPoint, NamedPath, PathData, PlotError,
    damage_chart, locus_chart, path_chart, state_plane_chart,
};
use proptest::prelude::*;

fn path(name: &str) -> PathData {
    let eqps: Vec<f64> = (0..=20).map(|k| 0.03 * f64::from(k)).collect();
    PathData {
        name: name.into(),
        triaxiality: eqps
            .iter()
            .enumerate()
            .map(|(k, e)| (k > 0).then_some(0.5 + 0.3 * e))
            .collect(),
        lode_angle_param: eqps
            .iter()
            .enumerate()
            .map(|(k, e)| (k > 0).then_some(0.9 - 0.2 * e))
            .collect(),
        eqps,
        triaxiality_avg: Some(0.58),
        lode_angle_param_avg: Some(0.85),
        eqps_f: 0.6,
    }
}

fn locus() -> LocusChartData {
    LocusChartData {
        title: "Fracture locus check".into(),
        curves: vec![LocusCurve {
            label: "θ̄ = 0".into(),
            points: (0..=50)
                .map(|k| {
                    let eta = -0.2 + 0.03 * f64::from(k);
                    (eta, 1.5 * (-1.4 * eta).exp())
                })
                .collect(),
        }],
        points: vec![LocusPoint {
            label: "plate A".into(),
            triaxiality: 0.6,
            eqps_f: 0.65,
            triaxiality_band: Some((0.55, 0.66)),
            eqps_f_band: Some((0.6, 0.7)),
        }],
    }
}

fn damage() -> Vec<DamageSeries> {
    vec![DamageSeries {
        label: "bar B".into(),
        points: (0..=30)
            .map(|k| (0.1 * f64::from(k), (0.1 * f64::from(k) / 2.5).powf(1.5)))
            .collect(),
        measured_gauge_f: Some(2.4),
    }]
}

/// Every chart with the strings its SVG must hold (title and both axis labels).
fn all_charts() -> Vec<(Chart, Vec<&'static str>)> {
    vec![
        (
            path_chart(&path("bar R4 check")).unwrap(),
            vec![
                "bar R4 check",
                "ε̄p (equivalent plastic strain)",
                "η (triaxiality)",
                "θ̄ (Lode angle parameter)",
            ],
        ),
        (
            state_plane_chart(&[NamedPath::from(&path("bar R4 check"))]).unwrap(),
            vec![
                "Stress-state paths",
                "η (triaxiality)",
                "θ̄ (Lode angle parameter)",
                "uniaxial tension",
                "bar R4 check",
            ],
        ),
        (
            locus_chart(&locus()).unwrap(),
            vec![
                "Fracture locus check",
                "η (triaxiality)",
                "ε_f (fracture strain)",
                "plate A",
                "θ̄ = 0",
            ],
        ),
        (
            damage_chart(&damage()).unwrap(),
            vec![
                "Damage check",
                "gauge elongation (mm)",
                "D (damage)",
                "bar B",
            ],
        ),
    ]
}

#[test]
fn svg_holds_title_axis_labels_and_legend() {
    for (chart, needles) in all_charts() {
        assert!(chart.svg.starts_with("<svg"), "{}", &chart.svg[..40]);
        assert!(chart.svg.trim_end().ends_with("</svg>"));
        for n in needles {
            assert!(
                chart.svg.contains(n),
                "{:?} missing from chart {:?}",
                n,
                chart.title()
            );
        }
    }
}

#[test]
fn png_has_signature_and_requested_size() {
    for (chart, _) in all_charts() {
        for (w, h) in [(800, 520), (640, 400), (1200, 780)] {
            let png = chart.png(w, h).unwrap();
            assert!(png.starts_with(&[0x89, b'P', b'N', b'G', 0x0D, 0x0A, 0x1A, 0x0A]));
            let img = image::load_from_memory(&png).unwrap();
            assert_eq!((img.width(), img.height()), (w, h), "{}", chart.title());
        }
    }
}

#[test]
fn png_is_not_blank() {
    let png = path_chart(&path("ink")).unwrap().png(800, 520).unwrap();
    let img = image::load_from_memory(&png).unwrap().to_rgb8();
    let dark = img
        .pixels()
        .filter(|p| p.0.iter().all(|&c| c < 100))
        .count();
    // Title, ticks, labels and axes leave well over a thousand dark pixels.
    assert!(dark > 1000, "only {dark} dark pixels");
}

#[test]
fn svg_at_another_size() {
    let chart = damage_chart(&damage()).unwrap();
    let svg = chart.svg_sized(1000, 650).unwrap();
    assert!(svg.contains("viewBox=\"0 0 1000 650\""));
    assert!(chart.svg.contains("viewBox=\"0 0 800 520\""));
}

#[test]
fn bad_sizes_are_errors() {
    let chart = damage_chart(&damage()).unwrap();
    assert!(matches!(chart.png(0, 520), Err(PlotError::Size { .. })));
    assert!(matches!(
        chart.png(800, 100_000),
        Err(PlotError::Size { .. })
    ));
    assert!(matches!(
        chart.svg_sized(10, 10),
        Err(PlotError::Size { .. })
    ));
}

#[test]
fn nan_and_infinity_are_errors_naming_the_series() {
    let mut p = path("bar N");
    p.triaxiality[3] = Some(f64::NAN);
    let e = path_chart(&p).unwrap_err();
    assert!(
        matches!(e, PlotError::NonFinite { index: Some(3), .. }),
        "{e}"
    );
    assert!(e.to_string().contains("triaxiality"), "{e}");

    let mut l = locus();
    l.points[0].eqps_f = f64::INFINITY;
    assert!(matches!(locus_chart(&l), Err(PlotError::NonFinite { .. })));
    let mut l = locus();
    l.curves[0].points[4].1 = f64::NAN;
    assert!(
        locus_chart(&l)
            .unwrap_err()
            .to_string()
            .contains("locus curve")
    );

    let mut d = damage();
    d[0].measured_gauge_f = Some(f64::NAN);
    assert!(matches!(damage_chart(&d), Err(PlotError::NonFinite { .. })));

    let mut n = NamedPath::from(&path("bar N"));
    n.lode_angle_param_avg = Some(f64::NEG_INFINITY);
    assert!(matches!(
        state_plane_chart(&[n]),
        Err(PlotError::NonFinite { .. })
    ));

    let mut p = path("bar huge");
    p.eqps_f = 1e300;
    assert!(matches!(path_chart(&p), Err(PlotError::OutOfRange { .. })));
}

#[test]
fn empty_inputs_give_a_note_not_an_error() {
    let empty_path = PathData {
        name: "empty".into(),
        eqps: vec![],
        triaxiality: vec![],
        lode_angle_param: vec![],
        triaxiality_avg: None,
        lode_angle_param_avg: None,
        eqps_f: 0.0,
    };
    let charts = [
        path_chart(&empty_path).unwrap(),
        state_plane_chart(&[]).unwrap(),
        locus_chart(&LocusChartData {
            title: "empty locus".into(),
            curves: vec![],
            points: vec![],
        })
        .unwrap(),
        damage_chart(&[]).unwrap(),
    ];
    for c in &charts {
        assert!(c.svg.contains("no "), "{}: no note", c.title());
        assert!(c.png(400, 260).unwrap().starts_with(b"\x89PNG"));
    }
    // A path with every value undefined also gets the note.
    let mut gaps = path("all gaps");
    gaps.triaxiality.iter_mut().for_each(|v| *v = None);
    gaps.lode_angle_param.iter_mut().for_each(|v| *v = None);
    assert!(
        path_chart(&gaps)
            .unwrap()
            .svg
            .contains("no defined η or θ̄ values to plot")
    );
}

#[test]
fn text_is_escaped_in_svg() {
    let mut p = path("a < b & \"c\"");
    p.name = "a < b & \"c\"".into();
    let svg = path_chart(&p).unwrap().svg;
    assert!(svg.contains("a &lt; b &amp; &quot;c&quot;"));
    assert!(!svg.contains("a < b"));
}

#[test]
fn fonts_initialise_once() {
    assert_eq!(ductrace_plot::init_fonts(), Ok(()));
    assert_eq!(ductrace_plot::init_fonts(), Ok(()));
}

fn finite() -> impl Strategy<Value = f64> {
    prop_oneof![-1e3..1e3f64, -1e12..1e12f64, Just(0.0), -1e-9..1e-9f64]
}

fn opt() -> impl Strategy<Value = Option<f64>> {
    prop::option::weighted(0.8, finite())
}

fn path_strategy() -> impl Strategy<Value = PathData> {
    (0usize..30).prop_flat_map(|n| {
        (
            prop::collection::vec(finite(), n),
            prop::collection::vec(opt(), n),
            prop::collection::vec(opt(), n),
            opt(),
            opt(),
            finite(),
            ".{0,40}",
        )
            .prop_map(|(eqps, t, l, ta, la, ef, name)| PathData {
                name,
                eqps,
                triaxiality: t,
                lode_angle_param: l,
                triaxiality_avg: ta,
                lode_angle_param_avg: la,
                eqps_f: ef,
            })
    })
}

/// 48 cases by default; `PROPTEST_CASES` raises it for a longer hunt.
fn cases() -> u32 {
    std::env::var("PROPTEST_CASES")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(48)
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(cases()))]

    #[test]
    fn any_finite_path_renders(p in path_strategy()) {
        let chart = path_chart(&p).unwrap();
        prop_assert!(chart.svg.starts_with("<svg"));
        let n = NamedPath::from(&p);
        state_plane_chart(&[n.clone(), n]).unwrap();
    }

    #[test]
    fn any_finite_locus_renders(
        curves in prop::collection::vec((".{0,12}", prop::collection::vec((finite(), finite()), 0..20)), 0..4),
        points in prop::collection::vec((".{0,12}", finite(), finite(), prop::option::of((finite(), finite())), prop::option::of((finite(), finite()))), 0..8),
    ) {
        let data = LocusChartData {
            title: "random".into(),
            curves: curves.into_iter().map(|(label, points)| LocusCurve { label, points }).collect(),
            points: points.into_iter().map(|(label, triaxiality, eqps_f, tb, eb)| LocusPoint {
                label, triaxiality, eqps_f, triaxiality_band: tb, eqps_f_band: eb,
            }).collect(),
        };
        prop_assert!(locus_chart(&data).is_ok());
    }

    #[test]
    fn any_finite_damage_renders(
        series in prop::collection::vec((".{0,12}", prop::collection::vec((finite(), finite()), 0..20), opt()), 0..8),
    ) {
        let data: Vec<DamageSeries> = series.into_iter()
            .map(|(label, points, measured_gauge_f)| DamageSeries { label, points, measured_gauge_f })
            .collect();
        prop_assert!(damage_chart(&data).is_ok());
    }

    #[test]
    fn any_finite_path_rasterises(p in path_strategy(), w in 200u32..900, h in 200u32..700) {
        let png = path_chart(&p).unwrap().png(w, h).unwrap();
        prop_assert!(png.starts_with(b"\x89PNG"));
    }
}
