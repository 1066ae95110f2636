//! Quadrature and facet geometry of the reference solver: Gauss-Legendre rules of any size,
//! product rules on every reference element, facet node order and normals, and exact errors
//! that vanish for fields the mesh represents.
// Numeric checks index several arrays in step; index loops say that more plainly.
#![allow(clippy::needless_range_loop)]

#[path = "solver_util.rs"]
mod util;

use hone::element::ElementKind;
use hone::material::{AnalysisMode, Elasticity, Material};
use hone::reference::solver::{
    exact_errors, facet_shape, gauss_legendre, reference_rule, FacetShape,
};
use util::*;

/// Integral of x^k over [-1, 1].
fn line_moment(k: usize) -> f64 {
    if k % 2 == 1 {
        0.0
    } else {
        2.0 / (k as f64 + 1.0)
    }
}

fn factorial(n: usize) -> f64 {
    (1..=n).map(|k| k as f64).product()
}

#[test]
fn gauss_legendre_matches_tabulated_rules() {
    // Abramowitz & Stegun 1964, Table 25.4 (from memory), and methods sheet section 7 [V]:
    // 2 points +-1/sqrt(3), weights 1; 3 points 0, +-sqrt(3/5), weights 8/9, 5/9.
    let (x, w) = gauss_legendre(2);
    assert_close(x[1], 0.5773502691896258, 1e-15, 1.0, "x2");
    assert_close(x[0], -x[1], 1e-16, 1.0, "symmetry");
    assert_close(w[0], 1.0, 1e-15, 1.0, "w2");
    let (x, w) = gauss_legendre(3);
    assert_eq!(x[1], 0.0);
    assert_close(x[2], 0.7745966692414834, 1e-15, 1.0, "x3");
    assert_close(w[1], 8.0 / 9.0, 1e-15, 1.0, "w3 middle");
    assert_close(w[2], 5.0 / 9.0, 1e-15, 1.0, "w3 outer");
}

#[test]
fn gauss_legendre_with_n_points_is_exact_to_degree_2n_minus_1() {
    for n in 1..=40 {
        let (x, w) = gauss_legendre(n);
        assert_eq!(x.len(), n);
        assert!(
            x.windows(2).all(|p| p[0] < p[1]),
            "n = {n}: nodes not ascending"
        );
        assert!(w.iter().all(|&v| v > 0.0), "n = {n}: non-positive weight");
        for k in 0..2 * n {
            let q: f64 = x.iter().zip(&w).map(|(x, w)| w * x.powi(k as i32)).sum();
            // |x| <= 1 and positive weights: round-off of a sum of n terms of size <= 2.
            assert_close(q, line_moment(k), 1e-13, 2.0, &format!("n = {n}, x^{k}"));
        }
        if n <= 6 {
            // Degree 2n is not integrated exactly: the rule's error term
            // 2^(2n+1) (n!)^4 / ((2n+1) ((2n)!)^2) (Abramowitz & Stegun 25.4.30) is >= 1e-4 here.
            let k = 2 * n;
            let q: f64 = x.iter().zip(&w).map(|(x, w)| w * x.powi(k as i32)).sum();
            assert!(
                (q - line_moment(k)).abs() > 1e-5,
                "n = {n}: x^{k} integrated exactly"
            );
        }
    }
}

/// Exact integral of r^a s^b t^c over the reference element of `kind` (natural coordinates).
fn element_moment(kind: ElementKind, e: [usize; 3]) -> f64 {
    use ElementKind::*;
    match kind {
        Quad4 | Quad8 | Quad9 => {
            line_moment(e[0]) * line_moment(e[1]) * if e[2] == 0 { 1.0 } else { 0.0 }
        }
        Hex8 | Hex20 | Hex27 => line_moment(e[0]) * line_moment(e[1]) * line_moment(e[2]),
        // Unit simplex: a! b! / (a + b + 2)! and a! b! c! / (a + b + c + 3)! (common practice).
        Tri3 | Tri6 => {
            factorial(e[0]) * factorial(e[1]) / factorial(e[0] + e[1] + 2)
                * if e[2] == 0 { 1.0 } else { 0.0 }
        }
        Tet4 | Tet10 => {
            factorial(e[0]) * factorial(e[1]) * factorial(e[2]) / factorial(e[0] + e[1] + e[2] + 3)
        }
        Wedge6 | Wedge15 => {
            factorial(e[0]) * factorial(e[1]) / factorial(e[0] + e[1] + 2) * line_moment(e[2])
        }
    }
}

