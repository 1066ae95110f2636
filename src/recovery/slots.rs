//! Recovered values are stored per (node, zone): a node on a material interface gets one value
//! per zone, so recovery never smooths across a jump in stiffness. In a single-zone mesh every
//! used node has exactly one slot.

use crate::mesh::{Mesh, NodeElements};

/// CSR map from nodes to their (node, zone) slots.
#[derive(Clone, Debug)]
pub struct Slots {
    offsets: Vec<usize>,
    zones: Vec<i64>,
    nodes: Vec<u32>,
}

impl Slots {
    /// One slot for each distinct zone among the elements around each node.
    pub fn new(mesh: &Mesh, adjacency: &NodeElements) -> Self {
        let n = mesh.node_count();
        let mut offsets = Vec::with_capacity(n + 1);
        let mut zones = Vec::with_capacity(n);
        let mut nodes = Vec::with_capacity(n);
        offsets.push(0);
        for node in 0..n {
            let start = zones.len();
            for &e in adjacency.of(node) {
                let z = mesh.zone[e as usize];
                if !zones[start..].contains(&z) {
                    zones.push(z);
                    nodes.push(node as u32);
                }
            }
            zones[start..].sort_unstable();
            offsets.push(zones.len());
        }
        Self {
            offsets,
            zones,
            nodes,
        }
    }

    /// Number of slots.
    pub fn len(&self) -> usize {
        self.zones.len()
    }

    /// Whether there are no slots (empty mesh).
    pub fn is_empty(&self) -> bool {
        self.zones.is_empty()
    }

    /// Slot of `node` in `zone`. Every (node, zone) pair of an element exists by construction.
    #[inline]
    pub fn slot(&self, node: u32, zone: i64) -> usize {
        let s = self.offsets[node as usize];
        let e = self.offsets[node as usize + 1];
        if e - s == 1 {
            return s;
        }
        s + self.zones[s..e]
            .iter()
            .position(|&z| z == zone)
            .unwrap_or(0)
    }

    /// Slots of `node` (one per zone around it).
    #[inline]
    pub fn of_node(&self, node: u32) -> std::ops::Range<usize> {
        self.offsets[node as usize]..self.offsets[node as usize + 1]
    }

    /// Node and zone of slot `s`.
    #[inline]
    pub fn node_zone(&self, s: usize) -> (u32, i64) {
        (self.nodes[s], self.zones[s])
    }
}
