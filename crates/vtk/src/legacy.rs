//! Legacy VTK (`.vtk`) files: `DATASET UNSTRUCTURED_GRID`, ASCII and BINARY (big-endian), file
//! versions 2.0 to 5.1.
//!
//! This module owns the legacy parser only. [`LegacyFile::scan`] walks the file's bytes once and builds a
//! catalogue: header (version, title, ASCII/BINARY), the POINTS, CELLS and CELL_TYPES sections and every
//! POINT_DATA / CELL_DATA array, each with the byte span of its data. Nothing is decoded during the scan;
//! [`LegacyFile::points`], [`LegacyFile::cells`] and [`LegacyFile::read`] decode one section on request from
//! the same bytes (typically a memory map). The public reader wraps [`LegacyError`] with the file path.
//!
//! Layout followed (VTK's "File Formats" document, Kitware, and VTK's own `vtkDataReader`/`vtkDataWriter`):
//! - line 1 `# vtk DataFile Version x.y`, line 2 a title, line 3 `ASCII` or `BINARY`, then `DATASET UNSTRUCTURED_GRID`;
//! - an optional dataset-level `FIELD FieldData n` block (e.g. `TimeValue`), see [`LegacyFile::time_value`];
//! - `POINTS n type`; classic `CELLS n size` (each cell prefixed by its point count) or, from version 5.0,
//!   `CELLS n_offsets n_connectivity` followed by `OFFSETS type` and `CONNECTIVITY type`; `CELL_TYPES n`;
//! - `POINT_DATA n` / `CELL_DATA n` sections with `SCALARS name type [ncomp]` (+ `LOOKUP_TABLE` line),
//!   `COLOR_SCALARS name n`, `VECTORS`, `NORMALS`, `TEXTURE_COORDINATES name dim type`, `TENSORS` (9 components,
//!   row-major), `TENSORS6` (6 components, XX YY ZZ XY YZ XZ) and `FIELD name n` arrays (`name ncomp ntuples type`);
//! - `METADATA` blocks up to the next blank line: `COMPONENT_NAMES` become the preceding array's
//!   [`LegacyArrayInfo::component_names`], `INFORMATION` entries are skipped; standalone `LOOKUP_TABLE name n`
//!   tables and `GLOBAL_IDS` / `PEDIGREE_IDS` sections are skipped.
//! - Cell lists: the 5.x layout is recognised by the `OFFSETS` keyword after `CELLS` (any version), the classic
//!   layout otherwise; offsets must start at 0, not decrease and end at the connectivity length; point ids must
//!   be below the number of points; `CELL_TYPES` must have one entry (0..=255) per cell. Unknown cell type ids
//!   are the caller's business.
//! - A `FIELD` array inside POINT_DATA / CELL_DATA must have that section's number of tuples.
//!
//! BINARY sections start after the newline that ends their keyword line and hold raw big-endian values; a
//! newline (or any whitespace) follows. ASCII sections are whitespace-separated tokens. Type names are matched
//! case-insensitively (as VTK does) and reported lower-case. `vtkidtype` is 4 bytes (VTK writes ids as `int`),
//! `long`/`unsigned_long` are 8 bytes (VTK's writers on LP64 systems). The title is decoded lossily (a title
//! in another encoding does not make the file unreadable); every other header line must be UTF-8.
//!
//! Safety: every declared count is checked against the bytes that remain before anything is allocated
//! (BINARY: exact byte length; ASCII: at least 2 bytes per value); the scan is linear in the file size; no input
//! panics (property tests below feed random bytes and truncated files).

use std::fmt;

/// Where an error was found: a line number (1-based) in ASCII files, a byte offset in BINARY files.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Position {
    /// 1-based line number (ASCII files and the first three header lines).
    Line(usize),
    /// 0-based byte offset from the start of the file (BINARY files).
    Byte(usize),
}

impl fmt::Display for Position {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Position::Line(n) => write!(f, "line {n}"),
            Position::Byte(n) => write!(f, "byte offset {n}"),
        }
    }
}

/// Errors of the legacy parser. Messages are one lower-case line naming the line number (ASCII) or byte
/// offset (BINARY); the caller adds the file path.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum LegacyError {
    /// The file has no bytes or only whitespace.
    #[error("empty file (no bytes or only whitespace)")]
    Empty,
    /// Line 1 is not a legacy VTK signature.
    #[error("line 1: not a legacy vtk file (expected '# vtk DataFile Version x.y')")]
    NotLegacy,
    /// The version on line 1 is outside 2.0 ..= 5.1 or unreadable.
    #[error("line 1: unsupported legacy file version '{0}' (versions 2.0 to 5.1 are supported)")]
    Version(String),
    /// A header or keyword line is not valid UTF-8.
    #[error("{at}: header line is not valid utf-8")]
    NotUtf8 {
        /// Where the line starts.
        at: Position,
    },
    /// Line 3 is neither `ASCII` nor `BINARY`.
    #[error("line 3: expected ASCII or BINARY, found '{found}'")]
    FileType {
        /// What line 3 holds (shortened).
        found: String,
    },
    /// A dataset type other than `UNSTRUCTURED_GRID`.
    #[error("{at}: only UNSTRUCTURED_GRID is supported, found DATASET {found}")]
    Dataset {
        /// Where the DATASET line is.
        at: Position,
        /// The dataset type found.
        found: String,
    },
    /// A keyword that does not belong where it was found.
    #[error("{at}: unexpected keyword '{found}' ({context})")]
    Keyword {
        /// Where the keyword is.
        at: Position,
        /// The keyword (shortened).
        found: String,
        /// What was expected there.
        context: String,
    },
    /// A keyword line lacks a required item or has an unreadable count.
    #[error("{at}: malformed {keyword} line: {detail}")]
    Malformed {
        /// Where the line is.
        at: Position,
        /// The section keyword.
        keyword: String,
        /// What is wrong.
        detail: String,
    },
    /// The file ends inside a section.
    #[error("{at}: unexpected end of file in {what}")]
    Truncated {
        /// Where the data of the section ended.
        at: Position,
        /// The section and how much of it was found.
        what: String,
    },
    /// A declared count needs more bytes than the file has left.
    #[error("{at}: {what} declares {count} values but only {available} bytes remain in the file")]
    TooLarge {
        /// Where the keyword line is.
        at: Position,
        /// The section.
        what: String,
        /// Declared number of values (tuples × components).
        count: u128,
        /// Bytes left after the keyword line.
        available: usize,
    },
    /// A data type name VTK does not define.
    #[error("{at}: unknown data type '{found}' in {what}")]
    UnknownType {
        /// Where the keyword line is.
        at: Position,
        /// The type name found.
        found: String,
        /// The section.
        what: String,
    },
    /// A VTK type this reader does not decode (strings, variants) or a non-integer type for cell lists.
    #[error("{at}: unsupported data type '{found}' in {what} ({detail})")]
    UnsupportedType {
        /// Where the keyword line is.
        at: Position,
        /// The type name found.
        found: String,
        /// The section.
        what: String,
        /// Why.
        detail: &'static str,
    },
    /// An ASCII token that is not a number of the expected kind.
    #[error("{at}: invalid {expected} '{token}' in {what}")]
    BadNumber {
        /// Where the token is.
        at: Position,
        /// The token (shortened).
        token: String,
        /// The section.
        what: String,
        /// "number" or "integer".
        expected: &'static str,
    },
    /// Declared and found counts disagree.
    #[error("{at}: count mismatch in {what}: {detail}")]
    CountMismatch {
        /// Where the inconsistency was detected.
        at: Position,
        /// The section.
        what: String,
        /// The two counts.
        detail: String,
    },
    /// A cell list refers to points or offsets that do not exist.
    #[error("{what}: {detail}")]
    OutOfRange {
        /// The section (e.g. "cell connectivity").
        what: &'static str,
        /// The offending cell and value.
        detail: String,
    },
    /// A required section is absent.
    #[error("missing {0} section")]
    Missing(&'static str),
    /// `read` was asked for an array index that does not exist.
    #[error("array index {index} out of range ({count} arrays)")]
    NoSuchArray {
        /// The index asked for.
        index: usize,
        /// Number of arrays in the catalogue.
        count: usize,
    },
    /// The bytes handed to a decode call are not the bytes that were scanned.
    #[error("byte buffer of {got} bytes does not match the scanned file of {expected} bytes")]
    WrongBuffer {
        /// Length of the buffer given.
        got: usize,
        /// Length of the scanned file.
        expected: usize,
    },
}

type Result<T> = std::result::Result<T, LegacyError>;

/// Where an array lives.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LegacyLocation {
    /// `POINT_DATA`: one tuple per point.
    Point,
    /// `CELL_DATA`: one tuple per cell.
    Cell,
}

/// The attribute keyword that introduced an array.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LegacyKind {
    /// `SCALARS name type [ncomp]`.
    Scalars,
    /// `COLOR_SCALARS name ncomp` (values in 0..1; BINARY bytes are divided by 255 on read).
    ColorScalars,
    /// `VECTORS name type` (3 components).
    Vectors,
    /// `NORMALS name type` (3 components).
    Normals,
    /// `TEXTURE_COORDINATES name dim type`.
    TextureCoordinates,
    /// `TENSORS name type` (9 components, row-major).
    Tensors,
    /// `TENSORS6 name type` (6 components: XX, YY, ZZ, XY, YZ, XZ).
    Tensors6,
    /// An array of a `FIELD` block (`name ncomp ntuples type`).
    Field,
}

/// Catalogue entry of one POINT_DATA / CELL_DATA array.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct LegacyArrayInfo {
    /// Array name (VTK's `%xx` escapes decoded).
    pub name: String,
    /// Point or cell data.
    pub location: LegacyLocation,
    /// Components per tuple.
    pub components: usize,
    /// The keyword that introduced the array.
    pub kind: LegacyKind,
    /// The type name as written, lower-cased: `float`, `double`, `int`, `unsigned_char`, `vtktypeint64`, ...
    /// (`COLOR_SCALARS`: `unsigned_char` in BINARY files, `float` in ASCII files).
    pub data_type: String,
    /// Number of tuples.
    pub tuples: usize,
    /// Component names from the array's `METADATA` / `COMPONENT_NAMES` block (VTK >= 8 writes them);
    /// empty when absent or when their number does not match `components`.
    pub component_names: Vec<String>,
}

