//! Whole-pipeline properties of recovery and estimate, looped over every element kind.

mod common;

use common::*;
use hone::element::{ElementKind, PatchBasis};
use hone::material::{AnalysisMode, Elasticity};
use hone::mesh::{BoundaryFacets, NodeElements};
use hone::recovery::{recover, sample_stresses, ElementMaterials, NodeRule, RecoveryMethod};

/// A linear displacement field (constant strain) with all strain components non-zero.
fn linear_field(p: [f64; 3]) -> [f64; 3] {
    [
        1e-3 * p[0] + 2e-4 * p[1] - 1e-4 * p[2] + 0.01,
        -3e-4 * p[0] + 5e-4 * p[1] + 2e-4 * p[2] - 0.02,
        3e-4 * p[0] - 1e-4 * p[1] + 4e-4 * p[2],
    ]
}

/// Patch test (common practice: Irons' patch test, see Zienkiewicz & Taylor vol. 1 ch. 10): on a
/// distorted, non-affine mesh of every kind a linear displacement field gives constant FE
/// stress, SPR recovers exactly that constant at every node, and the estimated error vanishes.
/// Tolerance: error below 1e-10 of the energy norm (issue acceptance value), stresses to 1e-9
/// relative to the stress magnitude (round-off of the patch least squares).
#[test]
fn patch_test_every_kind_on_distorted_meshes() {
    for kind in ElementKind::ALL {
        let mut mesh = unit_mesh(kind, if kind.dim() == 2 { 4 } else { 3 });
        distort(&mut mesh);
        let mode = common::mode_for(kind);
        let model = model_with(mesh, |p| {
            let mut u = linear_field(p);
            if kind.dim() == 2 {
                u[2] = 0.0;
            }
            u
        });
        let computed = run(&model, mode, RecoveryMethod::Spr);
        let est = &computed.estimate;
        assert!(est.energy_norm > 0.0, "{kind:?}");
        assert!(
            est.error_norm < 1e-10 * est.energy_norm,
            "{kind:?}: error {} vs energy {}",
            est.error_norm,
            est.energy_norm
        );
        // The exact constant stress from Hooke's law.
        let strain = if kind.dim() == 2 {
            [1e-3, 5e-4, 0.0, 2e-4 - 3e-4, 0.0, 0.0]
        } else {
            [1e-3, 5e-4, 4e-4, 2e-4 - 3e-4, 2e-4 - 1e-4, -1e-4 + 3e-4]
        };
        let exact = Elasticity::new(
            hone::material::Material::new(200_000.0, 0.3, "").unwrap(),
            mode,
        )
        .stress(&strain);
        let scale = exact.iter().fold(0.0f64, |m, v| m.max(v.abs()));
        for v in &computed.recovered.values {
            for c in 0..6 {
                assert!(
                    (v[c] - exact[c]).abs() <= 1e-9 * scale,
                    "{kind:?}: {v:?} vs {exact:?}"
                );
            }
        }
    }
}

/// A polynomial with every term of `basis`, with fixed non-trivial coefficients.
fn basis_polynomial(basis: PatchBasis, x: [f64; 3], component: usize) -> f64 {
    let mut p = [0.0; 27];
    basis.evaluate(x, &mut p);
    (0..basis.len())
        .map(|i| {
            p[i] * (1.0 + 0.37 * i as f64 + 0.11 * component as f64)
                * if i % 2 == 0 { 1.0 } else { -0.8 }
        })
        .sum()
}

