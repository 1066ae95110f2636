//! `hone study`: read and estimate every mesh, sample the quantities, judge them, report, plot.

use super::args::StudyArgs;
use super::model_options::{analysis_mode, materials, model_options};
use super::progress::Stages;
use super::Outcome;
use crate::estimate::estimate_model;
use crate::io::{build_model, read_results, write_atomically};
use crate::recovery::RecoveryMethod;
use crate::report::{write_study_svg, StudyReport};
use crate::study::{analyse, quantity_specs, sample, MeshSample, Probe, Spot, StudyOptions};
use anyhow::{anyhow, bail, Context, Result};
use std::path::{Path, PathBuf};

/// Reads, estimates and samples one file; the model is dropped on return.
fn sample_file(
    path: &Path,
    args: &StudyArgs,
    probes: &[Probe],
    stages: &Stages,
) -> Result<MeshSample> {
    let file = path.display().to_string();
    stages.stage("reading");
    let raw = read_results(path)?;
    let (model, _notes) = build_model(&raw, &file, &model_options(&args.model))?;
    drop(raw);
    let mode = analysis_mode(&args.model, model.mesh.dimension, &file)?;
    let map = materials(&args.model)?;
    let computed = estimate_model(&model, &map, mode, RecoveryMethod::Spr, &|m| {
        stages.stage(m)
    })
    .map_err(|e| anyhow!("{file}: {e}"))?;
    Ok(sample(&file, &model, &computed, probes)?)
}

/// The plot path: the one given, or study.svg next to the first input; never an input.
fn plot_path(args: &StudyArgs) -> Result<Option<PathBuf>> {
    if args.no_plot {
        return Ok(None);
    }
    let path = match &args.plot {
        Some(p) => p.clone(),
        None => args.files[0]
            .parent()
            .map_or_else(|| PathBuf::from("study.svg"), |d| d.join("study.svg")),
    };
    for input in &args.files {
        let same = match (path.canonicalize(), input.canonicalize()) {
            (Ok(a), Ok(b)) => a == b,
            _ => path == *input,
        };
        if same {
            bail!(
                "--plot {}: that is an input file; choose another name",
                path.display()
            );
        }
    }
    Ok(Some(path))
}

pub(super) fn run(args: &StudyArgs, json: bool, quiet: bool) -> Result<Outcome> {
    let probes: Vec<Probe> = args
        .probes
        .iter()
        .map(|p| p.parse::<Probe>())
        .collect::<Result<_, _>>()?;
    let options = StudyOptions {
        tolerance: args.tolerance / 100.0,
        ..StudyOptions::default()
    };
    let plot = plot_path(args)?;
    let stages = Stages::new(6 * args.files.len() as u64, quiet || json);
    let samples = args
        .files
        .iter()
        .map(|f| sample_file(f, args, &probes, &stages))
        .collect::<Result<Vec<_>>>()?;
    stages.finish();
    // TODO(issue 5): fill from singular::screen on the finest mesh once that module lands;
    // until then singular growth is recognised from the values alone.
    let spots: Vec<Spot> = Vec::new();
    let study = analyse(samples, &quantity_specs(&probes), &spots, &options)?;
    let mut warnings = Vec::new();
    if study.meshes.len() == 2 {
        warnings.push(
            "two meshes: the expected order is assumed (GCI safety factor 3); a third mesh shows whether the values converge".to_string(),
        );
    }
    if let Some(path) = &plot {
        write_atomically(path, Some(&args.files[0]), |w| write_study_svg(&study, w))
            .with_context(|| format!("writing the plot {}", path.display()))?;
    }
    let report = StudyReport {
        study,
        plot: plot.map(|p| p.display().to_string()),
        warnings,
    };
    super::print_report(
        json,
        || report.to_json(),
        |mut w| report.write_text(&mut w),
        !report.warnings.is_empty(),
    )
}
