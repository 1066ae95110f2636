//! `hone plan`: estimate, screen for singular spots, plan the next mesh, write the plan files.

use super::args::PlanArgs;
use super::estimate::{load, write_annotated, Loaded};
use super::progress::Stages;
use super::Outcome;
use crate::io::text_out::NodeText;
use crate::io::{
    file_order, write_atomically, write_medit_text, write_msh_text, write_pos_text, Field,
    FieldValues,
};
use crate::mesh::Model;
use crate::plan::{plan_on, Plan, PlanGeometry, PlanInput, PlanSettings, Strategy};
use crate::report::plan_files::{write_plan_tables, write_sizes_csv, ElementRows};
use crate::report::{percent, PlanReport, SpotLine};
use crate::singular::{screen_with, PoissonRatio, ScreeningOptions};
use anyhow::{bail, Context, Result};
use std::path::{Path, PathBuf};

/// Parses `--strategy NAME [VALUE]` with the defaults of each strategy.
fn strategy(words: &[String]) -> Result<Strategy> {
    let value = |default: f64| -> Result<f64> {
        match words.get(1) {
            None => Ok(default),
            Some(v) => v
                .parse::<f64>()
                .with_context(|| format!("--strategy {}: '{v}' is not a number", words[0])),
        }
    };
    let s = match words.first().map(String::as_str) {
        None | Some("optimal") => {
            if words.len() > 1 {
                bail!("--strategy optimal takes no value, found '{}'", words[1]);
            }
            Strategy::Optimal
        }
        Some("dorfler") => Strategy::Dorfler(value(0.5)?),
        Some("maximum") => Strategy::Maximum(value(0.5)?),
        Some("fraction") => Strategy::Fraction(value(0.1)?),
        Some(other) => {
            bail!("--strategy '{other}': expected optimal, dorfler THETA, maximum THETA or fraction F")
        }
    };
    Ok(s)
}

/// The strategy in words for the summary.
fn describe_strategy(s: &Strategy, settings: &PlanSettings) -> String {
    let limits = format!(
        "grading {}, at most {}x finer and {}x coarser per plan{}",
        settings.grading,
        1.0 / settings.step_limits.0,
        settings.step_limits.1,
        if settings.refine_only {
            ", refine only"
        } else {
            ""
        }
    );
    match s {
        Strategy::Optimal => format!("optimal sizes (fewest elements for the goal); {limits}"),
        Strategy::Dorfler(t) => {
            format!("Dorfler marking, theta {t}, marked elements halved; {limits}")
        }
        Strategy::Maximum(t) => {
            format!("maximum marking, theta {t}, marked elements halved; {limits}")
        }
        Strategy::Fraction(f) => {
            format!(
                "largest {} % of indicators marked, halved; {limits}",
                100.0 * f
            )
        }
    }
}

/// Parses `X,Y` or `X,Y,Z` (z = 0 when left out).
fn parse_point(text: &str) -> Result<[f64; 3]> {
    let parts: Vec<&str> = text.split(',').map(str::trim).collect();
    if !(2..=3).contains(&parts.len()) {
        bail!("--singular '{text}': expected X,Y or X,Y,Z");
    }
    let mut p = [0.0; 3];
    for (slot, part) in p.iter_mut().zip(&parts) {
        *slot = part
            .parse::<f64>()
            .ok()
            .filter(|v| v.is_finite())
            .with_context(|| format!("--singular '{text}': '{part}' is not a number"))?;
    }
    Ok(p)
}

/// Default output folder: next to the input, `NAME.plan` for `NAME.vtu`.
fn default_out_dir(input: &Path) -> PathBuf {
    let stem = input
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_else(|| "results".into());
    input.with_file_name(format!("{stem}.plan"))
}

/// Settings from the flags, checked.
fn settings(args: &PlanArgs) -> Result<PlanSettings> {
    let mut s = PlanSettings {
        strategy: strategy(&args.strategy)?,
        refine_only: args.refine_only,
        size_min: args.size_min,
        size_max: args.size_max,
        singular_floor: args.singular_floor,
        max_dofs: args.max_dofs,
        // The prediction from the final field (after the vertex minimum and the gradation) is
        // aimed at the target, so the next mesh does not overshoot it (checked by the
        // adaptive-loop tests).
        fit_final_error: true,
        ..PlanSettings::default()
    };
    if let Some(t) = args.target_error {
        if !(t > 0.0 && t < 100.0) {
            bail!("--target-error {t}: expected a percentage between 0 and 100");
        }
        s.target_error = Some(t / 100.0);
    }
    if let Some(g) = args.grading {
        s.grading = g;
    }
    if let Some(f) = args.max_refine_factor {
        if !(f >= 1.0 && f.is_finite()) {
            bail!("--max-refine-factor {f}: expected a number >= 1");
        }
        s.step_limits.0 = 1.0 / f;
    }
    if let Some(f) = args.max_coarsen_factor {
        s.step_limits.1 = f;
    }
    for (flag, v) in [
        ("--size-min", args.size_min),
        ("--size-max", args.size_max),
        ("--singular-floor", args.singular_floor),
    ] {
        if let Some(v) = v {
            if !(v > 0.0 && v.is_finite()) {
                bail!("{flag} {v}: expected a positive size");
            }
        }
    }
    Ok(s)
}

