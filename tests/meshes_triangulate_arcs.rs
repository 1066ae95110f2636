//! The size-driven 2D mesher on curved and sharp boundaries: a quarter plate with a hole, a
//! square with a full-circle hole given in either orientation, a quarter annulus whose arcs must
//! be split on the circle during refinement, and corners of 5 and 10 degrees. Area bounds on
//! arcs: see `meshes_support.rs`.

#[path = "meshes_support.rs"]
mod support;

use hone::element::ElementKind;
use hone::mesh::check_geometry;
use hone::reference::meshes::{measure, triangulate, Domain, Loop, MesherOptions, Segment};
use std::f64::consts::{FRAC_PI_2, PI, TAU};
use support::*;

/// Quarter plate [0, l]^2 minus the quarter disc of radius a about the origin.
fn quarter_plate(a: f64, l: f64) -> Domain {
    Domain {
        outer: Loop {
            start: [a, 0.0],
            segments: vec![
                line(l, 0.0),
                line(l, l),
                line(0.0, l),
                line(0.0, a),
                Segment::Arc {
                    center: [0.0, 0.0],
                    to: [a, 0.0],
                    counter_clockwise: false,
                },
            ],
        },
        holes: vec![],
    }
}

#[test]
fn quarter_plate_with_hole() {
    let (a, l, h) = (1.0, 5.0, 0.2);
    for kind in [ElementKind::Tri3, ElementKind::Tri6] {
        let mesh = triangulate(
            &quarter_plate(a, l),
            &|_| h,
            kind,
            &MesherOptions::default(),
        )
        .expect("mesh");
        assert!(check_geometry(&mesh).is_empty(), "{kind}: bad elements");
        check_mid_nodes(&mesh);
        assert!(
            min_angle(&mesh) >= 20.0,
            "{kind}: smallest angle {}",
            min_angle(&mesh)
        );
        let (area, exact) = (measure(&mesh), l * l - PI * a * a / 4.0);
        let bound = arc_area_bound(kind, a, FRAC_PI_2);
        assert!(
            area - exact >= -ROUND_OFF * exact && area - exact <= bound + ROUND_OFF * exact,
            "{kind}: area {area}, exact {exact}, allowed excess {bound}"
        );
        let (corners, mids) = check_arc(&mesh, [0.0, 0.0], a, 0.0, FRAC_PI_2);
        // Arc length pi/2 at h = 0.2: about 8 pieces.
        assert!(corners >= 8, "{kind}: {corners} points on the hole");
        let expected_mids = if kind == ElementKind::Tri6 {
            corners - 1
        } else {
            0
        };
        assert_eq!(mids, expected_mids, "{kind}: mid nodes on the hole");
    }
}

/// Square [0, 4]^2 with a full-circle hole of radius 1 about (2, 2); `flip` reverses both loops.
fn square_with_hole(flip: bool) -> Domain {
    let outer = if flip {
        vec![
            line(0.0, 4.0),
            line(4.0, 4.0),
            line(4.0, 0.0),
            line(0.0, 0.0),
        ]
    } else {
        vec![
            line(4.0, 0.0),
            line(4.0, 4.0),
            line(0.0, 4.0),
            line(0.0, 0.0),
        ]
    };
    Domain {
        outer: Loop {
            start: [0.0, 0.0],
            segments: outer,
        },
        holes: vec![Loop {
            start: [3.0, 2.0],
            segments: vec![Segment::Arc {
                center: [2.0, 2.0],
                to: [3.0, 2.0],
                counter_clockwise: flip,
            }],
        }],
    }
}

#[test]
fn circular_hole_in_either_orientation() {
    let h = 0.25;
    for flip in [false, true] {
        for kind in [ElementKind::Tri3, ElementKind::Tri6] {
            let what = format!("square with hole, flipped={flip}, {kind}");
            let mesh = triangulate(
                &square_with_hole(flip),
                &|_| h,
                kind,
                &MesherOptions::default(),
            )
            .expect("mesh");
            assert!(check_geometry(&mesh).is_empty(), "{what}: bad elements");
            check_mid_nodes(&mesh);
            assert!(
                min_angle(&mesh) >= 20.0,
                "{what}: smallest angle {}",
                min_angle(&mesh)
            );
            let (area, exact) = (measure(&mesh), 16.0 - PI);
            let bound = arc_area_bound(kind, 1.0, TAU);
            assert!(
                area - exact >= -ROUND_OFF * exact && area - exact <= bound + ROUND_OFF * exact,
                "{what}: area {area}, exact {exact}, allowed excess {bound}"
            );
            let (corners, mids) = check_arc(&mesh, [2.0, 2.0], 1.0, 0.0, TAU);
            assert!(corners >= 24, "{what}: {corners} points on the hole");
            let expected_mids = if kind == ElementKind::Tri6 {
                corners
            } else {
                0
            };
            assert_eq!(mids, expected_mids, "{what}: mid nodes on the hole");
            // No triangle spans the hole: none has all three corners on the circle.
            for e in 0..mesh.element_count() {
                let on_circle = mesh.element(e).1[..3]
                    .iter()
                    .filter(|&&n| {
                        let p = mesh.points[n as usize];
                        ((p[0] - 2.0).hypot(p[1] - 2.0) - 1.0).abs() < 1e-9
                    })
                    .count();
                assert!(on_circle < 3, "{what}: element {e} lies in the hole");
            }
        }
    }
}

