use super::*;

fn mat() -> Material {
    Material::new(206_000.0, 0.3, "").expect("valid steel")
}

fn product(a: &[[f64; 6]; 6], b: &[[f64; 6]; 6]) -> [[f64; 6]; 6] {
    let mut p = [[0.0; 6]; 6];
    for i in 0..6 {
        for j in 0..6 {
            p[i][j] = (0..6).map(|k| a[i][k] * b[k][j]).sum();
        }
    }
    p
}

/// C D must be the identity on the components each mode uses (C is the inverse of D there), and
/// zero elsewhere. Plane strain: D's zz row only reports sigma_zz, so it is left out of the check.
#[test]
fn compliance_inverts_stiffness_on_used_components() {
    let modes: [(AnalysisMode, &[usize]); 4] = [
        (AnalysisMode::Solid3d, &[0, 1, 2, 3, 4, 5]),
        (AnalysisMode::PlaneStress { thickness: 2.0 }, &[0, 1, 3]),
        (AnalysisMode::PlaneStrain, &[0, 1, 3]),
        (AnalysisMode::Axisymmetric, &[0, 1, 2, 3]),
    ];
    for (mode, used) in modes {
        let el = Elasticity::new(mat(), mode);
        let p = product(&el.compliance, &el.stiffness);
        for &i in used {
            for &j in used {
                let expected = if i == j { 1.0 } else { 0.0 };
                // Round-off relative to entries of order 1 after the product (common practice).
                assert!(
                    (p[i][j] - expected).abs() < 1e-12,
                    "{mode:?} [{i}][{j}] = {}",
                    p[i][j]
                );
            }
        }
    }
}

/// Plane strain reports sigma_zz = nu (sigma_xx + sigma_yy) (Timoshenko & Goodier 1970, sec. 16).
#[test]
fn plane_strain_reports_out_of_plane_stress() {
    let el = Elasticity::new(mat(), AnalysisMode::PlaneStrain);
    let s = el.stress(&[1e-3, -2e-4, 0.0, 5e-4, 0.0, 0.0]);
    let expected = 0.3 * (s[0] + s[1]);
    assert!((s[2] - expected).abs() <= 1e-12 * expected.abs());
}

/// Uniaxial stress s gives an energy density s^2 / E in every mode that carries sigma_xx
/// (sigma^T C sigma = s^2/E for 3D, plane stress, axisymmetric; plane strain gives
/// (1 - nu^2) s^2 / E because of the out-of-plane constraint; Hooke's law, common practice).
#[test]
fn uniaxial_energy_density() {
    let s = [100.0, 0.0, 0.0, 0.0, 0.0, 0.0];
    let m = mat();
    for mode in [
        AnalysisMode::Solid3d,
        AnalysisMode::PlaneStress { thickness: 1.0 },
        AnalysisMode::Axisymmetric,
    ] {
        let w = Elasticity::new(m, mode).energy_product(&s, &s);
        assert!((w - 1e4 / 206_000.0).abs() < 1e-15, "{mode:?}");
    }
    let w = Elasticity::new(m, AnalysisMode::PlaneStrain).energy_product(&s, &s);
    assert!((w - (1.0 - 0.09) * 1e4 / 206_000.0).abs() < 1e-15);
}

/// Von Mises: uniaxial s gives s, pure shear tau gives sqrt(3) tau (von Mises 1913, common practice).
#[test]
fn von_mises_reference_states() {
    assert!((von_mises(&[250.0, 0.0, 0.0, 0.0, 0.0, 0.0]) - 250.0).abs() < 1e-12);
    let v = von_mises(&[0.0, 0.0, 0.0, 0.0, 10.0, 0.0]);
    assert!((v - 10.0 * 3f64.sqrt()).abs() < 1e-12);
    assert_eq!(von_mises(&[-5.0, -5.0, -5.0, 0.0, 0.0, 0.0]), 0.0);
}

#[test]
fn unphysical_values_are_rejected_with_the_value() {
    let err = Material::new(210e3, 0.5, "").unwrap_err();
    assert!(err.to_string().contains("nu = 0.5"), "{err}");
    let err = Material::new(-1.0, 0.3, "zone 4: ").unwrap_err();
    assert!(err.to_string().starts_with("zone 4: "), "{err}");
    assert!(Material::new(f64::NAN, 0.3, "").is_err());
    assert!(AnalysisMode::PlaneStress { thickness: 0.0 }
        .validate()
        .is_err());
}

#[test]
fn zone_file_parses_and_rejects_bad_entries() {
    let map = MaterialMap::from_json(
        r#"{"1": {"youngs": 206000, "poisson": 0.3}, "7": {"youngs": 70000, "poisson": 0.33}}"#,
        "zones.json",
    )
    .expect("valid zone file");
    assert_eq!(map.material(7).map(|m| m.youngs), Some(70000.0));
    assert_eq!(map.material(2), None);
    let err =
        MaterialMap::from_json(r#"{"a": {"youngs": 1, "poisson": 0.3}}"#, "z.json").unwrap_err();
    assert!(err.to_string().contains("'a'"), "{err}");
    let err = MaterialMap::from_json(r#"{"3": {"youngs": 1}}"#, "z.json").unwrap_err();
    assert!(err.to_string().contains("poisson"), "{err}");
    let err =
        MaterialMap::from_json(r#"{"3": {"youngs": 1, "poisson": 0.6}}"#, "z.json").unwrap_err();
    assert!(err.to_string().contains("zone 3"), "{err}");
}

/// The compact products equal the full 6x6 ones, and D and C are block diagonal in every mode
/// (normal block and shear diagonal), which the compact form relies on.
#[test]
fn compact_products_match_full_matrices() {
    let a = [1.0, -2.0, 0.5, 0.3, -0.7, 1.1];
    let b = [0.2, 0.4, -1.5, 2.0, 0.9, -0.3];
    for mode in [
        AnalysisMode::Solid3d,
        AnalysisMode::PlaneStress { thickness: 3.0 },
        AnalysisMode::PlaneStrain,
        AnalysisMode::Axisymmetric,
    ] {
        let el = Elasticity::new(mat(), mode);
        for i in 0..6 {
            for j in 0..6 {
                if (i < 3) != (j < 3) || (i >= 3 && i != j) {
                    assert_eq!(el.stiffness[i][j], 0.0);
                    assert_eq!(el.compliance[i][j], 0.0);
                }
            }
        }
        let full_stress: Vec<f64> = (0..6)
            .map(|i| (0..6).map(|j| el.stiffness[i][j] * a[j]).sum())
            .collect();
        let full_energy: f64 = (0..6)
            .map(|i| a[i] * (0..6).map(|j| el.compliance[i][j] * b[j]).sum::<f64>())
            .sum();
        let s = el.stress(&a);
        for i in 0..6 {
            assert!((s[i] - full_stress[i]).abs() <= 1e-12 * full_stress[i].abs().max(1.0));
        }
        assert!(
            (el.energy_product(&a, &b) - full_energy).abs() <= 1e-15 * full_energy.abs().max(1.0)
        );
    }
}
