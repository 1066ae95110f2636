//! The typed error of the reader and writer.
//!
//! Every variant names the file (as given by the caller) and says what was found and what was
//! expected, so a message can be shown to the analyst as it is.

/// Error while reading or writing a results file.
#[derive(Debug, thiserror::Error)]
pub enum IoError {
    /// The operating system refused an operation (open, map, write, rename...).
    #[error("{path}: {source}")]
    Io {
        /// File the operation was about.
        path: String,
        /// The underlying error.
        #[source]
        source: std::io::Error,
    },
    /// The XML part of the file is not well formed.
    #[error("{file}: malformed XML near byte {position}: {message}")]
    Xml {
        /// File name.
        file: String,
        /// Byte offset where the parser stopped.
        position: u64,
        /// What the XML parser found wrong.
        message: String,
    },
    /// The file's structure is not what a VTK XML unstructured grid requires (missing element,
    /// bad attribute, unknown type name, missing `Points` array...).
    #[error("{file}: {found}, expected {expected}")]
    Structure {
        /// File name.
        file: String,
        /// What the file holds.
        found: String,
        /// What was required.
        expected: String,
    },
    /// An array holds a different number of values (or bytes) than its declaration requires.
    #[error("{file}: {array} has {found}, expected {expected}")]
    ArrayLength {
        /// File name.
        file: String,
        /// The array, e.g. `array 'displacement' (PointData)`.
        array: String,
        /// Count found, with its unit, e.g. `2999 values`.
        found: String,
        /// Count expected, with the reason, e.g. `3000 (1000 points x 3 components)`.
        expected: String,
    },
    /// Binary data of an array reaches past the end of the data available in the file.
    #[error("{file}: {region} ends at byte {end}, {array} needs bytes {start}..{stop} (truncated file?)")]
    Truncated {
        /// File name.
        file: String,
        /// Where the data lives, e.g. `appended data` or `inline binary data of ...`.
        region: String,
        /// End of that region (file byte offset, or character count for inline text).
        end: u64,
        /// The array that needs the bytes.
        array: String,
        /// First byte needed.
        start: u64,
        /// One past the last byte needed.
        stop: u64,
    },
    /// A header word (length, block count) or a declared count cannot fit in the file.
    #[error(
        "{file}: {what}={count} would need {needed}, more than the file can hold (file is {size})"
    )]
    TooLarge {
        /// File name.
        file: String,
        /// The count, e.g. `NumberOfPoints` or `array 'x' (PointData) length word`.
        what: String,
        /// Its value.
        count: u64,
        /// Bytes it would need, in human units.
        needed: String,
        /// Size of the file (or of the data region), in human units.
        size: String,
    },
    /// Invalid base64 text.
    #[error("{file}: {array}: invalid base64 near character {position}: {detail}, expected base64 text (A-Z a-z 0-9 + / =)")]
    Base64 {
        /// File name.
        file: String,
        /// The array.
        array: String,
        /// Character offset within the array's text.
        position: u64,
        /// What the decoder found.
        detail: String,
    },
    /// A zlib block does not decompress to its declared size.
    #[error("{file}: {array}: zlib block {block} of {blocks}: {found}, expected {expected}")]
    Zlib {
        /// File name.
        file: String,
        /// The array.
        array: String,
        /// Block index (0-based).
        block: u64,
        /// Number of blocks.
        blocks: u64,
        /// What happened.
        found: String,
        /// What was required.
        expected: String,
    },
    /// A value cannot be read or does not fit where it is used (non-numeric ascii, negative
    /// offset, integer too large for f64...).
    #[error("{file}: {array}: value {index} is '{found}', expected {expected}")]
    BadValue {
        /// File name.
        file: String,
        /// The array.
        array: String,
        /// Index of the value within the array (0-based).
        index: u64,
        /// The value as written in the file.
        found: String,
        /// What was required.
        expected: String,
    },
    /// A cell refers to a point that does not exist.
    #[error("{file}: cell {cell} uses point {point}, but the file has {points} points")]
    PointOutOfRange {
        /// File name.
        file: String,
        /// Cell index (0-based, over all pieces).
        cell: u64,
        /// The point id found.
        point: u64,
        /// Number of points.
        points: u64,
    },
    /// The cell `offsets` array is not consistent with `connectivity`.
    #[error("{file}: array 'offsets' (Cells): cell {cell} ends at {found}, expected {expected}")]
    BadOffsets {
        /// File name.
        file: String,
        /// Cell index (0-based).
        cell: u64,
        /// End offset found.
        found: u64,
        /// What was required.
        expected: String,
    },
    /// The file is compressed with a compressor this reader does not implement.
    #[error("{file}: compressor '{found}' is not supported, expected 'vtkZLibDataCompressor' or no compressor")]
    UnsupportedCompressor {
        /// File name.
        file: String,
        /// The `compressor` attribute.
        found: String,
    },
    /// The file name has an extension no reader handles.
    #[error("{path}: extension '{found}' is not supported, expected one of: .vtu, .pvtu, .msh")]
    UnsupportedExtension {
        /// The path.
        path: String,
        /// The extension found (empty when none).
        found: String,
    },
    /// A text or mixed text/binary mesh format (MSH, `.pos`, MEDIT) holds something other than
    /// what its syntax requires at a given place.
    #[error("{file}: {location}: found {found}, expected {expected}")]
    Syntax {
        /// File name.
        file: String,
        /// Where: line (text) or byte offset (binary data), and the section, e.g.
        /// `line 12 ($Nodes)`.
        location: String,
        /// What the file holds there.
        found: String,
        /// What was required.
        expected: String,
    },
    /// Pieces of a parallel file do not fit together.
    #[error("{file}: piece '{piece}' {found}, expected {expected}")]
    PieceMismatch {
        /// The .pvtu file.
        file: String,
        /// The piece's `Source`.
        piece: String,
        /// What the piece holds.
        found: String,
        /// What the first piece (or the declaration) holds.
        expected: String,
    },
    /// A write would replace the file that is being read.
    #[error(
        "{path}: refusing to write over the input file {input}, expected a different output path"
    )]
    WouldOverwriteInput {
        /// The output path.
        path: String,
        /// The protected input path.
        input: String,
    },
}

/// Formats a byte count with a decimal unit (B, kB, MB, GB, TB, PB).
pub(crate) fn human_bytes(n: f64) -> String {
    const UNITS: [&str; 6] = ["B", "kB", "MB", "GB", "TB", "PB"];
    let mut v = n;
    let mut u = 0;
    while v >= 1000.0 && u + 1 < UNITS.len() {
        v /= 1000.0;
        u += 1;
    }
    if u == 0 {
        format!("{} B", n.round())
    } else if v < 10.0 {
        format!("{v:.1} {}", UNITS[u])
    } else {
        format!("{v:.0} {}", UNITS[u])
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn human_units() {
        assert_eq!(human_bytes(999.0), "999 B");
        assert_eq!(human_bytes(3.0e6), "3.0 MB");
        assert_eq!(human_bytes(2.4e14), "240 TB");
    }
}
