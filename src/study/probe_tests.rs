use super::*;
use crate::element::ElementKind;
use crate::mesh::generate::structured;

fn parse(s: &str) -> Probe {
    s.parse().unwrap_or_else(|e| panic!("{s}: {e}"))
}

#[test]
fn syntax() {
    let p = parse("ux@10,20");
    assert_eq!(p.field, ProbeField::Displacement(0));
    assert_eq!(p.region, Region::Point([10.0, 20.0, 0.0]));
    assert_eq!((p.statistic, p.coordinates), (None, 2));
    let p = parse("von_mises@10, 20, 0");
    assert_eq!(p.field, ProbeField::VonMises);
    assert_eq!(p.coordinates, 3);
    let p = parse("max:von_mises@box(5,0,0,5)");
    assert_eq!(
        p.region,
        Region::Box {
            lo: [0.0, 0.0, 0.0],
            hi: [5.0, 5.0, 0.0]
        }
    );
    assert_eq!(p.statistic, Some(Statistic::Max));
    let p = parse("mean:syy@sphere(1,2,3,0.5)");
    assert_eq!(p.field, ProbeField::Stress(1));
    assert_eq!(
        p.region,
        Region::Sphere {
            centre: [1.0, 2.0, 3.0],
            radius: 0.5
        }
    );
    assert_eq!(parse("sxz@box(0,0,1,1)").statistic, Some(Statistic::Max));
    for bad in [
        "ux",
        "foo@1,2",
        "max:ux@1,2",
        "median:ux@box(0,0,1,1)",
        "ux@1",
        "ux@1,2,3,4",
        "ux@box(0,0,1)",
        "ux@sphere(0,0,-1)",
        "ux@1,nan",
        "ux@a,b",
    ] {
        assert!(bad.parse::<Probe>().is_err(), "{bad} parsed");
    }
}

/// On a unit square of quad4 with u = (2x + y, 0) and stress s = (x, y, 0, x + y, 0, 0) at the
/// nodes, interpolation is exact (bilinear fields on a rectangle), so the point values, the
/// region max and the volume-weighted mean are known in closed form.
#[test]
fn evaluation() {
    let mesh = structured(ElementKind::Quad4, [4, 4, 1], [1.0, 1.0, 1.0]);
    let u: Vec<[f64; 3]> = mesh
        .points
        .iter()
        .map(|p| [2.0 * p[0] + p[1], 0.0, 0.0])
        .collect();
    let s: Vec<SymTensor> = mesh
        .points
        .iter()
        .map(|p| [p[0], p[1], 0.0, p[0] + p[1], 0.0, 0.0])
        .collect();
    let measure = vec![1.0 / 16.0; mesh.element_count()];
    let model = crate::mesh::Model {
        mesh: mesh.clone(),
        displacement: u.clone(),
    };
    let weights = crate::study::node_weights(&model, &measure);
    let locator = Locator::new(&mesh);
    let stress_at = |n: u32, _zone: i64| s[n as usize];
    let ctx = ProbeContext {
        file: "square.vtu",
        mesh: &mesh,
        displacement: &u,
        stress_at: &stress_at,
        nodal_stress: &s,
        node_weight: &weights,
        locator: &locator,
    };
    let value = |text: &str| parse(text).evaluate(&ctx).expect("evaluates").value;
    assert!((value("ux@0.3,0.7") - 1.3).abs() < 1e-12);
    assert!((value("sxy@0.3,0.7") - 1.0).abs() < 1e-12);
    assert!((value("max:sxx@box(0,0,0.5,0.5)") - 0.5).abs() < 1e-12);
    assert!((value("min:syy@sphere(1,1,0.3)") - 0.75).abs() < 1e-12);
    // Mean of the linear sxx over the whole square with lumped weights: 0.5 (symmetry).
    assert!((value("mean:sxx@box(0,0,1,1)") - 0.5).abs() < 1e-12);
    let outside = parse("ux@2,2").evaluate(&ctx);
    assert!(matches!(outside, Err(ProbeError::Outside { ref file, .. }) if file == "square.vtu"));
    assert!(outside.unwrap_err().to_string().contains("square.vtu"));
    assert!(matches!(
        parse("ux@box(0.3,0.3,0.4,0.4)").evaluate(&ctx),
        Err(ProbeError::EmptyRegion { .. })
    ));
}
