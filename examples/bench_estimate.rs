//! Benchmark of the estimate pipeline on a generated mesh.
//!
//! ```text
//! cargo run --release --example bench_estimate -- --cells 1000000 --kind tet10 [--zlib] [--keep DIR]
//! ```
//!
//! Builds a box mesh of about `--cells` elements of `--kind`, puts a smooth displacement field
//! on it, writes a binary VTU (appended raw; `--zlib` for zlib-compressed blocks), then starts
//! itself again in a fresh process to time read, geometry check, FE stresses, adjacency,
//! recovery, indicators and the annotated write, and reports that process's peak memory
//! (VmHWM), so the figures cover only the estimate's own work.

use hone::element::ElementKind;
use hone::io::{
    build_model, cells_in_file_order, read_results, write_vtu, ArrayData, ArrayView, Encoding,
    GridView, ModelOptions, WriteOptions,
};
use hone::material::{AnalysisMode, Material, MaterialMap};
use hone::mesh::generate::structured;
use hone::mesh::{BoundaryFacets, NodeElements};
use hone::recovery::{recover, sample_stresses, ElementMaterials, RecoveryMethod};
use std::path::{Path, PathBuf};
use std::time::Instant;

#[path = "support/mod.rs"]
mod support;
use support::{arg, cpu_seconds, peak_memory_mb};

fn cells_per_cell(kind: ElementKind) -> usize {
    match kind {
        ElementKind::Tet4 | ElementKind::Tet10 => 6,
        ElementKind::Tri3 | ElementKind::Tri6 | ElementKind::Wedge6 | ElementKind::Wedge15 => 2,
        _ => 1,
    }
}

fn generate(path: &Path, kind: ElementKind, cells: usize, zlib: bool) {
    let t = Instant::now();
    let per = cells as f64 / cells_per_cell(kind) as f64;
    let n = if kind.dim() == 3 {
        per.cbrt().round() as usize
    } else {
        per.sqrt().round() as usize
    }
    .max(1);
    let mesh = structured(kind, [n, n, n], [1.0, 1.0, 1.0]);
    let disp: Vec<f64> = mesh
        .points
        .iter()
        .flat_map(|p| {
            [
                1e-3 * (p[0] + 0.5 * p[1]).sin(),
                1e-3 * (p[1] * p[2]).cos(),
                1e-3 * p[0] * p[2],
            ]
        })
        .collect();
    let cells = cells_in_file_order(&mesh);
    let (connectivity, offsets, types) = (cells.connectivity, cells.offsets, cells.types);
    let points = [ArrayView {
        name: "displacement",
        components: 3,
        data: ArrayData::F64(&disp),
    }];
    let grid = GridView {
        points: &mesh.points,
        connectivity: &connectivity,
        offsets: &offsets,
        types: &types,
        point_data: &points,
        cell_data: &[],
    };
    let opts = WriteOptions {
        encoding: Encoding::AppendedRaw,
        zlib_level: zlib.then_some(6),
        ..Default::default()
    };
    let file = std::fs::File::create(path).expect("create benchmark file");
    write_vtu(std::io::BufWriter::new(file), &grid, &opts).expect("write benchmark file");
    let size = std::fs::metadata(path).map(|m| m.len()).unwrap_or(0);
    println!(
        "generated {} {} cells, {} points, file {:.1} MB{} in {:.2} s",
        mesh.element_count(),
        kind.name(),
        mesh.node_count(),
        size as f64 / 1e6,
        if zlib { " (zlib)" } else { "" },
        t.elapsed().as_secs_f64()
    );
}

fn estimate(path: &Path, kind: ElementKind) {
    let mode = if kind.dim() == 3 {
        AnalysisMode::Solid3d
    } else {
        AnalysisMode::PlaneStress { thickness: 1.0 }
    };
    let map = MaterialMap::Single(Material::new(206_000.0, 0.3, "").expect("material"));
    let total = Instant::now();
    let mut t = Instant::now();
    let mut cpu = cpu_seconds();
    let cpu_start = cpu;
    let mut lap = |name: &str| {
        let now = cpu_seconds();
        println!(
            "  {name:<28} {:>8.3} s wall {:>8.2} s cpu",
            t.elapsed().as_secs_f64(),
            now - cpu
        );
        t = Instant::now();
        cpu = now;
    };
    let bytes = std::fs::read(path).expect("read bytes");
    drop(bytes);
    lap("read raw bytes (reference)");
    let raw = read_results(path).expect("read");
    lap("parse VTU");
    let (model, _) = build_model(&raw, "bench", &ModelOptions::default()).expect("model");
    drop(raw);
    lap("build model");
    let materials = ElementMaterials::new(&model.mesh, &map, mode).expect("materials");
    let samples = sample_stresses(&model, &materials).expect("stresses");
    lap("FE stresses + geometry");
    let adjacency = NodeElements::new(&model.mesh);
    let boundary = BoundaryFacets::new(&model.mesh, &adjacency);
    lap("adjacency + boundary");
    let recovered = recover(
        &model,
        &materials,
        &samples,
        &adjacency,
        &boundary,
        RecoveryMethod::Spr,
    );
    drop(samples);
    lap("SPR recovery");
    let est = hone::estimate::estimate(&model, &materials, &recovered, &[]).expect("estimate");
    lap("error indicators");
    let computed = hone::estimate::Computed {
        recovered,
        estimate: est,
        adjacency,
        boundary,
        // Corner fields are for plane models; this benchmark is 3D.
        corners: Vec::new(),
    };
    let read_estimate = total.elapsed().as_secs_f64();
    let out = path.with_extension("annotated.vtu");
    let size_now = model.mesh.size_now();
    hone::cli::write_annotated(&out, path, &model, &computed, &size_now, false, &[], &[])
        .expect("write");
    lap("write annotated VTU");
    println!(
        "  read + estimate {:.3} s wall ({:.2} s cpu), with write {:.3} s; relative error {:.4} %; peak memory {:.0} MB",
        read_estimate,
        cpu_seconds() - cpu_start,
        total.elapsed().as_secs_f64(),
        100.0 * computed.estimate.relative_error,
        peak_memory_mb()
    );
    let _ = std::fs::remove_file(out);
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let kind = arg::<String>(&args, "--kind")
        .and_then(|k| ElementKind::from_name(&k))
        .unwrap_or(ElementKind::Tet10);
    if let Some(file) = arg::<PathBuf>(&args, "--estimate-only") {
        estimate(&file, kind);
        return;
    }
    let cells: usize = arg(&args, "--cells").unwrap_or(100_000);
    let zlib = args.iter().any(|a| a == "--zlib");
    let dir = arg::<PathBuf>(&args, "--keep").unwrap_or_else(std::env::temp_dir);
    let path = dir.join(format!(
        "hone-bench-{}-{cells}{}.vtu",
        kind.name(),
        if zlib { "-zlib" } else { "" }
    ));
    generate(&path, kind, cells, zlib);
    let me = std::env::current_exe().expect("own path");
    let status = std::process::Command::new(me)
        .args(["--kind", kind.name(), "--estimate-only"])
        .arg(&path)
        .status()
        .expect("child runs");
    assert!(status.success());
    if !args.iter().any(|a| a == "--keep") {
        let _ = std::fs::remove_file(&path);
    }
}
