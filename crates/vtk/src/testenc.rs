//! Test-support encoder: builds `.vtu` files in memory in any encoding the reader accepts
//! (ascii, inline base64 in one or two runs, appended raw or base64; UInt32/UInt64 headers;
//! no compression, zlib, lz4 or lzma blocks; either byte order; any numeric type; several
//! pieces). Used by the crate's tests, benches and fuzz seeds; not a stable API.
//!
//! The layout follows VTK's file format documentation; the compressed data of each block is made
//! by the same libraries VTK's formats name (zlib via flate2, lz4 raw blocks via lz4_flex, xz
//! streams via lzma-rs).

use std::fmt::Write as _;
use std::io::Write as _;

use base64::Engine as _;

use crate::ScalarType;

/// Where array payloads go.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Format {
    /// `format="ascii"`.
    Ascii,
    /// `format="binary"`, header and data in one base64 run.
    InlineOneRun,
    /// `format="binary"`, header and data in two base64 runs.
    InlineTwoRuns,
    /// Appended raw.
    AppendedRaw,
    /// Appended base64 (header and data in two runs when compressed, one run otherwise, as VTK).
    AppendedBase64,
}

/// Block compressor.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Comp {
    /// None.
    None,
    /// vtkZLibDataCompressor.
    Zlib,
    /// vtkLZ4DataCompressor.
    Lz4,
    /// vtkLZMADataCompressor.
    Lzma,
}

/// Encoding settings of a file.
#[derive(Clone, Copy, Debug)]
pub struct Enc {
    /// Payload placement.
    pub format: Format,
    /// Compressor.
    pub comp: Comp,
    /// UInt64 header words (else UInt32).
    pub header64: bool,
    /// Big-endian byte order.
    pub big_endian: bool,
    /// Uncompressed block size for compressed data.
    pub block_size: usize,
}

impl Default for Enc {
    fn default() -> Enc {
        Enc {
            format: Format::AppendedRaw,
            comp: Comp::None,
            header64: false,
            big_endian: false,
            block_size: 32768,
        }
    }
}

/// One array.
#[derive(Clone, Debug)]
pub struct Arr {
    /// Name.
    pub name: String,
    /// Components.
    pub comps: usize,
    /// Stored type.
    pub ty: ScalarType,
    /// Values (converted to `ty` with `as`).
    pub data: Vec<f64>,
    /// ComponentName attributes.
    pub component_names: Vec<String>,
    /// Leave out `NumberOfComponents`.
    pub omit_components: bool,
}

impl Arr {
    /// A Float64 array.
    pub fn f64(name: &str, comps: usize, data: Vec<f64>) -> Arr {
        Arr {
            name: name.into(),
            comps,
            ty: ScalarType::Float64,
            data,
            component_names: Vec::new(),
            omit_components: false,
        }
    }
    /// An array of another type.
    pub fn typed(name: &str, comps: usize, ty: ScalarType, data: Vec<f64>) -> Arr {
        Arr {
            ty,
            ..Arr::f64(name, comps, data)
        }
    }
}

/// One piece.
#[derive(Clone, Debug, Default)]
pub struct Piece {
    /// Point coordinates.
    pub points: Vec<[f64; 3]>,
    /// Connectivity.
    pub connectivity: Vec<usize>,
    /// n_cells + 1 offsets from 0.
    pub offsets: Vec<usize>,
    /// Cell types.
    pub types: Vec<u8>,
    /// Point arrays.
    pub point_data: Vec<Arr>,
    /// Cell arrays.
    pub cell_data: Vec<Arr>,
}

impl Piece {
    /// A row of `n` unit hexahedra along x (4(n+1) points... 2*2*(n+1) points), no arrays.
    pub fn hex_row(n: usize, x0: f64) -> Piece {
        let mut points = Vec::new();
        for i in 0..=n {
            for (y, z) in [(0.0, 0.0), (1.0, 0.0), (1.0, 1.0), (0.0, 1.0)] {
                points.push([x0 + i as f64, y, z]);
            }
        }
        let mut connectivity = Vec::new();
        let mut offsets = vec![0];
        for i in 0..n {
            let a = 4 * i;
            let b = 4 * (i + 1);
            // VTK_HEXAHEDRON node order: bottom face then top face
            connectivity.extend([a, b, b + 1, a + 1, a + 3, b + 3, b + 2, a + 2]);
            offsets.push(connectivity.len());
        }
        Piece {
            points,
            connectivity,
            offsets,
            types: vec![12; n],
            point_data: Vec::new(),
            cell_data: Vec::new(),
        }
    }
}

