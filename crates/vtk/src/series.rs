//! Series of increments: discovery (file, `.pvd`, folder), the catalogue, and per-increment
//! lazy decoding from memory-mapped files.

use std::fs::File;
use std::ops::Range;
use std::path::{Path, PathBuf};
use std::sync::{Mutex, OnceLock};

use crate::decode::{self, Compressor, Ctx, F64Sink, I64Sink, Layout, Payload, Request};
use crate::error::{Error, Result};
use crate::legacy::{LegacyFile, LegacyLocation};
use crate::mesh::Mesh;
use crate::xml::{self, ArrayDesc, Header, PieceDesc, VtuHeader};
use crate::{Discovery, FieldInfo, IncrementInfo, Location, ScalarType};

/// The bytes of a file: a read-only memory map (or an empty buffer for empty files).
enum Bytes {
    Map(memmap2::Mmap),
    Empty,
}

impl Bytes {
    fn get(&self) -> &[u8] {
        match self {
            Bytes::Map(m) => m,
            Bytes::Empty => &[],
        }
    }
}

fn map_file(path: &Path) -> Result<Bytes> {
    let io = |action: &'static str| {
        move |source| Error::Io {
            path: path.to_path_buf(),
            action,
            source,
        }
    };
    let f = File::open(path).map_err(io("cannot open"))?;
    let len = f.metadata().map_err(io("cannot read metadata of"))?.len();
    if len == 0 {
        return Ok(Bytes::Empty);
    }
    // SAFETY: the map is read-only; results files are not expected to change while being read.
    // If another process truncates the file meanwhile, reading may fault (SIGBUS), as with any
    // memory-mapped reader; documented in the crate doc's Safety section.
    let m = unsafe { memmap2::Mmap::map(&f) }.map_err(io("cannot map"))?;
    Ok(Bytes::Map(m))
}

/// File kinds recognised.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Kind {
    Vtu,
    Pvtu,
    Pvd,
    Legacy,
    Unknown,
}

fn kind_of(path: &Path) -> Kind {
    match path
        .extension()
        .and_then(|e| e.to_str())
        .map(str::to_ascii_lowercase)
        .as_deref()
    {
        Some("vtu") => Kind::Vtu,
        Some("pvtu") => Kind::Pvtu,
        Some("pvd") => Kind::Pvd,
        Some("vtk") => Kind::Legacy,
        _ => Kind::Unknown,
    }
}

fn starts_with_tag(bytes: &[u8]) -> bool {
    let t = bytes.strip_prefix(b"\xef\xbb\xbf").unwrap_or(bytes);
    t.iter().find(|b| !b.is_ascii_whitespace()) == Some(&b'<')
}

fn sniff(bytes: &[u8]) -> Kind {
    let t = bytes
        .iter()
        .position(|b| !b.is_ascii_whitespace())
        .map_or(&[][..], |i| &bytes[i..]);
    if t.starts_with(b"# vtk DataFile") {
        Kind::Legacy
    } else {
        Kind::Vtu // the XML parser tells the XML kinds apart and rejects the rest
    }
}

enum FileData {
    Xml(VtuHeader),
    Legacy(Box<LegacyFile>),
}

struct OpenFile {
    path: PathBuf,
    bytes: Bytes,
    data: FileData,
}

/// One increment's files, their headers parsed, and its pieces in merge order.
struct Loaded {
    files: Vec<OpenFile>,
    /// (file index, piece index in that file)
    pieces: Vec<(usize, usize)>,
}

impl Loaded {
    fn new() -> Loaded {
        Loaded {
            files: Vec::new(),
            pieces: Vec::new(),
        }
    }

    /// Opens a data file (`.vtu`, `.pvtu` or `.vtk`) and appends its pieces.
    fn load(&mut self, path: &Path) -> Result<()> {
        let bytes = map_file(path)?;
        let kind = match kind_of(path) {
            Kind::Unknown => sniff(bytes.get()),
            // some tools give XML files the legacy extension
            Kind::Legacy if starts_with_tag(bytes.get()) => Kind::Vtu,
            k => k,
        };
        match kind {
            Kind::Legacy => {
                let lf = LegacyFile::scan(bytes.get()).map_err(|source| Error::Legacy {
                    path: path.to_path_buf(),
                    source: Box::new(source),
                })?;
                self.files.push(OpenFile {
                    path: path.to_path_buf(),
                    bytes,
                    data: FileData::Legacy(Box::new(lf)),
                });
                self.pieces.push((self.files.len() - 1, 0));
                Ok(())
            }
            _ => match xml::parse(bytes.get(), path)? {
                Header::Vtu(h) => {
                    let n = h.pieces.len();
                    self.files.push(OpenFile {
                        path: path.to_path_buf(),
                        bytes,
                        data: FileData::Xml(h),
                    });
                    let f = self.files.len() - 1;
                    self.pieces.extend((0..n).map(|p| (f, p)));
                    Ok(())
                }
                Header::Pvtu(sources) => {
                    if sources.is_empty() {
                        return Err(Error::Collection {
                            path: path.to_path_buf(),
                            message: "the partitioned file lists no pieces".into(),
                        });
                    }
                    let dir = path.parent().unwrap_or(Path::new(""));
                    for s in sources {
                        let p = dir.join(&s);
                        check_member(path, &p, &s)?;
                        if matches!(kind_of(&p), Kind::Pvtu | Kind::Pvd) {
                            return Err(Error::Collection {
                                path: path.to_path_buf(),
                                message: format!(
                                    "piece '{s}' is itself a collection; pieces must be .vtu files"
                                ),
                            });
                        }
                        self.load(&p)?;
                    }
                    Ok(())
                }
                Header::Pvd(_) => Err(Error::Collection {
                    path: path.to_path_buf(),
                    message: "a .pvd collection inside a collection is not supported".into(),
                }),
            },
        }
    }

