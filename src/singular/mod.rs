//! Screening for singular spots: places where the exact stress has no finite value, so a
//! refinement plan must not chase it (method sheet 4.3, detection heuristics (1) and the 3D note;
//! sheet 3.4 for what the plan does with the exponent).
//!
//! Near a singular point or edge the displacements behave like `r^lambda` and the stresses like
//! `r^(lambda - 1)` with `0 < lambda < 1`; refinement makes the peak stress grow instead of
//! converge. [`screen`] finds, from the mesh and the displacement field alone:
//!
//! - **Re-entrant corners (2D).** At every vertex node of the outer boundary (facets no other
//!   element of any zone shares) the interior angle is the sum of the corner angles of the
//!   elements having the node as a vertex, measured with the edge tangents of each element's own
//!   map so that curved quadratic edges count correctly. When every boundary edge at the node is
//!   free and the angle exceeds 180 deg by more than the angle tolerance, lambda is the Williams
//!   mode I exponent of that angle (Williams 1952; method sheet 4.1), the smallest exponent for
//!   any angle above 180 deg.
//! - **Re-entrant edges (3D).** The same with the interior dihedral angle of every boundary
//!   edge (sum of the elements' dihedral angles at it); connected flagged edges form one
//!   singular edge whose angle is the length-weighted mean and whose lambda is Williams' for
//!   that angle, i.e. the plane-strain cross-section of the edge (method sheet 4.3: "re-entrant
//!   edges carry the 2D lambda of the cross-section angle"; common practice).
//! - **Clamped-free corners and edges.** A node is a support when its displacement is exactly
//!   zero in every component; a boundary facet is supported when all its nodes are. Where a
//!   supported facet meets a free one, lambda solves the clamped-free corner equation for the
//!   interior angle there (method sheet 4.2, [`clamped`]) with Kolosov's kappa:
//!   `3 - 4 nu` in plane strain and 3D (the edge's plane-strain cross-section), and also for
//!   axisymmetric models (their meridian section near a corner is treated like plane strain),
//!   `(3 - nu)/(1 + nu)` in plane stress. Flagged only when lambda < 1 (for nu = 0.3, corners
//!   above 56.79 deg in plane strain, 61.29 deg in plane stress; sheet 4.2).
//! - **User spots.** Each point given is moved to the nearest vertex node. A node already in a
//!   screened spot takes that spot's angle and lambda; otherwise the angle is the measured
//!   interior angle (360 deg inside the mesh), lambda is Williams' when the node is on the
//!   boundary with an angle above 180 deg plus the tolerance, else 0.5, the crack-tip exponent,
//!   marked as assumed (common practice for a point known to be singular whose type is unknown).
//!
//! **Angle tolerance.** A concave arc meshed with straight-edged elements (a hole) turns by
//! `90/n` deg at every node when a quarter circle has `n` segments, so the interior angle there
//! is `180 + 90/n` deg. The default tolerance of [`DEFAULT_ANGLE_TOLERANCE_DEG`] = 15 deg leaves
//! a hole with 8 or more segments per quarter (11.25 deg per node) unflagged, with margin for
//! uneven spacing (common practice: a quarter circle is usually given 8 or more segments). The
//! price: corners between 180 and 195 deg are not flagged; their exponents lie above 0.85
//! (Williams mode I, 195 deg: 0.8573, computed with [`williams::williams_mode_one`]), a mild
//! singularity. Quadratic elements with mid nodes on the arc have matching edge tangents, so
//! their arcs measure close to 180 deg and need no tolerance at all.
//!
//! Not screened: clamped-clamped corners (both faces held), point loads and point supports, and
//! 3D vertex singularities (which need a numerical eigenanalysis, sheet 4.3); symmetry planes
//! (one displacement component zero) count as free boundary.

mod angles;
mod boundary;
pub mod clamped;
mod planar;
mod solid;
pub mod williams;

