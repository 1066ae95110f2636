//! Check that the supports prevent rigid-body motion, before any factorisation.
//!
//! With full integration a connected mesh of continuum elements has exactly the rigid-body
//! motions as zero-energy modes: translations and the in-plane rotation in plane analysis, the
//! axial translation in axisymmetry, three translations and three rotations in 3D (common
//! practice). For every connected part of the mesh, the modes restricted to the prescribed dofs,
//! `R_c` (one column per mode, rotations scaled by the part's size so all columns are O(1)), must
//! have full column rank: the smallest eigenvalue of `R_c^T R_c` must stay above
//! [`RANK_TOLERANCE`] times the largest.

use super::dofs::DofMap;
use super::SolveError;
use crate::material::AnalysisMode;
use crate::mesh::Mesh;
use nalgebra::{DMatrix, SymmetricEigen};

/// Relative eigenvalue below which a mode counts as free. Supports a distance `h` apart on a part
/// of size `L` give eigenvalues of order `(h / L)^2`, far above this for any mesh finer than
/// `1e-5 L`; round-off leaves a free mode near `1e-16`.
const RANK_TOLERANCE: f64 = 1e-12;

/// Union-find root with path halving.
fn root(parent: &mut [u32], mut i: u32) -> u32 {
    while parent[i as usize] != i {
        let p = parent[parent[i as usize] as usize];
        parent[i as usize] = p;
        i = p;
    }
    i
}

/// Values of the rigid-body modes of `mode` at dof `c` of a node at `x` (relative to the part's
/// centre, divided by its size). Returns the number of modes.
fn modes(mode: AnalysisMode, c: usize, x: [f64; 3], out: &mut [f64; 6]) -> usize {
    *out = [0.0; 6];
    match mode {
        AnalysisMode::Axisymmetric => {
            out[0] = if c == 1 { 1.0 } else { 0.0 };
            1
        }
        AnalysisMode::PlaneStress { .. } | AnalysisMode::PlaneStrain => {
            out[c] = 1.0;
            out[2] = if c == 0 { -x[1] } else { x[0] };
            3
        }
        AnalysisMode::Solid3d => {
            out[c] = 1.0;
            // Rotations about x, y, z: omega x x.
            let rot = [[0.0, -x[2], x[1]], [x[2], 0.0, -x[0]], [-x[1], x[0], 0.0]];
            for (k, r) in rot.iter().enumerate() {
                out[3 + k] = r[c];
            }
            6
        }
    }
}

/// Returns [`SolveError::Singular`] naming the first part of the mesh whose rigid-body motion the
/// prescribed dofs do not prevent.
pub(super) fn check_supports(
    mesh: &Mesh,
    mode: AnalysisMode,
    dofs: &DofMap,
) -> Result<(), SolveError> {
    let n = mesh.node_count();
    let mut parent: Vec<u32> = (0..n as u32).collect();
    for b in &mesh.blocks {
        let nn = b.kind.node_count();
        for cell in b.nodes.chunks_exact(nn) {
            let r0 = root(&mut parent, cell[0]);
            for &m in &cell[1..] {
                let r = root(&mut parent, m);
                if r != r0 {
                    parent[r as usize] = r0;
                }
            }
        }
    }
    // Parts in order of their smallest node; bounding boxes give centre and size.
    let mut part_of = vec![u32::MAX; n];
    let mut parts: Vec<(usize, [f64; 3], [f64; 3])> = Vec::new();
    for node in 0..n {
        if !dofs.used[node] {
            continue;
        }
        let r = root(&mut parent, node as u32) as usize;
        if part_of[r] == u32::MAX {
            part_of[r] = parts.len() as u32;
            parts.push((node, [f64::INFINITY; 3], [f64::NEG_INFINITY; 3]));
        }
        let p = &mut parts[part_of[r] as usize];
        for c in 0..3 {
            p.1[c] = p.1[c].min(mesh.points[node][c]);
            p.2[c] = p.2[c].max(mesh.points[node][c]);
        }
    }
    let count = modes(mode, 0, [0.0; 3], &mut [0.0; 6]);
    let mut gram = vec![[[0.0; 6]; 6]; parts.len()];
    let mut values = [0.0; 6];
    for node in 0..n {
        if !dofs.used[node] {
            continue;
        }
        let part = part_of[root(&mut parent, node as u32) as usize] as usize;
        let (_, lo, hi) = parts[part];
        let size = (0..3).map(|c| hi[c] - lo[c]).fold(0.0, f64::max);
        let size = if size > 0.0 { size } else { 1.0 };
        let x: [f64; 3] =
            std::array::from_fn(|c| (mesh.points[node][c] - 0.5 * (lo[c] + hi[c])) / size);
        for c in 0..dofs.ndim {
            if !dofs.constrained[node * dofs.ndim + c] {
                continue;
            }
            modes(mode, c, x, &mut values);
            let g = &mut gram[part];
            for i in 0..count {
                for j in 0..count {
                    g[i][j] += values[i] * values[j];
                }
            }
        }
    }
    for (part, g) in gram.iter().enumerate() {
        let m = DMatrix::from_fn(count, count, |i, j| g[i][j]);
        let eig = SymmetricEigen::new(m).eigenvalues;
        let max = eig.iter().copied().fold(0.0, f64::max);
        let free = eig
            .iter()
            .filter(|&&v| v <= RANK_TOLERANCE * max.max(1.0))
            .count();
        if free > 0 {
            return Err(SolveError::Singular {
                detail: format!(
                    "{free} of the {count} rigid-body modes of the part containing node {} are unrestrained{}",
                    parts[part].0,
                    if parts.len() > 1 {
                        format!("; the mesh has {} separate parts", parts.len())
                    } else {
                        String::new()
                    }
                ),
            });
        }
    }
    Ok(())
}
