//! Isoparametric geometry: the Jacobian of `x(xi) = sum_i N_i(xi) x_i`, physical gradients,
//! interpolated positions and the inverse map from a physical point to natural coordinates.
//!
//! With `J_ab = dx_b/dxi_a = sum_i (dN_i/dxi_a) x_ib` (rows: natural directions), the chain rule
//! gives `dN/dxi = J dN/dx`, so the physical gradient is `dN/dx = J^-1 dN/dxi` (common practice;
//! written `J^-T` when `J` is taken as `dx/dxi` with rows the physical directions).

use super::{ElementKind, MAX_NODES};

/// Jacobian `J_ab = sum_i dn[i][a] coords[i][b]` over the first `dim` rows and columns
/// (unused entries are the identity so that the determinant of the 2D block is the full one).
#[inline]
fn jacobian(dim: usize, coords: &[[f64; 3]], dn_ref: &[[f64; 3]]) -> [[f64; 3]; 3] {
    let mut j = [[0.0; 3]; 3];
    for (x, g) in coords.iter().zip(dn_ref) {
        for a in 0..dim {
            for b in 0..dim {
                j[a][b] += g[a] * x[b];
            }
        }
    }
    if dim == 2 {
        j[2][2] = 1.0;
    }
    j
}

/// Determinant and inverse of a 3x3 matrix by cofactors; the inverse is only meaningful when
/// the determinant is non-zero and finite.
#[inline]
fn det_inv(j: &[[f64; 3]; 3]) -> (f64, [[f64; 3]; 3]) {
    let c00 = j[1][1] * j[2][2] - j[1][2] * j[2][1];
    let c01 = j[1][2] * j[2][0] - j[1][0] * j[2][2];
    let c02 = j[1][0] * j[2][1] - j[1][1] * j[2][0];
    let det = j[0][0] * c00 + j[0][1] * c01 + j[0][2] * c02;
    let inv_det = 1.0 / det;
    let inv = [
        [
            c00 * inv_det,
            (j[0][2] * j[2][1] - j[0][1] * j[2][2]) * inv_det,
            (j[0][1] * j[1][2] - j[0][2] * j[1][1]) * inv_det,
        ],
        [
            c01 * inv_det,
            (j[0][0] * j[2][2] - j[0][2] * j[2][0]) * inv_det,
            (j[0][2] * j[1][0] - j[0][0] * j[1][2]) * inv_det,
        ],
        [
            c02 * inv_det,
            (j[0][1] * j[2][0] - j[0][0] * j[2][1]) * inv_det,
            (j[0][0] * j[1][1] - j[0][1] * j[1][0]) * inv_det,
        ],
    ];
    (det, inv)
}

/// True when every mid-edge node of an element of `kind` lies at the midpoint of its edge, to
/// within `1e-12 h` with `h^2 = h2` the element's size (always true for linear kinds). A
/// straight-sided simplex then has a constant Jacobian, which the strain kernel and the element
/// counter of the plan use; `point(i)` gives the position of local node `i`.
pub fn mid_nodes_at_midpoints(
    kind: ElementKind,
    point: impl Fn(usize) -> [f64; 3],
    h2: f64,
) -> bool {
    let tol2 = 1e-24 * h2;
    kind.edges()
        .iter()
        .zip(kind.edge_mid_nodes())
        .all(|(edge, &mid)| {
            let (m, p, q) = (point(mid), point(edge[0]), point(edge[1]));
            let off: f64 = (0..3).map(|c| (m[c] - 0.5 * (p[c] + q[c])).powi(2)).sum();
            off <= tol2
        })
}

/// Determinant and inverse of a Jacobian `j` (rows: natural directions) of a `dim`-dimensional
/// map; in 2D only the x-y block is used and the third row and column of the inverse are those
/// of the identity. The inverse is only meaningful when the determinant is non-zero and finite.
#[inline]
pub fn invert_jacobian(dim: usize, j: &[[f64; 3]; 3]) -> (f64, [[f64; 3]; 3]) {
    if dim == 2 {
        let mut planar = [[0.0; 3]; 3];
        planar[0][..2].copy_from_slice(&j[0][..2]);
        planar[1][..2].copy_from_slice(&j[1][..2]);
        planar[2][2] = 1.0;
        det_inv(&planar)
    } else {
        det_inv(j)
    }
}

/// det J at one point from the nodal coordinates and reference gradients (2D: the x-y block).
#[inline]
pub fn jacobian_determinant(dim: usize, coords: &[[f64; 3]], dn_ref: &[[f64; 3]]) -> f64 {
    det_inv(&jacobian(dim, coords, dn_ref)).0
}

