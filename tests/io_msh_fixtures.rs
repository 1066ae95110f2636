//! Reading MSH 4.1 files written by an independent library (meshio 5.3.5, PyPI), made by
//! `tests/data/make_msh_fixtures.py`. Expected values come from the formulas in that script:
//! displacement = (0.001 x, -0.002 y, 0.0005 z), zone = 100 + cell index over all blocks.
//! meshio writes coordinates with 17 significant digits (ascii) or raw doubles (binary), and
//! data rows with Python's shortest round-trip `repr`, so every comparison here is exact: the
//! same IEEE products are computed in numpy and here.

use std::path::PathBuf;

use hone::element::ElementKind;
use hone::io::{build_model, read_msh, read_results, ModelOptions, RawGrid};
use hone::mesh::check_geometry;

fn fixture(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/data")
        .join(name)
}

/// Mid-edge nodes sit halfway along their edge, exactly, with the edges of hone's element
/// tables (VTK order, formats notes 1.4).
fn check_mid_nodes(g: &RawGrid) {
    for c in 0..g.cell_count() {
        let nodes = g.cell_nodes(c);
        let kind = ElementKind::from_vtk_id(g.types[c]).expect("a hone element type");
        for (&[a, b], &m) in kind.edges().iter().zip(kind.edge_mid_nodes()) {
            let (pm, pa, pb) = (
                g.points[nodes[m] as usize],
                g.points[nodes[a] as usize],
                g.points[nodes[b] as usize],
            );
            for k in 0..3 {
                assert_eq!(pm[k], 0.5 * (pa[k] + pb[k]), "cell {c} node {m}");
            }
        }
    }
}

fn check_displacement(g: &RawGrid) {
    let u = g.point_array("displacement").expect("displacement");
    assert_eq!(u.components, 3);
    for (i, p) in g.points.iter().enumerate() {
        let want = [0.001 * p[0], -0.002 * p[1], 0.0005 * p[2]];
        assert_eq!(&u.values[3 * i..3 * i + 3], &want, "point {i}");
    }
}

fn same_grid(a: &RawGrid, b: &RawGrid) {
    assert_eq!(a.points, b.points);
    assert_eq!(a.connectivity, b.connectivity);
    assert_eq!(a.types, b.types);
    for (x, y) in a
        .point_data
        .iter()
        .chain(&a.cell_data)
        .zip(b.point_data.iter().chain(&b.cell_data))
    {
        assert_eq!(x.name, y.name);
        assert_eq!(x.values, y.values, "{}", x.name);
    }
}

#[test]
fn tri6_in_ascii_and_binary() {
    let ascii = read_msh(&fixture("meshio_tri6_ascii.msh")).unwrap();
    let binary = read_results(&fixture("meshio_tri6_binary.msh")).unwrap();
    same_grid(&ascii, &binary);
    let g = &ascii;
    assert_eq!(g.points.len(), 15);
    assert_eq!(g.types, vec![22; 4]);
    check_mid_nodes(g);
    check_displacement(g);
    assert_eq!(
        g.cell_array("zone").unwrap().values,
        vec![100.0, 101.0, 102.0, 103.0]
    );
    assert_eq!(g.cell_array("gmsh_physical").unwrap().values, vec![0.0; 4]);
    let (model, _) = build_model(g, "tri6.msh", &ModelOptions::default()).unwrap();
    assert_eq!(model.mesh.dimension, 2);
    assert!(check_geometry(&model.mesh).is_empty());
}

#[test]
fn tet10_with_a_boundary_group_in_ascii_and_binary() {
    let ascii = read_msh(&fixture("meshio_tet10_ascii.msh")).unwrap();
    let binary = read_msh(&fixture("meshio_tet10_binary.msh")).unwrap();
    same_grid(&ascii, &binary);
    let g = &ascii;
    assert_eq!(g.points.len(), 27);
    // The two boundary triangles are left out; the six tetrahedra stay.
    assert_eq!(g.types, vec![24; 6]);
    check_mid_nodes(g);
    check_displacement(g);
    // Element data rows of the boundary triangles (100, 101) are ignored.
    let zone = g.cell_array("zone").unwrap();
    assert_eq!(zone.values, vec![102.0, 103.0, 104.0, 105.0, 106.0, 107.0]);
    assert_eq!(g.cell_array("gmsh_entity").unwrap().values, vec![1.0; 6]);
    assert_eq!(g.cell_array("gmsh_physical").unwrap().values, vec![7.0; 6]);
    let opts = ModelOptions {
        zone_array: Some("gmsh_physical".into()),
        ..ModelOptions::default()
    };
    let (model, _) = build_model(g, "tet10.msh", &opts).unwrap();
    assert_eq!(model.mesh.zone, vec![7; 6]);
    assert!(check_geometry(&model.mesh).is_empty());
    // The six positive corner tetrahedra fill the 2 x 1 x 3 box (round-off of a few products).
    let mut volume = 0.0;
    for e in 0..model.mesh.element_count() {
        let (_, nodes) = model.mesh.element(e);
        let p: Vec<[f64; 3]> = nodes[..4]
            .iter()
            .map(|&n| model.mesh.points[n as usize])
            .collect();
        let d = |i: usize| [p[i][0] - p[0][0], p[i][1] - p[0][1], p[i][2] - p[0][2]];
        let (a, b, c) = (d(1), d(2), d(3));
        let det = a[0] * (b[1] * c[2] - b[2] * c[1]) - a[1] * (b[0] * c[2] - b[2] * c[0])
            + a[2] * (b[0] * c[1] - b[1] * c[0]);
        assert!(det > 0.0);
        volume += det / 6.0;
    }
    assert!((volume - 6.0).abs() <= 1e-12 * 6.0, "{volume}");
}
