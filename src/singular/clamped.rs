//! Smallest exponent of a clamped-free plane corner: one face held (zero displacement), the
//! other traction-free, interior angle `alpha` (method sheet 4.2 \[V\] gives the check values).
//!
//! Derivation (Airy function `phi = r^(lambda+1) F(theta)`,
//! `F = A sin((lambda+1) theta) + B cos((lambda+1) theta) + C sin((lambda-1) theta)
//! + D cos((lambda-1) theta)`, with the standard polar displacements of these four terms in
//! terms of Kolosov's `kappa`): the clamped face `theta = 0` gives
//! `B (lambda+1) = (kappa-lambda) D` and `A (lambda+1) = -(kappa+lambda) C`; the free face
//! `theta = alpha` needs `F = F' = 0`. The remaining 2 x 2 determinant simplifies to
//!
//! `kappa^2 + 1 + 2 kappa cos(2 lambda alpha) - 4 lambda^2 sin^2(alpha) = 0`.
//!
//! It reproduces every entry of the sheet's clamped-free table (plane strain and plane stress,
//! 60 to 360 deg), the half-plane root `1/2 + i ln(kappa) / (2 pi)` and the sheet's Cook's
//! membrane corner 0.67716. Roots may be complex (oscillatory singularity); only the real part
//! sets the rate. They are found by complex Newton iteration from a grid of starting points.

/// Minimal complex number for the root search.
#[derive(Clone, Copy, Debug, PartialEq)]
struct Complex {
    re: f64,
    im: f64,
}

impl Complex {
    fn sub(self, o: Complex) -> Complex {
        Complex {
            re: self.re - o.re,
            im: self.im - o.im,
        }
    }
    fn mul(self, o: Complex) -> Complex {
        Complex {
            re: self.re * o.re - self.im * o.im,
            im: self.re * o.im + self.im * o.re,
        }
    }
    fn div(self, o: Complex) -> Complex {
        let n = o.re * o.re + o.im * o.im;
        Complex {
            re: (self.re * o.re + self.im * o.im) / n,
            im: (self.im * o.re - self.re * o.im) / n,
        }
    }
    fn scale(self, s: f64) -> Complex {
        Complex {
            re: self.re * s,
            im: self.im * s,
        }
    }
    fn abs(self) -> f64 {
        self.re.hypot(self.im)
    }
    /// `cos(x + iy) = cos x cosh y - i sin x sinh y`.
    fn cos(self) -> Complex {
        Complex {
            re: self.re.cos() * self.im.cosh(),
            im: -self.re.sin() * self.im.sinh(),
        }
    }
    /// `sin(x + iy) = sin x cosh y + i cos x sinh y`.
    fn sin(self) -> Complex {
        Complex {
            re: self.re.sin() * self.im.cosh(),
            im: self.re.cos() * self.im.sinh(),
        }
    }
}

/// Kolosov constant for plane strain, `kappa = 3 - 4 nu` (common practice).
pub fn kappa_plane_strain(nu: f64) -> f64 {
    3.0 - 4.0 * nu
}

/// Kolosov constant for plane stress, `kappa = (3 - nu) / (1 + nu)` (common practice).
pub fn kappa_plane_stress(nu: f64) -> f64 {
    (3.0 - nu) / (1.0 + nu)
}

/// Characteristic function `kappa^2 + 1 + 2 kappa cos(2 lambda alpha) - 4 lambda^2 sin^2 alpha`
/// and its derivative in `lambda`.
fn characteristic(l: Complex, alpha: f64, kappa: f64) -> (Complex, Complex) {
    let s2 = alpha.sin().powi(2);
    let arg = l.scale(2.0 * alpha);
    let mut g = arg.cos().scale(2.0 * kappa).sub(l.mul(l).scale(4.0 * s2));
    g.re += kappa * kappa + 1.0;
    let dg = arg.sin().scale(-4.0 * kappa * alpha).sub(l.scale(8.0 * s2));
    (g, dg)
}

