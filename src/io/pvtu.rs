//! Reading a parallel `.pvtu` file: its pieces are read in parallel and stitched into one grid.
//!
//! Stitching: ghost cells (cell array `vtkGhostType` with bit 1 set) are dropped; the points
//! used by the remaining cells are merged across pieces by a global point id array when the
//! pieces have one (see [`GLOBAL_ID_NAMES`]), otherwise by coordinates within
//! [`MERGE_TOLERANCE`] times the bounding-box diagonal. A merged point takes its point data from
//! the first piece that has it; cell data is concatenated; `vtkGhostType` arrays are removed.

use std::collections::HashMap;
use std::path::Path;

use quick_xml::events::Event;
use quick_xml::Reader;
use rayon::prelude::*;

use super::error::IoError;
use super::grid::{DataArray, RawGrid};
use super::read_vtu::read_vtu;
use super::xml::{attributes, get, parse_count, structure};

/// Names of point arrays holding global point ids (compared case-insensitively).
pub const GLOBAL_ID_NAMES: [&str; 4] = ["GlobalNodeId", "GlobalPointIds", "global_id", "GlobalIds"];

/// Relative tolerance for merging points by coordinates (times the bounding-box diagonal).
pub const MERGE_TOLERANCE: f64 = 1e-9;

/// Name of VTK's ghost flag arrays.
const GHOST: &str = "vtkGhostType";

/// What the `.pvtu` declares.
struct Declaration {
    sources: Vec<String>,
    point_arrays: Vec<(String, usize)>,
    cell_arrays: Vec<(String, usize)>,
}

fn parse_pvtu(bytes: &[u8], file: &str) -> Result<Declaration, IoError> {
    let mut reader = Reader::from_reader(bytes);
    let mut decl = Declaration {
        sources: Vec::new(),
        point_arrays: Vec::new(),
        cell_arrays: Vec::new(),
    };
    let mut seen_root = false;
    let mut section = "";
    loop {
        let event = reader.read_event().map_err(|e| IoError::Xml {
            file: file.to_string(),
            position: reader.error_position(),
            message: e.to_string(),
        })?;
        let (e, empty) = match event {
            Event::Start(e) => (e, false),
            Event::Empty(e) => (e, true),
            Event::End(e) => {
                if matches!(e.name().as_ref(), "PPointData" | "PCellData") {
                    section = "";
                }
                continue;
            }
            Event::Eof => break,
            _ => continue,
        };
        let attrs = attributes(&e, file, &reader)?;
        match e.name().as_ref() {
            "VTKFile" => {
                seen_root = true;
                if get(&attrs, "type") != Some("PUnstructuredGrid") {
                    return Err(structure(
                        file,
                        format!("VTKFile type=\"{}\"", get(&attrs, "type").unwrap_or("")),
                        "type=\"PUnstructuredGrid\"",
                    ));
                }
            }
            "PPointData" if !empty => section = "point",
            "PCellData" if !empty => section = "cell",
            "PDataArray" if !section.is_empty() => {
                let name = get(&attrs, "Name").unwrap_or("").to_string();
                let comps =
                    parse_count(file, "PDataArray", &attrs, "NumberOfComponents")?.unwrap_or(1);
                let list = if section == "point" {
                    &mut decl.point_arrays
                } else {
                    &mut decl.cell_arrays
                };
                if name != GHOST {
                    list.push((name, comps as usize));
                }
            }
            "Piece" => match get(&attrs, "Source") {
                Some(s) => decl.sources.push(s.to_string()),
                None => {
                    return Err(structure(
                        file,
                        "a <Piece> without Source",
                        "<Piece Source=\"piece.vtu\"/>",
                    ))
                }
            },
            _ => {}
        }
    }
    if !seen_root {
        return Err(structure(
            file,
            "no <VTKFile> element",
            "<VTKFile type=\"PUnstructuredGrid\">",
        ));
    }
    if decl.sources.is_empty() {
        return Err(structure(
            file,
            "no <Piece Source=..> element",
            "at least one piece",
        ));
    }
    Ok(decl)
}

/// Reads a `.pvtu` file and its pieces (resolved relative to the `.pvtu`'s directory, read in
/// parallel) and stitches them into one grid.
pub fn read_pvtu(path: &Path) -> Result<RawGrid, IoError> {
    let file = path.display().to_string();
    let bytes = std::fs::read(path).map_err(|source| IoError::Io {
        path: file.clone(),
        source,
    })?;
    let decl = parse_pvtu(&bytes, &file)?;
    let dir = path.parent().unwrap_or(Path::new(""));
    let pieces: Vec<RawGrid> = decl
        .sources
        .par_iter()
        .map(|s| {
            let p = dir.join(s);
            if !p.is_file() {
                return Err(IoError::PieceMismatch {
                    file: file.clone(),
                    piece: s.clone(),
                    found: format!("is missing (no file at {})", p.display()),
                    expected: "every piece listed in the .pvtu to exist".to_string(),
                });
            }
            read_vtu(&p)
        })
        .collect::<Result<_, _>>()?;
    check_arrays(&file, &decl, &pieces)?;
    stitch(&file, &decl.sources, pieces)
}

