//! Bad input: each case must give an `IoError` whose message names the file and the array or
//! cell at fault; and no input at all (truncations, byte flips) may make the reader panic.

use hone::io::{
    read_vtu_bytes, write_vtu, ArrayData, ArrayView, ByteOrder, Encoding, GridView, HeaderType,
    IoError, WriteOptions,
};

/// A valid ascii file: 4 points, 2 triangles, a 3-component point array and a cell array.
const GOOD: &str = r#"<?xml version="1.0"?>
<VTKFile type="UnstructuredGrid" version="1.0" byte_order="LittleEndian" header_type="UInt64">
  <UnstructuredGrid>
    <Piece NumberOfPoints="4" NumberOfCells="2">
      <PointData>
        <DataArray type="Float64" Name="displacement" NumberOfComponents="3" format="ascii">
          0 0 0  1 0 0  1 1 0  0 1 0
        </DataArray>
      </PointData>
      <CellData>
        <DataArray type="Int32" Name="zone" format="ascii">1 2</DataArray>
      </CellData>
      <Points>
        <DataArray type="Float64" NumberOfComponents="3" format="ascii">0 0 0  1 0 0  1 1 0  0 1 0</DataArray>
      </Points>
      <Cells>
        <DataArray type="Int64" Name="connectivity" format="ascii">0 1 2  0 2 3</DataArray>
        <DataArray type="Int64" Name="offsets" format="ascii">3 6</DataArray>
        <DataArray type="UInt8" Name="types" format="ascii">5 5</DataArray>
      </Cells>
    </Piece>
  </UnstructuredGrid>
</VTKFile>
"#;

fn err_of(text: &str) -> (IoError, String) {
    let e = read_vtu_bytes(text.as_bytes(), "model.vtu").expect_err("input should be refused");
    let m = e.to_string();
    assert!(
        m.starts_with("model.vtu: "),
        "message must name the file: {m}"
    );
    (e, m)
}

#[test]
fn the_good_file_reads() {
    let g = read_vtu_bytes(GOOD.as_bytes(), "model.vtu").unwrap();
    assert_eq!((g.points.len(), g.cell_count()), (4, 2));
}

#[test]
fn wrong_array_length_names_array_and_counts() {
    let (e, m) =
        err_of(&GOOD.replace("0 0 0  1 0 0  1 1 0  0 1 0\n", "0 0 0  1 0 0  1 1 0  0 1\n"));
    assert!(matches!(e, IoError::ArrayLength { .. }));
    assert_eq!(
        m,
        "model.vtu: array 'displacement' (PointData) has 11 values, expected 12 (4 points x 3 components)"
    );
    let (_, m) = err_of(&GOOD.replace(">1 2</DataArray>", ">1 2 3</DataArray>"));
    assert!(
        m.contains("array 'zone' (CellData) has 3 values, expected 2 (2 cells x 1 components)"),
        "{m}"
    );
}

#[test]
fn non_numeric_ascii_names_array_index_and_token() {
    let (e, m) = err_of(&GOOD.replace("1 1 0  0 1 0\n", "1 abc 0  0 1 0\n"));
    assert!(matches!(e, IoError::BadValue { .. }));
    assert!(
        m.contains("array 'displacement' (PointData): value 7 is 'abc', expected a Float64 number"),
        "{m}"
    );
}

#[test]
fn cell_index_out_of_range_names_cell_and_point() {
    let (e, m) = err_of(&GOOD.replace("0 1 2  0 2 3", "0 1 2  0 2 7"));
    assert!(matches!(e, IoError::PointOutOfRange { .. }));
    assert_eq!(
        m,
        "model.vtu: cell 1 uses point 7, but the file has 4 points"
    );
}

#[test]
fn inconsistent_offsets_name_the_cell() {
    let (_, m) = err_of(&GOOD.replace(">3 6<", ">4 3<"));
    assert!(
        m.contains("array 'offsets' (Cells): cell 1 ends at 3, expected at least 4"),
        "{m}"
    );
    let (_, m) = err_of(&GOOD.replace(">3 6<", ">3 5<"));
    assert!(
        m.contains("cell 1 ends at 5, expected 6 (the length of connectivity)"),
        "{m}"
    );
    let (_, m) = err_of(&GOOD.replace(">3 6<", ">-3 6<"));
    assert!(
        m.contains("array 'offsets' (Cells): value 0 is '-3'"),
        "{m}"
    );
}

#[test]
fn missing_points_and_cells_are_named() {
    let start = GOOD.find("<Points>").unwrap();
    let end = GOOD.find("</Points>").unwrap() + "</Points>".len();
    let no_points = format!("{}{}", &GOOD[..start], &GOOD[end..]);
    let (e, m) = err_of(&no_points);
    assert!(matches!(e, IoError::Structure { .. }));
    assert!(
        m.contains("has no <Points> DataArray") && m.contains("4 points"),
        "{m}"
    );
    let (_, m) = err_of(&GOOD.replace("Name=\"offsets\"", "Name=\"offset\""));
    assert!(m.contains("connectivity, offsets and types"), "{m}");
    let (_, m) = err_of(&GOOD.replace(
        "type=\"Float64\" Name=\"displacement\"",
        "type=\"String\" Name=\"displacement\"",
    ));
    assert!(
        m.contains("array 'displacement' (PointData) has type 'String'"),
        "{m}"
    );
}

