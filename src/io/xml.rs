//! Parsing the XML skeleton of a `.vtu` file into the declarations of [`super::decl`].
//!
//! The XML parser only runs up to the `<AppendedData>` start tag; what follows is indexed as
//! bytes (raw appended data is not valid XML). Inline array text is kept as slices of the input.

use std::borrow::Cow;

use quick_xml::events::{BytesStart, Event};
use quick_xml::Reader;

use super::decl::{
    Appended, AppendedEncoding, ArrayDecl, Document, FileHeader, PieceDecl, Section, Storage,
};
use super::error::IoError;
use super::scalar::{ByteOrder, HeaderType};

/// Builds a structure error.
pub(crate) fn structure(
    file: &str,
    found: impl Into<String>,
    expected: impl Into<String>,
) -> IoError {
    IoError::Structure {
        file: file.to_string(),
        found: found.into(),
        expected: expected.into(),
    }
}

fn xml_error(file: &str, reader: &Reader<&[u8]>, e: impl std::fmt::Display) -> IoError {
    IoError::Xml {
        file: file.to_string(),
        position: reader.error_position(),
        message: e.to_string(),
    }
}

/// Reads all attributes of a tag as (name, value) pairs.
pub(crate) fn attributes(
    e: &BytesStart,
    file: &str,
    reader: &Reader<&[u8]>,
) -> Result<Vec<(String, String)>, IoError> {
    let mut out = Vec::new();
    for a in e.attributes() {
        let a = a.map_err(|err| xml_error(file, reader, err))?;
        let value = a
            .normalized_value(quick_xml::XmlVersion::Implicit1_0)
            .map_err(|err| xml_error(file, reader, err))?;
        out.push((a.key.as_ref().to_string(), value.into_owned()));
    }
    Ok(out)
}

/// The value of attribute `key`, if present.
pub(crate) fn get<'s>(attrs: &'s [(String, String)], key: &str) -> Option<&'s str> {
    attrs
        .iter()
        .find(|(k, _)| k == key)
        .map(|(_, v)| v.as_str())
}

/// Parses a non-negative integer attribute.
pub(crate) fn parse_count(
    file: &str,
    element: &str,
    attrs: &[(String, String)],
    key: &str,
) -> Result<Option<u64>, IoError> {
    match get(attrs, key) {
        None => Ok(None),
        Some(v) => v.trim().parse::<u64>().map(Some).map_err(|_| {
            structure(
                file,
                format!("<{element}> attribute {key}=\"{v}\""),
                "a non-negative integer",
            )
        }),
    }
}

/// Where the parser is in the element tree.
#[derive(Copy, Clone, PartialEq, Eq)]
enum Level {
    Top,
    VtkFile,
    Grid,
    Piece,
    Section(Section),
}

impl Level {
    fn up(self) -> Level {
        match self {
            Level::Top | Level::VtkFile => Level::Top,
            Level::Grid => Level::VtkFile,
            Level::Piece => Level::Grid,
            Level::Section(_) => Level::Piece,
        }
    }
}

/// Parses the XML part of a `.vtu` file held in `bytes`.
pub(crate) fn parse_document<'a>(bytes: &'a [u8], file: &str) -> Result<Document<'a>, IoError> {
    let mut reader = Reader::from_reader(bytes);
    reader.config_mut().trim_text(false);
    let mut level = Level::Top;
    let mut header: Option<FileHeader> = None;
    let mut pieces: Vec<PieceDecl<'a>> = Vec::new();
    let mut appended = None;
    loop {
        let event = reader
            .read_event()
            .map_err(|e| xml_error(file, &reader, e))?;
        match event {
            Event::Start(e) => {
                let name = e.name().as_ref().to_string();
                match (level, name.as_str()) {
                    (Level::Top, "VTKFile") => {
                        header = Some(file_header(&attributes(&e, file, &reader)?, file)?);
                        level = Level::VtkFile;
                    }
                    (Level::VtkFile, "UnstructuredGrid") => level = Level::Grid,
                    (Level::Grid, "Piece") => {
                        pieces.push(piece_header(&attributes(&e, file, &reader)?, file)?);
                        level = Level::Piece;
                    }
                    (Level::Piece, s) if section_of(s).is_some() => {
                        level = Level::Section(section_of(s).unwrap_or(Section::Points));
                    }
                    (Level::Section(sec), "DataArray") => {
                        let attrs = attributes(&e, file, &reader)?;
                        let text = element_text(&mut reader, file)?;
                        let piece = pieces.len().saturating_sub(1);
                        let decl = array_decl(&attrs, sec, piece, Some(text), file)?;
                        if let Some(p) = pieces.last_mut() {
                            add_array(p, decl);
                        }
                    }
                    (Level::VtkFile, "AppendedData") => {
                        let attrs = attributes(&e, file, &reader)?;
                        let pos = reader.buffer_position() as usize;
                        appended = Some(appended_region(bytes, pos, &attrs, file)?);
                        break;
                    }
                    (Level::Top, other) => {
                        return Err(structure(
                            file,
                            format!("root element <{other}>"),
                            "<VTKFile type=\"UnstructuredGrid\">",
                        ))
                    }
                    (Level::VtkFile, other)
                        if other.starts_with('P') && other.ends_with("Grid") =>
                    {
                        return Err(structure(
                            file,
                            format!("<{other}> (a parallel file)"),
                            "<UnstructuredGrid> (read .pvtu files with read_pvtu)",
                        ))
                    }
                    _ => {
                        reader
                            .read_to_end(e.name())
                            .map_err(|err| xml_error(file, &reader, err))?;
                    }
                }
            }
            Event::Empty(e) => {
                let name = e.name().as_ref().to_string();
                match (level, name.as_str()) {
                    (Level::Top, "VTKFile") => {
                        header = Some(file_header(&attributes(&e, file, &reader)?, file)?);
                    }
                    (Level::Grid, "Piece") => {
                        pieces.push(piece_header(&attributes(&e, file, &reader)?, file)?);
                    }
                    (Level::Section(sec), "DataArray") => {
                        let attrs = attributes(&e, file, &reader)?;
                        let piece = pieces.len().saturating_sub(1);
                        let decl = array_decl(&attrs, sec, piece, None, file)?;
                        if let Some(p) = pieces.last_mut() {
                            add_array(p, decl);
                        }
                    }
                    _ => {}
                }
            }
            Event::End(_) => level = level.up(),
            Event::Eof => break,
            _ => {}
        }
    }
    let Some(header) = header else {
        return Err(structure(
            file,
            "no <VTKFile> element",
            "a VTK XML file starting with <VTKFile type=\"UnstructuredGrid\">",
        ));
    };
    if pieces.is_empty() {
        return Err(structure(
            file,
            "no <Piece> inside <UnstructuredGrid>",
            "at least one <Piece NumberOfPoints=.. NumberOfCells=..>",
        ));
    }
    Ok(Document {
        header,
        pieces,
        appended,
    })
}

