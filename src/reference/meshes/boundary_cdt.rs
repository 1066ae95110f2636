//! The mesher's working triangulation: a constrained Delaunay triangulation (spade) of the
//! boundary points, a map from every boundary (constraint) edge to the segment it discretises,
//! the inside/outside flag of every face, and the split of a boundary edge on its segment.
//!
//! Inside faces are found by counting constraint crossings from the convex hull (even-odd
//! rule, a 0-1 breadth-first search over faces): the outer loop is crossed once, a hole twice.

use super::domain::{discretise, CheckedLoop, Piece};
use super::{LoopId, MeshError};
use spade::handles::{FixedFaceHandle, FixedVertexHandle, InnerTag};
use spade::{ConstrainedDelaunayTriangulation, Point2, Triangulation};
use std::collections::{HashMap, VecDeque};

/// The triangulation type: plain points, no extra data.
pub(crate) type Cdt = ConstrainedDelaunayTriangulation<Point2<f64>>;

/// Where a boundary edge lies: its segment (index into the piece list) and the segment
/// parameter at its lower- and higher-numbered vertex.
#[derive(Copy, Clone, Debug)]
pub(crate) struct EdgeSource {
    /// Index of the segment in the piece list.
    pub piece: usize,
    /// Parameter at the vertex with the smaller index.
    pub t_lo: f64,
    /// Parameter at the vertex with the larger index.
    pub t_hi: f64,
}

/// Sorted vertex pair: the key of an undirected edge.
pub(crate) fn edge_key(a: usize, b: usize) -> (usize, usize) {
    (a.min(b), a.max(b))
}

/// The triangulation with its boundary bookkeeping.
pub(crate) struct Workspace<'a> {
    /// The constrained Delaunay triangulation.
    pub cdt: Cdt,
    /// The boundary segments.
    pub pieces: &'a [Piece],
    /// Boundary edge -> the segment it lies on.
    pub edges: HashMap<(usize, usize), EdgeSource>,
    /// Per face index: whether the face is inside the domain.
    pub inside: Vec<bool>,
    /// Number of points allowed.
    pub cap: usize,
}

/// A boundary edge in loop direction, for the side check after the first classification.
struct DirectedBoundaryEdge {
    from: usize,
    to: usize,
    boundary: LoopId,
    domain_on_left: bool,
}

impl<'a> Workspace<'a> {
    /// Discretises every loop, inserts the points, adds the boundary edges as constraints, finds
    /// the inside faces and checks that every loop has the domain on the expected side.
    pub(crate) fn build(
        loops: &[CheckedLoop],
        pieces: &'a [Piece],
        size: &(dyn Fn([f64; 2]) -> f64 + Sync),
        cap: usize,
    ) -> Result<Self, MeshError> {
        let mut ws = Workspace {
            cdt: Cdt::new(),
            pieces,
            edges: HashMap::new(),
            inside: Vec::new(),
            cap,
        };
        let mut directed = Vec::new();
        let mut pending = Vec::new();
        for lp in loops {
            // (vertex, piece, parameter) at the start of each boundary edge of the loop.
            let mut starts: Vec<(usize, usize, f64)> = Vec::new();
            let mut polygon: Vec<[f64; 2]> = Vec::new();
            for (k, &pid) in lp.pieces.iter().enumerate() {
                let curve = &pieces[pid].curve;
                let ts = discretise(curve, size, cap)?;
                let points = std::iter::once((lp.corners[k], 0.0))
                    .chain(ts.iter().map(|&t| (curve.point(t), t)));
                for (p, t) in points {
                    let v = ws.insert_boundary_point(p, &pieces[pid])?;
                    starts.push((v, pid, t));
                    polygon.push(p);
                }
            }
            let area = signed_area(&polygon);
            let domain_on_left = (area > 0.0) == (lp.boundary == LoopId::Outer);
            for (i, &(from, pid, t0)) in starts.iter().enumerate() {
                // The next entry starts a new segment (parameter 0) or continues this one.
                let (to, _, next_t) = starts[(i + 1) % starts.len()];
                let t1 = if next_t == 0.0 { 1.0 } else { next_t };
                pending.push((from, to, pid, t0, t1));
                directed.push(DirectedBoundaryEdge {
                    from,
                    to,
                    boundary: lp.boundary,
                    domain_on_left,
                });
            }
        }
        for (from, to, pid, t0, t1) in pending {
            ws.add_boundary_edge(from, to, pid, t0, t1)?;
        }
        ws.classify();
        ws.check_sides(&directed)?;
        Ok(ws)
    }

