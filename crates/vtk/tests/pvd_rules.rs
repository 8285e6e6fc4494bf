//! Rules of `.pvd` collections (regression tests of the hardening work): datasets sharing a
//! timestep are the parts of one increment; the same file listed twice at one timestep is
//! refused instead of duplicating its cells; a listing out of time order is sorted.
//!
//! Source: the collection format as VTK writes it (one `DataSet` per timestep and part,
//! `timestep`, `part` and `file` attributes; VTK file-formats documentation, from memory),
//! and the fixture fixtures/vtk/good/series_pvd (written by VTK, listed out of order).

#![allow(clippy::unwrap_used)]

use std::path::{Path, PathBuf};

use ductrace_vtk::Series;

fn steps() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../../fixtures/vtk/good/series_pvd/steps")
}

fn pvd(dir: &Path, entries: &[(f64, u32, &str)]) -> PathBuf {
    let mut s = String::from(
        "<?xml version=\"1.0\"?>\n<VTKFile type=\"Collection\" version=\"1.0\">\n<Collection>\n",
    );
    for (t, part, f) in entries {
        let f = steps().join(f);
        s.push_str(&format!(
            "<DataSet timestep=\"{t}\" part=\"{part}\" file=\"{}\"/>\n",
            f.display()
        ));
    }
    s.push_str("</Collection>\n</VTKFile>\n");
    let p = dir.join("c.pvd");
    std::fs::write(&p, s).unwrap();
    p
}

#[test]
fn the_same_file_twice_at_one_timestep_is_refused() {
    let d = tempfile::tempdir().unwrap();
    let p = pvd(
        d.path(),
        &[(0.0, 0, "s0.vtu"), (0.5, 0, "s1.vtu"), (0.5, 1, "s1.vtu")],
    );
    let e = Series::open(&p).unwrap_err().to_string();
    assert!(e.contains("c.pvd"), "{e}");
    assert!(e.contains("listed twice at timestep 0.5"), "{e}");
}

#[test]
fn different_files_at_one_timestep_are_parts_of_one_increment() {
    let d = tempfile::tempdir().unwrap();
    let p = pvd(
        d.path(),
        &[
            (0.0, 0, "s0.vtu"),
            (0.0, 1, "s1.vtu"),
            (1.0, 1, "s3.vtu"),
            (1.0, 0, "s2.vtu"),
        ],
    );
    let s = Series::open(&p).unwrap();
    assert_eq!(s.increments().len(), 2);
    // parts in `part` order within a timestep
    let names = |k: usize| -> Vec<String> {
        s.increment_files(k)
            .iter()
            .map(|f| f.file_name().unwrap().to_string_lossy().into_owned())
            .collect()
    };
    assert_eq!(names(0), ["s0.vtu", "s1.vtu"]);
    assert_eq!(names(1), ["s2.vtu", "s3.vtu"]);
    // the mesh holds both parts' cells (each step of series_pvd has 6 cells)
    assert_eq!(s.mesh().unwrap().pieces().len(), 2);
}

#[test]
fn a_listing_out_of_time_order_is_sorted() {
    let d = tempfile::tempdir().unwrap();
    let p = pvd(
        d.path(),
        &[(1.5, 0, "s2.vtu"), (0.0, 0, "s0.vtu"), (0.5, 0, "s1.vtu")],
    );
    let s = Series::open(&p).unwrap();
    let times: Vec<f64> = s.increments().iter().map(|i| i.time).collect();
    assert_eq!(times, [0.0, 0.5, 1.5]);
}
