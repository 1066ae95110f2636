use super::*;
use crate::element::tests::{assert_close, Rng};
use crate::mesh::generate::{map_points, structured};
use crate::reference::meshes::l_shape;

/// Structured meshes of several kinds; the quadratic ones and some linear ones bent by a smooth
/// map so that elements are distorted and quadratic edges curved.
fn meshes() -> Vec<(ElementKind, Mesh)> {
    use ElementKind::*;
    let mut out = Vec::new();
    for (kind, bent) in [
        (Tri3, false),
        (Tri6, true),
        (Quad4, true),
        (Quad8, true),
        (Quad9, false),
        (Tet4, false),
        (Tet10, true),
        (Hex8, true),
        (Hex20, true),
        (Wedge6, false),
        (Wedge15, true),
    ] {
        let n = if kind.dim() == 2 { 5 } else { 3 };
        let mut mesh = structured(kind, [n, n, n], [2.0, 1.0, 1.5]);
        if bent {
            let dim = kind.dim();
            map_points(&mut mesh, |p| {
                let bump = (p[0] * 1.3).sin() * (p[1] * 2.0).cos();
                [
                    p[0] + 0.05 * bump,
                    p[1] + 0.04 * bump * p[0],
                    if dim == 3 { p[2] + 0.03 * bump } else { 0.0 },
                ]
            });
        }
        out.push((kind, mesh));
    }
    out
}

/// Physical position of natural point `xi` in element `e`.
fn position(mesh: &Mesh, e: usize, xi: [f64; 3]) -> [f64; 3] {
    interpolate(mesh, e, xi, &mesh.points)
}

/// Random natural points of random elements map back to the same element and the same natural
/// coordinates to 1e-10 (the inverse map is exact up to round-off: a Newton solve of
/// x(xi) = x; acceptance band of the issue).
#[test]
fn random_points_map_back_exactly() {
    let mut rng = Rng::new(11);
    for (kind, mesh) in meshes() {
        let locator = Locator::new(&mesh);
        for _ in 0..200 {
            let e = ((rng.uniform() * mesh.element_count() as f64) as usize)
                .min(mesh.element_count() - 1);
            let xi = rng.point_in(kind, 1e-3);
            let x = position(&mesh, e, xi);
            let (found, xi_found) = locator
                .locate(&mesh, x)
                .unwrap_or_else(|| panic!("{kind:?}: {x:?} of element {e} not found"));
            assert_eq!(found, e, "{kind:?}: point {x:?}");
            for d in 0..kind.dim() {
                assert_close(xi_found[d], xi[d], 1e-10, 1.0, kind.name());
            }
        }
    }
}

/// Points beyond the bounding box, and in the removed quadrant of an L-shape (inside its box),
/// are not located.
#[test]
fn points_outside_return_none() {
    for (kind, mesh) in meshes() {
        let locator = Locator::new(&mesh);
        let (lo, hi) = mesh.bounding_box();
        let mut beyond = hi.map(|v| v + 0.1);
        let mut before = lo.map(|v| v - 0.1);
        if kind.dim() == 2 {
            beyond[2] = 0.0;
            before[2] = 0.0;
        }
        assert!(locator.locate(&mesh, beyond).is_none(), "{kind:?}");
        assert!(locator.locate(&mesh, before).is_none(), "{kind:?}");
    }
    for kind in [ElementKind::Quad4, ElementKind::Tri6] {
        let mesh = l_shape(kind, 1.0, 4);
        let locator = Locator::new(&mesh);
        assert!(locator.locate(&mesh, [0.5, -0.5, 0.0]).is_none());
        assert!(locator.locate(&mesh, [0.01, -0.01, 0.0]).is_none());
        assert!(locator.locate(&mesh, [-0.5, -0.5, 0.0]).is_some());
    }
}

/// A point on the boundary, or outside it by less than the tolerance, is located in an element
/// touching that boundary with natural coordinates on the element's face; farther out it is not.
#[test]
fn boundary_points_use_the_tolerance() {
    let mesh = structured(ElementKind::Quad4, [4, 4, 1], [1.0, 1.0, 1.0]);
    let locator = Locator::new(&mesh);
    let tol = locator.tolerance();
    assert_close(tol, 1e-6 * 2f64.sqrt(), 1e-12, 1.0, "tolerance");
    for x in [
        [1.0, 0.3, 0.0],
        [1.0 + 0.5 * tol, 0.3, 0.0],
        [1.0, 1.0, 0.0],
    ] {
        let (e, xi) = locator.locate(&mesh, x).expect("on the boundary");
        assert_close(position(&mesh, e, xi)[0], 1.0, 1e-12, 1.0, "x on the face");
        assert_close(xi[0], 1.0, 1e-9, 1.0, "xi on the face");
    }
    assert!(locator.locate(&mesh, [1.0 + 3.0 * tol, 0.3, 0.0]).is_none());
    // A shared node belongs to the lowest-indexed element holding it.
    let (e, _) = locator
        .locate(&mesh, [0.25, 0.25, 0.0])
        .expect("inner node");
    assert_eq!(e, 0);
}

/// Interpolation reproduces fields in the element's space exactly: linear fields for every
/// kind, quadratic ones for quadratic kinds (completeness of the shape functions, common
/// practice).
#[test]
fn interpolation_reproduces_polynomials() {
    let mut rng = Rng::new(5);
    let linear = |p: [f64; 3]| [1.0 + 2.0 * p[0] - p[1] + 0.5 * p[2], 3.0 * p[1]];
    let quadratic = |p: [f64; 3]| [p[0] * p[0] - p[0] * p[1], p[1] * p[1] + p[0]];
    for kind in ElementKind::ALL {
        // Undistorted cells: the maps are affine, so fields polynomial in x are polynomial in xi.
        let mesh = structured(kind, [3, 3, 3], [2.0, 1.0, 1.5]);
        let lin: Vec<[f64; 2]> = mesh.points.iter().map(|&p| linear(p)).collect();
        let quad: Vec<[f64; 2]> = mesh.points.iter().map(|&p| quadratic(p)).collect();
        for _ in 0..20 {
            let e = ((rng.uniform() * mesh.element_count() as f64) as usize)
                .min(mesh.element_count() - 1);
            let xi = rng.point_in(kind, 0.0);
            let x = position(&mesh, e, xi);
            let v = interpolate(&mesh, e, xi, &lin);
            let expected = linear(x);
            for c in 0..2 {
                assert_close(v[c], expected[c], 1e-12, 10.0, kind.name());
            }
            if kind.order() == 2 {
                let w = interpolate_with(&mesh, e, xi, |n| quad[n as usize]);
                let expected = quadratic(x);
                for c in 0..2 {
                    assert_close(w[c], expected[c], 1e-12, 10.0, kind.name());
                }
            }
        }
    }
}

/// Clamping keeps points inside and moves outside points onto the reference element.
#[test]
fn clamping_lands_in_the_reference_element() {
    let mut rng = Rng::new(3);
    for kind in ElementKind::ALL {
        for _ in 0..50 {
            let xi = [
                rng.range(-3.0, 3.0),
                rng.range(-3.0, 3.0),
                if kind.dim() == 3 {
                    rng.range(-3.0, 3.0)
                } else {
                    0.0
                },
            ];
            let c = clamp_natural(kind, xi);
            assert!(kind.contains_natural(c, 1e-12), "{kind:?}: {xi:?} -> {c:?}");
            if kind.contains_natural(xi, 0.0) {
                assert_eq!(c, xi);
            }
        }
    }
}
