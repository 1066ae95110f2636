//! The refinement plan of one mesh: goals (target error and/or DOF budget), the size law or a
//! marking strategy, size limits, the nodal size field with gradation, and the prediction of
//! the next mesh's cost and error from that final field.
//!
//! Steps (method sheet 3.2, 3.4, 3.6, 3.7):
//! 1. element size ratios `s_i` from the optimal law with per-element exponents `q_i` (`p`, or
//!    `min(p, lambda)` in singular elements), or marks of a local strategy (marked: `s = 1/2`);
//! 2. element targets `h_i s_i`, with `s_i` limited per step, never above 1 with `refine_only`,
//!    clamped to `[size_min, size_max]`, and no finer than the floor in singular elements;
//! 3. vertex field = minimum over the elements around a vertex, gradation-limited along the
//!    vertex edges, non-vertex nodes interpolated;
//! 4. predicted elements from that final field ([`super::field::predicted_elements`]), nodes
//!    with the current mesh's nodes-per-element ratio (sheet 3.5), DOFs = nodes x components;
//!    predicted error `sum_i ||e||_i^2 (h'_i / h_i)^(2 q_i)` with `h'_i` the element's mean size
//!    in the final field (the error model of sheet 3).
//!
//! A DOF budget is met by adjusting the Lagrange multiplier of the law until the prediction from
//! the final field fits (the closed-form count of sheet 3.2 ignores the minimum, the limits and
//! the gradation, which all add elements).

use super::field::{element_sizes, interpolate_non_vertex, vertex_minimum, ElementCounter};
use super::{check_range, check_values, dorfler, fraction, maximum, EdgeGraph, PlanError};
use crate::mesh::Mesh;
use rayon::prelude::*;

/// Target relative error when no goal is given: 5 % in the energy norm (common practice for
/// design-stage stress analysis).
pub const DEFAULT_TARGET_ERROR: f64 = 0.05;
/// Default gradation `|grad h| <= g` (method sheet 3.7 suggests 0.2-0.5; our choice).
pub const DEFAULT_GRADING: f64 = 0.3;
/// Default per-step limits on `h_new / h_now`: refine at most 8x, coarsen at most 4x in one
/// plan, so the next mesh stays within the range the error model was fitted on (our choice,
/// inside the [0.1, 2] - [0.2, 4] range method sheet 3.4 recommends).
pub const DEFAULT_STEP_LIMITS: (f64, f64) = (0.125, 4.0);
/// Default floor of singular elements as a fraction of the bounding-box diagonal (our choice):
/// refinement stops there, so a stress without a limit cannot swallow the budget.
pub const DEFAULT_SINGULAR_FLOOR: f64 = 1e-4;
/// An element counts as refined when its planned size is below this fraction of its current
/// size, coarsened above the inverse (meshers hold sizes to about 20 %; common practice).
pub const KEEP_BAND: f64 = 0.8;
/// With [`PlanSettings::fit_final_error`], the final field's predicted error is accepted when it
/// lies between `1 - TARGET_FIT_BAND` times the target and the target (2 %: well inside the
/// spread of the error model itself; our choice).
pub const TARGET_FIT_BAND: f64 = 0.02;

/// How sizes are chosen.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Strategy {
    /// Fewest elements for the goal (method sheet 3.2 and 3.4).
    Optimal,
    /// Dorfler bulk marking with fraction theta; marked elements halve their size.
    Dorfler(f64),
    /// Maximum strategy with threshold theta; marked elements halve their size.
    Maximum(f64),
    /// The given fraction of elements with the largest indicators; they halve their size.
    Fraction(f64),
}

impl Strategy {
    /// Plain name for reports.
    pub fn name(&self) -> &'static str {
        match self {
            Strategy::Optimal => "optimal",
            Strategy::Dorfler(_) => "dorfler",
            Strategy::Maximum(_) => "maximum",
            Strategy::Fraction(_) => "fraction",
        }
    }
}

