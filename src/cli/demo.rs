//! `hone demo [DIR]`: builds the deck-plate scenario (sharp and rounded hatch corners, 2D tri6
//! and 3D tet10), solves it with the reference solver, writes the result files, then reads them
//! back and estimates each exactly as it would any other solver's file, and compares the two
//! corner variants.

use super::args::DemoArgs;
use super::Outcome;
use crate::estimate::{estimate_model, Computed};
use crate::io::{build_model, read_results, ModelOptions};
use crate::material::{von_mises, AnalysisMode, MaterialMap};
use crate::mesh::Model;
use crate::recovery::RecoveryMethod;
use crate::reference::demo::{
    plate_mesh, solid_mesh, solve_plate, Corner, MATERIAL, OPENING, PLATE_FLAGS, THICKNESS,
};
use crate::reference::solver::write_results;
use crate::report::{number, thousands};
use anyhow::{bail, Context, Result};
use clap::Parser;
use std::path::{Path, PathBuf};

/// Name of the file listing what the demo created in its folder.
const MARKER: &str = ".hone-demo-files";

/// Far-field element sizes (mm) of the 2D and 3D meshes: coarse enough for small files.
const SIZE_2D: f64 = 25.0;
const SIZE_3D: f64 = 40.0;

/// Picks the output folder: the given one, or a new `hone-demo[-N]` in the current folder.
fn output_dir(arg: &Option<PathBuf>) -> Result<PathBuf> {
    if let Some(dir) = arg {
        std::fs::create_dir_all(dir)
            .with_context(|| format!("cannot create the folder {}", dir.display()))?;
        return Ok(dir.clone());
    }
    for i in 1.. {
        let name = if i == 1 {
            "hone-demo".to_string()
        } else {
            format!("hone-demo-{i}")
        };
        let dir = PathBuf::from(name);
        if !dir.exists() {
            std::fs::create_dir_all(&dir)
                .with_context(|| format!("cannot create the folder {}", dir.display()))?;
            return Ok(dir);
        }
    }
    unreachable!("the loop returns")
}

/// Refuses to replace a file the demo did not create (it lists its files in the marker).
fn check_writable(dir: &Path, names: &[String]) -> Result<()> {
    let listed = std::fs::read_to_string(dir.join(MARKER)).unwrap_or_default();
    for name in names {
        let path = dir.join(name);
        if path.exists() && !listed.lines().any(|l| l == name) {
            bail!(
                "{} exists and was not written by hone demo; choose another folder",
                path.display()
            );
        }
    }
    Ok(())
}

struct Variant {
    corner: Corner,
    file: PathBuf,
    computed: Computed,
    model: Model,
}

fn estimate_file(path: &Path, mode: AnalysisMode) -> Result<(Model, Computed)> {
    let raw = read_results(path)?;
    let file = path.display().to_string();
    let (model, _) = build_model(&raw, &file, &ModelOptions::default())?;
    let computed = estimate_model(
        &model,
        &MaterialMap::Single(MATERIAL),
        mode,
        RecoveryMethod::Spr,
        &|_| {},
    )
    .map_err(|e| anyhow::anyhow!("{file}: {e}"))?;
    Ok((model, computed))
}

/// Share of the error squared in elements whose centroid lies within `radius` of the opening
/// corner, and the peak recovered von Mises stress with its location.
fn near_corner(v: &Variant, radius: f64) -> (f64, usize, f64, [f64; 3]) {
    let mesh = &v.model.mesh;
    let est = &v.computed.estimate;
    let mut share = 0.0;
    let mut count = 0;
    for e in 0..mesh.element_count() {
        let c = mesh.centroid(e);
        if ((c[0] - OPENING[0]).powi(2) + (c[1] - OPENING[1]).powi(2)).sqrt() < radius {
            share += est.error_share(e);
            count += 1;
        }
    }
    let nodal = v.computed.recovered.nodal_field(mesh.node_count());
    let (peak_node, peak) =
        nodal
            .iter()
            .map(von_mises)
            .enumerate()
            .fold(
                (0, 0.0),
                |best, (i, s)| if s > best.1 { (i, s) } else { best },
            );
    (share, count, peak, mesh.points[peak_node])
}

/// Far-field sizes of the study sequence (mm): each mesh halves the sizes of the previous one.
const STUDY_SIZES: [(f64, &str); 3] = [(50.0, "_coarse"), (SIZE_2D, ""), (12.5, "_fine")];

/// Runs one hone command line exactly as a user would type it (without the program name).
fn run_command(words: &[String]) -> Result<Outcome> {
    let cli = super::args::Cli::try_parse_from(
        std::iter::once("hone".to_string()).chain(words.iter().cloned()),
    )
    .map_err(|e| anyhow::anyhow!("demo command {words:?}: {e}"))?;
    super::run(cli)
}

/// The material and mode flags of the 2D demo files, without progress display.
fn plate_flags() -> Vec<String> {
    PLATE_FLAGS
        .iter()
        .chain(&["--quiet"])
        .map(|s| s.to_string())
        .collect()
}