/// SPR reproduces any polynomial of the patch basis exactly at every node served by a full-rank
/// patch (Zienkiewicz & Zhu 1992, part 1: the fit is a least-squares projection onto that space,
/// which leaves members of the space unchanged). Tolerance 1e-8 relative to the field's
/// magnitude (conditioning of the normal equations of degree-2 bases).
#[test]
fn spr_reproduces_patch_basis_polynomials() {
    for kind in ElementKind::ALL {
        let mut mesh = unit_mesh(kind, if kind.dim() == 2 { 5 } else { 3 });
        distort(&mut mesh);
        let mode = common::mode_for(kind);
        let model = model_with(mesh, linear_field);
        let materials = ElementMaterials::new(&model.mesh, &steel(), mode).unwrap();
        let mut samples = sample_stresses(&model, &materials).expect("valid mesh");
        let basis = kind.patch_basis();
        for (s, x) in samples.stress.iter_mut().zip(&samples.position) {
            for (c, value) in s.iter_mut().enumerate() {
                *value = basis_polynomial(basis, *x, c);
            }
        }
        let adjacency = NodeElements::new(&model.mesh);
        let boundary = BoundaryFacets::new(&model.mesh, &adjacency);
        let rec = recover(
            &model,
            &materials,
            &samples,
            &adjacency,
            &boundary,
            RecoveryMethod::Spr,
        );
        let mut checked = 0;
        for s in 0..rec.slots.len() {
            if matches!(rec.rules[s], NodeRule::LowerDegree | NodeRule::Averaged) {
                continue;
            }
            let (node, _) = rec.slots.node_zone(s);
            let x = model.mesh.points[node as usize];
            for c in 0..6 {
                let exact = basis_polynomial(basis, x, c);
                let scale = 1.0 + exact.abs();
                assert!(
                    (rec.values[s][c] - exact).abs() <= 1e-8 * scale * 10.0,
                    "{kind:?} node {node} rule {:?}: {} vs {exact}",
                    rec.rules[s],
                    rec.values[s][c]
                );
            }
            checked += 1;
        }
        assert!(
            checked * 10 >= rec.slots.len() * 9,
            "{kind:?}: only {checked} of {} nodes reproduced",
            rec.slots.len()
        );
    }
}

/// A smooth field (no singularity) for the convergence tests.
fn smooth_field(p: [f64; 3]) -> [f64; 3] {
    [
        1e-3 * (1.3 * p[0] + 0.7 * p[1]).sin() + 2e-4 * p[2] * p[2],
        1e-3 * (0.9 * p[0] - 1.1 * p[1]).cos() + 1e-4 * (p[2] * p[0]),
        1e-3 * (0.8 * p[2] + 0.5 * p[0] * p[1]).sin(),
    ]
}

/// On uniformly refined meshes carrying the nodal interpolant of a smooth field, the estimated
/// error falls like N^(-p/d) (a priori rate of the energy norm, e.g. Strang & Fix 1973; the
/// estimate follows because SPR is asymptotically exact, Zienkiewicz & Zhu 1992 part 2). The
/// slope over the two finest levels must be within 15 % of p/d (issue acceptance band).
#[test]
fn estimated_error_falls_at_the_element_order() {
    for kind in ElementKind::ALL {
        let levels: &[usize] = if kind.dim() == 2 {
            &[4, 8, 16]
        } else if kind.order() == 1 {
            &[3, 6, 12]
        } else {
            &[2, 4, 8]
        };
        let mode = common::mode_for(kind);
        let mut counts = Vec::new();
        let mut errors = Vec::new();
        for &n in levels {
            let mut mesh = unit_mesh(kind, n);
            distort(&mut mesh);
            let model = model_with(mesh, |p| {
                let mut u = smooth_field(p);
                if kind.dim() == 2 {
                    u[2] = 0.0;
                }
                u
            });
            counts.push(model.mesh.element_count() as f64);
            errors.push(run(&model, mode, RecoveryMethod::Spr).estimate.error_norm);
        }
        let k = counts.len();
        let slope = -common::log_slope(&counts[k - 2..], &errors[k - 2..]);
        let expected = kind.order() as f64 / kind.dim() as f64;
        assert!(
            (slope - expected).abs() <= 0.15 * expected,
            "{kind:?}: slope {slope:.3}, expected {expected:.3} (errors {errors:?})"
        );
    }
}

/// Results are bit-identical whatever the thread count (sums in element order).
#[test]
fn same_results_for_one_and_two_threads() {
    let mut mesh = unit_mesh(ElementKind::Tet10, 3);
    distort(&mut mesh);
    let model = model_with(mesh, smooth_field);
    let one = rayon::ThreadPoolBuilder::new()
        .num_threads(1)
        .build()
        .unwrap();
    let two = rayon::ThreadPoolBuilder::new()
        .num_threads(2)
        .build()
        .unwrap();
    let a = one.install(|| run(&model, AnalysisMode::Solid3d, RecoveryMethod::Spr));
    let b = two.install(|| run(&model, AnalysisMode::Solid3d, RecoveryMethod::Spr));
    assert_eq!(a.estimate.error_sq, b.estimate.error_sq);
    assert_eq!(
        a.estimate.error_norm.to_bits(),
        b.estimate.error_norm.to_bits()
    );
    assert_eq!(a.recovered.values, b.recovered.values);
}
