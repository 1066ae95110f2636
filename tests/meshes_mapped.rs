//! Mapped and block meshes of the reference problems (quarter annulus, plate with a hole,
//! L-shape) in every 2D kind: valid elements, exact areas, nodes on the arcs, counts, grading.
//!
//! Area check values. A linear element has straight sides, so the mesh covers the polygon of
//! the arc's chords: a sector of angle D between radii 0 and r loses `r^2/2 (D - sin D)` per
//! chord (elementary geometry), a relative loss `1 - sin D / D ~ D^2 / 6`. A quadratic element
//! whose mid node sits on the arc at the middle angle has a parabolic edge through three arc
//! points; the area between chord and parabola is 2/3 chord x sagitta (Archimedes' quadrature of
//! the parabola), `(4/3) r^2 sin(D/2) (1 - cos(D/2))`, so the remaining loss per chord is
//! `r^2 (D/2)^5 / 30 + O(D^7)` (series expansion, derived here): relative error `(D/2)^4 / 30`,
//! two orders better. Both closed forms are checked to round-off; the exact areas are
//! `pi/4 (b^2 - a^2)`, `l^2 - pi a^2 / 4` and `3 w^2`.

use hone::element::ElementKind;
use hone::mesh::{check_geometry, Mesh};
use hone::reference::meshes::{
    l_shape, l_shape_graded, measure, merge_coincident, plate_with_hole, quarter_annulus,
};
use std::f64::consts::PI;

const KINDS_2D: [ElementKind; 5] = [
    ElementKind::Tri3,
    ElementKind::Tri6,
    ElementKind::Quad4,
    ElementKind::Quad8,
    ElementKind::Quad9,
];

/// Round-off tolerance for sums of a few hundred element areas and for coordinates computed by
/// one cos/sin evaluation (a few hundred ulps; common practice).
const ROUND_OFF: f64 = 1e-12;

fn relative(a: f64, b: f64) -> f64 {
    (a - b).abs() / b.abs()
}

fn assert_close(found: f64, expected: f64, tol: f64, what: &str) {
    assert!(
        found.is_finite() && relative(found, expected) <= tol,
        "{what}: found {found}, expected {expected} (relative difference {:e}, allowed {tol:e})",
        relative(found, expected)
    );
}

/// Nodes within 1e-6 r of the circle of radius `r` about the origin must lie on it to round-off,
/// and there must be `expected` of them.
fn check_arc_nodes(mesh: &Mesh, r: f64, expected: usize, what: &str) {
    let near: Vec<f64> = mesh
        .points
        .iter()
        .map(|p| p[0].hypot(p[1]))
        .filter(|&d| (d - r).abs() < 1e-6 * r)
        .collect();
    assert_eq!(
        near.len(),
        expected,
        "{what}: nodes on the arc of radius {r}"
    );
    for d in near {
        assert!(
            (d - r).abs() <= ROUND_OFF * r,
            "{what}: node at radius {d}, arc radius {r}"
        );
    }
}

/// Parabolic segment area between a chord of an arc of angle `d` and the quadratic edge through
/// the arc's ends and its middle (2/3 chord x sagitta).
fn parabolic_segment(r: f64, d: f64) -> f64 {
    let half = 0.5 * d;
    4.0 / 3.0 * r * r * half.sin() * (1.0 - half.cos())
}

#[test]
fn quarter_annulus_valid_with_exact_area_and_arc_nodes() {
    let (a, b, n_r, n_t) = (1.0, 2.0, 4, 6);
    let d = PI / 2.0 / n_t as f64;
    let exact = PI / 4.0 * (b * b - a * a);
    for kind in KINDS_2D {
        let mesh = quarter_annulus(kind, a, b, n_r, n_t);
        let what = format!("quarter annulus {kind}");
        assert!(check_geometry(&mesh).is_empty(), "{what}: bad elements");
        let per_cell = if kind.vertex_count() == 3 { 2 } else { 1 };
        assert_eq!(mesh.element_count(), per_cell * n_r * n_t, "{what}");
        let area = measure(&mesh);
        let faceted = n_t as f64 * 0.5 * (b * b - a * a) * d.sin();
        let arc_nodes = if kind.order() == 1 {
            n_t + 1
        } else {
            2 * n_t + 1
        };
        if kind.order() == 1 {
            assert_close(area, faceted, ROUND_OFF, &what);
            // Faceting error ~ D^2/6 (header); 1 - sin D / D exactly.
            assert_close(relative(area, exact), 1.0 - d.sin() / d, 1e-9, &what);
        } else {
            let curved = faceted + n_t as f64 * (parabolic_segment(b, d) - parabolic_segment(a, d));
            assert_close(area, curved, ROUND_OFF, &what);
            // Leading term (D/2)^4/30 (header); the next term is O(D^2) smaller: 5 % here.
            let leading = (0.5 * d).powi(4) / 30.0;
            assert_close(relative(area, exact), leading, 0.05, &what);
        }
        check_arc_nodes(&mesh, a, arc_nodes, &what);
        check_arc_nodes(&mesh, b, arc_nodes, &what);
    }
}

