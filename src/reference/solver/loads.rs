//! Consistent nodal forces of tractions on boundary facets, and point loads.
//!
//! A facet's nodes (`Facet::nodes`: corners, then edge mid nodes in edge order, then a face
//! centre) are in the VTK order of a lower-dimensional kind: 2- or 3-node lines (ends, then the
//! middle) for 2D elements, tri3/tri6/quad4/quad8/quad9 for 3D elements. On that facet
//! `f_i = integral N_i t(x, n) dGamma`, by Gauss quadrature on the facet's own reference element:
//! `dGamma = |dx/ds| ds` on lines, `|dx/dxi x dx/deta| dxi deta` on faces, times the thickness
//! (plane stress) or `2 pi r` (axisymmetric) (common practice). Four points per direction make
//! the forces exact for a quadratic traction on a straight quadratic facet.
//!
//! Outward normals: 2D edges of a counter-clockwise element run counter-clockwise, so the outward
//! normal of tangent `(t_x, t_y)` is `(t_y, -t_x)/|t|`; face corners are ordered so that
//! `dx/dxi x dx/deta` points out of the element.

use super::{SolveError, TractionLoad};
use crate::element::gauss::{gauss_legendre, reference_rule};
use crate::element::{ElementKind, MAX_NODES};
use crate::material::AnalysisMode;
use crate::mesh::Mesh;

/// Gauss points per direction on a facet.
const FACET_POINTS: usize = 4;

/// A quadrature rule: natural coordinates and weights.
type Rule = Vec<([f64; 3], f64)>;

/// The reference shape of an element's facet.
#[derive(Copy, Clone, Debug, PartialEq, Eq)]
pub enum FacetShape {
    /// Two-node line (VTK 3): ends at s = -1 and s = +1.
    Line2,
    /// Three-node line (VTK 21): ends at s = -1, +1, then the middle at s = 0.
    Line3,
    /// A face with the shape functions and node order of this 2D kind.
    Face(ElementKind),
}

impl FacetShape {
    /// Number of nodes.
    pub fn node_count(self) -> usize {
        match self {
            FacetShape::Line2 => 2,
            FacetShape::Line3 => 3,
            FacetShape::Face(kind) => kind.node_count(),
        }
    }

    /// Shape functions and reference gradients (`dn[i][0]` along s or xi, `dn[i][1]` along
    /// eta) at natural point `xi`.
    pub fn evaluate(self, xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
        let s = xi[0];
        match self {
            FacetShape::Line2 => {
                n[..2].copy_from_slice(&[0.5 * (1.0 - s), 0.5 * (1.0 + s)]);
                dn[0] = [-0.5, 0.0, 0.0];
                dn[1] = [0.5, 0.0, 0.0];
            }
            FacetShape::Line3 => {
                n[..3].copy_from_slice(&[0.5 * s * (s - 1.0), 0.5 * s * (s + 1.0), 1.0 - s * s]);
                dn[0] = [s - 0.5, 0.0, 0.0];
                dn[1] = [s + 0.5, 0.0, 0.0];
                dn[2] = [-2.0 * s, 0.0, 0.0];
            }
            FacetShape::Face(kind) => kind.shape_functions_and_gradients(xi, n, dn),
        }
    }

    /// Natural coordinates of the facet's own nodes, in its node order.
    pub fn reference_nodes(self) -> Vec<[f64; 3]> {
        match self {
            FacetShape::Line2 => vec![[-1.0, 0.0, 0.0], [1.0, 0.0, 0.0]],
            FacetShape::Line3 => vec![[-1.0, 0.0, 0.0], [1.0, 0.0, 0.0], [0.0, 0.0, 0.0]],
            FacetShape::Face(kind) => kind.reference_nodes().to_vec(),
        }
    }

    /// The facet quadrature rule used for tractions.
    pub fn rule(self) -> Rule {
        match self {
            FacetShape::Line2 | FacetShape::Line3 => {
                let (x, w) = gauss_legendre(FACET_POINTS);
                x.into_iter()
                    .zip(w)
                    .map(|(x, w)| ([x, 0.0, 0.0], w))
                    .collect()
            }
            FacetShape::Face(kind) => reference_rule(kind, FACET_POINTS),
        }
    }
}

