//! Node-to-element adjacency as CSR arrays, and boundary facets found through it.

use super::Mesh;
use rayon::prelude::*;

/// For every node, the elements that contain it (any of their nodes), sorted by element index.
/// Built by counting (two passes), stored as offsets + indices.
#[derive(Clone, Debug)]
pub struct NodeElements {
    offsets: Vec<usize>,
    elements: Vec<u32>,
}

impl NodeElements {
    /// Builds the adjacency of all nodes of `mesh`.
    pub fn new(mesh: &Mesh) -> Self {
        let n = mesh.node_count();
        let mut counts = vec![0usize; n + 1];
        for b in &mesh.blocks {
            for &node in &b.nodes {
                counts[node as usize + 1] += 1;
            }
        }
        for i in 0..n {
            counts[i + 1] += counts[i];
        }
        let offsets = counts;
        let mut fill = offsets.clone();
        let mut elements = vec![0u32; offsets[n]];
        for b in &mesh.blocks {
            let nn = b.kind.node_count();
            for (i, cell) in b.nodes.chunks_exact(nn).enumerate() {
                let e = (b.first_element + i) as u32;
                for &node in cell {
                    let slot = &mut fill[node as usize];
                    elements[*slot] = e;
                    *slot += 1;
                }
            }
        }
        Self { offsets, elements }
    }

    /// Elements containing `node`, ascending.
    #[inline]
    pub fn of(&self, node: usize) -> &[u32] {
        &self.elements[self.offsets[node]..self.offsets[node + 1]]
    }
}

/// Boundary facets of every zone's sub-mesh: a facet is on the boundary when no other element of
/// the same zone contains all of its corners. Zone interfaces are therefore boundaries of both
/// zones, which keeps recovery patches from crossing material interfaces.
#[derive(Clone, Debug)]
pub struct BoundaryFacets {
    /// Per node: whether it lies on a boundary facet of at least one zone containing it.
    /// Per-zone detail is in `node_on_zone_boundary`.
    pub node_on_boundary: Vec<bool>,
    /// (node, zone) pairs on a zone boundary, sorted; used where zones matter.
    pub node_on_zone_boundary: Vec<(u32, i64)>,
    /// (element, local facet index) of every boundary facet, sorted.
    pub facets: Vec<(u32, u8)>,
}

impl BoundaryFacets {
    /// Finds boundary facets by intersecting the adjacency lists of a facet's corners.
    pub fn new(mesh: &Mesh, adjacency: &NodeElements) -> Self {
        // One bit per local facet (at most 6 facets per kind): no allocation per element.
        let masks: Vec<u8> = (0..mesh.element_count())
            .into_par_iter()
            .map(|e| {
                let (kind, nodes) = mesh.element(e);
                let zone = mesh.zone[e];
                let mut mask = 0u8;
                for (f, facet) in kind.facets().iter().enumerate() {
                    // Candidates share the facet's first two corners: walk the two sorted
                    // adjacency lists together (a merge), then check the remaining corners.
                    let a = adjacency.of(nodes[facet.corners[0]] as usize);
                    let b = adjacency.of(nodes[facet.corners[1]] as usize);
                    let (mut i, mut j) = (0, 0);
                    let mut shared = false;
                    while i < a.len() && j < b.len() && !shared {
                        match a[i].cmp(&b[j]) {
                            std::cmp::Ordering::Less => i += 1,
                            std::cmp::Ordering::Greater => j += 1,
                            std::cmp::Ordering::Equal => {
                                let other = a[i] as usize;
                                i += 1;
                                j += 1;
                                if other == e || mesh.zone[other] != zone {
                                    continue;
                                }
                                let (okind, onodes) = mesh.element(other);
                                let overts = &onodes[..okind.vertex_count()];
                                shared = facet.corners[2..]
                                    .iter()
                                    .all(|&c| overts.contains(&nodes[c]))
                                    && overts.contains(&nodes[facet.corners[0]])
                                    && overts.contains(&nodes[facet.corners[1]]);
                            }
                        }
                    }
                    if !shared {
                        mask |= 1 << f;
                    }
                }
                mask
            })
            .collect();
        let mut facets: Vec<(u32, u8)> = Vec::new();
        for (e, &mask) in masks.iter().enumerate() {
            for f in 0..8u8 {
                if mask & (1 << f) != 0 {
                    facets.push((e as u32, f));
                }
            }
        }
        let mut node_on_boundary = vec![false; mesh.node_count()];
        let mut node_on_zone_boundary = Vec::new();
        for &(e, f) in &facets {
            let (kind, nodes) = mesh.element(e as usize);
            for &local in kind.facets()[f as usize].nodes {
                let n = nodes[local];
                node_on_boundary[n as usize] = true;
                node_on_zone_boundary.push((n, mesh.zone[e as usize]));
            }
        }
        node_on_zone_boundary.sort_unstable();
        node_on_zone_boundary.dedup();
        Self {
            node_on_boundary,
            node_on_zone_boundary,
            facets,
        }
    }

    /// Whether `node` lies on the boundary of `zone`'s sub-mesh.
    pub fn on_zone_boundary(&self, node: u32, zone: i64) -> bool {
        self.node_on_zone_boundary
            .binary_search(&(node, zone))
            .is_ok()
    }
}
