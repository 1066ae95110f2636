//! `hone estimate`: read, check, recover, estimate, report, optionally write the annotated VTU.

use super::args::{EstimateArgs, RecoveryArg};
use super::model_options::{analysis_mode, describe, materials, model_options};
use super::progress::Stages;
use super::Outcome;
use crate::estimate::{estimate_model, Computed};
use crate::io::{
    build_model, read_results, write_model_vtu, Encoding, Field, FieldValues, WriteOptions,
};
use crate::material::{von_mises, AnalysisMode, MaterialMap};
use crate::mesh::Model;
use crate::recovery::RecoveryMethod;
use crate::report::{EstimateReport, TopElement};
use crate::singular::{format_point, SpotKind};
use anyhow::{anyhow, Context, Result};
use rayon::prelude::*;

/// Runs the estimate stage with progress display; errors name the file.
fn compute(
    model: &Model,
    map: &MaterialMap,
    mode: AnalysisMode,
    method: RecoveryMethod,
    file: &str,
    stages: &Stages,
) -> Result<Computed> {
    estimate_model(model, map, mode, method, &|m| stages.stage(m))
        .map_err(|e| anyhow!("{file}: {e}"))
}

/// A results file read, checked and estimated: what `estimate` and `plan` both start from.
pub(super) struct Loaded {
    pub model: Model,
    pub notes: crate::io::ModelNotes,
    pub mode: AnalysisMode,
    pub map: MaterialMap,
    pub method: RecoveryMethod,
    pub computed: Computed,
    /// Warnings about the input (cells left out).
    pub warnings: Vec<String>,
}

/// Reads `path`, builds the model, checks the mode and materials, and runs the estimate.
pub(super) fn load(
    path: &std::path::Path,
    model_args: &super::args::ModelArgs,
    recovery: RecoveryArg,
    stages: &Stages,
) -> Result<Loaded> {
    let file = path.display().to_string();
    stages.stage("reading");
    let raw = read_results(path)?;
    let (model, notes) = build_model(&raw, &file, &model_options(model_args))?;
    drop(raw);
    let mode = analysis_mode(model_args, model.mesh.dimension, &file)?;
    let map = materials(model_args)?;
    let method = match recovery {
        RecoveryArg::Spr => RecoveryMethod::Spr,
        RecoveryArg::Average => RecoveryMethod::Average,
    };
    let computed = compute(&model, &map, mode, method, &file, stages)?;
    let warnings = notes
        .skipped
        .iter()
        .map(|(vtk, count)| {
            format!(
                "{count} cells of type {} (VTK {vtk}) were left out (--skip-unsupported)",
                crate::element::vtk_cell_type_name(*vtk)
            )
        })
        .collect();
    Ok(Loaded {
        model,
        notes,
        mode,
        map,
        method,
        computed,
        warnings,
    })
}

pub(super) fn run(args: &EstimateArgs, json: bool, quiet: bool) -> Result<Outcome> {
    let file = args.file.display().to_string();
    let stages = Stages::new(6 + u64::from(args.out.is_some()), quiet || json);
    let Loaded {
        model,
        notes,
        mode,
        map,
        method,
        computed,
        mut warnings,
    } = load(&args.file, &args.model, args.recovery, &stages)?;
    let est = &computed.estimate;
    if est.energy_norm.is_nan() || est.energy_norm <= 0.0 {
        warnings
            .push("the displacement field carries no strain energy: nothing to estimate".into());
    }
    let averaged = computed
        .recovered
        .rules
        .iter()
        .filter(|r| **r == crate::recovery::NodeRule::Averaged)
        .count();
    if method == RecoveryMethod::Spr && averaged > 0 {
        warnings.push(format!(
            "{averaged} nodes could not be reached by any patch fit and use element averaging; the estimate is less reliable near them"
        ));
    }
    if let Some(out) = &args.out {
        stages.stage("writing annotated VTU");
        let size_now = model.mesh.size_now();
        write_annotated(
            out,
            &args.file,
            &model,
            &computed,
            &size_now,
            args.ascii,
            &[],
            &[],
        )
        .with_context(|| format!("writing {}", out.display()))?;
    }
    stages.finish();
    let concentration = est.concentration(&[0.5, 0.9]);
    let report = EstimateReport {
        file: file.clone(),
        kinds: model
            .mesh
            .kind_counts()
            .into_iter()
            .map(|(k, n)| (k.name(), n))
            .collect(),
        elements: model.mesh.element_count(),
        nodes: model.mesh.node_count(),
        dimension: model.mesh.dimension,
        mode: mode.name(),
        material: match mode {
            AnalysisMode::PlaneStress { thickness } => {
                format!("{}, thickness {thickness}", describe(&map))
            }
            _ => describe(&map),
        },
        recovery: match method {
            RecoveryMethod::Spr => "superconvergent patch recovery (SPR)",
            RecoveryMethod::Average => "nodal averaging",
        },
        recovery_rules: computed
            .recovered
            .rule_counts()
            .into_iter()
            .map(|(r, n)| (r.describe(), n))
            .collect(),
        energy_norm: est.energy_norm,
        error_norm: est.error_norm,
        relative_error: est.relative_error,
        elements_for_half: concentration[0],
        elements_for_ninety: concentration[1],
        top_elements: est
            .top_elements(args.top)
            .into_iter()
            .map(|e| TopElement {
                id: model.mesh.file_cell[e],
                kind: model.mesh.element(e).0.name(),
                centroid: model.mesh.centroid(e),
                error_energy: est.error_energy(e),
                error_share: est.error_share(e),
            })
            .collect(),
        warnings,
        notes: {
            let mut lines = Vec::new();
            if notes.reoriented_wedges > 0 {
                lines.push(format!(
                    "{} wedge cells use the other corner handedness (face 0-1-2 facing 3-4-5); they were reordered",
                    notes.reoriented_wedges
                ));
            }
            lines.extend(corner_notes(&computed, &model));
            lines
        },
    };
    super::print_report(
        json,
        || report.to_json(),
        |mut w| report.write_text(&mut w),
        !report.warnings.is_empty(),
    )
}

