//! Small-strain linear-elastic reference solver, for verification, examples and the demo.
//!
//! Not a user-facing feature: problems are defined in code (a [`Mesh`](crate::mesh::Mesh), a
//! [`MaterialMap`](crate::material::MaterialMap), an
//! [`AnalysisMode`](crate::material::AnalysisMode) and [`BoundaryConditions`]), and the
//! solution is the nodal displacement
//! field that the estimator then reads, exactly as it would read a file.
//!
//! The solver reuses the element library (shape tables, `map_gradients`), the material module
//! (`Elasticity`, `measure_factor`) and the zone-to-material map of the recovery stage, so the
//! strain-displacement matrix B is the one `recovery::ElementData::strain_at` applies.
//!
//! Symbols: `N_i` shape functions, `B` strain-displacement matrix (strains xx, yy, zz, xy, yz,
//! xz with engineering shear; axisymmetric: x = r, y = z, zz = hoop strain `u_r / r`), `D`
//! stiffness, `w` quadrature weight, `det J` Jacobian determinant, `f(x)` the mode's measure
//! factor (thickness, 1 or `2 pi r`).
//!
//! * Element stiffness `K_e = sum_q B^T D B w det J f(x_q)` with the element's full rule.
//! * Consistent loads `f_i = integral N_i t dGamma + integral N_i b dOmega` plus point loads.
//! * Prescribed displacements are eliminated: `K_ff u_f = f_f - K_fc u_c` (SPD when the supports
//!   prevent rigid-body motion).
//! * `U_h = 1/2 u^T K u`, evaluated element by element as `1/2 integral eps^T D eps f(x)`.
//!
//! (Zienkiewicz & Taylor, The Finite Element Method vol. 1, chs. 2, 6 and 9 for the displacement
//! method, the axisymmetric B and consistent loads; common practice.)

mod assembly;
mod coarse;
mod direct;
mod dofs;
mod exact;
mod iterative;
mod loads;
mod output;
mod pattern;
mod rigid;
mod select;
mod solve;
mod stiffness;

pub use crate::element::gauss::{gauss_legendre, reference_rule};
pub use exact::{exact_errors, try_exact_errors, ExactErrors};
pub use loads::{facet_shape, FacetShape};
pub use output::write_results;
pub use select::{boundary_facets, fix_component, select_facets, select_nodes};
pub use solve::{solve, solve_timed};

use crate::material::MaterialError;
use crate::recovery::MissingZoneMaterial;
use std::sync::Arc;
use thiserror::Error;

/// A vector field of position, for body forces (force per unit volume).
pub type VectorField = Arc<dyn Fn([f64; 3]) -> [f64; 3] + Send + Sync>;

/// (position, outward unit normal) -> traction vector (force per unit area/length). In 2D the
/// normal's z component is 0 and the traction's z component is ignored.
pub type TractionField = Arc<dyn Fn([f64; 3], [f64; 3]) -> [f64; 3] + Send + Sync>;

/// A prescribed displacement component: `u[node][component] = value`. Components: 0 = x (r),
/// 1 = y (z in axisymmetry), 2 = z (3D only).
#[derive(Copy, Clone, Debug, PartialEq)]
pub struct Constraint {
    /// Mesh point index (must be used by an element).
    pub node: u32,
    /// Displacement component, below the number of displacement components of the mode.
    pub component: usize,
    /// Prescribed value.
    pub value: f64,
}

/// A traction applied on boundary facets.
#[derive(Clone)]
pub struct TractionLoad {
    /// (global element index, local facet index) pairs, as returned by [`select_facets`].
    pub facets: Vec<(u32, u8)>,
    /// The traction as a function of position and outward unit normal.
    pub traction: TractionField,
}

/// Supports and loads of a problem.
#[derive(Clone, Default)]
pub struct BoundaryConditions {
    /// Prescribed displacement components (eliminated from the system).
    pub constraints: Vec<Constraint>,
    /// Distributed tractions on boundary facets.
    pub tractions: Vec<TractionLoad>,
    /// Body force per unit volume, if any.
    pub body_force: Option<VectorField>,
    /// Concentrated nodal forces (node, force); in 2D the z component is ignored. In plane stress
    /// and axisymmetry the force is the total over the thickness or the full ring.
    pub point_loads: Vec<(u32, [f64; 3])>,
}