/// Smallest root `(Re lambda, |Im lambda|)` with `Re lambda > 0` of the clamped-free
/// characteristic equation (module docs), searched from Newton starts on
/// `Re in [0.02, 1.79]`, `Im in [0, 1.45]` (a grid of 60 x 30; the sheet's roots have
/// `|Im| < 0.12`). `None` for an angle outside `(0, 2 pi]`, a `kappa` outside `(0.5, 4)` (both
/// formulas give `[1, 3]` for `0 <= nu <= 0.5`) or no root found.
pub fn clamped_free_root(alpha: f64, kappa: f64) -> Option<(f64, f64)> {
    let valid_alpha = alpha.is_finite() && alpha > 0.0 && alpha <= 2.0 * std::f64::consts::PI;
    if !(valid_alpha && kappa.is_finite() && kappa > 0.5 && kappa < 4.0) {
        return None;
    }
    let scale = kappa * kappa + 1.0;
    let mut best: Option<Complex> = None;
    for i in 0..60 {
        for j in 0..30 {
            let mut l = Complex {
                re: 0.02 + 0.03 * i as f64,
                im: 0.05 * j as f64,
            };
            for _ in 0..100 {
                let (g, dg) = characteristic(l, alpha, kappa);
                if dg.abs() == 0.0 || !l.re.is_finite() || !l.im.is_finite() {
                    break;
                }
                let step = g.div(dg);
                l = l.sub(step);
                if step.abs() < 1e-15 * l.abs().max(1.0) {
                    break;
                }
            }
            // accept a root when the residual is tiny against the constant term kappa^2 + 1
            let (g, _) = characteristic(l, alpha, kappa);
            let root = g.abs() < 1e-11 * scale && l.re > 1e-6 && l.re.is_finite();
            if root && best.is_none_or(|b| l.re < b.re - 1e-12) {
                best = Some(l);
            }
        }
    }
    best.map(|b| (b.re, b.im.abs()))
}

/// Singularity exponent of a clamped-free corner: the real part of the smallest root when it
/// is below 1, `None` when the corner is not singular (method sheet 4.2 \[V\]: plane strain
/// `nu = 0.3` is singular above 56.79 deg, plane stress above 61.29 deg).
pub fn clamped_free_exponent(alpha: f64, kappa: f64) -> Option<f64> {
    clamped_free_root(alpha, kappa)
        .map(|(re, _)| re)
        .filter(|&re| re < 1.0)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The sheet gives 4 decimals: half a unit of the last digit.
    fn close4(a: f64, b: f64) -> bool {
        (a - b).abs() <= 5e-5
    }

    #[test]
    fn plane_strain_matches_method_sheet() {
        let k = kappa_plane_strain(0.3);
        // clamped-free, plane strain, nu = 0.3: method sheet 4.2 [V]
        for (alpha, re, im) in [
            (60.0, 0.9554, 0.0),
            (90.0, 0.7112, 0.0),
            (120.0, 0.6207, 0.0),
            (135.0, 0.6134, 0.0),
            (150.0, 0.6121, 0.0747),
            (225.0, 0.4071, 0.0533),
            (270.0, 0.3417, 0.0343),
            (360.0, 0.25, 0.0468),
        ] {
            let (r, i) = clamped_free_root(f64::to_radians(alpha), k).unwrap();
            assert!(close4(r, re) && close4(i, im), "{alpha}: {r} {i}");
        }
    }

    #[test]
    fn plane_stress_matches_method_sheet() {
        let k = kappa_plane_stress(0.3);
        // clamped-free, plane stress, nu = 0.3: method sheet 4.2 [V]
        for (alpha, re, im) in [
            (90.0, 0.7583, 0.0),
            (120.0, 0.6746, 0.0),
            (135.0, 0.6964, 0.0723),
            (300.0, 0.3037, 0.0617),
        ] {
            let (r, i) = clamped_free_root(f64::to_radians(alpha), k).unwrap();
            assert!(close4(r, re) && close4(i, im), "{alpha}: {r} {i}");
        }
        // 60 deg: root 1.0175, not singular (sheet 4.2)
        assert_eq!(clamped_free_exponent(f64::to_radians(60.0), k), None);
        // Cook's membrane corner, 108.435 deg, plane stress nu = 1/3: 0.67716 (sheet 4.2 [V])
        let cook = clamped_free_exponent(f64::to_radians(108.435), kappa_plane_stress(1.0 / 3.0));
        assert!((cook.unwrap() - 0.67716).abs() <= 5e-6);
    }

    #[test]
    fn half_plane_has_the_closed_form() {
        // clamped-free half-plane: 1/2 + i ln(kappa) / (2 pi) (sheet 4.2 [V]); Newton converges
        // to machine precision, 1e-12 leaves room for the cosh of the imaginary part
        let k = kappa_plane_strain(0.3);
        let (r, i) = clamped_free_root(std::f64::consts::PI, k).unwrap();
        assert!((r - 0.5).abs() < 1e-12);
        assert!((i - k.ln() / (2.0 * std::f64::consts::PI)).abs() < 1e-12);
    }

    #[test]
    fn bad_inputs_give_none() {
        assert_eq!(clamped_free_root(f64::NAN, 1.8), None);
        assert_eq!(clamped_free_root(1.0, -1.0), None);
    }
}
