//! Recovered stress at re-entrant corners of plane models: the corner's singular terms plus a
//! smooth part, fitted to the FE stresses around the corner.
//!
//! Near a traction-free corner of interior angle `alpha` the stress is
//! `sigma = sum_m K_m r^(lambda_m - 1) f_m(theta) + smooth terms` (Williams 1952): polynomial
//! patches cannot follow `r^(lambda - 1)`, and on a uniform mesh the elements touching the corner
//! hold a fixed share of the whole error at every level (measured on the L-shape: 64-95 %), so
//! SPR alone underestimates the error there (effectivity 0.65-0.78 for tri3, quad4, quad8). Here
//! the field inside the elements touching the corner is instead
//!
//! `sigma*(x) = K_I Psi_I(x) + K_II Psi_II(x) + a + b x' + c y'` per in-plane component,
//!
//! with `Psi` the unit Williams stress fields of the measured angle (mode II only while its
//! exponent is below 1) and `(K, a, b, c)` fitted by least squares to the FE stresses at the
//! sampling points within [`FIT_RADIUS`] element sizes of the corner. This is the idea of
//! splitting the recovered field into a singular and a smooth part (Rodenas, Gonzalez-Estrada,
//! Tarancon & Fuenmayor 2008, "A recovery-type error estimator for the extended finite element
//! method based on singular+smooth stress field splitting", IJNME 76:545-571 (from memory)),
//! here with a local fit instead of their global stress-intensity extraction.
//!
//! Unit fields (Airy function `phi = r^(lambda+1) F(theta)`, theta from the material bisector,
//! faces at `theta = +-beta`, `beta = alpha / 2`):
//! `sigma_rr = r^(lambda-1) (F'' + (lambda+1) F)`, `sigma_tt = r^(lambda-1) lambda (lambda+1) F`,
//! `sigma_rt = -r^(lambda-1) lambda F'`, with, for mode I,
//! `F = cos((lambda-1) beta) cos((lambda+1) theta) - cos((lambda+1) beta) cos((lambda-1) theta)`
//! and, for mode II,
//! `F = sin((lambda-1) beta) sin((lambda+1) theta) - sin((lambda+1) beta) sin((lambda-1) theta)`.
//! Both satisfy `F(beta) = 0`; `F'(beta) = 0` is exactly the eigen-equation
//! `sin(lambda alpha) +/- lambda sin(alpha) = 0` (derived here; the L-shape's exact field is the
//! mode I field, checked in the tests).

use super::SampledStresses;
use crate::material::{AnalysisMode, SymTensor};
use crate::mesh::{BoundaryFacets, Mesh, NodeElements};
use crate::singular::williams::{williams_mode_one, williams_mode_two};
use crate::singular::SingularSpot;
use nalgebra::{DMatrix, DVector};
use std::collections::HashSet;
use std::f64::consts::PI;

/// Radius of the fit, in sizes of the elements touching the corner (mean distance from the
/// corner to their other vertices). Measured on the L-shape (tri3, tri6, quad4, quad8, quad9;
/// n = 8 and 16): 2 sizes give effectivities 0.87-0.99, 3 sizes 0.89-1.00, 4 sizes 0.90-1.01;
/// 3 keeps the fit local (other features of a real part stay out of it).
pub const FIT_RADIUS: f64 = 3.0;

/// At least this many equations per unknown, or the corner keeps plain SPR.
const MIN_ROWS_PER_UNKNOWN: usize = 2;

/// Singular values below this fraction of the largest make the fit rank deficient.
const RANK_TOLERANCE: f64 = 1e-10;

/// The fitted field of one re-entrant corner.
#[derive(Clone, Debug)]
pub struct CornerField {
    /// The corner node.
    pub node: u32,
    /// Elements touching the corner, ascending: the estimate uses this field in them.
    pub elements: Vec<u32>,
    /// Interior angle of the material, radians.
    pub angle: f64,
    /// Exponents of the singular terms fitted (mode I, then mode II while below 1).
    pub lambdas: Vec<f64>,
    /// Fitted amplitudes of the singular terms (stress units at one fit radius).
    pub amplitudes: Vec<f64>,
    origin: [f64; 2],
    bisector: f64,
    radius: f64,
    /// Per in-plane component (xx, yy, xy): constant, x', y' (coordinates over the radius).
    smooth: [[f64; 3]; 3],
    /// sigma_zz = zz_factor (sigma_xx + sigma_yy): nu in plane strain, 0 in plane stress.
    zz_factor: f64,
}