pub(super) fn run(args: &PlanArgs, json: bool, quiet: bool) -> Result<Outcome> {
    let file = args.file.display().to_string();
    let settings = settings(args)?;
    let stages = Stages::new(10, quiet || json);
    let user_points = args
        .singular
        .iter()
        .map(|text| parse_point(text))
        .collect::<Result<Vec<_>>>()?;
    let Loaded {
        model,
        mode,
        map,
        computed,
        mut warnings,
        ..
    } = load(&args.file, &args.model, args.recovery, &stages)?;
    let est = &computed.estimate;
    if est.error_norm.is_nan() || est.error_norm <= 0.0 {
        bail!("{file}: the estimated error is zero everywhere (no strain energy or an exact field): there is nothing to plan");
    }

    let mesh = &model.mesh;
    let n = mesh.element_count();
    let size_now = mesh.size_now();
    stages.stage("screening for singular spots, mesh edges");
    let mut options = ScreeningOptions::new(mode, PoissonRatio::from_materials(&map));
    options.user_points = user_points;
    // The plan's edge graph and element counter need the mesh alone: built alongside.
    let (screening, geometry) = rayon::join(
        || screen_with(&model, &computed.adjacency, &computed.boundary, &options),
        || PlanGeometry::new(mesh),
    );
    let screening = screening.with_context(|| format!("screening {file}"))?;
    let geometry = geometry.with_context(|| format!("planning {file}"))?;
    let mut exponents: Vec<f64> = (0..n).map(|e| mesh.element(e).0.order() as f64).collect();
    let mut singular = vec![false; n];
    let mut flagged = vec![0usize; screening.spots.len()];
    for (e, spot) in screening.element_spot.iter().enumerate() {
        if let Some(s) = spot {
            let s = *s as usize;
            singular[e] = true;
            flagged[s] += 1;
            exponents[e] = exponents[e].min(screening.spots[s].lambda);
        }
    }
    let spots: Vec<SpotLine> = screening
        .spots
        .iter()
        .zip(&flagged)
        .map(|(s, &elements)| SpotLine {
            kind: s.kind.as_str().to_string(),
            location: s.location,
            angle_deg: s.angle_deg,
            lambda: s.lambda,
            elements,
            sentence: s.sentence(),
        })
        .collect();
    let total_energy: f64 = est.energy_sq.iter().sum();
    let input = PlanInput {
        mesh,
        error_sq: &est.error_sq,
        energy_sq: total_energy,
        exponents: &exponents,
        singular: &singular,
        size_now: &size_now,
        dofs_per_node: mesh.dimension,
    };
    stages.stage("planning sizes");
    let the_plan =
        plan_on(&input, &settings, &geometry).with_context(|| format!("planning {file}"))?;
    drop(geometry); // its memory is free again for the writers
    if the_plan.budget_limited && the_plan.achievable_error > the_plan.target_error {
        warnings.push(format!(
            "the target {} % needs more than {} DOFs; the budget buys about {} %",
            percent(the_plan.target_error),
            settings.max_dofs.unwrap_or(0.0),
            percent(the_plan.achievable_error)
        ));
    } else if the_plan.achievable_error > 1.05 * the_plan.target_error {
        warnings.push(format!(
            "the per-plan limits keep this step from reaching {} % (predicted {} %); plan again after the next solve",
            percent(the_plan.target_error),
            percent(the_plan.achievable_error)
        ));
    }

    let out_dir = args
        .out_dir
        .clone()
        .unwrap_or_else(|| default_out_dir(&args.file));
    std::fs::create_dir_all(&out_dir)
        .with_context(|| format!("creating the output folder {}", out_dir.display()))?;
    let singular_zone: Vec<i32> = singular.iter().map(|&s| i32::from(s)).collect();
    let mut report = PlanReport {
        file: file.clone(),
        elements: n,
        nodes: mesh.node_count(),
        kinds: mesh
            .kind_counts()
            .into_iter()
            .map(|(k, c)| (k.name(), c))
            .collect(),
        dimension: mesh.dimension,
        mode: mode.name(),
        strategy: describe_strategy(&settings.strategy, &settings),
        relative_error: est.relative_error,
        target_error: the_plan.target_error,
        target_is_default: args.target_error.is_none(),
        max_dofs: settings.max_dofs,
        budget_limited: the_plan.budget_limited,
        achievable_error: the_plan.achievable_error,
        predicted_elements: the_plan.predicted_elements,
        predicted_nodes: the_plan.predicted_nodes,
        predicted_dofs: the_plan.predicted_dofs,
        current_dofs: the_plan.current_dofs,
        marks: the_plan.mark_counts(),
        size_range: the_plan
            .nodal_size
            .iter()
            .fold((f64::INFINITY, 0.0_f64), |(lo, hi), &h| {
                (lo.min(h), hi.max(h))
            }),
        spots,
        files: Vec::new(),
        warnings,
        notes: super::estimate::corner_notes(&computed, &model),
    };
    let files = plan_file_names(&out_dir);
    report.files = files.iter().map(|p| p.display().to_string()).collect();
    let summary = report.to_json();

    stages.stage("writing plan files");
    let refine_mark: Vec<i32> = the_plan.refine_mark.iter().map(|&m| i32::from(m)).collect();
    let annotated = || {
        write_annotated(
            &files[3],
            &args.file,
            &model,
            &computed,
            &size_now,
            false,
            &[Field {
                name: "size_target",
                components: 1,
                values: FieldValues::F64(&the_plan.nodal_size),
            }],
            &[
                Field {
                    name: "size_target",
                    components: 1,
                    values: FieldValues::F64(&the_plan.size_target),
                },
                Field {
                    name: "refine_mark",
                    components: 1,
                    values: FieldValues::I32(&refine_mark),
                },
                Field {
                    name: "singular_zone",
                    components: 1,
                    values: FieldValues::I32(&singular_zone),
                },
            ],
        )
        .with_context(|| format!("writing {}", files[3].display()))
    };
    write_plan_files(
        &files,
        &args.file,
        &model,
        &the_plan,
        est,
        &size_now,
        &singular_zone,
        &summary,
        &annotated,
    )?;
    stages.finish();

    super::print_report(
        json,
        || summary.clone(),
        |mut w| report.write_text(&mut w),
        !report.warnings.is_empty(),
    )
}

