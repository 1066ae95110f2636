//! Gmsh MSH 4.1 files: reading a mesh with its post-processing data into a [`RawGrid`], and
//! writing a mesh with a nodal size field.
//!
//! # Reading ([`read_msh`], [`read_msh_bytes`])
//! * ASCII and binary files. Binary values are in the writer's byte order, found from the
//!   integer 1 after the header; `size_t` is 8 or 4 bytes as the header says.
//! * `$Nodes`: entity blocks in any order; tags may be sparse and unordered and are renumbered
//!   to dense 0-based point indices in file order; parametric coordinates are skipped.
//! * `$Elements`: only elements of the highest dimension present become cells; elements of
//!   lower dimensions (boundary and edge groups) are left out. Node order is converted to VTK's
//!   (formats notes 1.5). Prisms keep their corners as written: Gmsh's handedness is the mirror
//!   of VTK's, and the model builder mirrors wedges whose Jacobian is negative
//!   ([`crate::mesh::orient_wedges`]), so they are not mirrored here as well. Gmsh types with a
//!   VTK counterpart hone has no element for (pyramids, 18-node prisms) get that VTK type, so
//!   the model builder reports them (and can skip them); types without one are an error when
//!   they are of the mesh's dimension.
//! * Cell arrays `gmsh_entity` (the element's entity tag) and `gmsh_physical` (the entity's
//!   first physical tag from `$Entities`, 0 when it has none or the file has no `$Entities`),
//!   usable as a zone array.
//! * `$NodeData` views become point arrays named by their first string tag, `$ElementData`
//!   views cell arrays (rows of left-out lower-dimension elements are ignored). When a view
//!   has several time steps, the one with the largest time-step tag is kept (the last one in a
//!   file written step by step); sections of one view and one step (partitions) fill each
//!   other in. Points or cells a view has no row for hold NaN.
//! * `$Comments`, `$PhysicalNames`, `$ElementNodeData` and unknown sections are skipped.
//! * Every count is checked against the bytes left in the file before anything is allocated;
//!   malformed input gives an [`IoError`] naming the file, the line (and byte, in binary data),
//!   the section, what was found and what was expected.
//!
//! # Writing ([`write_msh_size_field`])
//! ASCII MSH 4.1 with the linear mesh of the corners and a `$NodeData` view `size_target`.

use std::collections::HashMap;
use std::path::Path;

use rayon::prelude::*;

use super::error::{human_bytes, IoError};
use super::gmsh_types::{gmsh_number, gmsh_type, vtk_to_gmsh, GmshType};
use super::grid::{DataArray, RawGrid};
use super::read_vtu::with_mapped_file;
use super::scalar::ScalarType;
use super::text_out::{push_int, write_chunked, NodeText};
use super::write_atomically;
use crate::mesh::Mesh;

/// Reads an MSH 4.1 file (ASCII or binary). The file is memory-mapped; it must not be modified
/// by another process while it is read.
pub fn read_msh(path: &Path) -> Result<RawGrid, IoError> {
    with_mapped_file(path, read_msh_bytes)
}

/// Reads an MSH 4.1 file held in memory; `source_name` names it in error messages.
pub fn read_msh_bytes(bytes: &[u8], source_name: &str) -> Result<RawGrid, IoError> {
    let mut p = Parser {
        b: bytes,
        pos: 0,
        file: source_name,
        section: "start of file",
        binary: false,
        size_t: 8,
        big_endian: false,
    };
    let mut st = State::default();
    let mut first = true;
    loop {
        p.skip_ws();
        if p.pos >= bytes.len() {
            break;
        }
        let at = p.pos;
        if bytes[at] != b'$' {
            return Err(p.err(at, snippet(&bytes[at..]), "a section header such as $Nodes"));
        }
        let header = p.rest_of_line();
        let name = String::from_utf8_lossy(&header[1..]).trim().to_string();
        if first && name != "MeshFormat" {
            return Err(p.err(at, format!("${name}"), "$MeshFormat as the first section"));
        }
        first = false;
        match name.as_str() {
            "MeshFormat" => {
                p.section = "$MeshFormat";
                mesh_format(&mut p)?;
            }
            "Entities" => {
                p.section = "$Entities";
                st.physical = entities(&mut p)?;
            }
            "Nodes" => {
                p.section = "$Nodes";
                if st.nodes.is_some() {
                    return Err(p.err(at, "a second $Nodes section", "one $Nodes section"));
                }
                st.nodes = Some(nodes(&mut p)?);
            }
            "Elements" => {
                p.section = "$Elements";
                if st.cells.is_some() {
                    return Err(p.err(at, "a second $Elements section", "one $Elements section"));
                }
                let Some(nodes) = &st.nodes else {
                    return Err(p.err(at, "$Elements before $Nodes", "$Nodes first"));
                };
                st.cells = Some(elements(&mut p, &nodes.index)?);
            }
            "NodeData" | "ElementData" => {
                let on_nodes = name == "NodeData";
                p.section = if on_nodes {
                    "$NodeData"
                } else {
                    "$ElementData"
                };
                let target = if on_nodes {
                    st.nodes.as_ref().map(Target::Nodes)
                } else {
                    st.cells.as_ref().map(Target::Cells)
                };
                let Some(target) = target else {
                    let need = if on_nodes { "$Nodes" } else { "$Elements" };
                    return Err(p.err(
                        at,
                        format!("${name} before {need}"),
                        format!("{need} first"),
                    ));
                };
                let views = if on_nodes {
                    &mut st.point_views
                } else {
                    &mut st.cell_views
                };
                data_section(&mut p, target, views)?;
            }
            _ => {
                p.section = "unknown section";
                p.skip_section(&name)?;
            }
        }
        p.end_section(&name)?;
    }
    if first {
        return Err(p.err(0, "an empty file", "$MeshFormat"));
    }
    finish(&p, st)
}