impl CornerField {
    /// The recovered stress at `x` (hone's component order xx, yy, zz, xy, yz, xz).
    pub fn stress(&self, x: [f64; 3]) -> SymTensor {
        let (dx, dy) = (x[0] - self.origin[0], x[1] - self.origin[1]);
        let mut out = [0.0; 6];
        for (m, (&lambda, &k)) in self.lambdas.iter().zip(&self.amplitudes).enumerate() {
            let unit = unit_field(
                lambda,
                m == 0,
                self.angle,
                self.bisector,
                self.radius,
                dx,
                dy,
            );
            out[0] += k * unit[0];
            out[1] += k * unit[1];
            out[3] += k * unit[2];
        }
        let (u, v) = (dx / self.radius, dy / self.radius);
        for (c, &slot) in [0usize, 1, 3].iter().enumerate() {
            out[slot] += self.smooth[c][0] + self.smooth[c][1] * u + self.smooth[c][2] * v;
        }
        out[2] = self.zz_factor * (out[0] + out[1]);
        out
    }
}

/// Unit Williams stress (xx, yy, xy) at offset `(dx, dy)` from a corner of interior angle
/// `angle` whose material bisector points at `bisector`, with `r` measured in units of `radius`.
pub fn unit_field(
    lambda: f64,
    symmetric: bool,
    angle: f64,
    bisector: f64,
    radius: f64,
    dx: f64,
    dy: f64,
) -> [f64; 3] {
    let r = (dx * dx + dy * dy).sqrt() / radius;
    let phi = dy.atan2(dx);
    let theta = (phi - bisector + PI).rem_euclid(2.0 * PI) - PI;
    let beta = 0.5 * angle;
    let (lp, lm) = (lambda + 1.0, lambda - 1.0);
    let (f, fp, fpp) = if symmetric {
        let (a, b) = ((lm * beta).cos(), -(lp * beta).cos());
        let (cp, cm) = ((lp * theta).cos(), (lm * theta).cos());
        let (sp, sm) = ((lp * theta).sin(), (lm * theta).sin());
        (
            a * cp + b * cm,
            -a * lp * sp - b * lm * sm,
            -a * lp * lp * cp - b * lm * lm * cm,
        )
    } else {
        let (a, b) = ((lm * beta).sin(), -(lp * beta).sin());
        let (cp, cm) = ((lp * theta).cos(), (lm * theta).cos());
        let (sp, sm) = ((lp * theta).sin(), (lm * theta).sin());
        (
            a * sp + b * sm,
            a * lp * cp + b * lm * cm,
            -a * lp * lp * sp - b * lm * lm * sm,
        )
    };
    let scale = r.powf(lm);
    let rr = scale * (fpp + lp * f);
    let tt = scale * lambda * lp * f;
    let rt = -scale * lambda * fp;
    let (c, s) = (phi.cos(), phi.sin());
    [
        rr * c * c + tt * s * s - 2.0 * rt * s * c,
        rr * s * s + tt * c * c + 2.0 * rt * s * c,
        (rr - tt) * s * c + rt * (c * c - s * s),
    ]
}

/// The two boundary edges at `node` (the mesh's boundary facets of the elements around it
/// that have the node as a corner), as unit vectors from the node; `None` unless there are
/// exactly two.
fn boundary_directions(
    mesh: &Mesh,
    adjacency: &NodeElements,
    boundary: &BoundaryFacets,
    node: u32,
) -> Option<[[f64; 2]; 2]> {
    let mut others: Vec<u32> = Vec::new();
    for &e in adjacency.of(node as usize) {
        let (kind, nodes) = mesh.element(e as usize);
        let first = boundary.facets.partition_point(|&(f, _)| f < e);
        for &(_, facet) in boundary.facets[first..]
            .iter()
            .take_while(|&&(f, _)| f == e)
        {
            let corners = kind.facets()[facet as usize].corners;
            if let [a, b] = corners[..] {
                match (nodes[a] == node, nodes[b] == node) {
                    (true, false) => others.push(nodes[b]),
                    (false, true) => others.push(nodes[a]),
                    _ => {}
                }
            }
        }
    }
    let [a, b] = others[..] else {
        return None;
    };
    let o = mesh.points[node as usize];
    let unit = |v: u32| {
        let p = mesh.points[v as usize];
        let (dx, dy) = (p[0] - o[0], p[1] - o[1]);
        let len = dx.hypot(dy);
        (len > 0.0 && len.is_finite()).then(|| [dx / len, dy / len])
    };
    Some([unit(a)?, unit(b)?])
}

