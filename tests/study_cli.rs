//! `hone study` end to end: three L-shape results (quad4, n = 4, 8, 16; Williams 1952 corner
//! field, method sheet 5.5) written by the reference solver, studied by the real binary.
//! The corner stress must be called singular (method sheet 4.3: it grows by 1.3713 per halving
//! and has no limit); the JSON carries the documented keys.

mod common;

use common::scratch;
use hone::element::ElementKind;
use hone::reference::problems;
use hone::reference::solver::write_results;
use std::path::PathBuf;
use std::process::{Command, Output};

fn hone(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_hone"))
        .args(args)
        .output()
        .expect("binary runs")
}

/// Writes the three results (finest first, so the command must sort them).
fn files(name: &str) -> (PathBuf, Vec<String>) {
    let dir = scratch(name);
    let mut out = Vec::new();
    for n in [16, 4, 8] {
        let solved = problems::l_shape(ElementKind::Quad4, n)
            .solve()
            .expect("solves");
        let path = dir.join(format!("l_shape_{n}.vtu"));
        write_results(&path, &solved.model.mesh, &solved.model.displacement, false).expect("write");
        out.push(path.display().to_string());
    }
    (dir, out)
}

const MATERIAL: [&str; 5] = ["--youngs", "1", "--poisson", "0.3", "--plane-strain"];

#[test]
fn text_json_and_plot() {
    let (dir, inputs) = files("study-cli");
    let mut args: Vec<&str> = vec!["study"];
    args.extend(inputs.iter().map(|s| s.as_str()));
    args.extend(MATERIAL);
    args.extend([
        "--probe",
        "von_mises@0,0",
        "--probe",
        "mean:uy@box(-1,0,0,1)",
    ]);
    let o = hone(&args);
    let text = String::from_utf8_lossy(&o.stdout);
    assert!(
        o.status.success(),
        "{}\n{}",
        text,
        String::from_utf8_lossy(&o.stderr)
    );
    for expected in [
        "Convergence study over 3 meshes",
        "von_mises@0,0 (expected order 1",
        "singular: grows without limit",
        "no extrapolated value or GCI exists",
        "singularity-limited",
        "discretisation error only",
    ] {
        assert!(text.contains(expected), "missing {expected:?} in\n{text}");
    }
    // The mesh table is sorted by DOFs: n = 4 first.
    let first = text.find("l_shape_4.vtu").expect("n4");
    let last = text.find("l_shape_16.vtu").expect("n16");
    assert!(first < last);
    let svg = std::fs::read_to_string(dir.join("study.svg")).expect("plot next to the first input");
    assert!(svg.starts_with("<svg") && svg.contains("polyline"));

    args.push("--json");
    args.push("--no-plot");
    let o = hone(&args);
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).expect("json");
    let q = v["quantities"].as_array().expect("quantities");
    assert_eq!(q.len(), 5);
    for key in [
        "name",
        "values",
        "dofs",
        "observed_order",
        "extrapolated",
        "gci_fine",
        "verdict",
    ] {
        assert!(q[0].get(key).is_some(), "missing {key}");
    }
    let corner = q
        .iter()
        .find(|x| x["name"] == "von_mises@0,0")
        .expect("probe");
    assert_eq!(corner["verdict"], "singular");
    assert!(corner["extrapolated"].is_null() && corner["gci_fine"].is_null());
    assert!(v["singular_points"]
        .as_array()
        .is_some_and(|s| !s.is_empty()));
    assert_eq!(v["energy_error_rate"]["verdict"], "singularity-limited");
    assert!(v["cautions"]
        .as_str()
        .is_some_and(|c| c.contains("licensed engineer")));
}

#[test]
fn bad_probes_and_plot_paths_are_errors() {
    let (_dir, inputs) = files("study-cli-errors");
    let mut args: Vec<&str> = vec!["study"];
    args.extend(inputs.iter().map(|s| s.as_str()));
    args.extend(MATERIAL);
    let mut outside = args.clone();
    outside.extend(["--probe", "ux@0.5,-0.5"]);
    let o = hone(&outside);
    assert_eq!(o.status.code(), Some(2));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(
        err.contains("outside the mesh of") && err.contains("l_shape_"),
        "{err}"
    );
    let mut syntax = args.clone();
    syntax.extend(["--probe", "stress@1,2"]);
    assert_eq!(hone(&syntax).status.code(), Some(2));
    let mut onto_input = args.clone();
    onto_input.extend(["--plot", inputs[0].as_str()]);
    let o = hone(&onto_input);
    assert_eq!(o.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&o.stderr).contains("input file"));
}
