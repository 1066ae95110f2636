//! Extrusion of triangle meshes into wedges and tetrahedra: valid elements, volumes, node counts,
//! conformity of the tetrahedral split and of the quadratic mid nodes, zones, errors.
//!
//! Check values: a prism over the 2D mesh has volume area x thickness (also for curved Tri6
//! edges: the extruded quadratic faces are ruled surfaces over the 2D curves, so the cells tile
//! the curved prism exactly; derived here). In a conforming tetrahedral mesh every interior
//! triangle is shared by exactly two tetrahedra; the boundary consists of 2 triangles per 2D
//! element (bottom and top) and 2 triangles per 2D boundary edge and layer (each side
//! quadrilateral cut once), so the count of faces used once must equal that (common practice).

use hone::element::ElementKind;
use hone::mesh::{check_geometry, Mesh};
use hone::reference::meshes::{extrude, l_shape, measure, quarter_annulus, MeshError};
use std::collections::HashMap;

/// Round-off tolerance for volumes summed over a few thousand cells (common practice).
const ROUND_OFF: f64 = 1e-12;

/// Number of 2D boundary edges (vertex pairs used by one triangle only) and of all edges.
fn edge_counts(mesh2d: &Mesh) -> (usize, usize) {
    let mut uses: HashMap<(u32, u32), usize> = HashMap::new();
    for e in 0..mesh2d.element_count() {
        let (_, nodes) = mesh2d.element(e);
        for (i, j) in [(0, 1), (1, 2), (2, 0)] {
            let key = (nodes[i].min(nodes[j]), nodes[i].max(nodes[j]));
            *uses.entry(key).or_default() += 1;
        }
    }
    (uses.values().filter(|&&u| u == 1).count(), uses.len())
}

/// Counts how often each facet (sorted corner list) is used; returns (used once, used twice) and
/// fails on more.
fn facet_uses(mesh: &Mesh) -> (usize, usize) {
    let mut uses: HashMap<Vec<u32>, usize> = HashMap::new();
    for e in 0..mesh.element_count() {
        let (kind, nodes) = mesh.element(e);
        for facet in kind.facets() {
            let mut key: Vec<u32> = facet.corners.iter().map(|&c| nodes[c]).collect();
            key.sort_unstable();
            *uses.entry(key).or_default() += 1;
        }
    }
    assert!(
        uses.values().all(|&u| u <= 2),
        "a facet used by three or more cells"
    );
    (
        uses.values().filter(|&&u| u == 1).count(),
        uses.values().filter(|&&u| u == 2).count(),
    )
}

/// Every element that has an edge between two corners uses the same mid node for it.
fn check_mid_nodes_shared(mesh: &Mesh) {
    let mut mid: HashMap<(u32, u32), u32> = HashMap::new();
    for e in 0..mesh.element_count() {
        let (kind, nodes) = mesh.element(e);
        for (&[u, v], &m) in kind.edges().iter().zip(kind.edge_mid_nodes()) {
            let key = (nodes[u].min(nodes[v]), nodes[u].max(nodes[v]));
            let id = *mid.entry(key).or_insert(nodes[m]);
            assert_eq!(id, nodes[m], "element {e}: edge {key:?} has two mid nodes");
        }
    }
}

/// The straight-sided Tri3 mesh on the corners of a triangle mesh.
fn corner_mesh(mesh: &Mesh) -> Mesh {
    let mut out = mesh.clone();
    for block in &mut out.blocks {
        let nn = block.kind.node_count();
        block.nodes = block
            .nodes
            .chunks(nn)
            .flat_map(|c| c[..3].to_vec())
            .collect();
        block.kind = ElementKind::Tri3;
    }
    out
}

#[test]
fn extruded_meshes_are_valid_conforming_and_have_the_prism_volume() {
    let (thickness, layers) = (0.5, 3);
    let bases = [
        (
            "annulus tri3",
            quarter_annulus(ElementKind::Tri3, 1.0, 2.0, 3, 5),
        ),
        (
            "annulus tri6",
            quarter_annulus(ElementKind::Tri6, 1.0, 2.0, 3, 5),
        ),
        ("L tri3", l_shape(ElementKind::Tri3, 1.0, 2)),
    ];
    let targets = [
        ElementKind::Wedge6,
        ElementKind::Wedge15,
        ElementKind::Tet4,
        ElementKind::Tet10,
    ];
    for (name, mut base) in bases {
        // Alternate zones so that copying them can be checked.
        base.zone = (0..base.element_count() as i64).map(|e| e % 2).collect();
        let n_tri = base.element_count();
        let corners = {
            let mut used = vec![false; base.node_count()];
            for e in 0..n_tri {
                for &n in &base.element(e).1[..3] {
                    used[n as usize] = true;
                }
            }
            used.iter().filter(|&&u| u).count()
        };
        let (boundary_edges, edges) = edge_counts(&base);
        let area = measure(&base);
        let faceted_area = measure(&corner_mesh(&base));
        for kind in targets {
            let what = format!("{name} -> {kind}");
            let mesh = extrude(&base, thickness, layers, kind).expect("extrusion");
            assert_eq!(mesh.dimension, 3);
            assert!(check_geometry(&mesh).is_empty(), "{what}: bad elements");
            let volume = measure(&mesh);
            // Linear kinds use the corners only: the straight-sided (faceted) prism.
            let expected = if kind.order() == 2 {
                area
            } else {
                faceted_area
            } * thickness;
            assert!(
                ((volume - expected) / expected).abs() <= ROUND_OFF,
                "{what}: volume {volume}, expected {expected}"
            );
            let tets = matches!(kind, ElementKind::Tet4 | ElementKind::Tet10);
            let per_prism = if tets { 3 } else { 1 };
            assert_eq!(mesh.element_count(), per_prism * n_tri * layers, "{what}");
            for e in 0..mesh.element_count() {
                assert_eq!(
                    mesh.zone[e],
                    (e / (per_prism * layers)) as i64 % 2,
                    "{what}: zone of cell {e}"
                );
            }
            // Node counts: corner columns (layers + 1 levels); quadratic kinds add the 2D edge
            // mid points on every level, vertical mid nodes, and (tetrahedra) the mid nodes of
            // the side diagonals, which sit above the 2D edge mid points at mid levels.
            let (c, m, l) = (corners, edges, layers);
            let nodes = match kind {
                ElementKind::Wedge6 | ElementKind::Tet4 => c * (l + 1),
                ElementKind::Wedge15 => (c + m) * (l + 1) + c * l,
                _ => (c + m) * (2 * l + 1),
            };
            assert_eq!(mesh.node_count(), nodes, "{what}: node count");
            let (once, twice) = facet_uses(&mesh);
            if tets {
                assert_eq!(
                    once,
                    2 * n_tri + 2 * boundary_edges * layers,
                    "{what}: boundary triangles"
                );
                // Four faces per tetrahedron: interior faces counted twice.
                assert_eq!(once + 2 * twice, 4 * mesh.element_count(), "{what}");
            } else {
                assert_eq!(
                    once,
                    2 * n_tri + boundary_edges * layers,
                    "{what}: boundary faces"
                );
            }
            if kind.order() == 2 {
                check_mid_nodes_shared(&mesh);
            }
        }
    }
}

