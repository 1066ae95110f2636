//! Reference problems with exact solutions, solved by the reference solver.
//!
//! 1. Cantilever with a parabolic end shear, plane stress (Timoshenko & Goodier 1970, Theory of
//!    Elasticity, 3rd ed., sec. 21 (section number from memory); project methods sheet 5.3 [V]):
//!    P = 1000, L = 48, D = 12, E = 3e7, nu = 0.3, unit thickness.
//!    ```text
//!      y ^   +------------------------------+
//!        |   |                              |  <- parabolic shear, resultant P down
//!      --+-->+------------------------------+  x = L
//!      x = 0: exact displacements prescribed (test a) or exact tractions (tests b, c)
//!    ```
//!    Tip deflection u_y(L, 0) = -0.0089 [V]; exact strain energy U = 4.4746666667 [V].
//! 2. Lame thick cylinder under internal pressure, axisymmetric with u_z = 0 on both end faces
//!    (plane strain along the axis) (methods sheet 5.4 [V]): a = 1, b = 2, p = 1, E = 1,
//!    nu = 0.3: u_r(a) = 1.9066667, u_r(b) = 1.2133333, U per unit length 5.98996999.
//!    ```text
//!      z ^  u_z = 0
//!        |  +----------+
//!   p -> |  |  r in    |  free outer face
//!        |  |  [a, b]  |
//!        |  +----------+  u_z = 0
//!        +-----------------> r
//!    ```
// Numeric checks index several arrays in step; index loops say that more plainly.
#![allow(clippy::needless_range_loop)]

#[path = "solver_util.rs"]
mod util;

use hone::element::ElementKind;
use hone::material::AnalysisMode;
use hone::mesh::generate::{map_points, structured};
use hone::mesh::Mesh;
use hone::reference::solver::{
    exact_errors, select_facets, select_nodes, solve, BoundaryConditions, Constraint, SolveOptions,
    TractionLoad,
};
use std::sync::Arc;
use util::*;

const P: f64 = 1000.0;
const L: f64 = 48.0;
const D: f64 = 12.0;
const E: f64 = 3e7;
const NU: f64 = 0.3;
const I: f64 = D * D * D / 12.0;

/// Exact displacement of the cantilever (methods sheet 5.3).
fn beam_displacement(p: [f64; 3]) -> [f64; 3] {
    let (x, y) = (p[0], p[1]);
    let ux = P * y / (6.0 * E * I) * ((6.0 * L - 3.0 * x) * x + (2.0 + NU) * (y * y - D * D / 4.0));
    let uy = -P / (6.0 * E * I)
        * (3.0 * NU * y * y * (L - x) + (4.0 + 5.0 * NU) * D * D * x / 4.0 + (3.0 * L - x) * x * x);
    [ux, uy, 0.0]
}

/// Exact stress of the cantilever (xx, yy, zz, xy, yz, xz).
fn beam_stress(p: [f64; 3]) -> [f64; 6] {
    let (x, y) = (p[0], p[1]);
    let sxx = P * (L - x) * y / I;
    let sxy = -P / (2.0 * I) * (D * D / 4.0 - y * y);
    [sxx, 0.0, 0.0, sxy, 0.0, 0.0]
}

/// The exact traction sigma . n.
fn beam_traction(x: [f64; 3], n: [f64; 3]) -> [f64; 3] {
    let s = beam_stress(x);
    [s[0] * n[0] + s[3] * n[1], s[3] * n[0] + s[1] * n[1], 0.0]
}

fn beam_mesh(kind: ElementKind, nx: usize, ny: usize) -> Mesh {
    let mut mesh = structured(kind, [nx, ny, 1], [L, D, 0.0]);
    map_points(&mut mesh, |p| [p[0], p[1] - D / 2.0, 0.0]);
    mesh
}

const PLANE_STRESS: AnalysisMode = AnalysisMode::PlaneStress { thickness: 1.0 };

/// Exact displacements prescribed at x = 0, exact traction on x = L.
fn beam_prescribed(kind: ElementKind, nx: usize, ny: usize) -> (Mesh, Vec<[f64; 3]>) {
    let mesh = beam_mesh(kind, nx, ny);
    let left = select_nodes(&mesh, |p| p[0].abs() < 1e-9);
    let bc = BoundaryConditions {
        constraints: prescribe(&mesh, left, 2, beam_displacement),
        tractions: vec![TractionLoad {
            facets: select_facets(&mesh, |c| c.iter().all(|p| (p[0] - L).abs() < 1e-9)),
            traction: Arc::new(beam_traction),
        }],
        ..Default::default()
    };
    let solution = solve(
        &mesh,
        &single(E, NU),
        PLANE_STRESS,
        &bc,
        &SolveOptions::default(),
    )
    .expect("cantilever solves");
    (mesh, solution.displacement)
}

