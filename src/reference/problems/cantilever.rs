//! Cantilever with a parabolic end shear, plane stress.
//!
//! Source: Timoshenko & Goodier (1970), Theory of Elasticity, 3rd ed., sec. 21 (section number
//! from memory); the same form and parameters in Augarde & Deeks (2008), "The use of
//! Timoshenko's exact solution for a cantilever beam in adaptive analysis", Finite Elem. Anal.
//! Des. 44:595-601. Method sheet 5.3 (formulas checked there).
//!
//! ```text
//!   y ^      exact displacements          traction: parabolic shear, resultant P downward
//!     |  +---------------------------------------+
//!  D  |=>|                                       |<= sxy(L, y)
//!     |  +---------------------------------------+--> x
//!        0                                       L
//! ```
//! 0 <= x <= L, -D/2 <= y <= D/2, unit thickness, I = D^3/12:
//! ux = P y / (6 E I) [(6L - 3x) x + (2 + nu)(y^2 - D^2/4)],
//! uy = -P / (6 E I) [3 nu y^2 (L - x) + (4 + 5 nu) D^2 x / 4 + (3L - x) x^2],
//! sxx = P (L - x) y / I, syy = 0, sxy = -P / (2I) (D^2/4 - y^2).
//! Supports: the exact displacement at every node of x = 0; load: the exact traction at x = L.

use super::{exact_traction, Problem, ON_BOUNDARY};
use crate::element::ElementKind;
use crate::material::{AnalysisMode, Material, MaterialMap};
use crate::mesh::generate::{map_points, structured};
use crate::reference::solver::{select_nodes, BoundaryConditions, Constraint};
use std::sync::Arc;

/// Load P (downward resultant), length L, depth D, E, nu: the standard parameters
/// (method sheet 5.3; tip deflection -0.0089 there).
pub const P: f64 = 1000.0;
/// Beam length.
pub const L: f64 = 48.0;
/// Beam depth.
pub const D: f64 = 12.0;
/// Young's modulus.
pub const E: f64 = 3.0e7;
/// Poisson's ratio.
pub const NU: f64 = 0.3;

/// The cantilever meshed with `4 n x n` cells of `kind` (a 2D kind).
pub fn cantilever(kind: ElementKind, n: usize) -> Problem {
    let mut mesh = structured(kind, [4 * n, n, 1], [L, D, 1.0]);
    map_points(&mut mesh, |p| [p[0], p[1] - D / 2.0, 0.0]);
    let i = D * D * D / 12.0;
    let exact_displacement = Arc::new(move |p: [f64; 3]| {
        let (x, y) = (p[0], p[1]);
        [
            P * y / (6.0 * E * i) * ((6.0 * L - 3.0 * x) * x + (2.0 + NU) * (y * y - D * D / 4.0)),
            -P / (6.0 * E * i)
                * (3.0 * NU * y * y * (L - x)
                    + (4.0 + 5.0 * NU) * D * D * x / 4.0
                    + (3.0 * L - x) * x * x),
            0.0,
        ]
    });
    let exact_stress: super::ExactStress = Arc::new(move |p: [f64; 3]| {
        let (x, y) = (p[0], p[1]);
        [
            P * (L - x) * y / i,
            0.0,
            0.0,
            -P / (2.0 * i) * (D * D / 4.0 - y * y),
            0.0,
            0.0,
        ]
    });
    let tol = ON_BOUNDARY * L;
    let mut constraints = Vec::new();
    for node in select_nodes(&mesh, |p| p[0].abs() < tol) {
        let u = exact_displacement(mesh.points[node as usize]);
        constraints.push(Constraint {
            node,
            component: 0,
            value: u[0],
        });
        constraints.push(Constraint {
            node,
            component: 1,
            value: u[1],
        });
    }
    let tractions = vec![exact_traction(&mesh, &exact_stress, |f| {
        f.iter().all(|p| (p[0] - L).abs() < tol)
    })];
    Problem {
        name: "cantilever",
        source: "Timoshenko & Goodier 1970, sec. 21",
        materials: MaterialMap::Single(Material {
            youngs: E,
            poisson: NU,
        }),
        mode: AnalysisMode::PlaneStress { thickness: 1.0 },
        bc: BoundaryConditions {
            constraints,
            tractions,
            ..Default::default()
        },
        exact_stress,
        exact_displacement,
        rate_exponent: kind.order() as f64,
        mesh,
    }
}
