//! Superconvergent patch recovery (Zienkiewicz & Zhu 1992, part 1).
//!
//! A patch is the set of elements of one zone sharing a corner node (the patch's vertex). The FE
//! stresses at the elements' sampling points are fitted, component by component, by the
//! elements' own polynomial basis in coordinates centred on the vertex and scaled by the patch
//! size, xbar = (x - x_v) / h (methods sheet 1.5). Nodal values:
//! 1. an interior vertex takes its own patch's value, sigma*(x_v) = a_0;
//! 2. every other node (boundary vertices, mid-side, face and body nodes) averages the
//!    polynomials of the full-rank *interior* patches whose elements contain it (ZZ 1992 part 1:
//!    boundary values from adjacent interior patches, because a one-sided boundary patch
//!    extrapolates badly);
//! 3. fallback chain for nodes no interior patch reaches: (a) any full-rank patch, boundary
//!    patches included; (b) a patch around the node itself, enlarged ring by ring until the fit
//!    has full rank; (c) the same with a lower-degree basis; (d) the plain average of the
//!    elements' FE stresses at the node. The rule used is recorded per node.

use super::fe_stress::{ElementData, SampledStresses};
use super::least_squares::{evaluate, fit, Sample, MAX_TERMS};
use super::materials::ElementMaterials;
use super::slots::Slots;
use super::NodeRule;
use crate::element::{PatchBasis, TableRule};
use crate::material::SymTensor;
use crate::mesh::{BoundaryFacets, Mesh, Model, NodeElements};
use rayon::prelude::*;

/// Most candidate patches averaged for one node; more is never reached on sane meshes and the
/// cut keeps the loop allocation-free (the order is deterministic, so results stay reproducible).
const MAX_CANDIDATES: usize = 128;
/// Samples of one patch kept on the stack (a tet10 vertex in an unstructured mesh has about
/// 20-60 elements with 4 samples each); larger patches spill to the heap.
const STACK_SAMPLES: usize = 384;
/// Rings of neighbours added at most when enlarging a patch (fallback b).
const MAX_RINGS: usize = 3;

/// Status of one vertex patch.
#[derive(Copy, Clone, Debug, PartialEq, Eq)]
enum PatchStatus {
    Interior,
    Boundary,
    Failed,
}

/// All vertex patches, fitted.
struct Patches {
    stride: usize,
    coeff: Vec<SymTensor>,
    meta: Vec<PatchMeta>,
    of_slot: Vec<u32>,
}

#[derive(Copy, Clone, Debug)]
struct PatchMeta {
    center: [f64; 3],
    scale: f64,
    basis: PatchBasis,
    status: PatchStatus,
}

/// Read-only inputs shared by every patch and node.
pub(super) struct Context<'a> {
    pub model: &'a Model,
    pub materials: &'a ElementMaterials,
    pub samples: &'a SampledStresses,
    pub adjacency: &'a NodeElements,
    pub boundary: &'a BoundaryFacets,
    pub slots: &'a Slots,
}

impl Context<'_> {
    fn mesh(&self) -> &Mesh {
        &self.model.mesh
    }

    /// Whether `node` is a corner of element `e`.
    fn is_vertex_of(&self, node: u32, e: usize) -> bool {
        let (kind, nodes) = self.mesh().element(e);
        nodes[..kind.vertex_count()].contains(&node)
    }

    /// Fits `basis` to the samples of `elements` around `center`; the scale is the largest
    /// distance from the centre to a corner of the elements.
    fn fit(
        &self,
        elements: &[u32],
        center: [f64; 3],
        basis: PatchBasis,
        coeff: &mut [SymTensor],
    ) -> Option<f64> {
        let mesh = self.mesh();
        let mut h2: f64 = 0.0;
        for &e in elements {
            let (kind, nodes) = mesh.element(e as usize);
            for &n in &nodes[..kind.vertex_count()] {
                let p = mesh.points[n as usize];
                h2 = h2.max((0..3).map(|k| (p[k] - center[k]).powi(2)).sum());
            }
        }
        let h = h2.sqrt();
        if h.is_nan() || h <= 0.0 {
            return None;
        }
        // Samples gathered on the stack; a rare very large patch spills to the heap.
        let mut stack = [([0.0; 3], [0.0; 6]); STACK_SAMPLES];
        let mut heap: Vec<Sample> = Vec::new();
        let mut count = 0;
        for &e in elements {
            let e = e as usize;
            let b = mesh.block_of(e);
            let block = &mesh.blocks[b];
            for s in self.samples.range(block.kind, b, e - block.first_element) {
                let item = (
                    scaled(self.samples.position[s], center, h),
                    self.samples.stress[s],
                );
                if count < STACK_SAMPLES {
                    stack[count] = item;
                } else {
                    if heap.is_empty() {
                        heap.extend_from_slice(&stack);
                    }
                    heap.push(item);
                }
                count += 1;
            }
        }
        let samples = if count <= STACK_SAMPLES {
            &stack[..count]
        } else {
            &heap[..]
        };
        fit(basis, samples, coeff).then_some(h)
    }
}

