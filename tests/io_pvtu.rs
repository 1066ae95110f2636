//! Parallel files: two pieces of a strip of three unit quads, sharing the points at x = 2.
//!
//! ```text
//!  y=1  4----5----6----7        piece 0: Q0, Q1 owned, Q2 as a ghost cell (vtkGhostType 1)
//!       | Q0 | Q1 | Q2 |        piece 1: Q2 owned, its own point numbering
//!  y=0  0----1----2----3        (labels: piece-0 ids = x + 4 y)
//!       x=0  1    2    3
//! ```
//! Planted values check the stitching rules: piece 0's points at x = 3 are only used by its
//! ghost cell and carry a wrong displacement (999) that must not survive; piece 1's interface
//! points carry displacement + 1000, which must lose to piece 0 (first piece wins).

use std::path::Path;

use hone::io::{
    read_pvtu, read_results, write_vtu, ArrayData, ArrayView, Encoding, GridView, IoError,
    WriteOptions,
};

#[derive(Clone, Copy)]
struct Setup {
    /// Name of the global id array, if any.
    ids: Option<&'static str>,
    /// Shift of piece 1's interface points along x.
    shift: f64,
    /// Leave 'zone' out of piece 1.
    drop_zone: bool,
}

fn disp(p: [f64; 3]) -> [f64; 3] {
    [0.001 * p[0], -0.002 * p[1], 0.0]
}

#[allow(clippy::too_many_arguments)] // a test fixture writer: each argument is one array of the piece
fn write_piece(
    path: &Path,
    points: &[[f64; 3]],
    conn: &[u32],
    (ghost, zone): (&[u8], &[i32]),
    u: &[f64],
    ids: Option<(&str, &[i64])>,
    point_ghost: bool,
) {
    let n = conn.len() / 4;
    let offsets: Vec<u64> = (1..=n as u64).map(|c| 4 * c).collect();
    let types = vec![9u8; n];
    let pg = vec![0u8; points.len()];
    let mut pd = vec![ArrayView {
        name: "displacement",
        components: 3,
        data: ArrayData::F64(u),
    }];
    if let Some((name, v)) = ids {
        pd.push(ArrayView {
            name,
            components: 1,
            data: ArrayData::I64(v),
        });
    }
    if point_ghost {
        pd.push(ArrayView {
            name: "vtkGhostType",
            components: 1,
            data: ArrayData::U8(&pg),
        });
    }
    let mut cd = vec![ArrayView {
        name: "vtkGhostType",
        components: 1,
        data: ArrayData::U8(ghost),
    }];
    if !zone.is_empty() {
        cd.push(ArrayView {
            name: "zone",
            components: 1,
            data: ArrayData::I32(zone),
        });
    }
    let grid = GridView {
        points,
        connectivity: conn,
        offsets: &offsets,
        types: &types,
        point_data: &pd,
        cell_data: &cd,
    };
    let opts = WriteOptions {
        encoding: Encoding::AppendedRaw,
        ..WriteOptions::default()
    };
    write_vtu(std::fs::File::create(path).unwrap(), &grid, &opts).unwrap();
}

/// Writes `strip.pvtu` with pieces in `parts/`, returns its path.
fn make(dir: &Path, s: Setup) -> std::path::PathBuf {
    std::fs::create_dir_all(dir.join("parts")).unwrap();
    // Piece 0: all 8 points, id = x + 4 y.
    let p0: Vec<[f64; 3]> = (0..8)
        .map(|i| [(i % 4) as f64, (i / 4) as f64, 0.0])
        .collect();
    let c0: Vec<u32> = (0..3).flat_map(|q| [q, q + 1, q + 5, q + 4]).collect();
    let u0: Vec<f64> = p0
        .iter()
        .flat_map(|&p| if p[0] == 3.0 { [999.0; 3] } else { disp(p) })
        .collect();
    let id0: Vec<i64> = (0..8).collect();
    write_piece(
        &dir.join("parts/strip_0.vtu"),
        &p0,
        &c0,
        (&[0, 0, 1], &[10, 11, 99]),
        &u0,
        s.ids.map(|n| (n, id0.as_slice())),
        true,
    );
    // Piece 1: Q2 with local order (3,1) (2,0) (3,0) (2,1).
    let exact = [
        [3.0, 1.0, 0.0],
        [2.0, 0.0, 0.0],
        [3.0, 0.0, 0.0],
        [2.0, 1.0, 0.0],
    ];
    let p1: Vec<[f64; 3]> = exact
        .iter()
        .map(|&p| {
            if p[0] == 2.0 {
                [p[0] + s.shift, p[1], p[2]]
            } else {
                p
            }
        })
        .collect();
    let u1: Vec<f64> = exact
        .iter()
        .flat_map(|&p| {
            let d = disp(p);
            if p[0] == 2.0 {
                [d[0] + 1000.0, d[1], d[2]]
            } else {
                d
            }
        })
        .collect();
    let id1: Vec<i64> = exact.iter().map(|p| (p[0] + 4.0 * p[1]) as i64).collect();
    let zone1: &[i32] = if s.drop_zone { &[] } else { &[12] };
    write_piece(
        &dir.join("parts/strip_1.vtu"),
        &p1,
        &[1, 2, 0, 3],
        (&[0], zone1),
        &u1,
        s.ids.map(|n| (n, id1.as_slice())),
        false,
    );
    let pvtu = dir.join("strip.pvtu");
    std::fs::write(
        &pvtu,
        r#"<?xml version="1.0"?>
<VTKFile type="PUnstructuredGrid" version="1.0" byte_order="LittleEndian" header_type="UInt64">
  <PUnstructuredGrid GhostLevel="1">
    <PPointData Vectors="displacement">
      <PDataArray type="Float64" Name="displacement" NumberOfComponents="3"/>
    </PPointData>
    <PCellData>
      <PDataArray type="UInt8" Name="vtkGhostType"/>
    </PCellData>
    <PPoints><PDataArray type="Float64" NumberOfComponents="3"/></PPoints>
    <Piece Source="parts/strip_0.vtu"/>
    <Piece Source="parts/strip_1.vtu"/>
  </PUnstructuredGrid>
</VTKFile>
"#,
    )
    .unwrap();
    pvtu
}

