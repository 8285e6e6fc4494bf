//! Conformance: every file of `fixtures/vtk/good/`, written by the VTK library itself (its Python wheel:
//! vtkXMLUnstructuredGridWriter, vtkXMLPUnstructuredGridWriter, vtkUnstructuredGridWriter) or by meshio, read
//! through the public API and compared with its `<file>.expected.json`.
//!
//! Expected values: numpy, written by fixtures/vtk/generate.py from the arrays handed to VTK / meshio (never
//! read back from the files). `generate.py` also reads every file back with VTK's (or meshio's) own readers
//! and checks them against the same JSON before writing the index.
//!
//! Tolerances come from each JSON (`tolerance`): 1e-12 relative for Float64 data, 1e-6 for Float32 data.
//! Text writers that print fewer digits than round-trip (VTK's legacy ASCII writer: 11 significant digits for
//! doubles, 6 for floats; meshio's .vtu ASCII writer: %.11e) have expected values equal to what that printf
//! format prints, computed from the handed values (see `text_format` in the JSON).

// Test helpers outside #[test] functions: unwrapping the committed JSON is the point of a fixture test.
#![allow(clippy::unwrap_used)]

use std::path::{Path, PathBuf};

use ductrace_vtk::{Discovery, Location, Series};
use serde_json::Value;

fn good_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../../fixtures/vtk/good")
}

fn load_json(path: &Path) -> Value {
    let text = std::fs::read_to_string(path).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
    serde_json::from_str(&text).unwrap_or_else(|e| panic!("{}: {e}", path.display()))
}

fn f64s(v: &Value) -> Vec<f64> {
    v.as_array()
        .unwrap()
        .iter()
        .map(|x| x.as_f64().unwrap())
        .collect()
}

/// Relative closeness: |a - b| <= tol * max(|a|, |b|) (exact equality for zeros).
fn close(a: f64, b: f64, tol: f64) -> bool {
    a == b || (a - b).abs() <= tol * a.abs().max(b.abs())
}

/// Closeness relative to a scale (for derived quantities whose value may be near zero).
fn close_scaled(a: f64, b: f64, tol: f64, scale: f64) -> bool {
    (a - b).abs() <= tol * scale.max(f64::MIN_POSITIVE)
}

fn compare_slice(errs: &mut Vec<String>, what: &str, got: &[f64], want: &[f64], tol: f64) {
    if got.len() != want.len() {
        errs.push(format!(
            "{what}: {} values, expected {}",
            got.len(),
            want.len()
        ));
        return;
    }
    let bad: Vec<usize> = (0..got.len())
        .filter(|&i| !close(got[i], want[i], tol))
        .collect();
    if let Some(&i) = bad.first() {
        errs.push(format!(
            "{what}: {} of {} values differ beyond {tol:e}; first at {i}: got {}, expected {}",
            bad.len(),
            got.len(),
            got[i],
            want[i]
        ));
    }
}

/// Principal stresses of a symmetric 3x3 tensor in VTK order (XX, YY, ZZ, XY, YZ, XZ), descending.
/// Cyclic Jacobi rotations (Golub & Van Loan, "Matrix Computations", 4th ed. 2013, §8.5), accurate also for
/// repeated eigenvalues.
fn principal(s: &[f64]) -> [f64; 3] {
    let mut a = [[s[0], s[3], s[5]], [s[3], s[1], s[4]], [s[5], s[4], s[2]]];
    for _sweep in 0..50 {
        let off = a[0][1].powi(2) + a[0][2].powi(2) + a[1][2].powi(2);
        let diag = a[0][0].powi(2) + a[1][1].powi(2) + a[2][2].powi(2);
        if off <= 1e-36 * diag || off == 0.0 {
            break;
        }
        for (p, q) in [(0, 1), (0, 2), (1, 2)] {
            if a[p][q] == 0.0 {
                continue;
            }
            let theta = (a[q][q] - a[p][p]) / (2.0 * a[p][q]);
            let t = theta.signum() / (theta.abs() + (theta * theta + 1.0).sqrt());
            let t = if theta == 0.0 { 1.0 } else { t };
            let c = 1.0 / (t * t + 1.0).sqrt();
            let sn = t * c;
            // A <- J^T A J with the rotation J in the (p, q) plane.
            for row in a.iter_mut() {
                let (akp, akq) = (row[p], row[q]);
                row[p] = c * akp - sn * akq;
                row[q] = sn * akp + c * akq;
            }
            let (rp, rq) = (a[p], a[q]);
            for k in 0..3 {
                a[p][k] = c * rp[k] - sn * rq[k];
                a[q][k] = sn * rp[k] + c * rq[k];
            }
        }
    }
    let mut e = [a[0][0], a[1][1], a[2][2]];
    e.sort_by(|x, y| y.total_cmp(x));
    e
}

