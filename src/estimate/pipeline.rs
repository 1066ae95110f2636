//! The estimate stage as one call: element materials, FE stresses at sampling points (with the
//! geometry check), adjacency and boundary, recovery, indicators.

use super::{estimate, Estimate};
use crate::material::{AnalysisMode, MaterialMap};
use crate::mesh::{BadElement, BadElementKind, BoundaryFacets, Model, NodeElements};
use crate::recovery::{
    fit_corner, recover, sample_stresses, CornerField, ElementMaterials, MissingZoneMaterial,
    Recovered, RecoveryMethod, SampledStresses,
};
use crate::singular::{screen_with, PoissonRatio, ScreeningOptions, SpotKind};
use thiserror::Error;

/// Recovered stresses and indicators of one model.
#[derive(Clone, Debug)]
pub struct Computed {
    /// Recovered stresses.
    pub recovered: Recovered,
    /// Error indicators.
    pub estimate: Estimate,
    /// Elements around each node (kept for later stages, such as the singular screening).
    pub adjacency: NodeElements,
    /// Boundary facets of every zone (kept likewise).
    pub boundary: BoundaryFacets,
    /// Re-entrant corners whose elements use the fitted singular + smooth field (plane models
    /// with SPR; empty otherwise).
    pub corners: Vec<CornerField>,
}

/// Why the estimate could not be computed.
#[derive(Debug, Error)]
pub enum EstimateError {
    /// A zone without a material.
    #[error(transparent)]
    MissingMaterial(#[from] MissingZoneMaterial),
    /// Inverted or collapsed elements, in file order.
    #[error("{}", describe_bad(.0))]
    BadElements(Vec<BadElement>),
}

/// Lists at most ten cell ids and the total count.
fn cell_list(cells: &[u32]) -> String {
    let shown: Vec<String> = cells.iter().take(10).map(|c| c.to_string()).collect();
    if cells.len() > 10 {
        format!("{} and {} more", shown.join(", "), cells.len() - 10)
    } else {
        shown.join(", ")
    }
}

/// "3 inverted cells (...): 4, 17, 20; 1 degenerate cell ...".
fn describe_bad(bad: &[BadElement]) -> String {
    let ids = |kind: BadElementKind| -> Vec<u32> {
        bad.iter()
            .filter(|b| b.kind == kind)
            .map(|b| b.file_cell)
            .collect()
    };
    let inverted = ids(BadElementKind::Inverted);
    let degenerate = ids(BadElementKind::Degenerate);
    let mut parts = Vec::new();
    if !inverted.is_empty() {
        parts.push(format!(
            "{} inverted cells (negative Jacobian: mirrored node order or folded element): {}",
            inverted.len(),
            cell_list(&inverted)
        ));
    }
    if !degenerate.is_empty() {
        parts.push(format!(
            "{} degenerate cells (zero or non-finite Jacobian: collapsed element): {}",
            degenerate.len(),
            cell_list(&degenerate)
        ));
    }
    format!(
        "{}; expected every cell to have a positive Jacobian in VTK node order",
        parts.join("; ")
    )
}

/// Runs the estimate stage on a model. `stage` is told the name of each step as it starts
/// (for progress displays).
pub fn estimate_model(
    model: &Model,
    map: &MaterialMap,
    mode: AnalysisMode,
    method: RecoveryMethod,
    stage: &dyn Fn(&'static str),
) -> Result<Computed, EstimateError> {
    let materials = ElementMaterials::new(&model.mesh, map, mode)?;
    stage("FE stresses at sampling points");
    let samples = sample_stresses(model, &materials).map_err(EstimateError::BadElements)?;
    stage("adjacency and boundary");
    let adjacency = NodeElements::new(&model.mesh);
    let boundary = BoundaryFacets::new(&model.mesh, &adjacency);
    stage("stress recovery");
    let recovered = recover(model, &materials, &samples, &adjacency, &boundary, method);
    let plane = matches!(
        materials.mode,
        AnalysisMode::PlaneStrain | AnalysisMode::PlaneStress { .. }
    );
    let corners = if method == RecoveryMethod::Spr && plane {
        stage("fields at re-entrant corners");
        corner_fields(model, map, &materials, &samples, &adjacency, &boundary)
    } else {
        Vec::new()
    };
    drop(samples);
    stage("error indicators");
    let estimate =
        estimate(model, &materials, &recovered, &corners).map_err(EstimateError::BadElements)?;
    Ok(Computed {
        recovered,
        estimate,
        adjacency,
        boundary,
        corners,
    })
}

/// Fits the field of every re-entrant corner of a plane stress or plane strain model (the
/// singular screening's corners; none when the screening cannot run, in which case the corners
/// keep plain SPR).
fn corner_fields(
    model: &Model,
    map: &MaterialMap,
    materials: &ElementMaterials,
    samples: &SampledStresses,
    adjacency: &NodeElements,
    boundary: &BoundaryFacets,
) -> Vec<CornerField> {
    let mode = materials.mode;
    let options = ScreeningOptions::new(mode, PoissonRatio::from_materials(map));
    let Ok(screening) = screen_with(model, adjacency, boundary, &options) else {
        return Vec::new();
    };
    screening
        .spots
        .iter()
        .filter(|s| s.kind == SpotKind::ReentrantCorner && s.nodes.len() == 1)
        .filter_map(|s| {
            let first = *adjacency.of(s.nodes[0] as usize).first()? as usize;
            // sigma_zz = nu (sigma_xx + sigma_yy) in plane strain, 0 in plane stress.
            let zz = match mode {
                AnalysisMode::PlaneStrain => map.material(model.mesh.zone[first])?.poisson,
                _ => 0.0,
            };
            fit_corner(&model.mesh, mode, zz, samples, adjacency, boundary, s)
        })
        .collect()
}
