//! The plain grid a reader returns.

use super::scalar::ScalarType;

/// A results file as read: points, cells (VTK ids, VTK node order), and all named arrays.
///
/// The reader guarantees: every connectivity id is `< points.len()`; `offsets` holds the END
/// offset of each cell (VTK XML convention, no leading 0), is non-decreasing and its last entry
/// equals `connectivity.len()`; `types.len() == offsets.len()`; each point array holds
/// `points.len() * components` values and each cell array `cell_count() * components`.
#[derive(Clone, Debug, Default)]
pub struct RawGrid {
    /// Point coordinates.
    pub points: Vec<[f64; 3]>,
    /// Point ids of all cells, concatenated.
    pub connectivity: Vec<u32>,
    /// End offset of each cell in `connectivity`.
    pub offsets: Vec<u64>,
    /// VTK cell type id of each cell.
    pub types: Vec<u8>,
    /// Arrays with one tuple per point, in file order.
    pub point_data: Vec<DataArray>,
    /// Arrays with one tuple per cell, in file order.
    pub cell_data: Vec<DataArray>,
}

/// One named array of a results file, converted to `f64`.
#[derive(Clone, Debug)]
pub struct DataArray {
    /// The array's `Name`.
    pub name: String,
    /// Values per tuple (`NumberOfComponents`).
    pub components: usize,
    /// Scalar type stored in the file.
    pub scalar_type: ScalarType,
    /// Tuple-interleaved values. Integers are converted exactly (the reader refuses integers of
    /// magnitude above 2^53).
    pub values: Vec<f64>,
}

impl DataArray {
    /// Number of tuples (`values.len() / components`; 0 when `components` is 0).
    pub fn tuples(&self) -> usize {
        self.values.len().checked_div(self.components).unwrap_or(0)
    }

    /// The components of tuple `i`.
    pub fn tuple(&self, i: usize) -> &[f64] {
        &self.values[i * self.components..(i + 1) * self.components]
    }
}

impl RawGrid {
    /// Number of cells.
    pub fn cell_count(&self) -> usize {
        self.offsets.len()
    }

    /// Point ids of cell `c` (panics when `c >= cell_count()`).
    pub fn cell_nodes(&self, c: usize) -> &[u32] {
        let start = if c == 0 {
            0
        } else {
            self.offsets[c - 1] as usize
        };
        &self.connectivity[start..self.offsets[c] as usize]
    }

    /// The point array with exactly this name.
    pub fn point_array(&self, name: &str) -> Option<&DataArray> {
        self.point_data.iter().find(|a| a.name == name)
    }

    /// The cell array with exactly this name.
    pub fn cell_array(&self, name: &str) -> Option<&DataArray> {
        self.cell_data.iter().find(|a| a.name == name)
    }
}
