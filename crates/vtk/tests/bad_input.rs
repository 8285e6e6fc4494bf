//! One test per bad-input case of the reader: each asserts the substance of the one-line message
//! and that it names the file. Inputs are built here, from small hand-written files and from
//! the crate's test encoder.

#![allow(clippy::unwrap_used)] // test helpers unwrap like the tests do

use std::path::{Path, PathBuf};

use ductrace_vtk::testenc::{self, Arr, Comp, Enc, Format, Piece};
use ductrace_vtk::{Error, Location, Series, find_nonfinite};

struct Dir(tempfile::TempDir);

impl Dir {
    fn new() -> Dir {
        Dir(tempfile::tempdir().unwrap())
    }
    fn put(&self, name: &str, bytes: impl AsRef<[u8]>) -> PathBuf {
        let p = self.0.path().join(name);
        std::fs::write(&p, bytes).unwrap();
        p
    }
}

/// Opens, decodes the reference mesh and reads every field of every increment; the first error.
fn open_and_read(path: &Path) -> Result<(), Error> {
    let s = Series::open(path)?;
    s.mesh()?;
    let mut buf = Vec::new();
    for info in s.increments() {
        let inc = s.increment(info.index)?;
        for f in s.fields() {
            inc.read(&f.name, f.location, &mut buf)?;
        }
    }
    Ok(())
}

/// Asserts failure with a one-line message naming the file and containing every `parts`.
fn check(path: &Path, parts: &[&str]) {
    let e = match open_and_read(path) {
        Ok(()) => panic!("{} was accepted", path.display()),
        Err(e) => e.to_string(),
    };
    assert!(!e.contains('\n'), "message is not one line: {e}");
    let name = path.file_name().unwrap().to_string_lossy();
    assert!(e.contains(&*name), "message does not name the file: {e}");
    for p in parts {
        assert!(e.contains(p), "message lacks '{p}': {e}");
    }
    // after the path, the message starts lower-case (values may keep their case)
    let rest = e.split_once(": ").map_or(e.as_str(), |(_, r)| r);
    assert!(
        rest.starts_with(|c: char| !c.is_uppercase()),
        "not lower-case: {e}"
    );
}

const POINTS: &str = "0 0 0 1 0 0 1 1 0 0 1 0 0 0 1 1 0 1 1 1 1 0 1 1";

/// One hexahedron, mesh in ascii, a cell array `stress` described by `array_attrs` whose
/// payload is `inline` text or appended `appended` bytes.
fn hex_file(root_attrs: &str, array_attrs: &str, inline: &str, appended: Option<&[u8]>) -> Vec<u8> {
    hex_file_cells(
        root_attrs,
        array_attrs,
        inline,
        appended,
        "0 1 2 3 4 5 6 7",
        "8",
        "12",
    )
}

fn hex_file_cells(
    root_attrs: &str,
    array_attrs: &str,
    inline: &str,
    appended: Option<&[u8]>,
    conn: &str,
    offsets: &str,
    types: &str,
) -> Vec<u8> {
    let mut s = format!(
        "<?xml version=\"1.0\"?>\n<VTKFile type=\"UnstructuredGrid\" version=\"1.0\" {root_attrs}>\n<UnstructuredGrid>\n<Piece NumberOfPoints=\"8\" NumberOfCells=\"1\">\n<CellData>\n<DataArray Name=\"stress\" {array_attrs}>{inline}</DataArray>\n</CellData>\n<Points><DataArray type=\"Float64\" NumberOfComponents=\"3\" format=\"ascii\">{POINTS}</DataArray></Points>\n<Cells>\n<DataArray type=\"Int64\" Name=\"connectivity\" format=\"ascii\">{conn}</DataArray>\n<DataArray type=\"Int64\" Name=\"offsets\" format=\"ascii\">{offsets}</DataArray>\n<DataArray type=\"UInt8\" Name=\"types\" format=\"ascii\">{types}</DataArray>\n</Cells>\n</Piece>\n</UnstructuredGrid>\n"
    )
    .into_bytes();
    if let Some(a) = appended {
        s.extend_from_slice(b"<AppendedData encoding=\"raw\">\n_");
        s.extend_from_slice(a);
        s.extend_from_slice(b"\n</AppendedData>\n");
    }
    s.extend_from_slice(b"</VTKFile>\n");
    s
}