/// Writes the annotated VTU with the fields the estimate knows, plus `extra_points` and
/// `extra_cells` (the plan adds its fields this way). `size_now` is the mesh's current element
/// size ([`crate::mesh::Mesh::size_now`]), which the plan has computed already.
#[allow(clippy::too_many_arguments)]
pub fn write_annotated(
    out: &std::path::Path,
    input: &std::path::Path,
    model: &Model,
    computed: &Computed,
    size_now: &[f64],
    ascii: bool,
    extra_points: &[Field],
    extra_cells: &[Field],
) -> Result<()> {
    let est = &computed.estimate;
    let n = model.mesh.element_count();
    let nodal = computed.recovered.nodal_field(model.mesh.node_count());
    let stress: &[f64] = bytemuck::cast_slice(&nodal);
    let vm: Vec<f64> = nodal.par_iter().map(von_mises).collect();
    let per_element =
        |f: &(dyn Fn(usize) -> f64 + Sync)| -> Vec<f64> { (0..n).into_par_iter().map(f).collect() };
    let error_energy = per_element(&|e| est.error_energy(e));
    let error_share = per_element(&|e| est.error_share(e));
    let error_density = per_element(&|e| est.error_density(e));
    let options = WriteOptions {
        encoding: if ascii {
            Encoding::Ascii
        } else {
            Encoding::AppendedRaw
        },
        ..WriteOptions::default()
    };
    let one = |name, values| Field {
        name,
        components: 1,
        values: FieldValues::F64(values),
    };
    let mut points = vec![
        Field {
            name: "stress_recovered",
            components: 6,
            values: FieldValues::F64(stress),
        },
        one("von_mises_recovered", &vm),
    ];
    points.extend_from_slice(extra_points);
    let mut cells = vec![
        one("error_energy", &error_energy),
        one("error_share", &error_share),
        one("error_density", &error_density),
        one("size_now", size_now),
    ];
    cells.extend_from_slice(extra_cells);
    write_model_vtu(out, Some(input), model, &points, &cells, &options)?;
    Ok(())
}

/// One note per re-entrant corner whose elements use the fitted corner field.
pub(super) fn corner_notes(computed: &Computed, model: &Model) -> Vec<String> {
    computed
        .corners
        .iter()
        .map(|c| {
            let p = model.mesh.points[c.node as usize];
            let lambdas = c
                .lambdas
                .iter()
                .map(|l| format!("{l:.4}"))
                .collect::<Vec<_>>()
                .join(" and ");
            format!(
                "re-entrant corner of {:.1} deg at {}: in its {} elements the recovered stress is the corner's singular field (Williams exponents {lambdas}) plus a linear part, fitted to the FE stresses nearby, since patch polynomials cannot follow it",
                c.angle.to_degrees(),
                format_point(p, SpotKind::ReentrantCorner),
                c.elements.len()
            )
        })
        .collect()
}
