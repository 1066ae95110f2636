//! Angles of one element and of the material around a node or an edge, measured with the
//! element's own map so that curved (quadratic) edges and faces count with their true tangents.
//!
//! A straight line in the reference element through the natural point `xi` in the direction
//! `d` maps to a curve with tangent `t_b = sum_a d_a J_ab(xi)` at `xi`, where
//! `J_ab = dx_b/dxi_a = sum_i dN_i/dxi_a x_ib` (common practice: the chain rule). Every edge and
//! every face of a reference element is straight or flat, so:
//! - the corner angle of a 2D element at vertex `v` is the angle between the tangents of its two
//!   edges leaving `v`, both mapped at `xi_v`;
//! - the dihedral angle of a 3D element at its edge `(a, b)` is the angle between the two faces
//!   through that edge, measured at the edge's natural midpoint: each face gives the direction of
//!   one of its other corners, mapped and made perpendicular to the edge tangent.
//!
//! Angles between two vectors use `atan2(|u x w|, u . w)`, accurate near 0 and pi.
//! A straight-sided element gives its plain geometric angles exactly (to round-off).

use crate::element::{ElementKind, MAX_NODES};
use crate::mesh::{Mesh, NodeElements};

/// `J^T d`: the physical tangent of the reference direction `d` at the point where `j` was
/// evaluated.
#[inline]
fn push_forward(j: &[[f64; 3]; 3], d: [f64; 3]) -> [f64; 3] {
    let mut t = [0.0; 3];
    for a in 0..3 {
        for b in 0..3 {
            t[b] += d[a] * j[a][b];
        }
    }
    t
}

/// `J_ab = sum_i dN_i/dxi_a x_ib` at the natural point `xi` (rows beyond the kind's dimension
/// stay zero; all three physical columns are kept).
#[inline]
fn jacobian_at(kind: ElementKind, coords: &[[f64; 3]], xi: [f64; 3]) -> [[f64; 3]; 3] {
    let nn = kind.node_count();
    let mut dn = [[0.0; 3]; MAX_NODES];
    kind.shape_gradients(xi, &mut dn[..nn]);
    let mut j = [[0.0; 3]; 3];
    for (g, x) in dn[..nn].iter().zip(coords) {
        for a in 0..kind.dim() {
            for b in 0..3 {
                j[a][b] += g[a] * x[b];
            }
        }
    }
    j
}

#[inline]
fn sub(a: [f64; 3], b: [f64; 3]) -> [f64; 3] {
    [a[0] - b[0], a[1] - b[1], a[2] - b[2]]
}

#[inline]
fn dot(a: [f64; 3], b: [f64; 3]) -> f64 {
    a[0] * b[0] + a[1] * b[1] + a[2] * b[2]
}

#[inline]
fn cross(a: [f64; 3], b: [f64; 3]) -> [f64; 3] {
    [
        a[1] * b[2] - a[2] * b[1],
        a[2] * b[0] - a[0] * b[2],
        a[0] * b[1] - a[1] * b[0],
    ]
}

/// Angle between two vectors in `[0, pi]`, `atan2(|u x w|, u . w)`; 0 when one is zero.
#[inline]
pub(crate) fn angle_between(u: [f64; 3], w: [f64; 3]) -> f64 {
    dot(cross(u, w), cross(u, w)).sqrt().atan2(dot(u, w))
}

/// Corner angle (radians) of a 2D element at its local vertex `v`: the angle between the mapped
/// tangents of the two element edges that leave `v` (module docs).
pub(crate) fn corner_angle(kind: ElementKind, coords: &[[f64; 3]], v: usize) -> f64 {
    let reference = kind.reference_nodes();
    let j = jacobian_at(kind, coords, reference[v]);
    let mut tangents = [[0.0; 3]; 2];
    let mut found = 0;
    for &[a, b] in kind.edges() {
        let other = if a == v {
            b
        } else if b == v {
            a
        } else {
            continue;
        };
        if found < 2 {
            tangents[found] = push_forward(&j, sub(reference[other], reference[v]));
        }
        found += 1;
    }
    angle_between(tangents[0], tangents[1])
}

