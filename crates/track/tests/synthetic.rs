//! Histories and averages on synthetic series written by ductrace's own writer, with
//! answers known in closed form.
//!
//! Sources of the expected values: the average of a constant is the constant and the
//! trapezoid rule is exact for a linear integrand (elementary calculus), the definitions of
//! η and θ̄ (Bao & Wierzbicki 2004; Bai & Wierzbicki 2008), Δε̄p = √(2/3 Δεp:Δεp) (common
//! practice, FIELD-NOTES §2).

#![allow(clippy::unwrap_used)]

use std::path::{Path, PathBuf};

use ductrace_track::{FieldOptions, GaugeSpec, HistoryRequest, Stop, TrackError, extract};
use ductrace_vtk::Series;
use ductrace_vtk::write::{ArrayRef, CellsRef, write_pvd, write_vtu};

/// A structured grid of n×n×n hexahedra on [−1, 1]³.
struct Grid {
    points: Vec<[f64; 3]>,
    connectivity: Vec<usize>,
    offsets: Vec<usize>,
    types: Vec<u8>,
    centroids: Vec<[f64; 3]>,
}

fn grid(n: usize) -> Grid {
    let m = n + 1;
    let coord = |i: usize| -1.0 + 2.0 * i as f64 / n as f64;
    let mut points = Vec::new();
    for k in 0..m {
        for j in 0..m {
            for i in 0..m {
                points.push([coord(i), coord(j), coord(k)]);
            }
        }
    }
    let id = |i: usize, j: usize, k: usize| i + m * (j + m * k);
    let (mut connectivity, mut offsets, mut types, mut centroids) =
        (Vec::new(), vec![0], Vec::new(), Vec::new());
    for k in 0..n {
        for j in 0..n {
            for i in 0..n {
                connectivity.extend_from_slice(&[
                    id(i, j, k),
                    id(i + 1, j, k),
                    id(i + 1, j + 1, k),
                    id(i, j + 1, k),
                    id(i, j, k + 1),
                    id(i + 1, j, k + 1),
                    id(i + 1, j + 1, k + 1),
                    id(i, j + 1, k + 1),
                ]);
                offsets.push(connectivity.len());
                types.push(12);
                let h = 1.0 / n as f64;
                centroids.push([coord(i) + h, coord(j) + h, coord(k) + h]);
            }
        }
    }
    Grid {
        points,
        connectivity,
        offsets,
        types,
        centroids,
    }
}

/// Axisymmetric stress (σ1 along x, σ2 = σ3) with σ_vm and η given: θ̄ = +1.
fn axisym(vm: f64, eta: f64) -> [f64; 6] {
    let h = eta * vm;
    let s1 = h + 2.0 / 3.0 * vm;
    let s2 = h - 1.0 / 3.0 * vm;
    [s1, s2, s2, 0.0, 0.0, 0.0]
}

/// One increment of a synthetic series: per-cell stress and eqps (or plastic strain),
/// displacement as a uniform stretch along y of `stretch` (u_y = stretch · y).
struct Step {
    time: f64,
    stress: Vec<[f64; 6]>,
    eqps: Option<Vec<f64>>,
    plastic: Option<Vec<[f64; 6]>>,
    stretch: f64,
}

fn write_series(dir: &Path, g: &Grid, steps: &[Step]) -> PathBuf {
    let cells = CellsRef {
        connectivity: &g.connectivity,
        offsets: &g.offsets,
        types: &g.types,
    };
    let mut entries = Vec::new();
    let mut names = Vec::new();
    for (k, s) in steps.iter().enumerate() {
        let name = PathBuf::from(format!("step_{k:03}.vtu"));
        let stress: Vec<f64> = s.stress.iter().flatten().copied().collect();
        let disp: Vec<f64> = g
            .points
            .iter()
            .flat_map(|p| [0.0, s.stretch * p[1], 0.0])
            .collect();
        let mut cell_data = vec![ArrayRef {
            name: "stress",
            components: 6,
            data: &stress,
        }];
        let plastic: Vec<f64>;
        if let Some(e) = &s.eqps {
            cell_data.push(ArrayRef {
                name: "eqps",
                components: 1,
                data: e,
            });
        }
        if let Some(p) = &s.plastic {
            plastic = p.iter().flatten().copied().collect();
            cell_data.push(ArrayRef {
                name: "plastic_strain",
                components: 6,
                data: &plastic,
            });
        }
        write_vtu(
            &dir.join(&name),
            &g.points,
            &cells,
            &[ArrayRef {
                name: "displacement",
                components: 3,
                data: &disp,
            }],
            &cell_data,
        )
        .unwrap();
        names.push((s.time, name));
    }
    for (t, n) in &names {
        entries.push((*t, n.as_path()));
    }
    let pvd = dir.join("series.pvd");
    write_pvd(&pvd, &entries).unwrap();
    pvd
}

