//! The reader's error type: one enum, every variant naming the file it is about.
//!
//! Messages are one line, lower-case, and start with the file path; they name the array, the piece
//! and the byte offset where that helps the user find the problem.

use std::path::PathBuf;

/// Everything that can go wrong while opening, cataloguing, decoding or writing VTK-family files.
///
/// Every variant except the role-detection ones carries the path of the file concerned (role
/// detection works on a field catalogue, which has no single file).
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum Error {
    /// The operating system refused to open, map, read, write or rename a file.
    #[error("{}: {action}: {source}", path.display())]
    Io {
        /// The file.
        path: PathBuf,
        /// What was being done ("cannot open", "cannot map", ...).
        action: &'static str,
        /// The underlying error.
        #[source]
        source: std::io::Error,
    },
    /// The file is empty, blank, or not a file of the VTK family at all.
    #[error("{}: not a vtk file: {reason}", path.display())]
    NotVtk {
        /// The file.
        path: PathBuf,
        /// Why it was not recognised.
        reason: String,
    },
    /// The XML header is malformed, or uses a construct the reader refuses (DOCTYPE, entities,
    /// deep nesting).
    #[error("{}: bad xml at byte offset {offset}: {message}", path.display())]
    Xml {
        /// The file.
        path: PathBuf,
        /// Byte offset in the file where the problem was seen.
        offset: u64,
        /// What was wrong.
        message: String,
    },
    /// A well-formed file uses something this reader does not support (compressor, data type,
    /// header type, cell type, dataset type, ...).
    #[error("{}: unsupported {what}", path.display())]
    Unsupported {
        /// The file.
        path: PathBuf,
        /// What is unsupported, with the offending value.
        what: String,
    },
    /// The file ends before the data it declares.
    #[error("{}: truncated {what}: needs {needed} bytes from byte offset {offset}, the file holds only {available} from there", path.display())]
    Truncated {
        /// The file.
        path: PathBuf,
        /// Which data (array, piece, section).
        what: String,
        /// Byte offset in the file where the data starts.
        offset: u64,
        /// Bytes (or characters for text encodings) needed.
        needed: u64,
        /// Bytes available from that offset.
        available: u64,
    },
    /// Encoded data cannot be decoded (bad base64, corrupt zlib/lz4/lzma stream, unparsable
    /// number, inconsistent block table, ...).
    #[error("{}: corrupt {what}: {detail}", path.display())]
    Corrupt {
        /// The file.
        path: PathBuf,
        /// Which data (array, piece, block).
        what: String,
        /// What the decoder found.
        detail: String,
    },
    /// A declared size disagrees with the data or with the mesh (e.g. NumberOfComponents times
    /// tuples does not match the data length).
    #[error("{}: {what}: expected {expected}, found {found}", path.display())]
    SizeMismatch {
        /// The file.
        path: PathBuf,
        /// Which quantity, with the array and piece.
        what: String,
        /// The expected value.
        expected: u64,
        /// The value found.
        found: u64,
    },
    /// A declared size exceeds what the file can hold or a sane limit; refused before allocating.
    #[error("{}: {what} exceeds the limit: {detail}", path.display())]
    Limit {
        /// The file.
        path: PathBuf,
        /// Which quantity.
        what: String,
        /// The declared value and the limit.
        detail: String,
    },
    /// Cell connectivity, offsets or types are inconsistent (index out of range, decreasing
    /// offsets, wrong node count for the cell type).
    #[error("{}: bad cells in piece {piece}: {detail}", path.display())]
    BadCells {
        /// The file.
        path: PathBuf,
        /// Piece number in the file (0-based).
        piece: usize,
        /// What is wrong, with the cell number.
        detail: String,
    },
    /// A requested or required array is absent.
    #[error("{}: no {location} array named '{name}'; arrays present: {available}", path.display())]
    MissingArray {
        /// The file.
        path: PathBuf,
        /// The array name asked for.
        name: String,
        /// "point", "cell" or "point or cell".
        location: String,
        /// The arrays that do exist, comma-separated.
        available: String,
    },
    /// The pieces, cell counts, point counts or arrays of an increment differ from the first one.
    #[error("{}: {what} changed across the series: first increment has {expected}, this one {found}", path.display())]
    SeriesChanged {
        /// The file of the increment that differs.
        path: PathBuf,
        /// Which quantity.
        what: String,
        /// Value in the first increment.
        expected: String,
        /// Value in this increment.
        found: String,
    },
    /// A .pvd or .pvtu collection is inconsistent (missing file, self reference, bad entry).
    #[error("{}: {message}", path.display())]
    Collection {
        /// The collection file.
        path: PathBuf,
        /// What is wrong.
        message: String,
    },
    /// A folder does not identify one series.
    #[error("{}: {message}", path.display())]
    Folder {
        /// The folder.
        path: PathBuf,
        /// What is wrong, listing the candidates.
        message: String,
    },
    /// The legacy `.vtk` parser rejected the file.
    #[error("{}: {source}", path.display())]
    Legacy {
        /// The file.
        path: PathBuf,
        /// The parser's error (names a line or byte offset).
        #[source]
        source: Box<crate::legacy::LegacyError>,
    },
    /// An increment index beyond the series.
    #[error("{}: increment {index} does not exist; the series has {count}", path.display())]
    NoIncrement {
        /// The series' main file or folder.
        path: PathBuf,
        /// The index asked for.
        index: usize,
        /// Number of increments.
        count: usize,
    },
    /// A tuple range outside the array.
    #[error("{}: tuple range {start}..{end} of array '{name}' is outside 0..{tuples}", path.display())]
    TupleRange {
        /// The file.
        path: PathBuf,
        /// Array name.
        name: String,
        /// Range start.
        start: usize,
        /// Range end.
        end: usize,
        /// Number of tuples in the array.
        tuples: usize,
    },
    /// Several arrays could play one role; the user must choose.
    #[error("several arrays could be the {role}: {candidates}; choose one with --{option} NAME")]
    AmbiguousRole {
        /// The role ("stress", "eqps", ...).
        role: &'static str,
        /// The command-line option that overrides it.
        option: &'static str,
        /// The candidates, comma-separated, with location.
        candidates: String,
    },
    /// An array chosen for a role (by name or by override) cannot play it.
    #[error("array '{name}' cannot be the {role}: {reason}")]
    BadRole {
        /// The role.
        role: &'static str,
        /// The array.
        name: String,
        /// Why (component count, missing out-of-plane component, ...).
        reason: String,
    },
    /// An override names an array that does not exist.
    #[error("no array named '{name}' for the {role}; arrays present: {available}")]
    UnknownOverride {
        /// The role.
        role: &'static str,
        /// The name given.
        name: String,
        /// Arrays present.
        available: String,
    },
    /// The writer was given inconsistent input.
    #[error("{}: cannot write: {reason}", path.display())]
    WriteInput {
        /// The file to be written.
        path: PathBuf,
        /// What is inconsistent.
        reason: String,
    },
}

/// Shorthand for results of this crate.
pub type Result<T, E = Error> = std::result::Result<T, E>;
