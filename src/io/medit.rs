//! MEDIT text mesh (`.mesh`) and solution (`.sol`) files carrying a nodal size field.

use std::path::Path;

use super::error::IoError;
use super::text_out::{push_int, write_chunked, NodeText};
use super::write_atomically;
use crate::element::ElementKind;
use crate::mesh::Mesh;

/// MEDIT keyword of the linear element with the corners of `kind`.
fn keyword(kind: ElementKind) -> &'static str {
    use ElementKind::*;
    match kind {
        Tri3 | Tri6 => "Triangles",
        Quad4 | Quad8 | Quad9 => "Quadrilaterals",
        Tet4 | Tet10 => "Tetrahedra",
        Hex8 | Hex20 | Hex27 => "Hexahedra",
        Wedge6 | Wedge15 => "Prisms",
    }
}

/// Writes `mesh` as a MEDIT `.mesh` file at `mesh_path` and the size field `sizes` (one target
/// edge length per mesh node) as a `.sol` file at `sol_path`, both atomically, refusing to
/// overwrite `protect` (the input file).
///
/// The `.mesh` (`MeshVersionFormatted 2`, `Dimension` 2 or 3) holds the corner nodes only,
/// renumbered 1.. in increasing hone node order with reference 0 (2D: `x y ref`), and every
/// element as its linear counterpart (`Triangles`, `Quadrilaterals`, `Tetrahedra`, `Hexahedra`,
/// `Prisms`, corners in hone's VTK order) with the element's zone id as reference (negative
/// zones written as 0). Mid-side nodes are dropped. The `.sol` holds `SolAtVertices`, one
/// scalar per vertex in the same numbering. The remesher MMG adapts simplices only (triangles,
/// tetrahedra): meshes with quadrilaterals, hexahedra or prisms are written faithfully but are
/// not remeshable by it.
pub fn write_medit_size_field(
    mesh_path: &Path,
    sol_path: &Path,
    protect: Option<&Path>,
    mesh: &Mesh,
    sizes: &[f64],
) -> Result<(), IoError> {
    let text = NodeText::checked(sol_path, mesh, sizes)?;
    write_medit_text(mesh_path, sol_path, protect, mesh, &text)
}

