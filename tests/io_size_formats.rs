//! The three size-field outputs (MSH 4.1, `.pos`, MEDIT `.mesh` + `.sol`) read back: `.pos` by
//! hone's own reader (simplex count after splitting, values, volumes), MSH and MEDIT by an
//! independent library, meshio (PyPI), through `python3`. Without python3 or meshio the meshio
//! part says why and is skipped, unless `HONE_REQUIRE_MESHIO=1` (set by `.ci/run` once it has
//! installed meshio), which makes it a failure.

mod common;

use std::collections::HashMap;
use std::path::Path;
use std::process::Command;

use hone::element::ElementKind;
use hone::io::{read_pos_view, write_medit_size_field, write_msh_size_field, write_pos_size_field};
use hone::mesh::generate::structured;
use hone::mesh::Mesh;

/// A smooth positive size field.
fn sizes_of(mesh: &Mesh) -> Vec<f64> {
    mesh.points
        .iter()
        .map(|p| 0.05 + 0.01 * p[0] + 0.02 * p[1] + 0.03 * p[2])
        .collect()
}

/// Size at each node, keyed by the node's coordinates as written (z = 0 in 2D).
fn size_by_position(mesh: &Mesh, sizes: &[f64]) -> HashMap<[u64; 3], f64> {
    let two_d = mesh.dimension == 2;
    mesh.points
        .iter()
        .zip(sizes)
        .map(|(p, &h)| {
            let z = if two_d { 0.0 } else { p[2] };
            ([p[0].to_bits(), p[1].to_bits(), z.to_bits()], h)
        })
        .collect()
}

fn simplex_measure(c: &[[f64; 3]]) -> f64 {
    let d = |i: usize| [c[i][0] - c[0][0], c[i][1] - c[0][1], c[i][2] - c[0][2]];
    if c.len() == 3 {
        let (a, b) = (d(1), d(2));
        0.5 * (a[0] * b[1] - a[1] * b[0])
    } else {
        let (a, b, e) = (d(1), d(2), d(3));
        (a[0] * (b[1] * e[2] - b[2] * e[1]) - a[1] * (b[0] * e[2] - b[2] * e[0])
            + a[2] * (b[0] * e[1] - b[1] * e[0]))
            / 6.0
    }
}

/// `.pos` of every kind: one simplex per triangle / tetrahedron, 2 per quadrilateral, 6 per
/// hexahedron, 3 per wedge; values are the node sizes; the positive pieces fill the box.
#[test]
fn pos_views_cover_the_mesh_with_the_node_sizes() {
    let dir = tempfile::tempdir().unwrap();
    for kind in ElementKind::ALL {
        let box_size = [1.5, 1.0, 0.75];
        let mesh = structured(kind, [3, 2, 2], box_size);
        let sizes = sizes_of(&mesh);
        let path = dir.path().join("h.pos");
        write_pos_size_field(&path, None, &mesh, &sizes).unwrap();
        let view = read_pos_view(&path).unwrap();
        assert_eq!(view.name, "size_target");
        let per = match (kind.vertex_count(), kind.dim()) {
            (8, _) => 6,
            (6, _) => 3,
            (4, 2) => 2,
            _ => 1,
        };
        assert_eq!(
            view.entries.len(),
            per * mesh.element_count(),
            "{}",
            kind.name()
        );
        let at = size_by_position(&mesh, &sizes);
        let mut volume = 0.0;
        for e in &view.entries {
            assert_eq!(e.kind, if kind.dim() == 3 { "SS" } else { "ST" });
            for (c, h) in e.coords.iter().zip(&e.values) {
                assert_eq!(at[&c.map(f64::to_bits)], *h, "{}", kind.name());
            }
            let v = simplex_measure(&e.coords);
            assert!(v > 0.0, "{}: piece of measure {v}", kind.name());
            volume += v;
        }
        let whole = if kind.dim() == 3 {
            box_size.iter().product::<f64>()
        } else {
            box_size[0] * box_size[1]
        };
        // Sum of a few hundred O(0.01) pieces: round-off far below 1e-12 relative.
        assert!(
            (volume - whole).abs() <= 1e-12 * whole,
            "{}: {volume} vs {whole}",
            kind.name()
        );
    }
}

