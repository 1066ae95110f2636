//! Marking strategies for local refinement (method sheet 3.6). Each returns one flag per
//! element, `true` = refine.
//!
//! Ties: elements are ranked by descending indicator, equal indicators by ascending element
//! index (a stable order), so the result is deterministic and a minimal set never grows just
//! because of ties.

use super::{check_range, check_values, PlanError};

/// Element indices sorted by descending value, ties by ascending index.
fn ranking(values: &[f64]) -> Vec<usize> {
    let mut order: Vec<usize> = (0..values.len()).collect();
    order.sort_by(|&a, &b| values[b].total_cmp(&values[a]).then(a.cmp(&b)));
    order
}

/// Dorfler (bulk) marking (Dorfler 1996; method sheet 3.6): the smallest set M with
/// `sum_{K in M} eta_K^2 >= theta sum_K eta_K^2`, `theta in (0, 1]`, found by accumulating
/// `errors_sq` (the squared indicators `eta_K^2`) in descending order. The total is summed in
/// the same order, so `theta = 1` marks exactly the elements with nonzero indicator.
pub fn dorfler(errors_sq: &[f64], theta: f64) -> Result<Vec<bool>, PlanError> {
    check_values("squared error indicator", errors_sq)?;
    check_range("theta", theta, 0.0, 1.0, "0 < theta <= 1")?;
    let order = ranking(errors_sq);
    let total: f64 = order.iter().map(|&i| errors_sq[i]).sum();
    let threshold = theta * total;
    let mut marks = vec![false; errors_sq.len()];
    let mut sum = 0.0;
    for &i in &order {
        if sum >= threshold || errors_sq[i] == 0.0 {
            break;
        }
        marks[i] = true;
        sum += errors_sq[i];
    }
    Ok(marks)
}

/// Maximum strategy (Babuska & Rheinboldt 1978; method sheet 3.6): mark K when
/// `eta_K >= theta max_K' eta_K'`, `theta in (0, 1]`. Nothing is marked when every indicator
/// is zero.
pub fn maximum(errors: &[f64], theta: f64) -> Result<Vec<bool>, PlanError> {
    check_values("error indicator", errors)?;
    check_range("theta", theta, 0.0, 1.0, "0 < theta <= 1")?;
    let max = errors.iter().copied().fold(0.0, f64::max);
    let threshold = theta * max;
    Ok(errors.iter().map(|&e| e > 0.0 && e >= threshold).collect())
}

/// Fixed fraction (method sheet 3.6): mark the `ceil(f m)` elements with the largest `eta_K`
/// (m elements, `f in [0, 1]`, ties by ascending index). The product `f m` is lowered by
/// `1e-9 m` before rounding up so that, for example, `0.3 * 10 = 3.0000000000000004` marks 3.
pub fn fraction(errors: &[f64], f: f64) -> Result<Vec<bool>, PlanError> {
    check_values("error indicator", errors)?;
    check_range("fraction", f, -f64::MIN_POSITIVE, 1.0, "0 <= f <= 1")?;
    let m = errors.len() as f64;
    let count = ((f * m - 1e-9 * m).ceil().max(0.0) as usize).min(errors.len());
    let mut marks = vec![false; errors.len()];
    for &i in ranking(errors).iter().take(count) {
        marks[i] = true;
    }
    Ok(marks)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn indices(marks: &[bool]) -> Vec<usize> {
        (0..marks.len()).filter(|&i| marks[i]).collect()
    }

    #[test]
    fn dorfler_takes_the_minimal_set() {
        // squared indicators 1, 9, 4, 16, 0 (total 30), checked by hand (common practice):
        // theta 0.5 needs 15 -> 16 alone; theta 0.6 needs 18 -> 16 + 9; theta 1 -> all nonzero.
        let e2 = [1.0, 9.0, 4.0, 16.0, 0.0];
        assert_eq!(indices(&dorfler(&e2, 0.5).unwrap()), vec![3]);
        assert_eq!(indices(&dorfler(&e2, 0.6).unwrap()), vec![1, 3]);
        assert_eq!(indices(&dorfler(&e2, 1.0).unwrap()), vec![0, 1, 2, 3]);
        // threshold exactly met by the first: 16 / 30 (theta = 16/30 reaches 16 >= 16)
        assert_eq!(indices(&dorfler(&e2, 16.0 / 30.0).unwrap()), vec![3]);
    }

    #[test]
    fn dorfler_ties_go_to_the_lower_index() {
        // four equal indicators, theta 0.5: two suffice, the first two by index (common practice)
        let e2 = [2.0, 2.0, 2.0, 2.0];
        assert_eq!(indices(&dorfler(&e2, 0.5).unwrap()), vec![0, 1]);
        assert!(indices(&dorfler(&[0.0, 0.0], 0.5).unwrap()).is_empty());
    }

    #[test]
    fn maximum_marks_against_the_largest() {
        // max 4, theta 0.5 -> marks >= 2 (hand-checked, common practice)
        let e = [1.0, 2.0, 4.0, 1.9, 3.0];
        assert_eq!(indices(&maximum(&e, 0.5).unwrap()), vec![1, 2, 4]);
        assert_eq!(indices(&maximum(&e, 1.0).unwrap()), vec![2]);
        assert!(indices(&maximum(&[0.0, 0.0], 0.5).unwrap()).is_empty());
    }

    #[test]
    fn fraction_takes_the_top_share() {
        let e = [0.5, 0.1, 0.9, 0.3, 0.7, 0.2, 0.8, 0.4, 0.6, 0.0];
        // 30 % of 10 = 3: the three largest, 0.9 0.8 0.7 (hand-checked, common practice)
        assert_eq!(indices(&fraction(&e, 0.3).unwrap()), vec![2, 4, 6]);
        // 25 % of 10 = 2.5 -> 3 elements
        assert_eq!(indices(&fraction(&e, 0.25).unwrap()).len(), 3);
        assert!(indices(&fraction(&e, 0.0).unwrap()).is_empty());
        assert_eq!(indices(&fraction(&e, 1.0).unwrap()).len(), 10);
    }

    #[test]
    fn out_of_range_parameters_are_rejected() {
        for theta in [0.0, -0.1, 1.5, f64::NAN] {
            assert!(dorfler(&[1.0], theta).is_err());
            assert!(maximum(&[1.0], theta).is_err());
        }
        assert!(fraction(&[1.0], 1.1).is_err());
        assert!(fraction(&[1.0], -0.1).is_err());
        assert!(dorfler(&[1.0, f64::NAN], 0.5).is_err());
        assert!(maximum(&[-1.0], 0.5).is_err());
    }
}
