//! Sparse Cholesky solve with faer (`K = L L^T` after faer's fill-reducing ordering, then two
//! triangular solves).
//!
//! The matrix is stored as the upper triangle in compressed rows; read as compressed columns the
//! same arrays are its lower triangle (K is symmetric), which is the side handed to faer.

use super::pattern::Csr;
use super::SolveError;
use faer::linalg::solvers::Solve;
use faer::sparse::linalg::LltError;
use faer::sparse::{SparseColMatRef, SymbolicSparseColMatRef};
use faer::{MatMut, Side};

/// Overwrites `rhs` with the solution of `a x = rhs`; `a` must hold the upper triangle.
pub(super) fn cholesky_solve(a: &Csr, rhs: &mut [f64]) -> Result<(), SolveError> {
    debug_assert!(a.upper);
    let n = a.n;
    if n == 0 {
        return Ok(());
    }
    let symbolic = SymbolicSparseColMatRef::new_checked(n, n, &a.row_ptr, None, &a.col);
    let matrix = SparseColMatRef::new(symbolic, &a.val);
    let llt = matrix.sp_cholesky(Side::Lower).map_err(|e| match e {
        LltError::Numeric(faer::linalg::cholesky::llt::factor::LltError::NonPositivePivot {
            index,
        }) => SolveError::Singular {
            detail: format!("non-positive pivot at elimination step {index} of {n}"),
        },
        LltError::Generic(err) => SolveError::Factorization(format!("{err:?}")),
    })?;
    let x = MatMut::from_column_major_slice_mut(rhs, n, 1);
    llt.solve_in_place(x);
    if rhs.iter().any(|v| !v.is_finite()) {
        return Err(SolveError::Singular {
            detail: "the solution is not finite".into(),
        });
    }
    Ok(())
}
