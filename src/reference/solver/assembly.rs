//! Global assembly: element matrices computed in parallel, a fixed-size chunk of elements at a
//! time, into one preallocated buffer; then added into the preallocated CSR pattern in parallel
//! over ranges of row nodes, each range taking the elements in element order. Every entry is
//! therefore summed in the same order for any thread count, and no allocation happens per
//! element.
//!
//! Prescribed dofs are eliminated on the fly: an entry `K_e[p][q]` whose column is prescribed to
//! `u_c != 0` adds `-K_e[p][q] u_c` to the right side of row `p` (`K_ff u_f = f_f - K_fc u_c`).

use super::dofs::{DofMap, NONE};
use super::pattern::{Csr, NodeGraph};
use super::stiffness::Kernel;
use super::{SolveError, VectorField};
use crate::element::MAX_NODES;
use crate::material::AnalysisMode;
use crate::mesh::Mesh;
use crate::recovery::ElementMaterials;
use rayon::prelude::*;

/// Elements computed per parallel batch before they are added in order.
const CHUNK: usize = 512;

/// The assembled reduced system.
pub(super) struct System {
    /// `K_ff` (full pattern, or its upper triangle).
    pub matrix: Csr,
    /// `-K_fc u_c` per free equation (the loads are added by the caller).
    pub lift: Vec<f64>,
}

/// Assembles `K_ff` and `-K_fc u_c`, and adds the consistent body forces to `loads` (one entry
/// per dof, prescribed dofs included).
#[allow(clippy::too_many_arguments)]
pub(super) fn assemble(
    mesh: &Mesh,
    materials: &ElementMaterials,
    mode: AnalysisMode,
    dofs: &DofMap,
    graph: &NodeGraph,
    upper: bool,
    body: Option<&VectorField>,
    loads: &mut [f64],
) -> Result<System, SolveError> {
    let mut matrix = graph.matrix(dofs, upper)?;
    let mut lift = vec![0.0; dofs.free];
    let mut bad: Vec<u32> = Vec::new();
    let parts = partition(&matrix, dofs, rayon::current_num_threads());
    // The values are filled apart from the pattern, which the positions are computed from.
    let mut val = std::mem::take(&mut matrix.val);
    for block in &mesh.blocks {
        let kernel = Kernel::new(block.kind, mode);
        let nn = block.kind.node_count();
        let nd = kernel.dofs();
        let mut kbuf = vec![0.0; CHUNK * nd * nd];
        let mut fbuf = vec![0.0; CHUNK * nd];
        let mut ok = vec![true; CHUNK];
        for start in (0..block.len()).step_by(CHUNK) {
            let count = CHUNK.min(block.len() - start);
            kbuf[..count * nd * nd]
                .par_chunks_mut(nd * nd)
                .zip(fbuf[..count * nd].par_chunks_mut(nd))
                .zip(ok[..count].par_iter_mut())
                .enumerate()
                .for_each(|(i, ((ke, fe), good))| {
                    let local = start + i;
                    let mut coords = [[0.0; 3]; MAX_NODES];
                    mesh.gather_coords(block.cell(local), &mut coords[..nn]);
                    let e = block.first_element + local;
                    *good = kernel.element(&coords[..nn], materials.of(e), body, ke, fe);
                });
            for i in 0..count {
                if !ok[i] {
                    bad.push(mesh.file_cell[block.first_element + start + i]);
                }
            }
            let batch = Batch {
                cells: &block.nodes[start * nn..(start + count) * nn],
                nn,
                ke: &kbuf[..count * nd * nd],
                fe: &fbuf[..count * nd],
                ok: &ok[..count],
            };
            let targets = split(&parts, &mut val, &mut lift, loads, dofs.ndim);
            targets
                .into_par_iter()
                .for_each(|mut target| batch.add_into(&mut target, &matrix, graph, dofs));
        }
    }
    matrix.val = val;
    if bad.is_empty() {
        Ok(System { matrix, lift })
    } else {
        bad.sort_unstable();
        Err(SolveError::InvertedElements { cells: bad })
    }
}

/// A batch of computed element matrices and vectors.
struct Batch<'a> {
    cells: &'a [u32],
    nn: usize,
    ke: &'a [f64],
    fe: &'a [f64],
    ok: &'a [bool],
}

/// A range of row nodes with the parts of the global arrays their rows own.
#[derive(Copy, Clone, Debug)]
struct Part {
    /// Row nodes `nodes.0..nodes.1`.
    nodes: (usize, usize),
    /// Their stored entries `values.0..values.1`.
    values: (usize, usize),
    /// Their equations.
    eqs: (usize, usize),
}

/// One part's writable slices (offsets give the global index of element 0).
struct Target<'a> {
    part: Part,
    val: &'a mut [f64],
    lift: &'a mut [f64],
    loads: &'a mut [f64],
}

