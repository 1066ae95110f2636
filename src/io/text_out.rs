//! Shared pieces of the text writers (MSH, `.pos`, MEDIT): number formatting that reads back
//! to the same `f64`, parallel formatting of big sections, and checks of the size field.

use std::io::{self, Write};
use std::ops::Range;

use rayon::prelude::*;

use super::error::IoError;
use crate::mesh::Mesh;
use std::path::Path;

/// Items formatted per parallel task. Chunk boundaries depend on the item count only, and the
/// chunks are written in order, so the bytes do not depend on the thread count.
pub(crate) const CHUNK: usize = 16_384;

/// Chunks formatted before they are written: bounds the memory held by formatted text. The
/// plan writes its files side by side, so a few chunks per file keep every core busy: on 1M
/// tet10 (2 cores) 4 chunks wrote as fast as 16 (1.09-1.14 s against 1.02-1.37 s) with the
/// plan's peak memory at 648 MB instead of 770 MB.
pub(crate) const CHUNKS_IN_FLIGHT: usize = 4;

/// Appends `v` in its shortest round-trip form (`0.5`, `1.0`, `1e-7`, `2.5e20`), which C's
/// `strtod`, Python's `float`, JSON parsers and Gmsh's parser read back to the same value. The
/// digits come from `zmij` (Schubfach-based, already in the tree through serde_json), several
/// times faster than `fmt`, which matters for the gigabyte-sized text outputs of big meshes.
/// Non-finite values print as `NaN`, `inf`, `-inf` (callers check finiteness first).
#[inline]
pub(crate) fn push_f64(out: &mut Vec<u8>, v: f64) {
    let mut buffer = zmij::Buffer::new();
    out.extend_from_slice(buffer.format(v).as_bytes());
}

/// Longest text of [`push_f64`] (`-2.2250738585072014e-308`; zmij's own buffer size).
const NUMBER_TEXT_MAX: usize = 24;

/// Numbers formatted once by [`push_f64`], for writers that print the same value many times
/// (a node's coordinates in every simplex of a `.pos` view) or in several files (coordinates and
/// sizes in MSH, CSV and MEDIT). Copying the bytes is several times cheaper than formatting
/// again. Each number takes 25 bytes.
pub(crate) struct NumberText {
    slots: Vec<([u8; NUMBER_TEXT_MAX], u8)>,
}

impl NumberText {
    /// Formats `values` in parallel (the text of a value never depends on the thread count).
    pub(crate) fn new(values: &[f64]) -> Self {
        let slots = values
            .par_iter()
            .with_min_len(4096)
            .map(|&v| {
                let mut buffer = zmij::Buffer::new();
                let text = buffer.format(v).as_bytes();
                let mut slot = [0u8; NUMBER_TEXT_MAX];
                slot[..text.len()].copy_from_slice(text);
                (slot, text.len() as u8)
            })
            .collect();
        Self { slots }
    }

    /// Appends the text of value `i`.
    #[inline]
    pub(crate) fn push(&self, out: &mut Vec<u8>, i: usize) {
        let (bytes, len) = &self.slots[i];
        // A fixed-size copy of the whole slot, then the tail cut off: cheaper than a
        // variable-length copy for the tens of millions of numbers of a big `.pos` view.
        let at = out.len();
        out.extend_from_slice(bytes);
        out.truncate(at + *len as usize);
    }
}

/// The corner (vertex) nodes of a mesh with the coordinates and sizes of a nodal size field
/// formatted once, shared by the `.pos`, MSH and MEDIT writers of one plan. These files carry
/// the field on the linear mesh of the corners: a plan's field is linear between corners
/// (the planner gives mid-side and face nodes the interpolation of their element's corners),
/// so the corners hold all of it.
pub(crate) struct NodeText {
    /// Corner number of each mesh node, 1.. in node order; 0 for a node that is no corner.
    number: Vec<u32>,
    /// Node index of each corner, in corner order.
    corners: Vec<u32>,
    /// `x, y, z` of corner `k` at `3 k .. 3 k + 3`.
    coords: NumberText,
    /// Size of corner `k`.
    sizes: NumberText,
}

