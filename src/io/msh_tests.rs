//! Unit tests of the MSH 4.1 reader and writer.

use super::*;
use crate::element::ElementKind;
use crate::io::{build_model, ModelOptions};
use crate::mesh::check_geometry;
use crate::mesh::generate::structured;

/// Adds a zero displacement so the model builder accepts a size-field file.
fn with_displacement(mut raw: RawGrid) -> RawGrid {
    raw.point_data.push(DataArray {
        name: "displacement".into(),
        components: 3,
        scalar_type: ScalarType::Float64,
        values: vec![0.0; 3 * raw.points.len()],
    });
    raw
}

/// A full-order ASCII MSH 4.1 file of `mesh` with a nodal view `size_target`, laid out as Gmsh
/// writes one (formats notes 1.5): every node, every element with all its nodes in Gmsh order.
fn full_order_msh(mesh: &crate::mesh::Mesh, sizes: &[f64]) -> String {
    use std::fmt::Write as _;
    let (n, e, dim) = (mesh.node_count(), mesh.element_count(), mesh.dimension);
    let mut t =
        format!("$MeshFormat\n4.1 0 8\n$EndMeshFormat\n$Nodes\n1 {n} 1 {n}\n{dim} 1 0 {n}\n");
    for i in 1..=n {
        writeln!(t, "{i}").unwrap();
    }
    for p in &mesh.points {
        writeln!(t, "{} {} {}", p[0], p[1], p[2]).unwrap();
    }
    writeln!(t, "$EndNodes\n$Elements\n{} {e} 1 {e}", mesh.blocks.len()).unwrap();
    for b in &mesh.blocks {
        let q = vtk_to_gmsh(b.kind);
        writeln!(t, "{dim} 1 {} {}", gmsh_number(b.kind), b.len()).unwrap();
        for i in 0..b.len() {
            let cell = b.cell(i);
            write!(t, "{}", b.first_element + i + 1).unwrap();
            for &k in &q[..b.kind.node_count()] {
                write!(t, " {}", cell[k] + 1).unwrap();
            }
            t.push('\n');
        }
    }
    writeln!(
        t,
        "$EndElements\n$NodeData\n1\n\"size_target\"\n1\n0.0\n3\n0\n1\n{n}"
    )
    .unwrap();
    for (i, h) in sizes.iter().enumerate() {
        writeln!(t, "{} {h}", i + 1).unwrap();
    }
    t.push_str("$EndNodeData\n");
    t
}

/// A slightly skewed two-element mesh of `kind` with a size field that differs at every node.
fn skewed(kind: ElementKind) -> (crate::mesh::Mesh, Vec<f64>) {
    let mut mesh = structured(kind, [2, 1, 1], [2.0, 1.0, 0.7]);
    for p in &mut mesh.points {
        p[0] += 0.25 * p[1] + 0.1 * p[2];
        p[1] += 0.15 * p[2] + 0.01 * p[0];
    }
    let sizes: Vec<f64> = mesh
        .points
        .iter()
        .map(|p| 0.1 + p[0] / 7.0 + p[1] * 1e-9)
        .collect();
    (mesh, sizes)
}

/// Every kind: hone mesh -> full-order MSH file in Gmsh's node order -> reader -> model builder
/// gives the same points, the same cells in the same node order (wedges go through Gmsh's
/// handedness and back), positive elements, and the nodal view bit for bit.
#[test]
fn full_order_files_read_back_as_the_same_model() {
    for kind in ElementKind::ALL {
        let (mesh, sizes) = skewed(kind);
        let text = full_order_msh(&mesh, &sizes);
        let raw = read_msh_bytes(text.as_bytes(), "m.msh").unwrap();
        assert_eq!(raw.cell_count(), mesh.element_count(), "{}", kind.name());
        let h = raw.point_array("size_target").unwrap();
        assert_eq!(h.values, sizes, "{}", kind.name());
        assert_eq!(raw.cell_array("gmsh_entity").unwrap().values[0], 1.0);
        assert_eq!(raw.cell_array("gmsh_physical").unwrap().values[0], 0.0);
        let (model, notes) =
            build_model(&with_displacement(raw), "m.msh", &ModelOptions::default()).unwrap();
        let wedges = matches!(kind, ElementKind::Wedge6 | ElementKind::Wedge15);
        let expect_flips = if wedges { mesh.element_count() } else { 0 };
        assert_eq!(notes.reoriented_wedges, expect_flips, "{}", kind.name());
        let m2 = &model.mesh;
        assert_eq!(m2.dimension, mesh.dimension);
        assert_eq!(m2.points.len(), mesh.points.len());
        for (a, b) in m2.points.iter().zip(&mesh.points) {
            assert_eq!(a.map(f64::to_bits), b.map(f64::to_bits));
        }
        assert_eq!(m2.blocks.len(), 1);
        assert_eq!(m2.blocks[0].kind, kind);
        assert_eq!(m2.blocks[0].nodes, mesh.blocks[0].nodes, "{}", kind.name());
        assert!(check_geometry(m2).is_empty(), "{}", kind.name());
    }
}

