//! `hone inspect`: what a results file holds.

use super::args::InspectArgs;
use super::Outcome;
use crate::element::{vtk_cell_type_name, ElementKind};
use crate::io::read_results;
use crate::report::thousands;
use anyhow::Result;
use serde_json::json;
use std::collections::BTreeMap;
use std::io::Write;

pub(super) fn run(args: &InspectArgs, json: bool) -> Result<Outcome> {
    let raw = read_results(&args.file)?;
    let file = args.file.display().to_string();
    let mut types: BTreeMap<u8, usize> = BTreeMap::new();
    for &t in &raw.types {
        *types.entry(t).or_default() += 1;
    }
    let mut lo = [f64::INFINITY; 3];
    let mut hi = [f64::NEG_INFINITY; 3];
    for p in &raw.points {
        for k in 0..3 {
            lo[k] = lo[k].min(p[k]);
            hi[k] = hi[k].max(p[k]);
        }
    }
    let any3d = types
        .keys()
        .any(|&t| ElementKind::from_vtk_id(t).is_some_and(|k| k.dim() == 3));
    let extent = (0..2)
        .map(|k| hi[k].abs().max(lo[k].abs()))
        .fold(0.0, f64::max);
    let planar = hi[2] - lo[2] <= 1e-9 * extent.max(f64::MIN_POSITIVE);
    let dimension = if any3d || !planar { 3 } else { 2 };
    let type_rows: Vec<(String, u8, usize, bool)> = types
        .iter()
        .map(|(&t, &n)| {
            let kind = ElementKind::from_vtk_id(t);
            (
                kind.map_or_else(
                    || vtk_cell_type_name(t).to_string(),
                    |k| k.name().to_string(),
                ),
                t,
                n,
                kind.is_some(),
            )
        })
        .collect();
    let stdout = std::io::stdout();
    let mut w = stdout.lock();
    if json {
        let arrays = |list: &[crate::io::DataArray]| {
            list.iter()
                .map(|a| json!({"name": a.name, "components": a.components, "type": a.scalar_type.vtk_name()}))
                .collect::<Vec<_>>()
        };
        let value = json!({
            "file": file,
            "points": raw.points.len(),
            "cells": raw.cell_count(),
            "cell_types": type_rows.iter().map(|(name, id, n, ok)| json!({"type": name, "vtk_id": id, "count": n, "supported": ok})).collect::<Vec<_>>(),
            "point_arrays": arrays(&raw.point_data),
            "cell_arrays": arrays(&raw.cell_data),
            "bounding_box": {"min": lo, "max": hi},
            "dimension": dimension,
        });
        serde_json::to_writer_pretty(&mut w, &value)?;
        writeln!(w)?;
        return Ok(Outcome::Ok);
    }
    writeln!(w, "hone inspect: {file}")?;
    writeln!(w, "  points      {}", thousands(raw.points.len()))?;
    writeln!(w, "  cells       {}", thousands(raw.cell_count()))?;
    for (name, id, n, ok) in &type_rows {
        let note = if *ok { "" } else { "  (not supported)" };
        writeln!(w, "    {name:<22} VTK {id:>2}  {:>12}{note}", thousands(*n))?;
    }
    writeln!(w, "  point arrays")?;
    for a in &raw.point_data {
        writeln!(
            w,
            "    {:<30} {}, {}",
            a.name,
            components(a.components),
            a.scalar_type.vtk_name()
        )?;
    }
    writeln!(w, "  cell arrays")?;
    for a in &raw.cell_data {
        writeln!(
            w,
            "    {:<30} {}, {}",
            a.name,
            components(a.components),
            a.scalar_type.vtk_name()
        )?;
    }
    writeln!(
        w,
        "  bounding box  min ({}, {}, {})  max ({}, {}, {})",
        lo[0], lo[1], lo[2], hi[0], hi[1], hi[2]
    )?;
    writeln!(
        w,
        "  dimension   {dimension}{}",
        if dimension == 2 {
            " (all points at one z: give --plane-stress, --plane-strain or --axisymmetric)"
        } else {
            ""
        }
    )?;
    Ok(Outcome::Ok)
}

/// "1 component", "3 components".
fn components(n: usize) -> String {
    if n == 1 {
        "1 component".into()
    } else {
        format!("{n} components")
    }
}
