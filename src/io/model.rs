//! From a results file as read ([`RawGrid`]) to the [`Model`] hone computes on: cells grouped by
//! kind, the analysis dimension, zones, and the displacement field, each checked with a message
//! that names the file, the array or cell, what was found and what was expected.

use super::{DataArray, RawGrid};
use crate::element::{vtk_cell_type_name, ElementKind};
use crate::mesh::{orient_wedges, CellBlock, Mesh, Model};
use std::collections::BTreeMap;
use thiserror::Error;

/// Names searched (case-insensitively) for the displacement point array when none is given.
pub const USUAL_DISPLACEMENT_NAMES: [&str; 4] = ["displacement", "displacements", "disp", "u"];

/// How to turn a file into a model.
#[derive(Clone, Debug, Default)]
pub struct ModelOptions {
    /// Name of the displacement point array; `None` searches the usual names.
    pub displacement_array: Option<String>,
    /// Name of an integer cell array giving each cell's zone; `None` puts every cell in zone 0.
    pub zone_array: Option<String>,
    /// Leave cells of unsupported types out instead of failing.
    pub skip_unsupported: bool,
}

/// What building the model decided, for the summary.
#[derive(Clone, Debug, Default)]
pub struct ModelNotes {
    /// Cells left out because of `skip_unsupported`: (VTK type id, count).
    pub skipped: Vec<(u8, usize)>,
    /// The displacement array used.
    pub displacement_array: String,
    /// Wedge cells written with the other corner handedness and reordered.
    pub reoriented_wedges: usize,
}

/// Why a results file cannot be used as a model.
#[derive(Debug, Error)]
pub enum ModelError {
    /// Cells of types hone has no element for.
    #[error("{file}: {list} not supported (hone handles tri3, tri6, quad4, quad8, quad9, tet4, tet10, hex8, hex20, hex27, wedge6, wedge15); use --skip-unsupported to estimate on the other cells")]
    UnsupportedCells {
        /// File name.
        file: String,
        /// Readable list of the unsupported types with counts.
        list: String,
    },
    /// A cell whose point count does not match its type.
    #[error(
        "{file}: cell {cell} is a {kind} (VTK type {vtk}) with {found} points, expected {expected}"
    )]
    CellSize {
        /// File name.
        file: String,
        /// Cell index in the file.
        cell: usize,
        /// Element kind the type id names.
        kind: &'static str,
        /// VTK type id.
        vtk: u8,
        /// What the file has.
        found: usize,
        /// What the type needs.
        expected: usize,
    },
    /// Nothing left to compute on.
    #[error("{file}: no cells to estimate on ({total} cells in the file)")]
    NoCells {
        /// File name.
        file: String,
        /// Cells in the file.
        total: usize,
    },
    /// 2D and 3D cells in one file.
    #[error("{file}: the file mixes {two_d} 2D cells with {three_d} 3D cells; boundary faces exported with a solid mesh can be left out with --skip-unsupported")]
    MixedDimension {
        /// File name.
        file: String,
        /// Number of 2D cells.
        two_d: usize,
        /// Number of 3D cells.
        three_d: usize,
    },
    /// 2D cells not lying in a plane z = const.
    #[error("{file}: 2D cells span z from {z_min} to {z_max}; hone needs 2D meshes in a plane z = constant (shell and membrane results are not supported)")]
    NotPlanar {
        /// File name.
        file: String,
        /// Smallest z of the 2D cells.
        z_min: f64,
        /// Largest z of the 2D cells.
        z_max: f64,
    },
    /// No displacement array.
    #[error("{file}: {wanted}; the file's point arrays are: {available}. Name the right one with --displacement-array")]
    MissingDisplacement {
        /// File name.
        file: String,
        /// What was looked for.
        wanted: String,
        /// The point arrays the file has.
        available: String,
    },
    /// Displacement array of the wrong shape.
    #[error("{file}: point array '{array}' has {found} components, expected {expected} for a displacement")]
    DisplacementComponents {
        /// File name.
        file: String,
        /// The array name.
        array: String,
        /// What the file has.
        found: usize,
        /// Component counts allowed.
        expected: &'static str,
    },
    /// NaN or infinite displacement.
    #[error("{file}: point array '{array}' has a non-finite value ({value}) at point {point}")]
    NonFiniteDisplacement {
        /// File name.
        file: String,
        /// The array name.
        array: String,
        /// Point index.
        point: usize,
        /// The offending value.
        value: f64,
    },
    /// Zone array missing or malformed.
    #[error("{file}: {message}")]
    Zone {
        /// File name.
        file: String,
        /// What is wrong.
        message: String,
    },
}

