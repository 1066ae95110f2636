use super::*;

/// Relative closeness.
fn close(a: f64, b: f64, rel: f64) -> bool {
    (a - b).abs() <= rel * b.abs()
}

// Input of method sheet 3.8 [V]: 4 elements, h_i = 1, ||u||^2 = 10, etabar = 0.05.
const ERRORS: [f64; 4] = [0.1, 0.2, 0.05, 0.4];
const ENERGY_SQ: f64 = 10.0;
const TARGET: f64 = 0.05;
// The sheet prints 10 significant digits, so 1e-9 relative is the tightest fair check.
const REL: f64 = 1e-9;

#[test]
fn classic_matches_method_sheet() {
    let plan = classic_sizes(&ERRORS, ENERGY_SQ, TARGET, 1.0, 2.0).unwrap();
    // h_new of method sheet 3.8 [V] (classic, d = 2, p = 1).
    let expected = [0.7989250591, 0.3994625295, 1.5978501181, 0.1997312648];
    for (r, e) in plan.ratio.iter().zip(expected) {
        assert!(close(*r, e, REL), "{r} vs {e}");
    }
    // N = 33.2925336597, method sheet 3.8 [V].
    assert!(close(plan.predicted_elements, 33.2925336597, REL));
}

#[test]
fn optimal_matches_method_sheet_2d() {
    let plan = optimal_sizes(&ERRORS, ENERGY_SQ, TARGET, 1.0, 2.0).unwrap();
    // ebar_tot = 0.1597850118, s and N of method sheet 3.8 [V] (optimal, d = 2, p = 1).
    assert!(close(plan.target_error_norm, 0.1597850118, REL));
    let expected = [0.5834523688, 0.4125631265, 0.8251262530, 0.2917261844];
    for (r, e) in plan.ratio.iter().zip(expected) {
        assert!(close(*r, e, REL), "{r} vs {e}");
    }
    assert!(close(plan.predicted_elements, 22.0318237454, REL));
    // Constraint check of the sheet: sum ||e||_i^2 s_i^2 = 0.02553125 = ebar_tot^2.
    let e2: f64 = ERRORS
        .iter()
        .zip(&plan.ratio)
        .map(|(e, s)| e * e * s * s)
        .sum();
    assert!(close(e2, 0.02553125, 1e-12)); // exact up to a few roundings of 4 terms
}

#[test]
fn optimal_matches_method_sheet_3d_quadratic() {
    let plan = optimal_sizes(&ERRORS, ENERGY_SQ, TARGET, 2.0, 3.0).unwrap();
    // s and N of method sheet 3.8 [V] (optimal, d = 3, p = 2).
    let expected = [0.7873122224, 0.6458600523, 0.9597443492, 0.5298218359];
    for (r, e) in plan.ratio.iter().zip(expected) {
        assert!(close(*r, e, REL), "{r} vs {e}");
    }
    assert!(close(plan.predicted_elements, 13.6157987342, REL));
}

#[test]
fn optimal_equidistributes_over_new_elements() {
    // Method sheet 3.2 [V]: each new element carries ebar_tot^2 / N. Region i holds s_i^-d new
    // elements sharing ||e||_i^2 s_i^(2p), i.e. ||e||_i^2 s_i^(2p+d) each.
    for (p, d) in [(1.0, 2.0), (2.0, 3.0), (2.0, 2.0)] {
        let plan = optimal_sizes(&ERRORS, ENERGY_SQ, TARGET, p, d).unwrap();
        let each = plan.target_error_norm.powi(2) / plan.predicted_elements;
        for (e, s) in ERRORS.iter().zip(&plan.ratio) {
            // a handful of powf roundings: 1e-12 relative is ample
            assert!(close(e * e * s.powf(2.0 * p + d), each, 1e-12));
        }
    }
}

#[test]
fn budget_round_trip_recovers_the_error() {
    // plan for 5 % -> N -> best error for budget N is 5 % again (sheet 3.2 inversion).
    for (p, d) in [(1.0, 2.0), (2.0, 3.0)] {
        let plan = optimal_sizes(&ERRORS, ENERGY_SQ, TARGET, p, d).unwrap();
        let (eta, again) =
            optimal_budget(&ERRORS, ENERGY_SQ, p, d, plan.predicted_elements).unwrap();
        // closed forms invert each other; only powf rounding remains
        assert!(close(eta, TARGET, 1e-12));
        assert!(close(
            again.predicted_elements,
            plan.predicted_elements,
            1e-12
        ));
    }
}