// ------------------------------------------------------------------------------------------
// Parsing primitives

/// A cursor over the file with the format state needed to read values.
struct Parser<'a> {
    b: &'a [u8],
    pos: usize,
    file: &'a str,
    /// Section being read, for messages.
    section: &'static str,
    binary: bool,
    size_t: usize,
    big_endian: bool,
}

/// Up to 40 printable characters of `b`, for messages.
fn snippet(b: &[u8]) -> String {
    if b.is_empty() {
        return "end of file".to_string();
    }
    let end = b
        .iter()
        .take(40)
        .position(|&c| c == b'\n' || c == b'\r')
        .unwrap_or(b.len().min(40));
    let text: String = b[..end]
        .iter()
        .map(|&c| {
            if c.is_ascii_graphic() || c == b' ' {
                c as char
            } else {
                '?'
            }
        })
        .collect();
    format!("'{text}'")
}

impl<'a> Parser<'a> {
    fn err(&self, at: usize, found: impl Into<String>, expected: impl Into<String>) -> IoError {
        let at = at.min(self.b.len());
        let line = self.b[..at].iter().filter(|&&c| c == b'\n').count() + 1;
        let location = if self.binary {
            format!("line {line}, byte {at} ({})", self.section)
        } else {
            format!("line {line} ({})", self.section)
        };
        IoError::Syntax {
            file: self.file.to_string(),
            location,
            found: found.into(),
            expected: expected.into(),
        }
    }

    fn remaining(&self) -> usize {
        self.b.len() - self.pos.min(self.b.len())
    }

    /// Refuses a count whose items, at `min_bytes` each, cannot fit in the rest of the file.
    fn check_count(&self, n: u64, min_bytes: u64, what: &str) -> Result<usize, IoError> {
        let need = (n as f64) * (min_bytes as f64);
        if need > self.remaining() as f64 || n > usize::MAX as u64 / 64 {
            return Err(IoError::TooLarge {
                file: self.file.to_string(),
                what: format!("{what} ({})", self.section),
                count: n,
                needed: format!("at least {} after byte {}", human_bytes(need), self.pos),
                size: human_bytes(self.b.len() as f64),
            });
        }
        Ok(n as usize)
    }

    fn skip_ws(&mut self) {
        while self.pos < self.b.len() && self.b[self.pos].is_ascii_whitespace() {
            self.pos += 1;
        }
    }

