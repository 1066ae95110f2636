//! Element library: the finite-element kinds hone understands, with their reference geometry,
//! shape functions, quadrature rules, SPR sampling points and boundary facets.
//!
//! Glossary of symbols used throughout this module:
//! * `xi = (xi, eta, zeta)`: natural (reference) coordinates; for simplices `(r, s[, t])` with the
//!   barycentric coordinates `L0 = 1 - r - s [- t]`, `L1 = r`, `L2 = s` [, `L3 = t`].
//! * `N_i(xi)`: shape function of local node `i`; `dN_i/dxi_j` its reference gradient.
//! * `J_ab = dx_b/dxi_a`: Jacobian of the isoparametric map `x(xi) = sum_i N_i(xi) x_i`.
//!
//! Node order is VTK's for every kind (`vtkCellType.h` ids and the corner / mid-node order of the
//! VTK cell classes). Each kind is described by one constant `KindInfo` record in its family file
//! (`triangle.rs`, `quadrilateral.rs`, `tetrahedron.rs`, `hexahedron.rs`, `wedge.rs`); the single
//! `match` in `ElementKind::info` is the only place that dispatches on the kind.

pub mod gauss;
mod geometry;
mod hexahedron;
mod patch_basis;
mod quadrature;
mod quadrilateral;
mod shape;
mod table;
mod tetrahedron;
mod triangle;
mod vtk_names;
mod wedge;

#[cfg(test)]
pub(crate) mod tests;

pub use geometry::{
    interpolate_point, inverse_map, invert_jacobian, jacobian_determinant, map_gradients,
    mid_nodes_at_midpoints,
};
pub use patch_basis::PatchBasis;
pub use quadrature::{QuadraturePoint, Rule};
pub use table::{ShapeTable, TableRule};
pub use vtk_names::vtk_cell_type_name;

use quadrature::RuleSpec;

/// Largest node count of any kind (the 27-node hexahedron); lets callers size stack buffers.
pub const MAX_NODES: usize = 27;

/// Largest number of quadrature or sampling points of any rule (3x3x3 Gauss on hexahedra).
pub const MAX_POINTS: usize = 27;

/// The supported element kinds. Names follow the node count; node order is VTK's.
#[derive(Copy, Clone, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum ElementKind {
    /// Linear triangle, 3 nodes (VTK 5).
    Tri3,
    /// Quadratic triangle, 6 nodes (VTK 22).
    Tri6,
    /// Bilinear quadrilateral, 4 nodes (VTK 9).
    Quad4,
    /// Serendipity quadratic quadrilateral, 8 nodes (VTK 23).
    Quad8,
    /// Biquadratic Lagrange quadrilateral, 9 nodes (VTK 28).
    Quad9,
    /// Linear tetrahedron, 4 nodes (VTK 10).
    Tet4,
    /// Quadratic tetrahedron, 10 nodes (VTK 24).
    Tet10,
    /// Trilinear hexahedron, 8 nodes (VTK 12).
    Hex8,
    /// Serendipity quadratic hexahedron, 20 nodes (VTK 25).
    Hex20,
    /// Triquadratic Lagrange hexahedron, 27 nodes (VTK 29).
    Hex27,
    /// Linear wedge (triangular prism), 6 nodes (VTK 13).
    Wedge6,
    /// Serendipity quadratic wedge, 15 nodes (VTK 26).
    Wedge15,
}

/// A boundary entity of the element (an edge of a 2D element, a face of a 3D element).
///
/// `corners`: corner nodes, ordered so that for 3D elements the right-hand normal points out of
/// the element, and for 2D elements (counter-clockwise element) the edge runs counter-clockwise.
/// `nodes`: all nodes on the facet, corners first, then the mid nodes of the facet's edges in the
/// cyclic order `(c0,c1), (c1,c2), ...`, then the face centre node (27-node hexahedron only).
#[derive(Copy, Clone, Debug)]
pub struct Facet {
    /// Corner nodes (local indices), outward / counter-clockwise ordered.
    pub corners: &'static [usize],
    /// All nodes on the facet: corners, edge mid nodes, face centre.
    pub nodes: &'static [usize],
}

/// Reference-element shape shared by the kinds of one family.
#[derive(Copy, Clone, Debug, PartialEq, Eq)]
pub(crate) enum Family {
    /// Unit triangle `r, s >= 0, r + s <= 1`.
    Triangle,
    /// Square `[-1, 1]^2`.
    Quadrilateral,
    /// Unit tetrahedron `r, s, t >= 0, r + s + t <= 1`.
    Tetrahedron,
    /// Cube `[-1, 1]^3`.
    Hexahedron,
    /// Unit triangle in `(r, s)` times `t` in `[-1, 1]`.
    Wedge,
}

/// Evaluates shape functions and reference gradients together at one natural point.
pub(crate) type EvalFn = fn([f64; 3], &mut [f64], &mut [[f64; 3]]);

