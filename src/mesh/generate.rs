//! Structured meshes of a rectangle or a box in every element kind, for tests, benchmarks and
//! the reference problems.
//!
//! Every kind is built on one lattice of "fine" points with two steps per cell and direction.
//! A reference node of an element is placed by the element's corner (linear) shape functions
//! applied to the fine indices of its corners, so mid-side, face and body nodes land on lattice
//! points; lattice points no cell uses are dropped at the end. Squares split into two triangles,
//! cubes into six tetrahedra around the main diagonal (Kuhn's subdivision, conforming across
//! cells), square prisms into two wedges. Orientation is checked with the Jacobian so that every
//! element is positive in VTK node order.

use super::{CellBlock, Mesh};
use crate::element::{map_gradients, ElementKind, MAX_NODES};

/// The linear kind whose shape functions place the nodes of `kind`.
fn corner_kind(kind: ElementKind) -> ElementKind {
    use ElementKind::*;
    match kind {
        Tri3 | Tri6 => Tri3,
        Quad4 | Quad8 | Quad9 => Quad4,
        Tet4 | Tet10 => Tet4,
        Hex8 | Hex20 | Hex27 => Hex8,
        Wedge6 | Wedge15 => Wedge6,
    }
}

/// Corner lattice offsets (in units of cells) of the simplices/prisms filling one cell.
fn cell_pieces(kind: ElementKind) -> Vec<Vec<[usize; 3]>> {
    use ElementKind::*;
    let sq = |a: [usize; 2]| [a[0], a[1], 0];
    match corner_kind(kind) {
        Tri3 => vec![
            vec![sq([0, 0]), sq([1, 0]), sq([1, 1])],
            vec![sq([0, 0]), sq([1, 1]), sq([0, 1])],
        ],
        Quad4 => vec![vec![sq([0, 0]), sq([1, 0]), sq([1, 1]), sq([0, 1])]],
        Hex8 => vec![vec![
            [0, 0, 0],
            [1, 0, 0],
            [1, 1, 0],
            [0, 1, 0],
            [0, 0, 1],
            [1, 0, 1],
            [1, 1, 1],
            [0, 1, 1],
        ]],
        Wedge6 => {
            let tris = [[[0, 0], [1, 0], [1, 1]], [[0, 0], [1, 1], [0, 1]]];
            tris.iter()
                .map(|t| {
                    let mut v: Vec<[usize; 3]> = t.iter().map(|p| [p[0], p[1], 0]).collect();
                    v.extend(t.iter().map(|p| [p[0], p[1], 1]));
                    v
                })
                .collect()
        }
        Tet4 => {
            let perms = [
                [0, 1, 2],
                [0, 2, 1],
                [1, 0, 2],
                [1, 2, 0],
                [2, 0, 1],
                [2, 1, 0],
            ];
            perms
                .iter()
                .map(|p| {
                    let mut v = vec![[0usize; 3]];
                    let mut cur = [0usize; 3];
                    for &axis in p {
                        cur[axis] = 1;
                        v.push(cur);
                    }
                    v
                })
                .collect()
        }
        _ => unreachable!("corner_kind returns a linear kind"),
    }
}

/// Swaps corners so that a piece has positive orientation in VTK order.
fn flip(kind: ElementKind, corners: &mut [[usize; 3]]) {
    match corner_kind(kind) {
        ElementKind::Wedge6 => {
            corners.swap(1, 2);
            corners.swap(4, 5);
        }
        _ => corners.swap(1, 2),
    }
}