    /// The rest of the current line (without its end), consuming the line end.
    fn rest_of_line(&mut self) -> &'a [u8] {
        let start = self.pos.min(self.b.len());
        let end = self.b[start..]
            .iter()
            .position(|&c| c == b'\n')
            .map_or(self.b.len(), |i| start + i);
        self.pos = (end + 1).min(self.b.len());
        let mut line = &self.b[start..end];
        if line.last() == Some(&b'\r') {
            line = &line[..line.len() - 1];
        }
        line
    }

    /// After the last text value before binary data: the rest of its line must be blank.
    fn end_text_line(&mut self) -> Result<(), IoError> {
        let at = self.pos;
        let rest = self.rest_of_line();
        if rest.iter().any(|c| !c.is_ascii_whitespace()) {
            return Err(self.err(at, snippet(rest), "the end of the line before binary data"));
        }
        Ok(())
    }

    fn token(&mut self, what: &str) -> Result<&'a [u8], IoError> {
        self.skip_ws();
        let start = self.pos;
        while self.pos < self.b.len() && !self.b[self.pos].is_ascii_whitespace() {
            self.pos += 1;
        }
        if start == self.pos {
            return Err(self.err(start, "end of file", what.to_string()));
        }
        Ok(&self.b[start..self.pos])
    }

    fn text_u64(&mut self, what: &str) -> Result<u64, IoError> {
        let tok = self.token(what)?;
        let mut v: u64 = 0;
        let ok = !tok.is_empty()
            && tok.iter().all(|&c| {
                c.is_ascii_digit() && {
                    match v
                        .checked_mul(10)
                        .and_then(|x| x.checked_add((c - b'0') as u64))
                    {
                        Some(x) => {
                            v = x;
                            true
                        }
                        None => false,
                    }
                }
            });
        if ok {
            Ok(v)
        } else {
            Err(self.err(
                self.pos - tok.len(),
                snippet(tok),
                format!("{what} (a non-negative integer)"),
            ))
        }
    }

    /// The next token parsed as `T`; `kind` says what `T` is in messages ("an integer").
    fn text_value<T: std::str::FromStr>(&mut self, what: &str, kind: &str) -> Result<T, IoError> {
        let tok = self.token(what)?;
        std::str::from_utf8(tok)
            .ok()
            .and_then(|s| s.parse::<T>().ok())
            .ok_or_else(|| {
                self.err(
                    self.pos - tok.len(),
                    snippet(tok),
                    format!("{what} ({kind})"),
                )
            })
    }

    fn text_i64(&mut self, what: &str) -> Result<i64, IoError> {
        self.text_value(what, "an integer")
    }

    fn text_f64(&mut self, what: &str) -> Result<f64, IoError> {
        self.text_value(what, "a number")
    }

    fn take(&mut self, n: usize, what: &str) -> Result<&'a [u8], IoError> {
        if n > self.remaining() {
            return Err(self.err(
                self.pos,
                format!("end of file after {} bytes", self.remaining()),
                format!("{n} bytes of {what} (truncated file?)"),
            ));
        }
        let s = &self.b[self.pos..self.pos + n];
        self.pos += n;
        Ok(s)
    }

    #[inline]
    fn word(&self, bytes: &[u8]) -> u64 {
        match (bytes.len(), self.big_endian) {
            (4, false) => u32::from_le_bytes([bytes[0], bytes[1], bytes[2], bytes[3]]) as u64,
            (4, true) => u32::from_be_bytes([bytes[0], bytes[1], bytes[2], bytes[3]]) as u64,
            (_, false) => u64::from_le_bytes(std::array::from_fn(|i| bytes[i])),
            (_, true) => u64::from_be_bytes(std::array::from_fn(|i| bytes[i])),
        }
    }

    #[inline]
    fn real_of(&self, bytes: &[u8]) -> f64 {
        f64::from_bits(self.word(&bytes[..8]))
    }

    #[inline]
    fn int_of(&self, bytes: &[u8]) -> i64 {
        self.word(&bytes[..4]) as u32 as i32 as i64
    }

    /// A `size_t` value (count or tag): binary or text.
    fn size(&mut self, what: &str) -> Result<u64, IoError> {
        if self.binary {
            let b = self.take(self.size_t, what)?;
            Ok(self.word(b))
        } else {
            self.text_u64(what)
        }
    }

    /// An `int` value: binary int32 or text.
    fn int(&mut self, what: &str) -> Result<i64, IoError> {
        if self.binary {
            let b = self.take(4, what)?;
            Ok(self.int_of(b))
        } else {
            self.text_i64(what)
        }
    }

    /// A `double` value: binary or text.
    fn real(&mut self, what: &str) -> Result<f64, IoError> {
        if self.binary {
            let b = self.take(8, what)?;
            Ok(self.real_of(b))
        } else {
            self.text_f64(what)
        }
    }

    /// Expects `$End<name>` (after optional whitespace) and consumes its line.
    fn end_section(&mut self, name: &str) -> Result<(), IoError> {
        self.skip_ws();
        let want = format!("$End{name}");
        let at = self.pos;
        if !self.b[at..].starts_with(want.as_bytes()) {
            return Err(self.err(at, snippet(&self.b[at..]), want));
        }
        let line = self.rest_of_line();
        if line[want.len()..].iter().any(|c| !c.is_ascii_whitespace()) {
            return Err(self.err(at, snippet(line), want));
        }
        Ok(())
    }

    /// Skips a section this reader does not use, up to and including its `$End<name>` line.
    fn skip_section(&mut self, name: &str) -> Result<(), IoError> {
        let want = format!("$End{name}");
        let w = want.as_bytes();
        let found = self.b[self.pos..]
            .windows(w.len())
            .position(|s| s == w)
            .map(|i| self.pos + i);
        match found {
            Some(i) => {
                self.pos = i;
                Ok(())
            }
            None => Err(self.err(self.pos, "end of file", format!("{want} closing ${name}"))),
        }
    }
}

// ------------------------------------------------------------------------------------------
// Sections

