//! Preconditioned conjugate gradients (Hestenes & Stiefel 1952, "Methods of conjugate gradients
//! for solving linear systems", J. Res. NBS 49:409-436; the preconditioned form as in Saad 2003,
//! "Iterative Methods for Sparse Linear Systems", Algorithm 9.1 (from memory)) with a node-block
//! Jacobi preconditioner (the inverse of each node's diagonal block of free dofs, 1x1 to 3x3),
//! plus the coarse corner-node level of [`super::coarse`] on meshes with quadratic elements.
//!
//! Every vector operation is parallel and element-wise; dot products sum fixed-size chunks in
//! parallel and then the chunk sums in order, so iterates are identical for any thread count.

use super::coarse::Coarse;
use super::pattern::Csr;
use super::SolveError;
use rayon::prelude::*;

/// Entries per partial sum of a dot product (fixed: the summation order must not depend on the
/// number of threads).
const DOT_CHUNK: usize = 8192;

/// `a . b` summed in fixed chunks.
fn dot(a: &[f64], b: &[f64]) -> f64 {
    let partial: Vec<f64> = a
        .par_chunks(DOT_CHUNK)
        .zip(b.par_chunks(DOT_CHUNK))
        .map(|(x, y)| x.iter().zip(y).map(|(p, q)| p * q).sum())
        .collect();
    partial.iter().sum()
}

/// Inverted diagonal blocks: block `k` covers equations `start[k]..start[k] + size[k]`.
struct BlockJacobi {
    start: Vec<u32>,
    size: Vec<u8>,
    inverse: Vec<[f64; 9]>,
}

impl BlockJacobi {
    /// Inverts the diagonal blocks of `a` (blocks given as consecutive equation ranges). A block
    /// that is not positive definite gives [`SolveError::Singular`].
    fn new(a: &Csr, blocks: &[(u32, u8)]) -> Result<Self, SolveError> {
        let inverse: Vec<Option<[f64; 9]>> = blocks
            .par_iter()
            .map(|&(s, k)| {
                let k = k as usize;
                let mut m = nalgebra::Matrix3::<f64>::identity();
                for i in 0..k {
                    let row = s as usize + i;
                    let (lo, hi) = (a.row_ptr[row] as usize, a.row_ptr[row + 1] as usize);
                    let cols = &a.col[lo..hi];
                    for j in 0..k {
                        let p = cols.partition_point(|&c| c < s + j as u32);
                        m[(i, j)] = if p < cols.len() && cols[p] == s + j as u32 {
                            a.val[lo + p]
                        } else {
                            0.0
                        };
                    }
                }
                let inv = m.cholesky()?.inverse();
                Some(std::array::from_fn(|t| inv[(t / 3, t % 3)]))
            })
            .collect();
        let mut out = Vec::with_capacity(blocks.len());
        for (k, inv) in inverse.into_iter().enumerate() {
            match inv {
                Some(v) => out.push(v),
                None => {
                    return Err(SolveError::Singular {
                        detail: format!(
                            "the diagonal block of equation {} is not positive definite",
                            blocks[k].0
                        ),
                    })
                }
            }
        }
        Ok(Self {
            start: blocks.iter().map(|b| b.0).collect(),
            size: blocks.iter().map(|b| b.1).collect(),
            inverse: out,
        })
    }

    /// `z = M^-1 r`.
    fn apply(&self, r: &[f64], z: &mut [f64]) {
        // Blocks are consecutive and cover all equations: split z accordingly.
        let mut parts: Vec<&mut [f64]> = Vec::with_capacity(self.start.len());
        let mut rest = z;
        for &k in &self.size {
            let (head, tail) = rest.split_at_mut(k as usize);
            parts.push(head);
            rest = tail;
        }
        parts.into_par_iter().enumerate().for_each(|(b, out)| {
            let s = self.start[b] as usize;
            let inv = &self.inverse[b];
            for i in 0..out.len() {
                let mut acc = 0.0;
                for j in 0..out.len() {
                    acc += inv[3 * i + j] * r[s + j];
                }
                out[i] = acc;
            }
        });
    }
}

/// Solves `a x = b` by preconditioned CG from `x = 0`. `blocks` are the equation ranges of the
/// nodes (consecutive, covering all equations); `coarse`, when given, adds its two-level term
/// to the block-Jacobi preconditioner. Returns `x` and the iteration count.
pub(super) fn conjugate_gradient(
    a: &Csr,
    b: &[f64],
    blocks: &[(u32, u8)],
    coarse: Option<&Coarse>,
    tolerance: f64,
    max_iterations: usize,
) -> Result<(Vec<f64>, usize), SolveError> {
    let n = a.n;
    let mut x = vec![0.0; n];
    let b_norm = dot(b, b).sqrt();
    if b_norm == 0.0 {
        return Ok((x, 0));
    }
    let jacobi = BlockJacobi::new(a, blocks)?;
    let mut r = b.to_vec();
    let mut z = vec![0.0; n];
    let precondition = |r: &[f64], z: &mut [f64]| -> Result<(), SolveError> {
        jacobi.apply(r, z);
        match coarse {
            Some(c) => c.add(r, z),
            None => Ok(()),
        }
    };
    precondition(&r, &mut z)?;
    let mut p = z.clone();
    let mut q = vec![0.0; n];
    let mut rz = dot(&r, &z);
    let mut residual = 1.0;
    for it in 1..=max_iterations {
        a.multiply(&p, &mut q);
        let pq = dot(&p, &q);
        if !(pq > 0.0 && pq.is_finite()) {
            return Err(SolveError::Singular {
                detail: format!("conjugate gradients met p^T K p = {pq:e} at iteration {it}"),
            });
        }
        let alpha = rz / pq;
        x.par_iter_mut()
            .zip(r.par_iter_mut())
            .zip(p.par_iter().zip(q.par_iter()))
            .for_each(|((xi, ri), (pi, qi))| {
                *xi += alpha * pi;
                *ri -= alpha * qi;
            });
        residual = dot(&r, &r).sqrt() / b_norm;
        if residual <= tolerance {
            return Ok((x, it));
        }
        precondition(&r, &mut z)?;
        let rz_new = dot(&r, &z);
        let beta = rz_new / rz;
        rz = rz_new;
        p.par_iter_mut()
            .zip(z.par_iter())
            .for_each(|(pi, zi)| *pi = zi + beta * *pi);
    }
    Err(SolveError::NotConverged {
        iterations: max_iterations,
        residual,
    })
}
