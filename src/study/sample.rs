//! One mesh's contribution to a study: its size measures and the value of every quantity.

use super::probe::{Probe, ProbeContext, ProbeError};
use super::{QuantityKind, QuantitySpec};
use crate::estimate::Computed;
use crate::material::von_mises;
use crate::mesh::{Locator, Model};

/// Everything a study keeps of one mesh (the model itself can be dropped afterwards).
#[derive(Clone, Debug, PartialEq)]
pub struct MeshSample {
    /// Name shown in reports (the file name).
    pub label: String,
    /// Degrees of freedom: nodes used by elements times the dimension.
    pub dofs: usize,
    /// Number of elements.
    pub elements: usize,
    /// Total geometric area (2D) or volume (3D) of the elements.
    pub measure: f64,
    /// 2 or 3.
    pub dimension: usize,
    /// Largest element order p in the mesh.
    pub order: usize,
    /// Estimated global error ||e|| (energy norm).
    pub error_norm: f64,
    /// Value of each quantity, in the order of the specs.
    pub values: Vec<f64>,
    /// Where each quantity was read (None for global quantities).
    pub locations: Vec<Option<[f64; 3]>>,
}

impl MeshSample {
    /// Representative element size `h = (measure / N)^(1/d)` (Celik et al. 2008, step 1;
    /// method sheet 6.1).
    pub fn size(&self) -> f64 {
        (self.measure / self.elements.max(1) as f64).powf(1.0 / self.dimension as f64)
    }
}

/// The quantities of a study: the three always reported, then the probes in the given order.
pub fn quantity_specs(probes: &[Probe]) -> Vec<QuantitySpec> {
    let mut specs = vec![
        QuantitySpec {
            name: "strain_energy".into(),
            kind: QuantityKind::StrainEnergy,
        },
        QuantitySpec {
            name: "estimated_error".into(),
            kind: QuantityKind::ErrorNorm,
        },
        QuantitySpec {
            name: "peak_von_mises".into(),
            kind: QuantityKind::Stress,
        },
    ];
    specs.extend(probes.iter().map(|p| QuantitySpec {
        name: p.text.clone(),
        kind: if p.is_stress() {
            QuantityKind::Stress
        } else {
            QuantityKind::Displacement
        },
    }));
    specs
}

/// Volume share of each node, `w_n = sum over elements K at n of |K| / nodes(K)`; zero for
/// nodes no element uses.
pub fn node_weights(model: &Model, measure: &[f64]) -> Vec<f64> {
    let mesh = &model.mesh;
    let mut w = vec![0.0; mesh.node_count()];
    for block in &mesh.blocks {
        let nn = block.kind.node_count() as f64;
        for i in 0..block.len() {
            let share = measure[block.first_element + i] / nn;
            for &n in block.cell(i) {
                w[n as usize] += share;
            }
        }
    }
    w
}

/// Samples the standard quantities and the probes on one solved and estimated mesh. Strain
/// energy is `U_h = ||u_h||^2 / 2` (the estimate's `||u_h||^2` is the integral of
/// `sigma_h : eps_h`, method sheet 2); the peak von Mises runs over the recovered nodal field.
pub fn sample(
    label: &str,
    model: &Model,
    computed: &Computed,
    probes: &[Probe],
) -> Result<MeshSample, ProbeError> {
    let mesh = &model.mesh;
    let est = &computed.estimate;
    let weights = node_weights(model, &est.measure);
    let nodal = computed.recovered.nodal_field(mesh.node_count());
    let used = weights.iter().filter(|w| **w > 0.0).count();
    let mut peak: Option<(f64, usize)> = None;
    for (n, s) in nodal.iter().enumerate() {
        if weights[n] > 0.0 {
            let v = von_mises(s);
            if peak.is_none_or(|(b, _)| v > b) {
                peak = Some((v, n));
            }
        }
    }
    let mut values = vec![
        0.5 * est.energy_norm * est.energy_norm,
        est.error_norm,
        peak.map_or(0.0, |p| p.0),
    ];
    let mut locations = vec![None, None, peak.map(|(_, n)| mesh.points[n])];
    if !probes.is_empty() {
        let locator = Locator::new(mesh);
        let recovered = &computed.recovered;
        let stress_at = |n: u32, zone: i64| *recovered.at(n, zone);
        let ctx = ProbeContext {
            file: label,
            mesh,
            displacement: &model.displacement,
            stress_at: &stress_at,
            nodal_stress: &nodal,
            node_weight: &weights,
            locator: &locator,
        };
        for probe in probes {
            let v = probe.evaluate(&ctx)?;
            values.push(v.value);
            locations.push(Some(v.location));
        }
    }
    Ok(MeshSample {
        label: label.to_string(),
        dofs: used * mesh.dimension,
        elements: mesh.element_count(),
        measure: est.measure.iter().sum(),
        dimension: mesh.dimension,
        order: mesh
            .blocks
            .iter()
            .map(|b| b.kind.order())
            .max()
            .unwrap_or(1),
        error_norm: est.error_norm,
        values,
        locations,
    })
}
