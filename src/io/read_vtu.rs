//! Reading a serial `.vtu` file into a [`RawGrid`].

use std::path::Path;

use rayon::prelude::*;

use super::ascii::parse_ascii;
use super::decl::{ArrayDecl, Document, PieceDecl, Storage};
use super::error::{human_bytes, IoError};
use super::grid::{DataArray, RawGrid};
use super::payload::{binary_bytes, Ctx, ZLIB_MAX_RATIO};
use super::scalar::{convert, value_text, ScalarType, Target};
use super::xml::{parse_document, structure};

/// Reads a `.vtu` file. The file is memory-mapped, and raw appended arrays are converted
/// straight from the map; it must not be modified by another process while it is read.
pub fn read_vtu(path: &Path) -> Result<RawGrid, IoError> {
    with_mapped_file(path, read_vtu_bytes)
}

/// Memory-maps `path` and hands its bytes and its displayed name to `read` (an empty file is
/// passed as an empty slice: it cannot be mapped). The caller documents that the file must not
/// be modified while it is read.
pub(crate) fn with_mapped_file<T>(
    path: &Path,
    read: impl FnOnce(&[u8], &str) -> Result<T, IoError>,
) -> Result<T, IoError> {
    let name = path.display().to_string();
    let io = |source| IoError::Io {
        path: name.clone(),
        source,
    };
    let file = std::fs::File::open(path).map_err(io)?;
    let len = file.metadata().map_err(io)?.len();
    if len == 0 {
        return read(&[], &name);
    }
    // SAFETY: the map is only read, and lives until `read` returns; the caller must not truncate
    // the file meanwhile (documented on the public readers).
    let map = unsafe { memmap2::Mmap::map(&file) }.map_err(io)?;
    read(&map, &name)
}

/// Reads a `.vtu` file held in memory; `source_name` names it in error messages.
pub fn read_vtu_bytes(bytes: &[u8], source_name: &str) -> Result<RawGrid, IoError> {
    let doc = parse_document(bytes, source_name)?;
    let ctx = Ctx {
        file: source_name,
        header: doc.header.header,
        order: doc.header.order,
        compressed: doc.header.compressed,
        file_len: bytes.len() as u64,
    };
    for piece in &doc.pieces {
        check_counts(&ctx, piece)?;
    }
    let pieces: Vec<RawGrid> = doc
        .pieces
        .par_iter()
        .map(|p| decode_piece(&ctx, &doc, p))
        .collect::<Result<_, _>>()?;
    concat_pieces(source_name, &doc, pieces)
}

/// Refuses piece counts that could not fit in the file, before anything is allocated.
fn check_counts(ctx: &Ctx, piece: &PieceDecl) -> Result<(), IoError> {
    // Fewest bytes a point (3 values) and a cell (an offset and a type) can take in the file:
    // ascii "0 " per value, or 4-byte floats / 1-byte integers shrunk by zlib's best ratio.
    let ratio = if ctx.compressed {
        ZLIB_MAX_RATIO as f64
    } else {
        1.0
    };
    let per_point = if ctx.compressed { 12.0 / ratio } else { 6.0 };
    let per_cell = if ctx.compressed { 2.0 / ratio } else { 2.0 };
    for (what, n, per) in [
        ("NumberOfPoints", piece.n_points, per_point),
        ("NumberOfCells", piece.n_cells, per_cell),
    ] {
        let need = n as f64 * per;
        if need > ctx.file_len as f64 {
            return Err(IoError::TooLarge {
                file: ctx.file.to_string(),
                what: what.to_string(),
                count: n,
                needed: format!("at least {}", human_bytes(need)),
                size: human_bytes(ctx.file_len as f64),
            });
        }
    }
    Ok(())
}