fn mesh_format(p: &mut Parser) -> Result<(), IoError> {
    let at = p.pos;
    let version = p.token("the format version")?;
    if version != b"4.1" {
        return Err(p.err(
            at,
            format!("MSH version {}", String::from_utf8_lossy(version)),
            "version 4.1",
        ));
    }
    let file_type = p.text_u64("the file type (0 ASCII, 1 binary)")?;
    let at = p.pos;
    let size_t = p.text_u64("the data size (sizeof(size_t))")?;
    p.binary = match file_type {
        0 => false,
        1 => true,
        t => {
            return Err(p.err(at, format!("file type {t}"), "0 (ASCII) or 1 (binary)"));
        }
    };
    if size_t != 8 && size_t != 4 {
        return Err(p.err(at, format!("data size {size_t}"), "8 or 4"));
    }
    p.size_t = size_t as usize;
    if p.binary {
        p.end_text_line()?;
        let at = p.pos;
        let one = p.take(4, "the integer 1 that gives the byte order")?;
        p.big_endian = if u32::from_le_bytes([one[0], one[1], one[2], one[3]]) == 1 {
            false
        } else if u32::from_be_bytes([one[0], one[1], one[2], one[3]]) == 1 {
            true
        } else {
            return Err(p.err(
                at,
                format!("bytes {:02x?}", one),
                "the integer 1 in the writer's byte order",
            ));
        };
    }
    Ok(())
}

/// First physical tag of each entity, keyed by (dimension, entity tag).
type Physical = HashMap<(usize, i64), i64>;

fn entities(p: &mut Parser) -> Result<Physical, IoError> {
    let mut counts = [0u64; 4];
    for (d, c) in counts.iter_mut().enumerate() {
        *c = p.size(&format!("the number of entities of dimension {d}"))?;
    }
    let mut out = Physical::new();
    for (d, &n) in counts.iter().enumerate() {
        let n = p.check_count(n, 8, &format!("number of entities of dimension {d}"))?;
        for _ in 0..n {
            let tag = p.int("an entity tag")?;
            for _ in 0..(if d == 0 { 3 } else { 6 }) {
                p.real("an entity bounding-box coordinate")?;
            }
            let np = p.size("the number of physical tags")?;
            let np = p.check_count(np, 1, "number of physical tags")?;
            for k in 0..np {
                let phys = p.int("a physical tag")?;
                if k == 0 {
                    out.insert((d, tag), phys);
                }
            }
            if d > 0 {
                let nb = p.size("the number of bounding entities")?;
                let nb = p.check_count(nb, 1, "number of bounding entities")?;
                for _ in 0..nb {
                    p.int("a bounding entity tag")?;
                }
            }
        }
    }
    Ok(out)
}

/// From sparse 1-based tags to dense 0-based indices.
enum TagIndex {
    /// `idx[tag - min]`, `u32::MAX` where no item has the tag.
    Dense { min: u64, idx: Vec<u32> },
    /// Sorted (tag, index) pairs, for very sparse tags.
    Sorted(Vec<(u64, u32)>),
}

impl TagIndex {
    /// Builds the index of `tags` (item `i` has tag `tags[i]`); returns the first repeated tag
    /// as the error.
    fn new(tags: &[u64]) -> Result<TagIndex, u64> {
        if tags.is_empty() {
            return Ok(TagIndex::Sorted(Vec::new()));
        }
        let (min, max) = tags
            .iter()
            .fold((u64::MAX, 0), |(lo, hi), &t| (lo.min(t), hi.max(t)));
        let span = max - min;
        if span <= 2 * tags.len() as u64 + 1024 {
            let mut idx = vec![u32::MAX; span as usize + 1];
            for (i, &t) in tags.iter().enumerate() {
                let slot = &mut idx[(t - min) as usize];
                if *slot != u32::MAX {
                    return Err(t);
                }
                *slot = i as u32;
            }
            Ok(TagIndex::Dense { min, idx })
        } else {
            let mut pairs: Vec<(u64, u32)> = tags
                .iter()
                .enumerate()
                .map(|(i, &t)| (t, i as u32))
                .collect();
            pairs.par_sort_unstable();
            if let Some(w) = pairs.windows(2).find(|w| w[0].0 == w[1].0) {
                return Err(w[0].0);
            }
            Ok(TagIndex::Sorted(pairs))
        }
    }

    #[inline]
    fn get(&self, tag: u64) -> Option<u32> {
        match self {
            TagIndex::Dense { min, idx } => {
                let i = tag.checked_sub(*min)?;
                idx.get(usize::try_from(i).ok()?)
                    .copied()
                    .filter(|&v| v != u32::MAX)
            }
            TagIndex::Sorted(pairs) => pairs
                .binary_search_by_key(&tag, |&(t, _)| t)
                .ok()
                .map(|k| pairs[k].1),
        }
    }
}

struct Nodes {
    points: Vec<[f64; 3]>,
    index: TagIndex,
}

