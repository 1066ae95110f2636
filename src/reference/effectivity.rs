//! Effectivity of the estimator on the benchmark problems: estimated against exact error.
//!
//! theta = ||e*|| / ||e|| with ||e*|| the estimate (recovered minus FE stress) and ||e|| the
//! exact error (exact minus FE stress, high-order quadrature); Zienkiewicz & Zhu (1992, part 2)
//! call an estimator asymptotically exact when theta -> 1 under refinement. Rank agreement of
//! the element indicators is Spearman's rank correlation (Spearman 1904).

use super::problems::Problem;
use crate::estimate::EstimateError;
use crate::recovery::RecoveryMethod;
use thiserror::Error;

/// One line of the effectivity table.
#[derive(Clone, Debug)]
pub struct EffectivityRow {
    /// Problem name.
    pub problem: &'static str,
    /// Element kind name.
    pub kind: &'static str,
    /// Mesh level (the problem's division parameter).
    pub level: usize,
    /// Number of elements.
    pub elements: usize,
    /// Degrees of freedom.
    pub dofs: usize,
    /// Exact relative error ||e|| / ||u||.
    pub exact_relative: f64,
    /// Estimated relative error (SPR), eta.
    pub estimated_relative: f64,
    /// Effectivity index of SPR, ||e*|| / ||e||.
    pub theta_spr: f64,
    /// Effectivity index of nodal averaging.
    pub theta_average: f64,
    /// Spearman rank correlation of SPR element indicators with exact element errors.
    pub rank_correlation: f64,
}

/// Why a row could not be computed.
#[derive(Debug, Error)]
pub enum EffectivityError {
    /// The reference solve failed.
    #[error("{0}")]
    Solve(#[from] super::solver::SolveError),
    /// The estimate failed.
    #[error("{0}")]
    Estimate(#[from] EstimateError),
}

/// Solves `problem`, estimates with SPR and with averaging, and compares with the exact error.
pub fn effectivity_row(
    problem: &Problem,
    level: usize,
) -> Result<EffectivityRow, EffectivityError> {
    let solved = problem.solve()?;
    let spr = problem.estimate(&solved, RecoveryMethod::Spr)?;
    let avg = problem.estimate(&solved, RecoveryMethod::Average)?;
    let exact = solved.error_sq.sqrt();
    Ok(EffectivityRow {
        problem: problem.name,
        kind: problem.mesh.blocks[0].kind.name(),
        level,
        elements: solved.model.mesh.element_count(),
        dofs: solved.dofs,
        exact_relative: solved.relative_error(),
        estimated_relative: spr.estimate.relative_error,
        theta_spr: spr.estimate.error_norm / exact,
        theta_average: avg.estimate.error_norm / exact,
        rank_correlation: spearman(&spr.estimate.error_sq, &solved.element_error_sq),
    })
}

/// Ranks with ties given their mean rank.
fn ranks(v: &[f64]) -> Vec<f64> {
    let mut idx: Vec<usize> = (0..v.len()).collect();
    idx.sort_by(|&a, &b| v[a].total_cmp(&v[b]));
    let mut r = vec![0.0; v.len()];
    let mut i = 0;
    while i < idx.len() {
        let mut j = i;
        while j + 1 < idx.len() && v[idx[j + 1]] == v[idx[i]] {
            j += 1;
        }
        let mean = (i + j) as f64 / 2.0;
        for &k in &idx[i..=j] {
            r[k] = mean;
        }
        i = j + 1;
    }
    r
}

/// Spearman's rank correlation: Pearson correlation of the ranks (Spearman 1904).
pub fn spearman(a: &[f64], b: &[f64]) -> f64 {
    let (ra, rb) = (ranks(a), ranks(b));
    let n = ra.len() as f64;
    let (ma, mb) = (ra.iter().sum::<f64>() / n, rb.iter().sum::<f64>() / n);
    let mut sab = 0.0;
    let mut saa = 0.0;
    let mut sbb = 0.0;
    for (x, y) in ra.iter().zip(&rb) {
        sab += (x - ma) * (y - mb);
        saa += (x - ma).powi(2);
        sbb += (y - mb).powi(2);
    }
    if saa > 0.0 && sbb > 0.0 {
        sab / (saa * sbb).sqrt()
    } else {
        0.0
    }
}

/// Header of the table, matching [`EffectivityRow::line`].
pub const TABLE_HEADER: &str =
    "| problem | kind | level | elements | DOFs | exact rel. error | estimated (SPR) | theta SPR | theta averaging | rank corr. |\n|---|---|---|---|---|---|---|---|---|---|";

impl EffectivityRow {
    /// One Markdown table line.
    pub fn line(&self) -> String {
        format!(
            "| {} | {} | {} | {} | {} | {:.3} % | {:.3} % | {:.3} | {:.3} | {:.3} |",
            self.problem,
            self.kind,
            self.level,
            self.elements,
            self.dofs,
            100.0 * self.exact_relative,
            100.0 * self.estimated_relative,
            self.theta_spr,
            self.theta_average,
            self.rank_correlation
        )
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Spearman's rho of perfectly concordant data is 1, of reversed data -1; the classic
    /// example with one swap among 5 gives 1 - 6 * 2 / (5 * 24) = 0.9 (Spearman 1904 formula
    /// rho = 1 - 6 sum d^2 / (n (n^2 - 1)), common practice).
    #[test]
    fn spearman_reference_values() {
        let a = [1.0, 2.0, 3.0, 4.0, 5.0];
        assert!((spearman(&a, &[10.0, 20.0, 30.0, 40.0, 50.0]) - 1.0).abs() < 1e-15);
        assert!((spearman(&a, &[5.0, 4.0, 3.0, 2.0, 1.0]) + 1.0).abs() < 1e-15);
        assert!((spearman(&a, &[1.0, 3.0, 2.0, 4.0, 5.0]) - 0.9).abs() < 1e-15);
    }
}