    fn piece_counts(&self) -> Vec<(usize, usize)> {
        self.pieces
            .iter()
            .map(|&(f, p)| match &self.files[f].data {
                FileData::Xml(h) => (h.pieces[p].n_points, h.pieces[p].n_cells),
                FileData::Legacy(l) => (l.n_points(), l.n_cells()),
            })
            .collect()
    }

    /// The dataset-level TimeValue of the first file, if any.
    fn time_value(&self, scratch: &mut Vec<u8>) -> Result<Option<f64>> {
        let Some(f) = self.files.first() else {
            return Ok(None);
        };
        match &f.data {
            FileData::Legacy(l) => Ok(l.time_value(f.bytes.get()).filter(|t| t.is_finite())),
            FileData::Xml(h) => {
                let Some(a) = h.field_data.iter().find(|a| a.name == "TimeValue") else {
                    return Ok(None);
                };
                let tuples = a.tuples.unwrap_or(1);
                if tuples == 0 {
                    return Ok(None);
                }
                let mut out = Vec::new();
                decode_f64(
                    &f.path,
                    f.bytes.get(),
                    h.layout,
                    a,
                    tuples,
                    0..1,
                    "field data array 'TimeValue'",
                    scratch,
                    &mut out,
                )?;
                Ok(out.first().copied().filter(|t| t.is_finite()))
            }
        }
    }
}

/// Checks that a collection member exists and is not the collection itself.
fn check_member(collection: &Path, member: &Path, as_written: &str) -> Result<()> {
    let same = match (
        std::fs::canonicalize(collection),
        std::fs::canonicalize(member),
    ) {
        (Ok(a), Ok(b)) => a == b,
        _ => false,
    };
    if same {
        return Err(Error::Collection {
            path: collection.to_path_buf(),
            message: format!("the collection names itself ('{as_written}')"),
        });
    }
    if !member.is_file() {
        return Err(Error::Collection {
            path: collection.to_path_buf(),
            message: format!(
                "names a missing file '{as_written}' (looked for {})",
                member.display()
            ),
        });
    }
    Ok(())
}

#[allow(clippy::too_many_arguments)]
fn decode_f64(
    path: &Path,
    bytes: &[u8],
    layout: Layout,
    a: &ArrayDesc,
    tuples: usize,
    elems: Range<usize>,
    what: &str,
    scratch: &mut Vec<u8>,
    out: &mut Vec<f64>,
) -> Result<()> {
    let total = checked_total(path, a, tuples, what)?;
    let req = Request {
        ty: a.ty,
        total,
        elems,
    };
    decode::decode(
        bytes,
        &a.payload,
        layout,
        &req,
        Ctx { path, what },
        scratch,
        &mut F64Sink(out),
    )
}

fn checked_total(path: &Path, a: &ArrayDesc, tuples: usize, what: &str) -> Result<usize> {
    if let Some(t) = a.tuples
        && t != tuples
    {
        return Err(Error::SizeMismatch {
            path: path.to_path_buf(),
            what: format!("NumberOfTuples of {what}"),
            expected: tuples as u64,
            found: t as u64,
        });
    }
    tuples
        .checked_mul(a.components)
        .ok_or_else(|| Error::Limit {
            path: path.to_path_buf(),
            what: what.to_string(),
            detail: format!("{tuples} tuples of {} components", a.components),
        })
}

fn decode_ints(
    path: &Path,
    bytes: &[u8],
    layout: Layout,
    a: &ArrayDesc,
    count: usize,
    what: &str,
    scratch: &mut Vec<u8>,
) -> Result<Vec<usize>> {
    if a.ty.is_float() {
        return Err(Error::Unsupported {
            path: path.to_path_buf(),
            what: format!("{} data in {what} (integers expected)", a.ty),
        });
    }
    if a.components != 1 {
        return Err(Error::SizeMismatch {
            path: path.to_path_buf(),
            what: format!("NumberOfComponents of {what}"),
            expected: 1,
            found: a.components as u64,
        });
    }
    let mut v = Vec::new();
    let req = Request {
        ty: a.ty,
        total: count,
        elems: 0..count,
    };
    decode::decode(
        bytes,
        &a.payload,
        layout,
        &req,
        Ctx { path, what },
        scratch,
        &mut I64Sink(&mut v),
    )?;
    v.into_iter()
        .enumerate()
        .map(|(i, x)| {
            usize::try_from(x).map_err(|_| Error::Corrupt {
                path: path.to_path_buf(),
                what: what.to_string(),
                detail: format!("negative value {x} at position {i}"),
            })
        })
        .collect()
}

/// Decodes the points and cells of one XML piece and appends them to `mesh`.
fn xml_piece_into_mesh(
    path: &Path,
    bytes: &[u8],
    layout: Layout,
    piece: &PieceDesc,
    index: usize,
    scratch: &mut Vec<u8>,
    mesh: &mut Mesh,
) -> Result<()> {
    // Points and cells are independent: decode them at the same time.
    let mut cell_scratch = Vec::new();
    let (points, cells) = rayon::join(
        || piece_points(path, bytes, layout, piece, index, scratch),
        || xml_piece_cells(path, bytes, layout, piece, index, &mut cell_scratch),
    );
    // the points' error first, as when they were decoded first
    let points = points?;
    let (conn, offsets, types) = cells?;
    mesh.push_piece(path, index, points, conn, offsets, types)
}