fn section_of(name: &str) -> Option<Section> {
    match name {
        "PointData" => Some(Section::PointData),
        "CellData" => Some(Section::CellData),
        "Points" => Some(Section::Points),
        "Cells" => Some(Section::Cells),
        _ => None,
    }
}

fn add_array<'a>(piece: &mut PieceDecl<'a>, decl: ArrayDecl<'a>) {
    match decl.section {
        Section::PointData => piece.point_data.push(decl),
        Section::CellData => piece.cell_data.push(decl),
        Section::Points => {
            if piece.points.is_none() {
                piece.points = Some(decl);
            }
        }
        Section::Cells => match decl.name.as_str() {
            "connectivity" => piece.connectivity = Some(decl),
            "offsets" => piece.offsets = Some(decl),
            "types" => piece.types = Some(decl),
            _ => {} // faces / faceoffsets of polyhedra: not used
        },
    }
}

/// Reads the settings of `<VTKFile>`.
fn file_header(attrs: &[(String, String)], file: &str) -> Result<FileHeader, IoError> {
    match get(attrs, "type") {
        Some("UnstructuredGrid") => {}
        Some("PUnstructuredGrid") => {
            return Err(structure(
                file,
                "VTKFile type=\"PUnstructuredGrid\" (a parallel file)",
                "type=\"UnstructuredGrid\" (read .pvtu files with read_pvtu)",
            ))
        }
        other => {
            return Err(structure(
                file,
                format!("VTKFile type=\"{}\"", other.unwrap_or("")),
                "type=\"UnstructuredGrid\"",
            ))
        }
    }
    let header = match get(attrs, "header_type") {
        None | Some("UInt32") => HeaderType::UInt32,
        Some("UInt64") => HeaderType::UInt64,
        Some(v) => {
            return Err(structure(
                file,
                format!("VTKFile header_type=\"{v}\""),
                "\"UInt32\" or \"UInt64\"",
            ))
        }
    };
    let order = match get(attrs, "byte_order") {
        None | Some("LittleEndian") => ByteOrder::Little,
        Some("BigEndian") => ByteOrder::Big,
        Some(v) => {
            return Err(structure(
                file,
                format!("VTKFile byte_order=\"{v}\""),
                "\"LittleEndian\" or \"BigEndian\"",
            ))
        }
    };
    let compressed = match get(attrs, "compressor") {
        None | Some("") => false,
        Some("vtkZLibDataCompressor") => true,
        Some(v) => {
            return Err(IoError::UnsupportedCompressor {
                file: file.to_string(),
                found: v.to_string(),
            })
        }
    };
    Ok(FileHeader {
        header,
        order,
        compressed,
    })
}

fn piece_header<'a>(attrs: &[(String, String)], file: &str) -> Result<PieceDecl<'a>, IoError> {
    Ok(PieceDecl {
        n_points: parse_count(file, "Piece", attrs, "NumberOfPoints")?.unwrap_or(0),
        n_cells: parse_count(file, "Piece", attrs, "NumberOfCells")?.unwrap_or(0),
        ..PieceDecl::default()
    })
}