#[test]
fn plate_with_hole_valid_with_exact_area_hole_nodes_and_grading() {
    let (a, l, n_r, n_t, ratio) = (1.0, 5.0, 6, 4, 1.3);
    let d = PI / 4.0 / n_t as f64;
    let exact = l * l - PI * a * a / 4.0;
    for kind in KINDS_2D {
        let mesh = plate_with_hole(kind, a, l, n_r, n_t, ratio);
        let what = format!("plate with hole {kind}");
        assert!(check_geometry(&mesh).is_empty(), "{what}: bad elements");
        let per_cell = if kind.vertex_count() == 3 { 2 } else { 1 };
        assert_eq!(mesh.element_count(), 2 * per_cell * n_r * n_t, "{what}");
        let chords = 2 * n_t;
        let hole_polygon = chords as f64 * 0.5 * a * a * d.sin();
        let area = measure(&mesh);
        if kind.order() == 1 {
            assert_close(area, l * l - hole_polygon, ROUND_OFF, &what);
            assert!(
                area > exact,
                "{what}: the faceted hole is smaller than the circle"
            );
            check_arc_nodes(&mesh, a, chords + 1, &what);
        } else {
            let hole = hole_polygon + chords as f64 * parabolic_segment(a, d);
            assert_close(area, l * l - hole, ROUND_OFF, &what);
            check_arc_nodes(&mesh, a, 2 * chords + 1, &what);
        }
        assert_close(area, exact, 1.0 - d.sin() / d, &what);
        // The two blocks share the nodes of the diagonal: Quad4 and Tri3 have
        // (n_r + 1)(2 n_theta + 1) nodes.
        if kind.order() == 1 {
            assert_eq!(mesh.node_count(), (n_r + 1) * (2 * n_t + 1), "{what}");
        }
        // Radial corner spacing along y = 0 grows by `ratio` per cell (definition of the grading).
        let mut xs: Vec<f64> = mesh
            .points
            .iter()
            .filter(|p| p[1] == 0.0)
            .map(|p| p[0])
            .collect();
        xs.sort_by(f64::total_cmp);
        let step = kind.order();
        let corners: Vec<f64> = xs.iter().step_by(step).copied().collect();
        assert_eq!(corners.len(), n_r + 1, "{what}: corners on y = 0");
        for w in corners.windows(3) {
            assert_close((w[2] - w[1]) / (w[1] - w[0]), ratio, 1e-9, &what);
        }
    }
}

#[test]
fn l_shape_valid_with_exact_area_and_counts() {
    let (w, n) = (2.0, 3);
    for kind in KINDS_2D {
        let mesh = l_shape(kind, w, n);
        let what = format!("L-shape {kind}");
        assert!(check_geometry(&mesh).is_empty(), "{what}: bad elements");
        assert_close(measure(&mesh), 3.0 * w * w, ROUND_OFF, &what);
        let per_cell = if kind.vertex_count() == 3 { 2 } else { 1 };
        assert_eq!(mesh.element_count(), 3 * per_cell * n * n, "{what}");
        // Node lattice of the L: (2n+1)^2 - n^2 corner points; quadratic kinds use the half-step
        // lattice (4n+1)^2 - (2n)^2, minus the 3 n^2 cell centres for the serendipity quad.
        let expected = match kind {
            ElementKind::Tri3 | ElementKind::Quad4 => (2 * n + 1).pow(2) - n * n,
            ElementKind::Quad8 => (4 * n + 1).pow(2) - 4 * n * n - 3 * n * n,
            _ => (4 * n + 1).pow(2) - 4 * n * n,
        };
        assert_eq!(
            mesh.node_count(),
            expected,
            "{what}: nodes after merging the blocks"
        );
        assert!(
            mesh.points.iter().any(|p| p[0] == 0.0 && p[1] == 0.0),
            "{what}: re-entrant corner node"
        );
        for e in 0..mesh.element_count() {
            let c = mesh.centroid(e);
            assert!(
                !(c[0] > 0.0 && c[1] < 0.0),
                "{what}: element {e} in the removed quadrant"
            );
        }
    }
}