/// Textbook triaxiality η and Lode angle parameter θ̄ of the states generate.py rotates and scales
/// (FIELD-NOTES §1 table: Bao & Wierzbicki 2004, Int. J. Mech. Sci. 46:81–98; Bai & Wierzbicki 2008,
/// Int. J. Plasticity 24:1071–1096). Axisymmetric triaxial (1, a, a) with a = 0.2:
/// η = (1 + 2a) / (3 (1 − a)) = 7/12.
fn textbook(state: &str) -> Option<(f64, f64)> {
    Some(match state {
        "uniaxial_tension" => (1.0 / 3.0, 1.0),
        "pure_shear" => (0.0, 0.0),
        "plane_strain_tension" => (1.0 / 3f64.sqrt(), 0.0),
        "equibiaxial_tension" => (2.0 / 3.0, -1.0),
        "axisymmetric_triaxial" => (7.0 / 12.0, 1.0),
        "uniaxial_compression" => (-1.0 / 3.0, -1.0),
        _ => return None,
    })
}

/// Lode angle parameter θ̄ = 1 − (2/π) arccos ξ, ξ = (27/2) J3 / σ_vm³ clamped to [−1, 1]
/// (Bai & Wierzbicki 2008), of a VTK-order tensor with von Mises stress `vm` > 0.
fn lode_angle_parameter(s: &[f64], vm: f64) -> f64 {
    let h = (s[0] + s[1] + s[2]) / 3.0;
    let (a, b, c) = (s[0] - h, s[1] - h, s[2] - h);
    let (xy, yz, xz) = (s[3], s[4], s[5]);
    let j3 = a * (b * c - yz * yz) - xy * (xy * c - yz * xz) + xz * (xy * yz - b * xz);
    let xi = (13.5 * j3 / vm.powi(3)).clamp(-1.0, 1.0);
    1.0 - 2.0 / std::f64::consts::PI * xi.acos()
}

/// Check the stress measures of one 6-component stress array (hydrostatic σ_h = tr σ / 3, von Mises
/// σ_vm = √(3 J2), triaxiality η = σ_h / σ_vm (undefined when σ_vm = 0; Bao & Wierzbicki 2004), principal
/// stresses) computed from the values read against numpy's values in the JSON.
/// `tol`: relative tolerance of the values (derived quantities get 10 × tol, at least 1e-10, relative to the
/// tuple's largest component; triaxiality that relative to σ_vm).
fn check_stress(errs: &mut Vec<String>, what: &str, vals: &[f64], st: &Value, tol: f64) {
    let dtol = (10.0 * tol).max(1e-10);
    let hyd = f64s(&st["hydrostatic"]);
    let vm = f64s(&st["von_mises"]);
    let tri = st["triaxiality"].as_array().unwrap();
    let pr = st["principal"].as_array().unwrap();
    let states = st["states"].as_array().unwrap();
    let lode = st["lode_angle_parameter"].as_array().unwrap();
    // Against the textbook values the data's own precision counts: Float32 data (tol 1e-6) moves ξ by ~1e-7,
    // and θ̄ near ±1 by ~√(2 δξ).
    let (eta_tol, lode_tol) = if tol >= 1e-6 {
        (1e-5, 2e-3)
    } else {
        (1e-9, 1e-4)
    };
    if states.len() != vals.len() / 6 || hyd.len() != vals.len() / 6 {
        errs.push(format!(
            "{what}: stress tuples differ from the expected states"
        ));
        return;
    }
    for (k, s) in vals.chunks_exact(6).enumerate() {
        let scale = s.iter().fold(0.0f64, |m, v| m.max(v.abs()));
        let h = (s[0] + s[1] + s[2]) / 3.0;
        let (dx, dy, dz) = (s[0] - h, s[1] - h, s[2] - h);
        let j2 = 0.5 * (dx * dx + dy * dy + dz * dz) + s[3] * s[3] + s[4] * s[4] + s[5] * s[5];
        let v = (3.0 * j2).sqrt();
        let state = states[k].as_str().unwrap_or("?");
        if !close_scaled(h, hyd[k], dtol, scale) {
            errs.push(format!(
                "{what} tuple {k} ({state}): hydrostatic {h}, numpy {}",
                hyd[k]
            ));
        }
        if !close_scaled(v, vm[k], dtol, scale) {
            errs.push(format!(
                "{what} tuple {k} ({state}): von Mises {v}, numpy {}",
                vm[k]
            ));
        }
        let eta = (v > 1e-12 * scale).then(|| h / v);
        match (eta, tri[k].as_f64()) {
            (Some(a), Some(b)) if (a - b).abs() <= dtol * scale / v => {}
            (None, None) => {}
            (a, b) => errs.push(format!(
                "{what} tuple {k} ({state}): triaxiality {a:?}, numpy {b:?}"
            )),
        }
        if let Some(v_eta) = eta {
            let l = lode_angle_parameter(s, v);
            match lode[k].as_f64() {
                Some(b) if (l - b).abs() <= 1e-6 => {}
                b => errs.push(format!(
                    "{what} tuple {k} ({state}): Lode angle parameter {l}, numpy {b:?}"
                )),
            }
            match textbook(state) {
                Some((t_eta, t_lode))
                    if (v_eta - t_eta).abs() <= eta_tol && (l - t_lode).abs() <= lode_tol => {}
                t => errs.push(format!(
                    "{what} tuple {k}: (η, θ̄) = ({v_eta}, {l}), textbook {state} {t:?}"
                )),
            }
        }
        let p = principal(s);
        let want = f64s(&pr[k]);
        for i in 0..3 {
            if !close_scaled(p[i], want[i], dtol, scale) {
                errs.push(format!(
                    "{what} tuple {k} ({state}): principal {p:?}, numpy eigvalsh {want:?}"
                ));
                break;
            }
        }
    }
}

