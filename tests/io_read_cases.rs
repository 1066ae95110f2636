//! Reader cases beyond the round trip: a hand-made big-endian file with base64 headers encoded
//! alone, several pieces in one file, and extension dispatch.

use std::path::PathBuf;

use hone::io::{read_results, read_vtu, read_vtu_bytes, IoError, ScalarType};

fn fixture(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/data")
        .join(name)
}

#[test]
fn big_endian_uint32_header_encoded_alone() {
    // Values from tests/data/make_vtu_fixtures.py (hand_made_big_endian).
    let g = read_vtu(&fixture("hand_bigendian_header_alone.vtu")).unwrap();
    let pts = [
        [0.0, 0.0, 0.0],
        [1.0, 0.0, 0.0],
        [1.0, 1.0, 0.0],
        [0.0, 1.0, 0.0],
        [2.0, 0.5, 0.0],
    ];
    assert_eq!(g.points, pts);
    assert_eq!(g.connectivity, [0, 1, 2, 3, 1, 4, 2]);
    assert_eq!(g.offsets, [4, 7]);
    assert_eq!(g.types, [9, 5]);
    let u = g.point_array("displacement").unwrap();
    let want: Vec<f64> = pts
        .iter()
        .flat_map(|p| [0.001 * p[0], -0.002 * p[1], 0.0005 * p[2]])
        .collect();
    assert_eq!(u.values, want);
    let label = g.point_array("label").unwrap();
    assert_eq!(label.scalar_type, ScalarType::UInt16);
    assert_eq!(label.values, [1000.0, 1001.0, 1002.0, 1003.0, 1004.0]);
    let zone = g.cell_array("zone").unwrap();
    assert_eq!(
        (zone.scalar_type, zone.values.as_slice()),
        (ScalarType::Int16, &[-5.0, 7.0][..])
    );
    let sign = g.cell_array("sign").unwrap();
    assert_eq!(
        (sign.scalar_type, sign.values.as_slice()),
        (ScalarType::Int8, &[-1.0, 1.0][..])
    );
    // FieldData is skipped, not mistaken for point or cell data.
    assert_eq!(g.point_data.len(), 2);
    assert_eq!(g.cell_data.len(), 2);
}

/// Two pieces, ascii, the second with its own point numbering from 0.
const TWO_PIECES: &str = r#"<?xml version="1.0"?>
<VTKFile type="UnstructuredGrid" version="1.0" byte_order="LittleEndian" header_type="UInt64">
  <UnstructuredGrid>
    <Piece NumberOfPoints="3" NumberOfCells="1">
      <PointData><DataArray type="Float32" Name="t" format="ascii">1 2 3</DataArray></PointData>
      <CellData><DataArray type="Int64" Name="id" format="ascii">10</DataArray></CellData>
      <Points><DataArray type="Float64" NumberOfComponents="3" format="ascii">0 0 0  1 0 0  0 1 0</DataArray></Points>
      <Cells>
        <DataArray type="Int32" Name="connectivity" format="ascii">0 1 2</DataArray>
        <DataArray type="Int32" Name="offsets" format="ascii">3</DataArray>
        <DataArray type="UInt8" Name="types" format="ascii">5</DataArray>
      </Cells>
    </Piece>
    <Piece NumberOfPoints="4" NumberOfCells="2">
      <PointData><DataArray type="Float32" Name="t" format="ascii">4 5 6 7</DataArray></PointData>
      <CellData><DataArray type="Int64" Name="id" format="ascii">11 12</DataArray></CellData>
      <Points><DataArray type="Float32" NumberOfComponents="3" format="ascii">5 0 0  6 0 0  5 1 0  6 1 0</DataArray></Points>
      <Cells>
        <DataArray type="Int64" Name="connectivity" format="ascii">0 1 2  1 3 2</DataArray>
        <DataArray type="Int64" Name="offsets" format="ascii">3 6</DataArray>
        <DataArray type="UInt8" Name="types" format="ascii">5 5</DataArray>
      </Cells>
    </Piece>
  </UnstructuredGrid>
</VTKFile>
"#;

#[test]
fn pieces_of_one_file_are_concatenated_and_renumbered() {
    let g = read_vtu_bytes(TWO_PIECES.as_bytes(), "two.vtu").unwrap();
    assert_eq!(g.points.len(), 7);
    assert_eq!(g.points[3], [5.0, 0.0, 0.0]);
    assert_eq!(g.connectivity, [0, 1, 2, 3, 4, 5, 4, 6, 5]);
    assert_eq!(g.offsets, [3, 6, 9]);
    assert_eq!(g.types, [5, 5, 5]);
    assert_eq!(
        g.point_array("t").unwrap().values,
        [1.0, 2.0, 3.0, 4.0, 5.0, 6.0, 7.0]
    );
    assert_eq!(g.cell_array("id").unwrap().values, [10.0, 11.0, 12.0]);
}

#[test]
fn pieces_with_different_arrays_are_refused() {
    let text = TWO_PIECES.replacen(
        "Name=\"t\" format=\"ascii\">4",
        "Name=\"s\" format=\"ascii\">4",
        1,
    );
    let err = read_vtu_bytes(text.as_bytes(), "two.vtu")
        .unwrap_err()
        .to_string();
    assert!(
        err.starts_with("two.vtu:") && err.contains("piece 1") && err.contains("'s'"),
        "{err}"
    );
}

#[test]
fn read_results_dispatches_on_extension() {
    let g = read_results(&fixture("meshio_tet10_binary.vtu")).unwrap();
    assert_eq!(g.cell_count(), 6);
    let err = read_results(&fixture("make_vtu_fixtures.py")).unwrap_err();
    assert!(matches!(err, IoError::UnsupportedExtension { .. }), "{err}");
    let msg = err.to_string();
    assert!(
        msg.contains("'py'") && msg.contains(".vtu") && msg.contains(".pvtu"),
        "{msg}"
    );
}