/// What the plan aims for and the limits it keeps.
#[derive(Clone, Debug)]
pub struct PlanSettings {
    /// Target global relative error (fraction, 0.05 for 5 %).
    pub target_error: Option<f64>,
    /// Largest number of DOFs the next mesh may have.
    pub max_dofs: Option<f64>,
    /// Size law or marking strategy.
    pub strategy: Strategy,
    /// Never coarsen.
    pub refine_only: bool,
    /// Smallest size allowed anywhere.
    pub size_min: Option<f64>,
    /// Largest size allowed anywhere.
    pub size_max: Option<f64>,
    /// (shrink, grow) limits on `h_new / h_now` in one plan.
    pub step_limits: (f64, f64),
    /// Gradation `g` of `h_j <= h_i + g |x_i - x_j|`.
    pub grading: f64,
    /// Smallest size in singular elements; `None` uses [`DEFAULT_SINGULAR_FLOOR`] times the
    /// bounding-box diagonal.
    pub singular_floor: Option<f64>,
    /// Optimal strategy only: when the final field (after the vertex minimum and the
    /// gradation, which only make sizes smaller) is predicted to beat the target, raise the
    /// error the size law aims for until the final field's prediction meets the target (within
    /// [`TARGET_FIT_BAND`] below it). Off, the law aims at the target itself and the final
    /// field over-delivers: measured on the adaptive loop's tri6 meshes (DEVELOPERS.md,
    /// "Adaptive loop"), 0.71-0.75 % predicted and 0.66-0.81 % exact for a 1 % target.
    pub fit_final_error: bool,
}

impl Default for PlanSettings {
    fn default() -> Self {
        Self {
            target_error: None,
            max_dofs: None,
            strategy: Strategy::Optimal,
            refine_only: false,
            size_min: None,
            size_max: None,
            step_limits: DEFAULT_STEP_LIMITS,
            grading: DEFAULT_GRADING,
            singular_floor: None,
            fit_final_error: false,
        }
    }
}

/// Per-element inputs of the plan.
#[derive(Clone, Copy, Debug)]
pub struct PlanInput<'a> {
    /// The current mesh.
    pub mesh: &'a Mesh,
    /// `||e||_K^2` per element.
    pub error_sq: &'a [f64],
    /// `||u||^2`, the squared energy norm of the FE solution.
    pub energy_sq: f64,
    /// Convergence exponent per element: the degree p, or `min(p, lambda)` in singular ones.
    pub exponents: &'a [f64],
    /// Whether the element touches a singular spot.
    pub singular: &'a [bool],
    /// Current element size (mean vertex-edge length).
    pub size_now: &'a [f64],
    /// Displacement components per node (2 in 2D, 3 in 3D).
    pub dofs_per_node: usize,
}

/// The plan for the next mesh.
#[derive(Clone, Debug)]
pub struct Plan {
    /// The strategy used.
    pub strategy: Strategy,
    /// The target relative error in force (given, or the default).
    pub target_error: f64,
    /// Relative error the planned mesh is predicted to reach.
    pub achievable_error: f64,
    /// The DOF budget decided the sizes (the target did not fit).
    pub budget_limited: bool,
    /// Element target after limits and clamps, before the vertex minimum and gradation.
    pub element_target: Vec<f64>,
    /// Element size in the final field (mean of its corners): the per-element `size_target`.
    pub size_target: Vec<f64>,
    /// Final nodal size field (every node, mid-side nodes interpolated).
    pub nodal_size: Vec<f64>,
    /// 1 refine, 0 keep, -1 may coarsen.
    pub refine_mark: Vec<i8>,
    /// Predicted elements of the next mesh.
    pub predicted_elements: f64,
    /// Predicted nodes (current nodes-per-element ratio).
    pub predicted_nodes: f64,
    /// Predicted DOFs.
    pub predicted_dofs: f64,
    /// DOFs of the current mesh.
    pub current_dofs: f64,
}

impl Plan {
    /// (refined, kept, coarsened) element counts.
    pub fn mark_counts(&self) -> (usize, usize, usize) {
        let mut c = (0, 0, 0);
        for &m in &self.refine_mark {
            match m {
                1 => c.0 += 1,
                -1 => c.2 += 1,
                _ => c.1 += 1,
            }
        }
        c
    }
}

