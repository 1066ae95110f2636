//! `format="ascii"` arrays: whitespace-separated numbers.
//!
//! Values are parsed according to the declared type (Float32 text is rounded to `f32`, integer
//! text is read exactly and range-checked against the declared type). Large texts are split at
//! whitespace and parsed in parallel.

use rayon::prelude::*;

use super::error::IoError;
use super::scalar::{ScalarType, Target};

/// Text length above which parsing is split over threads.
const PAR_TEXT: usize = 1 << 20;

/// A token that could not be converted, with its index within the parsed text.
struct BadToken {
    index: usize,
    token: String,
    expected: String,
}

/// Parses all numbers of `text` as values of type `st`, converted to `T`.
pub(crate) fn parse_ascii<T: Target>(
    text: &str,
    st: ScalarType,
    expected_count: Option<u64>,
    file: &str,
    array: &str,
) -> Result<Vec<T>, IoError> {
    let cap = expected_count.unwrap_or(0).min(text.len() as u64 / 2 + 1) as usize;
    let result = if text.len() <= PAR_TEXT {
        let mut out = Vec::with_capacity(cap);
        parse_into(text, st, &mut out).map(|()| out)
    } else {
        parse_parallel(text, st)
    };
    result.map_err(|b| IoError::BadValue {
        file: file.to_string(),
        array: array.to_string(),
        index: b.index as u64,
        found: b.token,
        expected: b.expected,
    })
}

/// Splits `text` into about one piece per thread (at whitespace) and parses them in parallel.
fn parse_parallel<T: Target>(text: &str, st: ScalarType) -> Result<Vec<T>, BadToken> {
    let bytes = text.as_bytes();
    let pieces = (rayon::current_num_threads() * 4).max(1);
    let step = text.len() / pieces + 1;
    let mut cuts = vec![0usize];
    let mut at = step;
    while at < bytes.len() {
        while at < bytes.len() && !bytes[at].is_ascii_whitespace() {
            at += 1;
        }
        cuts.push(at);
        at += step;
    }
    cuts.push(bytes.len());
    cuts.dedup();
    let parts: Vec<Result<Vec<T>, BadToken>> = cuts
        .par_windows(2)
        .map(|w| {
            let mut out = Vec::new();
            // Cuts sit on ASCII whitespace, so both ends are char boundaries.
            let piece = text.get(w[0]..w[1]).unwrap_or("");
            parse_into(piece, st, &mut out).map(|()| out)
        })
        .collect();
    let mut before = 0usize;
    let mut total = 0usize;
    for p in &parts {
        match p {
            Ok(v) => {
                before += v.len();
                total += v.len();
            }
            Err(b) => {
                return Err(BadToken {
                    index: before + b.index,
                    token: b.token.clone(),
                    expected: b.expected.clone(),
                })
            }
        }
    }
    let mut out = Vec::with_capacity(total);
    for v in parts.into_iter().flatten() {
        out.extend_from_slice(&v);
    }
    Ok(out)
}

fn parse_into<T: Target>(text: &str, st: ScalarType, out: &mut Vec<T>) -> Result<(), BadToken> {
    let base = out.len();
    for (i, tok) in text.split_ascii_whitespace().enumerate() {
        let v = match parse_token(tok, st) {
            Some(v) => v,
            None => {
                return Err(BadToken {
                    index: base + i,
                    token: shorten(tok),
                    expected: format!("{} {} number", article(st), st.vtk_name()),
                })
            }
        };
        let converted = match v {
            Num::I(x) => T::from_i64(x),
            Num::U(x) => T::from_u64(x),
            Num::F(x) => T::from_f64(x),
        };
        match converted {
            Some(c) => out.push(c),
            None => {
                return Err(BadToken {
                    index: base + i,
                    token: shorten(tok),
                    expected: T::expected().to_string(),
                })
            }
        }
    }
    Ok(())
}

/// A parsed number before conversion.
enum Num {
    I(i64),
    U(u64),
    F(f64),
}

