//! Extrusion of a triangle mesh through a thickness into wedges or conforming tetrahedra.
//!
//! Points live on a lattice of (2D point, level): level `2k` is the plane `z = k t / layers`,
//! odd levels the mid planes, used by quadratic kinds only. Quadratic kinds need a mid point on
//! every 2D edge: a Tri6 input brings its own (so mid nodes on arcs stay on the arcs), a Tri3
//! input gets the edge midpoints. Unused lattice points are dropped at the end.
//!
//! Tetrahedra: each prism is cut into three tetrahedra by the rule of Dompierre, Labbe, Vallet
//! & Camarero (1999), "How to subdivide pyramids, prisms and hexahedra into tetrahedra", 8th
//! International Meshing Roundtable: every quadrilateral side is cut by the diagonal through
//! its vertex of smallest global index. Two prisms sharing a side see the same four vertices and
//! cut it the same way, so the tetrahedral mesh is conforming.

use super::MeshError;
use crate::element::ElementKind;
use crate::mesh::{CellBlock, Mesh};
use std::collections::HashMap;

/// Extrudes a 2D triangle mesh (Tri3 or Tri6) through z in [0, thickness] with `layers` layers
/// into Wedge6/Wedge15 or conforming Tet4/Tet10 (each prism split into 3 tets with a rule that
/// makes neighbouring prisms' shared quad faces use the same diagonal, e.g. the
/// smallest-global-index-vertex rule of Dompierre et al. 1999, "How to subdivide pyramids,
/// prisms and hexahedra into tetrahedra").
///
/// The 2D mesh's z coordinates are ignored; clockwise triangles are taken in reverse. Element counts: `n_tri * layers` wedges or
/// `3 n_tri * layers` tetrahedra; zones are copied from the 2D elements, `file_cell` numbers the
/// new cells `0..`. Every element is oriented positive in VTK order: wedges with the bottom face
/// `(a, c, b)` for a counter-clockwise triangle `(a, b, c)` (the element module's reference wedge
/// has node 1 at `s = 1`, node 2 at `r = 1`), tetrahedra by the sign of their volume.
///
/// Errors: [`MeshError::UnsupportedKind`] for a 2D mesh with other kinds than Tri3/Tri6 or a
/// target kind other than Wedge6, Wedge15, Tet4, Tet10; [`MeshError::InvalidParameter`] for a
/// non-positive or non-finite thickness or zero layers.
pub fn extrude(
    mesh2d: &Mesh,
    thickness: f64,
    layers: usize,
    kind3d: ElementKind,
) -> Result<Mesh, MeshError> {
    use ElementKind::*;
    if !matches!(kind3d, Wedge6 | Wedge15 | Tet4 | Tet10) {
        return Err(MeshError::UnsupportedKind {
            kind: kind3d,
            expected: "extrusion makes wedge6, wedge15, tet4 or tet10",
        });
    }
    if let Some(b) = mesh2d
        .blocks
        .iter()
        .find(|b| !matches!(b.kind, Tri3 | Tri6))
    {
        return Err(MeshError::UnsupportedKind {
            kind: b.kind,
            expected: "extrusion takes a tri3 or tri6 mesh",
        });
    }
    if !(thickness > 0.0 && thickness.is_finite()) {
        return Err(MeshError::InvalidParameter {
            name: "thickness",
            value: thickness,
            expected: "a positive finite length",
        });
    }
    if layers == 0 {
        return Err(MeshError::InvalidParameter {
            name: "layers",
            value: 0.0,
            expected: "at least 1",
        });
    }
    let quadratic = kind3d.order() == 2;
    let base = PlanarPoints::new(mesh2d, quadratic);
    let levels = 2 * layers + 1;
    let mut lattice = Lattice {
        index: vec![u32::MAX; base.xy.len() * levels],
        levels,
        next: 0,
    };
    let tets = matches!(kind3d, Tet4 | Tet10);
    let mut nodes: Vec<u32> = Vec::new();
    let mut zone = Vec::new();
    for block in &mesh2d.blocks {
        for i in 0..block.len() {
            let tri = counter_clockwise(&block.cell(i)[..3], &base);
            let z = mesh2d.zone[block.first_element + i];
            for k in 0..layers {
                // Prism corners as (2D point, level): bottom a, c, b then top (wedge order).
                let corners: [(u32, usize); 6] = [
                    (tri[0], 2 * k),
                    (tri[2], 2 * k),
                    (tri[1], 2 * k),
                    (tri[0], 2 * k + 2),
                    (tri[2], 2 * k + 2),
                    (tri[1], 2 * k + 2),
                ];
                if tets {
                    for tet in split_prism(&corners, &mut lattice) {
                        let tet = orient_tet(tet, &base, thickness, layers);
                        push_cell(kind3d, &tet, &base, &mut lattice, &mut nodes);
                        zone.push(z);
                    }
                } else {
                    push_cell(kind3d, &corners, &base, &mut lattice, &mut nodes);
                    zone.push(z);
                }
            }
        }
    }
    let mut points = vec![[0.0; 3]; lattice.next as usize];
    for (p, xy) in base.xy.iter().enumerate() {
        for level in 0..levels {
            let id = lattice.index[p * levels + level];
            if id != u32::MAX {
                let zc = thickness * level as f64 / (levels - 1) as f64;
                points[id as usize] = [xy[0], xy[1], zc];
            }
        }
    }
    let count = zone.len();
    Ok(Mesh {
        points,
        blocks: vec![CellBlock {
            kind: kind3d,
            nodes,
            first_element: 0,
        }],
        file_cell: (0..count as u32).collect(),
        zone,
        dimension: 3,
    })
}