/// Every kind: the size-field writer's file reads back as the linear mesh of the corners: the
/// corner points in node order, each element as its linear counterpart with its corners in the
/// same order, positive elements, and the corner sizes bit for bit.
#[test]
fn size_field_files_read_back_as_the_linear_corner_mesh() {
    let dir = tempfile::tempdir().unwrap();
    for kind in ElementKind::ALL {
        let (mesh, sizes) = skewed(kind);
        let path = dir.path().join("m.msh");
        write_msh_size_field(&path, None, &mesh, &sizes).unwrap();
        let raw = read_msh(&path).unwrap();
        let nv = kind.vertex_count();
        let mut corners: Vec<u32> = mesh.blocks[0]
            .nodes
            .chunks(kind.node_count())
            .flat_map(|c| c[..nv].to_vec())
            .collect();
        corners.sort_unstable();
        corners.dedup();
        let corner_sizes: Vec<f64> = corners.iter().map(|&v| sizes[v as usize]).collect();
        assert_eq!(raw.cell_count(), mesh.element_count(), "{}", kind.name());
        assert_eq!(
            raw.point_array("size_target").unwrap().values,
            corner_sizes,
            "{}",
            kind.name()
        );
        let (model, _) =
            build_model(&with_displacement(raw), "m.msh", &ModelOptions::default()).unwrap();
        let m2 = &model.mesh;
        assert_eq!(m2.points.len(), corners.len(), "{}", kind.name());
        for (a, &v) in m2.points.iter().zip(&corners) {
            assert_eq!(
                a.map(f64::to_bits),
                mesh.points[v as usize].map(f64::to_bits)
            );
        }
        assert_eq!(m2.blocks[0].kind, kind.linear(), "{}", kind.name());
        let expected: Vec<u32> = mesh.blocks[0]
            .nodes
            .chunks(kind.node_count())
            .flat_map(|c| {
                c[..nv]
                    .iter()
                    .map(|v| corners.binary_search(v).unwrap() as u32)
                    .collect::<Vec<_>>()
            })
            .collect();
        assert_eq!(m2.blocks[0].nodes, expected, "{}", kind.name());
        assert!(check_geometry(m2).is_empty(), "{}", kind.name());
    }
}

/// A hand-written ASCII file with what real files hold: comments and unknown sections,
/// $Entities with physical tags, sparse unordered node tags over two blocks (one parametric),
/// boundary lines to leave out, two time steps of a view, element data with rows for the
/// boundary lines, and a partial view.
const ASCII_2D: &str = "$MeshFormat
4.1 0 8
$EndMeshFormat
$Comments
anything $Nodes here is ignored
$EndComments
$Entities
0 1 1 0
7 0 0 0 2 0 0 1 31 2 1 -2
3 0 0 0 2 1 0 2 11 12 1 7
$EndEntities
$SomethingNew
1 2 3
$EndSomethingNew
$Nodes
2 5 10 90
2 3 0 3
90
10
40
2 0 0
0 0 0
2 1 0
2 3 1 2
20
50
0 1 0 0.5 0.5
1 2 0 0.25 0.5
$EndNodes
$Elements
3 4 1 9
1 7 1 1
9 10 90
2 3 3 1
5 10 90 40 20
2 2 2 2
3 20 40 50
4 90 40 50
$EndElements
$NodeData
1
\"displacement\"
1
0.0
3
0
3
5
10 0 0 0
90 1 0 0
40 1 1 0
20 0 1 0
50 0.5 1 0
$EndNodeData
$NodeData
1
\"displacement\"
1
1.0
3
1
3
5
10 0 0 0
90 2 0 0
40 2 2 0
20 0 2 0
50 1 2 0
$EndNodeData
$NodeData
1
\"temperature\"
1
0.0
3
0
1
2
90 300
10 290
$EndNodeData
$ElementData
1
\"thickness\"
1
0.0
3
0
1
4
9 -1
5 0.5
3 0.25
4 0.125
$EndElementData
";

