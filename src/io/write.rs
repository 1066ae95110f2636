//! Writing a grid as a `.vtu` file in any of the four encodings.

use std::io::{self, BufWriter, Write};

use rayon::prelude::*;

use super::encode::{b64_len, put_word, zip, B64Stream, Src, Zipped, STREAM_VALUES};
use super::scalar::{ByteOrder, HeaderType};

/// How array values are stored in the written file.
#[derive(Copy, Clone, Debug, PartialEq, Eq)]
pub enum Encoding {
    /// `format="ascii"`: numbers as text (compression does not apply).
    Ascii,
    /// `format="binary"`: base64 inside each `DataArray` element.
    InlineBase64,
    /// `format="appended"` with raw bytes in `<AppendedData encoding="raw">` (not valid XML).
    AppendedRaw,
    /// `format="appended"` with `<AppendedData encoding="base64">`.
    AppendedBase64,
}

/// Options of [`write_vtu`].
#[derive(Copy, Clone, Debug)]
pub struct WriteOptions {
    /// Array storage.
    pub encoding: Encoding,
    /// Width of binary header words.
    pub header: HeaderType,
    /// Byte order of binary data.
    pub byte_order: ByteOrder,
    /// zlib level 0..=9 for binary encodings; `None` writes uncompressed data.
    pub zlib_level: Option<u32>,
    /// Uncompressed bytes per zlib block.
    pub block_size: usize,
}

impl Default for WriteOptions {
    /// Appended raw data, UInt64 headers, little endian, no compression, 32768-byte blocks.
    fn default() -> Self {
        WriteOptions {
            encoding: Encoding::AppendedRaw,
            header: HeaderType::UInt64,
            byte_order: ByteOrder::Little,
            zlib_level: None,
            block_size: 32768,
        }
    }
}

/// Values of an array to write, borrowed from the caller.
#[derive(Copy, Clone, Debug)]
pub enum ArrayData<'a> {
    /// Written as Float64.
    F64(&'a [f64]),
    /// Written as Float32.
    F32(&'a [f32]),
    /// Written as Int32.
    I32(&'a [i32]),
    /// Written as Int64.
    I64(&'a [i64]),
    /// Written as UInt8.
    U8(&'a [u8]),
}

/// A named array to write (tuple-interleaved values).
#[derive(Copy, Clone, Debug)]
pub struct ArrayView<'a> {
    /// The array's `Name`.
    pub name: &'a str,
    /// Values per tuple.
    pub components: usize,
    /// The values.
    pub data: ArrayData<'a>,
}

/// A grid to write, borrowed from the caller.
#[derive(Copy, Clone, Debug)]
pub struct GridView<'a> {
    /// Point coordinates (written as Float64, 3 components).
    pub points: &'a [[f64; 3]],
    /// Point ids of all cells (written as Int32 when every id and offset fits, else Int64).
    pub connectivity: &'a [u32],
    /// End offset of each cell (Int32 or Int64 with the connectivity).
    pub offsets: &'a [u64],
    /// VTK cell type ids (written as UInt8).
    pub types: &'a [u8],
    /// Arrays with one tuple per point, written in this order.
    pub point_data: &'a [ArrayView<'a>],
    /// Arrays with one tuple per cell, written in this order.
    pub cell_data: &'a [ArrayView<'a>],
}

/// One array ready to be written.
struct Entry<'a> {
    name: &'a str,
    components: usize,
    src: Src<'a>,
}

impl<'a> Entry<'a> {
    fn from_view(v: &ArrayView<'a>) -> Self {
        let src = match v.data {
            ArrayData::F64(s) => Src::F64(s),
            ArrayData::F32(s) => Src::F32(s),
            ArrayData::I32(s) => Src::I32(s),
            ArrayData::I64(s) => Src::I64(s),
            ArrayData::U8(s) => Src::U8(s),
        };
        Entry {
            name: v.name,
            components: v.components,
            src,
        }
    }
}

