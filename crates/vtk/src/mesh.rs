//! The reference mesh: points and cells of the first increment, in the merged numbering.

use crate::cells::{NodeCount, cell_kind};
use crate::error::Error;
use rayon::prelude::*;
use std::path::Path;

/// Points and cells of the reference configuration (the first increment), pieces merged in file
/// order (see the crate doc).
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Mesh {
    pub(crate) points: Vec<[f64; 3]>,
    pub(crate) connectivity: Vec<usize>,
    /// n_cells + 1 entries, starting at 0.
    pub(crate) offsets: Vec<usize>,
    pub(crate) types: Vec<u8>,
    /// (points, cells) of each piece, in merge order.
    pub(crate) pieces: Vec<(usize, usize)>,
}

impl Mesh {
    /// Number of points.
    pub fn n_points(&self) -> usize {
        self.points.len()
    }
    /// Number of cells.
    pub fn n_cells(&self) -> usize {
        self.types.len()
    }
    /// Point coordinates of the reference configuration.
    pub fn points(&self) -> &[[f64; 3]] {
        &self.points
    }
    /// Point ids (merged numbering) of cell `cell`, in VTK's node order.
    ///
    /// Panics if `cell >= n_cells()` (an index error of the caller, like slice indexing).
    pub fn cell_points(&self, cell: usize) -> &[usize] {
        &self.connectivity[self.offsets[cell]..self.offsets[cell + 1]]
    }
    /// VTK cell type id of cell `cell` (see [`crate::cells::cell_kind`]).
    ///
    /// Panics if `cell >= n_cells()`.
    pub fn cell_type(&self, cell: usize) -> u8 {
        self.types[cell]
    }
    /// Whole connectivity (merged numbering).
    pub fn connectivity(&self) -> &[usize] {
        &self.connectivity
    }
    /// Cell offsets into [`Mesh::connectivity`]: `n_cells + 1` entries starting at 0.
    pub fn offsets(&self) -> &[usize] {
        &self.offsets
    }
    /// VTK cell type ids of all cells.
    pub fn cell_types(&self) -> &[u8] {
        &self.types
    }
    /// Point and cell counts of each piece, in merge order.
    pub fn pieces(&self) -> &[(usize, usize)] {
        &self.pieces
    }
    /// Cells per type: (VTK id, VTK name, count), sorted by id.
    pub fn cell_type_counts(&self) -> Vec<(u8, &'static str, usize)> {
        let mut counts = [0usize; 256];
        for &t in &self.types {
            counts[usize::from(t)] += 1;
        }
        counts
            .iter()
            .enumerate()
            .filter(|(_, n)| **n > 0)
            .map(|(id, &n)| {
                let id = id as u8;
                (id, cell_kind(id).map_or("VTK_UNKNOWN", |k| k.name), n)
            })
            .collect()
    }
    /// Centroid of each cell: the arithmetic mean of its points' coordinates (all nodes, corner
    /// and mid-side alike; not the volume centroid of distorted or curved cells). A cell without
    /// points gets the origin. Computed in parallel.
    pub fn centroids(&self) -> Vec<[f64; 3]> {
        self.centroids_with(&self.points)
    }
    /// [`Mesh::centroids`] with other coordinates for the same points (a reference
    /// configuration, say); point ids beyond `points` are skipped.
    pub fn centroids_with(&self, points: &[[f64; 3]]) -> Vec<[f64; 3]> {
        (0..self.n_cells())
            .into_par_iter()
            .map(|c| self.centroid_with(c, points))
            .collect()
    }
    /// Centroid of cell `cell` (see [`Mesh::centroids`]).
    ///
    /// Panics if `cell >= n_cells()`.
    pub fn centroid(&self, cell: usize) -> [f64; 3] {
        self.centroid_with(cell, &self.points)
    }
    fn centroid_with(&self, cell: usize, points: &[[f64; 3]]) -> [f64; 3] {
        let ids = self.cell_points(cell);
        let mut s = [0.0; 3];
        for p in ids.iter().filter_map(|&i| points.get(i)) {
            s[0] += p[0];
            s[1] += p[1];
            s[2] += p[2];
        }
        let n = ids.len().max(1) as f64;
        [s[0] / n, s[1] / n, s[2] / n]
    }
    /// True when all points have exactly the same z coordinate: a 2-D model (axisymmetric, plane
    /// strain or plane stress). An empty mesh is not planar.
    pub fn is_planar(&self) -> bool {
        match self.points.first() {
            None => false,
            Some(p0) => self.points.iter().all(|p| p[2] == p0[2]),
        }
    }

