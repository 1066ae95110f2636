//! The model as hone computes on it: points, cells grouped in per-kind blocks, a zone per cell,
//! and the nodal displacements.
//!
//! Cells of one kind are stored contiguously (one connectivity array per kind), so loops over a
//! block run code specialised for that kind and never branch on the kind per cell. Elements are
//! numbered globally block after block; `file_cell` maps that number back to the cell's index in
//! the results file, which is the id every report shows.

mod adjacency;
mod check;
pub mod generate;
pub mod locate;

pub use adjacency::{BoundaryFacets, NodeElements};
pub use check::{
    check_geometry, orient_wedges, BadElement, BadElementKind, DEGENERATE_RELATIVE_DET,
};
pub use locate::Locator;

use crate::element::ElementKind;

/// Cells of one kind, stored contiguously.
#[derive(Clone, Debug)]
pub struct CellBlock {
    /// The element kind of every cell in the block.
    pub kind: ElementKind,
    /// Node indices, `kind.node_count()` per cell, in VTK node order.
    pub nodes: Vec<u32>,
    /// Global element index of the block's first cell.
    pub first_element: usize,
}

impl CellBlock {
    /// Number of cells in the block.
    pub fn len(&self) -> usize {
        self.nodes.len() / self.kind.node_count()
    }

    /// Whether the block holds no cell.
    pub fn is_empty(&self) -> bool {
        self.nodes.is_empty()
    }

    /// Node indices of the block's `i`-th cell.
    #[inline]
    pub fn cell(&self, i: usize) -> &[u32] {
        let n = self.kind.node_count();
        &self.nodes[i * n..(i + 1) * n]
    }
}

/// Points and cells of a results file, with zones.
#[derive(Clone, Debug, Default)]
pub struct Mesh {
    /// Point coordinates (z = 0 or constant for 2D meshes).
    pub points: Vec<[f64; 3]>,
    /// Cells grouped by kind, in order of first appearance in the file.
    pub blocks: Vec<CellBlock>,
    /// Global element index -> cell index in the file.
    pub file_cell: Vec<u32>,
    /// Zone id of every element (0 when the file has no zone array).
    pub zone: Vec<i64>,
    /// Spatial dimension of the analysis: 2 or 3.
    pub dimension: usize,
}

impl Mesh {
    /// Number of elements (cells hone computes on).
    pub fn element_count(&self) -> usize {
        self.file_cell.len()
    }

    /// Number of points.
    pub fn node_count(&self) -> usize {
        self.points.len()
    }

    /// Index of the block holding global element `e`.
    #[inline]
    pub fn block_of(&self, e: usize) -> usize {
        self.blocks.partition_point(|b| b.first_element <= e) - 1
    }

    /// Kind and nodes of global element `e`.
    #[inline]
    pub fn element(&self, e: usize) -> (ElementKind, &[u32]) {
        let b = &self.blocks[self.block_of(e)];
        (b.kind, b.cell(e - b.first_element))
    }

    /// Mean of the element's corner coordinates.
    pub fn centroid(&self, e: usize) -> [f64; 3] {
        let (kind, nodes) = self.element(e);
        let nv = kind.vertex_count();
        let mut c = [0.0; 3];
        for &n in &nodes[..nv] {
            let p = self.points[n as usize];
            for k in 0..3 {
                c[k] += p[k];
            }
        }
        c.map(|v| v / nv as f64)
    }

    /// Counts of elements per kind, in block order.
    pub fn kind_counts(&self) -> Vec<(ElementKind, usize)> {
        let mut out: Vec<(ElementKind, usize)> = Vec::new();
        for b in &self.blocks {
            match out.iter_mut().find(|(k, _)| *k == b.kind) {
                Some(entry) => entry.1 += b.len(),
                None => out.push((b.kind, b.len())),
            }
        }
        out
    }

    /// Axis-aligned bounding box (min, max) of the points.
    pub fn bounding_box(&self) -> ([f64; 3], [f64; 3]) {
        let mut lo = [f64::INFINITY; 3];
        let mut hi = [f64::NEG_INFINITY; 3];
        for p in &self.points {
            for k in 0..3 {
                lo[k] = lo[k].min(p[k]);
                hi[k] = hi[k].max(p[k]);
            }
        }
        (lo, hi)
    }

    /// Copies a node's coordinates into `out` for the nodes of one element.
    #[inline]
    pub fn gather_coords(&self, nodes: &[u32], out: &mut [[f64; 3]]) {
        for (o, &n) in out.iter_mut().zip(nodes) {
            *o = self.points[n as usize];
        }
    }
}

/// A mesh with its nodal displacement field: the input of every later stage.
#[derive(Clone, Debug, Default)]
pub struct Model {
    /// Points and cells.
    pub mesh: Mesh,
    /// Displacement of every point (z component 0 for 2D).
    pub displacement: Vec<[f64; 3]>,
}

#[cfg(test)]
#[cfg(test)]
mod tests;