/// Cells in VTK's offsets/connectivity form.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct LegacyCells {
    /// Point ids of all cells, cell after cell.
    pub connectivity: Vec<usize>,
    /// `n_cells + 1` offsets into `connectivity`, starting at 0.
    pub offsets: Vec<usize>,
    /// VTK cell type id per cell.
    pub types: Vec<u8>,
}

/// Numeric type of a data section.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum DType {
    Bit,
    I8,
    U8,
    I16,
    U16,
    I32,
    U32,
    I64,
    U64,
    F32,
    F64,
}

/// What a type name means: a decodable type, a known but unsupported one, or nothing known.
enum TypeName {
    Num(DType),
    Unsupported,
    Unknown,
}

impl DType {
    fn from_name(lower: &str) -> TypeName {
        let t = match lower {
            "bit" => DType::Bit,
            "char" | "signed_char" | "vtktypeint8" => DType::I8,
            "unsigned_char" | "vtktypeuint8" => DType::U8,
            "short" | "vtktypeint16" => DType::I16,
            "unsigned_short" | "vtktypeuint16" => DType::U16,
            "int" | "vtkidtype" | "vtktypeint32" => DType::I32,
            "unsigned_int" | "vtktypeuint32" => DType::U32,
            "long" | "vtktypeint64" => DType::I64,
            "unsigned_long" | "vtktypeuint64" => DType::U64,
            "float" | "vtktypefloat32" => DType::F32,
            "double" | "vtktypefloat64" => DType::F64,
            "string" | "utf8_string" | "variant" => return TypeName::Unsupported,
            _ => return TypeName::Unknown,
        };
        TypeName::Num(t)
    }

    fn is_integer(self) -> bool {
        !matches!(self, DType::F32 | DType::F64)
    }

    /// Bytes needed for `count` values in a BINARY file.
    fn binary_len(self, count: usize) -> Option<usize> {
        let size = match self {
            DType::Bit => return Some(count.div_ceil(8)),
            DType::I8 | DType::U8 => 1,
            DType::I16 | DType::U16 => 2,
            DType::I32 | DType::U32 | DType::F32 => 4,
            DType::I64 | DType::U64 | DType::F64 => 8,
        };
        count.checked_mul(size)
    }
}

/// Byte span of one data section and how to decode it.
#[derive(Debug, Clone)]
struct Section {
    start: usize,
    end: usize,
    count: usize,
    ty: DType,
    what: String,
}

#[derive(Debug, Clone)]
enum CellLayout {
    /// `CELLS n size`: counts-prefixed point lists.
    Classic(Section),
    /// `OFFSETS` + `CONNECTIVITY` (file version 5.x).
    Split {
        offsets: Section,
        connectivity: Section,
    },
}

/// Catalogue of one legacy file, built from one scan of its bytes; arrays are not decoded.
#[derive(Debug, Clone)]
pub struct LegacyFile {
    version: (u32, u32),
    binary: bool,
    title: String,
    len: usize,
    n_points: usize,
    points: Section,
    n_cells: usize,
    cells: Option<CellLayout>,
    cell_types: Option<Section>,
    arrays: Vec<LegacyArrayInfo>,
    sections: Vec<Section>,
    dataset_fields: Vec<(String, Section)>,
}

/// Position of byte `off` in the style of the file (line for ASCII, byte offset for BINARY).
fn position(bytes: &[u8], off: usize, binary: bool) -> Position {
    if binary {
        Position::Byte(off)
    } else {
        let end = off.min(bytes.len());
        Position::Line(1 + bytes[..end].iter().filter(|&&b| b == b'\n').count())
    }
}

/// At most 40 characters of `s`, for error messages.
fn short(s: &str) -> String {
    if s.chars().count() > 40 {
        let mut t: String = s.chars().take(40).collect();
        t.push_str("...");
        t
    } else {
        s.to_string()
    }
}

/// Decode VTK's `%xx` escapes in legacy array names.
fn decode_name(raw: &str) -> String {
    let b = raw.as_bytes();
    let mut out = Vec::with_capacity(b.len());
    let mut i = 0;
    while i < b.len() {
        if b[i] == b'%' && i + 2 < b.len() {
            let hex = |c: u8| (c as char).to_digit(16);
            if let (Some(h), Some(l)) = (hex(b[i + 1]), hex(b[i + 2])) {
                out.push((h * 16 + l) as u8);
                i += 3;
                continue;
            }
        }
        out.push(b[i]);
        i += 1;
    }
    String::from_utf8_lossy(&out).into_owned()
}

/// True for the ASCII spellings of NaN and infinity that `str::parse::<f64>` accepts.
fn is_nonfinite_word(tok: &[u8]) -> bool {
    let t = tok
        .strip_prefix(b"-")
        .or_else(|| tok.strip_prefix(b"+"))
        .unwrap_or(tok);
    t.eq_ignore_ascii_case(b"nan")
        || t.eq_ignore_ascii_case(b"inf")
        || t.eq_ignore_ascii_case(b"infinity")
}

/// Keyword lines have at most 5 tokens (`TEXTURE_COORDINATES name dim type`); more are ignored, so a garbage
/// "line" costs no allocation beyond this.
const MAX_LINE_TOKENS: usize = 8;

/// One keyword line, split into tokens (at most [`MAX_LINE_TOKENS`]).
struct Line<'a> {
    start: usize,
    toks: Vec<&'a str>,
}

impl Line<'_> {
    fn keyword(&self) -> String {
        self.toks
            .first()
            .map(|t| t.to_ascii_lowercase())
            .unwrap_or_default()
    }
}

/// Sequential reader over the file's bytes.
struct Scanner<'a> {
    b: &'a [u8],
    pos: usize,
    binary: bool,
}

impl<'a> Scanner<'a> {
    fn at(&self, off: usize) -> Position {
        position(self.b, off, self.binary)
    }

    fn remaining(&self) -> usize {
        self.b.len().saturating_sub(self.pos)
    }

    fn skip_ws(&mut self) {
        while self.pos < self.b.len() && self.b[self.pos].is_ascii_whitespace() {
            self.pos += 1;
        }
    }

    /// Bytes of the next raw line (without its newline and a trailing `\r`), advancing past the newline.
    fn raw_line(&mut self) -> (usize, &'a [u8]) {
        let start = self.pos.min(self.b.len());
        let rest = &self.b[start..];
        let (line, next) = match rest.iter().position(|&c| c == b'\n') {
            Some(nl) => (&rest[..nl], start + nl + 1),
            None => (rest, self.b.len()),
        };
        self.pos = next;
        (start, line.strip_suffix(b"\r").unwrap_or(line))
    }

    /// Next non-blank line as tokens; `None` at the end of the file.
    fn next_line(&mut self) -> Result<Option<Line<'a>>> {
        self.skip_ws();
        if self.pos >= self.b.len() {
            return Ok(None);
        }
        let (start, raw) = self.raw_line();
        let text =
            std::str::from_utf8(raw).map_err(|_| LegacyError::NotUtf8 { at: self.at(start) })?;
        Ok(Some(Line {
            start,
            toks: text
                .split_ascii_whitespace()
                .take(MAX_LINE_TOKENS)
                .collect(),
        }))
    }

    /// Whether the next non-blank bytes are `kw` (case-insensitive) followed by whitespace or the end.
    fn peek_keyword(&self, kw: &str) -> bool {
        let mut p = self.pos;
        while p < self.b.len() && self.b[p].is_ascii_whitespace() {
            p += 1;
        }
        let k = kw.as_bytes();
        let end = p + k.len();
        end <= self.b.len()
            && self.b[p..end].eq_ignore_ascii_case(k)
            && (end == self.b.len() || self.b[end].is_ascii_whitespace())
    }

    /// Skip a `METADATA` block (lines up to and including the next blank line), returning the names of
    /// its `COMPONENT_NAMES` section (empty if none). `INFORMATION` entries are skipped.
    fn skip_metadata(&mut self) -> Vec<String> {
        let mut names = Vec::new();
        let mut in_names = false;
        while self.pos < self.b.len() {
            let (_, line) = self.raw_line();
            let line = line.trim_ascii();
            if line.is_empty() {
                break;
            }
            if line.eq_ignore_ascii_case(b"COMPONENT_NAMES") {
                in_names = true;
            } else if line.len() >= 11 && line[..11].eq_ignore_ascii_case(b"INFORMATION") {
                in_names = false;
            } else if in_names {
                names.push(decode_name(&String::from_utf8_lossy(line)));
            }
        }
        names
    }

    /// Record the span of a data section of `count` values of type `ty` that starts here.
    fn data(&mut self, count: usize, ty: DType, what: String, header: usize) -> Result<Section> {
        let avail = self.remaining();
        if self.binary {
            let nbytes = match ty.binary_len(count) {
                Some(n) if n <= avail => n,
                _ => {
                    return Err(LegacyError::TooLarge {
                        at: self.at(header),
                        what,
                        count: count as u128,
                        available: avail,
                    });
                }
            };
            let start = self.pos;
            self.pos += nbytes;
            return Ok(Section {
                start,
                end: self.pos,
                count,
                ty,
                what,
            });
        }
        if count > 0 && (count as u128) * 2 > avail as u128 + 1 {
            return Err(LegacyError::TooLarge {
                at: self.at(header),
                what,
                count: count as u128,
                available: avail,
            });
        }
        let mut start = self.pos;
        for i in 0..count {
            self.skip_ws();
            if self.pos >= self.b.len() {
                return Err(LegacyError::Truncated {
                    at: self.at(self.pos),
                    what: format!("{what} ({count} values declared, {i} found)"),
                });
            }
            let tok_start = self.pos;
            if i == 0 {
                start = tok_start;
            }
            while self.pos < self.b.len() && !self.b[self.pos].is_ascii_whitespace() {
                self.pos += 1;
            }
            let tok = &self.b[tok_start..self.pos];
            if tok[0].is_ascii_alphabetic() && !is_nonfinite_word(tok) {
                return Err(LegacyError::CountMismatch {
                    at: self.at(tok_start),
                    what,
                    detail: format!(
                        "{count} values declared, but '{}' follows after {i} values",
                        short(&String::from_utf8_lossy(tok))
                    ),
                });
            }
        }
        Ok(Section {
            start,
            end: self.pos,
            count,
            ty,
            what,
        })
    }
}

