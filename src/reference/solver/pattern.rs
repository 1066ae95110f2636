//! Sparsity pattern of the stiffness matrix: node-to-node adjacency through elements, expanded
//! to the free dofs, stored as CSR with sorted columns.
//!
//! Assembly needs the position of entry (row dof, column dof) without searching a whole row:
//! for every node `a` the sorted neighbour list `nbr` carries `prefix[k]`, the number of free
//! columns contributed by the neighbours before entry `k`. The column of free dof `(m, d)` in any
//! full row of node `a` is then `prefix[k_m] + rank(m, d)`, and an upper-triangle row (the one
//! handed to the Cholesky factorisation) is the suffix of the full row starting at its diagonal.

use super::dofs::{DofMap, NONE};
use super::SolveError;
use crate::mesh::{Mesh, NodeElements};
use rayon::prelude::*;

/// Nodes handled per parallel task when building the adjacency (fixed, so the work split does
/// not depend on the thread count; the result never does).
const NODE_CHUNK: usize = 2048;

/// Node-to-node adjacency of the used nodes, each list sorted and containing the node itself.
#[derive(Clone, Debug)]
pub(super) struct NodeGraph {
    /// Offsets into `nbr` per node (`node_count + 1` entries).
    pub ptr: Vec<usize>,
    /// Neighbour node ids.
    pub nbr: Vec<u32>,
    /// Free columns contributed by the neighbours before each entry, per node list.
    pub prefix: Vec<u32>,
}

/// A sparse matrix in compressed sparse rows with sorted column indices.
#[derive(Clone, Debug)]
pub(super) struct Csr {
    /// Number of rows and columns.
    pub n: usize,
    /// Whether only the upper triangle (columns >= row) is stored.
    pub upper: bool,
    /// Row offsets (`n + 1` entries).
    pub row_ptr: Vec<u32>,
    /// Column index of each stored entry.
    pub col: Vec<u32>,
    /// Value of each stored entry.
    pub val: Vec<f64>,
}

impl NodeGraph {
    /// Builds the adjacency from the element connectivity.
    pub fn new(mesh: &Mesh, dofs: &DofMap) -> Self {
        let adjacency = NodeElements::new(mesh);
        let n = mesh.node_count();
        let chunks: Vec<(Vec<usize>, Vec<u32>, Vec<u32>)> = (0..n.div_ceil(NODE_CHUNK))
            .into_par_iter()
            .map(|ci| {
                let range = ci * NODE_CHUNK..((ci + 1) * NODE_CHUNK).min(n);
                let mut counts = Vec::with_capacity(range.len());
                let mut lists = Vec::new();
                let mut prefix = Vec::new();
                let mut scratch: Vec<u32> = Vec::new();
                for a in range {
                    scratch.clear();
                    for &e in adjacency.of(a) {
                        scratch.extend_from_slice(mesh.element(e as usize).1);
                    }
                    scratch.sort_unstable();
                    scratch.dedup();
                    let mut running = 0u32;
                    for &m in &scratch {
                        prefix.push(running);
                        running += dofs.free_count(m as usize);
                    }
                    counts.push(scratch.len());
                    lists.extend_from_slice(&scratch);
                }
                (counts, lists, prefix)
            })
            .collect();
        let total: usize = chunks.iter().map(|c| c.1.len()).sum();
        let mut ptr = Vec::with_capacity(n + 1);
        let mut nbr = Vec::with_capacity(total);
        let mut prefix = Vec::with_capacity(total);
        ptr.push(0);
        for (counts, lists, pre) in chunks {
            for c in counts {
                ptr.push(ptr.last().copied().unwrap_or(0) + c);
            }
            nbr.extend_from_slice(&lists);
            prefix.extend_from_slice(&pre);
        }
        Self { ptr, nbr, prefix }
    }

    /// Absolute index of node `b` in the neighbour list of node `a`; `b` must be a neighbour.
    #[inline]
    pub fn find(&self, a: usize, b: u32) -> usize {
        let list = &self.nbr[self.ptr[a]..self.ptr[a + 1]];
        self.ptr[a] + list.partition_point(|&x| x < b)
    }

    /// Free columns in a full row of node `a`.
    fn row_total(&self, a: usize, dofs: &DofMap) -> u32 {
        let end = self.ptr[a + 1];
        if end == self.ptr[a] {
            return 0;
        }
        self.prefix[end - 1] + dofs.free_count(self.nbr[end - 1] as usize)
    }

    /// The empty matrix of the free dofs: the full pattern, or only the upper triangle.
    pub fn matrix(&self, dofs: &DofMap, upper: bool) -> Result<Csr, SolveError> {
        let n_nodes = self.ptr.len() - 1;
        let nd = dofs.ndim;
        let mut row_ptr: Vec<u32> = Vec::with_capacity(dofs.free + 1);
        row_ptr.push(0);
        let mut nnz: u64 = 0;
        // Per node: the range of `col` holding its rows.
        let mut node_range = vec![(0usize, 0usize); n_nodes];
        for a in 0..n_nodes {
            if !dofs.used[a] {
                continue;
            }
            let start = nnz as usize;
            let total = self.row_total(a, dofs) as u64;
            let diag = self.prefix[self.find(a, a as u32)] as u64;
            for c in 0..nd {
                if dofs.eq[a * nd + c] == NONE {
                    continue;
                }
                let skip = if upper {
                    diag + dofs.free_rank(a, c) as u64
                } else {
                    0
                };
                nnz += total - skip;
                if nnz > u32::MAX as u64 {
                    return Err(SolveError::Mesh(format!(
                        "the stiffness matrix would have more than {} stored entries",
                        u32::MAX
                    )));
                }
                row_ptr.push(nnz as u32);
            }
            node_range[a] = (start, nnz as usize);
        }
        let mut col = vec![0u32; nnz as usize];
        let mut slices: Vec<(usize, &mut [u32])> = Vec::with_capacity(dofs.used_count);
        let mut rest: &mut [u32] = &mut col;
        for (a, &(s, e)) in node_range.iter().enumerate() {
            if e > s {
                let (head, tail) = rest.split_at_mut(e - s);
                slices.push((a, head));
                rest = tail;
            }
        }
        slices.into_par_iter().for_each(|(a, out)| {
            let mut k = 0;
            for c in 0..nd {
                let row = dofs.eq[a * nd + c];
                if row == NONE {
                    continue;
                }
                for &m in &self.nbr[self.ptr[a]..self.ptr[a + 1]] {
                    for d in 0..nd {
                        let column = dofs.eq[m as usize * nd + d];
                        if column == NONE || (upper && column < row) {
                            continue;
                        }
                        out[k] = column;
                        k += 1;
                    }
                }
            }
        });
        let val = vec![0.0; nnz as usize];
        Ok(Csr {
            n: dofs.free,
            upper,
            row_ptr,
            col,
            val,
        })
    }
}

impl Csr {
    /// `y = A x` for a full-pattern matrix, parallel over rows (each row summed in column order,
    /// so the result does not depend on the thread count).
    pub fn multiply(&self, x: &[f64], y: &mut [f64]) {
        debug_assert!(!self.upper);
        y.par_iter_mut().enumerate().for_each(|(i, yi)| {
            let (s, e) = (self.row_ptr[i] as usize, self.row_ptr[i + 1] as usize);
            let mut acc = 0.0;
            for k in s..e {
                acc += self.val[k] * x[self.col[k] as usize];
            }
            *yi = acc;
        });
    }
}