/// Read the fixture `rel` (a file or folder under fixtures/vtk/good) and compare everything with its
/// expected JSON. Returns the list of differences.
fn check_file(rel: &str, expected_rel: &str) -> Vec<String> {
    let dir = good_dir();
    let exp = load_json(&dir.join(expected_rel));
    let tol = exp["tolerance"].as_f64().unwrap();
    let mut errs = Vec::new();
    let series = match Series::open(&dir.join(rel)) {
        Ok(s) => s,
        Err(e) => return vec![format!("open failed: {e}")],
    };

    // Mesh: counts, cell types, points, connectivity.
    let mesh = series.mesh().unwrap();
    let n_points = exp["n_points"].as_u64().unwrap() as usize;
    let n_cells = exp["n_cells"].as_u64().unwrap() as usize;
    if mesh.n_points() != n_points || mesh.n_cells() != n_cells {
        errs.push(format!(
            "mesh has {} points / {} cells, expected {n_points} / {n_cells}",
            mesh.n_points(),
            mesh.n_cells()
        ));
        return errs;
    }
    let want_counts: Vec<(u8, String, usize)> = exp["cell_types"]
        .as_array()
        .unwrap()
        .iter()
        .map(|t| {
            (
                t[0].as_u64().unwrap() as u8,
                t[1].as_str().unwrap().to_string(),
                t[2].as_u64().unwrap() as usize,
            )
        })
        .collect();
    let mut got_counts: Vec<(u8, String, usize)> = mesh
        .cell_type_counts()
        .into_iter()
        .map(|(id, name, n)| (id, name.to_string(), n))
        .collect();
    got_counts.sort();
    if got_counts != want_counts {
        errs.push(format!(
            "cell type counts {got_counts:?}, expected {want_counts:?}"
        ));
    }
    let flat: Vec<f64> = mesh.points().iter().flatten().copied().collect();
    let want_pts: Vec<f64> = exp["points"]
        .as_array()
        .unwrap()
        .iter()
        .flat_map(f64s)
        .collect();
    compare_slice(&mut errs, "points", &flat, &want_pts, tol);
    let usizes = |v: &Value| -> Vec<usize> {
        v.as_array()
            .unwrap()
            .iter()
            .map(|x| x.as_u64().unwrap() as usize)
            .collect()
    };
    if mesh.offsets() != usizes(&exp["offsets"]).as_slice() {
        errs.push("cell offsets differ".to_string());
    }
    if mesh.connectivity() != usizes(&exp["connectivity"]).as_slice() {
        errs.push("connectivity differs".to_string());
    }
    let types: Vec<u8> = usizes(&exp["types"]).iter().map(|&t| t as u8).collect();
    if mesh.cell_types() != types.as_slice() {
        errs.push("cell types differ".to_string());
    }
    let all_z_equal = want_pts.chunks_exact(3).all(|p| p[2] == want_pts[2]);
    if mesh.is_planar() != all_z_equal {
        errs.push(format!(
            "is_planar() = {}, expected {all_z_equal}",
            mesh.is_planar()
        ));
    }

    // Catalogue: the same (name, location) set as the arrays handed to the writer.
    let incs = exp["increments"].as_array().unwrap();
    let mut want_fields: Vec<(String, Location)> = incs[0]["arrays"]
        .as_array()
        .unwrap()
        .iter()
        .map(|a| (a["name"].as_str().unwrap().to_string(), loc(&a["location"])))
        .collect();
    want_fields.sort();
    let mut got_fields: Vec<(String, Location)> = series
        .fields()
        .iter()
        .map(|f| (f.name.clone(), f.location))
        .collect();
    got_fields.sort();
    if got_fields != want_fields {
        errs.push(format!("fields {got_fields:?}, expected {want_fields:?}"));
    }

    // Increments: order, times, files.
    if series.increments().len() != incs.len() {
        errs.push(format!(
            "{} increments, expected {}",
            series.increments().len(),
            incs.len()
        ));
        return errs;
    }
    let mut buf = Vec::new();
    let mut part = Vec::new();
    for (k, inc) in incs.iter().enumerate() {
        let info = &series.increments()[k];
        let time = inc["time"].as_f64().unwrap();
        if info.index != k || !close(info.time, time, 1e-12) {
            errs.push(format!(
                "increment {k}: index {} time {}, expected index {k} time {time}",
                info.index, info.time
            ));
        }
        let file = inc["file"].as_str().unwrap();
        if !info.file.ends_with(file) {
            errs.push(format!(
                "increment {k}: file {}, expected …/{file}",
                info.file.display()
            ));
        }
        let step = match series.increment(k) {
            Ok(s) => s,
            Err(e) => {
                errs.push(format!("increment {k}: {e}"));
                continue;
            }
        };
        if !close(step.time(), time, 1e-12) {
            errs.push(format!(
                "increment {k}: Increment::time {}, expected {time}",
                step.time()
            ));
        }
        let mut pts = Vec::new();
        match step.points(&mut pts) {
            Ok(()) => {
                let flat: Vec<f64> = pts.iter().flatten().copied().collect();
                compare_slice(
                    &mut errs,
                    &format!("increment {k} points"),
                    &flat,
                    &want_pts,
                    tol,
                );
            }
            Err(e) => errs.push(format!("increment {k} points: {e}")),
        }
        for a in inc["arrays"].as_array().unwrap() {
            let name = a["name"].as_str().unwrap();
            let location = loc(&a["location"]);
            let what = format!("increment {k} {location} array '{name}'");
            let comps = a["components"].as_u64().unwrap() as usize;
            let want = f64s(&a["values"]);
            let fi = match step.read(name, location, &mut buf) {
                Ok(fi) => fi.clone(),
                Err(e) => {
                    errs.push(format!("{what}: {e}"));
                    continue;
                }
            };
            if fi.components != comps {
                errs.push(format!(
                    "{what}: {} components, expected {comps}",
                    fi.components
                ));
            }
            let ty = a["type"].as_str().unwrap();
            if fi.scalar_type.name() != ty {
                errs.push(format!("{what}: type {}, expected {ty}", fi.scalar_type));
            }
            // Legacy files carry component names in METADATA blocks; the catalogue does not pass them on yet
            // (see `legacy_component_names_reach_the_catalogue`).
            let legacy = file.ends_with(".vtk");
            if let Some(names) = a
                .get("component_names")
                .filter(|_| !legacy || CHECK_LEGACY_NAMES)
            {
                let names: Vec<String> = names
                    .as_array()
                    .unwrap()
                    .iter()
                    .map(|n| n.as_str().unwrap().to_string())
                    .collect();
                if fi.component_names != names {
                    errs.push(format!(
                        "{what}: component names {:?}, expected {names:?}",
                        fi.component_names
                    ));
                }
            }
            compare_slice(&mut errs, &what, &buf, &want, tol);
            // A sub-range of tuples decodes to the same values as the full read.
            let n = want.len() / comps.max(1);
            if n >= 2 {
                let range = n / 3..(n / 3 + n / 2).min(n);
                match step.read_tuples(name, location, range.clone(), &mut part) {
                    Ok(_) => {
                        let full = &buf[range.start * comps..range.end * comps];
                        if part.as_slice() != full {
                            errs.push(format!(
                                "{what}: read_tuples({range:?}) differs from the full read"
                            ));
                        }
                    }
                    Err(e) => errs.push(format!("{what}: read_tuples({range:?}): {e}")),
                }
            }
            if let Some(st) = a.get("stress")
                && !buf.is_empty()
            {
                check_stress(&mut errs, &what, &buf, st, tol);
            }
        }
    }
    errs
}