/// Bytes of `values` stored as `ty` in the byte order.
pub fn raw_bytes(values: &[f64], ty: ScalarType, big: bool) -> Vec<u8> {
    let mut o = Vec::with_capacity(values.len() * ty.size());
    macro_rules! put {
        ($t:ty) => {
            for &v in values {
                let x = v as $t;
                o.extend_from_slice(&if big {
                    x.to_be_bytes()
                } else {
                    x.to_le_bytes()
                });
            }
        };
    }
    match ty {
        ScalarType::Int8 => put!(i8),
        ScalarType::UInt8 => put!(u8),
        ScalarType::Int16 => put!(i16),
        ScalarType::UInt16 => put!(u16),
        ScalarType::Int32 => put!(i32),
        ScalarType::UInt32 => put!(u32),
        ScalarType::Int64 => put!(i64),
        ScalarType::UInt64 => put!(u64),
        ScalarType::Float32 => put!(f32),
        ScalarType::Float64 => put!(f64),
    }
    o
}

fn word(enc: &Enc, v: u64, out: &mut Vec<u8>) {
    if enc.header64 {
        out.extend_from_slice(&if enc.big_endian {
            v.to_be_bytes()
        } else {
            v.to_le_bytes()
        });
    } else {
        let v = v as u32;
        out.extend_from_slice(&if enc.big_endian {
            v.to_be_bytes()
        } else {
            v.to_le_bytes()
        });
    }
}

/// Compresses one block.
pub fn compress(comp: Comp, data: &[u8]) -> Vec<u8> {
    match comp {
        Comp::None => data.to_vec(),
        Comp::Zlib => {
            let mut e = flate2::write::ZlibEncoder::new(Vec::new(), flate2::Compression::default());
            let _ = e.write_all(data);
            e.finish().unwrap_or_default()
        }
        Comp::Lz4 => lz4_flex::block::compress(data),
        Comp::Lzma => {
            let mut out = Vec::new();
            let _ = lzma_rs::xz_compress(&mut std::io::Cursor::new(data), &mut out);
            out
        }
    }
}

/// The binary header and data of an array's bytes.
pub fn binary(enc: &Enc, raw: &[u8]) -> (Vec<u8>, Vec<u8>) {
    let mut head = Vec::new();
    if enc.comp == Comp::None {
        word(enc, raw.len() as u64, &mut head);
        return (head, raw.to_vec());
    }
    let bs = enc.block_size.max(1);
    let blocks: Vec<Vec<u8>> = raw.chunks(bs).map(|c| compress(enc.comp, c)).collect();
    word(enc, blocks.len() as u64, &mut head);
    word(enc, bs as u64, &mut head);
    word(enc, (raw.len() % bs) as u64, &mut head);
    for b in &blocks {
        word(enc, b.len() as u64, &mut head);
    }
    (head, blocks.concat())
}

fn b64(b: &[u8]) -> String {
    base64::engine::general_purpose::STANDARD.encode(b)
}

/// ascii text of values of a type.
fn ascii(values: &[f64], ty: ScalarType) -> String {
    let mut s = String::new();
    for (i, &v) in values.iter().enumerate() {
        if i > 0 {
            s.push(' ');
        }
        match ty {
            ScalarType::Float64 => {
                let _ = write!(s, "{v:?}");
            }
            ScalarType::Float32 => {
                let _ = write!(s, "{:?}", v as f32);
            }
            ScalarType::UInt64 => {
                let _ = write!(s, "{}", v as u64);
            }
            _ => {
                let _ = write!(s, "{}", v as i64);
            }
        }
    }
    s
}