/// Parse a count token of keyword line `line`.
fn count_tok(s: &mut Scanner<'_>, line: &Line<'_>, i: usize, item: &str) -> Result<usize> {
    let kw = line.toks.first().copied().unwrap_or_default().to_string();
    let tok = line.toks.get(i).ok_or_else(|| LegacyError::Malformed {
        at: s.at(line.start),
        keyword: kw.clone(),
        detail: format!("missing {item}"),
    })?;
    tok.parse::<usize>().map_err(|_| LegacyError::Malformed {
        at: s.at(line.start),
        keyword: kw,
        detail: format!("{item} '{}' is not a non-negative integer", short(tok)),
    })
}

/// Parse a type token of keyword line `line`; `integer` requires an integer type.
fn type_tok(
    s: &Scanner<'_>,
    line: &Line<'_>,
    i: usize,
    what: &str,
    integer: bool,
) -> Result<(DType, String)> {
    let kw = line.toks.first().copied().unwrap_or_default().to_string();
    let tok = line.toks.get(i).ok_or_else(|| LegacyError::Malformed {
        at: s.at(line.start),
        keyword: kw,
        detail: "missing data type".to_string(),
    })?;
    let lower = tok.to_ascii_lowercase();
    match DType::from_name(&lower) {
        TypeName::Num(t) if integer && !t.is_integer() => Err(LegacyError::UnsupportedType {
            at: s.at(line.start),
            found: short(&lower),
            what: what.to_string(),
            detail: "an integer type is required",
        }),
        TypeName::Num(t) => Ok((t, lower)),
        TypeName::Unsupported => Err(LegacyError::UnsupportedType {
            at: s.at(line.start),
            found: short(&lower),
            what: what.to_string(),
            detail: "only numeric arrays are read",
        }),
        TypeName::Unknown => Err(LegacyError::UnknownType {
            at: s.at(line.start),
            found: short(&lower),
            what: what.to_string(),
        }),
    }
}

/// The name token of an attribute line.
fn name_tok(s: &Scanner<'_>, line: &Line<'_>) -> Result<String> {
    line.toks
        .get(1)
        .map(|n| decode_name(n))
        .ok_or_else(|| LegacyError::Malformed {
            at: s.at(line.start),
            keyword: line.toks.first().copied().unwrap_or_default().to_string(),
            detail: "missing array name".to_string(),
        })
}

fn mul(a: usize, b: usize, s: &Scanner<'_>, line: &Line<'_>, what: &str) -> Result<usize> {
    a.checked_mul(b).ok_or_else(|| LegacyError::TooLarge {
        at: s.at(line.start),
        what: what.to_string(),
        count: a as u128 * b as u128,
        available: s.remaining(),
    })
}

impl LegacyFile {
    /// Scan the whole file once and build its catalogue. Data is located, not decoded (ASCII tokens are
    /// counted, not parsed).
    pub fn scan(bytes: &[u8]) -> Result<LegacyFile> {
        if bytes.iter().all(|b| b.is_ascii_whitespace()) {
            return Err(LegacyError::Empty);
        }
        let mut s = Scanner {
            b: bytes,
            pos: 0,
            binary: false,
        };

        // Line 1: signature and version.
        let (_, l1) = s.raw_line();
        const SIG: &[u8] = b"# vtk DataFile Version";
        let l1 = l1.trim_ascii_start();
        if l1.len() < SIG.len() || !l1[..SIG.len()].eq_ignore_ascii_case(SIG) {
            return Err(LegacyError::NotLegacy);
        }
        let vtext = std::str::from_utf8(&l1[SIG.len()..])
            .map_err(|_| LegacyError::NotUtf8 {
                at: Position::Line(1),
            })?
            .trim();
        let version = parse_version(vtext).ok_or_else(|| LegacyError::Version(short(vtext)))?;
        if !((2, 0)..=(5, 1)).contains(&version) {
            return Err(LegacyError::Version(short(vtext)));
        }

        // Line 2: title (any bytes, decoded lossily).
        let (_, l2) = s.raw_line();
        let title = String::from_utf8_lossy(l2).trim().to_string();

        // Line 3: ASCII | BINARY.
        let (l3_start, l3) = s.raw_line();
        let l3 = std::str::from_utf8(l3).map_err(|_| LegacyError::NotUtf8 {
            at: position(bytes, l3_start, false),
        })?;
        let binary = match l3.trim().to_ascii_uppercase().as_str() {
            "ASCII" => false,
            "BINARY" => true,
            other => {
                return Err(LegacyError::FileType {
                    found: short(other),
                });
            }
        };
        s.binary = binary;

        // DATASET line.
        let line = s.next_line()?.ok_or(LegacyError::Missing("DATASET"))?;
        if line.keyword() != "dataset" {
            return Err(LegacyError::Keyword {
                at: s.at(line.start),
                found: short(line.toks.first().copied().unwrap_or_default()),
                context: "expected DATASET UNSTRUCTURED_GRID".to_string(),
            });
        }
        let dtype = line.toks.get(1).copied().unwrap_or_default();
        if !dtype.eq_ignore_ascii_case("unstructured_grid") {
            return Err(LegacyError::Dataset {
                at: s.at(line.start),
                found: short(dtype),
            });
        }

        let mut points: Option<(usize, Section)> = None;
        let mut cells: Option<(usize, CellLayout)> = None;
        let mut cell_types: Option<(usize, Section, usize)> = None;
        let mut arrays = Vec::new();
        let mut sections = Vec::new();
        let mut dataset_fields = Vec::new();
        // Current attribute section: location and its tuple count.
        let mut current: Option<(LegacyLocation, usize)> = None;

        // Whether the previous section was an array (a METADATA block then belongs to it).
        let mut after_array = false;
        while let Some(line) = s.next_line()? {
            let kw = line.keyword();
            let was_after_array = std::mem::replace(&mut after_array, false);
            match kw.as_str() {
                "metadata" => {
                    let names = s.skip_metadata();
                    if was_after_array {
                        attach_names(arrays.last_mut(), names);
                    }
                }
                "field" if current.is_none() => {
                    let n = count_tok(&mut s, &line, 2, "number of arrays")?;
                    for f in field_block(&mut s, n, None)? {
                        dataset_fields.push((f.name, f.section));
                    }
                }
                "points" => {
                    if points.is_some() {
                        return Err(dup(&s, &line));
                    }
                    let n = count_tok(&mut s, &line, 1, "number of points")?;
                    let (ty, _) = type_tok(&s, &line, 2, "points", false)?;
                    let count = mul(n, 3, &s, &line, "points")?;
                    let sec = s.data(count, ty, "points".to_string(), line.start)?;
                    points = Some((n, sec));
                }
                "cells" => {
                    if cells.is_some() {
                        return Err(dup(&s, &line));
                    }
                    let a = count_tok(&mut s, &line, 1, "number of cells")?;
                    let b = count_tok(&mut s, &line, 2, "size")?;
                    if s.peek_keyword("offsets") {
                        let ol = s.next_line()?.ok_or(LegacyError::Missing("OFFSETS"))?;
                        let (oty, _) = type_tok(&s, &ol, 1, "cell offsets", true)?;
                        let offsets = s.data(a, oty, "cell offsets".to_string(), ol.start)?;
                        let cl = s.next_line()?.ok_or(LegacyError::Missing("CONNECTIVITY"))?;
                        if cl.keyword() != "connectivity" {
                            return Err(LegacyError::Keyword {
                                at: s.at(cl.start),
                                found: short(cl.toks.first().copied().unwrap_or_default()),
                                context: "expected CONNECTIVITY after OFFSETS".to_string(),
                            });
                        }
                        let (cty, _) = type_tok(&s, &cl, 1, "cell connectivity", true)?;
                        let connectivity =
                            s.data(b, cty, "cell connectivity".to_string(), cl.start)?;
                        cells = Some((
                            a.saturating_sub(1),
                            CellLayout::Split {
                                offsets,
                                connectivity,
                            },
                        ));
                    } else {
                        let sec = s.data(b, DType::I32, "cells".to_string(), line.start)?;
                        cells = Some((a, CellLayout::Classic(sec)));
                    }
                }
                "cell_types" => {
                    if cell_types.is_some() {
                        return Err(dup(&s, &line));
                    }
                    let n = count_tok(&mut s, &line, 1, "number of cell types")?;
                    let sec = s.data(n, DType::I32, "cell types".to_string(), line.start)?;
                    cell_types = Some((n, sec, line.start));
                }
                "point_data" | "cell_data" => {
                    let n = count_tok(&mut s, &line, 1, "number of tuples")?;
                    let (loc, expected, what) = if kw == "point_data" {
                        (
                            LegacyLocation::Point,
                            points.as_ref().map(|p| p.0),
                            "POINTS",
                        )
                    } else {
                        (LegacyLocation::Cell, cells.as_ref().map(|c| c.0), "CELLS")
                    };
                    match expected {
                        Some(e) if e != n => {
                            return Err(LegacyError::CountMismatch {
                                at: s.at(line.start),
                                what: kw.to_ascii_uppercase(),
                                detail: format!("{n} tuples declared, but {what} declares {e}"),
                            });
                        }
                        None => {
                            return Err(LegacyError::Keyword {
                                at: s.at(line.start),
                                found: kw.to_ascii_uppercase(),
                                context: format!("found before the {what} section"),
                            });
                        }
                        _ => {}
                    }
                    current = Some((loc, n));
                }
                "scalars"
                | "color_scalars"
                | "vectors"
                | "normals"
                | "texture_coordinates"
                | "tensors"
                | "tensors6"
                | "field"
                | "lookup_table"
                | "global_ids"
                | "pedigree_ids" => {
                    let Some((loc, n)) = current else {
                        return Err(LegacyError::Keyword {
                            at: s.at(line.start),
                            found: kw.to_ascii_uppercase(),
                            context: "found outside POINT_DATA / CELL_DATA".to_string(),
                        });
                    };
                    let before = arrays.len();
                    attribute(&mut s, &line, &kw, loc, n, &mut arrays, &mut sections)?;
                    after_array = arrays.len() > before;
                }
                _ => {
                    let found = line.toks.first().copied().unwrap_or_default();
                    let context = if found.parse::<f64>().is_ok() {
                        "a number where a keyword was expected: does the count on a previous section line match its data?"
                    } else {
                        "not a legacy UNSTRUCTURED_GRID keyword"
                    };
                    return Err(LegacyError::Keyword {
                        at: s.at(line.start),
                        found: short(found),
                        context: context.to_string(),
                    });
                }
            }
        }

        let (n_points, points) = points.ok_or(LegacyError::Missing("POINTS"))?;
        let (n_cells, cells) = match cells {
            Some((n, c)) => (n, Some(c)),
            None => (0, None),
        };
        let cell_types = match (cell_types, cells.is_some()) {
            (Some((n, sec, at)), _) => {
                if n != n_cells {
                    return Err(LegacyError::CountMismatch {
                        at: s.at(at),
                        what: "CELL_TYPES".to_string(),
                        detail: format!("{n} types declared, but CELLS declares {n_cells} cells"),
                    });
                }
                Some(sec)
            }
            (None, true) if n_cells > 0 => return Err(LegacyError::Missing("CELL_TYPES")),
            (None, _) => None,
        };

        Ok(LegacyFile {
            version,
            binary,
            title,
            len: bytes.len(),
            n_points,
            points,
            n_cells,
            cells,
            cell_types,
            arrays,
            sections,
            dataset_fields,
        })
    }

