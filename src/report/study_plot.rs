//! The study plot as plain SVG (no font files, no plotting crate): two log-log panels against
//! the DOFs. Left: each quantity's normalised change between successive meshes,
//! `|phi_i - phi_(i-1)| / |phi_finest|`, plotted at the finer mesh; a converging quantity falls,
//! a singular one stays level. Right: the estimated global error with a reference slope of the
//! optimal rate `p/d` through the coarsest point.

use crate::study::Study;
use std::io::{self, Write};

const W: f64 = 460.0;
const H: f64 = 340.0;
const MARGIN: [f64; 4] = [70.0, 20.0, 40.0, 55.0]; // left, right, top, bottom
const COLOURS: [&str; 8] = [
    "#1f77b4", "#d62728", "#2ca02c", "#9467bd", "#ff7f0e", "#17becf", "#8c564b", "#e377c2",
];

/// A series: name, colour, points (x, y > 0), dashed.
type Series = (String, &'static str, Vec<(f64, f64)>, bool);

fn escape(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
}

/// Decade range covering the positive finite values.
fn decades(values: impl Iterator<Item = f64>) -> Option<(f64, f64)> {
    let (lo, hi) = values
        .filter(|v| *v > 0.0 && v.is_finite())
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| {
            (a.min(v), b.max(v))
        });
    (lo <= hi).then(|| {
        let (a, b) = (lo.log10().floor(), hi.log10().ceil());
        (a, if b > a { b } else { a + 1.0 })
    })
}

/// One panel at horizontal offset `x0`.
fn panel(
    w: &mut (impl Write + ?Sized),
    x0: f64,
    title: &str,
    y_label: &str,
    series: &[Series],
) -> io::Result<()> {
    let pts = || series.iter().flat_map(|s| s.2.iter().copied());
    let (Some((xa, xb)), Some((ya, yb))) =
        (decades(pts().map(|p| p.0)), decades(pts().map(|p| p.1)))
    else {
        return writeln!(
            w,
            r#"<text x="{}" y="60">{}: no positive values</text>"#,
            x0 + 80.0,
            escape(title)
        );
    };
    let (l, r, t, b) = (x0 + MARGIN[0], x0 + W - MARGIN[1], MARGIN[2], H - MARGIN[3]);
    let sx = |x: f64| l + (x.log10() - xa) / (xb - xa) * (r - l);
    let sy = |y: f64| b - (y.log10() - ya) / (yb - ya) * (b - t);
    writeln!(
        w,
        r#"<rect x="{l}" y="{t}" width="{}" height="{}" fill="none" stroke="black"/>"#,
        r - l,
        b - t
    )?;
    writeln!(
        w,
        r#"<text x="{}" y="{}" text-anchor="middle" font-weight="bold">{}</text>"#,
        (l + r) / 2.0,
        t - 12.0,
        escape(title)
    )?;
    for d in (xa as i32)..=(xb as i32) {
        let x = sx(10f64.powi(d));
        writeln!(
            w,
            r##"<line x1="{x}" y1="{t}" x2="{x}" y2="{b}" stroke="#ddd"/><text x="{x}" y="{}" text-anchor="middle">1e{d}</text>"##,
            b + 16.0
        )?;
    }
    for d in (ya as i32)..=(yb as i32) {
        let y = sy(10f64.powi(d));
        writeln!(
            w,
            r##"<line x1="{l}" y1="{y}" x2="{r}" y2="{y}" stroke="#ddd"/><text x="{}" y="{}" text-anchor="end">1e{d}</text>"##,
            l - 6.0,
            y + 4.0
        )?;
    }
    writeln!(
        w,
        r#"<text x="{}" y="{}" text-anchor="middle">degrees of freedom</text>"#,
        (l + r) / 2.0,
        b + 36.0
    )?;
    writeln!(
        w,
        r#"<text x="{}" y="{}" text-anchor="middle" transform="rotate(-90 {} {})">{}</text>"#,
        x0 + 16.0,
        (t + b) / 2.0,
        x0 + 16.0,
        (t + b) / 2.0,
        escape(y_label)
    )?;
    for (k, (name, colour, points, dashed)) in series.iter().enumerate() {
        let path: Vec<String> = points
            .iter()
            .filter(|p| p.0 > 0.0 && p.1 > 0.0 && p.1.is_finite())
            .map(|p| format!("{:.2},{:.2}", sx(p.0), sy(p.1)))
            .collect();
        let dash = if *dashed {
            r#" stroke-dasharray="6 4""#
        } else {
            ""
        };
        writeln!(
            w,
            r#"<polyline points="{}" fill="none" stroke="{colour}" stroke-width="2"{dash}/>"#,
            path.join(" ")
        )?;
        for p in &path {
            let (x, y) = p.split_once(',').unwrap_or(("0", "0"));
            writeln!(w, r#"<circle cx="{x}" cy="{y}" r="3" fill="{colour}"/>"#)?;
        }
        let ly = t + 16.0 + 16.0 * k as f64;
        writeln!(
            w,
            r#"<line x1="{}" y1="{}" x2="{}" y2="{}" stroke="{colour}" stroke-width="2"{dash}/><text x="{}" y="{}">{}</text>"#,
            r - 150.0,
            ly - 4.0,
            r - 130.0,
            ly - 4.0,
            r - 125.0,
            ly,
            escape(name)
        )?;
    }
    Ok(())
}

/// Writes the two-panel SVG.
pub fn write_study_svg(study: &Study, w: &mut (impl Write + ?Sized)) -> io::Result<()> {
    let mut changes: Vec<Series> = Vec::new();
    for (k, q) in study.quantities.iter().enumerate() {
        let last = q.values.last().copied().unwrap_or(0.0).abs();
        let points: Vec<(f64, f64)> = (1..q.values.len())
            .map(|i| {
                let c = if last > 0.0 {
                    (q.values[i] - q.values[i - 1]).abs() / last
                } else {
                    0.0
                };
                (q.dofs[i] as f64, c)
            })
            .collect();
        changes.push((q.name.clone(), COLOURS[k % COLOURS.len()], points, false));
    }
    let error: Vec<(f64, f64)> = study
        .quantities
        .iter()
        .find(|q| q.name == "estimated_error")
        .map(|q| {
            q.dofs
                .iter()
                .zip(&q.values)
                .map(|(d, v)| (*d as f64, *v))
                .collect()
        })
        .unwrap_or_default();
    let mut errors: Vec<Series> =
        vec![("estimated error".into(), COLOURS[0], error.clone(), false)];
    if let (Some(first), Some(last)) = (error.first(), error.last()) {
        let rate = study.energy_error_rate.optimal;
        let y = |n: f64| first.1 * (n / first.0).powf(-rate);
        errors.push((
            format!("optimal N^-{:.3}", rate),
            COLOURS[1],
            vec![(first.0, y(first.0)), (last.0, y(last.0))],
            true,
        ));
    }
    writeln!(
        w,
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="{}" height="{H}" font-family="sans-serif" font-size="12">"#,
        2.0 * W
    )?;
    writeln!(w, r#"<rect width="100%" height="100%" fill="white"/>"#)?;
    panel(
        w,
        0.0,
        "Change between successive meshes",
        "|change| / |finest value|",
        &changes,
    )?;
    panel(w, W, "Estimated error", "energy norm of the error", &errors)?;
    writeln!(w, "</svg>")
}
