//! Uniaxial tension applied by tractions, every element kind (Hooke's law; common practice).
//!
//! ```text
//!  plane / 3D:                          axisymmetric tube a <= r <= b:
//!   u_x = 0 |------------------| -> sigma         ^ sigma (on z = L)
//!   (face)  |                  | -> (traction     |
//!           |                  | ->  on x = L)   |==|  u_z = 0 on z = 0
//!   pin * --+------------------+                 r=a r=b
//! ```
//! Supports: u_x = 0 on the face x = 0, u_y = 0 (and u_z = 0) at the origin, in 3D u_z = 0 at
//! (0, W, 0) against rotation about x; axisymmetric: u_z = 0 on z = 0.
//! Expected (uniform stress sigma along the load): plane stress and 3D e_x = sigma / E, lateral
//! e = -nu sigma / E; plane strain e_x = (1 - nu^2) sigma / E, e_y = -nu (1 + nu) sigma / E;
//! axisymmetric u_z = sigma z / E, u_r = -nu sigma r / E. Strain energy U = sigma e_x V / 2 with
//! V including the thickness or 2 pi r, and f^T u = 2 U (Clapeyron, homogeneous supports).
// Numeric checks index several arrays in step; index loops say that more plainly.
#![allow(clippy::needless_range_loop)]

#[path = "solver_util.rs"]
mod util;

use hone::element::ElementKind;
use hone::material::AnalysisMode;
use hone::reference::solver::{
    select_facets, select_nodes, solve, BoundaryConditions, Constraint, SolveOptions, TractionLoad,
};
use std::sync::Arc;
use util::*;

const E: f64 = 200.0;
const NU: f64 = 0.3;
const SIGMA: f64 = 1.5;

/// A uniform state is in every element's span, so only round-off separates the FE result from
/// Hooke's law: systems of a few thousand dofs, condition numbers below about 1e5.
const TOLERANCE: f64 = 1e-9;

/// Solves tension along x of the box `[0, size]` and checks every node and the energies.
fn plane_or_solid(kind: ElementKind, mode: AnalysisMode, size: [f64; 3]) {
    let mesh = block(kind, 3, [0.0; 3], size);
    let ndim = mode.dimension();
    let at = |v: f64, w: f64| (v - w).abs() < 1e-9;
    let mut constraints: Vec<Constraint> = select_nodes(&mesh, |p| at(p[0], 0.0))
        .into_iter()
        .map(|node| Constraint {
            node,
            component: 0,
            value: 0.0,
        })
        .collect();
    let origin = select_nodes(&mesh, |p| at(p[0], 0.0) && at(p[1], 0.0) && at(p[2], 0.0));
    for c in 1..ndim {
        constraints.push(Constraint {
            node: origin[0],
            component: c,
            value: 0.0,
        });
    }
    if ndim == 3 {
        let corner = select_nodes(&mesh, |p| {
            at(p[0], 0.0) && at(p[1], size[1]) && at(p[2], 0.0)
        });
        constraints.push(Constraint {
            node: corner[0],
            component: 2,
            value: 0.0,
        });
    }
    let facets = select_facets(&mesh, |c| c.iter().all(|p| at(p[0], size[0])));
    assert!(!facets.is_empty());
    let bc = BoundaryConditions {
        constraints,
        tractions: vec![TractionLoad {
            facets,
            traction: Arc::new(|_, _| [SIGMA, 0.0, 0.0]),
        }],
        ..Default::default()
    };
    let solution = solve(&mesh, &single(E, NU), mode, &bc, &SolveOptions::default())
        .unwrap_or_else(|e| panic!("{kind} {}: {e}", mode.name()));
    let (ex, ey) = match mode {
        AnalysisMode::PlaneStrain => ((1.0 - NU * NU) * SIGMA / E, -NU * (1.0 + NU) * SIGMA / E),
        _ => (SIGMA / E, -NU * SIGMA / E),
    };
    let scale = ex * size[0];
    for (node, p) in mesh.points.iter().enumerate() {
        let expected = [ex * p[0], ey * p[1], ey * p[2]];
        for c in 0..ndim {
            assert_close(
                solution.displacement[node][c],
                expected[c],
                TOLERANCE,
                scale,
                &format!("{kind} {}: node {node} component {c}", mode.name()),
            );
        }
    }
    // The estimator's own stress evaluation sees the uniform stress everywhere.
    let model = hone::mesh::Model {
        mesh: mesh.clone(),
        displacement: solution.displacement.clone(),
    };
    let element_materials =
        hone::recovery::ElementMaterials::new(&mesh, &single(E, NU), mode).unwrap();
    let sampled = hone::recovery::sample_stresses(&model, &element_materials).unwrap();
    for s in &sampled.stress {
        let what = format!("{kind} {}: sampled stress", mode.name());
        assert_close(s[0], SIGMA, TOLERANCE, SIGMA, &what);
        for c in [1, 3, 4, 5] {
            assert_close(s[c], 0.0, TOLERANCE, SIGMA, &what);
        }
    }
    let thickness = match mode {
        AnalysisMode::PlaneStress { thickness } => thickness,
        _ => 1.0,
    };
    let volume = size[0] * size[1] * if ndim == 3 { size[2] } else { thickness };
    let energy = 0.5 * SIGMA * ex * volume;
    let what = format!("{kind} {}", mode.name());
    assert_close(solution.strain_energy, energy, TOLERANCE, energy, &what);
    assert_close(
        solution.external_work,
        2.0 * energy,
        TOLERANCE,
        energy,
        &what,
    );
}

