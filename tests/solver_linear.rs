//! Linear solvers, error reporting, thread-count independence and output of the reference
//! solver.
// Numeric checks index several arrays in step; index loops say that more plainly.
#![allow(clippy::needless_range_loop)]

#[path = "solver_util.rs"]
mod util;

use hone::element::ElementKind;
use hone::io::read_vtu;
use hone::material::{AnalysisMode, Material, MaterialMap};
use hone::mesh::generate::structured;
use hone::mesh::Mesh;
use hone::reference::solver::{
    exact_errors, select_facets, select_nodes, solve, try_exact_errors, write_results,
    BoundaryConditions, Constraint, LinearSolver, Solution, SolveError, SolveOptions, TractionLoad,
};
use std::collections::BTreeMap;
use std::sync::Arc;
use util::*;

const SOLID: AnalysisMode = AnalysisMode::Solid3d;

fn cg(tolerance: f64) -> SolveOptions {
    SolveOptions {
        solver: LinearSolver::ConjugateGradient {
            relative_tolerance: tolerance,
            max_iterations: 10_000,
        },
    }
}

/// A clamped 3D bar (x = 0 fixed) under gravity and an end shear: a genuinely 3D bending field.
fn bar(kind: ElementKind, n: [usize; 3]) -> (Mesh, BoundaryConditions) {
    let mesh = structured(kind, n, [4.0, 1.0, 1.0]);
    let clamped = select_nodes(&mesh, |p| p[0].abs() < 1e-9);
    let bc = BoundaryConditions {
        constraints: prescribe(&mesh, clamped, 3, |_| [0.0; 3]),
        tractions: vec![TractionLoad {
            facets: select_facets(&mesh, |c| c.iter().all(|p| (p[0] - 4.0).abs() < 1e-9)),
            traction: Arc::new(|x, _| [0.0, 0.2 * x[2], -1.0]),
        }],
        body_force: Some(Arc::new(|x| [0.1, 0.0, -0.5 * (1.0 + x[0])])),
        point_loads: vec![],
    };
    (mesh, bc)
}

fn max_abs(u: &[[f64; 3]]) -> f64 {
    u.iter().flatten().fold(0.0, |m, v| m.max(v.abs()))
}

#[test]
fn conjugate_gradients_agree_with_cholesky_in_3d() {
    for (kind, n) in [
        (ElementKind::Tet10, [6, 2, 2]),
        (ElementKind::Hex20, [8, 2, 2]),
    ] {
        let (mesh, bc) = bar(kind, n);
        let materials = single(1000.0, 0.3);
        let direct = solve(&mesh, &materials, SOLID, &bc, &SolveOptions::default()).unwrap();
        let iterative = solve(&mesh, &materials, SOLID, &bc, &cg(1e-12)).unwrap();
        assert!(direct.iterations.is_none());
        let iterations = iterative.iterations.expect("CG reports iterations");
        assert!(iterations > 1);
        let scale = max_abs(&direct.displacement);
        assert!(scale > 0.0);
        for (a, b) in direct.displacement.iter().zip(&iterative.displacement) {
            for c in 0..3 {
                // The task's agreement: 1e-8 relative; CG stops at a 1e-12 relative residual, so
                // its error is about cond(K) * 1e-12 < 1e-8 for these small meshes.
                assert_close(b[c], a[c], 1e-8, scale, &format!("{kind} CG vs Cholesky"));
            }
        }
        assert_close(
            iterative.strain_energy,
            direct.strain_energy,
            1e-8,
            direct.strain_energy,
            "energy",
        );
        assert_eq!(direct.dofs, 3 * mesh.node_count());
        eprintln!("{kind}: {} dofs, CG {iterations} iterations", direct.dofs);
    }
}