#[test]
fn merge_coincident_respects_the_tolerance() {
    use hone::mesh::CellBlock;
    // Two unit squares of two triangles each, the second shifted by 1 + eps in x.
    let square = |x0: f64| {
        vec![
            [x0, 0.0, 0.0],
            [x0 + 1.0, 0.0, 0.0],
            [x0 + 1.0, 1.0, 0.0],
            [x0, 1.0, 0.0],
        ]
    };
    let build = |gap: f64| {
        let mut points = square(0.0);
        points.extend(square(1.0 + gap));
        Mesh {
            points,
            blocks: vec![CellBlock {
                kind: ElementKind::Tri3,
                nodes: vec![0, 1, 2, 0, 2, 3, 4, 5, 6, 4, 6, 7],
                first_element: 0,
            }],
            file_cell: vec![0, 1, 2, 3],
            zone: vec![0; 4],
            dimension: 2,
        }
    };
    // Bounding-box diagonal ~ sqrt(5); tolerance 1e-6 relative ~ 2.2e-6 absolute.
    let mut close = build(1e-7);
    merge_coincident(&mut close, 1e-6);
    assert_eq!(close.node_count(), 6, "gap below the tolerance merges");
    assert!(check_geometry(&close).is_empty());
    // The right square keeps its far side at x = 2 + gap.
    assert_close(measure(&close), 2.0 + 1e-7, ROUND_OFF, "merged squares");
    let mut apart = build(1e-5);
    merge_coincident(&mut apart, 1e-6);
    assert_eq!(apart.node_count(), 8, "gap above the tolerance stays");
    let mut exact = build(0.0);
    merge_coincident(&mut exact, 0.0);
    assert_eq!(
        exact.node_count(),
        6,
        "zero tolerance merges identical points"
    );
}

/// The graded L-shape covers the same region with the same nodes and elements; corner elements
/// shrink by the grading (the corner cell's vertex at (h, h) moves to h^gamma (h, h) / w^(gamma -
/// 1), elementary algebra of the map) and mid-edge nodes stay at the midpoints of straight edges.
#[test]
fn graded_l_shape_keeps_region_and_shrinks_corner_cells() {
    let (w, n, gamma) = (2.0, 4, 2.0);
    for kind in KINDS_2D {
        let (uniform, mesh) = (l_shape(kind, w, n), l_shape_graded(kind, w, n, gamma));
        let what = format!("graded L-shape {kind}");
        assert!(check_geometry(&mesh).is_empty(), "{what}: bad elements");
        assert_close(measure(&mesh), 3.0 * w * w, ROUND_OFF, &what);
        assert_eq!(mesh.node_count(), uniform.node_count(), "{what}");
        assert_eq!(mesh.element_count(), uniform.element_count(), "{what}");
        let h = w / n as f64;
        let expected = h.powf(gamma) / w.powf(gamma - 1.0);
        assert!(
            mesh.points
                .iter()
                .any(|p| relative(p[0], expected) < ROUND_OFF
                    && relative(p[1], expected) < ROUND_OFF),
            "{what}: no vertex at ({expected}, {expected})"
        );
        let block = &mesh.blocks[0];
        for i in 0..block.len() {
            let cell = block.cell(i);
            for (edge, &mid) in kind.edges().iter().zip(kind.edge_mid_nodes()) {
                let (a, b, m) = (
                    mesh.points[cell[edge[0]] as usize],
                    mesh.points[cell[edge[1]] as usize],
                    mesh.points[cell[mid] as usize],
                );
                for c in 0..2 {
                    assert!(
                        (m[c] - 0.5 * (a[c] + b[c])).abs() <= ROUND_OFF * w,
                        "{what}: cell {i} mid node off its edge"
                    );
                }
            }
        }
    }
}