const APPENDED: &str = "type=\"Float64\" NumberOfComponents=\"6\" format=\"appended\" offset=\"0\"";

fn le32(v: &[u32]) -> Vec<u8> {
    v.iter().flat_map(|x| x.to_le_bytes()).collect()
}

fn stress_bytes() -> Vec<u8> {
    (0..6).flat_map(|i| (i as f64).to_le_bytes()).collect()
}

#[test]
fn good_reference_file_is_accepted() {
    // the base of the cases below reads fine
    let d = Dir::new();
    let mut a = le32(&[48]);
    a.extend(stress_bytes());
    let p = d.put("ok.vtu", hex_file("", APPENDED, "", Some(&a)));
    open_and_read(&p).unwrap();
}

#[test]
fn truncated_in_xml_header() {
    let d = Dir::new();
    let full = hex_file(
        "",
        "type=\"Float64\" NumberOfComponents=\"6\" format=\"ascii\"",
        "0 1 2 3 4 5",
        None,
    );
    let p = d.put("cut.vtu", &full[..full.len() / 2]);
    check(&p, &["ends inside", "truncated"]);
}

#[test]
fn truncated_in_inline_base64() {
    use base64::Engine as _;
    let d = Dir::new();
    let mut a = le32(&[48]);
    a.extend(&stress_bytes()[..20]);
    let text = base64::engine::general_purpose::STANDARD.encode(&a);
    let p = d.put(
        "inline.vtu",
        hex_file(
            "",
            "type=\"Float64\" NumberOfComponents=\"6\" format=\"binary\"",
            &text,
            None,
        ),
    );
    check(&p, &["truncated", "'stress'"]);
}

#[test]
fn truncated_in_appended_data() {
    let d = Dir::new();
    let mut a = le32(&[48]);
    a.extend(stress_bytes());
    let full = hex_file("", APPENDED, "", Some(&a));
    // cut inside the appended array (the file's end)
    let pos = full.windows(2).position(|w| w == b"\n_").unwrap() + 2 + 4 + 20;
    let p = d.put("app.vtu", &full[..pos]);
    check(
        &p,
        &["truncated", "'stress'", "needs 48 bytes", "holds only 20"],
    );
}

#[test]
fn header_claims_more_bytes_than_the_file() {
    let d = Dir::new();
    // UInt64 header claiming 2^40 bytes
    let mut a = (1u64 << 40).to_le_bytes().to_vec();
    a.extend(stress_bytes());
    let p = d.put(
        "claim.vtu",
        hex_file("header_type=\"UInt64\"", APPENDED, "", Some(&a)),
    );
    check(
        &p,
        &[
            "byte count in the binary header",
            "expected 48",
            "1099511627776",
        ],
    );
}

#[test]
fn block_table_claims_more_blocks_than_the_file() {
    let d = Dir::new();
    let a = le32(&[1 << 30, 48, 48, 10]);
    let p = d.put(
        "blocks.vtu",
        hex_file(
            "compressor=\"vtkZLibDataCompressor\"",
            APPENDED,
            "",
            Some(&a),
        ),
    );
    check(&p, &["truncated", "'stress'"]);
}

#[test]
fn block_table_claims_more_compressed_bytes_than_the_file() {
    let d = Dir::new();
    let mut a = le32(&[1, 48, 48, 1 << 31]);
    a.extend([0u8; 16]);
    let p = d.put(
        "csize.vtu",
        hex_file(
            "compressor=\"vtkZLibDataCompressor\"",
            APPENDED,
            "",
            Some(&a),
        ),
    );
    check(&p, &["truncated", "needs 2147483648 bytes"]);
}

#[test]
fn uncompressed_size_beyond_limits_is_refused_before_allocating() {
    let d = Dir::new();
    // a piece claiming 10^15 points: the points' header must say 24e15 bytes, which the file cannot hold
    let s = "<VTKFile type=\"UnstructuredGrid\"><UnstructuredGrid><Piece NumberOfPoints=\"1000000000000000\" NumberOfCells=\"0\"><Points><DataArray type=\"Float64\" NumberOfComponents=\"3\" format=\"appended\" offset=\"0\"/></Points></Piece></UnstructuredGrid><AppendedData encoding=\"raw\">_AAAA</AppendedData></VTKFile>";
    let p = d.put("huge.vtu", s);
    check(&p, &["point coordinates"]);
}