#[test]
fn cantilever_tip_deflection_and_exact_error_rate_quad8() {
    // Check value [V], and the closed form it comes from.
    let tip_exact = -0.0089;
    assert_close(
        beam_displacement([L, 0.0, 0.0])[1],
        tip_exact,
        1e-12,
        tip_exact,
        "formula",
    );
    let mut previous: Option<f64> = None;
    for (nx, ny) in [(4, 1), (8, 2), (16, 4), (32, 8)] {
        let (mesh, u) = beam_prescribed(ElementKind::Quad8, nx, ny);
        let tip = select_nodes(&mesh, |p| (p[0] - L).abs() < 1e-9 && p[1].abs() < 1e-9);
        let deflection = u[tip[0] as usize][1];
        let errors = exact_errors(&mesh, &u, &single(E, NU), PLANE_STRESS, &beam_stress, 6);
        let error = errors.error_sq.sqrt();
        let relative = error / errors.exact_energy_sq.sqrt();
        eprintln!("quad8 {nx}x{ny}: tip {deflection:.8e}, energy-norm error {error:.4e} (relative {relative:.3e})");
        if nx >= 8 {
            // "Within 0.5 % on a modest mesh" (the task's requirement); 8 x 2 quad8 is modest.
            assert_close(deflection, tip_exact, 5e-3, tip_exact, "tip deflection");
        }
        if let Some(prev) = previous {
            // Energy-norm error O(h^p), p = 2 for quad8 (methods sheet 4.3 / 6.2, smooth
            // solution): halving h divides it by about 4 (measured orders 1.99-2.00 here).
            let order = (prev / error).log2();
            assert!(
                (1.9..=2.1).contains(&order),
                "observed order {order:.3} at {nx}x{ny}, expected about 2"
            );
        }
        previous = Some(error);
    }
}

/// Minimal homogeneous supports: pin at (0, 0), u_y = 0 at (L, 0); exact tractions on both ends.
fn beam_tractions(
    kind: ElementKind,
    nx: usize,
    ny: usize,
) -> (Mesh, hone::reference::solver::Solution) {
    let mesh = beam_mesh(kind, nx, ny);
    let origin = select_nodes(&mesh, |p| p[0].abs() < 1e-9 && p[1].abs() < 1e-9)[0];
    let right = select_nodes(&mesh, |p| (p[0] - L).abs() < 1e-9 && p[1].abs() < 1e-9)[0];
    let pin = |node, component| Constraint {
        node,
        component,
        value: 0.0,
    };
    let ends = select_facets(&mesh, |c| {
        c.iter().all(|p| p[0].abs() < 1e-9) || c.iter().all(|p| (p[0] - L).abs() < 1e-9)
    });
    let bc = BoundaryConditions {
        constraints: vec![pin(origin, 0), pin(origin, 1), pin(right, 1)],
        tractions: vec![TractionLoad {
            facets: ends,
            traction: Arc::new(beam_traction),
        }],
        ..Default::default()
    };
    let solution = solve(
        &mesh,
        &single(E, NU),
        PLANE_STRESS,
        &bc,
        &SolveOptions::default(),
    )
    .expect("cantilever solves");
    (mesh, solution)
}

#[test]
fn cantilever_exact_error_equals_twice_the_energy_deficit() {
    // Methods sheet 2 and 5.3: with exact tractions and homogeneous rigid-body supports,
    // ||e||^2 = 2 (U - U_h), U = 4.4746666667 [V] (closed form below).
    let u_exact =
        2.0 * L * P * P * (5.0 * L * L + 3.0 * D * D * (1.0 + NU)) / (5.0 * D.powi(3) * E);
    assert_close(u_exact, 4.4746666667, 1e-10, 4.47, "closed-form energy");
    for kind in [ElementKind::Quad8, ElementKind::Quad9, ElementKind::Tri6] {
        let (mesh, solution) = beam_tractions(kind, 8, 2);
        // Clapeyron with homogeneous supports: f^T u = 2 U_h (round-off only).
        assert_close(
            solution.external_work,
            2.0 * solution.strain_energy,
            1e-10,
            solution.strain_energy,
            "Clapeyron",
        );
        let errors = exact_errors(
            &mesh,
            &solution.displacement,
            &single(E, NU),
            PLANE_STRESS,
            &beam_stress,
            5,
        );
        // The exact stress is quadratic and these elements' stresses are polynomial on the
        // rectangle, so 5 points per direction integrate the energy exactly.
        assert_close(
            errors.exact_energy_sq,
            2.0 * u_exact,
            1e-12,
            2.0 * u_exact,
            "2U",
        );
        let deficit = 2.0 * (u_exact - solution.strain_energy);
        eprintln!(
            "{kind}: ||e||^2 = {:.10e}, 2(U - U_h) = {deficit:.10e}",
            errors.error_sq
        );
        // Both sides are exact up to round-off in U_h (about 1e-15 U), amplified by U / ||e||^2
        // (about 1e3 here): 1e-6 relative is the task's stated agreement.
        assert_close(
            errors.error_sq,
            deficit,
            1e-6,
            deficit,
            &format!("{kind} identity"),
        );
    }
}

