//! End-to-end runs of `hone plan` on reference-solver results.

mod common;

use common::scratch;
use hone::element::ElementKind;
use hone::reference::problems::kirsch;
use hone::reference::solver::write_results;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn hone(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_hone"))
        .args(args)
        .output()
        .expect("binary runs")
}

/// A solved quarter plate with a hole (Kirsch problem) as a results file.
fn kirsch_file(dir: &Path) -> PathBuf {
    let solved = kirsch(ElementKind::Tri6, 4).solve().expect("solves");
    let path = dir.join("plate.vtu");
    write_results(&path, &solved.model.mesh, &solved.model.displacement, false).expect("writes");
    path
}

/// The JSON summary of a run that finished (exit 0 or 1).
fn summary(o: &Output) -> serde_json::Value {
    assert!(
        o.status.code().unwrap() < 2,
        "{}",
        String::from_utf8_lossy(&o.stderr)
    );
    serde_json::from_slice(&o.stdout).expect("one JSON object")
}

/// Material and mode of the Kirsch plate and of the L-shape results.
const PLATE: [&str; 5] = ["--youngs", "200000", "--poisson", "0.3", "--plane-stress"];
const L_SHAPE: [&str; 5] = ["--youngs", "1", "--poisson", "0.3", "--plane-strain"];

/// `plan FILE MATERIAL... EXTRA...`.
fn plan_args<'a>(file: &'a str, material: &[&'a str], extra: &[&'a str]) -> Vec<&'a str> {
    let mut v = vec!["plan", file];
    v.extend_from_slice(material);
    v.extend_from_slice(extra);
    v
}

