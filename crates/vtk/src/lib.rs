//! ductrace's reader and writer for the VTK family of open formats: lazy, streaming and safe.
//!
//! # What it reads
//! - XML UnstructuredGrid `.vtu`: DataArray `format` ascii, binary (inline base64) and appended
//!   (`encoding` raw and base64); `header_type` UInt32 (the default) and UInt64; `compressor` none,
//!   `vtkZLibDataCompressor`, `vtkLZ4DataCompressor`, `vtkLZMADataCompressor` with VTK's block
//!   layout; inline base64 with header and data in one run or in two runs; `byte_order`
//!   LittleEndian and BigEndian; the ten numeric types; several `<Piece>`s; PointData and
//!   CellData; `ComponentName0..` attributes; arrays without `NumberOfComponents` (one component).
//! - Partitioned `.pvtu` files, `.pvd` collections, legacy `.vtk` UNSTRUCTURED_GRID files, and
//!   folders (their single `.pvd`, or numbered files such as `run_0001.vtu`, `run_0002.vtu`).
//!
//! # How it reads
//! [`Series::open`] reads the catalogue only: the increments with their times and files, the point
//! and cell counts and the fields of the first increment (name, location, components, type,
//! encoding). Nothing is decoded: the reference mesh (the **points and cells of the first
//! increment**) on the first call of [`Series::mesh`], which validates its cells and keeps it,
//! and arrays on request. The XML header
//! is parsed with quick-xml up to the `<AppendedData>` tag; the file is memory-mapped and arrays
//! are decoded on request, straight from the mapping, into caller-owned buffers
//! ([`Increment::read`], [`Increment::read_tuples`]). Memory stays bounded by one increment's
//! requested arrays plus the mesh, however many increments a series has.
//!
//! # Merged numbering of pieces
//! When an increment consists of several pieces (several `<Piece>`s in one `.vtu`, the pieces of
//! a `.pvtu`, or several `.pvd` parts with the same timestep) they are merged into one numbering by
//! **concatenating the pieces in file order**: points of piece *k* are numbered after all points of
//! pieces 0..k, cells likewise, and the point ids in the connectivity of piece *k* are offset by the
//! number of points before it. Shared boundary points are *not* de-duplicated, and ghost cells
//! (GhostLevel > 0) are not removed. Every increment must have the same pieces with the same point
//! and cell counts as the first, so the numbering is stable across the series; otherwise reading
//! that increment is an error.
//!
//! # Times
//! From the `.pvd` `timestep`; for single files and numbered folders the dataset-level FieldData
//! array `TimeValue` when present, else the increment number (numbered folders) or the increment
//! index (single file).
//!
//! # Safety
//! Every declared size (NumberOfPoints/Cells/Tuples × components, binary headers, block tables)
//! is checked against the file length and against limits before allocating. DOCTYPE declarations
//! and entities are refused, XML nesting depth is limited, a non-UTF-8 header is an error. No
//! input makes the reader panic or hang. Files are memory-mapped read-only: a file truncated by
//! another process *while* it is being read can make the process fault, as with any
//! memory-mapped reader; results files are expected to stay put while ductrace reads them.
//! Non-finite values are not the reader's business: see
//! [`find_nonfinite`] for the caller's policy.
//!
//! # Example
//! ```no_run
//! use ductrace_vtk::{Location, Series};
//! # fn main() -> Result<(), ductrace_vtk::Error> {
//! let series = Series::open(std::path::Path::new("results/run.pvd"))?;
//! let mut stress = Vec::new();
//! for info in series.increments() {
//!     let inc = series.increment(info.index)?;
//!     let field = inc.read("stress", Location::Cell, &mut stress)?;
//!     assert_eq!(stress.len(), series.n_cells() * field.components);
//! }
//! # Ok(()) }
//! ```
#![deny(missing_docs)]

pub mod cells;
mod decode;
mod error;
#[allow(missing_docs, dead_code)]
mod legacy;
mod mesh;
pub mod roles;
mod series;
#[doc(hidden)]
pub mod testenc;
pub mod write;
mod xml;

use std::fmt;
use std::path::PathBuf;

pub use error::{Error, Result};
pub use mesh::Mesh;
pub use series::{Increment, Series};

/// Where an array's values live.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Location {
    /// One tuple per point (node).
    Point,
    /// One tuple per cell (element).
    Cell,
}

impl fmt::Display for Location {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            Location::Point => "point",
            Location::Cell => "cell",
        })
    }
}

/// The numeric type an array is stored with in the file (VTK names).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum ScalarType {
    /// Signed 8-bit integer.
    Int8,
    /// Unsigned 8-bit integer.
    UInt8,
    /// Signed 16-bit integer.
    Int16,
    /// Unsigned 16-bit integer.
    UInt16,
    /// Signed 32-bit integer.
    Int32,
    /// Unsigned 32-bit integer.
    UInt32,
    /// Signed 64-bit integer (converted to f64 exactly up to 2^53).
    Int64,
    /// Unsigned 64-bit integer (converted to f64 exactly up to 2^53).
    UInt64,
    /// IEEE 754 single precision.
    Float32,
    /// IEEE 754 double precision.
    Float64,
}