/// A series of `n_inc` increments where cell c has ε̄p = 0.02·k·(1 + 0.01 c) and an
/// axisymmetric state of triaxiality `eta(c, eps)`; the first increment is unloaded.
fn series_with(dir: &Path, n_inc: usize, eta: impl Fn(usize, f64) -> f64) -> (PathBuf, Grid) {
    series_from(dir, n_inc, true, eta)
}

/// As [`series_with`]; `unloaded_first` says whether increment 0 has zero stress.
fn series_from(
    dir: &Path,
    n_inc: usize,
    unloaded_first: bool,
    eta: impl Fn(usize, f64) -> f64,
) -> (PathBuf, Grid) {
    let g = grid(2);
    let steps: Vec<Step> = (0..n_inc)
        .map(|k| {
            let eps: Vec<f64> = (0..g.types.len())
                .map(|c| 0.02 * k as f64 * (1.0 + 0.01 * c as f64))
                .collect();
            let stress = eps
                .iter()
                .enumerate()
                .map(|(c, &e)| {
                    if k == 0 && unloaded_first {
                        [0.0; 6]
                    } else {
                        axisym(300.0 + 1000.0 * e, eta(c, e))
                    }
                })
                .collect();
            Step {
                time: 0.1 * k as f64,
                stress,
                eqps: Some(eps),
                plastic: None,
                stretch: 0.01 * k as f64,
            }
        })
        .collect();
    (write_series(dir, &g, &steps), g)
}

fn request(sel: &str) -> HistoryRequest {
    HistoryRequest::new(sel.parse().unwrap())
}

/// Proportional loading: η constant ⇒ η_avg = η exactly; θ̄ = +1 for an axisymmetric state.
#[test]
fn proportional_loading_averages_to_the_constant() {
    let dir = tempfile::tempdir().unwrap();
    let (pvd, _) = series_with(dir.path(), 11, |_, _| 0.6);
    let s = Series::open(&pvd).unwrap();
    let h = extract(&s, &request("cell:3")).unwrap();
    assert_eq!(h.rows.len(), 11);
    assert!(
        h.rows[0].triaxiality.is_none(),
        "unloaded increment is undefined"
    );
    let sum = h.summary;
    assert!((sum.triaxiality_avg.unwrap() - 0.6).abs() < 1e-12);
    assert!((sum.lode_angle_param_avg.unwrap() - 1.0).abs() < 1e-7);
    assert!((sum.eqps - 0.2 * 1.03).abs() < 1e-12);
    assert_eq!(sum.increments_integrated, 10);
    assert_eq!(sum.stop_increment, 10.0);
    assert!((sum.stop_time - 1.0).abs() < 1e-12);
}

/// η linear in ε̄p ⇒ the trapezoid rule is exact and η_avg is the mid value.
#[test]
fn linear_path_averages_to_the_mid_value() {
    let dir = tempfile::tempdir().unwrap();
    let (pvd, _) = series_from(dir.path(), 11, false, |_, e| 0.4 + 1.5 * e);
    let s = Series::open(&pvd).unwrap();
    let h = extract(&s, &request("cell:0")).unwrap();
    let ef = h.summary.eqps;
    assert!((ef - 0.2).abs() < 1e-12);
    assert!((h.summary.triaxiality_avg.unwrap() - (0.4 + 1.5 * ef / 2.0)).abs() < 1e-10);
    assert!((h.summary.triaxiality.unwrap() - (0.4 + 1.5 * ef)).abs() < 1e-10);
}