#[test]
fn absurd_counts_are_refused_before_allocation() {
    let (e, m) = err_of(&GOOD.replace("NumberOfPoints=\"4\"", "NumberOfPoints=\"9999999999999\""));
    assert!(matches!(e, IoError::TooLarge { .. }));
    assert!(
        m.contains(
            "NumberOfPoints=9999999999999 would need at least 60 TB, more than the file can hold"
        ),
        "{m}"
    );
    // A binary length word claiming 2^60 bytes in a small appended raw file.
    let mut bytes = written(Encoding::AppendedRaw, HeaderType::UInt64, None);
    let at = appended_start(&bytes);
    bytes[at..at + 8].copy_from_slice(&(1u64 << 60).to_le_bytes());
    let m = read_vtu_bytes(&bytes, "model.vtu").unwrap_err().to_string();
    assert!(
        m.contains("array 'velocity' (PointData) length word=1152921504606846976"),
        "{m}"
    );
    // A zlib block count claiming 2^40 blocks.
    let mut bytes = written(Encoding::AppendedRaw, HeaderType::UInt64, Some(6));
    let at = appended_start(&bytes);
    bytes[at..at + 8].copy_from_slice(&(1u64 << 40).to_le_bytes());
    let m = read_vtu_bytes(&bytes, "model.vtu").unwrap_err().to_string();
    assert!(
        m.contains("array 'velocity' (PointData) zlib block count=1099511627776"),
        "{m}"
    );
}

#[test]
fn truncated_appended_data_names_array_and_bytes() {
    let bytes = written(Encoding::AppendedRaw, HeaderType::UInt32, None);
    // The file ends with the 12-byte offsets block ([4-byte length][2 x Int32]), the 6-byte
    // types block and the closing tags: cutting 40 bytes ends inside the offsets.
    let end = bytes.len() - 40;
    let (e, m) = {
        let e = read_vtu_bytes(&bytes[..end], "model.vtu").unwrap_err();
        let m = e.to_string();
        (e, m)
    };
    assert!(matches!(e, IoError::Truncated { .. }), "{m}");
    assert!(m.starts_with(&format!("model.vtu: appended data ends at byte {end}, array 'offsets' (Cells) needs bytes {}..{} (truncated file?)", end - 4, end + 4)), "{m}");
    assert!(m.ends_with("(truncated file?)"), "{m}");
    // Cut inside the XML part.
    let m = read_vtu_bytes(&bytes[..200], "model.vtu")
        .unwrap_err()
        .to_string();
    assert!(m.starts_with("model.vtu: "), "{m}");
}

#[test]
fn bad_base64_and_bad_zlib_name_the_array() {
    let bytes = written(Encoding::InlineBase64, HeaderType::UInt64, None);
    let text = String::from_utf8(bytes).unwrap();
    let at = text.find("Name=\"temperature\"").unwrap();
    let data = at + text[at..].find('>').unwrap() + 1 + 20; // inside the base64 text
    let mut broken = text.clone();
    broken.replace_range(data..data + 1, "*");
    let (e, m) = err_of(&broken);
    assert!(matches!(e, IoError::Base64 { .. }));
    assert!(
        m.contains("array 'temperature' (PointData): invalid base64"),
        "{m}"
    );

    let mut bytes = written(Encoding::AppendedRaw, HeaderType::UInt64, Some(6));
    // First array (15 x 8 bytes in 64-byte blocks): header of 3 + 2 words, then the zlib
    // streams; break a byte of the first stream.
    let at = appended_start(&bytes) + 5 * 8 + 2;
    bytes[at] ^= 0xff;
    let e = read_vtu_bytes(&bytes, "model.vtu").unwrap_err();
    let m = e.to_string();
    assert!(matches!(e, IoError::Zlib { .. }), "{m}");
    assert!(
        m.contains("model.vtu: array 'velocity' (PointData): zlib block 0 of 2"),
        "{m}"
    );
}

#[test]
fn integers_beyond_2_pow_53_are_refused() {
    let text = GOOD.replace(
        "type=\"Int32\" Name=\"zone\" format=\"ascii\">1 2",
        "type=\"Int64\" Name=\"zone\" format=\"ascii\">1 9007199254740993",
    );
    let (_, m) = err_of(&text);
    assert!(m.contains("array 'zone' (CellData): value 1 is '9007199254740993', expected an integer of magnitude at most 2^53"), "{m}");
}

