//! Hexahedra on the reference cube `[-1, 1]^3`.
//!
//! ```text
//!  zeta = +1 (top)            zeta = 0 (middle)          zeta = -1 (bottom)
//!  7 ----14---- 6             19 ----23---- 18           3 ----10---- 2       eta
//!  |            |              |            |            |            |        ^
//!  15    25    13             20     26    21           11    24      9        |
//!  |            |              |            |            |            |        +--> xi
//!  4 ----12---- 5             16 ----22---- 17           0 ---- 8---- 1
//! ```
//!
//! hex8: corners 0..7 (0 at (-1,-1,-1), 0-3 counter-clockwise at the bottom, 4-7 above them;
//! face (0,1,2,3) has its right-hand normal toward (4,5,6,7)) (VTK 12). hex20: + mid-edge
//! nodes 8..19 (VTK 25). hex27: + face centres 20 x-min, 21 x-max, 22 y-min, 23 y-max,
//! 24 z-min, 25 z-max and the body centre 26 (VTK 29). hex8 and hex27 are tensor-product
//! Lagrange elements, hex20 is the serendipity element.

use super::patch_basis::PatchBasis;
use super::quadrature::RuleSpec;
use super::shape::{serendipity, tensor_lagrange};
use super::{Facet, Family, KindInfo};

const EDGES: &[[usize; 2]] = &[
    [0, 1],
    [1, 2],
    [2, 3],
    [3, 0],
    [4, 5],
    [5, 6],
    [6, 7],
    [7, 4],
    [0, 4],
    [1, 5],
    [2, 6],
    [3, 7],
];
const MID_NODES: &[usize] = &[8, 9, 10, 11, 12, 13, 14, 15, 16, 17, 18, 19];

const NODES27: &[[f64; 3]] = &[
    [-1.0, -1.0, -1.0],
    [1.0, -1.0, -1.0],
    [1.0, 1.0, -1.0],
    [-1.0, 1.0, -1.0],
    [-1.0, -1.0, 1.0],
    [1.0, -1.0, 1.0],
    [1.0, 1.0, 1.0],
    [-1.0, 1.0, 1.0],
    [0.0, -1.0, -1.0],
    [1.0, 0.0, -1.0],
    [0.0, 1.0, -1.0],
    [-1.0, 0.0, -1.0],
    [0.0, -1.0, 1.0],
    [1.0, 0.0, 1.0],
    [0.0, 1.0, 1.0],
    [-1.0, 0.0, 1.0],
    [-1.0, -1.0, 0.0],
    [1.0, -1.0, 0.0],
    [1.0, 1.0, 0.0],
    [-1.0, 1.0, 0.0],
    [-1.0, 0.0, 0.0],
    [1.0, 0.0, 0.0],
    [0.0, -1.0, 0.0],
    [0.0, 1.0, 0.0],
    [0.0, 0.0, -1.0],
    [0.0, 0.0, 1.0],
    [0.0, 0.0, 0.0],
];
const NODES8: &[[f64; 3]] = NODES27.split_at(8).0;
const NODES20: &[[f64; 3]] = NODES27.split_at(20).0;

/// Faces in the order of the hex27 face-centre nodes (x-min, x-max, y-min, y-max, z-min,
/// z-max), corners ordered for outward right-hand normals.
const FACETS8: &[Facet] = &[
    Facet {
        corners: &[0, 4, 7, 3],
        nodes: &[0, 4, 7, 3],
    },
    Facet {
        corners: &[1, 2, 6, 5],
        nodes: &[1, 2, 6, 5],
    },
    Facet {
        corners: &[0, 1, 5, 4],
        nodes: &[0, 1, 5, 4],
    },
    Facet {
        corners: &[3, 7, 6, 2],
        nodes: &[3, 7, 6, 2],
    },
    Facet {
        corners: &[0, 3, 2, 1],
        nodes: &[0, 3, 2, 1],
    },
    Facet {
        corners: &[4, 5, 6, 7],
        nodes: &[4, 5, 6, 7],
    },
];

const FACETS20: &[Facet] = &[
    Facet {
        corners: &[0, 4, 7, 3],
        nodes: &[0, 4, 7, 3, 16, 15, 19, 11],
    },
    Facet {
        corners: &[1, 2, 6, 5],
        nodes: &[1, 2, 6, 5, 9, 18, 13, 17],
    },
    Facet {
        corners: &[0, 1, 5, 4],
        nodes: &[0, 1, 5, 4, 8, 17, 12, 16],
    },
    Facet {
        corners: &[3, 7, 6, 2],
        nodes: &[3, 7, 6, 2, 19, 14, 18, 10],
    },
    Facet {
        corners: &[0, 3, 2, 1],
        nodes: &[0, 3, 2, 1, 11, 10, 9, 8],
    },
    Facet {
        corners: &[4, 5, 6, 7],
        nodes: &[4, 5, 6, 7, 12, 13, 14, 15],
    },
];