/// Decodes one array into values of `T`, checking the value count when it is known.
/// `expected` is (count, explanation).
fn decode_values<T: Target>(
    ctx: &Ctx,
    doc: &Document,
    decl: &ArrayDecl,
    st: ScalarType,
    expected: Option<(u64, String)>,
) -> Result<Vec<T>, IoError> {
    let array = decl.describe(doc.pieces.len());
    let length_error = |found: String| IoError::ArrayLength {
        file: ctx.file.to_string(),
        array: array.clone(),
        found,
        expected: expected
            .as_ref()
            .map(|(n, why)| format!("{n} {why}"))
            .unwrap_or_default(),
    };
    if let Storage::Ascii(text) = &decl.storage {
        let values = parse_ascii::<T>(text, st, expected.as_ref().map(|e| e.0), ctx.file, &array)?;
        if let Some((n, _)) = &expected {
            if values.len() as u64 != *n {
                return Err(length_error(format!("{} values", values.len())));
            }
        }
        return Ok(values);
    }
    let bytes = binary_bytes(ctx, doc, &decl.storage, &array)?;
    let size = st.size();
    if bytes.len() % size != 0 {
        return Err(IoError::ArrayLength {
            file: ctx.file.to_string(),
            array,
            found: format!("{} bytes", bytes.len()),
            expected: format!("a multiple of {size} (the size of {})", st.vtk_name()),
        });
    }
    let count = bytes.len() / size;
    if let Some((n, _)) = &expected {
        if count as u64 != *n {
            return Err(length_error(format!("{count} values")));
        }
    }
    let mut out = vec![T::default(); count];
    convert(&bytes, st, ctx.order, &mut out).map_err(|i| IoError::BadValue {
        file: ctx.file.to_string(),
        array: array.clone(),
        index: i as u64,
        found: value_text(&bytes, st, ctx.order, i),
        expected: T::expected().to_string(),
    })?;
    Ok(out)
}

/// The scalar type of a declaration, or a clear error.
fn scalar_type(
    ctx: &Ctx,
    doc: &Document,
    decl: &ArrayDecl,
    integer: bool,
) -> Result<ScalarType, IoError> {
    let array = decl.describe(doc.pieces.len());
    match ScalarType::from_vtk_name(&decl.type_name) {
        Some(st) if integer && !st.is_integer() => Err(structure(
            ctx.file,
            format!("{array} has type {}", st.vtk_name()),
            "an integer type",
        )),
        Some(st) => Ok(st),
        None => Err(structure(
            ctx.file,
            format!("{array} has type '{}'", decl.type_name),
            "one of Int8, UInt8, Int16, UInt16, Int32, UInt32, Int64, UInt64, Float32, Float64",
        )),
    }
}

/// Decodes a named data array with one tuple per point or cell.
fn decode_data_array(
    ctx: &Ctx,
    doc: &Document,
    decl: &ArrayDecl,
    tuples: u64,
    per: &str,
) -> Result<DataArray, IoError> {
    let st = scalar_type(ctx, doc, decl, false)?;
    let comps = decl.components as u64;
    let expected = tuples.checked_mul(comps).ok_or_else(|| {
        structure(
            ctx.file,
            format!(
                "{} with {comps} components",
                decl.describe(doc.pieces.len())
            ),
            "a size that fits in 64 bits",
        )
    })?;
    let why = format!("({tuples} {per} x {comps} components)");
    let values = decode_values::<f64>(ctx, doc, decl, st, Some((expected, why)))?;
    Ok(DataArray {
        name: decl.name.clone(),
        components: decl.components,
        scalar_type: st,
        values,
    })
}

fn missing(ctx: &Ctx, piece: &PieceDecl, what: &str, expected: &str) -> IoError {
    structure(
        ctx.file,
        format!(
            "a <Piece> with {} points and {} cells has no {what}",
            piece.n_points, piece.n_cells
        ),
        expected,
    )
}

