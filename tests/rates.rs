//! Convergence rates of the reference solver's exact error, and the Kirsch peak stress.
//!
//! A priori: ||e|| = O(h^min(p, lambda)) = O(N^(-min(p, lambda)/d)) under uniform refinement
//! (Strang & Fix 1973, ch. 3; method sheet 4.3, from memory for the theorem). Slopes over the
//! two finest levels must be within 10 % of the prediction (issue acceptance band).

mod common;

use hone::element::ElementKind;
use hone::reference::problems::{self, Problem, WILLIAMS_LAMBDA_270};

/// Builds a problem for a kind and level.
type Build = fn(ElementKind, usize) -> Problem;

fn slope(build: Build, kind: ElementKind, levels: [usize; 2]) -> f64 {
    let runs: Vec<(f64, f64)> = levels
        .iter()
        .map(|&n| {
            let s = build(kind, n).solve().expect("solves");
            (s.model.mesh.element_count() as f64, s.error_sq.sqrt())
        })
        .collect();
    -(runs[1].1 / runs[0].1).ln() / (runs[1].0 / runs[0].0).ln()
}

#[test]
fn smooth_problems_converge_at_p_over_d() {
    let cases: [(Build, ElementKind, [usize; 2]); 6] = [
        (problems::cantilever, ElementKind::Quad4, [8, 16]),
        (problems::cantilever, ElementKind::Tri6, [4, 8]),
        (problems::lame_axisymmetric, ElementKind::Quad8, [4, 8]),
        (problems::manufactured_box, ElementKind::Tet4, [4, 8]),
        (problems::manufactured_box, ElementKind::Hex20, [2, 4]),
        (problems::kirsch, ElementKind::Quad8, [8, 16]),
    ];
    for (build, kind, levels) in cases {
        let expected = kind.order() as f64 / kind.dim() as f64;
        let s = slope(build, kind, levels);
        assert!(
            (s - expected).abs() <= 0.1 * expected,
            "{kind:?}: slope {s:.4}, expected {expected}"
        );
    }
}

/// The L-shape converges at N^(-lambda/2) = N^(-0.2722) for any p (method sheet 4.3 [V]).
#[test]
fn l_shape_converges_at_the_singular_rate() {
    let expected = WILLIAMS_LAMBDA_270 / 2.0;
    for kind in [ElementKind::Quad4, ElementKind::Tri6] {
        let s = slope(problems::l_shape, kind, [8, 16]);
        assert!(
            (s - expected).abs() <= 0.1 * expected,
            "{kind:?}: slope {s:.4}, expected {expected:.4}"
        );
    }
}

/// The recovered sigma_xx at the top of the hole, (0, a), tends to 3 S (Kirsch 1898, Kt = 3):
/// within 1 % on the finest mesh and closer than on the coarsest.
#[test]
fn kirsch_peak_stress_tends_to_three() {
    let mut errors = Vec::new();
    for n in [4, 8, 16] {
        let (solved, computed) =
            common::solve_and_estimate(&problems::kirsch(ElementKind::Quad8, n));
        let mesh = &solved.model.mesh;
        let node = (0..mesh.node_count())
            .find(|&i| mesh.points[i][0].abs() < 1e-9 && (mesh.points[i][1] - 1.0).abs() < 1e-9)
            .expect("node at (0, a)") as u32;
        let peak = computed.recovered.at(node, 0)[0];
        errors.push((peak - 3.0).abs() / 3.0);
    }
    assert!(errors[2] < 0.01, "peak error {errors:?}");
    assert!(errors[2] < errors[0], "peak error {errors:?}");
}