#[test]
fn reads_a_hand_written_ascii_file() {
    let g = read_msh_bytes(ASCII_2D.as_bytes(), "hand.msh").unwrap();
    // Nodes in file order: tags 90 10 40 20 50.
    assert_eq!(
        g.points,
        vec![
            [2.0, 0.0, 0.0],
            [0.0, 0.0, 0.0],
            [2.0, 1.0, 0.0],
            [0.0, 1.0, 0.0],
            [1.0, 2.0, 0.0]
        ]
    );
    // The line (dimension 1) is left out; the quad and the two triangles stay, in file order.
    assert_eq!(g.types, vec![9, 5, 5]);
    assert_eq!(g.cell_nodes(0), &[1, 0, 2, 3]);
    assert_eq!(g.cell_nodes(1), &[3, 2, 4]);
    assert_eq!(g.cell_nodes(2), &[0, 2, 4]);
    assert_eq!(
        g.cell_array("gmsh_entity").unwrap().values,
        vec![3.0, 2.0, 2.0]
    );
    assert_eq!(
        g.cell_array("gmsh_physical").unwrap().values,
        vec![11.0, 0.0, 0.0]
    );
    // The later time step wins.
    let u = g.point_array("displacement").unwrap();
    assert_eq!(u.components, 3);
    assert_eq!(&u.values[..6], &[2.0, 0.0, 0.0, 0.0, 0.0, 0.0]);
    assert_eq!(&u.values[12..15], &[1.0, 2.0, 0.0]);
    // A partial view: points without a row hold NaN.
    let t = g.point_array("temperature").unwrap();
    assert_eq!(&t.values[..2], &[300.0, 290.0]);
    assert!(t.values[2..].iter().all(|v| v.is_nan()));
    // The boundary line's row (tag 9) is ignored.
    let th = g.cell_array("thickness").unwrap();
    assert_eq!(th.values, vec![0.5, 0.25, 0.125]);
    let opts = ModelOptions {
        zone_array: Some("gmsh_physical".into()),
        ..ModelOptions::default()
    };
    let (model, _) = build_model(&g, "hand.msh", &opts).unwrap();
    assert_eq!(model.mesh.dimension, 2);
    assert_eq!(model.mesh.zone, vec![11, 0, 0]);
}

/// Binary MSH writer for tests, in either byte order and either `size_t` width.
struct Bin {
    big: bool,
    st: usize,
    out: Vec<u8>,
}

impl Bin {
    fn text(&mut self, s: &str) -> &mut Self {
        self.out.extend_from_slice(s.as_bytes());
        self
    }
    fn size(&mut self, v: u64) -> &mut Self {
        if self.st == 4 {
            self.either(&(v as u32).to_le_bytes(), &(v as u32).to_be_bytes())
        } else {
            self.either(&v.to_le_bytes(), &v.to_be_bytes())
        }
    }
    /// Appends `le` or `be`, the value's bytes in either order.
    fn either(&mut self, le: &[u8], be: &[u8]) -> &mut Self {
        self.out.extend_from_slice(if self.big { be } else { le });
        self
    }
    fn int(&mut self, v: i32) -> &mut Self {
        self.either(&v.to_le_bytes(), &v.to_be_bytes())
    }
    fn real(&mut self, v: f64) -> &mut Self {
        self.either(&v.to_le_bytes(), &v.to_be_bytes())
    }
}

