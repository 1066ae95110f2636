//! Scalar types of VTK XML data arrays and the kernels that turn stored bytes into values.
//!
//! Binary payloads may sit at any byte offset of a memory map, so values are read with
//! `from_le_bytes` / `from_be_bytes` on copied chunks (never by casting the slice). Large arrays
//! are converted in parallel chunks (rayon) straight into the output vector.

use rayon::prelude::*;

/// Byte order of binary headers and values (`byte_order` attribute of `VTKFile`).
#[derive(Copy, Clone, Debug, PartialEq, Eq)]
pub enum ByteOrder {
    /// `LittleEndian`.
    Little,
    /// `BigEndian`.
    Big,
}

impl ByteOrder {
    /// The attribute value used in VTK XML files.
    pub fn vtk_name(self) -> &'static str {
        match self {
            ByteOrder::Little => "LittleEndian",
            ByteOrder::Big => "BigEndian",
        }
    }
}

/// Width of the binary length / block-table words (`header_type` attribute of `VTKFile`).
#[derive(Copy, Clone, Debug, PartialEq, Eq)]
pub enum HeaderType {
    /// 4-byte words (the default when the attribute is absent).
    UInt32,
    /// 8-byte words.
    UInt64,
}

impl HeaderType {
    /// The attribute value used in VTK XML files.
    pub fn vtk_name(self) -> &'static str {
        match self {
            HeaderType::UInt32 => "UInt32",
            HeaderType::UInt64 => "UInt64",
        }
    }

    /// Size of one header word in bytes.
    pub fn size(self) -> usize {
        match self {
            HeaderType::UInt32 => 4,
            HeaderType::UInt64 => 8,
        }
    }
}

/// Scalar type of a VTK data array (`type` attribute of `DataArray`).
#[derive(Copy, Clone, Debug, PartialEq, Eq)]
pub enum ScalarType {
    /// Signed 8-bit integer.
    Int8,
    /// Unsigned 8-bit integer.
    UInt8,
    /// Signed 16-bit integer.
    Int16,
    /// Unsigned 16-bit integer.
    UInt16,
    /// Signed 32-bit integer.
    Int32,
    /// Unsigned 32-bit integer.
    UInt32,
    /// Signed 64-bit integer.
    Int64,
    /// Unsigned 64-bit integer.
    UInt64,
    /// IEEE single precision.
    Float32,
    /// IEEE double precision.
    Float64,
}

/// Every scalar type, in the order of the enum.
pub(crate) const ALL_SCALAR_TYPES: [ScalarType; 10] = [
    ScalarType::Int8,
    ScalarType::UInt8,
    ScalarType::Int16,
    ScalarType::UInt16,
    ScalarType::Int32,
    ScalarType::UInt32,
    ScalarType::Int64,
    ScalarType::UInt64,
    ScalarType::Float32,
    ScalarType::Float64,
];

impl ScalarType {
    /// The name used in the `type` attribute, e.g. `"Float64"`.
    pub fn vtk_name(self) -> &'static str {
        match self {
            ScalarType::Int8 => "Int8",
            ScalarType::UInt8 => "UInt8",
            ScalarType::Int16 => "Int16",
            ScalarType::UInt16 => "UInt16",
            ScalarType::Int32 => "Int32",
            ScalarType::UInt32 => "UInt32",
            ScalarType::Int64 => "Int64",
            ScalarType::UInt64 => "UInt64",
            ScalarType::Float32 => "Float32",
            ScalarType::Float64 => "Float64",
        }
    }

    /// Parses a `type` attribute value (exact, case-sensitive as VTK writes it).
    pub fn from_vtk_name(s: &str) -> Option<Self> {
        ALL_SCALAR_TYPES.into_iter().find(|t| t.vtk_name() == s)
    }

    /// Size of one value in bytes.
    pub fn size(self) -> usize {
        match self {
            ScalarType::Int8 | ScalarType::UInt8 => 1,
            ScalarType::Int16 | ScalarType::UInt16 => 2,
            ScalarType::Int32 | ScalarType::UInt32 | ScalarType::Float32 => 4,
            ScalarType::Int64 | ScalarType::UInt64 | ScalarType::Float64 => 8,
        }
    }

    /// True for the eight integer types.
    pub fn is_integer(self) -> bool {
        !matches!(self, ScalarType::Float32 | ScalarType::Float64)
    }
}

/// Largest integer magnitude that converts to `f64` exactly.
pub(crate) const F64_EXACT_INT: u64 = 1 << 53;