/// Elements with one exponent share closed-form sums: `S_q = sum ||e||_i^(2d/(2q+d))`.
struct ExponentGroups {
    /// (q, S_q), one entry per distinct exponent.
    groups: Vec<(f64, f64)>,
    d: f64,
}

impl ExponentGroups {
    fn new(error_sq: &[f64], exponents: &[f64], d: f64) -> Self {
        let mut groups: Vec<(f64, f64)> = Vec::new();
        for (&e2, &q) in error_sq.iter().zip(exponents) {
            let term = e2.powf(d / (2.0 * q + d));
            match groups.iter_mut().find(|(gq, _)| *gq == q) {
                Some(g) => g.1 += term,
                None => groups.push((q, term)),
            }
        }
        Self { groups, d }
    }

    /// `sum_i ||e||_i^2 s_i^(2 q_i)` at multiplier `mu` (method sheet 3.4), by groups.
    fn error_sq(&self, mu: f64) -> f64 {
        let d = self.d;
        self.groups
            .iter()
            .map(|&(q, s)| s * (d / (2.0 * q * mu)).powf(2.0 * q / (2.0 * q + d)))
            .sum()
    }

    /// `sum_i s_i^-d` at multiplier `mu` (the law's element count before any limit).
    fn elements(&self, mu: f64) -> f64 {
        let d = self.d;
        self.groups
            .iter()
            .map(|&(q, s)| s * (2.0 * q * mu / d).powf(d / (2.0 * q + d)))
            .sum()
    }

