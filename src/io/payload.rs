//! Binary array payloads: length headers, zlib block tables, base64, raw appended bytes.
//!
//! Layout (VTK XML): uncompressed `[N][N bytes]`; zlib `[nblocks][B][last][csize..][blocks]`,
//! with header words of the file's `header_type` and byte order. Inline (`format="binary"`) and
//! appended base64 data encode the header either jointly with the data or on its own; the
//! padding of the header's first characters tells which. Every count read from the file is
//! checked against the bytes actually available before anything is allocated.

use std::borrow::Cow;

use base64::alphabet;
use base64::engine::general_purpose::{GeneralPurpose, GeneralPurposeConfig};
use base64::engine::DecodePaddingMode;
use base64::Engine;
use rayon::prelude::*;

use super::error::{human_bytes, IoError};
use super::scalar::{ByteOrder, HeaderType};
use super::xml::{AppendedEncoding, Document, Storage};

/// zlib's maximum compression ratio (deflate cannot expand a byte run by more than this).
pub(crate) const ZLIB_MAX_RATIO: u64 = 1032;

/// Lenient standard base64: padding optional, non-zero trailing bits accepted.
const B64: GeneralPurpose = GeneralPurpose::new(
    &alphabet::STANDARD,
    GeneralPurposeConfig::new()
        .with_decode_allow_trailing_bits(true)
        .with_decode_padding_mode(DecodePaddingMode::Indifferent),
);

/// What the payload decoder needs to know about the file.
pub(crate) struct Ctx<'f> {
    /// File name for messages.
    pub file: &'f str,
    /// Header word width.
    pub header: HeaderType,
    /// Byte order.
    pub order: ByteOrder,
    /// zlib blocks instead of plain bytes.
    pub compressed: bool,
    /// Size of the whole file in bytes.
    pub file_len: u64,
}

impl Ctx<'_> {
    fn word(&self, b: &[u8]) -> u64 {
        let mut a = [0u8; 8];
        match (self.header, self.order) {
            (HeaderType::UInt32, ByteOrder::Little) => {
                a[..4].copy_from_slice(&b[..4]);
                u64::from_le_bytes(a)
            }
            (HeaderType::UInt32, ByteOrder::Big) => {
                a[4..].copy_from_slice(&b[..4]);
                u64::from_be_bytes(a)
            }
            (HeaderType::UInt64, ByteOrder::Little) => {
                a.copy_from_slice(&b[..8]);
                u64::from_le_bytes(a)
            }
            (HeaderType::UInt64, ByteOrder::Big) => {
                a.copy_from_slice(&b[..8]);
                u64::from_be_bytes(a)
            }
        }
    }

    fn too_large(&self, what: String, count: u64, needed: f64) -> IoError {
        IoError::TooLarge {
            file: self.file.to_string(),
            what,
            count,
            needed: human_bytes(needed),
            size: human_bytes(self.file_len as f64),
        }
    }
}

/// A contiguous byte or character range an array's data lives in, for bounds messages.
struct Region<'a> {
    /// The bytes (or base64 characters), starting at the array's first byte.
    bytes: &'a [u8],
    /// Position of `bytes[0]` in the file (or in the element text).
    base: u64,
    /// Name of the region.
    name: String,
}

impl Region<'_> {
    /// Checks that `start..stop` (relative to `bytes`) is inside the region.
    fn need(&self, ctx: &Ctx, array: &str, start: u64, stop: u64) -> Result<(), IoError> {
        if stop <= self.bytes.len() as u64 {
            return Ok(());
        }
        Err(IoError::Truncated {
            file: ctx.file.to_string(),
            region: self.name.clone(),
            end: self.base + self.bytes.len() as u64,
            array: array.to_string(),
            start: self.base.saturating_add(start),
            stop: self.base.saturating_add(stop),
        })
    }
}

