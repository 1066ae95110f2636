//! FE stresses from nodal displacements: small strain, exact per-element Jacobian.
//!
//! epsilon = B u with B built from physical shape-function gradients dN/dx = J^-T dN/dxi;
//! sigma = D epsilon. In axisymmetric mode the hoop strain is u_r / r with r = sum N_i x_i
//! (Zienkiewicz & Taylor, The Finite Element Method vol. 1, ch. 5, common practice); on the axis
//! (r -> 0) the limit du_r/dr is used.

use super::materials::ElementMaterials;
use crate::element::{map_gradients, ElementKind, ShapeTable, TableRule, MAX_NODES};
use crate::material::{AnalysisMode, SymTensor};
use crate::mesh::Model;
use rayon::prelude::*;

/// Coordinates and displacements of one element, gathered once per element (stack only).
pub struct ElementData {
    /// Element kind.
    pub kind: ElementKind,
    /// Nodal coordinates (first `kind.node_count()` used).
    pub coords: [[f64; 3]; MAX_NODES],
    /// Nodal displacements.
    pub disp: [[f64; 3]; MAX_NODES],
}

impl ElementData {
    /// Gathers element `nodes` of `model`.
    #[inline]
    pub fn gather(model: &Model, kind: ElementKind, nodes: &[u32]) -> Self {
        let mut coords = [[0.0; 3]; MAX_NODES];
        let mut disp = [[0.0; 3]; MAX_NODES];
        for (a, &n) in nodes.iter().enumerate() {
            coords[a] = model.mesh.points[n as usize];
            disp[a] = model.displacement[n as usize];
        }
        Self { kind, coords, disp }
    }

    /// Strain, physical position and det J at point `k` of `table`. `None` when det J <= 0.
    #[inline]
    pub fn strain_at(
        &self,
        table: &ShapeTable,
        k: usize,
        dim: usize,
        mode: AnalysisMode,
    ) -> Option<(SymTensor, [f64; 3], f64)> {
        let nn = self.kind.node_count();
        let mut dn = [[0.0; 3]; MAX_NODES];
        let det = map_gradients(dim, &self.coords[..nn], table.dn_at(k), &mut dn[..nn]);
        if det.is_nan() || det <= 0.0 {
            return None;
        }
        let n = table.n_at(k);
        let mut x = [0.0; 3];
        let mut e = [0.0; 6];
        for a in 0..nn {
            let g = dn[a];
            let u = self.disp[a];
            for d in 0..3 {
                x[d] += n[a] * self.coords[a][d];
            }
            e[0] += g[0] * u[0];
            e[1] += g[1] * u[1];
            e[3] += g[1] * u[0] + g[0] * u[1];
            if dim == 3 {
                e[2] += g[2] * u[2];
                e[4] += g[2] * u[1] + g[1] * u[2];
                e[5] += g[2] * u[0] + g[0] * u[2];
            }
        }
        if mode == AnalysisMode::Axisymmetric {
            let ur: f64 = (0..nn).map(|a| n[a] * self.disp[a][0]).sum();
            let size = (0..nn).map(|a| self.coords[a][0].abs()).fold(0.0, f64::max);
            e[2] = if x[0] > 1e-12 * size.max(f64::MIN_POSITIVE) {
                ur / x[0]
            } else {
                e[0]
            };
        }
        Some((e, x, det))
    }
}

/// FE stresses and positions at every element's SPR sampling points, block after block.
#[derive(Clone, Debug, Default)]
pub struct SampledStresses {
    /// Stress at each sampling point.
    pub stress: Vec<SymTensor>,
    /// Physical position of each sampling point.
    pub position: Vec<[f64; 3]>,
    /// Per block: index of the block's first sample.
    pub block_start: Vec<usize>,
}

impl SampledStresses {
    /// Sample range of global element `e` in block `b` (local index `i`).
    #[inline]
    pub fn range(&self, kind: ElementKind, b: usize, i: usize) -> std::ops::Range<usize> {
        let ns = kind.sampling_points().len();
        let s = self.block_start[b] + i * ns;
        s..s + ns
    }
}

/// Computes FE stresses at the sampling points of every element. Elements with det J <= 0 at a
/// sampling point are returned as errors (file cell ids); the geometry check normally catches
/// them first.
pub fn sample_stresses(
    model: &Model,
    materials: &ElementMaterials,
) -> Result<SampledStresses, Vec<u32>> {
    let mesh = &model.mesh;
    let dim = mesh.dimension;
    let mut out = SampledStresses::default();
    let mut bad = Vec::new();
    for block in &mesh.blocks {
        let kind = block.kind;
        let table = kind.table(TableRule::Sampling);
        let ns = table.len();
        out.block_start.push(out.stress.len());
        let start = out.stress.len();
        out.stress.resize(start + block.len() * ns, [0.0; 6]);
        out.position.resize(start + block.len() * ns, [0.0; 3]);
        let failed: Vec<u32> = out.stress[start..]
            .par_chunks_mut(ns)
            .zip(out.position[start..].par_chunks_mut(ns))
            .enumerate()
            .filter_map(|(i, (stress, position))| {
                let e = block.first_element + i;
                let data = ElementData::gather(model, kind, block.cell(i));
                let el = materials.of(e);
                for k in 0..ns {
                    match data.strain_at(table, k, dim, materials.mode) {
                        Some((strain, x, _)) => {
                            stress[k] = el.stress(&strain);
                            position[k] = x;
                        }
                        None => return Some(mesh.file_cell[e]),
                    }
                }
                None
            })
            .collect();
        bad.extend(failed);
    }
    if bad.is_empty() {
        Ok(out)
    } else {
        Err(bad)
    }
}