/// plan.json, plan.csv, sizes.csv, plan.vtu, sizes.pos, sizes.msh, sizes.mesh, sizes.sol in
/// `dir` (the indices are used below).
fn plan_file_names(dir: &Path) -> Vec<PathBuf> {
    [
        "plan.json",
        "plan.csv",
        "sizes.csv",
        "plan.vtu",
        "sizes.pos",
        "sizes.msh",
        "sizes.mesh",
        "sizes.sol",
    ]
    .iter()
    .map(|n| dir.join(n))
    .collect()
}

/// Writes every plan file side by side (the annotated VTU through `annotated`), each atomically.
#[allow(clippy::too_many_arguments)]
fn write_plan_files(
    files: &[PathBuf],
    input: &Path,
    model: &Model,
    the_plan: &Plan,
    est: &crate::estimate::Estimate,
    size_now: &[f64],
    singular_zone: &[i32],
    summary: &serde_json::Value,
    annotated: &(dyn Fn() -> Result<()> + Sync),
) -> Result<()> {
    let mesh = &model.mesh;
    let n = mesh.element_count();
    let order = file_order(mesh);
    let error_energy: Vec<f64> = (0..n).map(|e| est.error_energy(e)).collect();
    let error_share: Vec<f64> = (0..n).map(|e| est.error_share(e)).collect();
    let rows = ElementRows {
        order: &order,
        id: &mesh.file_cell,
        error_energy: &error_energy,
        error_share: &error_share,
        refine_mark: &the_plan.refine_mark,
        size_now,
        size_target: &the_plan.size_target,
        singular_zone,
    };
    // Corner coordinates and sizes are formatted once for the three size-field files; this
    // also checks the sizes for sizes.csv.
    let nodes = NodeText::checked(&files[4], mesh, &the_plan.nodal_size)?;
    let context = |i: usize| format!("writing {}", files[i].display());
    type Job<'a> = Box<dyn FnOnce() -> Result<()> + Send + 'a>;
    let jobs: Vec<Job<'_>> = vec![
        Box::new(|| {
            // Both tables in one pass; each file is still written atomically on its own.
            write_atomically(&files[0], Some(input), |json| {
                write_atomically(&files[1], Some(input), |csv| {
                    write_plan_tables(json, csv, summary, &rows)
                })
                .map_err(std::io::Error::other)
            })
            .with_context(|| format!("{} and {}", context(0), files[1].display()))
        }),
        Box::new(|| {
            write_atomically(&files[2], Some(input), |w| {
                write_sizes_csv(w, mesh, &the_plan.nodal_size)
            })
            .with_context(|| context(2))
        }),
        Box::new(|| {
            write_pos_text(&files[4], Some(input), mesh, &nodes).with_context(|| context(4))
        }),
        Box::new(|| {
            write_msh_text(&files[5], Some(input), mesh, &nodes).with_context(|| context(5))
        }),
        Box::new(annotated),
        Box::new(|| {
            write_medit_text(&files[6], &files[7], Some(input), mesh, &nodes)
                .with_context(|| context(6))
        }),
    ];
    // The files are written side by side: formatting (rayon) of one overlaps the system calls
    // of the others (measured on 1M tet10: 2.2-2.8 s side by side, 3.0-3.5 s one after the
    // other). Each file is still written atomically and byte-identically.
    let results: Vec<Result<()>> = std::thread::scope(|scope| {
        let handles: Vec<_> = jobs.into_iter().map(|j| scope.spawn(j)).collect();
        handles
            .into_iter()
            .map(|h| {
                h.join()
                    .unwrap_or_else(|_| Err(anyhow::anyhow!("a plan writer stopped unexpectedly")))
            })
            .collect()
    });
    for r in results {
        r?;
    }
    Ok(())
}