pub(super) fn run(args: &DemoArgs) -> Result<Outcome> {
    let dir = output_dir(&args.dir)?;
    let mut names: Vec<String> = Vec::new();
    for c in [Corner::Sharp, Corner::Rounded] {
        for (_, suffix) in STUDY_SIZES {
            names.push(format!("deck_{}_tri6{suffix}.vtu", c.name()));
        }
        names.push(format!("deck_{}_tet10.vtu", c.name()));
        names.push(format!("deck_{}_tri6.plan", c.name()));
        names.push(format!("study_{}.svg", c.name()));
    }
    check_writable(&dir, &names)?;
    std::fs::write(dir.join(MARKER), names.join("\n") + "\n")
        .context("writing the demo's file list")?;
    println!(
        "hone demo: deck plate with a hatch opening, quarter model, 60 MPa tension (invented data)"
    );
    println!("  writing results to {}", dir.display());
    let mut variants_2d = Vec::new();
    let mut variants_3d = Vec::new();
    for corner in [Corner::Sharp, Corner::Rounded] {
        for (far, suffix) in STUDY_SIZES {
            let solved = solve_plate(&plate_mesh(corner, far)?)?;
            let file = dir.join(format!("deck_{}_tri6{suffix}.vtu", corner.name()));
            write_results(&file, &solved.mesh, &solved.displacement, false)?;
        }
        let file = dir.join(format!("deck_{}_tri6.vtu", corner.name()));
        let (model, computed) = estimate_file(
            &file,
            AnalysisMode::PlaneStress {
                thickness: THICKNESS,
            },
        )?;
        variants_2d.push(Variant {
            corner,
            file,
            computed,
            model,
        });

        let coarse = plate_mesh(corner, SIZE_3D)?;
        let solid = solve_plate(&solid_mesh(&coarse, 2)?)?;
        let file = dir.join(format!("deck_{}_tet10.vtu", corner.name()));
        write_results(&file, &solid.mesh, &solid.displacement, false)?;
        let (model, computed) = estimate_file(&file, AnalysisMode::Solid3d)?;
        variants_3d.push(Variant {
            corner,
            file,
            computed,
            model,
        });
    }
    for (label, variants) in [
        ("2D plane stress, tri6", &variants_2d),
        ("3D half thickness, tet10", &variants_3d),
    ] {
        println!();
        println!("  {label}");
        println!(
            "  {:<8} {:>9} {:>9} {:>10} {:>22} {:>22}",
            "corner",
            "elements",
            "nodes",
            "rel. error",
            "error within 50 mm",
            "peak von Mises (MPa)"
        );
        for v in variants.iter() {
            let (share, count, peak, at) = near_corner(v, 50.0);
            println!(
                "  {:<8} {:>9} {:>9} {:>9.2}% {:>12.1}% ({:>4} el.) {:>10} at ({}, {})",
                v.corner.name(),
                thousands(v.model.mesh.element_count()),
                thousands(v.model.mesh.node_count()),
                100.0 * v.computed.estimate.relative_error,
                100.0 * share,
                count,
                number(peak, 4),
                number(at[0], 4),
                number(at[1], 4),
            );
        }
        for v in variants.iter() {
            let top = v.computed.estimate.top_elements(3);
            let list: Vec<String> = top
                .iter()
                .map(|&e| {
                    let c = v.model.mesh.centroid(e);
                    format!(
                        "cell {} at ({}, {})",
                        v.model.mesh.file_cell[e],
                        number(c[0], 4),
                        number(c[1], 4)
                    )
                })
                .collect();
            println!("  largest errors, {}: {}", v.corner.name(), list.join("; "));
        }
    }
    println!();
    println!("  The sharp corner is a re-entrant 270 degree corner: its stress grows without limit as the");
    println!(
        "  mesh is refined, and the error concentrates there. The rounded corner has a finite peak"
    );
    println!("  that refinement converges.");
    for v in &variants_2d {
        println!();
        println!(
            "  ---- the plan for the next mesh, {} corner: hone plan {} --target-error 0.25 ...",
            v.corner.name(),
            v.file.display()
        );
        let mut words = vec![
            "plan".to_string(),
            v.file.display().to_string(),
            "--target-error".into(),
            "0.25".into(),
        ];
        words.extend(plate_flags());
        run_command(&words)?;
    }
    for corner in [Corner::Sharp, Corner::Rounded] {
        let files: Vec<String> = STUDY_SIZES
            .iter()
            .map(|(_, suffix)| {
                dir.join(format!("deck_{}_tri6{suffix}.vtu", corner.name()))
                    .display()
                    .to_string()
            })
            .collect();
        println!();
        println!(
            "  ---- convergence study, {} corner, three meshes halving every size: hone study {} ...",
            corner.name(),
            files.join(" ")
        );
        let mut words = vec!["study".to_string()];
        words.extend(files);
        words.extend([
            "--probe".to_string(),
            "max:von_mises@sphere(200,125,60)".to_string(),
            "--plot".to_string(),
            dir.join(format!("study_{}.svg", corner.name()))
                .display()
                .to_string(),
        ]);
        words.extend(plate_flags());
        run_command(&words)?;
    }
    // The plans and studies print their own warnings; the demo itself ran as intended.
    Ok(Outcome::Ok)
}
