//! The exact fields against the check values of the method sheet (section 5, values marked
//! \[V\] there: verified by independent computation) and against their own equations.

use super::cantilever::{D, E, L, NU, P};
use super::kirsch::{kirsch_displacement, kirsch_stress};
use super::l_shape::{williams_displacement, williams_stress};
use super::lame::lame_radial_displacement;
use super::*;
use crate::element::ElementKind;

fn close(a: f64, b: f64, rel: f64) -> bool {
    (a - b).abs() <= rel * b.abs().max(1e-300)
}

/// Williams 270 degree mode-I point values, plane strain, E = 1, nu = 0.3 (method sheet 5.5
/// \[V\]); the check values carry 12 digits, so 1e-9 relative.
#[test]
fn williams_field_matches_check_values() {
    let u = williams_displacement(-0.5, 0.5);
    assert!(
        close(u[0], -0.584097528158, 1e-9) && close(u[1], 0.584097528158, 1e-9),
        "{u:?}"
    );
    let s = williams_stress(-0.5, 0.5);
    assert!(
        close(s[0], 2.34810040576, 1e-9) && close(s[1], 2.34810040576, 1e-9),
        "{s:?}"
    );
    assert!(close(s[3], 0.449960770339, 1e-9), "{s:?}");
    let u = williams_displacement(0.5, 0.5);
    assert!(
        close(u[0], 0.830988278153, 1e-9) && close(u[1], 3.59983679595, 1e-9),
        "{u:?}"
    );
    let s = williams_stress(0.5, 0.5);
    assert!(
        close(s[0], 2.76907836402, 1e-9)
            && close(s[1], 0.775379531527, 1e-9)
            && close(s[3], 1.14688703118, 1e-9)
    );
    let s = williams_stress(1.0, 1.0);
    assert!(
        close(s[0], 2.01934808821, 1e-9)
            && close(s[1], 0.565444876885, 1e-9)
            && close(s[3], 0.836366411258, 1e-9)
    );
    // lambda solves the mode-I equation sin(lambda alpha) + lambda sin(alpha) = 0 at alpha =
    // 3 pi / 2 (Williams 1952; method sheet 4.1).
    let l = WILLIAMS_LAMBDA_270;
    assert!(((1.5 * std::f64::consts::PI * l).sin() - l).abs() < 1e-14);
    // The re-entrant faces are traction-free: sigma . n = 0 on y = 0 (x > 0): sxy = syy = 0.
    let s = williams_stress(0.3, 0.0);
    assert!(s[1].abs() < 1e-12 && s[3].abs() < 1e-12, "{s:?}");
}

/// Kirsch: ux(a, 0) = 3 S a / E = 3.0, uy(0, a) = -1.0, ux(5, 0) = 5.5248 (method sheet 5.1
/// \[V\], plane stress, E = 1, nu = 0.3) and the peak sigma_xx(0, a) = 3 S (Kirsch 1898).
#[test]
fn kirsch_field_matches_check_values() {
    assert!(close(kirsch_displacement(1.0, 0.0)[0], 3.0, 1e-12));
    assert!(close(kirsch_displacement(0.0, 1.0)[1], -1.0, 1e-12));
    // 5.5248 is printed to 5 digits.
    assert!(close(kirsch_displacement(5.0, 0.0)[0], 5.5248, 1e-4));
    assert!(close(kirsch_stress(0.0, 1.0)[0], 3.0, 1e-12));
    assert!(close(kirsch_stress(1.0, 0.0)[1], -1.0, 1e-12));
    // Far field: uniaxial S along x.
    let far = kirsch_stress(1e4, 3e3);
    assert!(close(far[0], 1.0, 1e-6) && far[1].abs() < 1e-6 && far[3].abs() < 1e-6);
}

/// Lame, plane strain, a = 1, b = 2, p = 1, E = 1, nu = 0.3: u_r(a) = 1.9066667,
/// u_r(b) = 1.2133333 (method sheet 5.4 \[V\], 8 digits).
#[test]
fn lame_matches_check_values() {
    assert!(close(lame_radial_displacement(1.0), 1.9066667, 1e-7));
    assert!(close(lame_radial_displacement(2.0), 1.2133333, 1e-7));
}

/// Cantilever tip deflection -(P L^3/(3EI)) - (4 + 5 nu) P D^2 L / (24 E I) = -0.0089 for the
/// standard parameters (method sheet 5.3 \[V\], printed to 2 digits).
#[test]
fn cantilever_tip_deflection() {
    let problem = cantilever(ElementKind::Quad8, 1);
    let tip = (problem.exact_displacement)([L, 0.0, 0.0])[1];
    let i = D * D * D / 12.0;
    let formula =
        -(P * L.powi(3) / (3.0 * E * i)) - (4.0 + 5.0 * NU) * P * D * D * L / (24.0 * E * i);
    assert!(close(tip, formula, 1e-12));
    assert!(close(tip, -0.0089, 0.01), "{tip}");
}