/// The decoded bytes of a `binary` or `appended` array (not `ascii`).
pub(crate) fn binary_bytes<'b>(
    ctx: &Ctx,
    doc: &Document<'b>,
    storage: &'b Storage<'b>,
    array: &str,
) -> Result<Cow<'b, [u8]>, IoError> {
    match storage {
        Storage::Ascii(_) => Ok(Cow::Borrowed(&[])),
        Storage::Binary(text) => {
            let trimmed = text.trim().as_bytes();
            let chars: Cow<[u8]> = if trimmed.iter().any(|b| b.is_ascii_whitespace()) {
                Cow::Owned(
                    trimmed
                        .iter()
                        .copied()
                        .filter(|b| !b.is_ascii_whitespace())
                        .collect(),
                )
            } else {
                Cow::Borrowed(trimmed)
            };
            let region = Region {
                bytes: &chars,
                base: 0,
                name: "the inline base64 text".to_string(),
            };
            base64_array(ctx, &region, array).map(Cow::Owned)
        }
        Storage::Appended(offset) => {
            let Some(app) = &doc.appended else {
                return Err(IoError::Structure {
                    file: ctx.file.to_string(),
                    found: format!("{array} with format=\"appended\" but no <AppendedData>"),
                    expected: "an <AppendedData> element after the grid".to_string(),
                });
            };
            let end = app.start + app.data.len() as u64;
            let name = "appended data".to_string();
            let Some(bytes) = usize::try_from(*offset)
                .ok()
                .and_then(|o| app.data.get(o..))
            else {
                return Err(IoError::Truncated {
                    file: ctx.file.to_string(),
                    region: name,
                    end,
                    array: array.to_string(),
                    start: app.start.saturating_add(*offset),
                    stop: app.start.saturating_add(*offset),
                });
            };
            let region = Region {
                bytes,
                base: app.start + offset,
                name,
            };
            match app.encoding {
                AppendedEncoding::Raw => raw_array(ctx, &region, array),
                AppendedEncoding::Base64 => base64_array(ctx, &region, array).map(Cow::Owned),
            }
        }
    }
}

/// A zlib block table.
struct BlockTable {
    block_size: u64,
    last: u64,
    csizes: Vec<u64>,
    /// Sum of `csizes`.
    compressed: u64,
    /// Total uncompressed size.
    total: u64,
}

/// Parses `[B][last][csize..]` after the `nblocks` word and checks the sizes are plausible.
fn block_table(ctx: &Ctx, words: &[u8], nblocks: u64, array: &str) -> Result<BlockTable, IoError> {
    let h = ctx.header.size();
    let block_size = ctx.word(&words[h..]);
    let last_word = ctx.word(&words[2 * h..]);
    let mut csizes = Vec::with_capacity(nblocks as usize);
    let mut compressed: u64 = 0;
    for k in 0..nblocks as usize {
        let c = ctx.word(&words[(3 + k) * h..]);
        compressed = compressed.saturating_add(c);
        csizes.push(c);
    }
    let bad = |found: String, expected: &str| IoError::Zlib {
        file: ctx.file.to_string(),
        array: array.to_string(),
        block: nblocks.saturating_sub(1),
        blocks: nblocks,
        found,
        expected: expected.to_string(),
    };
    if nblocks > 0 && block_size == 0 {
        return Err(bad(
            "block size 0 in the header".into(),
            "a positive block size",
        ));
    }
    if last_word > block_size {
        return Err(bad(
            format!("last block size {last_word} larger than the block size {block_size}"),
            "at most the block size",
        ));
    }
    let last = if last_word == 0 {
        block_size
    } else {
        last_word
    };
    let total = if nblocks == 0 {
        0
    } else {
        (nblocks - 1)
            .saturating_mul(block_size)
            .saturating_add(last)
    };
    if compressed > ctx.file_len {
        return Err(ctx.too_large(
            format!("{array} compressed size"),
            compressed,
            compressed as f64,
        ));
    }
    if total > compressed.saturating_mul(ZLIB_MAX_RATIO) {
        return Err(IoError::TooLarge {
            file: ctx.file.to_string(),
            what: format!("{array} uncompressed size"),
            count: total,
            needed: format!(
                "at least {} of zlib data (maximum ratio {ZLIB_MAX_RATIO}:1) but its blocks hold {}",
                human_bytes(total as f64 / ZLIB_MAX_RATIO as f64),
                human_bytes(compressed as f64)
            ),
            size: human_bytes(ctx.file_len as f64),
        });
    }
    Ok(BlockTable {
        block_size,
        last,
        csizes,
        compressed,
        total,
    })
}

/// Raw appended data at the start of `region`.
fn raw_array<'b>(ctx: &Ctx, region: &Region<'b>, array: &str) -> Result<Cow<'b, [u8]>, IoError> {
    let h = ctx.header.size() as u64;
    region.need(ctx, array, 0, h)?;
    let first = ctx.word(region.bytes);
    if !ctx.compressed {
        if first > ctx.file_len {
            return Err(ctx.too_large(format!("{array} length word"), first, first as f64));
        }
        region.need(ctx, array, h, h + first)?;
        return Ok(Cow::Borrowed(
            &region.bytes[h as usize..(h + first) as usize],
        ));
    }
    let nblocks = first;
    let table_len = nblocks.saturating_add(3).saturating_mul(h);
    if table_len > ctx.file_len {
        return Err(ctx.too_large(
            format!("{array} zlib block count"),
            nblocks,
            table_len as f64,
        ));
    }
    region.need(ctx, array, 0, table_len)?;
    let table = block_table(ctx, &region.bytes[..table_len as usize], nblocks, array)?;
    region.need(ctx, array, table_len, table_len + table.compressed)?;
    let blocks = &region.bytes[table_len as usize..(table_len + table.compressed) as usize];
    inflate(ctx, &table, blocks, array).map(Cow::Owned)
}

