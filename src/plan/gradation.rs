//! Gradient limiting of a nodal size field (method sheet 3.7; Persson 2006, discrete form).
//!
//! The limited field is `h(x_j) = min_i (h_i + g dist(x_i, x_j))` over the graph metric of the
//! mesh edges, computed Dijkstra-style from the smallest size: pop the node with the smallest
//! settled size, relax its edges with `h_j <- min(h_j, h_i + g |x_i - x_j|)`. O(n log n),
//! never increases a size, and leaves an already graded field untouched.

use std::cmp::Ordering;
use std::collections::BinaryHeap;

use rayon::prelude::*;

use super::{check_values, PlanError};
use crate::mesh::distance;

/// Heap entry ordered so that `BinaryHeap` pops the smallest size first, ties by the lower
/// node index (deterministic order).
#[derive(Clone, Copy, Debug)]
struct Entry {
    size: f64,
    node: u32,
}

impl PartialEq for Entry {
    fn eq(&self, other: &Self) -> bool {
        self.cmp(other) == Ordering::Equal
    }
}

impl Eq for Entry {}

impl PartialOrd for Entry {
    fn partial_cmp(&self, other: &Self) -> Option<Ordering> {
        Some(self.cmp(other))
    }
}

impl Ord for Entry {
    fn cmp(&self, other: &Self) -> Ordering {
        other
            .size
            .total_cmp(&self.size)
            .then(other.node.cmp(&self.node))
    }
}

/// The mesh edges as a graph for [`limit_gradation`]: both directions of every edge with its
/// length, in compressed rows (node `i`'s neighbours at `start[i]..start[i + 1]`). Built once
/// per plan and reused by every field the plan tries.
pub struct EdgeGraph {
    start: Vec<usize>,
    neighbours: Vec<u32>,
    lengths: Vec<f64>,
}

impl EdgeGraph {
    /// Builds the graph of `edges` over `points`; errors name an edge with a node outside
    /// `points` or a point with a non-finite coordinate.
    pub fn new(points: &[[f64; 3]], edges: &[(u32, u32)]) -> Result<Self, PlanError> {
        let n = points.len();
        if let Some(c) = points
            .par_iter()
            .position_first(|p| p.iter().any(|x| !x.is_finite()))
        {
            let p = points[c];
            return Err(PlanError::ElementValue {
                what: "point coordinate",
                index: c,
                value: p
                    .iter()
                    .copied()
                    .find(|x| !x.is_finite())
                    .unwrap_or(f64::NAN),
            });
        }
        let mut start = vec![0usize; n + 1];
        for (index, &(a, b)) in edges.iter().enumerate() {
            if a as usize >= n || b as usize >= n {
                return Err(PlanError::Edge {
                    index,
                    a,
                    b,
                    nodes: n,
                });
            }
            start[a as usize + 1] += 1;
            start[b as usize + 1] += 1;
        }
        for i in 0..n {
            start[i + 1] += start[i];
        }
        let mut fill = start.clone();
        let mut neighbours = vec![0u32; start[n]];
        for &(a, b) in edges {
            neighbours[fill[a as usize]] = b;
            fill[a as usize] += 1;
            neighbours[fill[b as usize]] = a;
            fill[b as usize] += 1;
        }
        let mut lengths = vec![0.0; start[n]];
        lengths
            .par_chunks_mut(4096)
            .enumerate()
            .for_each(|(chunk, out)| {
                let first = chunk * 4096;
                // The node owning entry `first`: the last row starting at or before it.
                let mut i = start.partition_point(|&s| s <= first) - 1;
                for (k, l) in out.iter_mut().enumerate() {
                    let at = first + k;
                    while start[i + 1] <= at {
                        i += 1;
                    }
                    *l = distance(&points[i], &points[neighbours[at] as usize]);
                }
            });
        Ok(Self {
            start,
            neighbours,
            lengths,
        })
    }

    /// Number of nodes.
    pub fn node_count(&self) -> usize {
        self.start.len() - 1
    }

    /// Neighbours of node `i` with the lengths of the edges to them.
    #[inline]
    fn around(&self, i: usize) -> (&[u32], &[f64]) {
        let r = self.start[i]..self.start[i + 1];
        (&self.neighbours[r.clone()], &self.lengths[r])
    }

    /// Limits the growth of `sizes` along the edges to `g` per unit length; see
    /// [`limit_gradation`].
    pub fn limit(&self, sizes: &mut [f64], g: f64) -> Result<(), PlanError> {
        let n = self.node_count();
        if sizes.len() != n {
            return Err(PlanError::Length {
                what: "sizes",
                found: sizes.len(),
                expected: n,
            });
        }
        check_values("size", sizes)?;
        if !(g.is_finite() && g >= 0.0) {
            return Err(PlanError::Parameter {
                what: "grading g",
                value: g,
                expected: "a finite value >= 0",
            });
        }
        // Only a node that lowers a neighbour can start a chain of changes: along a shortest
        // path from a node that does not, the path from its next node is as short, and a
        // neighbour's size only ever falls, so such a node would never relax an edge when
        // popped. The heap starts from those nodes alone (on a smooth field, a few).
        let sources: Vec<Entry> = (0..n)
            .into_par_iter()
            .filter(|&i| {
                let (around, lengths) = self.around(i);
                around
                    .iter()
                    .zip(lengths)
                    .any(|(&j, &l)| sizes[i] + g * l < sizes[j as usize])
            })
            .map(|i| Entry {
                size: sizes[i],
                node: i as u32,
            })
            .collect();
        let mut heap = BinaryHeap::from(sources);
        while let Some(Entry { size, node }) = heap.pop() {
            let i = node as usize;
            if size > sizes[i] {
                continue; // stale entry, a smaller size was settled later
            }
            let (around, lengths) = self.around(i);
            for (&j, &l) in around.iter().zip(lengths) {
                let j = j as usize;
                let candidate = size + g * l;
                if candidate < sizes[j] {
                    sizes[j] = candidate;
                    heap.push(Entry {
                        size: candidate,
                        node: j as u32,
                    });
                }
            }
        }
        Ok(())
    }
}

/// Limits the growth of the nodal sizes along mesh edges to `g` per unit length (Persson 2006,
/// discrete form of method sheet 3.7): afterwards `h_j <= h_i + g |x_i - x_j|` on every edge
/// `(i, j)` and `h_j = min over paths (h_i + g * path length)`. `sizes` must be finite and
/// `>= 0`, `g` finite and `>= 0`, every edge must name existing nodes (one entry of `points`
/// per node). Plans that limit several fields on one mesh build the [`EdgeGraph`] once.
pub fn limit_gradation(
    points: &[[f64; 3]],
    edges: &[(u32, u32)],
    sizes: &mut [f64],
    g: f64,
) -> Result<(), PlanError> {
    EdgeGraph::new(points, edges)?.limit(sizes, g)
}

#[cfg(test)]
#[path = "gradation_tests.rs"]
mod tests;
