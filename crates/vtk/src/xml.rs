//! Header parsing of VTK XML files (`.vtu`, `.pvtu`, `.pvd`) with quick-xml.
//!
//! Only the XML header is given to the parser: the text is cut at the `<AppendedData ...>` tag,
//! whose content (raw binary or base64) is never parsed as XML. For inline arrays the parser
//! records the byte span of the array's text; nothing is decoded here. DOCTYPE declarations and
//! entity references are refused, nesting depth is limited, and the header must be UTF-8.

use std::ops::Range;
use std::path::Path;

use quick_xml::events::{BytesStart, Event};

use crate::ScalarType;
use crate::decode::{Compressor, HeaderType, Layout, Payload};
use crate::error::{Error, Result};

/// Deepest element nesting accepted (VTK files use 5 or 6 levels).
const MAX_DEPTH: usize = 32;

/// One DataArray (or PDataArray) as declared in the header.
#[derive(Clone, Debug)]
pub(crate) struct ArrayDesc {
    pub name: String,
    pub ty: ScalarType,
    pub components: usize,
    pub component_names: Vec<String>,
    pub tuples: Option<usize>,
    pub payload: Payload,
}

/// One `<Piece>` of an UnstructuredGrid.
#[derive(Clone, Debug, Default)]
pub(crate) struct PieceDesc {
    pub n_points: usize,
    pub n_cells: usize,
    pub points: Option<ArrayDesc>,
    pub connectivity: Option<ArrayDesc>,
    pub offsets: Option<ArrayDesc>,
    pub types: Option<ArrayDesc>,
    pub point_data: Vec<ArrayDesc>,
    pub cell_data: Vec<ArrayDesc>,
}

/// The catalogue of a `.vtu` file.
#[derive(Clone, Debug)]
pub(crate) struct VtuHeader {
    pub layout: Layout,
    pub pieces: Vec<PieceDesc>,
    pub field_data: Vec<ArrayDesc>,
}

/// One `<DataSet>` of a `.pvd` collection.
#[derive(Clone, Debug)]
pub(crate) struct PvdEntry {
    pub timestep: Option<f64>,
    pub part: i64,
    pub file: String,
}

/// A parsed header of any supported XML kind.
#[derive(Clone, Debug)]
pub(crate) enum Header {
    Vtu(VtuHeader),
    /// `.pvtu`: the piece sources in file order.
    Pvtu(Vec<String>),
    /// `.pvd`: the data sets in file order.
    Pvd(Vec<PvdEntry>),
}

pub(crate) fn find_bytes(hay: &[u8], needle: &[u8]) -> Option<usize> {
    if needle.is_empty() || hay.len() < needle.len() {
        return None;
    }
    let first = needle[0];
    let mut i = 0;
    while i + needle.len() <= hay.len() {
        match hay[i..hay.len() - needle.len() + 1]
            .iter()
            .position(|&b| b == first)
        {
            None => return None,
            Some(p) => {
                let j = i + p;
                if &hay[j..j + needle.len()] == needle {
                    return Some(j);
                }
                i = j + 1;
            }
        }
    }
    None
}

struct P<'a> {
    path: &'a Path,
}

impl P<'_> {
    fn xml(&self, offset: u64, message: impl Into<String>) -> Error {
        Error::Xml {
            path: self.path.to_path_buf(),
            offset,
            message: message.into(),
        }
    }
    fn unsupported(&self, what: impl Into<String>) -> Error {
        Error::Unsupported {
            path: self.path.to_path_buf(),
            what: what.into(),
        }
    }
}

/// Attributes of a start tag as (name, unescaped value) pairs.
fn attrs(p: &P<'_>, e: &BytesStart<'_>, pos: u64) -> Result<Vec<(String, String)>> {
    let mut v = Vec::new();
    for a in e.attributes() {
        let a = a.map_err(|err| p.xml(pos, format!("bad attribute: {err}")))?;
        let key = String::from_utf8_lossy(a.key.as_ref()).into_owned();
        let val = a.unescape_value().map_err(|err| {
            p.xml(
                pos,
                format!("attribute {key}: {err} (entities are not allowed)"),
            )
        })?;
        v.push((key, val.into_owned()));
    }
    Ok(v)
}

fn get<'a>(a: &'a [(String, String)], k: &str) -> Option<&'a str> {
    a.iter().find(|(n, _)| n == k).map(|(_, v)| v.as_str())
}

