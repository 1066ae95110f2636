//! Reading and writing VTK XML unstructured grids (`.vtu`, `.pvtu`).
//!
//! This module stands alone: readers return a plain [`RawGrid`] (points, VTK cells, named arrays
//! converted to `f64`), the writer takes a borrowed [`GridView`].
//!
//! # Reading ([`read_vtu()`], [`read_vtu_bytes()`], [`read_pvtu()`], [`read_results()`])
//! * `VTKFile type="UnstructuredGrid"`, versions 0.1 and 1.0 (other version strings are read
//!   the same way); `header_type` UInt32 (default) or UInt64; `byte_order` LittleEndian or
//!   BigEndian; `compressor="vtkZLibDataCompressor"` (any other compressor is a clear error).
//! * DataArray `format` ascii, binary (inline base64, with the header encoded jointly with the
//!   data or on its own) and appended (`<AppendedData encoding="raw|base64">`). zlib blocks are
//!   inflated in parallel.
//! * All ten scalar types; points in any float type; `connectivity` / `offsets` / `types` in any
//!   integer type. Integers are converted to `f64` exactly (magnitudes above 2^53 are refused).
//! * Several `<Piece>`s in one file are concatenated (point ids renumbered).
//! * Unknown attributes and elements (`FieldData`, `InformationKey`, ...) are skipped.
//! * Raw appended data is never parsed as XML: the XML parser stops at `<AppendedData>`, and the
//!   arrays are converted straight from the memory-mapped file.
//! * Every count read from the file is checked against the file's size before allocation;
//!   truncated, malformed or inconsistent input gives an [`IoError`] naming the file and the
//!   array or cell, never a panic.
//! * `.pvtu`: pieces are read in parallel and stitched (ghost cells dropped, shared points merged
//!   by a global id array or by coordinates); see [`read_pvtu`].
//!
//! # Writing ([`write_vtu`], [`write_atomically`])
//! All four [`Encoding`]s, both header types, both byte orders, optional zlib compression in
//! blocks as VTK writes them. Connectivity and offsets are written as Int32 when they fit (else
//! Int64), types as UInt8, points as 3-component Float64.

#![warn(missing_docs)]

mod ascii;
mod atomic;
mod block_writer;
mod decl;
mod decode;
mod encode;
mod error;
mod gmsh_types;
mod grid;
mod medit;
mod msh;
mod payload;
mod pos;
mod pvtu;
mod read_vtu;
mod scalar;
pub(crate) mod text_out;
mod write;
mod xml;

pub use atomic::{set_sync_outputs, write_atomically};
pub use block_writer::set_cached_writes;
pub use error::IoError;
pub use grid::{DataArray, RawGrid};
pub use medit::write_medit_size_field;
pub(crate) use medit::write_medit_text;
pub(crate) use msh::write_msh_text;
pub use msh::{read_msh, read_msh_bytes, write_msh_size_field};
pub(crate) use pos::write_pos_text;
pub use pos::{read_pos_view, read_pos_views_bytes, write_pos_size_field, PosEntry, PosView};
pub use pvtu::{read_pvtu, GLOBAL_ID_NAMES, MERGE_TOLERANCE};
pub use read_vtu::{read_results, read_vtu, read_vtu_bytes};
pub use scalar::{ByteOrder, HeaderType, ScalarType};
pub use write::{write_vtu, ArrayData, ArrayView, Encoding, GridView, WriteOptions};

mod annotated;
mod model;
pub use annotated::{
    cells_in_file_order, file_order, write_model_vtu, CellArrays, Field, FieldValues,
};
pub use model::{build_model, ModelError, ModelNotes, ModelOptions, USUAL_DISPLACEMENT_NAMES};