    /// File version from line 1, e.g. `(5, 1)`.
    pub fn version(&self) -> (u32, u32) {
        self.version
    }

    /// True for BINARY files, false for ASCII.
    pub fn is_binary(&self) -> bool {
        self.binary
    }

    /// Title (line 2), trimmed; non-UTF-8 bytes replaced.
    pub fn title(&self) -> &str {
        &self.title
    }

    /// Number of points declared by `POINTS`.
    pub fn n_points(&self) -> usize {
        self.n_points
    }

    /// Number of cells declared by `CELLS` (0 when the file has no cells).
    pub fn n_cells(&self) -> usize {
        self.n_cells
    }

    /// Catalogue of POINT_DATA and CELL_DATA arrays in file order (dataset-level FIELD arrays excluded).
    pub fn arrays(&self) -> &[LegacyArrayInfo] {
        &self.arrays
    }

    fn check_buffer(&self, bytes: &[u8]) -> Result<()> {
        if bytes.len() != self.len {
            return Err(LegacyError::WrongBuffer {
                got: bytes.len(),
                expected: self.len,
            });
        }
        Ok(())
    }

    /// Decode the point coordinates.
    pub fn points(&self, bytes: &[u8]) -> Result<Vec<[f64; 3]>> {
        self.check_buffer(bytes)?;
        let mut flat = Vec::new();
        decode_f64(bytes, &self.points, self.binary, &mut flat)?;
        Ok(flat.chunks_exact(3).map(|c| [c[0], c[1], c[2]]).collect())
    }

    /// Decode the cells into offsets/connectivity form, checking point ids against `n_points`, offsets
    /// (start at 0, non-decreasing, end at the connectivity length) and type ids (0..=255).
    pub fn cells(&self, bytes: &[u8]) -> Result<LegacyCells> {
        self.check_buffer(bytes)?;
        let mut out = LegacyCells {
            connectivity: Vec::new(),
            offsets: vec![0],
            types: Vec::new(),
        };
        let Some(layout) = &self.cells else {
            return Ok(out);
        };
        let np = self.n_points;
        let id = |cell: usize, v: i64| -> Result<usize> {
            match usize::try_from(v) {
                Ok(u) if u < np => Ok(u),
                _ => Err(LegacyError::OutOfRange {
                    what: "cell connectivity",
                    detail: format!(
                        "cell {cell} refers to point {v}, but the file has {np} points"
                    ),
                }),
            }
        };
        let mut ints = Vec::new();
        match layout {
            CellLayout::Classic(sec) => {
                decode_i64(bytes, sec, self.binary, &mut ints)?;
                out.connectivity
                    .reserve(ints.len().saturating_sub(self.n_cells));
                out.offsets.reserve(self.n_cells);
                let mut i = 0usize;
                for cell in 0..self.n_cells {
                    let Some(&k) = ints.get(i) else {
                        return Err(LegacyError::CountMismatch {
                            at: position(bytes, sec.end, self.binary),
                            what: "CELLS".to_string(),
                            detail: format!(
                                "{} cells declared, but the {} values end after {cell} cells",
                                self.n_cells, sec.count
                            ),
                        });
                    };
                    let k = usize::try_from(k).ok().filter(|&k| k < ints.len() - i).ok_or_else(|| {
                        LegacyError::OutOfRange {
                            what: "cells",
                            detail: format!(
                                "cell {cell} declares {k} points, more than the {} values left in the CELLS list",
                                ints.len() - i - 1
                            ),
                        }
                    })?;
                    for &v in &ints[i + 1..i + 1 + k] {
                        out.connectivity.push(id(cell, v)?);
                    }
                    out.offsets.push(out.connectivity.len());
                    i += 1 + k;
                }
                if i != ints.len() {
                    return Err(LegacyError::CountMismatch {
                        at: position(bytes, sec.start, self.binary),
                        what: "CELLS".to_string(),
                        detail: format!(
                            "size {} declared, but the {} cells use {i} values",
                            ints.len(),
                            self.n_cells
                        ),
                    });
                }
            }
            CellLayout::Split {
                offsets,
                connectivity,
            } => {
                decode_i64(bytes, offsets, self.binary, &mut ints)?;
                let mut conn = Vec::new();
                decode_i64(bytes, connectivity, self.binary, &mut conn)?;
                if !ints.is_empty() {
                    if ints[0] != 0 {
                        return Err(LegacyError::OutOfRange {
                            what: "cell offsets",
                            detail: format!("the first offset is {}, not 0", ints[0]),
                        });
                    }
                    out.offsets.clear();
                    out.offsets.reserve(ints.len());
                    let mut prev = 0usize;
                    for (cell, &o) in ints.iter().enumerate() {
                        match usize::try_from(o) {
                            Ok(u) if u >= prev && u <= conn.len() => {
                                out.offsets.push(u);
                                prev = u;
                            }
                            _ => {
                                return Err(LegacyError::OutOfRange {
                                    what: "cell offsets",
                                    detail: format!(
                                        "offset {cell} is {o}: offsets must not decrease and must stay within the {} connectivity entries",
                                        conn.len()
                                    ),
                                });
                            }
                        }
                    }
                    if prev != conn.len() {
                        return Err(LegacyError::OutOfRange {
                            what: "cell offsets",
                            detail: format!(
                                "the last offset is {prev}, but there are {} connectivity entries",
                                conn.len()
                            ),
                        });
                    }
                }
                out.connectivity.reserve(conn.len());
                let mut cell = 0usize;
                for (j, &v) in conn.iter().enumerate() {
                    while cell + 1 < out.offsets.len() && out.offsets[cell + 1] <= j {
                        cell += 1;
                    }
                    out.connectivity.push(id(cell, v)?);
                }
            }
        }
        if let Some(sec) = &self.cell_types {
            decode_i64(bytes, sec, self.binary, &mut ints)?;
            out.types.reserve(ints.len());
            for (cell, &t) in ints.iter().enumerate() {
                let t = u8::try_from(t).map_err(|_| LegacyError::OutOfRange {
                    what: "cell types",
                    detail: format!("cell {cell} has type id {t}, outside 0..=255"),
                })?;
                out.types.push(t);
            }
        }
        Ok(out)
    }

    /// Decode array `index` of [`arrays`](Self::arrays) as f64, interleaved components, into `out`
    /// (cleared, reused). BINARY `COLOR_SCALARS` bytes are divided by 255 (VTK's 0..1 convention).
    pub fn read(&self, bytes: &[u8], index: usize, out: &mut Vec<f64>) -> Result<()> {
        self.check_buffer(bytes)?;
        let (info, sec) = self.arrays.get(index).zip(self.sections.get(index)).ok_or(
            LegacyError::NoSuchArray {
                index,
                count: self.arrays.len(),
            },
        )?;
        decode_f64(bytes, sec, self.binary, out)?;
        if self.binary && info.kind == LegacyKind::ColorScalars {
            out.iter_mut().for_each(|v| *v /= 255.0);
        }
        Ok(())
    }

    /// First value of the dataset-level FIELD array named `TimeValue`, if present and readable.
    pub fn time_value(&self, bytes: &[u8]) -> Option<f64> {
        self.check_buffer(bytes).ok()?;
        let (_, sec) = self.dataset_fields.iter().find(|(n, _)| n == "TimeValue")?;
        let first = Section {
            end: sec.end,
            count: sec.count.min(1),
            ..sec.clone()
        };
        let mut v = Vec::new();
        if self.binary {
            let width = first.ty.binary_len(first.count)?;
            let first = Section {
                end: first.start + width,
                ..first
            };
            decode_f64(bytes, &first, true, &mut v).ok()?;
        } else {
            let mut one = first;
            // Shorten the span to its first token.
            let tail = bytes.get(one.start..one.end)?;
            let n = tail
                .iter()
                .position(|c| c.is_ascii_whitespace())
                .unwrap_or(tail.len());
            one.end = one.start + n;
            decode_f64(bytes, &one, false, &mut v).ok()?;
        }
        v.first().copied()
    }
}

