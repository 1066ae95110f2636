use super::*;

/// Samples of a made-up 2D study: element counts n, unit area, one extra stress quantity.
fn samples(counts: &[usize], values: &[[f64; 4]]) -> Vec<MeshSample> {
    counts
        .iter()
        .zip(values)
        .map(|(&n, v)| MeshSample {
            label: format!("m{n}.vtu"),
            dofs: 2 * n,
            elements: n,
            measure: 1.0,
            dimension: 2,
            order: 1,
            error_norm: v[1],
            values: v.to_vec(),
            locations: vec![None, None, Some([0.0; 3]), Some([1.0, 1.0, 0.0])],
        })
        .collect()
}

fn specs() -> Vec<QuantitySpec> {
    let mut s = quantity_specs(&[]);
    s.push(QuantitySpec {
        name: "syy@1,1".into(),
        kind: QuantityKind::Stress,
    });
    s
}

/// Celik et al. (2008) Table 1 column 1 as a strain-energy sequence, meshes given in any order
/// (N = 8000, 18000, 4500): sorted by DOFs, p = 1.53, extrapolated 6.1685, GCI 2.2 % (values
/// from memory; method sheet 6.3 recomputation).
#[test]
fn meshes_in_any_order_give_the_celik_numbers() {
    let study = analyse(
        samples(
            &[8000, 18000, 4500],
            &[
                [5.972, 1.0, 1.0, 1.0],
                [6.063, 0.8, 1.0, 1.0],
                [5.863, 1.2, 1.0, 1.0],
            ],
        ),
        &specs(),
        &[],
        &StudyOptions::default(),
    )
    .expect("study");
    let q = &study.quantities[0];
    assert_eq!(q.dofs, vec![9000, 16000, 36000]);
    assert_eq!(q.values, vec![5.863, 5.972, 6.063]);
    assert!((q.observed_order.expect("p") - 1.53).abs() < 0.005);
    assert!((q.extrapolated.expect("ext") - 6.1685).abs() < 0.00005);
    assert!((100.0 * q.gci_fine.expect("gci") - 2.2).abs() < 0.05);
    assert_eq!(q.safety_factor, Some(1.25));
    assert_eq!(q.verdict, Verdict::Converging);
    // Constant values: converged, no order.
    assert_eq!(study.quantities[2].verdict, Verdict::Converged);
}

/// A stress growing by 2^(1 - 0.5445) per halving (method sheet 4.3: 1.3713 at 270 degrees) is
/// singular from the values alone, and gets no extrapolated value or GCI; with a flagged spot
/// at its location the spot's lambda is reported.
#[test]
fn growing_stress_is_singular() {
    let k: f64 = 1.0 - 0.5445;
    let counts = [100, 400, 1600, 6400];
    let values: Vec<[f64; 4]> = counts
        .iter()
        .map(|&n| {
            let h = (1.0 / n as f64).sqrt();
            [1.0, h.sqrt(), 1.0, 3.0 * h.powf(-k)]
        })
        .collect();
    let study = analyse(
        samples(&counts, &values),
        &specs(),
        &[],
        &StudyOptions::default(),
    )
    .expect("study");
    let q = &study.quantities[3];
    assert_eq!(q.verdict, Verdict::Singular);
    assert!(q.extrapolated.is_none() && q.gci_fine.is_none());
    let g = q.singular.as_ref().expect("growth");
    assert!((g.lambda - 0.5445).abs() < 1e-9, "{g:?}");
    assert!((g.growth_per_halving - 1.3713).abs() < 5e-5);
    assert_eq!(study.singular_points.len(), 1);
    // Rate of ||e|| = h^0.5 = N^-0.25 against p/d = 0.5: singularity-limited.
    let rate = &study.energy_error_rate;
    assert!((rate.observed.expect("rate") - 0.25).abs() < 1e-9);
    assert_eq!(rate.verdict, "singularity-limited");
    let spot = Spot {
        location: [1.0, 1.0, 0.0],
        lambda: 0.5445,
        kind: "re-entrant corner".into(),
    };
    let study = analyse(
        samples(&counts[2..], &values[2..]),
        &specs(),
        &[spot],
        &StudyOptions::default(),
    )
    .expect("study");
    let q = &study.quantities[3];
    assert_eq!(q.verdict, Verdict::Singular);
    assert_eq!(
        q.singular.as_ref().map(|g| g.source.as_str()),
        Some("re-entrant corner")
    );
}

/// Two meshes: expected order (p = 1: 2 for strain energy) and Fs = 3 (Celik et al. 2008;
/// method sheet 6.1). phi = 1, 1.3 with r = 2: phi_ext = (4 * 1.3 - 1)/3 = 1.4,
/// GCI = 3 * (0.3/1.3)/3 = 23.08 % (arithmetic).
#[test]
fn two_meshes_use_the_expected_order() {
    let study = analyse(
        samples(&[100, 400], &[[1.0, 1.0, 1.0, 1.0], [1.3, 0.5, 1.0, 1.0]]),
        &specs(),
        &[],
        &StudyOptions::default(),
    )
    .expect("study");
    let q = &study.quantities[0];
    assert_eq!(q.verdict, Verdict::AssumedOrder);
    assert!((q.extrapolated.expect("ext") - 1.4).abs() < 1e-12);
    assert!((q.gci_fine.expect("gci") - 0.3 / 1.3).abs() < 1e-12);
    assert_eq!(q.safety_factor, Some(3.0));
}

#[test]
fn bad_inputs_are_errors() {
    let one = samples(&[100], &[[1.0; 4]]);
    assert_eq!(
        analyse(one, &specs(), &[], &StudyOptions::default()),
        Err(StudyError::TooFewMeshes(1))
    );
    let same = samples(&[100, 100], &[[1.0; 4], [2.0; 4]]);
    assert!(matches!(
        analyse(same, &specs(), &[], &StudyOptions::default()),
        Err(StudyError::SameSize { .. })
    ));
}
