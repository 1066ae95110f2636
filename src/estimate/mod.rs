//! Energy-norm error indicators (Zienkiewicz & Zhu 1987; 1992 part 2).
//!
//! Per element K, with sigma* the recovered field interpolated by the element's own shape
//! functions and sigma_h the FE stress, both at the element's full quadrature points:
//!
//! * ||e||_K^2 = integral over K of (sigma* - sigma_h)^T C (sigma* - sigma_h)
//! * ||u||_K^2 = integral over K of sigma_h^T C sigma_h (twice the element's strain energy)
//! * eta = ||e|| / sqrt(||u||^2 + ||e||^2), the global relative error; the denominator
//!   approximates the exact energy norm through Galerkin orthogonality (methods sheet 2).
//!
//! In the elements touching a re-entrant corner of a plane model, sigma* is instead the corner's
//! fitted singular + smooth field ([`crate::recovery::corner`]), integrated with a
//! [`CORNER_RULE_ORDER`]-point product rule because the integrand grows like r^(2 lambda - 2).
//!
//! C is the compliance of the element's material in the analysis mode; the measure includes the
//! thickness (plane stress) or 2 pi r (axisymmetric). Global sums run over the per-element values
//! in element order, so results are bit-identical for any number of threads.

mod pipeline;

pub use pipeline::{estimate_model, Computed, EstimateError};

use crate::element::gauss::reference_rule;
use crate::element::{ShapeTable, TableRule};
use crate::mesh::{BadElement, Model};
use crate::recovery::{CornerField, ElementData, ElementMaterials, Recovered};
use rayon::prelude::*;

/// Error indicators of every element and their global sums.
#[derive(Clone, Debug)]
pub struct Estimate {
    /// ||e||_K^2 per element (global element order).
    pub error_sq: Vec<f64>,
    /// ||u_h||_K^2 per element.
    pub energy_sq: Vec<f64>,
    /// Geometric area (2D) or volume (3D) of each element, without thickness or 2 pi r.
    pub measure: Vec<f64>,
    /// ||e|| = sqrt(sum ||e||_K^2).
    pub error_norm: f64,
    /// ||u_h|| = sqrt(sum ||u||_K^2).
    pub energy_norm: f64,
    /// eta = ||e|| / sqrt(||u||^2 + ||e||^2), a fraction.
    pub relative_error: f64,
}

impl Estimate {
    /// ||e||_K of element `e`.
    pub fn error_energy(&self, e: usize) -> f64 {
        self.error_sq[e].sqrt()
    }

    /// Share of the total error squared held by element `e`.
    pub fn error_share(&self, e: usize) -> f64 {
        let total = self.error_norm * self.error_norm;
        if total > 0.0 {
            self.error_sq[e] / total
        } else {
            0.0
        }
    }

    /// ||e||_K^2 / measure_K, comparable across element sizes.
    pub fn error_density(&self, e: usize) -> f64 {
        if self.measure[e] > 0.0 {
            self.error_sq[e] / self.measure[e]
        } else {
            0.0
        }
    }

    /// For each of `fractions` (ascending), the fewest elements whose error squared sums to at
    /// least that fraction of the total; one sort serves all fractions.
    pub fn concentration(&self, fractions: &[f64]) -> Vec<usize> {
        let total: f64 = self.error_sq.iter().sum();
        if total.is_nan() || total <= 0.0 {
            return vec![0; fractions.len()];
        }
        let mut sorted = self.error_sq.clone();
        sorted.par_sort_unstable_by(|a, b| b.total_cmp(a));
        let mut out = Vec::with_capacity(fractions.len());
        let mut acc = 0.0;
        let mut count = 0;
        for &fraction in fractions {
            while count < sorted.len() && acc < fraction * total {
                acc += sorted[count];
                count += 1;
            }
            out.push(count);
        }
        out
    }

    /// The `k` elements with the largest error, largest first (ties: lower index first).
    pub fn top_elements(&self, k: usize) -> Vec<usize> {
        let mut idx: Vec<usize> = (0..self.error_sq.len()).collect();
        let k = k.min(idx.len());
        if k == 0 {
            return Vec::new();
        }
        let cmp = |a: &usize, b: &usize| {
            self.error_sq[*b]
                .total_cmp(&self.error_sq[*a])
                .then(a.cmp(b))
        };
        idx.select_nth_unstable_by(k - 1, cmp);
        idx.truncate(k);
        idx.sort_by(cmp);
        idx
    }
}

/// Gauss points per direction of the rule used in elements touching a re-entrant corner
/// (collapsed rules on triangles, products on quadrilaterals): the same order the reference
/// problems use for their exact errors, which resolves the corner integrand to well under a
/// percent of the total (checked there against 12 points).
pub const CORNER_RULE_ORDER: usize = 8;

