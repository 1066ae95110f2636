//! The 2D mesher's entry point: options, the steps (validate, discretise the boundary,
//! constrained Delaunay triangulation, refinement) and the output as a hone [`Mesh`].

use super::boundary_cdt::Workspace;
use super::domain::{check_loop, Domain};
use super::refine::Refinement;
use super::{LoopId, MeshError};
use crate::element::ElementKind;
use crate::mesh::{CellBlock, Mesh};
use spade::Triangulation;
use std::collections::HashMap;

/// Settings of [`triangulate`].
#[derive(Copy, Clone, Debug)]
pub struct MesherOptions {
    /// Smallest angle wanted in every triangle, in degrees (0: size only). Delaunay refinement
    /// is guaranteed to end for 20.7 degrees and does in practice up to about 33 (Shewchuk 2002,
    /// "Delaunay refinement algorithms for triangular mesh generation"); accepted: 0 to 34.
    /// Default 20.
    pub min_angle_deg: f64,
    /// Most points the mesh may have; reaching it is an error, so that a size field far too
    /// small for the domain fails instead of exhausting memory. Default 5 000 000.
    pub max_points: usize,
}

impl Default for MesherOptions {
    fn default() -> Self {
        Self {
            min_angle_deg: 20.0,
            max_points: 5_000_000,
        }
    }
}

/// Largest minimum angle accepted, degrees (see [`MesherOptions::min_angle_deg`]).
const MAX_MIN_ANGLE: f64 = 34.0;

/// Triangulates the domain so that edge lengths follow the size field h(x, y) (target edge
/// length), Tri3 or Tri6 (mid-side nodes of boundary edges on arcs placed ON the arc).
///
/// Steps: the loops are checked (closed, arcs with both ends on one circle, no crossings); each
/// segment gets points spaced by `h` ([`domain`](super::Segment) discretisation); spade builds
/// the constrained Delaunay triangulation of those points with the boundary edges as
/// constraints; the inside is found by parity of boundary crossings; the refinement loop
/// (`refine.rs`) inserts circumcentres of faces too large for `h` (longest edge above
/// `1.4 h(centroid)`) or with an angle below `min_angle_deg`, splitting encroached boundary edges
/// at their middle, on the arc for arcs. The output has dimension 2, z = 0, zone 0,
/// `file_cell = 0..n`, counter-clockwise triangles in VTK order; Tri6 mid nodes are edge
/// midpoints except on arcs, where they are the arc's point at the middle angle. Only points
/// used by a triangle are kept (boundary points first, in boundary order). The same input gives
/// the same mesh (every step is deterministic; hash maps are only looked up).
///
/// Errors: the domain's [`MeshError`] variants (open loop, arc ends off the circle, degenerate
/// or crossing segments, misplaced hole), [`MeshError::NonPositiveSize`],
/// [`MeshError::PointCapReached`], [`MeshError::BoundaryRefinement`] (features thinner than
/// the local size), [`MeshError::UnsupportedKind`] for kinds other than Tri3/Tri6 and
/// [`MeshError::InvalidParameter`] for a minimum angle outside 0..=34 degrees.
pub fn triangulate(
    domain: &Domain,
    size: &(dyn Fn([f64; 2]) -> f64 + Sync),
    kind: ElementKind,
    options: &MesherOptions,
) -> Result<Mesh, MeshError> {
    if !matches!(kind, ElementKind::Tri3 | ElementKind::Tri6) {
        return Err(MeshError::UnsupportedKind {
            kind,
            expected: "the mesher makes tri3 or tri6",
        });
    }
    let angle = options.min_angle_deg;
    if !(0.0..=MAX_MIN_ANGLE).contains(&angle) {
        return Err(MeshError::InvalidParameter {
            name: "min_angle_deg",
            value: angle,
            expected: "0 to 34 degrees",
        });
    }
    let mut pieces = Vec::new();
    let mut loops = vec![check_loop(LoopId::Outer, &domain.outer, &mut pieces)?];
    for (i, hole) in domain.holes.iter().enumerate() {
        loops.push(check_loop(LoopId::Hole(i), hole, &mut pieces)?);
    }
    let mut ws = Workspace::build(&loops, &pieces, size, options.max_points)?;
    let max_ratio = if angle > 0.0 {
        1.0 / (2.0 * angle.to_radians().sin())
    } else {
        f64::INFINITY
    };
    Refinement { size, max_ratio }.run(&mut ws)?;
    Ok(output(&ws, kind))
}

/// The inside faces as a hone mesh.
fn output(ws: &Workspace, kind: ElementKind) -> Mesh {
    let faces: Vec<[usize; 3]> = ws
        .cdt
        .fixed_inner_faces()
        .filter(|f| ws.inside[f.index()])
        .map(|f| ws.face_vertices(f))
        .collect();
    let mut used = vec![false; ws.cdt.num_vertices()];
    for tri in &faces {
        for &v in tri {
            used[v] = true;
        }
    }
    let mut id = vec![u32::MAX; used.len()];
    let mut points: Vec<[f64; 3]> = Vec::new();
    for v in (0..used.len()).filter(|&v| used[v]) {
        id[v] = points.len() as u32;
        let p = ws.position(v);
        points.push([p[0], p[1], 0.0]);
    }
    let mut nodes: Vec<u32> = Vec::with_capacity(faces.len() * kind.node_count());
    let mut mid: HashMap<(usize, usize), u32> = HashMap::new();
    for tri in &faces {
        nodes.extend(tri.iter().map(|&v| id[v]));
        if kind == ElementKind::Tri6 {
            for (a, b) in [(tri[0], tri[1]), (tri[1], tri[2]), (tri[2], tri[0])] {
                let m = *mid.entry((a.min(b), a.max(b))).or_insert_with(|| {
                    let p = ws.edge_midpoint(a, b);
                    points.push([p[0], p[1], 0.0]);
                    (points.len() - 1) as u32
                });
                nodes.push(m);
            }
        }
    }
    let count = faces.len();
    Mesh {
        points,
        blocks: vec![CellBlock {
            kind,
            nodes,
            first_element: 0,
        }],
        file_cell: (0..count as u32).collect(),
        zone: vec![0; count],
        dimension: 2,
    }
}