fn array_list(arrays: &[DataArray]) -> Vec<(String, usize)> {
    arrays
        .iter()
        .filter(|a| a.name != GHOST)
        .map(|a| (a.name.clone(), a.components))
        .collect()
}

fn show(list: &[(String, usize)]) -> String {
    let items: Vec<String> = list.iter().map(|(n, c)| format!("'{n}' ({c})")).collect();
    format!("[{}]", items.join(", "))
}

/// Every piece must carry the same arrays as the first, and every declared array.
fn check_arrays(file: &str, decl: &Declaration, pieces: &[RawGrid]) -> Result<(), IoError> {
    let first_points = array_list(&pieces[0].point_data);
    let first_cells = array_list(&pieces[0].cell_data);
    for (k, p) in pieces.iter().enumerate() {
        for (kind, have, want, declared) in [
            (
                "point",
                array_list(&p.point_data),
                &first_points,
                &decl.point_arrays,
            ),
            (
                "cell",
                array_list(&p.cell_data),
                &first_cells,
                &decl.cell_arrays,
            ),
        ] {
            let mismatch = |expected: String| IoError::PieceMismatch {
                file: file.to_string(),
                piece: decl.sources[k].clone(),
                found: format!("has {kind} arrays {} (name (components))", show(&have)),
                expected,
            };
            if &have != want {
                return Err(mismatch(format!(
                    "the {kind} arrays of the first piece: {}",
                    show(want)
                )));
            }
            if let Some(missing) = declared.iter().find(|d| !have.contains(d)) {
                return Err(mismatch(format!(
                    "the declared {kind} array '{}' with {} components",
                    missing.0, missing.1
                )));
            }
        }
    }
    Ok(())
}

/// How points of different pieces are recognised as the same point.
enum Keys {
    /// By global id (the array's values, per piece).
    Ids(Vec<Vec<i64>>),
    /// By coordinates within this absolute tolerance.
    Coords(f64),
}

fn global_ids(
    file: &str,
    sources: &[String],
    pieces: &[RawGrid],
) -> Result<Option<Vec<Vec<i64>>>, IoError> {
    let Some(name) = pieces[0]
        .point_data
        .iter()
        .find(|a| {
            a.components == 1
                && GLOBAL_ID_NAMES
                    .iter()
                    .any(|g| g.eq_ignore_ascii_case(&a.name))
        })
        .map(|a| a.name.clone())
    else {
        return Ok(None);
    };
    let mut all = Vec::with_capacity(pieces.len());
    for (k, p) in pieces.iter().enumerate() {
        let Some(arr) = p.point_array(&name) else {
            return Ok(None);
        };
        let mut ids = Vec::with_capacity(arr.values.len());
        for (i, &v) in arr.values.iter().enumerate() {
            if v.fract() != 0.0 || !v.is_finite() {
                return Err(IoError::BadValue {
                    file: sources[k].clone(),
                    array: format!("array '{name}' (PointData)"),
                    index: i as u64,
                    found: v.to_string(),
                    expected: format!("an integer global point id (listed in {file})"),
                });
            }
            ids.push(v as i64);
        }
        all.push(ids);
    }
    Ok(Some(all))
}

/// Spatial hash of merged points for coordinate matching.
struct PointHash {
    cell: f64,
    tol: f64,
    heads: HashMap<[i64; 3], u32>,
    next: Vec<u32>,
}

const NONE: u32 = u32::MAX;

impl PointHash {
    fn key(&self, p: &[f64; 3]) -> [i64; 3] {
        [
            (p[0] / self.cell).floor() as i64,
            (p[1] / self.cell).floor() as i64,
            (p[2] / self.cell).floor() as i64,
        ]
    }

    fn find(&self, p: &[f64; 3], points: &[[f64; 3]]) -> Option<u32> {
        let k = self.key(p);
        for dx in -1..=1i64 {
            for dy in -1..=1i64 {
                for dz in -1..=1i64 {
                    let kk = [
                        k[0].saturating_add(dx),
                        k[1].saturating_add(dy),
                        k[2].saturating_add(dz),
                    ];
                    let mut at = self.heads.get(&kk).copied().unwrap_or(NONE);
                    while at != NONE {
                        let q = &points[at as usize];
                        let d2 = (0..3).map(|i| (q[i] - p[i]) * (q[i] - p[i])).sum::<f64>();
                        if d2 <= self.tol * self.tol {
                            return Some(at);
                        }
                        at = self.next[at as usize];
                    }
                }
            }
        }
        None
    }