/// Every exact stress is in equilibrium with its problem's body force (zero where there is
/// none): div sigma + f = 0 by central differences (step 1e-5 of the size; truncation error
/// O(h^2) relative, so 1e-6 of the stress gradient scale).
#[test]
fn exact_fields_are_in_equilibrium() {
    let problems = [
        (cantilever(ElementKind::Quad4, 1), [20.0, 3.0, 0.0], 48.0),
        (kirsch(ElementKind::Quad4, 1), [2.0, 1.5, 0.0], 5.0),
        (l_shape(ElementKind::Quad4, 1), [-0.4, 0.6, 0.0], 1.0),
        (
            lame_plane_strain(ElementKind::Quad4, 1),
            [1.2, 0.7, 0.0],
            2.0,
        ),
        (manufactured_box(ElementKind::Hex8, 1), [0.3, 0.6, 0.8], 1.0),
    ];
    for (problem, x, size) in problems {
        let h = 1e-5 * size;
        let dim = problem.mode.dimension();
        let d = |c: usize, axis: usize| {
            let mut a = x;
            let mut b = x;
            a[axis] += h;
            b[axis] -= h;
            ((problem.exact_stress)(a)[c] - (problem.exact_stress)(b)[c]) / (2.0 * h)
        };
        // Rows of sigma: (xx, xy, xz), (xy, yy, yz), (xz, yz, zz).
        let rows = [[0, 3, 5], [3, 1, 4], [5, 4, 2]];
        let f = problem.bc.body_force.as_ref().map_or([0.0; 3], |f| f(x));
        let scale = (0..6)
            .map(|c| (problem.exact_stress)(x)[c].abs())
            .fold(0.0, f64::max)
            / size;
        for i in 0..dim {
            let div: f64 = (0..dim).map(|j| d(rows[i][j], j)).sum();
            assert!(
                (div + f[i]).abs() <= 1e-6 * scale.max(1e-12),
                "{}: row {i}: {div} + {}",
                problem.name,
                f[i]
            );
        }
    }
}

/// Every exact stress is Hooke's law applied to the strain of its exact displacement
/// (central differences, step 1e-6 of the size; O(h^2) truncation, so 1e-6 of the stress
/// scale). Axisymmetric strain includes the hoop term u_r / r.
#[test]
fn exact_stress_is_the_stress_of_the_exact_displacement() {
    use crate::material::{Elasticity, MaterialMap};
    let problems = [
        (cantilever(ElementKind::Quad4, 1), [20.0, 3.0, 0.0], 48.0),
        (kirsch(ElementKind::Quad4, 1), [2.0, 1.5, 0.0], 5.0),
        (l_shape(ElementKind::Quad4, 1), [-0.4, 0.6, 0.0], 1.0),
        (
            lame_plane_strain(ElementKind::Quad4, 1),
            [1.2, 0.7, 0.0],
            2.0,
        ),
        (
            lame_axisymmetric(ElementKind::Quad4, 1),
            [1.3, 0.2, 0.0],
            2.0,
        ),
        (lame_solid(ElementKind::Hex8, 1), [1.2, 0.7, 0.3], 2.0),
        (manufactured_box(ElementKind::Hex8, 1), [0.3, 0.7, 0.6], 1.0),
    ];
    for (problem, x, size) in problems {
        let MaterialMap::Single(material) = problem.materials else {
            panic!("single material")
        };
        let el = Elasticity::new(material, problem.mode);
        let h = 1e-6 * size;
        let g = |i: usize, j: usize| {
            let (mut a, mut b) = (x, x);
            a[j] += h;
            b[j] -= h;
            ((problem.exact_displacement)(a)[i] - (problem.exact_displacement)(b)[i]) / (2.0 * h)
        };
        let u = (problem.exact_displacement)(x);
        let strain = match problem.mode {
            AnalysisMode::Solid3d => [
                g(0, 0),
                g(1, 1),
                g(2, 2),
                g(0, 1) + g(1, 0),
                g(1, 2) + g(2, 1),
                g(0, 2) + g(2, 0),
            ],
            AnalysisMode::Axisymmetric => {
                [g(0, 0), g(1, 1), u[0] / x[0], g(0, 1) + g(1, 0), 0.0, 0.0]
            }
            _ => [g(0, 0), g(1, 1), 0.0, g(0, 1) + g(1, 0), 0.0, 0.0],
        };
        let from_u = el.stress(&strain);
        let exact = (problem.exact_stress)(x);
        let scale = exact.iter().fold(0.0f64, |m, v| m.max(v.abs()));
        // Plane stress and plane strain: sigma_zz is not part of D's plane-stress rows.
        let comps: &[usize] = match problem.mode {
            AnalysisMode::PlaneStress { .. } => &[0, 1, 3],
            AnalysisMode::PlaneStrain => &[0, 1, 2, 3],
            _ => &[0, 1, 2, 3, 4, 5],
        };
        for &c in comps {
            assert!(
                (from_u[c] - exact[c]).abs() <= 1e-6 * scale,
                "{}: component {c}: {} vs {}",
                problem.name,
                from_u[c],
                exact[c]
            );
        }
    }
}