/// One 10-node tetrahedron (Gmsh order) and one boundary triangle, with a vector NodeData and
/// an ElementData row for each, in binary.
fn binary_tet10(big: bool, st: usize) -> Vec<u8> {
    let mut b = Bin {
        big,
        st,
        out: Vec::new(),
    };
    b.text(&format!("$MeshFormat\n4.1 1 {st}\n")).int(1);
    b.text("\n$EndMeshFormat\n$Entities\n");
    b.size(0).size(0).size(1).size(1);
    b.int(4);
    for _ in 0..6 {
        b.real(0.0);
    }
    b.size(0).size(0);
    b.int(1);
    for _ in 0..6 {
        b.real(0.0);
    }
    b.size(2).int(21).int(22).size(1).int(4);
    b.text("\n$EndEntities\n$Nodes\n");
    let corners = [
        [0.0, 0.0, 0.0],
        [1.0, 0.0, 0.0],
        [0.0, 1.0, 0.0],
        [0.0, 0.0, 1.0],
    ];
    // Gmsh tet10 edges: 4:(0,1) 5:(1,2) 6:(2,0) 7:(3,0) 8:(3,2) 9:(3,1).
    let edges = [(0, 1), (1, 2), (2, 0), (3, 0), (3, 2), (3, 1)];
    let mut pts: Vec<[f64; 3]> = corners.to_vec();
    for (a, c) in edges {
        pts.push(std::array::from_fn(|k| {
            0.5 * (corners[a][k] + corners[c][k])
        }));
    }
    b.size(1).size(10).size(101).size(110);
    b.int(3).int(1).int(0).size(10);
    for i in 0..10 {
        b.size(101 + i as u64);
    }
    for p in &pts {
        b.real(p[0]).real(p[1]).real(p[2]);
    }
    b.text("\n$EndNodes\n$Elements\n");
    b.size(2).size(2).size(1).size(2);
    b.int(2).int(4).int(2).size(1);
    b.size(2).size(101).size(102).size(103);
    b.int(3).int(1).int(11).size(1);
    b.size(1);
    for i in 0..10 {
        b.size(101 + i);
    }
    b.text("\n$EndElements\n$NodeData\n1\n\"displacement\"\n1\n0.0\n3\n0\n3\n10\n");
    for i in 0..10 {
        let p = pts[i];
        b.int(101 + i as i32)
            .real(0.001 * p[0])
            .real(-0.002 * p[1])
            .real(0.0005 * p[2]);
    }
    b.text("\n$EndNodeData\n$ElementData\n1\n\"zone\"\n1\n0.0\n3\n0\n1\n2\n");
    b.int(2).real(9.0).int(1).real(5.0);
    b.text("\n$EndElementData\n");
    b.out
}

#[test]
fn reads_binary_in_both_byte_orders_and_both_size_widths() {
    for (big, st) in [(false, 8), (true, 8), (false, 4), (true, 4)] {
        let bytes = binary_tet10(big, st);
        let g = read_msh_bytes(&bytes, "bin.msh").unwrap();
        assert_eq!(g.types, vec![24]);
        // VTK nodes 8 and 9 are (1,3) and (2,3): Gmsh's 9 and 8.
        assert_eq!(g.cell_nodes(0), &[0, 1, 2, 3, 4, 5, 6, 7, 9, 8]);
        let c = g.cell_nodes(0);
        for (m, a, b) in [(8, 1, 3), (9, 2, 3), (7, 0, 3)] {
            let (pm, pa, pb) = (
                g.points[c[m] as usize],
                g.points[c[a] as usize],
                g.points[c[b] as usize],
            );
            for k in 0..3 {
                assert_eq!(pm[k], 0.5 * (pa[k] + pb[k]));
            }
        }
        assert_eq!(g.cell_array("gmsh_physical").unwrap().values, vec![21.0]);
        assert_eq!(g.cell_array("zone").unwrap().values, vec![5.0]);
        let u = g.point_array("displacement").unwrap();
        for (i, p) in g.points.iter().enumerate() {
            assert_eq!(u.values[3 * i + 1], -0.002 * p[1]);
        }
        let (model, _) = build_model(&g, "bin.msh", &ModelOptions::default()).unwrap();
        assert!(check_geometry(&model.mesh).is_empty());
    }
}

fn error_of(text: &str) -> String {
    match read_msh_bytes(text.as_bytes(), "bad.msh") {
        Ok(_) => panic!("accepted: {text}"),
        Err(e) => e.to_string(),
    }
}

#[test]
fn clear_errors_for_bad_references_and_types() {
    // An element naming a node $Nodes does not have.
    let e = error_of(&ASCII_2D.replace("4 90 40 50", "4 90 41 50"));
    assert!(e.contains("element 4 uses node 41"), "{e}");
    assert!(e.starts_with("bad.msh: line "), "{e}");
    // A NodeData row for an unknown node.
    let e = error_of(&ASCII_2D.replace("90 300", "91 300"));
    assert!(e.contains("node tag 91"), "{e}");
    // An ElementData row for an element that does not exist at all.
    let e = error_of(&ASCII_2D.replace("9 -1", "8 -1"));
    assert!(e.contains("element tag 8"), "{e}");
    // Version 2.2.
    let e = error_of(&ASCII_2D.replace("4.1 0 8", "2.2 0 8"));
    assert!(
        e.contains("MSH version 2.2") && e.contains("expected version 4.1"),
        "{e}"
    );
    // A 10-node triangle (no VTK counterpart) of the mesh's dimension.
    let tri10 = ASCII_2D.replace("3 4 1 9", "4 4 1 9").replace(
        "2 2 2 2\n3 20 40 50\n4 90 40 50",
        "2 3 2 1\n3 20 40 50\n2 3 21 1\n4 90 40 50 10 10 10 10 10 10 10",
    );
    let e = error_of(&tri10);
    assert!(e.contains("Gmsh type 21"), "{e}");
    // An unknown type number.
    let e = error_of(&ASCII_2D.replace("2 3 3 1", "2 3 999 1"));
    assert!(e.contains("element type 999"), "{e}");
    // A duplicate node tag.
    let e = error_of(&ASCII_2D.replace("20\n50\n", "20\n90\n"));
    assert!(e.contains("node tag 90 twice"), "{e}");
    // Counts larger than the file.
    let e = error_of(&ASCII_2D.replace("2 5 10 90", "2 50000000 10 90"));
    assert!(e.contains("numNodes"), "{e}");
    // A block of 64-node hexahedra larger than the file (refused before allocating).
    let big = ASCII_2D
        .replace("3 4 1 9", "3 100 1 9")
        .replace("2 2 2 2\n", "3 2 92 80\n");
    let e = error_of(&big);
    assert!(e.contains("numElementsInBlock"), "{e}");
    // A missing $End.
    let e = error_of(&ASCII_2D.replace("$EndNodes", "$EndNodez"));
    assert!(e.contains("expected $EndNodes"), "{e}");
    assert!(error_of("").contains("empty file"));
}

