//! L-shaped domain with the Williams mode-I corner field, plane strain.
//!
//! Source: Williams (1952), "Stress singularities resulting from various boundary conditions
//! in angular corners of plates in extension", J. Appl. Mech. 19:526-528 (citation from
//! memory); the field as restated and checked (equilibrium, traction-free faces) in the method
//! sheet 5.5, with check values there.
//!
//! ```text
//!   (-1,1) +-----------+ (1,1)       exact tractions on the four outer edges
//!          |           |             re-entrant faces (y = 0, x > 0 and x = 0, y < 0) free
//!          |     +-----+ (1,0)       u = 0 at the corner (0,0); u_y exact at (-1,0)
//!          |     |(0,0)
//!  (-1,-1) +-----+ (0,-1)
//! ```
//! Local polar coordinates at the corner, theta from the bisector (global angle 135 degrees),
//! faces at theta = +-omega, omega = 3 pi / 4; lambda solves sin(2 lambda omega) +
//! lambda sin(2 omega) = 0.

use super::{exact_traction, first_kind, ExactStress, Problem, ON_BOUNDARY};
use crate::element::ElementKind;
use crate::material::{AnalysisMode, Material, MaterialMap};
use crate::mesh::Mesh;
use crate::reference::meshes::{self, Domain, Loop, Segment};
use crate::reference::solver::{select_nodes, BoundaryConditions, Constraint};
use std::f64::consts::PI;
use std::sync::Arc;

/// Smallest mode-I Williams exponent of a 270 degree traction-free corner (method sheet 4.1,
/// \[V\]: 0.544483736782463929...).
pub const WILLIAMS_LAMBDA_270: f64 = 0.544_483_736_782_464;
const E: f64 = 1.0;
const NU: f64 = 0.3;
const OMEGA: f64 = 3.0 * PI / 4.0;

/// C = -cos((lambda + 1) omega) / cos((lambda - 1) omega) (method sheet 5.5: 1.84136433117098).
fn coefficient() -> f64 {
    let l = WILLIAMS_LAMBDA_270;
    -((l + 1.0) * OMEGA).cos() / ((l - 1.0) * OMEGA).cos()
}

/// Global polar angle in [0, 3 pi / 2] and the local angle from the bisector.
fn angles(x: f64, y: f64) -> (f64, f64) {
    let mut t = y.atan2(x);
    if t < -PI / 2.0 + 1e-15 {
        t += 2.0 * PI;
    } else if t < 0.0 {
        // Inside the removed quadrant only through round-off on the face x = 0, y < 0.
        t = if x.abs() < -y { 1.5 * PI } else { 0.0 };
    }
    (t, t - OMEGA)
}

/// Exact stress (Cartesian, hone's order) of the Williams field; independent of E and nu.
pub fn williams_stress(x: f64, y: f64) -> [f64; 6] {
    let l = WILLIAMS_LAMBDA_270;
    let c = coefficient();
    let r = (x * x + y * y).sqrt().max(1e-300);
    let (tg, t) = angles(x, y);
    let rl = r.powf(l - 1.0);
    let srr = l * rl * ((3.0 - l) * c * ((l - 1.0) * t).cos() - (l + 1.0) * ((l + 1.0) * t).cos());
    let stt = l * (l + 1.0) * rl * (c * ((l - 1.0) * t).cos() + ((l + 1.0) * t).cos());
    let srt = l * rl * ((l - 1.0) * c * ((l - 1.0) * t).sin() + (l + 1.0) * ((l + 1.0) * t).sin());
    let (cs, sn) = (tg.cos(), tg.sin());
    let sxx = srr * cs * cs + stt * sn * sn - 2.0 * srt * sn * cs;
    let syy = srr * sn * sn + stt * cs * cs + 2.0 * srt * sn * cs;
    let sxy = (srr - stt) * sn * cs + srt * (cs * cs - sn * sn);
    [sxx, syy, NU * (sxx + syy), sxy, 0.0, 0.0]
}

/// Exact displacement of the Williams field, plane strain (kappa = 3 - 4 nu).
pub fn williams_displacement(x: f64, y: f64) -> [f64; 3] {
    let l = WILLIAMS_LAMBDA_270;
    let c = coefficient();
    let mu = E / (2.0 * (1.0 + NU));
    let kappa = 3.0 - 4.0 * NU;
    let r = (x * x + y * y).sqrt();
    let (tg, t) = angles(x, y);
    let f = r.powf(l) / (2.0 * mu);
    let ur = f * (-(l + 1.0) * ((l + 1.0) * t).cos() + (kappa - l) * c * ((l - 1.0) * t).cos());
    let ut = f * ((l + 1.0) * ((l + 1.0) * t).sin() + (kappa + l) * c * ((l - 1.0) * t).sin());
    [
        ur * tg.cos() - ut * tg.sin(),
        ur * tg.sin() + ut * tg.cos(),
        0.0,
    ]
}

