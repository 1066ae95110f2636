//! Mapped and block meshes of the reference problems: a quarter annulus (Lame cylinder), a
//! quarter plate with a circular hole (Kirsch plate) and the L-shape (re-entrant corner).
//!
//! Each block is a [`structured`] mesh of the unit square whose points are moved by an exact
//! map `X(u, v)` with [`map_points`]. The structured generator puts every node, corner or mid
//! node, on a lattice of half-cell steps, so quadratic mid nodes are placed by the exact map as
//! well: mid nodes of edges on a circle lie on the circle. Blocks are joined with
//! [`merge_coincident`]. Every map keeps the orientation of the unit square (`u` across,
//! `v` counter-clockwise), so elements stay positive in VTK node order.
//!
//! Panics: these builders take their parameters from code, not from files; a parameter out of
//! range (a 3D kind, a non-positive length, zero cells) is a programming error and panics with
//! a message naming it (documented per function).

use super::merge::merge_coincident;
use crate::element::ElementKind;
use crate::mesh::generate::{map_points, structured};
use crate::mesh::{CellBlock, Mesh};
use std::f64::consts::FRAC_PI_2;

/// Relative tolerance (of the bounding-box diagonal) used to join blocks: the shared nodes of
/// two blocks are computed by the same formula, so they agree to round-off (common practice).
const BLOCK_MERGE_TOLERANCE: f64 = 1e-9;

/// Point on the unit circle at the fraction `f` of a quarter turn (angle `f pi / 2`), exact at
/// `f = 0` and `f = 1` and symmetric about the diagonal (so both blocks of the plate with a hole
/// compute the same diagonal points).
fn quarter_turn(f: f64) -> [f64; 2] {
    if f <= 0.0 {
        [1.0, 0.0]
    } else if f >= 1.0 {
        [0.0, 1.0]
    } else if f <= 0.5 {
        let t = f * FRAC_PI_2;
        [t.cos(), t.sin()]
    } else {
        let t = (1.0 - f) * FRAC_PI_2;
        [t.sin(), t.cos()]
    }
}

/// Panics unless `kind` is one of the 2D kinds.
fn assert_planar(kind: ElementKind) {
    assert!(
        kind.dim() == 2,
        "mapped 2D meshes need a 2D element kind, got {kind}"
    );
}

/// Index of a lattice point of a structured unit-square mesh with `cells` cells along one
/// direction: the generator places it at `k / (2 cells)`, `k = 0..=2 cells`.
fn lattice_index(coordinate: f64, cells: usize) -> usize {
    (coordinate * (2 * cells) as f64).round() as usize
}

/// Appends `other` (same single kind) to `mesh`, renumbering its points and elements.
fn append(mesh: &mut Mesh, other: Mesh) {
    let offset = mesh.points.len() as u32;
    let first = mesh.element_count();
    mesh.points.extend(other.points);
    for block in other.blocks {
        let nodes = block.nodes.iter().map(|&n| n + offset);
        match mesh.blocks.iter_mut().find(|b| b.kind == block.kind) {
            Some(existing) => existing.nodes.extend(nodes),
            None => mesh.blocks.push(CellBlock {
                kind: block.kind,
                nodes: nodes.collect(),
                first_element: first,
            }),
        }
    }
    let count = other.file_cell.len();
    mesh.file_cell
        .extend((first..first + count).map(|e| e as u32));
    mesh.zone.extend(other.zone);
}

/// Quarter annulus a <= r <= b, 0 <= theta <= pi/2, n_r x n_theta cells.
///
/// Map of the unit square: `r = a + (b - a) u`, `theta = v pi/2`, `X = r (cos theta,
/// sin theta)`; radial cells of equal width, angular cells of equal angle. Quadrilateral kinds
/// give `n_r n_theta` elements, triangles twice as many (each cell split on a diagonal).
/// Nodes on both arcs (mid nodes included) lie on their circles to round-off.
///
/// # Panics
/// If `kind` is not a 2D kind, unless `0 < a < b` (finite), or if a cell count is zero.
pub fn quarter_annulus(kind: ElementKind, a: f64, b: f64, n_r: usize, n_theta: usize) -> Mesh {
    assert_planar(kind);
    assert!(
        a > 0.0 && b > a && b.is_finite(),
        "quarter_annulus needs 0 < a < b, got a = {a}, b = {b}"
    );
    assert!(
        n_r > 0 && n_theta > 0,
        "quarter_annulus needs at least one cell per direction"
    );
    let mut mesh = structured(kind, [n_r, n_theta, 1], [1.0, 1.0, 1.0]);
    map_points(&mut mesh, |p| {
        let r = a + (b - a) * lattice_index(p[0], n_r) as f64 / (2 * n_r) as f64;
        let c = quarter_turn(lattice_index(p[1], n_theta) as f64 / (2 * n_theta) as f64);
        [r * c[0], r * c[1], 0.0]
    });
    mesh
}