/// Elements of `zone` that may reach within `radius` of the corner `node`, ascending: a search
/// outward through the adjacency from the corner's elements, so the cost depends on the
/// corner's neighbourhood, not on the mesh size.
fn elements_near(
    mesh: &Mesh,
    adjacency: &NodeElements,
    node: u32,
    zone: i64,
    radius: f64,
) -> Vec<u32> {
    let o = mesh.points[node as usize];
    let mut visited: HashSet<u32> = HashSet::new();
    let mut queue: Vec<u32> = adjacency.of(node as usize).to_vec();
    let mut near = Vec::new();
    while let Some(e) = queue.pop() {
        if !visited.insert(e) {
            continue;
        }
        let (kind, nodes) = mesh.element(e as usize);
        let vertices = &nodes[..kind.vertex_count()];
        // The element's bounding circle (about the mean of its vertices) meets the disc.
        let count = vertices.len() as f64;
        let centre = vertices.iter().fold([0.0, 0.0], |c, &v| {
            let p = mesh.points[v as usize];
            [c[0] + p[0] / count, c[1] + p[1] / count]
        });
        let reach = vertices.iter().fold(0.0_f64, |r, &v| {
            let p = mesh.points[v as usize];
            r.max((p[0] - centre[0]).hypot(p[1] - centre[1]))
        });
        let inside = (centre[0] - o[0]).hypot(centre[1] - o[1]) - reach <= radius;
        if !inside || mesh.zone[e as usize] != zone {
            continue;
        }
        near.push(e);
        for &v in vertices {
            queue.extend(
                adjacency
                    .of(v as usize)
                    .iter()
                    .filter(|e| !visited.contains(e)),
            );
        }
    }
    near.sort_unstable();
    near
}