fn corrupt_case(comp: &str, name: &str) {
    let d = Dir::new();
    let junk: Vec<u8> = (0..40u8).map(|i| i.wrapping_mul(37) ^ 0x5a).collect();
    let mut a = le32(&[1, 48, 48, junk.len() as u32]);
    a.extend(&junk);
    let p = d.put(
        name,
        hex_file(&format!("compressor=\"{comp}\""), APPENDED, "", Some(&a)),
    );
    let short = match comp {
        "vtkZLibDataCompressor" => "zlib",
        "vtkLZ4DataCompressor" => "lz4",
        _ => "lzma",
    };
    check(&p, &["corrupt", "'stress'", "block 0", short]);
}

#[test]
fn corrupt_zlib() {
    corrupt_case("vtkZLibDataCompressor", "z.vtu");
}

#[test]
fn corrupt_lz4() {
    corrupt_case("vtkLZ4DataCompressor", "l.vtu");
}

#[test]
fn corrupt_lzma() {
    corrupt_case("vtkLZMADataCompressor", "x.vtu");
}

#[test]
fn corrupt_base64() {
    let d = Dir::new();
    let p = d.put(
        "b64.vtu",
        hex_file(
            "",
            "type=\"Float64\" NumberOfComponents=\"6\" format=\"binary\"",
            "MAAAAA!!@@##$$%%^^**(())",
            None,
        ),
    );
    check(
        &p,
        &[
            "corrupt",
            "base64: invalid character '!' at byte offset",
            "'stress'",
        ],
    );
}

#[test]
fn unknown_compressor() {
    let d = Dir::new();
    let p = d.put(
        "c.vtu",
        hex_file(
            "compressor=\"vtkZstdDataCompressor\"",
            APPENDED,
            "",
            Some(&[]),
        ),
    );
    check(&p, &["unsupported", "vtkZstdDataCompressor"]);
}

#[test]
fn unknown_data_type() {
    let d = Dir::new();
    let p = d.put(
        "t.vtu",
        hex_file("", "type=\"Float128\" format=\"ascii\"", "1", None),
    );
    check(&p, &["unsupported", "Float128", "'stress'"]);
}

#[test]
fn unknown_header_type() {
    let d = Dir::new();
    let p = d.put(
        "h.vtu",
        hex_file("header_type=\"UInt16\"", APPENDED, "", Some(&[])),
    );
    check(&p, &["unsupported", "header_type", "UInt16"]);
}

#[test]
fn unknown_cell_type() {
    let d = Dir::new();
    let p = d.put(
        "ct.vtu",
        hex_file_cells(
            "",
            "type=\"Float64\" NumberOfComponents=\"6\" format=\"ascii\"",
            "0 1 2 3 4 5",
            None,
            "0 1 2 3 4 5 6 7",
            "8",
            "99",
        ),
    );
    check(&p, &["unknown cell type 99", "piece 0"]);
}

#[test]
fn bad_cells_are_found_when_the_mesh_is_first_asked_for() {
    // Opening reads headers only: the counts come from them, the cells are validated by the
    // first `mesh()` call, and every later call gives the same error (nothing half-built is kept).
    let d = Dir::new();
    let p = d.put(
        "late.vtu",
        hex_file_cells(
            "",
            "type=\"Float64\" NumberOfComponents=\"6\" format=\"ascii\"",
            "0 1 2 3 4 5",
            None,
            "0 1 2 3 4 5 6 9",
            "8",
            "12",
        ),
    );
    let s = Series::open(&p).unwrap();
    assert_eq!((s.n_points(), s.n_cells()), (8, 1));
    assert_eq!(s.pieces(), &[(8, 1)]);
    let mut buf = Vec::new();
    s.increment(0)
        .unwrap()
        .read("stress", Location::Cell, &mut buf)
        .unwrap();
    assert_eq!(buf, [0.0, 1.0, 2.0, 3.0, 4.0, 5.0]);
    for _ in 0..2 {
        let e = s.mesh().unwrap_err().to_string();
        assert!(
            e.contains("refers to point 9") && e.contains("late.vtu"),
            "{e}"
        );
    }
}

