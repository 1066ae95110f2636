//! Writer building blocks: typed source slices, byte conversion, streaming base64, zlib blocks.

use std::io::{self, Write};
use std::ops::Range;

use base64::engine::general_purpose::STANDARD;
use base64::Engine;
use rayon::prelude::*;

use super::scalar::{ByteOrder, HeaderType, ScalarType};

/// A slice of values to write, with the scalar type it is written as.
#[derive(Copy, Clone)]
pub(crate) enum Src<'a> {
    /// Float64.
    F64(&'a [f64]),
    /// Float32.
    F32(&'a [f32]),
    /// Int32.
    I32(&'a [i32]),
    /// Int64.
    I64(&'a [i64]),
    /// UInt8.
    U8(&'a [u8]),
    /// Point ids, written as Int64.
    U32AsI64(&'a [u32]),
    /// Offsets, written as Int64 (the caller checks they fit).
    U64AsI64(&'a [u64]),
    /// Point ids, written as Int32 (the caller checks they fit).
    U32AsI32(&'a [u32]),
    /// Offsets, written as Int32 (the caller checks they fit).
    U64AsI32(&'a [u64]),
}

/// Values converted per step when streaming.
pub(crate) const STREAM_VALUES: usize = 1 << 16;

impl Src<'_> {
    /// Number of values.
    pub(crate) fn len(&self) -> usize {
        match self {
            Src::F64(s) => s.len(),
            Src::F32(s) => s.len(),
            Src::I32(s) => s.len(),
            Src::I64(s) => s.len(),
            Src::U8(s) => s.len(),
            Src::U32AsI64(s) => s.len(),
            Src::U64AsI64(s) => s.len(),
            Src::U32AsI32(s) => s.len(),
            Src::U64AsI32(s) => s.len(),
        }
    }

    /// The type written to the file.
    pub(crate) fn scalar(&self) -> ScalarType {
        match self {
            Src::F64(_) => ScalarType::Float64,
            Src::F32(_) => ScalarType::Float32,
            Src::I32(_) | Src::U32AsI32(_) | Src::U64AsI32(_) => ScalarType::Int32,
            Src::I64(_) | Src::U32AsI64(_) | Src::U64AsI64(_) => ScalarType::Int64,
            Src::U8(_) => ScalarType::UInt8,
        }
    }

    /// Size of the values in bytes once written.
    pub(crate) fn byte_len(&self) -> usize {
        self.len() * self.scalar().size()
    }

    /// The bytes the values take in the file when they need no conversion: `order` is the
    /// machine's and the stored type is the written one, or point ids stored as `u32` are
    /// written as Int32 (`u32 as i32` keeps the bytes). Lets big arrays go to the file without
    /// a copy.
    pub(crate) fn native_bytes(&self, order: ByteOrder) -> Option<&[u8]> {
        if (order == ByteOrder::Little) != cfg!(target_endian = "little") {
            return None;
        }
        match self {
            Src::F64(s) => Some(bytemuck::cast_slice(s)),
            Src::F32(s) => Some(bytemuck::cast_slice(s)),
            Src::I32(s) => Some(bytemuck::cast_slice(s)),
            Src::I64(s) => Some(bytemuck::cast_slice(s)),
            Src::U8(s) => Some(s),
            Src::U32AsI32(s) => Some(bytemuck::cast_slice(s)),
            Src::U32AsI64(_) | Src::U64AsI64(_) | Src::U64AsI32(_) => None,
        }
    }

    /// Appends values `r` as bytes in `order`.
    pub(crate) fn bytes_into(&self, r: Range<usize>, order: ByteOrder, out: &mut Vec<u8>) {
        if let Some(bytes) = self.native_bytes(order) {
            let size = self.scalar().size();
            out.extend_from_slice(&bytes[r.start * size..r.end * size]);
            return;
        }
        macro_rules! put {
            ($s:expr, $conv:expr) => {{
                let s = &$s[r];
                if order == ByteOrder::Little {
                    for &v in s {
                        out.extend_from_slice(&$conv(v).to_le_bytes());
                    }
                } else {
                    for &v in s {
                        out.extend_from_slice(&$conv(v).to_be_bytes());
                    }
                }
            }};
        }
        match self {
            Src::F64(s) => put!(s, |v: f64| v),
            Src::F32(s) => put!(s, |v: f32| v),
            Src::I32(s) => put!(s, |v: i32| v),
            Src::I64(s) => put!(s, |v: i64| v),
            Src::U8(s) => put!(s, |v: u8| v),
            Src::U32AsI64(s) => put!(s, |v: u32| v as i64),
            Src::U64AsI64(s) => put!(s, |v: u64| v as i64),
            Src::U32AsI32(s) => put!(s, |v: u32| v as i32),
            Src::U64AsI32(s) => put!(s, |v: u64| v as i32),
        }
    }

    /// Appends value `i` as ascii text (shortest text that reads back to the same value).
    pub(crate) fn ascii_into(&self, i: usize, out: &mut Vec<u8>) {
        // Writing into a Vec cannot fail.
        let _ = match self {
            Src::F64(s) => write!(out, "{:?}", s[i]),
            Src::F32(s) => write!(out, "{:?}", s[i]),
            Src::I32(s) => write!(out, "{}", s[i]),
            Src::I64(s) => write!(out, "{}", s[i]),
            Src::U8(s) => write!(out, "{}", s[i]),
            Src::U32AsI64(s) => write!(out, "{}", s[i]),
            Src::U64AsI64(s) => write!(out, "{}", s[i]),
            Src::U32AsI32(s) => write!(out, "{}", s[i]),
            Src::U64AsI32(s) => write!(out, "{}", s[i]),
        };
    }
}

/// Appends one header word.
pub(crate) fn put_word(v: u64, header: HeaderType, order: ByteOrder, out: &mut Vec<u8>) {
    match (header, order) {
        (HeaderType::UInt32, ByteOrder::Little) => out.extend_from_slice(&(v as u32).to_le_bytes()),
        (HeaderType::UInt32, ByteOrder::Big) => out.extend_from_slice(&(v as u32).to_be_bytes()),
        (HeaderType::UInt64, ByteOrder::Little) => out.extend_from_slice(&v.to_le_bytes()),
        (HeaderType::UInt64, ByteOrder::Big) => out.extend_from_slice(&v.to_be_bytes()),
    }
}

/// Base64 length of `n` bytes.
pub(crate) fn b64_len(n: usize) -> usize {
    n.div_ceil(3) * 4
}

/// Streaming base64 encoder: bytes pushed in pieces encode as one continuous stream.
pub(crate) struct B64Stream<'w> {
    w: &'w mut dyn Write,
    carry: [u8; 3],
    ncarry: usize,
    text: Vec<u8>,
}

impl<'w> B64Stream<'w> {
    /// Starts a stream writing to `w`.
    pub(crate) fn new(w: &'w mut dyn Write) -> Self {
        B64Stream {
            w,
            carry: [0; 3],
            ncarry: 0,
            text: Vec::new(),
        }
    }

    /// Encodes `bytes` (keeping up to two bytes for the next call).
    pub(crate) fn push(&mut self, mut bytes: &[u8]) -> io::Result<()> {
        if self.ncarry > 0 {
            let take = (3 - self.ncarry).min(bytes.len());
            self.carry[self.ncarry..self.ncarry + take].copy_from_slice(&bytes[..take]);
            self.ncarry += take;
            bytes = &bytes[take..];
            if self.ncarry < 3 {
                return Ok(());
            }
            let carry = self.carry;
            self.emit(&carry)?;
            self.ncarry = 0;
        }
        let whole = bytes.len() / 3 * 3;
        self.emit(&bytes[..whole])?;
        let rest = &bytes[whole..];
        self.carry[..rest.len()].copy_from_slice(rest);
        self.ncarry = rest.len();
        Ok(())
    }

    fn emit(&mut self, bytes: &[u8]) -> io::Result<()> {
        if bytes.is_empty() {
            return Ok(());
        }
        self.text.resize(b64_len(bytes.len()), 0);
        let n = STANDARD
            .encode_slice(bytes, &mut self.text)
            .map_err(|e| io::Error::other(e.to_string()))?;
        self.w.write_all(&self.text[..n])
    }

    /// Encodes the remaining bytes with padding.
    pub(crate) fn finish(mut self) -> io::Result<()> {
        let carry = self.carry;
        let n = self.ncarry;
        self.ncarry = 0;
        self.emit(&carry[..n])
    }
}

/// An array compressed into independent zlib blocks (VTK layout).
pub(crate) struct Zipped {
    /// `[nblocks][B][last][csize..]` as bytes.
    pub header: Vec<u8>,
    /// The compressed blocks in order.
    pub blocks: Vec<Vec<u8>>,
}

impl Zipped {
    /// Total compressed bytes.
    pub(crate) fn data_len(&self) -> usize {
        self.blocks.iter().map(Vec::len).sum()
    }
}

/// Compresses the bytes of `src` in blocks of `block` uncompressed bytes, in parallel.
pub(crate) fn zip(
    src: &Src,
    order: ByteOrder,
    header: HeaderType,
    level: u32,
    block: usize,
) -> io::Result<Zipped> {
    let block = block.max(1);
    let total = src.byte_len();
    let size = src.scalar().size();
    let nblocks = total.div_ceil(block);
    let blocks: Vec<Vec<u8>> = (0..nblocks)
        .into_par_iter()
        .map(|k| {
            let (b0, b1) = (k * block, ((k + 1) * block).min(total));
            let (v0, v1) = (b0 / size, b1.div_ceil(size));
            let mut raw = Vec::with_capacity((v1 - v0) * size);
            src.bytes_into(v0..v1, order, &mut raw);
            let bytes = &raw[b0 - v0 * size..b1 - v0 * size];
            let mut enc = flate2::write::ZlibEncoder::new(
                Vec::with_capacity(bytes.len() / 2 + 64),
                flate2::Compression::new(level.min(9)),
            );
            enc.write_all(bytes)?;
            enc.finish()
        })
        .collect::<io::Result<_>>()?;
    let mut head = Vec::with_capacity((3 + nblocks) * header.size());
    put_word(nblocks as u64, header, order, &mut head);
    put_word(block as u64, header, order, &mut head);
    put_word((total % block) as u64, header, order, &mut head);
    for b in &blocks {
        put_word(b.len() as u64, header, order, &mut head);
    }
    Ok(Zipped {
        header: head,
        blocks,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn streamed_base64_equals_one_shot() {
        let data: Vec<u8> = (0..100u8).collect();
        for cut in [0, 1, 2, 3, 5, 50, 99, 100] {
            let mut out = Vec::new();
            let mut s = B64Stream::new(&mut out);
            s.push(&data[..cut]).unwrap();
            s.push(&data[cut..cut.min(40).max(cut)]).unwrap();
            s.push(&data[cut..]).unwrap();
            s.finish().unwrap();
            assert_eq!(
                String::from_utf8(out).unwrap(),
                STANDARD.encode(&data),
                "cut {cut}"
            );
        }
    }

    #[test]
    fn bytes_in_both_orders() {
        let v = [1.5f64, -2.0];
        let mut le = Vec::new();
        Src::F64(&v).bytes_into(0..2, ByteOrder::Little, &mut le);
        let mut be = Vec::new();
        Src::F64(&v).bytes_into(0..2, ByteOrder::Big, &mut be);
        assert_eq!(&le[..8], &1.5f64.to_le_bytes());
        assert_eq!(&be[8..], &(-2.0f64).to_be_bytes());
        let mut ids = Vec::new();
        Src::U32AsI64(&[7]).bytes_into(0..1, ByteOrder::Big, &mut ids);
        assert_eq!(ids, 7i64.to_be_bytes());
    }
}