/// Collects the text of the current element (its direct text; child elements are skipped).
fn element_text<'a>(reader: &mut Reader<&'a [u8]>, file: &str) -> Result<Cow<'a, str>, IoError> {
    let mut parts: Vec<Cow<'a, str>> = Vec::new();
    loop {
        let event = reader
            .read_event()
            .map_err(|e| xml_error(file, reader, e))?;
        match event {
            Event::Text(t) => parts.push(t.into_inner()),
            Event::CData(t) => parts.push(t.into_inner()),
            Event::Start(e) => {
                reader
                    .read_to_end(e.name())
                    .map_err(|err| xml_error(file, reader, err))?;
            }
            Event::End(_) => break,
            Event::Eof => {
                return Err(structure(
                    file,
                    "end of file inside a <DataArray>",
                    "</DataArray> (truncated file?)",
                ))
            }
            Event::GeneralRef(r) => {
                return Err(structure(
                    file,
                    format!("entity reference '&{};' inside <DataArray> text", &*r),
                    "numbers or base64 text only",
                ))
            }
            _ => {}
        }
    }
    let nonblank: Vec<Cow<'a, str>> = parts.into_iter().filter(|p| !p.trim().is_empty()).collect();
    Ok(match nonblank.len() {
        0 => Cow::Borrowed(""),
        1 => nonblank.into_iter().next().unwrap_or(Cow::Borrowed("")),
        _ => Cow::Owned(nonblank.concat()),
    })
}

fn array_decl<'a>(
    attrs: &[(String, String)],
    section: Section,
    piece: usize,
    text: Option<Cow<'a, str>>,
    file: &str,
) -> Result<ArrayDecl<'a>, IoError> {
    let name = get(attrs, "Name").unwrap_or("").to_string();
    let what = if name.is_empty() {
        format!("<DataArray> in <{}>", section.name())
    } else {
        format!("<DataArray Name=\"{name}\"> in <{}>", section.name())
    };
    let type_name = get(attrs, "type")
        .ok_or_else(|| {
            structure(
                file,
                format!("{what} without a type attribute"),
                "type=\"Float64\" or another VTK type name",
            )
        })?
        .to_string();
    let components = match parse_count(file, "DataArray", attrs, "NumberOfComponents")? {
        None => 1,
        Some(0) => {
            return Err(structure(
                file,
                format!("{what} with NumberOfComponents=\"0\""),
                "at least 1 component",
            ))
        }
        Some(n) => usize::try_from(n).map_err(|_| {
            structure(
                file,
                format!("{what} with NumberOfComponents=\"{n}\""),
                "a component count that fits in memory",
            )
        })?,
    };
    let text = text.unwrap_or(Cow::Borrowed(""));
    let storage = match get(attrs, "format").unwrap_or("ascii") {
        "ascii" => Storage::Ascii(text),
        "binary" => Storage::Binary(text),
        "appended" => {
            let offset = parse_count(file, "DataArray", attrs, "offset")?.ok_or_else(|| {
                structure(
                    file,
                    format!("{what} with format=\"appended\" but no offset"),
                    "an offset attribute",
                )
            })?;
            Storage::Appended(offset)
        }
        other => {
            return Err(structure(
                file,
                format!("{what} with format=\"{other}\""),
                "\"ascii\", \"binary\" or \"appended\"",
            ))
        }
    };
    Ok(ArrayDecl {
        name,
        type_name,
        components,
        storage,
        section,
        piece,
    })
}

/// Locates the appended data after the `<AppendedData ...>` tag ending at `pos`.
fn appended_region<'a>(
    bytes: &'a [u8],
    pos: usize,
    attrs: &[(String, String)],
    file: &str,
) -> Result<Appended<'a>, IoError> {
    let encoding = match get(attrs, "encoding").unwrap_or("raw") {
        "raw" => AppendedEncoding::Raw,
        "base64" => AppendedEncoding::Base64,
        other => {
            return Err(structure(
                file,
                format!("<AppendedData encoding=\"{other}\">"),
                "encoding=\"raw\" or \"base64\"",
            ))
        }
    };
    let rest = bytes.get(pos..).unwrap_or(&[]);
    let skip = rest.iter().take_while(|b| b.is_ascii_whitespace()).count();
    if rest.get(skip) != Some(&b'_') {
        return Err(structure(
            file,
            format!(
                "<AppendedData> content starting at byte {} without the '_' marker",
                pos + skip
            ),
            "'_' before the appended bytes",
        ));
    }
    let start = pos + skip + 1;
    let data = &bytes[start..];
    // The closing tag is the last one in the file (raw bytes may contain anything, and
    // searching from the end is immediate for a complete file).
    let end = rfind(data, b"</AppendedData").unwrap_or(data.len());
    Ok(Appended {
        encoding,
        data: &data[..end],
        start: start as u64,
    })
}

/// Last occurrence of `needle` in `hay`.
fn rfind(hay: &[u8], needle: &[u8]) -> Option<usize> {
    if needle.len() > hay.len() {
        return None;
    }
    (0..=hay.len() - needle.len())
        .rev()
        .find(|&i| hay[i] == needle[0] && &hay[i..i + needle.len()] == needle)
}
