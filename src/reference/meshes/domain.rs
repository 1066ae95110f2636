//! Domains for the mesher: loops of line segments and circular arcs, their validation, and the
//! discretisation of each segment with point spacing following the size field.
//!
//! Every segment is a curve `X(t)`, `t in [0, 1]`: a line `X = p0 + t (p1 - p0)` or an arc
//! `X = c + r (cos(theta0 + t sweep), sin(theta0 + t sweep))`. A segment of length `L` gets
//! `n = max(1, round(I))` pieces, `I = int_0^L ds / h(X(s))` (the number of target lengths that
//! fit along it), with the points at equal increments `I / n` of that integral, so the spacing
//! follows `h` (common practice for boundary discretisation). Arcs get at least one piece per
//! [`MAX_ARC_STEP`] of angle so that chords stay close to the circle.

use super::{LoopId, MeshError};
use std::f64::consts::{PI, TAU};

/// One piece of a boundary loop.
#[derive(Clone, Debug, PartialEq)]
pub enum Segment {
    /// Straight line from the previous point to `to`.
    Line {
        /// End point.
        to: [f64; 2],
    },
    /// Circular arc about `center` from the previous point to `to` (both at the same distance
    /// from the centre), running counter-clockwise or clockwise. An arc that ends where it
    /// starts is a full circle.
    Arc {
        /// Centre of the circle.
        center: [f64; 2],
        /// End point.
        to: [f64; 2],
        /// Direction of travel about the centre.
        counter_clockwise: bool,
    },
}

/// A closed boundary loop: from `start` through the segments; the last segment ends at `start`.
#[derive(Clone, Debug, PartialEq)]
pub struct Loop {
    /// First point.
    pub start: [f64; 2],
    /// The segments in order.
    pub segments: Vec<Segment>,
}

/// A 2D region: the outer loop minus the holes. Either orientation is accepted for every loop
/// (the mesher finds the inside by counting boundary crossings).
#[derive(Clone, Debug, PartialEq)]
pub struct Domain {
    /// The outer boundary.
    pub outer: Loop,
    /// Boundaries of the holes; they must lie inside `outer` and not inside each other.
    pub holes: Vec<Loop>,
}

/// Largest angle of one boundary piece on an arc: 30 degrees, so a chord deviates from the arc by
/// at most `r (1 - cos 15 deg) = 0.034 r` whatever the size field (a choice for geometric
/// fidelity of linear elements).
pub const MAX_ARC_STEP: f64 = PI / 6.0;

/// Relative tolerance (of the loop's extent or the arc's radius) for a loop to count as closed
/// and for the two ends of an arc to count as on one circle: 1e-9, loose enough for coordinates
/// typed with ten digits, tight enough to catch mistakes (common practice).
const CLOSURE_TOLERANCE: f64 = 1e-9;

/// Relative length below which a segment counts as degenerate.
const DEGENERATE_TOLERANCE: f64 = 1e-12;

/// Fewest samples of the size field along one segment for the `1/h` integral.
const MIN_SAMPLES: usize = 64;
/// Most samples along one segment.
const MAX_SAMPLES: usize = 1 << 20;
/// Samples per smallest target length found on the coarse pass: 8 keeps the trapezoid rule's
/// error on `int 1/h` far below one point.
const SAMPLES_PER_SIZE: f64 = 8.0;

/// A segment in parametric form.
#[derive(Clone, Debug)]
pub(crate) enum Curve {
    /// `p0 + t (p1 - p0)`.
    Line { p0: [f64; 2], p1: [f64; 2] },
    /// `center + radius (cos, sin)(theta0 + t sweep)`.
    Arc {
        center: [f64; 2],
        radius: f64,
        theta0: f64,
        sweep: f64,
    },
}

impl Curve {
    /// Point at parameter `t`.
    pub(crate) fn point(&self, t: f64) -> [f64; 2] {
        match *self {
            Curve::Line { p0, p1 } => [p0[0] + t * (p1[0] - p0[0]), p0[1] + t * (p1[1] - p0[1])],
            Curve::Arc {
                center,
                radius,
                theta0,
                sweep,
            } => {
                let (s, c) = (theta0 + t * sweep).sin_cos();
                [center[0] + radius * c, center[1] + radius * s]
            }
        }
    }