use crate::material::{AnalysisMode, MaterialMap};
use crate::mesh::{BoundaryFacets, Model, NodeElements};
use clamped::{kappa_plane_strain, kappa_plane_stress};
use rayon::prelude::*;
use std::collections::BTreeMap;
use std::f64::consts::PI;
use thiserror::Error;
use williams::williams_mode_one;

/// Default angle tolerance in degrees: a boundary corner or edge is re-entrant when its interior
/// angle exceeds 180 deg by more than this (module docs: why 15).
pub const DEFAULT_ANGLE_TOLERANCE_DEG: f64 = 15.0;

/// Largest angle tolerance accepted, degrees: beyond 90 deg even a 270 deg L-shape corner
/// would go unflagged.
pub const MAX_ANGLE_TOLERANCE_DEG: f64 = 90.0;

/// Exponent taken for a user spot that is neither a screened spot nor a re-entrant boundary
/// point: the crack-tip value (Williams 1952 at 360 deg; common practice).
pub const ASSUMED_LAMBDA: f64 = 0.5;

/// What makes a spot singular.
#[derive(Copy, Clone, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum SpotKind {
    /// 2D boundary corner with a free-free interior angle above 180 deg.
    ReentrantCorner,
    /// 3D boundary edge (chain of edges) with a free-free interior dihedral angle above 180 deg.
    ReentrantEdge,
    /// 2D boundary corner where a held edge meets a free edge.
    ClampedFreeCorner,
    /// 3D boundary edge (chain) where a held face meets a free face.
    ClampedFreeEdge,
    /// A point named by the user.
    User,
}

impl SpotKind {
    /// Plain name for reports and JSON.
    pub fn as_str(self) -> &'static str {
        match self {
            SpotKind::ReentrantCorner => "reentrant_corner",
            SpotKind::ReentrantEdge => "reentrant_edge",
            SpotKind::ClampedFreeCorner => "clamped_free_corner",
            SpotKind::ClampedFreeEdge => "clamped_free_edge",
            SpotKind::User => "user",
        }
    }
}

impl std::fmt::Display for SpotKind {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.as_str())
    }
}

/// One singular point (2D) or singular edge (3D).
#[derive(Clone, Debug, PartialEq)]
pub struct SingularSpot {
    /// What makes it singular.
    pub kind: SpotKind,
    /// The node (corner, user spot) or a point on the edge (midpoint of the edge piece nearest
    /// the chain's centroid).
    pub location: [f64; 3],
    /// Interior angle of the material there, degrees (mean over a chain of edges).
    pub angle_deg: f64,
    /// Singularity exponent: displacements ~ `r^lambda`, stresses ~ `r^(lambda - 1)`.
    pub lambda: f64,
    /// Whether `lambda` is the assumed crack-tip value rather than computed from the geometry.
    pub lambda_assumed: bool,
    /// Vertex nodes of the spot, ascending (one node for a corner or user spot).
    pub nodes: Vec<u32>,
}

impl SingularSpot {
    /// Plain sentence for reports: what the spot is, its exponent, and what to do about it.
    pub fn sentence(&self) -> String {
        let at = format_point(self.location, self.kind);
        let angle = self.angle_deg;
        let what = match self.kind {
            SpotKind::ReentrantCorner => format!("Re-entrant corner of {angle:.1} deg at {at}"),
            SpotKind::ReentrantEdge => format!("Re-entrant edge of {angle:.1} deg through {at}"),
            SpotKind::ClampedFreeCorner => {
                format!("Corner of {angle:.1} deg where a held edge meets a free edge at {at}")
            }
            SpotKind::ClampedFreeEdge => {
                format!("Edge of {angle:.1} deg where a held face meets a free face through {at}")
            }
            SpotKind::User => format!("Singular point given at {at} (angle {angle:.1} deg)"),
        };
        let exponent = if self.lambda_assumed {
            format!(
                "singularity exponent lambda = {:.4} assumed (crack tip)",
                self.lambda
            )
        } else {
            format!("singularity exponent lambda = {:.4}", self.lambda)
        };
        let remedy = match self.kind {
            SpotKind::ReentrantCorner | SpotKind::ReentrantEdge => "the real fillet radius",
            SpotKind::ClampedFreeCorner | SpotKind::ClampedFreeEdge => "the real support stiffness",
            SpotKind::User => "the real fillet radius or support stiffness",
        };
        format!(
            "{what}: {exponent}, so the stress there grows like r^({:.3}) and will not converge \
             under refinement; model {remedy} if that stress matters.",
            self.lambda - 1.0
        )
    }
}

