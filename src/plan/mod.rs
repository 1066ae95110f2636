//! The refinement plan: what size each element of the next mesh should have,
//! how many elements that costs, which elements to mark, how strong a corner singularity is and
//! how fast the size field may grow between neighbours.
//!
//! The laws work on plain slices; the field and the planner add the mesh. Reading results and
//! writing plan files live elsewhere.
//!
//! Model behind the size laws (method sheet 3): the error in the region of old element i scales
//! as `||e||_i s_i^q_i` with `s_i = h_new,i / h_i`, and the region holds about `s_i^-d` new
//! elements; `q_i = p` in smooth regions and `q_i = lambda` (Williams exponent) at singular
//! points.
//!
//! - [`size_law`]: classic Zienkiewicz-Zhu sizes (equal error per old element, sheet 3.1), the
//!   optimal sizes (equal error per new element, sheet 3.2), the element-budget inversion and
//!   the optimal sizes with per-element exponents (sheet 3.4).
//! - [`marking`]: Dorfler bulk marking, the Babuska-Rheinboldt maximum strategy and a fixed
//!   fraction (sheet 3.6).
//! - The corner exponents (Williams, sheet 4.1; clamped-free, sheet 4.2) live in
//!   [`crate::singular`] and are re-exported here.
//! - [`field`]: the nodal size field and the element count a mesher will make from it.
//! - [`planner`]: goals, limits and strategies put together into one [`Plan`].
//! - [`gradation`]: Persson's discrete gradient limiting of a nodal size field (sheet 3.7).

pub mod field;
pub mod gradation;
pub mod marking;
pub mod planner;
pub mod size_law;

pub use crate::singular::clamped::{
    clamped_free_exponent, clamped_free_root, kappa_plane_strain, kappa_plane_stress,
};
pub use crate::singular::williams::{corner_exponent, williams_mode_one, williams_mode_two};
pub use gradation::{limit_gradation, EdgeGraph};
pub use marking::{dorfler, fraction, maximum};
pub use planner::{plan, plan_on, Plan, PlanGeometry, PlanInput, PlanSettings, Strategy};
pub use size_law::{
    classic_sizes, optimal_budget, optimal_sizes, optimal_sizes_mixed, ClassicPlan, OptimalPlan,
};

use thiserror::Error;

/// A planning input outside its allowed range, with the value found and the range expected.
#[derive(Debug, Error, Clone, PartialEq)]
pub enum PlanError {
    /// A per-element value (error norm, exponent, size) is negative, NaN or infinite.
    #[error("{what} of element {index} is {value}: expected a finite value >= 0")]
    ElementValue {
        /// Which quantity was wrong.
        what: &'static str,
        /// Position in the input slice.
        index: usize,
        /// The value found.
        value: f64,
    },
    /// A scalar parameter is outside its range.
    #[error("{what} = {value} is not allowed: expected {expected}")]
    Parameter {
        /// Which parameter was wrong.
        what: &'static str,
        /// The value found.
        value: f64,
        /// The allowed range in words.
        expected: &'static str,
    },
    /// Two slices that must have one entry per element differ in length.
    #[error("{what}: {found} entries for {expected} elements")]
    Length {
        /// Which slice was wrong.
        what: &'static str,
        /// Its length.
        found: usize,
        /// The expected length.
        expected: usize,
    },
    /// Every element error is zero, so no size follows from the error model.
    #[error("every element error is zero: the error model gives no sizes")]
    NoError,
    /// An edge names a node that does not exist.
    #[error("edge {index} joins nodes {a} and {b}, but there are only {nodes} nodes")]
    Edge {
        /// Position of the edge.
        index: usize,
        /// First node.
        a: u32,
        /// Second node.
        b: u32,
        /// Number of nodes.
        nodes: usize,
    },
    /// The Lagrange-multiplier search of the mixed-exponent plan found no bracket.
    #[error("no Lagrange multiplier brackets the target error {target}")]
    NoBracket {
        /// Target global error norm.
        target: f64,
    },
}

/// Checks that every entry is finite and `>= 0`.
pub(crate) fn check_values(what: &'static str, values: &[f64]) -> Result<(), PlanError> {
    match values
        .iter()
        .enumerate()
        .find(|(_, v)| !(v.is_finite() && **v >= 0.0))
    {
        Some((index, &value)) => Err(PlanError::ElementValue { what, index, value }),
        None => Ok(()),
    }
}

/// Checks `lo < value <= hi` (`lo` exclusive) for a finite value.
pub(crate) fn check_range(
    what: &'static str,
    value: f64,
    lo: f64,
    hi: f64,
    expected: &'static str,
) -> Result<(), PlanError> {
    if value.is_finite() && value > lo && value <= hi {
        Ok(())
    } else {
        Err(PlanError::Parameter {
            what,
            value,
            expected,
        })
    }
}