/// An output element type the decoders can fill. Each conversion returns `None` when the value
/// does not fit the target (the caller turns that into an error naming the array and index).
pub(crate) trait Target: Copy + Send + Sync + Default + 'static {
    /// Converts a signed integer.
    fn from_i64(v: i64) -> Option<Self>;
    /// Converts an unsigned integer.
    fn from_u64(v: u64) -> Option<Self>;
    /// Converts a float (from a Float32 or Float64 array).
    fn from_f64(v: f64) -> Option<Self>;
    /// What the target accepts, for error messages.
    fn expected() -> &'static str;
}

impl Target for f64 {
    #[inline(always)]
    fn from_i64(v: i64) -> Option<Self> {
        (v.unsigned_abs() <= F64_EXACT_INT).then_some(v as f64)
    }
    #[inline(always)]
    fn from_u64(v: u64) -> Option<Self> {
        (v <= F64_EXACT_INT).then_some(v as f64)
    }
    #[inline(always)]
    fn from_f64(v: f64) -> Option<Self> {
        Some(v)
    }
    fn expected() -> &'static str {
        "an integer of magnitude at most 2^53 (exactly representable as f64)"
    }
}

macro_rules! int_target {
    ($t:ty, $what:literal) => {
        impl Target for $t {
            #[inline(always)]
            fn from_i64(v: i64) -> Option<Self> {
                <$t>::try_from(v).ok()
            }
            #[inline(always)]
            fn from_u64(v: u64) -> Option<Self> {
                <$t>::try_from(v).ok()
            }
            #[inline(always)]
            fn from_f64(_: f64) -> Option<Self> {
                None
            }
            fn expected() -> &'static str {
                $what
            }
        }
    };
}
int_target!(u8, "an integer in 0..=255");
int_target!(u32, "an integer in 0..=4294967295");
int_target!(u64, "a non-negative integer");

/// Copies `N` bytes of a chunk produced by `chunks_exact(N)` into an array.
#[inline(always)]
fn arr<const N: usize>(c: &[u8]) -> [u8; N] {
    let mut a = [0u8; N];
    a.copy_from_slice(c);
    a
}

/// Converts one chunk sequentially; `Err(i)` gives the index (within the chunk) of a value that
/// does not fit the target.
fn convert_seq<T: Target>(
    src: &[u8],
    st: ScalarType,
    order: ByteOrder,
    out: &mut [T],
) -> Result<(), usize> {
    macro_rules! run {
        ($ty:ty, $n:literal, $conv:ident, $cast:ty) => {{
            let it = src.chunks_exact($n).zip(out.iter_mut()).enumerate();
            match order {
                ByteOrder::Little => {
                    for (i, (c, o)) in it {
                        let v = <$ty>::from_le_bytes(arr::<$n>(c));
                        *o = T::$conv(v as $cast).ok_or(i)?;
                    }
                }
                ByteOrder::Big => {
                    for (i, (c, o)) in it {
                        let v = <$ty>::from_be_bytes(arr::<$n>(c));
                        *o = T::$conv(v as $cast).ok_or(i)?;
                    }
                }
            }
        }};
    }
    match st {
        ScalarType::Int8 => run!(i8, 1, from_i64, i64),
        ScalarType::UInt8 => run!(u8, 1, from_u64, u64),
        ScalarType::Int16 => run!(i16, 2, from_i64, i64),
        ScalarType::UInt16 => run!(u16, 2, from_u64, u64),
        ScalarType::Int32 => run!(i32, 4, from_i64, i64),
        ScalarType::UInt32 => run!(u32, 4, from_u64, u64),
        ScalarType::Int64 => run!(i64, 8, from_i64, i64),
        ScalarType::UInt64 => run!(u64, 8, from_u64, u64),
        ScalarType::Float32 => run!(f32, 4, from_f64, f64),
        ScalarType::Float64 => run!(f64, 8, from_f64, f64),
    }
    Ok(())
}

/// Values per parallel work item.
const PAR_CHUNK: usize = 1 << 15;

/// Converts `out.len()` values of type `st` from `src` (which must hold at least
/// `out.len() * st.size()` bytes). `Err(i)` is the smallest index of a value that does not fit.
pub(crate) fn convert<T: Target>(
    src: &[u8],
    st: ScalarType,
    order: ByteOrder,
    out: &mut [T],
) -> Result<(), usize> {
    let size = st.size();
    if out.len() <= 2 * PAR_CHUNK {
        return convert_seq(src, st, order, out);
    }
    let first_bad = out
        .par_chunks_mut(PAR_CHUNK)
        .zip(src.par_chunks(PAR_CHUNK * size))
        .enumerate()
        .filter_map(|(k, (o, s))| {
            convert_seq(s, st, order, o)
                .err()
                .map(|i| k * PAR_CHUNK + i)
        })
        .min();
    match first_bad {
        Some(i) => Err(i),
        None => Ok(()),
    }
}

