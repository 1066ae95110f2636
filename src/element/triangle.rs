//! Triangles on the unit reference triangle `r, s >= 0, r + s <= 1`.
//!
//! ```text
//!   s
//!   ^
//!   2                 tri3: corners 0 (0,0), 1 (1,0), 2 (0,1), counter-clockwise  (VTK 5)
//!   |\                tri6: + mid nodes 3 (0-1), 4 (1-2), 5 (2-0)                (VTK 22)
//!   | \
//!   5  4
//!   |   \
//!   0--3--1 --> r
//! ```
//!
//! Shape functions in barycentric form, `L0 = 1 - r - s`, `L1 = r`, `L2 = s` (see `shape.rs`).

use super::patch_basis::PatchBasis;
use super::quadrature::{RuleSpec, TRIANGLE_CENTROID, TRIANGLE_DUNAVANT_6, TRIANGLE_STRANG_FIX_3};
use super::shape::simplex;
use super::{Facet, Family, KindInfo};

const EDGES: &[[usize; 2]] = &[[0, 1], [1, 2], [2, 0]];
const MID_NODES: &[usize] = &[3, 4, 5];

const NODES6: &[[f64; 3]] = &[
    [0.0, 0.0, 0.0],
    [1.0, 0.0, 0.0],
    [0.0, 1.0, 0.0],
    [0.5, 0.0, 0.0],
    [0.5, 0.5, 0.0],
    [0.0, 0.5, 0.0],
];

const FACETS3: &[Facet] = &[
    Facet {
        corners: &[0, 1],
        nodes: &[0, 1],
    },
    Facet {
        corners: &[1, 2],
        nodes: &[1, 2],
    },
    Facet {
        corners: &[2, 0],
        nodes: &[2, 0],
    },
];

const FACETS6: &[Facet] = &[
    Facet {
        corners: &[0, 1],
        nodes: &[0, 1, 3],
    },
    Facet {
        corners: &[1, 2],
        nodes: &[1, 2, 4],
    },
    Facet {
        corners: &[2, 0],
        nodes: &[2, 0, 5],
    },
];

fn eval3(xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
    simplex(2, EDGES, &[], xi, n, dn);
}

fn eval6(xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
    simplex(2, EDGES, MID_NODES, xi, n, dn);
}

/// Linear triangle: full 3-point (degree 2), reduced centroid, sampled at the centroid.
pub(crate) const TRI3: KindInfo = KindInfo {
    name: "tri3",
    family: Family::Triangle,
    vtk_id: 5,
    dim: 2,
    order: 1,
    vertex_count: 3,
    reference_nodes: NODES6.split_at(3).0,
    reference_measure: 0.5,
    eval: eval3,
    edges: EDGES,
    edge_mid_nodes: &[],
    facets: FACETS3,
    flip: &[0, 2, 1],
    patch_basis: PatchBasis::Linear2,
    full: RuleSpec::Simplex(&TRIANGLE_STRANG_FIX_3),
    reduced: RuleSpec::Simplex(&TRIANGLE_CENTROID),
    sampling: RuleSpec::Simplex(&TRIANGLE_CENTROID),
};

/// Quadratic triangle: full 6-point (degree 4), reduced 3-point, sampled at the 3 interior
/// points (2/3, 1/6, 1/6) (project methods notes, section 1.2).
pub(crate) const TRI6: KindInfo = KindInfo {
    name: "tri6",
    family: Family::Triangle,
    vtk_id: 22,
    dim: 2,
    order: 2,
    vertex_count: 3,
    reference_nodes: NODES6,
    reference_measure: 0.5,
    eval: eval6,
    edges: EDGES,
    edge_mid_nodes: MID_NODES,
    facets: FACETS6,
    flip: &[0, 2, 1, 5, 4, 3],
    patch_basis: PatchBasis::Quadratic2,
    full: RuleSpec::Simplex(&TRIANGLE_DUNAVANT_6),
    reduced: RuleSpec::Simplex(&TRIANGLE_STRANG_FIX_3),
    sampling: RuleSpec::Simplex(&TRIANGLE_STRANG_FIX_3),
};
