//! Wedges (triangular prisms): the unit triangle in `(r, s)` times `t` in `[-1, 1]`.
//!
//! ```text
//!  t = +1 (top)           t = 0 (middle)          t = -1 (bottom)
//!  4                      13                      1                  s
//!  | \                    |                       | \                ^
//!  9   10                 |                       6   7              |
//!  |     \                |                       |     \            +--> r
//!  3--11--5               12          14          0---8---2
//! ```
//!
//! wedge6: corners 0 (0,0,-1), 1 (0,1,-1), 2 (1,0,-1), and 3, 4, 5 the same at t = +1 (VTK 13).
//! wedge15: + mid nodes 6 (0-1) 7 (1-2) 8 (2-0) 9 (3-4) 10 (4-5) 11 (5-3) 12 (0-3) 13 (1-4)
//! 14 (2-5) (VTK 26).
//!
//! Orientation: VTK documents its wedge with face (0, 1, 2) having its right-hand normal
//! pointing AWAY from face (3, 4, 5) (project format notes, section 1.4). Node 1 therefore sits
//! at `s = 1` and node 2 at `r = 1`: `(1 - 0) x (2 - 0) = e_s x e_r = -e_t` points away from the
//! top, and a wedge written in that VTK order has a positive Jacobian `det(dx/d(r, s, t))`.
//! Checked with the `vtk` Python package 9.2.6: the one-cell wedge with points (0,0,0), (0,1,0),
//! (1,0,0), (0,0,1), (0,1,1), (1,0,1) in VTK order has volume +0.5 under vtkCellSizeFilter and
//! vtkCellValidator reports it valid with every face outward; with nodes 1/2 and 4/5 swapped it
//! gives -0.5 and "faces are oriented incorrectly"; the 15-node version (mid nodes at the edge
//! midpoints) also gives +0.5, and vtkQuadraticWedge's parametric coordinates put nodes 6..14 on
//! the edges listed above. CAUTION: `vtk` 9.7.2 reverses both verdicts for the linear and the
//! quadratic wedge (the layout above gives -0.5 and is reported mis-oriented), so the
//! orientation found in files depends on the writer; `ElementKind::orientation_flip` repairs a
//! wedge whose Jacobian is negative everywhere.
//!
//! Shape functions: wedge6 is the product of the linear triangle and the linear line element;
//! wedge15 is the 15-node serendipity wedge (Zienkiewicz & Taylor, "The Finite Element Method",
//! vol. 1, prism elements; common practice), with triangle barycentrics `L` and `t_i = +-1`:
//! corner `N = L (2L - 1)(1 + t t_i)/2 - L (1 - t^2)/2`, triangle-edge mid node
//! `N = 2 L_a L_b (1 + t t_i)`, vertical-edge mid node `N = L (1 - t^2)`.

use super::patch_basis::PatchBasis;
use super::quadrature::{RuleSpec, TRIANGLE_CENTROID, TRIANGLE_DUNAVANT_6, TRIANGLE_STRANG_FIX_3};
use super::{Facet, Family, KindInfo};

const EDGES: &[[usize; 2]] = &[
    [0, 1],
    [1, 2],
    [2, 0],
    [3, 4],
    [4, 5],
    [5, 3],
    [0, 3],
    [1, 4],
    [2, 5],
];
const MID_NODES: &[usize] = &[6, 7, 8, 9, 10, 11, 12, 13, 14];

const NODES15: &[[f64; 3]] = &[
    [0.0, 0.0, -1.0],
    [0.0, 1.0, -1.0],
    [1.0, 0.0, -1.0],
    [0.0, 0.0, 1.0],
    [0.0, 1.0, 1.0],
    [1.0, 0.0, 1.0],
    [0.0, 0.5, -1.0],
    [0.5, 0.5, -1.0],
    [0.5, 0.0, -1.0],
    [0.0, 0.5, 1.0],
    [0.5, 0.5, 1.0],
    [0.5, 0.0, 1.0],
    [0.0, 0.0, 0.0],
    [0.0, 1.0, 0.0],
    [1.0, 0.0, 0.0],
];

/// Bottom triangle, top triangle, then the quadrilateral sides over edges 0-1, 1-2 and 2-0;
/// corners ordered for outward right-hand normals.
const FACETS6: &[Facet] = &[
    Facet {
        corners: &[0, 1, 2],
        nodes: &[0, 1, 2],
    },
    Facet {
        corners: &[3, 5, 4],
        nodes: &[3, 5, 4],
    },
    Facet {
        corners: &[0, 3, 4, 1],
        nodes: &[0, 3, 4, 1],
    },
    Facet {
        corners: &[1, 4, 5, 2],
        nodes: &[1, 4, 5, 2],
    },
    Facet {
        corners: &[2, 5, 3, 0],
        nodes: &[2, 5, 3, 0],
    },
];

const FACETS15: &[Facet] = &[
    Facet {
        corners: &[0, 1, 2],
        nodes: &[0, 1, 2, 6, 7, 8],
    },
    Facet {
        corners: &[3, 5, 4],
        nodes: &[3, 5, 4, 11, 10, 9],
    },
    Facet {
        corners: &[0, 3, 4, 1],
        nodes: &[0, 3, 4, 1, 12, 9, 13, 6],
    },
    Facet {
        corners: &[1, 4, 5, 2],
        nodes: &[1, 4, 5, 2, 13, 10, 14, 7],
    },
    Facet {
        corners: &[2, 5, 3, 0],
        nodes: &[2, 5, 3, 0, 14, 11, 12, 8],
    },
];

