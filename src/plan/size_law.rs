//! Element size laws: from per-element energy-norm errors to the size ratio `s_i = h_new / h`
//! of every element and the predicted element count of the next mesh (method sheet 3.1, 3.2,
//! 3.4).
//!
//! Inputs shared by every function: `errors[i] = ||e||_i` (energy norm of the error in element
//! i, not squared), `energy_sq = ||u||^2` (squared energy norm of the FE solution), the target
//! relative error `target` (etabar, 0.05 for 5 %), the degree `p` and the space dimension `d`.
//! `||e||^2 = sum_i ||e||_i^2`. An element with zero error gets ratio `+inf` (no refinement
//! need at all); callers clamp ratios to their size limits.

use super::{check_range, check_values, PlanError};

/// Sizes of the classic Zienkiewicz-Zhu criterion (equal error per old element).
#[derive(Clone, Debug, PartialEq)]
pub struct ClassicPlan {
    /// `h_new,i / h_i = xi_i^(-1/p)` per element.
    pub ratio: Vec<f64>,
    /// `N = sum_i xi_i^(d/p)`.
    pub predicted_elements: f64,
}

/// Sizes of the optimal criterion (fewest elements for a given global error).
#[derive(Clone, Debug, PartialEq)]
pub struct OptimalPlan {
    /// `s_i = h_new,i / h_i` per element.
    pub ratio: Vec<f64>,
    /// `N = sum_i s_i^-d`.
    pub predicted_elements: f64,
    /// Target global error norm `ebar_tot = etabar sqrt(||u||^2 + ||e||^2)`.
    pub target_error_norm: f64,
}

/// Validates the common inputs and returns `||e||^2`.
fn check_inputs(errors: &[f64], energy_sq: f64, p: f64, d: f64) -> Result<f64, PlanError> {
    check_values("error norm", errors)?;
    if !(energy_sq.is_finite() && energy_sq >= 0.0) {
        return Err(PlanError::Parameter {
            what: "||u||^2",
            value: energy_sq,
            expected: "a finite value >= 0",
        });
    }
    check_range("degree p", p, 0.0, f64::MAX, "a finite value > 0")?;
    check_range("dimension d", d, 0.0, f64::MAX, "a finite value > 0")?;
    let error_sq: f64 = errors.iter().map(|e| e * e).sum();
    if error_sq == 0.0 {
        return Err(PlanError::NoError);
    }
    Ok(error_sq)
}

/// Classic criterion (method sheet 3.1; Zienkiewicz-Zhu 1987): permissible error per element
/// `ebar = etabar sqrt((||u||^2 + ||e||^2) / m)`, `xi_i = ||e||_i / ebar`,
/// `h_new,i = h_i xi_i^(-1/p)`, `N = sum_i xi_i^(d/p)`.
pub fn classic_sizes(
    errors: &[f64],
    energy_sq: f64,
    target: f64,
    p: f64,
    d: f64,
) -> Result<ClassicPlan, PlanError> {
    let error_sq = check_inputs(errors, energy_sq, p, d)?;
    check_range("target error", target, 0.0, f64::MAX, "a finite value > 0")?;
    let ebar = target * ((energy_sq + error_sq) / errors.len() as f64).sqrt();
    let ratio = errors.iter().map(|e| (e / ebar).powf(-1.0 / p)).collect();
    let predicted_elements = errors.iter().map(|e| (e / ebar).powf(d / p)).sum();
    Ok(ClassicPlan {
        ratio,
        predicted_elements,
    })
}

/// `S = sum_j ||e||_j^(2d/(2p+d))` of method sheet 3.2.
fn s_sum(errors: &[f64], p: f64, d: f64) -> f64 {
    errors.iter().map(|e| e.powf(2.0 * d / (2.0 * p + d))).sum()
}

/// Optimal sizes for a global error norm `ebar_tot` (method sheet 3.2).
fn optimal_for_norm(errors: &[f64], ebar_tot: f64, p: f64, d: f64) -> OptimalPlan {
    let s = s_sum(errors, p, d);
    let scale = (ebar_tot * ebar_tot / s).powf(1.0 / (2.0 * p));
    let ratio = errors
        .iter()
        .map(|e| scale * e.powf(-2.0 / (2.0 * p + d)))
        .collect();
    OptimalPlan {
        ratio,
        predicted_elements: s.powf((2.0 * p + d) / (2.0 * p)) * ebar_tot.powf(-d / p),
        target_error_norm: ebar_tot,
    }
}

/// Optimal criterion (method sheet 3.2 \[V\], after Li & Bettess 1995): minimise
/// `N = sum s_i^-d` subject to `sum ||e||_i^2 s_i^(2p) = ebar_tot^2`,
/// `ebar_tot = etabar sqrt(||u||^2 + ||e||^2)`. With `S = sum_j ||e||_j^(2d/(2p+d))`:
/// `s_i = (ebar_tot^2 / S)^(1/(2p)) ||e||_i^(-2/(2p+d))` and
/// `N = S^((2p+d)/(2p)) ebar_tot^(-d/p)`. Every new element then carries `ebar_tot^2 / N`.
pub fn optimal_sizes(
    errors: &[f64],
    energy_sq: f64,
    target: f64,
    p: f64,
    d: f64,
) -> Result<OptimalPlan, PlanError> {
    let error_sq = check_inputs(errors, energy_sq, p, d)?;
    check_range("target error", target, 0.0, f64::MAX, "a finite value > 0")?;
    let ebar_tot = target * (energy_sq + error_sq).sqrt();
    Ok(optimal_for_norm(errors, ebar_tot, p, d))
}

