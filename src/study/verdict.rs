//! Verdicts on a sequence of values from successively finer meshes.
//!
//! * Convergence ratio `R = eps21/eps32` (Stern, Wilson, Coleman & Paterson 2001, J. Fluids Eng.
//!   123:793-802; classification from memory, method sheet 6.2): `0 < R < 1` monotonic
//!   convergence, `-1 < R < 0` oscillatory convergence, `|R| > 1` divergence.
//! * Converged: the last relative change `|eps21/phi1|` is below the tolerance (default 1 %,
//!   common practice) and the change before it is below it too or shrinking (`|R| < 1`).
//! * Singular (method sheet 4.3): a stress at a singular point of exponent `lambda < 1` grows
//!   like `h^-(1 - lambda)`, by `r^(1-lambda)` per refinement by the ratio `r` (1.3713 per
//!   halving at a 270 degree corner), and has no limit. Detected either from a flagged spot
//!   (the quantity is read at the spot and still rises) or from the values alone: the magnitude
//!   rises over the finest three meshes with growth exponents `k = ln(|phi_f/phi_c|)/ln(h_c/h_f)`
//!   in [0.1, 1.1] that do not fade (`k21 >= 0.7 k32`) and a ratio `R > 1`. These bounds are
//!   hone's heuristic (a smooth value approaching its limit has `k` decaying towards zero).

use serde::Serialize;

/// Smallest growth exponent taken as singular growth (hone's heuristic: 0.1 means at least
/// 7 % per halving).
pub const MIN_GROWTH_EXPONENT: f64 = 0.1;
/// Largest growth exponent of an elastic singularity, `1 - lambda` with lambda >= 0 (point
/// loads, lambda = 0 in 2D), plus a margin for pre-asymptotic meshes.
pub const MAX_GROWTH_EXPONENT: f64 = 1.1;
/// Growth is "not fading" while `k21 >= FADE * k32`.
pub const FADE: f64 = 0.7;

/// The verdict on one quantity.
#[derive(Copy, Clone, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Verdict {
    /// Last relative change below the tolerance.
    Converged,
    /// 0 < R < 1.
    Converging,
    /// -1 < R < 0.
    Oscillating,
    /// |R| > 1 (monotonic or oscillatory divergence).
    Diverging,
    /// A stress at a singular point: no limit exists.
    Singular,
    /// Two meshes only: the expected order was assumed, convergence is not shown.
    AssumedOrder,
}

impl Verdict {
    /// Plain words for the text report.
    pub fn describe(self) -> &'static str {
        match self {
            Verdict::Converged => "converged",
            Verdict::Converging => "converging monotonically",
            Verdict::Oscillating => "converging with oscillation",
            Verdict::Diverging => "diverging",
            Verdict::Singular => "singular: grows without limit under refinement",
            Verdict::AssumedOrder => "two meshes: expected order assumed, convergence not shown",
        }
    }
}

/// Growth exponent `k` with `|phi_fine| = |phi_coarse| (h_coarse/h_fine)^k`; `None` when a
/// value is zero.
pub fn growth_exponent(phi_fine: f64, phi_coarse: f64, h_fine: f64, h_coarse: f64) -> Option<f64> {
    let ratio = (phi_fine / phi_coarse).abs();
    (ratio > 0.0 && ratio.is_finite()).then(|| ratio.ln() / (h_coarse / h_fine).ln())
}

/// Singular growth read from the values alone (finest first): the mean growth exponent of the
/// finest three meshes when it matches the signature above.
pub fn singular_growth(h: &[f64], phi: &[f64]) -> Option<f64> {
    if h.len() < 3 {
        return None;
    }
    let k21 = growth_exponent(phi[0], phi[1], h[0], h[1])?;
    let k32 = growth_exponent(phi[1], phi[2], h[1], h[2])?;
    let band = MIN_GROWTH_EXPONENT..=MAX_GROWTH_EXPONENT;
    let same_sign = phi[0].signum() == phi[1].signum() && phi[1].signum() == phi[2].signum();
    let r = (phi[1] - phi[0]) / (phi[2] - phi[1]);
    (same_sign && band.contains(&k21) && band.contains(&k32) && k21 >= FADE * k32 && r > 1.0)
        .then_some(0.5 * (k21 + k32))
}

/// Classifies a converging or diverging sequence (finest first, three or more values) by the
/// last relative changes and Stern's ratio.
pub fn classify(phi: &[f64], tolerance: f64) -> Verdict {
    let change = |a: f64, b: f64| {
        if a == b {
            0.0
        } else {
            ((a - b) / a).abs()
        }
    };
    let e21 = change(phi[0], phi[1]);
    if phi.len() < 3 {
        return if e21 <= tolerance {
            Verdict::Converged
        } else {
            Verdict::AssumedOrder
        };
    }
    let e32 = change(phi[1], phi[2]);
    let (eps21, eps32) = (phi[1] - phi[0], phi[2] - phi[1]);
    let r = if eps32 != 0.0 {
        eps21 / eps32
    } else if eps21 == 0.0 {
        0.0
    } else {
        f64::INFINITY
    };
    if e21 <= tolerance && (e32 <= tolerance || r.abs() < 1.0) {
        Verdict::Converged
    } else if (0.0..1.0).contains(&r) {
        Verdict::Converging
    } else if (-1.0..0.0).contains(&r) {
        Verdict::Oscillating
    } else {
        Verdict::Diverging
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Stern et al. (2001) classes by R = eps21/eps32 (from memory; method sheet 6.2), on
    /// made-up sequences (finest first): R = 0.5, -0.5, 2, -2.
    #[test]
    fn stern_classes() {
        assert_eq!(classify(&[1.75, 1.5, 1.0], 0.01), Verdict::Converging);
        assert_eq!(classify(&[1.25, 1.5, 1.0], 0.01), Verdict::Oscillating);
        assert_eq!(classify(&[2.0, 1.5, 1.25], 0.01), Verdict::Diverging);
        assert_eq!(classify(&[0.5, 1.5, 1.0], 0.01), Verdict::Diverging);
        assert_eq!(classify(&[1.0005, 1.0, 0.999], 0.01), Verdict::Converged);
        // Both changes below the tolerance: converged whatever R (here 50).
        assert_eq!(classify(&[1.0, 1.005, 1.0051], 0.01), Verdict::Converged);
        assert_eq!(classify(&[1.0, 1.3], 0.01), Verdict::AssumedOrder);
        assert_eq!(classify(&[1.0, 1.005], 0.01), Verdict::Converged);
    }

    /// A peak stress at a 270 degree corner grows by 2^(1 - 0.5445) = 1.3713 per halving
    /// (method sheet 4.3 \[V\]); the values alone give back the growth exponent 1 - lambda.
    /// A value approaching its limit from below (phi = 3 - h^2) is not singular.
    #[test]
    fn singular_signature() {
        let h = [0.125, 0.25, 0.5];
        let phi = h.map(|h: f64| 2.0 * h.powf(-(1.0 - 0.5445)));
        let k = singular_growth(&h, &phi).expect("singular");
        assert!((k - 0.4555).abs() < 1e-12, "k = {k}");
        assert!((phi[0] / phi[1] - 1.3713).abs() < 5e-5);
        let smooth = h.map(|h: f64| 3.0 - h * h);
        assert_eq!(singular_growth(&h, &smooth), None);
        let falling = h.map(|h: f64| 2.0 * h.powf(0.3));
        assert_eq!(singular_growth(&h, &falling), None);
    }
}
