//! Point location: which element holds a physical point, and where in natural coordinates.
//!
//! An R-tree (Guttman 1984, as implemented by the `rstar` crate) holds every element's
//! axis-aligned bounding box; a query point is tested against the elements whose box holds it
//! by the inverse isoparametric map `x(xi) = sum_i N_i(xi) x_i = x`, solved by Newton's method
//! ([`inverse_map`]). The element is accepted when `xi` lies in the reference element.
//!
//! Boxes are padded: quadratic elements by 10 % of their extent, because a curved edge through
//! its mid-side node can bulge past the box of the nodes (for a parabola through three points
//! the bulge is at most a quarter of the mid-node's offset from the chord; common practice to
//! pad generously), and every element by the boundary tolerance so that a point just outside the
//! mesh still finds its nearest element. Points on a shared face belong to the element with the
//! lowest index among those holding them, so results do not depend on the tree's layout.

use super::Mesh;
use crate::element::{interpolate_point, inverse_map, ElementKind, MAX_NODES};
use rayon::prelude::*;
use rstar::primitives::{GeomWithData, Rectangle};
use rstar::RTree;

/// Default boundary tolerance, relative to the diagonal of the mesh's bounding box: a point at
/// most this far outside the mesh is located in its nearest element (about 1e6 times round-off
/// on coordinates of order one; common practice for geometric tolerances).
pub const DEFAULT_BOUNDARY_TOLERANCE: f64 = 1e-6;

/// Natural-coordinate slack within which a point counts as inside the reference element
/// (reference elements have size 1 or 2; this is round-off of the Newton solution).
const INSIDE_NATURAL: f64 = 1e-10;

/// Padding of a quadratic element's box, as a fraction of its largest extent.
const CURVED_PADDING: f64 = 0.1;

/// Element bounding box in the tree, carrying the global element index.
type ElementBox = GeomWithData<Rectangle<[f64; 3]>, u32>;

/// Finds the element and natural coordinates of physical points in one mesh.
#[derive(Debug)]
pub struct Locator {
    tree: RTree<ElementBox>,
    /// Largest distance (physical units) a point may lie outside the mesh and still be located.
    tolerance: f64,
    /// 2 or 3: in 2D the z coordinate of queries and boxes is ignored.
    dimension: usize,
}

impl Locator {
    /// Builds the tree of padded element boxes, with the default boundary tolerance
    /// ([`DEFAULT_BOUNDARY_TOLERANCE`] times the mesh diagonal).
    pub fn new(mesh: &Mesh) -> Locator {
        Self::with_tolerance(mesh, DEFAULT_BOUNDARY_TOLERANCE)
    }

    /// Builds the tree with a boundary tolerance `relative` to the mesh diagonal.
    pub fn with_tolerance(mesh: &Mesh, relative: f64) -> Locator {
        let (lo, hi) = mesh.bounding_box();
        let diagonal = if mesh.points.is_empty() {
            0.0
        } else {
            (0..3).map(|k| (hi[k] - lo[k]).powi(2)).sum::<f64>().sqrt()
        };
        let tolerance = relative.abs() * diagonal;
        let dimension = mesh.dimension;
        let boxes: Vec<ElementBox> = (0..mesh.element_count())
            .into_par_iter()
            .map(|e| {
                let (kind, nodes) = mesh.element(e);
                let (mut a, mut b) = ([f64::INFINITY; 3], [f64::NEG_INFINITY; 3]);
                for &n in nodes {
                    let p = mesh.points[n as usize];
                    for k in 0..3 {
                        a[k] = a[k].min(p[k]);
                        b[k] = b[k].max(p[k]);
                    }
                }
                let extent = (0..3).map(|k| b[k] - a[k]).fold(0.0, f64::max);
                let pad = tolerance
                    + if kind.order() > 1 {
                        CURVED_PADDING * extent
                    } else {
                        0.0
                    };
                for k in 0..3 {
                    a[k] -= pad;
                    b[k] += pad;
                }
                if dimension == 2 {
                    (a[2], b[2]) = (0.0, 0.0);
                }
                GeomWithData::new(Rectangle::from_corners(a, b), e as u32)
            })
            .collect();
        Locator {
            tree: RTree::bulk_load(boxes),
            tolerance,
            dimension,
        }
    }

    /// The boundary tolerance in physical units.
    pub fn tolerance(&self) -> f64 {
        self.tolerance
    }