/// The connectivity, offsets (with a leading 0) and types of one XML piece.
fn xml_piece_cells(
    path: &Path,
    bytes: &[u8],
    layout: Layout,
    piece: &PieceDesc,
    index: usize,
    scratch: &mut Vec<u8>,
) -> Result<(Vec<usize>, Vec<usize>, Vec<u8>)> {
    let nc = piece.n_cells;
    Ok(if nc == 0 {
        (Vec::new(), vec![0], Vec::new())
    } else {
        let missing = |what: &str| Error::MissingArray {
            path: path.to_path_buf(),
            name: what.to_string(),
            location: format!("<Cells> of piece {index}"),
            available: "connectivity, offsets, types are required".into(),
        };
        let oa = piece.offsets.as_ref().ok_or_else(|| missing("offsets"))?;
        let ta = piece.types.as_ref().ok_or_else(|| missing("types"))?;
        let ca = piece
            .connectivity
            .as_ref()
            .ok_or_else(|| missing("connectivity"))?;
        let ends = decode_ints(
            path,
            bytes,
            layout,
            oa,
            nc,
            &format!("array 'offsets' of piece {index}"),
            scratch,
        )?;
        let types = decode_ints(
            path,
            bytes,
            layout,
            ta,
            nc,
            &format!("array 'types' of piece {index}"),
            scratch,
        )?;
        let types: Vec<u8> = types
            .into_iter()
            .enumerate()
            .map(|(c, t)| {
                u8::try_from(t).map_err(|_| Error::BadCells {
                    path: path.to_path_buf(),
                    piece: index,
                    detail: format!("unknown cell type {t} of cell {c}"),
                })
            })
            .collect::<Result<_>>()?;
        let n_conn = ends.last().copied().unwrap_or(0);
        // the connectivity length is declared by the last offset; check it against the file
        // before decoding (decode checks the byte count against the data present)
        let conn = decode_ints(
            path,
            bytes,
            layout,
            ca,
            n_conn,
            &format!("array 'connectivity' of piece {index}"),
            scratch,
        )
        .map_err(|e| match e {
            Error::SizeMismatch { found, .. } => Error::BadCells {
                path: path.to_path_buf(),
                piece: index,
                detail: format!(
                    "the offsets end at {n_conn} but the connectivity holds {}",
                    if layout_is_binary(&ca.payload) {
                        format!("{} bytes", found)
                    } else {
                        format!("{found} values")
                    }
                ),
            },
            other => other,
        })?;
        let mut offsets = Vec::with_capacity(nc + 1);
        offsets.push(0);
        offsets.extend_from_slice(&ends);
        (conn, offsets, types)
    })
}

fn layout_is_binary(p: &Payload) -> bool {
    !matches!(p, Payload::Ascii(_))
}

fn piece_points(
    path: &Path,
    bytes: &[u8],
    layout: Layout,
    piece: &PieceDesc,
    index: usize,
    scratch: &mut Vec<u8>,
) -> Result<Vec<[f64; 3]>> {
    let np = piece.n_points;
    if np == 0 {
        return Ok(Vec::new());
    }
    let pa = piece.points.as_ref().ok_or_else(|| Error::MissingArray {
        path: path.to_path_buf(),
        name: "Points".into(),
        location: format!("<Points> of piece {index}"),
        available: "none".into(),
    })?;
    let what = format!("point coordinates of piece {index}");
    if pa.components != 3 {
        return Err(Error::SizeMismatch {
            path: path.to_path_buf(),
            what: format!("NumberOfComponents of {what}"),
            expected: 3,
            found: pa.components as u64,
        });
    }
    let mut flat = Vec::new();
    let total = checked_total(path, pa, np, &what)?;
    decode_f64(
        path,
        bytes,
        layout,
        pa,
        np,
        0..total,
        &what,
        scratch,
        &mut flat,
    )?;
    Ok(flat.chunks_exact(3).map(|c| [c[0], c[1], c[2]]).collect())
}

fn encoding_text(layout: Layout, payload: &Payload) -> String {
    let bin = |kind: &str| {
        let mut s = format!(
            "{kind}, {}, {} header",
            layout.compressor.name(),
            layout.header.name()
        );
        if layout.big_endian {
            s.push_str(", big-endian");
        }
        s
    };
    match payload {
        Payload::Ascii(_) => "ascii".into(),
        Payload::Inline(_) => bin("inline base64"),
        Payload::AppendedRaw(_) => bin("appended raw"),
        Payload::AppendedBase64(_) => bin("appended base64"),
    }
}

fn legacy_loc(l: LegacyLocation) -> Location {
    match l {
        LegacyLocation::Point => Location::Point,
        LegacyLocation::Cell => Location::Cell,
    }
}

/// The catalogue of the first piece of a loaded increment.
fn catalogue(loaded: &Loaded) -> Result<Vec<FieldInfo>> {
    let Some(&(f, p)) = loaded.pieces.first() else {
        return Ok(Vec::new());
    };
    let file = &loaded.files[f];
    let mut fields = Vec::new();
    match &file.data {
        FileData::Xml(h) => {
            let piece = &h.pieces[p];
            for (loc, list) in [
                (Location::Point, &piece.point_data),
                (Location::Cell, &piece.cell_data),
            ] {
                for a in list {
                    fields.push(FieldInfo {
                        name: a.name.clone(),
                        location: loc,
                        components: a.components,
                        component_names: a.component_names.clone(),
                        scalar_type: a.ty,
                        encoding: encoding_text(h.layout, &a.payload),
                    });
                }
            }
        }
        FileData::Legacy(l) => {
            for a in l.arrays() {
                let ty =
                    ScalarType::from_legacy(&a.data_type).ok_or_else(|| Error::Unsupported {
                        path: file.path.clone(),
                        what: format!("data type '{}' of array '{}'", a.data_type, a.name),
                    })?;
                fields.push(FieldInfo {
                    name: a.name.clone(),
                    location: legacy_loc(a.location),
                    components: a.components,
                    component_names: if a.component_names.len() == a.components {
                        a.component_names.clone()
                    } else {
                        Vec::new()
                    },
                    scalar_type: ty,
                    encoding: {
                        let (a, b) = l.version();
                        if l.is_binary() {
                            format!("legacy binary, big-endian, version {a}.{b}")
                        } else {
                            format!("legacy ascii, version {a}.{b}")
                        }
                    },
                });
            }
        }
    }
    Ok(fields)
}

