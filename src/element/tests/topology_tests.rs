//! Topology tables: names and VTK ids, edges and mid nodes, outward facets, wedge orientation,
//! patch bases.

use std::collections::BTreeSet;

use super::super::{vtk_cell_type_name, ElementKind, PatchBasis, MAX_NODES};

fn sub(a: [f64; 3], b: [f64; 3]) -> [f64; 3] {
    [a[0] - b[0], a[1] - b[1], a[2] - b[2]]
}

fn cross(a: [f64; 3], b: [f64; 3]) -> [f64; 3] {
    [
        a[1] * b[2] - a[2] * b[1],
        a[2] * b[0] - a[0] * b[2],
        a[0] * b[1] - a[1] * b[0],
    ]
}

fn dot(a: [f64; 3], b: [f64; 3]) -> f64 {
    a[0] * b[0] + a[1] * b[1] + a[2] * b[2]
}

fn mean(points: impl Iterator<Item = [f64; 3]>) -> [f64; 3] {
    let mut m = [0.0; 3];
    let mut k = 0.0;
    for p in points {
        for d in 0..3 {
            m[d] += p[d];
        }
        k += 1.0;
    }
    m.map(|v| v / k)
}

#[test]
fn names_and_vtk_ids_round_trip() {
    let ids = [5, 22, 9, 23, 28, 10, 24, 12, 25, 29, 13, 26];
    let counts = [3, 6, 4, 8, 9, 4, 10, 8, 20, 27, 6, 15];
    for ((kind, id), count) in ElementKind::ALL.into_iter().zip(ids).zip(counts) {
        assert_eq!(kind.vtk_id(), id);
        assert_eq!(ElementKind::from_vtk_id(id), Some(kind));
        assert_eq!(ElementKind::from_name(kind.name()), Some(kind));
        assert_eq!(kind.node_count(), count, "{kind}");
        assert!(kind.vertex_count() <= count);
        assert_eq!(
            kind.order(),
            if kind.edge_mid_nodes().is_empty() {
                1
            } else {
                2
            }
        );
        assert_ne!(vtk_cell_type_name(id), "unknown");
    }
    assert_eq!(ElementKind::from_name("hex9"), None);
    assert_eq!(ElementKind::from_vtk_id(14), None);
    assert_eq!(vtk_cell_type_name(14), "pyramid");
    assert_eq!(vtk_cell_type_name(42), "polyhedron");
    assert_eq!(vtk_cell_type_name(200), "unknown");
    assert_eq!(
        ElementKind::ALL.iter().map(|k| k.node_count()).max(),
        Some(MAX_NODES)
    );
}

#[test]
fn edges_and_mid_nodes_are_consistent() {
    let edge_counts = [3, 3, 4, 4, 4, 6, 6, 12, 12, 12, 9, 9];
    for (kind, count) in ElementKind::ALL.into_iter().zip(edge_counts) {
        let nodes = kind.reference_nodes();
        let edges = kind.edges();
        assert_eq!(edges.len(), count, "{kind} edge count");
        let distinct: BTreeSet<[usize; 2]> =
            edges.iter().map(|&[a, b]| [a.min(b), a.max(b)]).collect();
        assert_eq!(distinct.len(), edges.len(), "{kind}: repeated edge");
        assert!(edges.iter().flatten().all(|&v| v < kind.vertex_count()));
        if kind.order() == 1 {
            assert!(kind.edge_mid_nodes().is_empty());
            continue;
        }
        assert_eq!(kind.edge_mid_nodes().len(), edges.len());
        for (&[a, b], &m) in edges.iter().zip(kind.edge_mid_nodes()) {
            let mid = mean([nodes[a], nodes[b]].into_iter());
            assert_eq!(
                nodes[m], mid,
                "{kind}: mid node {m} not at the mean of {a}, {b}"
            );
        }
        // Mid nodes follow the corners in VTK order.
        let v = kind.vertex_count();
        let expected: Vec<usize> = (v..v + edges.len()).collect();
        assert_eq!(kind.edge_mid_nodes(), expected.as_slice(), "{kind}");
    }
}

