//! Convergence studies over a sequence of meshes of the same part.
//!
//! Each mesh is solved elsewhere, read, estimated and reduced to a [`MeshSample`] (its sizes and
//! the value of every quantity); [`analyse`] then sorts the samples by degrees of freedom and
//! judges every quantity:
//!
//! * three or more meshes: apparent order, Richardson extrapolation and GCI by Celik et al.
//!   (2008) on the finest three ([`celik`]), with `Fs = 1.25`; with four or more a
//!   least-squares fit `phi = phi0 + a h^p` as well ([`fit`]);
//! * two meshes: extrapolation and GCI with the expected order and `Fs = 3.0`;
//! * a verdict ([`verdict`]): converged, converging, oscillating, diverging, or singular. A
//!   singular value gets its growth exponent and the statement that it has no limit, never an
//!   extrapolated value or a GCI.
//!
//! Expected orders in `h` (method sheet 6.2, FE-specific): strain energy `2p`, energy-norm
//! error `p`, stresses `p`, displacements `p + 1` (p = element order).
//!
//! The estimated global error against the degrees of freedom N gives the energy-error rate
//! `||e|| ~ N^-rate`, compared with the optimal `p/d` of smooth problems; a clearly lower rate
//! (below 80 % of optimal, hone's threshold) is singularity-limited, with `rate = min(p,
//! lambda)/d` under uniform refinement (method sheet 4.3).

pub mod celik;
pub mod fit;
pub mod probe;
mod sample;
pub mod verdict;

pub use fit::PowerFit;
pub use probe::{Probe, ProbeError};
pub use sample::{node_weights, quantity_specs, sample, MeshSample};
pub use verdict::Verdict;

use serde::Serialize;
use thiserror::Error;

/// What kind of value a quantity is; decides its expected order and whether it may be singular.
#[derive(Copy, Clone, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum QuantityKind {
    /// Strain energy U_h (global).
    StrainEnergy,
    /// Estimated global error ||e|| (global).
    ErrorNorm,
    /// A stress value (local; may be singular).
    Stress,
    /// A displacement value.
    Displacement,
}

impl QuantityKind {
    /// Expected order in h for elements of order `p` (method sheet 6.2).
    pub fn expected_order(self, p: usize) -> f64 {
        let p = p as f64;
        match self {
            QuantityKind::StrainEnergy => 2.0 * p,
            QuantityKind::ErrorNorm | QuantityKind::Stress => p,
            QuantityKind::Displacement => p + 1.0,
        }
    }
}

/// Name and kind of one quantity.
#[derive(Clone, Debug, PartialEq)]
pub struct QuantitySpec {
    /// Name in reports.
    pub name: String,
    /// Kind.
    pub kind: QuantityKind,
}

/// A singular spot flagged by a screening (input): where, its exponent, and what it is.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Spot {
    /// Position.
    pub location: [f64; 3],
    /// Singularity exponent lambda (stress ~ r^(lambda - 1)).
    pub lambda: f64,
    /// Plain name of the kind of spot (e.g. "re-entrant corner").
    pub kind: String,
}

/// Options of [`analyse`].
#[derive(Clone, Debug, PartialEq)]
pub struct StudyOptions {
    /// Relative change below which a quantity counts as converged (a fraction).
    pub tolerance: f64,
    /// A local quantity belongs to a spot within this many finest representative sizes.
    pub spot_radius: f64,
}

/// Default relative tolerance: 1 % (common practice).
pub const DEFAULT_TOLERANCE: f64 = 0.01;

impl Default for StudyOptions {
    fn default() -> Self {
        StudyOptions {
            tolerance: DEFAULT_TOLERANCE,
            spot_radius: 2.0,
        }
    }
}

/// Growth of a singular value.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct SingularGrowth {
    /// Observed growth exponent k, value ~ h^-k (mean over the finest refinements).
    pub observed_exponent: f64,
    /// Singularity exponent lambda: from the flagged spot, or 1 - k from the values.
    pub lambda: f64,
    /// Expected growth per halving of h, 2^(1 - lambda).
    pub growth_per_halving: f64,
    /// Where the exponent comes from: the spot's kind, or "growth of the values".
    pub source: String,
}