#[test]
fn conjugate_gradients_agree_with_cholesky_in_2d_with_prescribed_displacements() {
    // Non-zero prescribed values (the lift -K_fc u_c), a point load, quad9 with its coarse level.
    let mesh = structured(ElementKind::Quad9, [12, 4, 1], [3.0, 1.0, 0.0]);
    let left = select_nodes(&mesh, |p| p[0].abs() < 1e-9);
    let tip = select_nodes(&mesh, |p| (p[0] - 3.0).abs() < 1e-9 && p[1].abs() < 1e-9);
    let bc = BoundaryConditions {
        constraints: prescribe(&mesh, left, 2, |p| [1e-3 * p[1], -2e-3 * p[1] * p[1], 0.0]),
        point_loads: vec![(tip[0], [0.5, -2.0, 0.0])],
        ..Default::default()
    };
    let materials = single(500.0, 0.25);
    let mode = AnalysisMode::PlaneStrain;
    let direct = solve(&mesh, &materials, mode, &bc, &SolveOptions::default()).unwrap();
    let iterative = solve(&mesh, &materials, mode, &bc, &cg(1e-12)).unwrap();
    let scale = max_abs(&direct.displacement);
    for (a, b) in direct.displacement.iter().zip(&iterative.displacement) {
        for c in 0..2 {
            // As in 3D: CG residual 1e-12, small condition number.
            assert_close(b[c], a[c], 1e-8, scale, "quad9 CG vs Cholesky");
        }
    }
}

fn expect_singular(result: Result<Solution, SolveError>, what: &str) {
    match result {
        Err(e @ SolveError::Singular { .. }) => {
            let text = e.to_string();
            assert!(
                text.starts_with("the stiffness matrix is singular: the supports do not prevent rigid-body motion"),
                "{what}: {text}"
            );
        }
        Err(e) => panic!("{what}: expected a singular-system error, got {e}"),
        Ok(_) => panic!("{what}: expected a singular-system error, got a solution"),
    }
}

#[test]
fn unsupported_and_under_supported_models_are_singular_errors() {
    let materials = single(1.0, 0.3);
    let mesh2 = structured(ElementKind::Quad8, [3, 2, 1], [2.0, 1.0, 0.0]);
    let load = |mesh: &Mesh| TractionLoad {
        facets: select_facets(mesh, |c| c.iter().all(|p| (p[0] - 2.0).abs() < 1e-9)),
        traction: Arc::new(|_, _| [1.0, 0.0, 0.0]),
    };
    let free = BoundaryConditions {
        tractions: vec![load(&mesh2)],
        ..Default::default()
    };
    let plane = AnalysisMode::PlaneStrain;
    for options in [SolveOptions::default(), cg(1e-10)] {
        expect_singular(
            solve(&mesh2, &materials, plane, &free, &options),
            "no supports, 2D",
        );
    }
    // One pinned node leaves the rotation free.
    let pinned = BoundaryConditions {
        constraints: prescribe(&mesh2, [0u32], 2, |_| [0.0; 3]),
        tractions: vec![load(&mesh2)],
        ..Default::default()
    };
    expect_singular(
        solve(&mesh2, &materials, plane, &pinned, &SolveOptions::default()),
        "one pin",
    );
    // Axisymmetric: only the axial translation is rigid; u_z fixed at one node suffices.
    let ring = structured(ElementKind::Quad4, [2, 2, 1], [1.0, 1.0, 0.0]);
    let mut axi = BoundaryConditions::default();
    expect_singular(
        solve(
            &ring,
            &materials,
            AnalysisMode::Axisymmetric,
            &axi,
            &SolveOptions::default(),
        ),
        "axisymmetric",
    );
    axi.constraints.push(Constraint {
        node: 0,
        component: 1,
        value: 0.0,
    });
    assert!(solve(
        &ring,
        &materials,
        AnalysisMode::Axisymmetric,
        &axi,
        &SolveOptions::default()
    )
    .is_ok());
    // 3D: all nodes of one straight edge fixed leaves the rotation about that edge.
    let mesh3 = structured(ElementKind::Hex8, [2, 2, 2], [1.0, 1.0, 1.0]);
    let edge = select_nodes(&mesh3, |p| p[1].abs() < 1e-9 && p[2].abs() < 1e-9);
    let hinge = BoundaryConditions {
        constraints: prescribe(&mesh3, edge, 3, |_| [0.0; 3]),
        ..Default::default()
    };
    expect_singular(
        solve(&mesh3, &materials, SOLID, &hinge, &SolveOptions::default()),
        "hinge",
    );
}