/// A stop halfway through an increment: eqps, η and time are interpolated and the last
/// segment is integrated to the stop.
#[test]
fn eqps_stop_halfway_through_an_increment() {
    let dir = tempfile::tempdir().unwrap();
    let (pvd, _) = series_from(dir.path(), 11, false, |_, e| 0.4 + 1.5 * e);
    let s = Series::open(&pvd).unwrap();
    let mut r = request("cell:0");
    r.stop = Some(Stop::Eqps(0.13)); // between increment 6 (0.12) and 7 (0.14)
    let h = extract(&s, &r).unwrap();
    let sum = h.summary;
    assert!(
        (sum.stop_increment - 6.5).abs() < 1e-9,
        "{}",
        sum.stop_increment
    );
    assert!((sum.stop_time - 0.65).abs() < 1e-9);
    assert!((sum.eqps - 0.13).abs() < 1e-12);
    assert!((sum.triaxiality_avg.unwrap() - (0.4 + 1.5 * 0.13 / 2.0)).abs() < 1e-10);
    assert_eq!(h.rows.len(), 7);
    assert_eq!(sum.increments_integrated, 7);
}

/// Time and gauge stops. The gauge between (0,−1,0) and (0,1,0) under u_y = e·y grows by
/// 2e; at e = 0.01·k a gauge stop of 0.05 falls at increment 2.5.
#[test]
fn time_and_gauge_stops() {
    let dir = tempfile::tempdir().unwrap();
    let (pvd, _) = series_with(dir.path(), 11, |_, _| 0.5);
    let s = Series::open(&pvd).unwrap();
    let mut r = request("cell:1");
    r.stop = Some(Stop::Time(0.35));
    let h = extract(&s, &r).unwrap();
    assert!((h.summary.stop_increment - 3.5).abs() < 1e-9);
    assert!((h.summary.eqps - 0.07 * 1.01).abs() < 1e-12);

    r.stop = Some(Stop::Gauge(0.05));
    r.gauge = Some("0,-1,0:0,1,0".parse::<GaugeSpec>().unwrap());
    let h = extract(&s, &r).unwrap();
    assert!((h.summary.stop_increment - 2.5).abs() < 1e-9);
    assert!((h.summary.gauge.unwrap() - 0.05).abs() < 1e-12);
    assert!((h.rows[2].gauge.unwrap() - 0.04).abs() < 1e-12);
    let g = h.gauge.unwrap();
    assert_eq!(g.points.len(), 2);
    assert!(g.points[0].distance.unwrap() < 1e-12);

    // The one-point form: u_y at y = 1 is 0.01 k.
    r.gauge = Some("0,1,0/y".parse::<GaugeSpec>().unwrap());
    r.stop = Some(Stop::Gauge(0.035));
    let h = extract(&s, &r).unwrap();
    assert!((h.summary.stop_increment - 3.5).abs() < 1e-9);
}

/// A stop outside the series is an error that gives the available range.
#[test]
fn stops_outside_the_series() {
    let dir = tempfile::tempdir().unwrap();
    let (pvd, _) = series_with(dir.path(), 5, |_, _| 0.5);
    let s = Series::open(&pvd).unwrap();
    for (stop, needle) in [
        (Stop::Increment(9), "increments 0 to 4"),
        (Stop::Time(7.0), "times 0 to 0.4"),
        (Stop::Eqps(3.0), "never reached"),
    ] {
        let mut r = request("cell:0");
        r.stop = Some(stop);
        let e = extract(&s, &r).unwrap_err();
        assert!(matches!(e, TrackError::StopOutside { .. }), "{e}");
        assert!(e.to_string().contains(needle), "{e}");
    }
}

/// ε̄p accumulated from a plastic strain tensor on a proportional path equals the scalar:
/// Δεp = Δε̄p (1, −½, −½) gives √(2/3 Δεp:Δεp) = Δε̄p (common practice). Also with
/// engineering shear on a shear path: Δγ_xy = √3 Δε̄p.
#[test]
fn eqps_accumulated_from_plastic_strain() {
    let dir = tempfile::tempdir().unwrap();
    let g = grid(1);
    let steps: Vec<Step> = (0..8)
        .map(|k| {
            let e = 0.03 * k as f64;
            Step {
                time: k as f64,
                stress: vec![axisym(400.0, 0.7)],
                eqps: None,
                plastic: Some(vec![[e, -e / 2.0, -e / 2.0, 0.0, 0.0, 0.0]]),
                stretch: 0.0,
            }
        })
        .collect();
    let pvd = write_series(dir.path(), &g, &steps);
    let s = Series::open(&pvd).unwrap();
    let h = extract(&s, &request("cell:0")).unwrap();
    for (k, row) in h.rows.iter().enumerate() {
        assert!((row.eqps - 0.03 * k as f64).abs() < 1e-14, "increment {k}");
    }
    assert!((h.summary.triaxiality_avg.unwrap() - 0.7).abs() < 1e-12);

    let dir2 = tempfile::tempdir().unwrap();
    let steps: Vec<Step> = (0..5)
        .map(|k| {
            let e = 0.01 * k as f64;
            Step {
                time: k as f64,
                stress: vec![[0.0, 0.0, 0.0, 100.0, 0.0, 0.0]],
                eqps: None,
                plastic: Some(vec![[0.0, 0.0, 0.0, 3.0_f64.sqrt() * e, 0.0, 0.0]]),
                stretch: 0.0,
            }
        })
        .collect();
    let pvd = write_series(dir2.path(), &g, &steps);
    let s = Series::open(&pvd).unwrap();
    let mut r = request("cell:0");
    r.fields = FieldOptions {
        engineering_shear: true,
        ..FieldOptions::default()
    };
    let h = extract(&s, &r).unwrap();
    assert!((h.summary.eqps - 0.04).abs() < 1e-14);
    assert!(h.summary.triaxiality_avg.unwrap().abs() < 1e-12);
    assert!(h.summary.lode_angle_param_avg.unwrap().abs() < 1e-9);
}