#[test]
fn number_of_components_not_matching_data_binary() {
    let d = Dir::new();
    let mut a = le32(&[48]);
    a.extend(stress_bytes());
    let attrs = "type=\"Float64\" NumberOfComponents=\"5\" format=\"appended\" offset=\"0\"";
    let p = d.put("nc.vtu", hex_file("", attrs, "", Some(&a)));
    check(&p, &["'stress'", "expected 40", "found 48"]);
}

#[test]
fn number_of_components_not_matching_data_ascii() {
    let d = Dir::new();
    let p = d.put(
        "nca.vtu",
        hex_file(
            "",
            "type=\"Float64\" NumberOfComponents=\"9\" format=\"ascii\"",
            "0 1 2 3 4 5",
            None,
        ),
    );
    check(
        &p,
        &[
            "number of ascii values",
            "'stress'",
            "expected 9",
            "found 6",
        ],
    );
}

#[test]
fn connectivity_out_of_range() {
    let d = Dir::new();
    let p = d.put(
        "conn.vtu",
        hex_file_cells(
            "",
            "type=\"Float64\" NumberOfComponents=\"6\" format=\"ascii\"",
            "0 1 2 3 4 5",
            None,
            "0 1 2 3 4 5 6 99",
            "8",
            "12",
        ),
    );
    check(&p, &["refers to point 99", "8 points"]);
}

#[test]
fn offsets_out_of_range() {
    let d = Dir::new();
    let p = d.put(
        "off.vtu",
        hex_file_cells(
            "",
            "type=\"Float64\" NumberOfComponents=\"6\" format=\"ascii\"",
            "0 1 2 3 4 5",
            None,
            "0 1 2 3 4 5 6 7",
            "12",
            "12",
        ),
    );
    check(&p, &["offsets", "connectivity"]);
}

#[test]
fn nan_and_inf_are_found_for_the_callers_policy() {
    let d = Dir::new();
    let p = d.put(
        "nan.vtu",
        hex_file(
            "",
            "type=\"Float64\" NumberOfComponents=\"6\" format=\"ascii\"",
            "0 1 nan 3 inf -inf",
            None,
        ),
    );
    let s = Series::open(&p).unwrap();
    let mut buf = Vec::new();
    let f = s
        .increment(0)
        .unwrap()
        .read("stress", Location::Cell, &mut buf)
        .unwrap();
    let nf = find_nonfinite(&buf, f.components).unwrap();
    assert_eq!((nf.count, nf.first_tuple, nf.first_component), (3, 0, 2));
}

fn series_dir(cells: &[usize]) -> (Dir, PathBuf) {
    let d = Dir::new();
    let mut entries = String::new();
    for (k, &n) in cells.iter().enumerate() {
        let mut p = Piece::hex_row(n, 0.0);
        p.cell_data.push(Arr::f64("eqps", 1, vec![0.0; n]));
        d.put(
            &format!("s{k}.vtu"),
            testenc::vtu(&Enc::default(), &[p], None),
        );
        entries.push_str(&format!("<DataSet timestep=\"{k}\" file=\"s{k}.vtu\"/>\n"));
    }
    let pvd = d.put(
        "series.pvd",
        format!("<VTKFile type=\"Collection\"><Collection>\n{entries}</Collection></VTKFile>"),
    );
    (d, pvd)
}

#[test]
fn increment_cell_count_changes() {
    let (d, pvd) = series_dir(&[3, 3, 4]);
    let s = Series::open(&pvd).unwrap();
    let e = s.increment(2).unwrap_err().to_string();
    assert!(
        e.contains("s2.vtu") && e.contains("cell count") && e.contains("changed"),
        "{e}"
    );
    assert!(e.contains("has 3") && e.contains("this one 4"), "{e}");
    drop(d);
}

#[test]
fn piece_count_changes() {
    let d = Dir::new();
    let a = testenc::vtu(
        &Enc::default(),
        &[Piece::hex_row(2, 0.0), Piece::hex_row(2, 5.0)],
        None,
    );
    let b = testenc::vtu(&Enc::default(), &[Piece::hex_row(4, 0.0)], None);
    d.put("p0.vtu", a);
    d.put("p1.vtu", b);
    let pvd = d.put(
        "pieces.pvd",
        "<VTKFile type=\"Collection\"><Collection><DataSet timestep=\"0\" file=\"p0.vtu\"/><DataSet timestep=\"1\" file=\"p1.vtu\"/></Collection></VTKFile>",
    );
    let s = Series::open(&pvd).unwrap();
    let e = s.increment(1).unwrap_err().to_string();
    assert!(
        e.contains("p1.vtu") && e.contains("number of pieces"),
        "{e}"
    );
}