/// Dihedral angle (radians) of a 3D element at its edge between local vertices `a` and `b`:
/// the angle between the two element faces through the edge, at the edge's natural midpoint
/// (module docs). `None` when the element does not have exactly two faces through that edge.
pub(crate) fn dihedral_angle(
    kind: ElementKind,
    coords: &[[f64; 3]],
    a: usize,
    b: usize,
) -> Option<f64> {
    let reference = kind.reference_nodes();
    let (ra, rb) = (reference[a], reference[b]);
    let mid = [
        0.5 * (ra[0] + rb[0]),
        0.5 * (ra[1] + rb[1]),
        0.5 * (ra[2] + rb[2]),
    ];
    let j = jacobian_at(kind, coords, mid);
    let t = push_forward(&j, sub(rb, ra));
    let tt = dot(t, t);
    let mut normals = [[0.0; 3]; 2];
    let mut found = 0;
    for facet in kind.facets() {
        if !(facet.corners.contains(&a) && facet.corners.contains(&b)) {
            continue;
        }
        let c = facet.corners.iter().copied().find(|&c| c != a && c != b)?;
        if found < 2 {
            let u = push_forward(&j, sub(reference[c], ra));
            let along = if tt > 0.0 { dot(u, t) / tt } else { 0.0 };
            normals[found] = [
                u[0] - along * t[0],
                u[1] - along * t[1],
                u[2] - along * t[2],
            ];
        }
        found += 1;
    }
    (found == 2).then(|| angle_between(normals[0], normals[1]))
}

/// Local vertex index of global `node` in an element's vertex list.
#[inline]
fn local_vertex(kind: ElementKind, nodes: &[u32], node: u32) -> Option<usize> {
    nodes[..kind.vertex_count()].iter().position(|&n| n == node)
}

/// Interior angle (radians) of the material around the vertex node `node` of a 2D mesh: the sum
/// of the corner angles of every element having `node` as a vertex. `2 pi` inside the mesh,
/// `pi` on a straight boundary, above `pi` at a re-entrant corner.
pub(crate) fn interior_angle(mesh: &Mesh, adjacency: &NodeElements, node: u32) -> f64 {
    let mut coords = [[0.0; 3]; MAX_NODES];
    let mut sum = 0.0;
    for &e in adjacency.of(node as usize) {
        let (kind, nodes) = mesh.element(e as usize);
        if let Some(v) = local_vertex(kind, nodes, node) {
            mesh.gather_coords(nodes, &mut coords);
            sum += corner_angle(kind, &coords[..nodes.len()], v);
        }
    }
    sum
}