fn build_mesh(loaded: &Loaded, scratch: &mut Vec<u8>) -> Result<Mesh> {
    let mut mesh = Mesh::default();
    for &(f, p) in &loaded.pieces {
        let file = &loaded.files[f];
        let bytes = file.bytes.get();
        match &file.data {
            FileData::Xml(h) => xml_piece_into_mesh(
                &file.path,
                bytes,
                h.layout,
                &h.pieces[p],
                p,
                scratch,
                &mut mesh,
            )?,
            FileData::Legacy(l) => {
                let wrap = |source: crate::legacy::LegacyError| Error::Legacy {
                    path: file.path.clone(),
                    source: Box::new(source),
                };
                let pts = l.points(bytes).map_err(wrap)?;
                let c = l.cells(bytes).map_err(wrap)?;
                let offsets = if c.offsets.is_empty() {
                    vec![0]
                } else {
                    c.offsets
                };
                mesh.push_piece(&file.path, 0, pts, c.connectivity, offsets, c.types)?;
            }
        }
    }
    Ok(mesh)
}

/// A result opened for reading: its increments, reference mesh and field catalogue.
///
/// Opening reads the catalogue only; see [`Series::increment`] to decode arrays.
pub struct Series {
    path: PathBuf,
    discovery: Discovery,
    increments: Vec<IncrementInfo>,
    /// The data files of each increment (several for `.pvd` parts of one timestep).
    parts: Vec<Vec<PathBuf>>,
    /// (points, cells) of each piece of the first increment, from its headers.
    pieces: Vec<(usize, usize)>,
    /// The reference mesh, decoded on first request ([`Series::mesh`]).
    mesh: OnceLock<Mesh>,
    fields: Vec<FieldInfo>,
}

impl std::fmt::Debug for Series {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("Series")
            .field("path", &self.path)
            .field("discovery", &self.discovery)
            .field("increments", &self.increments.len())
            .field("points", &self.n_points())
            .field("cells", &self.n_cells())
            .field("fields", &self.fields.len())
            .finish()
    }
}

impl Series {
    /// Opens a `.vtu`, `.pvtu`, `.pvd`, legacy `.vtk` file or a folder, reading the catalogue
    /// only: increments and times, the first increment's point and cell counts and its fields.
    ///
    /// Cost: the first increment's headers are parsed; a `.pvd` is checked for missing
    /// members; for a numbered folder every file's header is parsed (legacy files: scanned) to
    /// find its TimeValue. Nothing is decoded: the reference mesh on the first call of
    /// [`Series::mesh`], field arrays through [`Series::increment`].
    pub fn open(path: &Path) -> Result<Series> {
        let meta = std::fs::metadata(path).map_err(|source| Error::Io {
            path: path.to_path_buf(),
            action: "cannot open",
            source,
        })?;
        let (discovery, entries) = if meta.is_dir() {
            discover_folder(path)?
        } else if kind_of(path) == Kind::Pvd
            || (kind_of(path) == Kind::Unknown && looks_like_pvd(path))
        {
            (Discovery::Pvd(path.to_path_buf()), read_pvd(path)?)
        } else {
            (
                Discovery::File,
                vec![(None, vec![path.to_path_buf()], TimeRule::Index)],
            )
        };
        if entries.is_empty() {
            return Err(Error::Collection {
                path: path.to_path_buf(),
                message: "the collection lists no data sets".into(),
            });
        }
        let mut scratch = Vec::new();
        let mut increments = Vec::with_capacity(entries.len());
        let mut parts = Vec::with_capacity(entries.len());
        let mut first: Option<Loaded> = None;
        for (i, (time, files, rule)) in entries.into_iter().enumerate() {
            let time = match (time, rule) {
                (Some(t), _) => t,
                (None, TimeRule::Index) | (None, TimeRule::Number(_)) => {
                    // TimeValue from the file itself (header only)
                    let mut l = Loaded::new();
                    l.load(&files[0])?;
                    let t = l.time_value(&mut scratch)?;
                    let fallback = match rule {
                        TimeRule::Number(n) => n as f64,
                        TimeRule::Index => i as f64,
                    };
                    if i == 0 {
                        for f in &files[1..] {
                            l.load(f)?;
                        }
                        first = Some(l);
                    }
                    t.unwrap_or(fallback)
                }
            };
            increments.push(IncrementInfo {
                index: i,
                time,
                file: files[0].clone(),
            });
            parts.push(files);
        }
        let first = match first {
            Some(l) => l,
            None => {
                let mut l = Loaded::new();
                for f in &parts[0] {
                    l.load(f)?;
                }
                l
            }
        };
        let pieces = first.piece_counts();
        let fields = catalogue(&first)?;
        Ok(Series {
            path: path.to_path_buf(),
            discovery,
            increments,
            parts,
            pieces,
            mesh: OnceLock::new(),
            fields,
        })
    }