/// How the reduced system `K_ff u_f = r_f` is solved.
#[derive(Copy, Clone, Debug, PartialEq)]
pub enum LinearSolver {
    /// Sparse Cholesky factorisation (faer, with its fill-reducing ordering).
    Cholesky,
    /// Preconditioned conjugate gradients (Hestenes & Stiefel 1952); stops when
    /// `||r|| <= relative_tolerance ||b||`. Preconditioner: node-block Jacobi, plus on meshes
    /// with quadratic elements an exactly solved coarse level (the corner-node linear field,
    /// Galerkin `P^T K P`) that keeps the iteration count nearly independent of the mesh size.
    ConjugateGradient {
        /// Required reduction of the residual's Euclidean norm, relative to the right side.
        relative_tolerance: f64,
        /// Iteration limit; more gives [`SolveError::NotConverged`].
        max_iterations: usize,
    },
}

/// Options of [`solve`].
#[derive(Copy, Clone, Debug)]
pub struct SolveOptions {
    /// The linear solver.
    pub solver: LinearSolver,
}

impl Default for SolveOptions {
    /// Sparse Cholesky.
    fn default() -> Self {
        Self {
            solver: LinearSolver::Cholesky,
        }
    }
}

/// The solved problem.
#[derive(Clone, Debug)]
pub struct Solution {
    /// Displacement of every mesh point (z = 0 in 2D; 0 for points no element uses).
    pub displacement: Vec<[f64; 3]>,
    /// `U_h = 1/2 u^T K u`, including the thickness or `2 pi r` factor.
    pub strain_energy: f64,
    /// `f^T u` over tractions, body force and point loads (support reactions excluded).
    pub external_work: f64,
    /// Free plus constrained degrees of freedom of the nodes used by elements.
    pub dofs: usize,
    /// Conjugate-gradient iterations, when CG was used.
    pub iterations: Option<usize>,
}

/// Wall-clock seconds of the stages of [`solve_timed`].
#[derive(Copy, Clone, Debug, Default)]
pub struct SolveTimings {
    /// Checks, materials, dof numbering, support check, loads, node adjacency.
    pub setup: f64,
    /// Sparsity pattern, element matrices and their addition into the global matrix.
    pub assembly: f64,
    /// Factorisation and triangular solves, or the CG iterations.
    pub linear_solve: f64,
    /// Strain energy and external work of the solution.
    pub energy: f64,
}

/// Why a problem could not be solved. Cells are named by their file cell id
/// (`Mesh::file_cell`).
#[derive(Debug, Error)]
pub enum SolveError {
    /// Rigid-body motion is not prevented (or the factorisation met a non-positive pivot).
    #[error("the stiffness matrix is singular: the supports do not prevent rigid-body motion ({detail})")]
    Singular {
        /// Which part of the mesh can move, or where the factorisation failed.
        detail: String,
    },
    /// A zone has cells but no material.
    #[error(transparent)]
    MissingMaterial(#[from] MissingZoneMaterial),
    /// The analysis mode's own parameters are invalid (plane-stress thickness).
    #[error(transparent)]
    Mode(#[from] MaterialError),
    /// Elements with det J <= 0 (or not finite) at a quadrature point.
    #[error("{} element(s) are inverted or degenerate (det J <= 0 at a quadrature point): file cells {}", cells.len(), list(cells))]
    InvertedElements {
        /// File cell ids, ascending.
        cells: Vec<u32>,
    },
    /// Conjugate gradients did not reach the tolerance.
    #[error("conjugate gradients did not converge: relative residual {residual:e} after {iterations} iterations")]
    NotConverged {
        /// Iterations done.
        iterations: usize,
        /// `||r|| / ||b||` at the end.
        residual: f64,
    },
    /// The mesh does not fit the analysis mode, or has no elements.
    #[error("mesh and analysis do not fit: {0}")]
    Mesh(String),
    /// A constraint names a node or component that does not exist, or contradicts another.
    #[error("constraint on node {node}, component {component}: {reason}")]
    Constraint {
        /// Node index.
        node: u32,
        /// Component.
        component: usize,
        /// What is wrong, with the value found and what was expected.
        reason: String,
    },
    /// A load names a node, element or facet that does not exist, or is not finite.
    #[error("load: {0}")]
    Load(String),
    /// Options out of range (CG tolerance, iteration limit).
    #[error("solver options: {0}")]
    Options(String),
    /// The factorisation failed for a reason other than a bad pivot (memory, index range).
    #[error("sparse factorisation failed: {0}")]
    Factorization(String),
}

/// At most 20 ids, comma-separated, with the count of the rest.
fn list(cells: &[u32]) -> String {
    let shown: Vec<String> = cells.iter().take(20).map(|c| c.to_string()).collect();
    let rest = cells.len().saturating_sub(20);
    if rest > 0 {
        format!("{} and {rest} more", shown.join(", "))
    } else {
        shown.join(", ")
    }
}
