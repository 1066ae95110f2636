//! Global assembly: element matrices computed in parallel, a fixed-size chunk of elements at a
//! time, into one preallocated buffer; then added into the preallocated CSR pattern in element
//! order by one thread. The sums therefore run in the same order for any thread count, and no
//! allocation happens per element.
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
    let ndim = dofs.ndim;
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
                let local = start + i;
                if !ok[i] {
                    bad.push(mesh.file_cell[block.first_element + local]);
                    continue;
                }
                let ke = &kbuf[i * nd * nd..(i + 1) * nd * nd];
                let fe = &fbuf[i * nd..(i + 1) * nd];
                let nodes = block.cell(local);
                for (la, &a) in nodes.iter().enumerate() {
                    for c in 0..ndim {
                        loads[a as usize * ndim + c] += fe[la * ndim + c];
                    }
                }
                scatter(&mut matrix, &mut lift, graph, dofs, nodes, ke);
            }
        }
    }
    if bad.is_empty() {
        Ok(System { matrix, lift })
    } else {
        bad.sort_unstable();
        Err(SolveError::InvertedElements { cells: bad })
    }
}

/// Adds one element matrix `ke` (row-major over the element's dofs) into `matrix` and the
/// prescribed-column terms into `lift`.
fn scatter(
    matrix: &mut Csr,
    lift: &mut [f64],
    graph: &NodeGraph,
    dofs: &DofMap,
    nodes: &[u32],
    ke: &[f64],
) {
    let ndim = dofs.ndim;
    let nd = nodes.len() * ndim;
    let mut own = [0usize; MAX_NODES];
    for (la, &a) in nodes.iter().enumerate() {
        own[la] = graph.find(a as usize, a);
    }
    for (la, &a) in nodes.iter().enumerate() {
        let a = a as usize;
        for (lb, &b) in nodes.iter().enumerate() {
            let kb = graph.find(a, b);
            let b = b as usize;
            for c in 0..ndim {
                let row = dofs.eq[a * ndim + c];
                if row == NONE {
                    continue;
                }
                let p = la * ndim + c;
                for d in 0..ndim {
                    let q = lb * ndim + d;
                    let col_dof = b * ndim + d;
                    let col = dofs.eq[col_dof];
                    if col == NONE {
                        let value = dofs.prescribed[col_dof];
                        if value != 0.0 {
                            lift[row as usize] -= ke[p * nd + q] * value;
                        }
                        continue;
                    }
                    if matrix.upper && col < row {
                        continue;
                    }
                    let pos = matrix.position(graph, dofs, row, (a, c, own[la]), (b, d, kb));
                    matrix.val[pos] += ke[p * nd + q];
                }
            }
        }
    }
}