/// The shape of local facet `facet` of `kind`, or `None` when the kind has no such facet.
pub fn facet_shape(kind: ElementKind, facet: usize) -> Option<FacetShape> {
    let f = kind.facets().get(facet)?;
    let shape = match (kind.dim(), f.nodes.len()) {
        (2, 2) => FacetShape::Line2,
        (2, 3) => FacetShape::Line3,
        (3, 3) => FacetShape::Face(ElementKind::Tri3),
        (3, 6) => FacetShape::Face(ElementKind::Tri6),
        (3, 4) => FacetShape::Face(ElementKind::Quad4),
        (3, 8) => FacetShape::Face(ElementKind::Quad8),
        (3, 9) => FacetShape::Face(ElementKind::Quad9),
        _ => return None,
    };
    Some(shape)
}

/// Adds the consistent nodal forces of `load` to `forces` (one entry per dof, `ndim` per node).
pub(super) fn add_traction(
    mesh: &Mesh,
    mode: AnalysisMode,
    ndim: usize,
    load: &TractionLoad,
    forces: &mut [f64],
) -> Result<(), SolveError> {
    let mut rules: Vec<(FacetShape, Rule)> = Vec::new();
    for &(e, f) in &load.facets {
        if e as usize >= mesh.element_count() {
            return Err(SolveError::Load(format!(
                "traction on element {e}: the mesh has {} elements",
                mesh.element_count()
            )));
        }
        let (kind, nodes) = mesh.element(e as usize);
        let Some(shape) = facet_shape(kind, f as usize) else {
            return Err(SolveError::Load(format!(
                "traction on element {e}, facet {f}: a {kind} has {} facets",
                kind.facets().len()
            )));
        };
        let rule_index = match rules.iter().position(|(s, _)| *s == shape) {
            Some(i) => i,
            None => {
                rules.push((shape, shape.rule()));
                rules.len() - 1
            }
        };
        let rule = &rules[rule_index].1;
        let local = kind.facets()[f as usize].nodes;
        let m = local.len();
        let mut coords = [[0.0; 3]; MAX_NODES];
        for (i, &l) in local.iter().enumerate() {
            coords[i] = mesh.points[nodes[l] as usize];
        }
        let mut n = [0.0; MAX_NODES];
        let mut dn = [[0.0; 3]; MAX_NODES];
        for &(xi, w) in rule {
            shape.evaluate(xi, &mut n[..m], &mut dn[..m]);
            let mut x = [0.0; 3];
            let mut t1 = [0.0; 3];
            let mut t2 = [0.0; 3];
            for i in 0..m {
                for c in 0..3 {
                    x[c] += n[i] * coords[i][c];
                    t1[c] += dn[i][0] * coords[i][c];
                    t2[c] += dn[i][1] * coords[i][c];
                }
            }
            let normal = if kind.dim() == 2 {
                [t1[1], -t1[0], 0.0]
            } else {
                [
                    t1[1] * t2[2] - t1[2] * t2[1],
                    t1[2] * t2[0] - t1[0] * t2[2],
                    t1[0] * t2[1] - t1[1] * t2[0],
                ]
            };
            let measure = normal.iter().map(|v| v * v).sum::<f64>().sqrt();
            if !(measure.is_finite() && measure > 0.0) {
                return Err(SolveError::Load(format!(
                    "traction on element {e} (file cell {}), facet {f}: the facet is degenerate",
                    mesh.file_cell[e as usize]
                )));
            }
            let unit = normal.map(|v| v / measure);
            let traction = (load.traction)(x, unit);
            let weight = w * measure * mode.measure_factor(x[0]);
            for i in 0..m {
                let node = nodes[local[i]] as usize;
                for c in 0..ndim {
                    forces[node * ndim + c] += weight * n[i] * traction[c];
                }
            }
        }
    }
    Ok(())
}

/// Adds point loads to `forces`; each node must be used by an element.
pub(super) fn add_point_loads(
    used: &[bool],
    ndim: usize,
    loads: &[(u32, [f64; 3])],
    forces: &mut [f64],
) -> Result<(), SolveError> {
    for &(node, force) in loads {
        if !used.get(node as usize).copied().unwrap_or(false) {
            return Err(SolveError::Load(format!(
                "point load on node {node}: no element uses that point ({} points)",
                used.len()
            )));
        }
        for c in 0..ndim {
            forces[node as usize * ndim + c] += force[c];
        }
    }
    Ok(())
}