/// A decreasing equivalent plastic strain at the tracked point is a data error.
#[test]
fn decreasing_eqps_is_rejected() {
    let dir = tempfile::tempdir().unwrap();
    let g = grid(1);
    let eps = [0.0, 0.1, 0.2, 0.15, 0.3];
    let steps: Vec<Step> = eps
        .iter()
        .enumerate()
        .map(|(k, &e)| Step {
            time: k as f64,
            stress: vec![axisym(400.0, 0.5)],
            eqps: Some(vec![e]),
            plastic: None,
            stretch: 0.0,
        })
        .collect();
    let pvd = write_series(dir.path(), &g, &steps);
    let s = Series::open(&pvd).unwrap();
    let e = extract(&s, &request("cell:0")).unwrap_err().to_string();
    assert!(e.contains("decreases"), "{e}");
    assert!(e.contains("increment 3"), "{e}");
}

/// `max:eqps` picks the cell with the largest ε̄p at the stop (here the last cell, since
/// ε̄p grows with the cell id), reports runners-up in decreasing order; `near:` picks the
/// cell whose centroid is nearest.
#[test]
fn selections() {
    let dir = tempfile::tempdir().unwrap();
    let (pvd, g) = series_with(dir.path(), 6, |c, _| 0.3 + 0.01 * c as f64);
    let s = Series::open(&pvd).unwrap();
    let h = extract(&s, &request("max:eqps")).unwrap();
    assert_eq!(h.point.id, 7);
    let sel = h.selection.unwrap();
    assert_eq!(sel.runners_up.len(), 5);
    assert_eq!(sel.runners_up[0].id, 6);
    assert!(sel.runners_up.windows(2).all(|w| w[0].value >= w[1].value));

    let h = extract(&s, &request("max:triaxiality")).unwrap();
    assert_eq!(h.point.id, 7);

    let c = g.centroids[5];
    let h = extract(
        &s,
        &request(&format!("near:{},{},{}", c[0] + 0.1, c[1], c[2])),
    )
    .unwrap();
    assert_eq!(h.point.id, 5);
    assert!((h.point.distance.unwrap() - 0.1).abs() < 1e-12);

    let e = extract(&s, &request("cell:99")).unwrap_err().to_string();
    assert!(
        e.contains("out of range") && e.contains("ids 0 to 7"),
        "{e}"
    );
    let e = extract(&s, &request("point:0")).unwrap_err().to_string();
    assert!(e.contains("cell data"), "{e}");
    let e = extract(&s, &request("near:5,5,5")).unwrap_err().to_string();
    assert!(e.contains("outside the mesh"), "{e}");
}

/// `--band K`: ranges over the chosen cell and its K nearest neighbours contain the chosen
/// cell's own values.
#[test]
fn band_ranges_contain_the_chosen_value() {
    let dir = tempfile::tempdir().unwrap();
    let (pvd, _) = series_with(dir.path(), 6, |c, _| 0.3 + 0.01 * c as f64);
    let s = Series::open(&pvd).unwrap();
    let mut r = request("cell:0");
    r.band = Some(3);
    let h = extract(&s, &r).unwrap();
    let b = h.band.unwrap();
    assert_eq!(b.ids.len(), 3);
    let [lo, hi] = b.triaxiality_avg.unwrap();
    let own = h.summary.triaxiality_avg.unwrap();
    assert!(lo <= own && own <= hi && lo < hi);
    assert!((lo - 0.3).abs() < 1e-12);
}