fn invalid(msg: String) -> io::Error {
    io::Error::new(io::ErrorKind::InvalidInput, msg)
}

/// Checks that the view is self-consistent (lengths, offsets) before anything is written.
fn check_view(grid: &GridView) -> io::Result<()> {
    let (np, nc) = (grid.points.len(), grid.offsets.len());
    if grid.types.len() != nc {
        return Err(invalid(format!(
            "cannot write grid: {} cell types for {nc} cell offsets, expected one type per cell",
            grid.types.len()
        )));
    }
    let mut prev = 0u64;
    for (c, &o) in grid.offsets.iter().enumerate() {
        if o < prev || o > i64::MAX as u64 {
            return Err(invalid(format!(
                "cannot write grid: offset of cell {c} is {o}, expected a non-decreasing value at least {prev}"
            )));
        }
        prev = o;
    }
    if prev != grid.connectivity.len() as u64 {
        return Err(invalid(format!(
            "cannot write grid: last cell offset is {prev}, expected the connectivity length {}",
            grid.connectivity.len()
        )));
    }
    if let Some(k) = grid
        .connectivity
        .par_iter()
        .position_first(|&p| p as usize >= np)
    {
        return Err(invalid(format!(
            "cannot write grid: connectivity entry {k} is point {}, expected a point index below {np}",
            grid.connectivity[k]
        )));
    }
    for (views, n, per) in [
        (grid.point_data, np, "points"),
        (grid.cell_data, nc, "cells"),
    ] {
        for v in views {
            let e = Entry::from_view(v);
            if v.components == 0 || e.src.len() != n * v.components {
                return Err(invalid(format!(
                    "cannot write array '{}': {} values, expected {} ({n} {per} x {} components)",
                    v.name,
                    e.src.len(),
                    n * v.components,
                    v.components
                )));
            }
        }
    }
    Ok(())
}

/// With 4-byte header words, every length written must fit in 32 bits.
fn check_header_words(all: &[&Entry], opts: &WriteOptions, compressed: bool) -> io::Result<()> {
    if opts.header != HeaderType::UInt32 {
        return Ok(());
    }
    let max = u32::MAX as u64;
    for e in all {
        let bytes = e.src.byte_len() as u64;
        let blocks = bytes.div_ceil(opts.block_size.max(1) as u64);
        let (what, n) = if !compressed {
            ("bytes", bytes)
        } else if opts.block_size as u64 > max {
            ("bytes per zlib block", opts.block_size as u64)
        } else {
            ("zlib blocks", blocks)
        };
        if n > max {
            return Err(invalid(format!(
                "cannot write array '{}' with UInt32 header words: it needs {n} {what}, more than 4294967295; use HeaderType::UInt64",
                e.name
            )));
        }
    }
    Ok(())
}

/// Escapes text for an XML attribute value.
fn escape(s: &str) -> String {
    let mut o = String::with_capacity(s.len());
    for ch in s.chars() {
        match ch {
            '&' => o.push_str("&amp;"),
            '<' => o.push_str("&lt;"),
            '>' => o.push_str("&gt;"),
            '"' => o.push_str("&quot;"),
            '\'' => o.push_str("&apos;"),
            c => o.push(c),
        }
    }
    o
}

