//! The closed adaptive loop on the benchmark problems: solve, estimate (SPR), screen for
//! singular spots, plan the next mesh for a target error, remesh with hone's mesher following
//! the planned size field, and repeat; and, for comparison, uniform refinement with the same
//! mesher and a least-squares convergence rate.
//!
//! Everything the planner is told comes from the estimate and the screening, as in `hone plan`:
//! element exponents are the degree p, or `min(p, lambda)` in elements touching a singular spot.
//! The exact error of each mesh (from the problem's exact stress) is recorded beside the
//! estimate and the plan's predictions, so that the loop's promises can be checked against what
//! the next mesh really gives.
//!
//! Errors are relative in the energy norm, `||e|| / ||u||` with `||u||` the exact solution's
//! energy norm over the mesh ([`Solved::relative_error`], the definition the effectivity table
//! uses); the estimate is the planner's `eta = ||e*|| / sqrt(||u_h||^2 + ||e*||^2)`.

use super::meshes::{triangulate, Domain, MeshError, MesherOptions};
use super::problems::{Problem, Solved};
use super::solver::SolveError;
use crate::element::ElementKind;
use crate::estimate::{Computed, EstimateError};
use crate::mesh::locate::interpolate_with;
use crate::mesh::{Locator, Mesh, Model};
use crate::plan::{plan, Plan, PlanError, PlanInput, PlanSettings};
use crate::recovery::RecoveryMethod;
use crate::singular::{screen_with, PoissonRatio, ScreeningOptions, SingularError};
use rstar::primitives::GeomWithData;
use rstar::RTree;
use std::sync::atomic::{AtomicUsize, Ordering};
use thiserror::Error;

/// A benchmark problem built on a given mesh of its domain (for example
/// [`l_shape_on`](super::problems::l_shape_on)).
pub type ProblemOn = fn(Mesh) -> Problem;

/// A plan is "reachable" when its predicted error is at most this factor above its target:
/// the per-step limits, the singular floor and the gradation then did not hold the sizes back
/// from what the target asks (5 %: the band within which `hone plan` does not warn about the
/// step limits; our choice).
pub const REACHABLE_FACTOR: f64 = 1.05;

