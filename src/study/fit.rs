//! Least-squares fit `phi_i = phi0 + a h_i^p` over four or more meshes (Eca & Hoekstra's
//! least-squares version of the GCI; method sheet 6.2, details from memory).
//!
//! For a fixed `p` the fit is linear in `(phi0, a)` and solved in closed form; the residual
//! `S(p) = sum_i (phi_i - phi0 - a h_i^p)^2` is then minimised over `p` in (0, MAX_ORDER] by a
//! scan on a grid of 0.01 followed by golden-section refinement of the best cell. Sizes are
//! scaled by the finest one first so that `h^p` stays of order one.

use super::celik::MAX_ORDER;
use serde::Serialize;

/// Result of the fit.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct PowerFit {
    /// Fitted order p.
    pub order: f64,
    /// Fitted limit phi0 (the extrapolated value).
    pub limit: f64,
    /// Coefficient a, in units of the quantity per (h/h_finest)^p.
    pub coefficient: f64,
    /// Root-mean-square residual of the fit.
    pub rms_residual: f64,
}

/// Linear least squares of `phi = phi0 + a x` for fixed `x_i = (h_i/h_1)^p`: (phi0, a, S).
fn linear_fit(x: &[f64], phi: &[f64]) -> (f64, f64, f64) {
    let n = x.len() as f64;
    let mx = x.iter().sum::<f64>() / n;
    let my = phi.iter().sum::<f64>() / n;
    let sxx: f64 = x.iter().map(|v| (v - mx) * (v - mx)).sum();
    let sxy: f64 = x.iter().zip(phi).map(|(a, b)| (a - mx) * (b - my)).sum();
    let a = if sxx > 0.0 { sxy / sxx } else { 0.0 };
    let phi0 = my - a * mx;
    let s = x
        .iter()
        .zip(phi)
        .map(|(xi, yi)| (yi - phi0 - a * xi).powi(2))
        .sum();
    (phi0, a, s)
}

/// Fits `phi = phi0 + a h^p`; `None` with fewer than four meshes or non-positive sizes.
pub fn power_fit(h: &[f64], phi: &[f64]) -> Option<PowerFit> {
    if h.len() < 4 || h.len() != phi.len() || h.iter().any(|v| v.is_nan() || *v <= 0.0) {
        return None;
    }
    let h_min = h.iter().copied().fold(f64::INFINITY, f64::min);
    let scaled: Vec<f64> = h.iter().map(|v| v / h_min).collect();
    let mut x = vec![0.0; h.len()];
    let mut residual = |p: f64| {
        for (xi, hi) in x.iter_mut().zip(&scaled) {
            *xi = hi.powf(p);
        }
        linear_fit(&x, phi)
    };
    const STEP: f64 = 0.01;
    let steps = (MAX_ORDER / STEP) as usize;
    let mut best = (f64::INFINITY, STEP);
    for k in 1..=steps {
        let p = k as f64 * STEP;
        let s = residual(p).2;
        if s < best.0 {
            best = (s, p);
        }
    }
    let (mut a, mut b) = ((best.1 - STEP).max(1e-6), (best.1 + STEP).min(MAX_ORDER));
    let golden = 0.5 * (5f64.sqrt() - 1.0);
    for _ in 0..100 {
        let c = b - golden * (b - a);
        let d = a + golden * (b - a);
        if residual(c).2 <= residual(d).2 {
            b = d;
        } else {
            a = c;
        }
    }
    let order = 0.5 * (a + b);
    let (limit, coefficient, s) = residual(order);
    Some(PowerFit {
        order,
        limit,
        coefficient,
        rms_residual: (s / h.len() as f64).sqrt(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::element::tests::assert_close;

    /// An exact power law is recovered (construction): phi = 2.5 - 0.7 h^1.8 on five unevenly
    /// spaced sizes, and phi = 1 + 0.2 h^0.9 (growing coarse values) on four.
    #[test]
    fn recovers_exact_power_laws() {
        let h = [0.05, 0.08, 0.13, 0.2, 0.33];
        let phi: Vec<f64> = h.iter().map(|h: &f64| 2.5 - 0.7 * h.powf(1.8)).collect();
        let fit = power_fit(&h, &phi).expect("fit");
        assert_close(fit.order, 1.8, 1e-6, 1.0, "p");
        assert_close(fit.limit, 2.5, 1e-8, 1.0, "phi0");
        assert!(fit.rms_residual < 1e-10);
        let h = [1.0, 2.0, 4.0, 8.0];
        let phi: Vec<f64> = h.iter().map(|h: &f64| 1.0 + 0.2 * h.powf(0.9)).collect();
        let fit = power_fit(&h, &phi).expect("fit");
        assert_close(fit.order, 0.9, 1e-6, 1.0, "p");
        assert_close(fit.limit, 1.0, 1e-8, 1.0, "phi0");
    }

    #[test]
    fn needs_four_meshes() {
        assert!(power_fit(&[1.0, 2.0, 4.0], &[1.0, 2.0, 3.0]).is_none());
    }
}