/// Everything constant about one element kind. One record per kind, defined in the family file.
pub(crate) struct KindInfo {
    pub name: &'static str,
    pub family: Family,
    pub vtk_id: u8,
    pub dim: usize,
    pub order: usize,
    pub vertex_count: usize,
    pub reference_nodes: &'static [[f64; 3]],
    pub reference_measure: f64,
    pub eval: EvalFn,
    pub edges: &'static [[usize; 2]],
    pub edge_mid_nodes: &'static [usize],
    pub facets: &'static [Facet],
    /// Node permutation that mirrors the element (see `ElementKind::orientation_flip`).
    pub flip: &'static [usize],
    pub patch_basis: PatchBasis,
    pub full: RuleSpec,
    pub reduced: RuleSpec,
    pub sampling: RuleSpec,
}

impl ElementKind {
    /// Every kind, in declaration order (also the order of [`ElementKind::index`]).
    pub const ALL: [ElementKind; 12] = [
        ElementKind::Tri3,
        ElementKind::Tri6,
        ElementKind::Quad4,
        ElementKind::Quad8,
        ElementKind::Quad9,
        ElementKind::Tet4,
        ElementKind::Tet10,
        ElementKind::Hex8,
        ElementKind::Hex20,
        ElementKind::Hex27,
        ElementKind::Wedge6,
        ElementKind::Wedge15,
    ];