/// Radial position `g in [0, 1]` of lattice point `k` (`k = 0..=2n`) of a geometrically graded
/// row of `n` cells whose widths grow by `ratio` from one cell to the next:
/// `g(2i) = (ratio^i - 1) / (ratio^n - 1)` (`i / n` for `ratio = 1`), mid points halfway.
fn graded(k: usize, n: usize, ratio: f64) -> f64 {
    let corner = |i: usize| {
        if (ratio - 1.0).abs() < 1e-12 {
            i as f64 / n as f64
        } else {
            (ratio.powi(i as i32) - 1.0) / (ratio.powi(n as i32) - 1.0)
        }
    };
    if k % 2 == 0 {
        corner(k / 2)
    } else {
        0.5 * (corner(k / 2) + corner(k / 2 + 1))
    }
}

/// Quarter plate [0, l] x [0, l] minus the quarter disc r < a, as a mapped mesh of two blocks
/// (split on the diagonal), n_r cells radially and n_theta cells along each half of the arc;
/// radial grading `ratio` (>= 1: cells grow away from the hole geometrically). Nodes on the hole
/// lie exactly on the circle.
///
/// Block 1 covers `0 <= theta <= pi/4`, block 2 `pi/4 <= theta <= pi/2`. In block 1 the point
/// of the unit square `(u, v)` maps to `X = (1 - g(u)) a (cos theta, sin theta) + g(u) (l, l v)`
/// with `theta = v pi/4`: straight radial lines from the hole to the edge `x = l`, whose points
/// are equally spaced; block 2 is the mirror construction towards `y = l`, with `v` running
/// counter-clockwise so that both blocks keep the orientation. `g` is the geometric grading: `ratio` is the
/// width ratio of neighbouring radial cells, so the outermost cell is `ratio^(n_r - 1)` times the
/// innermost. Mid nodes of radial edges sit halfway between their corners. Elements:
/// `2 n_r n_theta` quadrilaterals or twice as many triangles.
///
/// # Panics
/// If `kind` is not a 2D kind, unless `0 < a < l` (finite) and `ratio >= 1` (finite), or if a
/// cell count is zero.
pub fn plate_with_hole(
    kind: ElementKind,
    a: f64,
    l: f64,
    n_r: usize,
    n_theta: usize,
    ratio: f64,
) -> Mesh {
    assert_planar(kind);
    assert!(
        a > 0.0 && l > a && l.is_finite(),
        "plate_with_hole needs 0 < a < l, got a = {a}, l = {l}"
    );
    assert!(
        ratio >= 1.0 && ratio.is_finite(),
        "plate_with_hole needs a grading ratio >= 1, got {ratio}"
    );
    assert!(
        n_r > 0 && n_theta > 0,
        "plate_with_hole needs at least one cell per direction"
    );
    let block = |second: bool| {
        let mut mesh = structured(kind, [n_r, n_theta, 1], [1.0, 1.0, 1.0]);
        map_points(&mut mesh, |p| {
            let g = graded(lattice_index(p[0], n_r), n_r, ratio);
            let v = lattice_index(p[1], n_theta) as f64 / (2 * n_theta) as f64;
            let (f, outer) = if second {
                (0.5 + 0.5 * v, [l * (1.0 - v), l])
            } else {
                (0.5 * v, [l, l * v])
            };
            let c = quarter_turn(f);
            if g == 0.0 {
                // Exactly on the hole.
                return [a * c[0], a * c[1], 0.0];
            }
            [
                (1.0 - g) * a * c[0] + g * outer[0],
                (1.0 - g) * a * c[1] + g * outer[1],
                0.0,
            ]
        });
        mesh
    };
    let mut mesh = block(false);
    append(&mut mesh, block(true));
    merge_coincident(&mut mesh, BLOCK_MERGE_TOLERANCE);
    mesh
}

