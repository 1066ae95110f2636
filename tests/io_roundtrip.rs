//! Write-then-read round trips of a small mixed grid over every encoding, header type, byte
//! order and compression setting. Values must come back bit for bit (f32 values widen exactly).

use hone::io::{
    read_vtu_bytes, write_atomically, write_vtu, ArrayData, ArrayView, ByteOrder, Encoding,
    GridView, HeaderType, IoError, RawGrid, ScalarType, WriteOptions,
};

/// Two triangles and one quad over six points (a 2 x 1 strip, z = 0.5).
struct Mixed {
    points: Vec<[f64; 3]>,
    connectivity: Vec<u32>,
    offsets: Vec<u64>,
    types: Vec<u8>,
    velocity: Vec<f64>,
    temperature: Vec<f32>,
    zone: Vec<i32>,
    big: Vec<i64>,
    flag: Vec<u8>,
}

fn mixed() -> Mixed {
    let points = vec![
        [0.0, 0.0, 0.5],
        [1.0, 0.0, 0.5],
        [2.0, 0.0, 0.5],
        [0.0, 1.0, 0.5],
        [1.0, 1.0, 0.5],
        [2.0, 1.0, 0.5],
    ];
    // Awkward values: thirds, tiny and huge magnitudes, negative zero.
    let velocity: Vec<f64> = points
        .iter()
        .flat_map(|p| [p[0] / 3.0, -1.0e-300 * (p[1] + 1.0), 1.0e300 * p[0] - 0.0])
        .collect();
    let temperature: Vec<f32> = (0..6).map(|i| 0.1f32 * i as f32 - 273.15).collect();
    Mixed {
        points,
        connectivity: vec![0, 1, 4, 0, 4, 3, 1, 2, 5, 4],
        offsets: vec![3, 6, 10],
        types: vec![5, 5, 9],
        velocity,
        temperature,
        zone: vec![-7, 0, 2_000_000_000],
        big: vec![1 << 53, -(1 << 53), 42],
        flag: vec![0, 255, 1],
    }
}

fn write(m: &Mixed, opts: &WriteOptions) -> Vec<u8> {
    let pd = [
        ArrayView {
            name: "velocity",
            components: 3,
            data: ArrayData::F64(&m.velocity),
        },
        ArrayView {
            name: "temperature",
            components: 1,
            data: ArrayData::F32(&m.temperature),
        },
    ];
    let cd = [
        ArrayView {
            name: "zone",
            components: 1,
            data: ArrayData::I32(&m.zone),
        },
        ArrayView {
            name: "big & <odd> \"name\"",
            components: 1,
            data: ArrayData::I64(&m.big),
        },
        ArrayView {
            name: "flag",
            components: 1,
            data: ArrayData::U8(&m.flag),
        },
    ];
    let grid = GridView {
        points: &m.points,
        connectivity: &m.connectivity,
        offsets: &m.offsets,
        types: &m.types,
        point_data: &pd,
        cell_data: &cd,
    };
    let mut out = Vec::new();
    write_vtu(&mut out, &grid, opts).unwrap();
    out
}

fn check_same(m: &Mixed, g: &RawGrid, what: &str) {
    assert_eq!(g.points, m.points, "{what}");
    assert_eq!(g.connectivity, m.connectivity, "{what}");
    assert_eq!(g.offsets, m.offsets, "{what}");
    assert_eq!(g.types, m.types, "{what}");
    assert_eq!(g.cell_count(), 3);
    assert_eq!(g.cell_nodes(2), &[1, 2, 5, 4]);
    let names: Vec<&str> = g.point_data.iter().map(|a| a.name.as_str()).collect();
    assert_eq!(names, ["velocity", "temperature"], "{what}");
    let v = g.point_array("velocity").unwrap();
    assert_eq!((v.components, v.scalar_type), (3, ScalarType::Float64));
    let bits = |x: &[f64]| x.iter().map(|v| v.to_bits()).collect::<Vec<_>>();
    assert_eq!(bits(&v.values), bits(&m.velocity), "{what}");
    let t = g.point_array("temperature").unwrap();
    assert_eq!(t.scalar_type, ScalarType::Float32);
    let widened: Vec<f64> = m.temperature.iter().map(|&x| x as f64).collect();
    assert_eq!(t.values, widened, "{what}");
    let names: Vec<&str> = g.cell_data.iter().map(|a| a.name.as_str()).collect();
    assert_eq!(names, ["zone", "big & <odd> \"name\"", "flag"], "{what}");
    let z = g.cell_array("zone").unwrap();
    assert_eq!(z.scalar_type, ScalarType::Int32);
    assert_eq!(z.values, [-7.0, 0.0, 2.0e9], "{what}");
    let b = g.cell_array("big & <odd> \"name\"").unwrap();
    assert_eq!(b.scalar_type, ScalarType::Int64);
    assert_eq!(
        b.values,
        [9007199254740992.0, -9007199254740992.0, 42.0],
        "{what}"
    );
    let f = g.cell_array("flag").unwrap();
    assert_eq!(f.scalar_type, ScalarType::UInt8);
    assert_eq!(f.values, [0.0, 255.0, 1.0], "{what}");
}

