//! Reading every encoding the reader accepts, files built in memory by the crate's test encoder
//! (`testenc`, which follows VTK's file format documentation) and by our writer; bit-exact
//! comparison with the values encoded. Also pieces, `.pvtu`, `.pvd`, folders and tuple ranges.

#![allow(clippy::unwrap_used)] // test helpers unwrap like the tests do

use std::path::{Path, PathBuf};

use ductrace_vtk::testenc::{self, Arr, Comp, Enc, Format, Piece};
use ductrace_vtk::write::{self, ArrayRef, CellsRef, VtuOptions};
use ductrace_vtk::{Discovery, Location, ScalarType, Series};
use proptest::prelude::*;

const ALL_TYPES: [ScalarType; 10] = [
    ScalarType::Int8,
    ScalarType::UInt8,
    ScalarType::Int16,
    ScalarType::UInt16,
    ScalarType::Int32,
    ScalarType::UInt32,
    ScalarType::Int64,
    ScalarType::UInt64,
    ScalarType::Float32,
    ScalarType::Float64,
];

fn put(dir: &Path, name: &str, bytes: &[u8]) -> PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, bytes).unwrap();
    p
}

/// A piece of `n` hexahedra with a 6-component stress, a scalar of each type, a vector.
fn rich_piece(n: usize, x0: f64, seed: f64) -> Piece {
    let mut p = Piece::hex_row(n, x0);
    let np = p.points.len();
    let stress: Vec<f64> = (0..n * 6).map(|i| seed + i as f64 * 0.125 - 3.0).collect();
    p.cell_data.push(Arr {
        component_names: ["XX", "YY", "ZZ", "XY", "YZ", "XZ"]
            .iter()
            .map(|s| s.to_string())
            .collect(),
        ..Arr::f64("stress", 6, stress)
    });
    for ty in ALL_TYPES {
        // small integers, exactly representable in every type
        let data: Vec<f64> = (0..n).map(|i| ((i * 7 + 3) % 100) as f64).collect();
        p.cell_data.push(Arr {
            omit_components: true,
            ..Arr::typed(&format!("c_{ty}"), 1, ty, data)
        });
    }
    let disp: Vec<f64> = (0..np * 3).map(|i| seed * 0.5 + i as f64 * 1e-3).collect();
    p.point_data.push(Arr::f64("displacement", 3, disp));
    p
}

fn check_piece_values(series: &Series, pieces: &[Piece], label: &str) {
    let inc = series.increment(0).unwrap();
    let mut buf = Vec::new();
    let np: usize = pieces.iter().map(|p| p.points.len()).sum();
    let nc: usize = pieces.iter().map(|p| p.types.len()).sum();
    assert_eq!(series.mesh().unwrap().n_points(), np, "{label}");
    assert_eq!(series.mesh().unwrap().n_cells(), nc, "{label}");
    // points merged in order
    let pts: Vec<[f64; 3]> = pieces.iter().flat_map(|p| p.points.clone()).collect();
    assert_eq!(series.mesh().unwrap().points(), &pts[..], "{label}");
    for (k, a) in pieces[0].cell_data.iter().enumerate() {
        let f = inc.read(&a.name, Location::Cell, &mut buf).unwrap();
        assert_eq!(f.scalar_type, a.ty, "{label}");
        let expected: Vec<f64> = pieces
            .iter()
            .flat_map(|p| p.cell_data[k].data.clone())
            .collect();
        assert_eq!(buf, expected, "{label}: {}", a.name);
    }
    let f = inc.read("displacement", Location::Point, &mut buf).unwrap();
    assert_eq!(f.components, 3);
    let expected: Vec<f64> = pieces
        .iter()
        .flat_map(|p| p.point_data[0].data.clone())
        .collect();
    assert_eq!(buf, expected, "{label}");
    // one cell across the piece boundary, and a short range
    let last = nc - 1;
    inc.read_tuples("stress", Location::Cell, last..nc, &mut buf)
        .unwrap();
    let all: Vec<f64> = pieces
        .iter()
        .flat_map(|p| p.cell_data[0].data.clone())
        .collect();
    assert_eq!(buf, all[last * 6..], "{label}");
    inc.read_tuples("stress", Location::Cell, 1..nc - 1, &mut buf)
        .unwrap();
    assert_eq!(buf, all[6..(nc - 1) * 6], "{label}");
}

