//! Writing a solved model as a VTU that the estimate pipeline reads like any results file.

use crate::io::{
    cells_in_file_order, write_atomically, write_vtu, ArrayData, ArrayView, CellArrays, Encoding,
    GridView, IoError, WriteOptions,
};
use crate::mesh::Mesh;
use std::path::Path;

/// Writes the solved model as a VTU (appended raw binary by default, ASCII when `ascii`) with a
/// "displacement" point array (3 components) and, when the mesh has more than one zone, an Int32
/// cell array "zone", atomically (`io::write_atomically`). Cells are written in file-cell order
/// (`Mesh::file_cell`).
pub fn write_results(
    path: &Path,
    mesh: &Mesh,
    displacement: &[[f64; 3]],
    ascii: bool,
) -> Result<(), IoError> {
    let invalid = |message: String| IoError::Io {
        path: path.display().to_string(),
        source: std::io::Error::new(std::io::ErrorKind::InvalidInput, message),
    };
    if displacement.len() != mesh.node_count() {
        return Err(invalid(format!(
            "{} displacement vectors for {} points",
            displacement.len(),
            mesh.node_count()
        )));
    }
    let CellArrays {
        order,
        connectivity,
        offsets,
        types,
    } = cells_in_file_order(mesh);
    let values: Vec<f64> = displacement.iter().flatten().copied().collect();
    let point_data = [ArrayView {
        name: "displacement",
        components: 3,
        data: ArrayData::F64(&values),
    }];
    let several_zones = mesh.zone.windows(2).any(|w| w[0] != w[1]);
    let mut zones = Vec::new();
    if several_zones {
        zones.reserve(order.len());
        for &e in &order {
            let z = mesh.zone[e];
            let z = i32::try_from(z).map_err(|_| {
                invalid(format!(
                    "zone id {z} of cell {} does not fit an Int32 array",
                    mesh.file_cell[e]
                ))
            })?;
            zones.push(z);
        }
    }
    let zone_array = [ArrayView {
        name: "zone",
        components: 1,
        data: ArrayData::I32(&zones),
    }];
    let cell_data: &[ArrayView] = if several_zones { &zone_array } else { &[] };
    let grid = GridView {
        points: &mesh.points,
        connectivity: &connectivity,
        offsets: &offsets,
        types: &types,
        point_data: &point_data,
        cell_data,
    };
    let options = WriteOptions {
        encoding: if ascii {
            Encoding::Ascii
        } else {
            Encoding::AppendedRaw
        },
        ..WriteOptions::default()
    };
    write_atomically(path, None, |w| write_vtu(w, &grid, &options))
}
