//! Screening on the reference problems, the demo files and hand-made meshes.
//!
//! Check values: Williams mode I exponents from the method sheet 4.1 table (Williams 1952,
//! "Stress singularities resulting from various boundary conditions in angular corners of plates
//! in extension", J. Appl. Mech. 19:526-528), printed to 10 decimals, so compared to 1e-9
//! relative; clamped-free exponents from the method sheet 4.2 table, printed to 4 decimals, so
//! compared to half a unit of the last digit. Angles of straight-edged corners are exact up to
//! round-off of a few trigonometric evaluations: 1e-9 deg.

use super::*;
use crate::element::ElementKind;
use crate::material::Material;
use crate::mesh::generate::structured;
use crate::mesh::{CellBlock, Mesh};
use crate::reference::meshes::{self, extrude, triangulate, Domain, Loop, MesherOptions, Segment};
use crate::reference::problems;
use crate::reference::solver::{
    fix_component, select_facets, solve, BoundaryConditions, SolveOptions, TractionLoad,
};
use std::sync::Arc;

/// Williams mode I at 270 deg (method sheet 4.1, Williams 1952).
const LAMBDA_270: f64 = 0.5444837368;
/// Williams mode I at 240 deg (method sheet 4.1, Williams 1952).
const LAMBDA_240: f64 = 0.6157310595;
/// Clamped-free, 90 deg, nu = 0.3: plane strain and plane stress (method sheet 4.2 \[V\]).
const CLAMPED_90_STRAIN: f64 = 0.7112;
const CLAMPED_90_STRESS: f64 = 0.7583;

/// Straight-edged angles: round-off only (module docs).
const ANGLE_TOL_DEG: f64 = 1e-9;

fn close_rel(a: f64, b: f64, rel: f64) -> bool {
    (a - b).abs() <= rel * b.abs()
}

fn plane_strain(nu: f64) -> ScreeningOptions {
    ScreeningOptions::new(AnalysisMode::PlaneStrain, PoissonRatio::Single(nu))
}

/// A model whose every node moves by the same nonzero vector: no node is held.
fn translated(mesh: Mesh) -> Model {
    let displacement = vec![[1.0e-3, -2.0e-3, 5.0e-4]; mesh.node_count()];
    let displacement = if mesh.dimension == 2 {
        displacement.iter().map(|u| [u[0], u[1], 0.0]).collect()
    } else {
        displacement
    };
    Model { mesh, displacement }
}

fn dist(p: [f64; 3], q: [f64; 3]) -> f64 {
    ((p[0] - q[0]).powi(2) + (p[1] - q[1]).powi(2) + (p[2] - q[2]).powi(2)).sqrt()
}

#[test]
fn l_shape_has_one_reentrant_corner() {
    // method sheet 5.5: L-shape (-1,1)^2 minus the quadrant x > 0, y < 0, re-entrant corner of
    // 270 deg at the origin; the problem holds that corner node (u = 0), which does not make its
    // edges supported (their other nodes move).
    for kind in [ElementKind::Tri3, ElementKind::Quad4, ElementKind::Tri6] {
        let solved = problems::l_shape(kind, 4).solve().unwrap();
        let s = screen(&solved.model, &plane_strain(0.3)).unwrap();
        assert_eq!(s.spots.len(), 1, "{kind}: {:?}", s.spots);
        let spot = &s.spots[0];
        assert_eq!(spot.kind, SpotKind::ReentrantCorner);
        assert!(dist(spot.location, [0.0, 0.0, 0.0]) < 1e-12);
        assert!((spot.angle_deg - 270.0).abs() < ANGLE_TOL_DEG, "{kind}");
        assert!(close_rel(spot.lambda, LAMBDA_270, 1e-9), "{kind}");
        assert!(!spot.lambda_assumed);
        // exactly the elements having the corner node are marked
        let corner = spot.nodes[0];
        for e in 0..solved.model.mesh.element_count() {
            let has = solved.model.mesh.element(e).1.contains(&corner);
            assert_eq!(s.element_spot[e], has.then_some(0), "{kind} element {e}");
        }
        assert!(spot.sentence().contains("fillet radius"));
    }
}

