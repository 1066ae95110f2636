//! The nodal size field of the next mesh and what it will cost.
//!
//! Element targets become a field on the mesh vertices (the minimum over the elements around a
//! vertex, so no element gets a coarser size than it asked for), non-vertex nodes take the value
//! a linear interpolation of the corners gives (what a mesher reading the field sees), and the
//! element count of the next mesh is predicted from that final field by integrating
//! `1 / regular_measure(h(x))` over the domain (method sheet 3.5: count from the size field,
//! then nodes from the count).

use rayon::prelude::*;

use crate::element::{
    jacobian_determinant, mid_nodes_at_midpoints, ElementKind, ShapeTable, TableRule, MAX_NODES,
};
use crate::mesh::Mesh;

/// Vertex field from element sizes: `h_v = min over elements K containing v of h_K`.
/// Non-vertex nodes and nodes in no element are left at `+inf`; see [`interpolate_non_vertex`].
pub fn vertex_minimum(mesh: &Mesh, element_sizes: &[f64]) -> Vec<f64> {
    let mut field = vec![f64::INFINITY; mesh.node_count()];
    for b in &mesh.blocks {
        let nv = b.kind.vertex_count();
        for c in 0..b.len() {
            let h = element_sizes[b.first_element + c];
            for &n in &b.cell(c)[..nv] {
                let slot = &mut field[n as usize];
                if h < *slot {
                    *slot = h;
                }
            }
        }
    }
    field
}

/// Linear interpolation weights of the corners at each non-vertex node of `kind`:
/// row j (for local node `vertex_count + j`) holds the linear kind's shape functions there.
fn non_vertex_weights(kind: ElementKind) -> Vec<[f64; 8]> {
    let linear = kind.linear();
    let nv = kind.vertex_count();
    kind.reference_nodes()[nv..]
        .iter()
        .map(|&xi| {
            let mut n = [0.0; MAX_NODES];
            linear.shape_functions(xi, &mut n[..nv]);
            let mut row = [0.0; 8];
            row[..nv].copy_from_slice(&n[..nv]);
            row
        })
        .collect()
}

/// Gives every non-vertex node (mid-side, face and body nodes) the value of the linear
/// interpolation of its element's corner sizes, and nodes in no element the largest size of
/// the field (they carry no element, so any value is harmless; this one never refines).
pub fn interpolate_non_vertex(mesh: &Mesh, field: &mut [f64]) {
    for b in &mesh.blocks {
        let nv = b.kind.vertex_count();
        let weights = non_vertex_weights(b.kind);
        if weights.is_empty() {
            continue;
        }
        for c in 0..b.len() {
            let nodes = b.cell(c);
            let mut corner = [0.0; 8];
            for (v, h) in corner[..nv].iter_mut().enumerate() {
                *h = field[nodes[v] as usize];
            }
            for (j, row) in weights.iter().enumerate() {
                let h: f64 = (0..nv).map(|v| row[v] * corner[v]).sum();
                field[nodes[nv + j] as usize] = h;
            }
        }
    }
    let largest = field
        .iter()
        .copied()
        .filter(|h| h.is_finite())
        .fold(0.0_f64, f64::max);
    for h in field.iter_mut().filter(|h| !h.is_finite()) {
        *h = largest;
    }
}

/// Size of each element under a nodal field: the mean of its corner values (the linear
/// interpolation's mean over a simplex; used for marks and the per-element `size_target`).
pub fn element_sizes(mesh: &Mesh, field: &[f64]) -> Vec<f64> {
    (0..mesh.element_count())
        .into_par_iter()
        .map(|e| {
            let (kind, nodes) = mesh.element(e);
            let nv = kind.vertex_count();
            nodes[..nv].iter().map(|&n| field[n as usize]).sum::<f64>() / nv as f64
        })
        .collect()
}

/// One block's part of [`ElementCounter`].
struct BlockCounter {
    /// Block index in the mesh.
    block: usize,
    /// Vertices per element.
    vertices: usize,
    /// Points per element.
    points: usize,
    /// Linear (corner) shape functions at each point, `points x vertices`.
    corner_n: Vec<f64>,
    /// `w_k |det J_k|` per element and point, element-major.
    weighted_det: Vec<f64>,
}

/// Square of the largest distance between two corners: the element size the straight-sides
/// test is relative to (as in the strain kernel).
fn corner_size_sq(corners: &[[f64; 3]]) -> f64 {
    let mut h2: f64 = 0.0;
    for (a, p) in corners.iter().enumerate() {
        for q in &corners[a + 1..] {
            h2 = h2.max((0..3).map(|c| (p[c] - q[c]).powi(2)).sum());
        }
    }
    h2
}