/// L-shape `(-1,1)^2 minus [0,1] x [-1,0]` (removed quadrant x>0, y<0), scaled by `half_width`,
/// n cells per unit length (three n x n blocks merged), re-entrant corner at the origin.
///
/// The blocks are `[-1, 0] x [0, 1]`, `[0, 1] x [0, 1]` and `[-1, 0] x [-1, 0]` (times
/// `half_width`), each a structured mesh; the re-entrant faces lie on the positive x axis and the
/// negative y axis. Elements: `3 n^2` quadrilaterals or twice as many triangles.
///
/// # Panics
/// If `kind` is not a 2D kind, unless `half_width > 0` (finite), or if `n` is zero.
pub fn l_shape(kind: ElementKind, half_width: f64, n: usize) -> Mesh {
    assert_planar(kind);
    assert!(
        half_width > 0.0 && half_width.is_finite(),
        "l_shape needs half_width > 0, got {half_width}"
    );
    assert!(n > 0, "l_shape needs at least one cell per unit length");
    let block = |x0: f64, y0: f64| {
        let mut mesh = structured(kind, [n, n, 1], [1.0, 1.0, 1.0]);
        map_points(&mut mesh, |p| {
            let u = lattice_index(p[0], n) as f64 / (2 * n) as f64;
            let v = lattice_index(p[1], n) as f64 / (2 * n) as f64;
            [half_width * (x0 + u), half_width * (y0 + v), 0.0]
        });
        mesh
    };
    let mut mesh = block(-1.0, 0.0);
    append(&mut mesh, block(0.0, 0.0));
    append(&mut mesh, block(-1.0, -1.0));
    merge_coincident(&mut mesh, BLOCK_MERGE_TOLERANCE);
    mesh
}

/// [`l_shape`] graded toward the re-entrant corner at the origin: every vertex `x` moves to
/// `x (|x|_inf / w)^(gamma - 1)` (`w` the half width), which keeps the outer square edges and
/// the two edges through the corner in place and makes the element size grow like
/// `r^(1 - 1/gamma)` away from the corner (a radical mesh; gamma = 1 is the uniform mesh).
/// Mid-edge nodes sit at the midpoints of the straight mapped edges and quad9 centres at the
/// mean of their corners: mapping them too would pull them toward the corner and, for
/// gamma >= 2, turn the corner elements into quarter-point elements whose geometry is itself
/// singular. Grading toward a singularity so that the corner elements no longer hold most of
/// the error is the usual mesh design for it (Babuska, Kellogg & Pitkaranta 1979, "Direct and
/// inverse error estimates for finite elements with mesh refinements", Numer. Math. 33).
pub fn l_shape_graded(kind: ElementKind, half_width: f64, n: usize, gamma: f64) -> Mesh {
    assert!(
        gamma >= 1.0 && gamma.is_finite(),
        "l_shape_graded needs gamma >= 1, got {gamma}"
    );
    let mut mesh = l_shape(kind, half_width, n);
    let block = &mesh.blocks[0];
    let (nv, nn) = (kind.vertex_count(), kind.node_count());
    let mut is_vertex = vec![false; mesh.points.len()];
    for i in 0..block.len() {
        for &v in &block.cell(i)[..nv] {
            is_vertex[v as usize] = true;
        }
    }
    for (p, &vertex) in mesh.points.iter_mut().zip(&is_vertex) {
        if vertex {
            let rho = p[0].abs().max(p[1].abs()) / half_width;
            let scale = rho.powf(gamma - 1.0);
            p[0] *= scale;
            p[1] *= scale;
        }
    }
    let (edges, mids) = (kind.edges(), kind.edge_mid_nodes());
    for i in 0..mesh.blocks[0].len() {
        let cell: Vec<u32> = mesh.blocks[0].cell(i).to_vec();
        let at = |k: usize| mesh.points[cell[k] as usize];
        let mut moved: Vec<(u32, [f64; 3])> = Vec::new();
        for (edge, &mid) in edges.iter().zip(mids) {
            let (a, b) = (at(edge[0]), at(edge[1]));
            moved.push((cell[mid], std::array::from_fn(|c| 0.5 * (a[c] + b[c]))));
        }
        if nn > nv + mids.len() {
            let centre: [f64; 3] =
                std::array::from_fn(|c| (0..nv).map(|k| at(k)[c]).sum::<f64>() / nv as f64);
            moved.push((cell[nn - 1], centre));
        }
        for (node, x) in moved {
            mesh.points[node as usize] = x;
        }
    }
    mesh
}
