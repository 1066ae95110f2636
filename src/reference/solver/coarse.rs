//! Coarse level of the CG preconditioner for meshes with quadratic elements: the linear
//! (corner-node) field, solved exactly.
//!
//! `P` interpolates the free dofs of the corner nodes to all free dofs with the elements' linear
//! (corner) shape functions: the identity on corner nodes, the linear interpolant of the corners
//! on mid-edge, face and body nodes. The coarse matrix is the Galerkin product `K_c = P^T K P`
//! (SPD because `K` is SPD and `P` has full column rank), factored once by sparse Cholesky. The
//! preconditioner adds `P K_c^-1 P^T r` to the block-Jacobi term, an additive two-level method:
//! the coarse solve removes the smooth error that Jacobi alone reduces only slowly, so the
//! iteration count no longer grows with the mesh (two-level p-hierarchical preconditioning;
//! e.g. Smith, Bjorstad & Gropp 1996, "Domain Decomposition", ch. 2 on additive two-level
//! methods (from memory)).

use super::direct::Factor;
use super::dofs::{DofMap, NONE};
use super::pattern::Csr;
use super::SolveError;
use crate::element::{ElementKind, MAX_NODES};
use crate::mesh::Mesh;
use rayon::prelude::*;

/// Coarse rows handled per parallel task in the Galerkin product.
const ROW_CHUNK: usize = 1024;

/// Weights below this (relative to 1) are treated as zero in `P` (the linear shape functions at
/// reference nodes are 0, 1/8, 1/4, 1/2 or 1 exactly up to round-off).
const WEIGHT_FLOOR: f64 = 1e-12;

/// A sparse matrix by rows: `ptr` offsets, `col` indices, `val` values.
struct Rows {
    ptr: Vec<u32>,
    col: Vec<u32>,
    val: Vec<f64>,
}

impl Rows {
    fn row(&self, i: usize) -> (&[u32], &[f64]) {
        let (s, e) = (self.ptr[i] as usize, self.ptr[i + 1] as usize);
        (&self.col[s..e], &self.val[s..e])
    }

    /// The transpose, with `columns` rows, each filled in ascending source-row order.
    fn transpose(&self, columns: usize) -> Rows {
        let mut ptr = vec![0u32; columns + 1];
        for &c in &self.col {
            ptr[c as usize + 1] += 1;
        }
        for i in 0..columns {
            ptr[i + 1] += ptr[i];
        }
        let mut fill: Vec<u32> = ptr[..columns].to_vec();
        let mut col = vec![0u32; self.col.len()];
        let mut val = vec![0.0; self.col.len()];
        for i in 0..self.ptr.len() - 1 {
            let (cs, vs) = self.row(i);
            for (&c, &v) in cs.iter().zip(vs) {
                let slot = &mut fill[c as usize];
                col[*slot as usize] = i as u32;
                val[*slot as usize] = v;
                *slot += 1;
            }
        }
        Rows { ptr, col, val }
    }
}

/// The coarse level: interpolation, its transpose and the factored coarse matrix.
pub(super) struct Coarse {
    p: Rows,
    pt: Rows,
    factor: Factor,
}

/// The linear kind of the same family (the corner shape functions of `kind`).
fn linear_kind(kind: ElementKind) -> ElementKind {
    ElementKind::ALL
        .into_iter()
        .find(|k| {
            k.order() == 1 && k.dim() == kind.dim() && k.vertex_count() == kind.vertex_count()
        })
        .unwrap_or(kind)
}