    /// What was opened.
    pub fn path(&self) -> &Path {
        &self.path
    }
    /// The increments in time order.
    pub fn increments(&self) -> &[IncrementInfo] {
        &self.increments
    }
    /// The data files of increment `index` (one, or several `.pvd` parts); empty if out of range.
    pub fn increment_files(&self, index: usize) -> &[PathBuf] {
        self.parts.get(index).map_or(&[], Vec::as_slice)
    }
    /// The rule that found the increments.
    pub fn discovery(&self) -> &Discovery {
        &self.discovery
    }
    /// The reference mesh: points and cells of the first increment, decoded and validated on
    /// the first call (its cells: offsets, point ids, types and node counts), then kept.
    ///
    /// Commands that need only cell or point data (a full-field damage pass) never pay for
    /// it, or can decode it while they work; an error (a bad cell, a truncated array) is
    /// returned by every call until one succeeds.
    pub fn mesh(&self) -> Result<&Mesh> {
        if let Some(m) = self.mesh.get() {
            return Ok(m);
        }
        let files = self.parts.first().map_or(&[][..], Vec::as_slice);
        let mut loaded = Loaded::new();
        for f in files {
            loaded.load(f)?;
        }
        let mesh = build_mesh(&loaded, &mut Vec::new())?;
        if mesh.pieces() != self.pieces.as_slice() {
            return Err(Error::SeriesChanged {
                path: files.first().cloned().unwrap_or_default(),
                what: "point and cell counts of the pieces since the series was opened".into(),
                expected: format!("{:?}", self.pieces),
                found: format!("{:?}", mesh.pieces()),
            });
        }
        Ok(self.mesh.get_or_init(|| mesh))
    }
    /// Number of points of the reference mesh (from the headers; no decoding).
    pub fn n_points(&self) -> usize {
        self.pieces.iter().map(|p| p.0).sum()
    }
    /// Number of cells of the reference mesh (from the headers; no decoding).
    pub fn n_cells(&self) -> usize {
        self.pieces.iter().map(|p| p.1).sum()
    }
    /// Point and cell counts of each piece of the first increment, in merge order (from the
    /// headers; no decoding).
    pub fn pieces(&self) -> &[(usize, usize)] {
        &self.pieces
    }
    /// Point and cell arrays of the first increment (first piece), point data first.
    pub fn fields(&self) -> &[FieldInfo] {
        &self.fields
    }
    /// Looks up a field by name; with `location` `None`, a cell array is preferred over a point
    /// array of the same name.
    pub fn field(&self, name: &str, location: Option<Location>) -> Result<&FieldInfo> {
        let find = |loc: Location| {
            self.fields
                .iter()
                .find(|f| f.name == name && f.location == loc)
        };
        let found = match location {
            Some(l) => find(l),
            None => find(Location::Cell).or_else(|| find(Location::Point)),
        };
        found.ok_or_else(|| Error::MissingArray {
            path: self.path.clone(),
            name: name.to_string(),
            location: location.map_or("point or cell".into(), |l| l.to_string()),
            available: list_fields(&self.fields),
        })
    }

    /// Opens increment `index`: maps its file(s) and parses their headers; nothing is decoded.
    /// Checks that its pieces have the reference mesh's point and cell counts.
    pub fn increment(&self, index: usize) -> Result<Increment<'_>> {
        let files = self.parts.get(index).ok_or_else(|| Error::NoIncrement {
            path: self.path.clone(),
            index,
            count: self.parts.len(),
        })?;
        let mut loaded = Loaded::new();
        for f in files {
            loaded.load(f)?;
        }
        let counts = loaded.piece_counts();
        let reference = self.pieces.as_slice();
        let first_file = files.first().cloned().unwrap_or_default();
        if counts.len() != reference.len() {
            return Err(Error::SeriesChanged {
                path: first_file,
                what: "number of pieces".into(),
                expected: reference.len().to_string(),
                found: counts.len().to_string(),
            });
        }
        for (k, (c, r)) in counts.iter().zip(reference).enumerate() {
            let path = loaded.files[loaded.pieces[k].0].path.clone();
            if c.1 != r.1 {
                return Err(Error::SeriesChanged {
                    path,
                    what: format!("cell count of piece {k}"),
                    expected: r.1.to_string(),
                    found: c.1.to_string(),
                });
            }
            if c.0 != r.0 {
                return Err(Error::SeriesChanged {
                    path,
                    what: format!("point count of piece {k}"),
                    expected: r.0.to_string(),
                    found: c.0.to_string(),
                });
            }
        }
        let info = &self.increments[index];
        Ok(Increment {
            series: self,
            index,
            time: info.time,
            loaded,
            scratch: Mutex::new(Vec::new()),
        })
    }
}

fn list_fields(fields: &[FieldInfo]) -> String {
    if fields.is_empty() {
        return "none".into();
    }
    fields
        .iter()
        .map(|f| format!("{} ({}, {})", f.name, f.location, f.components))
        .collect::<Vec<_>>()
        .join(", ")
}

/// How an increment's time is found when the collection gives none.
#[derive(Clone, Copy, Debug)]
enum TimeRule {
    /// TimeValue, else the increment index.
    Index,
    /// TimeValue, else this number (numbered folders).
    Number(u64),
}

type Entries = Vec<(Option<f64>, Vec<PathBuf>, TimeRule)>;

fn looks_like_pvd(path: &Path) -> bool {
    // cheap sniff of the first kilobytes for a Collection root
    let Ok(b) = map_file(path) else { return false };
    let head = &b.get()[..b.get().len().min(4096)];
    xml::find_bytes(head, b"type=\"Collection\"").is_some()
}