fn nodes(p: &mut Parser) -> Result<Nodes, IoError> {
    let blocks = p.size("the number of entity blocks")?;
    let total = p.size("the number of nodes")?;
    p.size("the smallest node tag")?;
    p.size("the largest node tag")?;
    let per_node = if p.binary { p.size_t as u64 + 24 } else { 8 };
    let total = p.check_count(total, per_node, "numNodes")?;
    let blocks = p.check_count(blocks, 4, "numEntityBlocks")?;
    let mut tags: Vec<u64> = Vec::with_capacity(total);
    let mut points: Vec<[f64; 3]> = Vec::with_capacity(total);
    for _ in 0..blocks {
        let dim = p.int("the entity dimension")?;
        p.int("the entity tag")?;
        let parametric = p.int("the parametric flag")?;
        let at = p.pos;
        let n = p.size("the number of nodes in the block")?;
        if n > (total - tags.len()) as u64 {
            return Err(p.err(
                at,
                format!("a block of {n} nodes after {} nodes", tags.len()),
                format!("{total} nodes in all, as the section header says"),
            ));
        }
        let n = n as usize;
        let extra = match (parametric, dim) {
            (0, _) => 0,
            (1, d @ 0..=3) => d as usize,
            _ => {
                return Err(p.err(
                    at,
                    format!("parametric flag {parametric} for an entity of dimension {dim}"),
                    "parametric 0 or 1 and a dimension 0 to 3",
                ))
            }
        };
        let at = p.pos;
        if p.binary {
            let st = p.size_t;
            let raw = p.take(n * st, "node tags")?;
            tags.extend(raw.chunks_exact(st).map(|c| p.word(c)));
            let nc = 3 + extra;
            let raw = p.take(n * nc * 8, "node coordinates")?;
            points.extend(raw.chunks_exact(nc * 8).map(|c| {
                [
                    p.real_of(&c[0..8]),
                    p.real_of(&c[8..16]),
                    p.real_of(&c[16..24]),
                ]
            }));
        } else {
            for _ in 0..n {
                tags.push(p.text_u64("a node tag")?);
            }
            for _ in 0..n {
                let x = p.text_f64("a node x coordinate")?;
                let y = p.text_f64("a node y coordinate")?;
                let z = p.text_f64("a node z coordinate")?;
                for _ in 0..extra {
                    p.text_f64("a parametric coordinate")?;
                }
                points.push([x, y, z]);
            }
        }
        let first = points.len() - n;
        if let Some(i) = points[first..]
            .iter()
            .position(|q| q.iter().any(|v| !v.is_finite()))
        {
            return Err(p.err(
                at,
                format!(
                    "node {} with coordinates {:?}",
                    tags[first + i],
                    points[first + i]
                ),
                "finite coordinates",
            ));
        }
        if tags[first..].contains(&0) {
            return Err(p.err(at, "node tag 0", "node tags of 1 or more"));
        }
    }
    if tags.len() != total {
        return Err(p.err(
            p.pos,
            format!("{} nodes in the blocks", tags.len()),
            format!("{total} nodes, as the section header says"),
        ));
    }
    let index = TagIndex::new(&tags)
        .map_err(|t| p.err(p.pos, format!("node tag {t} twice"), "unique node tags"))?;
    Ok(Nodes { points, index })
}

/// Elements of one entity block that are kept as cells.
struct KeptBlock {
    ty: &'static GmshType,
    entity: i64,
    /// Node indices in VTK order (or as written when the type has no VTK id).
    nodes: Vec<u32>,
    tags: Vec<u64>,
}

/// The cells of the file: elements of the highest dimension.
struct Cells {
    blocks: Vec<KeptBlock>,
    index: TagIndex,
    /// Tags of the left-out lower-dimension elements, sorted.
    skipped: Vec<u64>,
    count: usize,
}