/// Coordinates with up to 6 significant digits; 2D spots (corners) without z.
pub fn format_point(p: [f64; 3], kind: SpotKind) -> String {
    let one = |v: f64| {
        if v == 0.0 || !v.is_finite() {
            return format!("{}", if v == 0.0 { 0.0 } else { v });
        }
        let digits = (5 - v.abs().log10().floor() as i32).clamp(0, 12) as usize;
        let s = format!("{v:.digits$}");
        if s.contains('.') {
            s.trim_end_matches('0').trim_end_matches('.').to_string()
        } else {
            s
        }
    };
    let planar = matches!(
        kind,
        SpotKind::ReentrantCorner | SpotKind::ClampedFreeCorner
    ) || (kind == SpotKind::User && p[2] == 0.0);
    if planar {
        format!("({}, {})", one(p[0]), one(p[1]))
    } else {
        format!("({}, {}, {})", one(p[0]), one(p[1]), one(p[2]))
    }
}

/// Poisson's ratio for the clamped-free exponent (only there does it matter: the Williams
/// exponents of free corners do not depend on it).
#[derive(Clone, Debug, PartialEq)]
pub enum PoissonRatio {
    /// One value for the whole model.
    Single(f64),
    /// A value per zone id.
    ByZone(BTreeMap<i64, f64>),
}

impl PoissonRatio {
    /// The Poisson ratios of a material map.
    pub fn from_materials(materials: &MaterialMap) -> Self {
        match materials {
            MaterialMap::Single(m) => PoissonRatio::Single(m.poisson),
            MaterialMap::ByZone(map) => {
                PoissonRatio::ByZone(map.iter().map(|(&z, m)| (z, m.poisson)).collect())
            }
        }
    }
}

/// Settings of [`screen`].
#[derive(Clone, Debug, PartialEq)]
pub struct ScreeningOptions {
    /// How the mesh is interpreted: sets kappa for clamped-free spots.
    pub mode: AnalysisMode,
    /// Poisson's ratio (per zone where zones differ).
    pub poisson: PoissonRatio,
    /// Points named by the user as singular (2D: z is ignored in effect when the mesh is at
    /// z = 0 and the point is too).
    pub user_points: Vec<[f64; 3]>,
    /// Re-entrant when the interior angle exceeds 180 deg by more than this, degrees;
    /// 0 to [`MAX_ANGLE_TOLERANCE_DEG`].
    pub angle_tolerance_deg: f64,
}

impl ScreeningOptions {
    /// Options with no user points and the default angle tolerance.
    pub fn new(mode: AnalysisMode, poisson: PoissonRatio) -> Self {
        Self {
            mode,
            poisson,
            user_points: Vec::new(),
            angle_tolerance_deg: DEFAULT_ANGLE_TOLERANCE_DEG,
        }
    }
}

/// The outcome of [`screen`].
#[derive(Clone, Debug, PartialEq)]
pub struct Screening {
    /// Spots found: re-entrant, then clamped-free (2D: in node order, the two kinds mixed), then
    /// the user's in the order given.
    pub spots: Vec<SingularSpot>,
    /// Per element: the index in `spots` of the spot it touches (the element contains one of
    /// the spot's nodes); where it touches several, the smallest lambda wins, then the lower
    /// index.
    pub element_spot: Vec<Option<u32>>,
}

