//! Loads and selections of the reference solver: body force, point loads against consistent
//! traction loads, boundary-facet selection.
// Numeric checks index several arrays in step; index loops say that more plainly.
#![allow(clippy::needless_range_loop)]

#[path = "solver_util.rs"]
mod util;

use hone::element::ElementKind;
use hone::material::AnalysisMode;
use hone::mesh::generate::structured;
use hone::reference::solver::{
    boundary_facets, select_facets, select_nodes, solve, BoundaryConditions, Constraint,
    SolveOptions, TractionLoad,
};
use std::sync::Arc;
use util::*;

const E: f64 = 100.0;
const NU: f64 = 0.25;
const GAMMA: f64 = 0.8;

/// Bar under its own weight along -x, carried by the traction gamma L on x = L (Timoshenko &
/// Goodier 1970, Theory of Elasticity, the prismatic bar under its own weight (from memory);
/// field derived here): sigma_xx = gamma x, all other stresses 0, which satisfies equilibrium
/// with b = (-gamma, 0, 0) and leaves the sides and x = 0 traction-free. Displacements (3D; drop
/// z for plane stress): u = gamma (x^2 + nu (y^2 + z^2)) / (2E), v = -nu gamma x y / E,
/// w = -nu gamma x z / E. They are quadratic, so every quadratic kind reproduces them.
fn hanging(p: [f64; 3]) -> [f64; 3] {
    let (x, y, z) = (p[0], p[1], p[2]);
    [
        GAMMA * (x * x + NU * (y * y + z * z)) / (2.0 * E),
        -NU * GAMMA * x * y / E,
        -NU * GAMMA * x * z / E,
    ]
}

#[test]
fn body_force_bar_is_reproduced_by_quadratic_kinds() {
    let cases = [
        (
            ElementKind::Tri6,
            AnalysisMode::PlaneStress { thickness: 0.5 },
        ),
        (
            ElementKind::Quad8,
            AnalysisMode::PlaneStress { thickness: 0.5 },
        ),
        (
            ElementKind::Quad9,
            AnalysisMode::PlaneStress { thickness: 0.5 },
        ),
        (ElementKind::Tet10, AnalysisMode::Solid3d),
        (ElementKind::Hex20, AnalysisMode::Solid3d),
        (ElementKind::Hex27, AnalysisMode::Solid3d),
        (ElementKind::Wedge15, AnalysisMode::Solid3d),
    ];
    let (l, w, h) = (3.0, 1.0, 0.8);
    for (kind, mode) in cases {
        let three = kind.dim() == 3;
        let mesh = block(kind, 3, [0.0; 3], [l, w, if three { h } else { 0.0 }]);
        let ndim = mode.dimension();
        let at = |a: f64, b: f64| (a - b).abs() < 1e-9;
        let node = |x: f64, y: f64| {
            select_nodes(&mesh, |p| at(p[0], x) && at(p[1], y) && at(p[2], 0.0))[0]
        };
        let fix = |node, component| Constraint {
            node,
            component,
            value: 0.0,
        };
        // Minimal supports, all satisfied by the exact field with value 0.
        let mut constraints: Vec<Constraint> = (0..ndim).map(|c| fix(node(0.0, 0.0), c)).collect();
        constraints.push(fix(node(l, 0.0), 1));
        if three {
            constraints.push(fix(node(l, 0.0), 2));
            constraints.push(fix(node(0.0, w), 2));
        }
        let bc = BoundaryConditions {
            constraints,
            tractions: vec![TractionLoad {
                facets: select_facets(&mesh, |c| c.iter().all(|p| at(p[0], l))),
                traction: Arc::new(move |_, _| [GAMMA * l, 0.0, 0.0]),
            }],
            body_force: Some(Arc::new(|_| [-GAMMA, 0.0, 0.0])),
            ..Default::default()
        };
        let solution = solve(&mesh, &single(E, NU), mode, &bc, &SolveOptions::default())
            .unwrap_or_else(|e| panic!("{kind}: {e}"));
        let scale = hanging([l, w, h])[0];
        for (n, p) in mesh.points.iter().enumerate() {
            let exact = hanging(*p);
            for c in 0..ndim {
                // Quadratic field in the element span, loads integrated exactly: round-off only
                // (a few thousand dofs, condition numbers below 1e5).
                assert_close(
                    solution.displacement[n][c],
                    exact[c],
                    1e-9,
                    scale,
                    &format!("{kind} node {n} component {c}"),
                );
            }
        }
        // Clapeyron with homogeneous supports: f^T u = 2 U_h.
        assert_close(
            solution.external_work,
            2.0 * solution.strain_energy,
            1e-10,
            solution.strain_energy,
            &format!("{kind} Clapeyron"),
        );
        // U = integral sigma^2 / (2E) = gamma^2 L^3 A / (6E) (A = W t or W H).
        let area = w * match mode {
            AnalysisMode::PlaneStress { thickness } => thickness,
            _ => h,
        };
        let energy = GAMMA * GAMMA * l.powi(3) * area / (6.0 * E);
        assert_close(
            solution.strain_energy,
            energy,
            1e-9,
            energy,
            &format!("{kind} energy"),
        );
    }
}