#[test]
fn wrong_file_types_are_named() {
    let (_, m) = err_of(&GOOD.replace("type=\"UnstructuredGrid\"", "type=\"PolyData\""));
    assert!(
        m.contains("VTKFile type=\"PolyData\", expected type=\"UnstructuredGrid\""),
        "{m}"
    );
    let (_, m) = err_of("not xml at all");
    assert!(m.contains("no <VTKFile> element"), "{m}");
    let (e, _) = err_of(&GOOD.replace(
        "header_type=\"UInt64\"",
        "header_type=\"UInt64\" compressor=\"vtkLZ4DataCompressor\"",
    ));
    assert!(matches!(e, IoError::UnsupportedCompressor { .. }));
}

/// A small grid written by hone's writer (velocity is the first array in the appended data).
fn written(encoding: Encoding, header: HeaderType, zlib_level: Option<u32>) -> Vec<u8> {
    let points = [
        [0.0, 0.0, 0.0],
        [1.0, 0.0, 0.0],
        [1.0, 1.0, 0.0],
        [0.0, 1.0, 0.0],
        [2.0, 0.5, 0.0],
    ];
    let velocity: Vec<f64> = (0..15).map(|i| i as f64 * 0.25).collect();
    let temperature: Vec<f32> = (0..5).map(|i| 20.0 + i as f32).collect();
    let zone = [3i32, 4];
    let pd = [
        ArrayView {
            name: "velocity",
            components: 3,
            data: ArrayData::F64(&velocity),
        },
        ArrayView {
            name: "temperature",
            components: 1,
            data: ArrayData::F32(&temperature),
        },
    ];
    let cd = [ArrayView {
        name: "zone",
        components: 1,
        data: ArrayData::I32(&zone),
    }];
    let grid = GridView {
        points: &points,
        connectivity: &[0, 1, 2, 3, 1, 4, 2],
        offsets: &[4, 7],
        types: &[9, 5],
        point_data: &pd,
        cell_data: &cd,
    };
    let opts = WriteOptions {
        encoding,
        header,
        byte_order: ByteOrder::Little,
        zlib_level,
        block_size: 64,
    };
    let mut out = Vec::new();
    write_vtu(&mut out, &grid, &opts).unwrap();
    out
}

/// Byte offset just after the `_` that starts the appended data.
fn appended_start(bytes: &[u8]) -> usize {
    let tag = bytes
        .windows(13)
        .position(|w| w == b"<AppendedData")
        .unwrap();
    tag + bytes[tag..].iter().position(|&b| b == b'_').unwrap() + 1
}

/// Deterministic pseudo-random numbers (xorshift64*).
struct Rng(u64);
impl Rng {
    fn next(&mut self) -> u64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        self.0.wrapping_mul(0x2545_F491_4F6C_DD1D)
    }
}

#[test]
fn truncations_and_byte_flips_never_panic() {
    let mut inputs: Vec<(String, Vec<u8>)> = vec![("ascii".into(), GOOD.as_bytes().to_vec())];
    for enc in [
        Encoding::InlineBase64,
        Encoding::AppendedRaw,
        Encoding::AppendedBase64,
    ] {
        for (header, z) in [
            (HeaderType::UInt32, None),
            (HeaderType::UInt64, Some(6)),
            (HeaderType::UInt32, Some(1)),
        ] {
            inputs.push((format!("{enc:?} {header:?} {z:?}"), written(enc, header, z)));
        }
    }
    let data = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/data");
    for name in [
        "meshio_tet10_zlib.vtu",
        "meshio_quad8_tri6_binary.vtu",
        "hand_bigendian_header_alone.vtu",
    ] {
        inputs.push((name.into(), std::fs::read(data.join(name)).unwrap()));
    }
    let mut rng = Rng(0x9E37_79B9_7F4A_7C15);
    let (mut ok, mut err) = (0usize, 0usize);
    let mut run = |what: &str, bytes: &[u8]| {
        let r = std::panic::catch_unwind(|| read_vtu_bytes(bytes, "fuzz.vtu").map(|_| ()));
        match r {
            Ok(Ok(())) => ok += 1,
            Ok(Err(e)) => {
                assert!(e.to_string().starts_with("fuzz.vtu: "), "{what}: {e}");
                err += 1
            }
            Err(_) => panic!("reader panicked on {what}"),
        }
    };
    for (name, bytes) in &inputs {
        assert!(
            read_vtu_bytes(bytes, "fuzz.vtu").is_ok(),
            "{name} must be valid to start with"
        );
        for cut in 0..bytes.len() {
            run(&format!("{name} cut at {cut}"), &bytes[..cut]);
        }
        for round in 0..1500 {
            let mut b = bytes.clone();
            let flips = 1 + (rng.next() % 3) as usize;
            for _ in 0..flips {
                let at = (rng.next() % b.len() as u64) as usize;
                // Mostly random bytes; sometimes digits, to reach number parsing and counts.
                b[at] = if rng.next() % 4 == 0 {
                    b'0' + (rng.next() % 10) as u8
                } else {
                    rng.next() as u8
                };
            }
            run(&format!("{name} mutation {round}"), &b);
        }
    }
    // Both outcomes must occur: the mutations reach past the first checks.
    assert!(ok > 100 && err > 1000, "ok {ok}, err {err}");
}