/// The stored value at `index` as text, for error messages (`src` must hold it).
pub(crate) fn value_text(src: &[u8], st: ScalarType, order: ByteOrder, index: usize) -> String {
    let size = st.size();
    let Some(bytes) = src.get(index * size..(index + 1) * size) else {
        return "?".to_string();
    };
    let mut one = [0.0f64; 1];
    if st.is_integer() {
        // Read through i128 so every integer type prints exactly.
        let mut b = [0u8; 16];
        let v: i128 = match order {
            ByteOrder::Little => {
                b[..size].copy_from_slice(bytes);
                let raw = u128::from_le_bytes(b);
                sign_extend(raw, size, st)
            }
            ByteOrder::Big => {
                b[16 - size..].copy_from_slice(bytes);
                let raw = u128::from_be_bytes(b);
                sign_extend(raw, size, st)
            }
        };
        return v.to_string();
    }
    match convert_seq(bytes, st, order, &mut one) {
        Ok(()) => one[0].to_string(),
        Err(_) => "?".to_string(),
    }
}

/// Interprets the low `size` bytes of `raw` as a signed or unsigned integer.
fn sign_extend(raw: u128, size: usize, st: ScalarType) -> i128 {
    let bits = 8 * size as u32;
    let signed = matches!(
        st,
        ScalarType::Int8 | ScalarType::Int16 | ScalarType::Int32 | ScalarType::Int64
    );
    if signed && (raw >> (bits - 1)) & 1 == 1 {
        (raw as i128) - (1i128 << bits)
    } else {
        raw as i128
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_round_trip_and_sizes() {
        for t in ALL_SCALAR_TYPES {
            assert_eq!(ScalarType::from_vtk_name(t.vtk_name()), Some(t));
        }
        assert_eq!(ScalarType::from_vtk_name("float64"), None);
        assert_eq!(ScalarType::Int16.size(), 2);
        assert!(!ScalarType::Float32.is_integer());
        assert!(ScalarType::UInt64.is_integer());
    }

    #[test]
    fn converts_both_orders_and_rejects_out_of_range() {
        let le: Vec<u8> = [-3i32, 7].iter().flat_map(|v| v.to_le_bytes()).collect();
        let be: Vec<u8> = [-3i32, 7].iter().flat_map(|v| v.to_be_bytes()).collect();
        let mut out = [0.0f64; 2];
        convert(&le, ScalarType::Int32, ByteOrder::Little, &mut out).unwrap();
        assert_eq!(out, [-3.0, 7.0]);
        convert(&be, ScalarType::Int32, ByteOrder::Big, &mut out).unwrap();
        assert_eq!(out, [-3.0, 7.0]);
        let mut ids = [0u32; 2];
        assert_eq!(
            convert(&le, ScalarType::Int32, ByteOrder::Little, &mut ids),
            Err(0)
        );
        assert_eq!(
            value_text(&le, ScalarType::Int32, ByteOrder::Little, 0),
            "-3"
        );
        assert_eq!(value_text(&be, ScalarType::Int32, ByteOrder::Big, 1), "7");
        let big = ((1u64 << 53) + 1).to_le_bytes();
        assert_eq!(
            convert(&big, ScalarType::UInt64, ByteOrder::Little, &mut out[..1]),
            Err(0)
        );
    }

    #[test]
    fn parallel_path_reports_first_bad_index() {
        let n = 5 * PAR_CHUNK + 17;
        let mut vals: Vec<i64> = (0..n as i64).collect();
        vals[3 * PAR_CHUNK + 5] = -1;
        vals[4 * PAR_CHUNK] = -2;
        let src: Vec<u8> = vals.iter().flat_map(|v| v.to_be_bytes()).collect();
        let mut out = vec![0u64; n];
        let r = convert(&src, ScalarType::Int64, ByteOrder::Big, &mut out);
        assert_eq!(r, Err(3 * PAR_CHUNK + 5));
        let mut f = vec![0.0f64; n];
        convert(&src, ScalarType::Int64, ByteOrder::Big, &mut f).unwrap();
        assert_eq!(f[n - 1], (n - 1) as f64);
    }
}
