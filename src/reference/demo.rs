//! The demo scenario: a steel deck plate of a small work boat with a rectangular hatch opening,
//! in plane tension from hull bending. Invented data for demonstration only, never a check
//! value.
//!
//! ```text
//!  y ^  quarter model (symmetry: u_x = 0 on x = 0, u_y = 0 on y = 0)
//! 400 +--------------------------------+
//!     |                                |
//!     |                                | <- 60 MPa on x = 600
//! 125 +--------+  corner: sharp (270 deg re-entrant) or rounded R 40
//!     | opening|                       |
//!   0 +--------+-----------------------+--> x
//!     0       200                     600       units mm, N, MPa; plate 8 mm thick
//! ```
//! 2D: plane stress, tri6 from hone's mesher. 3D: half the thickness (u_z = 0 on the
//! mid-plane z = 0), the same triangles extruded into tet10.

use super::meshes::{extrude, triangulate, Domain, Loop, MeshError, MesherOptions, Segment};
use super::solver::{
    fix_component, select_facets, solve, BoundaryConditions, SolveError, SolveOptions, TractionLoad,
};
use crate::element::ElementKind;
use crate::material::{AnalysisMode, Material, MaterialMap};
use crate::mesh::{Mesh, Model};
use std::sync::Arc;
use thiserror::Error;

/// Panel half-length (x), half-width (y), opening half-length and half-width, corner radius,
/// thickness, applied tension.
pub const PANEL: [f64; 2] = [600.0, 400.0];
/// Half sizes of the opening.
pub const OPENING: [f64; 2] = [200.0, 125.0];
/// Corner radius of the rounded variant.
pub const CORNER_RADIUS: f64 = 40.0;
/// Plate thickness.
pub const THICKNESS: f64 = 8.0;
/// Tension on the edge x = 600.
pub const TENSION: f64 = 60.0;
/// Steel.
pub const MATERIAL: Material = Material {
    youngs: 206_000.0,
    poisson: 0.3,
};

/// [`MATERIAL`], plane stress and [`THICKNESS`] as `hone` command-line flags, for running the
/// commands on the 2D demo files.
pub const PLATE_FLAGS: [&str; 7] = [
    "--youngs",
    "206000",
    "--poisson",
    "0.3",
    "--plane-stress",
    "--thickness",
    "8",
];

/// The two corner variants.
#[derive(Copy, Clone, Debug, PartialEq, Eq)]
pub enum Corner {
    /// Sharp re-entrant corner.
    Sharp,
    /// Rounded with radius 40 mm.
    Rounded,
}

impl Corner {
    /// Name used in file names.
    pub fn name(self) -> &'static str {
        match self {
            Corner::Sharp => "sharp",
            Corner::Rounded => "rounded",
        }
    }
}

/// Why the demo model could not be built.
#[derive(Debug, Error)]
pub enum DemoError {
    /// Meshing failed.
    #[error("meshing the demo plate: {0}")]
    Mesh(#[from] MeshError),
    /// Solving failed.
    #[error("solving the demo plate: {0}")]
    Solve(#[from] SolveError),
}

/// The quarter plate outline (counter-clockwise).
pub fn domain(corner: Corner) -> Domain {
    let [l, w] = PANEL;
    let [a, b] = OPENING;
    let mut segments = vec![
        Segment::Line { to: [l, 0.0] },
        Segment::Line { to: [l, w] },
        Segment::Line { to: [0.0, w] },
        Segment::Line { to: [0.0, b] },
    ];
    match corner {
        Corner::Sharp => {
            segments.push(Segment::Line { to: [a, b] });
        }
        Corner::Rounded => {
            let r = CORNER_RADIUS;
            segments.push(Segment::Line { to: [a - r, b] });
            segments.push(Segment::Arc {
                center: [a - r, b - r],
                to: [a, b - r],
                counter_clockwise: false,
            });
        }
    }
    segments.push(Segment::Line { to: [a, 0.0] });
    Domain {
        outer: Loop {
            start: [a, 0.0],
            segments,
        },
        holes: Vec::new(),
    }
}

/// Target element size: `far` away from the corner, shrinking linearly towards it. Every size
/// is proportional to `far`, so halving `far` halves the mesh size everywhere (a systematic
/// refinement, as a convergence study needs).
fn size_field(far: f64) -> impl Fn([f64; 2]) -> f64 + Sync {
    move |p: [f64; 2]| {
        let d = ((p[0] - OPENING[0]).powi(2) + (p[1] - OPENING[1]).powi(2)).sqrt();
        (far * (0.25 + 0.006 * d)).min(far)
    }
}

/// The 2D tri6 mesh of a variant with far-field size `far` (mm).
pub fn plate_mesh(corner: Corner, far: f64) -> Result<Mesh, DemoError> {
    Ok(triangulate(
        &domain(corner),
        &size_field(far),
        ElementKind::Tri6,
        &MesherOptions::default(),
    )?)
}

/// Solves the plate on `mesh` (2D plane stress, or a 3D half-thickness mesh).
pub fn solve_plate(mesh: &Mesh) -> Result<Model, DemoError> {
    let three_d = mesh.dimension == 3;
    let tol = 1e-6;
    let mut constraints = Vec::new();
    constraints.extend(fix_component(mesh, 0, |p| p[0].abs() < tol));
    constraints.extend(fix_component(mesh, 1, |p| p[1].abs() < tol));
    if three_d {
        constraints.extend(fix_component(mesh, 2, |p| p[2].abs() < tol));
    }
    let load = TractionLoad {
        facets: select_facets(mesh, |f| f.iter().all(|p| (p[0] - PANEL[0]).abs() < tol)),
        traction: Arc::new(|_, _| [TENSION, 0.0, 0.0]),
    };
    let mode = if three_d {
        AnalysisMode::Solid3d
    } else {
        AnalysisMode::PlaneStress {
            thickness: THICKNESS,
        }
    };
    let bc = BoundaryConditions {
        constraints,
        tractions: vec![load],
        ..Default::default()
    };
    let solution = solve(
        mesh,
        &MaterialMap::Single(MATERIAL),
        mode,
        &bc,
        &SolveOptions::default(),
    )?;
    Ok(Model {
        mesh: mesh.clone(),
        displacement: solution.displacement,
    })
}

/// The 3D tet10 mesh: the 2D triangles extruded through half the thickness in `layers` layers.
pub fn solid_mesh(mesh2d: &Mesh, layers: usize) -> Result<Mesh, DemoError> {
    Ok(extrude(
        mesh2d,
        THICKNESS / 2.0,
        layers,
        ElementKind::Tet10,
    )?)
}
