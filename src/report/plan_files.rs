//! The plan's table files: `plan.json` (summary plus one object per element), `plan.csv` (the
//! same per-element rows) and `sizes.csv` (the nodal size field). Rows are formatted in parallel
//! chunks and written in order, so big meshes write fast and the bytes never depend on the
//! number of threads. Numbers use the shortest round-trip form.

use crate::io::text_out::{push_f64, push_int, write_chunked};
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

/// Appends one element row's values separated by `sep` (JSON or CSV), with the keys when
/// `json` is set.
fn push_row(out: &mut Vec<u8>, rows: &ElementRows, e: usize, json: bool) {
    let fields: [(&str, f64); 4] = [
        ("error_energy", rows.error_energy[e]),
        ("error_share", rows.error_share[e]),
        ("size_now", rows.size_now[e]),
        ("size_target", rows.size_target[e]),
    ];
    let key = |out: &mut Vec<u8>, k: &str| {
        if json {
            out.extend_from_slice(b",\"");
            out.extend_from_slice(k.as_bytes());
            out.extend_from_slice(b"\":");
        } else {
            out.push(b',');
        }
    };
    if json {
        out.extend_from_slice(b"{\"id\":");
    }
    push_int(out, rows.id[e]);
    for (k, v) in &fields[..2] {
        key(out, k);
        push_f64(out, *v);
    }
    key(out, "refine_mark");
    push_int(out, i64::from(rows.refine_mark[e]));
    for (k, v) in &fields[2..] {
        key(out, k);
        push_f64(out, *v);
    }
    key(out, "singular_zone");
    push_int(out, i64::from(rows.singular_zone[e]));
    if json {
        out.push(b'}');
    }
}

/// `plan.json`: `{"summary": {...}, "elements": [{"id":..,"error_energy":..,"error_share":..,
/// "refine_mark":..,"size_now":..,"size_target":..,"singular_zone":..}, ...]}`, one element per
/// line without spaces (a million-element plan is a file for programs).
pub fn write_plan_json(w: &mut dyn Write, summary: &Value, rows: &ElementRows) -> io::Result<()> {
    w.write_all(b"{\n\"summary\": ")?;
    serde_json::to_writer_pretty(&mut *w, summary)?;
    w.write_all(b",\n\"elements\": [\n")?;
    let n = rows.order.len();
    write_chunked(w, n, |range, out| {
        for i in range {
            push_row(out, rows, rows.order[i], true);
            out.extend_from_slice(if i + 1 < n { b",\n" } else { b"\n" });
        }
    })?;
    w.write_all(b"]\n}\n")
}

/// `plan.csv`: a header line, then the same rows as `plan.json`.
pub fn write_plan_csv(w: &mut dyn Write, rows: &ElementRows) -> io::Result<()> {
    w.write_all(b"id,error_energy,error_share,refine_mark,size_now,size_target,singular_zone\n")?;
    write_chunked(w, rows.order.len(), |range, out| {
        for i in range {
            push_row(out, rows, rows.order[i], false);
            out.push(b'\n');
        }
    })
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
    use crate::io::text_out::CHUNK;

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
        let n = 3 * CHUNK + 7;
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
        write_plan_json(&mut out, &serde_json::json!({"relative_error": 0.1}), &rows).unwrap();
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
        write_plan_csv(&mut out, &rows).unwrap();
        let text = String::from_utf8(out).unwrap();
        let lines: Vec<&str> = text.lines().collect();
        assert_eq!(lines.len(), order.len() + 1);
        assert!(lines[1..].iter().all(|l| l.split(',').count() == 7));
        let last: Vec<&str> = lines[order.len()].split(',').collect();
        assert_eq!(last[0], "0");
    }
}
