//! Writes a model with hone's result fields as a VTU: the cells hone computed on, in the order
//! they had in the input file, with point and cell fields given in hone's element order.

use super::{write_atomically, write_vtu, ArrayData, ArrayView, GridView, IoError, WriteOptions};
use crate::mesh::{Mesh, Model};
use std::path::Path;

/// Values of one output field.
#[derive(Copy, Clone, Debug)]
pub enum FieldValues<'a> {
    /// Floating-point values.
    F64(&'a [f64]),
    /// Integer values (marks, flags, ids).
    I32(&'a [i32]),
}

/// A named output field: `components` values per point or per element.
#[derive(Copy, Clone, Debug)]
pub struct Field<'a> {
    /// Array name in the file (glossary names).
    pub name: &'a str,
    /// Components per tuple.
    pub components: usize,
    /// Values, tuple-interleaved; cell fields in hone's element order.
    pub values: FieldValues<'a>,
}

/// A mesh's cells as VTK XML arrays, in the order they had in the input file.
#[derive(Clone, Debug, Default)]
pub struct CellArrays {
    /// hone's element index of each written cell.
    pub order: Vec<usize>,
    /// Node ids of all cells, concatenated.
    pub connectivity: Vec<u32>,
    /// End offset of each cell in `connectivity`.
    pub offsets: Vec<u64>,
    /// VTK cell type of each cell.
    pub types: Vec<u8>,
}

/// The elements of `mesh` sorted by their index in the input file (the order every written
/// table and cell array follows).
pub fn file_order(mesh: &Mesh) -> Vec<usize> {
    let mut order: Vec<usize> = (0..mesh.element_count()).collect();
    order.sort_by_key(|&e| mesh.file_cell[e]);
    order
}

/// Lays out the cells of `mesh` for writing, sorted by their index in the input file.
pub fn cells_in_file_order(mesh: &Mesh) -> CellArrays {
    let order = file_order(mesh);
    let mut connectivity = Vec::new();
    let mut offsets = Vec::with_capacity(order.len());
    let mut types = Vec::with_capacity(order.len());
    for &e in &order {
        let (kind, nodes) = mesh.element(e);
        connectivity.extend_from_slice(nodes);
        offsets.push(connectivity.len() as u64);
        types.push(kind.vtk_id());
    }
    CellArrays {
        order,
        connectivity,
        offsets,
        types,
    }
}

/// Writes `model` with `point_fields` and `cell_fields` to `path` atomically, refusing to
/// overwrite `protect` (the input file). Cells are written in input-file order and a cell field
/// `file_cell` gives each cell's index in the input file.
pub fn write_model_vtu(
    path: &Path,
    protect: Option<&Path>,
    model: &Model,
    point_fields: &[Field],
    cell_fields: &[Field],
    options: &WriteOptions,
) -> Result<(), IoError> {
    let mesh = &model.mesh;
    let CellArrays {
        order,
        connectivity,
        offsets,
        types,
    } = cells_in_file_order(mesh);
    let file_cell: Vec<i32> = order.iter().map(|&e| mesh.file_cell[e] as i32).collect();
    let displacement: Vec<f64> = model.displacement.iter().flatten().copied().collect();
    let mut reordered_f64: Vec<Vec<f64>> = Vec::new();
    let mut reordered_i32: Vec<Vec<i32>> = Vec::new();
    for f in cell_fields {
        let c = f.components;
        match f.values {
            FieldValues::F64(v) => reordered_f64.push(
                order
                    .iter()
                    .flat_map(|&e| v[e * c..(e + 1) * c].iter().copied())
                    .collect(),
            ),
            FieldValues::I32(v) => reordered_i32.push(
                order
                    .iter()
                    .flat_map(|&e| v[e * c..(e + 1) * c].iter().copied())
                    .collect(),
            ),
        }
    }
    let mut points = vec![ArrayView {
        name: "displacement",
        components: 3,
        data: ArrayData::F64(&displacement),
    }];
    for f in point_fields {
        points.push(ArrayView {
            name: f.name,
            components: f.components,
            data: view(f.values),
        });
    }
    let mut cells = Vec::new();
    let (mut i_f, mut i_i) = (0, 0);
    for f in cell_fields {
        let data = match f.values {
            FieldValues::F64(_) => {
                i_f += 1;
                ArrayData::F64(&reordered_f64[i_f - 1])
            }
            FieldValues::I32(_) => {
                i_i += 1;
                ArrayData::I32(&reordered_i32[i_i - 1])
            }
        };
        cells.push(ArrayView {
            name: f.name,
            components: f.components,
            data,
        });
    }
    cells.push(ArrayView {
        name: "file_cell",
        components: 1,
        data: ArrayData::I32(&file_cell),
    });
    let grid = GridView {
        points: &mesh.points,
        connectivity: &connectivity,
        offsets: &offsets,
        types: &types,
        point_data: &points,
        cell_data: &cells,
    };
    write_atomically(path, protect, |w| write_vtu(w, &grid, options))
}

fn view(values: FieldValues<'_>) -> ArrayData<'_> {
    match values {
        FieldValues::F64(v) => ArrayData::F64(v),
        FieldValues::I32(v) => ArrayData::I32(v),
    }
}