#[test]
fn every_encoding_every_type_several_pieces() {
    let dir = tempfile::tempdir().unwrap();
    // block size 64 bytes: arrays span several blocks (and >= 4 for the parallel path)
    for (i, enc) in testenc::all_encodings(64).iter().enumerate() {
        let pieces = vec![rich_piece(7, 0.0, 1.0), rich_piece(5, 10.0, 2.0)];
        let bytes = testenc::vtu(enc, &pieces, Some(0.25));
        let p = put(dir.path(), &format!("e{i}.vtu"), &bytes);
        let label = format!("{enc:?}");
        let s = Series::open(&p).unwrap_or_else(|e| panic!("{label}: {e}"));
        assert_eq!(s.increments()[0].time, 0.25, "{label}");
        assert_eq!(s.discovery(), &Discovery::File);
        check_piece_values(&s, &pieces, &label);
        let stress = s.field("stress", None).unwrap();
        assert_eq!(stress.component_names[3], "XY");
        let c = s.field("c_Int8", Some(Location::Cell)).unwrap();
        assert_eq!(c.components, 1);
    }
}

#[test]
fn encoding_text_names_the_layout() {
    let dir = tempfile::tempdir().unwrap();
    let enc = Enc {
        format: Format::AppendedRaw,
        comp: Comp::Zlib,
        header64: true,
        big_endian: false,
        block_size: 32768,
    };
    let p = put(
        dir.path(),
        "a.vtu",
        &testenc::vtu(&enc, &[rich_piece(2, 0.0, 0.0)], None),
    );
    let s = Series::open(&p).unwrap();
    assert_eq!(
        s.field("stress", None).unwrap().encoding,
        "appended raw, zlib, UInt64 header"
    );
    // no TimeValue: the index
    assert_eq!(s.increments()[0].time, 0.0);
}

#[test]
fn writer_round_trip_and_pvd() {
    let dir = tempfile::tempdir().unwrap();
    let piece = Piece::hex_row(3, 0.0);
    let cells = CellsRef {
        connectivity: &piece.connectivity,
        offsets: &piece.offsets,
        types: &piece.types,
    };
    let mut files = Vec::new();
    let times = [0.5, 0.0, 1.5, 1.0];
    for (k, t) in times.iter().enumerate() {
        let stress: Vec<f64> = (0..18).map(|i| i as f64 * t + 0.1).collect();
        let eqps: Vec<f64> = (0..3).map(|i| i as f64 * t).collect();
        let u: Vec<f64> = (0..piece.points.len() * 3)
            .map(|i| i as f64 * 1e-3)
            .collect();
        let name = format!("step_{k}.vtu");
        write::write_vtu_with(
            &dir.path().join(&name),
            &piece.points,
            &cells,
            &[ArrayRef {
                name: "u",
                components: 3,
                data: &u,
            }],
            &[
                ArrayRef {
                    name: "stress",
                    components: 6,
                    data: &stress,
                },
                ArrayRef {
                    name: "eqps",
                    components: 1,
                    data: &eqps,
                },
            ],
            &VtuOptions::with_time(*t),
        )
        .unwrap();
        files.push((*t, PathBuf::from(name)));
    }
    let entries: Vec<(f64, &Path)> = files.iter().map(|(t, p)| (*t, p.as_path())).collect();
    let pvd = dir.path().join("run.pvd");
    write::write_pvd(&pvd, &entries).unwrap();
    let s = Series::open(&pvd).unwrap();
    let got: Vec<f64> = s.increments().iter().map(|i| i.time).collect();
    assert_eq!(got, vec![0.0, 0.5, 1.0, 1.5]);
    assert!(s.increments()[0].file.ends_with("step_1.vtu"));
    let mut buf = Vec::new();
    for info in s.increments() {
        let inc = s.increment(info.index).unwrap();
        inc.read("stress", Location::Cell, &mut buf).unwrap();
        let t = info.time;
        let expected: Vec<f64> = (0..18).map(|i| i as f64 * t + 0.1).collect();
        assert_eq!(buf, expected);
        inc.read_tuples("eqps", Location::Cell, 2..3, &mut buf)
            .unwrap();
        assert_eq!(buf, vec![2.0 * t]);
    }
    assert_eq!(
        s.mesh().unwrap().cell_type_counts(),
        vec![(12, "VTK_HEXAHEDRON", 3)]
    );
    // the folder holds exactly one .pvd: it is used
    let f = Series::open(dir.path()).unwrap();
    assert!(matches!(f.discovery(), Discovery::FolderPvd(_)));
    assert_eq!(f.increments().len(), 4);
    // and the roles
    let roles =
        ductrace_vtk::roles::detect(s.fields(), &ductrace_vtk::roles::RoleOverrides::default())
            .unwrap();
    assert_eq!(roles.stress.unwrap().name, "stress");
    assert_eq!(roles.eqps.unwrap().name, "eqps");
    assert_eq!(roles.displacement.unwrap().name, "u");
}