    /// Inserts a boundary point; a point already present means the boundary touches itself.
    fn insert_boundary_point(&mut self, p: [f64; 2], piece: &Piece) -> Result<usize, MeshError> {
        let before = self.cdt.num_vertices();
        if before >= self.cap {
            return Err(MeshError::PointCapReached { cap: self.cap });
        }
        let v = self
            .cdt
            .insert(Point2::new(p[0], p[1]))
            .map_err(|e| MeshError::Triangulation {
                x: p[0],
                y: p[1],
                message: format!("{e:?}"),
            })?;
        if v.index() < before {
            return Err(MeshError::SelfIntersecting {
                boundary: piece.boundary,
                segment: piece.segment,
                x: p[0],
                y: p[1],
            });
        }
        Ok(v.index())
    }

    /// Adds the constraint edge `from -> to` on `piece`; crossing or overlapping another boundary
    /// edge, or passing through a boundary point, is a self-intersection.
    fn add_boundary_edge(
        &mut self,
        from: usize,
        to: usize,
        piece: usize,
        t0: f64,
        t1: f64,
    ) -> Result<(), MeshError> {
        let (a, b) = (
            FixedVertexHandle::from_index(from),
            FixedVertexHandle::from_index(to),
        );
        let fail = |ws: &Self| {
            let (p, q) = (ws.position(from), ws.position(to));
            MeshError::SelfIntersecting {
                boundary: ws.pieces[piece].boundary,
                segment: ws.pieces[piece].segment,
                x: 0.5 * (p[0] + q[0]),
                y: 0.5 * (p[1] + q[1]),
            }
        };
        if self.cdt.exists_constraint(a, b) || !self.cdt.can_add_constraint(a, b) {
            return Err(fail(self));
        }
        if self.cdt.try_add_constraint(a, b).len() != 1 {
            return Err(fail(self));
        }
        let (t_lo, t_hi) = if from < to { (t0, t1) } else { (t1, t0) };
        self.edges
            .insert(edge_key(from, to), EdgeSource { piece, t_lo, t_hi });
        Ok(())
    }

    /// Coordinates of vertex `v`.
    pub(crate) fn position(&self, v: usize) -> [f64; 2] {
        let p = self.cdt.vertex(FixedVertexHandle::from_index(v)).position();
        [p.x, p.y]
    }

    /// Vertex indices of a face, counter-clockwise.
    pub(crate) fn face_vertices(&self, f: FixedFaceHandle<InnerTag>) -> [usize; 3] {
        self.cdt.face(f).vertices().map(|v| v.fix().index())
    }

    /// Marks every face inside or outside by the parity of the number of boundary edges crossed
    /// on the way from the convex hull (0-1 breadth-first search, deterministic order).
    pub(crate) fn classify(&mut self) {
        let n = self.cdt.num_all_faces();
        let mut depth = vec![u32::MAX; n];
        let mut queue: VecDeque<(FixedFaceHandle<InnerTag>, u32)> = VecDeque::new();
        for e in self.cdt.convex_hull() {
            let inner = [e.face(), e.rev().face()]
                .into_iter()
                .find_map(|f| f.as_inner());
            if let Some(f) = inner {
                let d = u32::from(e.is_constraint_edge());
                if d < depth[f.index()] {
                    depth[f.index()] = d;
                    queue.push_back((f.fix(), d));
                }
            }
        }
        while let Some((f, d)) = queue.pop_front() {
            if d > depth[f.index()] {
                continue;
            }
            for e in self.cdt.face(f).adjacent_edges() {
                let Some(neighbour) = e.rev().face().as_inner() else {
                    continue;
                };
                let crossing = u32::from(e.is_constraint_edge());
                let nd = d + crossing;
                if nd < depth[neighbour.index()] {
                    depth[neighbour.index()] = nd;
                    if crossing == 0 {
                        queue.push_front((neighbour.fix(), nd));
                    } else {
                        queue.push_back((neighbour.fix(), nd));
                    }
                }
            }
        }
        self.inside = depth.iter().map(|&d| d != u32::MAX && d % 2 == 1).collect();
    }

