//! Binary array payloads: length headers, zlib block tables, base64, raw appended bytes.
//!
//! Layout (VTK XML): uncompressed `[N][N bytes]`; zlib `[nblocks][B][last][csize..][blocks]`,
//! with header words of the file's `header_type` and byte order. Inline (`format="binary"`) and
//! appended base64 data encode the header either jointly with the data or on its own; the
//! padding of the header's first characters tells which. Every count read from the file is
//! checked against the bytes actually available before anything is allocated.

use std::borrow::Cow;

use super::decl::{AppendedEncoding, Document, Storage};
use super::decode::{b64_decode, b64_decode_into, inflate, BlockTable};
use super::error::{human_bytes, IoError};
use super::scalar::{ByteOrder, HeaderType};

/// zlib's maximum compression ratio (deflate cannot expand a byte run by more than this).
pub(crate) const ZLIB_MAX_RATIO: u64 = 1032;

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