#[test]
fn numbered_folder_sorted_numerically() {
    let dir = tempfile::tempdir().unwrap();
    let enc = Enc::default();
    for n in [10, 2, 1] {
        let mut p = Piece::hex_row(2, 0.0);
        p.cell_data
            .push(Arr::f64("eqps", 1, vec![n as f64, n as f64 + 0.5]));
        put(
            dir.path(),
            &format!("run_{n:04}.vtu"),
            &testenc::vtu(&enc, &[p], None),
        );
    }
    let s = Series::open(dir.path()).unwrap();
    assert_eq!(
        s.discovery(),
        &Discovery::FolderNumbered {
            stem: "run_*.vtu".into()
        }
    );
    assert!(s.discovery().to_string().contains("sorted by number"));
    let t: Vec<f64> = s.increments().iter().map(|i| i.time).collect();
    assert_eq!(t, vec![1.0, 2.0, 10.0]);
    let mut buf = Vec::new();
    s.increment(2)
        .unwrap()
        .read("eqps", Location::Cell, &mut buf)
        .unwrap();
    assert_eq!(buf, vec![10.0, 10.5]);
}

#[test]
fn pvtu_pieces_merged_in_order() {
    let dir = tempfile::tempdir().unwrap();
    let enc = Enc {
        format: Format::AppendedBase64,
        comp: Comp::Lz4,
        ..Enc::default()
    };
    let pieces = vec![
        rich_piece(3, 0.0, 1.0),
        rich_piece(2, 3.0, 2.0),
        rich_piece(4, 5.0, 3.0),
    ];
    let mut xml = String::from(
        "<?xml version=\"1.0\"?>\n<VTKFile type=\"PUnstructuredGrid\" version=\"1.0\">\n<PUnstructuredGrid GhostLevel=\"0\">\n<PCellData><PDataArray type=\"Float64\" Name=\"stress\" NumberOfComponents=\"6\"/></PCellData>\n<PPoints><PDataArray type=\"Float64\" NumberOfComponents=\"3\"/></PPoints>\n",
    );
    for (k, p) in pieces.iter().enumerate() {
        let name = format!("part_{k}.vtu");
        put(
            dir.path(),
            &name,
            &testenc::vtu(&enc, std::slice::from_ref(p), None),
        );
        xml.push_str(&format!("<Piece Source=\"{name}\"/>\n"));
    }
    xml.push_str("</PUnstructuredGrid>\n</VTKFile>\n");
    let pv = put(dir.path(), "all.pvtu", xml.as_bytes());
    let s = Series::open(&pv).unwrap();
    check_piece_values(&s, &pieces, "pvtu");
    // connectivity of piece 1 offset by the 16 points of piece 0
    assert_eq!(s.mesh().unwrap().cell_points(3)[0], 16);
    assert_eq!(s.mesh().unwrap().pieces(), &[(16, 3), (12, 2), (20, 4)]);
}