/// The 2D points (x, y) plus, for quadratic output, the mid point of every 2D edge.
struct PlanarPoints {
    xy: Vec<[f64; 2]>,
    /// Sorted 2D edge -> index in `xy` of its mid point.
    mid: HashMap<(u32, u32), u32>,
}

impl PlanarPoints {
    fn new(mesh2d: &Mesh, quadratic: bool) -> Self {
        let mut xy: Vec<[f64; 2]> = mesh2d.points.iter().map(|p| [p[0], p[1]]).collect();
        let mut mid = HashMap::new();
        if quadratic {
            for block in &mesh2d.blocks {
                let kind = block.kind;
                for i in 0..block.len() {
                    let cell = block.cell(i);
                    for (e, &[u, v]) in kind.edges().iter().enumerate() {
                        let key = edge_key(cell[u], cell[v]);
                        mid.entry(key).or_insert_with(|| {
                            if let Some(&m) = kind.edge_mid_nodes().get(e) {
                                cell[m]
                            } else {
                                let (p, q) = (xy[key.0 as usize], xy[key.1 as usize]);
                                xy.push([0.5 * (p[0] + q[0]), 0.5 * (p[1] + q[1])]);
                                (xy.len() - 1) as u32
                            }
                        });
                    }
                }
            }
        }
        Self { xy, mid }
    }
}

/// The triangle's corners, reordered to run counter-clockwise in the (x, y) plane.
fn counter_clockwise(tri: &[u32], base: &PlanarPoints) -> [u32; 3] {
    let p = |i: usize| base.xy[tri[i] as usize];
    let (a, b, c) = (p(0), p(1), p(2));
    let cross = (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0]);
    if cross < 0.0 {
        [tri[0], tri[2], tri[1]]
    } else {
        [tri[0], tri[1], tri[2]]
    }
}

/// Sorted pair.
fn edge_key(a: u32, b: u32) -> (u32, u32) {
    (a.min(b), a.max(b))
}

/// Global 3D node numbers of (2D point, level) pairs, handed out on first use.
struct Lattice {
    index: Vec<u32>,
    levels: usize,
    next: u32,
}

impl Lattice {
    fn id(&mut self, point: u32, level: usize) -> u32 {
        let slot = &mut self.index[point as usize * self.levels + level];
        if *slot == u32::MAX {
            *slot = self.next;
            self.next += 1;
        }
        *slot
    }
}