#[test]
fn point_loads_equal_to_consistent_edge_loads_give_the_same_solution() {
    // Consistent nodal forces of a constant traction q on an edge of length h (common practice):
    // 2-node edge q h / 2 at each end; 3-node edge q h (1/6, 1/6, 2/3) at ends and middle.
    let (l, w, ny) = (4.0, 2.0, 4usize);
    let thickness = 0.5;
    let q = 3.0;
    let mode = AnalysisMode::PlaneStress { thickness };
    for kind in [ElementKind::Quad4, ElementKind::Quad8] {
        let mesh = structured(kind, [6, ny, 1], [l, w, 0.0]);
        let at = |a: f64, b: f64| (a - b).abs() < 1e-9;
        let mut constraints: Vec<Constraint> = select_nodes(&mesh, |p| at(p[0], 0.0))
            .into_iter()
            .flat_map(|node| {
                (0..2).map(move |component| Constraint {
                    node,
                    component,
                    value: 0.0,
                })
            })
            .collect();
        constraints.dedup();
        let traction = BoundaryConditions {
            constraints: constraints.clone(),
            tractions: vec![TractionLoad {
                facets: select_facets(&mesh, |c| c.iter().all(|p| at(p[0], l))),
                traction: Arc::new(move |_, _| [0.0, -q, 0.0]),
            }],
            ..Default::default()
        };
        let h = w / ny as f64;
        let point_loads = select_nodes(&mesh, |p| at(p[0], l))
            .into_iter()
            .map(|node| {
                let y = mesh.points[node as usize][1];
                let k = y / h;
                let is_corner = (k - k.round()).abs() < 1e-9;
                let share = match (kind, is_corner) {
                    (ElementKind::Quad4, _) => {
                        if at(y, 0.0) || at(y, w) {
                            0.5
                        } else {
                            1.0
                        }
                    }
                    (_, true) => {
                        if at(y, 0.0) || at(y, w) {
                            1.0 / 6.0
                        } else {
                            1.0 / 3.0
                        }
                    }
                    (_, false) => 2.0 / 3.0,
                };
                (node, [0.0, -q * h * thickness * share, 0.0])
            })
            .collect();
        let points = BoundaryConditions {
            constraints,
            point_loads,
            ..Default::default()
        };
        let materials = single(E, NU);
        let a = solve(&mesh, &materials, mode, &traction, &SolveOptions::default()).unwrap();
        let b = solve(&mesh, &materials, mode, &points, &SolveOptions::default()).unwrap();
        let scale = a
            .displacement
            .iter()
            .map(|u| u[1].abs())
            .fold(0.0, f64::max);
        assert!(scale > 0.0);
        for (n, (ua, ub)) in a.displacement.iter().zip(&b.displacement).enumerate() {
            for c in 0..2 {
                // Same system up to the round-off of the load quadrature.
                assert_close(
                    ub[c],
                    ua[c],
                    1e-12,
                    scale,
                    &format!("{kind} node {n} component {c}"),
                );
            }
        }
        assert_close(
            b.external_work,
            a.external_work,
            1e-12,
            a.external_work,
            &format!("{kind} work"),
        );
    }
}

#[test]
fn boundary_facets_are_counted_as_expected_and_ignore_zones() {
    // Expected counts by counting the structured meshes' outer edges and faces.
    let cases = [
        (ElementKind::Quad4, [4, 3, 1], 2 * (4 + 3)),
        (ElementKind::Tri6, [2, 2, 1], 2 * (2 + 2)),
        (ElementKind::Hex8, [2, 2, 2], 6 * 4),
        (ElementKind::Tet4, [1, 1, 1], 6 * 2),
        (ElementKind::Wedge15, [2, 1, 1], 2 * 2 * 2 + 2 * (2 + 1)),
    ];
    for (kind, n, expected) in cases {
        let mut mesh = structured(kind, n, [1.0, 1.0, 1.0]);
        assert_eq!(boundary_facets(&mesh).len(), expected, "{kind}");
        // Two zones: the interface is not a boundary of the solid.
        for (e, z) in mesh.zone.iter_mut().enumerate() {
            *z = (e % 2) as i64;
        }
        assert_eq!(boundary_facets(&mesh).len(), expected, "{kind} with zones");
        let top = select_facets(&mesh, |c| c.iter().all(|p| (p[1] - 1.0).abs() < 1e-12));
        // Facets on y = 1: one edge per cell in 2D; a quadrilateral per cell for hexahedra and
        // wedges (whose sides are quadrilaterals); two triangles per cell face for tetrahedra.
        let top_expected = match kind {
            ElementKind::Quad4 | ElementKind::Tri6 => n[0],
            ElementKind::Tet4 => 2 * n[0] * n[2],
            _ => n[0] * n[2],
        };
        assert_eq!(top.len(), top_expected, "{kind} top facets");
    }
}
