//! Williams exponents of a traction-free plane corner (method sheet 4.1; Williams 1952).
//!
//! Near a corner of interior angle `alpha` the displacements behave like `r^lambda` and the
//! stresses like `r^(lambda - 1)`; a singularity is present when `0 < lambda < 1`. The
//! eigenvalues solve
//! - mode I (symmetric): `sin(lambda alpha) + lambda sin(alpha) = 0`,
//! - mode II (antisymmetric): `sin(lambda alpha) - lambda sin(alpha) = 0`, where `lambda = 1`
//!   (a rigid rotation) is always a root and is excluded.
//!
//! Roots are found numerically: a scan of `(0, 1)` for the first sign change, then bisection
//! to machine precision. Angles are in radians.

use std::f64::consts::PI;

/// Scan points over `(0, 1)`; neighbouring roots of either equation in `(0, 1)` are further
/// apart than 1/2000 for every angle up to `2 pi`.
const SCAN: usize = 2000;

/// Smallest root of `f` in `(0, 1)` by scan and bisection, `None` when there is none.
fn smallest_root(f: impl Fn(f64) -> f64) -> Option<f64> {
    let step = 1.0 / SCAN as f64;
    let mut a = 0.5 * step;
    let mut fa = f(a);
    for k in 1..SCAN {
        let b = (k as f64 + 0.5) * step;
        let fb = f(b);
        if fa == 0.0 {
            return Some(a);
        }
        if fa.signum() != fb.signum() {
            return Some(bisect(&f, a, b, fa));
        }
        a = b;
        fa = fb;
    }
    None
}

/// Bisection on a sign change of `f` over `[a, b]` until the interval stops shrinking.
fn bisect(f: &impl Fn(f64) -> f64, mut a: f64, mut b: f64, mut fa: f64) -> f64 {
    loop {
        let m = 0.5 * (a + b);
        if m <= a || m >= b {
            return m;
        }
        let fm = f(m);
        if fm == 0.0 {
            return m;
        }
        if fm.signum() == fa.signum() {
            a = m;
            fa = fm;
        } else {
            b = m;
        }
    }
}

/// Checks that `alpha` is a corner angle in `(0, 2 pi]`.
fn valid(alpha: f64) -> bool {
    alpha.is_finite() && alpha > 0.0 && alpha <= 2.0 * PI * (1.0 + 1e-15)
}

/// Smallest mode I exponent `lambda in (0, 1)` of `sin(lambda alpha) + lambda sin(alpha) = 0`
/// (method sheet 4.1 \[V\]); `None` when the corner is not singular in mode I
/// (`alpha <= pi`) or the angle is not in `(0, 2 pi]`.
pub fn williams_mode_one(alpha: f64) -> Option<f64> {
    if !valid(alpha) || alpha <= PI {
        return None;
    }
    smallest_root(|l| (l * alpha).sin() + l * alpha.sin())
}

/// Smallest nontrivial mode II exponent `lambda in (0, 1)` of
/// `sin(lambda alpha) - lambda sin(alpha) = 0` (method sheet 4.1 \[V\]). The trivial root
/// `lambda = 1` is divided out, i.e. the roots of `(sin(lambda alpha) - lambda sin(alpha)) /
/// (1 - lambda)` are searched. `None` when mode II is not singular (alpha up to about
/// 257.45 deg, where the root crosses 1) or the angle is not in `(0, 2 pi]`.
pub fn williams_mode_two(alpha: f64) -> Option<f64> {
    if !valid(alpha) || alpha <= PI {
        return None;
    }
    smallest_root(|l| ((l * alpha).sin() - l * alpha.sin()) / (1.0 - l))
}

/// Smallest singular exponent of a traction-free corner over both modes, `None` when the
/// corner is not singular (method sheet 4.3: use the smallest exponent over all modes).
pub fn corner_exponent(alpha: f64) -> Option<f64> {
    match (williams_mode_one(alpha), williams_mode_two(alpha)) {
        (Some(a), Some(b)) => Some(a.min(b)),
        (a, b) => a.or(b),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn deg(a: f64) -> f64 {
        a.to_radians()
    }

    /// The sheet prints 10 decimals; 1e-9 relative is the tightest fair check.
    fn close(a: f64, b: f64) -> bool {
        (a - b).abs() <= 1e-9 * b
    }

    #[test]
    fn mode_one_matches_method_sheet() {
        // lambda_I of method sheet 4.1 [V] (traction-free wedge)
        for (alpha, lambda) in [
            (270.0, 0.5444837368),
            (240.0, 0.6157310595),
            (225.0, 0.6735834321),
            (200.0, 0.8186958513),
            (300.0, 0.5122213612),
            (360.0, 0.5),
        ] {
            let got = williams_mode_one(deg(alpha)).unwrap();
            assert!(close(got, lambda), "{alpha} deg: {got} vs {lambda}");
        }
        // more digits given by the sheet for the L-shape: 0.544483736782463929 (rounded to f64 below); bisection runs
        // to machine precision, so 1e-14 relative
        let l = williams_mode_one(deg(270.0)).unwrap();
        assert!((l - 0.544_483_736_782_464).abs() < 1e-14);
    }

    #[test]
    fn mode_two_matches_method_sheet() {
        // lambda_II of method sheet 4.1 [V]
        for (alpha, lambda) in [
            (270.0, 0.9085291898),
            (300.0, 0.7309007415),
            (330.0, 0.5981918496),
            (360.0, 0.5),
        ] {
            let got = williams_mode_two(deg(alpha)).unwrap();
            assert!(close(got, lambda), "{alpha} deg: {got} vs {lambda}");
        }
        // not singular below 257.4534 deg (sheet 4.1): 225 deg has lambda_II = 1.302
        assert_eq!(williams_mode_two(deg(225.0)), None);
    }

    #[test]
    fn convex_corners_are_not_singular() {
        for alpha in [30.0, 90.0, 179.9, 180.0] {
            assert_eq!(corner_exponent(deg(alpha)), None);
        }
        assert_eq!(corner_exponent(f64::NAN), None);
        assert_eq!(corner_exponent(deg(400.0)), None);
        // the corner exponent is mode I's where both are singular (sheet 4.1 table)
        assert!(close(corner_exponent(deg(270.0)).unwrap(), 0.5444837368));
    }

    #[test]
    fn roots_satisfy_their_equations() {
        for alpha in [190.0, 250.0, 280.0, 345.0] {
            let a = deg(alpha);
            let l = williams_mode_one(a).unwrap();
            // residual of a unit-size trigonometric equation at a double-precision root
            assert!(((l * a).sin() + l * a.sin()).abs() < 1e-13);
        }
    }
}
