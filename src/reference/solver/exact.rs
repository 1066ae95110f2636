//! Exact energy-norm errors against a known exact stress field, by high-order quadrature.
//!
//! Per element K: `||e||_K^2 = integral_K (sigma - sigma_h)^T C (sigma - sigma_h) f(x) dOmega`
//! and the exact energy integral `integral_K sigma^T C sigma f(x) dOmega`, with `C` the
//! compliance of the element's material in the mode (zero rows for unused components), `f(x)`
//! the thickness or `2 pi r`, and `sigma_h = D eps(u_h)` evaluated by the estimator's own
//! `recovery::ElementData::strain_at` (methods sheet section 2: the exact error used to judge
//! estimators; Zienkiewicz & Zhu 1992 part 2).
//!
//! Quadrature: [`reference_rule`] with `order` points per direction (Gauss-Legendre products on
//! quadrilaterals and hexahedra, collapsed rules on simplices, triangle x line on wedges).
//! Parallel over elements; the totals are summed in element order.

use super::SolveError;
use crate::element::gauss::reference_rule;
use crate::element::{ElementKind, ShapeTable};
use crate::material::{AnalysisMode, MaterialMap};
use crate::mesh::Mesh;
use crate::recovery::{ElementData, ElementMaterials};
use rayon::prelude::*;

/// Exact energy-norm errors of an FE solution.
#[derive(Clone, Debug)]
pub struct ExactErrors {
    /// `||e||_K^2` per element (global element order).
    pub element_error_sq: Vec<f64>,
    /// `||e||^2 = sum_K ||e||_K^2`.
    pub error_sq: f64,
    /// `integral sigma^T C sigma` over the mesh: twice the exact strain energy of the meshed
    /// domain.
    pub exact_energy_sq: f64,
}

/// Exact errors of `displacement` against `exact_stress` (6 components xx, yy, zz, xy, yz, xz)
/// with `order` Gauss points per direction. A missing zone material or an inverted element makes
/// every value NaN (so the result cannot pass for a small error); use [`try_exact_errors`] for the
/// reason.
pub fn exact_errors(
    mesh: &Mesh,
    displacement: &[[f64; 3]],
    materials: &MaterialMap,
    mode: AnalysisMode,
    exact_stress: &(dyn Fn([f64; 3]) -> [f64; 6] + Sync),
    order: usize,
) -> ExactErrors {
    try_exact_errors(mesh, displacement, materials, mode, exact_stress, order).unwrap_or_else(
        |_| ExactErrors {
            element_error_sq: vec![f64::NAN; mesh.element_count()],
            error_sq: f64::NAN,
            exact_energy_sq: f64::NAN,
        },
    )
}

/// [`exact_errors`] with the failure reason: a missing zone material, a displacement array of the
/// wrong length, a mesh that does not fit the mode, or inverted elements (file cell ids).
pub fn try_exact_errors(
    mesh: &Mesh,
    displacement: &[[f64; 3]],
    materials: &MaterialMap,
    mode: AnalysisMode,
    exact_stress: &(dyn Fn([f64; 3]) -> [f64; 6] + Sync),
    order: usize,
) -> Result<ExactErrors, SolveError> {
    let mode = mode.validate()?;
    if displacement.len() != mesh.node_count() {
        return Err(SolveError::Mesh(format!(
            "{} displacement vectors for {} points",
            displacement.len(),
            mesh.node_count()
        )));
    }
    if let Some(b) = mesh
        .blocks
        .iter()
        .find(|b| b.kind.dim() != mode.dimension())
    {
        return Err(SolveError::Mesh(format!(
            "{} analysis cannot integrate {} cells",
            mode.name(),
            b.kind
        )));
    }
    let element_materials = ElementMaterials::new(mesh, materials, mode)?;
    let n = mesh.element_count();
    let mut element_error_sq = vec![0.0; n];
    let mut element_exact_sq = vec![0.0; n];
    let mut bad = Vec::new();
    for block in &mesh.blocks {
        let table = table(block.kind, order);
        let range = block.first_element..block.first_element + block.len();
        let failed: Vec<u32> = element_error_sq[range.clone()]
            .par_iter_mut()
            .zip(element_exact_sq[range].par_iter_mut())
            .enumerate()
            .filter_map(|(i, (err, ex))| {
                let e = block.first_element + i;
                let data = ElementData::from_nodes(
                    block.kind,
                    mesh.dimension,
                    block.cell(i),
                    &mesh.points,
                    displacement,
                );
                let elasticity = element_materials.of(e);
                let dim = block.kind.dim();
                let (mut acc_err, mut acc_ex) = (0.0, 0.0);
                for k in 0..table.len() {
                    let Ok((strain, x, det)) = data.strain_at(&table, k, dim, mode, true) else {
                        return Some(mesh.file_cell[e]);
                    };
                    let fe = elasticity.stress(&strain);
                    let exact = exact_stress(x);
                    let diff: [f64; 6] = std::array::from_fn(|c| exact[c] - fe[c]);
                    let w = table.weights[k] * det * mode.measure_factor(x[0]);
                    acc_err += w * elasticity.energy_product(&diff, &diff);
                    acc_ex += w * elasticity.energy_product(&exact, &exact);
                }
                *err = acc_err;
                *ex = acc_ex;
                None
            })
            .collect();
        bad.extend(failed);
    }
    if !bad.is_empty() {
        bad.sort_unstable();
        return Err(SolveError::InvertedElements { cells: bad });
    }
    Ok(ExactErrors {
        error_sq: element_error_sq.iter().sum(),
        exact_energy_sq: element_exact_sq.iter().sum(),
        element_error_sq,
    })
}

/// Shape table of `kind` at its [`reference_rule`] with `order` points per direction.
fn table(kind: ElementKind, order: usize) -> ShapeTable {
    let (points, weights) = reference_rule(kind, order).into_iter().unzip();
    ShapeTable::new(kind, points, weights)
}