/// Maps reference gradients to physical ones for one point. `dim` 2 uses x, y only; 3 uses
/// x, y, z. Returns `det J` (the caller treats `det <= 0` or non-finite as an inverted or
/// degenerate element); fills `dn_phys[i] = J^-1 dn_ref[i]` only when `det > 0` (third entry 0
/// in 2D). Uses the first `dn_ref.len()` entries of `coords`.
pub fn map_gradients(
    dim: usize,
    coords: &[[f64; 3]],
    dn_ref: &[[f64; 3]],
    dn_phys: &mut [[f64; 3]],
) -> f64 {
    let j = jacobian(dim, coords, dn_ref);
    let (det, inv) = det_inv(&j);
    if det > 0.0 && det.is_finite() {
        for (out, g) in dn_phys.iter_mut().zip(dn_ref) {
            let mut p = [0.0; 3];
            for (b, pb) in p.iter_mut().enumerate().take(dim) {
                for a in 0..dim {
                    *pb += inv[b][a] * g[a];
                }
            }
            *out = p;
        }
    }
    det
}

/// Physical position `x = sum_i N_i x_i` of a natural point, given the nodal coordinates and
/// the shape functions `n` at that point.
pub fn interpolate_point(coords: &[[f64; 3]], n: &[f64]) -> [f64; 3] {
    let mut x = [0.0; 3];
    for (c, &ni) in coords.iter().zip(n) {
        for d in 0..3 {
            x[d] += ni * c[d];
        }
    }
    x
}

/// Maximum Newton iterations of [`inverse_map`].
const INVERSE_MAX_ITERATIONS: usize = 50;
/// Convergence of [`inverse_map`]: Newton step below this size in natural units (the reference
/// elements have size 1 or 2, so this is close to round-off).
const INVERSE_STEP_TOL: f64 = 1e-13;
/// Largest Newton step allowed in natural units, so a poor start cannot throw the iterate far
/// outside the region where the map is valid.
const INVERSE_MAX_STEP: f64 = 1.0;

/// Inverse isoparametric map: the natural coordinates of the physical point `x` in the element
/// of `kind` with nodal `coords`, or `None` if Newton's method did not converge (inverted or
/// degenerate Jacobian met on the way, or no convergence within 50 iterations).
///
/// Newton on `F(xi) = x(xi) - x`, `J^T dxi = -F`, started at the centroid of the reference
/// element; steps are capped at length 1 and halved (up to 30 times) while the residual grows.
/// The result may lie outside the element; check it with [`ElementKind::contains_natural`].
pub fn inverse_map(kind: ElementKind, coords: &[[f64; 3]], x: [f64; 3]) -> Option<[f64; 3]> {
    let dim = kind.dim();
    let nn = kind.node_count();
    if coords.len() < nn {
        return None;
    }
    let coords = &coords[..nn];
    let verts = &kind.reference_nodes()[..kind.vertex_count()];
    let mut xi = [0.0; 3];
    for v in verts {
        for d in 0..3 {
            xi[d] += v[d] / verts.len() as f64;
        }
    }
    let mut n = [0.0; MAX_NODES];
    let mut dn = [[0.0; 3]; MAX_NODES];
    let residual = |xi: [f64; 3], n: &mut [f64; MAX_NODES], dn: &mut [[f64; 3]; MAX_NODES]| {
        kind.shape_functions_and_gradients(xi, &mut n[..nn], &mut dn[..nn]);
        let xp = interpolate_point(coords, &n[..nn]);
        let mut r = [0.0; 3];
        for d in 0..dim {
            r[d] = x[d] - xp[d];
        }
        r
    };
    let norm = |v: [f64; 3]| (v[0] * v[0] + v[1] * v[1] + v[2] * v[2]).sqrt();
    let mut r = residual(xi, &mut n, &mut dn);
    for _ in 0..INVERSE_MAX_ITERATIONS {
        let j = jacobian(dim, coords, &dn[..nn]);
        let (det, inv) = det_inv(&j);
        if !(det.is_finite() && det > 0.0) {
            return None;
        }
        // Solve J^T step = r: step = J^-T r, i.e. step_a = sum_b inv[b][a] r_b.
        let mut step = [0.0; 3];
        for a in 0..dim {
            for b in 0..dim {
                step[a] += inv[b][a] * r[b];
            }
        }
        let len = norm(step);
        if !len.is_finite() {
            return None;
        }
        if len > INVERSE_MAX_STEP {
            step = step.map(|s| s * INVERSE_MAX_STEP / len);
        }
        let r0 = norm(r);
        let mut factor = 1.0;
        let mut trial;
        let mut r_trial;
        let mut halvings = 0;
        loop {
            trial = [0.0; 3];
            for d in 0..3 {
                trial[d] = xi[d] + factor * step[d];
            }
            r_trial = residual(trial, &mut n, &mut dn);
            if norm(r_trial) <= r0 || halvings == 30 {
                break;
            }
            factor *= 0.5;
            halvings += 1;
        }
        xi = trial;
        r = r_trial;
        if len < INVERSE_STEP_TOL {
            return Some(xi);
        }
    }
    None
}