/// Fits the field of the corner `spot` (one node, its measured interior angle) from the FE
/// stresses at the sampling points. `None` (the corner keeps plain SPR) when the mode is not
/// plane stress or plane strain, the spot is not one re-entrant corner node or sits on a material
/// interface, its boundary edges cannot be told, or the fit has too few points or is rank
/// deficient.
pub fn fit_corner(
    mesh: &Mesh,
    mode: AnalysisMode,
    zz_factor: f64,
    samples: &SampledStresses,
    adjacency: &NodeElements,
    boundary: &BoundaryFacets,
    spot: &SingularSpot,
) -> Option<CornerField> {
    let [node] = spot.nodes[..] else {
        return None;
    };
    let angle = spot.angle_deg.to_radians();
    if !matches!(
        mode,
        AnalysisMode::PlaneStrain | AnalysisMode::PlaneStress { .. }
    ) || angle <= PI
    {
        return None;
    }
    let elements: Vec<u32> = adjacency.of(node as usize).to_vec();
    let zone = mesh.zone[*elements.first()? as usize];
    if elements.iter().any(|&e| mesh.zone[e as usize] != zone) {
        return None;
    }
    let o = mesh.points[node as usize];
    let [t1, t2] = boundary_directions(mesh, adjacency, boundary, node)?;
    let sum = [t1[0] + t2[0], t1[1] + t2[1]];
    // The material bisector is opposite the bisector of the (smaller) void angle; a crack's two
    // faces coincide, and the material lies straight ahead of them.
    let bisector = if sum[0].hypot(sum[1]) < 1e-9 {
        (-t1[1]).atan2(-t1[0])
    } else {
        (-sum[1]).atan2(-sum[0])
    };
    let mut size = 0.0;
    let mut count = 0usize;
    for &e in &elements {
        let (kind, nodes) = mesh.element(e as usize);
        for &v in &nodes[..kind.vertex_count()] {
            if v != node {
                let p = mesh.points[v as usize];
                size += (p[0] - o[0]).hypot(p[1] - o[1]);
                count += 1;
            }
        }
    }
    let radius = FIT_RADIUS * size / count.max(1) as f64;
    if !(radius > 0.0 && radius.is_finite()) {
        return None;
    }
    let mut lambdas = vec![williams_mode_one(angle)?];
    lambdas.extend(williams_mode_two(angle));
    let singular = lambdas.len();
    let unknowns = singular + 9;
    // Sampling points within the radius, of same-zone elements near the corner, in element
    // order.
    let mut rows: Vec<f64> = Vec::new();
    let mut rhs: Vec<f64> = Vec::new();
    for e in elements_near(mesh, adjacency, node, zone, radius) {
        let e = e as usize;
        let b = mesh.block_of(e);
        let block = &mesh.blocks[b];
        for s in samples.range(block.kind, b, e - block.first_element) {
            let x = samples.position[s];
            let (dx, dy) = (x[0] - o[0], x[1] - o[1]);
            let r = dx.hypot(dy);
            if r > radius || r == 0.0 {
                continue;
            }
            let units: Vec<[f64; 3]> = lambdas
                .iter()
                .enumerate()
                .map(|(m, &l)| unit_field(l, m == 0, angle, bisector, radius, dx, dy))
                .collect();
            for (c, &slot) in [0usize, 1, 3].iter().enumerate() {
                let start = rows.len();
                rows.resize(start + unknowns, 0.0);
                let row = &mut rows[start..];
                for (m, unit) in units.iter().enumerate() {
                    row[m] = unit[c];
                }
                row[singular + 3 * c] = 1.0;
                row[singular + 3 * c + 1] = dx / radius;
                row[singular + 3 * c + 2] = dy / radius;
                rhs.push(samples.stress[s][slot]);
            }
        }
    }
    if rhs.len() < MIN_ROWS_PER_UNKNOWN * unknowns {
        return None;
    }
    let a = DMatrix::from_row_slice(rhs.len(), unknowns, &rows);
    let svd = a.svd(true, true);
    let largest = svd.singular_values.max();
    if largest.is_nan() || largest <= 0.0 || svd.singular_values.min() < RANK_TOLERANCE * largest {
        return None;
    }
    let solution = svd
        .solve(&DVector::from_vec(rhs), RANK_TOLERANCE * largest)
        .ok()?;
    if solution.iter().any(|v| !v.is_finite()) {
        return None;
    }
    let mut smooth = [[0.0; 3]; 3];
    for (c, row) in smooth.iter_mut().enumerate() {
        for (j, v) in row.iter_mut().enumerate() {
            *v = solution[singular + 3 * c + j];
        }
    }
    Some(CornerField {
        node,
        elements,
        angle,
        amplitudes: solution.iter().take(singular).copied().collect(),
        lambdas,
        origin: [o[0], o[1]],
        bisector,
        radius,
        smooth,
        zz_factor,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::reference::problems::l_shape;

    /// The L-shape's exact stress (Williams mode I, 270 degrees, bisector at 135 degrees; method
    /// sheet 5.5) is a multiple of the unit mode I field at every point and component.
    #[test]
    fn mode_one_field_matches_the_l_shape_solution() {
        let problem = l_shape(crate::element::ElementKind::Tri3, 1);
        let angle = 1.5 * PI;
        let lambda = williams_mode_one(angle).unwrap();
        let mut ratio = None;
        for p in [
            [0.3, 0.2],
            [-0.5, 0.1],
            [-0.2, -0.7],
            [0.9, 0.01],
            [-0.01, -0.9],
        ] {
            let exact = (problem.exact_stress)([p[0], p[1], 0.0]);
            let unit = unit_field(lambda, true, angle, 0.75 * PI, 1.0, p[0], p[1]);
            for (c, &slot) in [0usize, 1, 3].iter().enumerate() {
                let r = exact[slot] / unit[c];
                let first = *ratio.get_or_insert(r);
                assert!(
                    (r - first).abs() < 1e-12 * first.abs(),
                    "{p:?} {c}: {r} vs {first}"
                );
            }
        }
    }

    /// Both unit fields leave the corner's faces free of traction (sigma . n = 0 on
    /// theta = +-beta), for a 300 degree corner with an arbitrary bisector.
    #[test]
    fn unit_fields_are_traction_free_on_the_faces() {
        let angle = 300f64.to_radians();
        let bisector = 0.3;
        for (lambda, symmetric) in [
            (williams_mode_one(angle).unwrap(), true),
            (williams_mode_two(angle).unwrap(), false),
        ] {
            for sign in [-1.0, 1.0] {
                let face = bisector + sign * 0.5 * angle;
                let (dx, dy) = (0.7 * face.cos(), 0.7 * face.sin());
                let s = unit_field(lambda, symmetric, angle, bisector, 1.0, dx, dy);
                // Face normal: perpendicular to the face direction.
                let n = [-face.sin(), face.cos()];
                let t = [s[0] * n[0] + s[2] * n[1], s[2] * n[0] + s[1] * n[1]];
                let scale = s.iter().map(|v| v.abs()).fold(0.0, f64::max);
                assert!(
                    t[0].hypot(t[1]) < 1e-10 * scale,
                    "lambda {lambda}: traction {t:?} on face {face}"
                );
            }
        }
    }
}