impl ScalarType {
    /// Bytes per value.
    pub fn size(self) -> usize {
        match self {
            ScalarType::Int8 | ScalarType::UInt8 => 1,
            ScalarType::Int16 | ScalarType::UInt16 => 2,
            ScalarType::Int32 | ScalarType::UInt32 | ScalarType::Float32 => 4,
            ScalarType::Int64 | ScalarType::UInt64 | ScalarType::Float64 => 8,
        }
    }
    /// True for Float32 and Float64.
    pub fn is_float(self) -> bool {
        matches!(self, ScalarType::Float32 | ScalarType::Float64)
    }
    /// VTK's XML name, e.g. `Float64`.
    pub fn name(self) -> &'static str {
        match self {
            ScalarType::Int8 => "Int8",
            ScalarType::UInt8 => "UInt8",
            ScalarType::Int16 => "Int16",
            ScalarType::UInt16 => "UInt16",
            ScalarType::Int32 => "Int32",
            ScalarType::UInt32 => "UInt32",
            ScalarType::Int64 => "Int64",
            ScalarType::UInt64 => "UInt64",
            ScalarType::Float32 => "Float32",
            ScalarType::Float64 => "Float64",
        }
    }
    /// Maps a legacy `.vtk` type name (`float`, `double`, `int`, `unsigned_char`, `vtktypeint64`,
    /// ...) to the type; `None` if unknown.
    pub fn from_legacy(name: &str) -> Option<ScalarType> {
        Some(match name.to_ascii_lowercase().as_str() {
            "bit" | "unsigned_char" | "vtktypeuint8" => ScalarType::UInt8,
            "char" | "signed_char" | "vtktypeint8" => ScalarType::Int8,
            "short" | "vtktypeint16" => ScalarType::Int16,
            "unsigned_short" | "vtktypeuint16" => ScalarType::UInt16,
            "int" | "vtkidtype" | "vtktypeint32" => ScalarType::Int32,
            "unsigned_int" | "vtktypeuint32" => ScalarType::UInt32,
            "long" | "vtktypeint64" => ScalarType::Int64,
            "unsigned_long" | "vtktypeuint64" => ScalarType::UInt64,
            "float" | "vtktypefloat32" => ScalarType::Float32,
            "double" | "vtktypefloat64" => ScalarType::Float64,
            _ => return None,
        })
    }
}

impl fmt::Display for ScalarType {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// Catalogue entry of one point or cell array.
#[derive(Clone, Debug, PartialEq)]
pub struct FieldInfo {
    /// Array name as written (may be empty for unnamed arrays).
    pub name: String,
    /// Point or cell data.
    pub location: Location,
    /// Number of components per tuple (1 when the file does not say).
    pub components: usize,
    /// `ComponentName0..` attributes, empty when absent (or incomplete).
    pub component_names: Vec<String>,
    /// Stored numeric type.
    pub scalar_type: ScalarType,
    /// Human-readable encoding, e.g. `appended raw, zlib, UInt64 header`.
    pub encoding: String,
}

/// One increment (time step) of a series.
#[derive(Clone, Debug, PartialEq)]
pub struct IncrementInfo {
    /// Position in the series, 0-based, in time order.
    pub index: usize,
    /// Time value (see the crate doc for where it comes from).
    pub time: f64,
    /// The file holding the increment (its first part when a `.pvd` lists several parts).
    pub file: PathBuf,
}

/// The rule that found the increments of a series.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Discovery {
    /// A single data file was given.
    File,
    /// A `.pvd` collection file was given.
    Pvd(PathBuf),
    /// A folder was given; it holds exactly one `.pvd`, which was used.
    FolderPvd(PathBuf),
    /// A folder was given; it holds numbered files `<stem><number>.<ext>`, sorted by number.
    FolderNumbered {
        /// The shared name before the number, with the extension, e.g. `run_*.vtu`.
        stem: String,
    },
}

impl fmt::Display for Discovery {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Discovery::File => write!(f, "a single file: one increment"),
            Discovery::Pvd(p) => write!(
                f,
                "increments listed in the collection {}, in timestep order",
                p.display()
            ),
            Discovery::FolderPvd(p) => write!(
                f,
                "the folder's only collection file {}, increments in timestep order",
                p.display()
            ),
            Discovery::FolderNumbered { stem } => write!(
                f,
                "numbered files {stem} in the folder, sorted by number; the time is the file's TimeValue, or the number when the file has none"
            ),
        }
    }
}

/// Non-finite values found in an array.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct NonFinite {
    /// How many values are NaN or infinite.
    pub count: usize,
    /// Tuple of the first one.
    pub first_tuple: usize,
    /// Component of the first one.
    pub first_component: usize,
}