#[test]
fn pvd_naming_a_missing_file() {
    let d = Dir::new();
    let p = d.put(
        "miss.pvd",
        "<VTKFile type=\"Collection\"><Collection><DataSet timestep=\"0\" file=\"nowhere.vtu\"/></Collection></VTKFile>",
    );
    check(&p, &["missing file", "nowhere.vtu"]);
}

#[test]
fn pvd_naming_itself() {
    let d = Dir::new();
    let p = d.put(
        "self.pvd",
        "<VTKFile type=\"Collection\"><Collection><DataSet timestep=\"0\" file=\"self.pvd\"/></Collection></VTKFile>",
    );
    check(&p, &["names itself"]);
}

#[test]
fn empty_file() {
    let d = Dir::new();
    check(&d.put("empty.vtu", ""), &["not a vtk file", "empty"]);
    check(&d.put("empty.vtk", ""), &["empty"]);
}

#[test]
fn whitespace_only_file() {
    let d = Dir::new();
    check(
        &d.put("blank.vtu", " \n\t\n  "),
        &["not a vtk file", "whitespace"],
    );
}

#[test]
fn non_utf8_header() {
    let d = Dir::new();
    let mut b = b"<VTKFile type=\"UnstructuredGrid\"><UnstructuredGrid><Piece NumberOfPoints=\"0\" NumberOfCells=\"0\" Name=\"".to_vec();
    let at = format!("byte offset {}", b.len());
    b.extend([0xff, 0xfe, 0x80]);
    b.extend(b"\"/></UnstructuredGrid></VTKFile>");
    check(&d.put("bin.vtu", b), &["not valid utf-8", &at]);
}

#[test]
fn non_vtk_text() {
    let d = Dir::new();
    check(
        &d.put("notes.vtu", "these are not results\n"),
        &["not a vtk file"],
    );
    check(
        &d.put("other.vtu", "<html><body>hello</body></html>"),
        &["not a vtk file", "<html>"],
    );
}

#[test]
fn deeply_nested_xml() {
    let d = Dir::new();
    let mut s = String::from("<VTKFile type=\"UnstructuredGrid\">");
    s.push_str(&"<a>".repeat(10_000));
    s.push_str(&"</a>".repeat(10_000));
    s.push_str("</VTKFile>");
    check(&d.put("deep.vtu", s), &["nested deeper than"]);
}

#[test]
fn entity_expansion_doctype() {
    let d = Dir::new();
    let s = "<?xml version=\"1.0\"?>\n<!DOCTYPE lolz [\n<!ENTITY lol \"lol\">\n<!ENTITY lol2 \"&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;\">\n<!ENTITY lol3 \"&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;\">\n]>\n<VTKFile type=\"UnstructuredGrid\"><UnstructuredGrid><Piece NumberOfPoints=\"0\" NumberOfCells=\"0\" Name=\"&lol3;\"/></UnstructuredGrid></VTKFile>";
    check(&d.put("lol.vtu", s), &["DOCTYPE", "not allowed"]);
    // an entity reference without a DOCTYPE
    let s = "<VTKFile type=\"UnstructuredGrid\"><UnstructuredGrid><Piece NumberOfPoints=\"0\" NumberOfCells=\"0\" Name=\"&lol3;\"/></UnstructuredGrid></VTKFile>";
    check(&d.put("ent.vtu", s), &["entities are not allowed"]);
}

#[test]
fn truncated_legacy_binary() {
    let d = Dir::new();
    let mut b =
        b"# vtk DataFile Version 4.2\nt\nBINARY\nDATASET UNSTRUCTURED_GRID\nPOINTS 8 double\n"
            .to_vec();
    b.extend((0..24).flat_map(|i| (i as f64).to_be_bytes()).take(50));
    check(&d.put("cut.vtk", b), &["points"]);
}

