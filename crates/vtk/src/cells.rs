//! The table of VTK cell types: id, VTK name and node count (fixed or variable).
//!
//! Source: VTK's `vtkCellType.h` (the ids are part of the open file format).

/// Number of nodes of a cell type.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum NodeCount {
    /// Always this many nodes.
    Fixed(usize),
    /// Any number of nodes (polygons, polylines, strips, polyhedra, arbitrary-order cells).
    Variable,
}

/// One row of the cell type table.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct CellKind {
    /// VTK cell type id.
    pub id: u8,
    /// VTK's name for it, e.g. `VTK_QUADRATIC_QUAD`.
    pub name: &'static str,
    /// Its node count.
    pub nodes: NodeCount,
}

use NodeCount::{Fixed, Variable};

const TABLE: &[(u8, &str, NodeCount)] = &[
    (0, "VTK_EMPTY_CELL", Fixed(0)),
    (1, "VTK_VERTEX", Fixed(1)),
    (2, "VTK_POLY_VERTEX", Variable),
    (3, "VTK_LINE", Fixed(2)),
    (4, "VTK_POLY_LINE", Variable),
    (5, "VTK_TRIANGLE", Fixed(3)),
    (6, "VTK_TRIANGLE_STRIP", Variable),
    (7, "VTK_POLYGON", Variable),
    (8, "VTK_PIXEL", Fixed(4)),
    (9, "VTK_QUAD", Fixed(4)),
    (10, "VTK_TETRA", Fixed(4)),
    (11, "VTK_VOXEL", Fixed(8)),
    (12, "VTK_HEXAHEDRON", Fixed(8)),
    (13, "VTK_WEDGE", Fixed(6)),
    (14, "VTK_PYRAMID", Fixed(5)),
    (15, "VTK_PENTAGONAL_PRISM", Fixed(10)),
    (16, "VTK_HEXAGONAL_PRISM", Fixed(12)),
    (21, "VTK_QUADRATIC_EDGE", Fixed(3)),
    (22, "VTK_QUADRATIC_TRIANGLE", Fixed(6)),
    (23, "VTK_QUADRATIC_QUAD", Fixed(8)),
    (24, "VTK_QUADRATIC_TETRA", Fixed(10)),
    (25, "VTK_QUADRATIC_HEXAHEDRON", Fixed(20)),
    (26, "VTK_QUADRATIC_WEDGE", Fixed(15)),
    (27, "VTK_QUADRATIC_PYRAMID", Fixed(13)),
    (28, "VTK_BIQUADRATIC_QUAD", Fixed(9)),
    (29, "VTK_TRIQUADRATIC_HEXAHEDRON", Fixed(27)),
    (30, "VTK_QUADRATIC_LINEAR_QUAD", Fixed(6)),
    (31, "VTK_QUADRATIC_LINEAR_WEDGE", Fixed(12)),
    (32, "VTK_BIQUADRATIC_QUADRATIC_WEDGE", Fixed(18)),
    (33, "VTK_BIQUADRATIC_QUADRATIC_HEXAHEDRON", Fixed(24)),
    (34, "VTK_BIQUADRATIC_TRIANGLE", Fixed(7)),
    (35, "VTK_CUBIC_LINE", Fixed(4)),
    (36, "VTK_QUADRATIC_POLYGON", Variable),
    (37, "VTK_TRIQUADRATIC_PYRAMID", Fixed(19)),
    (42, "VTK_POLYHEDRON", Variable),
    (68, "VTK_LAGRANGE_CURVE", Variable),
    (69, "VTK_LAGRANGE_TRIANGLE", Variable),
    (70, "VTK_LAGRANGE_QUADRILATERAL", Variable),
    (71, "VTK_LAGRANGE_TETRAHEDRON", Variable),
    (72, "VTK_LAGRANGE_HEXAHEDRON", Variable),
    (73, "VTK_LAGRANGE_WEDGE", Variable),
    (74, "VTK_LAGRANGE_PYRAMID", Variable),
    (75, "VTK_BEZIER_CURVE", Variable),
    (76, "VTK_BEZIER_TRIANGLE", Variable),
    (77, "VTK_BEZIER_QUADRILATERAL", Variable),
    (78, "VTK_BEZIER_TETRAHEDRON", Variable),
    (79, "VTK_BEZIER_HEXAHEDRON", Variable),
    (80, "VTK_BEZIER_WEDGE", Variable),
    (81, "VTK_BEZIER_PYRAMID", Variable),
];

/// Looks up a VTK cell type id; `None` for ids VTK does not define (or this table does not know).
pub fn cell_kind(id: u8) -> Option<CellKind> {
    TABLE
        .iter()
        .find(|(i, _, _)| *i == id)
        .map(|&(id, name, nodes)| CellKind { id, name, nodes })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn known_ids_from_vtk_cell_type_header() {
        // values from VTK's vtkCellType.h
        assert_eq!(cell_kind(12).map(|k| k.nodes), Some(Fixed(8)));
        assert_eq!(cell_kind(23).map(|k| k.name), Some("VTK_QUADRATIC_QUAD"));
        assert_eq!(cell_kind(25).map(|k| k.nodes), Some(Fixed(20)));
        assert_eq!(cell_kind(7).map(|k| k.nodes), Some(Variable));
        assert!(cell_kind(17).is_none());
        assert!(cell_kind(255).is_none());
    }

    #[test]
    fn ids_unique_and_sorted() {
        for w in TABLE.windows(2) {
            assert!(w[0].0 < w[1].0);
        }
    }
}