/// Builds a whole `.vtu` file.
pub fn vtu(enc: &Enc, pieces: &[Piece], time: Option<f64>) -> Vec<u8> {
    let mut xml = String::new();
    let mut appended: Vec<u8> = Vec::new();
    let comp_attr = match enc.comp {
        Comp::None => String::new(),
        Comp::Zlib => " compressor=\"vtkZLibDataCompressor\"".into(),
        Comp::Lz4 => " compressor=\"vtkLZ4DataCompressor\"".into(),
        Comp::Lzma => " compressor=\"vtkLZMADataCompressor\"".into(),
    };
    let _ = writeln!(
        xml,
        "<?xml version=\"1.0\"?>\n<VTKFile type=\"UnstructuredGrid\" version=\"1.0\" byte_order=\"{}\" header_type=\"{}\"{comp_attr}>\n<UnstructuredGrid>",
        if enc.big_endian {
            "BigEndian"
        } else {
            "LittleEndian"
        },
        if enc.header64 { "UInt64" } else { "UInt32" }
    );
    let mut array = |xml: &mut String, a: &Arr| {
        let fmt = match enc.format {
            Format::Ascii => "ascii",
            Format::InlineOneRun | Format::InlineTwoRuns => "binary",
            _ => "appended",
        };
        let _ = write!(
            xml,
            "<DataArray type=\"{}\" Name=\"{}\" format=\"{fmt}\"",
            a.ty, a.name
        );
        if !a.omit_components {
            let _ = write!(xml, " NumberOfComponents=\"{}\"", a.comps);
        }
        for (i, n) in a.component_names.iter().enumerate() {
            let _ = write!(xml, " ComponentName{i}=\"{n}\"");
        }
        let raw = raw_bytes(&a.data, a.ty, enc.big_endian);
        match enc.format {
            Format::Ascii => {
                let _ = writeln!(xml, ">\n{}\n</DataArray>", ascii(&a.data, a.ty));
            }
            Format::InlineOneRun => {
                let (h, d) = binary(enc, &raw);
                let _ = writeln!(xml, ">\n{}\n</DataArray>", b64(&[h, d].concat()));
            }
            Format::InlineTwoRuns => {
                let (h, d) = binary(enc, &raw);
                let _ = writeln!(xml, ">\n{}{}\n</DataArray>", b64(&h), b64(&d));
            }
            Format::AppendedRaw => {
                let _ = writeln!(xml, " offset=\"{}\"/>", appended.len());
                let (h, d) = binary(enc, &raw);
                appended.extend_from_slice(&h);
                appended.extend_from_slice(&d);
            }
            Format::AppendedBase64 => {
                let _ = writeln!(xml, " offset=\"{}\"/>", appended.len());
                let (h, d) = binary(enc, &raw);
                if enc.comp == Comp::None {
                    appended.extend_from_slice(b64(&[h, d].concat()).as_bytes());
                } else {
                    appended.extend_from_slice(b64(&h).as_bytes());
                    appended.extend_from_slice(b64(&d).as_bytes());
                }
            }
        }
    };
    if let Some(t) = time {
        xml.push_str("<FieldData>\n");
        array(
            &mut xml,
            &Arr {
                component_names: Vec::new(),
                ..Arr::f64("TimeValue", 1, vec![t])
            },
        );
        xml.push_str("</FieldData>\n");
    }
    for p in pieces {
        let _ = writeln!(
            xml,
            "<Piece NumberOfPoints=\"{}\" NumberOfCells=\"{}\">",
            p.points.len(),
            p.types.len()
        );
        xml.push_str("<PointData>\n");
        for a in &p.point_data {
            array(&mut xml, a);
        }
        xml.push_str("</PointData>\n<CellData>\n");
        for a in &p.cell_data {
            array(&mut xml, a);
        }
        xml.push_str("</CellData>\n<Points>\n");
        let flat: Vec<f64> = p.points.iter().flatten().copied().collect();
        array(&mut xml, &Arr::f64("Points", 3, flat));
        xml.push_str("</Points>\n<Cells>\n");
        let conn: Vec<f64> = p.connectivity.iter().map(|&v| v as f64).collect();
        array(
            &mut xml,
            &Arr::typed("connectivity", 1, ScalarType::Int64, conn),
        );
        let offs: Vec<f64> = p.offsets.iter().skip(1).map(|&v| v as f64).collect();
        array(&mut xml, &Arr::typed("offsets", 1, ScalarType::Int64, offs));
        let types: Vec<f64> = p.types.iter().map(|&v| f64::from(v)).collect();
        array(&mut xml, &Arr::typed("types", 1, ScalarType::UInt8, types));
        xml.push_str("</Cells>\n</Piece>\n");
    }
    xml.push_str("</UnstructuredGrid>\n");
    let mut out = xml.into_bytes();
    if matches!(enc.format, Format::AppendedRaw | Format::AppendedBase64) {
        let enc_name = if enc.format == Format::AppendedRaw {
            "raw"
        } else {
            "base64"
        };
        out.extend_from_slice(format!("<AppendedData encoding=\"{enc_name}\">\n_").as_bytes());
        out.extend_from_slice(&appended);
        out.extend_from_slice(b"\n</AppendedData>\n");
    }
    out.extend_from_slice(b"</VTKFile>\n");
    out
}

/// Every combination of format, compressor, header width and byte order (ascii once).
pub fn all_encodings(block_size: usize) -> Vec<Enc> {
    let mut v = vec![Enc {
        format: Format::Ascii,
        ..Enc::default()
    }];
    for format in [
        Format::InlineOneRun,
        Format::InlineTwoRuns,
        Format::AppendedRaw,
        Format::AppendedBase64,
    ] {
        for comp in [Comp::None, Comp::Zlib, Comp::Lz4, Comp::Lzma] {
            for header64 in [false, true] {
                for big_endian in [false, true] {
                    v.push(Enc {
                        format,
                        comp,
                        header64,
                        big_endian,
                        block_size,
                    });
                }
            }
        }
    }
    v
}