#[test]
fn boundary_edges_split_on_the_arcs() {
    // Quarter annulus 1 <= r <= 2: a convex outer arc and a concave inner one. The size field is
    // 0.5 within 0.01 of either circle but 0.05 inside, so the arcs start with 3 pieces each
    // (the 30-degree minimum) and must be split on the arc while the interior is refined.
    let domain = Domain {
        outer: Loop {
            start: [1.0, 0.0],
            segments: vec![
                line(2.0, 0.0),
                Segment::Arc {
                    center: [0.0, 0.0],
                    to: [0.0, 2.0],
                    counter_clockwise: true,
                },
                line(0.0, 1.0),
                Segment::Arc {
                    center: [0.0, 0.0],
                    to: [1.0, 0.0],
                    counter_clockwise: false,
                },
            ],
        },
        holes: vec![],
    };
    let h = |p: [f64; 2]| {
        let r = p[0].hypot(p[1]);
        if (r - 1.0).abs() < 0.01 || (r - 2.0).abs() < 0.01 {
            0.5
        } else {
            0.05
        }
    };
    for kind in [ElementKind::Tri3, ElementKind::Tri6] {
        let mesh = triangulate(&domain, &h, kind, &MesherOptions::default()).expect("mesh");
        assert!(check_geometry(&mesh).is_empty(), "{kind}: bad elements");
        check_mid_nodes(&mesh);
        assert!(
            min_angle(&mesh) >= 20.0,
            "{kind}: smallest angle {}",
            min_angle(&mesh)
        );
        for r in [1.0, 2.0] {
            let (corners, mids) = check_arc(&mesh, [0.0, 0.0], r, 0.0, FRAC_PI_2);
            assert!(
                corners > 4,
                "{kind}: only {corners} points on r = {r}: no split"
            );
            let expected_mids = if kind == ElementKind::Tri6 {
                corners - 1
            } else {
                0
            };
            assert_eq!(mids, expected_mids, "{kind}: mid nodes on r = {r}");
        }
        // The outer arc loses area, the inner one adds: each within its bound (header).
        let (area, exact) = (measure(&mesh), 0.75 * PI);
        let (loss, gain) = (
            arc_area_bound(kind, 2.0, FRAC_PI_2),
            arc_area_bound(kind, 1.0, FRAC_PI_2),
        );
        assert!(
            area >= exact - loss - ROUND_OFF && area <= exact + gain + ROUND_OFF,
            "{kind}: area {area}, exact {exact}, allowed -{loss} / +{gain}"
        );
    }
}

#[test]
fn small_input_angles_end_with_valid_meshes() {
    // A thin triangle with a 5 or 10 degree corner at the origin: no triangle there can have
    // angles above the corner's own, so shape refinement gives up near it (the exception of the
    // minimum-angle requirement); away from it (centroid beyond 0.2) the 20 degrees hold.
    for degrees in [5.0_f64, 10.0] {
        let tip = degrees.to_radians();
        let domain = Domain {
            outer: Loop {
                start: [0.0, 0.0],
                segments: vec![line(1.0, 0.0), line(1.0, tip.tan()), line(0.0, 0.0)],
            },
            holes: vec![],
        };
        let mesh = triangulate(
            &domain,
            &|_| 0.05,
            ElementKind::Tri3,
            &MesherOptions::default(),
        )
        .expect("mesh");
        assert!(check_geometry(&mesh).is_empty(), "{degrees}: bad elements");
        let area = 0.5 * tip.tan();
        assert!(
            (measure(&mesh) - area).abs() <= ROUND_OFF * area,
            "{degrees}: area"
        );
        // Round-off in the angle of the input corner (acos near 1 loses digits): 1e-6 degrees.
        assert!(
            min_angle(&mesh) >= degrees - 1e-6,
            "{degrees}: {}",
            min_angle(&mesh)
        );
        let mut far = mesh.clone();
        let keep: Vec<usize> = (0..mesh.element_count())
            .filter(|&e| {
                let c = mesh.centroid(e);
                c[0].hypot(c[1]) > 0.2
            })
            .collect();
        far.blocks[0].nodes = keep
            .iter()
            .flat_map(|&e| mesh.element(e).1.to_vec())
            .collect();
        far.file_cell = (0..keep.len() as u32).collect();
        far.zone = vec![0; keep.len()];
        assert!(
            min_angle(&far) >= 20.0,
            "{degrees}: away from the tip {}",
            min_angle(&far)
        );
    }
}
