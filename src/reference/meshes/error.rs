//! The typed error of the generators and the mesher: every variant says which loop or segment,
//! what was found and what was expected, so the message can be shown as it is.

use crate::element::ElementKind;

/// Which boundary loop of a [`Domain`](super::Domain) an error is about.
#[derive(Copy, Clone, Debug, PartialEq, Eq)]
pub enum LoopId {
    /// The outer loop.
    Outer,
    /// `holes[i]`.
    Hole(usize),
}

impl std::fmt::Display for LoopId {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            LoopId::Outer => write!(f, "outer loop"),
            LoopId::Hole(i) => write!(f, "hole {i}"),
        }
    }
}

/// Error of [`triangulate`](super::triangulate) and [`extrude`](super::extrude).
#[derive(Debug, thiserror::Error)]
pub enum MeshError {
    /// A loop has no segment.
    #[error("{boundary}: no segment")]
    EmptyLoop {
        /// The loop.
        boundary: LoopId,
    },
    /// The last segment of a loop does not end at the loop's start.
    #[error("{boundary}: open, the last segment ends at ({end_x}, {end_y}) but the loop starts at ({start_x}, {start_y})")]
    OpenLoop {
        /// The loop.
        boundary: LoopId,
        /// End of the last segment, x.
        end_x: f64,
        /// End of the last segment, y.
        end_y: f64,
        /// Start of the loop, x.
        start_x: f64,
        /// Start of the loop, y.
        start_y: f64,
    },
    /// A coordinate is NaN or infinite.
    #[error("{boundary}, segment {segment}: coordinate not finite")]
    NotFinite {
        /// The loop.
        boundary: LoopId,
        /// Segment index in the loop.
        segment: usize,
    },
    /// A line segment of zero length, or an arc of zero radius.
    #[error("{boundary}, segment {segment}: degenerate ({what})")]
    DegenerateSegment {
        /// The loop.
        boundary: LoopId,
        /// Segment index in the loop.
        segment: usize,
        /// What is degenerate, with the numbers.
        what: String,
    },
    /// The two ends of an arc are at different distances from its centre.
    #[error("{boundary}, segment {segment}: arc ends not on one circle, start at radius {start_radius}, end at radius {end_radius} from the centre ({center_x}, {center_y})")]
    ArcEndsOffCircle {
        /// The loop.
        boundary: LoopId,
        /// Segment index in the loop.
        segment: usize,
        /// Centre x.
        center_x: f64,
        /// Centre y.
        center_y: f64,
        /// Distance of the arc's start from the centre.
        start_radius: f64,
        /// Distance of the arc's end from the centre.
        end_radius: f64,
    },
    /// Two boundary pieces cross or touch (within one loop or between loops).
    #[error("{boundary}, segment {segment}: the boundary crosses or touches itself or another loop near ({x}, {y})")]
    SelfIntersecting {
        /// The loop.
        boundary: LoopId,
        /// Segment index in the loop.
        segment: usize,
        /// A point near the crossing.
        x: f64,
        /// A point near the crossing.
        y: f64,
    },
    /// A hole does not lie inside the outer loop, or lies inside another hole.
    #[error("{boundary}: not inside the outer loop, or inside another hole")]
    MisplacedHole {
        /// The loop.
        boundary: LoopId,
    },
    /// The size field returned a non-positive or non-finite value.
    #[error("size field is {value} at ({x}, {y}), expected a positive finite edge length")]
    NonPositiveSize {
        /// Where it was evaluated, x.
        x: f64,
        /// Where it was evaluated, y.
        y: f64,
        /// The value returned.
        value: f64,
    },
    /// The mesh would need more points than [`MesherOptions::max_points`](super::MesherOptions).
    #[error("point cap reached: the mesh needs more than {cap} points (size field too small for the domain?)")]
    PointCapReached {
        /// The cap.
        cap: usize,
    },
    /// Splitting a boundary edge could not restore the boundary (features thinner than the
    /// local size, or arcs bulging across another boundary piece).
    #[error("boundary refinement failed near ({x}, {y}): a boundary piece there is closer to another than the mesh resolves")]
    BoundaryRefinement {
        /// Where, x.
        x: f64,
        /// Where, y.
        y: f64,
    },
    /// The triangulation library refused a boundary point (a coordinate too large or too close
    /// to zero for its exact predicates).
    #[error("the triangulation refused the point ({x}, {y}): {message}")]
    Triangulation {
        /// Point x.
        x: f64,
        /// Point y.
        y: f64,
        /// The library's reason.
        message: String,
    },
    /// An element kind the operation does not produce or accept.
    #[error("unsupported element kind {kind}: {expected}")]
    UnsupportedKind {
        /// The kind given.
        kind: ElementKind,
        /// The kinds accepted.
        expected: &'static str,
    },
    /// A numeric parameter out of range.
    #[error("{name} = {value}, expected {expected}")]
    InvalidParameter {
        /// Parameter name.
        name: &'static str,
        /// Value given.
        value: f64,
        /// Allowed range.
        expected: &'static str,
    },
}
