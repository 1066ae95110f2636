//! Joining blocks (merging coincident points) and measuring a mesh (total area or volume).

use crate::element::{map_gradients, TableRule, MAX_NODES};
use crate::mesh::Mesh;
use std::collections::HashMap;

/// Merges points closer than tol (relative to the bounding-box diagonal) and renumbers; for
/// assembling blocks.
///
/// Points are visited in index order; each point is merged into the lowest-numbered earlier
/// point kept that lies within `relative_tolerance * diagonal` (Euclidean distance), found
/// through a uniform grid of cells of that size (a candidate is in the same or a neighbouring
/// cell). Kept points keep their relative order and coordinates; the cells' connectivity is
/// rewritten. With `relative_tolerance <= 0` only points with identical coordinates merge. The
/// result does not depend on the hash map's iteration order (it is only looked up).
pub fn merge_coincident(mesh: &mut Mesh, relative_tolerance: f64) {
    if mesh.points.is_empty() {
        return;
    }
    let (lo, hi) = mesh.bounding_box();
    let diagonal = (0..3).map(|k| (hi[k] - lo[k]).powi(2)).sum::<f64>().sqrt();
    let tol = relative_tolerance * diagonal;
    let mut new_index = vec![0u32; mesh.points.len()];
    let mut kept: Vec<[f64; 3]> = Vec::new();
    if tol > 0.0 && tol.is_finite() {
        let key = |p: &[f64; 3]| -> [i64; 3] {
            std::array::from_fn(|k| ((p[k] - lo[k]) / tol).floor() as i64)
        };
        let mut grid: HashMap<[i64; 3], Vec<u32>> = HashMap::new();
        for (i, p) in mesh.points.iter().enumerate() {
            let c = key(p);
            let mut found: Option<u32> = None;
            for dx in -1..=1 {
                for dy in -1..=1 {
                    for dz in -1..=1 {
                        let Some(list) = grid.get(&[c[0] + dx, c[1] + dy, c[2] + dz]) else {
                            continue;
                        };
                        for &j in list {
                            let q = kept[j as usize];
                            let d2 = (0..3).map(|k| (p[k] - q[k]).powi(2)).sum::<f64>();
                            if d2 <= tol * tol && found.is_none_or(|f| j < f) {
                                found = Some(j);
                            }
                        }
                    }
                }
            }
            new_index[i] = match found {
                Some(j) => j,
                None => {
                    let j = kept.len() as u32;
                    kept.push(*p);
                    grid.entry(c).or_default().push(j);
                    j
                }
            };
        }
    } else {
        // Exact duplicates only; -0.0 and 0.0 are the same coordinate.
        let bits = |p: &[f64; 3]| p.map(|v| (v + 0.0).to_bits());
        let mut seen: HashMap<[u64; 3], u32> = HashMap::new();
        for (i, p) in mesh.points.iter().enumerate() {
            new_index[i] = *seen.entry(bits(p)).or_insert_with(|| {
                kept.push(*p);
                (kept.len() - 1) as u32
            });
        }
    }
    mesh.points = kept;
    for block in &mut mesh.blocks {
        for n in &mut block.nodes {
            *n = new_index[*n as usize];
        }
    }
}

/// Total area (2D) or volume (3D) of the mesh: the sum over elements of
/// `sum_q w_q det J(xi_q)` with the kind's full quadrature rule (the isoparametric measure;
/// exact for affine elements and for the curved 2D quadratic elements made here, whose `det J`
/// is a polynomial of a degree the rule integrates exactly). Inverted parts count negative.
pub fn measure(mesh: &Mesh) -> f64 {
    let dim = mesh.dimension;
    let mut total = 0.0;
    for block in &mesh.blocks {
        let kind = block.kind;
        let nn = kind.node_count();
        let table = kind.table(TableRule::Full);
        let mut coords = [[0.0; 3]; MAX_NODES];
        let mut dn_phys = [[0.0; 3]; MAX_NODES];
        for i in 0..block.len() {
            mesh.gather_coords(block.cell(i), &mut coords[..nn]);
            for k in 0..table.len() {
                let det = map_gradients(dim, &coords[..nn], table.dn_at(k), &mut dn_phys[..nn]);
                total += table.weights[k] * det;
            }
        }
    }
    total
}
