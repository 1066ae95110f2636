//! Tetrahedra on the unit reference tetrahedron `r, s, t >= 0, r + s + t <= 1`.
//!
//! ```text
//!           t
//!           3                  tet4: corners 0 (0,0,0), 1 (1,0,0), 2 (0,1,0), 3 (0,0,1);
//!          /|\                       face (0,1,2) has its right-hand normal toward 3 (VTK 10)
//!         / | \                tet10: + mid nodes 4 (0-1), 5 (1-2), 6 (2-0),
//!        7  |  9                      7 (0-3), 8 (1-3), 9 (2-3)                    (VTK 24)
//!       /   8   \
//!      0 ---|-6--2 --> s       (8 sits on edge 1-3, drawn behind)
//!       \   |   /
//!        4  |  5
//!         \ | /
//!           1
//!          r
//! ```
//!
//! Shape functions in barycentric form, `L0 = 1 - r - s - t`, `L1 = r`, `L2 = s`, `L3 = t`.

use super::patch_basis::PatchBasis;
use super::quadrature::{RuleSpec, TET_CENTROID, TET_GELLERT_HARBORD_14, TET_KEAST_4};
use super::shape::simplex;
use super::{Facet, Family, KindInfo};

const EDGES: &[[usize; 2]] = &[[0, 1], [1, 2], [2, 0], [0, 3], [1, 3], [2, 3]];
const MID_NODES: &[usize] = &[4, 5, 6, 7, 8, 9];

const NODES10: &[[f64; 3]] = &[
    [0.0, 0.0, 0.0],
    [1.0, 0.0, 0.0],
    [0.0, 1.0, 0.0],
    [0.0, 0.0, 1.0],
    [0.5, 0.0, 0.0],
    [0.5, 0.5, 0.0],
    [0.0, 0.5, 0.0],
    [0.0, 0.0, 0.5],
    [0.5, 0.0, 0.5],
    [0.0, 0.5, 0.5],
];

/// Faces with outward right-hand normals, opposite nodes 3, 2, 0 and 1.
const FACETS4: &[Facet] = &[
    Facet {
        corners: &[0, 2, 1],
        nodes: &[0, 2, 1],
    },
    Facet {
        corners: &[0, 1, 3],
        nodes: &[0, 1, 3],
    },
    Facet {
        corners: &[1, 2, 3],
        nodes: &[1, 2, 3],
    },
    Facet {
        corners: &[0, 3, 2],
        nodes: &[0, 3, 2],
    },
];

const FACETS10: &[Facet] = &[
    Facet {
        corners: &[0, 2, 1],
        nodes: &[0, 2, 1, 6, 5, 4],
    },
    Facet {
        corners: &[0, 1, 3],
        nodes: &[0, 1, 3, 4, 8, 7],
    },
    Facet {
        corners: &[1, 2, 3],
        nodes: &[1, 2, 3, 5, 9, 8],
    },
    Facet {
        corners: &[0, 3, 2],
        nodes: &[0, 3, 2, 7, 9, 6],
    },
];

const FLIP10: &[usize] = &[0, 2, 1, 3, 6, 5, 4, 7, 9, 8];

fn eval4(xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
    simplex(3, EDGES, &[], xi, n, dn);
}

fn eval10(xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
    simplex(3, EDGES, MID_NODES, xi, n, dn);
}

/// Linear tetrahedron: full 4-point (degree 2), reduced centroid, sampled at the centroid.
pub(crate) const TET4: KindInfo = KindInfo {
    name: "tet4",
    family: Family::Tetrahedron,
    vtk_id: 10,
    dim: 3,
    order: 1,
    vertex_count: 4,
    reference_nodes: NODES10.split_at(4).0,
    reference_measure: 1.0 / 6.0,
    eval: eval4,
    edges: EDGES,
    edge_mid_nodes: &[],
    facets: FACETS4,
    flip: FLIP10.split_at(4).0,
    patch_basis: PatchBasis::Linear3,
    full: RuleSpec::Simplex(&TET_KEAST_4),
    reduced: RuleSpec::Simplex(&TET_CENTROID),
    sampling: RuleSpec::Simplex(&TET_CENTROID),
};

/// Quadratic tetrahedron: full 14-point (degree 5), reduced 4-point, sampled at the 4-point
/// rule's points (project methods notes, section 1.2).
pub(crate) const TET10: KindInfo = KindInfo {
    name: "tet10",
    family: Family::Tetrahedron,
    vtk_id: 24,
    dim: 3,
    order: 2,
    vertex_count: 4,
    reference_nodes: NODES10,
    reference_measure: 1.0 / 6.0,
    eval: eval10,
    edges: EDGES,
    edge_mid_nodes: MID_NODES,
    facets: FACETS10,
    flip: FLIP10,
    patch_basis: PatchBasis::Quadratic3,
    full: RuleSpec::Simplex(&TET_GELLERT_HARBORD_14),
    reduced: RuleSpec::Simplex(&TET_KEAST_4),
    sampling: RuleSpec::Simplex(&TET_KEAST_4),
};