/// Why screening could not run.
#[derive(Debug, Error, Clone, PartialEq)]
pub enum SingularError {
    /// The displacement field does not match the mesh.
    #[error("the displacement field has {found} entries but the mesh has {expected} points")]
    DisplacementLength {
        /// Entries found.
        found: usize,
        /// Points in the mesh.
        expected: usize,
    },
    /// The analysis mode is for another dimension than the mesh.
    #[error("the analysis mode is {mode} ({mode_dim}D) but the mesh is {mesh_dim}D")]
    ModeDimension {
        /// Name of the mode.
        mode: &'static str,
        /// Dimension of the mode.
        mode_dim: usize,
        /// Dimension of the mesh.
        mesh_dim: usize,
    },
    /// An element's kind does not match the mesh dimension, or it names a missing point.
    #[error("cell {cell} of the file ({kind}) {problem}")]
    BadElement {
        /// Cell index in the file.
        cell: u32,
        /// Element kind name.
        kind: &'static str,
        /// What is wrong.
        problem: String,
    },
    /// Angle tolerance out of range.
    #[error(
        "angle tolerance {value} deg is not allowed: expected a finite value from 0 to {max} deg"
    )]
    AngleTolerance {
        /// Value given.
        value: f64,
        /// Largest value accepted.
        max: f64,
    },
    /// No Poisson ratio for a zone that needs one.
    #[error("no Poisson's ratio for zone {zone}, needed for a clamped-free spot there")]
    MissingZone {
        /// The zone id.
        zone: i64,
    },
    /// A Poisson ratio outside the range the clamped-free exponent is computed for.
    #[error("Poisson's ratio {value} (zone {zone}) gives kappa = {kappa}: the clamped-free exponent is computed for 0.5 < kappa < 4, i.e. about -0.2 < nu < 0.5")]
    Poisson {
        /// Zone id.
        zone: i64,
        /// The ratio.
        value: f64,
        /// Kolosov's constant from it.
        kappa: f64,
    },
    /// A user point with a non-finite coordinate.
    #[error("singular point {index} ({point:?}) has a coordinate that is not a finite number")]
    UserPoint {
        /// Position in the list given (from 1).
        index: usize,
        /// The point.
        point: [f64; 3],
    },
    /// User points given for a mesh without elements.
    #[error("singular points were given but the mesh has no elements to place them on")]
    EmptyMesh,
}

/// What the screening steps share.
pub(crate) struct Context<'a> {
    mesh: &'a crate::mesh::Mesh,
    adjacency: &'a NodeElements,
    /// Angle tolerance in radians.
    tolerance: f64,
    options: &'a ScreeningOptions,
}

impl Context<'_> {
    /// Kolosov's kappa for the clamped-free exponent in `zone` (module docs: plane stress uses
    /// `(3 - nu)/(1 + nu)`, every other mode `3 - 4 nu`).
    fn kappa(&self, zone: i64) -> Result<f64, SingularError> {
        let nu = match &self.options.poisson {
            PoissonRatio::Single(nu) => *nu,
            PoissonRatio::ByZone(map) => {
                *map.get(&zone).ok_or(SingularError::MissingZone { zone })?
            }
        };
        let kappa = match self.options.mode {
            AnalysisMode::PlaneStress { .. } => kappa_plane_stress(nu),
            AnalysisMode::PlaneStrain | AnalysisMode::Axisymmetric | AnalysisMode::Solid3d => {
                kappa_plane_strain(nu)
            }
        };
        // the range `clamped` solves for (its root search needs 0.5 < kappa < 4)
        if nu.is_finite() && nu > -1.0 && nu < 0.5 && kappa > 0.5 && kappa < 4.0 {
            Ok(kappa)
        } else {
            Err(SingularError::Poisson {
                zone,
                value: nu,
                kappa,
            })
        }
    }
}

/// Interior angles at the boundary vertex nodes (2D: the corner sum; 3D: the largest interior
/// dihedral angle of the node's boundary edges), radians; `nodes` ascending.
#[derive(Clone, Debug, Default)]
pub(crate) struct BoundaryAngles {
    nodes: Vec<u32>,
    angles: Vec<f64>,
}

impl BoundaryAngles {
    fn get(&self, node: u32) -> Option<f64> {
        self.nodes.binary_search(&node).ok().map(|i| self.angles[i])
    }
}