fn plate_args<'a>(file: &'a str, extra: &[&'a str]) -> Vec<&'a str> {
    plan_args(file, &PLATE, extra)
}

#[test]
fn plan_json_summary_and_files() {
    let dir = scratch("plan_json");
    let file = kirsch_file(&dir);
    let out_dir = dir.join("out");
    let f = file.to_str().unwrap();
    let o = hone(&plate_args(
        f,
        &[
            "--target-error",
            "0.5",
            "--json",
            "--out-dir",
            out_dir.to_str().unwrap(),
        ],
    ));
    let v = summary(&o);
    for key in [
        "relative_error",
        "target_error",
        "achievable_error",
        "predicted_elements",
        "predicted_nodes",
        "predicted_dofs",
        "current_dofs",
        "marked_elements",
        "singular_points",
    ] {
        assert!(v.get(key).is_some(), "missing key {key}");
    }
    assert!((v["target_error"].as_f64().unwrap() - 0.005).abs() < 1e-15);
    // Aiming at a third of the current error costs more DOFs than the current mesh has (a
    // better distribution alone cannot buy a factor 3 at rate p/d = 1).
    let eta = v["relative_error"].as_f64().unwrap();
    assert!(eta > 0.012, "the coarse plate already has {eta}");
    assert!(v["predicted_dofs"].as_f64().unwrap() > v["current_dofs"].as_f64().unwrap());
    assert!(v["marked_elements"].as_u64().unwrap() > 0);

    // plan.json: the same summary plus one row per element with the documented keys.
    let text = std::fs::read_to_string(out_dir.join("plan.json")).unwrap();
    let plan: serde_json::Value = serde_json::from_str(&text).unwrap();
    assert_eq!(plan["summary"]["predicted_dofs"], v["predicted_dofs"]);
    let rows = plan["elements"].as_array().unwrap();
    assert_eq!(rows.len() as u64, v["current_elements"].as_u64().unwrap());
    for key in [
        "id",
        "error_energy",
        "error_share",
        "refine_mark",
        "size_now",
        "size_target",
        "singular_zone",
    ] {
        assert!(rows[0].get(key).is_some(), "row lacks {key}");
    }
    let share: f64 = rows
        .iter()
        .map(|r| r["error_share"].as_f64().unwrap())
        .sum();
    assert!((share - 1.0).abs() < 1e-12, "shares sum to {share}");

    // plan.csv and sizes.csv: one line per element / node plus the header.
    let csv = std::fs::read_to_string(out_dir.join("plan.csv")).unwrap();
    assert_eq!(csv.lines().count(), rows.len() + 1);
    let sizes = std::fs::read_to_string(out_dir.join("sizes.csv")).unwrap();
    let back = hone::io::read_vtu(&out_dir.join("plan.vtu")).expect("annotated VTU reads");
    assert_eq!(sizes.lines().count(), back.points.len() + 1);
    for name in [
        "error_energy",
        "error_share",
        "error_density",
        "size_now",
        "size_target",
        "refine_mark",
        "singular_zone",
        "file_cell",
    ] {
        assert!(back.cell_array(name).is_some(), "no cell array {name}");
    }
    for name in ["stress_recovered", "von_mises_recovered", "size_target"] {
        assert!(back.point_array(name).is_some(), "no point array {name}");
    }
    // The nodal sizes in sizes.csv are the VTU's point field, in the same order.
    let field = &back.point_array("size_target").unwrap().values;
    for (line, h) in sizes.lines().skip(1).zip(field) {
        let v: f64 = line.rsplit(',').next().unwrap().parse().unwrap();
        assert_eq!(v, *h);
    }
    // The MSH size field carries the same values at the corner nodes, its points in node
    // order; the .pos view covers the triangles.
    let msh = hone::io::read_msh(&out_dir.join("sizes.msh")).expect("MSH reads");
    let msh_sizes = &msh.point_array("size_target").unwrap().values;
    let mut k = 0;
    for (p, h) in back.points.iter().zip(field) {
        if k < msh.points.len() && msh.points[k] == *p {
            assert_eq!(msh_sizes[k], *h, "size at MSH node {k}");
            k += 1;
        }
    }
    assert_eq!(
        k,
        msh.points.len(),
        "MSH nodes are the mesh's corners in node order"
    );
    assert_eq!(msh.cell_count(), rows.len());
    let pos = hone::io::read_pos_view(&out_dir.join("sizes.pos")).expect(".pos reads");
    assert_eq!(pos.name, "size_target");
    assert_eq!(pos.entries.len(), rows.len());
    assert!(out_dir.join("sizes.mesh").exists() && out_dir.join("sizes.sol").exists());

    // An independent reader (meshio) sees the annotated VTU with its fields and values.
    if common::meshio_available() {
        let script = "import meshio, json, sys\n\
m = meshio.read(sys.argv[1])\n\
print(json.dumps({'points': len(m.points), 'cells': sum(len(c.data) for c in m.cells),\n\
 'point': sorted(m.point_data), 'cell': sorted(m.cell_data),\n\
 'size': [float(v) for v in m.point_data['size_target'].ravel()]}))";
        let o = Command::new("python3")
            .args(["-c", script])
            .arg(out_dir.join("plan.vtu"))
            .output()
            .unwrap();
        assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
        let j: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
        assert_eq!(j["points"].as_u64().unwrap() as usize, back.points.len());
        assert_eq!(j["cells"].as_u64().unwrap() as usize, rows.len());
        for name in [
            "size_target",
            "refine_mark",
            "singular_zone",
            "error_energy",
        ] {
            assert!(
                j["cell"].as_array().unwrap().iter().any(|n| n == name),
                "{name}"
            );
        }
        let sizes_back: Vec<f64> = j["size"]
            .as_array()
            .unwrap()
            .iter()
            .map(|v| v.as_f64().unwrap())
            .collect();
        for (a, b) in sizes_back.iter().zip(field) {
            // JSON text from Python's repr round-trips exactly; serde may be off by an ulp.
            assert!((a - b).abs() <= 2.0 * f64::EPSILON * b.abs());
        }
    }
}

#[test]
fn budget_and_text_summary() {
    let dir = scratch("plan_budget");
    let file = kirsch_file(&dir);
    let f = file.to_str().unwrap();
    let o = hone(&plate_args(
        f,
        &[
            "--target-error",
            "0.1",
            "--max-dofs",
            "3000",
            "--json",
            "--quiet",
        ],
    ));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).expect("JSON");
    assert_eq!(v["budget_limited"], true);
    assert!(v["predicted_dofs"].as_f64().unwrap() <= 3000.0);
    assert!(v["achievable_error"].as_f64().unwrap() > 0.001);
    // The default folder sits next to the input; the text names every number the issue asks.
    let o = hone(&plate_args(f, &["--strategy", "dorfler", "0.5"]));
    let text = String::from_utf8_lossy(&o.stdout);
    for phrase in [
        "global relative error",
        "target error",
        "achievable error",
        "next mesh (predicted)",
        "refined",
        "Dorfler",
        "discretisation error only",
    ] {
        assert!(text.contains(phrase), "summary lacks '{phrase}':\n{text}");
    }
    assert!(dir.join("plate.plan").join("plan.json").exists());
}