/// Element-budget inversion of the optimal criterion (method sheet 3.2 \[V\]): the smallest
/// global error reachable with `max_elements` elements is
/// `ebar_tot = S^((2p+d)/(2d)) N^(-p/d)`, returned as the relative error
/// `ebar_tot / sqrt(||u||^2 + ||e||^2)` together with the optimal plan for it.
pub fn optimal_budget(
    errors: &[f64],
    energy_sq: f64,
    p: f64,
    d: f64,
    max_elements: f64,
) -> Result<(f64, OptimalPlan), PlanError> {
    let error_sq = check_inputs(errors, energy_sq, p, d)?;
    check_range(
        "element budget",
        max_elements,
        0.0,
        f64::MAX,
        "a finite value > 0",
    )?;
    let s = s_sum(errors, p, d);
    let ebar_tot = s.powf((2.0 * p + d) / (2.0 * d)) * max_elements.powf(-p / d);
    let relative = ebar_tot / (energy_sq + error_sq).sqrt();
    Ok((relative, optimal_for_norm(errors, ebar_tot, p, d)))
}

/// Size ratio of element i for multiplier `mu` (method sheet 3.4 \[V\]):
/// `s_i = (d / (2 q_i mu ||e||_i^2))^(1/(2 q_i + d))`.
fn mixed_ratio(e: f64, q: f64, d: f64, mu: f64) -> f64 {
    (d / (2.0 * q * mu * e * e)).powf(1.0 / (2.0 * q + d))
}

/// `sum_i ||e||_i^2 s_i^(2 q_i)`, each term written as
/// `||e||_i^(2d/(2q+d)) (d/(2 q mu))^(2q/(2q+d))` so zero errors give 0, not `0 * inf`.
fn mixed_error_sq(errors: &[f64], exponents: &[f64], d: f64, mu: f64) -> f64 {
    errors
        .iter()
        .zip(exponents)
        .map(|(&e, &q)| {
            e.powf(2.0 * d / (2.0 * q + d)) * (d / (2.0 * q * mu)).powf(2.0 * q / (2.0 * q + d))
        })
        .sum()
}

/// Optimal sizes with a per-element exponent `q_i` (`p` in smooth elements, `min(p, lambda)`
/// at singular points; method sheet 3.4 \[V\]). Stationarity of
/// `N + mu (sum ||e||_i^2 s_i^(2 q_i) - ebar_tot^2)` gives
/// `s_i = (d / (2 q_i mu ||e||_i^2))^(1/(2 q_i + d))`; `mu > 0` is found by bisection on
/// `ln mu` to relative width 1e-12 (the constrained error decreases monotonically in `mu`).
/// `N = sum_i s_i^-d`. With every `q_i = p` this is [`optimal_sizes`].
pub fn optimal_sizes_mixed(
    errors: &[f64],
    exponents: &[f64],
    energy_sq: f64,
    target: f64,
    d: f64,
) -> Result<OptimalPlan, PlanError> {
    if exponents.len() != errors.len() {
        return Err(PlanError::Length {
            what: "exponents",
            found: exponents.len(),
            expected: errors.len(),
        });
    }
    for (index, &q) in exponents.iter().enumerate() {
        if !(q.is_finite() && q > 0.0) {
            return Err(PlanError::ElementValue {
                what: "exponent",
                index,
                value: q,
            });
        }
    }
    let error_sq = check_inputs(errors, energy_sq, 1.0, d)?;
    check_range("target error", target, 0.0, f64::MAX, "a finite value > 0")?;
    let ebar_tot = target * (energy_sq + error_sq).sqrt();
    let goal = ebar_tot * ebar_tot;
    // Bracket ln mu: the error sum falls as mu grows. Start at mu = 1 and widen by e^4 steps.
    let f = |ln_mu: f64| mixed_error_sq(errors, exponents, d, ln_mu.exp()) - goal;
    let (mut lo, mut hi) = (0.0_f64, 0.0_f64);
    let mut steps = 0;
    while f(lo) < 0.0 {
        lo -= 4.0;
        steps += 1;
        if steps > 400 {
            return Err(PlanError::NoBracket { target: ebar_tot });
        }
    }
    while f(hi) > 0.0 {
        hi += 4.0;
        steps += 1;
        if steps > 400 {
            return Err(PlanError::NoBracket { target: ebar_tot });
        }
    }
    // Relative width 1e-12 in mu is an absolute width 1e-12 in ln mu.
    while hi - lo > 1e-12 {
        let mid = 0.5 * (lo + hi);
        if mid <= lo || mid >= hi {
            break;
        }
        if f(mid) > 0.0 {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    let mu = (0.5 * (lo + hi)).exp();
    let ratio: Vec<f64> = errors
        .iter()
        .zip(exponents)
        .map(|(&e, &q)| mixed_ratio(e, q, d, mu))
        .collect();
    let predicted_elements = ratio.iter().map(|s| s.powf(-d)).sum();
    Ok(OptimalPlan {
        ratio,
        predicted_elements,
        target_error_norm: ebar_tot,
    })
}

#[cfg(test)]
#[path = "size_law_tests.rs"]
mod tests;