#[test]
fn facets_point_outward_and_hold_their_nodes() {
    for kind in ElementKind::ALL {
        let nodes = kind.reference_nodes();
        let centre = mean(nodes[..kind.vertex_count()].iter().copied());
        let expected_facets = match kind.dim() {
            2 => kind.edges().len(),
            _ => match kind.vertex_count() {
                4 => 4,
                8 => 6,
                _ => 5,
            },
        };
        assert_eq!(kind.facets().len(), expected_facets, "{kind} facet count");
        let mut on_some_facet = BTreeSet::new();
        for f in kind.facets() {
            let c: Vec<[f64; 3]> = f.corners.iter().map(|&i| nodes[i]).collect();
            let fc = mean(c.iter().copied());
            let normal = if kind.dim() == 2 {
                let e = sub(c[1], c[0]);
                [e[1], -e[0], 0.0]
            } else {
                // Newell-style sum of fan cross products (exact for planar reference faces).
                let mut n = [0.0; 3];
                for k in 1..c.len() - 1 {
                    let t = cross(sub(c[k], c[0]), sub(c[k + 1], c[0]));
                    for d in 0..3 {
                        n[d] += t[d];
                    }
                }
                n
            };
            assert!(
                dot(normal, sub(fc, centre)) > 0.0,
                "{kind}: facet {:?} points inward",
                f.corners
            );
            assert_eq!(
                &f.nodes[..f.corners.len()],
                f.corners,
                "{kind}: corners first"
            );
            // Every facet node lies in the facet's plane (3D) or on its line (2D).
            for &i in f.nodes {
                let off = dot(normal, sub(nodes[i], c[0]));
                assert!(
                    off.abs() < 1e-14,
                    "{kind}: node {i} off facet {:?}",
                    f.corners
                );
                on_some_facet.insert(i);
            }
            // Edge mid nodes in cyclic order, then the face centre.
            let nc = f.corners.len();
            // A 2D facet (a line) has one edge, a polygonal face as many edges as corners.
            let ne = if nc == 2 { 1 } else { nc };
            if kind.order() == 2 {
                for k in 0..ne {
                    let m = f.nodes[nc + k];
                    let expected = mean([c[k], c[(k + 1) % nc]].into_iter());
                    assert_eq!(
                        nodes[m], expected,
                        "{kind}: facet {:?} mid node {m}",
                        f.corners
                    );
                }
                let extra = f.nodes.len() - nc - ne;
                assert!(extra <= 1, "{kind}: too many facet nodes");
                if extra == 1 {
                    assert_eq!(nodes[f.nodes[nc + ne]], fc, "{kind}: face centre");
                }
            } else {
                assert_eq!(f.nodes.len(), nc);
            }
        }
        // All nodes but the interior ones (quad9 and hex27 centres) lie on some facet.
        let interior = nodes
            .iter()
            .filter(|&&xi| kind.contains_natural(xi, -1e-9))
            .count();
        let expected_interior =
            usize::from(matches!(kind, ElementKind::Quad9 | ElementKind::Hex27));
        assert_eq!(interior, expected_interior, "{kind}");
        assert_eq!(on_some_facet.len(), kind.node_count() - interior, "{kind}");
    }
}

