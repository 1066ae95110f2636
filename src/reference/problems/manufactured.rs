//! A smooth manufactured 3D field on the unit box, loaded by the body force it implies.
//!
//! u = (a x^3 y, a y^3 z, a z^3 x): cubic in one variable, so no element space of hone
//! (at most quadratic per coordinate) contains it. For an isotropic material Navier's equations
//! mu lap(u) + (lambda + mu) grad(div u) + f = 0 (e.g. Timoshenko & Goodier 1970, sec. 85,
//! common practice) give, with div u = 3a (x^2 y + y^2 z + z^2 x), the body force
//! f = -( (lambda + mu)(6a x y + 3a z^2) + 6 mu a x y,
//!        (lambda + mu)(3a x^2 + 6a y z) + 6 mu a y z,
//!        (lambda + mu)(3a y^2 + 6a z x) + 6 mu a z x ).
//! Supports: the exact displacement on x = 0; the exact traction on the other five faces.

use super::{exact_traction, ExactStress, Problem, ON_BOUNDARY};
use crate::element::ElementKind;
use crate::material::{AnalysisMode, Material, MaterialMap};
use crate::mesh::generate::structured;
use crate::reference::solver::{select_nodes, BoundaryConditions, Constraint};
use std::sync::Arc;

const AMP: f64 = 1e-3;
const E: f64 = 1.0;
const NU: f64 = 0.3;

fn lame_constants() -> (f64, f64) {
    (
        E * NU / ((1.0 + NU) * (1.0 - 2.0 * NU)),
        E / (2.0 * (1.0 + NU)),
    )
}

/// The unit box with `n` cells per direction (a 3D kind).
pub fn manufactured_box(kind: ElementKind, n: usize) -> Problem {
    let mesh = structured(kind, [n, n, n], [1.0, 1.0, 1.0]);
    let (lambda, mu) = lame_constants();
    let exact_displacement = Arc::new(|p: [f64; 3]| {
        [
            AMP * p[0].powi(3) * p[1],
            AMP * p[1].powi(3) * p[2],
            AMP * p[2].powi(3) * p[0],
        ]
    });
    let exact_stress: ExactStress = Arc::new(move |p: [f64; 3]| {
        let (x, y, z) = (p[0], p[1], p[2]);
        let e = [
            3.0 * AMP * x * x * y,
            3.0 * AMP * y * y * z,
            3.0 * AMP * z * z * x,
        ];
        let tr = e[0] + e[1] + e[2];
        [
            lambda * tr + 2.0 * mu * e[0],
            lambda * tr + 2.0 * mu * e[1],
            lambda * tr + 2.0 * mu * e[2],
            mu * AMP * x.powi(3),
            mu * AMP * y.powi(3),
            mu * AMP * z.powi(3),
        ]
    });
    let body_force = Arc::new(move |p: [f64; 3]| {
        let (x, y, z) = (p[0], p[1], p[2]);
        let lm = lambda + mu;
        [
            -(lm * (6.0 * AMP * x * y + 3.0 * AMP * z * z) + 6.0 * mu * AMP * x * y),
            -(lm * (3.0 * AMP * x * x + 6.0 * AMP * y * z) + 6.0 * mu * AMP * y * z),
            -(lm * (3.0 * AMP * y * y + 6.0 * AMP * z * x) + 6.0 * mu * AMP * z * x),
        ]
    });
    let tol = ON_BOUNDARY;
    let mut constraints = Vec::new();
    for node in select_nodes(&mesh, |p| p[0].abs() < tol) {
        let u = exact_displacement(mesh.points[node as usize]);
        for (component, value) in u.into_iter().enumerate() {
            constraints.push(Constraint {
                node,
                component,
                value,
            });
        }
    }
    let tractions = vec![exact_traction(&mesh, &exact_stress, |f| {
        let all = |test: &dyn Fn(&[f64; 3]) -> bool| f.iter().all(test);
        all(&|p| (p[0] - 1.0).abs() < tol)
            || all(&|p| p[1].abs() < tol)
            || all(&|p| (p[1] - 1.0).abs() < tol)
            || all(&|p| p[2].abs() < tol)
            || all(&|p| (p[2] - 1.0).abs() < tol)
    })];
    Problem {
        name: "manufactured box",
        source: "manufactured solution (Navier equations)",
        materials: MaterialMap::Single(Material {
            youngs: E,
            poisson: NU,
        }),
        mode: AnalysisMode::Solid3d,
        bc: BoundaryConditions {
            constraints,
            tractions,
            body_force: Some(body_force),
            ..Default::default()
        },
        exact_stress,
        exact_displacement,
        rate_exponent: kind.order() as f64,
        mesh,
    }
}