#[test]
fn results_do_not_depend_on_the_thread_count() {
    let (mesh, bc) = bar(ElementKind::Tet10, [6, 3, 3]);
    let materials = single(1000.0, 0.3);
    let stress = |x: [f64; 3]| [x[0], 0.5 * x[1], 0.0, 0.1, 0.2 * x[2], 0.0];
    let run = |threads: usize| {
        let pool = rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .unwrap();
        pool.install(|| {
            let a = solve(&mesh, &materials, SOLID, &bc, &SolveOptions::default()).unwrap();
            let b = solve(&mesh, &materials, SOLID, &bc, &cg(1e-10)).unwrap();
            let e = exact_errors(&mesh, &a.displacement, &materials, SOLID, &stress, 3);
            (a, b, e)
        })
    };
    let (a1, b1, e1) = run(1);
    for threads in [2, 3] {
        let (a, b, e) = run(threads);
        // Bit-identical: every sum runs in a fixed order.
        assert_eq!(
            a.displacement, a1.displacement,
            "Cholesky, {threads} threads"
        );
        assert_eq!(a.strain_energy.to_bits(), a1.strain_energy.to_bits());
        assert_eq!(b.displacement, b1.displacement, "CG, {threads} threads");
        assert_eq!(b.iterations, b1.iterations);
        assert_eq!(e.error_sq.to_bits(), e1.error_sq.to_bits());
    }
}

#[test]
fn bad_input_gives_typed_errors() {
    let mesh = structured(ElementKind::Tri3, [2, 2, 1], [1.0, 1.0, 0.0]);
    let materials = single(1.0, 0.3);
    let plane = AnalysisMode::PlaneStress { thickness: 1.0 };
    let supported = prescribe(&mesh, select_nodes(&mesh, |p| p[0] == 0.0), 2, |_| [0.0; 3]);
    let with = |extra: Vec<Constraint>| BoundaryConditions {
        constraints: supported.iter().copied().chain(extra).collect(),
        ..Default::default()
    };
    let options = SolveOptions::default();
    let bad_node = with(vec![Constraint {
        node: 999,
        component: 0,
        value: 0.0,
    }]);
    assert!(matches!(
        solve(&mesh, &materials, plane, &bad_node, &options),
        Err(SolveError::Constraint { node: 999, .. })
    ));
    let bad_component = with(vec![Constraint {
        node: 1,
        component: 2,
        value: 0.0,
    }]);
    assert!(matches!(
        solve(&mesh, &materials, plane, &bad_component, &options),
        Err(SolveError::Constraint { component: 2, .. })
    ));
    let conflict = with(vec![Constraint {
        node: 0,
        component: 0,
        value: 1.0,
    }]);
    assert!(matches!(
        solve(&mesh, &materials, plane, &conflict, &options),
        Err(SolveError::Constraint { .. })
    ));
    let nan = with(vec![Constraint {
        node: 4,
        component: 1,
        value: f64::NAN,
    }]);
    assert!(matches!(
        solve(&mesh, &materials, plane, &nan, &options),
        Err(SolveError::Constraint { .. })
    ));
    let mut point = with(vec![]);
    point.point_loads.push((100, [1.0, 0.0, 0.0]));
    assert!(matches!(
        solve(&mesh, &materials, plane, &point, &options),
        Err(SolveError::Load(_))
    ));
    let mut facet = with(vec![]);
    facet.tractions.push(TractionLoad {
        facets: vec![(0, 7)],
        traction: Arc::new(|_, _| [0.0; 3]),
    });
    assert!(matches!(
        solve(&mesh, &materials, plane, &facet, &options),
        Err(SolveError::Load(_))
    ));
    let mut infinite = with(vec![]);
    infinite.body_force = Some(Arc::new(|_| [f64::INFINITY, 0.0, 0.0]));
    assert!(matches!(
        solve(&mesh, &materials, plane, &infinite, &options),
        Err(SolveError::Load(_))
    ));
    // Mode and mesh dimension must match; thickness must be positive.
    assert!(matches!(
        solve(&mesh, &materials, SOLID, &with(vec![]), &options),
        Err(SolveError::Mesh(_))
    ));
    let thin = AnalysisMode::PlaneStress { thickness: 0.0 };
    assert!(matches!(
        solve(&mesh, &materials, thin, &with(vec![]), &options),
        Err(SolveError::Mode(_))
    ));
    // CG options and non-convergence.
    let cg_bad = SolveOptions {
        solver: LinearSolver::ConjugateGradient {
            relative_tolerance: 0.0,
            max_iterations: 10,
        },
    };
    assert!(matches!(
        solve(&mesh, &materials, plane, &with(vec![]), &cg_bad),
        Err(SolveError::Options(_))
    ));
    let mut loaded = with(vec![]);
    loaded.point_loads.push((8, [0.3, -1.0, 0.0]));
    let cg_short = SolveOptions {
        solver: LinearSolver::ConjugateGradient {
            relative_tolerance: 1e-14,
            max_iterations: 2,
        },
    };
    match solve(&mesh, &materials, plane, &loaded, &cg_short) {
        Err(SolveError::NotConverged {
            iterations: 2,
            residual,
        }) => assert!(residual > 1e-14),
        other => panic!(
            "expected non-convergence, got {:?}",
            other.map(|s| s.iterations)
        ),
    }
    // A zone without material.
    let mut zoned = mesh.clone();
    zoned.zone[3] = 7;
    let by_zone = MaterialMap::ByZone(BTreeMap::from([(0, Material::new(1.0, 0.3, "").unwrap())]));
    assert!(matches!(
        solve(&zoned, &by_zone, plane, &with(vec![]), &options),
        Err(SolveError::MissingMaterial(_))
    ));
    assert!(try_exact_errors(
        &zoned,
        &vec![[0.0; 3]; zoned.node_count()],
        &by_zone,
        plane,
        &|_| [0.0; 6],
        2
    )
    .is_err());
    assert!(exact_errors(
        &zoned,
        &vec![[0.0; 3]; zoned.node_count()],
        &by_zone,
        plane,
        &|_| [0.0; 6],
        2
    )
    .error_sq
    .is_nan());
    // An inverted element is named by its file cell.
    let mut inverted = mesh.clone();
    let nodes = &mut inverted.blocks[0].nodes;
    nodes.swap(3 * 5 + 1, 3 * 5 + 2);
    inverted.file_cell[5] = 42;
    match solve(&inverted, &materials, plane, &with(vec![]), &options) {
        Err(SolveError::InvertedElements { cells }) => assert_eq!(cells, vec![42]),
        other => panic!(
            "expected an inverted-element error, got {:?}",
            other.map(|s| s.dofs)
        ),
    }
}

