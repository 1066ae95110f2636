//! Quarter plate with a circular hole under uniaxial tension, the exact infinite-plate field
//! applied as tractions on the outer edges so that it holds in the finite model.
//!
//! Source: Kirsch (1898), Zeitschrift des VDI 42:797-807 (citation from memory); Cartesian
//! stresses and displacements as restated and checked in the method sheet 5.1.
//!
//! ```text
//!  y ^
//!  l +-----------------+      exact tractions on x = l and y = l
//!    |                 |      u_x = 0 on x = 0, u_y = 0 on y = 0 (symmetry)
//!    |                 |      hole r = a traction-free
//!  a +._               |
//!    |  '.             |
//!    +----+------------+--> x   (remote tension S along x)
//!         a            l
//! ```
//! Peak: sigma_xx(0, a) = 3 S (Kt = 3).

use super::{exact_traction, first_kind, ExactStress, Problem, ON_BOUNDARY};
use crate::element::ElementKind;
use crate::material::{AnalysisMode, Material, MaterialMap};
use crate::mesh::Mesh;
use crate::reference::meshes::{plate_with_hole, Domain, Loop, Segment};
use crate::reference::solver::{fix_component, BoundaryConditions};
use std::sync::Arc;

/// Hole radius, plate half-width, remote stress, E, nu (method sheet 5.1 check values use these).
pub const A: f64 = 1.0;
/// Quarter-plate size.
pub const L: f64 = 5.0;
/// Remote tension.
pub const S: f64 = 1.0;
const E: f64 = 1.0;
const NU: f64 = 0.3;

/// Exact Kirsch stress at (x, y), Cartesian components (method sheet 5.1).
pub fn kirsch_stress(x: f64, y: f64) -> [f64; 6] {
    let r2 = x * x + y * y;
    let t = y.atan2(x);
    let (a2, a4) = (A * A / r2, A.powi(4) / (r2 * r2));
    let (c2, c4, s2, s4) = (
        (2.0 * t).cos(),
        (4.0 * t).cos(),
        (2.0 * t).sin(),
        (4.0 * t).sin(),
    );
    [
        S * (1.0 - a2 * (1.5 * c2 + c4) + 1.5 * a4 * c4),
        S * (-a2 * (0.5 * c2 - c4) - 1.5 * a4 * c4),
        0.0,
        S * (-a2 * (0.5 * s2 + s4) + 1.5 * a4 * s4),
        0.0,
        0.0,
    ]
}

/// Exact Kirsch displacement, plane stress (kappa = (3 - nu)/(1 + nu)).
pub fn kirsch_displacement(x: f64, y: f64) -> [f64; 3] {
    let r = (x * x + y * y).sqrt();
    let t = y.atan2(x);
    let mu = E / (2.0 * (1.0 + NU));
    let kappa = (3.0 - NU) / (1.0 + NU);
    let f = S * A / (8.0 * mu);
    let (ar, ar3) = (A / r, (A / r).powi(3));
    [
        f * ((r / A) * (kappa + 1.0) * t.cos()
            + 2.0 * ar * ((1.0 + kappa) * t.cos() + (3.0 * t).cos())
            - 2.0 * ar3 * (3.0 * t).cos()),
        f * ((r / A) * (kappa - 3.0) * t.sin()
            + 2.0 * ar * ((1.0 - kappa) * t.sin() + (3.0 * t).sin())
            - 2.0 * ar3 * (3.0 * t).sin()),
        0.0,
    ]
}

/// Radial growth of neighbouring cells away from the hole: the stress decays like (a/r)^2 and
/// (a/r)^4, so cells near the hole are made smaller (common practice for this benchmark).
pub const GRADING: f64 = 1.15;

/// The quarter plate meshed with `2n` cells radially (graded) and `n` along each half of the
/// hole.
pub fn kirsch(kind: ElementKind, n: usize) -> Problem {
    let ratio = GRADING.powf(8.0 / (2 * n) as f64);
    kirsch_on(plate_with_hole(kind, A, L, 2 * n, n, ratio))
}

/// The quarter plate `[0, L]^2` minus the quarter disc `r < A` for the mesher, the region of
/// [`plate_with_hole`] with the constants of this problem: counter-clockwise from (A, 0) along
/// the symmetry line `y = 0`, the outer edges, the symmetry line `x = 0` and the hole's arc
/// (clockwise about the origin).
pub fn kirsch_domain() -> Domain {
    Domain {
        outer: Loop {
            start: [A, 0.0],
            segments: vec![
                Segment::Line { to: [L, 0.0] },
                Segment::Line { to: [L, L] },
                Segment::Line { to: [0.0, L] },
                Segment::Line { to: [0.0, A] },
                Segment::Arc {
                    center: [0.0, 0.0],
                    to: [A, 0.0],
                    counter_clockwise: false,
                },
            ],
        },
        holes: Vec::new(),
    }
}

/// The Kirsch problem on any mesh of [`kirsch_domain`] (one 2D kind): symmetry supports on the
/// axes, the exact traction on `x = L` and `y = L`, the hole free.
pub fn kirsch_on(mesh: Mesh) -> Problem {
    let kind = first_kind(&mesh);
    let exact_stress: ExactStress = Arc::new(|p| kirsch_stress(p[0], p[1]));
    let tol = ON_BOUNDARY * L;
    let mut constraints = Vec::new();
    constraints.extend(fix_component(&mesh, 0, |p| p[0].abs() < tol));
    constraints.extend(fix_component(&mesh, 1, |p| p[1].abs() < tol));
    let tractions = vec![
        exact_traction(&mesh, &exact_stress, |f| {
            f.iter().all(|p| (p[0] - L).abs() < tol)
        }),
        exact_traction(&mesh, &exact_stress, |f| {
            f.iter().all(|p| (p[1] - L).abs() < tol)
        }),
    ];
    Problem {
        name: "plate with hole",
        source: "Kirsch 1898",
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
        exact_displacement: Arc::new(|p| kirsch_displacement(p[0], p[1])),
        rate_exponent: kind.map_or(1, ElementKind::order) as f64,
        mesh,
    }
}
