//! The mesher refuses bad domains, size fields and options with a typed error that names the
//! loop, the segment and the numbers involved.

use hone::element::ElementKind;
use hone::reference::meshes::{
    triangulate, Domain, Loop, LoopId, MeshError, MesherOptions, Segment,
};

fn line(x: f64, y: f64) -> Segment {
    Segment::Line { to: [x, y] }
}

fn square_loop(x0: f64, y0: f64, side: f64) -> Loop {
    Loop {
        start: [x0, y0],
        segments: vec![
            line(x0 + side, y0),
            line(x0 + side, y0 + side),
            line(x0, y0 + side),
            line(x0, y0),
        ],
    }
}

fn outer_only(outer: Loop) -> Domain {
    Domain {
        outer,
        holes: vec![],
    }
}

fn circle(centre: [f64; 2], r: f64) -> Loop {
    Loop {
        start: [centre[0] + r, centre[1]],
        segments: vec![Segment::Arc {
            center: centre,
            to: [centre[0] + r, centre[1]],
            counter_clockwise: false,
        }],
    }
}

fn mesh(domain: &Domain) -> Result<hone::mesh::Mesh, MeshError> {
    triangulate(
        domain,
        &|_| 0.1,
        ElementKind::Tri3,
        &MesherOptions::default(),
    )
}

#[test]
fn open_loop_names_both_ends() {
    let mut lp = square_loop(0.0, 0.0, 1.0);
    lp.segments.pop();
    let err = mesh(&outer_only(lp)).unwrap_err();
    assert!(matches!(
        err,
        MeshError::OpenLoop { boundary: LoopId::Outer, end_x, end_y, .. } if end_x == 0.0 && end_y == 1.0
    ));
    let text = err.to_string();
    assert!(
        text.contains("outer loop") && text.contains("(0, 1)"),
        "{text}"
    );
}

#[test]
fn arc_ends_off_the_circle() {
    let domain = Domain {
        outer: square_loop(-2.0, -2.0, 4.0),
        holes: vec![Loop {
            start: [1.0, 0.0],
            segments: vec![
                Segment::Arc {
                    center: [0.0, 0.0],
                    to: [0.0, 1.1],
                    counter_clockwise: true,
                },
                line(1.0, 0.0),
            ],
        }],
    };
    let err = mesh(&domain).unwrap_err();
    match &err {
        MeshError::ArcEndsOffCircle {
            boundary,
            segment,
            start_radius,
            end_radius,
            ..
        } => {
            assert_eq!((*boundary, *segment), (LoopId::Hole(0), 0));
            assert_eq!(*start_radius, 1.0);
            assert!((end_radius - 1.1).abs() < 1e-15);
        }
        other => panic!("unexpected {other:?}"),
    }
    assert!(err.to_string().contains("hole 0, segment 0"), "{err}");
}

#[test]
fn crossing_and_touching_boundaries() {
    // Bow-tie: the first and third segments cross.
    let bow_tie = Loop {
        start: [0.0, 0.0],
        segments: vec![
            line(1.0, 1.0),
            line(1.0, 0.0),
            line(0.0, 1.0),
            line(0.0, 0.0),
        ],
    };
    assert!(matches!(
        mesh(&outer_only(bow_tie)),
        Err(MeshError::SelfIntersecting {
            boundary: LoopId::Outer,
            ..
        })
    ));
    // Two overlapping holes.
    let overlapping = Domain {
        outer: square_loop(0.0, 0.0, 10.0),
        holes: vec![circle([4.0, 5.0], 2.0), circle([6.0, 5.0], 2.0)],
    };
    assert!(matches!(
        mesh(&overlapping),
        Err(MeshError::SelfIntersecting {
            boundary: LoopId::Hole(1),
            ..
        })
    ));
    // A hole whose corner lies on the outer boundary.
    let touching = Domain {
        outer: square_loop(0.0, 0.0, 4.0),
        holes: vec![square_loop(0.0, 1.0, 1.0)],
    };
    assert!(matches!(
        mesh(&touching),
        Err(MeshError::SelfIntersecting { .. })
    ));
}

