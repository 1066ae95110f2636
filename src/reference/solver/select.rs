//! Picking facets and nodes by position, to define supports and loads in code.

use super::Constraint;
use crate::element::MAX_NODES;
use crate::mesh::{Mesh, NodeElements};
use rayon::prelude::*;

/// Every boundary facet of the mesh: facets whose corners are not all shared by another element
/// (zones ignored, so material interfaces are not boundaries). Sorted (element, local facet).
pub fn boundary_facets(mesh: &Mesh) -> Vec<(u32, u8)> {
    let adjacency = NodeElements::new(mesh);
    let masks: Vec<u8> = (0..mesh.element_count())
        .into_par_iter()
        .map(|e| {
            let (kind, nodes) = mesh.element(e);
            let mut mask = 0u8;
            for (f, facet) in kind.facets().iter().enumerate() {
                let c0 = nodes[facet.corners[0]] as usize;
                let shared = adjacency.of(c0).iter().any(|&other| {
                    if other as usize == e {
                        return false;
                    }
                    let (okind, onodes) = mesh.element(other as usize);
                    let corners = &onodes[..okind.vertex_count()];
                    facet.corners[1..]
                        .iter()
                        .all(|&c| corners.contains(&nodes[c]))
                });
                if !shared {
                    mask |= 1 << f;
                }
            }
            mask
        })
        .collect();
    let mut out = Vec::new();
    for (e, &mask) in masks.iter().enumerate() {
        for f in 0..8u8 {
            if mask & (1 << f) != 0 {
                out.push((e as u32, f));
            }
        }
    }
    out
}

/// Boundary facets (facets of no other element) whose nodes all satisfy `keep(coords)`;
/// `keep` receives the coordinates of all the facet's nodes (corners first). Sorted.
pub fn select_facets(mesh: &Mesh, keep: impl Fn(&[[f64; 3]]) -> bool) -> Vec<(u32, u8)> {
    let mut coords = [[0.0; 3]; MAX_NODES];
    boundary_facets(mesh)
        .into_iter()
        .filter(|&(e, f)| {
            let (kind, nodes) = mesh.element(e as usize);
            let local = kind.facets()[f as usize].nodes;
            for (i, &l) in local.iter().enumerate() {
                coords[i] = mesh.points[nodes[l] as usize];
            }
            keep(&coords[..local.len()])
        })
        .collect()
}

/// Nodes used by elements whose position satisfies `keep`, ascending.
pub fn select_nodes(mesh: &Mesh, keep: impl Fn([f64; 3]) -> bool) -> Vec<u32> {
    let mut used = vec![false; mesh.node_count()];
    for b in &mesh.blocks {
        for &n in &b.nodes {
            used[n as usize] = true;
        }
    }
    (0..mesh.node_count())
        .filter(|&n| used[n] && keep(mesh.points[n]))
        .map(|n| n as u32)
        .collect()
}

/// Zero-displacement supports: component `component` fixed to 0 at every node used by elements
/// whose position satisfies `keep` (symmetry planes, clamped faces).
pub fn fix_component(
    mesh: &Mesh,
    component: usize,
    keep: impl Fn([f64; 3]) -> bool,
) -> Vec<Constraint> {
    select_nodes(mesh, keep)
        .into_iter()
        .map(|node| Constraint {
            node,
            component,
            value: 0.0,
        })
        .collect()
}