#[test]
fn reference_rules_integrate_monomials_to_their_degree_on_every_kind() {
    use ElementKind::*;
    for kind in ElementKind::ALL {
        for n in 1..=6 {
            let rule = reference_rule(kind, n);
            let total: f64 = rule.iter().map(|p| p.1).sum();
            // Sum of at most 7^3 positive terms: round-off well below 1e-13 relative.
            assert_close(
                total,
                kind.reference_measure(),
                1e-13,
                kind.reference_measure(),
                &format!("{kind} n={n} measure"),
            );
            // Exactness: tensor rules degree 2n-1 per direction; collapsed triangle and
            // tetrahedron total degree 2n-2 (module docs); wedge: triangle part 2n-2, t 2n-1.
            let max = 2 * n;
            for a in 0..max {
                for b in 0..max {
                    for c in 0..(if kind.dim() == 3 { max } else { 1 }) {
                        let exact_expected = match kind {
                            Quad4 | Quad8 | Quad9 | Hex8 | Hex20 | Hex27 => {
                                a < 2 * n && b < 2 * n && c < 2 * n
                            }
                            Tri3 | Tri6 => a + b <= 2 * n - 2,
                            Tet4 | Tet10 => a + b + c + 2 <= 2 * n,
                            Wedge6 | Wedge15 => a + b <= 2 * n - 2 && c < 2 * n,
                        };
                        if !exact_expected {
                            continue;
                        }
                        let q: f64 = rule
                            .iter()
                            .map(|(x, w)| {
                                w * x[0].powi(a as i32) * x[1].powi(b as i32) * x[2].powi(c as i32)
                            })
                            .sum();
                        let exact = element_moment(kind, [a, b, c]);
                        assert_close(
                            q,
                            exact,
                            1e-13,
                            kind.reference_measure(),
                            &format!("{kind} n={n} r^{a} s^{b} t^{c}"),
                        );
                    }
                }
            }
        }
    }
}

#[test]
fn facet_nodes_are_in_the_vtk_order_of_the_facet_kind_and_normals_point_out() {
    for kind in ElementKind::ALL {
        let reference = kind.reference_nodes();
        let nv = kind.vertex_count();
        let mut centroid = [0.0; 3];
        for p in &reference[..nv] {
            for c in 0..3 {
                centroid[c] += p[c] / nv as f64;
            }
        }
        for (f, facet) in kind.facets().iter().enumerate() {
            let shape = facet_shape(kind, f).expect("every facet has a shape");
            assert_eq!(shape.node_count(), facet.nodes.len(), "{kind} facet {f}");
            // The facet's corners with the facet kind's linear functions must place every facet
            // node where the element has it (the facet is flat in the reference element).
            let corner_shape = match shape {
                FacetShape::Line2 | FacetShape::Line3 => FacetShape::Line2,
                FacetShape::Face(k) if k.vertex_count() == 3 => FacetShape::Face(ElementKind::Tri3),
                FacetShape::Face(_) => FacetShape::Face(ElementKind::Quad4),
            };
            let nc = corner_shape.node_count();
            assert_eq!(
                &facet.nodes[..nc],
                facet.corners,
                "{kind} facet {f}: corners first"
            );
            let mut n = [0.0; 9];
            let mut dn = [[0.0; 3]; 9];
            for (j, xi) in shape.reference_nodes().iter().enumerate() {
                corner_shape.evaluate(*xi, &mut n[..nc], &mut dn[..nc]);
                for c in 0..3 {
                    let placed: f64 = (0..nc).map(|i| n[i] * reference[facet.corners[i]][c]).sum();
                    let actual = reference[facet.nodes[j]][c];
                    assert_close(
                        placed,
                        actual,
                        1e-14,
                        1.0,
                        &format!("{kind} facet {f} node {j} coord {c}"),
                    );
                }
            }
            // Outward normal at the facet centre, as the traction code computes it.
            let xi = if nc == 3 {
                [1.0 / 3.0, 1.0 / 3.0, 0.0]
            } else {
                [0.0; 3]
            };
            let m = shape.node_count();
            shape.evaluate(xi, &mut n[..m], &mut dn[..m]);
            let mut x = [0.0; 3];
            let mut t1 = [0.0; 3];
            let mut t2 = [0.0; 3];
            for i in 0..m {
                for c in 0..3 {
                    let p = reference[facet.nodes[i]][c];
                    x[c] += n[i] * p;
                    t1[c] += dn[i][0] * p;
                    t2[c] += dn[i][1] * p;
                }
            }
            let normal = if kind.dim() == 2 {
                [t1[1], -t1[0], 0.0]
            } else {
                [
                    t1[1] * t2[2] - t1[2] * t2[1],
                    t1[2] * t2[0] - t1[0] * t2[2],
                    t1[0] * t2[1] - t1[1] * t2[0],
                ]
            };
            let outward: f64 = (0..3).map(|c| normal[c] * (x[c] - centroid[c])).sum();
            assert!(outward > 0.0, "{kind} facet {f}: normal points inward");
        }
    }
}

