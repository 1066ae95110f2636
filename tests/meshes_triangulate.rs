//! The size-driven 2D mesher on a square and on the demo's quarter deck plate with a hatch
//! opening (sharp and rounded corner): valid elements, smallest angles, areas, points on the
//! arc, edge lengths against constant and graded size fields, element counts, determinism.
//! Area bounds on arcs: see `meshes_support.rs`.
//!
//! The mesh's density: a mesh of equilateral triangles of side h has area / (sqrt(3)/4 h^2)
//! elements (common practice); Delaunay refinement gives a spread of shapes, so the count is
//! checked within a factor. Measured (this implementation): mean edge / h = 0.99 on the square
//! and the deck at constant h, element count / ideal = 1.02 (square, h = 0.05) and 1.07 (deck,
//! h = 20); smallest angle 30-33 degrees for the default 20.

#[path = "meshes_support.rs"]
mod support;

use hone::element::ElementKind;
use hone::mesh::check_geometry;
use hone::reference::meshes::{measure, triangulate, Domain, Loop, MesherOptions, Segment};
use std::f64::consts::{FRAC_PI_2, PI};
use support::*;

fn unit_square() -> Domain {
    Domain {
        outer: Loop {
            start: [0.0, 0.0],
            segments: vec![
                line(1.0, 0.0),
                line(1.0, 1.0),
                line(0.0, 1.0),
                line(0.0, 0.0),
            ],
        },
        holes: vec![],
    }
}

/// The demo's quarter deck plate: [0, 600] x [0, 400] minus the opening [0, 200] x [0, 125],
/// its corner at (200, 125) sharp or rounded with radius 40 (centre (160, 85)).
fn deck(rounded: bool) -> Domain {
    let mut segments = vec![
        line(600.0, 0.0),
        line(600.0, 400.0),
        line(0.0, 400.0),
        line(0.0, 125.0),
    ];
    if rounded {
        segments.push(line(160.0, 125.0));
        segments.push(Segment::Arc {
            center: [160.0, 85.0],
            to: [200.0, 85.0],
            counter_clockwise: false,
        });
    } else {
        segments.push(line(200.0, 125.0));
    }
    segments.push(line(200.0, 0.0));
    Domain {
        outer: Loop {
            start: [200.0, 0.0],
            segments,
        },
        holes: vec![],
    }
}

/// Exact area of the deck: 600 x 400 - 200 x 125, plus 40^2 (1 - pi/4) when the corner is
/// rounded (the corner square minus the quarter disc becomes plate).
fn deck_area(rounded: bool) -> f64 {
    215_000.0
        + if rounded {
            1600.0 * (1.0 - PI / 4.0)
        } else {
            0.0
        }
}

#[test]
fn square_with_constant_size() {
    let h = 0.05;
    for kind in [ElementKind::Tri3, ElementKind::Tri6] {
        let mesh =
            triangulate(&unit_square(), &|_| h, kind, &MesherOptions::default()).expect("mesh");
        assert_eq!(mesh.dimension, 2);
        assert!(check_geometry(&mesh).is_empty(), "{kind}: bad elements");
        check_mid_nodes(&mesh);
        assert!(
            min_angle(&mesh) >= 20.0,
            "{kind}: smallest angle {}",
            min_angle(&mesh)
        );
        let area = measure(&mesh);
        assert!((area - 1.0).abs() <= ROUND_OFF, "{kind}: area {area}");
        let mean_edge = mean(edges(&mesh).iter().map(|e| e.0));
        // Constant h: mean edge within 15 % of h (measured 0.99 h, header).
        assert!(
            (mean_edge / h - 1.0).abs() <= 0.15,
            "{kind}: mean edge {mean_edge}"
        );
        let ideal = 1.0 / (3f64.sqrt() / 4.0 * h * h);
        let ratio = mesh.element_count() as f64 / ideal;
        assert!(
            (0.85..=1.3).contains(&ratio),
            "{kind}: {} elements, ideal {ideal}",
            mesh.element_count()
        );
        for p in boundary_nodes(&mesh) {
            assert!(
                p[0] == 0.0 || p[0] == 1.0 || p[1] == 0.0 || p[1] == 1.0,
                "{kind}: boundary node {p:?} off the square"
            );
            assert_eq!(p[2], 0.0);
        }
        assert!(mesh.zone.iter().all(|&z| z == 0));
        assert_eq!(
            mesh.file_cell,
            (0..mesh.element_count() as u32).collect::<Vec<_>>()
        );
    }
}

