//! Quadrilaterals on the reference square `[-1, 1]^2`.
//!
//! ```text
//!   eta
//!    ^
//!    3-----6-----2      quad4: corners 0..3 counter-clockwise, 0 at (-1,-1)      (VTK 9)
//!    |           |      quad8: + mid nodes 4 (0-1), 5 (1-2), 6 (2-3), 7 (3-0)   (VTK 23)
//!    7     8     5      quad9: + centre 8                                        (VTK 28)
//!    |           |
//!    0-----4-----1 --> xi
//! ```
//!
//! quad4 and quad9 are tensor-product Lagrange elements, quad8 is the serendipity element.

use super::patch_basis::PatchBasis;
use super::quadrature::RuleSpec;
use super::shape::{serendipity, tensor_lagrange};
use super::{Facet, Family, KindInfo};

const EDGES: &[[usize; 2]] = &[[0, 1], [1, 2], [2, 3], [3, 0]];
const MID_NODES: &[usize] = &[4, 5, 6, 7];

const NODES9: &[[f64; 3]] = &[
    [-1.0, -1.0, 0.0],
    [1.0, -1.0, 0.0],
    [1.0, 1.0, 0.0],
    [-1.0, 1.0, 0.0],
    [0.0, -1.0, 0.0],
    [1.0, 0.0, 0.0],
    [0.0, 1.0, 0.0],
    [-1.0, 0.0, 0.0],
    [0.0, 0.0, 0.0],
];
const NODES4: &[[f64; 3]] = NODES9.split_at(4).0;
const NODES8: &[[f64; 3]] = NODES9.split_at(8).0;

const FACETS4: &[Facet] = &[
    Facet {
        corners: &[0, 1],
        nodes: &[0, 1],
    },
    Facet {
        corners: &[1, 2],
        nodes: &[1, 2],
    },
    Facet {
        corners: &[2, 3],
        nodes: &[2, 3],
    },
    Facet {
        corners: &[3, 0],
        nodes: &[3, 0],
    },
];

const FACETS8: &[Facet] = &[
    Facet {
        corners: &[0, 1],
        nodes: &[0, 1, 4],
    },
    Facet {
        corners: &[1, 2],
        nodes: &[1, 2, 5],
    },
    Facet {
        corners: &[2, 3],
        nodes: &[2, 3, 6],
    },
    Facet {
        corners: &[3, 0],
        nodes: &[3, 0, 7],
    },
];

const FLIP9: &[usize] = &[0, 3, 2, 1, 7, 6, 5, 4, 8];

fn eval4(xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
    tensor_lagrange(NODES4, 2, 1, xi, n, dn);
}

fn eval8(xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
    serendipity(NODES8, 2, xi, n, dn);
}

fn eval9(xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
    tensor_lagrange(NODES9, 2, 2, xi, n, dn);
}

/// Bilinear quadrilateral: full 2x2 Gauss, reduced 1 point, sampled at the centre (Barlow point).
pub(crate) const QUAD4: KindInfo = KindInfo {
    name: "quad4",
    family: Family::Quadrilateral,
    vtk_id: 9,
    dim: 2,
    order: 1,
    vertex_count: 4,
    reference_nodes: NODES4,
    reference_measure: 4.0,
    eval: eval4,
    edges: EDGES,
    edge_mid_nodes: &[],
    facets: FACETS4,
    flip: FLIP9.split_at(4).0,
    patch_basis: PatchBasis::Bilinear,
    full: RuleSpec::Gauss { dim: 2, n: 2 },
    reduced: RuleSpec::Gauss { dim: 2, n: 1 },
    sampling: RuleSpec::Gauss { dim: 2, n: 1 },
};

/// Serendipity quadrilateral: full 3x3, reduced 2x2, sampled at the 2x2 Gauss (Barlow) points.
pub(crate) const QUAD8: KindInfo = KindInfo {
    name: "quad8",
    family: Family::Quadrilateral,
    vtk_id: 23,
    dim: 2,
    order: 2,
    vertex_count: 4,
    reference_nodes: NODES8,
    reference_measure: 4.0,
    eval: eval8,
    edges: EDGES,
    edge_mid_nodes: MID_NODES,
    facets: FACETS8,
    flip: FLIP9.split_at(8).0,
    patch_basis: PatchBasis::Serendipity2,
    full: RuleSpec::Gauss { dim: 2, n: 3 },
    reduced: RuleSpec::Gauss { dim: 2, n: 2 },
    sampling: RuleSpec::Gauss { dim: 2, n: 2 },
};

/// Biquadratic quadrilateral: full 3x3, reduced 2x2, sampled at the 2x2 Gauss points.
pub(crate) const QUAD9: KindInfo = KindInfo {
    name: "quad9",
    family: Family::Quadrilateral,
    vtk_id: 28,
    dim: 2,
    order: 2,
    vertex_count: 4,
    reference_nodes: NODES9,
    reference_measure: 4.0,
    eval: eval9,
    edges: EDGES,
    edge_mid_nodes: MID_NODES,
    facets: FACETS8,
    flip: FLIP9,
    patch_basis: PatchBasis::Biquadratic,
    full: RuleSpec::Gauss { dim: 2, n: 3 },
    reduced: RuleSpec::Gauss { dim: 2, n: 2 },
    sampling: RuleSpec::Gauss { dim: 2, n: 2 },
};