/// Checks the stitched strip (8 points, 3 quads, values by the rules in the header).
fn check_strip(g: &hone::io::RawGrid) {
    let want_points = [
        [0.0, 0.0, 0.0],
        [1.0, 0.0, 0.0],
        [2.0, 0.0, 0.0],
        [0.0, 1.0, 0.0],
        [1.0, 1.0, 0.0],
        [2.0, 1.0, 0.0],
        [3.0, 1.0, 0.0],
        [3.0, 0.0, 0.0],
    ];
    assert_eq!(g.points, want_points);
    assert_eq!(g.connectivity, [0, 1, 4, 3, 1, 2, 5, 4, 2, 7, 6, 5]);
    assert_eq!(g.offsets, [4, 8, 12]);
    assert_eq!(g.types, [9, 9, 9]);
    let u = g.point_array("displacement").unwrap();
    let want: Vec<f64> = want_points.iter().flat_map(|&p| disp(p)).collect();
    assert_eq!(u.values, want);
    assert_eq!(g.cell_array("zone").unwrap().values, [10.0, 11.0, 12.0]);
    assert!(g.cell_array("vtkGhostType").is_none() && g.point_array("vtkGhostType").is_none());
}

#[test]
fn stitches_by_global_ids() {
    let dir = tempfile::tempdir().unwrap();
    // Piece 1's interface points are 1e-6 off: only the ids can match them.
    let pvtu = make(
        dir.path(),
        Setup {
            ids: Some("globalnodeid"),
            shift: 1e-6,
            drop_zone: false,
        },
    );
    let g = read_pvtu(&pvtu).unwrap();
    check_strip(&g);
    assert_eq!(
        g.point_array("globalnodeid").unwrap().values,
        [0.0, 1.0, 2.0, 4.0, 5.0, 6.0, 7.0, 3.0]
    );
}

#[test]
fn stitches_by_coordinates_within_tolerance() {
    let dir = tempfile::tempdir().unwrap();
    // Tolerance is 1e-9 x diagonal (sqrt(10)): a 1e-12 offset merges.
    let pvtu = make(
        dir.path(),
        Setup {
            ids: None,
            shift: 1e-12,
            drop_zone: false,
        },
    );
    let g = read_results(&pvtu).unwrap();
    check_strip(&g);
}

#[test]
fn points_beyond_tolerance_stay_apart_without_ids() {
    let dir = tempfile::tempdir().unwrap();
    let pvtu = make(
        dir.path(),
        Setup {
            ids: None,
            shift: 1e-6,
            drop_zone: false,
        },
    );
    let g = read_pvtu(&pvtu).unwrap();
    // 6 from piece 0 + all 4 of piece 1.
    assert_eq!(g.points.len(), 10);
    assert_eq!(g.cell_count(), 3);
}

#[test]
fn missing_piece_and_different_arrays_are_clear_errors() {
    let dir = tempfile::tempdir().unwrap();
    let pvtu = make(
        dir.path(),
        Setup {
            ids: None,
            shift: 0.0,
            drop_zone: true,
        },
    );
    let err = read_pvtu(&pvtu).unwrap_err();
    let m = err.to_string();
    assert!(matches!(err, IoError::PieceMismatch { .. }), "{m}");
    assert!(
        m.contains("strip.pvtu: piece 'parts/strip_1.vtu' has cell arrays [] ")
            && m.contains("'zone' (1)"),
        "{m}"
    );

    std::fs::remove_file(dir.path().join("parts/strip_1.vtu")).unwrap();
    let m = read_pvtu(&pvtu).unwrap_err().to_string();
    assert!(m.contains("piece 'parts/strip_1.vtu' is missing"), "{m}");
}

#[test]
fn serial_reader_points_parallel_files_to_read_pvtu() {
    let dir = tempfile::tempdir().unwrap();
    let pvtu = make(
        dir.path(),
        Setup {
            ids: None,
            shift: 0.0,
            drop_zone: false,
        },
    );
    let m = hone::io::read_vtu(&pvtu).unwrap_err().to_string();
    assert!(
        m.contains("PUnstructuredGrid") && m.contains("read_pvtu"),
        "{m}"
    );
}