#[test]
fn interface_between_zones_is_not_a_boundary() {
    // the L-shape split into two zones along x = 0: the interface is no outer boundary, so the
    // only spot stays the re-entrant corner (and the Poisson map is never asked for)
    let mut model = problems::l_shape(ElementKind::Quad4, 4)
        .solve()
        .unwrap()
        .model;
    for e in 0..model.mesh.element_count() {
        model.mesh.zone[e] = if model.mesh.centroid(e)[0] < 0.0 {
            1
        } else {
            2
        };
    }
    let options = ScreeningOptions::new(
        AnalysisMode::PlaneStrain,
        PoissonRatio::ByZone(BTreeMap::new()),
    );
    let s = screen(&model, &options).unwrap();
    assert_eq!(s.spots.len(), 1);
    assert_eq!(s.spots[0].kind, SpotKind::ReentrantCorner);
}

#[test]
fn hole_arc_is_not_reentrant() {
    // Kirsch quarter plate (method sheet 5.1): 2n segments on the quarter hole. Straight-edged
    // tri3 with 8 segments per quarter turn by 11.25 deg per node, under the 15 deg tolerance;
    // quad8 with mid nodes on the arc measure close to 180 deg even with 4 segments.
    for (kind, n) in [(ElementKind::Tri3, 4), (ElementKind::Quad8, 2)] {
        let problem = problems::kirsch(kind, n);
        let solved = problem.solve().unwrap();
        let options = ScreeningOptions::new(problem.mode, PoissonRatio::Single(0.3));
        let s = screen(&solved.model, &options).unwrap();
        assert!(s.spots.is_empty(), "{kind}: {:?}", s.spots);
        assert!(s.element_spot.iter().all(Option::is_none));
    }
    // the tolerance is what keeps the tri3 arc out: with 5 deg every arc node is flagged, at
    // 180 + 90/8 deg
    let solved = problems::kirsch(ElementKind::Tri3, 4).solve().unwrap();
    let mut options = plane_strain(0.3);
    options.mode = AnalysisMode::PlaneStress { thickness: 1.0 };
    options.angle_tolerance_deg = 5.0;
    let s = screen(&solved.model, &options).unwrap();
    assert_eq!(s.spots.len(), 7, "{:?}", s.spots);
    for spot in &s.spots {
        assert!((spot.angle_deg - 191.25).abs() < 1e-9);
    }
}

/// Outline with a 240 deg corner at the origin: material from polar angle 0 to 240 deg.
fn notch_240() -> Domain {
    let t = 240f64.to_radians();
    let line = |x: f64, y: f64| Segment::Line { to: [x, y] };
    Domain {
        outer: Loop {
            start: [0.0, 0.0],
            segments: vec![
                line(1.0, 0.0),
                line(1.0, 1.0),
                line(-1.0, 1.0),
                line(-1.0, -1.0),
                line(t.cos(), t.sin()),
                line(0.0, 0.0),
            ],
        },
        holes: Vec::new(),
    }
}

#[test]
fn notch_of_240_degrees() {
    for kind in [ElementKind::Tri3, ElementKind::Tri6] {
        let mesh = triangulate(&notch_240(), &|_| 0.25, kind, &MesherOptions::default()).unwrap();
        let s = screen(&translated(mesh), &plane_strain(0.3)).unwrap();
        assert_eq!(s.spots.len(), 1, "{kind}: {:?}", s.spots);
        let spot = &s.spots[0];
        assert_eq!(spot.kind, SpotKind::ReentrantCorner);
        assert!(dist(spot.location, [0.0; 3]) < 1e-12);
        assert!((spot.angle_deg - 240.0).abs() < ANGLE_TOL_DEG);
        assert!(close_rel(spot.lambda, LAMBDA_240, 1e-9));
    }
}

fn demo_model(name: &str) -> Model {
    let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("meshes")
        .join(name);
    let raw = crate::io::read_results(&path).unwrap();
    crate::io::build_model(&raw, name, &crate::io::ModelOptions::default())
        .unwrap()
        .0
}

