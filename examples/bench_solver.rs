//! Benchmark of the reference solver on a generated structured mesh.
//!
//! ```text
//! cargo run --release --example bench_solver -- --dofs 200000 --dim 2 [--kind quad8|tri6|...]
//!     [--solver cholesky|cg] [--tol 1e-8] [--check-threads]
//! cargo run --release --example bench_solver -- --dofs 300000 --dim 3
//! ```
//!
//! 2D (default quad8, plane stress): a 4:1 plate clamped on x = 0 with a parabolic shear on
//! x = L. 3D (default tet10): a 2:1:1 bar clamped on x = 0 with a shear and gravity. The mesh is
//! sized to about `--dofs` degrees of freedom. The solver defaults to sparse Cholesky in 2D and
//! to conjugate gradients (relative tolerance `--tol`, default 1e-8) in 3D. Prints the mesh, the time of each stage of the
//! solve, the energies, and the process's peak resident memory (VmHWM). `--check-threads` solves
//! again on a one-thread pool and reports whether the displacements are bit-identical.

use hone::element::ElementKind;
use hone::material::{AnalysisMode, Material, MaterialMap};
use hone::mesh::generate::structured;
use hone::mesh::Mesh;
use hone::reference::solver::{
    select_facets, select_nodes, solve_timed, BoundaryConditions, Constraint, LinearSolver,
    SolveOptions, TractionLoad,
};
use std::sync::Arc;
use std::time::Instant;

#[path = "support/mod.rs"]
mod support;
use support::{arg, peak_memory_mb};

/// A structured mesh of `kind` on `[0, 4] x [0, 1]` (2D) or `[0, 2] x [0, 1] x [0, 1]` (3D) with
/// cells in proportion, sized to about `dofs` degrees of freedom.
fn mesh_for(kind: ElementKind, dofs: usize) -> Mesh {
    let dim = kind.dim();
    let aspect = if dim == 2 { 4 } else { 2 };
    let build = |n: usize| {
        let cells = [aspect * n, n, n];
        let size = [aspect as f64, 1.0, 1.0];
        structured(kind, cells, size)
    };
    // Nodes grow like n^dim: calibrate on a small mesh.
    let probe = 4;
    let ratio = build(probe).node_count() as f64 / (probe as f64).powi(dim as i32);
    let nodes = dofs as f64 / dim as f64;
    let n = (nodes / ratio).powf(1.0 / dim as f64).round().max(1.0) as usize;
    // One correction for the boundary layer the small probe over-weights.
    let mesh = build(n);
    let scale = (nodes / mesh.node_count() as f64).powf(1.0 / dim as f64);
    let corrected = (n as f64 * scale).round().max(1.0) as usize;
    if corrected == n {
        mesh
    } else {
        build(corrected)
    }
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let dofs: usize = arg(&args, "--dofs").unwrap_or(200_000);
    let dim: usize = arg(&args, "--dim").unwrap_or(2);
    let default_kind = if dim == 3 { "tet10" } else { "quad8" };
    let kind_name: String = arg(&args, "--kind").unwrap_or_else(|| default_kind.to_string());
    let Some(kind) = ElementKind::from_name(&kind_name) else {
        eprintln!("unknown kind {kind_name}");
        std::process::exit(2);
    };
    if kind.dim() != dim {
        eprintln!("{kind} is not a {dim}D kind");
        std::process::exit(2);
    }
    // Sparse Cholesky in 2D; in 3D its fill grows too fast (300k tet10 dofs: 256 s and 7 GB
    // measured), so CG with the two-level preconditioner is the default there.
    let default_solver = if dim == 3 { "cg" } else { "cholesky" };
    let solver_name: String = arg(&args, "--solver").unwrap_or_else(|| default_solver.into());
    let tolerance: f64 = arg(&args, "--tol").unwrap_or(1e-8);
    let solver = match solver_name.as_str() {
        "cholesky" => LinearSolver::Cholesky,
        "cg" => LinearSolver::ConjugateGradient {
            relative_tolerance: tolerance,
            max_iterations: 100_000,
        },
        other => {
            eprintln!("unknown solver {other}: expected cholesky or cg");
            std::process::exit(2);
        }
    };
    let check_threads = args.iter().any(|a| a == "--check-threads");

    let t = Instant::now();
    let mesh = mesh_for(kind, dofs);
    let length = if dim == 2 { 4.0 } else { 2.0 };
    let at = |a: f64, b: f64| (a - b).abs() < 1e-9;
    let clamped = select_nodes(&mesh, |p| at(p[0], 0.0));
    let constraints: Vec<Constraint> = clamped
        .iter()
        .flat_map(|&node| {
            (0..dim).map(move |component| Constraint {
                node,
                component,
                value: 0.0,
            })
        })
        .collect();
    let end = select_facets(&mesh, |c| c.iter().all(|p| at(p[0], length)));
    let bc = BoundaryConditions {
        constraints,
        tractions: vec![TractionLoad {
            facets: end,
            traction: Arc::new(|x, _| [0.0, -x[1] * (1.0 - x[1]), 0.1]),
        }],
        body_force: (dim == 3).then(|| {
            Arc::new(|_: [f64; 3]| [0.0, 0.0, -0.01]) as hone::reference::solver::VectorField
        }),
        point_loads: Vec::new(),
    };
    let mode = if dim == 2 {
        AnalysisMode::PlaneStress { thickness: 1.0 }
    } else {
        AnalysisMode::Solid3d
    };
    let materials = MaterialMap::Single(Material::new(1000.0, 0.3, "").expect("valid material"));
    println!(
        "{kind}: {} elements, {} nodes, mesh and supports in {:.2} s",
        mesh.element_count(),
        mesh.node_count(),
        t.elapsed().as_secs_f64()
    );
    let options = SolveOptions { solver };
    let t = Instant::now();
    let (solution, timings) = match solve_timed(&mesh, &materials, mode, &bc, &options) {
        Ok(r) => r,
        Err(e) => {
            eprintln!("solve failed: {e}");
            std::process::exit(1);
        }
    };
    let total = t.elapsed().as_secs_f64();
    println!(
        "{} dofs, solver {solver_name}{}",
        solution.dofs,
        solution
            .iterations
            .map(|i| format!(" ({i} iterations, tolerance {tolerance:e})"))
            .unwrap_or_default()
    );
    println!(
        "setup {:.2} s, assembly {:.2} s, linear solve {:.2} s, energy {:.2} s, total {total:.2} s",
        timings.setup, timings.assembly, timings.linear_solve, timings.energy
    );
    println!(
        "strain energy {:.10e}, external work / 2 {:.10e}",
        solution.strain_energy,
        0.5 * solution.external_work
    );
    println!(
        "threads {}, peak memory {:.0} MB",
        rayon::current_num_threads(),
        peak_memory_mb()
    );
    if check_threads {
        let pool = rayon::ThreadPoolBuilder::new()
            .num_threads(1)
            .build()
            .expect("one-thread pool");
        let t = Instant::now();
        let single = pool.install(|| solve_timed(&mesh, &materials, mode, &bc, &options));
        match single {
            Ok((one, _)) => println!(
                "one thread: {:.2} s, displacements bit-identical: {}",
                t.elapsed().as_secs_f64(),
                one.displacement == solution.displacement
            ),
            Err(e) => println!("one thread: solve failed: {e}"),
        }
    }
}