/// Screens `model` for singular spots (module docs for the rules) and marks the elements that
/// touch them.
///
/// Errors: a displacement field of the wrong length, a mode of the wrong dimension, an element
/// of the wrong dimension or with a node index past the points, an angle tolerance outside
/// 0 to 90 deg, a Poisson ratio missing or out of range where a clamped-free spot needs it, a
/// non-finite user point, or user points on a mesh without elements.
pub fn screen(model: &Model, options: &ScreeningOptions) -> Result<Screening, SingularError> {
    check_input(model, options)?;
    let adjacency = NodeElements::new(&model.mesh);
    let boundary = BoundaryFacets::new(&model.mesh, &adjacency);
    screen_checked(model, &adjacency, &boundary, options)
}

/// [`screen`] with the node-to-element adjacency and the zone boundary facets the estimate has
/// already built (`estimate::Computed` keeps them), which saves rebuilding them.
pub fn screen_with(
    model: &Model,
    adjacency: &NodeElements,
    boundary: &BoundaryFacets,
    options: &ScreeningOptions,
) -> Result<Screening, SingularError> {
    check_input(model, options)?;
    screen_checked(model, adjacency, boundary, options)
}

/// The screening proper, on input [`check_input`] has accepted.
fn screen_checked(
    model: &Model,
    adjacency: &NodeElements,
    boundary: &BoundaryFacets,
    options: &ScreeningOptions,
) -> Result<Screening, SingularError> {
    let mesh = &model.mesh;
    let ctx = Context {
        mesh,
        adjacency,
        tolerance: options.angle_tolerance_deg.to_radians(),
        options,
    };
    let supported = boundary::supports(&model.displacement);
    let facets = boundary::outer_facets(mesh, adjacency, boundary, &supported);
    let (mut spots, angles) = if mesh.dimension == 3 {
        solid::screen_edges(&ctx, &facets)?
    } else {
        planar::screen_corners(&ctx, &facets)?
    };
    let user = user_spots(&ctx, &spots, &angles)?;
    spots.extend(user);
    let element_spot = element_spots(mesh, &spots);
    Ok(Screening {
        spots,
        element_spot,
    })
}

/// Checks sizes, dimensions, node indices and the angle tolerance before any indexing.
fn check_input(model: &Model, options: &ScreeningOptions) -> Result<(), SingularError> {
    let mesh = &model.mesh;
    if model.displacement.len() != mesh.node_count() {
        return Err(SingularError::DisplacementLength {
            found: model.displacement.len(),
            expected: mesh.node_count(),
        });
    }
    if options.mode.dimension() != mesh.dimension {
        return Err(SingularError::ModeDimension {
            mode: options.mode.name(),
            mode_dim: options.mode.dimension(),
            mesh_dim: mesh.dimension,
        });
    }
    let tol = options.angle_tolerance_deg;
    if !(tol.is_finite() && (0.0..=MAX_ANGLE_TOLERANCE_DEG).contains(&tol)) {
        return Err(SingularError::AngleTolerance {
            value: tol,
            max: MAX_ANGLE_TOLERANCE_DEG,
        });
    }
    let points = mesh.node_count();
    for b in &mesh.blocks {
        let cell = |i: usize| mesh.file_cell.get(b.first_element + i).copied();
        let bad = |i: usize, problem: String| SingularError::BadElement {
            cell: cell(i).unwrap_or(u32::MAX),
            kind: b.kind.name(),
            problem,
        };
        if b.kind.dim() != mesh.dimension {
            return Err(bad(
                0,
                format!("is {}D in a {}D mesh", b.kind.dim(), mesh.dimension),
            ));
        }
        if b.nodes.len() % b.kind.node_count() != 0 {
            return Err(bad(0, "block has a partial cell".into()));
        }
        if let Some(k) = b.nodes.iter().position(|&n| n as usize >= points) {
            let i = k / b.kind.node_count();
            return Err(bad(
                i,
                format!("names point {} but there are {points}", b.nodes[k]),
            ));
        }
        if cell(b.len().saturating_sub(1)).is_none() || mesh.zone.len() < b.first_element + b.len()
        {
            return Err(bad(0, "has no file index or zone".into()));
        }
    }
    for (i, p) in options.user_points.iter().enumerate() {
        if !p.iter().all(|c| c.is_finite()) {
            return Err(SingularError::UserPoint {
                index: i + 1,
                point: *p,
            });
        }
    }
    if !options.user_points.is_empty() && mesh.element_count() == 0 {
        return Err(SingularError::EmptyMesh);
    }
    Ok(())
}