#[test]
fn corner_orientation_follows_vtk() {
    let n = |k: ElementKind| k.reference_nodes();
    // Tetra: (0,1,2) right-hand normal points toward node 3.
    for k in [ElementKind::Tet4, ElementKind::Tet10] {
        let p = n(k);
        assert!(dot(cross(sub(p[1], p[0]), sub(p[2], p[0])), sub(p[3], p[0])) > 0.0);
    }
    // Hexahedron: (0,1,2,3) normal points toward (4,5,6,7).
    for k in [ElementKind::Hex8, ElementKind::Hex20, ElementKind::Hex27] {
        let p = n(k);
        assert!(dot(cross(sub(p[1], p[0]), sub(p[2], p[0])), sub(p[4], p[0])) > 0.0);
    }
    // 2D kinds are counter-clockwise.
    for k in [ElementKind::Tri3, ElementKind::Quad4] {
        let p = n(k);
        assert!(cross(sub(p[1], p[0]), sub(p[2], p[0]))[2] > 0.0);
    }
    // Wedge: see wedge.rs for the orientation VTK itself accepts; the reference wedge must make
    // a wedge in that orientation have det J > 0 (identity map, checked in geometry_tests).
    for k in [ElementKind::Wedge6, ElementKind::Wedge15] {
        let p = n(k);
        let side = dot(cross(sub(p[1], p[0]), sub(p[2], p[0])), sub(p[3], p[0]));
        assert!(side != 0.0);
        assert_eq!(side > 0.0, super::super::wedge::BASE_NORMAL_TOWARD_TOP);
    }
}

#[test]
fn patch_bases_have_the_documented_terms() {
    let cases = [
        (PatchBasis::Linear2, 3, 2),
        (PatchBasis::Bilinear, 4, 2),
        (PatchBasis::Quadratic2, 6, 2),
        (PatchBasis::Serendipity2, 8, 2),
        (PatchBasis::Biquadratic, 9, 2),
        (PatchBasis::Linear3, 4, 3),
        (PatchBasis::Trilinear, 8, 3),
        (PatchBasis::Quadratic3, 10, 3),
        (PatchBasis::Serendipity3, 20, 3),
        (PatchBasis::Triquadratic, 27, 3),
    ];
    let x = [0.3, -1.7, 2.2];
    for (basis, len, dim) in cases {
        assert_eq!(basis.len(), len, "{basis:?}");
        assert!(!basis.is_empty());
        assert_eq!(basis.dim(), dim, "{basis:?}");
        let exps = basis.exponents();
        let distinct: BTreeSet<[u8; 3]> = exps.iter().copied().collect();
        assert_eq!(distinct.len(), len, "{basis:?}: repeated term");
        assert_eq!(exps[0], [0, 0, 0]);
        assert!(exps.iter().all(|e| e.iter().all(|&p| p <= 2)));
        if dim == 2 {
            assert!(exps.iter().all(|e| e[2] == 0));
        }
        // Complete linear part right after the constant.
        for d in 0..dim {
            let mut e = [0u8; 3];
            e[d] = 1;
            assert_eq!(exps[1 + d], e, "{basis:?}");
        }
        let mut out = [f64::NAN; 28];
        basis.evaluate(x, &mut out);
        for (k, e) in exps.iter().enumerate() {
            let z = if dim == 3 { x[2] } else { 1.0 };
            let expected = x[0].powi(e[0] as i32) * x[1].powi(e[1] as i32) * z.powi(e[2] as i32);
            assert!(
                (out[k] - expected).abs() <= 1e-14 * expected.abs().max(1.0),
                "{basis:?} term {k}"
            );
        }
        assert!(out[len].is_nan(), "{basis:?} wrote past len()");
        // The fallback chain shrinks strictly and keeps a subset of the terms.
        if let Some(lower) = basis.lower() {
            assert!(lower.len() < len);
            assert_eq!(lower.dim(), dim);
            assert!(
                lower.exponents().iter().all(|e| distinct.contains(e)),
                "{basis:?} -> {lower:?}"
            );
        } else {
            assert_eq!(
                len,
                dim + 1,
                "{basis:?}: chain must end at the complete linear basis"
            );
        }
    }
    // Each kind's basis matches its dimension and has one term per node or fewer.
    for kind in ElementKind::ALL {
        let b = kind.patch_basis();
        assert_eq!(b.dim(), kind.dim(), "{kind}");
        assert!(b.len() <= kind.node_count(), "{kind}");
    }
}