/// Builds the model, grouping cells by kind in order of first appearance.
pub fn build_model(
    raw: &RawGrid,
    file: &str,
    options: &ModelOptions,
) -> Result<(Model, ModelNotes), ModelError> {
    let mut notes = ModelNotes::default();
    let total = raw.cell_count();
    let mut unsupported: BTreeMap<u8, usize> = BTreeMap::new();
    let mut kinds: Vec<Option<ElementKind>> = Vec::with_capacity(total);
    let (mut n2, mut n3) = (0usize, 0usize);
    for (c, &t) in raw.types.iter().enumerate() {
        let kind = ElementKind::from_vtk_id(t);
        match kind {
            Some(k) => {
                let found = raw.cell_nodes(c).len();
                if found != k.node_count() {
                    return Err(ModelError::CellSize {
                        file: file.into(),
                        cell: c,
                        kind: k.name(),
                        vtk: t,
                        found,
                        expected: k.node_count(),
                    });
                }
                if k.dim() == 2 {
                    n2 += 1
                } else {
                    n3 += 1
                }
            }
            None => *unsupported.entry(t).or_default() += 1,
        }
        kinds.push(kind);
    }
    let mut dimension = if n3 > 0 { 3 } else { 2 };
    if n2 > 0 && n3 > 0 {
        if !options.skip_unsupported {
            return Err(ModelError::MixedDimension {
                file: file.into(),
                two_d: n2,
                three_d: n3,
            });
        }
        // Surface cells of a solid model: left out like unsupported types.
        for (c, k) in kinds.iter_mut().enumerate() {
            if k.is_some_and(|k| k.dim() == 2) {
                *unsupported.entry(raw.types[c]).or_default() += 1;
                *k = None;
            }
        }
        dimension = 3;
    }
    if !unsupported.is_empty() {
        if !options.skip_unsupported {
            let list = unsupported
                .iter()
                .map(|(t, n)| format!("{n} cells of type {} (VTK {t})", vtk_cell_type_name(*t)))
                .collect::<Vec<_>>()
                .join(", ");
            let list = if unsupported.len() == 1 && unsupported.values().sum::<usize>() == 1 {
                format!("{list} is")
            } else {
                format!("{list} are")
            };
            return Err(ModelError::UnsupportedCells {
                file: file.into(),
                list,
            });
        }
        notes.skipped = unsupported.into_iter().collect();
    }
    let zones = zone_values(raw, file, options)?;
    let mut order: Vec<ElementKind> = Vec::new();
    for k in kinds.iter().flatten() {
        if !order.contains(k) {
            order.push(*k);
        }
    }
    let mut blocks = Vec::new();
    let mut file_cell = Vec::new();
    let mut zone = Vec::new();
    for kind in order {
        let first_element = file_cell.len();
        let mut nodes = Vec::new();
        for (c, k) in kinds.iter().enumerate() {
            if *k == Some(kind) {
                nodes.extend_from_slice(raw.cell_nodes(c));
                file_cell.push(c as u32);
                zone.push(zones.as_ref().map_or(0, |z| z[c]));
            }
        }
        blocks.push(CellBlock {
            kind,
            nodes,
            first_element,
        });
    }
    if file_cell.is_empty() {
        return Err(ModelError::NoCells {
            file: file.into(),
            total,
        });
    }
    if dimension == 2 {
        check_planar(raw, &blocks, file)?;
    }
    let (name, displacement) = displacement_field(raw, file, options, dimension)?;
    notes.displacement_array = name;
    let mut mesh = Mesh {
        points: raw.points.clone(),
        blocks,
        file_cell,
        zone,
        dimension,
    };
    notes.reoriented_wedges = orient_wedges(&mut mesh);
    Ok((Model { mesh, displacement }, notes))
}