/// Mid node (2D point, level) of the edge between two corner (2D point, level) pairs:
/// horizontal edges use the 2D edge's mid point, vertical edges the mid level, and the
/// diagonals of the prism sides both.
fn mid_of(a: (u32, usize), b: (u32, usize), base: &PlanarPoints) -> (u32, usize) {
    let level = (a.1 + b.1) / 2;
    if a.0 == b.0 {
        (a.0, level)
    } else {
        (base.mid[&edge_key(a.0, b.0)], level)
    }
}

/// Appends one cell whose corners are given as (2D point, level), adding the mid nodes of
/// quadratic kinds in the kind's edge order.
fn push_cell(
    kind: ElementKind,
    corners: &[(u32, usize)],
    base: &PlanarPoints,
    lattice: &mut Lattice,
    nodes: &mut Vec<u32>,
) {
    for &(p, level) in corners {
        nodes.push(lattice.id(p, level));
    }
    for &[u, v] in kind.edges().iter().take(kind.edge_mid_nodes().len()) {
        let (p, level) = mid_of(corners[u], corners[v], base);
        nodes.push(lattice.id(p, level));
    }
}

/// The three tetrahedra of a prism given in wedge order (bottom 0, 1, 2; top 3, 4, 5 above
/// them), following Dompierre et al. (1999): rotate and mirror the prism so that its corner of
/// smallest global index is corner 0; the sides through corner 0 are then cut by diagonals from
/// corner 0, and the opposite side `1-2-5-4` by `1-5` if its smallest corner is 1 or 5, else by
/// `2-4`. Global indices are the 3D node numbers (the same for every prism sharing a corner).
fn split_prism(corners: &[(u32, usize); 6], lattice: &mut Lattice) -> [[(u32, usize); 4]; 3] {
    let ids: [u32; 6] = std::array::from_fn(|i| lattice.id(corners[i].0, corners[i].1));
    let smallest = (0..6).min_by_key(|&i| ids[i]).unwrap_or(0);
    // Relabelling that brings the smallest corner to position 0: a rotation of the triangle,
    // combined with swapping bottom and top when it is on the top.
    let (tri, top) = (smallest % 3, smallest >= 3);
    let map = |i: usize| -> usize {
        let layer = (i / 3 == 1) != top;
        (i % 3 + tri) % 3 + if layer { 3 } else { 0 }
    };
    let c: [(u32, usize); 6] = std::array::from_fn(|i| corners[map(i)]);
    let id: [u32; 6] = std::array::from_fn(|i| ids[map(i)]);
    let side_min = [id[1], id[2], id[4], id[5]]
        .into_iter()
        .min()
        .unwrap_or(id[1]);
    let pick = |ix: [usize; 4]| ix.map(|i| c[i]);
    if side_min == id[1] || side_min == id[5] {
        [pick([0, 1, 2, 5]), pick([0, 1, 5, 4]), pick([0, 4, 5, 3])]
    } else {
        [pick([0, 1, 2, 4]), pick([0, 4, 2, 5]), pick([0, 4, 5, 3])]
    }
}

/// Swaps two corners of a tetrahedron whose signed volume `(x1-x0) . ((x2-x0) x (x3-x0))` is
/// negative, so it is positive in VTK order (face 0-1-2 with its normal towards corner 3).
fn orient_tet(
    mut tet: [(u32, usize); 4],
    base: &PlanarPoints,
    thickness: f64,
    layers: usize,
) -> [(u32, usize); 4] {
    let pos = |c: (u32, usize)| {
        let p = base.xy[c.0 as usize];
        [p[0], p[1], thickness * c.1 as f64 / (2 * layers) as f64]
    };
    let x: [[f64; 3]; 4] = tet.map(pos);
    let d = |i: usize| -> [f64; 3] { std::array::from_fn(|k| x[i][k] - x[0][k]) };
    let (a, b, c) = (d(1), d(2), d(3));
    let volume = a[0] * (b[1] * c[2] - b[2] * c[1]) - a[1] * (b[0] * c[2] - b[2] * c[0])
        + a[2] * (b[0] * c[1] - b[1] * c[0]);
    if volume < 0.0 {
        tet.swap(1, 2);
    }
    tet
}
