//! Gmsh element types: node counts, dimensions, the matching VTK cell type and the node
//! permutation between the two orderings (formats notes 1.5 and 2.3).
//!
//! Permutations follow `VTK[k] = Gmsh[p[k]]`; the inverse `Gmsh[j] = VTK[q[j]]` is computed
//! from `p`, so each ordering is written down once.

use crate::element::{ElementKind, MAX_NODES};

/// One Gmsh element type.
#[derive(Copy, Clone, Debug)]
pub(crate) struct GmshType {
    /// Gmsh's type number.
    pub gmsh: i32,
    /// A short name for messages.
    pub name: &'static str,
    /// Nodes per element.
    pub nodes: usize,
    /// Topological dimension (0 point, 1 line, 2 surface, 3 volume).
    pub dim: usize,
    /// VTK cell type with the same nodes, if VTK has one.
    pub vtk: Option<u8>,
    /// `VTK[k] = Gmsh[p[k]]`; empty for the identity.
    pub p: &'static [usize],
}

const TET10_P: &[usize] = &[0, 1, 2, 3, 4, 5, 6, 7, 9, 8];
const HEX20_P: &[usize] = &[
    0, 1, 2, 3, 4, 5, 6, 7, 8, 11, 13, 9, 16, 18, 19, 17, 10, 12, 14, 15,
];
const HEX27_P: &[usize] = &[
    0, 1, 2, 3, 4, 5, 6, 7, 8, 11, 13, 9, 16, 18, 19, 17, 10, 12, 14, 15, 22, 23, 21, 24, 20, 25,
    26,
];
/// Corners kept as Gmsh writes them (the model builder mirrors wedges of the other handedness).
const PRISM15_P: &[usize] = &[0, 1, 2, 3, 4, 5, 6, 9, 7, 12, 14, 13, 8, 10, 11];
/// As the 15-node prism, then the quad-face centres: VTK's 32 lists faces (0,1,4,3),
/// (1,2,5,4), (2,0,3,5), Gmsh (0,1,4,3), (0,2,5,3), (1,2,5,4) (from memory of VTK's
/// vtkBiQuadraticQuadraticWedge; hone has no element for it, such cells are only reported).
const PRISM18_P: &[usize] = &[0, 1, 2, 3, 4, 5, 6, 9, 7, 12, 14, 13, 8, 10, 11, 15, 17, 16];
const PYRAMID13_P: &[usize] = &[0, 1, 2, 3, 4, 5, 8, 10, 6, 7, 9, 11, 12];

const fn t(
    gmsh: i32,
    name: &'static str,
    nodes: usize,
    dim: usize,
    vtk: Option<u8>,
    p: &'static [usize],
) -> GmshType {
    GmshType {
        gmsh,
        name,
        nodes,
        dim,
        vtk,
        p,
    }
}

/// The Gmsh types this reader knows the size of. Types without a VTK id can still be skipped
/// when they are of a lower dimension than the mesh.
const TYPES: &[GmshType] = &[
    t(1, "2-node line", 2, 1, Some(3), &[]),
    t(2, "3-node triangle", 3, 2, Some(5), &[]),
    t(3, "4-node quadrangle", 4, 2, Some(9), &[]),
    t(4, "4-node tetrahedron", 4, 3, Some(10), &[]),
    t(5, "8-node hexahedron", 8, 3, Some(12), &[]),
    t(6, "6-node prism", 6, 3, Some(13), &[]),
    t(7, "5-node pyramid", 5, 3, Some(14), &[]),
    t(8, "3-node line", 3, 1, Some(21), &[]),
    t(9, "6-node triangle", 6, 2, Some(22), &[]),
    t(10, "9-node quadrangle", 9, 2, Some(28), &[]),
    t(11, "10-node tetrahedron", 10, 3, Some(24), TET10_P),
    t(12, "27-node hexahedron", 27, 3, Some(29), HEX27_P),
    t(13, "18-node prism", 18, 3, Some(32), PRISM18_P),
    t(14, "14-node pyramid", 14, 3, None, &[]),
    t(15, "1-node point", 1, 0, Some(1), &[]),
    t(16, "8-node quadrangle", 8, 2, Some(23), &[]),
    t(17, "20-node hexahedron", 20, 3, Some(25), HEX20_P),
    t(18, "15-node prism", 15, 3, Some(26), PRISM15_P),
    t(19, "13-node pyramid", 13, 3, Some(27), PYRAMID13_P),
    t(20, "9-node triangle", 9, 2, None, &[]),
    t(21, "10-node triangle", 10, 2, None, &[]),
    t(26, "4-node line", 4, 1, None, &[]),
    t(27, "5-node line", 5, 1, None, &[]),
    t(28, "6-node line", 6, 1, None, &[]),
    t(29, "20-node tetrahedron", 20, 3, None, &[]),
    t(36, "16-node quadrangle", 16, 2, None, &[]),
    t(92, "64-node hexahedron", 64, 3, None, &[]),
];

