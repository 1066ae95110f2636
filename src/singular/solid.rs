//! 3D screening: re-entrant edges and clamped-free edges on the outer boundary, grouped into
//! singular edges (rules in the module docs of [`crate::singular`]).

use super::angles::edge_interior_angle;
use super::boundary::OuterFacet;
use super::clamped::clamped_free_exponent;
use super::williams::williams_mode_one;
use super::{BoundaryAngles, Context, SingularError, SingularSpot, SpotKind};
use rayon::prelude::*;
use std::f64::consts::PI;

/// One boundary face's view of one of its edges: ((low node, high node), face supported,
/// element owning the face).
type Side = ((u32, u32), bool, u32);

/// A vertex-to-vertex edge of the outer boundary with its interior dihedral angle.
struct BoundaryEdge {
    nodes: (u32, u32),
    angle: f64,
    /// Kind of spot the edge would belong to, if its faces make it a candidate.
    class: Option<SpotKind>,
    /// Element owning one free face through the edge (its zone gives the Poisson ratio).
    free_element: u32,
}

/// Screens every vertex-to-vertex edge of the outer boundary; returns the singular edges
/// (re-entrant first, then clamped-free, each in order of their smallest edge) and, per
/// boundary vertex node, the largest interior dihedral angle of its boundary edges.
pub(crate) fn screen_edges(
    ctx: &Context,
    facets: &[OuterFacet],
) -> Result<(Vec<SingularSpot>, BoundaryAngles), SingularError> {
    let mesh = ctx.mesh;
    let mut sides: Vec<Side> = Vec::with_capacity(4 * facets.len());
    for f in facets {
        let (kind, nodes) = mesh.element(f.element as usize);
        let corners = kind.facets()[f.facet as usize].corners;
        for (i, &c) in corners.iter().enumerate() {
            let (a, b) = (nodes[c], nodes[corners[(i + 1) % corners.len()]]);
            sides.push(((a.min(b), a.max(b)), f.supported, f.element));
        }
    }
    sides.sort_unstable();
    let groups: Vec<&[Side]> = sides.chunk_by(|x, y| x.0 == y.0).collect();
    let edges: Vec<BoundaryEdge> = groups
        .par_iter()
        .map(|group| {
            let (a, b) = group[0].0;
            let angle = edge_interior_angle(mesh, ctx.adjacency, a, b);
            let free = group.iter().find(|s| !s.1);
            let any_supported = group.iter().any(|s| s.1);
            let class = match (free, any_supported) {
                (Some(_), false) if angle > PI + ctx.tolerance => Some(SpotKind::ReentrantEdge),
                (Some(_), true) => Some(SpotKind::ClampedFreeEdge),
                _ => None,
            };
            BoundaryEdge {
                nodes: (a, b),
                angle,
                class,
                free_element: free.map_or(group[0].2, |s| s.2),
            }
        })
        .collect();

    let mut spots = Vec::new();
    for kind in [SpotKind::ReentrantEdge, SpotKind::ClampedFreeEdge] {
        let chosen: Vec<&BoundaryEdge> = edges.iter().filter(|e| e.class == Some(kind)).collect();
        for group in connected_groups(&chosen) {
            if let Some(spot) = group_spot(ctx, kind, &group)? {
                spots.push(spot);
            }
        }
    }

    // Largest boundary-edge angle at every boundary vertex, for the user spots.
    let mut at_node: Vec<(u32, f64)> = edges
        .iter()
        .flat_map(|e| [(e.nodes.0, e.angle), (e.nodes.1, e.angle)])
        .collect();
    at_node.sort_unstable_by_key(|x| x.0);
    let mut angles = BoundaryAngles::default();
    for run in at_node.chunk_by(|x, y| x.0 == y.0) {
        angles.nodes.push(run[0].0);
        angles
            .angles
            .push(run.iter().map(|x| x.1).fold(f64::NEG_INFINITY, f64::max));
    }
    Ok((spots, angles))
}

