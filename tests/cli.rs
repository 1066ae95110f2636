//! End-to-end runs of the real `hone` binary in a scratch folder.

mod common;

use common::*;
use hone::element::ElementKind;
use hone::io::{write_vtu, ArrayData, ArrayView, Encoding, GridView, WriteOptions};
use hone::mesh::Model;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn hone(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_hone"))
        .args(args)
        .output()
        .expect("binary runs")
}

fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

/// Writes a model as a VTU with a point array `disp_name` holding the displacement.
fn write_model(path: &Path, model: &Model, disp_name: &str, encoding: Encoding) {
    let mesh = &model.mesh;
    let cells = hone::io::cells_in_file_order(mesh);
    let (connectivity, offsets, types) = (cells.connectivity, cells.offsets, cells.types);
    let disp: Vec<f64> = model.displacement.iter().flatten().copied().collect();
    let zone: Vec<i32> = (0..mesh.element_count())
        .map(|e| 1 + (e % 2) as i32)
        .collect();
    let points = [ArrayView {
        name: disp_name,
        components: 3,
        data: ArrayData::F64(&disp),
    }];
    let cells = [ArrayView {
        name: "zone",
        components: 1,
        data: ArrayData::I32(&zone),
    }];
    let grid = GridView {
        points: &mesh.points,
        connectivity: &connectivity,
        offsets: &offsets,
        types: &types,
        point_data: &points,
        cell_data: &cells,
    };
    let file = std::fs::File::create(path).expect("create");
    write_vtu(
        std::io::BufWriter::new(file),
        &grid,
        &WriteOptions {
            encoding,
            ..Default::default()
        },
    )
    .expect("write");
}

fn smooth(p: [f64; 3]) -> [f64; 3] {
    [
        1e-3 * (p[0] + 0.5 * p[1]).sin(),
        1e-3 * (0.7 * p[0] * p[1]),
        1e-3 * p[2] * p[0],
    ]
}

fn tet_file(dir: &Path) -> PathBuf {
    let path = dir.join("part.vtu");
    let mut mesh = unit_mesh(ElementKind::Tet10, 2);
    distort(&mut mesh);
    write_model(
        &path,
        &model_with(mesh, smooth),
        "Displacement",
        Encoding::AppendedRaw,
    );
    path
}

#[test]
fn estimate_json_has_the_documented_keys() {
    let dir = scratch("json");
    let file = tet_file(&dir);
    let out = dir.join("annotated.vtu");
    let o = hone(&[
        "estimate",
        file.to_str().unwrap(),
        "--youngs",
        "206000",
        "--poisson",
        "0.3",
        "--json",
        "--out",
        out.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).expect("one JSON object");
    for key in [
        "elements",
        "nodes",
        "dimension",
        "energy_norm",
        "error_norm",
        "relative_error",
        "top_elements",
    ] {
        assert!(v.get(key).is_some(), "missing key {key}");
    }
    assert_eq!(v["elements"], 48);
    assert_eq!(v["dimension"], 3);
    let eta = v["relative_error"].as_f64().unwrap();
    assert!(
        eta > 0.0 && eta < 1.0,
        "relative error is a fraction: {eta}"
    );
    let top = v["top_elements"].as_array().unwrap();
    assert_eq!(top.len(), 10);
    for key in ["id", "centroid", "error_energy", "error_share"] {
        assert!(top[0].get(key).is_some(), "top element lacks {key}");
    }
    // The annotated file reads back with every field the estimate knows.
    let back = hone::io::read_vtu(&out).expect("annotated VTU reads");
    assert_eq!(back.cell_count(), 48);
    for name in [
        "error_energy",
        "error_share",
        "error_density",
        "size_now",
        "file_cell",
    ] {
        assert!(back.cell_array(name).is_some(), "no cell array {name}");
    }
    for name in ["displacement", "stress_recovered", "von_mises_recovered"] {
        assert!(back.point_array(name).is_some(), "no point array {name}");
    }
    // error_share sums to one (definition, glossary).
    let share: f64 = back.cell_array("error_share").unwrap().values.iter().sum();
    assert!((share - 1.0).abs() < 1e-12);
}

#[test]
fn text_summary_and_thread_independence() {
    let dir = scratch("text");
    let file = tet_file(&dir);
    let args = |threads: &'static str| {
        hone(&[
            "estimate",
            file.to_str().unwrap(),
            "--youngs",
            "1",
            "--poisson",
            "0.25",
            "--threads",
            threads,
        ])
    };
    let one = args("1");
    let two = args("2");
    assert_eq!(one.status.code(), Some(0), "{}", stderr(&one));
    assert_eq!(
        one.stdout, two.stdout,
        "output differs between 1 and 2 threads"
    );
    let text = String::from_utf8(one.stdout).unwrap();
    for needle in [
        "global relative error",
        "energy norm",
        "error concentration",
        "largest element errors",
        "discretisation error only",
    ] {
        assert!(text.contains(needle), "summary lacks '{needle}':\n{text}");
    }
}

