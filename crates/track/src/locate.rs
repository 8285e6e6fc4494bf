//! Locations in the reference configuration: points, cell centroids, nearest neighbours.
//!
//! The reference configuration is the first increment's points, or with deformed
//! coordinates in the files, those points minus the first increment's displacement.

use ductrace_vtk::{Location, Series};

use crate::fields::Fields;
use crate::{Result, TrackError};

/// A tracked entity: a point or a cell, with its reference coordinates.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Located {
    /// Point or cell.
    pub location: Location,
    /// 0-based id in the merged numbering.
    pub id: usize,
    /// Reference coordinates (a cell's centroid: the mean of its points).
    pub coords: [f64; 3],
    /// Distance from the requested coordinates (`near:` selectors and gauge points).
    pub distance: Option<f64>,
}

/// Reference coordinates of every entity at a location.
#[derive(Debug, Clone)]
pub struct Reference {
    /// Reference point coordinates.
    pub points: Vec<[f64; 3]>,
    /// Coordinates of the entities at the stress location (points or centroids).
    pub entities: Vec<[f64; 3]>,
    /// Lower corner of the bounding box of the points.
    pub lower: [f64; 3],
    /// Upper corner of the bounding box of the points.
    pub upper: [f64; 3],
}

fn dist2(a: &[f64; 3], b: &[f64; 3]) -> f64 {
    (a[0] - b[0]).powi(2) + (a[1] - b[1]).powi(2) + (a[2] - b[2]).powi(2)
}

/// Euclidean distance.
pub fn distance(a: &[f64; 3], b: &[f64; 3]) -> f64 {
    dist2(a, b).sqrt()
}

impl Reference {
    /// Builds the reference configuration (see the module doc).
    pub fn build(series: &Series, fields: &Fields, deformed_points: bool) -> Result<Reference> {
        let mesh = series.mesh()?;
        let mut points = mesh.points().to_vec();
        if deformed_points {
            let name = fields
                .displacement
                .as_deref()
                .ok_or_else(|| TrackError::Field {
                    path: series.path().to_path_buf(),
                    message: "deformed points need a displacement array".into(),
                })?;
            let inc = series.increment(0)?;
            let mut u = Vec::new();
            inc.read(name, Location::Point, &mut u)?;
            for (p, d) in points.iter_mut().zip(u.chunks_exact(3)) {
                p[0] -= d[0];
                p[1] -= d[1];
                p[2] -= d[2];
            }
        }
        let entities = match fields.location {
            Location::Point => points.clone(),
            Location::Cell => mesh.centroids_with(&points),
        };
        let mut lower = [f64::INFINITY; 3];
        let mut upper = [f64::NEG_INFINITY; 3];
        for p in &points {
            for k in 0..3 {
                lower[k] = lower[k].min(p[k]);
                upper[k] = upper[k].max(p[k]);
            }
        }
        Ok(Reference {
            points,
            entities,
            lower,
            upper,
        })
    }

    /// True when `p` lies inside the bounding box of the points, widened by 1 % of its
    /// diagonal (and never less than 1e-9 of it, for flat 2-D meshes).
    pub fn inside_box(&self, p: &[f64; 3]) -> bool {
        if self.points.is_empty() {
            return false;
        }
        let diag = distance(&self.lower, &self.upper);
        let tol = 0.01 * diag + 1e-12;
        (0..3).all(|k| p[k] >= self.lower[k] - tol && p[k] <= self.upper[k] + tol)
    }

    /// The entity (at the stress location) nearest `p`; ties to the lowest id.
    pub fn nearest_entity(&self, p: &[f64; 3]) -> Option<(usize, f64)> {
        nearest(&self.entities, p)
    }

    /// The point nearest `p`; ties to the lowest id.
    pub fn nearest_point(&self, p: &[f64; 3]) -> Option<(usize, f64)> {
        nearest(&self.points, p)
    }

    /// The `k` entities nearest entity `id`, excluding itself, by increasing distance (ties
    /// to the lowest id).
    pub fn neighbours(&self, id: usize, k: usize) -> Vec<usize> {
        let Some(c) = self.entities.get(id) else {
            return Vec::new();
        };
        let mut all: Vec<(f64, usize)> = self
            .entities
            .iter()
            .enumerate()
            .filter(|(i, _)| *i != id)
            .map(|(i, p)| (dist2(p, c), i))
            .collect();
        let k = k.min(all.len());
        if k == 0 {
            return Vec::new();
        }
        all.select_nth_unstable_by(k - 1, |a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)));
        let mut first: Vec<(f64, usize)> = all[..k].to_vec();
        first.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)));
        first.into_iter().map(|(_, i)| i).collect()
    }
}

fn nearest(items: &[[f64; 3]], p: &[f64; 3]) -> Option<(usize, f64)> {
    let mut best: Option<(usize, f64)> = None;
    for (i, q) in items.iter().enumerate() {
        let d = dist2(p, q);
        if best.is_none_or(|(_, b)| d < b) {
            best = Some((i, d));
        }
    }
    best.map(|(i, d)| (i, d.sqrt()))
}
