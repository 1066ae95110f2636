//! Thick-walled cylinder under internal pressure (Lame), in plane strain, axisymmetric and 3D.
//!
//! Source: Lame's solution, e.g. Timoshenko & Goodier (1970), Theory of Elasticity, sec. 33
//! (section number from memory); formulas and check values in the method sheet 5.4. With
//! A = p a^2 / (b^2 - a^2): sigma_r = A (1 - b^2/r^2), sigma_t = A (1 + b^2/r^2), and with the
//! axial strain held at zero sigma_z = 2 nu A, u_r = (1 + nu) A / E ((1 - 2 nu) r + b^2 / r).
//!
//! ```text
//!  plane strain / 3D: quarter ring a <= r <= b      axisymmetric: r in [a, b], z in [0, h]
//!    y ^                                              z ^
//!    b +._                                            h +-------+
//!      |   '.        u_x = 0 on x = 0                  p|=>     |   u_z = 0 on z = 0 and z = h
//!    a +.    \       u_y = 0 on y = 0                  p|=>     |
//!      | \    |      (3D: u_z = 0 on both ends)       0 +-------+--> r
//!      +--+---+-->x                                       a       b
//!         a   b
//! ```

use super::{exact_traction, ExactStress, Problem, ON_BOUNDARY};
use crate::element::ElementKind;
use crate::material::{AnalysisMode, Material, MaterialMap};
use crate::mesh::generate::{map_points, structured};
use crate::reference::meshes::quarter_annulus;
use crate::reference::solver::{fix_component, BoundaryConditions, Constraint};
use std::sync::Arc;

/// Inner radius, outer radius, pressure, E, nu (method sheet 5.4 check values).
pub const A_IN: f64 = 1.0;
/// Outer radius.
pub const B_OUT: f64 = 2.0;
/// Internal pressure.
pub const PRESSURE: f64 = 1.0;
const E: f64 = 1.0;
const NU: f64 = 0.3;
/// Axial length of the axisymmetric and 3D models.
const LENGTH: f64 = 0.5;

fn coefficient() -> f64 {
    PRESSURE * A_IN * A_IN / (B_OUT * B_OUT - A_IN * A_IN)
}

/// Radial displacement with zero axial strain (method sheet 5.4, plane strain).
pub fn lame_radial_displacement(r: f64) -> f64 {
    (1.0 + NU) * coefficient() / E * ((1.0 - 2.0 * NU) * r + B_OUT * B_OUT / r)
}

/// (sigma_r, sigma_t, sigma_z) at radius r with zero axial strain.
pub fn lame_stresses(r: f64) -> (f64, f64, f64) {
    let a = coefficient();
    let q = B_OUT * B_OUT / (r * r);
    (a * (1.0 - q), a * (1.0 + q), 2.0 * NU * a)
}

fn cartesian(p: [f64; 3]) -> [f64; 6] {
    let r = (p[0] * p[0] + p[1] * p[1]).sqrt();
    let (c, s) = (p[0] / r, p[1] / r);
    let (sr, st, sz) = lame_stresses(r);
    [
        sr * c * c + st * s * s,
        sr * s * s + st * c * c,
        sz,
        (sr - st) * s * c,
        0.0,
        0.0,
    ]
}

fn cartesian_displacement(p: [f64; 3]) -> [f64; 3] {
    let r = (p[0] * p[0] + p[1] * p[1]).sqrt();
    let u = lame_radial_displacement(r);
    [u * p[0] / r, u * p[1] / r, 0.0]
}

fn material() -> MaterialMap {
    MaterialMap::Single(Material {
        youngs: E,
        poisson: NU,
    })
}

fn inner(p: &[f64; 3]) -> bool {
    ((p[0] * p[0] + p[1] * p[1]).sqrt() - A_IN).abs() < 1e-6 * A_IN
}

/// Symmetry supports u_x = 0 on x = 0 and u_y = 0 on y = 0 (and u_z = 0 on both ends in 3D).
fn symmetry(mesh: &crate::mesh::Mesh, ends: bool) -> Vec<Constraint> {
    let tol = ON_BOUNDARY * B_OUT;
    let mut c = Vec::new();
    c.extend(fix_component(mesh, 0, |p| p[0].abs() < tol));
    c.extend(fix_component(mesh, 1, |p| p[1].abs() < tol));
    if ends {
        c.extend(fix_component(mesh, 2, |p| {
            p[2].abs() < tol || (p[2] - LENGTH).abs() < tol
        }));
    }
    c
}

