//! Probes: the values a convergence study follows, named on the command line in hone's own
//! small syntax.
//!
//! ```text
//! probe     = [statistic ":"] field "@" where
//! statistic = max | min | mean              (regions only; default max)
//! field     = ux | uy | uz                   displacement components
//!           | sxx | syy | szz | sxy | syz | sxz   recovered stress components
//!           | von_mises                      von Mises equivalent of the recovered stress
//! where     = x "," y ["," z]                a point
//!           | box(x0,y0,x1,y1)               a rectangle (2D) ...
//!           | box(x0,y0,z0,x1,y1,z1)         ... or a box (3D)
//!           | sphere(x,y,r) | sphere(x,y,z,r)   a disc (2D) or a ball (3D)
//! ```
//! Examples: `ux@10,20`, `von_mises@10,20,0`, `max:von_mises@box(0,0,5,5)`,
//! `mean:syy@sphere(3,4,0.5)`.
//!
//! A point value is interpolated with the shape functions of the element holding the point,
//! from the displacement or from the recovered stress of that element's zone (the stress
//! tensor is interpolated first, then von Mises is taken). A region's max and min run over the
//! mesh nodes inside it (recovered nodal field, zones averaged); its mean weights each node by
//! its share of the volume, `w_n = sum over elements K at n of |K| / nodes(K)` (a lumped
//! quadrature of the mean value, common practice).

use crate::material::{von_mises, SymTensor};
use crate::mesh::locate::interpolate_with;
use crate::mesh::{Locator, Mesh};
use std::fmt;
use std::str::FromStr;
use thiserror::Error;

/// What a probe reads.
#[derive(Copy, Clone, Debug, PartialEq, Eq)]
pub enum ProbeField {
    /// Displacement component 0, 1 or 2.
    Displacement(usize),
    /// Recovered stress component in hone's order xx, yy, zz, xy, yz, xz.
    Stress(usize),
    /// Von Mises equivalent of the recovered stress.
    VonMises,
}

/// Field names of the probe syntax, in the order of [`ProbeField`] components.
const DISPLACEMENT_NAMES: [&str; 3] = ["ux", "uy", "uz"];
const STRESS_NAMES: [&str; 6] = ["sxx", "syy", "szz", "sxy", "syz", "sxz"];

/// How a region is reduced to one number.
#[derive(Copy, Clone, Debug, PartialEq, Eq)]
pub enum Statistic {
    /// Largest nodal value.
    Max,
    /// Smallest nodal value.
    Min,
    /// Volume-weighted mean of the nodal values.
    Mean,
}

/// Where a probe reads.
#[derive(Copy, Clone, Debug, PartialEq)]
pub enum Region {
    /// One point (z = 0 when only x, y are given).
    Point([f64; 3]),
    /// Axis-aligned box from `lo` to `hi` (z unbounded when given in 2D).
    Box {
        /// Lower corner.
        lo: [f64; 3],
        /// Upper corner.
        hi: [f64; 3],
    },
    /// Ball (or disc in 2D) of `radius` around `centre`.
    Sphere {
        /// Centre.
        centre: [f64; 3],
        /// Radius.
        radius: f64,
    },
}

/// A parsed probe.
#[derive(Clone, Debug, PartialEq)]
pub struct Probe {
    /// The text as given (the quantity's name in reports).
    pub text: String,
    /// What is read.
    pub field: ProbeField,
    /// Reduction over a region (`None` for a point).
    pub statistic: Option<Statistic>,
    /// Where it is read.
    pub region: Region,
    /// Number of coordinates given per point: 2 or 3.
    pub coordinates: usize,
}

/// Why a probe could not be parsed or evaluated.
#[derive(Debug, Error, PartialEq)]
pub enum ProbeError {
    /// Bad syntax.
    #[error(
        "probe \"{probe}\": {reason}; expected for example ux@10,20 or max:von_mises@box(0,0,5,5)"
    )]
    Syntax {
        /// The probe text.
        probe: String,
        /// What is wrong.
        reason: String,
    },
    /// The point lies outside the mesh.
    #[error("probe \"{probe}\": the point ({x}, {y}, {z}) lies outside the mesh of {file}")]
    Outside {
        /// The probe text.
        probe: String,
        /// The file.
        file: String,
        /// Coordinates.
        x: f64,
        /// Coordinates.
        y: f64,
        /// Coordinates.
        z: f64,
    },
    /// No node inside the region.
    #[error("probe \"{probe}\": no node of {file} lies inside the region")]
    EmptyRegion {
        /// The probe text.
        probe: String,
        /// The file.
        file: String,
    },
    /// Two coordinates given for a 3D mesh.
    #[error("probe \"{probe}\": {file} is a 3D mesh; give x, y and z")]
    NeedsZ {
        /// The probe text.
        probe: String,
        /// The file.
        file: String,
    },
}