/// Swap corners 1/2 and 4/5 (the Gmsh-style and VTK-9.7-style orientation), mid nodes following.
const FLIP15: &[usize] = &[0, 2, 1, 3, 5, 4, 8, 7, 6, 11, 10, 9, 12, 14, 13];

/// Whether the right-hand normal of the base (0, 1, 2) points toward the top face (3, 4, 5) in
/// the reference wedge: false, following VTK's documented wedge (see the module comment).
#[cfg_attr(not(test), allow(dead_code))]
pub(crate) const BASE_NORMAL_TOWARD_TOP: bool = false;

/// Triangle barycentric of wedge corner `c` (0..6) and its gradient: node 0 -> `1 - r - s`,
/// node 1 -> `s`, node 2 -> `r` (and the same for 3, 4, 5).
#[inline]
fn corner_barycentric(c: usize, r: f64, s: f64) -> (f64, [f64; 3]) {
    match c % 3 {
        0 => (1.0 - r - s, [-1.0, -1.0, 0.0]),
        1 => (s, [0.0, 1.0, 0.0]),
        _ => (r, [1.0, 0.0, 0.0]),
    }
}

/// Level `t_i` of corner `c`: -1 for the bottom corners 0..3, +1 for the top corners 3..6.
#[inline]
fn corner_level(c: usize) -> f64 {
    if c < 3 {
        -1.0
    } else {
        1.0
    }
}

fn eval6(xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
    let [r, s, t] = xi;
    for c in 0..6 {
        let (l, dl) = corner_barycentric(c, r, s);
        let tc = corner_level(c);
        let h = 0.5 * (1.0 + tc * t);
        n[c] = l * h;
        dn[c] = [dl[0] * h, dl[1] * h, 0.5 * tc * l];
    }
}

fn eval15(xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
    let [r, s, t] = xi;
    let bubble = 1.0 - t * t;
    for c in 0..6 {
        let (l, dl) = corner_barycentric(c, r, s);
        let tc = corner_level(c);
        let h = 1.0 + tc * t;
        n[c] = 0.5 * l * (2.0 * l - 1.0) * h - 0.5 * l * bubble;
        let g = 0.5 * (4.0 * l - 1.0) * h - 0.5 * bubble;
        dn[c] = [g * dl[0], g * dl[1], 0.5 * l * (2.0 * l - 1.0) * tc + l * t];
    }
    for (&[a, b], &m) in EDGES.iter().zip(MID_NODES) {
        let (la, dla) = corner_barycentric(a, r, s);
        if b == a + 3 {
            // Vertical edge: L_a (1 - t^2).
            n[m] = la * bubble;
            dn[m] = [dla[0] * bubble, dla[1] * bubble, -2.0 * t * la];
        } else {
            // Triangle edge on the level of a: 2 L_a L_b (1 + t t_a).
            let (lb, dlb) = corner_barycentric(b, r, s);
            let ta = corner_level(a);
            let h = 1.0 + ta * t;
            n[m] = 2.0 * la * lb * h;
            dn[m] = [
                2.0 * (dla[0] * lb + la * dlb[0]) * h,
                2.0 * (dla[1] * lb + la * dlb[1]) * h,
                2.0 * la * lb * ta,
            ];
        }
    }
}

/// Linear wedge: full 3-point triangle x 2 Gauss, reduced centroid x 1, sampled at the centroid.
pub(crate) const WEDGE6: KindInfo = KindInfo {
    name: "wedge6",
    family: Family::Wedge,
    vtk_id: 13,
    dim: 3,
    order: 1,
    vertex_count: 6,
    reference_nodes: NODES15.split_at(6).0,
    reference_measure: 1.0,
    eval: eval6,
    edges: EDGES,
    edge_mid_nodes: &[],
    facets: FACETS6,
    flip: FLIP15.split_at(6).0,
    patch_basis: PatchBasis::Linear3,
    full: RuleSpec::Wedge {
        triangle: &TRIANGLE_STRANG_FIX_3,
        n: 2,
    },
    reduced: RuleSpec::Wedge {
        triangle: &TRIANGLE_CENTROID,
        n: 1,
    },
    sampling: RuleSpec::Wedge {
        triangle: &TRIANGLE_CENTROID,
        n: 1,
    },
};

/// Quadratic wedge: full 6-point triangle x 3 Gauss, reduced 3-point triangle x 2 Gauss,
/// sampled at the 3-point triangle x 2 Gauss points.
pub(crate) const WEDGE15: KindInfo = KindInfo {
    name: "wedge15",
    family: Family::Wedge,
    vtk_id: 26,
    dim: 3,
    order: 2,
    vertex_count: 6,
    reference_nodes: NODES15,
    reference_measure: 1.0,
    eval: eval15,
    edges: EDGES,
    edge_mid_nodes: MID_NODES,
    facets: FACETS15,
    flip: FLIP15,
    patch_basis: PatchBasis::Quadratic3,
    full: RuleSpec::Wedge {
        triangle: &TRIANGLE_DUNAVANT_6,
        n: 3,
    },
    reduced: RuleSpec::Wedge {
        triangle: &TRIANGLE_STRANG_FIX_3,
        n: 2,
    },
    sampling: RuleSpec::Wedge {
        triangle: &TRIANGLE_STRANG_FIX_3,
        n: 2,
    },
};
