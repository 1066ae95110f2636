//! Reading .vtu files written by an independent library (meshio 5.3.5, PyPI), made by
//! `tests/data/make_vtu_fixtures.py`. Expected values come from the formulas in that script:
//! displacement = (0.001 x, -0.002 y, 0.0005 z) (Float64), temperature = x + 2 y + 3 z (Float32),
//! zone = 100 + cell index (Int32). meshio writes VTK node order, version 0.1, Int64
//! connectivity/offsets/types, base64 headers joint with the data when uncompressed and
//! separate when zlib-compressed (last block size = full block, not 0), and ascii floats with
//! 12 significant digits (`{:.11e}`).

use std::path::PathBuf;

use hone::io::{read_vtu, IoError, RawGrid, ScalarType};

fn fixture(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/data")
        .join(name)
}

/// Midpoint node pairs of each VTK cell type used (formats notes, section 1.4).
fn mid_edges(vtk_type: u8) -> &'static [(usize, usize, usize)] {
    match vtk_type {
        22 => &[(3, 0, 1), (4, 1, 2), (5, 2, 0)],
        23 => &[(4, 0, 1), (5, 1, 2), (6, 2, 3), (7, 3, 0)],
        24 => &[
            (4, 0, 1),
            (5, 1, 2),
            (6, 2, 0),
            (7, 0, 3),
            (8, 1, 3),
            (9, 2, 3),
        ],
        t => panic!("unexpected cell type {t}"),
    }
}

/// Checks the arrays against the script's formulas. `rel` is the relative tolerance: 0 for
/// binary files (same IEEE operations in numpy and here), 1e-11 for ascii (12 digits written).
fn check(g: &RawGrid, points: usize, types: &[u8], rel: f64) {
    assert_eq!(g.points.len(), points);
    assert_eq!(g.types, types);
    assert_eq!(g.cell_count(), types.len());
    // Mid-edge nodes sit halfway along their edge: confirms VTK node order survived.
    for c in 0..g.cell_count() {
        let nodes = g.cell_nodes(c);
        for &(m, a, b) in mid_edges(g.types[c]) {
            let (pm, pa, pb) = (
                g.points[nodes[m] as usize],
                g.points[nodes[a] as usize],
                g.points[nodes[b] as usize],
            );
            for i in 0..3 {
                assert!(
                    (pm[i] - 0.5 * (pa[i] + pb[i])).abs() <= 1e-12,
                    "cell {c} node {m}"
                );
            }
        }
    }
    let close = |got: f64, want: f64| (got - want).abs() <= rel * want.abs();
    let u = g.point_array("displacement").expect("displacement");
    assert_eq!((u.components, u.scalar_type), (3, ScalarType::Float64));
    let t = g.point_array("temperature").expect("temperature");
    assert_eq!((t.components, t.scalar_type), (1, ScalarType::Float32));
    for (i, p) in g.points.iter().enumerate() {
        let want = [0.001 * p[0], -0.002 * p[1], 0.0005 * p[2]];
        for (k, w) in want.iter().enumerate() {
            let got = u.values[3 * i + k];
            assert!(close(got, *w), "point {i} comp {k}: {got} vs {w}");
        }
        let tw = (p[0] + 2.0 * p[1] + 3.0 * p[2]) as f32 as f64;
        assert!(close(t.values[i], tw), "point {i}: {} vs {tw}", t.values[i]);
    }
    let z = g.cell_array("zone").expect("zone");
    assert_eq!(z.scalar_type, ScalarType::Int32);
    let want: Vec<f64> = (0..types.len()).map(|c| 100.0 + c as f64).collect();
    assert_eq!(z.values, want);
}

#[test]
fn quad8_tri6_in_ascii_binary_and_zlib() {
    // Two tri6 (22) written first, then one quad8 (23); 6 corners + 8 mid-edge nodes.
    for (file, rel) in [("ascii", 1e-11), ("binary", 0.0), ("zlib", 0.0)] {
        let g = read_vtu(&fixture(&format!("meshio_quad8_tri6_{file}.vtu"))).unwrap();
        check(&g, 14, &[22, 22, 23], rel);
        // Cell 2 is the quad on [0,1]^2: corners 0..3.
        assert_eq!(&g.cell_nodes(2)[..4], &[0, 1, 2, 3]);
    }
}

#[test]
fn tet10_in_ascii_binary_zlib_and_uint64_header() {
    // Six tetrahedra of a Kuhn split: 8 corners + 19 distinct edges (12 box edges, 6 face
    // diagonals, 1 main diagonal) = 27 points.
    for (file, rel) in [
        ("ascii", 1e-11),
        ("binary", 0.0),
        ("zlib", 0.0),
        ("zlib_uint64", 0.0),
    ] {
        let g = read_vtu(&fixture(&format!("meshio_tet10_{file}.vtu"))).unwrap();
        check(&g, 27, &[24; 6], rel);
        // Positive volumes (corner orientation kept).
        for c in 0..6 {
            let n = g.cell_nodes(c);
            let p = |k: usize| g.points[n[k] as usize];
            let d = |a: [f64; 3], b: [f64; 3]| [b[0] - a[0], b[1] - a[1], b[2] - a[2]];
            let (e1, e2, e3) = (d(p(0), p(1)), d(p(0), p(2)), d(p(0), p(3)));
            let vol = (e1[0] * (e2[1] * e3[2] - e2[2] * e3[1])
                - e1[1] * (e2[0] * e3[2] - e2[2] * e3[0])
                + e1[2] * (e2[0] * e3[1] - e2[1] * e3[0]))
                / 6.0;
            // Box volume 2 x 1 x 3 = 6, split into six equal parts.
            assert!((vol - 1.0).abs() < 1e-12, "cell {c}: volume {vol}");
        }
    }
}

#[test]
fn lzma_compressed_file_is_refused_by_name() {
    let err = read_vtu(&fixture("meshio_tet10_lzma.vtu")).unwrap_err();
    assert!(
        matches!(err, IoError::UnsupportedCompressor { .. }),
        "{err}"
    );
    let msg = err.to_string();
    assert!(
        msg.contains("meshio_tet10_lzma.vtu") && msg.contains("vtkLZMADataCompressor"),
        "{msg}"
    );
}