fn elements(p: &mut Parser, node_index: &TagIndex) -> Result<Cells, IoError> {
    let blocks = p.size("the number of entity blocks")?;
    let total = p.size("the number of elements")?;
    p.size("the smallest element tag")?;
    p.size("the largest element tag")?;
    let per_elem = if p.binary { 2 * p.size_t as u64 } else { 4 };
    let total = p.check_count(total, per_elem, "numElements")?;
    let blocks = p.check_count(blocks, 4, "numEntityBlocks")?;
    let mut kept: Vec<KeptBlock> = Vec::new();
    let mut skipped: Vec<u64> = Vec::new();
    let mut max_dim = 0usize;
    let mut read = 0usize;
    for _ in 0..blocks {
        let dim = p.int("the entity dimension")?;
        let entity = p.int("the entity tag")?;
        let at = p.pos;
        let number = p.int("the element type")?;
        let ty = gmsh_type(number as i32).filter(|_| number == number as i32 as i64);
        let Some(ty) = ty else {
            return Err(p.err(
                at,
                format!("element type {number}"),
                "a Gmsh element type up to third order (1-21, 26-29, 36, 92)",
            ));
        };
        if dim != ty.dim as i64 {
            return Err(p.err(
                at,
                format!("a {} in an entity of dimension {dim}", ty.name),
                format!("entity dimension {}", ty.dim),
            ));
        }
        let at = p.pos;
        let n = p.size("the number of elements in the block")?;
        if n > (total - read) as u64 {
            return Err(p.err(
                at,
                format!("a block of {n} elements after {read} elements"),
                format!("{total} elements in all, as the section header says"),
            ));
        }
        let nn = ty.nodes;
        // A row is at least its 1 + nn numbers: "1 " each in text, size_t each in binary.
        let per_row = (1 + nn as u64) * if p.binary { p.size_t as u64 } else { 2 };
        let n = p.check_count(n, per_row, "numElementsInBlock")?;
        read += n;
        // Tags and node tags as read, one row per element.
        let mut rows: Vec<u64> = Vec::with_capacity(n * (1 + nn));
        if p.binary {
            let st = p.size_t;
            let raw = p.take(n * (1 + nn) * st, "element rows")?;
            rows.extend(raw.chunks_exact(st).map(|c| p.word(c)));
        } else {
            for _ in 0..n {
                rows.push(p.text_u64("an element tag")?);
                for _ in 0..nn {
                    rows.push(p.text_u64("a node tag of an element")?);
                }
            }
        }
        if ty.dim < max_dim {
            skipped.extend(rows.iter().step_by(1 + nn));
            continue;
        }
        if ty.dim > max_dim {
            for b in kept.drain(..) {
                skipped.extend(b.tags);
            }
            max_dim = ty.dim;
        }
        let mut nodes = vec![0u32; n * nn];
        let missing = nodes
            .par_chunks_mut(nn)
            .zip(rows.par_chunks(1 + nn))
            .find_map_any(|(out, row)| {
                for (k, slot) in out.iter_mut().enumerate() {
                    let g = if ty.p.is_empty() { k } else { ty.p[k] };
                    match node_index.get(row[1 + g]) {
                        Some(i) => *slot = i,
                        None => return Some((row[0], row[1 + g])),
                    }
                }
                None
            });
        if let Some((elem, node)) = missing {
            return Err(p.err(
                at,
                format!("element {elem} uses node {node}, which $Nodes does not have"),
                "node tags listed in $Nodes",
            ));
        }
        let tags: Vec<u64> = rows.iter().step_by(1 + nn).copied().collect();
        kept.push(KeptBlock {
            ty,
            entity,
            nodes,
            tags,
        });
    }
    if read != total {
        return Err(p.err(
            p.pos,
            format!("{read} elements in the blocks"),
            format!("{total} elements, as the section header says"),
        ));
    }
    if let Some(b) = kept.iter().find(|b| b.ty.vtk.is_none()) {
        return Err(p.err(
            p.pos,
            format!(
                "{} {}-node elements (Gmsh type {}), {}D like the mesh",
                b.tags.len(),
                b.ty.nodes,
                b.ty.gmsh,
                b.ty.dim
            ),
            "element types with a VTK counterpart (hone reads tri3/6, quad4/8/9, tet4/10, \
             hex8/20/27, prism6/15)",
        ));
    }
    let tags: Vec<u64> = kept.iter().flat_map(|b| b.tags.iter().copied()).collect();
    let index = TagIndex::new(&tags).map_err(|t| {
        p.err(
            p.pos,
            format!("element tag {t} twice"),
            "unique element tags",
        )
    })?;
    skipped.par_sort_unstable();
    Ok(Cells {
        blocks: kept,
        index,
        skipped,
        count: tags.len(),
    })
}

