//! Size- and shape-driven Delaunay refinement of the working triangulation.
//!
//! A face inside the domain is bad when it is too large for the size field or too skinny:
//! * size: longest edge `l_max > SIZE_FACTOR h(centroid)`;
//! * shape: circumradius over shortest edge `R / l_min > 1 / (2 sin theta_min)`, which is the same
//!   as its smallest angle being below `theta_min` (Ruppert 1995; Shewchuk 2002, "Delaunay
//!   refinement algorithms for triangular mesh generation", Comput. Geom. 22:21-74).
//!
//! Bad faces are taken from a priority queue, worst first (badness = the larger of the two
//! ratios; ties by vertex indices), and their circumcentre is inserted, unless it lies beyond a
//! boundary edge (found by walking the straight line from the face's centroid) or encroaches a
//! boundary edge of its insertion cavity; that edge is split instead. Encroachment uses the
//! diametral lens: the edge is seen from the point under an angle above 120 degrees (Shewchuk
//! 2002; it splits fewer boundary edges than the diametral circle of Ruppert 1995). Splits are collected and made at the end of a round, followed by a fresh
//! inside/outside classification; rounds repeat until no face is bad. Inserting a point only
//! changes faces around the new vertex, all of which lie in the same region as the bad face, so
//! inside flags stay valid within a round.

use super::boundary_cdt::{edge_key, Workspace};
use super::domain::size_at;
use super::MeshError;
use spade::handles::{FixedFaceHandle, FixedVertexHandle, InnerTag};
use spade::{Point2, Triangulation};
use std::cmp::Ordering;
use std::collections::{BinaryHeap, HashSet};

/// A face is too large when its longest edge exceeds this multiple of the target size at its
/// centroid. Refinement stops with edges between about half and this multiple of `h`; 1.4 was
/// tuned so that the mean edge length is close to `h` (measured 0.99 h at constant size on a
/// square and on the demo deck; 1.3 gave 0.92 h, 1.45 gave 1.02 h).
pub(crate) const SIZE_FACTOR: f64 = 1.4;

/// Skinny faces whose shortest edge is below this fraction of `h` are left alone: they sit at
/// small input angles or tiny boundary features, where refining for shape would not end
/// (the known limit of Delaunay refinement at input angles below 60 degrees, Ruppert 1995).
const MIN_QUALITY_EDGE: f64 = 1.0 / 16.0;

/// Cosine of the lens angle: a point encroaches a boundary edge when it sees the edge under an
/// angle above 120 degrees, `cos < -1/2`.
const ENCROACH_COS: f64 = -0.5;

/// Most faces a straight-line walk may cross before giving up (a safeguard against a cycle from
/// round-off; a real walk crosses far fewer).
const MAX_WALK: usize = 1 << 20;

/// A bad face in the queue.
struct Entry {
    badness: f64,
    face: FixedFaceHandle<InnerTag>,
    vertices: [usize; 3],
}

impl PartialEq for Entry {
    fn eq(&self, other: &Self) -> bool {
        self.cmp(other) == Ordering::Equal
    }
}
impl Eq for Entry {}
impl PartialOrd for Entry {
    fn partial_cmp(&self, other: &Self) -> Option<Ordering> {
        Some(self.cmp(other))
    }
}
impl Ord for Entry {
    /// Larger badness first; among equals the smaller vertex triple first.
    fn cmp(&self, other: &Self) -> Ordering {
        self.badness
            .total_cmp(&other.badness)
            .then_with(|| other.vertices.cmp(&self.vertices))
    }
}

/// What to do about a bad face.
enum Action {
    /// Insert this point.
    Insert([f64; 2]),
    /// Split this boundary edge instead.
    Split((usize, usize)),
    /// Nothing can be done now.
    Skip,
}

/// `(b - a) x (c - a)`: positive when `a, b, c` run counter-clockwise.
fn orient(a: [f64; 2], b: [f64; 2], c: [f64; 2]) -> f64 {
    (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0])
}

