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

/// One sample of a patch fit: position in scaled patch coordinates and the FE stress there.
pub type Sample = ([f64; 3], SymTensor);

/// Fits `basis` by least squares to `samples`, writing `coeff[i][c]` (term i, component c).
/// Returns false when there are fewer samples than terms or the normal matrix is rank
/// deficient. The system is sized to the basis at compile time, so small bases touch only
/// small arrays and the loops unroll.
pub fn fit(basis: PatchBasis, samples: &[Sample], coeff: &mut [SymTensor]) -> bool {
    match basis.len() {
        3 => fit_n::<3>(basis, samples, coeff),
        4 => fit_n::<4>(basis, samples, coeff),
        6 => fit_n::<6>(basis, samples, coeff),
        8 => fit_n::<8>(basis, samples, coeff),
        9 => fit_n::<9>(basis, samples, coeff),
        10 => fit_n::<10>(basis, samples, coeff),
        20 => fit_n::<20>(basis, samples, coeff),
        27 => fit_n::<27>(basis, samples, coeff),
        _ => false,
    }
}

fn fit_n<const N: usize>(basis: PatchBasis, samples: &[Sample], coeff: &mut [SymTensor]) -> bool {
    let n = N;
    let table = basis.exponents();
    if table.len() != N || coeff.len() < N {
        return false;
    }
    // Exponents as indices into per-coordinate power tables [1, v, v^2]: every basis term has
    // degree <= 2 in each coordinate.
    let exps: [[usize; 3]; N] = std::array::from_fn(|i| table[i].map(|e| (e as usize).min(2)));
    let three_d = basis.dim() == 3;
    let mut a = [[0.0; N]; N];
    let mut b = [[0.0; 6]; N];
    for (xbar, sigma) in samples {
        let px = [1.0, xbar[0], xbar[0] * xbar[0]];
        let py = [1.0, xbar[1], xbar[1] * xbar[1]];
        let z = if three_d { xbar[2] } else { 0.0 };
        let pz = [1.0, z, z * z];
        let p: [f64; N] = std::array::from_fn(|i| px[exps[i][0]] * py[exps[i][1]] * pz[exps[i][2]]);
        // The full square: measured fewer instructions than the triangle (it vectorises).
        for i in 0..N {
            for j in 0..N {
                a[i][j] += p[i] * p[j];
            }
            for c in 0..6 {
                b[i][c] += p[i] * sigma[c];
            }
        }
    }
    let samples = samples.len();
    if samples < n {
        return false;
    }
    let max_diag = (0..n).map(|i| a[i][i]).fold(0.0, f64::max);
    if !max_diag.is_finite() || max_diag <= 0.0 {
        return false;
    }
    // Cholesky A = L L^T, L stored in the lower triangle (A's upper triangle holds the input).
    for j in 0..n {
        let mut d = a[j][j];
        for k in 0..j {
            d -= a[j][k] * a[j][k];
        }
        if d.is_nan() || d <= RANK_TOLERANCE * max_diag {
            return false;
        }
        let l = d.sqrt();
        a[j][j] = l;
        for i in j + 1..n {
            let mut s = a[j][i];
            for k in 0..j {
                s -= a[i][k] * a[j][k];
            }
            a[i][j] = s / l;
        }
    }
    // Forward and back substitution for all six components at once.
    let mut y = [[0.0; 6]; N];
    for i in 0..n {
        let mut s = b[i];
        for k in 0..i {
            for c in 0..6 {
                s[c] -= a[i][k] * y[k][c];
            }
        }
        for c in 0..6 {
            y[i][c] = s[c] / a[i][i];
        }
    }
    for i in (0..n).rev() {
        let mut s = y[i];
        for k in i + 1..n {
            for c in 0..6 {
                s[c] -= a[k][i] * coeff[k][c];
            }
        }
        for c in 0..6 {
            coeff[i][c] = s[c] / a[i][i];
        }
    }
    true
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