/// [`write_medit_size_field`] with the numbers already formatted and checked.
pub(crate) fn write_medit_text(
    mesh_path: &Path,
    sol_path: &Path,
    protect: Option<&Path>,
    mesh: &Mesh,
    text: &NodeText,
) -> Result<(), IoError> {
    let corners = text.corners();
    let dim = mesh.dimension;
    let header = format!("MeshVersionFormatted 2\n\nDimension {dim}\n\n");
    write_atomically(mesh_path, protect, |w| {
        w.write_all(header.as_bytes())?;
        w.write_all(format!("Vertices\n{}\n", corners.len()).as_bytes())?;
        write_chunked(w, corners.len(), |r, buf| {
            for k in r {
                for c in 0..dim {
                    text.push_corner_coord(buf, k, c);
                    buf.push(b' ');
                }
                buf.extend_from_slice(b"0\n");
            }
        })?;
        for kw in [
            "Triangles",
            "Quadrilaterals",
            "Tetrahedra",
            "Hexahedra",
            "Prisms",
        ] {
            let blocks: Vec<_> = mesh
                .blocks
                .iter()
                .filter(|b| keyword(b.kind) == kw)
                .collect();
            let count: usize = blocks.iter().map(|b| b.len()).sum();
            if count == 0 {
                continue;
            }
            w.write_all(format!("\n{kw}\n{count}\n").as_bytes())?;
            for b in blocks {
                let nv = b.kind.vertex_count();
                write_chunked(w, b.len(), |r, buf| {
                    for i in r {
                        for &v in &b.cell(i)[..nv] {
                            push_int(buf, text.number(v));
                            buf.push(b' ');
                        }
                        let zone = mesh.zone[b.first_element + i].clamp(0, i32::MAX as i64);
                        push_int(buf, zone);
                        buf.push(b'\n');
                    }
                })?;
            }
        }
        w.write_all(b"\nEnd\n")
    })?;
    write_atomically(sol_path, protect, |w| {
        w.write_all(header.as_bytes())?;
        w.write_all(format!("SolAtVertices\n{}\n1 1\n\n", corners.len()).as_bytes())?;
        write_chunked(w, corners.len(), |r, buf| {
            for k in r {
                text.push_corner_size(buf, k);
                buf.push(b'\n');
            }
        })?;
        w.write_all(b"\nEnd\n")
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::mesh::generate::structured;

    /// Reads back the written text: vertex count and coordinates, cells with corner numbers
    /// and references, and the solution values, against the mesh they came from.
    #[test]
    fn writes_corners_cells_and_sizes() {
        let dir = tempfile::tempdir().unwrap();
        for kind in ElementKind::ALL {
            let mut mesh = structured(kind, [2, 1, 1], [2.0, 1.0, 1.0]);
            let e = mesh.element_count();
            mesh.zone = (0..e as i64).map(|z| z - 1).collect();
            let sizes: Vec<f64> = mesh.points.iter().map(|p| 0.1 + p[0] / 3.0).collect();
            let (mp, sp) = (dir.path().join("m.mesh"), dir.path().join("m.sol"));
            write_medit_size_field(&mp, &sp, None, &mesh, &sizes).unwrap();
            let text = std::fs::read_to_string(&mp).unwrap();
            let tokens: Vec<&str> = text.split_whitespace().collect();
            let at = |k: &str| tokens.iter().position(|t| *t == k).unwrap();
            let dim = mesh.dimension;
            assert_eq!(tokens[at("Dimension") + 1], dim.to_string());
            let v0 = at("Vertices");
            let nv: usize = tokens[v0 + 1].parse().unwrap();
            let coords: Vec<Vec<f64>> = (0..nv)
                .map(|i| {
                    let row = &tokens[v0 + 2 + i * (dim + 1)..v0 + 2 + (i + 1) * (dim + 1)];
                    assert_eq!(row[dim], "0");
                    row[..dim].iter().map(|t| t.parse().unwrap()).collect()
                })
                .collect();
            let c0 = at(keyword(kind));
            let nc: usize = tokens[c0 + 1].parse().unwrap();
            assert_eq!(nc, e, "{}", kind.name());
            let per = kind.vertex_count() + 1;
            for i in 0..nc {
                let row = &tokens[c0 + 2 + i * per..c0 + 2 + (i + 1) * per];
                let (_, cell) = mesh.element(i);
                for (j, t) in row[..per - 1].iter().enumerate() {
                    let v: usize = t.parse().unwrap();
                    let p = mesh.points[cell[j] as usize];
                    assert_eq!(coords[v - 1][..], p[..dim], "{}", kind.name());
                }
                assert_eq!(row[per - 1], (i as i64 - 1).max(0).to_string());
            }
            assert_eq!(*tokens.last().unwrap(), "End");
            let sol = std::fs::read_to_string(&sp).unwrap();
            let st: Vec<&str> = sol.split_whitespace().collect();
            let s0 = st.iter().position(|t| *t == "SolAtVertices").unwrap();
            assert_eq!(st[s0 + 1], nv.to_string());
            assert_eq!((st[s0 + 2], st[s0 + 3]), ("1", "1"));
            for (i, c) in coords.iter().enumerate() {
                let h: f64 = st[s0 + 4 + i].parse().unwrap();
                assert_eq!(h, 0.1 + c[0] / 3.0);
            }
            assert_eq!(st[s0 + 4 + nv], "End");
        }
    }

    #[test]
    fn refuses_a_size_field_of_the_wrong_length() {
        let dir = tempfile::tempdir().unwrap();
        let mesh = structured(ElementKind::Tri3, [1, 1, 1], [1.0, 1.0, 1.0]);
        let (mp, sp) = (dir.path().join("m.mesh"), dir.path().join("m.sol"));
        let e = write_medit_size_field(&mp, &sp, None, &mesh, &[1.0]).unwrap_err();
        assert!(e.to_string().contains("one per mesh node"), "{e}");
        assert!(!mp.exists() && !sp.exists());
    }
}