#[test]
fn demo_sharp_corner_flagged_rounded_not() {
    // demo scenario: quarter deck plate, symmetry (one component held) on x = 0 and y = 0, so
    // no node is held in every component and no clamped-free spot exists; the sharp variant has
    // the 270 deg opening corner at (200, 125), the rounded one a 40 mm radius there.
    let stress = ScreeningOptions::new(
        AnalysisMode::PlaneStress { thickness: 8.0 },
        PoissonRatio::Single(0.3),
    );
    let sharp = screen(&demo_model("deck_sharp_tri6.vtu"), &stress).unwrap();
    assert_eq!(sharp.spots.len(), 1, "{:?}", sharp.spots);
    let spot = &sharp.spots[0];
    assert_eq!(spot.kind, SpotKind::ReentrantCorner);
    assert!(dist(spot.location, [200.0, 125.0, 0.0]) < 1e-9);
    assert!((spot.angle_deg - 270.0).abs() < ANGLE_TOL_DEG);
    assert!(close_rel(spot.lambda, LAMBDA_270, 1e-9));
    let rounded = screen(&demo_model("deck_rounded_tri6.vtu"), &stress).unwrap();
    assert!(rounded.spots.is_empty(), "{:?}", rounded.spots);

    // 3D: the same corner is an edge through the half thickness, z in [0, 4]; the mid-plane
    // z = 0 holds u_z only
    let solid = ScreeningOptions::new(AnalysisMode::Solid3d, PoissonRatio::Single(0.3));
    let sharp = screen(&demo_model("deck_sharp_tet10.vtu"), &solid).unwrap();
    assert_eq!(sharp.spots.len(), 1, "{:?}", sharp.spots);
    let spot = &sharp.spots[0];
    assert_eq!(spot.kind, SpotKind::ReentrantEdge);
    let mesh = &demo_model("deck_sharp_tet10.vtu").mesh;
    for &n in &spot.nodes {
        let p = mesh.points[n as usize];
        assert!((p[0] - 200.0).abs() < 1e-9 && (p[1] - 125.0).abs() < 1e-9);
    }
    assert!(
        spot.nodes.len() >= 3,
        "two or more layers: {:?}",
        spot.nodes
    );
    assert!((spot.angle_deg - 270.0).abs() < ANGLE_TOL_DEG);
    assert!(close_rel(spot.lambda, LAMBDA_270, 1e-9));
    let rounded = screen(&demo_model("deck_rounded_tet10.vtu"), &solid).unwrap();
    assert!(rounded.spots.is_empty(), "{:?}", rounded.spots);
}

/// `mesh` held in every component on x = 0, loaded by a uniform `traction` on x = `length`,
/// solved with E = 1000, nu = 0.3.
fn held_at_x0(mesh: Mesh, mode: AnalysisMode, length: f64, traction: [f64; 3]) -> Model {
    let mut constraints = Vec::new();
    for c in 0..mesh.dimension {
        constraints.extend(fix_component(&mesh, c, |p| p[0].abs() < 1e-9));
    }
    let load = TractionLoad {
        facets: select_facets(&mesh, |f| f.iter().all(|p| (p[0] - length).abs() < 1e-9)),
        traction: Arc::new(move |_, _| traction),
    };
    let bc = BoundaryConditions {
        constraints,
        tractions: vec![load],
        ..Default::default()
    };
    let material = MaterialMap::Single(Material {
        youngs: 1000.0,
        poisson: 0.3,
    });
    let solution = solve(&mesh, &material, mode, &bc, &SolveOptions::default()).unwrap();
    Model {
        mesh,
        displacement: solution.displacement,
    }
}

/// Beam `[0, 4] x [0, 1]` held on x = 0, shear on x = 4.
fn cantilever_2d(kind: ElementKind, mode: AnalysisMode) -> Model {
    let mesh = structured(kind, [8, 2, 1], [4.0, 1.0, 1.0]);
    held_at_x0(mesh, mode, 4.0, [0.0, -1.0, 0.0])
}