    /// Length of the whole curve.
    fn length(&self) -> f64 {
        match *self {
            Curve::Line { p0, p1 } => (p1[0] - p0[0]).hypot(p1[1] - p0[1]),
            Curve::Arc { radius, sweep, .. } => radius * sweep.abs(),
        }
    }

    /// Fewest pieces the curve is cut into.
    fn min_pieces(&self) -> usize {
        match *self {
            Curve::Line { .. } => 1,
            Curve::Arc { sweep, .. } => {
                (sweep.abs() / MAX_ARC_STEP - 1e-9).ceil().max(1.0) as usize
            }
        }
    }
}

/// A validated segment with where it came from.
#[derive(Clone, Debug)]
pub(crate) struct Piece {
    /// Geometry.
    pub curve: Curve,
    /// The loop it belongs to.
    pub boundary: LoopId,
    /// Its index in the loop.
    pub segment: usize,
}

/// A validated loop: its pieces and its corner points (the start of every segment).
#[derive(Clone, Debug)]
pub(crate) struct CheckedLoop {
    /// Which loop.
    pub boundary: LoopId,
    /// Start point of every segment (the loop is closed: segment i ends at corner i + 1, the
    /// last at corner 0).
    pub corners: Vec<[f64; 2]>,
    /// Index into the piece list of every segment.
    pub pieces: Vec<usize>,
}

fn finite(p: [f64; 2]) -> bool {
    p[0].is_finite() && p[1].is_finite()
}

fn distance(a: [f64; 2], b: [f64; 2]) -> f64 {
    (a[0] - b[0]).hypot(a[1] - b[1])
}

/// Checks a loop and appends its pieces to `pieces`.
pub(crate) fn check_loop(
    boundary: LoopId,
    lp: &Loop,
    pieces: &mut Vec<Piece>,
) -> Result<CheckedLoop, MeshError> {
    if lp.segments.is_empty() {
        return Err(MeshError::EmptyLoop { boundary });
    }
    let ends = |s: &Segment| match s {
        Segment::Line { to } | Segment::Arc { to, .. } => *to,
    };
    if !finite(lp.start) {
        return Err(MeshError::NotFinite {
            boundary,
            segment: 0,
        });
    }
    let mut extent: f64 = 0.0;
    for (i, s) in lp.segments.iter().enumerate() {
        let centre = match s {
            Segment::Arc { center, .. } => *center,
            Segment::Line { .. } => lp.start,
        };
        if !finite(ends(s)) || !finite(centre) {
            return Err(MeshError::NotFinite {
                boundary,
                segment: i,
            });
        }
        extent = extent
            .max(distance(lp.start, ends(s)))
            .max(distance(lp.start, centre));
    }
    let last = ends(&lp.segments[lp.segments.len() - 1]);
    let gap = distance(last, lp.start);
    if gap > CLOSURE_TOLERANCE * extent {
        return Err(MeshError::OpenLoop {
            boundary,
            end_x: last[0],
            end_y: last[1],
            start_x: lp.start[0],
            start_y: lp.start[1],
        });
    }
    let mut corners = Vec::with_capacity(lp.segments.len());
    let mut ids = Vec::with_capacity(lp.segments.len());
    let mut from = lp.start;
    for (i, s) in lp.segments.iter().enumerate() {
        // The last segment ends exactly at the start.
        let to = if i + 1 == lp.segments.len() {
            lp.start
        } else {
            ends(s)
        };
        let curve = checked_curve(boundary, i, s, from, to, extent)?;
        corners.push(from);
        ids.push(pieces.len());
        pieces.push(Piece {
            curve,
            boundary,
            segment: i,
        });
        from = to;
    }
    Ok(CheckedLoop {
        boundary,
        corners,
        pieces: ids,
    })
}

