//! Patch tests of the reference solver (common practice: Irons' patch test, e.g. Zienkiewicz &
//! Taylor, The Finite Element Method vol. 1, ch. 10).
//!
//! Goal: a linear displacement field (constant strain) prescribed on the boundary nodes of a
//! distorted mesh is reproduced at every interior node, for every element kind in every mode it
//! applies to. Axisymmetric: `u_r = a r`, `u_z = b z + c`, whose strains
//! (`e_rr = e_tt = a`, `e_zz = b`) are constant with `sigma_rr = sigma_tt`, so it is an exact
//! solution without body force.
//!
//! ```text
//!   y                       distorted structured mesh, 3 cells per direction
//!   ^  +-----+-----+-----+  every boundary node: u = exact field (all components)
//!   |  |     |     |     |  interior nodes: free, no loads
//!   |  +-----+-----+-----+  expected: u = exact field at every node
//!   +--> x (= r)
//! ```
// Numeric checks index several arrays in step; index loops say that more plainly.
#![allow(clippy::needless_range_loop)]

#[path = "solver_util.rs"]
mod util;

use hone::material::AnalysisMode;
use hone::reference::solver::{solve, BoundaryConditions, SolveOptions};
use util::*;

/// Round-off bound relative to the largest displacement: the systems have at most a few
/// thousand dofs and condition numbers below about 1e5, so the solution carries errors of order
/// 1e5 * 1e-16; 1e-9 leaves a wide margin while any element error (1e-4 or more on these
/// distorted meshes) would fail.
const PATCH_TOLERANCE: f64 = 1e-9;

fn run_patch(
    kind: hone::element::ElementKind,
    mode: AnalysisMode,
    n: usize,
    origin: [f64; 3],
    size: [f64; 3],
    field: &dyn Fn([f64; 3]) -> [f64; 3],
) {
    let mut mesh = block(kind, n, origin, size);
    distort(&mut mesh, origin, size);
    let on_boundary = boundary_nodes(&mesh);
    let ndim = mode.dimension();
    let boundary = (0..mesh.node_count() as u32).filter(|&i| on_boundary[i as usize]);
    let interior = on_boundary.iter().filter(|b| !**b).count();
    assert!(interior > 0, "{kind}: the patch has no interior node");
    let bc = BoundaryConditions {
        constraints: prescribe(&mesh, boundary, ndim, field),
        ..Default::default()
    };
    let materials = single(210.0, 0.3);
    let solution = solve(&mesh, &materials, mode, &bc, &SolveOptions::default())
        .unwrap_or_else(|e| panic!("{kind} {}: {e}", mode.name()));
    let scale = mesh
        .points
        .iter()
        .map(|&p| field(p).iter().fold(0.0f64, |m, v| m.max(v.abs())))
        .fold(0.0, f64::max);
    for (node, p) in mesh.points.iter().enumerate() {
        let exact = field(*p);
        for (c, &value) in exact.iter().enumerate().take(ndim) {
            assert_close(
                solution.displacement[node][c],
                value,
                PATCH_TOLERANCE,
                scale,
                &format!("{kind} {}: node {node} component {c}", mode.name()),
            );
        }
    }
}

#[test]
fn linear_field_is_reproduced_by_every_2d_kind_in_every_2d_mode() {
    let origin = [0.5, 0.25, 0.0];
    let size = [2.0, 1.5, 0.0];
    for kind in KINDS_2D {
        for mode in modes_2d() {
            let field: Field = if mode == AnalysisMode::Axisymmetric {
                Box::new(|p: [f64; 3]| [2e-3 * p[0], -1e-3 + 1.5e-3 * p[1], 0.0])
            } else {
                Box::new(|p: [f64; 3]| {
                    [
                        1e-3 * (1.0 + 2.0 * p[0] - 0.5 * p[1]),
                        1e-3 * (-0.7 + 0.4 * p[0] + 1.3 * p[1]),
                        0.0,
                    ]
                })
            };
            run_patch(kind, mode, 3, origin, size, &field);
        }
    }
}

#[test]
fn linear_field_is_reproduced_by_every_3d_kind() {
    let origin = [0.0, 0.0, 0.0];
    let size = [1.0, 1.2, 0.9];
    let field = |p: [f64; 3]| {
        [
            1e-3 * (0.3 + 1.1 * p[0] - 0.4 * p[1] + 0.2 * p[2]),
            1e-3 * (-0.5 + 0.6 * p[0] + 0.9 * p[1] - 0.7 * p[2]),
            1e-3 * (0.8 - 0.3 * p[0] + 0.5 * p[1] + 1.4 * p[2]),
        ]
    };
    for kind in KINDS_3D {
        run_patch(kind, AnalysisMode::Solid3d, 3, origin, size, &field);
    }
}