#[test]
fn cantilever_clamped_corners() {
    // the two ends of the held edge are 90 deg clamped-free corners (method sheet 4.2); the
    // held edge's inner nodes (180 deg, held on both sides) and the free corners are not spots
    for (mode, expected) in [
        (AnalysisMode::PlaneStrain, CLAMPED_90_STRAIN),
        (
            AnalysisMode::PlaneStress { thickness: 1.0 },
            CLAMPED_90_STRESS,
        ),
    ] {
        for kind in [ElementKind::Quad4, ElementKind::Tri6] {
            let model = cantilever_2d(kind, mode);
            let options = ScreeningOptions::new(mode, PoissonRatio::Single(0.3));
            let s = screen(&model, &options).unwrap();
            assert_eq!(s.spots.len(), 2, "{kind}: {:?}", s.spots);
            let mut ys: Vec<f64> = s.spots.iter().map(|s| s.location[1]).collect();
            ys.sort_by(f64::total_cmp);
            assert_eq!(ys, [0.0, 1.0]);
            for spot in &s.spots {
                assert_eq!(spot.kind, SpotKind::ClampedFreeCorner);
                assert_eq!(spot.location[0], 0.0);
                assert!((spot.angle_deg - 90.0).abs() < ANGLE_TOL_DEG);
                assert!((spot.lambda - expected).abs() <= 5e-5, "{}", spot.lambda);
                assert!(spot.sentence().contains("support stiffness"));
            }
        }
    }
}

#[test]
fn extruded_l_shape_has_one_reentrant_edge() {
    // the L-shape through a thickness of 0.5 in 3 layers: the corner line x = y = 0 is one
    // singular edge of 270 deg carrying the 2D exponent (method sheet 4.3, 3D note)
    let planar = meshes::l_shape(ElementKind::Tri3, 1.0, 3);
    for kind in [ElementKind::Tet4, ElementKind::Wedge6] {
        let mesh = extrude(&planar, 0.5, 3, kind).unwrap();
        let options = ScreeningOptions::new(AnalysisMode::Solid3d, PoissonRatio::Single(0.3));
        let s = screen(&translated(mesh.clone()), &options).unwrap();
        assert_eq!(s.spots.len(), 1, "{kind}: {:?}", s.spots);
        let spot = &s.spots[0];
        assert_eq!(spot.kind, SpotKind::ReentrantEdge);
        assert_eq!(spot.nodes.len(), 4, "{kind}: one node per level");
        for &n in &spot.nodes {
            let p = mesh.points[n as usize];
            assert!(p[0].abs() < 1e-12 && p[1].abs() < 1e-12);
        }
        assert!(spot.location[0].abs() < 1e-12 && spot.location[1].abs() < 1e-12);
        assert!((spot.angle_deg - 270.0).abs() < ANGLE_TOL_DEG, "{kind}");
        assert!(close_rel(spot.lambda, LAMBDA_270, 1e-9));
        // every element with a node on the corner line is marked, no other
        let marked = s.element_spot.iter().filter(|m| m.is_some()).count();
        let touching = (0..mesh.element_count())
            .filter(|&e| mesh.element(e).1.iter().any(|n| spot.nodes.contains(n)))
            .count();
        assert_eq!(marked, touching);
    }
}

/// Block `[0, 2] x [0, 1] x [0, 1]` of hex8 held on x = 0, pulled and sheared on x = 2.
fn clamped_block() -> Model {
    let mesh = structured(ElementKind::Hex8, [4, 2, 2], [2.0, 1.0, 1.0]);
    held_at_x0(mesh, AnalysisMode::Solid3d, 2.0, [1.0, -0.5, 0.25])
}

#[test]
fn clamped_face_gives_clamped_free_edges() {
    // the rim of the held face x = 0 is one connected chain of 90 deg edges where the held face
    // meets the four free sides: one clamped-free edge, lambda of the plane-strain 90 deg
    // corner (method sheet 4.2, 4.3)
    let model = clamped_block();
    let options = ScreeningOptions::new(AnalysisMode::Solid3d, PoissonRatio::Single(0.3));
    let s = screen(&model, &options).unwrap();
    assert_eq!(s.spots.len(), 1, "{:?}", s.spots);
    let spot = &s.spots[0];
    assert_eq!(spot.kind, SpotKind::ClampedFreeEdge);
    assert!((spot.angle_deg - 90.0).abs() < ANGLE_TOL_DEG);
    assert!((spot.lambda - CLAMPED_90_STRAIN).abs() <= 5e-5);
    // the rim of a 2 x 2 face: 8 vertex nodes, all at x = 0
    assert_eq!(spot.nodes.len(), 8);
    for &n in &spot.nodes {
        assert_eq!(model.mesh.points[n as usize][0], 0.0);
    }
    assert_eq!(spot.location[0], 0.0);

    // a face moved by a tiny amount is free: no support, no spot
    let mut nudged = model.clone();
    for (p, u) in nudged
        .mesh
        .points
        .iter()
        .zip(nudged.displacement.iter_mut())
    {
        if p[0] == 0.0 {
            u[1] = 1e-30;
        }
    }
    let s = screen(&nudged, &options).unwrap();
    assert!(s.spots.is_empty(), "{:?}", s.spots);
}