/// A structured mesh of `[0, lx] x [0, ly]` (2D kinds, `nz` ignored, z = 0) or
/// `[0, lx] x [0, ly] x [0, lz]` (3D kinds) with `n` cells per direction.
///
/// Cell counts: quads and hexes one element per cell; triangles two, tetrahedra six, wedges two.
pub fn structured(kind: ElementKind, n: [usize; 3], size: [f64; 3]) -> Mesh {
    let dim = kind.dim();
    let cells = [
        n[0].max(1),
        n[1].max(1),
        if dim == 3 { n[2].max(1) } else { 1 },
    ];
    let fine = [
        2 * cells[0] + 1,
        2 * cells[1] + 1,
        if dim == 3 { 2 * cells[2] + 1 } else { 1 },
    ];
    let lattice = |i: [usize; 3]| i[0] + fine[0] * (i[1] + fine[1] * i[2]);
    let ck = corner_kind(kind);
    let nn = kind.node_count();
    let mut weights = vec![0.0; ck.node_count()];
    let ref_nodes = kind.reference_nodes();
    let mut conn: Vec<u32> = Vec::new();
    let mut used = vec![u32::MAX; fine[0] * fine[1] * fine[2]];
    let mut next = 0u32;
    let mut local = [0u32; MAX_NODES];
    for k in 0..cells[2] {
        for j in 0..cells[1] {
            for i in 0..cells[0] {
                for mut piece in cell_pieces(kind) {
                    let fine_corner = |c: &[usize; 3]| {
                        [
                            2 * (i + c[0]),
                            2 * (j + c[1]),
                            if dim == 3 { 2 * (k + c[2]) } else { 0 },
                        ]
                    };
                    if orientation(ck, &piece.iter().map(fine_corner).collect::<Vec<_>>()) < 0.0 {
                        flip(kind, &mut piece);
                    }
                    let corners: Vec<[usize; 3]> = piece.iter().map(fine_corner).collect();
                    for (a, xi) in ref_nodes.iter().enumerate().take(nn) {
                        ck.shape_functions(*xi, &mut weights);
                        let mut idx = [0usize; 3];
                        for (d, slot) in idx.iter_mut().enumerate() {
                            let v: f64 = weights
                                .iter()
                                .zip(&corners)
                                .map(|(w, c)| w * c[d] as f64)
                                .sum();
                            *slot = v.round() as usize;
                        }
                        let l = lattice(idx);
                        if used[l] == u32::MAX {
                            used[l] = next;
                            next += 1;
                        }
                        local[a] = used[l];
                    }
                    conn.extend_from_slice(&local[..nn]);
                }
            }
        }
    }
    let mut points = vec![[0.0; 3]; next as usize];
    for kz in 0..fine[2] {
        for jy in 0..fine[1] {
            for ix in 0..fine[0] {
                let id = used[lattice([ix, jy, kz])];
                if id != u32::MAX {
                    points[id as usize] = [
                        size[0] * ix as f64 / (fine[0] - 1) as f64,
                        size[1] * jy as f64 / (fine[1] - 1) as f64,
                        if dim == 3 {
                            size[2] * kz as f64 / (fine[2] - 1) as f64
                        } else {
                            0.0
                        },
                    ];
                }
            }
        }
    }
    let count = conn.len() / nn;
    Mesh {
        points,
        blocks: vec![CellBlock {
            kind,
            nodes: conn,
            first_element: 0,
        }],
        file_cell: (0..count as u32).collect(),
        zone: vec![0; count],
        dimension: dim,
    }
}

/// Sign of the Jacobian of the linear piece with lattice corners `corners`, at its centroid.
fn orientation(ck: ElementKind, corners: &[[usize; 3]]) -> f64 {
    let coords: Vec<[f64; 3]> = corners
        .iter()
        .map(|c| [c[0] as f64, c[1] as f64, c[2] as f64])
        .collect();
    let nv = ck.node_count();
    let mut centroid = [0.0; 3];
    for xi in ck.reference_nodes() {
        for d in 0..3 {
            centroid[d] += xi[d] / nv as f64;
        }
    }
    let mut dn = [[0.0; 3]; MAX_NODES];
    ck.shape_gradients(centroid, &mut dn[..nv]);
    let mut out = [[0.0; 3]; MAX_NODES];
    map_gradients(ck.dim(), &coords, &dn[..nv], &mut out[..nv])
}

/// Moves every point by `f(point)`; with a smooth non-affine `f` this gives curved, distorted
/// elements whose isoparametric maps are still valid if the displacement is small.
pub fn map_points(mesh: &mut Mesh, f: impl Fn([f64; 3]) -> [f64; 3]) {
    for p in &mut mesh.points {
        *p = f(*p);
    }
}