/// Circumcentre and squared circumradius of a triangle (relative to its first corner for
/// accuracy); `None` for a degenerate triangle.
fn circumcircle(p: [[f64; 2]; 3]) -> Option<([f64; 2], f64)> {
    let (bx, by) = (p[1][0] - p[0][0], p[1][1] - p[0][1]);
    let (cx, cy) = (p[2][0] - p[0][0], p[2][1] - p[0][1]);
    let d = 2.0 * (bx * cy - by * cx);
    if d == 0.0 {
        return None;
    }
    let (b2, c2) = (bx * bx + by * by, cx * cx + cy * cy);
    let ux = (cy * b2 - by * c2) / d;
    let uy = (bx * c2 - cx * b2) / d;
    let centre = [p[0][0] + ux, p[0][1] + uy];
    (centre[0].is_finite() && centre[1].is_finite()).then_some((centre, ux * ux + uy * uy))
}

/// The refinement loop's settings.
pub(crate) struct Refinement<'s> {
    /// Target edge length.
    pub size: &'s (dyn Fn([f64; 2]) -> f64 + Sync),
    /// Largest circumradius / shortest edge allowed (infinite: no shape refinement).
    pub max_ratio: f64,
}

impl Refinement<'_> {
    /// Refines until no inside face is bad.
    pub(crate) fn run(&self, ws: &mut Workspace) -> Result<(), MeshError> {
        loop {
            let mut heap = BinaryHeap::new();
            let faces: Vec<FixedFaceHandle<InnerTag>> = ws.cdt.fixed_inner_faces().collect();
            for f in faces {
                if ws.inside[f.index()] {
                    if let Some(entry) = self.entry(ws, f)? {
                        heap.push(entry);
                    }
                }
            }
            let mut splits: Vec<(usize, usize)> = Vec::new();
            let mut scheduled: HashSet<(usize, usize)> = HashSet::new();
            while let Some(entry) = heap.pop() {
                if ws.face_vertices(entry.face) != entry.vertices {
                    continue;
                }
                match self.action(ws, entry.face, entry.vertices) {
                    Action::Insert(c) => {
                        let hint = FixedVertexHandle::from_index(entry.vertices[0]);
                        let before = ws.cdt.num_vertices();
                        if before >= ws.cap {
                            return Err(MeshError::PointCapReached { cap: ws.cap });
                        }
                        let Ok(v) = ws.cdt.insert_with_hint(Point2::new(c[0], c[1]), hint) else {
                            continue;
                        };
                        if v.index() < before {
                            continue;
                        }
                        ws.inside.resize(ws.cdt.num_all_faces(), false);
                        let around: Vec<FixedFaceHandle<InnerTag>> = ws
                            .cdt
                            .vertex(v)
                            .out_edges()
                            .filter_map(|e| e.face().as_inner())
                            .map(|f| f.fix())
                            .collect();
                        for f in around {
                            ws.inside[f.index()] = true;
                            if let Some(entry) = self.entry(ws, f)? {
                                heap.push(entry);
                            }
                        }
                    }
                    Action::Split(key) => {
                        if scheduled.insert(key) {
                            splits.push(key);
                        }
                    }
                    Action::Skip => {}
                }
            }
            if splits.is_empty() {
                return Ok(());
            }
            for key in splits {
                ws.split_boundary_edge(key)?;
            }
            ws.classify();
        }
    }

    /// The queue entry of face `f` if it is bad.
    fn entry(
        &self,
        ws: &Workspace,
        f: FixedFaceHandle<InnerTag>,
    ) -> Result<Option<Entry>, MeshError> {
        let vertices = ws.face_vertices(f);
        let p = vertices.map(|v| ws.position(v));
        let len = |i: usize, j: usize| (p[i][0] - p[j][0]).hypot(p[i][1] - p[j][1]);
        let l = [len(1, 2), len(2, 0), len(0, 1)];
        let l_max = l[0].max(l[1]).max(l[2]);
        let l_min = l[0].min(l[1]).min(l[2]);
        let centroid = [
            (p[0][0] + p[1][0] + p[2][0]) / 3.0,
            (p[0][1] + p[1][1] + p[2][1]) / 3.0,
        ];
        let h = size_at(self.size, centroid)?;
        let size_ratio = l_max / (SIZE_FACTOR * h);
        let twice_area = orient(p[0], p[1], p[2]);
        let shape_ratio = if self.max_ratio.is_finite() && l_min >= MIN_QUALITY_EDGE * h {
            let circumradius = l[0] * l[1] * l[2] / (2.0 * twice_area);
            circumradius / l_min / self.max_ratio
        } else {
            0.0
        };
        let badness = size_ratio.max(shape_ratio);
        Ok((badness > 1.0).then_some(Entry {
            badness,
            face: f,
            vertices,
        }))
    }

    /// Where to refine face `f`: its circumcentre, or the boundary edge that circumcentre lies
    /// beyond or encroaches.
    fn action(&self, ws: &Workspace, f: FixedFaceHandle<InnerTag>, vertices: [usize; 3]) -> Action {
        let p = vertices.map(|v| ws.position(v));
        let Some((c, _)) = circumcircle(p) else {
            return Action::Skip;
        };
        let g = [
            (p[0][0] + p[1][0] + p[2][0]) / 3.0,
            (p[0][1] + p[1][1] + p[2][1]) / 3.0,
        ];
        // Walk from the centroid towards the circumcentre.
        let mut current = f;
        let mut steps = 0;
        loop {
            let face = ws.cdt.face(current);
            let exit = face.adjacent_edges().into_iter().find(|e| {
                let (a, b) = (pos(e.from().position()), pos(e.to().position()));
                if orient(a, b, c) >= 0.0 {
                    return false;
                }
                let (oa, ob) = (orient(g, c, a), orient(g, c, b));
                (oa <= 0.0 && ob >= 0.0) || (oa >= 0.0 && ob <= 0.0)
            });
            let Some(e) = exit else { break };
            if e.is_constraint_edge() {
                return Action::Split(edge_key(e.from().fix().index(), e.to().fix().index()));
            }
            let Some(next) = e.rev().face().as_inner() else {
                return Action::Skip;
            };
            current = next.fix();
            steps += 1;
            if steps > MAX_WALK {
                return Action::Skip;
            }
        }
        // The insertion cavity: faces whose circumcircle holds c, reached without crossing the
        // boundary. Its boundary edges must not be encroached by c.
        let mut visited: HashSet<usize> = HashSet::new();
        let mut stack = vec![current];
        visited.insert(current.index());
        while let Some(fh) = stack.pop() {
            for e in ws.cdt.face(fh).adjacent_edges() {
                if e.is_constraint_edge() {
                    let (a, b) = (pos(e.from().position()), pos(e.to().position()));
                    if encroaches(c, a, b) {
                        return Action::Split(edge_key(
                            e.from().fix().index(),
                            e.to().fix().index(),
                        ));
                    }
                    continue;
                }
                let Some(next) = e.rev().face().as_inner() else {
                    continue;
                };
                if visited.contains(&next.index()) {
                    continue;
                }
                let q = next.positions().map(pos);
                if let Some((centre, r2)) = circumcircle(q) {
                    let d2 = (c[0] - centre[0]).powi(2) + (c[1] - centre[1]).powi(2);
                    if d2 < r2 {
                        visited.insert(next.index());
                        stack.push(next.fix());
                    }
                }
            }
        }
        Action::Insert(c)
    }
}

/// Plain array from a spade point.
fn pos(p: Point2<f64>) -> [f64; 2] {
    [p.x, p.y]
}

/// Whether `c` lies in the diametral lens of the edge `a-b` (sees it under more than 120
/// degrees).
fn encroaches(c: [f64; 2], a: [f64; 2], b: [f64; 2]) -> bool {
    let u = [a[0] - c[0], a[1] - c[1]];
    let v = [b[0] - c[0], b[1] - c[1]];
    let dot = u[0] * v[0] + u[1] * v[1];
    let norms = u[0].hypot(u[1]) * v[0].hypot(v[1]);
    dot < ENCROACH_COS * norms
}