impl fmt::Display for ProbeField {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            ProbeField::Displacement(c) => f.write_str(DISPLACEMENT_NAMES[*c]),
            ProbeField::Stress(c) => f.write_str(STRESS_NAMES[*c]),
            ProbeField::VonMises => f.write_str("von_mises"),
        }
    }
}

/// Parses a comma-separated list of finite numbers.
fn numbers(s: &str) -> Option<Vec<f64>> {
    s.split(',')
        .map(|t| t.trim().parse::<f64>().ok().filter(|v| v.is_finite()))
        .collect()
}

/// Pads 2D coordinates with z = 0.
fn point(v: &[f64]) -> [f64; 3] {
    [v[0], v[1], v.get(2).copied().unwrap_or(0.0)]
}

impl FromStr for Probe {
    type Err = ProbeError;

    fn from_str(text: &str) -> Result<Probe, ProbeError> {
        let bad = |reason: &str| ProbeError::Syntax {
            probe: text.to_string(),
            reason: reason.to_string(),
        };
        let compact: String = text.chars().filter(|c| !c.is_whitespace()).collect();
        let (head, place) = compact
            .split_once('@')
            .ok_or_else(|| bad("no '@' between the field and the place"))?;
        let (statistic, field) = match head.split_once(':') {
            Some((stat, field)) => (
                Some(match stat {
                    "max" => Statistic::Max,
                    "min" => Statistic::Min,
                    "mean" => Statistic::Mean,
                    _ => return Err(bad("the statistic must be max, min or mean")),
                }),
                field,
            ),
            None => (None, head),
        };
        let field = if let Some(c) = DISPLACEMENT_NAMES.iter().position(|n| *n == field) {
            ProbeField::Displacement(c)
        } else if let Some(c) = STRESS_NAMES.iter().position(|n| *n == field) {
            ProbeField::Stress(c)
        } else if field == "von_mises" {
            ProbeField::VonMises
        } else {
            return Err(bad(
                "unknown field; use ux, uy, uz, sxx, syy, szz, sxy, syz, sxz or von_mises",
            ));
        };
        let shape = |name: &str| {
            place
                .strip_prefix(name)
                .and_then(|r| r.strip_prefix('('))
                .and_then(|r| r.strip_suffix(')'))
        };
        let (region, coordinates) = if let Some(args) = shape("box") {
            let v = numbers(args).ok_or_else(|| bad("box() takes numbers"))?;
            let d = match v.len() {
                4 => 2,
                6 => 3,
                _ => return Err(bad("box() takes x0,y0,x1,y1 or x0,y0,z0,x1,y1,z1")),
            };
            let (a, b) = (point(&v[..d]), point(&v[d..]));
            let mut lo = [0.0; 3];
            let mut hi = [0.0; 3];
            for k in 0..3 {
                lo[k] = a[k].min(b[k]);
                hi[k] = a[k].max(b[k]);
            }
            (Region::Box { lo, hi }, d)
        } else if let Some(args) = shape("sphere") {
            let v = numbers(args).ok_or_else(|| bad("sphere() takes numbers"))?;
            if !(3..=4).contains(&v.len()) {
                return Err(bad("sphere() takes x,y,r or x,y,z,r"));
            }
            let radius = v[v.len() - 1];
            if radius <= 0.0 {
                return Err(bad("the sphere radius must be positive"));
            }
            let centre = point(&v[..v.len() - 1]);
            (Region::Sphere { centre, radius }, v.len() - 1)
        } else {
            let v = numbers(place).ok_or_else(|| bad("a point is x,y or x,y,z"))?;
            if !(2..=3).contains(&v.len()) {
                return Err(bad("a point is x,y or x,y,z"));
            }
            if statistic.is_some() {
                return Err(bad(
                    "max, min and mean apply to box() and sphere(), not to a point",
                ));
            }
            (Region::Point(point(&v)), v.len())
        };
        let statistic = match region {
            Region::Point(_) => None,
            _ => Some(statistic.unwrap_or(Statistic::Max)),
        };
        Ok(Probe {
            text: text.trim().to_string(),
            field,
            statistic,
            region,
            coordinates,
        })
    }
}

