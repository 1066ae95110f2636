//! Turns the raw material and mode flags into checked library options, once the mesh's
//! dimension is known. No silent default for the 2D mode.

use super::args::ModelArgs;
use crate::io::ModelOptions;
use crate::material::{AnalysisMode, Material, MaterialMap};
use anyhow::{bail, Context, Result};

/// Reading options for the io stage.
pub fn model_options(args: &ModelArgs) -> ModelOptions {
    ModelOptions {
        displacement_array: args.displacement_array.clone(),
        zone_array: args.zone_array.clone(),
        skip_unsupported: args.skip_unsupported,
    }
}

/// The analysis mode for a mesh of `dimension`, from the flags.
pub fn analysis_mode(args: &ModelArgs, dimension: usize, file: &str) -> Result<AnalysisMode> {
    let chosen = [
        (args.plane_stress, "--plane-stress"),
        (args.plane_strain, "--plane-strain"),
        (args.axisymmetric, "--axisymmetric"),
    ];
    let given: Vec<&str> = chosen
        .iter()
        .filter(|(on, _)| *on)
        .map(|(_, n)| *n)
        .collect();
    if dimension == 3 {
        if let Some(flag) = given.first() {
            bail!("{file}: {flag} is for 2D meshes, but this mesh is 3D (solid cells)");
        }
        if args.thickness.is_some() {
            bail!("{file}: --thickness is for 2D plane stress, but this mesh is 3D");
        }
        return Ok(AnalysisMode::Solid3d);
    }
    let mode = match given.as_slice() {
        [] => bail!(
            "{file}: the mesh is 2D (all points at one z); say how to analyse it with one of \
             --plane-stress [--thickness T], --plane-strain or --axisymmetric"
        ),
        ["--plane-stress"] => AnalysisMode::PlaneStress {
            thickness: args.thickness.unwrap_or(1.0),
        },
        [other] => {
            if args.thickness.is_some() {
                bail!("--thickness is for plane stress; {other} analyses per unit thickness or per full ring");
            }
            if *other == "--plane-strain" {
                AnalysisMode::PlaneStrain
            } else {
                AnalysisMode::Axisymmetric
            }
        }
        _ => bail!("choose one 2D mode, not {}", given.join(" and ")),
    };
    Ok(mode.validate()?)
}

/// The material map from `--youngs`/`--poisson` or `--materials`.
pub fn materials(args: &ModelArgs) -> Result<MaterialMap> {
    if let Some(path) = &args.materials {
        if args.youngs.is_some() || args.poisson.is_some() {
            bail!("give either --materials FILE or --youngs/--poisson, not both");
        }
        let name = path.display().to_string();
        let text = std::fs::read_to_string(path)
            .with_context(|| format!("cannot read the materials file {name}"))?;
        return Ok(MaterialMap::from_json(&text, &name)?);
    }
    match (args.youngs, args.poisson) {
        (Some(e), Some(nu)) => Ok(MaterialMap::Single(Material::new(e, nu, "")?)),
        (None, None) => bail!(
            "no material: give --youngs E --poisson NU, or --materials FILE with --zone-array NAME"
        ),
        (None, Some(_)) => bail!("--poisson given without --youngs: give both"),
        (Some(_), None) => bail!("--youngs given without --poisson: give both"),
    }
}

/// A one-line description of the materials for summaries.
pub fn describe(map: &MaterialMap) -> String {
    match map {
        MaterialMap::Single(m) => format!("E = {}, nu = {}", m.youngs, m.poisson),
        MaterialMap::ByZone(zones) => zones
            .iter()
            .map(|(z, m)| format!("zone {z}: E = {}, nu = {}", m.youngs, m.poisson))
            .collect::<Vec<_>>()
            .join("; "),
    }
}