fn parse_usize(p: &P<'_>, a: &[(String, String)], k: &str, pos: u64) -> Result<Option<usize>> {
    match get(a, k) {
        None => Ok(None),
        Some(v) => v
            .trim()
            .parse::<usize>()
            .map(Some)
            .map_err(|_| p.xml(pos, format!("attribute {k}=\"{v}\" is not a count"))),
    }
}

/// A DataArray being read: its attributes and the span of its text.
struct Open {
    attrs: Vec<(String, String)>,
    depth: usize,
    text: Option<Range<usize>>,
    pos: u64,
}

#[derive(Clone, Copy, PartialEq, Eq, Debug)]
enum Section {
    None,
    FieldData,
    PointData,
    CellData,
    Points,
    Cells,
}

/// Parses the XML header of `bytes` (the whole mapped file).
pub(crate) fn parse(bytes: &[u8], path: &Path) -> Result<Header> {
    let p = P { path };
    if bytes.is_empty() {
        return Err(Error::NotVtk {
            path: path.to_path_buf(),
            reason: "the file is empty".into(),
        });
    }
    if bytes.iter().all(u8::is_ascii_whitespace) {
        return Err(Error::NotVtk {
            path: path.to_path_buf(),
            reason: "the file holds only whitespace".into(),
        });
    }
    // cut at the end of the <AppendedData ...> tag: what follows is never parsed as xml
    let (head_end, appended_tag) = match find_bytes(bytes, b"<AppendedData") {
        Some(i) => match bytes[i..].iter().position(|&b| b == b'>') {
            Some(j) => (i + j + 1, Some(i)),
            None => {
                return Err(p.xml(
                    i as u64,
                    "file ends inside the <AppendedData> tag (truncated?)",
                ));
            }
        },
        None => (bytes.len(), None),
    };
    let head = &bytes[..head_end];
    if let Err(e) = std::str::from_utf8(head) {
        return Err(Error::Xml {
            path: path.to_path_buf(),
            offset: e.valid_up_to() as u64,
            message: "the xml header is not valid utf-8".into(),
        });
    }
    let mut r = quick_xml::Reader::from_reader(head);
    r.config_mut().check_end_names = true;

    let mut depth = 0usize;
    let mut root: Option<String> = None;
    let mut layout = Layout {
        header: HeaderType::U32,
        compressor: Compressor::None,
        big_endian: false,
    };
    let mut pieces: Vec<PieceDesc> = Vec::new();
    let mut field_data: Vec<ArrayDesc> = Vec::new();
    let mut sources: Vec<String> = Vec::new();
    let mut entries: Vec<PvdEntry> = Vec::new();
    let mut section = Section::None;
    let mut in_piece = false;
    let mut open: Option<Open> = None;
    // arrays waiting for the appended-data start (offset relative to it)
    let mut pending: Vec<(usize, Section, usize, usize)> = Vec::new(); // (piece, section, index, offset)
    let mut appended: Option<(usize, bool)> = None;
    let mut stack: Vec<String> = Vec::new();

    loop {
        let before = r.buffer_position();
        let ev = r.read_event().map_err(|e| {
            let at = r.error_position();
            let mut m = e.to_string();
            if m.contains("end of input") {
                m.push_str(" (truncated file?)");
            }
            p.xml(at, m)
        })?;
        let after = r.buffer_position();
        let is_empty = matches!(&ev, Event::Empty(_));
        match ev {
            Event::DocType(_) => {
                return Err(p.xml(before, "DOCTYPE declarations are not allowed"));
            }
            Event::GeneralRef(_) => {
                return Err(p.xml(before, "entity references are not allowed"));
            }
            Event::Decl(_) | Event::Comment(_) | Event::PI(_) => {}
            Event::CData(_) => {
                if open.is_some() {
                    return Err(p.xml(before, "CDATA array content is not supported"));
                }
            }
            Event::Text(t) => {
                if let Some(o) = open.as_mut()
                    && o.depth == depth
                    && !t.iter().all(u8::is_ascii_whitespace)
                {
                    o.text = Some(before as usize..after as usize);
                } else if root.is_none() && !t.iter().all(u8::is_ascii_whitespace) {
                    return Err(Error::NotVtk {
                        path: path.to_path_buf(),
                        reason: "text outside any element; this is not an xml vtk file".into(),
                    });
                }
            }
            Event::End(e) => {
                let name = String::from_utf8_lossy(e.name().as_ref()).into_owned();
                let closing = depth;
                depth = depth.saturating_sub(1);
                stack.pop();
                if let Some(o) = open.as_ref()
                    && o.depth == closing
                    && (name == "DataArray" || name == "PDataArray")
                {
                    let o = open.take().ok_or_else(|| p.xml(before, "internal state"))?;
                    finish_array(
                        &p,
                        o,
                        section,
                        &mut pieces,
                        &mut field_data,
                        &mut pending,
                        in_piece,
                    )?;
                    continue;
                }
                match name.as_str() {
                    "Piece" => in_piece = false,
                    "PointData" | "CellData" | "Points" | "Cells" | "FieldData" => {
                        section = Section::None
                    }
                    _ => {}
                }
                if depth == 0 {
                    break;
                }
            }
            Event::Start(e) | Event::Empty(e) => {
                let name = String::from_utf8_lossy(e.name().as_ref()).into_owned();
                let a = attrs(&p, &e, before)?;
                if !is_empty {
                    depth += 1;
                    stack.push(name.clone());
                    if depth > MAX_DEPTH {
                        return Err(p.xml(
                            before,
                            format!("elements nested deeper than {MAX_DEPTH} levels"),
                        ));
                    }
                }
                if root.is_none() {
                    if name != "VTKFile" {
                        return Err(Error::NotVtk {
                            path: path.to_path_buf(),
                            reason: format!("the root element is <{name}>, not <VTKFile>"),
                        });
                    }
                    let ty = get(&a, "type").unwrap_or("").to_string();
                    match ty.as_str() {
                        "UnstructuredGrid" | "PUnstructuredGrid" | "Collection" => {}
                        other => {
                            return Err(p.unsupported(format!(
                                "vtk xml dataset type '{other}' (only UnstructuredGrid, PUnstructuredGrid and Collection are read)"
                            )));
                        }
                    }
                    layout = read_layout(&p, &a)?;
                    root = Some(ty);
                    continue;
                }
                match name.as_str() {
                    "AppendedData" => {
                        let enc = get(&a, "encoding").unwrap_or("raw");
                        let b64 = match enc {
                            "raw" => false,
                            "base64" => true,
                            other => {
                                return Err(
                                    p.unsupported(format!("appended data encoding '{other}'"))
                                );
                            }
                        };
                        // content starts after the '_' that follows the tag
                        let tag_end = after as usize;
                        let rest = &bytes[tag_end.min(bytes.len())..];
                        let skip = rest
                            .iter()
                            .position(|b| !b.is_ascii_whitespace())
                            .unwrap_or(rest.len());
                        if rest.get(skip) != Some(&b'_') {
                            return Err(p.xml(
                                (tag_end + skip) as u64,
                                "appended data does not start with '_' (truncated?)",
                            ));
                        }
                        appended = Some((tag_end + skip + 1, b64));
                        let _ = appended_tag;
                        break;
                    }
                    "Piece" if root.as_deref() == Some("UnstructuredGrid") => {
                        let np = parse_usize(&p, &a, "NumberOfPoints", before)?.unwrap_or(0);
                        let nc = parse_usize(&p, &a, "NumberOfCells", before)?.unwrap_or(0);
                        pieces.push(PieceDesc {
                            n_points: np,
                            n_cells: nc,
                            ..Default::default()
                        });
                        in_piece = !is_empty;
                    }
                    "Piece" if root.as_deref() == Some("PUnstructuredGrid") => {
                        let src = get(&a, "Source").ok_or_else(|| {
                            p.xml(before, "a <Piece> of the .pvtu has no Source attribute")
                        })?;
                        sources.push(src.to_string());
                    }
                    "DataSet" => {
                        let file = get(&a, "file").ok_or_else(|| {
                            p.xml(
                                before,
                                "a <DataSet> of the collection has no file attribute",
                            )
                        })?;
                        let timestep = match get(&a, "timestep") {
                            None => None,
                            Some(t) => Some(
                                t.trim()
                                    .parse::<f64>()
                                    .ok()
                                    .filter(|v| v.is_finite())
                                    .ok_or_else(|| {
                                        p.xml(
                                            before,
                                            format!("timestep=\"{t}\" is not a finite number"),
                                        )
                                    })?,
                            ),
                        };
                        let part = match get(&a, "part") {
                            None => 0,
                            Some(t) => t.trim().parse::<i64>().map_err(|_| {
                                p.xml(before, format!("part=\"{t}\" is not an integer"))
                            })?,
                        };
                        entries.push(PvdEntry {
                            timestep,
                            part,
                            file: file.to_string(),
                        });
                    }
                    "PointData" if in_piece => section = Section::PointData,
                    "CellData" if in_piece => section = Section::CellData,
                    "Points" if in_piece => section = Section::Points,
                    "Cells" if in_piece => section = Section::Cells,
                    "FieldData" if !in_piece => section = Section::FieldData,
                    "DataArray" => {
                        let o = Open {
                            attrs: a,
                            depth,
                            text: None,
                            pos: before,
                        };
                        if is_empty {
                            finish_array(
                                &p,
                                o,
                                section,
                                &mut pieces,
                                &mut field_data,
                                &mut pending,
                                in_piece,
                            )?;
                        } else {
                            if open.is_some() {
                                return Err(p.xml(before, "DataArray inside a DataArray"));
                            }
                            open = Some(o);
                        }
                    }
                    _ => {}
                }
            }
            Event::Eof => {
                if depth > 0 || root.is_none() {
                    if root.is_none() {
                        return Err(Error::NotVtk {
                            path: path.to_path_buf(),
                            reason: "no <VTKFile> element".into(),
                        });
                    }
                    return Err(p.xml(
                        before,
                        format!(
                            "the file ends inside <{}> (truncated xml header?)",
                            stack.last().map(String::as_str).unwrap_or("VTKFile")
                        ),
                    ));
                }
                break;
            }
        }
    }
    let root = root.ok_or_else(|| Error::NotVtk {
        path: path.to_path_buf(),
        reason: "no <VTKFile> element".into(),
    })?;
    match root.as_str() {
        "Collection" => Ok(Header::Pvd(entries)),
        "PUnstructuredGrid" => Ok(Header::Pvtu(sources)),
        _ => {
            if !pending.is_empty() {
                let (start, b64) = appended.ok_or_else(|| {
                    p.xml(
                        bytes.len() as u64,
                        "arrays are declared appended but the file has no <AppendedData> (truncated?)",
                    )
                })?;
                for (piece, sec, idx, off) in pending {
                    let abs = start.checked_add(off).ok_or_else(|| {
                        p.xml(0, format!("appended offset {off} is out of range"))
                    })?;
                    let payload = if b64 {
                        Payload::AppendedBase64(abs)
                    } else {
                        Payload::AppendedRaw(abs)
                    };
                    let slot = match sec {
                        Section::FieldData => field_data.get_mut(idx),
                        _ => pieces.get_mut(piece).and_then(|pc| match sec {
                            Section::PointData => pc.point_data.get_mut(idx),
                            Section::CellData => pc.cell_data.get_mut(idx),
                            Section::Points => pc.points.as_mut(),
                            Section::Cells => match idx {
                                0 => pc.connectivity.as_mut(),
                                1 => pc.offsets.as_mut(),
                                _ => pc.types.as_mut(),
                            },
                            _ => None,
                        }),
                    };
                    if let Some(s) = slot {
                        s.payload = payload;
                    }
                }
            }
            Ok(Header::Vtu(VtuHeader {
                layout,
                pieces,
                field_data,
            }))
        }
    }
}