/// Decodes and checks one piece (point ids local to the piece).
fn decode_piece(ctx: &Ctx, doc: &Document, piece: &PieceDecl) -> Result<RawGrid, IoError> {
    let np = piece.n_points;
    let nc = piece.n_cells;
    let points = match &piece.points {
        None if np == 0 => Vec::new(),
        None => {
            return Err(missing(
                ctx,
                piece,
                "<Points> DataArray",
                "a <Points> element holding a 3-component DataArray",
            ))
        }
        Some(decl) => {
            if decl.components != 3 {
                return Err(structure(
                    ctx.file,
                    format!(
                        "{} with {} components",
                        decl.describe(doc.pieces.len()),
                        decl.components
                    ),
                    "NumberOfComponents=\"3\"",
                ));
            }
            let st = scalar_type(ctx, doc, decl, false)?;
            let why = format!("({np} points x 3 components)");
            let flat = decode_values::<f64>(ctx, doc, decl, st, Some((np * 3, why)))?;
            // Reinterpret in place when the capacity allows it (always for binary data).
            match bytemuck::allocation::try_cast_vec::<f64, [f64; 3]>(flat) {
                Ok(points) => points,
                Err((_, flat)) => flat.chunks_exact(3).map(|c| [c[0], c[1], c[2]]).collect(),
            }
        }
    };
    let (connectivity, offsets, types) = match (&piece.connectivity, &piece.offsets, &piece.types) {
        (None, None, None) if nc == 0 => (Vec::new(), Vec::new(), Vec::new()),
        (Some(c), Some(o), Some(t)) => {
            let why = format!("({nc} cells)");
            let (cst, ost, tst) = (
                scalar_type(ctx, doc, c, true)?,
                scalar_type(ctx, doc, o, true)?,
                scalar_type(ctx, doc, t, true)?,
            );
            let ((conn, offs), types) = rayon::join(
                || {
                    rayon::join(
                        || decode_values::<u32>(ctx, doc, c, cst, None),
                        || decode_values::<u64>(ctx, doc, o, ost, Some((nc, why.clone()))),
                    )
                },
                || decode_values::<u8>(ctx, doc, t, tst, Some((nc, why.clone()))),
            );
            (conn?, offs?, types?)
        }
        _ => {
            return Err(missing(
                ctx,
                piece,
                "complete <Cells> (connectivity, offsets and types)",
                "DataArrays named connectivity, offsets and types inside <Cells>",
            ))
        }
    };
    check_cells(ctx, &connectivity, &offsets, points.len() as u64, 0)?;
    let point_data = piece
        .point_data
        .par_iter()
        .map(|d| decode_data_array(ctx, doc, d, np, "points"))
        .collect::<Result<Vec<_>, _>>()?;
    let cell_data = piece
        .cell_data
        .par_iter()
        .map(|d| decode_data_array(ctx, doc, d, nc, "cells"))
        .collect::<Result<Vec<_>, _>>()?;
    Ok(RawGrid {
        points,
        connectivity,
        offsets,
        types,
        point_data,
        cell_data,
    })
}

/// Checks offsets (non-decreasing, last == connectivity length) and point ids (< `n_points`).
/// `first_cell` numbers the cells in messages.
pub(crate) fn check_cells(
    ctx: &Ctx,
    connectivity: &[u32],
    offsets: &[u64],
    n_points: u64,
    first_cell: u64,
) -> Result<(), IoError> {
    let bad_offset = |cell: usize, found: u64, expected: String| IoError::BadOffsets {
        file: ctx.file.to_string(),
        cell: first_cell + cell as u64,
        found,
        expected,
    };
    let mut prev = 0u64;
    for (c, &o) in offsets.iter().enumerate() {
        if o < prev {
            return Err(bad_offset(
                c,
                o,
                format!("at least {prev} (offsets must not decrease)"),
            ));
        }
        prev = o;
    }
    if prev != connectivity.len() as u64 {
        return Err(match offsets.len() {
            0 => IoError::ArrayLength {
                file: ctx.file.to_string(),
                array: "array 'connectivity' (Cells)".to_string(),
                found: format!("{} values", connectivity.len()),
                expected: "0 (the piece has no cells)".to_string(),
            },
            n => bad_offset(
                n - 1,
                prev,
                format!(
                    "{} (the length of connectivity) for the last cell",
                    connectivity.len()
                ),
            ),
        });
    }
    const CHUNK: usize = 1 << 16;
    let first_bad = connectivity
        .par_chunks(CHUNK)
        .enumerate()
        .filter_map(|(k, ids)| {
            ids.iter()
                .position(|&id| id as u64 >= n_points)
                .map(|i| k * CHUNK + i)
        })
        .min();
    if let Some(pos) = first_bad {
        let cell = offsets.partition_point(|&o| o <= pos as u64);
        return Err(IoError::PointOutOfRange {
            file: ctx.file.to_string(),
            cell: first_cell + cell as u64,
            point: connectivity[pos] as u64,
            points: n_points,
        });
    }
    Ok(())
}

