//! `hone study`: read and estimate every mesh, sample the quantities, judge them, report, plot.

use super::args::RecoveryArg;
use super::args::StudyArgs;
use super::estimate::load;
use super::progress::Stages;
use super::Outcome;
use crate::io::write_atomically;
use crate::report::{write_study_svg, StudyReport};
use crate::singular::{screen_with, PoissonRatio, ScreeningOptions};
use crate::study::{analyse, quantity_specs, sample, MeshSample, Probe, Spot, StudyOptions};
use anyhow::{bail, Context, Result};
use std::path::{Path, PathBuf};

/// Reads, estimates, screens and samples one file; the model is dropped on return.
fn sample_file(
    path: &Path,
    args: &StudyArgs,
    probes: &[Probe],
    stages: &Stages,
) -> Result<(MeshSample, Vec<Spot>)> {
    let file = path.display().to_string();
    let loaded = load(path, &args.model, RecoveryArg::Spr, stages)?;
    stages.stage("screening for singular spots");
    let options = ScreeningOptions::new(loaded.mode, PoissonRatio::from_materials(&loaded.map));
    let screening = screen_with(
        &loaded.model,
        &loaded.computed.adjacency,
        &loaded.computed.boundary,
        &options,
    )
    .with_context(|| format!("screening {file}"))?;
    let spots = screening
        .spots
        .iter()
        .map(|s| Spot {
            location: s.location,
            lambda: s.lambda,
            kind: s.kind.as_str().replace('_', " "),
        })
        .collect();
    Ok((
        sample(&file, &loaded.model, &loaded.computed, probes)?,
        spots,
    ))
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
    let sampled = args
        .files
        .iter()
        .map(|f| sample_file(f, args, &probes, &stages))
        .collect::<Result<Vec<_>>>()?;
    stages.finish();
    // Spots come from the finest mesh (most DOFs): its screening sees the geometry best.
    let finest = (0..sampled.len())
        .max_by_key(|&i| sampled[i].0.dofs)
        .unwrap_or(0);
    let spots: Vec<Spot> = sampled.get(finest).map(|s| s.1.clone()).unwrap_or_default();
    let samples: Vec<MeshSample> = sampled.into_iter().map(|s| s.0).collect();
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