    /// The constant record of this kind: the one dispatch point of the module.
    pub(crate) fn info(self) -> &'static KindInfo {
        match self {
            ElementKind::Tri3 => &triangle::TRI3,
            ElementKind::Tri6 => &triangle::TRI6,
            ElementKind::Quad4 => &quadrilateral::QUAD4,
            ElementKind::Quad8 => &quadrilateral::QUAD8,
            ElementKind::Quad9 => &quadrilateral::QUAD9,
            ElementKind::Tet4 => &tetrahedron::TET4,
            ElementKind::Tet10 => &tetrahedron::TET10,
            ElementKind::Hex8 => &hexahedron::HEX8,
            ElementKind::Hex20 => &hexahedron::HEX20,
            ElementKind::Hex27 => &hexahedron::HEX27,
            ElementKind::Wedge6 => &wedge::WEDGE6,
            ElementKind::Wedge15 => &wedge::WEDGE15,
        }
    }

    /// Position of this kind in [`ElementKind::ALL`] (for per-kind arrays and caches).
    pub fn index(self) -> usize {
        self as usize
    }

    /// Short lower-case name: "tri3", "tri6", "quad4", ..., "wedge15".
    pub fn name(self) -> &'static str {
        self.info().name
    }

    /// Inverse of [`ElementKind::name`]; `None` for an unknown name.
    pub fn from_name(s: &str) -> Option<ElementKind> {
        Self::ALL.into_iter().find(|k| k.name() == s)
    }

    /// Kind of a VTK cell type id (`vtkCellType.h`); `None` for ids hone does not support.
    pub fn from_vtk_id(id: u8) -> Option<ElementKind> {
        Self::ALL.into_iter().find(|k| k.vtk_id() == id)
    }

    /// VTK cell type id of this kind (`vtkCellType.h`).
    pub fn vtk_id(self) -> u8 {
        self.info().vtk_id
    }

    /// Number of nodes.
    pub fn node_count(self) -> usize {
        self.info().reference_nodes.len()
    }

    /// Number of corner (vertex) nodes; they come first in VTK order.
    pub fn vertex_count(self) -> usize {
        self.info().vertex_count
    }

    /// Spatial dimension of the reference element: 2 or 3.
    pub fn dim(self) -> usize {
        self.info().dim
    }

    /// Polynomial degree p of the displacement interpolation along an edge (1 or 2).
    pub fn order(self) -> usize {
        self.info().order
    }

    /// Natural coordinates of each node, in VTK order (third entry 0 in 2D).
    pub fn reference_nodes(self) -> &'static [[f64; 3]] {
        self.info().reference_nodes
    }

    /// The linear kind of the same family (tri3, quad4, tet4, hex8, wedge6): the corners of
    /// this kind, in the same order, interpolated linearly. Size fields live on the corners.
    pub fn linear(self) -> ElementKind {
        match self.info().family {
            Family::Triangle => ElementKind::Tri3,
            Family::Quadrilateral => ElementKind::Quad4,
            Family::Tetrahedron => ElementKind::Tet4,
            Family::Hexahedron => ElementKind::Hex8,
            Family::Wedge => ElementKind::Wedge6,
        }
    }

    /// Area or volume of a well-shaped element of this family with every edge of length `h`:
    /// equilateral triangle `sqrt(3)/4 h^2`, square `h^2`, regular tetrahedron
    /// `h^3 / (6 sqrt(2))`, cube `h^3`, right prism on an equilateral triangle `sqrt(3)/4 h^3`
    /// (elementary geometry). A mesher asked for edge length h fills a region of measure V with
    /// about `V / regular_measure(h)` elements.
    pub fn regular_measure(self, h: f64) -> f64 {
        match self.info().family {
            Family::Triangle => 3f64.sqrt() / 4.0 * h * h,
            Family::Quadrilateral => h * h,
            Family::Tetrahedron => h * h * h / (6.0 * 2f64.sqrt()),
            Family::Hexahedron => h * h * h,
            Family::Wedge => 3f64.sqrt() / 4.0 * h * h * h,
        }
    }

    /// Area (2D) or volume (3D) of the reference element: 1/2 for the unit triangle, 4 for
    /// [-1,1]^2, 1/6 for the unit tetrahedron, 8 for [-1,1]^3, 1 for the unit triangle x [-1,1].
    pub fn reference_measure(self) -> f64 {
        self.info().reference_measure
    }

    /// Writes the shape functions `N_i(xi)` into `n[..node_count]`.
    pub fn shape_functions(self, xi: [f64; 3], n: &mut [f64]) {
        let mut dn = [[0.0; 3]; MAX_NODES];
        (self.info().eval)(xi, n, &mut dn);
    }

    /// Writes the reference gradients `dN_i/dxi_j` into `dn[..node_count]` (third entry 0 in 2D).
    pub fn shape_gradients(self, xi: [f64; 3], dn: &mut [[f64; 3]]) {
        let mut n = [0.0; MAX_NODES];
        (self.info().eval)(xi, &mut n, dn);
    }

    /// Writes both shape functions and reference gradients in one pass (cheaper than calling
    /// [`ElementKind::shape_functions`] and [`ElementKind::shape_gradients`]).
    pub fn shape_functions_and_gradients(self, xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
        (self.info().eval)(xi, n, dn);
    }

    /// Quadrature rule on the reference element. `Full` integrates the product of two fields
    /// interpolated by the element exactly on an affine element (degree 2p for simplices,
    /// p + 1 Gauss points per direction otherwise); `Reduced` is one order lower. Weights sum to
    /// [`ElementKind::reference_measure`].
    pub fn quadrature(self, rule: Rule) -> &'static [QuadraturePoint] {
        quadrature::cached(self, rule)
    }

    /// SPR sampling points (natural coordinates): where the FE gradient is most accurate
    /// (Zienkiewicz & Zhu 1992; Barlow 1976). See the project's methods notes, sections 1.2 and 7.
    pub fn sampling_points(self) -> &'static [[f64; 3]] {
        quadrature::cached_sampling(self)
    }

    /// Polynomial basis used when fitting SPR patches of this kind.
    pub fn patch_basis(self) -> PatchBasis {
        self.info().patch_basis
    }

    /// Vertex-to-vertex edges as pairs of local corner indices (tri 3, quad 4, tet 6, hex 12,
    /// wedge 9), in the order of VTK's mid-edge nodes.
    pub fn edges(self) -> &'static [[usize; 2]] {
        self.info().edges
    }

    /// For quadratic kinds, the mid node of `edges()[i]`; empty for linear kinds.
    pub fn edge_mid_nodes(self) -> &'static [usize] {
        self.info().edge_mid_nodes
    }

    /// Boundary facets: edges of 2D elements, faces of 3D elements, outward ordered.
    pub fn facets(self) -> &'static [Facet] {
        self.info().facets
    }

    /// Node permutation `p` that mirrors the element: the cell with nodes `old[p[k]]` has the
    /// opposite orientation, so a cell whose Jacobian is negative everywhere (written with the
    /// other handedness) becomes positive. Mid nodes follow their edges. Useful for wedges,
    /// whose orientation in files depends on the writer (see `wedge.rs`).
    pub fn orientation_flip(self) -> &'static [usize] {
        self.info().flip
    }

    /// Shape functions and gradients tabulated at the points of `rule`, computed once and cached.
    pub fn table(self, rule: TableRule) -> &'static ShapeTable {
        table::cached(self, rule)
    }

    /// Whether natural coordinates `xi` lie inside the reference element, allowing an overshoot
    /// of `tol` (in natural units) past every bounding plane (a negative `tol` demands a margin).
    pub fn contains_natural(self, xi: [f64; 3], tol: f64) -> bool {
        let [r, s, t] = xi;
        let inside_interval = |x: f64| (-1.0 - tol..=1.0 + tol).contains(&x);
        let inside_triangle = r >= -tol && s >= -tol && r + s <= 1.0 + tol;
        match self.info().family {
            Family::Triangle => inside_triangle,
            Family::Quadrilateral => inside_interval(r) && inside_interval(s),
            Family::Tetrahedron => r >= -tol && s >= -tol && t >= -tol && r + s + t <= 1.0 + tol,
            Family::Hexahedron => inside_interval(r) && inside_interval(s) && inside_interval(t),
            Family::Wedge => inside_triangle && inside_interval(t),
        }
    }
}

impl std::fmt::Display for ElementKind {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.name())
    }
}