/// The judgement on one quantity. Values and DOFs run from the coarsest mesh to the finest.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct QuantityResult {
    /// Name.
    pub name: String,
    /// Kind.
    pub kind: QuantityKind,
    /// Value per mesh.
    pub values: Vec<f64>,
    /// DOFs per mesh.
    pub dofs: Vec<usize>,
    /// Where the value was read on the finest mesh (local quantities).
    pub location: Option<[f64; 3]>,
    /// Expected order in h.
    pub expected_order: f64,
    /// Observed (apparent) order in h, finest three meshes.
    pub observed_order: Option<f64>,
    /// Richardson extrapolated value.
    pub extrapolated: Option<f64>,
    /// GCI of the finest mesh, a fraction.
    pub gci_fine: Option<f64>,
    /// Safety factor used for the GCI.
    pub safety_factor: Option<f64>,
    /// Relative change between the finest two meshes, e_a21.
    pub relative_change: f64,
    /// GCI32 / (r21^p GCI21), about 1 in the asymptotic range.
    pub asymptotic_ratio: Option<f64>,
    /// Stern's ratio R = eps21/eps32.
    pub convergence_ratio: Option<f64>,
    /// Half the range of the finest three values (oscillating sequences; Stern et al. 2001).
    pub oscillation_uncertainty: Option<f64>,
    /// Least-squares fit over all meshes (four or more).
    pub fit: Option<PowerFit>,
    /// Verdict.
    pub verdict: Verdict,
    /// Growth data of a singular value.
    pub singular: Option<SingularGrowth>,
}

/// A singular point in the report: flagged by a screening or found from growing values.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct SingularPoint {
    /// Position (for values found from growth: where the finest mesh's value was read).
    pub location: [f64; 3],
    /// Singularity exponent.
    pub lambda: f64,
    /// What it is.
    pub kind: String,
    /// Quantities judged singular there.
    pub quantities: Vec<String>,
}

/// Rate of the estimated global error against the DOFs.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct EnergyErrorRate {
    /// Observed rate over the finest two meshes, ||e|| ~ N^-rate.
    pub observed: Option<f64>,
    /// Least-squares rate over all meshes.
    pub fitted: Option<f64>,
    /// Optimal rate p/d.
    pub optimal: f64,
    /// "optimal", "singularity-limited", "pre-asymptotic" (low, but too high for a
    /// singularity) or "undetermined".
    pub verdict: &'static str,
    /// lambda = rate d implied by a singularity-limited rate.
    pub implied_lambda: Option<f64>,
}

/// A finished study.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Study {
    /// Meshes from the coarsest to the finest: (label, DOFs, elements, representative size).
    pub meshes: Vec<(String, usize, usize, f64)>,
    /// One result per quantity.
    pub quantities: Vec<QuantityResult>,
    /// Singular points.
    pub singular_points: Vec<SingularPoint>,
    /// Energy-error rate.
    pub energy_error_rate: EnergyErrorRate,
    /// Tolerance used (fraction).
    pub tolerance: f64,
}

/// Why a study cannot be made.
#[derive(Debug, Error, PartialEq)]
pub enum StudyError {
    /// Fewer than two meshes.
    #[error("a convergence study needs at least two meshes, got {0}")]
    TooFewMeshes(usize),
    /// 2D and 3D meshes mixed.
    #[error("{a} is {da}D but {b} is {db}D; a study compares meshes of the same part")]
    MixedDimensions {
        /// First file.
        a: String,
        /// Its dimension.
        da: usize,
        /// Other file.
        b: String,
        /// Its dimension.
        db: usize,
    },
    /// Two meshes of the same size.
    #[error("{a} and {b} have the same representative element size {h}; refine between meshes")]
    SameSize {
        /// First file.
        a: String,
        /// Other file.
        b: String,
        /// The size.
        h: f64,
    },
    /// The tolerance is not a positive fraction.
    #[error("tolerance {0}: expected a positive fraction (0.01 for 1 %)")]
    BadTolerance(f64),
}

/// Least-squares slope of ln y against ln x.
pub fn log_slope(x: &[f64], y: &[f64]) -> Option<f64> {
    if x.len() < 2 || x.iter().chain(y).any(|v| v.is_nan() || *v <= 0.0) {
        return None;
    }
    let lx: Vec<f64> = x.iter().map(|v| v.ln()).collect();
    let ly: Vec<f64> = y.iter().map(|v| v.ln()).collect();
    let n = lx.len() as f64;
    let (mx, my) = (lx.iter().sum::<f64>() / n, ly.iter().sum::<f64>() / n);
    let sxy: f64 = lx.iter().zip(&ly).map(|(a, b)| (a - mx) * (b - my)).sum();
    let sxx: f64 = lx.iter().map(|a| (a - mx).powi(2)).sum();
    (sxx > 0.0).then(|| sxy / sxx)
}

