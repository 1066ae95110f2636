//! 2D screening: re-entrant corners and clamped-free corners at the vertex nodes of the outer
//! boundary (rules in the module docs of [`crate::singular`]).

use super::angles::interior_angle;
use super::boundary::OuterFacet;
use super::clamped::clamped_free_exponent;
use super::williams::williams_mode_one;
use super::{BoundaryAngles, Context, SingularError, SingularSpot, SpotKind};
use rayon::prelude::*;
use std::f64::consts::PI;

/// One end of an outer boundary edge: (vertex node, edge supported, element owning the edge).
type End = (u32, bool, u32);

/// Screens every vertex node of the outer boundary; returns the spots found (ascending node
/// order, re-entrant and clamped-free mixed) and the interior angle of every boundary vertex.
pub(crate) fn screen_corners(
    ctx: &Context,
    facets: &[OuterFacet],
) -> Result<(Vec<SingularSpot>, BoundaryAngles), SingularError> {
    let mesh = ctx.mesh;
    let mut ends: Vec<End> = Vec::with_capacity(2 * facets.len());
    for f in facets {
        let (kind, nodes) = mesh.element(f.element as usize);
        for &c in kind.facets()[f.facet as usize].corners {
            ends.push((nodes[c], f.supported, f.element));
        }
    }
    ends.sort_unstable();
    let groups: Vec<&[End]> = ends.chunk_by(|x, y| x.0 == y.0).collect();
    let results: Vec<(f64, Option<SingularSpot>)> = groups
        .par_iter()
        .map(|group| screen_vertex(ctx, group))
        .collect::<Result<_, _>>()?;
    let nodes = groups.iter().map(|g| g[0].0).collect();
    let (angles, spots): (Vec<f64>, Vec<Option<SingularSpot>>) = results.into_iter().unzip();
    Ok((
        spots.into_iter().flatten().collect(),
        BoundaryAngles { nodes, angles },
    ))
}

/// Interior angle at one boundary vertex (all its boundary edge ends in `group`) and the spot
/// there, if any.
fn screen_vertex(
    ctx: &Context,
    group: &[End],
) -> Result<(f64, Option<SingularSpot>), SingularError> {
    let node = group[0].0;
    let angle = interior_angle(ctx.mesh, ctx.adjacency, node);
    let free = group.iter().find(|end| !end.1);
    let any_supported = group.iter().any(|end| end.1);
    let found = match (free, any_supported) {
        // Every boundary edge here is free: a traction-free corner (method sheet 4.1).
        (Some(_), false) if angle > PI + ctx.tolerance => {
            williams_mode_one(angle).map(|l| (SpotKind::ReentrantCorner, l))
        }
        // A held edge meets a free one: clamped-free corner (method sheet 4.2).
        (Some(&(_, _, element)), true) => {
            let kappa = ctx.kappa(ctx.mesh.zone[element as usize])?;
            clamped_free_exponent(angle, kappa).map(|l| (SpotKind::ClampedFreeCorner, l))
        }
        _ => None,
    };
    let spot = found.map(|(kind, lambda)| SingularSpot {
        kind,
        location: ctx.mesh.points[node as usize],
        angle_deg: angle.to_degrees(),
        lambda,
        lambda_assumed: false,
        nodes: vec![node],
    });
    Ok((angle, spot))
}
