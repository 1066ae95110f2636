//! Quadrature exactness: every rule integrates every monomial in its exactness class exactly on
//! the reference element. Exact values: for the cube, products of the 1D integrals
//! `int_{-1}^{1} x^a dx = 2/(a+1)` (a even) or 0 (a odd); for the unit d-simplex, the Dirichlet
//! formula `int r^a s^b t^c = a! b! c! / (a + b + c + d)!`; for the wedge, the triangle formula
//! times the 1D integral.

use super::super::quadrature::{spec, RuleSpec};
use super::super::{ElementKind, Rule, MAX_POINTS};
use super::assert_close;

/// Weights and points carry about 1e-16 relative error and rules have at most 27 points of
/// weights <= 8/27: 1e-14 relative to the reference measure is far above round-off.
const QUAD_TOL: f64 = 1e-14;

fn factorial(n: u32) -> f64 {
    (1..=n).map(f64::from).product()
}

/// `int_{-1}^{1} x^a dx`.
fn line_integral(a: u32) -> f64 {
    if a % 2 == 1 {
        0.0
    } else {
        2.0 / f64::from(a + 1)
    }
}

/// Dirichlet formula on the unit simplex of dimension `dim`.
fn simplex_integral(dim: u32, e: [u32; 3]) -> f64 {
    factorial(e[0]) * factorial(e[1]) * factorial(e[2]) / factorial(e[0] + e[1] + e[2] + dim)
}

/// Exponent triples the rule must integrate exactly, with the exact integral.
fn exactness_class(kind: ElementKind, rule: Rule) -> Vec<([u32; 3], f64)> {
    let dim = kind.dim();
    let mut out = Vec::new();
    let zmax = |m: u32| if dim == 3 { m } else { 0 };
    match spec(kind, rule) {
        RuleSpec::Gauss { n, .. } => {
            let m = 2 * n as u32 - 1;
            for c in 0..=zmax(m) {
                for b in 0..=m {
                    for a in 0..=m {
                        let z = if dim == 3 { line_integral(c) } else { 1.0 };
                        out.push(([a, b, c], line_integral(a) * line_integral(b) * z));
                    }
                }
            }
        }
        RuleSpec::Simplex(r) => {
            let p = r.degree as u32;
            for c in 0..=zmax(p) {
                for b in 0..=p - c {
                    for a in 0..=p - b - c {
                        out.push(([a, b, c], simplex_integral(dim as u32, [a, b, c])));
                    }
                }
            }
        }
        RuleSpec::Wedge { triangle, n } => {
            let p = triangle.degree as u32;
            for c in 0..=2 * n as u32 - 1 {
                for b in 0..=p {
                    for a in 0..=p - b {
                        out.push(([a, b, c], simplex_integral(2, [a, b, 0]) * line_integral(c)));
                    }
                }
            }
        }
    }
    out
}

#[test]
fn every_rule_integrates_its_monomials_exactly() {
    for kind in ElementKind::ALL {
        for rule in [Rule::Full, Rule::Reduced] {
            let points = kind.quadrature(rule);
            let class = exactness_class(kind, rule);
            assert!(class.len() > 1, "{kind} {rule:?}: empty exactness class");
            for (e, exact) in class {
                let q: f64 = points
                    .iter()
                    .map(|p| {
                        let [r, s, t] = p.xi;
                        p.weight * r.powi(e[0] as i32) * s.powi(e[1] as i32) * t.powi(e[2] as i32)
                    })
                    .sum();
                let what = format!("{kind} {rule:?} monomial {e:?}");
                assert_close(q, exact, QUAD_TOL, kind.reference_measure(), &what);
            }
        }
    }
}

#[test]
fn weights_are_positive_and_sum_to_reference_measure() {
    for kind in ElementKind::ALL {
        for rule in [Rule::Full, Rule::Reduced] {
            let points = kind.quadrature(rule);
            assert!(
                !points.is_empty() && points.len() <= MAX_POINTS,
                "{kind} {rule:?}"
            );
            assert!(
                points.iter().all(|p| p.weight > 0.0),
                "{kind} {rule:?}: weight <= 0"
            );
            assert!(
                points.iter().all(|p| kind.contains_natural(p.xi, 0.0)),
                "{kind} {rule:?}: point outside the element"
            );
            let sum: f64 = points.iter().map(|p| p.weight).sum();
            let m = kind.reference_measure();
            assert_close(sum, m, QUAD_TOL, m, &format!("{kind} {rule:?} weight sum"));
        }
    }
}

/// The full rule integrates the stiffness integrand of an affine element exactly, and even the
/// "mass" products `N_i N_j`: degree 2p for simplices, degree 2p + 1 per direction for tensor
/// rules (n >= p + 1 Gauss points), both parts for wedges. Checked on the rule's exactness class
/// (whose monomials are verified above), and the reduced rule is never richer than the full one.
#[test]
fn full_rule_covers_products_of_shape_functions() {
    for kind in ElementKind::ALL {
        let p = kind.order();
        let ok = match spec(kind, Rule::Full) {
            RuleSpec::Gauss { n, .. } => n > p,
            RuleSpec::Simplex(r) => r.degree >= 2 * p,
            RuleSpec::Wedge { triangle, n } => triangle.degree >= 2 * p && n > p,
        };
        assert!(ok, "{kind}: full rule too weak for degree {p}");
        assert!(kind.quadrature(Rule::Reduced).len() < kind.quadrature(Rule::Full).len());
    }
}

#[test]
fn sampling_points_are_inside_and_match_the_methods_table() {
    // Expected counts (project methods notes, sections 1.2 and 7): centroids for the linear
    // simplices and wedge6, 1 point for quad4/hex8, 2x2 (x2) Gauss for the quadratic quads and
    // hexes, the 3- and 4-point interior rules for tri6 / tet10, 3 x 2 for wedge15.
    let expected = [1, 3, 1, 4, 4, 1, 4, 1, 8, 8, 1, 6];
    for (kind, count) in ElementKind::ALL.into_iter().zip(expected) {
        let pts = kind.sampling_points();
        assert_eq!(pts.len(), count, "{kind} sampling point count");
        for &xi in pts {
            assert!(
                kind.contains_natural(xi, -1e-3),
                "{kind}: sampling point {xi:?} not inside"
            );
        }
    }
    // The tri6 points are the barycentric (2/3, 1/6, 1/6) permutations.
    for xi in ElementKind::Tri6.sampling_points() {
        let l = [1.0 - xi[0] - xi[1], xi[0], xi[1]];
        assert_eq!(
            l.iter().filter(|&&v| (v - 2.0 / 3.0).abs() < 1e-15).count(),
            1
        );
        assert_eq!(
            l.iter().filter(|&&v| (v - 1.0 / 6.0).abs() < 1e-15).count(),
            2
        );
    }
    // quad8 samples at +-1/sqrt(3) (Gauss-Legendre 2-point abscissa).
    let g = 1.0 / 3f64.sqrt();
    for xi in ElementKind::Quad8.sampling_points() {
        assert_close(xi[0].abs(), g, 1e-15, 1.0, "quad8 sampling abscissa");
        assert_close(xi[1].abs(), g, 1e-15, 1.0, "quad8 sampling abscissa");
    }
}