#[test]
fn inspect_lists_types_and_arrays() {
    let dir = scratch("inspect");
    let file = tet_file(&dir);
    let o = hone(&["inspect", file.to_str().unwrap(), "--json"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(v["cells"], 48);
    assert_eq!(v["dimension"], 3);
    assert_eq!(v["cell_types"][0]["type"], "tet10");
    assert_eq!(v["point_arrays"][0]["name"], "Displacement");
}

/// Each bad input ends with exit code 2 and a message that names what is wrong; never a panic.
#[test]
fn bad_inputs_give_clear_errors() {
    let dir = scratch("bad");
    let good = tet_file(&dir);
    let bytes = std::fs::read(&good).unwrap();
    let mat = ["--youngs", "1", "--poisson", "0.3"];
    let run = |path: &Path, extra: &[&str]| {
        let mut args = vec!["estimate", path.to_str().unwrap()];
        args.extend_from_slice(&mat);
        args.extend_from_slice(extra);
        hone(&args)
    };
    let expect_error = |o: &Output, needles: &[&str]| {
        let err = stderr(o);
        assert_eq!(o.status.code(), Some(2), "stderr: {err}");
        assert!(!err.contains("panicked"), "{err}");
        for n in needles {
            assert!(err.contains(n), "message lacks '{n}': {err}");
        }
    };

    // Truncated file.
    let truncated = dir.join("truncated.vtu");
    std::fs::write(&truncated, &bytes[..bytes.len() * 2 / 3]).unwrap();
    expect_error(&run(&truncated, &[]), &["truncated.vtu"]);

    // Missing displacement array: the message lists the arrays the file has.
    let missing = dir.join("missing.vtu");
    let mut mesh = unit_mesh(ElementKind::Quad4, 2);
    mesh.dimension = 2;
    write_model(
        &missing,
        &model_with(mesh.clone(), |p| [p[0] * 1e-3, 0.0, 0.0]),
        "temperature",
        Encoding::Ascii,
    );
    expect_error(
        &run(&missing, &["--plane-stress"]),
        &["missing.vtu", "temperature", "--displacement-array"],
    );

    // 2D without a mode.
    let plane = dir.join("plane.vtu");
    write_model(
        &plane,
        &model_with(mesh.clone(), |p| [p[0] * 1e-3, 0.0, 0.0]),
        "u",
        Encoding::Ascii,
    );
    expect_error(
        &run(&plane, &[]),
        &["2D", "--plane-stress", "--plane-strain", "--axisymmetric"],
    );
    // ...and with one it works.
    let ok = run(&plane, &["--plane-strain"]);
    assert_eq!(ok.status.code(), Some(0), "{}", stderr(&ok));

    // NaN displacement.
    let nan = dir.join("nan.vtu");
    write_model(
        &nan,
        &model_with(mesh.clone(), |p| {
            if p[0] > 0.9 && p[1] > 0.9 {
                [f64::NAN, 0.0, 0.0]
            } else {
                [0.0; 3]
            }
        }),
        "u",
        Encoding::Ascii,
    );
    expect_error(
        &run(&nan, &["--plane-stress"]),
        &["nan.vtu", "'u'", "non-finite"],
    );

    // Inverted element: mirror one quad's node order.
    let inverted = dir.join("inverted.vtu");
    let mut bad_mesh = mesh.clone();
    bad_mesh.blocks[0].nodes.swap(1, 3);
    write_model(
        &inverted,
        &model_with(bad_mesh, |p| [p[0] * 1e-3, 0.0, 0.0]),
        "u",
        Encoding::Ascii,
    );
    expect_error(&run(&inverted, &["--plane-stress"]), &["inverted", "0"]);

    // Unknown / unsupported cell type: turn the text's cell types into pyramids (VTK 14).
    let text = std::fs::read_to_string(&plane).unwrap();
    let types_start = text.find("Name=\"types\"").unwrap();
    let close = text[types_start..].find('>').unwrap() + types_start + 1;
    let end = text[close..].find('<').unwrap() + close;
    let replaced = format!("{}\n14 14 14 14\n{}", &text[..close], &text[end..]);
    let pyramids = dir.join("pyramids.vtu");
    std::fs::write(&pyramids, replaced).unwrap();
    expect_error(
        &run(&pyramids, &["--plane-stress"]),
        &["pyramid", "--skip-unsupported"],
    );

    // Unphysical material.
    let o = hone(&[
        "estimate",
        good.to_str().unwrap(),
        "--youngs",
        "1",
        "--poisson",
        "0.5",
    ]);
    expect_error(&o, &["nu = 0.5"]);

    // A file that does not exist.
    expect_error(&run(&dir.join("nope.vtu"), &[]), &["nope.vtu"]);
}

#[test]
fn output_never_overwrites_the_input() {
    let dir = scratch("protect");
    let file = tet_file(&dir);
    let before = std::fs::read(&file).unwrap();
    let o = hone(&[
        "estimate",
        file.to_str().unwrap(),
        "--youngs",
        "1",
        "--poisson",
        "0.3",
        "--out",
        file.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
    assert_eq!(std::fs::read(&file).unwrap(), before, "input modified");
}

fn data(name: &str) -> String {
    format!("{}/tests/data/{name}", env!("CARGO_MANIFEST_DIR"))
}

/// Files written by an independent mesh I/O library (meshio; script in tests/data) carry a
/// linear displacement field, so the FE stress is constant and the estimate must vanish (the
/// patch test, common practice), whatever the encoding.
#[test]
fn external_files_with_a_linear_field_estimate_zero_error() {
    let cases: [(&str, &[&str]); 4] = [
        ("meshio_tet10_ascii.vtu", &[]),
        ("meshio_tet10_zlib_uint64.vtu", &[]),
        ("meshio_quad8_tri6_binary.vtu", &["--plane-stress"]),
        ("meshio_quad8_tri6_zlib.vtu", &["--plane-strain"]),
    ];
    for (file, extra) in cases {
        let path = data(file);
        let mut args = vec![
            "estimate",
            path.as_str(),
            "--youngs",
            "70000",
            "--poisson",
            "0.33",
            "--json",
        ];
        args.extend_from_slice(extra);
        let o = hone(&args);
        assert_eq!(o.status.code(), Some(0), "{file}: {}", stderr(&o));
        let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
        let eta = v["relative_error"].as_f64().unwrap();
        // meshio's ascii writes 12 significant digits: round-off in u of 1e-12 relative gives
        // stress noise of about 1e-9 relative on these unit-size cells.
        assert!(eta < 1e-6, "{file}: relative error {eta}");
        assert!(v["energy_norm"].as_f64().unwrap() > 0.0);
    }
}

/// A zlib-compressed tet10 file from meshio (headers encoded separately, Int64 types) with a
/// smooth non-polynomial field: the summary is sensible (all 96 cells, 3D, a small positive
/// relative error, the error concentrated in a minority of cells) and the capitalised
/// 'Displacement' array is found.
#[test]
fn external_file_with_a_smooth_field_gives_a_sensible_summary() {
    let path = data("meshio_bracket_tet10_zlib.vtu");
    let o = hone(&[
        "estimate",
        &path,
        "--youngs",
        "206000",
        "--poisson",
        "0.3",
        "--json",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(v["elements"], 96);
    assert_eq!(v["dimension"], 3);
    let eta = v["relative_error"].as_f64().unwrap();
    assert!(eta > 1e-4 && eta < 0.2, "relative error {eta}");
    let half = v["elements_for_half_error"].as_u64().unwrap();
    assert!((1..48).contains(&half), "half of the error in {half} cells");
    let text = hone(&["estimate", &path, "--youngs", "206000", "--poisson", "0.3"]);
    let text = String::from_utf8(text.stdout).unwrap();
    assert!(text.contains("tet10 96"), "{text}");
}

/// `hone demo DIR` writes the four result files, can run again into its own folder, and
/// refuses to replace a file it did not create.
#[test]
fn demo_writes_its_files_and_protects_others() {
    let dir = scratch("demo");
    let out = dir.join("run");
    let o = hone(&["demo", out.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let text = String::from_utf8(o.stdout).unwrap();
    for name in [
        "deck_sharp_tri6.vtu",
        "deck_rounded_tri6.vtu",
        "deck_sharp_tet10.vtu",
        "deck_rounded_tet10.vtu",
    ] {
        let back = hone::io::read_vtu(&out.join(name)).expect("demo file reads");
        assert!(back.point_array("displacement").is_some(), "{name}");
    }
    assert!(
        text.contains("sharp")
            && text.contains("rounded")
            && text.contains("discretisation error only")
    );
    // Again into the same folder: its own files may be replaced.
    assert_eq!(
        hone(&["demo", out.to_str().unwrap()]).status.code(),
        Some(0)
    );
    // A foreign file with a demo name is never replaced.
    let foreign = dir.join("foreign");
    std::fs::create_dir_all(&foreign).unwrap();
    std::fs::write(foreign.join("deck_sharp_tri6.vtu"), "mine").unwrap();
    let o = hone(&["demo", foreign.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2));
    assert!(
        stderr(&o).contains("was not written by hone demo"),
        "{}",
        stderr(&o)
    );
    assert_eq!(
        std::fs::read_to_string(foreign.join("deck_sharp_tri6.vtu")).unwrap(),
        "mine"
    );
}

/// The shipped sharp demo plate has one re-entrant corner (270 degrees at (200, 125), the
/// demo's geometry): the JSON notes say its elements use the fitted corner field; the rounded
/// variant has no such note.
#[test]
fn estimate_notes_the_corner_field() {
    let meshes = Path::new(env!("CARGO_MANIFEST_DIR")).join("meshes");
    let notes = |file: &str| -> Vec<String> {
        let path = meshes.join(file);
        let mut args = vec!["estimate", path.to_str().unwrap(), "--json"];
        args.extend(hone::reference::demo::PLATE_FLAGS);
        let o = hone(&args);
        assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
        let v: serde_json::Value = serde_json::from_slice(&o.stdout).expect("one JSON object");
        v["notes"]
            .as_array()
            .expect("notes")
            .iter()
            .map(|n| n.as_str().unwrap().to_string())
            .collect()
    };
    let sharp = notes("deck_sharp_tri6.vtu");
    let corner: Vec<&String> = sharp
        .iter()
        .filter(|n| n.starts_with("re-entrant corner of 270.0 deg at (200, 125)"))
        .collect();
    assert_eq!(corner.len(), 1, "{sharp:?}");
    assert!(
        corner[0].contains("Williams exponents 0.5445 and 0.9085"),
        "{corner:?}"
    );
    let rounded = notes("deck_rounded_tri6.vtu");
    assert!(
        !rounded.iter().any(|n| n.contains("re-entrant corner")),
        "{rounded:?}"
    );
}