/// The L-shape with `n` cells per unit length (three n x n blocks).
pub fn l_shape(kind: ElementKind, n: usize) -> Problem {
    l_shape_on(meshes::l_shape(kind, 1.0, n))
}

/// Grading exponent of [`l_shape_graded`]: element sizes grow like r^(1 - 1/2) from the corner.
/// 2 is the smallest integer above p / lambda = 1.84 for linear elements, the condition under
/// which a radical mesh restores the optimal convergence rate at a corner singularity (Babuska,
/// Kellogg & Pitkaranta 1979, Numer. Math. 33; condition from memory). Stronger grading makes
/// neighbouring sizes differ by large factors at the corner, which hurts any recovery.
pub const L_SHAPE_GRADING: f64 = 2.0;

/// The L-shape on a mesh of `n` cells per unit length graded toward the corner
/// ([`meshes::l_shape_graded`] with [`L_SHAPE_GRADING`]): the mesh an analyst draws around a
/// singular corner, on which the corner elements no longer hold a fixed share of the error.
pub fn l_shape_graded(kind: ElementKind, n: usize) -> Problem {
    let mut problem = l_shape_on(meshes::l_shape_graded(kind, 1.0, n, L_SHAPE_GRADING));
    problem.name = "L-shape graded";
    // A radical mesh of exponent gamma converges like h^min(p, gamma lambda) (from memory, same
    // source); measured on these meshes: tri3 0.90, tri6 1.12 against 1 and 1.09.
    problem.rate_exponent = (L_SHAPE_GRADING * WILLIAMS_LAMBDA_270).min(kind.order() as f64);
    problem
}

/// The L-shape outline for the mesher, counter-clockwise from the re-entrant corner (0, 0):
/// the same region as the mapped mesh, `(-1,1)^2` minus the quadrant `x > 0, y < 0`. The left
/// edge is split at (-1, 0) so that every mesh of the domain has a node where [`l_shape_on`]
/// holds `u_y`.
pub fn l_shape_domain() -> Domain {
    let corners = [
        [1.0, 0.0],
        [1.0, 1.0],
        [-1.0, 1.0],
        [-1.0, 0.0],
        [-1.0, -1.0],
        [0.0, -1.0],
        [0.0, 0.0],
    ];
    Domain {
        outer: Loop {
            start: [0.0, 0.0],
            segments: corners.iter().map(|&to| Segment::Line { to }).collect(),
        },
        holes: Vec::new(),
    }
}

/// The L-shape problem on any mesh of [`l_shape_domain`] (one 2D kind): exact tractions on the
/// four outer edges, `u = 0` at the corner and `u_y` exact at (-1, 0). The mesh must have nodes
/// at (0, 0) and (-1, 0); without them the rigid modes stay free and the solve reports it.
pub fn l_shape_on(mesh: Mesh) -> Problem {
    let kind = first_kind(&mesh);
    let exact_stress: ExactStress = Arc::new(|p| williams_stress(p[0], p[1]));
    let tol = ON_BOUNDARY;
    let mut constraints = Vec::new();
    for node in select_nodes(&mesh, |p| p[0].abs() < tol && p[1].abs() < tol) {
        constraints.push(Constraint {
            node,
            component: 0,
            value: 0.0,
        });
        constraints.push(Constraint {
            node,
            component: 1,
            value: 0.0,
        });
    }
    for node in select_nodes(&mesh, |p| (p[0] + 1.0).abs() < tol && p[1].abs() < tol) {
        let u = williams_displacement(-1.0, 0.0);
        constraints.push(Constraint {
            node,
            component: 1,
            value: u[1],
        });
    }
    let on = |f: &[[f64; 3]], test: &dyn Fn([f64; 3]) -> bool| f.iter().all(|p| test(*p));
    let tractions = vec![
        exact_traction(&mesh, &exact_stress, |f| {
            on(f, &|p| (p[0] + 1.0).abs() < tol)
        }),
        exact_traction(&mesh, &exact_stress, |f| {
            on(f, &|p| (p[1] - 1.0).abs() < tol)
        }),
        exact_traction(&mesh, &exact_stress, |f| {
            on(f, &|p| (p[0] - 1.0).abs() < tol && p[1] > -tol)
        }),
        exact_traction(&mesh, &exact_stress, |f| {
            on(f, &|p| (p[1] + 1.0).abs() < tol && p[0] < tol)
        }),
    ];
    Problem {
        name: "L-shape",
        source: "Williams 1952",
        materials: MaterialMap::Single(Material {
            youngs: E,
            poisson: NU,
        }),
        mode: AnalysisMode::PlaneStrain,
        bc: BoundaryConditions {
            constraints,
            tractions,
            ..Default::default()
        },
        exact_stress,
        exact_displacement: Arc::new(|p| williams_displacement(p[0], p[1])),
        rate_exponent: WILLIAMS_LAMBDA_270.min(kind.map_or(1, ElementKind::order) as f64),
        mesh,
    }
}