impl Coarse {
    /// Builds the coarse level, or `None` when every node is a corner node (linear meshes: the
    /// coarse problem would be the whole problem).
    pub fn new(mesh: &Mesh, dofs: &DofMap, k: &Csr) -> Result<Option<Self>, SolveError> {
        let n_nodes = mesh.node_count();
        let ndim = dofs.ndim;
        let mut corner = vec![false; n_nodes];
        for b in &mesh.blocks {
            let nn = b.kind.node_count();
            for cell in b.nodes.chunks_exact(nn) {
                for &v in &cell[..b.kind.vertex_count()] {
                    corner[v as usize] = true;
                }
            }
        }
        if (0..n_nodes).all(|n| corner[n] || !dofs.used[n]) {
            return Ok(None);
        }
        // Interpolation sources of the other nodes, first element wins: at `source_ptr[m]` a
        // header `(count, 0)`, then `count` entries `(corner node, weight)`.
        let mut source_ptr = vec![u32::MAX; n_nodes];
        let mut sources: Vec<(u32, f64)> = Vec::new();
        let mut weights = [0.0; MAX_NODES];
        for b in &mesh.blocks {
            let kind = b.kind;
            let nv = kind.vertex_count();
            let linear = linear_kind(kind);
            let nn = kind.node_count();
            for cell in b.nodes.chunks_exact(nn) {
                for (l, &m) in cell.iter().enumerate().skip(nv) {
                    let m = m as usize;
                    if corner[m] || source_ptr[m] != u32::MAX {
                        continue;
                    }
                    source_ptr[m] = sources.len() as u32;
                    linear.shape_functions(kind.reference_nodes()[l], &mut weights[..nv]);
                    let count = weights[..nv]
                        .iter()
                        .filter(|w| w.abs() > WEIGHT_FLOOR)
                        .count();
                    sources.push((count as u32, 0.0));
                    for (c, &w) in weights[..nv].iter().enumerate() {
                        if w.abs() > WEIGHT_FLOOR {
                            sources.push((cell[c], w));
                        }
                    }
                }
            }
        }
        // Coarse equations: free dofs of corner nodes, in fine order.
        let mut coarse_eq = vec![NONE; n_nodes * ndim];
        let mut n_coarse = 0u32;
        for node in 0..n_nodes {
            if corner[node] {
                for c in 0..ndim {
                    if dofs.eq[node * ndim + c] != NONE {
                        coarse_eq[node * ndim + c] = n_coarse;
                        n_coarse += 1;
                    }
                }
            }
        }
        // P by fine equations (ascending node, then component).
        let mut p = Rows {
            ptr: vec![0],
            col: Vec::new(),
            val: Vec::new(),
        };
        for node in 0..n_nodes {
            for c in 0..ndim {
                if dofs.eq[node * ndim + c] == NONE {
                    continue;
                }
                if corner[node] {
                    p.col.push(coarse_eq[node * ndim + c]);
                    p.val.push(1.0);
                } else {
                    let start = source_ptr[node] as usize;
                    let count = sources[start].0 as usize;
                    for &(src, w) in &sources[start + 1..start + 1 + count] {
                        let j = coarse_eq[src as usize * ndim + c];
                        if j != NONE {
                            p.col.push(j);
                            p.val.push(w);
                        }
                    }
                }
                p.ptr.push(p.col.len() as u32);
            }
        }
        if n_coarse == 0 {
            return Ok(None);
        }
        let pt = p.transpose(n_coarse as usize);
        let kc = galerkin(k, &p, &pt, n_coarse as usize);
        let factor = Factor::new(&kc)?;
        Ok(Some(Self { p, pt, factor }))
    }

    /// `z += P K_c^-1 P^T r`.
    pub fn add(&self, r: &[f64], z: &mut [f64]) -> Result<(), SolveError> {
        let mut rc: Vec<f64> = (0..self.pt.ptr.len() - 1)
            .into_par_iter()
            .map(|i| {
                let (cs, vs) = self.pt.row(i);
                cs.iter().zip(vs).map(|(&c, &w)| w * r[c as usize]).sum()
            })
            .collect();
        self.factor.solve(&mut rc)?;
        z.par_iter_mut().enumerate().for_each(|(i, zi)| {
            let (cs, vs) = self.p.row(i);
            let mut acc = 0.0;
            for (&c, &w) in cs.iter().zip(vs) {
                acc += w * rc[c as usize];
            }
            *zi += acc;
        });
        Ok(())
    }
}

/// Upper triangle of `P^T K P` (K in full storage), rows in parallel chunks, each entry summed
/// in a fixed order.
fn galerkin(k: &Csr, p: &Rows, pt: &Rows, n: usize) -> Csr {
    let chunks: Vec<(Vec<u32>, Vec<u32>, Vec<f64>)> = (0..n.div_ceil(ROW_CHUNK))
        .into_par_iter()
        .map(|ci| {
            let rows = ci * ROW_CHUNK..((ci + 1) * ROW_CHUNK).min(n);
            let mut acc = vec![0.0; n];
            let mut seen = vec![false; n];
            let mut touched: Vec<u32> = Vec::new();
            let (mut counts, mut cols, mut vals) = (Vec::new(), Vec::new(), Vec::new());
            for big_i in rows {
                let (fine, wf) = pt.row(big_i);
                for (&i, &wi) in fine.iter().zip(wf) {
                    let i = i as usize;
                    for idx in k.row_ptr[i] as usize..k.row_ptr[i + 1] as usize {
                        let kij = wi * k.val[idx];
                        let (coarse, wc) = p.row(k.col[idx] as usize);
                        for (&big_j, &wj) in coarse.iter().zip(wc) {
                            if (big_j as usize) < big_i {
                                continue;
                            }
                            if !seen[big_j as usize] {
                                seen[big_j as usize] = true;
                                touched.push(big_j);
                            }
                            acc[big_j as usize] += kij * wj;
                        }
                    }
                }
                touched.sort_unstable();
                counts.push(touched.len() as u32);
                for &j in &touched {
                    cols.push(j);
                    vals.push(acc[j as usize]);
                    acc[j as usize] = 0.0;
                    seen[j as usize] = false;
                }
                touched.clear();
            }
            (counts, cols, vals)
        })
        .collect();
    let mut row_ptr = Vec::with_capacity(n + 1);
    row_ptr.push(0u32);
    let mut col = Vec::new();
    let mut val = Vec::new();
    for (counts, c, v) in chunks {
        for count in counts {
            row_ptr.push(row_ptr.last().copied().unwrap_or(0) + count);
        }
        col.extend_from_slice(&c);
        val.extend_from_slice(&v);
    }
    Csr {
        n,
        upper: true,
        row_ptr,
        col,
        val,
    }
}