#[test]
fn user_points_snap_to_nodes() {
    let model = problems::l_shape(ElementKind::Quad4, 4)
        .solve()
        .unwrap()
        .model;
    let mut options = plane_strain(0.3);
    options.user_points = vec![
        [0.01, -0.02, 0.0], // next to the re-entrant corner: takes its values
        [-0.49, 0.52, 0.0], // inside: assumed crack-tip exponent, angle 360
        [-1.0, 0.26, 0.0],  // on the straight edge x = -1: 180 deg, assumed
    ];
    let s = screen(&model, &options).unwrap();
    assert_eq!(s.spots.len(), 4);
    let [corner, at_corner, inside, edge] = [&s.spots[0], &s.spots[1], &s.spots[2], &s.spots[3]];
    assert_eq!(at_corner.kind, SpotKind::User);
    assert_eq!(at_corner.nodes, corner.nodes);
    assert_eq!(at_corner.lambda, corner.lambda);
    assert!(!at_corner.lambda_assumed);
    // quad4, 4 cells per unit: nodes on a 0.25 lattice
    assert!(dist(inside.location, [-0.5, 0.5, 0.0]) < 1e-12);
    assert_eq!(inside.angle_deg, 360.0);
    assert_eq!(inside.lambda, ASSUMED_LAMBDA);
    assert!(inside.lambda_assumed);
    assert!(inside.sentence().contains("assumed"));
    assert!(dist(edge.location, [-1.0, 0.25, 0.0]) < 1e-12);
    assert!((edge.angle_deg - 180.0).abs() < ANGLE_TOL_DEG);
    assert!(edge.lambda_assumed);
    // elements at the corner keep the screened corner (same lambda, lower index); the others
    // take the spot whose node they contain
    for e in 0..model.mesh.element_count() {
        let nodes = model.mesh.element(e).1;
        let expected = [(corner, 0), (inside, 2), (edge, 3)]
            .iter()
            .find(|(spot, _)| nodes.contains(&spot.nodes[0]))
            .map(|&(_, i)| i);
        assert_eq!(s.element_spot[e], expected, "element {e}");
    }
}

#[test]
fn odd_meshes_do_not_panic() {
    // one triangle among isolated points, with zero and with nonzero displacement
    let mesh = Mesh {
        points: vec![
            [4.0, 5.0, 0.0],
            [0.0, 0.0, 0.0],
            [1.0, 0.0, 0.0],
            [0.0, 1.0, 0.0],
            [-3.0, 2.0, 0.0],
        ],
        blocks: vec![CellBlock {
            kind: ElementKind::Tri3,
            nodes: vec![1, 2, 3],
            first_element: 0,
        }],
        file_cell: vec![0],
        zone: vec![0],
        dimension: 2,
    };
    let mut options = plane_strain(0.3);
    options.user_points = vec![[4.0, 5.0, 0.0]];
    for u in [[0.0; 3], [1.0, 0.0, 0.0]] {
        let model = Model {
            mesh: mesh.clone(),
            displacement: vec![u; 5],
        };
        let s = screen(&model, &options).unwrap();
        // the isolated point is no vertex: the user point lands on the triangle's corner (0,1)
        assert_eq!(s.spots.len(), 1, "{:?}", s.spots);
        assert_eq!(s.spots[0].nodes, [3]);
        assert!((s.spots[0].angle_deg - 45.0).abs() < ANGLE_TOL_DEG);
        assert_eq!(s.element_spot, [Some(0)]);
    }
    // the same triangle with one edge held: its corners of 90 and 45 deg where the held edge
    // ends; 90 deg is singular (0.7112), 45 deg is not (below 56.79 deg, method sheet 4.2)
    let model = Model {
        mesh: mesh.clone(),
        displacement: vec![
            [1.0, 0.0, 0.0],
            [0.0; 3],
            [0.0; 3],
            [1.0, 1.0, 0.0],
            [0.0; 3],
        ],
    };
    let s = screen(&model, &plane_strain(0.3)).unwrap();
    assert_eq!(s.spots.len(), 1, "{:?}", s.spots);
    assert_eq!(s.spots[0].nodes, [1]);
    assert!((s.spots[0].lambda - CLAMPED_90_STRAIN).abs() <= 5e-5);

    // an empty mesh: nothing to find, but user points cannot be placed
    let empty = Model {
        mesh: Mesh {
            dimension: 2,
            ..Default::default()
        },
        displacement: Vec::new(),
    };
    let s = screen(&empty, &plane_strain(0.3)).unwrap();
    assert!(s.spots.is_empty() && s.element_spot.is_empty());
    assert_eq!(screen(&empty, &options), Err(SingularError::EmptyMesh));
}