#[inline]
fn scaled(x: [f64; 3], center: [f64; 3], h: f64) -> [f64; 3] {
    [
        (x[0] - center[0]) / h,
        (x[1] - center[1]) / h,
        (x[2] - center[2]) / h,
    ]
}

/// The richest basis among the elements (ties: the first).
fn patch_basis(mesh: &Mesh, elements: impl Iterator<Item = u32>) -> Option<PatchBasis> {
    let mut best: Option<PatchBasis> = None;
    for e in elements {
        let b = mesh.element(e as usize).0.patch_basis();
        if best.is_none_or(|cur| b.len() > cur.len()) {
            best = Some(b);
        }
    }
    best
}

/// Fits every vertex patch, in parallel.
fn fit_patches(ctx: &Context) -> Patches {
    let mesh = ctx.mesh();
    let slots = ctx.slots;
    // A slot is a patch vertex when it is a corner of an element of its zone.
    let mut is_vertex = vec![false; slots.len()];
    for block in &mesh.blocks {
        let nv = block.kind.vertex_count();
        for i in 0..block.len() {
            let zone = mesh.zone[block.first_element + i];
            for &v in &block.cell(i)[..nv] {
                is_vertex[slots.slot(v, zone)] = true;
            }
        }
    }
    let mut of_slot = vec![u32::MAX; slots.len()];
    let mut vertex_slots = Vec::new();
    for (s, entry) in of_slot.iter_mut().enumerate() {
        if is_vertex[s] {
            *entry = vertex_slots.len() as u32;
            vertex_slots.push(s as u32);
        }
    }
    let stride = mesh
        .blocks
        .iter()
        .map(|b| b.kind.patch_basis().len())
        .max()
        .unwrap_or(1);
    let mut coeff = vec![[0.0; 6]; vertex_slots.len() * stride];
    let meta: Vec<PatchMeta> = coeff
        .par_chunks_mut(stride)
        .zip(vertex_slots.par_iter())
        .map(|(c, &s)| {
            let (node, zone) = slots.node_zone(s as usize);
            let center = mesh.points[node as usize];
            let mut buf = [0u32; MAX_CANDIDATES];
            let mut count = 0;
            for &e in ctx.adjacency.of(node as usize) {
                if mesh.zone[e as usize] == zone
                    && ctx.is_vertex_of(node, e as usize)
                    && count < MAX_CANDIDATES
                {
                    buf[count] = e;
                    count += 1;
                }
            }
            let elements = &buf[..count];
            let basis = patch_basis(mesh, elements.iter().copied()).unwrap_or(PatchBasis::Linear2);
            let fitted = ctx.fit(elements, center, basis, c);
            let status = match fitted {
                None => PatchStatus::Failed,
                Some(_) if ctx.boundary.on_zone_boundary(node, zone) => PatchStatus::Boundary,
                Some(_) => PatchStatus::Interior,
            };
            PatchMeta {
                center,
                scale: fitted.unwrap_or(1.0),
                basis,
                status,
            }
        })
        .collect();
    Patches {
        stride,
        coeff,
        meta,
        of_slot,
    }
}

/// SPR nodal values for every slot.
pub(super) fn recover_spr(ctx: &Context) -> (Vec<SymTensor>, Vec<NodeRule>) {
    let patches = fit_patches(ctx);
    let mesh = ctx.mesh();
    let slots = ctx.slots;
    let mut values = vec![[0.0; 6]; slots.len()];
    let mut rules = vec![NodeRule::Averaged; slots.len()];
    values
        .par_iter_mut()
        .zip(rules.par_iter_mut())
        .enumerate()
        .for_each(|(s, (value, rule))| {
            let (node, zone) = slots.node_zone(s);
            let x = mesh.points[node as usize];
            let own = patches.of_slot[s];
            if own != u32::MAX && patches.meta[own as usize].status == PatchStatus::Interior {
                let start = own as usize * patches.stride;
                *value = patches.coeff[start];
                *rule = NodeRule::OwnPatch;
                return;
            }
            for (accept, label) in [
                (PatchStatus::Interior, NodeRule::InteriorPatches),
                (PatchStatus::Boundary, NodeRule::AnyPatch),
            ] {
                if let Some(v) = average_of_patches(ctx, &patches, node, zone, x, accept) {
                    *value = v;
                    *rule = label;
                    return;
                }
            }
            let (v, r) = fallback(ctx, node, zone);
            *value = v;
            *rule = r;
        });
    (values, rules)
}

