//! Shared by the file-based fuzz targets (`pvtu`, `pvd`): a per-process temporary folder
//! holding fixed valid member files, the fuzz input written as the collection, then the
//! series opened and every array of every increment decoded.

use std::path::PathBuf;
use std::sync::OnceLock;

use ductrace_vtk::Series;

/// The per-process folder, created once with `files` in it.
fn folder(kind: &str, files: &[(&str, &[u8])]) -> &'static PathBuf {
    static DIR: OnceLock<PathBuf> = OnceLock::new();
    DIR.get_or_init(|| {
        let dir = std::env::temp_dir().join(format!("ductrace-fuzz-{kind}-{}", std::process::id()));
        for (name, bytes) in files {
            let p = dir.join(name);
            std::fs::create_dir_all(p.parent().expect("member path has a folder"))
                .expect("create the fuzz folder");
            std::fs::write(&p, bytes).expect("write a member file");
        }
        dir
    })
}

/// Writes `data` as `dir/name`, opens it and decodes everything; errors are expected,
/// panics, hangs and huge allocations are the bugs.
pub fn run(kind: &str, files: &[(&str, &[u8])], name: &str, data: &[u8]) {
    let dir = folder(kind, files);
    let path = dir.join(name);
    if std::fs::write(&path, data).is_err() {
        return;
    }
    let Ok(series) = Series::open(&path) else {
        return;
    };
    if let Ok(mesh) = series.mesh() {
        let _ = mesh.points().len();
    }
    let mut buf = Vec::new();
    let mut pts = Vec::new();
    // bounded: a hostile collection may list many increments
    for k in 0..series.increments().len().min(64) {
        let Ok(inc) = series.increment(k) else {
            continue;
        };
        let _ = inc.points(&mut pts);
        for f in series.fields() {
            let _ = inc.read(&f.name, f.location, &mut buf);
            let _ = inc.read_tuples(&f.name, f.location, 0..1, &mut buf);
        }
    }
}