    fn insert(&mut self, p: &[f64; 3], index: u32) {
        let k = self.key(p);
        let head = self.heads.insert(k, index).unwrap_or(NONE);
        self.next.push(head);
    }
}

/// Stitches pieces: drops ghost cells, merges shared points, concatenates cell data.
fn stitch(file: &str, sources: &[String], pieces: Vec<RawGrid>) -> Result<RawGrid, IoError> {
    // Kept cells and used points of each piece.
    let kept: Vec<Vec<bool>> = pieces
        .iter()
        .map(|p| {
            let ghost = p.cell_array(GHOST);
            (0..p.cell_count())
                .map(|c| ghost.is_none_or(|g| (g.values[c * g.components] as u64) & 1 == 0))
                .collect()
        })
        .collect();
    let used: Vec<Vec<bool>> = pieces
        .iter()
        .zip(&kept)
        .map(|(p, k)| {
            let mut u = vec![false; p.points.len()];
            for c in (0..p.cell_count()).filter(|&c| k[c]) {
                for &i in p.cell_nodes(c) {
                    u[i as usize] = true;
                }
            }
            u
        })
        .collect();
    let keys = match global_ids(file, sources, &pieces)? {
        Some(ids) => Keys::Ids(ids),
        None => {
            let mut lo = [f64::INFINITY; 3];
            let mut hi = [f64::NEG_INFINITY; 3];
            for (p, u) in pieces.iter().zip(&used) {
                for (q, _) in p.points.iter().zip(u).filter(|(_, &u)| u) {
                    for i in 0..3 {
                        lo[i] = lo[i].min(q[i]);
                        hi[i] = hi[i].max(q[i]);
                    }
                }
            }
            let diag = (0..3).map(|i| (hi[i] - lo[i]).powi(2)).sum::<f64>().sqrt();
            Keys::Coords(if diag.is_finite() {
                MERGE_TOLERANCE * diag
            } else {
                0.0
            })
        }
    };
    let mut out = RawGrid {
        point_data: without_ghost(&pieces[0].point_data),
        cell_data: without_ghost(&pieces[0].cell_data),
        ..RawGrid::default()
    };
    let mut by_id: HashMap<i64, u32> = HashMap::new();
    let mut hash = match keys {
        Keys::Coords(tol) => Some(PointHash {
            cell: if tol > 0.0 { tol } else { 1.0 },
            tol,
            heads: HashMap::new(),
            next: Vec::new(),
        }),
        Keys::Ids(_) => None,
    };
    for (k, p) in pieces.iter().enumerate() {
        // The piece's arrays in the order of the output's (check_arrays made them match).
        let pdata: Vec<&DataArray> = p.point_data.iter().filter(|a| a.name != GHOST).collect();
        let cdata: Vec<&DataArray> = p.cell_data.iter().filter(|a| a.name != GHOST).collect();
        let mut map = vec![NONE; p.points.len()];
        for (i, q) in p.points.iter().enumerate().filter(|(i, _)| used[k][*i]) {
            let found = match (&keys, &hash) {
                (Keys::Ids(ids), _) => by_id.get(&ids[k][i]).copied(),
                (_, Some(h)) => h.find(q, &out.points),
                _ => None,
            };
            map[i] = match found {
                Some(j) => j,
                None => {
                    let j = u32::try_from(out.points.len())
                        .ok()
                        .filter(|&j| j != NONE)
                        .ok_or_else(|| {
                            structure(
                                file,
                                "more than 4294967295 points in the merged grid",
                                "point ids that fit in 32 bits",
                            )
                        })?;
                    out.points.push(*q);
                    match (&keys, &mut hash) {
                        (Keys::Ids(ids), _) => {
                            by_id.insert(ids[k][i], j);
                        }
                        (_, Some(h)) => h.insert(q, j),
                        _ => {}
                    }
                    for (dst, src) in out.point_data.iter_mut().zip(&pdata) {
                        dst.values.extend_from_slice(src.tuple(i));
                    }
                    j
                }
            };
        }
        for c in (0..p.cell_count()).filter(|&c| kept[k][c]) {
            out.connectivity
                .extend(p.cell_nodes(c).iter().map(|&i| map[i as usize]));
            out.offsets.push(out.connectivity.len() as u64);
            out.types.push(p.types[c]);
            for (dst, src) in out.cell_data.iter_mut().zip(&cdata) {
                dst.values.extend_from_slice(src.tuple(c));
            }
        }
    }
    Ok(out)
}

fn without_ghost(arrays: &[DataArray]) -> Vec<DataArray> {
    arrays
        .iter()
        .filter(|a| a.name != GHOST)
        .map(|a| DataArray {
            name: a.name.clone(),
            components: a.components,
            scalar_type: a.scalar_type,
            values: Vec::new(),
        })
        .collect()
}