/// What a probe reads from: one mesh's fields.
pub struct ProbeContext<'a> {
    /// File name for messages.
    pub file: &'a str,
    /// The mesh.
    pub mesh: &'a Mesh,
    /// Nodal displacement.
    pub displacement: &'a [[f64; 3]],
    /// Recovered stress of a node for an element of a zone.
    pub stress_at: &'a (dyn Fn(u32, i64) -> SymTensor + Sync),
    /// Recovered nodal stress (zones averaged).
    pub nodal_stress: &'a [SymTensor],
    /// Volume share of each node (zero for nodes no element uses).
    pub node_weight: &'a [f64],
    /// Point locator (built once per mesh).
    pub locator: &'a Locator,
}

/// A probe's value on one mesh, and where it was read (the node of a max or min, the point, or
/// the region's centre for a mean).
#[derive(Copy, Clone, Debug, PartialEq)]
pub struct ProbeValue {
    /// The value.
    pub value: f64,
    /// Where.
    pub location: [f64; 3],
}

impl Probe {
    /// Evaluates the probe on one mesh.
    pub fn evaluate(&self, ctx: &ProbeContext<'_>) -> Result<ProbeValue, ProbeError> {
        let mesh = ctx.mesh;
        if mesh.dimension == 3 && self.coordinates < 3 {
            return Err(ProbeError::NeedsZ {
                probe: self.text.clone(),
                file: ctx.file.to_string(),
            });
        }
        let nodal = |n: usize| -> f64 {
            match self.field {
                ProbeField::Displacement(c) => ctx.displacement[n][c],
                ProbeField::Stress(c) => ctx.nodal_stress[n][c],
                ProbeField::VonMises => von_mises(&ctx.nodal_stress[n]),
            }
        };
        let planar = mesh.dimension == 2;
        let inside = |p: [f64; 3]| -> bool {
            let dims = if planar { 2 } else { 3 };
            match self.region {
                Region::Point(_) => false,
                Region::Box { lo, hi } => (0..dims).all(|k| p[k] >= lo[k] && p[k] <= hi[k]),
                Region::Sphere { centre, radius } => {
                    (0..dims).map(|k| (p[k] - centre[k]).powi(2)).sum::<f64>() <= radius * radius
                }
            }
        };
        match self.region {
            Region::Point(x) => {
                let (e, xi) = ctx
                    .locator
                    .locate(mesh, x)
                    .ok_or_else(|| ProbeError::Outside {
                        probe: self.text.clone(),
                        file: ctx.file.to_string(),
                        x: x[0],
                        y: x[1],
                        z: x[2],
                    })?;
                let value = match self.field {
                    ProbeField::Displacement(c) => {
                        interpolate_with(mesh, e, xi, |n| ctx.displacement[n as usize])[c]
                    }
                    field => {
                        let zone = mesh.zone[e];
                        let s = interpolate_with(mesh, e, xi, |n| (ctx.stress_at)(n, zone));
                        match field {
                            ProbeField::Stress(c) => s[c],
                            _ => von_mises(&s),
                        }
                    }
                };
                Ok(ProbeValue { value, location: x })
            }
            Region::Box { .. } | Region::Sphere { .. } => {
                let stat = self.statistic.unwrap_or(Statistic::Max);
                let mut best: Option<(f64, usize)> = None;
                let (mut sum, mut weight) = (0.0, 0.0);
                for (n, &p) in mesh.points.iter().enumerate() {
                    if ctx.node_weight[n] <= 0.0 || !inside(p) {
                        continue;
                    }
                    let v = nodal(n);
                    sum += ctx.node_weight[n] * v;
                    weight += ctx.node_weight[n];
                    let better = match (best, stat) {
                        (None, _) => true,
                        (Some((b, _)), Statistic::Min) => v < b,
                        (Some((b, _)), _) => v > b,
                    };
                    if better {
                        best = Some((v, n));
                    }
                }
                let (v, n) = best.ok_or_else(|| ProbeError::EmptyRegion {
                    probe: self.text.clone(),
                    file: ctx.file.to_string(),
                })?;
                Ok(match stat {
                    Statistic::Mean => ProbeValue {
                        value: sum / weight,
                        location: match self.region {
                            Region::Box { lo, hi } => [0, 1, 2].map(|k| 0.5 * (lo[k] + hi[k])),
                            Region::Sphere { centre, .. } => centre,
                            Region::Point(x) => x,
                        },
                    },
                    _ => ProbeValue {
                        value: v,
                        location: mesh.points[n],
                    },
                })
            }
        }
    }

    /// Whether the probe reads a stress (a local value that may be singular).
    pub fn is_stress(&self) -> bool {
        !matches!(self.field, ProbeField::Displacement(_))
    }
}

#[cfg(test)]
#[path = "probe_tests.rs"]
mod tests;