#[test]
fn tension_in_plane_stress_and_plane_strain_for_every_2d_kind() {
    for kind in KINDS_2D {
        for mode in [
            AnalysisMode::PlaneStress { thickness: 0.5 },
            AnalysisMode::PlaneStrain,
        ] {
            plane_or_solid(kind, mode, [3.0, 1.0, 0.0]);
        }
    }
}

#[test]
fn tension_of_a_bar_for_every_3d_kind() {
    for kind in KINDS_3D {
        plane_or_solid(kind, AnalysisMode::Solid3d, [3.0, 1.0, 0.8]);
    }
}

#[test]
fn axial_tension_of_a_tube_for_every_2d_kind() {
    let (a, b, length) = (1.0, 2.0, 3.0);
    let mode = AnalysisMode::Axisymmetric;
    for kind in KINDS_2D {
        let mesh = block(kind, 3, [a, 0.0, 0.0], [b - a, length, 0.0]);
        let at = |v: f64, w: f64| (v - w).abs() < 1e-9;
        let constraints = select_nodes(&mesh, |p| at(p[1], 0.0))
            .into_iter()
            .map(|node| Constraint {
                node,
                component: 1,
                value: 0.0,
            })
            .collect();
        let facets = select_facets(&mesh, |c| c.iter().all(|p| at(p[1], length)));
        let bc = BoundaryConditions {
            constraints,
            tractions: vec![TractionLoad {
                facets,
                traction: Arc::new(|_, _| [0.0, SIGMA, 0.0]),
            }],
            ..Default::default()
        };
        let solution = solve(&mesh, &single(E, NU), mode, &bc, &SolveOptions::default())
            .unwrap_or_else(|e| panic!("{kind} axisymmetric: {e}"));
        let scale = SIGMA / E * length;
        for (node, p) in mesh.points.iter().enumerate() {
            let expected = [-NU * SIGMA / E * p[0], SIGMA / E * p[1]];
            for c in 0..2 {
                assert_close(
                    solution.displacement[node][c],
                    expected[c],
                    TOLERANCE,
                    scale,
                    &format!("{kind} axisymmetric: node {node} component {c}"),
                );
            }
        }
        let volume = std::f64::consts::PI * (b * b - a * a) * length;
        let energy = 0.5 * SIGMA * SIGMA / E * volume;
        let what = format!("{kind} axisymmetric energy");
        assert_close(solution.strain_energy, energy, TOLERANCE, energy, &what);
        assert_close(
            solution.external_work,
            2.0 * energy,
            TOLERANCE,
            energy,
            &what,
        );
    }
}