/// Number of base64 characters encoding `n` bytes (with padding).
fn b64_len(n: u64) -> u64 {
    n.div_ceil(3).saturating_mul(4)
}

/// Base64-encoded array at the start of `region` (header alone or joint with the data).
fn base64_array(ctx: &Ctx, region: &Region, array: &str) -> Result<Vec<u8>, IoError> {
    let h = ctx.header.size() as u64;
    let chars = region.bytes;
    let first_chars = b64_len(h);
    region.need(ctx, array, 0, first_chars)?;
    let first_bytes = b64_decode(ctx, &chars[..first_chars as usize], 0, array)?;
    if first_bytes.len() < h as usize {
        return Err(IoError::Base64 {
            file: ctx.file.to_string(),
            array: array.to_string(),
            position: 0,
            detail: format!("the header decodes to {} bytes", first_bytes.len()),
        });
    }
    let first = ctx.word(&first_bytes);
    // Sizes of the header and of the data that follows it, in bytes.
    let (header_len, table) = if ctx.compressed {
        let table_len = first.saturating_add(3).saturating_mul(h);
        if b64_len(table_len) > ctx.file_len {
            return Err(ctx.too_large(
                format!("{array} zlib block count"),
                first,
                b64_len(table_len) as f64,
            ));
        }
        region.need(ctx, array, 0, b64_len(table_len))?;
        let words = b64_decode(ctx, &chars[..b64_len(table_len) as usize], 0, array)?;
        if (words.len() as u64) < table_len {
            return Err(IoError::Base64 {
                file: ctx.file.to_string(),
                array: array.to_string(),
                position: 0,
                detail: format!("the block table decodes to {} bytes", words.len()),
            });
        }
        (table_len, Some(block_table(ctx, &words, first, array)?))
    } else {
        (h, None)
    };
    let data_len = table.as_ref().map_or(first, |t| t.compressed);
    if b64_len(data_len) > ctx.file_len {
        return Err(ctx.too_large(
            format!("{array} length word"),
            data_len,
            b64_len(data_len) as f64,
        ));
    }
    let header_chars = b64_len(header_len);
    let alone = header_len % 3 == 0 || chars[header_chars as usize - 1] == b'=';
    let data = if alone {
        let stop = header_chars + b64_len(data_len);
        region.need(ctx, array, header_chars, stop)?;
        b64_decode(
            ctx,
            &chars[header_chars as usize..stop as usize],
            header_chars,
            array,
        )?
    } else {
        // Joint stream: the groups holding the header end with the first data bytes; the
        // rest is aligned and decodes straight into the output.
        let stop = b64_len(header_len + data_len);
        region.need(ctx, array, 0, stop)?;
        let groups = header_len.div_ceil(3);
        if stop <= groups * 4 {
            let mut all = b64_decode(ctx, &chars[..stop as usize], 0, array)?;
            all.drain(..(header_len as usize).min(all.len()));
            all
        } else {
            let head = b64_decode(ctx, &chars[..(groups * 4) as usize], 0, array)?;
            let lead = &head[(header_len as usize).min(head.len())..];
            let mut out = vec![0u8; data_len as usize];
            let n = lead.len().min(out.len());
            out[..n].copy_from_slice(&lead[..n]);
            b64_decode_into(
                ctx,
                &chars[(groups * 4) as usize..stop as usize],
                &mut out[n..],
                groups * 4,
                array,
            )?;
            out
        }
    };
    if data.len() as u64 != data_len {
        return Err(IoError::ArrayLength {
            file: ctx.file.to_string(),
            array: array.to_string(),
            found: format!("{} bytes of base64-decoded data", data.len()),
            expected: format!("{data_len} (from its binary header)"),
        });
    }
    match table {
        None => Ok(data),
        Some(t) => inflate(ctx, &t, &data, array),
    }
}

/// Characters per parallel base64 work item (a multiple of 4).
const B64_CHUNK: usize = 1 << 18;

/// Number of bytes that base64 text `chars` decodes to (padding optional).
fn b64_decoded_len(chars: &[u8]) -> Option<usize> {
    let pad = chars
        .iter()
        .rev()
        .take(2)
        .take_while(|&&c| c == b'=')
        .count();
    let body = chars.len() - pad;
    (body % 4 != 1).then_some(body / 4 * 3 + (body % 4).saturating_sub(1))
}

