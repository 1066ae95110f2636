//! The solve driver: checks, dof numbering, loads, assembly, linear solve, energies.

use super::assembly::assemble;
use super::coarse::Coarse;
use super::direct::cholesky_solve;
use super::dofs::{DofMap, NONE};
use super::iterative::conjugate_gradient;
use super::loads::{add_point_loads, add_traction};
use super::pattern::NodeGraph;
use super::rigid::check_supports;
use super::stiffness::element_energy;
use super::{BoundaryConditions, LinearSolver, Solution, SolveError, SolveOptions, SolveTimings};
use crate::material::{AnalysisMode, MaterialMap};
use crate::mesh::Mesh;
use crate::recovery::{ElementData, ElementMaterials};
use rayon::prelude::*;
use std::time::Instant;

/// Checks that the mesh has elements and that every block fits the mode's dimension.
fn check_mesh(mesh: &Mesh, mode: AnalysisMode) -> Result<(), SolveError> {
    if mesh.element_count() == 0 {
        return Err(SolveError::Mesh("the mesh has no elements".into()));
    }
    let dim = mode.dimension();
    if mesh.dimension != dim {
        return Err(SolveError::Mesh(format!(
            "{} analysis needs a {dim}D mesh, the mesh is {}D",
            mode.name(),
            mesh.dimension
        )));
    }
    if let Some(b) = mesh.blocks.iter().find(|b| b.kind.dim() != dim) {
        return Err(SolveError::Mesh(format!(
            "{} analysis needs {dim}D elements, the mesh has {} cells",
            mode.name(),
            b.kind
        )));
    }
    if mesh.zone.len() != mesh.element_count() {
        return Err(SolveError::Mesh(format!(
            "{} zone entries for {} elements",
            mesh.zone.len(),
            mesh.element_count()
        )));
    }
    Ok(())
}

/// Checks the CG options.
fn check_options(options: &SolveOptions) -> Result<(), SolveError> {
    if let LinearSolver::ConjugateGradient {
        relative_tolerance,
        max_iterations,
    } = options.solver
    {
        if !(relative_tolerance > 0.0 && relative_tolerance < 1.0) {
            return Err(SolveError::Options(format!(
                "relative tolerance {relative_tolerance} is not allowed: expected 0 < tol < 1"
            )));
        }
        if max_iterations == 0 {
            return Err(SolveError::Options(
                "maximum iterations 0 is not allowed: expected at least 1".into(),
            ));
        }
    }
    Ok(())
}

/// Solves the linear-elastic problem on `mesh` and returns the nodal displacements and energies.
///
/// Steps: check mesh, mode and options; resolve zone materials; number the free dofs of the
/// nodes elements use; check that the supports prevent rigid-body motion (else
/// [`SolveError::Singular`]); consistent loads; assemble `K_ff` and `-K_fc u_c`; solve by sparse
/// Cholesky or conjugate gradients; strain energy `U_h = 1/2 integral eps^T D eps f(x)` element by
/// element and external work `f^T u`, both summed in element / dof order (bit-identical for any
/// thread count).
pub fn solve(
    mesh: &Mesh,
    materials: &MaterialMap,
    mode: AnalysisMode,
    bc: &BoundaryConditions,
    options: &SolveOptions,
) -> Result<Solution, SolveError> {
    solve_timed(mesh, materials, mode, bc, options).map(|(solution, _)| solution)
}

