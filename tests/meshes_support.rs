//! Helpers shared by the mesher tests (`meshes_triangulate*.rs`), included with `#[path]`;
//! compiled alone it holds no test.
//!
//! Area check values. Straight boundaries are met exactly. On an arc of radius r a boundary
//! edge spanning the angle D <= `MAX_ARC_STEP` misses the area between chord and arc,
//! `g(D) = r^2/2 (D - sin D)` (elementary geometry); a Tri6 edge with its mid node on the arc
//! misses `f(D) = r^2 (D/2 - sin(D/2) cos(D/2) - 4/3 sin(D/2) (1 - cos(D/2)))`, the circular
//! segment minus the parabolic one (2/3 chord x sagitta, Archimedes), ~ r^2 (D/2)^5 / 30. Both
//! grow faster than D, so over an arc of total angle T the miss is at most `T g(Dmax) / Dmax`
//! (resp. `T f(Dmax) / Dmax`) with `Dmax = MAX_ARC_STEP` (derived here). Where the domain lies
//! outside the circle (the opening's rounded corner, a hole) the mesh is larger than the exact
//! area by at most that bound; where it lies inside (a convex outer arc), smaller.
#![allow(dead_code)]

use hone::element::ElementKind;
use hone::mesh::{BoundaryFacets, Mesh, NodeElements};
use hone::reference::meshes::{Segment, MAX_ARC_STEP};
use std::f64::consts::TAU;

/// Relative round-off of areas summed over a few thousand triangles (common practice).
pub const ROUND_OFF: f64 = 1e-12;

pub fn line(x: f64, y: f64) -> Segment {
    Segment::Line { to: [x, y] }
}

/// Largest area missed along an arc of radius r and total angle `total` (module header).
pub fn arc_area_bound(kind: ElementKind, r: f64, total: f64) -> f64 {
    let d = MAX_ARC_STEP;
    let miss = if kind == ElementKind::Tri3 {
        0.5 * r * r * (d - d.sin())
    } else {
        let h = 0.5 * d;
        r * r * (h - h.sin() * h.cos() - 4.0 / 3.0 * h.sin() * (1.0 - h.cos()))
    };
    total * miss / d
}

/// Smallest interior angle of the straight-sided triangles (corners), degrees.
pub fn min_angle(mesh: &Mesh) -> f64 {
    let mut smallest: f64 = 180.0;
    for e in 0..mesh.element_count() {
        let (_, nodes) = mesh.element(e);
        let p = |i: usize| mesh.points[nodes[i % 3] as usize];
        for i in 0..3 {
            let (a, b, c) = (p(i), p(i + 1), p(i + 2));
            let u = [b[0] - a[0], b[1] - a[1]];
            let v = [c[0] - a[0], c[1] - a[1]];
            let cos = (u[0] * v[0] + u[1] * v[1]) / (u[0].hypot(u[1]) * v[0].hypot(v[1]));
            smallest = smallest.min(cos.clamp(-1.0, 1.0).acos().to_degrees());
        }
    }
    smallest
}

/// Every corner-to-corner edge once: (length, midpoint).
pub fn edges(mesh: &Mesh) -> Vec<(f64, [f64; 2])> {
    let mut seen = std::collections::HashSet::new();
    let mut out = Vec::new();
    for e in 0..mesh.element_count() {
        let (_, nodes) = mesh.element(e);
        for (i, j) in [(0, 1), (1, 2), (2, 0)] {
            let (a, b) = (nodes[i].min(nodes[j]), nodes[i].max(nodes[j]));
            if seen.insert((a, b)) {
                let (p, q) = (mesh.points[a as usize], mesh.points[b as usize]);
                let mid = [0.5 * (p[0] + q[0]), 0.5 * (p[1] + q[1])];
                out.push(((p[0] - q[0]).hypot(p[1] - q[1]), mid));
            }
        }
    }
    out
}

pub fn mean(values: impl Iterator<Item = f64>) -> f64 {
    let (sum, n) = values.fold((0.0, 0usize), |(s, n), v| (s + v, n + 1));
    sum / n as f64
}

/// Nodes on boundary facets (corner and mid nodes).
pub fn boundary_nodes(mesh: &Mesh) -> Vec<[f64; 3]> {
    let facets = BoundaryFacets::new(mesh, &NodeElements::new(mesh));
    (0..mesh.node_count())
        .filter(|&n| facets.node_on_boundary[n])
        .map(|n| mesh.points[n])
        .collect()
}

/// Corner and mid nodes of the mesh near the arc `centre, r` within the angle range `[t0, t1]`:
/// those within 1e-6 r of the circle must lie on it to round-off (one cos/sin evaluation).
/// Returns (corner count, mid-node count).
pub fn check_arc(mesh: &Mesh, centre: [f64; 2], r: f64, t0: f64, t1: f64) -> (usize, usize) {
    let mut is_corner = vec![false; mesh.node_count()];
    for e in 0..mesh.element_count() {
        for &n in &mesh.element(e).1[..3] {
            is_corner[n as usize] = true;
        }
    }
    let (mut corners, mut mids) = (0, 0);
    for (n, p) in mesh.points.iter().enumerate() {
        let (dx, dy) = (p[0] - centre[0], p[1] - centre[1]);
        let d = dx.hypot(dy);
        let t = dy.atan2(dx).rem_euclid(TAU);
        if (d - r).abs() < 1e-6 * r && t >= t0 - 1e-9 && t <= t1 + 1e-9 {
            assert!(
                (d - r).abs() <= ROUND_OFF * r,
                "node {n} at distance {d} from the centre, radius {r}"
            );
            if is_corner[n] {
                corners += 1;
            } else {
                mids += 1;
            }
        }
    }
    (corners, mids)
}

/// Tri6 mid nodes sit at their edge's midpoint, or on the arc within the sagitta of a 30-degree
/// piece: at most (1 - cos 15 deg) / (2 sin 15 deg) = 0.066 of the edge length away.
pub fn check_mid_nodes(mesh: &Mesh) {
    for e in 0..mesh.element_count() {
        let (kind, nodes) = mesh.element(e);
        for (&[u, v], &m) in kind.edges().iter().zip(kind.edge_mid_nodes()) {
            let (p, q, c) = (
                mesh.points[nodes[u] as usize],
                mesh.points[nodes[v] as usize],
                mesh.points[nodes[m] as usize],
            );
            let length = (p[0] - q[0]).hypot(p[1] - q[1]);
            let off = (c[0] - 0.5 * (p[0] + q[0])).hypot(c[1] - 0.5 * (p[1] + q[1]));
            assert!(
                off <= 0.067 * length,
                "element {e}: mid node {off} from the midpoint of an edge of {length}"
            );
        }
    }
}