/// Decodes base64 characters (no whitespace) into a new buffer. `pos` is the position of
/// `chars[0]` within the array's text, for messages.
fn b64_decode(ctx: &Ctx, chars: &[u8], pos: u64, array: &str) -> Result<Vec<u8>, IoError> {
    let len = b64_decoded_len(chars).ok_or_else(|| {
        b64_error(
            ctx,
            array,
            pos + chars.len() as u64,
            "a dangling character at the end".into(),
        )
    })?;
    let mut out = vec![0u8; len];
    b64_decode_into(ctx, chars, &mut out, pos, array)?;
    Ok(out)
}

fn b64_error(ctx: &Ctx, array: &str, position: u64, detail: String) -> IoError {
    IoError::Base64 {
        file: ctx.file.to_string(),
        array: array.to_string(),
        position,
        detail,
    }
}

/// Decodes base64 characters into exactly `out`, in parallel chunks.
fn b64_decode_into(
    ctx: &Ctx,
    chars: &[u8],
    out: &mut [u8],
    pos: u64,
    array: &str,
) -> Result<(), IoError> {
    if b64_decoded_len(chars) != Some(out.len()) {
        return Err(b64_error(
            ctx,
            array,
            pos,
            format!(
                "{} characters do not decode to the {} bytes its header announces",
                chars.len(),
                out.len()
            ),
        ));
    }
    let bad = |at: usize, detail: String| b64_error(ctx, array, pos + at as u64, detail);
    let first_err = out
        .par_chunks_mut(B64_CHUNK / 4 * 3)
        .zip(chars.par_chunks(B64_CHUNK))
        .enumerate()
        .filter_map(|(k, (o, c))| match B64.decode_slice(c, o) {
            Ok(n) if n == o.len() => None,
            Ok(n) => Some(bad(
                k * B64_CHUNK,
                format!("a chunk decodes to {n} bytes instead of {}", o.len()),
            )),
            Err(base64::DecodeSliceError::DecodeError(base64::DecodeError::InvalidByte(i, b))) => {
                Some(bad(
                    k * B64_CHUNK + i,
                    format!("found {:?} (byte {b})", b as char),
                ))
            }
            Err(e) => Some(bad(k * B64_CHUNK, e.to_string())),
        })
        .min_by_key(|e| match e {
            IoError::Base64 { position, .. } => *position,
            _ => u64::MAX,
        });
    match first_err {
        Some(e) => Err(e),
        None => Ok(()),
    }
}

/// Decompresses zlib blocks in parallel into one buffer.
fn inflate(ctx: &Ctx, table: &BlockTable, blocks: &[u8], array: &str) -> Result<Vec<u8>, IoError> {
    let nblocks = table.csizes.len();
    let mut starts = Vec::with_capacity(nblocks);
    let mut at = 0usize;
    for &c in &table.csizes {
        starts.push(at);
        at += c as usize;
    }
    let mut out = vec![0u8; table.total as usize];
    let bsize = (table.block_size as usize).max(1);
    let first_err = out
        .par_chunks_mut(bsize)
        .enumerate()
        .filter_map(|(k, o)| {
            let input = &blocks[starts[k]..starts[k] + table.csizes[k] as usize];
            inflate_block(input, o).err().map(|found| (k, found))
        })
        .min_by_key(|(k, _)| *k);
    if let Some((k, found)) = first_err {
        let expected_len = if k + 1 == nblocks {
            table.last
        } else {
            table.block_size
        };
        return Err(IoError::Zlib {
            file: ctx.file.to_string(),
            array: array.to_string(),
            block: k as u64,
            blocks: nblocks as u64,
            found,
            expected: format!("a zlib stream of {expected_len} bytes"),
        });
    }
    Ok(out)
}

/// Inflates one zlib stream into exactly `out`.
fn inflate_block(input: &[u8], out: &mut [u8]) -> Result<(), String> {
    let mut d = flate2::Decompress::new(true);
    match d.decompress(input, out, flate2::FlushDecompress::Finish) {
        Ok(flate2::Status::StreamEnd) if d.total_out() as usize == out.len() => Ok(()),
        Ok(flate2::Status::StreamEnd) => Err(format!("it decompresses to {} bytes", d.total_out())),
        Ok(_) if d.total_out() as usize == out.len() => Err("it decompresses to more bytes".into()),
        Ok(_) => Err(format!(
            "the stream ends early after {} bytes",
            d.total_out()
        )),
        Err(e) => Err(format!("invalid zlib data ({e})")),
    }
}