fn dup(s: &Scanner<'_>, line: &Line<'_>) -> LegacyError {
    LegacyError::Keyword {
        at: s.at(line.start),
        found: line.keyword().to_ascii_uppercase(),
        context: "the section appears twice".to_string(),
    }
}

fn parse_version(v: &str) -> Option<(u32, u32)> {
    let (a, b) = v.split_once('.')?;
    Some((a.trim().parse().ok()?, b.trim().parse().ok()?))
}

/// Set an array's component names from a METADATA block when their number matches its components.
fn attach_names(array: Option<&mut LegacyArrayInfo>, names: Vec<String>) {
    if let Some(a) = array
        && !names.is_empty()
        && names.len() == a.components
    {
        a.component_names = names;
    }
}

/// One array of a FIELD block.
struct FieldArray {
    name: String,
    components: usize,
    type_name: String,
    component_names: Vec<String>,
    section: Section,
}

/// A `FIELD` block of `n` arrays. Arrays of `expected_tuples` (if any) must have that many tuples.
/// `NULL_ARRAY` entries are skipped; METADATA blocks give the preceding array its component names.
fn field_block(
    s: &mut Scanner<'_>,
    n: usize,
    expected_tuples: Option<usize>,
) -> Result<Vec<FieldArray>> {
    let mut out: Vec<FieldArray> = Vec::new();
    let mut found = 0usize;
    let mut after_array = false;
    while found < n {
        let line = s.next_line()?.ok_or_else(|| LegacyError::Truncated {
            at: s.at(s.pos),
            what: format!("FIELD block ({n} arrays declared, {found} found)"),
        })?;
        let first = line.toks.first().copied().unwrap_or_default();
        if first.eq_ignore_ascii_case("metadata") {
            let names = s.skip_metadata();
            if after_array
                && let Some(last) = out.last_mut()
                && !names.is_empty()
                && names.len() == last.components
            {
                last.component_names = names;
            }
            after_array = false;
            continue;
        }
        found += 1;
        after_array = false;
        if first == "NULL_ARRAY" {
            continue;
        }
        let name = decode_name(first);
        let what = format!("field array '{}'", short(&name));
        let ncomp = count_tok(s, &line, 1, "number of components")?;
        let ntup = count_tok(s, &line, 2, "number of tuples")?;
        let (ty, ty_name) = type_tok(s, &line, 3, &what, false)?;
        if let Some(e) = expected_tuples
            && e != ntup
        {
            return Err(LegacyError::CountMismatch {
                at: s.at(line.start),
                what,
                detail: format!("{ntup} tuples declared, but the data section has {e}"),
            });
        }
        let count = mul(ncomp, ntup, s, &line, &what)?;
        let section = s.data(count, ty, what, line.start)?;
        out.push(FieldArray {
            name,
            components: ncomp,
            type_name: ty_name,
            component_names: Vec::new(),
            section,
        });
        after_array = true;
    }
    Ok(out)
}

/// Parse one attribute keyword line (and its data) inside POINT_DATA / CELL_DATA.
fn attribute(
    s: &mut Scanner<'_>,
    line: &Line<'_>,
    kw: &str,
    location: LegacyLocation,
    n: usize,
    arrays: &mut Vec<LegacyArrayInfo>,
    sections: &mut Vec<Section>,
) -> Result<()> {
    let mut push =
        |name: String, kind: LegacyKind, components: usize, data_type: String, sec: Section| {
            arrays.push(LegacyArrayInfo {
                name,
                location,
                components,
                kind,
                data_type,
                tuples: n,
                component_names: Vec::new(),
            });
            sections.push(sec);
        };
    match kw {
        "scalars" => {
            let name = name_tok(s, line)?;
            let what = format!("scalars '{}'", short(&name));
            let (ty, ty_name) = type_tok(s, line, 2, &what, false)?;
            let ncomp = match line.toks.get(3) {
                Some(_) => count_tok(s, line, 3, "number of components")?,
                None => 1,
            };
            if ncomp == 0 {
                return Err(LegacyError::Malformed {
                    at: s.at(line.start),
                    keyword: "SCALARS".to_string(),
                    detail: "number of components is 0".to_string(),
                });
            }
            if s.peek_keyword("lookup_table") {
                s.next_line()?;
            }
            let count = mul(n, ncomp, s, line, &what)?;
            let sec = s.data(count, ty, what, line.start)?;
            push(name, LegacyKind::Scalars, ncomp, ty_name, sec);
        }
        "color_scalars" => {
            let name = name_tok(s, line)?;
            let what = format!("color scalars '{}'", short(&name));
            let ncomp = count_tok(s, line, 2, "number of values")?;
            let (ty, ty_name) = if s.binary {
                (DType::U8, "unsigned_char")
            } else {
                (DType::F32, "float")
            };
            let count = mul(n, ncomp, s, line, &what)?;
            let sec = s.data(count, ty, what, line.start)?;
            push(
                name,
                LegacyKind::ColorScalars,
                ncomp,
                ty_name.to_string(),
                sec,
            );
        }
        "vectors" | "normals" | "tensors" | "tensors6" => {
            let (kind, ncomp, label) = match kw {
                "vectors" => (LegacyKind::Vectors, 3, "vectors"),
                "normals" => (LegacyKind::Normals, 3, "normals"),
                "tensors" => (LegacyKind::Tensors, 9, "tensors"),
                _ => (LegacyKind::Tensors6, 6, "tensors6"),
            };
            let name = name_tok(s, line)?;
            let what = format!("{label} '{}'", short(&name));
            let (ty, ty_name) = type_tok(s, line, 2, &what, false)?;
            let count = mul(n, ncomp, s, line, &what)?;
            let sec = s.data(count, ty, what, line.start)?;
            push(name, kind, ncomp, ty_name, sec);
        }
        "texture_coordinates" => {
            let name = name_tok(s, line)?;
            let what = format!("texture coordinates '{}'", short(&name));
            let ncomp = count_tok(s, line, 2, "dimension")?;
            let (ty, ty_name) = type_tok(s, line, 3, &what, false)?;
            let count = mul(n, ncomp, s, line, &what)?;
            let sec = s.data(count, ty, what, line.start)?;
            push(name, LegacyKind::TextureCoordinates, ncomp, ty_name, sec);
        }
        "field" => {
            let nf = count_tok(s, line, 2, "number of arrays")?;
            for f in field_block(s, nf, Some(n))? {
                arrays.push(LegacyArrayInfo {
                    name: f.name,
                    location,
                    components: f.components,
                    kind: LegacyKind::Field,
                    data_type: f.type_name,
                    tuples: n,
                    component_names: Vec::new(),
                });
                sections.push(f.section);
                attach_names(arrays.last_mut(), f.component_names);
            }
        }
        "lookup_table" => {
            // A colour table: n RGBA entries, floats (ASCII) or bytes (BINARY). Skipped.
            let size = count_tok(s, line, 2, "size")?;
            let count = mul(size, 4, s, line, "lookup table")?;
            let ty = if s.binary { DType::U8 } else { DType::F32 };
            s.data(count, ty, "lookup table".to_string(), line.start)?;
        }
        _ => {
            // GLOBAL_IDS / PEDIGREE_IDS name type: one value per tuple. Skipped.
            let name = name_tok(s, line)?;
            let what = format!("{} '{}'", kw, short(&name));
            let (ty, _) = type_tok(s, line, 2, &what, false)?;
            s.data(n, ty, what, line.start)?;
        }
    }
    Ok(())
}

/// Canonical lower-case legacy name of a type.
fn canonical_name(ty: DType) -> &'static str {
    match ty {
        DType::Bit => "bit",
        DType::I8 => "char",
        DType::U8 => "unsigned_char",
        DType::I16 => "short",
        DType::U16 => "unsigned_short",
        DType::I32 => "int",
        DType::U32 => "unsigned_int",
        DType::I64 => "vtktypeint64",
        DType::U64 => "vtktypeuint64",
        DType::F32 => "float",
        DType::F64 => "double",
    }
}

/// The bytes of a section, or an error if the buffer is shorter.
fn section_bytes<'a>(bytes: &'a [u8], sec: &Section) -> Result<&'a [u8]> {
    bytes
        .get(sec.start..sec.end)
        .ok_or(LegacyError::WrongBuffer {
            got: bytes.len(),
            expected: sec.end,
        })
}

macro_rules! be {
    ($data:expr, $n:literal, $t:ty, $out:expr, $conv:expr) => {
        $out.extend($data.chunks_exact($n).map(|c| {
            let mut a = [0u8; $n];
            a.copy_from_slice(c);
            $conv(<$t>::from_be_bytes(a))
        }))
    };
}

/// Decode a section as f64 into `out` (cleared).
fn decode_f64(bytes: &[u8], sec: &Section, binary: bool, out: &mut Vec<f64>) -> Result<()> {
    out.clear();
    let data = section_bytes(bytes, sec)?;
    out.reserve(sec.count);
    if binary {
        match sec.ty {
            DType::Bit => {
                out.extend((0..sec.count).map(|i| f64::from((data[i / 8] >> (7 - i % 8)) & 1)))
            }
            DType::I8 => out.extend(data.iter().map(|&b| f64::from(b as i8))),
            DType::U8 => out.extend(data.iter().map(|&b| f64::from(b))),
            DType::I16 => be!(data, 2, i16, out, f64::from),
            DType::U16 => be!(data, 2, u16, out, f64::from),
            DType::I32 => be!(data, 4, i32, out, f64::from),
            DType::U32 => be!(data, 4, u32, out, f64::from),
            DType::I64 => be!(data, 8, i64, out, |v: i64| v as f64),
            DType::U64 => be!(data, 8, u64, out, |v: u64| v as f64),
            DType::F32 => be!(data, 4, f32, out, f64::from),
            DType::F64 => be!(data, 8, f64, out, |v: f64| v),
        }
        return Ok(());
    }
    for tok in tokens(data) {
        let v = std::str::from_utf8(tok)
            .ok()
            .and_then(|t| t.parse::<f64>().ok());
        match v {
            Some(v) => out.push(v),
            None => return Err(bad_token(bytes, tok, sec, "number")),
        }
    }
    check_count(bytes, sec, out.len())
}