impl NodeText {
    /// Checks `sizes` against `mesh` ([`check_sizes`]; `path` names the output in errors),
    /// then numbers the corners and formats their coordinates and sizes.
    pub(crate) fn checked(path: &Path, mesh: &Mesh, sizes: &[f64]) -> Result<Self, IoError> {
        check_sizes(&path.display().to_string(), mesh.node_count(), sizes)?;
        let mut number = vec![0u32; mesh.node_count()];
        for b in &mesh.blocks {
            let nv = b.kind.vertex_count();
            for i in 0..b.len() {
                for &v in &b.cell(i)[..nv] {
                    number[v as usize] = 1;
                }
            }
        }
        let mut corners: Vec<u32> = Vec::new();
        for (v, slot) in number.iter_mut().enumerate() {
            if *slot != 0 {
                corners.push(v as u32);
                *slot = corners.len() as u32;
            }
        }
        let coords: Vec<f64> = corners
            .iter()
            .flat_map(|&v| mesh.points[v as usize])
            .collect();
        let corner_sizes: Vec<f64> = corners.iter().map(|&v| sizes[v as usize]).collect();
        Ok(Self {
            number,
            corners,
            coords: NumberText::new(&coords),
            sizes: NumberText::new(&corner_sizes),
        })
    }

    /// Node index of each corner, in corner order.
    pub(crate) fn corners(&self) -> &[u32] {
        &self.corners
    }

    /// Corner number (1..) of mesh node `node`, 0 when it is no corner.
    #[inline]
    pub(crate) fn number(&self, node: u32) -> u32 {
        self.number[node as usize]
    }

    /// Appends coordinate `c` of corner `k` (0-based corner order).
    #[inline]
    pub(crate) fn push_corner_coord(&self, out: &mut Vec<u8>, k: usize, c: usize) {
        self.coords.push(out, 3 * k + c);
    }

    /// Appends the size of corner `k` (0-based corner order).
    #[inline]
    pub(crate) fn push_corner_size(&self, out: &mut Vec<u8>, k: usize) {
        self.sizes.push(out, k);
    }

    /// Appends coordinate `c` of mesh node `node`, which must be a corner.
    #[inline]
    pub(crate) fn push_coord(&self, out: &mut Vec<u8>, node: u32, c: usize) {
        self.push_corner_coord(out, self.number(node) as usize - 1, c);
    }

    /// Appends the size of mesh node `node`, which must be a corner.
    #[inline]
    pub(crate) fn push_size(&self, out: &mut Vec<u8>, node: u32) {
        self.push_corner_size(out, self.number(node) as usize - 1);
    }
}

/// Appends an integer.
#[inline]
pub(crate) fn push_int(out: &mut Vec<u8>, v: impl int_text::Int) {
    v.push(out);
}

/// Integer formatting without going through `fmt` for each digit string.
pub(crate) mod int_text {
    /// Integers the writers print.
    pub(crate) trait Int: Copy {
        /// Appends the decimal digits.
        fn push(self, out: &mut Vec<u8>);
    }

    impl Int for u64 {
        #[inline]
        fn push(self, out: &mut Vec<u8>) {
            // Digits written front to back into a fixed buffer, copied whole and cut to length
            // (a fixed-size copy instead of a variable-length one, as in `NumberText::push`).
            let digits = self.checked_ilog10().unwrap_or(0) as usize + 1;
            let mut buf = [0u8; 20];
            let mut v = self;
            for d in buf[..digits].iter_mut().rev() {
                *d = b'0' + (v % 10) as u8;
                v /= 10;
            }
            let at = out.len();
            out.extend_from_slice(&buf);
            out.truncate(at + digits);
        }
    }

    impl Int for usize {
        #[inline]
        fn push(self, out: &mut Vec<u8>) {
            (self as u64).push(out)
        }
    }

    impl Int for u32 {
        #[inline]
        fn push(self, out: &mut Vec<u8>) {
            (self as u64).push(out)
        }
    }

    impl Int for i64 {
        #[inline]
        fn push(self, out: &mut Vec<u8>) {
            if self < 0 {
                out.push(b'-');
            }
            self.unsigned_abs().push(out)
        }
    }
}

/// Formats items `0..n` with `f(range, buffer)` in chunks of [`CHUNK`] items on the rayon pool
/// and writes the chunks in order. The chunk buffers are reused from batch to batch, so a
/// gigabyte-sized section costs no fresh allocation (page faults) after the first batch.
pub(crate) fn write_chunked(
    w: &mut dyn Write,
    n: usize,
    f: impl Fn(Range<usize>, &mut Vec<u8>) + Sync,
) -> io::Result<()> {
    write_chunked_to([w], n, |r, [buf]| f(r, buf))
}