/// Rate below this fraction of the optimal one counts as singularity-limited (hone's
/// threshold; the L-shape's 0.27 against 0.5 is far below it, smooth problems are within 10 %).
pub const LIMITED_FRACTION: f64 = 0.8;

fn energy_error_rate(samples: &[MeshSample]) -> EnergyErrorRate {
    let finest = &samples[samples.len() - 1];
    let optimal = finest.order as f64 / finest.dimension as f64;
    let dofs: Vec<f64> = samples.iter().map(|s| s.dofs as f64).collect();
    let err: Vec<f64> = samples.iter().map(|s| s.error_norm).collect();
    let n = samples.len();
    let observed = log_slope(&dofs[n - 2..], &err[n - 2..]).map(|s| -s);
    let fitted = log_slope(&dofs, &err).map(|s| -s);
    // A singularity caps the rate at lambda / d with lambda < 1 (method sheet 4.3). A low rate
    // whose implied lambda is 1 or more cannot come from a singularity: the meshes are not yet
    // in the asymptotic range (curved boundaries or fillets still being resolved).
    let (verdict, implied_lambda) = match observed {
        Some(r) if r < LIMITED_FRACTION * optimal => {
            let lambda = r * finest.dimension as f64;
            if lambda < 1.0 {
                ("singularity-limited", Some(lambda))
            } else {
                ("pre-asymptotic", None)
            }
        }
        Some(_) => ("optimal", None),
        None => ("undetermined", None),
    };
    EnergyErrorRate {
        observed,
        fitted,
        optimal,
        verdict,
        implied_lambda,
    }
}

/// Judges one quantity; `h` and `phi` finest first.
fn judge(
    spec: &QuantitySpec,
    h: &[f64],
    phi: &[f64],
    order: usize,
    spot: Option<&Spot>,
    tolerance: f64,
) -> (QuantityResult, Option<SingularGrowth>) {
    let expected_order = spec.kind.expected_order(order);
    let relative_change = if phi[0] == phi[1] {
        0.0
    } else {
        ((phi[0] - phi[1]) / phi[0]).abs()
    };
    let mut result = QuantityResult {
        name: spec.name.clone(),
        kind: spec.kind,
        values: phi.iter().rev().copied().collect(),
        dofs: Vec::new(),
        location: None,
        expected_order,
        observed_order: None,
        extrapolated: None,
        gci_fine: None,
        safety_factor: None,
        relative_change,
        asymptotic_ratio: None,
        convergence_ratio: None,
        oscillation_uncertainty: None,
        fit: None,
        verdict: verdict::classify(phi, tolerance),
        singular: None,
    };
    if phi.len() >= 3 {
        let (eps21, eps32) = (phi[1] - phi[0], phi[2] - phi[1]);
        result.convergence_ratio = (eps32 != 0.0).then(|| eps21 / eps32);
    }
    let singular = if spec.kind == QuantityKind::Stress {
        let observed = if phi.len() >= 3 {
            verdict::singular_growth(h, phi)
        } else {
            None
        };
        let rising = phi[0].abs() > phi[1].abs() && relative_change > tolerance;
        match spot {
            Some(s) if rising => Some(SingularGrowth {
                observed_exponent: observed.unwrap_or_else(|| {
                    verdict::growth_exponent(phi[0], phi[1], h[0], h[1]).unwrap_or(0.0)
                }),
                lambda: s.lambda,
                growth_per_halving: 2f64.powf(1.0 - s.lambda),
                source: s.kind.clone(),
            }),
            _ => observed.map(|k| SingularGrowth {
                observed_exponent: k,
                lambda: 1.0 - k,
                growth_per_halving: 2f64.powf(k),
                source: "growth of the values".into(),
            }),
        }
    } else {
        None
    };
    if let Some(g) = &singular {
        result.verdict = Verdict::Singular;
        result.singular = Some(g.clone());
        return (result, singular);
    }
    // The error norm tends to zero by definition: its order is informative, an extrapolated
    // "limit" and a GCI relative to a vanishing value are not.
    let limit_exists = spec.kind != QuantityKind::ErrorNorm;
    if phi.len() >= 3 {
        if let Ok(c) = celik::three_mesh([h[0], h[1], h[2]], [phi[0], phi[1], phi[2]]) {
            result.observed_order = Some(c.order);
            result.asymptotic_ratio = Some(c.asymptotic_ratio);
            if limit_exists
                && matches!(
                    result.verdict,
                    Verdict::Converged | Verdict::Converging | Verdict::Oscillating
                )
            {
                result.extrapolated = Some(c.extrapolated);
                result.gci_fine = Some(c.gci_fine);
                result.safety_factor = Some(celik::SAFETY_THREE_MESHES);
            }
        }
        if result.verdict == Verdict::Oscillating {
            let (lo, hi) = phi[..3]
                .iter()
                .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| {
                    (a.min(*v), b.max(*v))
                });
            result.oscillation_uncertainty = Some(0.5 * (hi - lo));
        }
        result.fit = fit::power_fit(h, phi);
    } else if limit_exists && phi[0] != phi[1] {
        let r = h[1] / h[0];
        result.extrapolated = Some(celik::extrapolate(phi[0], phi[1], r, expected_order));
        result.gci_fine = Some(celik::gci(
            phi[0],
            phi[1],
            r,
            expected_order,
            celik::SAFETY_TWO_MESHES,
        ));
        result.safety_factor = Some(celik::SAFETY_TWO_MESHES);
    }
    (result, None)
}