fn read_pvd(path: &Path) -> Result<Entries> {
    let bytes = map_file(path)?;
    let entries = match xml::parse(bytes.get(), path)? {
        Header::Pvd(e) => e,
        _ => {
            return Err(Error::Collection {
                path: path.to_path_buf(),
                message: "a .pvd file must be a <VTKFile type=\"Collection\">".into(),
            });
        }
    };
    let dir = path.parent().unwrap_or(Path::new(""));
    let mut list: Vec<(f64, i64, PathBuf)> = Vec::with_capacity(entries.len());
    for (i, e) in entries.iter().enumerate() {
        let p = dir.join(&e.file);
        check_member(path, &p, &e.file)?;
        if kind_of(&p) == Kind::Pvd {
            return Err(Error::Collection {
                path: path.to_path_buf(),
                message: format!("data set '{}' is itself a .pvd collection", e.file),
            });
        }
        list.push((e.timestep.unwrap_or(i as f64), e.part, p));
    }
    // stable: equal timesteps keep their parts in (part, file) order
    list.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)));
    let mut out: Entries = Vec::new();
    for (t, _, p) in list {
        match out.last_mut() {
            Some((Some(lt), files, _)) if *lt == t => {
                // Parts of one timestep are pieces of one mesh: the same file twice would
                // silently duplicate its cells.
                if files.contains(&p) {
                    return Err(Error::Collection {
                        path: path.to_path_buf(),
                        message: format!(
                            "data set '{}' is listed twice at timestep {t}",
                            p.strip_prefix(dir).unwrap_or(&p).display()
                        ),
                    });
                }
                files.push(p)
            }
            _ => out.push((Some(t), vec![p], TimeRule::Index)),
        }
    }
    Ok(out)
}

/// Splits `run_0012` into (`run_`, 12); `None` without trailing digits.
fn split_number(stem: &str) -> Option<(&str, &str)> {
    let digits = stem.bytes().rev().take_while(u8::is_ascii_digit).count();
    if digits == 0 {
        return None;
    }
    let (a, b) = stem.split_at(stem.len() - digits);
    Some((a, b))
}

fn discover_folder(dir: &Path) -> Result<(Discovery, Entries)> {
    let rd = std::fs::read_dir(dir).map_err(|source| Error::Io {
        path: dir.to_path_buf(),
        action: "cannot list",
        source,
    })?;
    let mut files: Vec<PathBuf> = Vec::new();
    for e in rd {
        let e = e.map_err(|source| Error::Io {
            path: dir.to_path_buf(),
            action: "cannot list",
            source,
        })?;
        let p = e.path();
        if p.is_file() && kind_of(&p) != Kind::Unknown {
            files.push(p);
        }
    }
    files.sort();
    let pvds: Vec<&PathBuf> = files.iter().filter(|p| kind_of(p) == Kind::Pvd).collect();
    if pvds.len() == 1 {
        let p = pvds[0].clone();
        let entries = read_pvd(&p)?;
        return Ok((Discovery::FolderPvd(p), entries));
    }
    let name = |p: &Path| {
        p.file_name()
            .map(|n| n.to_string_lossy().into_owned())
            .unwrap_or_default()
    };
    if pvds.len() > 1 {
        return Err(Error::Folder {
            path: dir.to_path_buf(),
            message: format!(
                "the folder holds several .pvd collections ({}); give one of them",
                pvds.iter().map(|p| name(p)).collect::<Vec<_>>().join(", ")
            ),
        });
    }
    // numbered files; .pvtu files take precedence over the .vtu pieces they list
    let has_pvtu = files.iter().any(|p| kind_of(p) == Kind::Pvtu);
    // (stem, extension, numbered files)
    type Group = (String, String, Vec<(u64, PathBuf)>);
    let mut groups: Vec<Group> = Vec::new();
    for p in &files {
        let k = kind_of(p);
        if has_pvtu && k != Kind::Pvtu {
            continue;
        }
        let ext = p
            .extension()
            .map(|e| e.to_string_lossy().into_owned())
            .unwrap_or_default();
        let stem = p
            .file_stem()
            .map(|s| s.to_string_lossy().into_owned())
            .unwrap_or_default();
        let Some((prefix, digits)) = split_number(&stem) else {
            continue;
        };
        let n: u64 = digits.parse().map_err(|_| Error::Folder {
            path: dir.to_path_buf(),
            message: format!("the number in '{}' is too large", name(p)),
        })?;
        match groups.iter_mut().find(|(s, e, _)| s == prefix && *e == ext) {
            Some(g) => g.2.push((n, p.clone())),
            None => groups.push((prefix.to_string(), ext, vec![(n, p.clone())])),
        }
    }
    match groups.len() {
        0 => Err(Error::Folder {
            path: dir.to_path_buf(),
            message: "the folder holds no .pvd and no numbered .vtu, .pvtu or .vtk files".into(),
        }),
        1 => {
            let (stem, ext, mut list) = groups.remove(0);
            list.sort_by_key(|(n, _)| *n);
            for w in list.windows(2) {
                if w[0].0 == w[1].0 {
                    return Err(Error::Folder {
                        path: dir.to_path_buf(),
                        message: format!(
                            "files '{}' and '{}' have the same increment number",
                            name(&w[0].1),
                            name(&w[1].1)
                        ),
                    });
                }
            }
            let entries = list
                .into_iter()
                .map(|(n, p)| (None, vec![p], TimeRule::Number(n)))
                .collect();
            Ok((
                Discovery::FolderNumbered {
                    stem: format!("{stem}*.{ext}"),
                },
                entries,
            ))
        }
        _ => Err(Error::Folder {
            path: dir.to_path_buf(),
            message: format!(
                "the folder holds several numbered series ({}); give a .pvd or one file",
                groups
                    .iter()
                    .map(|(s, e, l)| format!("{s}*.{e}: {} files", l.len()))
                    .collect::<Vec<_>>()
                    .join(", ")
            ),
        }),
    }
}

/// One increment: its files mapped and headers parsed; arrays are decoded on request.
pub struct Increment<'s> {
    series: &'s Series,
    index: usize,
    time: f64,
    loaded: Loaded,
    scratch: Mutex<Vec<u8>>,
}