#[test]
fn every_encoding_header_order_and_compression_reads_back_exactly() {
    let m = mixed();
    let mut combos = 0;
    for encoding in [
        Encoding::Ascii,
        Encoding::InlineBase64,
        Encoding::AppendedRaw,
        Encoding::AppendedBase64,
    ] {
        for header in [HeaderType::UInt32, HeaderType::UInt64] {
            for byte_order in [ByteOrder::Little, ByteOrder::Big] {
                // Block size 16 forces several zlib blocks per array, with a partial last one.
                for (zlib_level, block_size) in [(None, 32768), (Some(6), 32768), (Some(1), 16)] {
                    let opts = WriteOptions {
                        encoding,
                        header,
                        byte_order,
                        zlib_level,
                        block_size,
                    };
                    let bytes = write(&m, &opts);
                    let what = format!("{opts:?}");
                    let g = read_vtu_bytes(&bytes, "roundtrip.vtu")
                        .unwrap_or_else(|e| panic!("{what}: {e}"));
                    check_same(&m, &g, &what);
                    if encoding != Encoding::AppendedRaw {
                        let text = std::str::from_utf8(&bytes).expect("non-raw output is text");
                        assert!(
                            text.contains("&amp; &lt;odd&gt; &quot;name&quot;"),
                            "{what}"
                        );
                    }
                    combos += 1;
                }
            }
        }
    }
    assert_eq!(combos, 4 * 2 * 2 * 3);
}

#[test]
fn default_options_are_appended_raw_uint64_little_uncompressed() {
    let o = WriteOptions::default();
    assert_eq!(o.encoding, Encoding::AppendedRaw);
    assert_eq!(o.header, HeaderType::UInt64);
    assert_eq!(o.byte_order, ByteOrder::Little);
    assert_eq!(o.zlib_level, None);
    assert_eq!(o.block_size, 32768);
    let m = mixed();
    let bytes = write(&m, &o);
    let head = String::from_utf8_lossy(&bytes[..300]);
    assert!(
        head.contains("header_type=\"UInt64\"") && head.contains("LittleEndian"),
        "{head}"
    );
    check_same(&m, &read_vtu_bytes(&bytes, "d.vtu").unwrap(), "default");
}

#[test]
fn empty_grid_round_trips() {
    let grid = GridView {
        points: &[],
        connectivity: &[],
        offsets: &[],
        types: &[],
        point_data: &[],
        cell_data: &[],
    };
    for zlib_level in [None, Some(6)] {
        for encoding in [
            Encoding::Ascii,
            Encoding::InlineBase64,
            Encoding::AppendedRaw,
            Encoding::AppendedBase64,
        ] {
            let opts = WriteOptions {
                encoding,
                zlib_level,
                ..WriteOptions::default()
            };
            let mut out = Vec::new();
            write_vtu(&mut out, &grid, &opts).unwrap();
            let g = read_vtu_bytes(&out, "empty.vtu").unwrap();
            assert!(g.points.is_empty() && g.offsets.is_empty(), "{opts:?}");
        }
    }
}

#[test]
fn writer_refuses_inconsistent_views() {
    let m = mixed();
    let short = [1.0f64; 5];
    let pd = [ArrayView {
        name: "u",
        components: 1,
        data: ArrayData::F64(&short),
    }];
    let grid = GridView {
        points: &m.points,
        connectivity: &m.connectivity,
        offsets: &m.offsets,
        types: &m.types,
        point_data: &pd,
        cell_data: &[],
    };
    let err = write_vtu(Vec::new(), &grid, &WriteOptions::default()).unwrap_err();
    assert!(
        err.to_string().contains("'u': 5 values, expected 6"),
        "{err}"
    );
    // A cell naming a point that does not exist.
    let mut connectivity = m.connectivity.clone();
    connectivity[7] = 6;
    let grid = GridView {
        points: &m.points,
        connectivity: &connectivity,
        offsets: &m.offsets,
        types: &m.types,
        point_data: &[],
        cell_data: &[],
    };
    let err = write_vtu(Vec::new(), &grid, &WriteOptions::default()).unwrap_err();
    assert!(
        err.to_string()
            .contains("connectivity entry 7 is point 6, expected a point index below 6"),
        "{err}"
    );
}

#[test]
fn atomic_write_replaces_target_and_protects_input() {
    let dir = tempfile::tempdir().unwrap();
    let input = dir.path().join("in.vtu");
    let m = mixed();
    let bytes = write(&m, &WriteOptions::default());
    std::fs::write(&input, &bytes).unwrap();
    // Writing over the input is refused and leaves it untouched.
    let err = write_atomically(&input, Some(&input), |w| w.write_all(b"x")).unwrap_err();
    assert!(matches!(err, IoError::WouldOverwriteInput { .. }), "{err}");
    assert!(err.to_string().contains("in.vtu"), "{err}");
    assert_eq!(std::fs::read(&input).unwrap(), bytes);
    // A failing writer leaves neither the target nor a temporary file behind.
    let out = dir.path().join("out.vtu");
    let err = write_atomically(&out, Some(&input), |w| {
        w.write_all(b"partial")?;
        Err(std::io::Error::other("disk full"))
    })
    .unwrap_err();
    assert!(err.to_string().contains("disk full"), "{err}");
    assert!(!out.exists());
    assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 1);
    // A successful write lands in full and reads back.
    write_atomically(&out, Some(&input), |w| w.write_all(&bytes)).unwrap();
    check_same(&m, &hone::io::read_vtu(&out).unwrap(), "atomic");
    check_same(
        &m,
        &hone::io::read_results(&out).unwrap(),
        "atomic via read_results",
    );
    // With the disk flush on (`--sync`) the same write replaces the file in full.
    hone::io::set_sync_outputs(true);
    let synced = write_atomically(&out, Some(&input), |w| w.write_all(&bytes));
    hone::io::set_sync_outputs(false);
    synced.unwrap();
    assert_eq!(std::fs::read(&out).unwrap(), bytes);
    assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 2);
}
