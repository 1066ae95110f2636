//! Decoding stages shared by inline and appended data: base64 text to bytes and zlib blocks to
//! bytes, both in parallel straight into the output buffer.

use base64::alphabet;
use base64::engine::general_purpose::{GeneralPurpose, GeneralPurposeConfig};
use base64::engine::DecodePaddingMode;
use base64::Engine;
use rayon::prelude::*;

use super::error::IoError;
use super::payload::Ctx;

/// Lenient standard base64: padding optional, non-zero trailing bits accepted.
const B64: GeneralPurpose = GeneralPurpose::new(
    &alphabet::STANDARD,
    GeneralPurposeConfig::new()
        .with_decode_allow_trailing_bits(true)
        .with_decode_padding_mode(DecodePaddingMode::Indifferent),
);

/// A zlib block table (`[nblocks][B][last][csize..]`, checked).
pub(crate) struct BlockTable {
    /// Uncompressed bytes per block (`B`).
    pub block_size: u64,
    /// Uncompressed bytes of the last block (`B` when the header says 0).
    pub last: u64,
    /// Compressed size of each block.
    pub csizes: Vec<u64>,
    /// Sum of `csizes`.
    pub compressed: u64,
    /// Total uncompressed size.
    pub total: u64,
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
pub(crate) fn b64_decode(
    ctx: &Ctx,
    chars: &[u8],
    pos: u64,
    array: &str,
) -> Result<Vec<u8>, IoError> {
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
pub(crate) fn b64_decode_into(
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
pub(crate) fn inflate(
    ctx: &Ctx,
    table: &BlockTable,
    blocks: &[u8],
    array: &str,
) -> Result<Vec<u8>, IoError> {
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
