//! Isoparametric geometry: positive Jacobians, exact gradients of linear fields (every
//! isoparametric element reproduces linear fields, common practice), inverse-map round trips.

use super::super::{interpolate_point, inverse_map, map_gradients, ElementKind, Rule, MAX_NODES};
use super::{assert_close, distorted_coords, gradients, reference_size, shape, Rng};

/// Natural points where the Jacobian is checked: full quadrature points and the nodes.
fn check_points(kind: ElementKind) -> Vec<[f64; 3]> {
    let mut pts: Vec<[f64; 3]> = kind.quadrature(Rule::Full).iter().map(|q| q.xi).collect();
    pts.extend_from_slice(kind.reference_nodes());
    pts
}

#[test]
fn reference_element_has_unit_jacobian_under_identity_map() {
    for kind in ElementKind::ALL {
        let coords = kind.reference_nodes();
        let mut dn_phys = [[0.0; 3]; MAX_NODES];
        for xi in check_points(kind) {
            let dn = gradients(kind, xi);
            let nn = kind.node_count();
            let det = map_gradients(kind.dim(), coords, &dn[..nn], &mut dn_phys[..nn]);
            // Identity map: J = I exactly up to round-off in sums of O(1) terms.
            assert_close(det, 1.0, 1e-13, 1.0, &format!("{kind} det J at {xi:?}"));
            for i in 0..nn {
                for d in 0..3 {
                    assert_close(
                        dn_phys[i][d],
                        dn[i][d],
                        1e-13,
                        1.0,
                        &format!("{kind} dN_{i}"),
                    );
                }
            }
        }
    }
}

#[test]
fn distorted_elements_keep_positive_jacobian() {
    let mut rng = Rng::new(3);
    for kind in ElementKind::ALL {
        for _ in 0..20 {
            let coords = distorted_coords(kind, &mut rng);
            let mut dn_phys = [[0.0; 3]; MAX_NODES];
            for xi in check_points(kind) {
                let dn = gradients(kind, xi);
                let nn = kind.node_count();
                let det = map_gradients(kind.dim(), &coords, &dn[..nn], &mut dn_phys[..nn]);
                assert!(
                    det > 0.0 && det.is_finite(),
                    "{kind}: det J = {det} at {xi:?}"
                );
            }
        }
    }
}

#[test]
fn inverted_element_reports_negative_determinant() {
    for kind in ElementKind::ALL {
        // Mirror the reference element in x: the map reverses orientation.
        let coords: Vec<[f64; 3]> = kind
            .reference_nodes()
            .iter()
            .map(|&[x, y, z]| [-x, y, z])
            .collect();
        let xi = kind.sampling_points()[0];
        let dn = gradients(kind, xi);
        let nn = kind.node_count();
        let mut dn_phys = [[7.0; 3]; MAX_NODES];
        let det = map_gradients(kind.dim(), &coords, &dn[..nn], &mut dn_phys[..nn]);
        assert_close(det, -1.0, 1e-13, 1.0, &format!("{kind} mirrored det"));
        assert!(
            dn_phys[..nn].iter().all(|g| *g == [7.0; 3]),
            "{kind}: output written for det < 0"
        );
    }
}

#[test]
fn map_gradients_reproduces_linear_field_on_distorted_elements() {
    let mut rng = Rng::new(4);
    let a = [0.7, -1.3, 2.1];
    for kind in ElementKind::ALL {
        let dim = kind.dim();
        let nn = kind.node_count();
        for _ in 0..10 {
            let coords = distorted_coords(kind, &mut rng);
            let u: Vec<f64> = coords
                .iter()
                .map(|x| 0.5 + a[0] * x[0] + a[1] * x[1] + a[2] * x[2])
                .collect();
            for q in kind.quadrature(Rule::Full) {
                let dn = gradients(kind, q.xi);
                let mut dn_phys = [[0.0; 3]; MAX_NODES];
                let det = map_gradients(dim, &coords, &dn[..nn], &mut dn_phys[..nn]);
                assert!(det > 0.0);
                for d in 0..dim {
                    let g: f64 = (0..nn).map(|i| u[i] * dn_phys[i][d]).sum();
                    // Sums of ~27 terms of size ~|a| x |x| ~ 10: 1e-12 relative to |a| is
                    // comfortably above round-off.
                    assert_close(g, a[d], 1e-12, 2.5, &format!("{kind} du/dx{d}"));
                }
                if dim == 2 {
                    assert!(dn_phys[..nn].iter().all(|g| g[2] == 0.0));
                }
            }
        }
    }
}