/// The user's points as spots (module docs).
fn user_spots(
    ctx: &Context,
    screened: &[SingularSpot],
    angles: &BoundaryAngles,
) -> Result<Vec<SingularSpot>, SingularError> {
    if ctx.options.user_points.is_empty() {
        return Ok(Vec::new());
    }
    let mesh = ctx.mesh;
    let mut is_vertex = vec![false; mesh.node_count()];
    for b in &mesh.blocks {
        let (nn, nv) = (b.kind.node_count(), b.kind.vertex_count());
        for cell in b.nodes.chunks_exact(nn) {
            for &n in &cell[..nv] {
                is_vertex[n as usize] = true;
            }
        }
    }
    let mut spots = Vec::new();
    for p in &ctx.options.user_points {
        let nearest = (0..mesh.node_count())
            .into_par_iter()
            .filter(|&n| is_vertex[n])
            .map(|n| {
                let q = mesh.points[n];
                let d: f64 = (0..3).map(|k| (q[k] - p[k]).powi(2)).sum();
                (d, n)
            })
            .min_by(|a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)));
        let Some((_, node)) = nearest else {
            return Err(SingularError::EmptyMesh);
        };
        let node = node as u32;
        let known = screened
            .iter()
            .filter(|s| s.nodes.binary_search(&node).is_ok())
            .min_by(|a, b| a.lambda.total_cmp(&b.lambda));
        let (angle_deg, lambda, lambda_assumed) = match (known, angles.get(node)) {
            (Some(s), _) => (s.angle_deg, s.lambda, s.lambda_assumed),
            (None, Some(angle)) => match williams_mode_one(angle) {
                Some(l) if angle > PI + ctx.tolerance => (angle.to_degrees(), l, false),
                _ => (angle.to_degrees(), ASSUMED_LAMBDA, true),
            },
            (None, None) => (360.0, ASSUMED_LAMBDA, true),
        };
        spots.push(SingularSpot {
            kind: SpotKind::User,
            location: mesh.points[node as usize],
            angle_deg,
            lambda,
            lambda_assumed,
            nodes: vec![node],
        });
    }
    Ok(spots)
}

/// Per element, the touched spot with the smallest lambda (then the lowest index).
fn element_spots(mesh: &crate::mesh::Mesh, spots: &[SingularSpot]) -> Vec<Option<u32>> {
    let mut node_spot: Vec<Option<u32>> = vec![None; mesh.node_count()];
    let better = |candidate: usize, current: Option<u32>| {
        current.is_none_or(|c| spots[candidate].lambda < spots[c as usize].lambda)
    };
    for (i, s) in spots.iter().enumerate() {
        for &n in &s.nodes {
            if better(i, node_spot[n as usize]) {
                node_spot[n as usize] = Some(i as u32);
            }
        }
    }
    (0..mesh.element_count())
        .into_par_iter()
        .map(|e| {
            let (_, nodes) = mesh.element(e);
            let mut best: Option<u32> = None;
            for &n in nodes {
                if let Some(s) = node_spot[n as usize] {
                    let wins = best.is_none_or(|b| {
                        let (ls, lb) = (spots[s as usize].lambda, spots[b as usize].lambda);
                        ls < lb || (ls == lb && s < b)
                    });
                    if wins {
                        best = Some(s);
                    }
                }
            }
            best
        })
        .collect()
}

#[cfg(test)]
mod tests;