/// [`solve`], also returning the wall-clock time of each stage (for benchmarks).
pub fn solve_timed(
    mesh: &Mesh,
    materials: &MaterialMap,
    mode: AnalysisMode,
    bc: &BoundaryConditions,
    options: &SolveOptions,
) -> Result<(Solution, SolveTimings), SolveError> {
    let clock = Instant::now();
    let mut timings = SolveTimings::default();
    let mode = mode.validate()?;
    check_mesh(mesh, mode)?;
    check_options(options)?;
    let element_materials = ElementMaterials::new(mesh, materials, mode)?;
    let ndim = mode.dimension();
    let dofs = DofMap::new(mesh, ndim, &bc.constraints)?;
    check_supports(mesh, mode, &dofs)?;

    let mut loads = vec![0.0; mesh.node_count() * ndim];
    for traction in &bc.tractions {
        add_traction(mesh, mode, ndim, traction, &mut loads)?;
    }
    add_point_loads(&dofs.used, ndim, &bc.point_loads, &mut loads)?;

    let graph = NodeGraph::new(mesh, &dofs);
    timings.setup = clock.elapsed().as_secs_f64();
    let clock = Instant::now();
    let upper = options.solver == LinearSolver::Cholesky;
    let system = assemble(
        mesh,
        &element_materials,
        mode,
        &dofs,
        &graph,
        upper,
        bc.body_force.as_ref(),
        &mut loads,
    )?;
    if let Some(dof) = loads.iter().position(|v| !v.is_finite()) {
        return Err(SolveError::Load(format!(
            "the nodal force on node {}, component {} is not finite ({})",
            dof / ndim,
            dof % ndim,
            loads[dof]
        )));
    }
    timings.assembly = clock.elapsed().as_secs_f64();
    let clock = Instant::now();
    let mut rhs = system.lift;
    for (dof, &e) in dofs.eq.iter().enumerate() {
        if e != NONE {
            rhs[e as usize] += loads[dof];
        }
    }
    let iterations = match options.solver {
        LinearSolver::Cholesky => {
            cholesky_solve(&system.matrix, &mut rhs)?;
            None
        }
        LinearSolver::ConjugateGradient {
            relative_tolerance,
            max_iterations,
        } => {
            let mut blocks = Vec::with_capacity(dofs.used_count);
            for node in 0..mesh.node_count() {
                let first = (0..ndim)
                    .map(|c| dofs.eq[node * ndim + c])
                    .find(|&e| e != NONE);
                if let Some(first) = first {
                    blocks.push((first, dofs.free_count(node) as u8));
                }
            }
            let coarse = Coarse::new(mesh, &dofs, &system.matrix)?;
            let (x, it) = conjugate_gradient(
                &system.matrix,
                &rhs,
                &blocks,
                coarse.as_ref(),
                relative_tolerance,
                max_iterations,
            )?;
            rhs = x;
            Some(it)
        }
    };
    drop(system.matrix);
    timings.linear_solve = clock.elapsed().as_secs_f64();
    let clock = Instant::now();

    let mut displacement = vec![[0.0; 3]; mesh.node_count()];
    for (node, u) in displacement.iter_mut().enumerate() {
        if !dofs.used[node] {
            continue;
        }
        for c in 0..ndim {
            let dof = node * ndim + c;
            u[c] = match dofs.eq[dof] {
                NONE => dofs.prescribed[dof],
                e => rhs[e as usize],
            };
        }
    }
    let mut external_work = 0.0;
    for (dof, &f) in loads.iter().enumerate() {
        external_work += f * displacement[dof / ndim][dof % ndim];
    }
    let strain_energy = strain_energy(mesh, &element_materials, mode, &displacement)?;
    timings.energy = clock.elapsed().as_secs_f64();
    let solution = Solution {
        displacement,
        strain_energy,
        external_work,
        dofs: dofs.used_count * ndim,
        iterations,
    };
    Ok((solution, timings))
}

/// `U_h` summed over elements in order.
fn strain_energy(
    mesh: &Mesh,
    materials: &ElementMaterials,
    mode: AnalysisMode,
    displacement: &[[f64; 3]],
) -> Result<f64, SolveError> {
    let energies: Vec<Option<f64>> = (0..mesh.element_count())
        .into_par_iter()
        .map(|e| {
            let (kind, nodes) = mesh.element(e);
            let data =
                ElementData::from_nodes(kind, mesh.dimension, nodes, &mesh.points, displacement);
            element_energy(&data, materials.of(e), mode)
        })
        .collect();
    let mut total = 0.0;
    let mut bad = Vec::new();
    for (e, v) in energies.iter().enumerate() {
        match v {
            Some(v) => total += v,
            None => bad.push(mesh.file_cell[e]),
        }
    }
    if bad.is_empty() {
        Ok(total)
    } else {
        bad.sort_unstable();
        Err(SolveError::InvertedElements { cells: bad })
    }
}
