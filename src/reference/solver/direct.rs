//! Sparse Cholesky factorisation with faer (`K = L L^T` after faer's approximate-minimum-degree
//! fill-reducing ordering, then two triangular solves).
//!
//! The matrix is stored as the upper triangle in compressed rows; read as compressed columns the
//! same arrays are its lower triangle (K is symmetric), which is the side handed to faer.
//!
//! faer runs sequentially here (`Par::Seq`): its parallel supernodal factorisation adds the
//! updates of sibling supernodes in completion order, so with several threads the last bits of
//! the solution depend on the thread count (measured on a 200k-dof system), which the project
//! does not allow.

use super::pattern::Csr;
use super::SolveError;
use faer::dyn_stack::{MemBuffer, MemStack};
use faer::linalg::solvers::LltError;
use faer::sparse::linalg::cholesky::{
    factorize_symbolic_cholesky, LltRef, SymbolicCholesky, SymmetricOrdering,
};
use faer::sparse::{SparseColMatRef, SymbolicSparseColMatRef};
use faer::{Conj, MatMut, Par, Side};

/// A numeric Cholesky factor, reusable for several right sides.
pub(super) struct Factor {
    symbolic: SymbolicCholesky<u32>,
    values: Vec<f64>,
}

/// Allocation failure of a workspace.
fn no_memory(what: &str) -> SolveError {
    SolveError::Factorization(format!("cannot allocate the {what}"))
}

impl Factor {
    /// Factors `a`, which must hold the upper triangle of an SPD matrix. A non-positive pivot
    /// gives [`SolveError::Singular`].
    pub fn new(a: &Csr) -> Result<Self, SolveError> {
        debug_assert!(a.upper);
        let n = a.n;
        let symbolic = SymbolicSparseColMatRef::new_checked(n, n, &a.row_ptr, None, &a.col);
        let matrix = SparseColMatRef::new(symbolic, &a.val);
        let factor = factorize_symbolic_cholesky(
            symbolic,
            Side::Lower,
            SymmetricOrdering::Amd,
            Default::default(),
        )
        .map_err(|e| SolveError::Factorization(format!("{e:?}")))?;
        let mut values: Vec<f64> = Vec::new();
        values
            .try_reserve_exact(factor.len_val())
            .map_err(|_| no_memory(&format!("factor ({} values)", factor.len_val())))?;
        values.resize(factor.len_val(), 0.0);
        let par = Par::Seq;
        let mut scratch = MemBuffer::try_new(
            factor.factorize_numeric_llt_scratch::<f64>(par, Default::default()),
        )
        .map_err(|_| no_memory("factorisation workspace"))?;
        factor
            .factorize_numeric_llt(
                &mut values,
                matrix,
                Side::Lower,
                Default::default(),
                par,
                MemStack::new(&mut scratch),
                Default::default(),
            )
            .map_err(|e| match e {
                LltError::NonPositivePivot { index } => SolveError::Singular {
                    detail: format!("non-positive pivot at elimination step {index} of {n}"),
                },
            })?;
        Ok(Self {
            symbolic: factor,
            values,
        })
    }

    /// Number of stored values of the factor L.
    #[allow(dead_code)]
    pub fn factor_entries(&self) -> usize {
        self.values.len()
    }

    /// Overwrites `rhs` with the solution of `a x = rhs`.
    pub fn solve(&self, rhs: &mut [f64]) -> Result<(), SolveError> {
        let n = rhs.len();
        let par = Par::Seq;
        let mut scratch = MemBuffer::try_new(self.symbolic.solve_in_place_scratch::<f64>(1, par))
            .map_err(|_| no_memory("solve workspace"))?;
        let x = MatMut::from_column_major_slice_mut(rhs, n, 1);
        LltRef::new(&self.symbolic, &self.values).solve_in_place_with_conj(
            Conj::No,
            x,
            par,
            MemStack::new(&mut scratch),
        );
        Ok(())
    }
}

/// Overwrites `rhs` with the solution of `a x = rhs`; `a` must hold the upper triangle.
pub(super) fn cholesky_solve(a: &Csr, rhs: &mut [f64]) -> Result<(), SolveError> {
    if a.n == 0 {
        return Ok(());
    }
    Factor::new(a)?.solve(rhs)?;
    if rhs.iter().any(|v| !v.is_finite()) {
        return Err(SolveError::Singular {
            detail: "the solution is not finite".into(),
        });
    }
    Ok(())
}