fn check_planar(raw: &RawGrid, blocks: &[CellBlock], file: &str) -> Result<(), ModelError> {
    let mut lo = f64::INFINITY;
    let mut hi = f64::NEG_INFINITY;
    let mut extent: f64 = 0.0;
    for b in blocks {
        for &n in &b.nodes {
            let p = raw.points[n as usize];
            lo = lo.min(p[2]);
            hi = hi.max(p[2]);
            extent = extent.max(p[0].abs()).max(p[1].abs());
        }
    }
    // Relative tolerance 1e-9 of the in-plane extent: round-off of exported coordinates.
    if hi - lo > 1e-9 * extent.max(f64::MIN_POSITIVE) {
        return Err(ModelError::NotPlanar {
            file: file.into(),
            z_min: lo,
            z_max: hi,
        });
    }
    Ok(())
}

fn zone_values(
    raw: &RawGrid,
    file: &str,
    options: &ModelOptions,
) -> Result<Option<Vec<i64>>, ModelError> {
    let Some(name) = &options.zone_array else {
        return Ok(None);
    };
    let fail = |message: String| ModelError::Zone {
        file: file.into(),
        message,
    };
    let array = raw.cell_array(name).ok_or_else(|| {
        let names: Vec<&str> = raw.cell_data.iter().map(|a| a.name.as_str()).collect();
        fail(format!(
            "no cell array '{name}' for zones; the file's cell arrays are: {}",
            if names.is_empty() {
                "(none)".to_string()
            } else {
                names.join(", ")
            }
        ))
    })?;
    if array.components != 1 {
        return Err(fail(format!(
            "cell array '{name}' has {} components, expected 1 (a zone id per cell)",
            array.components
        )));
    }
    array
        .values
        .iter()
        .enumerate()
        .map(|(c, &v)| {
            if v.is_finite() && v.fract() == 0.0 && v.abs() < 9.0e15 {
                Ok(v as i64)
            } else {
                Err(fail(format!(
                    "cell array '{name}' has value {v} at cell {c}, expected an integer zone id"
                )))
            }
        })
        .collect::<Result<Vec<_>, _>>()
        .map(Some)
}

fn find_displacement<'a>(raw: &'a RawGrid, options: &ModelOptions) -> Option<&'a DataArray> {
    match &options.displacement_array {
        Some(name) => raw.point_array(name).or_else(|| {
            raw.point_data
                .iter()
                .find(|a| a.name.eq_ignore_ascii_case(name))
        }),
        None => USUAL_DISPLACEMENT_NAMES.iter().find_map(|want| {
            raw.point_data
                .iter()
                .find(|a| a.name.eq_ignore_ascii_case(want))
        }),
    }
}

fn displacement_field(
    raw: &RawGrid,
    file: &str,
    options: &ModelOptions,
    dimension: usize,
) -> Result<(String, Vec<[f64; 3]>), ModelError> {
    let Some(array) = find_displacement(raw, options) else {
        let available: Vec<String> = raw
            .point_data
            .iter()
            .map(|a| format!("'{}' ({} components)", a.name, a.components))
            .collect();
        let wanted = match &options.displacement_array {
            Some(n) => format!("no point array named '{n}'"),
            None => format!(
                "no displacement point array (looked for {})",
                USUAL_DISPLACEMENT_NAMES.join(", ")
            ),
        };
        return Err(ModelError::MissingDisplacement {
            file: file.into(),
            wanted,
            available: if available.is_empty() {
                "(none)".into()
            } else {
                available.join(", ")
            },
        });
    };
    let comps = array.components;
    let ok = if dimension == 3 {
        comps == 3
    } else {
        comps == 2 || comps == 3
    };
    if !ok {
        return Err(ModelError::DisplacementComponents {
            file: file.into(),
            array: array.name.clone(),
            found: comps,
            expected: if dimension == 3 { "3" } else { "2 or 3" },
        });
    }
    let mut out = Vec::with_capacity(raw.points.len());
    for (p, tuple) in array.values.chunks_exact(comps).enumerate() {
        let mut u = [0.0; 3];
        for (d, &v) in tuple.iter().enumerate().take(dimension) {
            if !v.is_finite() {
                return Err(ModelError::NonFiniteDisplacement {
                    file: file.into(),
                    array: array.name.clone(),
                    point: p,
                    value: v,
                });
            }
            u[d] = v;
        }
        out.push(u);
    }
    Ok((array.name.clone(), out))
}