#[test]
fn bad_input_gives_typed_errors() {
    let model = problems::l_shape(ElementKind::Tri3, 2)
        .solve()
        .unwrap()
        .model;
    let mut short = model.clone();
    short.displacement.pop();
    assert!(matches!(
        screen(&short, &plane_strain(0.3)),
        Err(SingularError::DisplacementLength { .. })
    ));
    let solid = ScreeningOptions::new(AnalysisMode::Solid3d, PoissonRatio::Single(0.3));
    assert!(matches!(
        screen(&model, &solid),
        Err(SingularError::ModeDimension { .. })
    ));
    for tol in [-1.0, f64::NAN, 91.0] {
        let mut o = plane_strain(0.3);
        o.angle_tolerance_deg = tol;
        assert!(matches!(
            screen(&model, &o),
            Err(SingularError::AngleTolerance { .. })
        ));
    }
    let mut o = plane_strain(0.3);
    o.user_points = vec![[0.0, f64::INFINITY, 0.0]];
    assert!(matches!(
        screen(&model, &o),
        Err(SingularError::UserPoint { index: 1, .. })
    ));
    let mut broken = model.clone();
    broken.mesh.blocks[0].nodes[0] = 1_000_000;
    assert!(matches!(
        screen(&broken, &plane_strain(0.3)),
        Err(SingularError::BadElement { .. })
    ));
    // Poisson ratio checked where a clamped-free corner needs it
    let clamped = cantilever_2d(ElementKind::Quad4, AnalysisMode::PlaneStrain);
    assert!(matches!(
        screen(&clamped, &plane_strain(0.5)),
        Err(SingularError::Poisson { .. })
    ));
    let by_zone = ScreeningOptions::new(
        AnalysisMode::PlaneStrain,
        PoissonRatio::ByZone(BTreeMap::from([(7, 0.3)])),
    );
    assert_eq!(
        screen(&clamped, &by_zone),
        Err(SingularError::MissingZone { zone: 0 })
    );
}

#[test]
fn same_result_for_any_thread_count() {
    let model = demo_model("deck_sharp_tet10.vtu");
    let options = ScreeningOptions::new(AnalysisMode::Solid3d, PoissonRatio::Single(0.3));
    let run = |threads: usize| {
        rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .unwrap()
            .install(|| screen(&model, &options).unwrap())
    };
    assert_eq!(run(1), run(3));
}

#[test]
fn kind_names_are_plain() {
    let names: Vec<&str> = [
        SpotKind::ReentrantCorner,
        SpotKind::ReentrantEdge,
        SpotKind::ClampedFreeCorner,
        SpotKind::ClampedFreeEdge,
        SpotKind::User,
    ]
    .iter()
    .map(|k| k.as_str())
    .collect();
    assert_eq!(
        names,
        [
            "reentrant_corner",
            "reentrant_edge",
            "clamped_free_corner",
            "clamped_free_edge",
            "user"
        ]
    );
}