fn read_layout(p: &P<'_>, a: &[(String, String)]) -> Result<Layout> {
    let header = match get(a, "header_type") {
        None | Some("UInt32") => HeaderType::U32,
        Some("UInt64") => HeaderType::U64,
        Some(other) => return Err(p.unsupported(format!("header_type '{other}'"))),
    };
    let compressor = match get(a, "compressor") {
        None | Some("") => Compressor::None,
        Some("vtkZLibDataCompressor") => Compressor::Zlib,
        Some("vtkLZ4DataCompressor") => Compressor::Lz4,
        Some("vtkLZMADataCompressor") => Compressor::Lzma,
        Some(other) => return Err(p.unsupported(format!("compressor '{other}'"))),
    };
    let big_endian = match get(a, "byte_order") {
        None | Some("LittleEndian") => false,
        Some("BigEndian") => true,
        Some(other) => return Err(p.unsupported(format!("byte_order '{other}'"))),
    };
    Ok(Layout {
        header,
        compressor,
        big_endian,
    })
}

/// Parses the `type` attribute of a DataArray.
pub(crate) fn scalar_type(name: &str) -> Option<ScalarType> {
    Some(match name {
        "Int8" | "Char" => ScalarType::Int8,
        "UInt8" | "UChar" => ScalarType::UInt8,
        "Int16" | "Short" => ScalarType::Int16,
        "UInt16" | "UShort" => ScalarType::UInt16,
        "Int32" | "Int" => ScalarType::Int32,
        "UInt32" | "UInt" => ScalarType::UInt32,
        "Int64" | "Long" | "IdType" => ScalarType::Int64,
        "UInt64" | "ULong" => ScalarType::UInt64,
        "Float32" | "Float" => ScalarType::Float32,
        "Float64" | "Double" => ScalarType::Float64,
        _ => return None,
    })
}

