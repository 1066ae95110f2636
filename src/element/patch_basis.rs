//! Polynomial bases for the SPR patch fit (Zienkiewicz & Zhu 1992, part 1): the recovered
//! stress on a patch is `sigma*(x) = P(x) a` with `P` the row of monomials listed here, evaluated
//! in scaled patch-local coordinates. Each element kind fits with its own interpolation terms
//! (project methods notes, section 1.3).

/// Polynomial basis for the SPR patch fit, in (scaled) global coordinates.
#[derive(Copy, Clone, Debug, PartialEq, Eq, Hash)]
pub enum PatchBasis {
    /// `1, x, y` (tri3).
    Linear2,
    /// `1, x, y, xy` (quad4).
    Bilinear,
    /// `1, x, y, x^2, xy, y^2` (tri6).
    Quadratic2,
    /// Quadratic2 + `x^2 y, x y^2` (quad8).
    Serendipity2,
    /// Serendipity2 + `x^2 y^2` (quad9).
    Biquadratic,
    /// `1, x, y, z` (tet4, wedge6).
    Linear3,
    /// `1, x, y, z, xy, yz, zx, xyz` (hex8).
    Trilinear,
    /// Complete quadratic in 3D, 10 terms (tet10, wedge15).
    Quadratic3,
    /// Quadratic3 + `xyz, x^2y, x^2z, xy^2, y^2z, xz^2, yz^2, x^2yz, xy^2z, xyz^2`, 20 terms (hex20).
    Serendipity3,
    /// Tensor product of `{1, x, x^2}` in x, y and z, 27 terms (hex27).
    Triquadratic,
}

/// Exponents `[a, b, c]` of the terms `x^a y^b z^c` of the largest 3D basis, ordered so that
/// each smaller 3D basis is a prefix: constant, linear (4), then the rest of Quadratic3 (10),
/// the cubic and quartic serendipity terms (20), then the remaining triquadratic terms (27).
const TERMS3: [[u8; 3]; 27] = [
    [0, 0, 0],
    [1, 0, 0],
    [0, 1, 0],
    [0, 0, 1],
    [2, 0, 0],
    [0, 2, 0],
    [0, 0, 2],
    [1, 1, 0],
    [0, 1, 1],
    [1, 0, 1],
    [1, 1, 1],
    [2, 1, 0],
    [2, 0, 1],
    [1, 2, 0],
    [0, 2, 1],
    [1, 0, 2],
    [0, 1, 2],
    [2, 1, 1],
    [1, 2, 1],
    [1, 1, 2],
    [2, 2, 0],
    [0, 2, 2],
    [2, 0, 2],
    [2, 2, 1],
    [2, 1, 2],
    [1, 2, 2],
    [2, 2, 2],
];

/// Terms of the 2D bases, ordered so that Linear2, Quadratic2, Serendipity2 and Biquadratic are
/// prefixes.
const TERMS2: [[u8; 3]; 9] = [
    [0, 0, 0],
    [1, 0, 0],
    [0, 1, 0],
    [2, 0, 0],
    [1, 1, 0],
    [0, 2, 0],
    [2, 1, 0],
    [1, 2, 0],
    [2, 2, 0],
];

const BILINEAR: [[u8; 3]; 4] = [[0, 0, 0], [1, 0, 0], [0, 1, 0], [1, 1, 0]];
const TRILINEAR: [[u8; 3]; 8] = [
    [0, 0, 0],
    [1, 0, 0],
    [0, 1, 0],
    [0, 0, 1],
    [1, 1, 0],
    [0, 1, 1],
    [1, 0, 1],
    [1, 1, 1],
];

impl PatchBasis {
    /// Exponents `[a, b, c]` of each term `x^a y^b z^c`, in the order `evaluate` writes them;
    /// term 0 is the constant and terms 1..=dim are x, y (, z).
    pub fn exponents(self) -> &'static [[u8; 3]] {
        match self {
            PatchBasis::Linear2 => TERMS2.split_at(3).0,
            PatchBasis::Bilinear => &BILINEAR,
            PatchBasis::Quadratic2 => TERMS2.split_at(6).0,
            PatchBasis::Serendipity2 => TERMS2.split_at(8).0,
            PatchBasis::Biquadratic => &TERMS2,
            PatchBasis::Linear3 => TERMS3.split_at(4).0,
            PatchBasis::Trilinear => &TRILINEAR,
            PatchBasis::Quadratic3 => TERMS3.split_at(10).0,
            PatchBasis::Serendipity3 => TERMS3.split_at(20).0,
            PatchBasis::Triquadratic => &TERMS3,
        }
    }

    /// Number of terms (columns of the least-squares matrix).
    pub fn len(self) -> usize {
        self.exponents().len()
    }

    /// Always false: every basis holds at least the constant term.
    pub fn is_empty(self) -> bool {
        self.len() == 0
    }

    /// Number of coordinates the basis uses: 2 (x, y) or 3 (x, y, z).
    pub fn dim(self) -> usize {
        match self {
            PatchBasis::Linear2
            | PatchBasis::Bilinear
            | PatchBasis::Quadratic2
            | PatchBasis::Serendipity2
            | PatchBasis::Biquadratic => 2,
            PatchBasis::Linear3
            | PatchBasis::Trilinear
            | PatchBasis::Quadratic3
            | PatchBasis::Serendipity3
            | PatchBasis::Triquadratic => 3,
        }
    }

    /// Writes the terms at `x` into `out[..len()]`; term 0 is the constant 1. In 2D, `x[2]` is
    /// ignored. `out` must hold at least `len()` values (extra entries are left untouched).
    pub fn evaluate(self, x: [f64; 3], out: &mut [f64]) {
        let pow = |v: f64| [1.0, v, v * v];
        let px = pow(x[0]);
        let py = pow(x[1]);
        let pz = pow(if self.dim() == 3 { x[2] } else { 0.0 });
        for (o, e) in out.iter_mut().zip(self.exponents()) {
            *o = px[e[0] as usize] * py[e[1] as usize] * pz[e[2] as usize];
        }
    }

    /// The next smaller basis for the SPR fallback chain, or `None` at the end of it.
    ///
    /// Every step keeps a strict subset of the terms, so a patch that supports a basis also
    /// supports all lower ones:
    /// Biquadratic -> Serendipity2 -> Quadratic2 -> Bilinear -> Linear2 -> None, and
    /// Triquadratic -> Serendipity3 -> Quadratic3 -> Linear3 -> None, Trilinear -> Linear3.
    /// (Quadratic3 lacks `xyz`, so it drops to the complete linear basis, not to Trilinear.)
    pub fn lower(self) -> Option<PatchBasis> {
        match self {
            PatchBasis::Biquadratic => Some(PatchBasis::Serendipity2),
            PatchBasis::Serendipity2 => Some(PatchBasis::Quadratic2),
            PatchBasis::Quadratic2 => Some(PatchBasis::Bilinear),
            PatchBasis::Bilinear => Some(PatchBasis::Linear2),
            PatchBasis::Linear2 => None,
            PatchBasis::Triquadratic => Some(PatchBasis::Serendipity3),
            PatchBasis::Serendipity3 => Some(PatchBasis::Quadratic3),
            PatchBasis::Quadratic3 => Some(PatchBasis::Linear3),
            PatchBasis::Trilinear => Some(PatchBasis::Linear3),
            PatchBasis::Linear3 => None,
        }
    }
}
