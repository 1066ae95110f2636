//! What the XML skeleton of a `.vtu` file declares: file settings, pieces, arrays and where
//! their values are. Inline text and appended data are borrowed from the input bytes.

use std::borrow::Cow;

use super::scalar::{ByteOrder, HeaderType};

/// Which part of a piece an array belongs to.
#[derive(Copy, Clone, Debug, PartialEq, Eq)]
pub(crate) enum Section {
    /// `<PointData>`.
    PointData,
    /// `<CellData>`.
    CellData,
    /// `<Points>`.
    Points,
    /// `<Cells>`.
    Cells,
}

impl Section {
    /// Element name.
    pub(crate) fn name(self) -> &'static str {
        match self {
            Section::PointData => "PointData",
            Section::CellData => "CellData",
            Section::Points => "Points",
            Section::Cells => "Cells",
        }
    }
}

/// Where an array's values are.
#[derive(Debug)]
pub(crate) enum Storage<'a> {
    /// `format="ascii"`: the element text.
    Ascii(Cow<'a, str>),
    /// `format="binary"`: base64 element text.
    Binary(Cow<'a, str>),
    /// `format="appended"`: offset into the appended data.
    Appended(u64),
}

/// One `<DataArray>` declaration.
#[derive(Debug)]
pub(crate) struct ArrayDecl<'a> {
    /// `Name` attribute (empty when absent).
    pub name: String,
    /// `type` attribute.
    pub type_name: String,
    /// `NumberOfComponents` (default 1).
    pub components: usize,
    /// Where the values are.
    pub storage: Storage<'a>,
    /// The enclosing section.
    pub section: Section,
    /// Index of the enclosing piece.
    pub piece: usize,
}

impl ArrayDecl<'_> {
    /// Description for messages, e.g. `array 'displacement' (PointData)`.
    pub(crate) fn describe(&self, pieces: usize) -> String {
        let name = if self.name.is_empty() && self.section == Section::Points {
            "Points"
        } else {
            &self.name
        };
        if pieces > 1 {
            format!(
                "array '{name}' ({}, piece {})",
                self.section.name(),
                self.piece
            )
        } else {
            format!("array '{name}' ({})", self.section.name())
        }
    }
}

/// One `<Piece>`.
#[derive(Debug, Default)]
pub(crate) struct PieceDecl<'a> {
    /// `NumberOfPoints`.
    pub n_points: u64,
    /// `NumberOfCells`.
    pub n_cells: u64,
    /// The array in `<Points>`.
    pub points: Option<ArrayDecl<'a>>,
    /// `connectivity` in `<Cells>`.
    pub connectivity: Option<ArrayDecl<'a>>,
    /// `offsets` in `<Cells>`.
    pub offsets: Option<ArrayDecl<'a>>,
    /// `types` in `<Cells>`.
    pub types: Option<ArrayDecl<'a>>,
    /// Arrays in `<PointData>`.
    pub point_data: Vec<ArrayDecl<'a>>,
    /// Arrays in `<CellData>`.
    pub cell_data: Vec<ArrayDecl<'a>>,
}

/// Encoding of the `<AppendedData>` block.
#[derive(Copy, Clone, Debug, PartialEq, Eq)]
pub(crate) enum AppendedEncoding {
    /// Raw bytes.
    Raw,
    /// Base64 text; offsets count characters.
    Base64,
}

/// The appended data region (after the `_` marker).
#[derive(Debug)]
pub(crate) struct Appended<'a> {
    /// Encoding attribute.
    pub encoding: AppendedEncoding,
    /// Bytes from just after `_` to the closing tag (or the end of the file).
    pub data: &'a [u8],
    /// File offset of `data[0]`.
    pub start: u64,
}

/// File-level settings from `<VTKFile>`.
#[derive(Copy, Clone, Debug)]
pub(crate) struct FileHeader {
    /// Width of binary header words.
    pub header: HeaderType,
    /// Byte order of binary data.
    pub order: ByteOrder,
    /// True when `compressor="vtkZLibDataCompressor"`.
    pub compressed: bool,
}

/// The parsed skeleton.
#[derive(Debug)]
pub(crate) struct Document<'a> {
    /// File-level settings.
    pub header: FileHeader,
    /// The pieces in file order.
    pub pieces: Vec<PieceDecl<'a>>,
    /// The appended data, when the file has an `<AppendedData>` element.
    pub appended: Option<Appended<'a>>,
}
