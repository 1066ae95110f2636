use super::generate::structured;
use super::*;
use crate::element::ElementKind;

/// Element and node counts of structured meshes follow from the lattice (common practice:
/// counting): n^2 quads with (n+1)^2 nodes; 2 n^2 triangles; 6 n^3 tetrahedra (Kuhn); quad8
/// has (n+1)^2 + 2 n (n+1) nodes; hex27 (2n+1)^3; tet10 uses every lattice point, (2n+1)^3.
#[test]
fn structured_counts() {
    let n: usize = 3;
    let cases = [
        (ElementKind::Quad4, n * n, (n + 1) * (n + 1)),
        (ElementKind::Tri3, 2 * n * n, (n + 1) * (n + 1)),
        (
            ElementKind::Quad8,
            n * n,
            (n + 1) * (n + 1) + 2 * n * (n + 1),
        ),
        (ElementKind::Quad9, n * n, (2 * n + 1) * (2 * n + 1)),
        (ElementKind::Tet4, 6 * n * n * n, (n + 1).pow(3)),
        (ElementKind::Tet10, 6 * n * n * n, (2 * n + 1).pow(3)),
        (ElementKind::Hex27, n * n * n, (2 * n + 1).pow(3)),
        (ElementKind::Wedge6, 2 * n * n * n, (n + 1).pow(3)),
    ];
    for (kind, elements, nodes) in cases {
        let m = structured(kind, [n, n, n], [1.0, 2.0, 3.0]);
        assert_eq!(m.element_count(), elements, "{kind:?}");
        assert_eq!(m.node_count(), nodes, "{kind:?}");
    }
}

/// Every generated element has a positive Jacobian and the element measures add up to the box
/// (checked through the geometry check and the volume of the reference map).
#[test]
fn structured_meshes_are_valid() {
    for kind in ElementKind::ALL {
        let m = structured(kind, [2, 3, 2], [1.0, 2.0, 0.5]);
        assert!(check_geometry(&m).is_empty(), "{kind:?}");
    }
}

/// Boundary facets of a structured box: 2D: 4 n edges; hexes: 6 n^2 faces; Kuhn tetrahedra: two
/// triangles per boundary square, 12 n^2 (counting, common practice). Interior nodes of a
/// quad4 mesh are (n-1)^2.
#[test]
fn boundary_facets_of_structured_meshes() {
    let n = 4;
    let cases = [
        (ElementKind::Quad4, 4 * n),
        (ElementKind::Tri6, 4 * n),
        (ElementKind::Hex8, 6 * n * n),
        (ElementKind::Tet10, 12 * n * n),
        (ElementKind::Wedge15, 2 * 2 * n * n + 4 * n * n),
    ];
    for (kind, facets) in cases {
        let m = structured(kind, [n, n, n], [1.0, 1.0, 1.0]);
        let adjacency = NodeElements::new(&m);
        let boundary = BoundaryFacets::new(&m, &adjacency);
        assert_eq!(boundary.facets.len(), facets, "{kind:?}");
    }
    let m = structured(ElementKind::Quad4, [n, n, 1], [1.0, 1.0, 1.0]);
    let b = BoundaryFacets::new(&m, &NodeElements::new(&m));
    let interior = b.node_on_boundary.iter().filter(|x| !**x).count();
    assert_eq!(interior, (n - 1) * (n - 1));
}

/// A zone interface is a boundary of both zones.
#[test]
fn zone_interfaces_are_boundaries() {
    let n = 4;
    let mut m = structured(ElementKind::Quad4, [n, n, 1], [1.0, 1.0, 1.0]);
    for e in 0..m.element_count() {
        m.zone[e] = if m.centroid(e)[0] < 0.5 { 1 } else { 2 };
    }
    let b = BoundaryFacets::new(&m, &NodeElements::new(&m));
    // Outer boundary 4 n edges plus n interface edges counted once per side.
    assert_eq!(b.facets.len(), 4 * n + 2 * n);
}

#[test]
fn adjacency_lists_are_sorted_and_complete() {
    let m = structured(ElementKind::Hex20, [2, 2, 2], [1.0, 1.0, 1.0]);
    let adj = NodeElements::new(&m);
    let mut total = 0;
    for node in 0..m.node_count() {
        let list = adj.of(node);
        assert!(list.windows(2).all(|w| w[0] < w[1]));
        for &e in list {
            assert!(m.element(e as usize).1.contains(&(node as u32)));
        }
        total += list.len();
    }
    assert_eq!(total, m.element_count() * 20);
}

#[test]
fn inverted_element_is_reported_by_file_id() {
    let mut m = structured(ElementKind::Quad4, [2, 2, 1], [1.0, 1.0, 1.0]);
    m.file_cell = vec![10, 11, 12, 13];
    m.blocks[0].nodes.swap(4 + 1, 4 + 3);
    let bad = check_geometry(&m);
    assert_eq!(bad.len(), 1);
    assert_eq!(bad[0].file_cell, 11);
    assert_eq!(bad[0].kind, BadElementKind::Inverted);
}

/// `vertex_edges` (bucketed) lists each vertex edge once, sorted: the same list as sorting
/// and deduplicating every element edge directly.
#[test]
fn vertex_edges_match_a_plain_sort() {
    for kind in [
        ElementKind::Tet10,
        ElementKind::Hex20,
        ElementKind::Tri6,
        ElementKind::Wedge15,
    ] {
        let mesh = crate::mesh::generate::structured(kind, [3, 2, 2], [1.0, 1.0, 1.0]);
        let mut plain: Vec<(u32, u32)> = Vec::new();
        for e in 0..mesh.element_count() {
            let (k, nodes) = mesh.element(e);
            for [i, j] in k.edges() {
                let (a, b) = (nodes[*i], nodes[*j]);
                plain.push((a.min(b), a.max(b)));
            }
        }
        plain.sort_unstable();
        plain.dedup();
        assert_eq!(mesh.vertex_edges(), plain, "{kind:?}");
    }
}