const FACETS27: &[Facet] = &[
    Facet {
        corners: &[0, 4, 7, 3],
        nodes: &[0, 4, 7, 3, 16, 15, 19, 11, 20],
    },
    Facet {
        corners: &[1, 2, 6, 5],
        nodes: &[1, 2, 6, 5, 9, 18, 13, 17, 21],
    },
    Facet {
        corners: &[0, 1, 5, 4],
        nodes: &[0, 1, 5, 4, 8, 17, 12, 16, 22],
    },
    Facet {
        corners: &[3, 7, 6, 2],
        nodes: &[3, 7, 6, 2, 19, 14, 18, 10, 23],
    },
    Facet {
        corners: &[0, 3, 2, 1],
        nodes: &[0, 3, 2, 1, 11, 10, 9, 8, 24],
    },
    Facet {
        corners: &[4, 5, 6, 7],
        nodes: &[4, 5, 6, 7, 12, 13, 14, 15, 25],
    },
];

/// Mirror in zeta: swap the bottom and top layers.
const FLIP27: &[usize] = &[
    4, 5, 6, 7, 0, 1, 2, 3, 12, 13, 14, 15, 8, 9, 10, 11, 16, 17, 18, 19, 20, 21, 22, 23, 25, 24,
    26,
];

fn eval8(xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
    tensor_lagrange(NODES8, 3, 1, xi, n, dn);
}

fn eval20(xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
    serendipity(NODES20, 3, xi, n, dn);
}

fn eval27(xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
    tensor_lagrange(NODES27, 3, 2, xi, n, dn);
}

/// Trilinear hexahedron: full 2x2x2, reduced 1 point, sampled at the centre.
pub(crate) const HEX8: KindInfo = KindInfo {
    name: "hex8",
    family: Family::Hexahedron,
    vtk_id: 12,
    dim: 3,
    order: 1,
    vertex_count: 8,
    reference_nodes: NODES8,
    reference_measure: 8.0,
    eval: eval8,
    edges: EDGES,
    edge_mid_nodes: &[],
    facets: FACETS8,
    flip: FLIP27.split_at(8).0,
    patch_basis: PatchBasis::Trilinear,
    full: RuleSpec::Gauss { dim: 3, n: 2 },
    reduced: RuleSpec::Gauss { dim: 3, n: 1 },
    sampling: RuleSpec::Gauss { dim: 3, n: 1 },
};

/// Serendipity hexahedron: full 3x3x3, reduced 2x2x2, sampled at the 2x2x2 Gauss points.
pub(crate) const HEX20: KindInfo = KindInfo {
    name: "hex20",
    family: Family::Hexahedron,
    vtk_id: 25,
    dim: 3,
    order: 2,
    vertex_count: 8,
    reference_nodes: NODES20,
    reference_measure: 8.0,
    eval: eval20,
    edges: EDGES,
    edge_mid_nodes: MID_NODES,
    facets: FACETS20,
    flip: FLIP27.split_at(20).0,
    patch_basis: PatchBasis::Serendipity3,
    full: RuleSpec::Gauss { dim: 3, n: 3 },
    reduced: RuleSpec::Gauss { dim: 3, n: 2 },
    sampling: RuleSpec::Gauss { dim: 3, n: 2 },
};

/// Triquadratic hexahedron: full 3x3x3, reduced 2x2x2, sampled at the 2x2x2 Gauss points.
pub(crate) const HEX27: KindInfo = KindInfo {
    name: "hex27",
    family: Family::Hexahedron,
    vtk_id: 29,
    dim: 3,
    order: 2,
    vertex_count: 8,
    reference_nodes: NODES27,
    reference_measure: 8.0,
    eval: eval27,
    edges: EDGES,
    edge_mid_nodes: MID_NODES,
    facets: FACETS27,
    flip: FLIP27,
    patch_basis: PatchBasis::Triquadratic,
    full: RuleSpec::Gauss { dim: 3, n: 3 },
    reduced: RuleSpec::Gauss { dim: 3, n: 2 },
    sampling: RuleSpec::Gauss { dim: 3, n: 2 },
};
