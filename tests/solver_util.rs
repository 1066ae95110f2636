//! Helpers shared by the reference-solver tests (included with `#[path]`; as a test target of
//! its own it holds no tests).
// Numeric checks index several arrays in step; index loops say that more plainly.
#![allow(clippy::needless_range_loop)]
#![allow(dead_code)]

use hone::element::ElementKind;
use hone::material::{AnalysisMode, Material, MaterialMap};
use hone::mesh::generate::{map_points, structured};
use hone::mesh::Mesh;
use hone::reference::solver::{boundary_facets, Constraint};

/// A displacement field given in code.
pub type Field = Box<dyn Fn([f64; 3]) -> [f64; 3]>;

/// The 2D kinds.
pub const KINDS_2D: [ElementKind; 5] = [
    ElementKind::Tri3,
    ElementKind::Tri6,
    ElementKind::Quad4,
    ElementKind::Quad8,
    ElementKind::Quad9,
];

/// The 3D kinds.
pub const KINDS_3D: [ElementKind; 7] = [
    ElementKind::Tet4,
    ElementKind::Tet10,
    ElementKind::Hex8,
    ElementKind::Hex20,
    ElementKind::Hex27,
    ElementKind::Wedge6,
    ElementKind::Wedge15,
];

/// The three 2D modes (plane stress with a non-unit thickness to exercise the factor).
pub fn modes_2d() -> [AnalysisMode; 3] {
    [
        AnalysisMode::PlaneStress { thickness: 0.5 },
        AnalysisMode::PlaneStrain,
        AnalysisMode::Axisymmetric,
    ]
}

/// One material for the whole mesh.
pub fn single(youngs: f64, poisson: f64) -> MaterialMap {
    MaterialMap::Single(Material::new(youngs, poisson, "").expect("valid material"))
}

/// A structured mesh of `kind` on `[x0, x0 + size] x ...` with `n` cells per direction.
pub fn block(kind: ElementKind, n: usize, origin: [f64; 3], size: [f64; 3]) -> Mesh {
    let mut mesh = structured(kind, [n, n, n], size);
    map_points(&mut mesh, |p| {
        [p[0] + origin[0], p[1] + origin[1], p[2] + origin[2]]
    });
    mesh
}

/// Moves the points by a smooth non-affine map (bilinear / trilinear terms relative to `origin`
/// scaled by `size`), giving distorted elements with valid Jacobians.
pub fn distort(mesh: &mut Mesh, origin: [f64; 3], size: [f64; 3]) {
    let three = mesh.dimension == 3;
    map_points(mesh, |p| {
        let x = (p[0] - origin[0]) / size[0];
        let y = (p[1] - origin[1]) / size[1];
        let z = if three {
            (p[2] - origin[2]) / size[2]
        } else {
            0.0
        };
        [
            p[0] + size[0] * (0.12 * x * y - 0.06 * y * z),
            p[1] + size[1] * (-0.1 * x * y + 0.05 * x * z),
            p[2] + if three {
                size[2] * (0.08 * x * y - 0.07 * y * z)
            } else {
                0.0
            },
        ]
    });
}

/// Whether each node lies on a boundary facet.
pub fn boundary_nodes(mesh: &Mesh) -> Vec<bool> {
    let mut on = vec![false; mesh.node_count()];
    for (e, f) in boundary_facets(mesh) {
        let (kind, nodes) = mesh.element(e as usize);
        for &l in kind.facets()[f as usize].nodes {
            on[nodes[l] as usize] = true;
        }
    }
    on
}

/// Constraints fixing every component `0..ndim` of `nodes` to `field(position)`.
pub fn prescribe(
    mesh: &Mesh,
    nodes: impl IntoIterator<Item = u32>,
    ndim: usize,
    field: impl Fn([f64; 3]) -> [f64; 3],
) -> Vec<Constraint> {
    let mut out = Vec::new();
    for node in nodes {
        let u = field(mesh.points[node as usize]);
        for (component, &value) in u.iter().enumerate().take(ndim) {
            out.push(Constraint {
                node,
                component,
                value,
            });
        }
    }
    out
}

/// Asserts `|actual - expected| <= rel * scale` (scale: a stated magnitude of the quantity),
/// rejecting NaN first and printing both sides.
#[track_caller]
pub fn assert_close(actual: f64, expected: f64, rel: f64, scale: f64, what: &str) {
    assert!(
        actual.is_finite(),
        "{what}: got {actual}, expected {expected}"
    );
    let tol = rel * scale.abs();
    assert!(
        (actual - expected).abs() <= tol,
        "{what}: got {actual:.12e}, expected {expected:.12e}, difference {:.3e} > {tol:.3e}",
        (actual - expected).abs()
    );
}