/// Writes `grid` as a VTK XML UnstructuredGrid (one piece) to `w`.
///
/// Connectivity and offsets are written as Int32 when the point count and the connectivity
/// length fit (every VTK reader takes either; half the bytes of the biggest array), else as
/// Int64; types as UInt8, points as 3-component
/// Float64; point and cell arrays keep their order. Output is buffered internally. Fails with
/// `InvalidInput` when the view is inconsistent (array lengths, offsets).
pub fn write_vtu<W: Write>(w: W, grid: &GridView, opts: &WriteOptions) -> io::Result<()> {
    check_view(grid)?;
    let mut w = BufWriter::with_capacity(1 << 20, w);
    let zlevel = match opts.encoding {
        Encoding::Ascii => None,
        _ => opts.zlib_level,
    };
    let point_data: Vec<Entry> = grid.point_data.iter().map(Entry::from_view).collect();
    let cell_data: Vec<Entry> = grid.cell_data.iter().map(Entry::from_view).collect();
    let points = [Entry {
        name: "Points",
        components: 3,
        src: Src::F64(bytemuck::cast_slice(grid.points)),
    }];
    let narrow =
        i32::try_from(grid.points.len()).is_ok() && i32::try_from(grid.connectivity.len()).is_ok();
    let cells = [
        Entry {
            name: "connectivity",
            components: 1,
            src: if narrow {
                Src::U32AsI32(grid.connectivity)
            } else {
                Src::U32AsI64(grid.connectivity)
            },
        },
        Entry {
            name: "offsets",
            components: 1,
            src: if narrow {
                Src::U64AsI32(grid.offsets)
            } else {
                Src::U64AsI64(grid.offsets)
            },
        },
        Entry {
            name: "types",
            components: 1,
            src: Src::U8(grid.types),
        },
    ];
    let sections: [(&str, &[Entry]); 4] = [
        ("PointData", &point_data),
        ("CellData", &cell_data),
        ("Points", &points),
        ("Cells", &cells),
    ];
    let all: Vec<&Entry> = sections.iter().flat_map(|(_, e)| e.iter()).collect();
    check_header_words(&all, opts, zlevel.is_some())?;

    // Compress everything first when needed: appended offsets depend on compressed sizes.
    let zipped: Vec<Option<Zipped>> = match zlevel {
        Some(level) => all
            .iter()
            .map(|e| zip(&e.src, opts.byte_order, opts.header, level, opts.block_size).map(Some))
            .collect::<io::Result<_>>()?,
        None => all.iter().map(|_| None).collect(),
    };
    let h = opts.header.size();
    let appended_len = |e: &Entry, z: &Option<Zipped>| match (z, opts.encoding) {
        (None, Encoding::AppendedBase64) => b64_len(h + e.src.byte_len()),
        (None, _) => h + e.src.byte_len(),
        (Some(z), Encoding::AppendedBase64) => b64_len(z.header.len()) + b64_len(z.data_len()),
        (Some(z), _) => z.header.len() + z.data_len(),
    };

    write!(
        w,
        "<?xml version=\"1.0\"?>\n<VTKFile type=\"UnstructuredGrid\" version=\"1.0\" byte_order=\"{}\" header_type=\"{}\"{}>\n  <UnstructuredGrid>\n    <Piece NumberOfPoints=\"{}\" NumberOfCells=\"{}\">\n",
        opts.byte_order.vtk_name(),
        opts.header.vtk_name(),
        if zlevel.is_some() { " compressor=\"vtkZLibDataCompressor\"" } else { "" },
        grid.points.len(),
        grid.offsets.len()
    )?;
    let mut k = 0;
    let mut offset = 0usize;
    for (section, entries) in sections {
        writeln!(w, "      <{section}>")?;
        for e in entries {
            let z = &zipped[k];
            k += 1;
            let head = format!(
                "        <DataArray type=\"{}\" Name=\"{}\" NumberOfComponents=\"{}\"",
                e.src.scalar().vtk_name(),
                escape(e.name),
                e.components
            );
            match opts.encoding {
                Encoding::AppendedRaw | Encoding::AppendedBase64 => {
                    writeln!(w, "{head} format=\"appended\" offset=\"{offset}\"/>")?;
                    offset += appended_len(e, z);
                }
                Encoding::InlineBase64 => {
                    write!(w, "{head} format=\"binary\">\n          ")?;
                    write_base64_block(&mut w, e, z, opts)?;
                    writeln!(w, "\n        </DataArray>")?;
                }
                Encoding::Ascii => {
                    writeln!(w, "{head} format=\"ascii\">")?;
                    write_ascii(&mut w, e)?;
                    writeln!(w, "        </DataArray>")?;
                }
            }
        }
        writeln!(w, "      </{section}>")?;
    }
    w.write_all(b"    </Piece>\n  </UnstructuredGrid>\n")?;
    if matches!(
        opts.encoding,
        Encoding::AppendedRaw | Encoding::AppendedBase64
    ) {
        let enc = if opts.encoding == Encoding::AppendedRaw {
            "raw"
        } else {
            "base64"
        };
        write!(w, "  <AppendedData encoding=\"{enc}\">\n   _")?;
        for (e, z) in all.iter().zip(&zipped) {
            if opts.encoding == Encoding::AppendedRaw {
                write_raw_block(&mut w, e, z, opts)?;
            } else {
                write_base64_block(&mut w, e, z, opts)?;
            }
        }
        w.write_all(b"\n  </AppendedData>\n")?;
    }
    w.write_all(b"</VTKFile>\n")?;
    w.flush()
}