/// Splits edges into groups connected through shared nodes (union-find over the edge list);
/// groups are ordered by their first edge, edges within a group keep their order.
fn connected_groups<'a>(edges: &[&'a BoundaryEdge]) -> Vec<Vec<&'a BoundaryEdge>> {
    let mut parent: Vec<usize> = (0..edges.len()).collect();
    fn root(parent: &mut [usize], mut i: usize) -> usize {
        while parent[i] != i {
            parent[i] = parent[parent[i]];
            i = parent[i];
        }
        i
    }
    let mut by_node: Vec<(u32, usize)> = edges
        .iter()
        .enumerate()
        .flat_map(|(i, e)| [(e.nodes.0, i), (e.nodes.1, i)])
        .collect();
    by_node.sort_unstable();
    for run in by_node.chunk_by(|x, y| x.0 == y.0) {
        for w in run.windows(2) {
            let (ra, rb) = (root(&mut parent, w[0].1), root(&mut parent, w[1].1));
            // the smaller index becomes the root, so a group's root is its first edge
            parent[ra.max(rb)] = ra.min(rb);
        }
    }
    let mut slot = vec![usize::MAX; edges.len()];
    let mut groups: Vec<Vec<&BoundaryEdge>> = Vec::new();
    for i in 0..edges.len() {
        let r = root(&mut parent, i);
        if slot[r] == usize::MAX {
            slot[r] = groups.len();
            groups.push(Vec::new());
        }
        groups[slot[r]].push(edges[i]);
    }
    groups
}

/// The singular edge made of `group`: angle = length-weighted mean of the edges' angles,
/// lambda from it (Williams mode I for re-entrant edges, the clamped-free equation in plane
/// strain for clamped-free edges: the plane-strain cross-section assumption, method sheet 4.3),
/// location = the edge midpoint nearest the group's length-weighted centroid (on the edge even
/// when the group bends or closes into a loop). `None` when the exponent is not below 1.
fn group_spot(
    ctx: &Context,
    kind: SpotKind,
    group: &[&BoundaryEdge],
) -> Result<Option<SingularSpot>, SingularError> {
    let points = &ctx.mesh.points;
    let midpoint = |e: &BoundaryEdge| {
        let (p, q) = (points[e.nodes.0 as usize], points[e.nodes.1 as usize]);
        [
            0.5 * (p[0] + q[0]),
            0.5 * (p[1] + q[1]),
            0.5 * (p[2] + q[2]),
        ]
    };
    let length = |e: &BoundaryEdge| {
        let (p, q) = (points[e.nodes.0 as usize], points[e.nodes.1 as usize]);
        ((p[0] - q[0]).powi(2) + (p[1] - q[1]).powi(2) + (p[2] - q[2]).powi(2)).sqrt()
    };
    let (mut total, mut angle_sum, mut centroid) = (0.0, 0.0, [0.0; 3]);
    for e in group {
        let l = length(e);
        let m = midpoint(e);
        total += l;
        angle_sum += l * e.angle;
        for k in 0..3 {
            centroid[k] += l * m[k];
        }
    }
    let angle = if total > 0.0 {
        angle_sum / total
    } else {
        group.iter().map(|e| e.angle).sum::<f64>() / group.len() as f64
    };
    let centroid = centroid.map(|c| if total > 0.0 { c / total } else { 0.0 });
    let lambda = match kind {
        SpotKind::ReentrantEdge => williams_mode_one(angle),
        _ => {
            let zone = ctx.mesh.zone[group[0].free_element as usize];
            clamped_free_exponent(angle, ctx.kappa(zone)?)
        }
    };
    let Some(lambda) = lambda else {
        return Ok(None);
    };
    let distance = |e: &&BoundaryEdge| {
        let m = midpoint(e);
        (0..3).map(|k| (m[k] - centroid[k]).powi(2)).sum::<f64>()
    };
    let nearest = group
        .iter()
        .min_by(|x, y| distance(x).total_cmp(&distance(y)))
        .map_or([f64::NAN; 3], |e| midpoint(e));
    let mut nodes: Vec<u32> = group.iter().flat_map(|e| [e.nodes.0, e.nodes.1]).collect();
    nodes.sort_unstable();
    nodes.dedup();
    Ok(Some(SingularSpot {
        kind,
        location: nearest,
        angle_deg: angle.to_degrees(),
        lambda,
        lambda_assumed: false,
        nodes,
    }))
}
