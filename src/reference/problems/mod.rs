//! Benchmark problems with published exact solutions: geometry, loads, supports, exact
//! displacement and stress, each with its source. Formulas and check values: the project's
//! method sheet, section 5.
//!
//! A problem is built for an element kind and a mesh level (cells per unit of the problem's
//! base division); [`Problem::solve`] runs the reference solver and measures the exact error
//! against the exact stress by high-order quadrature.

mod cantilever;
mod kirsch;
mod l_shape;
mod lame;
mod manufactured;

pub use cantilever::cantilever;
pub use kirsch::{kirsch, kirsch_domain, kirsch_on};
pub use l_shape::{
    l_shape, l_shape_domain, l_shape_graded, l_shape_on, L_SHAPE_GRADING, WILLIAMS_LAMBDA_270,
};
pub use lame::{lame_axisymmetric, lame_plane_strain, lame_solid};
pub use manufactured::manufactured_box;

use crate::element::ElementKind;
use crate::estimate::{estimate_model, Computed, EstimateError};
use crate::material::{AnalysisMode, MaterialMap, SymTensor};
use crate::mesh::{Mesh, Model};
use crate::recovery::RecoveryMethod;
use crate::reference::solver::{
    exact_errors, solve, BoundaryConditions, SolveError, SolveOptions, TractionField, TractionLoad,
};
use std::sync::Arc;

/// An exact field: position -> value.
pub type ExactStress = Arc<dyn Fn([f64; 3]) -> SymTensor + Send + Sync>;
/// An exact displacement field.
pub type ExactDisplacement = Arc<dyn Fn([f64; 3]) -> [f64; 3] + Send + Sync>;

/// A benchmark problem on one mesh.
#[derive(Clone)]
pub struct Problem {
    /// Short name used in tables.
    pub name: &'static str,
    /// Where the exact solution comes from.
    pub source: &'static str,
    /// The mesh.
    pub mesh: Mesh,
    /// Material(s).
    pub materials: MaterialMap,
    /// Analysis mode.
    pub mode: AnalysisMode,
    /// Supports and loads.
    pub bc: BoundaryConditions,
    /// Exact stress (hone's component order xx, yy, zz, xy, yz, xz).
    pub exact_stress: ExactStress,
    /// Exact displacement.
    pub exact_displacement: ExactDisplacement,
    /// Exponent q of the exact error under uniform refinement, ||e|| ~ h^q: the element order p
    /// for smooth problems, min(p, lambda) with a singularity.
    pub rate_exponent: f64,
}

/// A solved problem with its exact error.
#[derive(Clone, Debug)]
pub struct Solved {
    /// Mesh and FE displacement, ready for the estimator.
    pub model: Model,
    /// Number of degrees of freedom.
    pub dofs: usize,
    /// Exact ||u - u_h||^2 per element (energy norm, against the exact stress).
    pub element_error_sq: Vec<f64>,
    /// Exact ||u - u_h||^2.
    pub error_sq: f64,
    /// ||u||^2 of the exact solution over the mesh.
    pub exact_energy_sq: f64,
    /// FE strain energy U_h.
    pub strain_energy: f64,
}

impl Solved {
    /// Exact relative error ||e|| / ||u||.
    pub fn relative_error(&self) -> f64 {
        (self.error_sq / self.exact_energy_sq).sqrt()
    }
}

/// Quadrature points per direction for the exact error (composite Gauss-Legendre and collapsed
/// rules of the reference solver): 8 integrates the smooth integrands far beyond the
/// discretisation error and resolves the r^(2 lambda - 2) corner integrand of the L-shape to
/// well under a percent of the total (common practice: refine the reference quadrature until
/// the result no longer changes; checked in the tests by comparing with 12).
pub const EXACT_ERROR_ORDER: usize = 8;

impl Problem {
    /// Runs hone's estimate stage (recovery `method`) on a solution of this problem.
    pub fn estimate(
        &self,
        solved: &Solved,
        method: RecoveryMethod,
    ) -> Result<Computed, EstimateError> {
        estimate_model(&solved.model, &self.materials, self.mode, method, &|_| {})
    }

    /// Solves with the reference solver and measures the exact error.
    pub fn solve(&self) -> Result<Solved, SolveError> {
        let solution = solve(
            &self.mesh,
            &self.materials,
            self.mode,
            &self.bc,
            &SolveOptions::default(),
        )?;
        let exact = exact_errors(
            &self.mesh,
            &solution.displacement,
            &self.materials,
            self.mode,
            &*self.exact_stress,
            EXACT_ERROR_ORDER,
        );
        Ok(Solved {
            model: Model {
                mesh: self.mesh.clone(),
                displacement: solution.displacement,
            },
            dofs: solution.dofs,
            element_error_sq: exact.element_error_sq,
            error_sq: exact.error_sq,
            exact_energy_sq: exact.exact_energy_sq,
            strain_energy: solution.strain_energy,
        })
    }
}

/// Traction sigma . n of an exact stress field, for loading boundaries with the exact solution.
pub fn traction_of(stress: ExactStress) -> TractionField {
    Arc::new(move |x, n| {
        let s = stress(x);
        [
            s[0] * n[0] + s[3] * n[1] + s[5] * n[2],
            s[3] * n[0] + s[1] * n[1] + s[4] * n[2],
            s[5] * n[0] + s[4] * n[1] + s[2] * n[2],
        ]
    })
}

/// A traction load with the exact stress on the boundary facets selected by `keep`.
pub fn exact_traction(
    mesh: &Mesh,
    stress: &ExactStress,
    keep: impl Fn(&[[f64; 3]]) -> bool,
) -> TractionLoad {
    TractionLoad {
        facets: crate::reference::solver::select_facets(mesh, keep),
        traction: traction_of(stress.clone()),
    }
}

/// The element kind of the mesh's first block (`None` for a mesh without elements); the
/// problems on a given mesh take their convergence exponent from it.
fn first_kind(mesh: &Mesh) -> Option<ElementKind> {
    mesh.blocks.first().map(|b| b.kind)
}

/// Relative tolerance for selecting boundary nodes and facets by coordinate: 1e-9 of the
/// problem's size (points generated on the boundary sit there to round-off; common practice).
pub const ON_BOUNDARY: f64 = 1e-9;

#[cfg(test)]
mod tests;