/// Predicts the element count a mesher makes from a nodal size field (method sheet 3.5):
/// `N = sum_K integral_K dx / regular_measure(h(x))`, with `h` interpolated linearly from the
/// corners (as meshers interpolate a background field) and the integral taken with the degree-2
/// rule of the element's linear kind on the element's exact geometry (the size varies by a few
/// percent across one element once graded, so a degree-2 rule is ample).
/// `regular_measure` is the measure of a well-shaped element of edge `h`
/// ([`ElementKind::regular_measure`]). The geometry part (`w_k |det J_k|`) is computed once, so
/// a plan can evaluate many candidate fields cheaply. Per-element terms are summed in element
/// order, so the count does not depend on the number of threads.
pub struct ElementCounter {
    blocks: Vec<BlockCounter>,
}

impl ElementCounter {
    /// Tabulates the quadrature weights times Jacobian determinants of every element.
    pub fn new(mesh: &Mesh) -> Self {
        let blocks = mesh
            .blocks
            .iter()
            .enumerate()
            .map(|(block, b)| {
                let linear = b.kind.linear();
                let rule = linear.table(TableRule::Full);
                let own = ShapeTable::new(b.kind, rule.points.clone(), rule.weights.clone());
                let nv = b.kind.vertex_count();
                let nn = b.kind.node_count();
                let dim = b.kind.dim();
                let points = rule.len();
                let corner_n: Vec<f64> = (0..points)
                    .flat_map(|k| rule.n_at(k)[..nv].to_vec())
                    .collect();
                // Simplices with straight edges (every mid-edge node at its edge's midpoint,
                // the usual case) have a constant Jacobian: one determinant of the corners
                // instead of one of all nodes per point.
                let simplex = matches!(linear, ElementKind::Tri3 | ElementKind::Tet4);
                let mut weighted_det = vec![0.0; b.len() * points];
                weighted_det
                    .par_chunks_mut(points)
                    .enumerate()
                    .for_each(|(c, out)| {
                        let nodes = b.cell(c);
                        let mut coords = [[0.0; 3]; MAX_NODES];
                        mesh.gather_coords(nodes, &mut coords[..nn]);
                        let straight = simplex && {
                            let h2 = corner_size_sq(&coords[..nv]);
                            mid_nodes_at_midpoints(b.kind, |i| coords[i], h2)
                        };
                        let constant = if straight {
                            jacobian_determinant(dim, &coords[..nv], rule.dn_at(0)).abs()
                        } else {
                            0.0
                        };
                        for (k, w) in out.iter_mut().enumerate() {
                            *w = own.weights[k]
                                * if straight {
                                    constant
                                } else {
                                    jacobian_determinant(dim, &coords[..nn], own.dn_at(k)).abs()
                                };
                        }
                    });
                BlockCounter {
                    block,
                    vertices: nv,
                    points,
                    corner_n,
                    weighted_det,
                }
            })
            .collect();
        Self { blocks }
    }

    /// Predicted number of elements for the nodal field `field` (target edge length per node).
    pub fn count(&self, mesh: &Mesh, field: &[f64]) -> f64 {
        let mut total = 0.0;
        for bc in &self.blocks {
            let b = &mesh.blocks[bc.block];
            let (nv, np) = (bc.vertices, bc.points);
            let terms: Vec<f64> = (0..b.len())
                .into_par_iter()
                .map(|c| {
                    let nodes = b.cell(c);
                    let mut corner = [0.0; 8];
                    for (v, h) in corner[..nv].iter_mut().enumerate() {
                        *h = field[nodes[v] as usize];
                    }
                    let wdet = &bc.weighted_det[c * np..(c + 1) * np];
                    let mut sum = 0.0;
                    for (k, w) in wdet.iter().enumerate() {
                        let n = &bc.corner_n[k * nv..(k + 1) * nv];
                        let h: f64 = (0..nv).map(|v| n[v] * corner[v]).sum();
                        sum += w / b.kind.regular_measure(h);
                    }
                    sum
                })
                .collect();
            total += terms.iter().sum::<f64>();
        }
        total
    }
}