/// [`write_chunked`] into `K` files at once: `f(range, buffers)` formats each chunk into one
/// buffer per file, so files that print the same numbers (plan.json and plan.csv) format them
/// once. Each file gets its chunks in order.
pub(crate) fn write_chunked_to<const K: usize>(
    mut w: [&mut dyn Write; K],
    n: usize,
    f: impl Fn(Range<usize>, &mut [Vec<u8>; K]) + Sync,
) -> io::Result<()> {
    let batch = CHUNK * CHUNKS_IN_FLIGHT;
    let mut buffers: Vec<[Vec<u8>; K]> = Vec::new();
    let mut start = 0;
    while start < n {
        let end = (start + batch).min(n);
        let chunks = (end - start).div_ceil(CHUNK);
        buffers.resize_with(buffers.len().max(chunks), || {
            std::array::from_fn(|_| Vec::new())
        });
        buffers[..chunks]
            .par_iter_mut()
            .enumerate()
            .for_each(|(k, bufs)| {
                for b in bufs.iter_mut() {
                    b.clear();
                }
                let s = start + k * CHUNK;
                f(s..(s + CHUNK).min(end), bufs);
            });
        for bufs in &buffers[..chunks] {
            for (out, t) in w.iter_mut().zip(bufs) {
                out.write_all(t)?;
            }
        }
        start = end;
    }
    Ok(())
}

/// Checks that `sizes` holds one finite value per mesh node; `path` names the output file.
fn check_sizes(path: &str, node_count: usize, sizes: &[f64]) -> Result<(), IoError> {
    if sizes.len() != node_count {
        return Err(IoError::ArrayLength {
            file: path.to_string(),
            array: "size field".to_string(),
            found: format!("{} values", sizes.len()),
            expected: format!("{node_count} (one per mesh node)"),
        });
    }
    if let Some(i) = sizes.iter().position(|v| !v.is_finite()) {
        return Err(IoError::BadValue {
            file: path.to_string(),
            array: "size field".to_string(),
            index: i as u64,
            found: format!("{}", sizes[i]),
            expected: "a finite target edge length".to_string(),
        });
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_read_back_exactly() {
        for v in [
            0.0,
            -0.0,
            1.0,
            0.1,
            1e-300,
            2.5e300,
            123456.789,
            -3.0e-7,
            f64::MAX,
        ] {
            let mut out = Vec::new();
            push_f64(&mut out, v);
            let text = String::from_utf8(out).unwrap();
            assert_eq!(
                text.parse::<f64>().unwrap().to_bits(),
                v.to_bits(),
                "{text}"
            );
            assert!(text.len() < 30, "{text}");
        }
        let mut out = Vec::new();
        push_int(&mut out, 0u64);
        out.push(b' ');
        push_int(&mut out, -1234i64);
        out.push(b' ');
        push_int(&mut out, u64::MAX);
        assert_eq!(out, b"0 -1234 18446744073709551615");
    }

    /// The table holds the same text as formatting each value directly.
    #[test]
    fn number_text_matches_direct_formatting() {
        let values = [
            0.0,
            -2.2250738585072014e-308,
            1.0 / 3.0,
            -1e300,
            42.0,
            f64::NAN,
        ];
        let table = NumberText::new(&values);
        for (i, &v) in values.iter().enumerate() {
            let (mut direct, mut copied) = (Vec::new(), Vec::new());
            push_f64(&mut direct, v);
            table.push(&mut copied, i);
            assert_eq!(copied, direct);
        }
    }

    #[test]
    fn chunked_output_is_in_order() {
        // More than two batches, the last one partial.
        let n = (2 * CHUNKS_IN_FLIGHT + 1) * CHUNK + 17;
        let mut out = Vec::new();
        write_chunked(&mut out, n, |r, buf| {
            for i in r {
                push_int(buf, i);
                buf.push(b'\n');
            }
        })
        .unwrap();
        let text = String::from_utf8(out).unwrap();
        let got: Vec<usize> = text.lines().map(|l| l.parse().unwrap()).collect();
        assert_eq!(got, (0..n).collect::<Vec<_>>());
    }
}