#[test]
fn legacy_file_through_the_series() {
    let dir = tempfile::tempdir().unwrap();
    let text = "# vtk DataFile Version 4.2\ntest\nASCII\nDATASET UNSTRUCTURED_GRID\nFIELD FieldData 1\nTimeValue 1 1 double\n2.5\nPOINTS 4 float\n0 0 0 1 0 0 1 1 0 0 1 0\nCELLS 1 5\n4 0 1 2 3\nCELL_TYPES 1\n9\nCELL_DATA 1\nSCALARS eqps double 1\nLOOKUP_TABLE default\n0.125\nTENSORS stress double\n1 2 3 2 4 5 3 5 6\n";
    let p = put(dir.path(), "one.vtk", text.as_bytes());
    let s = Series::open(&p).unwrap();
    assert_eq!(s.increments()[0].time, 2.5);
    assert_eq!(s.mesh().unwrap().n_cells(), 1);
    assert!(s.mesh().unwrap().is_planar());
    let mut buf = Vec::new();
    let inc = s.increment(0).unwrap();
    let f = inc.read("stress", Location::Cell, &mut buf).unwrap();
    assert_eq!(f.components, 9);
    assert_eq!(f.scalar_type, ScalarType::Float64);
    assert_eq!(buf, vec![1.0, 2.0, 3.0, 2.0, 4.0, 5.0, 3.0, 5.0, 6.0]);
    assert!(f.encoding.starts_with("legacy ascii"));
    let mut pts = Vec::new();
    inc.points(&mut pts).unwrap();
    assert_eq!(pts[2], [1.0, 1.0, 0.0]);
}

fn enc_strategy() -> impl Strategy<Value = Enc> {
    let all = testenc::all_encodings(1);
    (0..all.len(), 1usize..200).prop_map(move |(i, bs)| Enc {
        block_size: bs,
        ..all[i]
    })
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 64, ..ProptestConfig::default() })]

    /// Random f64 bit patterns (finite or not) survive every binary encoding bit-exactly.
    #[test]
    fn random_f64_bit_exact(bits in proptest::collection::vec(any::<u64>(), 1..300), enc in enc_strategy()) {
        let n = bits.len();
        let values: Vec<f64> = bits.iter().map(|&b| f64::from_bits(b)).collect();
        let mut p = Piece::hex_row(n, 0.0);
        p.cell_data.push(Arr::f64("v", 1, values.clone()));
        let bytes = testenc::vtu(&enc, &[p], None);
        let dir = tempfile::tempdir().unwrap();
        let path = put(dir.path(), "r.vtu", &bytes);
        let s = Series::open(&path).unwrap();
        let mut buf = Vec::new();
        let inc = s.increment(0).unwrap();
        inc.read("v", Location::Cell, &mut buf).unwrap();
        if enc.format == Format::Ascii {
            // ascii: Rust's shortest round-trip text; NaN payloads are not kept by text
            for (a, b) in buf.iter().zip(&values) {
                prop_assert!(a.to_bits() == b.to_bits() || (a.is_nan() && b.is_nan()));
            }
        } else {
            let got: Vec<u64> = buf.iter().map(|v| v.to_bits()).collect();
            prop_assert_eq!(got, bits.clone());
        }
        // sub-ranges decode the same values
        let a = n / 3;
        let b = (2 * n / 3).max(a);
        inc.read_tuples("v", Location::Cell, a..b, &mut buf).unwrap();
        for (x, y) in buf.iter().zip(&values[a..b]) {
            prop_assert!(x.to_bits() == y.to_bits() || (x.is_nan() && y.is_nan()));
        }
    }

    /// Random bytes, and random damage to a valid file, never panic.
    #[test]
    fn garbage_never_panics(bytes in proptest::collection::vec(any::<u8>(), 0..2000)) {
        let _ = ductrace_vtk::fuzz_xml(&bytes);
        let _ = ductrace_vtk::fuzz_legacy(&bytes);
        let _ = ductrace_vtk::fuzz_appended(&bytes);
    }

    #[test]
    fn damaged_files_never_panic(enc in enc_strategy(), cut in 0.0f64..1.0, flips in proptest::collection::vec((0.0f64..1.0, any::<u8>()), 0..8)) {
        let mut p = rich_piece(4, 0.0, 1.0);
        p.cell_data.truncate(3);
        let mut bytes = testenc::vtu(&enc, &[p], Some(1.0));
        for (pos, b) in flips {
            let i = ((bytes.len() as f64) * pos) as usize;
            if i < bytes.len() { bytes[i] = b; }
        }
        let keep = ((bytes.len() as f64) * (0.5 + cut / 2.0)) as usize;
        let _ = ductrace_vtk::fuzz_xml(&bytes);
        let _ = ductrace_vtk::fuzz_xml(&bytes[..keep]);
    }
}