/// Interior dihedral angle (radians) of the material around the edge between vertex nodes `a`
/// and `b` of a 3D mesh: the sum of the dihedral angles of every element that has `(a, b)` as
/// one of its edges. Elements sharing both nodes only through a face diagonal do not count.
pub(crate) fn edge_interior_angle(mesh: &Mesh, adjacency: &NodeElements, a: u32, b: u32) -> f64 {
    let (la, lb) = (adjacency.of(a as usize), adjacency.of(b as usize));
    let mut coords = [[0.0; 3]; MAX_NODES];
    let mut sum = 0.0;
    let (mut i, mut k) = (0, 0);
    while i < la.len() && k < lb.len() {
        match la[i].cmp(&lb[k]) {
            std::cmp::Ordering::Less => i += 1,
            std::cmp::Ordering::Greater => k += 1,
            std::cmp::Ordering::Equal => {
                let (kind, nodes) = mesh.element(la[i] as usize);
                i += 1;
                k += 1;
                let (Some(va), Some(vb)) =
                    (local_vertex(kind, nodes, a), local_vertex(kind, nodes, b))
                else {
                    continue;
                };
                let is_edge = kind
                    .edges()
                    .iter()
                    .any(|&[p, q]| (p == va && q == vb) || (p == vb && q == va));
                if !is_edge {
                    continue;
                }
                mesh.gather_coords(nodes, &mut coords);
                if let Some(angle) = dihedral_angle(kind, &coords[..nodes.len()], va, vb) {
                    sum += angle;
                }
            }
        }
    }
    sum
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::f64::consts::PI;

    /// Round-off of a few products of unit-size numbers.
    const TOL: f64 = 1e-12;

    #[test]
    fn straight_elements_give_plain_angles() {
        // unit right triangle: 90 deg at node 0, 45 deg at nodes 1 and 2 (plane geometry)
        let tri = [[0.0, 0.0, 0.0], [1.0, 0.0, 0.0], [0.0, 1.0, 0.0]];
        assert!((corner_angle(ElementKind::Tri3, &tri, 0) - PI / 2.0).abs() < TOL);
        assert!((corner_angle(ElementKind::Tri3, &tri, 1) - PI / 4.0).abs() < TOL);
        // the same triangle as tri6 with mid nodes at the edge midpoints: same angles
        let tri6 = [
            tri[0],
            tri[1],
            tri[2],
            [0.5, 0.0, 0.0],
            [0.5, 0.5, 0.0],
            [0.0, 0.5, 0.0],
        ];
        assert!((corner_angle(ElementKind::Tri6, &tri6, 2) - PI / 4.0).abs() < TOL);
        // parallelogram quad with a 60 deg corner at node 0 and 120 deg at node 1
        let c = [0.5, 3f64.sqrt() / 2.0];
        let quad = [
            [0.0, 0.0, 0.0],
            [1.0, 0.0, 0.0],
            [1.0 + c[0], c[1], 0.0],
            [c[0], c[1], 0.0],
        ];
        assert!((corner_angle(ElementKind::Quad4, &quad, 0) - PI / 3.0).abs() < TOL);
        assert!((corner_angle(ElementKind::Quad4, &quad, 1) - 2.0 * PI / 3.0).abs() < TOL);
    }

    #[test]
    fn curved_edge_counts_with_its_tangent() {
        // tri6 whose edge 0-1 bulges: mid node 3 at (0.5, -0.25). The edge is the parabola
        // x = s, y = -s (1 - s), tangent (1, -1) at node 0, so the corner angle at node 0 is
        // 90 + 45 = 135 deg instead of the chord's 90 (derivation above).
        let tri6 = [
            [0.0, 0.0, 0.0],
            [1.0, 0.0, 0.0],
            [0.0, 1.0, 0.0],
            [0.5, -0.25, 0.0],
            [0.5, 0.5, 0.0],
            [0.0, 0.5, 0.0],
        ];
        let angle = corner_angle(ElementKind::Tri6, &tri6, 0);
        assert!((angle - 0.75 * PI).abs() < TOL, "{}", angle.to_degrees());
    }

    #[test]
    fn dihedral_angles_of_a_unit_tetrahedron_and_cube() {
        // corner tetrahedron (0,0,0), (1,0,0), (0,1,0), (0,0,1): 90 deg at the edges along the
        // axes, acos(1/sqrt 3) = 54.7356 deg at the edges of the slanted face (plane geometry)
        let tet = [
            [0.0, 0.0, 0.0],
            [1.0, 0.0, 0.0],
            [0.0, 1.0, 0.0],
            [0.0, 0.0, 1.0],
        ];
        let axis = dihedral_angle(ElementKind::Tet4, &tet, 0, 1).unwrap();
        assert!((axis - PI / 2.0).abs() < TOL);
        let slanted = dihedral_angle(ElementKind::Tet4, &tet, 1, 2).unwrap();
        assert!((slanted - (1.0 / 3f64.sqrt()).acos()).abs() < TOL);
        // unit cube as hex8: every edge 90 deg
        let hex: Vec<[f64; 3]> = [
            [0., 0., 0.],
            [1., 0., 0.],
            [1., 1., 0.],
            [0., 1., 0.],
            [0., 0., 1.],
            [1., 0., 1.],
            [1., 1., 1.],
            [0., 1., 1.],
        ]
        .to_vec();
        for &[a, b] in ElementKind::Hex8.edges() {
            let d = dihedral_angle(ElementKind::Hex8, &hex, a, b).unwrap();
            assert!((d - PI / 2.0).abs() < TOL);
        }
    }
}
