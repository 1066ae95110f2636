//! Unit tests of the element library. Every test loops over [`ElementKind::ALL`]; helpers here
//! give reproducible pseudo-random points and distorted element geometries.

mod geometry_tests;
mod quadrature_tests;
mod shape_tests;
mod topology_tests;

use super::{ElementKind, Family, MAX_NODES};

/// SplitMix64 (Steele, Lea & Flood 2014): a tiny reproducible generator, so no test depends on
/// a random-number crate or on the run.
pub(crate) struct Rng(u64);

impl Rng {
    pub fn new(seed: u64) -> Rng {
        Rng(seed)
    }

    /// Uniform in [0, 1).
    pub fn uniform(&mut self) -> f64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^= z >> 31;
        (z >> 11) as f64 / (1u64 << 53) as f64
    }

    /// Uniform in [lo, hi).
    pub fn range(&mut self, lo: f64, hi: f64) -> f64 {
        lo + (hi - lo) * self.uniform()
    }

    /// A natural point strictly inside the reference element of `kind` (at least `margin` away
    /// from every bounding plane, in natural units).
    pub fn point_in(&mut self, kind: ElementKind, margin: f64) -> [f64; 3] {
        loop {
            let xi = [
                self.range(-1.0, 1.0),
                self.range(-1.0, 1.0),
                self.range(-1.0, 1.0),
            ];
            let xi = match kind.dim() {
                2 => [xi[0], xi[1], 0.0],
                _ => xi,
            };
            if kind.contains_natural(xi, -margin) {
                return xi;
            }
        }
    }
}

/// Characteristic size of the reference element: 1 for simplices and wedges (unit legs), 2 for
/// the [-1, 1] squares and cubes.
pub(super) fn reference_size(kind: ElementKind) -> f64 {
    match kind.info().family {
        Family::Quadrilateral | Family::Hexahedron => 2.0,
        _ => 1.0,
    }
}

/// Nodal coordinates of a mildly distorted element: the reference nodes under a fixed affine
/// map with positive determinant, then every node moved by up to 5 % of the element size in
/// each direction (so quadratic kinds get curved edges).
pub(super) fn distorted_coords(kind: ElementKind, rng: &mut Rng) -> Vec<[f64; 3]> {
    const A: [[f64; 3]; 3] = [[1.2, 0.3, 0.1], [-0.2, 0.9, 0.2], [0.1, -0.1, 1.1]];
    let dim = kind.dim();
    let h = 0.05 * reference_size(kind);
    kind.reference_nodes()
        .iter()
        .map(|xi| {
            let mut x = [0.0; 3];
            for (r, xr) in x.iter_mut().enumerate().take(dim) {
                for (c, xc) in xi.iter().enumerate().take(dim) {
                    *xr += A[r][c] * xc;
                }
                *xr += 3.0 + rng.range(-h, h);
            }
            x
        })
        .collect()
}

/// Shape functions at `xi` in a fixed-size buffer.
pub(super) fn shape(kind: ElementKind, xi: [f64; 3]) -> [f64; MAX_NODES] {
    let mut n = [0.0; MAX_NODES];
    kind.shape_functions(xi, &mut n[..kind.node_count()]);
    n
}

/// Reference gradients at `xi` in a fixed-size buffer.
pub(super) fn gradients(kind: ElementKind, xi: [f64; 3]) -> [[f64; 3]; MAX_NODES] {
    let mut dn = [[0.0; 3]; MAX_NODES];
    kind.shape_gradients(xi, &mut dn[..kind.node_count()]);
    dn
}

/// Asserts `|actual - expected| <= rel * scale`, rejecting NaN first, and prints both sides.
#[track_caller]
pub(crate) fn assert_close(actual: f64, expected: f64, rel: f64, scale: f64, what: &str) {
    assert!(
        actual.is_finite(),
        "{what}: got non-finite {actual}, expected {expected}"
    );
    let err = (actual - expected).abs();
    assert!(
        err <= rel * scale,
        "{what}: got {actual:.17e}, expected {expected:.17e}, error {err:.3e} > {rel:.1e} x scale {scale}"
    );
}