    /// `ln mu` where `f(mu)` crosses `goal`; `f` monotone with sign `rising`.
    fn solve(&self, goal: f64, f: impl Fn(&Self, f64) -> f64, rising: bool) -> Option<f64> {
        let g = |ln_mu: f64| {
            let v = f(self, ln_mu.exp()) - goal;
            if rising {
                v
            } else {
                -v
            }
        };
        let (mut lo, mut hi) = (0.0_f64, 0.0_f64);
        let mut steps = 0;
        while g(lo) > 0.0 {
            lo -= 4.0;
            steps += 1;
            if steps > 400 {
                return None;
            }
        }
        while g(hi) < 0.0 {
            hi += 4.0;
            steps += 1;
            if steps > 400 {
                return None;
            }
        }
        // Width 1e-12 in ln mu is a relative width 1e-12 in mu.
        while hi - lo > 1e-12 {
            let mid = 0.5 * (lo + hi);
            if mid <= lo || mid >= hi {
                break;
            }
            if g(mid) < 0.0 {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        Some(0.5 * (lo + hi))
    }
}

/// Everything that follows from the element size ratios.
struct Realised {
    element_target: Vec<f64>,
    nodal: Vec<f64>,
    size_target: Vec<f64>,
    elements: f64,
    error_sq: f64,
}

/// What a plan needs from the mesh alone: the vertex-edge graph of the gradation and the
/// element counter's geometry. Built once per mesh; a caller can build it while it does other
/// work (the plan command overlaps it with the singular-spot screening).
pub struct PlanGeometry {
    graph: EdgeGraph,
    counter: ElementCounter,
}

impl PlanGeometry {
    /// Builds the edge graph and the counter of `mesh`; errors name a bad point.
    pub fn new(mesh: &Mesh) -> Result<Self, PlanError> {
        Ok(Self {
            graph: EdgeGraph::new(&mesh.points, &mesh.vertex_edges())?,
            counter: ElementCounter::new(mesh),
        })
    }
}

/// Plans the next mesh. Errors name the setting or the element that is out of range.
pub fn plan(input: &PlanInput, settings: &PlanSettings) -> Result<Plan, PlanError> {
    plan_on(input, settings, &PlanGeometry::new(input.mesh)?)
}

/// [`plan`] with the mesh's [`PlanGeometry`] built already (it must be of `input.mesh`).
pub fn plan_on(
    input: &PlanInput,
    settings: &PlanSettings,
    geometry: &PlanGeometry,
) -> Result<Plan, PlanError> {
    let mesh = input.mesh;
    let n = mesh.element_count();
    for (what, len) in [
        ("error_sq", input.error_sq.len()),
        ("exponents", input.exponents.len()),
        ("singular", input.singular.len()),
        ("size_now", input.size_now.len()),
    ] {
        if len != n {
            return Err(PlanError::Length {
                what,
                found: len,
                expected: n,
            });
        }
    }
    check_values("error norm squared", input.error_sq)?;
    check_values("current size", input.size_now)?;
    for (index, &q) in input.exponents.iter().enumerate() {
        if !(q.is_finite() && q > 0.0) {
            return Err(PlanError::ElementValue {
                what: "exponent",
                index,
                value: q,
            });
        }
    }
    let target = settings.target_error.unwrap_or(DEFAULT_TARGET_ERROR);
    check_range("target error", target, 0.0, 1.0, "a fraction in (0, 1]")?;
    if let Some(b) = settings.max_dofs {
        check_range("DOF budget", b, 0.0, f64::MAX, "a positive number")?;
    }
    check_range("grading", settings.grading, 0.0, f64::MAX, "a value > 0")?;
    let (shrink, grow) = settings.step_limits;
    check_range("step shrink limit", shrink, 0.0, 1.0, "a value in (0, 1]")?;
    check_range("step growth limit", grow, 0.0, f64::MAX, "a value >= 1")?;
    if grow < 1.0 {
        return Err(PlanError::Parameter {
            what: "step growth limit",
            value: grow,
            expected: "a value >= 1",
        });
    }
    if let (Some(lo), Some(hi)) = (settings.size_min, settings.size_max) {
        if lo > hi {
            return Err(PlanError::Parameter {
                what: "size_min",
                value: lo,
                expected: "a value <= size_max",
            });
        }
    }
    let error_sq_total: f64 = input.error_sq.iter().sum();
    if error_sq_total <= 0.0 {
        return Err(PlanError::NoError);
    }
    let reference_sq = input.energy_sq + error_sq_total;
    let d = mesh.dimension as f64;
    let (lo, hi) = mesh.bounding_box();
    let diagonal = crate::mesh::distance(&lo, &hi);
    let floor = settings
        .singular_floor
        .unwrap_or(DEFAULT_SINGULAR_FLOOR * diagonal);
    let PlanGeometry { graph, counter } = geometry;
    // Vertices of singular elements keep at least the floor (capped by the element's current
    // size, so the floor never coarsens): the vertex minimum would otherwise hand them a
    // neighbour's smaller target and refinement would go on at the spot plan after plan.
    let mut floor_nodes: Vec<(u32, f64)> = Vec::new();
    for e in (0..n).filter(|&e| input.singular[e]) {
        let (kind, nodes) = mesh.element(e);
        let f = floor.min(input.size_now[e]);
        floor_nodes.extend(nodes[..kind.vertex_count()].iter().map(|&v| (v, f)));
    }
    floor_nodes.sort_unstable_by(|a, b| a.0.cmp(&b.0).then(a.1.total_cmp(&b.1)));
    floor_nodes.dedup_by_key(|x| x.0);
    let nodes_per_element = mesh.node_count() as f64 / n.max(1) as f64;
    let dofs_of = |elements: f64| elements * nodes_per_element * input.dofs_per_node as f64;

    // Steps 2-4 for a set of ratios.
    let realise = |ratio: &[f64]| -> Result<Realised, PlanError> {
        let element_target: Vec<f64> = (0..n)
            .into_par_iter()
            .map(|i| {
                let mut s = ratio[i].clamp(shrink, grow);
                if settings.refine_only {
                    s = s.min(1.0);
                }
                let mut h = input.size_now[i] * s;
                if let Some(m) = settings.size_max {
                    h = h.min(m);
                }
                if let Some(m) = settings.size_min {
                    h = h.max(m);
                }
                if input.singular[i] {
                    h = h.max(floor.min(input.size_now[i]));
                }
                h
            })
            .collect();
        let mut nodal = vertex_minimum(mesh, &element_target);
        let hold_floor = |nodal: &mut [f64]| {
            for &(node, f) in &floor_nodes {
                let h = &mut nodal[node as usize];
                *h = h.max(f);
            }
        };
        hold_floor(&mut nodal);
        // Non-vertex nodes (and nodes in no element) lie on no vertex edge, so the gradation
        // never reads them: park them at f64::MAX (a finite size it accepts) and interpolate
        // them once the vertices are final.
        nodal.par_iter_mut().for_each(|h| {
            if h.is_infinite() {
                *h = f64::MAX;
            }
        });
        graph.limit(&mut nodal, settings.grading)?;
        nodal.par_iter_mut().for_each(|h| {
            if *h == f64::MAX {
                *h = f64::INFINITY;
            }
        });
        // The floor wins over the gradation at the spot itself: refinement stops there even
        // when a neighbour asks for smaller elements.
        hold_floor(&mut nodal);
        interpolate_non_vertex(mesh, &mut nodal);
        let size_target = element_sizes(mesh, &nodal);
        let elements = counter.count(mesh, &nodal);
        let terms: Vec<f64> = (0..n)
            .into_par_iter()
            .map(|i| {
                let now = input.size_now[i];
                if input.error_sq[i] == 0.0 || now <= 0.0 {
                    0.0
                } else {
                    input.error_sq[i] * (size_target[i] / now).powf(2.0 * input.exponents[i])
                }
            })
            .collect();
        Ok(Realised {
            element_target,
            nodal,
            size_target,
            elements,
            error_sq: terms.iter().sum(),
        })
    };

    let (realised, budget_limited, marks) = match settings.strategy {
        Strategy::Optimal => {
            let groups = ExponentGroups::new(input.error_sq, input.exponents, d);
            let ratio_at = |ln_mu: f64| -> Vec<f64> {
                let mu = ln_mu.exp();
                (0..n)
                    .into_par_iter()
                    .map(|i| {
                        let (e2, q) = (input.error_sq[i], input.exponents[i]);
                        (d / (2.0 * q * mu * e2)).powf(1.0 / (2.0 * q + d))
                    })
                    .collect()
            };
            let goal = target * target * reference_sq;
            let ln_mu = groups.solve(goal, ExponentGroups::error_sq, false).ok_or(
                PlanError::NoBracket {
                    target: goal.sqrt(),
                },
            )?;
            let mut realised = realise(&ratio_at(ln_mu))?;
            if settings.fit_final_error {
                realised = fit_final_error(&groups, goal, realised, &ratio_at, &realise)?;
            }
            match settings.max_dofs {
                Some(budget) if dofs_of(realised.elements) > budget => (
                    fit_budget(&groups, budget, &dofs_of, &ratio_at, &realise)?,
                    true,
                    None,
                ),
                _ => (realised, false, None),
            }
        }
        Strategy::Dorfler(theta) | Strategy::Maximum(theta) | Strategy::Fraction(theta) => {
            let marked = match settings.strategy {
                Strategy::Dorfler(_) => dorfler(input.error_sq, theta)?,
                Strategy::Maximum(_) => maximum(&norms(input.error_sq), theta)?,
                _ => fraction(&norms(input.error_sq), theta)?,
            };
            let ratio: Vec<f64> = marked.iter().map(|&m| if m { 0.5 } else { 1.0 }).collect();
            (realise(&ratio)?, false, Some(marked))
        }
    };

    let refine_mark: Vec<i8> = match marks {
        Some(marked) => marked.iter().map(|&m| i8::from(m)).collect(),
        None => realised
            .size_target
            .iter()
            .zip(input.size_now)
            .map(|(&t, &now)| {
                if t < KEEP_BAND * now {
                    1
                } else if t > now / KEEP_BAND && !settings.refine_only {
                    -1
                } else {
                    0
                }
            })
            .collect(),
    };
    let predicted_nodes = realised.elements * nodes_per_element;
    Ok(Plan {
        strategy: settings.strategy,
        target_error: target,
        achievable_error: (realised.error_sq / reference_sq).sqrt(),
        budget_limited,
        element_target: realised.element_target,
        size_target: realised.size_target,
        nodal_size: realised.nodal,
        refine_mark,
        predicted_elements: realised.elements,
        predicted_nodes,
        predicted_dofs: predicted_nodes * input.dofs_per_node as f64,
        current_dofs: (mesh.node_count() * input.dofs_per_node) as f64,
    })
}

/// `||e||_K` from `||e||_K^2`.
fn norms(error_sq: &[f64]) -> Vec<f64> {
    error_sq.iter().map(|e| e.sqrt()).collect()
}

/// Raises the error the size law aims for until the final field's predicted error squared lies
/// in `[(1 - TARGET_FIT_BAND)^2 goal, goal]`: each round scales the law's aim by `goal / got`
/// (the final field's error falls with the law's, so the rounds approach the goal from below;
/// at most 8 rounds, the closest plan at or below the goal is kept). A plan already at or above
/// the goal (the step limits hold it back) is returned unchanged.
fn fit_final_error(
    groups: &ExponentGroups,
    goal: f64,
    first: Realised,
    ratio_at: &dyn Fn(f64) -> Vec<f64>,
    realise: &dyn Fn(&[f64]) -> Result<Realised, PlanError>,
) -> Result<Realised, PlanError> {
    let low = (1.0 - TARGET_FIT_BAND).powi(2) * goal;
    if first.error_sq >= low || first.error_sq <= 0.0 {
        return Ok(first);
    }
    let mut aim = goal * goal / first.error_sq;
    let mut best = first;
    for _ in 0..8 {
        let ln_mu = groups
            .solve(aim, ExponentGroups::error_sq, false)
            .ok_or(PlanError::NoBracket { target: aim.sqrt() })?;
        let r = realise(&ratio_at(ln_mu))?;
        if r.error_sq <= 0.0 {
            break;
        }
        aim *= goal / r.error_sq;
        if r.error_sq <= goal {
            let done = r.error_sq >= low;
            if r.error_sq > best.error_sq {
                best = r;
            }
            if done {
                break;
            }
        }
    }
    Ok(best)
}

/// Spends a DOF budget: start from the multiplier whose closed-form count (sheet 3.2) equals
/// the budget, then correct the count aimed for by the ratio of the final-field prediction to
/// the budget until the prediction is within 2 % below it (at most 8 rounds; the best plan
/// that fits is kept).
fn fit_budget(
    groups: &ExponentGroups,
    budget_dofs: f64,
    dofs_of: &dyn Fn(f64) -> f64,
    ratio_at: &dyn Fn(f64) -> Vec<f64>,
    realise: &dyn Fn(&[f64]) -> Result<Realised, PlanError>,
) -> Result<Realised, PlanError> {
    let budget_elements = budget_dofs / dofs_of(1.0);
    let mut aim = budget_elements;
    let mut best: Option<Realised> = None;
    let mut smallest: Option<Realised> = None;
    for _ in 0..8 {
        let ln_mu = groups
            .solve(aim, ExponentGroups::elements, true)
            .ok_or(PlanError::NoBracket { target: aim })?;
        let r = realise(&ratio_at(ln_mu))?;
        let ratio = r.elements / budget_elements;
        aim *= 0.99 / ratio;
        let done = ratio <= 1.0 && ratio > 0.98;
        if ratio <= 1.0 {
            if best.as_ref().is_none_or(|b| r.elements > b.elements) {
                best = Some(r);
            }
        } else if smallest.as_ref().is_none_or(|b| r.elements < b.elements) {
            smallest = Some(r);
        }
        if done {
            break;
        }
    }
    // Nothing fitted (the limits alone exceed the budget): return the smallest plan tried.
    best.or(smallest).ok_or(PlanError::NoBracket {
        target: budget_elements,
    })
}

#[cfg(test)]
#[path = "planner_tests.rs"]
mod tests;