/// Pyramids have a VTK type but no hone element: the model builder reports them and can
/// leave them out.
#[test]
fn pyramids_reach_the_model_builder_as_vtk_pyramids() {
    let text = "$MeshFormat\n4.1 0 8\n$EndMeshFormat\n$Nodes\n1 9 1 9\n3 1 0 9\n\
        1\n2\n3\n4\n5\n6\n7\n8\n9\n\
        0 0 0\n1 0 0\n1 1 0\n0 1 0\n0 0 1\n1 0 1\n1 1 1\n0 1 1\n0.5 0.5 2\n$EndNodes\n\
        $Elements\n2 2 1 2\n3 1 5 1\n1 1 2 3 4 5 6 7 8\n3 2 7 1\n2 5 6 7 8 9\n$EndElements\n\
        $NodeData\n1\n\"u\"\n1\n0\n3\n0\n3\n9\n\
        1 0 0 0\n2 0 0 0\n3 0 0 0\n4 0 0 0\n5 0 0 0\n6 0 0 0\n7 0 0 0\n8 0 0 0\n9 0 0 0\n\
        $EndNodeData\n";
    let g = read_msh_bytes(text.as_bytes(), "pyr.msh").unwrap();
    assert_eq!(g.types, vec![12, 14]);
    let e = build_model(&g, "pyr.msh", &ModelOptions::default()).unwrap_err();
    assert!(e.to_string().contains("pyramid"), "{e}");
    let opts = ModelOptions {
        skip_unsupported: true,
        ..ModelOptions::default()
    };
    let (model, notes) = build_model(&g, "pyr.msh", &opts).unwrap();
    assert_eq!(model.mesh.element_count(), 1);
    assert_eq!(notes.skipped, vec![(14, 1)]);
}

/// Every prefix of an ASCII and a binary file, and bytes overwritten with junk, give an error
/// or a grid, never a panic.
#[test]
fn truncated_and_corrupted_files_never_panic() {
    let files = [
        ASCII_2D.as_bytes().to_vec(),
        binary_tet10(false, 8),
        binary_tet10(true, 4),
    ];
    for bytes in &files {
        for cut in 0..bytes.len() {
            let _ = read_msh_bytes(&bytes[..cut], "cut.msh");
        }
        assert!(read_msh_bytes(&bytes[..bytes.len() / 2], "cut.msh").is_err());
        // Deterministic corruption: each position in turn set to a few nasty values.
        for i in 0..bytes.len() {
            for junk in [0u8, 0xff, b'9', b'$', b'\n', b'-'] {
                let mut b = bytes.clone();
                b[i] = junk;
                let _ = read_msh_bytes(&b, "junk.msh");
            }
        }
    }
}

#[test]
fn sparse_tags_use_the_sorted_index() {
    let tags = [5u64, 1_000_000_000, 17];
    let idx = TagIndex::new(&tags).unwrap();
    assert!(matches!(idx, TagIndex::Sorted(_)));
    assert_eq!(idx.get(1_000_000_000), Some(1));
    assert_eq!(idx.get(17), Some(2));
    assert_eq!(idx.get(6), None);
    assert_eq!(TagIndex::new(&[3, 9, 3]).err(), Some(3));
    let dense = TagIndex::new(&[4, 2, 3]).unwrap();
    assert!(matches!(dense, TagIndex::Dense { .. }));
    assert_eq!(dense.get(2), Some(1));
    assert_eq!(dense.get(1), None);
    assert_eq!(dense.get(u64::MAX), None);
}
