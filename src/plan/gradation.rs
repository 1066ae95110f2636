//! Gradient limiting of a nodal size field (method sheet 3.7; Persson 2006, discrete form).
//!
//! The limited field is `h(x_j) = min_i (h_i + g dist(x_i, x_j))` over the graph metric of the
//! mesh edges, computed Dijkstra-style from the smallest size: pop the node with the smallest
//! settled size, relax its edges with `h_j <- min(h_j, h_i + g |x_i - x_j|)`. O(n log n),
//! never increases a size, and leaves an already graded field untouched.

use std::cmp::Ordering;
use std::collections::BinaryHeap;

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

/// Limits the growth of the nodal sizes along mesh edges to `g` per unit length (Persson 2006,
/// discrete form of method sheet 3.7): afterwards `h_j <= h_i + g |x_i - x_j|` on every edge
/// `(i, j)` and `h_j = min over paths (h_i + g * path length)`. `sizes` must be finite and
/// `>= 0`, `g` finite and `>= 0`, every edge must name existing nodes (one entry of `points`
/// per node).
pub fn limit_gradation(
    points: &[[f64; 3]],
    edges: &[(u32, u32)],
    sizes: &mut [f64],
    g: f64,
) -> Result<(), PlanError> {
    let n = points.len();
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
    for (c, p) in points.iter().enumerate() {
        if p.iter().any(|x| !x.is_finite()) {
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
    }
    // CSR adjacency, both directions.
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
    // Only nodes on some edge can change or pass a change on (mid-side nodes of quadratic
    // meshes are not on vertex edges): the heap holds those alone.
    let mut heap: BinaryHeap<Entry> = (0..n)
        .filter(|&i| start[i + 1] > start[i])
        .map(|i| Entry {
            size: sizes[i],
            node: i as u32,
        })
        .collect();
    while let Some(Entry { size, node }) = heap.pop() {
        let i = node as usize;
        if size > sizes[i] {
            continue; // stale entry, a smaller size was settled later
        }
        for &j in &neighbours[start[i]..start[i + 1]] {
            let j = j as usize;
            let candidate = size + g * distance(&points[i], &points[j]);
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

#[cfg(test)]
#[path = "gradation_tests.rs"]
mod tests;