#[test]
fn mixed_with_equal_exponents_is_the_closed_form() {
    for (p, d) in [(1.0, 2.0), (2.0, 3.0)] {
        let closed = optimal_sizes(&ERRORS, ENERGY_SQ, TARGET, p, d).unwrap();
        let mixed = optimal_sizes_mixed(&ERRORS, &[p; 4], ENERGY_SQ, TARGET, d).unwrap();
        // bisection on ln mu to 1e-12 moves s by at most 1e-12 / (2p + d)
        for (a, b) in mixed.ratio.iter().zip(&closed.ratio) {
            assert!(close(*a, *b, 1e-10), "{a} vs {b}");
        }
        assert!(close(
            mixed.predicted_elements,
            closed.predicted_elements,
            1e-10
        ));
    }
}

#[test]
fn mixed_meets_the_error_target_with_a_singular_element() {
    // q = lambda_I(270 deg) = 0.5444837368 (method sheet 4.1 [V]) in the worst element.
    let q = [1.0, 1.0, 1.0, 0.5444837368];
    let plan = optimal_sizes_mixed(&ERRORS, &q, ENERGY_SQ, TARGET, 2.0).unwrap();
    let e2: f64 = ERRORS
        .iter()
        .zip(&plan.ratio)
        .zip(q)
        .map(|((e, s), q)| e * e * s.powf(2.0 * q))
        .sum();
    // constraint of sheet 3.4 holds to the bisection width (1e-12 in ln mu)
    assert!(close(e2, plan.target_error_norm.powi(2), 1e-10));
    // the singular element must be refined harder than under the smooth law
    let smooth = optimal_sizes(&ERRORS, ENERGY_SQ, TARGET, 1.0, 2.0).unwrap();
    assert!(plan.predicted_elements > smooth.predicted_elements);
}

#[test]
fn zero_error_element_is_left_alone() {
    let plan = optimal_sizes(&[0.0, 0.3], 1.0, 0.1, 1.0, 2.0).unwrap();
    assert!(plan.ratio[0].is_infinite());
    let mixed = optimal_sizes_mixed(&[0.0, 0.3], &[1.0, 1.0], 1.0, 0.1, 2.0).unwrap();
    assert!(close(
        mixed.predicted_elements,
        plan.predicted_elements,
        1e-10
    ));
}

#[test]
fn bad_inputs_are_typed_errors() {
    assert!(matches!(
        classic_sizes(&[0.1, -1.0], 1.0, 0.05, 1.0, 2.0),
        Err(PlanError::ElementValue { index: 1, .. })
    ));
    assert_eq!(
        optimal_sizes(&[0.0, 0.0], 1.0, 0.05, 1.0, 2.0),
        Err(PlanError::NoError)
    );
    assert!(optimal_sizes(&ERRORS, 1.0, 0.0, 1.0, 2.0).is_err());
    assert!(optimal_sizes(&ERRORS, f64::NAN, 0.05, 1.0, 2.0).is_err());
    assert!(optimal_budget(&ERRORS, 1.0, 1.0, 2.0, 0.0).is_err());
    assert!(matches!(
        optimal_sizes_mixed(&ERRORS, &[1.0], 1.0, 0.05, 2.0),
        Err(PlanError::Length { .. })
    ));
    assert!(optimal_sizes_mixed(&ERRORS, &[1.0, 0.0, 1.0, 1.0], 1.0, 0.05, 2.0).is_err());
}

#[test]
fn classic_and_optimal_reach_the_same_global_error() {
    // Method sheet 3.8 [V]: both plans predict ebar_tot; the optimal one needs 34 % fewer
    // elements (22.03 vs 33.29). Predicted error of a plan: sum ||e||_i^2 s_i^(2p), p = 1.
    let classic = classic_sizes(&ERRORS, ENERGY_SQ, TARGET, 1.0, 2.0).unwrap();
    let optimal = optimal_sizes(&ERRORS, ENERGY_SQ, TARGET, 1.0, 2.0).unwrap();
    let predicted = |r: &[f64]| -> f64 { ERRORS.iter().zip(r).map(|(e, s)| e * e * s * s).sum() };
    // four terms with a few roundings each: 1e-12 relative
    assert!(close(predicted(&classic.ratio), 0.02553125, 1e-12));
    assert!(close(predicted(&optimal.ratio), 0.02553125, 1e-12));
    let saving = 1.0 - optimal.predicted_elements / classic.predicted_elements;
    assert!((saving - 0.34).abs() < 0.005, "{saving}"); // sheet rounds to whole percent
}