/// Whether `check_file` also checks component names of legacy files (the catalogue carries
/// `LegacyArrayInfo::component_names`).
const CHECK_LEGACY_NAMES: bool = true;

/// VTK's legacy writer stores component names in `METADATA` / `COMPONENT_NAMES` (legacy_binary_51.vtk: point
/// `stress` with XX, YY, ZZ, XY, YZ, XZ, handed to VTK by generate.py). The legacy parser reads them
/// (`LegacyArrayInfo::component_names`) and the series catalogue carries them.
#[test]
fn legacy_component_names_reach_the_catalogue() {
    let s = Series::open(&good_dir().join("legacy_binary_51.vtk")).unwrap();
    let f = s.field("stress", Some(Location::Point)).unwrap();
    assert_eq!(f.component_names, ["XX", "YY", "ZZ", "XY", "YZ", "XZ"]);
}

fn loc(v: &Value) -> Location {
    match v.as_str().unwrap() {
        "point" => Location::Point,
        "cell" => Location::Cell,
        other => panic!("location {other}"),
    }
}

fn index() -> Vec<(String, String)> {
    let idx = load_json(&good_dir().join("index.json"));
    idx["fixtures"]
        .as_array()
        .unwrap()
        .iter()
        .map(|f| {
            (
                f["path"].as_str().unwrap().to_string(),
                f["expected"].as_str().unwrap().to_string(),
            )
        })
        .collect()
}