    /// Appends one piece, validating its cells: offsets increase and end at the connectivity
    /// length, point ids are below the piece's point count, types are known and fixed-size types
    /// have their node count. `offsets` has n_cells + 1 entries starting at 0.
    ///
    /// The cells are checked in parallel chunks; the error is the one of the lowest failing
    /// cell, as a serial check would give. The first piece's arrays are moved in, not copied.
    #[allow(clippy::too_many_arguments)]
    pub(crate) fn push_piece(
        &mut self,
        path: &Path,
        piece: usize,
        points: Vec<[f64; 3]>,
        connectivity: Vec<usize>,
        offsets: Vec<usize>,
        types: Vec<u8>,
    ) -> Result<(), Error> {
        let np = points.len();
        let n = types.len();
        check_piece(path, piece, np, &connectivity, &offsets, &types)?;
        if self.pieces.is_empty() {
            self.points = points;
            self.connectivity = connectivity;
            self.offsets = offsets;
            self.types = types;
        } else {
            let base_p = self.points.len();
            let base_c = self.connectivity.len();
            self.points.extend_from_slice(&points);
            self.connectivity
                .extend(connectivity.iter().map(|&i| i + base_p));
            if self.offsets.is_empty() {
                self.offsets.push(0);
            }
            self.offsets
                .extend(offsets[1..].iter().map(|&o| o + base_c));
            self.types.extend_from_slice(&types);
        }
        self.pieces.push((np, n));
        Ok(())
    }
}

/// Validates one piece's cells against its point count `np` (the checks of
/// [`Mesh::push_piece`]); the error names the lowest failing cell.
pub(crate) fn check_piece(
    path: &Path,
    piece: usize,
    np: usize,
    connectivity: &[usize],
    offsets: &[usize],
    types: &[u8],
) -> Result<(), Error> {
    let bad = |detail: String| Error::BadCells {
        path: path.to_path_buf(),
        piece,
        detail,
    };
    let n = types.len();
    if offsets.len() != n + 1 || offsets.first() != Some(&0) {
        return Err(bad(format!(
            "{} offsets for {n} cells",
            offsets.len().saturating_sub(1)
        )));
    }
    if let Some((_, detail)) = first_bad_cell(connectivity, offsets, types, np) {
        return Err(bad(detail));
    }
    if offsets[n] != connectivity.len() {
        return Err(bad(format!(
            "the last offset is {} but the connectivity has {} entries",
            offsets[n],
            connectivity.len()
        )));
    }
    Ok(())
}

/// Cells per parallel validation chunk.
const CHECK_CHUNK: usize = 16 * 1024;

