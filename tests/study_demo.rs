//! `hone study` on the demo scenario (invented data: a deck plate with a hatch opening), three
//! meshes per corner variant with every size halved. Issue 5's check: the sharp 270 degree
//! hatch corner is flagged and its peak stress called singular (it grows toward the factor
//! 2^(1 - lambda) = 1.3713 per halving, lambda = 0.5444837368, Williams 1952; method sheet 4.3),
//! while the rounded corner's peak converges.

mod common;

use common::scratch;
use hone::reference::demo::PLATE_FLAGS;
use hone::reference::demo::{plate_mesh, solve_plate, Corner};
use hone::reference::solver::write_results;
use std::process::Command;

fn study(corner: Corner) -> serde_json::Value {
    let dir = scratch(&format!("study_demo_{}", corner.name()));
    let mut args: Vec<String> = vec!["study".into()];
    for far in [50.0, 25.0, 12.5] {
        let solved = solve_plate(&plate_mesh(corner, far).expect("meshes")).expect("solves");
        let path = dir.join(format!("deck_{far}.vtu"));
        write_results(&path, &solved.mesh, &solved.displacement, false).expect("writes");
        args.push(path.display().to_string());
    }
    for a in PLATE_FLAGS.into_iter().chain([
        "--probe",
        "max:von_mises@sphere(200,125,60)",
        "--no-plot",
        "--json",
    ]) {
        args.push(a.into());
    }
    let o = Command::new(env!("CARGO_BIN_EXE_hone"))
        .args(&args)
        .output()
        .expect("binary runs");
    assert!(
        o.status.code().unwrap_or(2) < 2,
        "{}",
        String::from_utf8_lossy(&o.stderr)
    );
    serde_json::from_slice(&o.stdout).expect("JSON")
}

fn quantity<'a>(v: &'a serde_json::Value, name: &str) -> &'a serde_json::Value {
    v["quantities"]
        .as_array()
        .unwrap()
        .iter()
        .find(|q| q["name"] == name)
        .unwrap_or_else(|| panic!("no quantity {name}"))
}

#[test]
fn sharp_corner_is_singular_rounded_converges() {
    let sharp = study(Corner::Sharp);
    let spots = sharp["singular_points"].as_array().unwrap();
    assert_eq!(spots.len(), 1, "{spots:?}");
    let peak = quantity(&sharp, "max:von_mises@sphere(200,125,60)");
    assert_eq!(peak["verdict"], "singular");
    assert!(peak["extrapolated"].is_null() && peak["gci_fine"].is_null());
    let values: Vec<f64> = peak["values"]
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v.as_f64().unwrap())
        .collect();
    // Growth per halving on the finest pair: near 1.3713 (method sheet 4.3); 15 % allows for
    // the meshes being graded toward the corner and still pre-asymptotic (measured 1.35).
    let growth = values[2] / values[1];
    assert!((growth / 1.3713 - 1.0).abs() < 0.15, "growth {growth}");

    let rounded = study(Corner::Rounded);
    assert!(rounded["singular_points"].as_array().unwrap().is_empty());
    let peak = quantity(&rounded, "max:von_mises@sphere(200,125,60)");
    let verdict = peak["verdict"].as_str().unwrap();
    assert!(
        verdict == "converging" || verdict == "converged",
        "rounded verdict {verdict}"
    );
    assert!(peak["extrapolated"].as_f64().is_some());
}