/// Every fixture of the index, each checked completely; all differences are listed at once.
#[test]
fn every_fixture_matches_its_expected_values() {
    let fixtures = index();
    assert!(
        fixtures.len() >= 40,
        "index lists only {} fixtures",
        fixtures.len()
    );
    let mut report = Vec::new();
    for (rel, exp) in &fixtures {
        for e in check_file(rel, exp) {
            report.push(format!("{rel}: {e}"));
        }
    }
    assert!(
        report.is_empty(),
        "{} differences:\n{}",
        report.len(),
        report.join("\n")
    );
}

/// Run one fixture by name (per-file tests give a readable failure list per encoding).
fn check(rel: &str) {
    let (_, exp) = index()
        .into_iter()
        .find(|(p, _)| p == rel)
        .unwrap_or_else(|| panic!("{rel} is not in fixtures/vtk/good/index.json"));
    let errs = check_file(rel, &exp);
    assert!(errs.is_empty(), "{rel}:\n{}", errs.join("\n"));
}

macro_rules! fixture_tests {
    ($($name:ident => $rel:literal,)*) => {
        $(#[test] fn $name() { check($rel); })*
    };
}

fixture_tests! {
    xml_ascii => "hex_ascii.vtu",
    xml_ascii_float32 => "hex_ascii_f32.vtu",
    xml_inline_raw => "hex_inline_raw.vtu",
    xml_inline_zlib_two_base64_runs => "hex_inline_zlib.vtu",
    xml_inline_zlib_uint64_header => "hex_inline_zlib_u64.vtu",
    xml_inline_lz4_small_blocks => "hex_inline_lz4_blocks.vtu",
    xml_inline_lzma_big_endian => "hex_inline_lzma_be.vtu",
    xml_inline_zlib_float32 => "hex_inline_zlib_f32.vtu",
    xml_appended_raw => "hex_appended_raw.vtu",
    xml_appended_raw_uint64_header => "hex_appended_raw_u64.vtu",
    xml_appended_raw_big_endian => "hex_appended_raw_be.vtu",
    xml_appended_raw_float32_big_endian => "hex_appended_raw_f32_be.vtu",
    xml_appended_base64 => "hex_appended_base64.vtu",
    xml_appended_base64_zlib => "hex_appended_base64_zlib.vtu",
    xml_appended_zlib => "hex_appended_zlib.vtu",
    xml_appended_zlib_small_blocks => "hex_appended_zlib_blocks.vtu",
    xml_appended_zlib_big_endian => "hex_appended_zlib_be.vtu",
    xml_appended_lz4 => "hex_appended_lz4.vtu",
    xml_appended_lz4_float32_blocks => "hex_appended_lz4_f32_blocks.vtu",
    xml_appended_lzma_small_blocks => "hex_appended_lzma_blocks.vtu",
    xml_quadratic_quads => "quad8_appended_zlib.vtu",
    xml_quadratic_quads_ascii => "quad8_ascii.vtu",
    xml_quadratic_hexahedra => "hex20_inline_zlib.vtu",
    xml_quadratic_hexahedra_raw => "hex20_appended_raw.vtu",
    xml_mixed_cells_lzma => "mixed_appended_lzma.vtu",
    xml_mixed_cells_inline => "mixed_inline_raw.vtu",
    xml_three_pieces_in_one_file => "hex_3pieces.vtu",
    pvtu_three_pieces => "pvtu/block.pvtu",
    pvtu_three_pieces_inline => "pvtu_inline/block.pvtu",
    pvd_unsorted_collection => "series_pvd/collection.pvd",
    folder_numbered_vtu => "series_numbered",
    folder_numbered_legacy => "series_legacy",
    legacy_ascii_51 => "legacy_ascii_51.vtk",
    legacy_binary_51 => "legacy_binary_51.vtk",
    legacy_ascii_42 => "legacy_ascii_42.vtk",
    legacy_binary_42 => "legacy_binary_42.vtk",
    legacy_quadratic_hexahedra_float32 => "legacy_hex20_binary_51.vtk",
    legacy_quadratic_quads_float32_ascii => "legacy_quad8_ascii_42.vtk",
    legacy_tensors6_binary => "legacy_tensors6_binary_51.vtk",
    legacy_tensors6_ascii => "legacy_tensors6_ascii_42.vtk",
    meshio_zlib => "meshio_hex_zlib.vtu",
    meshio_ascii => "meshio_hex_ascii.vtu",
    meshio_lzma => "meshio_quad8_lzma.vtu",
    meshio_uncompressed => "meshio_hex20_raw.vtu",
    meshio_mixed => "meshio_mixed_zlib.vtu",
    meshio_legacy_binary => "meshio_mixed_binary.vtk",
    meshio_legacy_ascii => "meshio_quad8_ascii.vtk",
}

/// The discovery rule matches the kind of path given.
#[test]
fn discovery_rules() {
    let dir = good_dir();
    let d = |rel: &str| Series::open(&dir.join(rel)).unwrap().discovery().clone();
    assert_eq!(d("hex_appended_raw.vtu"), Discovery::File);
    assert_eq!(d("legacy_binary_51.vtk"), Discovery::File);
    assert!(matches!(d("series_pvd/collection.pvd"), Discovery::Pvd(_)));
    assert!(matches!(d("series_pvd"), Discovery::FolderPvd(_)));
    assert!(matches!(
        d("series_numbered"),
        Discovery::FolderNumbered { .. }
    ));
    assert!(matches!(
        d("series_legacy"),
        Discovery::FolderNumbered { .. }
    ));
}

/// The .pvd lists timesteps 1.0, 0.0, 1.5, 0.5 (see `listed_order` in its JSON); increments come sorted.
#[test]
fn pvd_increments_are_sorted_by_timestep() {
    let dir = good_dir();
    let exp = load_json(&dir.join("series_pvd/collection.pvd.expected.json"));
    let listed = f64s(&exp["meta"]["listed_order"]);
    let mut sorted = listed.clone();
    sorted.sort_by(f64::total_cmp);
    assert_ne!(
        listed, sorted,
        "the fixture must list its timesteps unsorted"
    );
    let s = Series::open(&dir.join("series_pvd/collection.pvd")).unwrap();
    let times: Vec<f64> = s.increments().iter().map(|i| i.time).collect();
    assert_eq!(times, sorted);
}

/// A folder of step8.vtk, step9.vtk, step10.vtk is ordered by number, not by name.
#[test]
fn numbered_folder_is_sorted_numerically() {
    let s = Series::open(&good_dir().join("series_legacy")).unwrap();
    let names: Vec<String> = s
        .increments()
        .iter()
        .map(|i| i.file.file_name().unwrap().to_string_lossy().into_owned())
        .collect();
    assert_eq!(names, ["step8.vtk", "step9.vtk", "step10.vtk"]);
}

/// VTK writes a one-component array without NumberOfComponents: the reader takes it as 1.
#[test]
fn eqps_without_number_of_components_has_one() {
    let path = good_dir().join("hex_ascii.vtu");
    let text = std::fs::read_to_string(&path).unwrap();
    let tag = text
        .lines()
        .find(|l| l.contains("Name=\"eqps\""))
        .expect("eqps array");
    assert!(
        !tag.contains("NumberOfComponents"),
        "fixture must omit the attribute: {tag}"
    );
    let s = Series::open(&path).unwrap();
    assert_eq!(s.field("eqps", Some(Location::Cell)).unwrap().components, 1);
}

fn bad_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../../fixtures/vtk/bad")
}

