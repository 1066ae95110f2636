//! High-order quadrature (the reference problems' loads and exact errors, the estimate at
//! re-entrant corners): Gauss-Legendre rules of any size computed by Newton's method, and
//! product rules on every reference element.
//!
//! Gauss-Legendre: the nodes are the roots of the Legendre polynomial `P_n`, found by Newton's
//! method from the estimate `x_i = cos(pi (i + 3/4) / (n + 1/2))`, with `P_n` and `P_n'` from the
//! three-term recurrence `k P_k = (2k - 1) x P_(k-1) - (k - 1) P_(k-2)` and
//! `P_n' = n (x P_n - P_(n-1)) / (x^2 - 1)`; weights `w_i = 2 / ((1 - x_i^2) P_n'(x_i)^2)`. The
//! rule integrates polynomials of degree `2n - 1` exactly (Abramowitz & Stegun 1964, Handbook of
//! Mathematical Functions, 25.4.29; Press et al., Numerical Recipes, sec. 4.5 (from memory)).
//!
//! Simplices use the collapsed (Duffy) map of the square or cube: triangle `r = u`,
//! `s = v (1 - u)` with Jacobian `1 - u`; tetrahedron `r = u`, `s = v (1 - u)`,
//! `t = w (1 - u)(1 - v)` with Jacobian `(1 - u)^2 (1 - v)`, `u, v, w` Gauss-Legendre points on
//! [0, 1] (Duffy 1982, SIAM J. Numer. Anal. 19:1260-1262; Stroud 1971, "Approximate calculation
//! of multiple integrals" (from memory)). With `n` points per direction (`n + 1` along `u` on
//! the tetrahedron, where the Jacobian is quadratic) both are exact to total degree `2n - 2`.
//! Wedges take the collapsed triangle rule times Gauss-Legendre in `t`.

use crate::element::ElementKind;

/// Newton iterations allowed per root (quadratic convergence from the estimate needs < 10).
const NEWTON_ITERATIONS: usize = 100;

/// Legendre polynomial `P_n(x)` and its derivative, by the three-term recurrence (`|x| < 1`).
fn legendre(n: usize, x: f64) -> (f64, f64) {
    let (mut p0, mut p1) = (1.0, x);
    for k in 2..=n {
        let k = k as f64;
        let p2 = ((2.0 * k - 1.0) * x * p1 - (k - 1.0) * p0) / k;
        p0 = p1;
        p1 = p2;
    }
    if n == 0 {
        return (1.0, 0.0);
    }
    let dp = n as f64 * (x * p1 - p0) / (x * x - 1.0);
    (p1, dp)
}

/// Gauss-Legendre nodes (ascending) and weights on [-1, 1] with `n >= 1` points, exact for
/// polynomials of degree `2n - 1`. `n = 0` is treated as 1.
pub fn gauss_legendre(n: usize) -> (Vec<f64>, Vec<f64>) {
    let n = n.max(1);
    let mut x = vec![0.0; n];
    let mut w = vec![0.0; n];
    for i in 0..n.div_ceil(2) {
        let mut r = (std::f64::consts::PI * (i as f64 + 0.75) / (n as f64 + 0.5)).cos();
        for _ in 0..NEWTON_ITERATIONS {
            let (p, dp) = legendre(n, r);
            let step = p / dp;
            r -= step;
            if step.abs() <= 1e-16 * r.abs().max(1.0) {
                break;
            }
        }
        let (_, dp) = legendre(n, r);
        let weight = 2.0 / ((1.0 - r * r) * dp * dp);
        // Roots come in +-pairs; the middle one of an odd rule is exactly 0.
        let r = if 2 * i + 1 == n { 0.0 } else { r };
        x[n - 1 - i] = r;
        x[i] = -r;
        w[n - 1 - i] = weight;
        w[i] = weight;
    }
    (x, w)
}

/// A product rule with `n` points per direction on the reference element of `kind` (natural
/// coordinates, weights summing to `kind.reference_measure()`): Gauss-Legendre on quadrilaterals
/// and hexahedra (exact to degree `2n - 1` in each coordinate), collapsed Gauss-Legendre on
/// triangles and tetrahedra (total degree `2n - 2`), collapsed triangle x Gauss-Legendre on
/// wedges. `n = 0` is treated as 1.
pub fn reference_rule(kind: ElementKind, n: usize) -> Vec<([f64; 3], f64)> {
    let (x, w) = gauss_legendre(n);
    // The same points mapped to [0, 1].
    let unit: Vec<(f64, f64)> = x
        .iter()
        .zip(&w)
        .map(|(&x, &w)| (0.5 * (x + 1.0), 0.5 * w))
        .collect();
    let line: Vec<(f64, f64)> = x.iter().copied().zip(w.iter().copied()).collect();
    let mut out = Vec::new();
    let triangle = || {
        let mut t = Vec::with_capacity(unit.len() * unit.len());
        for &(u, wu) in &unit {
            for &(v, wv) in &unit {
                t.push(([u, v * (1.0 - u)], wu * wv * (1.0 - u)));
            }
        }
        t
    };
    use ElementKind::*;
    match kind {
        Quad4 | Quad8 | Quad9 => {
            for &(b, wb) in &line {
                for &(a, wa) in &line {
                    out.push(([a, b, 0.0], wa * wb));
                }
            }
        }
        Hex8 | Hex20 | Hex27 => {
            for &(c, wc) in &line {
                for &(b, wb) in &line {
                    for &(a, wa) in &line {
                        out.push(([a, b, c], wa * wb * wc));
                    }
                }
            }
        }
        Tri3 | Tri6 => {
            out.extend(
                triangle()
                    .into_iter()
                    .map(|(p, wt)| ([p[0], p[1], 0.0], wt)),
            );
        }
        Wedge6 | Wedge15 => {
            let tri = triangle();
            for &(t, wt) in &line {
                for &(p, wp) in &tri {
                    out.push(([p[0], p[1], t], wp * wt));
                }
            }
        }
        Tet4 | Tet10 => {
            // One more point along u, whose Jacobian factor (1 - u)^2 is quadratic.
            let (xu, wu) = gauss_legendre(n.max(1) + 1);
            let first: Vec<(f64, f64)> = xu
                .iter()
                .zip(&wu)
                .map(|(&x, &w)| (0.5 * (x + 1.0), 0.5 * w))
                .collect();
            for &(u, wu) in &first {
                for &(v, wv) in &unit {
                    for &(s, ws) in &unit {
                        let r = u;
                        let q = v * (1.0 - u);
                        let t = s * (1.0 - u) * (1.0 - v);
                        let jac = (1.0 - u) * (1.0 - u) * (1.0 - v);
                        out.push(([r, q, t], wu * wv * ws * jac));
                    }
                }
            }
        }
    }
    out
}
