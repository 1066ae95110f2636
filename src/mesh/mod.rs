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

    /// Current size of every element (the glossary's `size_now`): the mean length of its
    /// vertex-to-vertex edges. Mid-side nodes do not count, so a straight quadratic element has
    /// the size of its linear counterpart.
    pub fn size_now(&self) -> Vec<f64> {
        use rayon::prelude::*;
        (0..self.element_count())
            .into_par_iter()
            .map(|e| {
                let (kind, nodes) = self.element(e);
                let edges = kind.edges();
                let sum: f64 = edges
                    .iter()
                    .map(|[a, b]| {
                        distance(
                            &self.points[nodes[*a] as usize],
                            &self.points[nodes[*b] as usize],
                        )
                    })
                    .sum();
                sum / edges.len() as f64
            })
            .collect()
    }

    /// Every vertex-to-vertex edge of the mesh once, as (smaller node, larger node), sorted.
    /// Mid-side nodes are not vertices; the size field and its gradation live on these edges.
    /// Built by bucketing every element edge on its smaller node (a counting sort), then
    /// sorting and deduplicating each small bucket in parallel.
    pub fn vertex_edges(&self) -> Vec<(u32, u32)> {
        use rayon::prelude::*;
        let n = self.node_count();
        let each_edge = |f: &mut dyn FnMut(u32, u32)| {
            for b in &self.blocks {
                let list = b.kind.edges();
                for c in 0..b.len() {
                    let nodes = b.cell(c);
                    for [i, j] in list {
                        let (a, z) = (nodes[*i], nodes[*j]);
                        f(a.min(z), a.max(z));
                    }
                }
            }
        };
        let mut start = vec![0usize; n + 1];
        each_edge(&mut |a, _| start[a as usize + 1] += 1);
        for i in 0..n {
            start[i + 1] += start[i];
        }
        let mut fill = start.clone();
        let mut other = vec![0u32; start[n]];
        each_edge(&mut |a, z| {
            other[fill[a as usize]] = z;
            fill[a as usize] += 1;
        });
        // Sort and deduplicate each bucket; `kept[a]` is the bucket's count of distinct ends.
        let mut buckets: Vec<&mut [u32]> = Vec::with_capacity(n);
        let mut rest: &mut [u32] = &mut other;
        for a in 0..n {
            let (head, tail) = rest.split_at_mut(start[a + 1] - start[a]);
            buckets.push(head);
            rest = tail;
        }
        let kept: Vec<usize> = buckets
            .par_iter_mut()
            .map(|bucket| {
                bucket.sort_unstable();
                let mut k = 0;
                for i in 0..bucket.len() {
                    if i == 0 || bucket[i] != bucket[k - 1] {
                        bucket[k] = bucket[i];
                        k += 1;
                    }
                }
                k
            })
            .collect();
        let mut edges = Vec::with_capacity(kept.iter().sum());
        for (a, &k) in kept.iter().enumerate() {
            edges.extend(other[start[a]..start[a] + k].iter().map(|&z| (a as u32, z)));
        }
        edges
    }

    /// Copies a node's coordinates into `out` for the nodes of one element.
    #[inline]
    pub fn gather_coords(&self, nodes: &[u32], out: &mut [[f64; 3]]) {
        for (o, &n) in out.iter_mut().zip(nodes) {
            *o = self.points[n as usize];
        }
    }
}

/// Euclidean distance between two points.
#[inline]
pub fn distance(a: &[f64; 3], b: &[f64; 3]) -> f64 {
    ((a[0] - b[0]).powi(2) + (a[1] - b[1]).powi(2) + (a[2] - b[2]).powi(2)).sqrt()
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