/// Reads the MSH and MEDIT outputs with meshio; prints counts and values as Python reprs.
const READ_WITH_MESHIO: &str = r#"
import json, sys
import numpy as np
import meshio
msh = meshio.read(sys.argv[1])
med = meshio.read(sys.argv[2], file_format="medit")
tok = open(sys.argv[3]).read().split()
i = tok.index("SolAtVertices")
n = int(tok[i + 1])
assert tok[i + 2:i + 4] == ["1", "1"], tok[i + 2:i + 4]
print(json.dumps({
    "msh_points": len(msh.points),
    "msh_cells": {c.type: len(c.data) for c in msh.cells},
    "msh_coords": [[repr(float(v)) for v in p] for p in msh.points],
    "msh_size": [repr(float(v)) for v in msh.point_data["size_target"]],
    "mesh_points": len(med.points),
    "mesh_cells": {c.type: len(c.data) for c in med.cells},
    "mesh_coords": [[repr(float(v)) for v in p] for p in med.points],
    "sol": tok[i + 4:i + 4 + n],
    "sol_end": tok[i + 4 + n],
}))
"#;

fn num(v: &serde_json::Value) -> f64 {
    v.as_str()
        .and_then(|s| s.parse().ok())
        .expect("a number as text")
}

fn check_with_meshio(dir: &Path, mesh: &Mesh, medit_type: &str) {
    let sizes = sizes_of(mesh);
    let (msh, med, sol) = (dir.join("h.msh"), dir.join("h.mesh"), dir.join("h.sol"));
    write_msh_size_field(&msh, None, mesh, &sizes).unwrap();
    write_medit_size_field(&med, &sol, None, mesh, &sizes).unwrap();
    let out = Command::new("python3")
        .args(["-c", READ_WITH_MESHIO])
        .args([&msh, &med, &sol])
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "meshio failed: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    let j: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let e = mesh.element_count();
    // MSH and MEDIT: corner nodes only (increasing node order), linear cells.
    let corners: Vec<u32> = {
        let b = &mesh.blocks[0];
        let mut c: Vec<u32> = b
            .nodes
            .chunks(b.kind.node_count())
            .flat_map(|c| c[..b.kind.vertex_count()].iter().copied())
            .collect();
        c.sort_unstable();
        c.dedup();
        c
    };
    assert_eq!(j["msh_points"], corners.len());
    assert_eq!(j["msh_cells"], serde_json::json!({ medit_type: e }));
    for (i, &v) in corners.iter().enumerate() {
        let c: Vec<f64> = j["msh_coords"][i]
            .as_array()
            .unwrap()
            .iter()
            .map(num)
            .collect();
        assert_eq!(c, mesh.points[v as usize].to_vec(), "msh node {i}");
        assert_eq!(num(&j["msh_size"][i]), sizes[v as usize], "msh size {i}");
    }
    // MEDIT: corner nodes only, linear cells, one size per vertex in the same order.
    assert_eq!(j["mesh_points"], corners.len());
    assert_eq!(j["mesh_cells"], serde_json::json!({ medit_type: e }));
    let sol_values = j["sol"].as_array().unwrap();
    assert_eq!(sol_values.len(), corners.len());
    assert_eq!(j["sol_end"], "End");
    let at = size_by_position(mesh, &sizes);
    for (i, v) in sol_values.iter().enumerate() {
        let mut c: Vec<f64> = j["mesh_coords"][i]
            .as_array()
            .unwrap()
            .iter()
            .map(num)
            .collect();
        c.resize(3, 0.0);
        let h: f64 = v.as_str().unwrap().parse().unwrap();
        assert_eq!(
            at[&[c[0].to_bits(), c[1].to_bits(), c[2].to_bits()]],
            h,
            "vertex {i}"
        );
    }
}

#[test]
fn msh_and_medit_read_back_with_meshio() {
    if !common::meshio_available() {
        return;
    }
    let dir = tempfile::tempdir().unwrap();
    let tri6 = structured(ElementKind::Tri6, [3, 2, 1], [3.0, 2.0, 1.0]);
    check_with_meshio(dir.path(), &tri6, "triangle");
    let tet10 = structured(ElementKind::Tet10, [2, 2, 1], [2.0, 1.0, 0.5]);
    check_with_meshio(dir.path(), &tet10, "tetra");
}