/// Joins the pieces of one file, renumbering point ids.
fn concat_pieces(file: &str, doc: &Document, mut pieces: Vec<RawGrid>) -> Result<RawGrid, IoError> {
    if pieces.len() == 1 {
        return Ok(pieces.pop().unwrap_or_default());
    }
    let total_points: usize = pieces.iter().map(|p| p.points.len()).sum();
    if total_points as u64 > u32::MAX as u64 + 1 {
        return Err(structure(
            file,
            format!("{total_points} points in {} pieces", doc.pieces.len()),
            "at most 4294967296 points (point ids are 32-bit)",
        ));
    }
    let mut out = RawGrid::default();
    for (k, p) in pieces.into_iter().enumerate() {
        if k == 0 {
            out.point_data = p.point_data.iter().map(empty_like).collect();
            out.cell_data = p.cell_data.iter().map(empty_like).collect();
        }
        append_arrays(file, k, "point", &mut out.point_data, p.point_data)?;
        append_arrays(file, k, "cell", &mut out.cell_data, p.cell_data)?;
        let shift = out.points.len() as u32;
        let conn_shift = out.connectivity.len() as u64;
        out.points.extend_from_slice(&p.points);
        out.connectivity
            .extend(p.connectivity.iter().map(|&i| i + shift));
        out.offsets
            .extend(p.offsets.iter().map(|&o| o + conn_shift));
        out.types.extend_from_slice(&p.types);
    }
    Ok(out)
}

fn empty_like(a: &DataArray) -> DataArray {
    DataArray {
        name: a.name.clone(),
        components: a.components,
        scalar_type: a.scalar_type,
        values: Vec::new(),
    }
}

/// Appends piece `k`'s arrays to `out`, requiring the same names and component counts.
fn append_arrays(
    file: &str,
    k: usize,
    kind: &str,
    out: &mut [DataArray],
    arrays: Vec<DataArray>,
) -> Result<(), IoError> {
    let names = |v: &mut dyn Iterator<Item = (&String, usize)>| {
        v.map(|(n, c)| format!("'{n}' ({c} components)"))
            .collect::<Vec<_>>()
            .join(", ")
    };
    let same = arrays.len() == out.len()
        && arrays
            .iter()
            .zip(out.iter())
            .all(|(a, b)| a.name == b.name && a.components == b.components);
    if !same {
        return Err(structure(
            file,
            format!(
                "piece {k} has {kind} arrays [{}]",
                names(&mut arrays.iter().map(|a| (&a.name, a.components)))
            ),
            format!(
                "the same {kind} arrays as piece 0: [{}]",
                names(&mut out.iter().map(|a| (&a.name, a.components)))
            ),
        ));
    }
    for (dst, src) in out.iter_mut().zip(arrays) {
        if dst.scalar_type != src.scalar_type {
            dst.scalar_type = ScalarType::Float64;
        }
        dst.values.extend_from_slice(&src.values);
    }
    Ok(())
}

/// Reads a results file, choosing the reader by extension (`.vtu`, `.pvtu`, `.msh`;
/// case-insensitive).
pub fn read_results(path: &Path) -> Result<RawGrid, IoError> {
    let ext = path
        .extension()
        .map(|e| e.to_string_lossy().to_ascii_lowercase())
        .unwrap_or_default();
    match ext.as_str() {
        "vtu" => read_vtu(path),
        "pvtu" => super::pvtu::read_pvtu(path),
        "msh" => super::msh::read_msh(path),
        _ => Err(IoError::UnsupportedExtension {
            path: path.display().to_string(),
            found: ext,
        }),
    }
}