/// What a data section's rows refer to.
enum Target<'a> {
    Nodes(&'a Nodes),
    Cells(&'a Cells),
}

/// One view being gathered.
struct View {
    name: String,
    components: usize,
    step: i64,
    values: Vec<f64>,
}

fn data_section(p: &mut Parser, target: Target, views: &mut Vec<View>) -> Result<(), IoError> {
    // Headers are text in binary files too.
    let binary = std::mem::replace(&mut p.binary, false);
    let result = data_header_and_rows(p, target, views, binary);
    p.binary = binary;
    result
}

fn data_header_and_rows(
    p: &mut Parser,
    target: Target,
    views: &mut Vec<View>,
    binary: bool,
) -> Result<(), IoError> {
    let n_str = p.text_u64("the number of string tags")?;
    let n_str = p.check_count(n_str, 1, "number of string tags")?;
    p.end_text_line()?;
    let mut name = String::new();
    for k in 0..n_str {
        p.skip_ws();
        let line = p.rest_of_line();
        if k == 0 {
            let text = String::from_utf8_lossy(line);
            name = text.trim().trim_matches('"').to_string();
        }
    }
    let n_real = p.text_u64("the number of real tags")?;
    let n_real = p.check_count(n_real, 1, "number of real tags")?;
    for _ in 0..n_real {
        p.text_f64("a real tag")?;
    }
    let at = p.pos;
    let n_int = p.text_u64("the number of integer tags")?;
    let n_int = p.check_count(n_int, 1, "number of integer tags")?;
    let mut ints = Vec::with_capacity(n_int);
    for _ in 0..n_int {
        ints.push(p.text_i64("an integer tag")?);
    }
    if ints.len() < 3 {
        return Err(p.err(
            at,
            format!("{} integer tags", ints.len()),
            "at least 3 (time step, components, count)",
        ));
    }
    let (step, comps, count) = (ints[0], ints[1], ints[2]);
    if !(1..=9).contains(&comps) || count < 0 {
        return Err(p.err(
            at,
            format!("{comps} components and {count} rows"),
            "1 to 9 components and a non-negative row count",
        ));
    }
    let comps = comps as usize;
    if binary {
        p.end_text_line()?;
    }
    p.binary = binary;
    let row_bytes = if binary { 4 + 8 * comps as u64 } else { 4 };
    let count = p.check_count(count as u64, row_bytes, "number of data rows")?;
    let len = match &target {
        Target::Nodes(n) => n.points.len(),
        Target::Cells(c) => c.count,
    };
    let slot = match views.iter().position(|v| v.name == name) {
        Some(i) => {
            let v = &mut views[i];
            if v.components != comps {
                return Err(p.err(
                    at,
                    format!("view '{name}' with {comps} components"),
                    format!("{} components, as its earlier section", v.components),
                ));
            }
            if step > v.step {
                v.step = step;
                v.values.fill(f64::NAN);
            }
            if step < v.step {
                None
            } else {
                Some(i)
            }
        }
        None => {
            views.push(View {
                name: name.clone(),
                components: comps,
                step,
                values: vec![f64::NAN; len * comps],
            });
            Some(views.len() - 1)
        }
    };
    let mut row = [0.0f64; 9];
    for r in 0..count {
        let at = p.pos;
        let tag = p.int("a row tag")?;
        for v in row.iter_mut().take(comps) {
            *v = p.real("a data value")?;
        }
        let Some(i) = slot else { continue };
        let found = match &target {
            Target::Nodes(n) => u64::try_from(tag).ok().and_then(|t| n.index.get(t)),
            Target::Cells(c) => {
                let hit = u64::try_from(tag).ok().and_then(|t| c.index.get(t));
                if hit.is_none()
                    && u64::try_from(tag).is_ok_and(|t| c.skipped.binary_search(&t).is_ok())
                {
                    continue;
                }
                hit
            }
        };
        let Some(k) = found else {
            let what = match target {
                Target::Nodes(_) => "node",
                Target::Cells(_) => "element",
            };
            return Err(p.err(
                at,
                format!("row {r} of view '{name}' for {what} tag {tag}"),
                format!("{what} tags listed in ${}s", capital(what)),
            ));
        };
        let k = k as usize;
        views[i].values[k * comps..(k + 1) * comps].copy_from_slice(&row[..comps]);
    }
    p.binary = false;
    Ok(())
}

fn capital(what: &str) -> &'static str {
    if what == "node" {
        "Node"
    } else {
        "Element"
    }
}

#[derive(Default)]
struct State {
    physical: Physical,
    nodes: Option<Nodes>,
    cells: Option<Cells>,
    point_views: Vec<View>,
    cell_views: Vec<View>,
}

fn finish(p: &Parser, st: State) -> Result<RawGrid, IoError> {
    let Some(nodes) = st.nodes else {
        return Err(p.err(p.pos, "no $Nodes section", "a $Nodes section"));
    };
    let Some(cells) = st.cells else {
        return Err(p.err(p.pos, "no $Elements section", "an $Elements section"));
    };
    let mut connectivity = Vec::with_capacity(cells.blocks.iter().map(|b| b.nodes.len()).sum());
    let mut offsets = Vec::with_capacity(cells.count);
    let mut types = Vec::with_capacity(cells.count);
    let mut entity = Vec::with_capacity(cells.count);
    let mut physical = Vec::with_capacity(cells.count);
    for b in &cells.blocks {
        let nn = b.ty.nodes;
        let vtk = b.ty.vtk.unwrap_or(0);
        let phys = st.physical.get(&(b.ty.dim, b.entity)).copied().unwrap_or(0);
        for cell in b.nodes.chunks_exact(nn) {
            connectivity.extend_from_slice(cell);
            offsets.push(connectivity.len() as u64);
            types.push(vtk);
            entity.push(b.entity as f64);
            physical.push(phys as f64);
        }
    }
    let array = |name: String, components: usize, values: Vec<f64>, st: ScalarType| DataArray {
        name,
        components,
        scalar_type: st,
        values,
    };
    let mut cell_data = vec![
        array("gmsh_entity".into(), 1, entity, ScalarType::Int32),
        array("gmsh_physical".into(), 1, physical, ScalarType::Int32),
    ];
    cell_data.extend(
        st.cell_views
            .into_iter()
            .map(|v| array(v.name, v.components, v.values, ScalarType::Float64)),
    );
    let point_data = st
        .point_views
        .into_iter()
        .map(|v| array(v.name, v.components, v.values, ScalarType::Float64))
        .collect();
    Ok(RawGrid {
        points: nodes.points,
        connectivity,
        offsets,
        types,
        point_data,
        cell_data,
    })
}