/// The parametric form of one segment from `from` to `to`, checked.
fn checked_curve(
    boundary: LoopId,
    segment: usize,
    s: &Segment,
    from: [f64; 2],
    to: [f64; 2],
    extent: f64,
) -> Result<Curve, MeshError> {
    match s {
        Segment::Line { .. } => {
            let length = distance(from, to);
            if length <= DEGENERATE_TOLERANCE * extent || length == 0.0 {
                return Err(MeshError::DegenerateSegment {
                    boundary,
                    segment,
                    what: format!("line of length {length}"),
                });
            }
            Ok(Curve::Line { p0: from, p1: to })
        }
        Segment::Arc {
            center,
            counter_clockwise,
            ..
        } => {
            let (r0, r1) = (distance(*center, from), distance(*center, to));
            if r0 <= DEGENERATE_TOLERANCE * extent || r0 == 0.0 {
                return Err(MeshError::DegenerateSegment {
                    boundary,
                    segment,
                    what: format!("arc of radius {r0}"),
                });
            }
            if (r0 - r1).abs() > CLOSURE_TOLERANCE * r0.max(r1) {
                return Err(MeshError::ArcEndsOffCircle {
                    boundary,
                    segment,
                    center_x: center[0],
                    center_y: center[1],
                    start_radius: r0,
                    end_radius: r1,
                });
            }
            let theta0 = (from[1] - center[1]).atan2(from[0] - center[0]);
            let theta1 = (to[1] - center[1]).atan2(to[0] - center[0]);
            let full = distance(from, to) <= CLOSURE_TOLERANCE * r0;
            // Counter-clockwise sweep in (0, 2 pi]; clockwise the complement, negative.
            let ccw_sweep = if full {
                TAU
            } else {
                (theta1 - theta0).rem_euclid(TAU)
            };
            let sweep = match (*counter_clockwise, full) {
                (true, _) => ccw_sweep,
                (false, true) => -TAU,
                (false, false) => ccw_sweep - TAU,
            };
            Ok(Curve::Arc {
                center: *center,
                radius: 0.5 * (r0 + r1),
                theta0,
                sweep,
            })
        }
    }
}

/// Evaluates the size field, refusing non-positive or non-finite values.
pub(crate) fn size_at(
    size: &(dyn Fn([f64; 2]) -> f64 + Sync),
    p: [f64; 2],
) -> Result<f64, MeshError> {
    let h = size(p);
    if h > 0.0 && h.is_finite() {
        Ok(h)
    } else {
        Err(MeshError::NonPositiveSize {
            x: p[0],
            y: p[1],
            value: h,
        })
    }
}

/// Interior parameters `0 < t_1 < ... < t_{n-1} < 1` of the points on a curve, spaced so that
/// `int ds / h` is the same between neighbours (trapezoid rule on a table of samples, inverted
/// by linear interpolation). Fails if the curve alone would need more than `cap` points.
pub(crate) fn discretise(
    curve: &Curve,
    size: &(dyn Fn([f64; 2]) -> f64 + Sync),
    cap: usize,
) -> Result<Vec<f64>, MeshError> {
    let length = curve.length();
    let mut h_min = f64::INFINITY;
    for k in 0..=MIN_SAMPLES {
        h_min = h_min.min(size_at(size, curve.point(k as f64 / MIN_SAMPLES as f64))?);
    }
    let m = ((SAMPLES_PER_SIZE * length / h_min).ceil() as usize).clamp(MIN_SAMPLES, MAX_SAMPLES);
    let mut cumulative = Vec::with_capacity(m + 1);
    cumulative.push(0.0);
    let mut previous = 1.0 / size_at(size, curve.point(0.0))?;
    for k in 1..=m {
        let inv = 1.0 / size_at(size, curve.point(k as f64 / m as f64))?;
        let last = cumulative[k - 1];
        cumulative.push(last + 0.5 * (previous + inv) * length / m as f64);
        previous = inv;
    }
    let total = cumulative[m];
    let n = (total.round() as usize).max(curve.min_pieces());
    if n > cap {
        return Err(MeshError::PointCapReached { cap });
    }
    let mut ts = Vec::with_capacity(n.saturating_sub(1));
    let mut k = 0;
    for j in 1..n {
        let target = total * j as f64 / n as f64;
        while k + 1 < m && cumulative[k + 1] < target {
            k += 1;
        }
        let (c0, c1) = (cumulative[k], cumulative[k + 1]);
        let frac = if c1 > c0 {
            (target - c0) / (c1 - c0)
        } else {
            0.5
        };
        ts.push((k as f64 + frac.clamp(0.0, 1.0)) / m as f64);
    }
    Ok(ts)
}