/// Splits the row nodes into about `4 * threads` ranges of similar stored-entry counts. Each
/// stored entry belongs to exactly one range and is updated in element order, so the sums do
/// not depend on how many ranges there are.
fn partition(matrix: &Csr, dofs: &DofMap, threads: usize) -> Vec<Part> {
    let n_nodes = dofs.used.len();
    let mut first_eq = vec![0usize; n_nodes + 1];
    for node in 0..n_nodes {
        first_eq[node + 1] = first_eq[node] + dofs.free_count(node) as usize;
    }
    let nnz = matrix.col.len();
    let pieces = (4 * threads.max(1)).max(1);
    let target = nnz.div_ceil(pieces).max(1);
    let mut parts = Vec::with_capacity(pieces + 1);
    let mut start = 0usize;
    for node in 0..n_nodes {
        let begin = matrix.row_ptr[first_eq[start]] as usize;
        let end = matrix.row_ptr[first_eq[node + 1]] as usize;
        if end - begin >= target || node + 1 == n_nodes {
            parts.push(Part {
                nodes: (start, node + 1),
                values: (begin, end),
                eqs: (first_eq[start], first_eq[node + 1]),
            });
            start = node + 1;
        }
    }
    parts
}

/// Cuts `val`, `lift` and `loads` along the parts.
fn split<'a>(
    parts: &[Part],
    mut val: &'a mut [f64],
    mut lift: &'a mut [f64],
    mut loads: &'a mut [f64],
    ndim: usize,
) -> Vec<Target<'a>> {
    let mut out = Vec::with_capacity(parts.len());
    for &part in parts {
        let (v, rest) = std::mem::take(&mut val).split_at_mut(part.values.1 - part.values.0);
        val = rest;
        let (l, rest) = std::mem::take(&mut lift).split_at_mut(part.eqs.1 - part.eqs.0);
        lift = rest;
        let (f, rest) =
            std::mem::take(&mut loads).split_at_mut((part.nodes.1 - part.nodes.0) * ndim);
        loads = rest;
        out.push(Target {
            part,
            val: v,
            lift: l,
            loads: f,
        });
    }
    out
}

impl Batch<'_> {
    /// Adds the rows `target` owns, element by element in order: `K_e` entries into the matrix,
    /// prescribed-column terms into `lift`, body forces into `loads`.
    fn add_into(&self, target: &mut Target, matrix: &Csr, graph: &NodeGraph, dofs: &DofMap) {
        let ndim = dofs.ndim;
        let nd = self.nn * ndim;
        let (lo, hi) = target.part.nodes;
        for (i, nodes) in self.cells.chunks_exact(self.nn).enumerate() {
            if !self.ok[i] || !nodes.iter().any(|&a| (lo..hi).contains(&(a as usize))) {
                continue;
            }
            let ke = &self.ke[i * nd * nd..(i + 1) * nd * nd];
            let fe = &self.fe[i * nd..(i + 1) * nd];
            for (la, &a) in nodes.iter().enumerate() {
                let a = a as usize;
                if !(lo..hi).contains(&a) {
                    continue;
                }
                for c in 0..ndim {
                    target.loads[(a - lo) * ndim + c] += fe[la * ndim + c];
                }
                // Row (a, c) starts, as a full row, at its `row_ptr` minus the free columns left
                // of its diagonal when only the upper triangle is stored.
                let own = graph.find(a, a as u32);
                // (Signed: in upper storage the base may lie left of the part's first entry.)
                let mut row_base = [0isize; 3];
                let mut rank = 0isize;
                for c in 0..ndim {
                    let row = dofs.eq[a * ndim + c];
                    if row != NONE {
                        let start =
                            matrix.row_ptr[row as usize] as isize - target.part.values.0 as isize;
                        row_base[c] = if matrix.upper {
                            start - graph.prefix[own] as isize - rank
                        } else {
                            start
                        };
                        rank += 1;
                    }
                }
                for (lb, &b) in nodes.iter().enumerate() {
                    let kb = graph.find(a, b);
                    let b = b as usize;
                    let prefix = graph.prefix[kb] as isize;
                    for c in 0..ndim {
                        let row = dofs.eq[a * ndim + c];
                        if row == NONE {
                            continue;
                        }
                        let p = la * ndim + c;
                        let mut column = row_base[c] + prefix;
                        for d in 0..ndim {
                            let q = lb * ndim + d;
                            let col_dof = b * ndim + d;
                            let col = dofs.eq[col_dof];
                            if col == NONE {
                                let value = dofs.prescribed[col_dof];
                                if value != 0.0 {
                                    target.lift[row as usize - target.part.eqs.0] -=
                                        ke[p * nd + q] * value;
                                }
                                continue;
                            }
                            if !(matrix.upper && col < row) {
                                target.val[column as usize] += ke[p * nd + q];
                            }
                            column += 1;
                        }
                    }
                }
            }
        }
    }
}