#[allow(clippy::too_many_arguments)]
fn finish_array(
    p: &P<'_>,
    o: Open,
    section: Section,
    pieces: &mut [PieceDesc],
    field_data: &mut Vec<ArrayDesc>,
    pending: &mut Vec<(usize, Section, usize, usize)>,
    in_piece: bool,
) -> Result<()> {
    let a = &o.attrs;
    let pos = o.pos;
    if section == Section::None || (section != Section::FieldData && !in_piece) {
        return Ok(()); // an array outside the sections we read (e.g. in <PPointData>)
    }
    let name = get(a, "Name").unwrap_or("").to_string();
    let tyname = get(a, "type").unwrap_or("");
    if section == Section::FieldData && scalar_type(tyname).is_none() {
        return Ok(()); // dataset-level strings and the like: not ours to read
    }
    let ty = scalar_type(tyname).ok_or_else(|| {
        p.unsupported(format!(
            "data type '{tyname}' of array '{name}' (expected Int8..Int64, UInt8..UInt64, Float32, Float64)"
        ))
    })?;
    let components = parse_usize(p, a, "NumberOfComponents", pos)?.unwrap_or(1);
    if components == 0 || components > 1024 {
        return Err(p.xml(
            pos,
            format!("array '{name}': NumberOfComponents=\"{components}\" is not in 1..1024"),
        ));
    }
    let mut component_names = Vec::new();
    for i in 0..components.min(64) {
        match get(a, &format!("ComponentName{i}")) {
            Some(n) => component_names.push(n.to_string()),
            None => break,
        }
    }
    if component_names.len() != components {
        component_names.clear();
    }
    let tuples = parse_usize(p, a, "NumberOfTuples", pos)?;
    let format = get(a, "format").unwrap_or("ascii");
    let mut appended_off = None;
    let payload = match format {
        "ascii" => Payload::Ascii(o.text.clone().unwrap_or(0..0)),
        "binary" => Payload::Inline(o.text.clone().unwrap_or(0..0)),
        "appended" => {
            let off = parse_usize(p, a, "offset", pos)?.ok_or_else(|| {
                p.xml(
                    pos,
                    format!("appended array '{name}' has no offset attribute"),
                )
            })?;
            appended_off = Some(off);
            Payload::AppendedRaw(usize::MAX)
        }
        other => {
            return Err(p.unsupported(format!("format '{other}' of array '{name}'")));
        }
    };
    let desc = ArrayDesc {
        name,
        ty,
        components,
        component_names,
        tuples,
        payload,
    };
    let piece = pieces.len().saturating_sub(1);
    let (idx, sec) = match section {
        Section::FieldData => {
            field_data.push(desc);
            (field_data.len() - 1, section)
        }
        Section::PointData | Section::CellData | Section::Points | Section::Cells => {
            let pc = pieces
                .last_mut()
                .ok_or_else(|| p.xml(pos, "array outside a <Piece>"))?;
            match section {
                Section::PointData => {
                    pc.point_data.push(desc);
                    (pc.point_data.len() - 1, section)
                }
                Section::CellData => {
                    pc.cell_data.push(desc);
                    (pc.cell_data.len() - 1, section)
                }
                Section::Points => {
                    pc.points = Some(desc);
                    (0, section)
                }
                _ => match desc.name.as_str() {
                    "connectivity" => {
                        pc.connectivity = Some(desc);
                        (0, section)
                    }
                    "offsets" => {
                        pc.offsets = Some(desc);
                        (1, section)
                    }
                    "types" => {
                        pc.types = Some(desc);
                        (2, section)
                    }
                    _ => return Ok(()), // faces / faceoffsets of polyhedra: not needed
                },
            }
        }
        Section::None => return Ok(()),
    };
    if let Some(off) = appended_off {
        pending.push((piece, sec, idx, off));
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn parse_str(s: &str) -> Result<Header> {
        parse(s.as_bytes(), Path::new("t.vtu"))
    }

    #[test]
    fn finds_needle() {
        assert_eq!(find_bytes(b"abc<AppendedData", b"<AppendedData"), Some(3));
        assert_eq!(find_bytes(b"<Append", b"<AppendedData"), None);
    }

    #[test]
    fn inline_span_recorded() {
        let s = r#"<VTKFile type="UnstructuredGrid"><UnstructuredGrid><Piece NumberOfPoints="1" NumberOfCells="0"><Points><DataArray type="Float64" NumberOfComponents="3" format="ascii"> 1 2 3 </DataArray></Points></Piece></UnstructuredGrid></VTKFile>"#;
        let Header::Vtu(h) = parse_str(s).unwrap() else {
            panic!()
        };
        let pts = h.pieces[0].points.as_ref().unwrap();
        let Payload::Ascii(span) = &pts.payload else {
            panic!()
        };
        assert_eq!(&s[span.clone()], " 1 2 3 ");
    }

    #[test]
    fn utf8_byte_order_mark_accepted() {
        let s = "\u{feff}<?xml version=\"1.0\"?>\n<VTKFile type=\"UnstructuredGrid\"><UnstructuredGrid></UnstructuredGrid></VTKFile>";
        assert!(matches!(parse_str(s), Ok(Header::Vtu(_))));
    }

    #[test]
    fn information_key_children_skipped() {
        // VTK 9 writes <InformationKey> children inside a DataArray before its text
        let s = r#"<VTKFile type="UnstructuredGrid"><UnstructuredGrid><Piece NumberOfPoints="1" NumberOfCells="0"><Points><DataArray type="Float64" NumberOfComponents="3" format="ascii">
  <InformationKey name="L2_NORM_RANGE" location="vtkDataArray" length="2"><Value index="0">1</Value><Value index="1">2</Value></InformationKey>
  4 5 6
</DataArray></Points></Piece></UnstructuredGrid></VTKFile>"#;
        let Header::Vtu(h) = parse_str(s).unwrap() else {
            panic!()
        };
        let Payload::Ascii(span) = &h.pieces[0].points.as_ref().unwrap().payload else {
            panic!()
        };
        assert_eq!(s[span.clone()].trim(), "4 5 6");
    }

    #[test]
    fn doctype_refused() {
        let s = r#"<?xml version="1.0"?><!DOCTYPE lolz [<!ENTITY lol "lol">]><VTKFile type="UnstructuredGrid"></VTKFile>"#;
        let e = parse_str(s).unwrap_err().to_string();
        assert!(e.contains("DOCTYPE"), "{e}");
    }

    #[test]
    fn depth_limited() {
        let mut s = String::from(r#"<VTKFile type="UnstructuredGrid">"#);
        for _ in 0..100 {
            s.push_str("<a>");
        }
        let e = parse_str(&s).unwrap_err().to_string();
        assert!(e.contains("nested deeper"), "{e}");
    }

    #[test]
    fn string_field_data_is_skipped() {
        let s = r#"<VTKFile type="UnstructuredGrid"><UnstructuredGrid><FieldData><DataArray type="String" Name="note" NumberOfTuples="1" format="ascii">104 105 0</DataArray><DataArray type="Float64" Name="TimeValue" NumberOfTuples="1" format="ascii">2</DataArray></FieldData></UnstructuredGrid></VTKFile>"#;
        let Header::Vtu(h) = parse_str(s).unwrap() else {
            panic!()
        };
        assert_eq!(h.field_data.len(), 1);
        assert_eq!(h.field_data[0].name, "TimeValue");
    }

    #[test]
    fn unknown_type_and_compressor() {
        let s = r#"<VTKFile type="UnstructuredGrid" compressor="vtkFooCompressor"></VTKFile>"#;
        assert!(
            parse_str(s)
                .unwrap_err()
                .to_string()
                .contains("vtkFooCompressor")
        );
        let s = r#"<VTKFile type="ImageData"></VTKFile>"#;
        assert!(parse_str(s).unwrap_err().to_string().contains("ImageData"));
    }
}