/// Why a run stopped.
#[derive(Debug, Error)]
pub enum AdaptiveError {
    /// The mesher failed.
    #[error("meshing: {0}")]
    Mesh(#[from] MeshError),
    /// The reference solve failed.
    #[error("solving: {0}")]
    Solve(#[from] SolveError),
    /// The estimate failed.
    #[error("estimating: {0}")]
    Estimate(#[from] EstimateError),
    /// The screening for singular spots failed.
    #[error("screening: {0}")]
    Screen(#[from] SingularError),
    /// The planner refused its input.
    #[error("planning: {0}")]
    Plan(#[from] PlanError),
}

/// What was planned on one mesh.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct PlanRecord {
    /// The plan's target relative error.
    pub target_error: f64,
    /// The relative error the plan predicts for the mesh it describes.
    pub achievable_error: f64,
    /// Predicted elements of the next mesh.
    pub predicted_elements: f64,
    /// Predicted DOFs of the next mesh (nodes x components).
    pub predicted_dofs: f64,
    /// Smallest and largest nodal size of the planned field.
    pub size_range: (f64, f64),
}

impl PlanRecord {
    /// Whether the plan's predicted error is within [`REACHABLE_FACTOR`] of its target.
    pub fn reachable(&self) -> bool {
        self.achievable_error <= REACHABLE_FACTOR * self.target_error
    }

    fn of(p: &Plan) -> Self {
        let size_range = p
            .nodal_size
            .iter()
            .fold((f64::INFINITY, 0.0_f64), |(lo, hi), &h| {
                (lo.min(h), hi.max(h))
            });
        Self {
            target_error: p.target_error,
            achievable_error: p.achievable_error,
            predicted_elements: p.predicted_elements,
            predicted_dofs: p.predicted_dofs,
            size_range,
        }
    }
}

/// One mesh of a run: its size, its exact and estimated errors, and the plan made on it
/// (adaptive runs only).
#[derive(Clone, Debug, PartialEq)]
pub struct StepRecord {
    /// Position in the run (0: the starting mesh).
    pub step: usize,
    /// Elements.
    pub elements: usize,
    /// Degrees of freedom, constrained ones included (nodes x components, the planner's count).
    pub dofs: usize,
    /// Exact relative error `||e|| / ||u||` ([`Solved::relative_error`]).
    pub exact_relative_error: f64,
    /// Estimated relative error (SPR), `eta`.
    pub estimated_relative_error: f64,
    /// Elements touching a singular spot found by the screening.
    pub singular_elements: usize,
    /// Size queries of the mesher that fell outside the previous mesh and took the nearest old
    /// vertex's size (0 for the first mesh and for uniform runs).
    pub outside_queries: usize,
    /// The plan made on this mesh (`None` in uniform runs).
    pub plan: Option<PlanRecord>,
}

impl StepRecord {
    /// DOFs of this mesh over the DOFs the previous plan predicted for it, minus one (`None`
    /// without a previous plan).
    pub fn dof_prediction_error(&self, previous: &StepRecord) -> Option<f64> {
        previous
            .plan
            .map(|p| self.dofs as f64 / p.predicted_dofs - 1.0)
    }
}

/// Settings of [`adaptive_run`].
#[derive(Clone, Debug)]
pub struct AdaptiveSettings {
    /// Element kind of every mesh (tri3 or tri6: the mesher makes triangles).
    pub kind: ElementKind,
    /// Constant target edge length of the starting mesh.
    pub start_size: f64,
    /// Target relative error of each plan, one entry per remesh.
    pub targets: Vec<f64>,
    /// The planner's settings; `target_error` is replaced by each entry of `targets`.
    pub plan: PlanSettings,
    /// The mesher's settings.
    pub mesher: MesherOptions,
}

/// A solved mesh: the exact error, the estimate and the record.
struct Measured {
    solved: Solved,
    computed: Computed,
    record: StepRecord,
}

/// Solves `problem`, estimates with SPR and records the errors.
fn measure(problem: &Problem, step: usize) -> Result<Measured, AdaptiveError> {
    let solved = problem.solve()?;
    let computed = problem.estimate(&solved, RecoveryMethod::Spr)?;
    let record = StepRecord {
        step,
        elements: solved.model.mesh.element_count(),
        dofs: solved.model.mesh.node_count() * solved.model.mesh.dimension,
        exact_relative_error: solved.relative_error(),
        estimated_relative_error: computed.estimate.relative_error,
        singular_elements: 0,
        outside_queries: 0,
        plan: None,
    };
    Ok(Measured {
        solved,
        computed,
        record,
    })
}

/// Screens the solved model and plans for `settings` (the wiring of `hone plan`: exponent p per
/// element, `min(p, lambda)` in elements touching a spot, which are also the singular ones).
fn plan_on(
    problem: &Problem,
    m: &Measured,
    settings: &PlanSettings,
) -> Result<(Plan, usize), AdaptiveError> {
    let model: &Model = &m.solved.model;
    let mesh = &model.mesh;
    let options = ScreeningOptions::new(
        problem.mode,
        PoissonRatio::from_materials(&problem.materials),
    );
    let screening = screen_with(model, &m.computed.adjacency, &m.computed.boundary, &options)?;
    let (exponents, singular): (Vec<f64>, Vec<bool>) = screening
        .element_spot
        .iter()
        .enumerate()
        .map(|(e, spot)| {
            let p = mesh.element(e).0.order() as f64;
            match spot {
                Some(s) => (p.min(screening.spots[*s as usize].lambda), true),
                None => (p, false),
            }
        })
        .unzip();
    let est = &m.computed.estimate;
    let size_now = mesh.size_now();
    let input = PlanInput {
        mesh,
        error_sq: &est.error_sq,
        energy_sq: est.energy_sq.iter().sum(),
        exponents: &exponents,
        singular: &singular,
        size_now: &size_now,
        dofs_per_node: mesh.dimension,
    };
    let flagged = singular.iter().filter(|&&s| s).count();
    Ok((plan(&input, settings)?, flagged))
}

/// Solves, estimates, screens and plans one mesh; the record carries the plan's summary.
fn measure_and_plan(
    problem: &Problem,
    step: usize,
    settings: &PlanSettings,
) -> Result<(Measured, Plan), AdaptiveError> {
    let mut m = measure(problem, step)?;
    let (the_plan, flagged) = plan_on(problem, &m, settings)?;
    m.record.singular_elements = flagged;
    m.record.plan = Some(PlanRecord::of(&the_plan));
    Ok((m, the_plan))
}

/// One step of the loop without the remesh: solve `problem`, estimate, screen and plan with
/// `settings` (the record of step 0 of a run on this mesh).
pub fn plan_step(problem: &Problem, settings: &PlanSettings) -> Result<StepRecord, AdaptiveError> {
    Ok(measure_and_plan(problem, 0, settings)?.0.record)
}

/// The planned nodal size field of `mesh` as a function of position, for the mesher.
///
/// Inside the old mesh the field is interpolated with the element's shape functions (the plan
/// gives mid-side nodes the mean of their corners, so this is the linear interpolation of the
/// corner sizes, as the planner's own count assumes). A point the [`Locator`] does not find
/// (farther outside the old mesh than its boundary tolerance, which happens where the old
/// boundary cuts a chord or a parabola across a circular arc) takes the size of the nearest old
/// vertex: the field is continuous, so that vertex's value is the nearest information there is,
/// and such points lie within a fraction of an element of the old boundary. Their number is
/// counted in `outside`.
struct SizeField<'a> {
    mesh: &'a Mesh,
    locator: Locator,
    nodal: &'a [f64],
    vertices: RTree<GeomWithData<[f64; 2], u32>>,
    outside: AtomicUsize,
}

impl<'a> SizeField<'a> {
    fn new(mesh: &'a Mesh, nodal: &'a [f64]) -> Self {
        let mut is_vertex = vec![false; mesh.node_count()];
        for e in 0..mesh.element_count() {
            let (kind, nodes) = mesh.element(e);
            for &n in &nodes[..kind.vertex_count()] {
                is_vertex[n as usize] = true;
            }
        }
        let vertices = (0..mesh.node_count())
            .filter(|&n| is_vertex[n])
            .map(|n| {
                let p = mesh.points[n];
                GeomWithData::new([p[0], p[1]], n as u32)
            })
            .collect();
        Self {
            mesh,
            locator: Locator::new(mesh),
            nodal,
            vertices: RTree::bulk_load(vertices),
            outside: AtomicUsize::new(0),
        }
    }

    fn at(&self, x: [f64; 2]) -> f64 {
        let p = [x[0], x[1], 0.0];
        if let Some((e, xi)) = self.locator.locate(self.mesh, p) {
            return interpolate_with(self.mesh, e, xi, |n| [self.nodal[n as usize]])[0];
        }
        self.outside.fetch_add(1, Ordering::Relaxed);
        match self.vertices.nearest_neighbor(x) {
            Some(v) => self.nodal[v.data as usize],
            // A mesh without vertices has no field; a non-positive size makes the mesher
            // report the point.
            None => 0.0,
        }
    }
}

/// The adaptive loop: mesh `domain` uniformly at `settings.start_size`, then for each target in
/// `settings.targets` solve, estimate, screen, plan for that target and remesh with the plan's
/// nodal field; the last mesh is solved, estimated and planned for the last target too (its
/// plan is recorded, not built). Returns one record per mesh (`targets.len() + 1`).
pub fn adaptive_run(
    build: ProblemOn,
    domain: &Domain,
    settings: &AdaptiveSettings,
) -> Result<Vec<StepRecord>, AdaptiveError> {
    let start = settings.start_size;
    let mut mesh = triangulate(domain, &|_| start, settings.kind, &settings.mesher)?;
    let mut outside = 0;
    let mut records = Vec::with_capacity(settings.targets.len() + 1);
    let last = settings.targets.len().saturating_sub(1);
    for step in 0..=settings.targets.len() {
        let problem = build(mesh);
        let mut plan_settings = settings.plan.clone();
        plan_settings.target_error = settings.targets.get(step.min(last)).copied();
        let (mut m, the_plan) = measure_and_plan(&problem, step, &plan_settings)?;
        m.record.outside_queries = outside;
        records.push(m.record);
        if step == settings.targets.len() {
            break;
        }
        let old = &m.solved.model.mesh;
        let field = SizeField::new(old, &the_plan.nodal_size);
        mesh = triangulate(domain, &|x| field.at(x), settings.kind, &settings.mesher)?;
        outside = field.outside.load(Ordering::Relaxed);
    }
    Ok(records)
}

/// Uniform refinement for comparison: one mesh of `domain` per constant target edge length in
/// `sizes`, solved and estimated (no plans).
pub fn uniform_run(
    build: ProblemOn,
    domain: &Domain,
    kind: ElementKind,
    sizes: &[f64],
    mesher: &MesherOptions,
) -> Result<Vec<StepRecord>, AdaptiveError> {
    sizes
        .iter()
        .enumerate()
        .map(|(step, &h)| {
            let mesh = triangulate(domain, &|_| h, kind, mesher)?;
            Ok(measure(&build(mesh), step)?.record)
        })
        .collect()
}

/// A power law `error = coefficient * dofs^(-rate)` fitted by least squares on the logarithms.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct RateFit {
    /// Convergence rate with respect to the DOFs (positive when the error falls).
    pub rate: f64,
    /// The error at one DOF on the fitted line.
    pub coefficient: f64,
}

impl RateFit {
    /// Least-squares fit of `ln error = ln coefficient - rate ln dofs` (ordinary least squares
    /// of a straight line; common practice for observed convergence rates). `None` with fewer
    /// than two points, non-positive values, or all DOFs equal.
    pub fn of(dofs: &[f64], errors: &[f64]) -> Option<RateFit> {
        if dofs.len() < 2
            || dofs.len() != errors.len()
            || dofs
                .iter()
                .chain(errors)
                .any(|v| !(v.is_finite() && *v > 0.0))
        {
            return None;
        }
        let x: Vec<f64> = dofs.iter().map(|v| v.ln()).collect();
        let y: Vec<f64> = errors.iter().map(|v| v.ln()).collect();
        let n = x.len() as f64;
        let (mx, my) = (x.iter().sum::<f64>() / n, y.iter().sum::<f64>() / n);
        let sxx: f64 = x.iter().map(|v| (v - mx).powi(2)).sum();
        if sxx <= 0.0 {
            return None;
        }
        let sxy: f64 = x.iter().zip(&y).map(|(a, b)| (a - mx) * (b - my)).sum();
        let slope = sxy / sxx;
        Some(RateFit {
            rate: -slope,
            coefficient: (my - slope * mx).exp(),
        })
    }

    /// The fit over the records of a run (DOFs against exact relative errors).
    pub fn of_records(records: &[StepRecord]) -> Option<RateFit> {
        let dofs: Vec<f64> = records.iter().map(|r| r.dofs as f64).collect();
        let errors: Vec<f64> = records.iter().map(|r| r.exact_relative_error).collect();
        Self::of(&dofs, &errors)
    }

    /// DOFs at which the fitted line reaches `error` (`None` for a rate that is not positive).
    pub fn dofs_for(&self, error: f64) -> Option<f64> {
        (self.rate > 0.0).then(|| (self.coefficient / error).powf(1.0 / self.rate))
    }
}

/// Header of [`StepRecord::line`]'s table.
pub const TABLE_HEADER: &str = "| step | elements | DOFs | exact rel. error | estimated | singular el. | target | predicted error | predicted DOFs next |\n|---|---|---|---|---|---|---|---|---|";

impl StepRecord {
    /// One Markdown table line (plan columns blank without a plan).
    pub fn line(&self) -> String {
        let plan = match &self.plan {
            Some(p) => format!(
                "{:.2} % | {:.3} % | {:.0}",
                100.0 * p.target_error,
                100.0 * p.achievable_error,
                p.predicted_dofs
            ),
            None => " | | ".to_string(),
        };
        format!(
            "| {} | {} | {} | {:.3} % | {:.3} % | {} | {} |",
            self.step,
            self.elements,
            self.dofs,
            100.0 * self.exact_relative_error,
            100.0 * self.estimated_relative_error,
            self.singular_elements,
            plan
        )
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Points on an exact power law give back its rate and coefficient (error = 2 N^-0.5 at
    /// N = 100, 400, 1600: 0.2, 0.1, 0.05; arithmetic).
    #[test]
    fn rate_fit_recovers_a_power_law() {
        let fit = RateFit::of(&[100.0, 400.0, 1600.0], &[0.2, 0.1, 0.05]).unwrap();
        assert!((fit.rate - 0.5).abs() < 1e-12, "{fit:?}");
        assert!((fit.coefficient - 2.0).abs() < 1e-12, "{fit:?}");
        // 2 N^-0.5 = 0.01 at N = 40 000.
        let n = fit.dofs_for(0.01).unwrap();
        assert!((n - 40_000.0).abs() < 1e-6 * 40_000.0, "{n}");
        assert!(RateFit::of(&[100.0], &[0.2]).is_none());
        assert!(RateFit::of(&[100.0, 100.0], &[0.2, 0.1]).is_none());
    }
}