/// Open a path and decode everything of every increment; the first error's message, if any.
fn first_error(path: &Path) -> Option<String> {
    let s = match Series::open(path) {
        Ok(s) => s,
        Err(e) => return Some(e.to_string()),
    };
    // the reference mesh is decoded (and its cells validated) on first request
    if let Err(e) = s.mesh() {
        return Some(e.to_string());
    }
    let mut buf = Vec::new();
    let mut pts = Vec::new();
    for k in 0..s.increments().len() {
        let step = match s.increment(k) {
            Ok(step) => step,
            Err(e) => return Some(e.to_string()),
        };
        if let Err(e) = step.points(&mut pts) {
            return Some(e.to_string());
        }
        for f in s.fields() {
            if let Err(e) = step.read(&f.name, f.location, &mut buf) {
                return Some(e.to_string());
            }
        }
    }
    None
}

/// Every file of fixtures/vtk/bad (made by make_bad.py from the VTK-written good files) fails with a
/// one-line message that names the file and carries the substance listed in bad/index.json; files with
/// NaN/Inf read, and `find_nonfinite` reports the count and the first location that make_bad.py wrote.
#[test]
fn bad_fixtures_fail_with_the_expected_substance() {
    let idx = load_json(&bad_dir().join("index.json"));
    let cases = idx["cases"].as_array().unwrap();
    assert!(cases.len() >= 35, "only {} bad cases", cases.len());
    let mut report = Vec::new();
    for c in cases {
        let file = c["file"].as_str().unwrap();
        let path = bad_dir().join(file);
        if c["stage"] == "nonfinite" {
            let e = &c["expect"];
            let (name, location) = (e[0].as_str().unwrap(), loc(&e[1]));
            let want = (
                e[2].as_u64().unwrap() as usize,
                e[3].as_u64().unwrap() as usize,
                e[4].as_u64().unwrap() as usize,
            );
            let mut buf = Vec::new();
            let got = Series::open(&path)
                .and_then(|s| {
                    let step = s.increment(0)?;
                    let comps = step.read(name, location, &mut buf)?.components;
                    Ok(ductrace_vtk::find_nonfinite(&buf, comps))
                })
                .map(|n| n.map(|n| (n.count, n.first_tuple, n.first_component)));
            match got {
                Ok(Some(g)) if g == want => {}
                other => report.push(format!("{file}: non-finite {other:?}, expected {want:?}")),
            }
            continue;
        }
        let Some(msg) = first_error(&path) else {
            report.push(format!("{file}: no error"));
            continue;
        };
        let lower = msg.to_lowercase();
        if msg.lines().count() != 1 {
            report.push(format!("{file}: message is not one line: {msg}"));
        }
        let base = Path::new(file).file_name().unwrap().to_string_lossy();
        if !msg.contains(base.as_ref()) {
            report.push(format!("{file}: message does not name the file: {msg}"));
        }
        for group in c["expect"].as_array().unwrap() {
            let words: Vec<&str> = group
                .as_array()
                .unwrap()
                .iter()
                .map(|w| w.as_str().unwrap())
                .collect();
            if !words.iter().any(|w| lower.contains(w)) {
                report.push(format!("{file}: message lacks any of {words:?}: {msg}"));
            }
        }
    }
    assert!(
        report.is_empty(),
        "{} problems:\n{}",
        report.len(),
        report.join("\n")
    );
}