/// The lowest cell that fails a check of [`Mesh::push_piece`], with its message; `offsets`
/// has `types.len() + 1` entries.
fn first_bad_cell(
    connectivity: &[usize],
    offsets: &[usize],
    types: &[u8],
    np: usize,
) -> Option<(usize, String)> {
    let check = |c: usize| -> Option<String> {
        let (a, b) = (offsets[c], offsets[c + 1]);
        if b < a || b > connectivity.len() {
            return Some(format!(
                "offset {b} of cell {c} is out of range (connectivity has {} entries)",
                connectivity.len()
            ));
        }
        let Some(kind) = cell_kind(types[c]) else {
            return Some(format!("unknown cell type {} of cell {c}", types[c]));
        };
        if let NodeCount::Fixed(k) = kind.nodes
            && b - a != k
        {
            return Some(format!(
                "cell {c} of type {} has {} points, expected {k}",
                kind.name,
                b - a
            ));
        }
        connectivity[a..b]
            .iter()
            .find(|&&id| id >= np)
            .map(|id| format!("cell {c} refers to point {id}, the piece has {np} points"))
    };
    let n = types.len();
    (0..n.div_ceil(CHECK_CHUNK))
        .into_par_iter()
        .filter_map(|k| {
            (k * CHECK_CHUNK..((k + 1) * CHECK_CHUNK).min(n)).find_map(|c| check(c).map(|d| (c, d)))
        })
        .min_by_key(|(c, _)| *c)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn quad_mesh() -> Mesh {
        let mut m = Mesh::default();
        let pts = vec![
            [0.0, 0.0, 0.0],
            [1.0, 0.0, 0.0],
            [1.0, 1.0, 0.0],
            [0.0, 1.0, 0.0],
        ];
        m.push_piece(
            Path::new("a"),
            0,
            pts.clone(),
            vec![0, 1, 2, 3],
            vec![0, 4],
            vec![9],
        )
        .unwrap();
        m.push_piece(Path::new("a"), 1, pts, vec![0, 1, 2], vec![0, 3], vec![5])
            .unwrap();
        m
    }

    #[test]
    fn pieces_merge_with_offsets() {
        let m = quad_mesh();
        assert_eq!(m.n_points(), 8);
        assert_eq!(m.n_cells(), 2);
        assert_eq!(m.cell_points(1), &[4, 5, 6]);
        assert_eq!(m.cell_type(1), 5);
        assert_eq!(
            m.cell_type_counts(),
            vec![(5, "VTK_TRIANGLE", 1), (9, "VTK_QUAD", 1)]
        );
        assert!(m.is_planar());
        // mean of the nodes (by hand)
        assert_eq!(m.centroids()[0], [0.5, 0.5, 0.0]);
        assert_eq!(m.centroids()[1], [2.0 / 3.0, 1.0 / 3.0, 0.0]);
    }

    #[test]
    fn the_lowest_bad_cell_is_reported_whichever_chunk_finishes_first() {
        // Vertex cells over several validation chunks; two faults in different chunks.
        let n = 3 * CHECK_CHUNK + 11;
        let conn: Vec<usize> = (0..n).collect();
        let offsets: Vec<usize> = (0..=n).collect();
        let mut types = vec![1u8; n];
        let mut bad_conn = conn.clone();
        types[2 * CHECK_CHUNK + 5] = 200;
        bad_conn[CHECK_CHUNK + 7] = n + 3;
        let e = check_piece(Path::new("a"), 0, n, &bad_conn, &offsets, &types).unwrap_err();
        let want = format!("cell {} refers to point {}", CHECK_CHUNK + 7, n + 3);
        assert!(e.to_string().contains(&want), "{e}");
        let e = check_piece(Path::new("a"), 0, n, &conn, &offsets, &types).unwrap_err();
        assert!(e.to_string().contains("unknown cell type 200"), "{e}");
        types[2 * CHECK_CHUNK + 5] = 1;
        assert!(check_piece(Path::new("a"), 0, n, &conn, &offsets, &types).is_ok());
    }

    #[test]
    fn bad_cells_refused() {
        let mut m = Mesh::default();
        let pts = vec![[0.0; 3]; 3];
        let e = m
            .push_piece(
                Path::new("a"),
                0,
                pts.clone(),
                vec![0, 1, 7],
                vec![0, 3],
                vec![5],
            )
            .unwrap_err();
        assert!(e.to_string().contains("refers to point 7"), "{e}");
        let e = m
            .push_piece(
                Path::new("a"),
                0,
                pts.clone(),
                vec![0, 1, 2],
                vec![0, 4],
                vec![5],
            )
            .unwrap_err();
        assert!(e.to_string().contains("out of range"), "{e}");
        let e = m
            .push_piece(
                Path::new("a"),
                0,
                pts.clone(),
                vec![0, 1, 2],
                vec![0, 3],
                vec![99],
            )
            .unwrap_err();
        assert!(e.to_string().contains("unknown cell type 99"), "{e}");
        let e = m
            .push_piece(Path::new("a"), 0, pts, vec![0, 1, 2], vec![0, 3], vec![9])
            .unwrap_err();
        assert!(e.to_string().contains("expected 4"), "{e}");
    }
}
