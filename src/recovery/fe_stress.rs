//! FE stresses from nodal displacements: small strain, exact per-element Jacobian.
//!
//! epsilon = B u with B built from physical shape-function gradients dN/dx = J^-T dN/dxi;
//! sigma = D epsilon. In axisymmetric mode the hoop strain is u_r / r with r = sum N_i x_i
//! (Zienkiewicz & Taylor, The Finite Element Method vol. 1, ch. 5, common practice); on the axis
//! (r -> 0) the limit du_r/dr is used.
//!
//! Every evaluation also checks the geometry: det J <= 0 means an inverted element, and
//! det J / h^d below [`DEGENERATE_RELATIVE_DET`] (h the largest corner distance) a collapsed
//! one. Both are reported by the file's cell id instead of turning into NaN later, and the
//! passes that evaluate strains anyway do the check, so no separate pass is needed.

use super::materials::ElementMaterials;
use crate::element::{
    invert_jacobian, mid_nodes_at_midpoints, ElementKind, ShapeTable, TableRule, MAX_NODES,
};
use crate::material::{AnalysisMode, SymTensor};
use crate::mesh::{BadElement, BadElementKind, Model, DEGENERATE_RELATIVE_DET};
use rayon::prelude::*;

/// Strain, physical position and det J at one point.
pub type PointStrain = (SymTensor, [f64; 3], f64);

/// Coordinates and displacements of one element, gathered once per element (stack only).
///
/// Each node is one row `[x, y, z, 0, ux, uy, uz, 0]`: a single 8-wide accumulation per natural
/// direction then yields both the Jacobian and the displacement gradient (it vectorises).
pub struct ElementData {
    /// Element kind.
    pub kind: ElementKind,
    /// Per node: coordinates in 0..3, displacement in 4..7.
    pub rows: [[f64; 8]; MAX_NODES],
    /// h^d with h the largest distance between two corners: the scale of det J.
    pub det_scale: f64,
    /// For straight-sided simplices the Jacobian is constant: (J^-1, det J) computed once.
    affine: Option<([[f64; 3]; 3], f64)>,
}

/// Constant (J^-1, det J) of a straight-sided triangle or tetrahedron: tri3 and tet4 always,
/// tri6 and tet10 when every mid node sits at its edge's midpoint (to 1e-12 of the size). On
/// the unit reference simplex J's rows are x_1 - x_0, x_2 - x_0 (, x_3 - x_0) (common practice).
fn affine_simplex(
    kind: ElementKind,
    rows: &[[f64; 8]; MAX_NODES],
    h2: f64,
) -> Option<([[f64; 3]; 3], f64)> {
    use ElementKind::*;
    let d = match kind {
        Tri3 | Tri6 => 2,
        Tet4 | Tet10 => 3,
        _ => return None,
    };
    if !mid_nodes_at_midpoints(kind, |i| [rows[i][0], rows[i][1], rows[i][2]], h2) {
        return None;
    }
    let mut j = [[0.0; 3]; 3];
    for r in 0..d {
        for c in 0..d {
            j[r][c] = rows[r + 1][c] - rows[0][c];
        }
    }
    let (det, inv) = invert_jacobian(d, &j);
    Some((inv, det))
}

impl ElementData {
    /// Gathers element `nodes` of `model`.
    #[inline]
    pub fn gather(model: &Model, kind: ElementKind, nodes: &[u32]) -> Self {
        Self::from_nodes(
            kind,
            model.mesh.dimension,
            nodes,
            &model.mesh.points,
            &model.displacement,
        )
    }

    /// Gathers element `nodes` from point and displacement arrays, for a mesh of spatial
    /// dimension `dim`.
    #[inline]
    pub fn from_nodes(
        kind: ElementKind,
        dim: usize,
        nodes: &[u32],
        points: &[[f64; 3]],
        displacement: &[[f64; 3]],
    ) -> Self {
        let mut rows = [[0.0; 8]; MAX_NODES];
        for (row, &n) in rows.iter_mut().zip(nodes) {
            let p = points[n as usize];
            let u = displacement[n as usize];
            *row = [p[0], p[1], p[2], 0.0, u[0], u[1], u[2], 0.0];
        }
        let nv = kind.vertex_count();
        let mut h2: f64 = 0.0;
        for a in 0..nv {
            for b in a + 1..nv {
                let d2 = (0..3)
                    .map(|c| (rows[a][c] - rows[b][c]).powi(2))
                    .sum::<f64>();
                h2 = h2.max(d2);
            }
        }
        let det_scale = h2.powf(dim as f64 / 2.0);
        let affine = if dim == kind.dim() {
            affine_simplex(kind, &rows, h2)
        } else {
            None
        };
        Self {
            kind,
            rows,
            det_scale,
            affine,
        }
    }