/// Computes the indicators; `corners` are the fitted fields of re-entrant corners (empty for
/// plain recovery). Elements inverted or collapsed at a quadrature point are returned, in file
/// order.
pub fn estimate(
    model: &Model,
    materials: &ElementMaterials,
    recovered: &Recovered,
    corners: &[CornerField],
) -> Result<Estimate, Vec<BadElement>> {
    let mesh = &model.mesh;
    let dim = mesh.dimension;
    let mode = materials.mode;
    let n = mesh.element_count();
    let mut error_sq = vec![0.0; n];
    let mut energy_sq = vec![0.0; n];
    let mut measure = vec![0.0; n];
    let mut bad = Vec::new();
    // Element -> corner field, sorted by element (an element touching two corners takes the
    // first).
    let mut corner_of: Vec<(u32, u32)> = corners
        .iter()
        .enumerate()
        .flat_map(|(f, c)| c.elements.iter().map(move |&e| (e, f as u32)))
        .collect();
    corner_of.sort_unstable();
    corner_of.dedup_by_key(|p| p.0);
    let field_of = |e: usize| -> Option<&CornerField> {
        corner_of
            .binary_search_by_key(&(e as u32), |p| p.0)
            .ok()
            .map(|i| &corners[corner_of[i].1 as usize])
    };
    for block in &mesh.blocks {
        let kind = block.kind;
        let nn = kind.node_count();
        let table = kind.table(TableRule::Full);
        let corner_table = (!corner_of.is_empty()).then(|| {
            let (points, weights) = reference_rule(kind, CORNER_RULE_ORDER).into_iter().unzip();
            ShapeTable::new(kind, points, weights)
        });
        let range = block.first_element..block.first_element + block.len();
        let failed: Vec<BadElement> = error_sq[range.clone()]
            .par_iter_mut()
            .zip(energy_sq[range.clone()].par_iter_mut())
            .zip(measure[range].par_iter_mut())
            .enumerate()
            .filter_map(|(i, ((err, energy), meas))| {
                let e = block.first_element + i;
                let nodes = block.cell(i);
                let data = ElementData::gather(model, kind, nodes);
                let el = materials.of(e);
                let zone = mesh.zone[e];
                let mut nodal = [[0.0; 6]; crate::element::MAX_NODES];
                for (a, &node) in nodes.iter().enumerate() {
                    nodal[a] = *recovered.at(node, zone);
                }
                let field = field_of(e);
                let table = match (field, &corner_table) {
                    (Some(_), Some(t)) => t,
                    _ => table,
                };
                let (mut se, mut su, mut sm) = (0.0, 0.0, 0.0);
                for k in 0..table.len() {
                    let at = data.strain_at(table, k, dim, mode, field.is_some());
                    let (strain, x, det) = match at {
                        Ok(v) => v,
                        Err(kind) => {
                            return Some(BadElement {
                                file_cell: mesh.file_cell[e],
                                kind,
                            })
                        }
                    };
                    let sh = el.stress(&strain);
                    let mut diff = [0.0; 6];
                    if let Some(f) = field {
                        diff = f.stress(x);
                    } else {
                        let shape = table.n_at(k);
                        for a in 0..nn {
                            for c in 0..6 {
                                diff[c] += shape[a] * nodal[a][c];
                            }
                        }
                    }
                    for c in 0..6 {
                        diff[c] -= sh[c];
                    }
                    let w = table.weights[k] * det;
                    let wf = w * mode.measure_factor(x[0]);
                    se += wf * el.energy_product(&diff, &diff);
                    su += wf * el.energy_product(&sh, &sh);
                    sm += w;
                }
                *err = se;
                *energy = su;
                *meas = sm;
                None
            })
            .collect();
        bad.extend(failed);
    }
    if !bad.is_empty() {
        bad.sort_by_key(|b| b.file_cell);
        return Err(bad);
    }
    let total_error: f64 = error_sq.iter().sum();
    let total_energy: f64 = energy_sq.iter().sum();
    let denom = (total_energy + total_error).sqrt();
    Ok(Estimate {
        error_norm: total_error.sqrt(),
        energy_norm: total_energy.sqrt(),
        relative_error: if denom > 0.0 {
            total_error.sqrt() / denom
        } else {
            0.0
        },
        error_sq,
        energy_sq,
        measure,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Errors squared 4, 1, 3, 2 (total 10): half needs the two largest (4 + 3 = 7 >= 5), 90 %
    /// the three largest (9 >= 9) (definition of error concentration, glossary).
    #[test]
    fn concentration_counts_the_fewest_elements() {
        let est = Estimate {
            error_sq: vec![4.0, 1.0, 3.0, 2.0],
            energy_sq: vec![1.0; 4],
            measure: vec![1.0; 4],
            error_norm: 10f64.sqrt(),
            energy_norm: 2.0,
            relative_error: 0.0,
        };
        assert_eq!(est.concentration(&[0.5, 0.9, 1.0]), vec![2, 3, 4]);
    }
}