/// Quarter ring in plane strain, `n` cells radially and `2n` around (a 2D kind).
pub fn lame_plane_strain(kind: ElementKind, n: usize) -> Problem {
    let mesh = quarter_annulus(kind, A_IN, B_OUT, n, 2 * n);
    let exact_stress: ExactStress = Arc::new(cartesian);
    let tractions = vec![exact_traction(&mesh, &exact_stress, |f| {
        f.iter().all(inner)
    })];
    Problem {
        name: "Lame plane strain",
        source: "Lame; Timoshenko & Goodier 1970",
        materials: material(),
        mode: AnalysisMode::PlaneStrain,
        bc: BoundaryConditions {
            constraints: symmetry(&mesh, false),
            tractions,
            ..Default::default()
        },
        exact_stress,
        exact_displacement: Arc::new(cartesian_displacement),
        rate_exponent: kind.order() as f64,
        mesh,
    }
}

/// Axisymmetric section r in [a, b], z in [0, h], `2n x n` cells (a 2D kind).
pub fn lame_axisymmetric(kind: ElementKind, n: usize) -> Problem {
    let mut mesh = structured(kind, [2 * n, n, 1], [B_OUT - A_IN, LENGTH, 1.0]);
    map_points(&mut mesh, |p| [p[0] + A_IN, p[1], 0.0]);
    let tol = ON_BOUNDARY * B_OUT;
    let mut constraints = Vec::new();
    constraints.extend(fix_component(&mesh, 1, |p| {
        p[1].abs() < tol || (p[1] - LENGTH).abs() < tol
    }));
    // (r, z, theta) in the (xx, yy, zz) slots.
    let exact_stress: ExactStress = Arc::new(|p: [f64; 3]| {
        let (sr, st, sz) = lame_stresses(p[0]);
        [sr, sz, st, 0.0, 0.0, 0.0]
    });
    let tractions = vec![exact_traction(&mesh, &exact_stress, |f| {
        f.iter().all(|p| (p[0] - A_IN).abs() < tol)
    })];
    Problem {
        name: "Lame axisymmetric",
        source: "Lame; Timoshenko & Goodier 1970",
        materials: material(),
        mode: AnalysisMode::Axisymmetric,
        bc: BoundaryConditions {
            constraints,
            tractions,
            ..Default::default()
        },
        exact_stress,
        exact_displacement: Arc::new(|p: [f64; 3]| [lame_radial_displacement(p[0]), 0.0, 0.0]),
        rate_exponent: kind.order() as f64,
        mesh,
    }
}

/// Quarter ring extruded to length h with u_z = 0 on both ends (a 3D kind): a structured box
/// (s, t, z) with `n x 2n x 1` cells mapped by x = (a + s) cos(t pi/2), y = (a + s) sin(t pi/2),
/// so every node, mid nodes included, lies on its exact circle.
pub fn lame_solid(kind: ElementKind, n: usize) -> Problem {
    let mut mesh = structured(kind, [n, 2 * n, 1.max(n / 2)], [B_OUT - A_IN, 1.0, LENGTH]);
    map_points(&mut mesh, |p| {
        let r = A_IN + p[0];
        let t = p[1] * std::f64::consts::FRAC_PI_2;
        [r * t.cos(), r * t.sin(), p[2]]
    });
    let exact_stress: ExactStress = Arc::new(cartesian);
    let tractions = vec![exact_traction(&mesh, &exact_stress, |f| {
        f.iter().all(inner)
    })];
    Problem {
        name: "Lame 3D",
        source: "Lame; Timoshenko & Goodier 1970",
        materials: material(),
        mode: AnalysisMode::Solid3d,
        bc: BoundaryConditions {
            constraints: symmetry(&mesh, true),
            tractions,
            ..Default::default()
        },
        exact_stress,
        exact_displacement: Arc::new(cartesian_displacement),
        rate_exponent: kind.order() as f64,
        mesh,
    }
}
