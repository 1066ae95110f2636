//! Writes a model with hone's result fields as a VTU: the cells hone computed on, in the order
//! they had in the input file, with point and cell fields given in hone's element order.

use super::{write_atomically, write_vtu, ArrayData, ArrayView, GridView, IoError, WriteOptions};
use crate::mesh::{Mesh, Model};
use rayon::prelude::*;
use std::borrow::Cow;
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
    cells_in_order(mesh, file_order(mesh))
}

/// Lays out the cells of `mesh` in the element order `order`.
fn cells_in_order(mesh: &Mesh, order: Vec<usize>) -> CellArrays {
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

/// The tuples of `values` (`c` per element, element order) in the element order `order`.
fn reordered<T: Copy + Send + Sync>(order: &[usize], values: &[T], c: usize) -> Vec<T> {
    order
        .par_iter()
        .flat_map_iter(|&e| values[e * c..(e + 1) * c].iter().copied())
        .collect()
}

/// Writes `model` with `point_fields` and `cell_fields` to `path` atomically, refusing to
/// overwrite `protect` (the input file). Cells are written in input-file order and a cell field
/// `file_cell` gives each cell's index in the input file.
///
/// When hone's element order is the file's (one cell kind, the usual case) the mesh's node
/// lists and the cell fields are written as they are, without reordered copies.
pub fn write_model_vtu(
    path: &Path,
    protect: Option<&Path>,
    model: &Model,
    point_fields: &[Field],
    cell_fields: &[Field],
    options: &WriteOptions,
) -> Result<(), IoError> {
    let mesh = &model.mesh;
    let order = file_order(mesh);
    let in_file_order = order.par_iter().enumerate().all(|(i, &e)| i == e);
    let (connectivity, offsets, types): (Cow<[u32]>, Vec<u64>, Vec<u8>) = match &mesh.blocks[..] {
        [b] if in_file_order => {
            let nn = b.kind.node_count() as u64;
            (
                Cow::Borrowed(&b.nodes),
                (1..=b.len() as u64)
                    .into_par_iter()
                    .map(|c| c * nn)
                    .collect(),
                vec![b.kind.vtk_id(); b.len()],
            )
        }
        _ => {
            let cells = cells_in_order(mesh, order.clone());
            (Cow::Owned(cells.connectivity), cells.offsets, cells.types)
        }
    };
    let file_cell: Vec<i32> = order
        .par_iter()
        .map(|&e| mesh.file_cell[e] as i32)
        .collect();
    let displacement: &[f64] = bytemuck::cast_slice(&model.displacement);
    let mut owned_f64: Vec<Vec<f64>> = Vec::new();
    let mut owned_i32: Vec<Vec<i32>> = Vec::new();
    if !in_file_order {
        for f in cell_fields {
            match f.values {
                FieldValues::F64(v) => owned_f64.push(reordered(&order, v, f.components)),
                FieldValues::I32(v) => owned_i32.push(reordered(&order, v, f.components)),
            }
        }
    }
    let mut points = vec![ArrayView {
        name: "displacement",
        components: 3,
        data: ArrayData::F64(displacement),
    }];
    for f in point_fields {
        points.push(ArrayView {
            name: f.name,
            components: f.components,
            data: view(f.values),
        });
    }
    let mut cell_views = Vec::new();
    let (mut i_f, mut i_i) = (0, 0);
    for f in cell_fields {
        let data = match f.values {
            FieldValues::F64(v) if in_file_order => ArrayData::F64(v),
            FieldValues::I32(v) if in_file_order => ArrayData::I32(v),
            FieldValues::F64(_) => {
                i_f += 1;
                ArrayData::F64(&owned_f64[i_f - 1])
            }
            FieldValues::I32(_) => {
                i_i += 1;
                ArrayData::I32(&owned_i32[i_i - 1])
            }
        };
        cell_views.push(ArrayView {
            name: f.name,
            components: f.components,
            data,
        });
    }
    cell_views.push(ArrayView {
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
        cell_data: &cell_views,
    };
    write_atomically(path, protect, |w| write_vtu(w, &grid, options))
}

fn view(values: FieldValues<'_>) -> ArrayData<'_> {
    match values {
        FieldValues::F64(v) => ArrayData::F64(v),
        FieldValues::I32(v) => ArrayData::I32(v),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::io::{build_model, read_vtu, DataArray, ModelOptions, RawGrid, ScalarType};

    /// A 3 x 1 strip: triangle, quad, triangle in the file (element order groups kinds).
    fn strip(interleaved: bool) -> RawGrid {
        let points = vec![
            [0.0, 0.0, 0.0],
            [1.0, 0.0, 0.0],
            [2.0, 0.0, 0.0],
            [3.0, 0.0, 0.0],
            [0.0, 1.0, 0.0],
            [1.0, 1.0, 0.0],
            [2.0, 1.0, 0.0],
            [3.0, 1.0, 0.0],
        ];
        let (connectivity, offsets, types) = if interleaved {
            (
                vec![0, 1, 5, 0, 5, 4, 1, 2, 6, 5, 2, 3, 7, 2, 7, 6],
                vec![3, 6, 10, 13, 16],
                vec![5, 5, 9, 5, 5],
            )
        } else {
            (
                vec![0, 1, 5, 4, 1, 2, 6, 5, 2, 3, 7, 6],
                vec![4, 8, 12],
                vec![9, 9, 9],
            )
        };
        // A plane model: no z displacement.
        let displacement: Vec<f64> = (0..points.len() * 3)
            .map(|i| if i % 3 == 2 { 0.0 } else { i as f64 * 0.5 })
            .collect();
        RawGrid {
            points,
            connectivity,
            offsets,
            types,
            point_data: vec![DataArray {
                name: "displacement".into(),
                components: 3,
                scalar_type: ScalarType::Float64,
                values: displacement,
            }],
            cell_data: Vec::new(),
        }
    }

    /// Cells come back in file order with their node lists and types, cell fields given in
    /// hone's element order land on the right file cells, `file_cell` numbers them, and the
    /// displacement is the model's: for a mixed file (reordered copies) and a one-kind file
    /// (written without copies).
    #[test]
    fn cells_and_fields_come_back_in_file_order() {
        let dir = tempfile::tempdir().unwrap();
        for interleaved in [true, false] {
            let raw = strip(interleaved);
            let (model, _) = build_model(&raw, "strip.vtu", &ModelOptions::default()).unwrap();
            let n = model.mesh.element_count();
            assert_eq!(n, raw.types.len());
            // A field naming each element's file index, and a two-component one.
            let own: Vec<f64> = (0..n).map(|e| model.mesh.file_cell[e] as f64).collect();
            let pair: Vec<f64> = (0..n)
                .flat_map(|e| [e as f64, -(model.mesh.file_cell[e] as f64)])
                .collect();
            let mark: Vec<i32> = (0..n)
                .map(|e| 10 * model.mesh.file_cell[e] as i32)
                .collect();
            let path = dir.path().join("out.vtu");
            write_model_vtu(
                &path,
                None,
                &model,
                &[],
                &[
                    Field {
                        name: "own",
                        components: 1,
                        values: FieldValues::F64(&own),
                    },
                    Field {
                        name: "pair",
                        components: 2,
                        values: FieldValues::F64(&pair),
                    },
                    Field {
                        name: "mark",
                        components: 1,
                        values: FieldValues::I32(&mark),
                    },
                ],
                &WriteOptions::default(),
            )
            .unwrap();
            let back = read_vtu(&path).unwrap();
            assert_eq!(back.connectivity, raw.connectivity, "{interleaved}");
            assert_eq!(back.offsets, raw.offsets);
            assert_eq!(back.types, raw.types);
            assert_eq!(back.points, raw.points);
            assert_eq!(
                back.point_array("displacement").unwrap().values,
                raw.point_data[0].values
            );
            let file_index: Vec<f64> = (0..n).map(|k| k as f64).collect();
            assert_eq!(back.cell_array("own").unwrap().values, file_index);
            assert_eq!(back.cell_array("file_cell").unwrap().values, file_index);
            let marks: Vec<f64> = (0..n).map(|k| 10.0 * k as f64).collect();
            assert_eq!(back.cell_array("mark").unwrap().values, marks);
            let pairs = &back.cell_array("pair").unwrap().values;
            for k in 0..n {
                assert_eq!(pairs[2 * k + 1], -(k as f64), "{interleaved}: cell {k}");
                let e = pairs[2 * k] as usize;
                assert_eq!(model.mesh.file_cell[e] as usize, k);
            }
        }
    }
}