impl std::fmt::Debug for Increment<'_> {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("Increment")
            .field("index", &self.index)
            .field("time", &self.time)
            .field("files", &self.loaded.files.len())
            .finish()
    }
}

impl<'s> Increment<'s> {
    /// Position in the series.
    pub fn index(&self) -> usize {
        self.index
    }
    /// Time of the increment.
    pub fn time(&self) -> f64 {
        self.time
    }

    /// Decodes array `name` at `location` as f64, interleaved components, into `out` (cleared
    /// and reused). Checks the data length against tuples × components, with the tuple count
    /// of the reference mesh.
    pub fn read(
        &self,
        name: &str,
        location: Location,
        out: &mut Vec<f64>,
    ) -> Result<&'s FieldInfo> {
        let info = self.series.field(name, Some(location))?;
        let n = self.count(location);
        self.read_range(info, 0..n, out, None)?;
        Ok(info)
    }

    /// Decodes tuples `range` (merged numbering) of an array into `out` (cleared): raw and
    /// uncompressed base64 data are read only for those tuples, compressed data only for the
    /// blocks covering them, ascii text is tokenised but only those tuples parsed. Legacy
    /// `.vtk` arrays are decoded whole into a temporary buffer and the range copied.
    pub fn read_tuples(
        &self,
        name: &str,
        location: Location,
        range: Range<usize>,
        out: &mut Vec<f64>,
    ) -> Result<&'s FieldInfo> {
        self.read_tuples_with(name, location, range, out, None)
    }

    /// [`Increment::read_tuples`] with the caller's byte buffer for decompression and base64,
    /// so that threads reading ranges of one increment at the same time each reuse their own
    /// buffer (nothing allocated per call).
    pub fn read_tuples_using(
        &self,
        name: &str,
        location: Location,
        range: Range<usize>,
        out: &mut Vec<f64>,
        scratch: &mut Vec<u8>,
    ) -> Result<&'s FieldInfo> {
        self.read_tuples_with(name, location, range, out, Some(scratch))
    }

    fn read_tuples_with(
        &self,
        name: &str,
        location: Location,
        range: Range<usize>,
        out: &mut Vec<f64>,
        scratch: Option<&mut Vec<u8>>,
    ) -> Result<&'s FieldInfo> {
        let info = self.series.field(name, Some(location))?;
        let n = self.count(location);
        if range.start > range.end || range.end > n {
            return Err(Error::TupleRange {
                path: self.first_path(),
                name: name.to_string(),
                start: range.start,
                end: range.end,
                tuples: n,
            });
        }
        self.read_range(info, range, out, scratch)?;
        Ok(info)
    }

    /// True when [`Increment::read_tuples`] of array `name` costs only the requested tuples'
    /// bytes: every piece stores it as uncompressed binary (appended raw, appended or inline
    /// base64). False for compressed data (a range costs whole blocks), ascii text and legacy
    /// files (a range costs the whole array). A caller may then split one array's decoding
    /// into ranges, one per thread, each decoded where it is used.
    pub fn ranges_are_direct(&self, name: &str, location: Location) -> Result<bool> {
        let info = self.series.field(name, Some(location))?;
        Ok(self.loaded.pieces.iter().all(|&(f, p)| {
            let FileData::Xml(h) = &self.loaded.files[f].data else {
                return false;
            };
            let piece = &h.pieces[p];
            let list = match info.location {
                Location::Point => &piece.point_data,
                Location::Cell => &piece.cell_data,
            };
            h.layout.compressor == Compressor::None
                && list
                    .iter()
                    .find(|a| a.name == info.name)
                    .is_some_and(|a| !matches!(a.payload, Payload::Ascii(_)))
        }))
    }

    /// This increment's point coordinates (merged numbering).
    pub fn points(&self, out: &mut Vec<[f64; 3]>) -> Result<()> {
        out.clear();
        let mut scratch = self.scratch.lock().unwrap_or_else(|p| p.into_inner());
        for &(f, p) in &self.loaded.pieces {
            let file = &self.loaded.files[f];
            let bytes = file.bytes.get();
            match &file.data {
                FileData::Xml(h) => out.extend(piece_points(
                    &file.path,
                    bytes,
                    h.layout,
                    &h.pieces[p],
                    p,
                    &mut scratch,
                )?),
                FileData::Legacy(l) => {
                    out.extend(l.points(bytes).map_err(|source| Error::Legacy {
                        path: file.path.clone(),
                        source: Box::new(source),
                    })?)
                }
            }
        }
        Ok(())
    }

    fn first_path(&self) -> PathBuf {
        self.loaded
            .files
            .first()
            .map(|f| f.path.clone())
            .unwrap_or_default()
    }

    fn count(&self, location: Location) -> usize {
        match location {
            Location::Point => self.series.n_points(),
            Location::Cell => self.series.n_cells(),
        }
    }

    fn read_range(
        &self,
        info: &FieldInfo,
        range: Range<usize>,
        out: &mut Vec<f64>,
        caller_scratch: Option<&mut Vec<u8>>,
    ) -> Result<()> {
        out.clear();
        let c = info.components;
        // The caller's buffer, else the increment's; threads reading ranges of one increment
        // at the same time do not wait for each other (a second reader gets its own buffer).
        let mut local = Vec::new();
        let mut guard;
        let scratch: &mut Vec<u8> = match caller_scratch {
            Some(s) => s,
            None => {
                guard = self.scratch.try_lock().ok();
                match guard.as_deref_mut() {
                    Some(s) => s,
                    None => &mut local,
                }
            }
        };
        let mut base = 0usize;
        let mut tmp = Vec::new();
        for (k, &(f, p)) in self.loaded.pieces.iter().enumerate() {
            let file = &self.loaded.files[f];
            let bytes = file.bytes.get();
            let (np, nc) = self.series.pieces[k];
            let n = match info.location {
                Location::Point => np,
                Location::Cell => nc,
            };
            let lo = range.start.max(base);
            let hi = range.end.min(base + n);
            let piece_base = base;
            base += n;
            if lo >= hi {
                continue;
            }
            let (tlo, thi) = (lo - piece_base, hi - piece_base);
            match &file.data {
                FileData::Xml(h) => {
                    let piece = &h.pieces[p];
                    let list = match info.location {
                        Location::Point => &piece.point_data,
                        Location::Cell => &piece.cell_data,
                    };
                    let a = list.iter().find(|a| a.name == info.name).ok_or_else(|| {
                        Error::MissingArray {
                            path: file.path.clone(),
                            name: info.name.clone(),
                            location: format!("{} (piece {p})", info.location),
                            available: list
                                .iter()
                                .map(|a| a.name.as_str())
                                .collect::<Vec<_>>()
                                .join(", "),
                        }
                    })?;
                    let what = format!("{} array '{}' of piece {p}", info.location, info.name);
                    if a.components != c {
                        return Err(Error::SizeMismatch {
                            path: file.path.clone(),
                            what: format!("NumberOfComponents of {what}"),
                            expected: c as u64,
                            found: a.components as u64,
                        });
                    }
                    decode_f64(
                        &file.path,
                        bytes,
                        h.layout,
                        a,
                        n,
                        tlo * c..thi * c,
                        &what,
                        scratch,
                        out,
                    )?;
                }
                FileData::Legacy(l) => {
                    let want = match info.location {
                        Location::Point => LegacyLocation::Point,
                        Location::Cell => LegacyLocation::Cell,
                    };
                    let (idx, a) = l
                        .arrays()
                        .iter()
                        .enumerate()
                        .find(|(_, a)| a.name == info.name && a.location == want)
                        .ok_or_else(|| Error::MissingArray {
                            path: file.path.clone(),
                            name: info.name.clone(),
                            location: info.location.to_string(),
                            available: l
                                .arrays()
                                .iter()
                                .map(|a| a.name.as_str())
                                .collect::<Vec<_>>()
                                .join(", "),
                        })?;
                    if a.components != c || a.tuples != n {
                        return Err(Error::SizeMismatch {
                            path: file.path.clone(),
                            what: format!("values of {} array '{}'", info.location, info.name),
                            expected: (n * c) as u64,
                            found: (a.tuples * a.components) as u64,
                        });
                    }
                    l.read(bytes, idx, &mut tmp)
                        .map_err(|source| Error::Legacy {
                            path: file.path.clone(),
                            source: Box::new(source),
                        })?;
                    let s = tlo * c..thi * c;
                    let part = tmp.get(s).ok_or_else(|| Error::SizeMismatch {
                        path: file.path.clone(),
                        what: format!("values of {} array '{}'", info.location, info.name),
                        expected: (n * c) as u64,
                        found: tmp.len() as u64,
                    })?;
                    out.extend_from_slice(part);
                }
            }
        }
        let expected = range.len() * c;
        if out.len() != expected {
            return Err(Error::SizeMismatch {
                path: self.first_path(),
                what: format!("values of {} array '{}'", info.location, info.name),
                expected: expected as u64,
                found: out.len() as u64,
            });
        }
        Ok(())
    }
}