    /// The element holding `x` and the natural coordinates of `x` in it, or `None` when `x` is
    /// farther than the boundary tolerance from every element. `mesh` must be the mesh the
    /// locator was built from.
    ///
    /// Among candidate elements whose natural coordinates lie inside their reference element,
    /// the lowest index wins; otherwise the candidate whose closest point (natural coordinates
    /// clamped into the reference element, mapped back) is nearest to `x`, if that distance is
    /// within the tolerance. Its natural coordinates are the clamped ones.
    pub fn locate(&self, mesh: &Mesh, x: [f64; 3]) -> Option<(usize, [f64; 3])> {
        let mut q = x;
        if self.dimension == 2 {
            q[2] = 0.0;
        }
        let mut coords = [[0.0; 3]; MAX_NODES];
        let mut inside: Option<(usize, [f64; 3])> = None;
        let mut nearest: Option<(f64, usize, [f64; 3])> = None;
        for candidate in self.tree.locate_all_at_point(q) {
            let e = candidate.data as usize;
            if inside.is_some_and(|(best, _)| best < e) {
                continue;
            }
            let (kind, nodes) = mesh.element(e);
            let nn = kind.node_count();
            mesh.gather_coords(nodes, &mut coords[..nn]);
            let Some(xi) = inverse_map(kind, &coords[..nn], q) else {
                continue;
            };
            if kind.contains_natural(xi, INSIDE_NATURAL) {
                inside = Some((e, xi));
                continue;
            }
            let clamped = clamp_natural(kind, xi);
            let mut n = [0.0; MAX_NODES];
            kind.shape_functions(clamped, &mut n[..nn]);
            let p = interpolate_point(&coords[..nn], &n[..nn]);
            let d = (0..self.dimension)
                .map(|k| (p[k] - q[k]).powi(2))
                .sum::<f64>()
                .sqrt();
            let better = match nearest {
                None => true,
                Some((bd, be, _)) => d < bd || (d == bd && e < be),
            };
            if better {
                nearest = Some((d, e, clamped));
            }
        }
        inside.or_else(|| {
            nearest
                .filter(|(d, _, _)| *d <= self.tolerance)
                .map(|(_, e, xi)| (e, xi))
        })
    }
}

/// The point of the reference element nearest (approximately, for simplices) to `xi`: interval
/// coordinates are clipped to [-1, 1]; simplex coordinates are clipped to be non-negative and
/// then scaled back onto the face `sum = 1` if they exceed it.
pub fn clamp_natural(kind: ElementKind, xi: [f64; 3]) -> [f64; 3] {
    let clip = |v: f64| v.clamp(-1.0, 1.0);
    let simplex = |v: &mut [f64]| {
        for c in v.iter_mut() {
            *c = c.max(0.0);
        }
        let s: f64 = v.iter().sum();
        if s > 1.0 {
            for c in v.iter_mut() {
                *c /= s;
            }
        }
    };
    let mut out = xi;
    match (kind.dim(), kind.vertex_count()) {
        (2, 3) => simplex(&mut out[..2]),
        (2, _) => {
            out[0] = clip(out[0]);
            out[1] = clip(out[1]);
        }
        (_, 4) => simplex(&mut out[..3]),
        (_, 6) => {
            simplex(&mut out[..2]);
            out[2] = clip(out[2]);
        }
        _ => out = out.map(clip),
    }
    out
}

/// Interpolates a nodal quantity at natural point `xi` of element `e`:
/// `v(xi) = sum_i N_i(xi) v_i`, with `value(node)` giving `v_i` (so a zone-aware field, such as
/// the recovered stress of the element's zone, can be read without copying it).
pub fn interpolate_with<const C: usize>(
    mesh: &Mesh,
    e: usize,
    xi: [f64; 3],
    value: impl Fn(u32) -> [f64; C],
) -> [f64; C] {
    let (kind, nodes) = mesh.element(e);
    let nn = kind.node_count();
    let mut n = [0.0; MAX_NODES];
    kind.shape_functions(xi, &mut n[..nn]);
    let mut out = [0.0; C];
    for (&node, &w) in nodes.iter().zip(&n[..nn]) {
        let v = value(node);
        for c in 0..C {
            out[c] += w * v[c];
        }
    }
    out
}

/// Interpolates a nodal field stored one entry per node (see [`interpolate_with`]).
pub fn interpolate<const C: usize>(
    mesh: &Mesh,
    e: usize,
    xi: [f64; 3],
    field: &[[f64; C]],
) -> [f64; C] {
    interpolate_with(mesh, e, xi, |n| field[n as usize])
}

#[cfg(test)]
#[path = "locate_tests.rs"]
mod tests;
