//! Small dense least-squares fits for SPR patches, on the stack.
//!
//! Normal equations A a = b with A = sum_k P(x_k)^T P(x_k), b = sum_k P(x_k)^T sigma(x_k)
//! (Zienkiewicz & Zhu 1992, part 1, eq. for the patch fit), one factorisation for all six stress
//! components. A is factorised by Cholesky; a pivot below `RANK_TOLERANCE` times the largest
//! diagonal entry means the samples do not determine the polynomial (rank deficient), and the fit
//! is refused so the caller can fall back. Coordinates are scaled to the patch (|x| <= 1), so the
//! entries of A are of order one and the relative pivot test is meaningful.

use crate::element::{PatchBasis, MAX_NODES};
use crate::material::SymTensor;

/// Largest number of basis terms (triquadratic: 27).
pub const MAX_TERMS: usize = MAX_NODES;

/// Relative pivot below which A counts as singular: 1e-10, i.e. sample matrices P with condition
/// number up to about 1e5 are accepted (cond(A) = cond(P)^2; the solution error grows like
/// cond(A) times machine epsilon, about 1e-6 at this limit). Measured on distorted 15-node wedge
/// meshes: a vertex patch within one element layer has its samples on only two z levels, so z^2
/// is nearly a combination of 1 and z; at 1e-12 such fits were accepted and broke the patch test
/// (error 3e-6 of the energy norm), at 1e-10 they are refused and the node falls back.
const RANK_TOLERANCE: f64 = 1e-10;

/// Accumulates the normal equations of one patch.
pub struct NormalEquations {
    basis: PatchBasis,
    a: [[f64; MAX_TERMS]; MAX_TERMS],
    b: [SymTensor; MAX_TERMS],
    samples: usize,
}

impl NormalEquations {
    /// Empty system for `basis`.
    pub fn new(basis: PatchBasis) -> Self {
        Self {
            basis,
            a: [[0.0; MAX_TERMS]; MAX_TERMS],
            b: [[0.0; 6]; MAX_TERMS],
            samples: 0,
        }
    }

    /// Adds one sample at scaled position `xbar` with value `sigma`.
    #[inline]
    pub fn add(&mut self, xbar: [f64; 3], sigma: &SymTensor) {
        let n = self.basis.len();
        let mut p = [0.0; MAX_TERMS];
        self.basis.evaluate(xbar, &mut p);
        for i in 0..n {
            for j in i..n {
                self.a[i][j] += p[i] * p[j];
            }
            for c in 0..6 {
                self.b[i][c] += p[i] * sigma[c];
            }
        }
        self.samples += 1;
    }

    /// Solves for the coefficients (`coeff[i][c]`, term i, component c). Returns false when there
    /// are fewer samples than terms or A is rank deficient.
    pub fn solve(mut self, coeff: &mut [SymTensor]) -> bool {
        let n = self.basis.len();
        if self.samples < n {
            return false;
        }
        for i in 0..n {
            for j in 0..i {
                self.a[i][j] = self.a[j][i];
            }
        }
        let max_diag = (0..n).map(|i| self.a[i][i]).fold(0.0, f64::max);
        if !max_diag.is_finite() || max_diag <= 0.0 {
            return false;
        }
        // Cholesky A = L L^T in place (lower triangle).
        for j in 0..n {
            let mut d = self.a[j][j];
            for k in 0..j {
                d -= self.a[j][k] * self.a[j][k];
            }
            if d.is_nan() || d <= RANK_TOLERANCE * max_diag {
                return false;
            }
            let l = d.sqrt();
            self.a[j][j] = l;
            for i in j + 1..n {
                let mut s = self.a[i][j];
                for k in 0..j {
                    s -= self.a[i][k] * self.a[j][k];
                }
                self.a[i][j] = s / l;
            }
        }
        // Forward and back substitution for all six components at once.
        let mut y = [[0.0; 6]; MAX_TERMS];
        for i in 0..n {
            let mut s = self.b[i];
            for k in 0..i {
                for c in 0..6 {
                    s[c] -= self.a[i][k] * y[k][c];
                }
            }
            for c in 0..6 {
                y[i][c] = s[c] / self.a[i][i];
            }
        }
        for i in (0..n).rev() {
            let mut s = y[i];
            for k in i + 1..n {
                for c in 0..6 {
                    s[c] -= self.a[k][i] * coeff[k][c];
                }
            }
            for c in 0..6 {
                coeff[i][c] = s[c] / self.a[i][i];
            }
        }
        true
    }
}

/// Evaluates a fitted patch polynomial at scaled position `xbar`.
#[inline]
pub fn evaluate(basis: PatchBasis, coeff: &[SymTensor], xbar: [f64; 3]) -> SymTensor {
    let mut p = [0.0; MAX_TERMS];
    basis.evaluate(xbar, &mut p);
    let mut s = [0.0; 6];
    for (pi, ci) in p.iter().zip(coeff).take(basis.len()) {
        for c in 0..6 {
            s[c] += pi * ci[c];
        }
    }
    s
}
