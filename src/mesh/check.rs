//! Geometry check right after reading: every element must map the reference element onto a
//! region with positive Jacobian determinant at its quadrature and sampling points. Bad cells are
//! reported by their file id instead of producing NaN later.

use super::Mesh;
use crate::element::{jacobian_determinant, map_gradients, TableRule, MAX_NODES};
use rayon::prelude::*;

/// Why an element was rejected.
#[derive(Copy, Clone, Debug, PartialEq)]
pub enum BadElementKind {
    /// det J <= 0 somewhere: the node order is mirrored or the element folds over itself.
    Inverted,
    /// |det J| is negligible relative to the element's size^d, or not finite: collapsed element.
    Degenerate,
}

/// An element that failed the geometry check.
#[derive(Copy, Clone, Debug, PartialEq)]
pub struct BadElement {
    /// Cell index in the results file.
    pub file_cell: u32,
    /// Failure kind.
    pub kind: BadElementKind,
}

/// Relative determinant below which an element counts as collapsed: det J / h^d < 1e-10
/// (a flat element to round-off; common practice for mesh checks).
pub const DEGENERATE_RELATIVE_DET: f64 = 1e-10;

/// Checks every element and returns the bad ones (empty when all are valid), in file order.
pub fn check_geometry(mesh: &Mesh) -> Vec<BadElement> {
    let dim = mesh.dimension;
    let mut bad: Vec<BadElement> = mesh
        .blocks
        .iter()
        .flat_map(|block| {
            let kind = block.kind;
            let nn = kind.node_count();
            let rules = [TableRule::Full, TableRule::Sampling];
            (0..block.len())
                .into_par_iter()
                .filter_map(move |i| {
                    let nodes = block.cell(i);
                    let mut coords = [[0.0; 3]; MAX_NODES];
                    mesh.gather_coords(nodes, &mut coords[..nn]);
                    let h = element_size(&coords[..kind.vertex_count()]);
                    let scale = h.powi(dim as i32).max(f64::MIN_POSITIVE);
                    let mut worst = f64::INFINITY;
                    for rule in rules {
                        let table = kind.table(rule);
                        for k in 0..table.len() {
                            let det = jacobian_determinant(dim, &coords[..nn], table.dn_at(k));
                            let rel = det / scale;
                            if rel.is_nan() || rel < worst {
                                worst = rel;
                            }
                        }
                    }
                    let file_cell = mesh.file_cell[block.first_element + i];
                    if !worst.is_finite() || worst.abs() < DEGENERATE_RELATIVE_DET {
                        Some(BadElement {
                            file_cell,
                            kind: BadElementKind::Degenerate,
                        })
                    } else if worst < 0.0 {
                        Some(BadElement {
                            file_cell,
                            kind: BadElementKind::Inverted,
                        })
                    } else {
                        None
                    }
                })
                .collect::<Vec<_>>()
        })
        .collect();
    bad.sort_by_key(|b| b.file_cell);
    bad
}

/// Largest distance between two corners: a size scale for relative geometry tolerances.
pub(crate) fn element_size(corners: &[[f64; 3]]) -> f64 {
    let mut h2: f64 = 0.0;
    for (i, a) in corners.iter().enumerate() {
        for b in &corners[i + 1..] {
            let d2 = (0..3).map(|k| (a[k] - b[k]).powi(2)).sum::<f64>();
            h2 = h2.max(d2);
        }
    }
    h2.sqrt()
}

/// Reorders the corners (and mid nodes) of wedge cells written with the other handedness.
///
/// VTK's documentation puts the wedge's face (0, 1, 2) with its normal pointing away from
/// (3, 4, 5), and VTK 9.2 computes positive volumes for that order; VTK 9.7 and Gmsh use the
/// opposite order. Both occur in result files, and the order carries no other meaning, so a
/// wedge whose Jacobian is negative at every quadrature point is mirrored with
/// [`ElementKind::orientation_flip`](crate::element::ElementKind::orientation_flip) instead of
/// being rejected. Returns how many cells were reordered. Other kinds are left alone: for them a
/// negative Jacobian means an inverted element.
pub fn orient_wedges(mesh: &mut Mesh) -> usize {
    use crate::element::ElementKind;
    let dim = mesh.dimension;
    let points = &mesh.points;
    let mut count = 0;
    for block in &mut mesh.blocks {
        let kind = block.kind;
        if !matches!(kind, ElementKind::Wedge6 | ElementKind::Wedge15) {
            continue;
        }
        let nn = kind.node_count();
        let flip = kind.orientation_flip();
        let table = kind.table(TableRule::Full);
        count += block
            .nodes
            .par_chunks_mut(nn)
            .map(|cell| {
                let mut coords = [[0.0; 3]; MAX_NODES];
                for (c, &n) in coords.iter_mut().zip(cell.iter()) {
                    *c = points[n as usize];
                }
                let mut dn_phys = [[0.0; 3]; MAX_NODES];
                let all_negative = (0..table.len()).all(|k| {
                    map_gradients(dim, &coords[..nn], table.dn_at(k), &mut dn_phys[..nn]) < 0.0
                });
                if all_negative {
                    let old: [u32; MAX_NODES] =
                        std::array::from_fn(|i| if i < nn { cell[i] } else { 0 });
                    for (k, slot) in cell.iter_mut().enumerate() {
                        *slot = old[flip[k]];
                    }
                    1
                } else {
                    0
                }
            })
            .sum::<usize>();
    }
    count
}