#[test]
fn deck_with_constant_size() {
    let h = 20.0;
    for rounded in [false, true] {
        for kind in [ElementKind::Tri3, ElementKind::Tri6] {
            let what = format!("deck rounded={rounded} {kind}");
            let mesh =
                triangulate(&deck(rounded), &|_| h, kind, &MesherOptions::default()).expect("mesh");
            assert!(check_geometry(&mesh).is_empty(), "{what}: bad elements");
            check_mid_nodes(&mesh);
            assert!(
                min_angle(&mesh) >= 20.0,
                "{what}: smallest angle {}",
                min_angle(&mesh)
            );
            let (area, exact) = (measure(&mesh), deck_area(rounded));
            let bound = if rounded {
                arc_area_bound(kind, 40.0, FRAC_PI_2)
            } else {
                0.0
            };
            assert!(
                area - exact >= -ROUND_OFF * exact && area - exact <= bound + ROUND_OFF * exact,
                "{what}: area {area}, exact {exact}, allowed excess {bound}"
            );
            let mean_edge = mean(edges(&mesh).iter().map(|e| e.0));
            assert!(
                (mean_edge / h - 1.0).abs() <= 0.15,
                "{what}: mean edge {mean_edge}"
            );
            let ideal = exact / (3f64.sqrt() / 4.0 * h * h);
            let ratio = mesh.element_count() as f64 / ideal;
            assert!(
                (0.85..=1.3).contains(&ratio),
                "{what}: {} elements, ideal {ideal}",
                mesh.element_count()
            );
            if rounded {
                let (corners, mids) = check_arc(&mesh, [160.0, 85.0], 40.0, 0.0, FRAC_PI_2);
                // At least one point per 30 degrees: 3 pieces, 4 points.
                assert!(corners >= 4, "{what}: {corners} points on the arc");
                let expected_mids = if kind == ElementKind::Tri6 {
                    corners - 1
                } else {
                    0
                };
                assert_eq!(mids, expected_mids, "{what}: mid nodes on the arc");
            } else {
                assert!(
                    mesh.points.iter().any(|p| p[0] == 200.0 && p[1] == 125.0),
                    "{what}: re-entrant corner node"
                );
            }
        }
    }
}

#[test]
fn deck_with_graded_size() {
    // h = 5 + 0.2 r, r the distance from the opening's corner.
    let corner = [200.0, 125.0];
    let r = |p: [f64; 2]| (p[0] - corner[0]).hypot(p[1] - corner[1]);
    let h = move |p: [f64; 2]| 5.0 + 0.2 * r(p);
    for rounded in [false, true] {
        let what = format!("graded deck rounded={rounded}");
        let mesh = triangulate(
            &deck(rounded),
            &h,
            ElementKind::Tri3,
            &MesherOptions::default(),
        )
        .expect("mesh");
        assert!(check_geometry(&mesh).is_empty(), "{what}: bad elements");
        assert!(
            min_angle(&mesh) >= 20.0,
            "{what}: smallest angle {}",
            min_angle(&mesh)
        );
        let all = edges(&mesh);
        // Edge length over h at the edge's midpoint, by distance band from the corner: within
        // 20 % of 1 in every band (measured 0.92-0.98).
        let bands = [0.0, 25.0, 50.0, 100.0, 200.0, 300.0, f64::INFINITY];
        for w in bands.windows(2) {
            let in_band = || all.iter().filter(|e| r(e.1) >= w[0] && r(e.1) < w[1]);
            assert!(in_band().count() >= 20, "{what}: band {w:?} too sparse");
            let ratio = mean(in_band().map(|e| e.0 / h(e.1)));
            assert!(
                (ratio - 1.0).abs() <= 0.2,
                "{what}: band {w:?}, mean edge / h = {ratio}"
            );
        }
        let near = mean(all.iter().filter(|e| r(e.1) < 25.0).map(|e| e.0));
        let far = mean(all.iter().filter(|e| r(e.1) > 300.0).map(|e| e.0));
        // h goes from 5-10 near the corner to 65-150 far away.
        assert!(far > 5.0 * near, "{what}: near {near}, far {far}");
    }
}

#[test]
fn requested_minimum_angle_is_met() {
    let h = |p: [f64; 2]| 5.0 + 0.2 * (p[0] - 200.0).hypot(p[1] - 125.0);
    for angle in [0.0, 25.0, 30.0, 33.0] {
        for rounded in [false, true] {
            let options = MesherOptions {
                min_angle_deg: angle,
                ..MesherOptions::default()
            };
            let mesh = triangulate(&deck(rounded), &h, ElementKind::Tri6, &options).expect("mesh");
            assert!(
                check_geometry(&mesh).is_empty(),
                "angle {angle}: bad elements"
            );
            // Every input angle here is 90 degrees or more, so no exception applies.
            let found = min_angle(&mesh);
            assert!(
                found >= angle,
                "requested {angle}, found {found} (rounded={rounded})"
            );
        }
    }
}

#[test]
fn the_same_input_gives_the_same_mesh() {
    let h = |p: [f64; 2]| 5.0 + 0.2 * (p[0] - 200.0).hypot(p[1] - 125.0);
    let run = || {
        triangulate(
            &deck(true),
            &h,
            ElementKind::Tri6,
            &MesherOptions::default(),
        )
        .expect("mesh")
    };
    let (first, second) = (run(), run());
    assert_eq!(first.points.len(), second.points.len());
    for (p, q) in first.points.iter().zip(&second.points) {
        assert_eq!(p.map(f64::to_bits), q.map(f64::to_bits));
    }
    assert_eq!(first.blocks[0].nodes, second.blocks[0].nodes);
}
