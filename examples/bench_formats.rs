//! Benchmark of the size-field writers and the MSH reader on a generated mesh.
//!
//! ```text
//! cargo run --release --example bench_formats -- --cells 1000000 [--kind tet10] [--threads N]
//! ```
//!
//! Builds a box mesh of about `--cells` elements of `--kind` with a smooth size field, then
//! times writing it as MSH 4.1, `.pos` and MEDIT `.mesh` + `.sol`, and reading the MSH file
//! back (checked against the mesh), with file sizes and this process's peak memory (VmHWM).

use hone::element::ElementKind;
use hone::io::{read_msh, write_medit_size_field, write_msh_size_field, write_pos_size_field};
use hone::mesh::generate::structured;
use std::time::Instant;

#[path = "support/mod.rs"]
mod support;
use support::{arg, cpu_seconds, peak_memory_mb};

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let cells: usize = arg(&args, "--cells").unwrap_or(1_000_000);
    let kind = arg::<String>(&args, "--kind")
        .and_then(|k| ElementKind::from_name(&k))
        .unwrap_or(ElementKind::Tet10);
    if let Some(t) = arg::<usize>(&args, "--threads") {
        rayon::ThreadPoolBuilder::new()
            .num_threads(t)
            .build_global()
            .expect("thread pool set once");
    }
    let per = match kind.vertex_count() {
        4 if kind.dim() == 3 => 6.0,
        3 | 6 => 2.0,
        _ => 1.0,
    };
    let n = if kind.dim() == 3 {
        (cells as f64 / per).cbrt().round() as usize
    } else {
        (cells as f64 / per).sqrt().round() as usize
    }
    .max(1);
    let mesh = structured(kind, [n, n, n], [1.0, 1.0, 1.0]);
    let sizes: Vec<f64> = mesh
        .points
        .iter()
        .map(|p| 0.01 + 0.05 * (p[0] * p[0] + 0.5 * p[1] + 0.25 * p[2]))
        .collect();
    println!(
        "{} mesh: {} elements, {} nodes, {} threads",
        kind.name(),
        mesh.element_count(),
        mesh.node_count(),
        rayon::current_num_threads()
    );
    let dir = tempfile::tempdir().expect("temporary folder");
    let msh = dir.path().join("size.msh");
    let pos = dir.path().join("size.pos");
    let (med, sol) = (dir.path().join("size.mesh"), dir.path().join("size.sol"));
    let size_mb = |p: &std::path::Path| std::fs::metadata(p).map_or(0.0, |m| m.len() as f64 / 1e6);
    let timed = |what: &str, f: &mut dyn FnMut()| {
        let (t, c) = (Instant::now(), cpu_seconds());
        f();
        println!(
            "{what:<22} {:>7.2} s wall {:>7.2} s cpu",
            t.elapsed().as_secs_f64(),
            cpu_seconds() - c
        );
    };
    timed("write MSH", &mut || {
        write_msh_size_field(&msh, None, &mesh, &sizes).expect("MSH written")
    });
    timed("write .pos", &mut || {
        write_pos_size_field(&pos, None, &mesh, &sizes).expect(".pos written")
    });
    timed("write .mesh + .sol", &mut || {
        write_medit_size_field(&med, &sol, None, &mesh, &sizes).expect("MEDIT written")
    });
    let mut grid = None;
    timed("read MSH", &mut || {
        grid = Some(read_msh(&msh).expect("MSH read"))
    });
    let grid = grid.expect("read above");
    assert_eq!(grid.cell_count(), mesh.element_count());
    assert_eq!(
        grid.point_array("size_target").expect("sizes").values,
        sizes
    );
    println!(
        "files: MSH {:.0} MB, .pos {:.0} MB, .mesh {:.0} MB, .sol {:.0} MB; peak memory {:.0} MB",
        size_mb(&msh),
        size_mb(&pos),
        size_mb(&med),
        size_mb(&sol),
        peak_memory_mb()
    );
}
