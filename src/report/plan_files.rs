//! The plan's table files: `plan.json` (summary plus one object per element), `plan.csv` (the
//! same per-element rows) and `sizes.csv` (the nodal size field). Rows are formatted in parallel
//! chunks and written in order, so big meshes write fast and the bytes never depend on the
//! number of threads. Numbers use the shortest round-trip form.

use crate::io::text_out::{push_f64, push_int, write_chunked, write_chunked_to};
use crate::mesh::Mesh;
use serde_json::Value;
use std::io::{self, Write};

/// Per-element columns of the plan, indexed by element; `order` lists the elements in the
/// order the rows are written (input-file order).
#[derive(Clone, Copy, Debug)]
pub struct ElementRows<'a> {
    /// Elements in row order.
    pub order: &'a [usize],
    /// Cell index in the input file.
    pub id: &'a [u32],
    /// `||e||_K`.
    pub error_energy: &'a [f64],
    /// `||e||_K^2 / ||e||^2`.
    pub error_share: &'a [f64],
    /// 1 refine, 0 keep, -1 may coarsen.
    pub refine_mark: &'a [i8],
    /// Current size.
    pub size_now: &'a [f64],
    /// Planned size.
    pub size_target: &'a [f64],
    /// 1 where the element touches a singular spot.
    pub singular_zone: &'a [i32],
}

/// The per-element columns of plan.json and plan.csv, in row order (glossary names).
pub const ELEMENT_COLUMNS: [&str; 7] = [
    "id",
    "error_energy",
    "error_share",
    "refine_mark",
    "size_now",
    "size_target",
    "singular_zone",
];

/// JSON text before each field of a row, after the row's first field (`id`).
const JSON_KEYS: [&[u8]; 6] = [
    b",\"error_energy\":",
    b",\"error_share\":",
    b",\"refine_mark\":",
    b",\"size_now\":",
    b",\"size_target\":",
    b",\"singular_zone\":",
];

/// Appends element `e`'s CSV line to `csv` and the same row as a JSON object (without the
/// separator after it) to `json`. Each number is formatted once, for the CSV line, and its
/// text copied into the JSON object.
fn push_row(json: &mut Vec<u8>, csv: &mut Vec<u8>, rows: &ElementRows, e: usize) {
    let start = csv.len();
    let mut ends = [0usize; 7];
    push_int(csv, rows.id[e]);
    ends[0] = csv.len();
    let floats_then_int = |csv: &mut Vec<u8>, a: f64, b: f64, i: i64, ends: &mut [usize]| {
        for (v, end) in [a, b].into_iter().zip(&mut ends[..2]) {
            csv.push(b',');
            push_f64(csv, v);
            *end = csv.len();
        }
        csv.push(b',');
        push_int(csv, i);
        ends[2] = csv.len();
    };
    floats_then_int(
        csv,
        rows.error_energy[e],
        rows.error_share[e],
        i64::from(rows.refine_mark[e]),
        &mut ends[1..4],
    );
    floats_then_int(
        csv,
        rows.size_now[e],
        rows.size_target[e],
        i64::from(rows.singular_zone[e]),
        &mut ends[4..7],
    );
    json.extend_from_slice(b"{\"id\":");
    json.extend_from_slice(&csv[start..ends[0]]);
    for (k, key) in JSON_KEYS.iter().enumerate() {
        json.extend_from_slice(key);
        // Field k + 1 starts after the comma that ends field k.
        json.extend_from_slice(&csv[ends[k] + 1..ends[k + 1]]);
    }
    json.push(b'}');
    csv.push(b'\n');
}

/// `plan.json` to `json` and `plan.csv` to `csv`, the rows formatted once for both.
///
/// `plan.json`: `{"summary": {...}, "elements": [{"id":..,"error_energy":..,"error_share":..,
/// "refine_mark":..,"size_now":..,"size_target":..,"singular_zone":..}, ...]}`, one element per
/// line without spaces (a million-element plan is a file for programs). `plan.csv`: a header
/// line, then the same rows.
pub fn write_plan_tables(
    json: &mut dyn Write,
    csv: &mut dyn Write,
    summary: &Value,
    rows: &ElementRows,
) -> io::Result<()> {
    json.write_all(b"{\n\"summary\": ")?;
    serde_json::to_writer_pretty(&mut *json, summary)?;
    json.write_all(b",\n\"elements\": [\n")?;
    csv.write_all(ELEMENT_COLUMNS.join(",").as_bytes())?;
    csv.write_all(b"\n")?;
    let n = rows.order.len();
    write_chunked_to([&mut *json, csv], n, |range, [j, c]| {
        for i in range {
            push_row(j, c, rows, rows.order[i]);
            j.extend_from_slice(if i + 1 < n { b",\n" } else { b"\n" });
        }
    })?;
    json.write_all(b"]\n}\n")
}