/// Judges every quantity of the samples. `spots` are singular points flagged by a screening
/// (may be empty: singular growth is then found from the values alone).
pub fn analyse(
    mut samples: Vec<MeshSample>,
    specs: &[QuantitySpec],
    spots: &[Spot],
    options: &StudyOptions,
) -> Result<Study, StudyError> {
    if samples.len() < 2 {
        return Err(StudyError::TooFewMeshes(samples.len()));
    }
    if !(options.tolerance > 0.0 && options.tolerance < 1.0) {
        return Err(StudyError::BadTolerance(options.tolerance));
    }
    if let Some(s) = samples.iter().find(|s| s.dimension != samples[0].dimension) {
        return Err(StudyError::MixedDimensions {
            a: samples[0].label.clone(),
            da: samples[0].dimension,
            b: s.label.clone(),
            db: s.dimension,
        });
    }
    samples.sort_by(|a, b| a.dofs.cmp(&b.dofs).then(b.size().total_cmp(&a.size())));
    for w in samples.windows(2) {
        if w[0].size() <= w[1].size() || w[1].size().is_nan() {
            return Err(StudyError::SameSize {
                a: w[0].label.clone(),
                b: w[1].label.clone(),
                h: w[1].size(),
            });
        }
    }
    let finest = &samples[samples.len() - 1];
    let order = finest.order;
    let h: Vec<f64> = samples.iter().rev().map(|s| s.size()).collect();
    let dofs: Vec<usize> = samples.iter().map(|s| s.dofs).collect();
    let radius = options.spot_radius * h[0];
    let mut singular_points: Vec<SingularPoint> = Vec::new();
    let mut quantities = Vec::with_capacity(specs.len());
    for (q, spec) in specs.iter().enumerate() {
        let phi: Vec<f64> = samples.iter().rev().map(|s| s.values[q]).collect();
        let location = finest.locations[q];
        let spot = location.and_then(|x| {
            spots
                .iter()
                .filter(|s| distance(s.location, x) <= radius)
                .min_by(|a, b| distance(a.location, x).total_cmp(&distance(b.location, x)))
        });
        let (mut result, singular) = judge(spec, &h, &phi, order, spot, options.tolerance);
        result.dofs = dofs.clone();
        result.location = location;
        if let (Some(g), Some(x)) = (singular, location) {
            let at = spot.map_or(x, |s| s.location);
            match singular_points
                .iter_mut()
                .find(|p| distance(p.location, at) <= radius)
            {
                Some(p) => p.quantities.push(spec.name.clone()),
                None => singular_points.push(SingularPoint {
                    location: at,
                    lambda: g.lambda,
                    kind: g.source.clone(),
                    quantities: vec![spec.name.clone()],
                }),
            }
        }
        quantities.push(result);
    }
    for s in spots {
        if !singular_points
            .iter()
            .any(|p| distance(p.location, s.location) <= radius)
        {
            singular_points.push(SingularPoint {
                location: s.location,
                lambda: s.lambda,
                kind: s.kind.clone(),
                quantities: Vec::new(),
            });
        }
    }
    Ok(Study {
        meshes: samples
            .iter()
            .map(|s| (s.label.clone(), s.dofs, s.elements, s.size()))
            .collect(),
        quantities,
        singular_points,
        energy_error_rate: energy_error_rate(&samples),
        tolerance: options.tolerance,
    })
}

fn distance(a: [f64; 3], b: [f64; 3]) -> f64 {
    (0..3).map(|k| (a[k] - b[k]).powi(2)).sum::<f64>().sqrt()
}

#[cfg(test)]
#[path = "tests.rs"]
mod tests;