/// Fuzz entry: parse an XML file from bytes and decode everything in it.
pub(crate) fn fuzz_xml(bytes: &[u8]) -> Result<usize> {
    let path = Path::new("<fuzz>.vtu");
    let mut scratch = Vec::new();
    let mut n = 0;
    if let Header::Vtu(h) = xml::parse(bytes, path)? {
        let mut mesh = Mesh::default();
        for (i, piece) in h.pieces.iter().enumerate() {
            xml_piece_into_mesh(path, bytes, h.layout, piece, i, &mut scratch, &mut mesh)?;
            let mut out = Vec::new();
            for (list, count) in [
                (&piece.point_data, piece.n_points),
                (&piece.cell_data, piece.n_cells),
            ] {
                for a in list {
                    let total = checked_total(path, a, count, "array")?;
                    decode_f64(
                        path,
                        bytes,
                        h.layout,
                        a,
                        count,
                        0..total,
                        "array",
                        &mut scratch,
                        &mut out,
                    )?;
                    n += out.len();
                    out.clear();
                    // a sub-range too, exercising the partial paths
                    let half = total / 2;
                    decode_f64(
                        path,
                        bytes,
                        h.layout,
                        a,
                        count,
                        half..total,
                        "array",
                        &mut scratch,
                        &mut out,
                    )?;
                    out.clear();
                }
            }
        }
        n += mesh.n_points() + mesh.n_cells();
    }
    Ok(n)
}

/// Fuzz entry: scan a legacy file from bytes and decode its mesh and arrays.
pub(crate) fn fuzz_legacy(bytes: &[u8]) -> Result<usize> {
    let path = Path::new("<fuzz>.vtk");
    let wrap = |source: crate::legacy::LegacyError| Error::Legacy {
        path: path.to_path_buf(),
        source: Box::new(source),
    };
    let l = LegacyFile::scan(bytes).map_err(wrap)?;
    let pts = l.points(bytes).map_err(wrap)?;
    let c = l.cells(bytes).map_err(wrap)?;
    let mut mesh = Mesh::default();
    let offsets = if c.offsets.is_empty() {
        vec![0]
    } else {
        c.offsets
    };
    mesh.push_piece(path, 0, pts, c.connectivity, offsets, c.types)?;
    let mut out = Vec::new();
    let mut n = mesh.n_points();
    for i in 0..l.arrays().len() {
        l.read(bytes, i, &mut out).map_err(wrap)?;
        n += out.len();
    }
    Ok(n)
}