/// `sizes.csv`: `x,y,z,size` per node (every node, mid-side nodes included), in node order.
/// `sizes` must hold one finite value per node (checked by the caller).
pub(crate) fn write_sizes_csv(w: &mut dyn Write, mesh: &Mesh, sizes: &[f64]) -> io::Result<()> {
    w.write_all(b"x,y,z,size\n")?;
    write_chunked(w, mesh.node_count(), |range, out| {
        for i in range {
            for c in mesh.points[i] {
                push_f64(out, c);
                out.push(b',');
            }
            push_f64(out, sizes[i]);
            out.push(b'\n');
        }
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::io::text_out::{CHUNK, CHUNKS_IN_FLIGHT};

    type Columns = (Vec<usize>, Vec<u32>, Vec<f64>, Vec<i8>, Vec<i32>);

    fn rows(c: &Columns) -> ElementRows<'_> {
        ElementRows {
            order: &c.0,
            id: &c.1,
            error_energy: &c.2,
            error_share: &c.2,
            refine_mark: &c.3,
            size_now: &c.2,
            size_target: &c.2,
            singular_zone: &c.4,
        }
    }

    fn rows_fixture() -> Columns {
        // Two batches of chunks, the second one partial.
        let n = (CHUNKS_IN_FLIGHT + 2) * CHUNK + 7;
        let order: Vec<usize> = (0..n).rev().collect();
        let id: Vec<u32> = (0..n as u32).collect();
        let values: Vec<f64> = (0..n).map(|i| 0.1 * i as f64 + 1e-17).collect();
        let marks: Vec<i8> = (0..n).map(|i| (i % 3) as i8 - 1).collect();
        let zone: Vec<i32> = (0..n).map(|i| (i % 2) as i32).collect();
        (order, id, values, marks, zone)
    }

    /// The JSON parses back with every row, in the given order, with the values written.
    #[test]
    fn plan_json_round_trips() {
        let columns = rows_fixture();
        let (order, id, v, marks, _) = &columns;
        let rows = rows(&columns);
        let mut out = Vec::new();
        write_plan_tables(
            &mut out,
            &mut io::sink(),
            &serde_json::json!({"relative_error": 0.1}),
            &rows,
        )
        .unwrap();
        let parsed: Value = serde_json::from_slice(&out).unwrap();
        let elements = parsed["elements"].as_array().unwrap();
        assert_eq!(elements.len(), order.len());
        for (i, row) in elements.iter().enumerate() {
            let e = order[i];
            assert_eq!(row["id"].as_u64().unwrap(), id[e] as u64);
            // serde_json's default float parser may be off by an ulp (exact parsing needs its
            // float_roundtrip feature); the text itself is Rust's shortest round-trip form.
            let got = row["size_target"].as_f64().unwrap();
            assert!((got - v[e]).abs() <= 2.0 * f64::EPSILON * v[e].abs());
            assert_eq!(row["refine_mark"].as_i64().unwrap(), marks[e] as i64);
        }
        assert_eq!(parsed["summary"]["relative_error"].as_f64(), Some(0.1));
    }

    /// CSV: header plus one line per row with 7 fields.
    #[test]
    fn plan_csv_has_every_row() {
        let columns = rows_fixture();
        let order = &columns.0;
        let rows = rows(&columns);
        let mut out = Vec::new();
        write_plan_tables(&mut io::sink(), &mut out, &Value::Null, &rows).unwrap();
        let text = String::from_utf8(out).unwrap();
        let lines: Vec<&str> = text.lines().collect();
        assert_eq!(lines.len(), order.len() + 1);
        assert!(lines[1..].iter().all(|l| l.split(',').count() == 7));
        let last: Vec<&str> = lines[order.len()].split(',').collect();
        assert_eq!(last[0], "0");
        // Every value reads back exactly (Rust's parser is exact), marks and zones included.
        let (_, id, v, marks, zone) = &columns;
        for (line, &e) in lines[1..].iter().zip(order) {
            let f: Vec<&str> = line.split(',').collect();
            assert_eq!(f[0].parse::<u32>().unwrap(), id[e]);
            for k in [1, 2, 4, 5] {
                assert_eq!(f[k].parse::<f64>().unwrap().to_bits(), v[e].to_bits());
            }
            assert_eq!(f[3].parse::<i8>().unwrap(), marks[e]);
            assert_eq!(f[6].parse::<i32>().unwrap(), zone[e]);
        }
    }

    /// The JSON keys are the column names.
    #[test]
    fn json_keys_are_the_columns() {
        for (key, column) in JSON_KEYS.iter().zip(&ELEMENT_COLUMNS[1..]) {
            assert_eq!(*key, format!(",\"{column}\":").as_bytes());
        }
    }

    /// The JSON rows carry the same number texts as the CSV lines, key by key.
    #[test]
    fn json_rows_match_csv_lines() {
        let columns = rows_fixture();
        let rows = rows(&columns);
        let (mut json, mut csv) = (Vec::new(), Vec::new());
        write_plan_tables(&mut json, &mut csv, &Value::Null, &rows).unwrap();
        let (json, csv) = (
            String::from_utf8(json).unwrap(),
            String::from_utf8(csv).unwrap(),
        );
        let keys = ELEMENT_COLUMNS;
        let header: Vec<&str> = csv.lines().next().unwrap().split(',').collect();
        assert_eq!(header, keys);
        let json_rows: Vec<&str> = json
            .lines()
            .filter(|l| l.starts_with("{\"id\""))
            .map(|l| l.trim_end_matches(','))
            .collect();
        assert_eq!(json_rows.len(), columns.0.len());
        for (row, line) in json_rows.iter().zip(csv.lines().skip(1)) {
            let pairs: Vec<String> = keys
                .iter()
                .zip(line.split(','))
                .map(|(k, v)| format!("\"{k}\":{v}"))
                .collect();
            assert_eq!(*row, format!("{{{}}}", pairs.join(",")));
        }
    }
}