/// Parses one token as type `st`; `None` when it is not a number of that type (or out of its
/// range).
fn parse_token(tok: &str, st: ScalarType) -> Option<Num> {
    match st {
        ScalarType::Float32 => tok.parse::<f32>().ok().map(|v| Num::F(v as f64)),
        ScalarType::Float64 => tok.parse::<f64>().ok().map(Num::F),
        ScalarType::UInt8 | ScalarType::UInt16 | ScalarType::UInt32 | ScalarType::UInt64 => {
            let v = tok
                .parse::<u64>()
                .ok()
                .or_else(|| integral(tok).and_then(|f| u64::try_from(f).ok()))?;
            let max = match st {
                ScalarType::UInt8 => u8::MAX as u64,
                ScalarType::UInt16 => u16::MAX as u64,
                ScalarType::UInt32 => u32::MAX as u64,
                _ => u64::MAX,
            };
            (v <= max).then_some(Num::U(v))
        }
        _ => {
            let v = tok.parse::<i64>().ok().or_else(|| integral(tok))?;
            let (lo, hi) = match st {
                ScalarType::Int8 => (i8::MIN as i64, i8::MAX as i64),
                ScalarType::Int16 => (i16::MIN as i64, i16::MAX as i64),
                ScalarType::Int32 => (i32::MIN as i64, i32::MAX as i64),
                _ => (i64::MIN, i64::MAX),
            };
            (lo..=hi).contains(&v).then_some(Num::I(v))
        }
    }
}

/// Integer value of a token written as a float with no fraction (e.g. `3.0`, `1e3`).
fn integral(tok: &str) -> Option<i64> {
    let f = tok.parse::<f64>().ok()?;
    (f.is_finite() && f.fract() == 0.0 && f.abs() < 9.0e15).then_some(f as i64)
}

/// "an" before Int types, "a" before the others (UInt is read "you-int").
fn article(st: ScalarType) -> &'static str {
    if st.vtk_name().starts_with("Int") {
        "an"
    } else {
        "a"
    }
}

/// A token cut to a readable length for messages.
fn shorten(tok: &str) -> String {
    if tok.chars().count() <= 40 {
        tok.to_string()
    } else {
        let head: String = tok.chars().take(40).collect();
        format!("{head}...")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parses_types_and_reports_bad_tokens() {
        let v: Vec<f64> =
            parse_ascii("1 2.5\n -3e2", ScalarType::Float64, Some(3), "f", "a").unwrap();
        assert_eq!(v, vec![1.0, 2.5, -300.0]);
        let v: Vec<f64> = parse_ascii("0.1", ScalarType::Float32, None, "f", "a").unwrap();
        assert_eq!(v, vec![0.1f32 as f64]);
        let v: Vec<u32> = parse_ascii("0 7 4.0", ScalarType::Int64, None, "f", "a").unwrap();
        assert_eq!(v, vec![0, 7, 4]);
        let e = parse_ascii::<f64>("1 2 x3", ScalarType::Float64, None, "m.vtu", "array 'u'")
            .unwrap_err()
            .to_string();
        assert!(e.contains("value 2 is 'x3'"), "{e}");
        let e =
            parse_ascii::<f64>("300", ScalarType::UInt8, None, "m.vtu", "array 'u'").unwrap_err();
        assert!(e.to_string().contains("'300'"), "{e}");
        let e =
            parse_ascii::<u32>("-1", ScalarType::Int32, None, "m.vtu", "array 'c'").unwrap_err();
        assert!(e.to_string().contains("0..=4294967295"), "{e}");
    }

    #[test]
    fn parallel_parse_matches_sequential_and_indexes_errors_globally() {
        let n = 300_000;
        let mut text = String::new();
        for i in 0..n {
            text.push_str(&format!("{}.25 ", i));
        }
        assert!(text.len() > PAR_TEXT);
        let v: Vec<f64> = parse_ascii(&text, ScalarType::Float64, Some(n), "f", "a").unwrap();
        assert_eq!(v.len(), n as usize);
        assert_eq!(v[123_456], 123_456.25);
        let bad = text.replacen("250000.25", "25O000.25", 1);
        let e = parse_ascii::<f64>(&bad, ScalarType::Float64, None, "f", "a").unwrap_err();
        assert!(e.to_string().contains("value 250000 is '25O000.25'"), "{e}");
    }
}
