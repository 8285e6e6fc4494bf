//! ductrace's writer: `.vtu` UnstructuredGrid files with appended raw binary data, and `.pvd`
//! collections. Used by tests (synthetic series) and by the export command.
//!
//! Format written (VTK XML file format, version 1.0): `header_type="UInt64"`,
//! `byte_order="LittleEndian"`, no compression; points and arrays Float64, connectivity and
//! offsets Int64, types UInt8. Files are written atomically: a temporary file in the same folder,
//! then a rename.

use std::io::Write;
use std::path::{Path, PathBuf};

use crate::error::Error;
use crate::mesh::Mesh;

/// One array to write: `data` holds `components` values per tuple, interleaved.
#[derive(Clone, Copy, Debug)]
pub struct ArrayRef<'a> {
    /// Array name.
    pub name: &'a str,
    /// Components per tuple (at least 1).
    pub components: usize,
    /// Values, tuple after tuple.
    pub data: &'a [f64],
}

/// Cells to write, in the form [`Mesh`] uses.
#[derive(Clone, Copy, Debug)]
pub struct CellsRef<'a> {
    /// Point ids of all cells, cell after cell.
    pub connectivity: &'a [usize],
    /// `n_cells + 1` offsets into `connectivity`, starting at 0.
    pub offsets: &'a [usize],
    /// VTK cell type ids.
    pub types: &'a [u8],
}

impl<'a> CellsRef<'a> {
    /// The cells of a mesh.
    pub fn of(mesh: &'a Mesh) -> CellsRef<'a> {
        CellsRef {
            connectivity: mesh.connectivity(),
            offsets: mesh.offsets(),
            types: mesh.cell_types(),
        }
    }
}

/// Extra settings for [`write_vtu_with`].
#[derive(Clone, Debug, Default, PartialEq)]
#[non_exhaustive]
pub struct VtuOptions {
    /// Dataset-level FieldData `TimeValue` to write, if any.
    pub time: Option<f64>,
}

impl VtuOptions {
    /// Options with a TimeValue.
    pub fn with_time(time: f64) -> VtuOptions {
        VtuOptions { time: Some(time) }
    }
}

fn escape(s: &str) -> String {
    let mut o = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => o.push_str("&amp;"),
            '<' => o.push_str("&lt;"),
            '>' => o.push_str("&gt;"),
            '"' => o.push_str("&quot;"),
            '\'' => o.push_str("&apos;"),
            c => o.push(c),
        }
    }
    o
}

