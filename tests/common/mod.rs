//! Helpers shared by the whole-run tests: models from generated meshes and analytic fields.
#![allow(dead_code)]

use hone::element::ElementKind;
use hone::estimate::{estimate_model, Computed};
use hone::material::{AnalysisMode, Material, MaterialMap};
use hone::mesh::generate::{map_points, structured};
use hone::mesh::{Mesh, Model};
use hone::recovery::RecoveryMethod;
use hone::reference::problems::{Problem, Solved};
use std::path::PathBuf;

/// Steel-like material used throughout the tests (any values would do).
pub fn steel() -> MaterialMap {
    MaterialMap::Single(Material::new(200_000.0, 0.3, "").expect("valid material"))
}

/// The natural analysis mode of a kind: plane stress (t = 1) for 2D kinds, 3D solid otherwise.
pub fn mode_for(kind: ElementKind) -> AnalysisMode {
    if kind.dim() == 2 {
        AnalysisMode::PlaneStress { thickness: 1.0 }
    } else {
        AnalysisMode::Solid3d
    }
}

/// Unit square or cube with `n` cells per direction.
pub fn unit_mesh(kind: ElementKind, n: usize) -> Mesh {
    structured(kind, [n, n, n], [1.0, 1.0, 1.0])
}

/// A smooth non-affine distortion of the unit square/cube that keeps its outline:
/// x' = x + a sin(pi x) sin(pi y) [sin(pi z)], similarly for y (and z), a = 0.04.
pub fn distort(mesh: &mut Mesh) {
    let dim = mesh.dimension;
    map_points(mesh, |p| {
        use std::f64::consts::PI;
        let bump =
            (PI * p[0]).sin() * (PI * p[1]).sin() * if dim == 3 { (PI * p[2]).sin() } else { 1.0 };
        let a = 0.04;
        [
            p[0] + a * bump * (1.0 + p[1]),
            p[1] + a * bump * (1.0 - 0.5 * p[0]),
            if dim == 3 {
                p[2] + a * bump * (0.5 + p[0])
            } else {
                0.0
            },
        ]
    });
}

/// A model with displacement u(x) at every node.
pub fn model_with(mesh: Mesh, u: impl Fn([f64; 3]) -> [f64; 3]) -> Model {
    let displacement = mesh.points.iter().map(|&p| u(p)).collect();
    Model { mesh, displacement }
}

/// Runs check, stresses, recovery and the estimate.
pub fn run(model: &Model, mode: AnalysisMode, method: RecoveryMethod) -> Computed {
    estimate_model(model, &steel(), mode, method, &|_| {}).expect("pipeline runs")
}

/// Least-squares slope of log y against log x.
pub fn log_slope(x: &[f64], y: &[f64]) -> f64 {
    let lx: Vec<f64> = x.iter().map(|v| v.ln()).collect();
    let ly: Vec<f64> = y.iter().map(|v| v.ln()).collect();
    let n = lx.len() as f64;
    let mx = lx.iter().sum::<f64>() / n;
    let my = ly.iter().sum::<f64>() / n;
    let sxy: f64 = lx.iter().zip(&ly).map(|(a, b)| (a - mx) * (b - my)).sum();
    let sxx: f64 = lx.iter().map(|a| (a - mx).powi(2)).sum();
    sxy / sxx
}

/// A fresh, empty scratch folder for one test.
pub fn scratch(name: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("hone-test-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).expect("scratch folder");
    dir
}

/// Solves a reference problem and runs the estimate (SPR) on its result.
pub fn solve_and_estimate(problem: &Problem) -> (Solved, Computed) {
    let solved = problem.solve().expect("solves");
    let computed = problem
        .estimate(&solved, RecoveryMethod::Spr)
        .expect("estimate");
    (solved, computed)
}

/// Whether Python's meshio (an independent mesh I/O library) can be used for read-back checks.
/// Without it the caller skips its check with a message, unless `HONE_REQUIRE_MESHIO=1` (set by
/// `.ci/run` after installing meshio), which makes a missing meshio a failure.
pub fn meshio_available() -> bool {
    let why = match std::process::Command::new("python3")
        .args(["-c", "import meshio"])
        .output()
    {
        Err(e) => format!("python3 could not be started: {e}"),
        Ok(o) if !o.status.success() => format!(
            "python3 cannot import meshio: {}",
            String::from_utf8_lossy(&o.stderr).trim()
        ),
        Ok(_) => return true,
    };
    if std::env::var("HONE_REQUIRE_MESHIO").as_deref() == Ok("1") {
        panic!("HONE_REQUIRE_MESHIO=1 but {why}");
    }
    eprintln!("skipping the meshio read-back: {why}");
    false
}