#[test]
fn extruded_mid_nodes_follow_the_arc() {
    // Tri6 mid nodes on the arcs stay on the cylinders r = a and r = b at every level.
    let base = quarter_annulus(ElementKind::Tri6, 1.0, 2.0, 2, 4);
    for kind in [ElementKind::Wedge15, ElementKind::Tet10] {
        let mesh = extrude(&base, 1.0, 2, kind).expect("extrusion");
        for r in [1.0_f64, 2.0] {
            let on: Vec<f64> = mesh
                .points
                .iter()
                .map(|p| p[0].hypot(p[1]))
                .filter(|d| (d - r).abs() < 1e-6)
                .collect();
            // 2D arc nodes (9 per arc) on 5 levels (every lattice level is used by Tet10; Wedge15
            // uses the mid levels only above corners: 5 corners).
            let expected = if kind == ElementKind::Tet10 {
                9 * 5
            } else {
                9 * 3 + 5 * 2
            };
            assert_eq!(on.len(), expected, "{kind}: nodes on the cylinder r = {r}");
            // Round-off of one cos/sin evaluation (common practice).
            assert!(
                on.iter().all(|d| (d - r).abs() < 1e-12 * r),
                "{kind}: r = {r}"
            );
        }
    }
}

#[test]
fn extrude_rejects_bad_input() {
    let tri = quarter_annulus(ElementKind::Tri3, 1.0, 2.0, 1, 1);
    let quad = quarter_annulus(ElementKind::Quad4, 1.0, 2.0, 1, 1);
    assert!(matches!(
        extrude(&quad, 1.0, 1, ElementKind::Wedge6),
        Err(MeshError::UnsupportedKind {
            kind: ElementKind::Quad4,
            ..
        })
    ));
    assert!(matches!(
        extrude(&tri, 1.0, 1, ElementKind::Hex8),
        Err(MeshError::UnsupportedKind {
            kind: ElementKind::Hex8,
            ..
        })
    ));
    for t in [0.0, -1.0, f64::NAN] {
        assert!(matches!(
            extrude(&tri, t, 1, ElementKind::Tet4),
            Err(MeshError::InvalidParameter {
                name: "thickness",
                ..
            })
        ));
    }
    assert!(matches!(
        extrude(&tri, 1.0, 0, ElementKind::Tet4),
        Err(MeshError::InvalidParameter { name: "layers", .. })
    ));
}

#[test]
fn demo_deck_extruded_through_its_thickness() {
    // The demo's 3D variant: the rounded quarter deck meshed in Tri6, extruded through 8 mm in
    // two layers into wedge15 and tet10.
    use hone::reference::meshes::{triangulate, Domain, Loop, MesherOptions, Segment};
    let line = |x: f64, y: f64| Segment::Line { to: [x, y] };
    let deck = Domain {
        outer: Loop {
            start: [200.0, 0.0],
            segments: vec![
                line(600.0, 0.0),
                line(600.0, 400.0),
                line(0.0, 400.0),
                line(0.0, 125.0),
                line(160.0, 125.0),
                Segment::Arc {
                    center: [160.0, 85.0],
                    to: [200.0, 85.0],
                    counter_clockwise: false,
                },
                line(200.0, 0.0),
            ],
        },
        holes: vec![],
    };
    let size = |p: [f64; 2]| 8.0 + 0.2 * (p[0] - 200.0).hypot(p[1] - 125.0);
    let base =
        triangulate(&deck, &size, ElementKind::Tri6, &MesherOptions::default()).expect("mesh");
    let area = measure(&base);
    for kind in [ElementKind::Wedge15, ElementKind::Tet10] {
        let mesh = extrude(&base, 8.0, 2, kind).expect("extrusion");
        assert!(check_geometry(&mesh).is_empty(), "{kind}: bad elements");
        let volume = measure(&mesh);
        assert!(
            ((volume - 8.0 * area) / (8.0 * area)).abs() <= ROUND_OFF,
            "{kind}: volume {volume}, area {area}"
        );
        let (once, _) = facet_uses(&mesh);
        if kind == ElementKind::Tet10 {
            let (boundary_edges, _) = edge_counts(&base);
            assert_eq!(once, 2 * base.element_count() + 2 * boundary_edges * 2);
        }
    }
}