#[test]
fn compressed_truncated_appended_base64_in_two_runs() {
    // VTK's own layout for compressed appended base64, cut early in the appended data: the
    // points (after the cell data) are missing
    let d = Dir::new();
    let enc = Enc {
        format: Format::AppendedBase64,
        comp: Comp::Zlib,
        block_size: 64,
        ..Enc::default()
    };
    let mut p = Piece::hex_row(30, 0.0);
    p.cell_data
        .push(Arr::f64("eqps", 1, (0..30).map(f64::from).collect()));
    let full = testenc::vtu(&enc, &[p], None);
    let start = full.windows(2).position(|w| w == b"\n_").unwrap() + 2;
    let path = d.put("b64cut.vtu", &full[..start + 30]);
    check(&path, &["truncated", "point coordinates"]);
}

#[test]
fn folder_with_several_pvd_files() {
    let d = Dir::new();
    let c = "<VTKFile type=\"Collection\"><Collection></Collection></VTKFile>";
    d.put("a.pvd", c);
    d.put("b.pvd", c);
    let e = Series::open(d.0.path()).unwrap_err().to_string();
    assert!(
        e.contains("several .pvd") && e.contains("a.pvd") && e.contains("b.pvd"),
        "{e}"
    );
}

#[test]
fn folder_with_several_numbered_series() {
    let d = Dir::new();
    let v = testenc::vtu(&Enc::default(), &[Piece::hex_row(1, 0.0)], None);
    for n in ["run_1.vtu", "run_2.vtu", "other_1.vtu"] {
        d.put(n, &v);
    }
    let e = Series::open(d.0.path()).unwrap_err().to_string();
    assert!(
        e.contains("several numbered series")
            && e.contains("run_*.vtu: 2 files")
            && e.contains("other_*.vtu: 1 files"),
        "{e}"
    );
}

#[test]
fn folder_with_duplicate_numbers() {
    let d = Dir::new();
    let v = testenc::vtu(&Enc::default(), &[Piece::hex_row(1, 0.0)], None);
    d.put("run_1.vtu", &v);
    d.put("run_01.vtu", &v);
    let e = Series::open(d.0.path()).unwrap_err().to_string();
    assert!(e.contains("same increment number"), "{e}");
}

#[test]
fn folder_without_results() {
    let d = Dir::new();
    d.put("notes.txt", "x");
    let e = Series::open(d.0.path()).unwrap_err().to_string();
    assert!(e.contains("no .pvd and no numbered"), "{e}");
}

#[test]
fn missing_path() {
    let d = Dir::new();
    let p = d.0.path().join("absent.vtu");
    let e = Series::open(&p).unwrap_err().to_string();
    assert!(e.contains("absent.vtu") && e.contains("cannot open"), "{e}");
}

#[test]
fn missing_array_lists_the_arrays() {
    let d = Dir::new();
    let mut p = Piece::hex_row(1, 0.0);
    p.cell_data.push(Arr::f64("eqps", 1, vec![0.0]));
    let path = d.put("m.vtu", testenc::vtu(&Enc::default(), &[p], None));
    let s = Series::open(&path).unwrap();
    let mut buf = Vec::new();
    let e = s
        .increment(0)
        .unwrap()
        .read("stress", Location::Cell, &mut buf)
        .unwrap_err()
        .to_string();
    assert!(
        e.contains("m.vtu") && e.contains("'stress'") && e.contains("eqps (cell, 1)"),
        "{e}"
    );
    let e = s
        .increment(0)
        .unwrap()
        .read_tuples("eqps", Location::Cell, 0..2, &mut buf)
        .unwrap_err()
        .to_string();
    assert!(e.contains("0..2") && e.contains("0..1"), "{e}");
    let e = s.increment(5).unwrap_err().to_string();
    assert!(e.contains("increment 5") && e.contains("has 1"), "{e}");
}

/// Regression (found by the `vtu_header` fuzz target): an lzma block whose xz footer declares an
/// index of 2^34 bytes made the third-party decoder overflow.
#[test]
fn fuzz_regression_lzma_backward_size() {
    let p = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/data/fuzz_lzma_backward_size.vtu");
    let bytes = std::fs::read(&p).unwrap();
    let r = ductrace_vtk::fuzz_xml(&bytes);
    assert!(r.is_err(), "{r:?}");
}
