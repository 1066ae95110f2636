//! The outer boundary of a mesh and its supports.
//!
//! [`BoundaryFacets`] lists each zone's boundary, so zone interfaces appear there too; the outer
//! boundary keeps only the facets no other element (of any zone) shares. A node is a support
//! when its displacement is exactly zero in every component: a prescribed zero is written as
//! the exact value 0 by solvers, whereas a free node almost never lands on exactly 0 in all
//! components (common practice for reading supports back from results). A facet is supported
//! when all its nodes (corners and mid nodes) are supports, so an edge whose mid node moves is
//! free.

use crate::mesh::{BoundaryFacets, Mesh, NodeElements};
use rayon::prelude::*;

/// One facet of the outer boundary.
#[derive(Copy, Clone, Debug)]
pub(crate) struct OuterFacet {
    /// Element owning the facet.
    pub element: u32,
    /// Local facet index in the element's kind.
    pub facet: u8,
    /// Whether every node of the facet is a support.
    pub supported: bool,
}

/// Whether another element (any zone) contains every corner of facet `f` of element `e`.
fn shared_with_any(mesh: &Mesh, adjacency: &NodeElements, e: usize, f: usize) -> bool {
    let (kind, nodes) = mesh.element(e);
    let corners = kind.facets()[f].corners;
    adjacency
        .of(nodes[corners[0]] as usize)
        .iter()
        .any(|&other| {
            if other as usize == e {
                return false;
            }
            let (okind, onodes) = mesh.element(other as usize);
            let overts = &onodes[..okind.vertex_count()];
            corners.iter().all(|&c| overts.contains(&nodes[c]))
        })
}

/// Per node: displacement exactly zero in every component (module docs).
pub(crate) fn supports(displacement: &[[f64; 3]]) -> Vec<bool> {
    displacement
        .par_iter()
        .map(|u| u.iter().all(|&c| c == 0.0))
        .collect()
}

/// Facets of the outer boundary, in (element, facet) order, with their support flag.
pub(crate) fn outer_facets(
    mesh: &Mesh,
    adjacency: &NodeElements,
    boundary: &BoundaryFacets,
    supported: &[bool],
) -> Vec<OuterFacet> {
    let zone_facets = &boundary.facets;
    let one_zone = mesh.zone.windows(2).all(|w| w[0] == w[1]);
    zone_facets
        .par_iter()
        .copied()
        .filter(|&(e, f)| one_zone || !shared_with_any(mesh, adjacency, e as usize, f as usize))
        .map(|(e, f)| {
            let (kind, nodes) = mesh.element(e as usize);
            let facet = &kind.facets()[f as usize];
            OuterFacet {
                element: e,
                facet: f,
                supported: facet.nodes.iter().all(|&l| supported[nodes[l] as usize]),
            }
        })
        .collect()
}