// ------------------------------------------------------------------------------------------
// Writing

/// Writes `mesh` with the nodal size field `sizes` (one target edge length per mesh node) as an
/// ASCII MSH 4.1 file, atomically, refusing to overwrite `protect` (the input file).
///
/// The file carries the field on the linear mesh of the corners, as a mesher's background
/// field is read (the `.pos` and MEDIT outputs do the same): the corner nodes in one entity
/// block (dimension `mesh.dimension`, tag 1, tags 1.. in increasing node order), one element
/// block per cell block of the mesh with each element as its linear counterpart (3-node
/// triangles, 4-node quadrangles and tetrahedra, 8-node hexahedra, 6-node prisms) in Gmsh node
/// order (prisms mirrored to Gmsh's handedness), tags 1..E in hone's element order, and a
/// `$NodeData` view `size_target` (time 0.0, step 0, 1 component) at the corners. Mid-side and
/// face nodes are left out: a plan's size field is linear between corners there (on a 1M
/// tet10 mesh this makes the file 4 times smaller).
pub fn write_msh_size_field(
    path: &Path,
    protect: Option<&Path>,
    mesh: &Mesh,
    sizes: &[f64],
) -> Result<(), IoError> {
    write_msh_text(path, protect, mesh, &NodeText::checked(path, mesh, sizes)?)
}

/// [`write_msh_size_field`] with the numbers already formatted and checked.
pub(crate) fn write_msh_text(
    path: &Path,
    protect: Option<&Path>,
    mesh: &Mesh,
    text: &NodeText,
) -> Result<(), IoError> {
    let n = text.corners().len();
    let e = mesh.element_count();
    let dim = mesh.dimension;
    write_atomically(path, protect, |w| {
        let mut head = Vec::new();
        head.extend_from_slice(b"$MeshFormat\n4.1 0 8\n$EndMeshFormat\n$Nodes\n");
        let (lo, hi) = if n == 0 { (0, 0) } else { (1, n) };
        head.extend_from_slice(format!("1 {n} {lo} {hi}\n{dim} 1 0 {n}\n").as_bytes());
        w.write_all(&head)?;
        write_chunked(w, n, |r, buf| {
            for k in r {
                push_int(buf, k + 1);
                buf.push(b'\n');
            }
        })?;
        write_chunked(w, n, |r, buf| {
            for k in r {
                text.push_corner_coord(buf, k, 0);
                buf.push(b' ');
                text.push_corner_coord(buf, k, 1);
                buf.push(b' ');
                text.push_corner_coord(buf, k, 2);
                buf.push(b'\n');
            }
        })?;
        let (lo, hi) = if e == 0 { (0, 0) } else { (1, e) };
        w.write_all(
            format!(
                "$EndNodes\n$Elements\n{} {e} {lo} {hi}\n",
                mesh.blocks.len()
            )
            .as_bytes(),
        )?;
        for b in &mesh.blocks {
            let linear = b.kind.linear();
            let nv = linear.node_count();
            let q = vtk_to_gmsh(linear);
            w.write_all(format!("{dim} 1 {} {}\n", gmsh_number(linear), b.len()).as_bytes())?;
            write_chunked(w, b.len(), |r, buf| {
                for i in r {
                    push_int(buf, b.first_element + i + 1);
                    let cell = b.cell(i);
                    for &k in &q[..nv] {
                        buf.push(b' ');
                        push_int(buf, text.number(cell[k]));
                    }
                    buf.push(b'\n');
                }
            })?;
        }
        w.write_all(
            format!("$EndElements\n$NodeData\n1\n\"size_target\"\n1\n0.0\n3\n0\n1\n{n}\n")
                .as_bytes(),
        )?;
        write_chunked(w, n, |r, buf| {
            for k in r {
                push_int(buf, k + 1);
                buf.push(b' ');
                text.push_corner_size(buf, k);
                buf.push(b'\n');
            }
        })?;
        w.write_all(b"$EndNodeData\n")
    })
}

#[cfg(test)]
#[path = "msh_tests.rs"]
mod tests;