/// Predicted number of elements of a mesh that follows the nodal size field `field`; see
/// [`ElementCounter`] (use it directly to evaluate several fields on one mesh).
pub fn predicted_elements(mesh: &Mesh, field: &[f64]) -> f64 {
    ElementCounter::new(mesh).count(mesh, field)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::mesh::generate::structured;

    /// A uniform field equal to the current size predicts the current count: a unit square of
    /// 8 x 8 quad4 (size 1/8) holds 64 squares of edge 1/8 (elementary geometry).
    #[test]
    fn uniform_field_on_squares_predicts_the_current_count() {
        let mesh = structured(ElementKind::Quad9, [8, 8, 1], [1.0, 1.0, 1.0]);
        let sizes = mesh.size_now();
        let mut field = vertex_minimum(&mesh, &sizes);
        interpolate_non_vertex(&mesh, &mut field);
        let n = predicted_elements(&mesh, &field);
        assert!((n - 64.0).abs() < 1e-9 * 64.0, "{n}");
        // Halving the size quadruples the count in 2D.
        let half: Vec<f64> = field.iter().map(|h| h / 2.0).collect();
        let n2 = predicted_elements(&mesh, &half);
        assert!((n2 - 256.0).abs() < 1e-9 * 256.0, "{n2}");
    }

    /// Tetrahedra: a unit cube at edge h holds 1 / (h^3 / (6 sqrt 2)) regular tetrahedra
    /// (elementary geometry; the count a mesher reaches is this up to the shape of its tets).
    #[test]
    fn tet_count_uses_the_regular_tetrahedron() {
        let mesh = structured(ElementKind::Tet10, [3, 3, 3], [1.0, 1.0, 1.0]);
        let field = vec![0.1; mesh.node_count()];
        let n = predicted_elements(&mesh, &field);
        let expected = 6.0 * 2f64.sqrt() / 1e-3;
        assert!((n - expected).abs() < 1e-9 * expected, "{n} vs {expected}");
    }

    /// Curved elements take the general path (a Jacobian per point): moving an interior mid-edge
    /// node keeps the mesh's volume (the elements around the edge gain what the others lose), so
    /// the count stays that of the straight mesh up to the rule's error on the cubic det J.
    #[test]
    fn curved_tets_count_like_straight_ones() {
        let mut mesh = structured(ElementKind::Tet10, [3, 3, 3], [1.0, 1.0, 1.0]);
        let centre = [0.5, 0.5, 0.5];
        let (e, mid) = (0..mesh.element_count())
            .find_map(|e| {
                let (kind, nodes) = mesh.element(e);
                kind.edge_mid_nodes().iter().find_map(|&m| {
                    let p = mesh.points[nodes[m] as usize];
                    (crate::mesh::distance(&p, &centre) < 0.2).then_some((e, nodes[m]))
                })
            })
            .expect("an interior mid-edge node");
        mesh.points[mid as usize][0] += 0.01;
        let (kind, nodes) = mesh.element(e);
        let mut coords = [[0.0; 3]; MAX_NODES];
        mesh.gather_coords(nodes, &mut coords[..kind.node_count()]);
        let h2 = corner_size_sq(&coords[..kind.vertex_count()]);
        assert!(!mid_nodes_at_midpoints(kind, |i| coords[i], h2));
        let field = vec![0.1; mesh.node_count()];
        let n = predicted_elements(&mesh, &field);
        let expected = 6.0 * 2f64.sqrt() / 1e-3;
        assert!((n - expected).abs() < 1e-4 * expected, "{n} vs {expected}");
    }

    /// Mid-side nodes take the mean of their edge ends; the vertex minimum never exceeds the
    /// size of any element around the vertex.
    #[test]
    fn vertex_minimum_and_mid_nodes() {
        let mesh = structured(ElementKind::Tri6, [4, 4, 1], [1.0, 1.0, 1.0]);
        let element: Vec<f64> = (0..mesh.element_count())
            .map(|e| 0.1 + 0.01 * e as f64)
            .collect();
        let mut field = vertex_minimum(&mesh, &element);
        interpolate_non_vertex(&mesh, &mut field);
        for e in 0..mesh.element_count() {
            let (kind, nodes) = mesh.element(e);
            for &n in &nodes[..3] {
                assert!(field[n as usize] <= element[e]);
            }
            for (i, [a, b]) in kind.edges().iter().enumerate() {
                let m = nodes[kind.edge_mid_nodes()[i]] as usize;
                let mean = 0.5 * (field[nodes[*a] as usize] + field[nodes[*b] as usize]);
                assert!((field[m] - mean).abs() <= 1e-15 * mean);
            }
        }
    }
}