#[test]
fn pvd_parts_of_one_timestep_are_pieces() {
    let dir = tempfile::tempdir().unwrap();
    let enc = Enc::default();
    let mut xml = String::from("<VTKFile type=\"Collection\"><Collection>\n");
    for t in [1, 0] {
        for part in [1, 0] {
            let mut p = Piece::hex_row(2 + part, 0.0);
            p.cell_data
                .push(Arr::f64("eqps", 1, vec![(10 * t + part) as f64; 2 + part]));
            let name = format!("t{t}_p{part}.vtu");
            put(dir.path(), &name, &testenc::vtu(&enc, &[p], None));
            xml.push_str(&format!(
                "<DataSet timestep=\"{t}\" part=\"{part}\" file=\"{name}\"/>\n"
            ));
        }
    }
    xml.push_str("</Collection></VTKFile>");
    let pvd = put(dir.path(), "parts.pvd", xml.as_bytes());
    let s = Series::open(&pvd).unwrap();
    assert_eq!(s.increments().len(), 2);
    assert_eq!(s.increment_files(0).len(), 2);
    assert_eq!(s.mesh().unwrap().pieces(), &[(12, 2), (16, 3)]);
    let mut buf = Vec::new();
    s.increment(1)
        .unwrap()
        .read("eqps", Location::Cell, &mut buf)
        .unwrap();
    assert_eq!(buf, vec![10.0, 10.0, 11.0, 11.0, 11.0]);
}

#[test]
fn writer_refuses_inconsistent_input_and_leaves_no_temp_file() {
    let dir = tempfile::tempdir().unwrap();
    let piece = Piece::hex_row(1, 0.0);
    let cells = CellsRef {
        connectivity: &piece.connectivity,
        offsets: &piece.offsets,
        types: &piece.types,
    };
    let path = dir.path().join("w.vtu");
    let e = write::write_vtu(
        &path,
        &piece.points,
        &cells,
        &[],
        &[ArrayRef {
            name: "stress",
            components: 6,
            data: &[0.0; 5],
        }],
    )
    .unwrap_err()
    .to_string();
    assert!(
        e.contains("w.vtu") && e.contains("'stress' has 5 values"),
        "{e}"
    );
    let bad = CellsRef {
        connectivity: &[0, 1, 2, 3, 4, 5, 6, 9],
        ..cells
    };
    assert!(write::write_vtu(&path, &piece.points, &bad, &[], &[]).is_err());
    // names with xml characters survive
    write::write_vtu(
        &path,
        &piece.points,
        &cells,
        &[],
        &[ArrayRef {
            name: "a<b>&\"c\"",
            components: 1,
            data: &[1.5],
        }],
    )
    .unwrap();
    let s = Series::open(&path).unwrap();
    assert_eq!(s.fields()[0].name, "a<b>&\"c\"");
    let left: Vec<_> = std::fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name())
        .collect();
    assert_eq!(left, vec![std::ffi::OsString::from("w.vtu")]);
}

#[test]
fn xml_file_with_the_legacy_extension() {
    let dir = tempfile::tempdir().unwrap();
    let mut p = Piece::hex_row(2, 0.0);
    p.cell_data.push(Arr::f64("eqps", 1, vec![0.5, 0.25]));
    let path = put(
        dir.path(),
        "xml.vtk",
        &testenc::vtu(&Enc::default(), &[p], None),
    );
    let s = Series::open(&path).unwrap();
    let mut buf = Vec::new();
    s.increment(0)
        .unwrap()
        .read("eqps", Location::Cell, &mut buf)
        .unwrap();
    assert_eq!(buf, vec![0.5, 0.25]);
}