#[test]
fn exact_errors_vanish_for_linear_fields_and_equal_the_energy_for_a_zero_field() {
    let material = Material::new(210.0, 0.3, "").unwrap();
    let materials = single(210.0, 0.3);
    let cases: Vec<(ElementKind, AnalysisMode)> = KINDS_2D
        .iter()
        .flat_map(|&k| modes_2d().map(|m| (k, m)))
        .chain(KINDS_3D.iter().map(|&k| (k, AnalysisMode::Solid3d)))
        .collect();
    for (kind, mode) in cases {
        let three = kind.dim() == 3;
        let origin = [0.5, 0.25, 0.0];
        let size = [2.0, 1.5, if three { 1.0 } else { 0.0 }];
        let mut mesh = block(kind, 2, origin, size);
        distort(&mut mesh, origin, size);
        let axisymmetric = mode == AnalysisMode::Axisymmetric;
        // Linear fields and their constant strains (engineering shear).
        let (field, strain): (Field, [f64; 6]) = if axisymmetric {
            (
                Box::new(|p: [f64; 3]| [2e-3 * p[0], 1.5e-3 * p[1], 0.0]),
                [2e-3, 1.5e-3, 2e-3, 0.0, 0.0, 0.0],
            )
        } else if three {
            (
                Box::new(|p: [f64; 3]| {
                    [
                        1e-3 * (p[0] + 0.5 * p[1]),
                        1e-3 * (0.3 * p[0] - p[1] + 0.2 * p[2]),
                        1e-3 * 0.7 * p[2],
                    ]
                }),
                [1e-3, -1e-3, 0.7e-3, 0.8e-3, 0.2e-3, 0.0],
            )
        } else {
            (
                Box::new(|p: [f64; 3]| {
                    [1e-3 * (p[0] + 0.5 * p[1]), 1e-3 * (0.3 * p[0] - p[1]), 0.0]
                }),
                [1e-3, -1e-3, 0.0, 0.8e-3, 0.0, 0.0],
            )
        };
        let stress = Elasticity::new(material, mode).stress(&strain);
        let u: Vec<[f64; 3]> = mesh.points.iter().map(|&p| field(p)).collect();
        let exact = move |_: [f64; 3]| stress;
        let errors = exact_errors(&mesh, &u, &materials, mode, &exact, 4);
        assert_eq!(errors.element_error_sq.len(), mesh.element_count());
        assert!(errors.exact_energy_sq > 0.0);
        // The FE stress equals the exact one up to round-off in the gradients (1e-16 relative),
        // so the squared error is at most about 1e-30 of the energy; 1e-24 leaves margin.
        assert!(
            errors.error_sq <= 1e-24 * errors.exact_energy_sq,
            "{kind} {}: error {:e} for energy {:e}",
            mode.name(),
            errors.error_sq,
            errors.exact_energy_sq
        );
        let zero = vec![[0.0; 3]; mesh.node_count()];
        let against_zero = exact_errors(&mesh, &zero, &materials, mode, &exact, 4);
        // With u_h = 0 the error is the exact field itself (same sum, same order).
        assert_close(
            against_zero.error_sq,
            against_zero.exact_energy_sq,
            1e-15,
            errors.exact_energy_sq,
            "zero field",
        );
        assert_close(
            against_zero.exact_energy_sq,
            errors.exact_energy_sq,
            1e-15,
            errors.exact_energy_sq,
            "same energy",
        );
    }
}