/// Decode an integer section as i64 into `out` (cleared).
fn decode_i64(bytes: &[u8], sec: &Section, binary: bool, out: &mut Vec<i64>) -> Result<()> {
    out.clear();
    let data = section_bytes(bytes, sec)?;
    out.reserve(sec.count);
    if binary {
        match sec.ty {
            DType::Bit => {
                out.extend((0..sec.count).map(|i| i64::from((data[i / 8] >> (7 - i % 8)) & 1)))
            }
            DType::I8 => out.extend(data.iter().map(|&b| i64::from(b as i8))),
            DType::U8 => out.extend(data.iter().map(|&b| i64::from(b))),
            DType::I16 => be!(data, 2, i16, out, i64::from),
            DType::U16 => be!(data, 2, u16, out, i64::from),
            DType::I32 => be!(data, 4, i32, out, i64::from),
            DType::U32 => be!(data, 4, u32, out, i64::from),
            DType::I64 => be!(data, 8, i64, out, |v: i64| v),
            // Values above i64::MAX become negative and are then rejected as ids/offsets.
            DType::U64 => be!(data, 8, u64, out, |v: u64| i64::try_from(v).unwrap_or(-1)),
            DType::F32 | DType::F64 => {
                return Err(LegacyError::UnsupportedType {
                    at: position(bytes, sec.start, binary),
                    found: canonical_name(sec.ty).to_string(),
                    what: sec.what.clone(),
                    detail: "an integer type is required",
                });
            }
        }
        return Ok(());
    }
    for tok in tokens(data) {
        let v = std::str::from_utf8(tok)
            .ok()
            .and_then(|t| t.parse::<i64>().ok());
        match v {
            Some(v) => out.push(v),
            None => return Err(bad_token(bytes, tok, sec, "integer")),
        }
    }
    check_count(bytes, sec, out.len())
}

fn tokens(data: &[u8]) -> impl Iterator<Item = &[u8]> {
    data.split(|c| c.is_ascii_whitespace())
        .filter(|t| !t.is_empty())
}

fn bad_token(bytes: &[u8], tok: &[u8], sec: &Section, expected: &'static str) -> LegacyError {
    let off = (tok.as_ptr() as usize).saturating_sub(bytes.as_ptr() as usize);
    LegacyError::BadNumber {
        at: position(bytes, off, false),
        token: short(&String::from_utf8_lossy(tok)),
        what: sec.what.clone(),
        expected,
    }
}