#[test]
fn written_results_read_back_with_displacement_and_zones() {
    let (mut mesh, bc) = bar(ElementKind::Hex8, [3, 2, 2]);
    let solution = solve(
        &mesh,
        &single(1000.0, 0.3),
        SOLID,
        &bc,
        &SolveOptions::default(),
    )
    .unwrap();
    let dir = tempfile::tempdir().unwrap();
    for ascii in [false, true] {
        let path = dir.path().join(format!("bar_{ascii}.vtu"));
        write_results(&path, &mesh, &solution.displacement, ascii).unwrap();
        let grid = read_vtu(&path).unwrap();
        assert_eq!(grid.points, mesh.points);
        assert_eq!(grid.cell_count(), mesh.element_count());
        let u = grid
            .point_array("displacement")
            .expect("displacement array");
        assert_eq!(u.components, 3);
        let flat: Vec<f64> = solution.displacement.iter().flatten().copied().collect();
        if ascii {
            for (a, b) in u.values.iter().zip(&flat) {
                // ASCII output: printed digits only (round-trip formatting keeps about 1e-15).
                assert_close(
                    *a,
                    *b,
                    1e-14,
                    max_abs(&solution.displacement),
                    "ascii value",
                );
            }
        } else {
            assert_eq!(u.values, flat);
        }
        assert!(grid.cell_array("zone").is_none(), "one zone: no zone array");
    }
    for (e, z) in mesh.zone.iter_mut().enumerate() {
        *z = if e < 4 { 3 } else { 5 };
    }
    let path = dir.path().join("zones.vtu");
    write_results(&path, &mesh, &solution.displacement, false).unwrap();
    let grid = read_vtu(&path).unwrap();
    let zones = grid.cell_array("zone").expect("zone array");
    let expected: Vec<f64> = mesh.zone.iter().map(|&z| z as f64).collect();
    assert_eq!(zones.values, expected);
}
