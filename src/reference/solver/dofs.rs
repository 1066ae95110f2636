//! Degrees of freedom: which nodes carry unknowns, which components are prescribed, and the
//! numbering of the free equations (ascending node, then component, so that the columns of a
//! row come out sorted when the neighbours of a node are sorted).

use super::{Constraint, SolveError};
use crate::mesh::Mesh;

/// Marks a dof that has no equation (prescribed, or the node is not used by any element).
pub(super) const NONE: u32 = u32::MAX;

/// Node and dof bookkeeping of one problem. Dof `node * ndim + c` is component `c` of `node`.
#[derive(Clone, Debug)]
pub(super) struct DofMap {
    /// Displacement components per node: 2 (plane and axisymmetric modes) or 3.
    pub ndim: usize,
    /// Whether an element uses the node.
    pub used: Vec<bool>,
    /// Equation index of each dof, or [`NONE`].
    pub eq: Vec<u32>,
    /// Whether each dof is prescribed.
    pub constrained: Vec<bool>,
    /// Prescribed value of each dof (0 where free).
    pub prescribed: Vec<f64>,
    /// Number of free equations.
    pub free: usize,
    /// Number of used nodes.
    pub used_count: usize,
}

impl DofMap {
    /// Numbers the free dofs of the nodes used by `mesh`'s elements after applying
    /// `constraints` (checked: node in range and used, component below `ndim`, finite value, no
    /// two different values for one dof).
    pub fn new(mesh: &Mesh, ndim: usize, constraints: &[Constraint]) -> Result<Self, SolveError> {
        let n = mesh.node_count();
        let mut used = vec![false; n];
        for b in &mesh.blocks {
            for &node in &b.nodes {
                used[node as usize] = true;
            }
        }
        let mut constrained = vec![false; n * ndim];
        let mut prescribed = vec![0.0; n * ndim];
        for c in constraints {
            let fail = |reason: String| SolveError::Constraint {
                node: c.node,
                component: c.component,
                reason,
            };
            let node = c.node as usize;
            if node >= n {
                return Err(fail(format!("the mesh has {n} points (0..{n})")));
            }
            if !used[node] {
                return Err(fail("no element uses this point".into()));
            }
            if c.component >= ndim {
                return Err(fail(format!(
                    "this analysis has {ndim} displacement components (0..{ndim})"
                )));
            }
            if !c.value.is_finite() {
                return Err(fail(format!("value {} is not finite", c.value)));
            }
            let dof = node * ndim + c.component;
            if constrained[dof] && prescribed[dof] != c.value {
                return Err(fail(format!(
                    "prescribed twice with different values, {} and {}",
                    prescribed[dof], c.value
                )));
            }
            constrained[dof] = true;
            prescribed[dof] = c.value;
        }
        let mut eq = vec![NONE; n * ndim];
        let mut free = 0usize;
        for node in 0..n {
            if !used[node] {
                continue;
            }
            for c in 0..ndim {
                let dof = node * ndim + c;
                if !constrained[dof] {
                    if free >= NONE as usize {
                        return Err(SolveError::Mesh(format!(
                            "more than {} free equations",
                            NONE - 1
                        )));
                    }
                    eq[dof] = free as u32;
                    free += 1;
                }
            }
        }
        let used_count = used.iter().filter(|&&u| u).count();
        Ok(Self {
            ndim,
            used,
            eq,
            constrained,
            prescribed,
            free,
            used_count,
        })
    }

    /// Number of free components of `node`.
    #[inline]
    pub fn free_count(&self, node: usize) -> u32 {
        let base = node * self.ndim;
        self.eq[base..base + self.ndim]
            .iter()
            .filter(|&&e| e != NONE)
            .count() as u32
    }

    /// Number of free components of `node` before component `c`.
    #[inline]
    pub fn free_rank(&self, node: usize, c: usize) -> u32 {
        let base = node * self.ndim;
        self.eq[base..base + c]
            .iter()
            .filter(|&&e| e != NONE)
            .count() as u32
    }
}