/// Mean of the patch polynomials (status Interior, or Interior and Boundary when `accept` is
/// Boundary) of the patches whose elements contain `node`, evaluated at `x`.
fn average_of_patches(
    ctx: &Context,
    patches: &Patches,
    node: u32,
    zone: i64,
    x: [f64; 3],
    accept: PatchStatus,
) -> Option<SymTensor> {
    let mesh = ctx.mesh();
    let mut seen = [0u32; MAX_CANDIDATES];
    let mut count = 0;
    let mut sum = [0.0; 6];
    for &e in ctx.adjacency.of(node as usize) {
        if mesh.zone[e as usize] != zone {
            continue;
        }
        let (kind, nodes) = mesh.element(e as usize);
        for &v in &nodes[..kind.vertex_count()] {
            let p = patches.of_slot[ctx.slots.slot(v, zone)];
            if p == u32::MAX || seen[..count].contains(&p) || count == MAX_CANDIDATES {
                continue;
            }
            let meta = &patches.meta[p as usize];
            let ok = match accept {
                PatchStatus::Interior => meta.status == PatchStatus::Interior,
                _ => meta.status != PatchStatus::Failed,
            };
            if !ok {
                continue;
            }
            seen[count] = p;
            count += 1;
            let start = p as usize * patches.stride;
            let val = evaluate(
                meta.basis,
                &patches.coeff[start..start + patches.stride],
                scaled(x, meta.center, meta.scale),
            );
            for c in 0..6 {
                sum[c] += val[c];
            }
        }
    }
    (count > 0).then(|| sum.map(|v| v / count as f64))
}

/// Fallbacks (b), (c) and (d) for a node no patch reaches. Rare, so it may allocate.
fn fallback(ctx: &Context, node: u32, zone: i64) -> (SymTensor, NodeRule) {
    let mesh = ctx.mesh();
    let center = mesh.points[node as usize];
    let mut set: Vec<u32> = ctx
        .adjacency
        .of(node as usize)
        .iter()
        .copied()
        .filter(|&e| mesh.zone[e as usize] == zone)
        .collect();
    let mut coeff = [[0.0; 6]; MAX_TERMS];
    let basis = patch_basis(mesh, set.iter().copied());
    if let Some(basis) = basis {
        for ring in 0..=MAX_RINGS {
            if ring > 0 {
                grow(ctx, &mut set, zone);
            }
            if ctx.fit(&set, center, basis, &mut coeff).is_some() {
                return (coeff[0], NodeRule::EnlargedPatch);
            }
        }
        let mut lower = basis.lower();
        while let Some(b) = lower {
            if ctx.fit(&set, center, b, &mut coeff).is_some() {
                return (coeff[0], NodeRule::LowerDegree);
            }
            lower = b.lower();
        }
    }
    (node_average(ctx, node, zone), NodeRule::Averaged)
}

/// Adds every element of `zone` sharing a node with the set.
fn grow(ctx: &Context, set: &mut Vec<u32>, zone: i64) {
    let mesh = ctx.mesh();
    let mut added = Vec::new();
    for &e in set.iter() {
        for &n in mesh.element(e as usize).1 {
            for &other in ctx.adjacency.of(n as usize) {
                if mesh.zone[other as usize] == zone {
                    added.push(other);
                }
            }
        }
    }
    set.extend(added);
    set.sort_unstable();
    set.dedup();
}

/// Plain average of the FE stresses of the zone's elements at `node` (the elements' own values
/// at that node). Elements whose Jacobian vanishes at the node are left out.
pub(super) fn node_average(ctx: &Context, node: u32, zone: i64) -> SymTensor {
    let mesh = ctx.mesh();
    let dim = mesh.dimension;
    let mut sum = [0.0; 6];
    let mut count = 0usize;
    for &e in ctx.adjacency.of(node as usize) {
        let e = e as usize;
        if mesh.zone[e] != zone {
            continue;
        }
        let (kind, nodes) = mesh.element(e);
        let Some(local) = nodes.iter().position(|&n| n == node) else {
            continue;
        };
        let data = ElementData::gather(ctx.model, kind, nodes);
        if let Ok((strain, _, _)) = data.strain_at(
            kind.table(TableRule::Nodes),
            local,
            dim,
            ctx.materials.mode,
            false,
        ) {
            let s = ctx.materials.of(e).stress(&strain);
            for c in 0..6 {
                sum[c] += s[c];
            }
            count += 1;
        }
    }
    if count == 0 {
        return sum;
    }
    sum.map(|v| v / count as f64)
}
