//! Stress recovery: FE stresses at sampling points, then a smooth nodal stress field.
//!
//! `Spr` is Zienkiewicz-Zhu superconvergent patch recovery (see the `spr` module for the rules);
//! `Average` is simple nodal averaging of the elements' own stresses at each node, the crudest
//! form of the 1987 Zienkiewicz-Zhu projection, kept for comparison.

pub mod corner;
mod fe_stress;
mod least_squares;
mod materials;
mod slots;
mod spr;

pub use corner::{fit_corner, CornerField};
pub use fe_stress::{sample_stresses, ElementData, PointStrain, SampledStresses};
pub use least_squares::{evaluate as evaluate_patch, fit as fit_polynomial, Sample, MAX_TERMS};
pub use materials::{ElementMaterials, MissingZoneMaterial};
pub use slots::Slots;

use crate::material::SymTensor;
use crate::mesh::{BoundaryFacets, Model, NodeElements};
use rayon::prelude::*;

/// Which recovery to run.
#[derive(Copy, Clone, Debug, PartialEq, Eq)]
pub enum RecoveryMethod {
    /// Superconvergent patch recovery (the default).
    Spr,
    /// Simple nodal averaging, for comparison.
    Average,
}

/// How a node's recovered value was obtained (diagnostics for the user).
#[derive(Copy, Clone, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum NodeRule {
    /// Interior vertex: its own patch.
    OwnPatch,
    /// Average of the interior patches containing the node.
    InteriorPatches,
    /// Average of patches containing the node, boundary patches included (fallback a).
    AnyPatch,
    /// A patch around the node enlarged by rings of neighbours (fallback b).
    EnlargedPatch,
    /// The enlarged patch with a lower-degree basis (fallback c).
    LowerDegree,
    /// Plain average of the elements' values at the node (fallback d, or `--recovery average`).
    Averaged,
}

impl NodeRule {
    /// Plain description for summaries.
    pub fn describe(self) -> &'static str {
        match self {
            NodeRule::OwnPatch => "own interior patch",
            NodeRule::InteriorPatches => "neighbouring interior patches",
            NodeRule::AnyPatch => "boundary patches",
            NodeRule::EnlargedPatch => "enlarged patch",
            NodeRule::LowerDegree => "lower-degree patch",
            NodeRule::Averaged => "element averaging",
        }
    }
}

/// The recovered stress field: one value per (node, zone) slot.
#[derive(Clone, Debug)]
pub struct Recovered {
    /// The method that produced it.
    pub method: RecoveryMethod,
    /// The (node, zone) slots.
    pub slots: Slots,
    /// Recovered stress per slot.
    pub values: Vec<SymTensor>,
    /// Rule used per slot.
    pub rules: Vec<NodeRule>,
}

impl Recovered {
    /// Recovered stress at `node` for an element of `zone`.
    #[inline]
    pub fn at(&self, node: u32, zone: i64) -> &SymTensor {
        &self.values[self.slots.slot(node, zone)]
    }

    /// One value per node for output: the mean over the node's zones (zero for unused nodes).
    pub fn nodal_field(&self, node_count: usize) -> Vec<SymTensor> {
        (0..node_count as u32)
            .into_par_iter()
            .map(|n| {
                let r = self.slots.of_node(n);
                let k = r.len();
                let mut s = [0.0; 6];
                for i in r {
                    for c in 0..6 {
                        s[c] += self.values[i][c];
                    }
                }
                if k > 0 {
                    s.map(|v| v / k as f64)
                } else {
                    s
                }
            })
            .collect()
    }

    /// How many slots used each rule, in rule order.
    pub fn rule_counts(&self) -> Vec<(NodeRule, usize)> {
        let mut counts: std::collections::BTreeMap<NodeRule, usize> = Default::default();
        for &r in &self.rules {
            *counts.entry(r).or_default() += 1;
        }
        counts.into_iter().collect()
    }
}

/// Recovers the stress field from the sampled FE stresses.
pub fn recover(
    model: &Model,
    materials: &ElementMaterials,
    samples: &SampledStresses,
    adjacency: &NodeElements,
    boundary: &BoundaryFacets,
    method: RecoveryMethod,
) -> Recovered {
    let slots = Slots::new(&model.mesh, adjacency);
    let ctx = spr::Context {
        model,
        materials,
        samples,
        adjacency,
        boundary,
        slots: &slots,
    };
    let (values, rules) = match method {
        RecoveryMethod::Spr => spr::recover_spr(&ctx),
        RecoveryMethod::Average => {
            let values = (0..slots.len())
                .into_par_iter()
                .map(|s| {
                    let (node, zone) = slots.node_zone(s);
                    spr::node_average(&ctx, node, zone)
                })
                .collect();
            (values, vec![NodeRule::Averaged; slots.len()])
        }
    };
    Recovered {
        method,
        slots,
        values,
        rules,
    }
}