/// The Gmsh type with this number, if the reader knows it.
pub(crate) fn gmsh_type(number: i32) -> Option<&'static GmshType> {
    TYPES.iter().find(|t| t.gmsh == number)
}

/// Gmsh type number written for an element kind.
pub(crate) fn gmsh_number(kind: ElementKind) -> i32 {
    use ElementKind::*;
    match kind {
        Tri3 => 2,
        Tri6 => 9,
        Quad4 => 3,
        Quad8 => 16,
        Quad9 => 10,
        Tet4 => 4,
        Tet10 => 11,
        Hex8 => 5,
        Hex20 => 17,
        Hex27 => 12,
        Wedge6 => 6,
        Wedge15 => 18,
    }
}

/// `q` with `Gmsh[j] = VTK[q[j]]` for writing a hone element (VTK order, positive Jacobian) as
/// Gmsh's type. Wedges are mirrored on the way so that Gmsh sees its own handedness (its prism's
/// face (0,1,2) faces the opposite triangle, VTK's faces away from it): reading the file back
/// keeps those corners and the model builder mirrors them again, giving the original element.
pub(crate) fn vtk_to_gmsh(kind: ElementKind) -> [usize; MAX_NODES] {
    let n = kind.node_count();
    let mut q = [0usize; MAX_NODES];
    let ty = gmsh_type(gmsh_number(kind));
    let p = ty.map_or(&[][..], |t| t.p);
    for k in 0..n {
        let g = if p.is_empty() { k } else { p[k] };
        q[g] = k;
    }
    if matches!(kind, ElementKind::Wedge6 | ElementKind::Wedge15) {
        let flip = kind.orientation_flip();
        for v in q.iter_mut().take(n) {
            *v = flip[*v];
        }
    }
    q
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn permutations_are_permutations_of_the_right_length() {
        for t in TYPES {
            if t.p.is_empty() {
                continue;
            }
            assert_eq!(t.p.len(), t.nodes, "{}", t.name);
            let mut seen = vec![false; t.nodes];
            for &i in t.p {
                assert!(!seen[i], "{}", t.name);
                seen[i] = true;
            }
        }
    }

    #[test]
    fn written_kinds_read_back_as_the_same_vtk_type() {
        for kind in ElementKind::ALL {
            let ty = gmsh_type(gmsh_number(kind)).expect("known type");
            assert_eq!(ty.vtk, Some(kind.vtk_id()));
            assert_eq!(ty.nodes, kind.node_count());
            assert_eq!(ty.dim, kind.dim());
        }
    }

    /// Formats notes 1.5 list q for the 20-node hexahedron and the mirrored 15-node wedge; the
    /// inversion of p must reproduce them.
    #[test]
    fn inverse_matches_the_listed_q() {
        let q = vtk_to_gmsh(ElementKind::Hex20);
        assert_eq!(
            &q[..20],
            &[0, 1, 2, 3, 4, 5, 6, 7, 8, 11, 16, 9, 17, 10, 18, 19, 12, 15, 13, 14]
        );
        let q = vtk_to_gmsh(ElementKind::Wedge15);
        assert_eq!(
            &q[..15],
            &[0, 2, 1, 3, 5, 4, 8, 6, 12, 7, 14, 13, 11, 9, 10]
        );
        let q = vtk_to_gmsh(ElementKind::Hex27);
        assert_eq!(&q[20..27], &[24, 22, 20, 21, 23, 25, 26]);
    }
}