fn check_count(bytes: &[u8], sec: &Section, found: usize) -> Result<()> {
    if found != sec.count {
        return Err(LegacyError::CountMismatch {
            at: position(bytes, sec.start, false),
            what: sec.what.clone(),
            detail: format!("{} values declared, {found} found", sec.count),
        });
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    /// Hand-written ASCII file, version 4.2 (classic CELLS): two cells (a hexahedron, VTK type 12, and a
    /// tetrahedron, type 10) on 9 points, with SCALARS, VECTORS, TENSORS, TENSORS6 and FIELD arrays.
    /// Layout per VTK's "File Formats" document (Kitware).
    const ASCII42: &str = "# vtk DataFile Version 4.2
hand-written test grid
ASCII
DATASET UNSTRUCTURED_GRID
FIELD FieldData 2
TimeValue 1 1 double
0.25
cycle 1 1 int
7
POINTS 9 float
0 0 0 1 0 0 1 1 0 0 1 0
0 0 1 1 0 1 1 1 1 0 1 1
2 0 0
CELLS 2 14
8 0 1 2 3 4 5 6 7
4 1 8 2 5
CELL_TYPES 2
12
10
CELL_DATA 2
SCALARS eqps double
LOOKUP_TABLE default
0.5 1.5e-1
TENSORS6 stress double
1 2 3 4 5 6
-1 -2 -3 -4 -5 -6
FIELD FieldData 1
material%20id 1 2 int
3 4
POINT_DATA 9
VECTORS displacement float
0 0 0 1 0 0 1 1 0 0 1 0 0 0 1 1 0 1 1 1 1 0 1 1 2 0 0
SCALARS two double 2
LOOKUP_TABLE default
1 2 3 4 5 6 7 8 9 10 11 12 13 14 15 16 17 18
TENSORS t9 double
1 2 3 4 5 6 7 8 9 1 2 3 4 5 6 7 8 9 1 2 3 4 5 6 7 8 9
1 2 3 4 5 6 7 8 9 1 2 3 4 5 6 7 8 9 1 2 3 4 5 6 7 8 9
1 2 3 4 5 6 7 8 9 1 2 3 4 5 6 7 8 9 1 2 3 4 5 6 7 8 9
";

    /// The same grid in the 5.1 layout (OFFSETS / CONNECTIVITY) with METADATA blocks, as VTK 9 writes them.
    const ASCII51: &str = "# vtk DataFile Version 5.1
vtk output
ASCII
DATASET UNSTRUCTURED_GRID
POINTS 9 double
0 0 0 1 0 0 1 1 0 0 1 0
0 0 1 1 0 1 1 1 1 0 1 1
2 0 0
METADATA
INFORMATION 2
NAME L2_NORM_RANGE LOCATION vtkDataArray
DATA 2 0 2
NAME L2_NORM_FINITE_RANGE LOCATION vtkDataArray
DATA 2 0 2

CELLS 3 12
OFFSETS vtktypeint64
0 8 12
CONNECTIVITY vtktypeint64
0 1 2 3 4 5 6 7
1 8 2 5
CELL_TYPES 2
12
10

CELL_DATA 2
FIELD FieldData 2
stress 6 2 double
1 2 3 4 5 6
-1 -2 -3 -4 -5 -6
METADATA
COMPONENT_NAMES
XX
YY
ZZ
XY
YZ
XZ

eqps 1 2 float
nan inf
";

    fn expect_grid(f: &LegacyFile, bytes: &[u8]) {
        assert_eq!(f.n_points(), 9);
        assert_eq!(f.n_cells(), 2);
        let p = f.points(bytes).unwrap();
        assert_eq!(p.len(), 9);
        assert_eq!(p[6], [1.0, 1.0, 1.0]);
        assert_eq!(p[8], [2.0, 0.0, 0.0]);
        let c = f.cells(bytes).unwrap();
        assert_eq!(c.offsets, vec![0, 8, 12]);
        assert_eq!(c.connectivity, vec![0, 1, 2, 3, 4, 5, 6, 7, 1, 8, 2, 5]);
        assert_eq!(c.types, vec![12, 10]);
    }

    fn index(f: &LegacyFile, name: &str) -> usize {
        f.arrays().iter().position(|a| a.name == name).unwrap()
    }

    #[test]
    fn ascii_42_classic_cells_and_every_attribute() {
        let b = ASCII42.as_bytes();
        let f = LegacyFile::scan(b).unwrap();
        assert_eq!(f.version(), (4, 2));
        assert!(!f.is_binary());
        assert_eq!(f.title(), "hand-written test grid");
        expect_grid(&f, b);
        assert_eq!(f.time_value(b), Some(0.25));
        let names: Vec<_> = f
            .arrays()
            .iter()
            .map(|a| (a.name.as_str(), a.kind, a.location, a.components))
            .collect();
        assert_eq!(
            names,
            vec![
                ("eqps", LegacyKind::Scalars, LegacyLocation::Cell, 1),
                ("stress", LegacyKind::Tensors6, LegacyLocation::Cell, 6),
                ("material id", LegacyKind::Field, LegacyLocation::Cell, 1),
                (
                    "displacement",
                    LegacyKind::Vectors,
                    LegacyLocation::Point,
                    3
                ),
                ("two", LegacyKind::Scalars, LegacyLocation::Point, 2),
                ("t9", LegacyKind::Tensors, LegacyLocation::Point, 9),
            ]
        );
        let mut v = Vec::new();
        f.read(b, index(&f, "eqps"), &mut v).unwrap();
        assert_eq!(v, vec![0.5, 0.15]);
        f.read(b, index(&f, "stress"), &mut v).unwrap();
        assert_eq!(
            v,
            vec![1., 2., 3., 4., 5., 6., -1., -2., -3., -4., -5., -6.]
        );
        f.read(b, index(&f, "material id"), &mut v).unwrap();
        assert_eq!(v, vec![3.0, 4.0]);
        assert_eq!(f.arrays()[index(&f, "material id")].data_type, "int");
        f.read(b, index(&f, "two"), &mut v).unwrap();
        assert_eq!(v, (1..=18).map(f64::from).collect::<Vec<_>>());
        f.read(b, index(&f, "t9"), &mut v).unwrap();
        assert_eq!(v.len(), 81);
        assert_eq!(&v[9..18], &[1., 2., 3., 4., 5., 6., 7., 8., 9.]);
        assert_eq!(f.arrays()[index(&f, "displacement")].data_type, "float");
        assert_eq!(f.arrays()[index(&f, "displacement")].tuples, 9);
    }

    #[test]
    fn ascii_51_offsets_connectivity_and_metadata() {
        let b = ASCII51.as_bytes();
        let f = LegacyFile::scan(b).unwrap();
        assert_eq!(f.version(), (5, 1));
        expect_grid(&f, b);
        assert_eq!(f.time_value(b), None);
        assert_eq!(f.arrays().len(), 2);
        let mut v = Vec::new();
        f.read(b, index(&f, "stress"), &mut v).unwrap();
        assert_eq!(v[5], 6.0);
        assert_eq!(
            f.arrays()[0].component_names,
            ["XX", "YY", "ZZ", "XY", "YZ", "XZ"]
        );
        assert!(f.arrays()[1].component_names.is_empty());
        f.read(b, index(&f, "eqps"), &mut v).unwrap();
        assert!(v[0].is_nan() && v[1] == f64::INFINITY);
        assert_eq!(f.arrays()[1].data_type, "float");
    }

    #[test]
    fn ascii_20_and_30_versions() {
        for ver in ["2.0", "3.0"] {
            let text = ASCII42.replace("Version 4.2", &format!("Version {ver}"));
            let f = LegacyFile::scan(text.as_bytes()).unwrap();
            expect_grid(&f, text.as_bytes());
        }
    }

    /// Minimal BINARY writer for tests: header lines in ASCII, data big-endian (VTK "File Formats").
    struct Bin(Vec<u8>);
    impl Bin {
        fn line(&mut self, s: &str) -> &mut Self {
            self.0.extend_from_slice(s.as_bytes());
            self.0.push(b'\n');
            self
        }
        fn f32s(&mut self, v: &[f32]) -> &mut Self {
            v.iter()
                .for_each(|x| self.0.extend_from_slice(&x.to_be_bytes()));
            self.0.push(b'\n');
            self
        }
        fn f64s(&mut self, v: &[f64]) -> &mut Self {
            v.iter()
                .for_each(|x| self.0.extend_from_slice(&x.to_be_bytes()));
            self.0.push(b'\n');
            self
        }
        fn i32s(&mut self, v: &[i32]) -> &mut Self {
            v.iter()
                .for_each(|x| self.0.extend_from_slice(&x.to_be_bytes()));
            self.0.push(b'\n');
            self
        }
        fn i64s(&mut self, v: &[i64]) -> &mut Self {
            v.iter()
                .for_each(|x| self.0.extend_from_slice(&x.to_be_bytes()));
            self.0.push(b'\n');
            self
        }
    }

    const PTS: [f64; 27] = [
        0., 0., 0., 1., 0., 0., 1., 1., 0., 0., 1., 0., 0., 0., 1., 1., 0., 1., 1., 1., 1., 0., 1.,
        1., 2., 0., 0.,
    ];

    fn binary_51() -> Vec<u8> {
        let mut b = Bin(Vec::new());
        b.line("# vtk DataFile Version 5.1")
            .line("binary test")
            .line("BINARY")
            .line("DATASET UNSTRUCTURED_GRID");
        b.line("FIELD FieldData 1")
            .line("TimeValue 1 1 double")
            .f64s(&[1.5]);
        b.line("POINTS 9 double").f64s(&PTS);
        b.line("METADATA").line("INFORMATION 0").line("");
        b.line("CELLS 3 12")
            .line("OFFSETS vtktypeint64")
            .i64s(&[0, 8, 12]);
        b.line("CONNECTIVITY vtktypeint64")
            .i64s(&[0, 1, 2, 3, 4, 5, 6, 7, 1, 8, 2, 5]);
        b.line("CELL_TYPES 2").i32s(&[12, 10]);
        b.line("CELL_DATA 2")
            .line("TENSORS6 stress float")
            .f32s(&[1., 2., 3., 4., 5., 6., -1., -2., -3., -4., -5., -6.]);
        b.line("SCALARS id int 1")
            .line("LOOKUP_TABLE default")
            .i32s(&[-3, 70000]);
        b.line("COLOR_SCALARS rgb 3");
        b.0.extend_from_slice(&[0, 255, 51, 255, 0, 102]);
        b.0.push(b'\n');
        b.line("POINT_DATA 9")
            .line("FIELD FieldData 2")
            .line("u 3 9 double")
            .f64s(&PTS);
        b.line("flag 1 9 unsigned_char");
        b.0.extend_from_slice(&[1, 2, 3, 4, 5, 6, 7, 8, 255]);
        b.0.push(b'\n');
        b.line("LOOKUP_TABLE table 2");
        b.0.extend_from_slice(&[0; 8]);
        b.0.push(b'\n');
        b.line("TENSORS t9 double").f64s(&[2.0; 81]);
        b.0
    }

    fn binary_42() -> Vec<u8> {
        let mut b = Bin(Vec::new());
        b.line("# vtk DataFile Version 4.2")
            .line("binary test")
            .line("BINARY")
            .line("DATASET UNSTRUCTURED_GRID");
        b.line("POINTS 9 float").f32s(&PTS.map(|x| x as f32));
        b.line("CELLS 2 14")
            .i32s(&[8, 0, 1, 2, 3, 4, 5, 6, 7, 4, 1, 8, 2, 5]);
        b.line("CELL_TYPES 2").i32s(&[12, 10]);
        b.line("CELL_DATA 2")
            .line("SCALARS eqps double")
            .line("LOOKUP_TABLE default")
            .f64s(&[0.1, 0.2]);
        b.0
    }

    #[test]
    fn binary_51_built_in_test() {
        let b = binary_51();
        let f = LegacyFile::scan(&b).unwrap();
        assert!(f.is_binary());
        assert_eq!(f.version(), (5, 1));
        expect_grid(&f, &b);
        assert_eq!(f.time_value(&b), Some(1.5));
        let mut v = Vec::new();
        f.read(&b, index(&f, "stress"), &mut v).unwrap();
        assert_eq!(
            v,
            vec![1., 2., 3., 4., 5., 6., -1., -2., -3., -4., -5., -6.]
        );
        f.read(&b, index(&f, "id"), &mut v).unwrap();
        assert_eq!(v, vec![-3.0, 70000.0]);
        f.read(&b, index(&f, "rgb"), &mut v).unwrap();
        assert_eq!(v, vec![0.0, 1.0, 0.2, 1.0, 0.0, 0.4]);
        f.read(&b, index(&f, "u"), &mut v).unwrap();
        assert_eq!(v, PTS.to_vec());
        f.read(&b, index(&f, "flag"), &mut v).unwrap();
        assert_eq!(v[8], 255.0);
        f.read(&b, index(&f, "t9"), &mut v).unwrap();
        assert_eq!(v, vec![2.0; 81]);
        assert_eq!(f.arrays()[index(&f, "t9")].location, LegacyLocation::Point);
    }

    #[test]
    fn binary_42_classic_cells() {
        let b = binary_42();
        let f = LegacyFile::scan(&b).unwrap();
        expect_grid(&f, &b);
        let mut v = Vec::new();
        f.read(&b, 0, &mut v).unwrap();
        assert_eq!(v, vec![0.1, 0.2]);
    }

    fn err(text: &[u8]) -> String {
        match LegacyFile::scan(text) {
            Ok(f) => match f.cells(text) {
                Ok(_) => {
                    let mut v = Vec::new();
                    for i in 0..f.arrays().len() {
                        if let Err(e) = f.read(text, i, &mut v) {
                            return e.to_string();
                        }
                    }
                    match f.points(text) {
                        Ok(_) => panic!("no error"),
                        Err(e) => e.to_string(),
                    }
                }
                Err(e) => e.to_string(),
            },
            Err(e) => e.to_string(),
        }
    }

    #[test]
    fn empty_and_not_vtk() {
        assert_eq!(err(b""), "empty file (no bytes or only whitespace)");
        assert!(err(b"  \n\t ").starts_with("empty file"));
        assert!(err(b"hello world\n").contains("not a legacy vtk file"));
        assert!(
            err(b"# vtk DataFile Version 6.0\nx\nASCII\n")
                .contains("unsupported legacy file version '6.0'")
        );
        assert!(err(b"# vtk DataFile Version 1.0\nx\nASCII\n").contains("'1.0'"));
        assert!(
            err(b"# vtk DataFile Version x\nx\nASCII\n")
                .contains("unsupported legacy file version")
        );
    }

    #[test]
    fn non_utf8_header_lines() {
        assert_eq!(
            err(b"# vtk DataFile Version 4.2\nt\nASC\xffII\n"),
            "line 3: header line is not valid utf-8"
        );
        let mut t = ASCII42
            .replace("CELL_TYPES 2", "CELL_TYPES\u{1} 2")
            .into_bytes();
        let i = t.iter().position(|&c| c == 1).unwrap();
        t[i] = 0xfe;
        assert_eq!(err(&t), "line 17: header line is not valid utf-8");
        // A non-UTF-8 title is accepted (decoded lossily).
        let t = ASCII42.replace("hand-written", "hand\u{1}").into_bytes();
        let t: Vec<u8> = t
            .into_iter()
            .map(|c| if c == 1 { 0xe9 } else { c })
            .collect();
        assert!(LegacyFile::scan(&t).unwrap().title().starts_with("hand"));
    }

    #[test]
    fn wrong_file_type_and_dataset() {
        assert!(
            err(b"# vtk DataFile Version 4.2\nt\nTEXT\n")
                .contains("expected ASCII or BINARY, found 'TEXT'")
        );
        let t = ASCII42.replace("UNSTRUCTURED_GRID", "STRUCTURED_POINTS");
        assert_eq!(
            err(t.as_bytes()),
            "line 4: only UNSTRUCTURED_GRID is supported, found DATASET STRUCTURED_POINTS"
        );
        let t = ASCII42.replace("DATASET UNSTRUCTURED_GRID", "DATASETS UNSTRUCTURED_GRID");
        assert!(err(t.as_bytes()).contains("expected DATASET"));
    }

    #[test]
    fn bad_keyword() {
        let t = ASCII42.replace("VECTORS displacement", "VECTOR displacement");
        let e = err(t.as_bytes());
        assert!(e.starts_with("line 31: unexpected keyword 'VECTOR'"), "{e}");
    }

    #[test]
    fn truncated_ascii_and_binary() {
        let t = &ASCII42[..ASCII42.len() - 40];
        let e = err(t.as_bytes());
        assert!(
            e.contains("unexpected end of file in tensors 't9' (81 values declared")
                || e.contains("declares 81 values"),
            "{e}"
        );
        let b = binary_51();
        for cut in [b.len() - 100, b.len() / 2, 200] {
            let e = err(&b[..cut]);
            assert!(e.starts_with("byte offset "), "{e}");
            assert!(
                e.contains("remain") || e.contains("end of file") || e.contains("missing"),
                "{e}"
            );
        }
        // The header line of POINTS declares more values than the file holds.
        let e = err(&b[..b.len() - 5]);
        assert!(
            e.contains("tensors 't9' declares 81 values but only"),
            "{e}"
        );
    }

    #[test]
    fn count_mismatch() {
        // Fewer values than declared: the next keyword is met inside the data.
        let t = ASCII42.replace("POINTS 9 float", "POINTS 10 float");
        let e = err(t.as_bytes());
        assert!(
            e.contains(
                "count mismatch in points: 30 values declared, but 'CELLS' follows after 27 values"
            ),
            "{e}"
        );
        // More values than declared: a number where a keyword belongs.
        let t = ASCII42.replace(
            "SCALARS eqps double\nLOOKUP_TABLE default\n0.5 1.5e-1",
            "SCALARS eqps double\nLOOKUP_TABLE default\n0.5 1.5e-1 9",
        );
        let e = err(t.as_bytes());
        assert!(
            e.contains("unexpected keyword '9'") && e.contains("count on a previous section"),
            "{e}"
        );
        let t = ASCII42.replace("CELL_TYPES 2\n12\n10", "CELL_TYPES 1\n12\n");
        assert!(err(t.as_bytes()).contains("count mismatch in CELL_TYPES"));
        let t = ASCII42.replace("CELL_DATA 2", "CELL_DATA 3");
        assert!(err(t.as_bytes()).contains("CELL_DATA: 3 tuples declared, but CELLS declares 2"));
        let t = ASCII42
            .replace("CELLS 2 14", "CELLS 2 15")
            .replace("4 1 8 2 5", "4 1 8 2 5 0");
        assert!(err(t.as_bytes()).contains("size 15 declared, but the 2 cells use 14 values"));
        let t = ASCII42.replace("material%20id 1 2 int", "material%20id 1 3 int");
        assert!(err(t.as_bytes()).contains("3 tuples declared, but the data section has 2"));
    }

    #[test]
    fn unknown_and_unsupported_types() {
        let t = ASCII42.replace("SCALARS eqps double", "SCALARS eqps quad");
        assert_eq!(
            err(t.as_bytes()),
            "line 21: unknown data type 'quad' in scalars 'eqps'"
        );
        let t = ASCII42.replace("material%20id 1 2 int", "material%20id 1 2 string");
        assert!(
            err(t.as_bytes())
                .contains("unsupported data type 'string' in field array 'material id'")
        );
        let t = ASCII51.replace("OFFSETS vtktypeint64", "OFFSETS float");
        assert!(err(t.as_bytes()).contains(
            "unsupported data type 'float' in cell offsets (an integer type is required)"
        ));
    }

    #[test]
    fn offsets_and_ids_out_of_range() {
        let t = ASCII51.replace("0 8 12\n", "0 8 13\n");
        assert!(err(t.as_bytes()).contains("cell offsets: offset 2 is 13"));
        let t = ASCII51.replace("0 8 12\n", "0 9 8\n");
        assert!(err(t.as_bytes()).contains("offsets must not decrease"));
        let t = ASCII51.replace("0 8 12\n", "1 8 12\n");
        assert!(err(t.as_bytes()).contains("the first offset is 1"));
        let t = ASCII51.replace("1 8 2 5", "1 9 2 5");
        assert_eq!(
            err(t.as_bytes()),
            "cell connectivity: cell 1 refers to point 9, but the file has 9 points"
        );
        let t = ASCII42.replace("4 1 8 2 5", "4 1 -8 2 5");
        assert!(err(t.as_bytes()).contains("cell 1 refers to point -8"));
        let t = ASCII42.replace("4 1 8 2 5", "5 1 8 2 5");
        assert!(err(t.as_bytes()).contains("cell 1 declares 5 points"));
        let t = ASCII42.replace("12\n10\n", "12\n300\n");
        assert!(err(t.as_bytes()).contains("cell 1 has type id 300"));
    }

    #[test]
    fn bad_numbers_name_the_line() {
        let t = ASCII42.replace("0.5 1.5e-1", "0.5 1.5q-1");
        assert_eq!(
            err(t.as_bytes()),
            "line 23: invalid number '1.5q-1' in scalars 'eqps'"
        );
        let t = ASCII42.replace("4 1 8 2 5", "4 1 8 2.5 5");
        assert_eq!(err(t.as_bytes()), "line 16: invalid integer '2.5' in cells");
    }

    #[test]
    fn huge_counts_are_refused_before_allocation() {
        let t = ASCII42.replace("POINTS 9 float", "POINTS 99999999999999 float");
        assert!(err(t.as_bytes()).contains("points declares 299999999999997 values but only"));
        let t = ASCII42.replace("POINTS 9 float", &format!("POINTS {} float", usize::MAX));
        assert!(err(t.as_bytes()).contains("points declares"));
        let mut b = binary_42();
        let i = b.windows(14).position(|w| w == b"POINTS 9 float").unwrap();
        b.splice(i..i + 14, b"POINTS 4000000000 float".iter().copied());
        assert!(err(&b).contains("byte offset"));
    }

    #[test]
    fn wrong_buffer_and_index() {
        let b = ASCII42.as_bytes();
        let f = LegacyFile::scan(b).unwrap();
        let mut v = Vec::new();
        assert!(matches!(
            f.read(b, 99, &mut v),
            Err(LegacyError::NoSuchArray {
                index: 99,
                count: 6
            })
        ));
        assert!(matches!(
            f.points(&b[..10]),
            Err(LegacyError::WrongBuffer { .. })
        ));
    }

    #[test]
    fn no_cells_is_a_point_cloud() {
        let t = "# vtk DataFile Version 3.0\nc\nASCII\nDATASET UNSTRUCTURED_GRID\nPOINTS 1 int\n1 2 3\n";
        let f = LegacyFile::scan(t.as_bytes()).unwrap();
        assert_eq!(f.n_cells(), 0);
        assert_eq!(
            f.cells(t.as_bytes()).unwrap(),
            LegacyCells {
                offsets: vec![0],
                ..Default::default()
            }
        );
        assert_eq!(f.points(t.as_bytes()).unwrap(), vec![[1.0, 2.0, 3.0]]);
        assert_eq!(
            err(b"# vtk DataFile Version 3.0\nc\nASCII\nDATASET UNSTRUCTURED_GRID\n"),
            "missing POINTS section"
        );
    }

    proptest! {
        #[test]
        fn garbage_never_panics(data in proptest::collection::vec(any::<u8>(), 0..600)) {
            let _ = err_silent(&data);
            let mut with_header = b"# vtk DataFile Version 5.1\nx\nBINARY\nDATASET UNSTRUCTURED_GRID\n".to_vec();
            with_header.extend_from_slice(&data);
            let _ = err_silent(&with_header);
        }

        #[test]
        fn truncations_and_flips_never_panic(cut in 0usize..4000, at in 0usize..4000, byte in any::<u8>(), which in 0usize..4) {
            let files = [ASCII42.as_bytes().to_vec(), ASCII51.as_bytes().to_vec(), binary_51(), binary_42()];
            let f = &files[which];
            let _ = err_silent(&f[..cut.min(f.len())]);
            let mut g = f.clone();
            let i = at % g.len();
            g[i] = byte;
            let _ = err_silent(&g);
        }
    }

    /// A point cloud of `n` points with one SCALARS array `s` of type `ty` holding `values`.
    fn point_cloud(binary: bool, ty: &str, n: usize, data: &[u8]) -> Vec<u8> {
        let mut b = Bin(Vec::new());
        b.line("# vtk DataFile Version 3.0").line("roundtrip");
        b.line(if binary { "BINARY" } else { "ASCII" })
            .line("DATASET UNSTRUCTURED_GRID");
        b.line(&format!("POINTS {n} double"));
        if binary {
            b.f64s(&vec![0.5; 3 * n]);
        } else {
            b.line(&vec!["0.5"; 3 * n].join(" "));
        }
        b.line(&format!("POINT_DATA {n}"))
            .line(&format!("SCALARS s {ty}"))
            .line("LOOKUP_TABLE default");
        b.0.extend_from_slice(data);
        b.0.push(b'\n');
        b.0
    }

    proptest! {
        /// Random doubles survive BINARY (big-endian bytes) and ASCII (Rust's shortest round-trip text)
        /// bit for bit; so do random 32-bit integers.
        #[test]
        fn random_values_round_trip(values in proptest::collection::vec(any::<f64>(), 1..40),
                                    ints in proptest::collection::vec(any::<i32>(), 1..40)) {
            let n = values.len();
            let be: Vec<u8> = values.iter().flat_map(|v| v.to_be_bytes()).collect();
            let text = values.iter().map(|v| format!("{v:?}")).collect::<Vec<_>>().join("\n");
            for (binary, data) in [(true, be), (false, text.into_bytes())] {
                let file = point_cloud(binary, "double", n, &data);
                let f = LegacyFile::scan(&file).unwrap();
                let mut out = Vec::new();
                f.read(&file, 0, &mut out).unwrap();
                prop_assert_eq!(out.len(), n);
                for (a, b) in out.iter().zip(&values) {
                    prop_assert!(a.to_bits() == b.to_bits() || (a.is_nan() && b.is_nan()), "{} vs {}", a, b);
                }
            }
            let n = ints.len();
            let be: Vec<u8> = ints.iter().flat_map(|v| v.to_be_bytes()).collect();
            let text = ints.iter().map(|v| v.to_string()).collect::<Vec<_>>().join(" ");
            for (binary, data) in [(true, be), (false, text.into_bytes())] {
                let file = point_cloud(binary, "int", n, &data);
                let f = LegacyFile::scan(&file).unwrap();
                let mut out = Vec::new();
                f.read(&file, 0, &mut out).unwrap();
                prop_assert_eq!(out, ints.iter().map(|&i| f64::from(i)).collect::<Vec<_>>());
            }
        }
    }

    /// Scan and decode everything; errors are fine, panics are not.
    fn err_silent(b: &[u8]) -> Option<()> {
        let f = LegacyFile::scan(b).ok()?;
        let _ = f.points(b);
        let _ = f.cells(b);
        let _ = f.time_value(b);
        let mut v = Vec::new();
        for i in 0..f.arrays().len() {
            let _ = f.read(b, i, &mut v);
        }
        Some(())
    }
}