    /// Strain, physical position and det J at point `k` of `table`, or why the element is bad
    /// there. The position is only accumulated when `position` is true or the mode is
    /// axisymmetric (otherwise it is returned as zeros).
    #[inline]
    pub fn strain_at(
        &self,
        table: &ShapeTable,
        k: usize,
        dim: usize,
        mode: AnalysisMode,
        position: bool,
    ) -> Result<PointStrain, BadElementKind> {
        let pos = position || mode == AnalysisMode::Axisymmetric;
        macro_rules! arm {
            ($d:literal, $n:literal) => {
                if pos {
                    self.strain_at_dim::<$d, $n, true>(table, k, mode)
                } else {
                    self.strain_at_dim::<$d, $n, false>(table, k, mode)
                }
            };
        }
        // Dimension and node count as constants let the node loop unroll (one copy per kind).
        match (dim, self.kind.node_count()) {
            (3, 4) => arm!(3, 4),
            (3, 6) => arm!(3, 6),
            (3, 8) => arm!(3, 8),
            (3, 10) => arm!(3, 10),
            (3, 15) => arm!(3, 15),
            (3, 20) => arm!(3, 20),
            (3, 27) => arm!(3, 27),
            (2, 3) => arm!(2, 3),
            (2, 4) => arm!(2, 4),
            (2, 6) => arm!(2, 6),
            (2, 8) => arm!(2, 8),
            (2, 9) => arm!(2, 9),
            _ => Err(BadElementKind::Degenerate),
        }
    }

    /// [`Self::strain_at`] for a fixed dimension `D` and node count `NN`. The displacement
    /// gradient is formed in natural coordinates, G_ai = sum_n dN_n/dxi_a u_ni, alongside
    /// J_ab = sum_n dN_n/dxi_a x_nb, then mapped once, du_i/dx_b = sum_a (J^-1)_ba G_ai: cheaper
    /// than mapping every shape-function gradient first.
    #[inline]
    fn strain_at_dim<const D: usize, const NN: usize, const POS: bool>(
        &self,
        table: &ShapeTable,
        k: usize,
        mode: AnalysisMode,
    ) -> Result<PointStrain, BadElementKind> {
        let (Ok(dn), Ok(n), Ok(rows)) = (
            <&[[f64; 3]; NN]>::try_from(table.dn_at(k)),
            <&[f64; NN]>::try_from(table.n_at(k)),
            <&[[f64; 8]; NN]>::try_from(&self.rows[..NN]),
        ) else {
            return Err(BadElementKind::Degenerate);
        };
        // acc[r] = sum_a dN_a/dxi_r [x_a, u_a]; pos = sum_a N_a [x_a, u_a]. For affine
        // simplices J is known, so only the displacement half (lanes 4..8) is accumulated.
        let mut acc = [[0.0; 8]; 3];
        let mut pos = [0.0; 8];
        let affine = self.affine;
        if affine.is_some() {
            for a in 0..NN {
                let row = &rows[a];
                for r in 0..D {
                    let w = dn[a][r];
                    for c in 4..8 {
                        acc[r][c] += w * row[c];
                    }
                }
            }
        } else {
            for a in 0..NN {
                let row = &rows[a];
                for r in 0..D {
                    let w = dn[a][r];
                    for c in 0..8 {
                        acc[r][c] += w * row[c];
                    }
                }
            }
        }
        if POS {
            for a in 0..NN {
                for c in 0..8 {
                    pos[c] += n[a] * rows[a][c];
                }
            }
        }
        let (det, inv) = match affine {
            Some((inv, det)) => (det, inv),
            None => {
                let mut j = [[0.0; 3]; 3];
                for r in 0..D {
                    j[r].copy_from_slice(&acc[r][..3]);
                }
                invert_jacobian(D, &j)
            }
        };
        if det.is_nan() || det <= 0.0 {
            return Err(BadElementKind::Inverted);
        }
        let relative = det / self.det_scale;
        if !det.is_finite() || relative.is_nan() || relative < DEGENERATE_RELATIVE_DET {
            return Err(BadElementKind::Degenerate);
        }
        // h[i][b] = du_i/dx_b
        let mut h = [[0.0; 3]; 3];
        for i in 0..D {
            for b in 0..D {
                let mut v = 0.0;
                for a in 0..D {
                    v += inv[b][a] * acc[a][4 + i];
                }
                h[i][b] = v;
            }
        }
        let mut e = [h[0][0], h[1][1], 0.0, h[0][1] + h[1][0], 0.0, 0.0];
        let x = [pos[0], pos[1], pos[2]];
        if D == 3 {
            e[2] = h[2][2];
            e[4] = h[1][2] + h[2][1];
            e[5] = h[0][2] + h[2][0];
        } else if mode == AnalysisMode::Axisymmetric {
            let size = rows.iter().map(|r| r[0].abs()).fold(0.0, f64::max);
            e[2] = if x[0] > 1e-12 * size.max(f64::MIN_POSITIVE) {
                pos[4] / x[0]
            } else {
                e[0]
            };
        }
        Ok((e, x, det))
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

/// Computes FE stresses at the sampling points of every element. Inverted or collapsed
/// elements are returned as errors, in file order.
pub fn sample_stresses(
    model: &Model,
    materials: &ElementMaterials,
) -> Result<SampledStresses, Vec<BadElement>> {
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
        let failed: Vec<BadElement> = out.stress[start..]
            .par_chunks_mut(ns)
            .zip(out.position[start..].par_chunks_mut(ns))
            .enumerate()
            .filter_map(|(i, (stress, position))| {
                let e = block.first_element + i;
                let data = ElementData::gather(model, kind, block.cell(i));
                let el = materials.of(e);
                for k in 0..ns {
                    match data.strain_at(table, k, dim, materials.mode, true) {
                        Ok((strain, x, _)) => {
                            stress[k] = el.stress(&strain);
                            position[k] = x;
                        }
                        Err(kind) => {
                            return Some(BadElement {
                                file_cell: mesh.file_cell[e],
                                kind,
                            })
                        }
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
        bad.sort_by_key(|b| b.file_cell);
        Err(bad)
    }
}