#[test]
fn inverse_map_round_trips() {
    let mut rng = Rng::new(5);
    for kind in ElementKind::ALL {
        let nn = kind.node_count();
        for _ in 0..20 {
            let coords = distorted_coords(kind, &mut rng);
            let xi = rng.point_in(kind, 0.0);
            let n = shape(kind, xi);
            let x = interpolate_point(&coords, &n[..nn]);
            let back = inverse_map(kind, &coords, x)
                .unwrap_or_else(|| panic!("{kind}: inverse_map failed for {xi:?}"));
            for d in 0..kind.dim() {
                // Newton converges quadratically to round-off; 1e-10 of the element size.
                assert_close(
                    back[d],
                    xi[d],
                    1e-10,
                    reference_size(kind),
                    &format!("{kind} xi{d}"),
                );
            }
            assert!(kind.contains_natural(back, 1e-9));
        }
        // A point well outside maps to natural coordinates outside the element.
        let coords = kind.reference_nodes();
        let far = [5.0, 5.0, if kind.dim() == 3 { 5.0 } else { 0.0 }];
        if let Some(xi) = inverse_map(kind, coords, far) {
            assert!(
                !kind.contains_natural(xi, 1e-6),
                "{kind}: {far:?} mapped inside"
            );
        }
        // Degenerate element (all nodes at one point): no answer.
        let collapsed = vec![[1.0, 2.0, 3.0]; nn];
        assert!(
            inverse_map(kind, &collapsed, [1.0, 2.0, 3.0]).is_none(),
            "{kind} collapsed"
        );
    }
}

#[test]
fn interpolate_point_reproduces_nodes() {
    let mut rng = Rng::new(6);
    for kind in ElementKind::ALL {
        let coords = distorted_coords(kind, &mut rng);
        for (j, &xi) in kind.reference_nodes().iter().enumerate() {
            let n = shape(kind, xi);
            let x = interpolate_point(&coords, &n[..kind.node_count()]);
            for d in 0..3 {
                assert_close(
                    x[d],
                    coords[j][d],
                    1e-13,
                    5.0,
                    &format!("{kind} node {j} x{d}"),
                );
            }
        }
    }
}

#[test]
fn orientation_flip_repairs_mirrored_elements() {
    let mut rng = Rng::new(7);
    for kind in ElementKind::ALL {
        let nn = kind.node_count();
        let flip = kind.orientation_flip();
        assert_eq!(flip.len(), nn, "{kind}");
        let mut seen = vec![false; nn];
        for &p in flip {
            seen[p] = true;
        }
        assert!(seen.iter().all(|&s| s), "{kind}: flip is not a permutation");
        assert!(
            (0..nn).all(|k| flip[flip[k]] == k),
            "{kind}: flip is not an involution"
        );
        // Mirror a distorted element in x: negative everywhere; after the flip, positive.
        let coords: Vec<[f64; 3]> = distorted_coords(kind, &mut rng)
            .into_iter()
            .map(|[x, y, z]| [-x, y, z])
            .collect();
        let flipped: Vec<[f64; 3]> = flip.iter().map(|&p| coords[p]).collect();
        let mut dn_phys = [[0.0; 3]; MAX_NODES];
        for xi in check_points(kind) {
            let dn = gradients(kind, xi);
            let before = map_gradients(kind.dim(), &coords, &dn[..nn], &mut dn_phys[..nn]);
            let after = map_gradients(kind.dim(), &flipped, &dn[..nn], &mut dn_phys[..nn]);
            assert!(
                before < 0.0 && after > 0.0,
                "{kind} at {xi:?}: {before} -> {after}"
            );
        }
    }
}