/// Lame cylinder: exact radial displacement (plane strain along the axis) and stresses.
mod lame {
    pub const A: f64 = 1.0;
    pub const B: f64 = 2.0;
    pub const P: f64 = 1.0;
    pub const E: f64 = 1.0;
    pub const NU: f64 = 0.3;
    const C: f64 = P * A * A / (B * B - A * A);

    pub fn radial(r: f64) -> f64 {
        (1.0 + NU) * C / E * ((1.0 - 2.0 * NU) * r + B * B / r)
    }

    /// (rr, zz, hoop, rz, -, -).
    pub fn stress(x: [f64; 3]) -> [f64; 6] {
        let r2 = x[0] * x[0];
        [
            C * (1.0 - B * B / r2),
            2.0 * NU * C,
            C * (1.0 + B * B / r2),
            0.0,
            0.0,
            0.0,
        ]
    }
}

#[test]
fn lame_cylinder_axisymmetric_quad8_and_tri6() {
    // Check values [V] of methods sheet 5.4 against the closed form.
    assert_close(
        lame::radial(lame::A),
        1.9066667,
        1e-7,
        1.9,
        "u_r(a) formula",
    );
    assert_close(
        lame::radial(lame::B),
        1.2133333,
        1e-7,
        1.2,
        "u_r(b) formula",
    );
    let height = 0.5;
    for kind in [ElementKind::Quad8, ElementKind::Tri6] {
        let mut mesh = structured(kind, [8, 2, 1], [lame::B - lame::A, height, 0.0]);
        map_points(&mut mesh, |p| [p[0] + lame::A, p[1], 0.0]);
        let ends = select_nodes(&mesh, |p| p[1].abs() < 1e-9 || (p[1] - height).abs() < 1e-9);
        let constraints = ends
            .into_iter()
            .map(|node| Constraint {
                node,
                component: 1,
                value: 0.0,
            })
            .collect();
        let inner = select_facets(&mesh, |c| c.iter().all(|p| (p[0] - lame::A).abs() < 1e-9));
        let bc = BoundaryConditions {
            constraints,
            tractions: vec![TractionLoad {
                facets: inner,
                traction: Arc::new(|_, n| [-lame::P * n[0], -lame::P * n[1], 0.0]),
            }],
            ..Default::default()
        };
        let materials = single(lame::E, lame::NU);
        let mode = AnalysisMode::Axisymmetric;
        let solution =
            solve(&mesh, &materials, mode, &bc, &SolveOptions::default()).expect("cylinder solves");
        for (r, expected) in [(lame::A, 1.9066667), (lame::B, 1.2133333)] {
            let nodes = select_nodes(&mesh, |p| (p[0] - r).abs() < 1e-9);
            let ur = solution.displacement[nodes[0] as usize][0];
            eprintln!(
                "{kind}: u_r({r}) = {ur:.8}, relative error {:.2e}",
                (ur - expected) / expected
            );
            for node in nodes {
                let what = format!("{kind}: u_r({r}) at node {node}");
                // The task's requirement: within 0.1 % at r = a.
                assert_close(
                    solution.displacement[node as usize][0],
                    expected,
                    1e-3,
                    expected,
                    &what,
                );
                // Exact u_z = 0; the FE field is not exactly 0 at the free nodes of the tri6
                // mesh (diagonals break the symmetry), same 0.1 % bound relative to u_r.
                assert_close(
                    solution.displacement[node as usize][1],
                    0.0,
                    1e-3,
                    expected,
                    &what,
                );
            }
        }
        // Energy per unit length 5.98996999 [V] over the height; 8 points per direction make the
        // rational integrand's quadrature error negligible (below 1e-12 relative).
        let errors = exact_errors(
            &mesh,
            &solution.displacement,
            &materials,
            mode,
            &lame::stress,
            8,
        );
        let two_u = 2.0 * 5.98996999 * height;
        assert_close(errors.exact_energy_sq, two_u, 1e-8, two_u, "2U");
        // Homogeneous supports that the exact solution satisfies, exact pressure loads:
        // ||e||^2 = 2 (U - U_h) (methods sheet 2); U from the closed form pi a p u_r(a). Unlike
        // the plane case the identity holds only up to the quadrature error of the stiffness:
        // its hoop terms N_a N_b / r are rational and the full rule does not integrate them
        // exactly (measured 7.5e-4 relative for quad8 here); 5e-3 bounds that and still fails
        // for any error of the order of ||e||^2 itself.
        let u = std::f64::consts::PI * lame::A * lame::P * lame::radial(lame::A) * height;
        let deficit = 2.0 * (u - solution.strain_energy);
        eprintln!(
            "{kind} Lame: ||e||^2 = {:.6e}, 2(U - U_h) = {deficit:.6e}",
            errors.error_sq
        );
        assert_close(
            errors.error_sq,
            deficit,
            5e-3,
            deficit,
            &format!("{kind} identity"),
        );
    }
}