    /// Whether the face on the left of `from -> to` is inside.
    fn left_is_inside(&self, from: usize, to: usize) -> Option<bool> {
        let e = self.cdt.get_edge_from_neighbors(
            FixedVertexHandle::from_index(from),
            FixedVertexHandle::from_index(to),
        )?;
        let f = e.face();
        Some(!f.is_outer() && self.inside[f.index()])
    }

    /// Every boundary edge must have the domain on the side its loop's orientation says; a hole
    /// outside the outer loop (or inside another hole) has it on the other side.
    fn check_sides(&self, directed: &[DirectedBoundaryEdge]) -> Result<(), MeshError> {
        let mut bad_outer = false;
        for e in directed {
            let left = self.left_is_inside(e.from, e.to);
            let right = self.left_is_inside(e.to, e.from);
            if left != Some(e.domain_on_left) || right != Some(!e.domain_on_left) {
                if e.boundary == LoopId::Outer {
                    bad_outer = true;
                } else {
                    return Err(MeshError::MisplacedHole {
                        boundary: e.boundary,
                    });
                }
            }
        }
        if bad_outer {
            return Err(MeshError::MisplacedHole {
                boundary: LoopId::Outer,
            });
        }
        Ok(())
    }

    /// Splits the boundary edge `key` at the middle of its segment parameter (on the arc for
    /// arcs): the constraint is removed, the new point inserted and the two halves constrained.
    /// Returns the new vertex. Faces change away from the new vertex too (the constraint's
    /// removal re-legalises its neighbourhood), so the caller reclassifies afterwards.
    pub(crate) fn split_boundary_edge(&mut self, key: (usize, usize)) -> Result<usize, MeshError> {
        let Some(&source) = self.edges.get(&key) else {
            let p = self.position(key.0);
            return Err(MeshError::BoundaryRefinement { x: p[0], y: p[1] });
        };
        let t_mid = 0.5 * (source.t_lo + source.t_hi);
        let m = self.pieces[source.piece].curve.point(t_mid);
        let failure = MeshError::BoundaryRefinement { x: m[0], y: m[1] };
        let (a, b) = (
            FixedVertexHandle::from_index(key.0),
            FixedVertexHandle::from_index(key.1),
        );
        let Some(edge) = self.cdt.get_edge_from_neighbors(a, b) else {
            return Err(failure);
        };
        let edge = edge.as_undirected().fix();
        let before = self.cdt.num_vertices();
        if before >= self.cap {
            return Err(MeshError::PointCapReached { cap: self.cap });
        }
        self.cdt.remove_constraint_edge(edge);
        let v = self
            .cdt
            .insert_with_hint(Point2::new(m[0], m[1]), a)
            .map_err(|_| MeshError::BoundaryRefinement { x: m[0], y: m[1] })?;
        if v.index() < before {
            return Err(failure);
        }
        self.edges.remove(&key);
        let halves = [(key.0, source.t_lo), (key.1, source.t_hi)];
        for (end, t_end) in halves {
            let added = self
                .cdt
                .try_add_constraint(FixedVertexHandle::from_index(end), v);
            if added.len() != 1 {
                return Err(MeshError::BoundaryRefinement { x: m[0], y: m[1] });
            }
            // The new vertex has the largest index.
            self.edges.insert(
                edge_key(end, v.index()),
                EdgeSource {
                    piece: source.piece,
                    t_lo: t_end,
                    t_hi: t_mid,
                },
            );
        }
        Ok(v.index())
    }

    /// Point halfway along edge `a-b`: on the segment's curve for boundary edges (on the arc for
    /// arcs), the straight midpoint otherwise.
    pub(crate) fn edge_midpoint(&self, a: usize, b: usize) -> [f64; 2] {
        match self.edges.get(&edge_key(a, b)) {
            Some(s) => self.pieces[s.piece].curve.point(0.5 * (s.t_lo + s.t_hi)),
            None => {
                let (p, q) = (self.position(a), self.position(b));
                [0.5 * (p[0] + q[0]), 0.5 * (p[1] + q[1])]
            }
        }
    }
}

/// Signed area of a polygon (shoelace formula): positive when counter-clockwise.
fn signed_area(polygon: &[[f64; 2]]) -> f64 {
    let n = polygon.len();
    (0..n)
        .map(|i| {
            let (p, q) = (polygon[i], polygon[(i + 1) % n]);
            p[0] * q[1] - q[0] * p[1]
        })
        .sum::<f64>()
        * 0.5
}