#[test]
fn two_materials_in_series_in_two_blocks() {
    // Bar [0, 2] x [0, 1], zone 1 (x < 1): E1 = 100, nu1 = 0.2; zone 2: E2 = 200, nu2 = 0.4.
    // Equal nu / E makes the lateral strains match at the interface, so the uniform-stress
    // state is exact (Hooke per zone, common practice): u_x = sigma x / E1 for x <= 1,
    // sigma / E1 + sigma (x - 1) / E2 beyond; u_y = -(nu / E) sigma y.
    use hone::material::{Material, MaterialMap};
    use hone::mesh::{CellBlock, Mesh};
    use std::collections::BTreeMap;
    let kind = ElementKind::Quad8;
    let one = hone::mesh::generate::structured(kind, [4, 2, 1], [2.0, 1.0, 0.0]);
    let nn = kind.node_count();
    let (mut left, mut right) = (Vec::new(), Vec::new());
    for e in 0..one.element_count() {
        if one.centroid(e)[0] < 1.0 {
            left.push(e);
        } else {
            right.push(e);
        }
    }
    let block = |cells: &[usize], first: usize| CellBlock {
        kind,
        nodes: cells
            .iter()
            .flat_map(|&e| one.element(e).1.to_vec())
            .collect(),
        first_element: first,
    };
    let order: Vec<usize> = left.iter().chain(&right).copied().collect();
    let mesh = Mesh {
        points: one.points.clone(),
        blocks: vec![block(&left, 0), block(&right, left.len())],
        file_cell: order.iter().map(|&e| e as u32).collect(),
        zone: order
            .iter()
            .map(|&e| if left.contains(&e) { 1 } else { 2 })
            .collect(),
        dimension: 2,
    };
    assert_eq!(mesh.blocks[1].nodes.len(), right.len() * nn);
    let materials = MaterialMap::ByZone(BTreeMap::from([
        (1, Material::new(100.0, 0.2, "").unwrap()),
        (2, Material::new(200.0, 0.4, "").unwrap()),
    ]));
    let at = |v: f64, w: f64| (v - w).abs() < 1e-9;
    let mut constraints: Vec<Constraint> = select_nodes(&mesh, |p| at(p[0], 0.0))
        .into_iter()
        .map(|node| Constraint {
            node,
            component: 0,
            value: 0.0,
        })
        .collect();
    constraints.push(Constraint {
        node: select_nodes(&mesh, |p| at(p[0], 0.0) && at(p[1], 0.0))[0],
        component: 1,
        value: 0.0,
    });
    let bc = BoundaryConditions {
        constraints,
        tractions: vec![TractionLoad {
            facets: select_facets(&mesh, |c| c.iter().all(|p| at(p[0], 2.0))),
            traction: Arc::new(|_, _| [SIGMA, 0.0, 0.0]),
        }],
        ..Default::default()
    };
    let mode = AnalysisMode::PlaneStress { thickness: 1.0 };
    let solution = solve(&mesh, &materials, mode, &bc, &SolveOptions::default()).unwrap();
    let scale = SIGMA * (1.0 / 100.0 + 1.0 / 200.0);
    for (n, p) in mesh.points.iter().enumerate() {
        let ux = if p[0] <= 1.0 {
            SIGMA * p[0] / 100.0
        } else {
            SIGMA / 100.0 + SIGMA * (p[0] - 1.0) / 200.0
        };
        let uy = -0.002 * SIGMA * p[1];
        assert_close(
            solution.displacement[n][0],
            ux,
            TOLERANCE,
            scale,
            &format!("node {n} u_x"),
        );
        assert_close(
            solution.displacement[n][1],
            uy,
            TOLERANCE,
            scale,
            &format!("node {n} u_y"),
        );
    }
}
