//! The bad-input catalogue (docs/BAD-INPUT.md), one test per entry: each bad input run
//! through the `ductrace` binary must exit with the catalogued code and print ONE line on
//! stderr that names the file (where there is one) and carries the catalogued substance.
//!
//! Sources of the expectations: the change made to each file of fixtures/vtk/bad, as
//! documented in fixtures/vtk/bad/README.md and index.json (fixtures/vtk/make_bad.py);
//! for the extra inputs made here, the construction of the input itself (e.g. an eqps
//! sequence 0, 0.1, 0.05 decreases between increments 1 and 2); exit codes as documented
//! in docs/ARCHITECTURE.md (1 data, 2 usage).

#![allow(clippy::unwrap_used)]

use std::path::{Path, PathBuf};

use assert_cmd::Command;
use serde_json::Value;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn bad(name: &str) -> PathBuf {
    root().join("fixtures/vtk/bad").join(name)
}

fn good(name: &str) -> PathBuf {
    root().join("fixtures/vtk/good").join(name)
}

fn s(p: &Path) -> String {
    p.to_str().unwrap().to_string()
}

/// Runs `ductrace args`; returns (exit code, stdout, stderr).
fn run(args: &[String]) -> (i32, String, String) {
    let out = Command::cargo_bin("ductrace")
        .unwrap()
        .args(args)
        .output()
        .unwrap();
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stdout).into_owned(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

/// The catalogue check: exit `code`; stderr is exactly one line, an error line, naming
/// `file` (when not empty) and containing every needle (case-insensitive). Returns stdout.
fn check(args: &[String], code: i32, file: &str, needles: &[&str]) -> String {
    let (got, stdout, stderr) = run(args);
    let lines: Vec<&str> = stderr.lines().filter(|l| !l.trim().is_empty()).collect();
    assert_eq!(got, code, "{args:?}: exit code {got}, stderr: {stderr}");
    assert_eq!(
        lines.len(),
        1,
        "{args:?}: stderr is not one line:\n{stderr}"
    );
    let line = lines[0];
    assert!(line.starts_with("ductrace: error: "), "{args:?}: {line}");
    if !file.is_empty() {
        assert!(
            line.contains(file),
            "{args:?}: does not name {file}: {line}"
        );
    }
    let low = line.to_lowercase();
    for n in needles {
        assert!(
            low.contains(&n.to_lowercase()),
            "{args:?}: missing {n:?} in: {line}"
        );
    }
    stdout
}

fn args(v: &[&str]) -> Vec<String> {
    v.iter().map(|a| a.to_string()).collect()
}

fn probe(p: &Path) -> Vec<String> {
    vec!["probe".into(), s(p)]
}

fn history(p: &Path, extra: &[&str]) -> Vec<String> {
    let mut v = vec!["history".into(), s(p)];
    v.extend(extra.iter().map(|a| a.to_string()));
    v
}

// ---------------------------------------------------------------------------------------
// Every file of fixtures/vtk/bad.
// ---------------------------------------------------------------------------------------

/// How a bad fixture is run: `probe` reaches everything read when a result is opened
/// (XML header, mesh, cells, the collection); `history --at max:sigma_vm` decodes the
/// whole stress array of every increment (the decoder paths).
#[derive(Clone, Copy)]
enum Via {
    Probe,
    DecodeStress,
}

/// (file, how, substance). The file name itself must appear in the message too.
const VTK_BAD: &[(&str, Via, &[&str])] = &[
    (
        "truncated_header.vtu",
        Via::Probe,
        &["bad xml", "byte offset", "not closed"],
    ),
    (
        "truncated_appended.vtu",
        Via::Probe,
        &["truncated", "needs", "byte offset", "holds only"],
    ),
    (
        "truncated_inline_base64.vtu",
        Via::Probe,
        &["ends inside <DataArray>", "byte offset"],
    ),
    (
        "short_inline_base64.vtu",
        Via::DecodeStress,
        &["truncated cell array 'stress'", "needs 864 bytes"],
    ),
    (
        "header_nbytes_too_large.vtu",
        Via::DecodeStress,
        &["cell array 'stress'", "expected 864", "4294967280"],
    ),
    (
        "block_table_too_large.vtu",
        Via::DecodeStress,
        &["cell array 'stress'", "truncated", "holds only"],
    ),
    (
        "block_count_too_large.vtu",
        Via::DecodeStress,
        &["cell array 'stress'", "truncated", "holds only"],
    ),
    (
        "corrupt_base64.vtu",
        Via::DecodeStress,
        &["corrupt cell array 'stress'", "base64", "byte offset"],
    ),
    (
        "corrupt_zlib.vtu",
        Via::DecodeStress,
        &["corrupt cell array 'stress'", "block 0", "zlib"],
    ),
    (
        "corrupt_lz4.vtu",
        Via::DecodeStress,
        &["corrupt cell array 'stress'", "block 0", "lz4"],
    ),
    (
        "corrupt_lzma.vtu",
        Via::DecodeStress,
        &["corrupt cell array 'stress'", "block 0", "magic"],
    ),
    (
        "unknown_compressor.vtu",
        Via::Probe,
        &["unsupported compressor 'vtkSnappyDataCompressor'"],
    ),
    (
        "unknown_header_type.vtu",
        Via::Probe,
        &["unsupported header_type 'UInt16'"],
    ),
    (
        "unknown_data_type.vtu",
        Via::Probe,
        &["unsupported data type 'Float128'", "'stress'", "Float64"],
    ),
    (
        "unknown_cell_type.vtu",
        Via::Probe,
        &["unknown cell type 200 of cell 5"],
    ),
    (
        "components_mismatch_appended.vtu",
        Via::DecodeStress,
        &["cell array 'stress'", "expected 1296, found 864"],
    ),
    (
        "offsets_out_of_range.vtu",
        Via::Probe,
        &["offsets end at 1440", "144"],
    ),
    (
        "connectivity_out_of_range.vtu",
        Via::Probe,
        &["cell 2 refers to point 4800", "48 points"],
    ),
    (
        "nan_stress.vtu",
        Via::DecodeStress,
        &[
            "\"stress\"",
            "2 non-finite",
            "cell 4, component 2",
            "--allow-nonfinite",
        ],
    ),
    (
        "nan_stress_appended.vtu",
        Via::DecodeStress,
        &[
            "\"stress\"",
            "1 non-finite",
            "cell 3, component 5",
            "--allow-nonfinite",
        ],
    ),
    (
        "pvd_missing_file.pvd",
        Via::Probe,
        &["missing file 'missing_step.vtu'"],
    ),
    ("pvd_self.pvd", Via::Probe, &["names itself"]),
    ("empty.vtu", Via::Probe, &["not a vtk file", "empty"]),
    (
        "whitespace.vtu",
        Via::Probe,
        &["not a vtk file", "only whitespace"],
    ),
    ("empty.vtk", Via::Probe, &["empty file"]),
    ("whitespace.vtk", Via::Probe, &["empty file", "whitespace"]),
    (
        "non_utf8.vtu",
        Via::Probe,
        &["not valid utf-8", "byte offset 10922"],
    ),
    ("non_utf8.vtk", Via::Probe, &["line 3", "not valid utf-8"]),
    ("not_vtk.vtu", Via::Probe, &["not a vtk file"]),
    (
        "not_vtk.vtk",
        Via::Probe,
        &["line 1", "not a legacy vtk file"],
    ),
    (
        "not_unstructured.vtu",
        Via::Probe,
        &["unsupported", "'PolyData'"],
    ),
    (
        "deep_nesting.vtu",
        Via::Probe,
        &["nested deeper than", "byte offset"],
    ),
    (
        "billion_laughs.vtu",
        Via::Probe,
        &["DOCTYPE", "not allowed"],
    ),
    (
        "legacy_truncated_binary.vtk",
        Via::Probe,
        &["'eqps'", "18 values", "70 bytes"],
    ),
    (
        "legacy_count_mismatch.vtk",
        Via::Probe,
        &["line 26", "count mismatch", "147", "144"],
    ),
    (
        "legacy_not_unstructured.vtk",
        Via::Probe,
        &["line 4", "UNSTRUCTURED_GRID", "POLYDATA"],
    ),
    (
        "legacy_unknown_type.vtk",
        Via::Probe,
        &["line 70", "'quad'", "'eqps'"],
    ),
];

/// Entries of fixtures/vtk/bad handled by their own test below.
const VTK_BAD_SEPARATE: &[&str] = &[
    "components_mismatch.vtu", // the role check refuses it first: components_mismatch_...
    "inf_eqps.vtu",            // nonfinite_eqps_...
    "series_cells_change",     // series_cells_change_...
];

#[test]
fn every_bad_vtk_fixture_fails_with_one_line_naming_the_file() {
    for (file, via, needles) in VTK_BAD {
        let p = bad(file);
        let a = match via {
            Via::Probe => probe(&p),
            Via::DecodeStress => history(&p, &["--at", "max:sigma_vm"]),
        };
        check(&a, 1, file, needles);
    }
}

/// Files whose catalogue reads fine fail only when the array is decoded: `probe` then
/// succeeds (it reads the catalogue only) and the decoding command fails.
#[test]
fn catalogue_only_reads_of_decoder_failures_succeed() {
    for (file, via, _) in VTK_BAD {
        if matches!(via, Via::DecodeStress) {
            let (code, _, err) = run(&probe(&bad(file)));
            assert_eq!(code, 0, "{file}: {err}");
        }
    }
}

/// The catalogue covers every file of fixtures/vtk/bad (index.json), so a new bad
/// fixture cannot go untested.
#[test]
fn catalogue_covers_every_bad_fixture() {
    let index: Value =
        serde_json::from_str(&std::fs::read_to_string(bad("index.json")).unwrap()).unwrap();
    for case in index["cases"].as_array().unwrap() {
        let f = case["file"].as_str().unwrap();
        assert!(
            VTK_BAD.iter().any(|(n, _, _)| *n == f) || VTK_BAD_SEPARATE.contains(&f),
            "{f} has no catalogue entry"
        );
    }
    for e in std::fs::read_dir(root().join("fixtures/vtk/bad")).unwrap() {
        let name = e.unwrap().file_name().into_string().unwrap();
        if name == "README.md" || name == "index.json" {
            continue;
        }
        assert!(
            VTK_BAD.iter().any(|(n, _, _)| *n == name) || VTK_BAD_SEPARATE.contains(&name.as_str()),
            "{name} has no catalogue entry"
        );
    }
}

#[test]
fn components_mismatch_is_refused_as_a_stress() {
    // 5 components declared: refused by the role check before the reader's count check.
    let p = bad("components_mismatch.vtu");
    check(
        &history(
            &p,
            &["--at", "cell:0", "--stress", "stress", "--location", "cell"],
        ),
        1,
        "components_mismatch.vtu",
        &["'stress'", "5 components", "expected 6 or 9"],
    );
    // Without --stress the 6-component point stress is not at the cell location of eqps
    // and no cell stress qualifies: the message lists the arrays.
    check(
        &history(&p, &["--at", "cell:0"]),
        1,
        "components_mismatch.vtu",
        &["no stress array found", "--stress", "stress (cell, 5)"],
    );
}

#[test]
fn series_cells_change_names_the_increment_file() {
    check(
        &history(&bad("series_cells_change"), &["--at", "cell:0"]),
        1,
        "run_0002.vtu",
        &["cell count", "changed", "6", "18"],
    );
}

#[test]
fn nonfinite_stress_at_the_chosen_entity() {
    check(
        &history(&bad("nan_stress.vtu"), &["--at", "cell:4"]),
        1,
        "nan_stress.vtu",
        &["cell 4", "zz", "not finite", "nan"],
    );
    check(
        &history(&bad("nan_stress.vtu"), &["--at", "cell:9"]),
        1,
        "nan_stress.vtu",
        &["cell 9", "xx", "-inf"],
    );
    // --allow-nonfinite skips them in a max: scan: the choice is neither cell 4 nor 9.
    let (code, out, err) = run(&history(
        &bad("nan_stress.vtu"),
        &[
            "--at",
            "max:sigma_vm",
            "--allow-nonfinite",
            "--format",
            "json",
        ],
    ));
    assert_eq!(code, 0, "{err}");
    let v: Value = serde_json::from_str(&out).unwrap();
    let id = v["point"]["id"].as_u64().unwrap();
    assert!(id != 4 && id != 9, "chose a non-finite cell {id}");
}

#[test]
fn nonfinite_eqps_refused_for_max_unless_allowed() {
    let p = bad("inf_eqps.vtu");
    check(
        &history(&p, &["--at", "max:eqps"]),
        1,
        "inf_eqps.vtu",
        &["\"eqps\"", "1 non-finite", "cell 7", "--allow-nonfinite"],
    );
    let (code, out, err) = run(&history(
        &p,
        &["--at", "max:eqps", "--allow-nonfinite", "--format", "json"],
    ));
    assert_eq!(code, 0, "{err}");
    let v: Value = serde_json::from_str(&out).unwrap();
    assert_ne!(
        v["point"]["id"].as_u64().unwrap(),
        7,
        "the inf cell was chosen"
    );
    // At the non-finite entity itself the history is refused, allowed or not.
    for extra in [&[][..], &["--allow-nonfinite"][..]] {
        let mut a = vec!["--at", "cell:7"];
        a.extend_from_slice(extra);
        check(
            &history(&p, &a),
            1,
            "inf_eqps.vtu",
            &["\"eqps\"", "cell 7", "inf"],
        );
    }
}

// ---------------------------------------------------------------------------------------
// Extra inputs, made here: small ASCII .vtu files (a row of unit hexahedra) and .pvd files.
// ---------------------------------------------------------------------------------------

/// One cell's (stress in VTK order, eqps).
type CellData = ([f64; 6], f64);

fn num(v: f64) -> String {
    if v.is_nan() {
        "nan".into()
    } else if v.is_infinite() {
        if v > 0.0 { "inf".into() } else { "-inf".into() }
    } else {
        format!("{v:?}")
    }
}

/// An ASCII .vtu of `cells.len()` unit hexahedra in a row along x starting at `x0`, with
/// cell data `stress` (6) and `eqps` (1); with `point_data`, the same arrays as point data
/// (every point of cell k gets cell k's values; shared points get the later cell's).
fn vtu(cells: &[CellData], x0: f64, point_data: bool) -> String {
    let n = cells.len();
    let mut pts = Vec::new();
    for i in 0..=n {
        let x = x0 + i as f64;
        for (y, z) in [(0.0, 0.0), (1.0, 0.0), (1.0, 1.0), (0.0, 1.0)] {
            pts.push(format!("{x} {y} {z}"));
        }
    }
    let mut conn = Vec::new();
    for i in 0..n {
        let a = 4 * i;
        let b = 4 * (i + 1);
        conn.push(format!(
            "{} {} {} {} {} {} {} {}",
            a,
            b,
            b + 1,
            a + 1,
            a + 3,
            b + 3,
            b + 2,
            a + 2
        ));
    }
    let offsets: Vec<String> = (1..=n).map(|i| (8 * i).to_string()).collect();
    let types = vec!["12"; n].join(" ");
    let stress: Vec<String> = cells
        .iter()
        .map(|(s, _)| s.iter().map(|v| num(*v)).collect::<Vec<_>>().join(" "))
        .collect();
    let eqps: Vec<String> = cells.iter().map(|(_, e)| num(*e)).collect();
    let arrays = |st: &[String], eq: &[String]| {
        format!(
            "<DataArray type=\"Float64\" Name=\"stress\" NumberOfComponents=\"6\" format=\"ascii\">{}</DataArray>\n\
             <DataArray type=\"Float64\" Name=\"eqps\" format=\"ascii\">{}</DataArray>\n",
            st.join(" "),
            eq.join(" ")
        )
    };
    let point = if point_data {
        let mut st = Vec::new();
        let mut eq = Vec::new();
        for i in 0..=n {
            let k = i.min(n - 1);
            for _ in 0..4 {
                st.push(stress[k].clone());
                eq.push(eqps[k].clone());
            }
        }
        format!("<PointData>\n{}</PointData>\n", arrays(&st, &eq))
    } else {
        String::new()
    };
    format!(
        "<?xml version=\"1.0\"?>\n<VTKFile type=\"UnstructuredGrid\" version=\"1.0\" byte_order=\"LittleEndian\">\n\
         <UnstructuredGrid><Piece NumberOfPoints=\"{}\" NumberOfCells=\"{n}\">\n\
         <Points><DataArray type=\"Float64\" NumberOfComponents=\"3\" format=\"ascii\">{}</DataArray></Points>\n\
         <Cells>\n<DataArray type=\"Int64\" Name=\"connectivity\" format=\"ascii\">{}</DataArray>\n\
         <DataArray type=\"Int64\" Name=\"offsets\" format=\"ascii\">{}</DataArray>\n\
         <DataArray type=\"UInt8\" Name=\"types\" format=\"ascii\">{types}</DataArray>\n</Cells>\n\
         {point}<CellData>\n{}</CellData>\n</Piece></UnstructuredGrid></VTKFile>\n",
        4 * (n + 1),
        pts.join(" "),
        conn.join(" "),
        offsets.join(" "),
        arrays(&stress, &eqps)
    )
}

/// A .pvd listing (timestep, part, file) in the order given.
fn pvd(entries: &[(f64, u32, &str)]) -> String {
    let mut s = String::from(
        "<?xml version=\"1.0\"?>\n<VTKFile type=\"Collection\" version=\"1.0\">\n<Collection>\n",
    );
    for (t, part, f) in entries {
        s.push_str(&format!(
            "<DataSet timestep=\"{t}\" part=\"{part}\" file=\"{f}\"/>\n"
        ));
    }
    s.push_str("</Collection>\n</VTKFile>\n");
    s
}

fn write(dir: &Path, name: &str, text: &str) -> PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

fn uniaxial(s: f64) -> [f64; 6] {
    [s, 0.0, 0.0, 0.0, 0.0, 0.0]
}

#[test]
fn nan_eqps_refused_for_max_unless_allowed() {
    let d = tempfile::tempdir().unwrap();
    let p = write(
        d.path(),
        "nan_eqps.vtu",
        &vtu(
            &[
                (uniaxial(100.0), 0.1),
                (uniaxial(200.0), f64::NAN),
                (uniaxial(300.0), 0.05),
            ],
            0.0,
            false,
        ),
    );
    check(
        &history(&p, &["--at", "max:eqps"]),
        1,
        "nan_eqps.vtu",
        &["\"eqps\"", "1 non-finite", "cell 1", "--allow-nonfinite"],
    );
    let (code, out, err) = run(&history(
        &p,
        &["--at", "max:eqps", "--allow-nonfinite", "--format", "json"],
    ));
    assert_eq!(code, 0, "{err}");
    let v: Value = serde_json::from_str(&out).unwrap();
    // the NaN is skipped: the largest finite eqps is cell 0's 0.1
    assert_eq!(v["point"]["id"].as_u64().unwrap(), 0);
    check(
        &history(&p, &["--at", "cell:1"]),
        1,
        "nan_eqps.vtu",
        &["cell 1", "nan"],
    );
}

#[test]
fn eqps_decreasing_at_the_chosen_point() {
    let d = tempfile::tempdir().unwrap();
    // cell 0: 0, 0.1, 0.05, 0.2 (decreases between increments 1 and 2); cell 1 increases.
    let e0 = [0.0, 0.1, 0.05, 0.2];
    let e1 = [0.0, 0.2, 0.3, 0.4];
    let mut list = Vec::new();
    let names: Vec<String> = (0..4).map(|i| format!("d{i}.vtu")).collect();
    for i in 0..4 {
        let s = 100.0 * (i + 1) as f64;
        write(
            d.path(),
            &names[i],
            &vtu(&[(uniaxial(s), e0[i]), (uniaxial(s), e1[i])], 0.0, false),
        );
    }
    for (i, n) in names.iter().enumerate() {
        list.push((i as f64, 0, n.as_str()));
    }
    let p = write(d.path(), "dec.pvd", &pvd(&list));
    check(
        &history(&p, &["--at", "cell:0"]),
        1,
        "dec.pvd",
        &[
            "decreases",
            "cell 0",
            "0.1 at increment 1",
            "0.05 at increment 2",
        ],
    );
    check(
        &history(&p, &["--at", "cell:0", "--until", "eqps:0.15"]),
        1,
        "dec.pvd",
        &["decreases", "cell 0"],
    );
    // Before the decrease the history is fine; another point is not affected.
    for extra in [
        &["--at", "cell:0", "--until", "increment:1"][..],
        &["--at", "cell:1"][..],
    ] {
        let (code, _, err) = run(&history(&p, extra));
        assert_eq!(code, 0, "{extra:?}: {err}");
    }
    // max:eqps at the last increment chooses cell 1 (0.4 > 0.2): no error either.
    let (code, out, err) = run(&history(&p, &["--at", "max:eqps", "--format", "json"]));
    assert_eq!(code, 0, "{err}");
    let v: Value = serde_json::from_str(&out).unwrap();
    assert_eq!(v["point"]["id"].as_u64().unwrap(), 1);
}

/// Non-monotonic listing order: the reader sorts by timestep (fixtures/vtk/good/series_pvd
/// lists 1.0, 0.0, 1.5, 0.5 for s0, s3, s2, s1; its generator's README).
#[test]
fn pvd_listed_out_of_order_is_sorted_by_time() {
    let p = good("series_pvd/collection.pvd");
    let (code, out, err) = run(&args(&["probe", p.to_str().unwrap(), "--format", "json"]));
    assert_eq!(code, 0, "{err}");
    let v: Value = serde_json::from_str(&out).unwrap();
    let incs = v["increments"].as_array().unwrap();
    let got: Vec<(f64, String)> = incs
        .iter()
        .map(|i| {
            let f = i["file"].as_str().unwrap();
            (
                i["time"].as_f64().unwrap(),
                Path::new(f)
                    .file_name()
                    .unwrap()
                    .to_str()
                    .unwrap()
                    .to_string(),
            )
        })
        .collect();
    let want = [
        (0.0, "s3.vtu"),
        (0.5, "s1.vtu"),
        (1.0, "s0.vtu"),
        (1.5, "s2.vtu"),
    ];
    assert_eq!(got.len(), want.len());
    for ((t, f), (wt, wf)) in got.iter().zip(want) {
        assert_eq!((*t, f.as_str()), (wt, wf));
    }
}

/// Duplicate timesteps: datasets sharing a timestep are the parts (pieces) of ONE
/// increment (the reader's rule, crates/vtk/src/series.rs `read_pvd`; the .pvd format lets
/// a timestep list several `part`s). Consistent parts at every timestep make one mesh of
/// all parts; a duplicate at only some timesteps changes the number of pieces and is
/// refused when that increment is read, naming its file.
#[test]
fn pvd_duplicate_times_are_parts_of_one_increment() {
    let d = tempfile::tempdir().unwrap();
    for (k, s0) in [(0, 100.0), (1, 200.0)] {
        // part 0: cell at x 0..1; part 1: cell at x 1..2, with twice the stress
        write(
            d.path(),
            &format!("a{k}.vtu"),
            &vtu(&[(uniaxial(s0), 0.1 * k as f64)], 0.0, false),
        );
        write(
            d.path(),
            &format!("b{k}.vtu"),
            &vtu(&[(uniaxial(2.0 * s0), 0.2 * k as f64)], 1.0, false),
        );
    }
    let both = write(
        d.path(),
        "both.pvd",
        &pvd(&[
            (0.0, 0, "a0.vtu"),
            (0.0, 1, "b0.vtu"),
            (1.0, 1, "b1.vtu"),
            (1.0, 0, "a1.vtu"),
        ]),
    );
    let (code, out, err) = run(&args(&[
        "probe",
        both.to_str().unwrap(),
        "--format",
        "json",
    ]));
    assert_eq!(code, 0, "{err}");
    let v: Value = serde_json::from_str(&out).unwrap();
    assert_eq!(v["increments"].as_array().unwrap().len(), 2);
    assert_eq!(
        v["cells"].as_u64().unwrap(),
        2,
        "parts are pieces of one mesh"
    );
    let (code, out, err) = run(&history(&both, &["--at", "cell:1", "--format", "json"]));
    assert_eq!(code, 0, "{err}");
    let v: Value = serde_json::from_str(&out).unwrap();
    let rows = v["rows"].as_array().unwrap();
    // cell 1 is part 1's cell: σ_vm of uniaxial 200 then 400 (σ_vm = |σ| in uniaxial tension)
    assert!((rows[0]["sigma_vm"].as_f64().unwrap() - 200.0).abs() < 1e-9);
    assert!((rows[1]["sigma_vm"].as_f64().unwrap() - 400.0).abs() < 1e-9);

    let some = write(
        d.path(),
        "some.pvd",
        &pvd(&[(0.0, 0, "a0.vtu"), (1.0, 0, "a1.vtu"), (1.0, 1, "b1.vtu")]),
    );
    check(
        &history(&some, &["--at", "cell:0"]),
        1,
        "a1.vtu",
        &[
            "number of pieces changed",
            "first increment has 1, this one 2",
        ],
    );
}

#[test]
fn single_increment_series_has_null_averages() {
    let (code, out, err) = run(&history(
        &good("hex_ascii.vtu"),
        &["--at", "cell:0", "--format", "json"],
    ));
    assert_eq!(code, 0, "{err}");
    let v: Value = serde_json::from_str(&out).unwrap();
    assert_eq!(v["rows"].as_array().unwrap().len(), 1);
    assert!(v["summary"]["triaxiality_avg"].is_null());
    assert!(v["summary"]["lode_angle_param_avg"].is_null());
    assert_eq!(v["summary"]["increments_integrated"].as_u64().unwrap(), 0);
    // the CSV writes the undefined averages as empty fields, not NaN
    let (code, out, err) = run(&history(
        &good("hex_ascii.vtu"),
        &["--at", "cell:0", "--format", "csv"],
    ));
    assert_eq!(code, 0, "{err}");
    assert!(!out.to_lowercase().contains("nan"), "{out}");
}

#[test]
fn stop_outside_the_series() {
    let p = good("series_pvd/collection.pvd");
    let cases: &[(&str, &[&str])] = &[
        (
            "time:5",
            &["stop time:5 is outside the series", "times 0 to 1.5"],
        ),
        ("time:-1", &["stop time:-1 is outside the series"]),
        (
            "increment:10",
            &[
                "stop increment:10 is outside the series",
                "increments 0 to 3",
            ],
        ),
        (
            "eqps:100",
            &["stop eqps:100 is never reached at cell 0", "0 to 0.01"],
        ),
    ];
    for (stop, needles) in cases {
        check(
            &history(&p, &["--at", "cell:0", "--until", stop]),
            1,
            "collection.pvd",
            needles,
        );
    }
    // A gauge stop without a gauge is a usage error, found before any file is read.
    check(
        &history(&p, &["--at", "cell:0", "--until", "gauge:1"]),
        2,
        "",
        &["--until gauge:u needs a gauge definition", "--gauge"],
    );
}

#[test]
fn selector_out_of_range() {
    let p = good("series_pvd/collection.pvd");
    check(
        &history(&p, &["--at", "cell:6"]),
        1,
        "collection.pvd",
        &["cell id 6 is out of range", "6 cells", "ids 0 to 5"],
    );
    check(
        &history(&p, &["--at", "near:1e9,0,0"]),
        1,
        "collection.pvd",
        &["lies outside the mesh", "bounding box"],
    );
    // point data: a row of 2 cells has 12 points (ids 0 to 11)
    let d = tempfile::tempdir().unwrap();
    let q = write(
        d.path(),
        "points.vtu",
        &vtu(&[(uniaxial(100.0), 0.1), (uniaxial(100.0), 0.1)], 0.0, true),
    );
    check(
        &history(&q, &["--at", "point:12", "--location", "point"]),
        1,
        "points.vtu",
        &["point id 12 is out of range", "12 points"],
    );
}

#[test]
fn gauge_point_outside_the_mesh() {
    let p = good("series_pvd/collection.pvd");
    for g in ["1e6,0,0:0.1,0,0.5", "0,0,0/x"] {
        check(
            &history(
                &p,
                &["--at", "cell:0", "--gauge", g, "--until", "gauge:0.1"],
            ),
            1,
            "collection.pvd",
            &["gauge point", "lies outside the mesh", "bounding box"],
        );
    }
}

/// Syntax errors of the small languages are usage errors (exit 2): the message quotes the
/// text and the expected form (no file is involved).
#[test]
fn selector_stop_gauge_syntax_errors() {
    let p = good("hex_ascii.vtu");
    let cases: &[(&[&str], &[&str])] = &[
        (
            &["--at", "bogus:1"],
            &["invalid selector \"bogus:1\"", "cell:ID"],
        ),
        (
            &["--at", "point:-1"],
            &["invalid selector", "not a non-negative integer"],
        ),
        (
            &["--at", "cell:99999999999999999999999"],
            &["invalid selector", "not a non-negative integer"],
        ),
        (
            &["--at", "near:nan,0,0"],
            &["invalid selector", "not finite"],
        ),
        (
            &["--at", "cell:0", "--until", "time:abc"],
            &["invalid stop \"time:abc\"", "not a number"],
        ),
        (
            &["--at", "cell:0", "--gauge", "0,0,0/Q"],
            &["invalid gauge", "axis", "x, y, z"],
        ),
    ];
    for (extra, needles) in cases {
        check(&history(&p, extra), 2, "", needles);
    }
}

// ---------------------------------------------------------------------------------------
// Studies, tables and fit files.
// ---------------------------------------------------------------------------------------

/// The bundled study with absolute result paths, optionally edited.
fn study_text(edit: impl Fn(String) -> String) -> String {
    let dir = root().join("fixtures/campaign");
    let text = std::fs::read_to_string(dir.join("study.toml")).unwrap();
    let text = text.replace("result = \"", &format!("result = \"{}/", dir.display()));
    edit(text)
}

/// The study with only its first `n` specimens.
fn first_specimens(text: &str, n: usize) -> String {
    let parts: Vec<&str> = text.split("[[specimen]]").collect();
    let mut s = parts[0].to_string();
    for p in &parts[1..=n] {
        s.push_str("[[specimen]]");
        s.push_str(p);
    }
    s
}

#[test]
fn study_with_a_missing_result_folder_writes_the_other_rows() {
    let d = tempfile::tempdir().unwrap();
    let st = write(
        d.path(),
        "study.toml",
        &study_text(|t| t.replace("nrb_r4/nrb_r4.pvd", "nowhere/nrb_r4.pvd")),
    );
    let out = d.path().join("table.csv");
    let (code, _, err) = run(&args(&[
        "table",
        st.to_str().unwrap(),
        "--format",
        "csv",
        "-o",
        out.to_str().unwrap(),
    ]));
    assert_eq!(code, 1, "{err}");
    // one line per failed specimen, naming it and the missing path, then the count
    let lines: Vec<&str> = err.lines().collect();
    assert_eq!(lines.len(), 2, "{err}");
    assert!(
        lines[0].starts_with("ductrace: error: specimen nrb-r4: "),
        "{err}"
    );
    assert!(
        lines[0].contains("nowhere/nrb_r4.pvd") && lines[0].contains("cannot open"),
        "{err}"
    );
    assert!(
        !lines[0].contains("specimen \"nrb-r4\""),
        "name repeated: {err}"
    );
    assert_eq!(lines[1], "ductrace: error: 1 of 6 specimens failed");
    let table = std::fs::read_to_string(&out).unwrap();
    let rows: Vec<&str> = table
        .lines()
        .filter(|l| !l.starts_with('#'))
        .skip(1)
        .collect();
    assert_eq!(rows.len(), 5, "{table}");
    for name in ["srb", "nrb-r10", "nrb-r2", "pst-r2", "shear"] {
        assert!(
            rows.iter().any(|r| r.starts_with(&format!("{name},"))),
            "{name}: {table}"
        );
    }
    assert!(table.contains("# failed: nrb-r4: "), "{table}");
}

#[test]
fn too_few_specimens_for_the_model() {
    let d = tempfile::tempdir().unwrap();
    let st = write(
        d.path(),
        "one.toml",
        &first_specimens(&study_text(|t| t), 1),
    );
    for model in ["jc", "hc"] {
        check(
            &args(&["fit", st.to_str().unwrap(), "--model", model]),
            1,
            "one.toml",
            &[
                &format!("model {model}"),
                "needs at least 3 data points",
                "1 given",
            ],
        );
    }
    // the same through a table file
    let table = d.path().join("one.csv");
    let (code, _, err) = run(&args(&[
        "table",
        st.to_str().unwrap(),
        "--format",
        "csv",
        "-o",
        table.to_str().unwrap(),
    ]));
    assert_eq!(code, 0, "{err}");
    check(
        &args(&["fit", table.to_str().unwrap(), "--model", "jc"]),
        1,
        "one.csv",
        &["needs at least 3 data points", "1 given"],
    );
}

#[test]
fn study_with_an_unknown_key_names_key_and_line() {
    let d = tempfile::tempdir().unwrap();
    let text =
        study_text(|t| t.replacen("kind = \"shear\"", "kind = \"shear\"\ncolour = \"red\"", 1));
    let line = text.lines().position(|l| l.starts_with("colour")).unwrap() + 1;
    let st = write(d.path(), "study.toml", &text);
    check(
        &args(&["table", st.to_str().unwrap()]),
        1,
        "study.toml",
        &[
            &format!("line {line}"),
            "unknown field `colour`",
            "expected one of",
        ],
    );
}

#[test]
fn fit_file_not_json_or_unknown_model() {
    let d = tempfile::tempdir().unwrap();
    let not_json = write(d.path(), "fit.json", "not json {");
    let unknown = write(
        d.path(),
        "zz.json",
        "{\"model\": \"zz\", \"parameters\": {}}",
    );
    let no_model = write(d.path(), "nomodel.json", "[1, 2]");
    let study = root().join("fixtures/campaign/study.toml");
    let result = root().join("fixtures/campaign/srb/srb.pvd");
    let out = d.path().join("exported");
    let cases: Vec<(Vec<String>, &str, &[&str])> = vec![
        (
            args(&[
                "damage",
                study.to_str().unwrap(),
                "--locus",
                not_json.to_str().unwrap(),
            ]),
            "fit.json",
            &["not a fit file"],
        ),
        (
            args(&[
                "damage",
                study.to_str().unwrap(),
                "--locus",
                unknown.to_str().unwrap(),
            ]),
            "zz.json",
            &["unknown fracture-locus model 'zz'", "jc, mmc, hc"],
        ),
        (
            args(&[
                "damage",
                study.to_str().unwrap(),
                "--locus",
                no_model.to_str().unwrap(),
            ]),
            "nomodel.json",
            &["no \"model\" key"],
        ),
        (
            args(&[
                "export",
                result.to_str().unwrap(),
                "-o",
                out.to_str().unwrap(),
                "--locus",
                not_json.to_str().unwrap(),
            ]),
            "fit.json",
            &["not a fit file"],
        ),
        (
            args(&[
                "export",
                result.to_str().unwrap(),
                "-o",
                out.to_str().unwrap(),
                "--locus",
                unknown.to_str().unwrap(),
            ]),
            "zz.json",
            &["unknown fracture-locus model 'zz'"],
        ),
        (
            args(&["fit", not_json.to_str().unwrap(), "--model", "jc"]),
            "fit.json",
            &["not json"],
        ),
    ];
    for (a, file, needles) in &cases {
        check(a, 1, file, needles);
    }
    // the refused export wrote nothing
    assert!(!out.exists(), "export created {}", out.display());
}

/// A study file that is not TOML, or missing, names the file.
#[test]
fn study_not_toml_or_missing() {
    let d = tempfile::tempdir().unwrap();
    let st = write(d.path(), "broken.toml", "title = \"x\"\n[[specimen]\n");
    check(
        &args(&["table", st.to_str().unwrap()]),
        1,
        "broken.toml",
        &["line 2"],
    );
    let missing = d.path().join("absent.toml");
    check(
        &args(&["table", missing.to_str().unwrap()]),
        1,
        "absent.toml",
        &["cannot read"],
    );
}

#[test]
fn study_with_a_missing_result_folder_cannot_be_fitted() {
    let d = tempfile::tempdir().unwrap();
    let st = write(
        d.path(),
        "study.toml",
        &study_text(|t| t.replace("nrb_r4/nrb_r4.pvd", "nowhere/nrb_r4.pvd")),
    );
    check(
        &args(&["fit", st.to_str().unwrap(), "--model", "jc"]),
        1,
        "nowhere/nrb_r4.pvd",
        &["specimen nrb-r4 failed", "cannot be fitted", "cannot open"],
    );
}

/// The same file twice at one timestep would duplicate its cells: refused. A timestep that
/// is not a finite number: refused with its byte offset.
#[test]
fn pvd_same_file_twice_or_nonfinite_timestep() {
    let d = tempfile::tempdir().unwrap();
    write(
        d.path(),
        "a.vtu",
        &vtu(&[(uniaxial(100.0), 0.0)], 0.0, false),
    );
    write(
        d.path(),
        "b.vtu",
        &vtu(&[(uniaxial(200.0), 0.1)], 0.0, false),
    );
    let twice = write(
        d.path(),
        "twice.pvd",
        &pvd(&[(0.0, 0, "a.vtu"), (1.0, 0, "b.vtu"), (1.0, 1, "b.vtu")]),
    );
    check(
        &probe(&twice),
        1,
        "twice.pvd",
        &["'b.vtu' is listed twice at timestep 1"],
    );
    for bad_t in ["nan", "inf"] {
        let text = pvd(&[(0.0, 0, "a.vtu"), (1.0, 0, "b.vtu")])
            .replace("timestep=\"1\"", &format!("timestep=\"{bad_t}\""));
        let p = write(d.path(), "t.pvd", &text);
        check(
            &probe(&p),
            1,
            "t.pvd",
            &[
                &format!("timestep=\"{bad_t}\" is not a finite number"),
                "byte offset",
            ],
        );
    }
}

/// σ_vm → 0 between plastic increments: where the stress is zero or hydrostatic at an end
/// of a segment with plastic flow, η (and θ̄) is undefined there and the trapezoid average
/// cannot be formed (Bao & Wierzbicki 2004's average needs η along the whole path): refused,
/// naming the entity, the increment and the plastic increment. Before it, the history works.
#[test]
fn vanishing_stress_under_plastic_flow() {
    let d = tempfile::tempdir().unwrap();
    // (tag, stress at increment 2, eqps per increment, segment named in the message)
    let cases: [(&str, [f64; 6], [f64; 4], &str); 3] = [
        (
            "zero",
            [0.0; 6],
            [0.0, 0.1, 0.2, 0.3],
            "between increments 1 and 2",
        ),
        (
            "hydro",
            [50.0, 50.0, 50.0, 0.0, 0.0, 0.0],
            [0.0, 0.1, 0.2, 0.3],
            "between increments 1 and 2",
        ),
        (
            "unload",
            [0.0; 6],
            [0.0, 0.1, 0.1, 0.3],
            "between increments 2 and 3",
        ),
    ];
    for (tag, st2, eq, seg) in cases {
        let mut list = Vec::new();
        let names: Vec<String> = (0..4).map(|i| format!("{tag}{i}.vtu")).collect();
        for i in 0..4 {
            let st = if i == 2 {
                st2
            } else {
                uniaxial(100.0 * (i + 1) as f64)
            };
            write(d.path(), &names[i], &vtu(&[(st, eq[i])], 0.0, false));
            list.push((i as f64, 0, names[i].as_str()));
        }
        let p = write(d.path(), &format!("{tag}.pvd"), &pvd(&list));
        check(
            &history(&p, &["--at", "cell:0"]),
            1,
            &format!("{tag}.pvd"),
            &[
                "cell 0",
                "triaxiality is undefined at increment 2",
                "plastic strain grows",
                seg,
            ],
        );
        let (code, _, err) = run(&history(&p, &["--at", "cell:0", "--until", "increment:1"]));
        assert_eq!(code, 0, "{tag}: {err}");
    }
}