#[test]
fn misplaced_holes() {
    let outside = Domain {
        outer: square_loop(0.0, 0.0, 4.0),
        holes: vec![circle([10.0, 10.0], 1.0)],
    };
    assert!(matches!(
        mesh(&outside),
        Err(MeshError::MisplacedHole {
            boundary: LoopId::Hole(0)
        })
    ));
    let nested = Domain {
        outer: square_loop(0.0, 0.0, 10.0),
        holes: vec![circle([5.0, 5.0], 3.0), circle([5.0, 5.0], 1.0)],
    };
    assert!(matches!(
        mesh(&nested),
        Err(MeshError::MisplacedHole {
            boundary: LoopId::Hole(1)
        })
    ));
}

#[test]
fn degenerate_empty_and_non_finite_loops() {
    let mut repeated = square_loop(0.0, 0.0, 1.0);
    repeated.segments.insert(1, line(1.0, 0.0));
    assert!(matches!(
        mesh(&outer_only(repeated)),
        Err(MeshError::DegenerateSegment {
            boundary: LoopId::Outer,
            segment: 1,
            ..
        })
    ));
    let empty = Loop {
        start: [0.0, 0.0],
        segments: vec![],
    };
    assert!(matches!(
        mesh(&outer_only(empty)),
        Err(MeshError::EmptyLoop {
            boundary: LoopId::Outer
        })
    ));
    let mut not_finite = square_loop(0.0, 0.0, 1.0);
    not_finite.segments[2] = line(f64::NAN, 1.0);
    assert!(matches!(
        mesh(&outer_only(not_finite)),
        Err(MeshError::NotFinite { segment: 2, .. })
    ));
}

#[test]
fn bad_size_fields() {
    let domain = outer_only(square_loop(0.0, 0.0, 1.0));
    let options = MesherOptions::default();
    for value in [0.0, -1.0, f64::NAN, f64::INFINITY] {
        let err = triangulate(&domain, &move |_| value, ElementKind::Tri3, &options).unwrap_err();
        assert!(
            matches!(err, MeshError::NonPositiveSize { value: v, .. } if v.to_bits() == value.to_bits()),
            "{value}: {err:?}"
        );
    }
    // Negative only in the interior right half: found while refining, reported where.
    let half = |p: [f64; 2]| {
        if p[0] > 0.6 && p[0] < 0.9 && p[1] > 0.1 && p[1] < 0.9 {
            -1.0
        } else {
            0.2
        }
    };
    match triangulate(&domain, &half, ElementKind::Tri3, &options) {
        Err(MeshError::NonPositiveSize { x, value, .. }) => {
            assert!(x > 0.6 && x < 0.9 && value == -1.0);
        }
        other => panic!("unexpected {other:?}"),
    }
}

#[test]
fn point_cap_kind_and_angle_limits() {
    let domain = outer_only(square_loop(0.0, 0.0, 1.0));
    let capped = MesherOptions {
        max_points: 50,
        ..MesherOptions::default()
    };
    // h = 0.01 needs about 13 000 points.
    assert!(matches!(
        triangulate(&domain, &|_| 0.01, ElementKind::Tri3, &capped),
        Err(MeshError::PointCapReached { cap: 50 })
    ));
    // A cap below the boundary's own point count fails while discretising the boundary.
    assert!(matches!(
        triangulate(&domain, &|_| 0.001, ElementKind::Tri3, &capped),
        Err(MeshError::PointCapReached { cap: 50 })
    ));
    for kind in [ElementKind::Quad4, ElementKind::Tet4] {
        assert!(matches!(
            triangulate(&domain, &|_| 0.1, kind, &MesherOptions::default()),
            Err(MeshError::UnsupportedKind { .. })
        ));
    }
    for angle in [-1.0, 40.0, f64::NAN] {
        let options = MesherOptions {
            min_angle_deg: angle,
            ..MesherOptions::default()
        };
        assert!(matches!(
            triangulate(&domain, &|_| 0.1, ElementKind::Tri3, &options),
            Err(MeshError::InvalidParameter {
                name: "min_angle_deg",
                ..
            })
        ));
    }
}