#[test]
fn bad_plan_options_are_clear_errors() {
    let dir = scratch("plan_bad");
    let file = kirsch_file(&dir);
    let f = file.to_str().unwrap();
    for (extra, phrase) in [
        (vec!["--target-error", "0"], "--target-error"),
        (vec!["--strategy", "everywhere"], "--strategy"),
        (vec!["--strategy", "dorfler", "x"], "not a number"),
        (vec!["--size-min=-1"], "--size-min"),
    ] {
        let o = hone(&plate_args(f, &extra));
        assert_eq!(o.status.code(), Some(2), "{extra:?}");
        let err = String::from_utf8_lossy(&o.stderr);
        assert!(err.contains(phrase), "{extra:?}: {err}");
    }
}

/// The L-shape's re-entrant corner is found, sized with its Williams exponent and flagged in
/// plan.json. lambda = 0.5444837368 for 270 degrees (Williams 1952; methods sheet 4.1).
#[test]
fn l_shape_corner_is_a_singular_point() {
    let dir = scratch("plan_lshape");
    let solved = hone::reference::problems::l_shape(ElementKind::Tri6, 4)
        .solve()
        .expect("solves");
    let path = dir.join("lshape.vtu");
    write_results(&path, &solved.model.mesh, &solved.model.displacement, false).expect("writes");
    let out_dir = dir.join("out");
    let file = path.to_str().unwrap();
    let o = hone(&plan_args(
        file,
        &L_SHAPE,
        &[
            "--target-error",
            "2",
            "--json",
            "--out-dir",
            out_dir.to_str().unwrap(),
        ],
    ));
    let v = summary(&o);
    let spots = v["singular_points"].as_array().unwrap();
    let corners: Vec<&serde_json::Value> = spots
        .iter()
        .filter(|s| s["kind"] == "reentrant_corner")
        .collect();
    assert_eq!(corners.len(), 1, "{spots:?}");
    let c = corners[0];
    assert!((c["lambda"].as_f64().unwrap() - 0.5444837368).abs() < 1e-9);
    assert!((c["angle_deg"].as_f64().unwrap() - 270.0).abs() < 1e-9);
    let loc = c["location"].as_array().unwrap();
    assert!(loc[0].as_f64().unwrap().abs() < 1e-12 && loc[1].as_f64().unwrap().abs() < 1e-12);
    let plan: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(out_dir.join("plan.json")).unwrap()).unwrap();
    let flagged = plan["elements"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|r| r["singular_zone"] == 1)
        .count();
    assert!(flagged > 0 && flagged < 10, "{flagged} elements flagged");

    let o = hone(&plan_args(file, &L_SHAPE, &["--singular", "1,x"]));
    assert_eq!(o.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&o.stderr).contains("--singular"));
}