/// Raw `[N][bytes]` or `[zlib header][blocks]`.
fn write_raw_block(
    w: &mut dyn Write,
    e: &Entry,
    z: &Option<Zipped>,
    opts: &WriteOptions,
) -> io::Result<()> {
    if let Some(z) = z {
        w.write_all(&z.header)?;
        for b in &z.blocks {
            w.write_all(b)?;
        }
        return Ok(());
    }
    let mut buf = Vec::with_capacity(STREAM_VALUES * 8);
    put_word(
        e.src.byte_len() as u64,
        opts.header,
        opts.byte_order,
        &mut buf,
    );
    w.write_all(&buf)?;
    if let Some(bytes) = e.src.native_bytes(opts.byte_order) {
        return w.write_all(bytes);
    }
    let n = e.src.len();
    let mut i = 0;
    while i < n {
        let j = (i + STREAM_VALUES).min(n);
        buf.clear();
        e.src.bytes_into(i..j, opts.byte_order, &mut buf);
        w.write_all(&buf)?;
        i = j;
    }
    Ok(())
}

/// Base64: uncompressed as one stream of header + data (as VTK writes it); compressed as the
/// header and the blocks encoded separately.
fn write_base64_block(
    w: &mut dyn Write,
    e: &Entry,
    z: &Option<Zipped>,
    opts: &WriteOptions,
) -> io::Result<()> {
    if let Some(z) = z {
        let mut s = B64Stream::new(w);
        s.push(&z.header)?;
        s.finish()?;
        let mut s = B64Stream::new(w);
        for b in &z.blocks {
            s.push(b)?;
        }
        return s.finish();
    }
    let mut s = B64Stream::new(w);
    let mut buf = Vec::with_capacity(STREAM_VALUES * 8);
    put_word(
        e.src.byte_len() as u64,
        opts.header,
        opts.byte_order,
        &mut buf,
    );
    s.push(&buf)?;
    let n = e.src.len();
    let mut i = 0;
    while i < n {
        let j = (i + STREAM_VALUES).min(n);
        buf.clear();
        e.src.bytes_into(i..j, opts.byte_order, &mut buf);
        s.push(&buf)?;
        i = j;
    }
    s.finish()
}

/// Values as text, one tuple per line (scalars six to a line).
fn write_ascii(w: &mut dyn Write, e: &Entry) -> io::Result<()> {
    let per_line = if e.components == 1 { 6 } else { e.components };
    let n = e.src.len();
    let mut buf = Vec::with_capacity(1 << 16);
    let mut i = 0;
    while i < n {
        let j = (i + per_line).min(n);
        buf.extend_from_slice(b"          ");
        for k in i..j {
            if k > i {
                buf.push(b' ');
            }
            e.src.ascii_into(k, &mut buf);
        }
        buf.push(b'\n');
        if buf.len() > 60_000 {
            w.write_all(&buf)?;
            buf.clear();
        }
        i = j;
    }
    w.write_all(&buf)
}