/// Writes a `.vtu` file: appended raw binary, UInt64 header, Float64 data, little-endian,
/// Int64 connectivity/offsets, UInt8 types.
pub fn write_vtu(
    path: &Path,
    mesh_points: &[[f64; 3]],
    cells: &CellsRef<'_>,
    point_data: &[ArrayRef<'_>],
    cell_data: &[ArrayRef<'_>],
) -> Result<(), Error> {
    write_vtu_with(
        path,
        mesh_points,
        cells,
        point_data,
        cell_data,
        &VtuOptions::default(),
    )
}

/// [`write_vtu`] with options (a TimeValue).
pub fn write_vtu_with(
    path: &Path,
    mesh_points: &[[f64; 3]],
    cells: &CellsRef<'_>,
    point_data: &[ArrayRef<'_>],
    cell_data: &[ArrayRef<'_>],
    options: &VtuOptions,
) -> Result<(), Error> {
    let bad = |reason: String| Error::WriteInput {
        path: path.to_path_buf(),
        reason,
    };
    let np = mesh_points.len();
    let nc = cells.types.len();
    // the reader's own validation of cells
    crate::mesh::check_piece(path, 0, np, cells.connectivity, cells.offsets, cells.types)
        .map_err(|e| bad(e.to_string()))?;
    for (list, n, loc) in [(point_data, np, "point"), (cell_data, nc, "cell")] {
        for a in list {
            if a.components == 0 || a.data.len() != n * a.components {
                return Err(bad(format!(
                    "{loc} array '{}' has {} values, expected {n} tuples of {} components",
                    a.name,
                    a.data.len(),
                    a.components
                )));
            }
        }
    }
    if let Some(t) = options.time
        && !t.is_finite()
    {
        return Err(bad(format!("time value {t} is not finite")));
    }

    let mut xml = String::new();
    let mut offset: u64 = 0;
    let mut da = |xml: &mut String, ty: &str, name: &str, comps: usize, nbytes: u64| {
        xml.push_str(&format!(
            "        <DataArray type=\"{ty}\" Name=\"{}\" NumberOfComponents=\"{comps}\" format=\"appended\" offset=\"{offset}\"/>\n",
            escape(name)
        ));
        offset += 8 + nbytes;
    };
    xml.push_str("<?xml version=\"1.0\"?>\n");
    xml.push_str("<VTKFile type=\"UnstructuredGrid\" version=\"1.0\" byte_order=\"LittleEndian\" header_type=\"UInt64\">\n");
    xml.push_str("  <UnstructuredGrid>\n");
    if let Some(t) = options.time {
        xml.push_str(&format!(
            "    <FieldData>\n      <DataArray type=\"Float64\" Name=\"TimeValue\" NumberOfTuples=\"1\" format=\"ascii\">{t:?}</DataArray>\n    </FieldData>\n"
        ));
    }
    xml.push_str(&format!(
        "    <Piece NumberOfPoints=\"{np}\" NumberOfCells=\"{nc}\">\n"
    ));
    xml.push_str("      <PointData>\n");
    for a in point_data {
        da(
            &mut xml,
            "Float64",
            a.name,
            a.components,
            (a.data.len() * 8) as u64,
        );
    }
    xml.push_str("      </PointData>\n      <CellData>\n");
    for a in cell_data {
        da(
            &mut xml,
            "Float64",
            a.name,
            a.components,
            (a.data.len() * 8) as u64,
        );
    }
    xml.push_str("      </CellData>\n      <Points>\n");
    da(&mut xml, "Float64", "Points", 3, (np * 24) as u64);
    xml.push_str("      </Points>\n      <Cells>\n");
    da(
        &mut xml,
        "Int64",
        "connectivity",
        1,
        (cells.connectivity.len() * 8) as u64,
    );
    da(&mut xml, "Int64", "offsets", 1, (nc * 8) as u64);
    da(&mut xml, "UInt8", "types", 1, nc as u64);
    xml.push_str("      </Cells>\n    </Piece>\n  </UnstructuredGrid>\n");
    xml.push_str("  <AppendedData encoding=\"raw\">\n   _");

    atomic_write(path, |w| {
        w.write_all(xml.as_bytes())?;
        let f64s = |w: &mut dyn Write, vals: &mut dyn Iterator<Item = f64>, n: usize| {
            w.write_all(&((n * 8) as u64).to_le_bytes())?;
            let mut buf = Vec::with_capacity(8 * 4096);
            for v in vals {
                buf.extend_from_slice(&v.to_le_bytes());
                if buf.len() >= 8 * 4096 {
                    w.write_all(&buf)?;
                    buf.clear();
                }
            }
            w.write_all(&buf)
        };
        for a in point_data.iter().chain(cell_data) {
            f64s(w, &mut a.data.iter().copied(), a.data.len())?;
        }
        f64s(w, &mut mesh_points.iter().flatten().copied(), np * 3)?;
        let i64s = |w: &mut dyn Write, vals: &mut dyn Iterator<Item = usize>, n: usize| {
            w.write_all(&((n * 8) as u64).to_le_bytes())?;
            let mut buf = Vec::with_capacity(8 * 4096);
            for v in vals {
                buf.extend_from_slice(&(v as i64).to_le_bytes());
                if buf.len() >= 8 * 4096 {
                    w.write_all(&buf)?;
                    buf.clear();
                }
            }
            w.write_all(&buf)
        };
        i64s(
            w,
            &mut cells.connectivity.iter().copied(),
            cells.connectivity.len(),
        )?;
        i64s(w, &mut cells.offsets[1..].iter().copied(), nc)?;
        w.write_all(&(nc as u64).to_le_bytes())?;
        w.write_all(cells.types)?;
        w.write_all(b"\n  </AppendedData>\n</VTKFile>\n")
    })
}

/// Writes a `.pvd` collection listing `(time, file)` entries in the given order. Files are
/// written relative to the `.pvd`'s folder: relative paths as given, absolute paths inside that
/// folder made relative; an absolute path elsewhere is an error.
pub fn write_pvd(path: &Path, entries: &[(f64, &Path)]) -> Result<(), Error> {
    let bad = |reason: String| Error::WriteInput {
        path: path.to_path_buf(),
        reason,
    };
    let dir = path.parent().unwrap_or(Path::new(""));
    let mut xml = String::from(
        "<?xml version=\"1.0\"?>\n<VTKFile type=\"Collection\" version=\"0.1\" byte_order=\"LittleEndian\">\n  <Collection>\n",
    );
    for (t, f) in entries {
        if !t.is_finite() {
            return Err(bad(format!("time value {t} is not finite")));
        }
        let rel: PathBuf = if f.is_absolute() {
            f.strip_prefix(dir)
                .map_err(|_| {
                    bad(format!(
                        "{} is not inside the collection's folder",
                        f.display()
                    ))
                })?
                .to_path_buf()
        } else {
            f.to_path_buf()
        };
        let parts: Vec<String> = rel
            .components()
            .map(|c| {
                c.as_os_str()
                    .to_str()
                    .map(str::to_string)
                    .ok_or_else(|| bad(format!("file name {} is not utf-8", rel.display())))
            })
            .collect::<Result<_, _>>()?;
        xml.push_str(&format!(
            "    <DataSet timestep=\"{t:?}\" group=\"\" part=\"0\" file=\"{}\"/>\n",
            escape(&parts.join("/"))
        ));
    }
    xml.push_str("  </Collection>\n</VTKFile>\n");
    atomic_write(path, |w| w.write_all(xml.as_bytes()))
}

/// Writes through a temporary file in the same folder, then renames it over `path`.
fn atomic_write(
    path: &Path,
    body: impl FnOnce(&mut dyn Write) -> std::io::Result<()>,
) -> Result<(), Error> {
    let io = |action: &'static str| {
        move |source| Error::Io {
            path: path.to_path_buf(),
            action,
            source,
        }
    };
    let dir = match path.parent() {
        Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
        _ => PathBuf::from("."),
    };
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_else(|| "out".into());
    let tmp = dir.join(format!(".{name}.{}.tmp", std::process::id()));
    let result = (|| {
        let f = std::fs::File::create(&tmp).map_err(io("cannot create a temporary file for"))?;
        let mut w = std::io::BufWriter::with_capacity(1 << 20, f);
        body(&mut w).map_err(io("cannot write"))?;
        let f = w.into_inner().map_err(|e| Error::Io {
            path: path.to_path_buf(),
            action: "cannot write",
            source: e.into_error(),
        })?;
        f.sync_all().map_err(io("cannot sync"))?;
        std::fs::rename(&tmp, path).map_err(io("cannot rename the temporary file to"))
    })();
    if result.is_err() {
        let _ = std::fs::remove_file(&tmp);
    }
    result
}