/// Counts the NaN and infinite values in `data` (interleaved, `components` per tuple) and locates
/// the first; `None` when all values are finite. A `components` of 0 is treated as 1.
pub fn find_nonfinite(data: &[f64], components: usize) -> Option<NonFinite> {
    let c = components.max(1);
    let first = data.iter().position(|v| !v.is_finite())?;
    let count = data[first..].iter().filter(|v| !v.is_finite()).count();
    Some(NonFinite {
        count,
        first_tuple: first / c,
        first_component: first % c,
    })
}

/// Parses bytes as a VTK XML file and decodes every array of it; for fuzzing. Returns the number
/// of values decoded. Never panics.
#[doc(hidden)]
pub fn fuzz_xml(bytes: &[u8]) -> Result<usize> {
    series::fuzz_xml(bytes)
}

/// Decodes `bytes` as the appended data of a small fixed `.vtu` header; the first byte picks the
/// layout (raw or base64, header width, compressor, byte order, value type); for fuzzing.
#[doc(hidden)]
pub fn fuzz_appended(bytes: &[u8]) -> Result<usize> {
    let Some((&sel, rest)) = bytes.split_first() else {
        return Ok(0);
    };
    let header = if sel & 1 == 0 { "UInt32" } else { "UInt64" };
    let order = if sel & 2 == 0 {
        "LittleEndian"
    } else {
        "BigEndian"
    };
    let comp = match (sel >> 2) & 3 {
        0 => "",
        1 => " compressor=\"vtkZLibDataCompressor\"",
        2 => " compressor=\"vtkLZ4DataCompressor\"",
        _ => " compressor=\"vtkLZMADataCompressor\"",
    };
    let encoding = if sel & 16 == 0 { "raw" } else { "base64" };
    let ty = ["Float64", "Float32", "Int32", "UInt8"][usize::from((sel >> 5) & 3)];
    let mut file = format!(
        "<VTKFile type=\"UnstructuredGrid\" version=\"1.0\" byte_order=\"{order}\" header_type=\"{header}\"{comp}><UnstructuredGrid><Piece NumberOfPoints=\"4\" NumberOfCells=\"1\"><CellData><DataArray type=\"{ty}\" Name=\"a\" NumberOfComponents=\"6\" format=\"appended\" offset=\"0\"/></CellData><Points><DataArray type=\"Float64\" NumberOfComponents=\"3\" format=\"ascii\">0 0 0 1 0 0 1 1 0 0 1 0</DataArray></Points><Cells><DataArray type=\"Int32\" Name=\"connectivity\" format=\"ascii\">0 1 2 3</DataArray><DataArray type=\"Int32\" Name=\"offsets\" format=\"ascii\">4</DataArray><DataArray type=\"UInt8\" Name=\"types\" format=\"ascii\">9</DataArray></Cells></Piece></UnstructuredGrid><AppendedData encoding=\"{encoding}\">_"
    )
    .into_bytes();
    file.extend_from_slice(rest);
    series::fuzz_xml(&file)
}

/// Parses bytes as a legacy `.vtk` file and decodes its mesh and arrays; for fuzzing.
#[doc(hidden)]
pub fn fuzz_legacy(bytes: &[u8]) -> Result<usize> {
    series::fuzz_legacy(bytes)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn nonfinite_located() {
        let d = [1.0, 2.0, 3.0, f64::NAN, 5.0, f64::INFINITY];
        let n = find_nonfinite(&d, 2).unwrap();
        assert_eq!(
            n,
            NonFinite {
                count: 2,
                first_tuple: 1,
                first_component: 1
            }
        );
        assert!(find_nonfinite(&[0.0, 1.0], 1).is_none());
    }

    #[test]
    fn series_and_increments_can_be_shared_across_threads() {
        fn send_sync<T: Send + Sync>() {}
        send_sync::<Series>();
        send_sync::<Increment<'static>>();
        send_sync::<Error>();
    }

    #[test]
    fn fuzz_appended_decodes_a_valid_stream() {
        // selector 0b0000_0100: UInt32 header, little-endian, zlib, raw, Float64
        let enc = testenc::Enc {
            comp: testenc::Comp::Zlib,
            ..testenc::Enc::default()
        };
        let raw = testenc::raw_bytes(&[1.0, 2.0, 3.0, 4.0, 5.0, 6.0], ScalarType::Float64, false);
        let (h, d) = testenc::binary(&enc, &raw);
        let input = [vec![4u8], h, d].concat();
        // 6 values counted, plus 4 points and 1 cell
        assert_eq!(fuzz_appended(&input).unwrap(), 6 + 4 + 1);
        assert!(fuzz_appended(&input[..input.len() - 3]).is_err());
    }

    #[test]
    fn displays() {
        assert_eq!(Location::Cell.to_string(), "cell");
        assert_eq!(ScalarType::UInt16.to_string(), "UInt16");
        assert_eq!(ScalarType::from_legacy("double"), Some(ScalarType::Float64));
        assert_eq!(ScalarType::from_legacy("float"), Some(ScalarType::Float32));
    }
}
