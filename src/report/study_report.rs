//! The `study` summary: one table per quantity, the singular points and the energy-error rate.

use super::{number, thousands, CAUTIONS};
use crate::study::{Study, Verdict};
use serde_json::{json, Value};
use std::io::{self, Write};

/// The sentence every singular quantity carries.
pub const NO_LIMIT: &str = "it has no limit under refinement: no extrapolated value or GCI exists";

/// Everything the study summary shows.
#[derive(Clone, Debug, PartialEq)]
pub struct StudyReport {
    /// The study.
    pub study: Study,
    /// The plot written, if any.
    pub plot: Option<String>,
    /// Warnings (also make the exit code 1).
    pub warnings: Vec<String>,
}

fn opt(v: Option<f64>, sig: usize) -> String {
    v.map_or_else(|| "-".to_string(), |v| number(v, sig))
}

impl StudyReport {
    /// Writes the text summary.
    pub fn write_text(&self, w: &mut impl Write) -> io::Result<()> {
        let s = &self.study;
        writeln!(w, "Convergence study over {} meshes", s.meshes.len())?;
        let width = s
            .meshes
            .iter()
            .map(|m| m.0.chars().count())
            .max()
            .unwrap_or(0)
            .max(4);
        writeln!(
            w,
            "  {:<width$} {:>12} {:>12} {:>12}",
            "mesh", "DOFs", "elements", "size h"
        )?;
        for (label, dofs, elements, h) in &s.meshes {
            writeln!(
                w,
                "  {:<width$} {:>12} {:>12} {:>12}",
                label,
                thousands(*dofs),
                thousands(*elements),
                number(*h, 4)
            )?;
        }
        for q in &s.quantities {
            writeln!(w)?;
            writeln!(
                w,
                "{} (expected order {})",
                q.name,
                number(q.expected_order, 2)
            )?;
            writeln!(w, "  {:>12} {:>16} {:>10}", "DOFs", "value", "change")?;
            for (i, (d, v)) in q.dofs.iter().zip(&q.values).enumerate() {
                let change = if i == 0 || *v == 0.0 {
                    String::new()
                } else {
                    format!("{:+.2} %", 100.0 * (v - q.values[i - 1]) / v.abs())
                };
                writeln!(
                    w,
                    "  {:>12} {:>16} {:>10}",
                    thousands(*d),
                    number(*v, 6),
                    change
                )?;
            }
            writeln!(
                w,
                "  observed order {}   extrapolated {}   GCI (finest) {}",
                opt(q.observed_order, 3),
                opt(q.extrapolated, 6),
                q.gci_fine
                    .map_or_else(|| "-".into(), |g| format!("{} %", number(100.0 * g, 3)))
            )?;
            if let Some(f) = &q.fit {
                writeln!(
                    w,
                    "  least-squares fit over all meshes: order {}, limit {}",
                    number(f.order, 3),
                    number(f.limit, 6)
                )?;
            }
            if let Some(u) = q.oscillation_uncertainty {
                writeln!(w, "  oscillation: half range {}", number(u, 3))?;
            }
            writeln!(w, "  verdict: {}", q.verdict.describe())?;
            if let (Verdict::Singular, Some(g)) = (q.verdict, &q.singular) {
                writeln!(
                    w,
                    "  grows like h^-{} (lambda {}, x{} per halving; from {}); {NO_LIMIT}",
                    number(g.observed_exponent, 3),
                    number(g.lambda, 3),
                    number(g.growth_per_halving, 4),
                    g.source
                )?;
            }
        }
        writeln!(w)?;
        let r = &s.energy_error_rate;
        writeln!(
            w,
            "Estimated error against DOFs: ||e|| ~ N^-{} (finest two meshes; all meshes {}), optimal {}: {}",
            opt(r.observed, 3),
            opt(r.fitted, 3),
            number(r.optimal, 3),
            r.verdict
        )?;
        if let Some(l) = r.implied_lambda {
            writeln!(
                w,
                "  implied singularity exponent lambda = {}",
                number(l, 3)
            )?;
        }
        if s.singular_points.is_empty() {
            writeln!(w, "Singular points: none found")?;
        } else {
            writeln!(w, "Singular points:")?;
            for p in &s.singular_points {
                writeln!(
                    w,
                    "  ({}, {}, {}): lambda {} ({}); {}",
                    number(p.location[0], 4),
                    number(p.location[1], 4),
                    number(p.location[2], 4),
                    number(p.lambda, 3),
                    p.kind,
                    p.quantities.join(", ")
                )?;
            }
        }
        if let Some(plot) = &self.plot {
            writeln!(w, "Plot: {plot}")?;
        }
        for warning in &self.warnings {
            writeln!(w, "warning: {warning}")?;
        }
        writeln!(w)?;
        writeln!(w, "{CAUTIONS}")
    }

    /// The JSON object (`--json`).
    pub fn to_json(&self) -> Value {
        let s = &self.study;
        let quantities: Vec<Value> = s
            .quantities
            .iter()
            .map(|q| {
                let mut v = serde_json::to_value(q).unwrap_or(Value::Null);
                if let Some(o) = v.as_object_mut() {
                    if q.verdict == Verdict::Singular {
                        o.insert("note".into(), json!(NO_LIMIT));
                    }
                }
                v
            })
            .collect();
        json!({
            "meshes": s.meshes.iter().map(|(l, d, e, h)| json!({
                "file": l, "dofs": d, "elements": e, "size": h
            })).collect::<Vec<_>>(),
            "quantities": quantities,
            "singular_points": s.singular_points,
            "energy_error_rate": s.energy_error_rate,
            "tolerance_percent": 100.0 * s.tolerance,
            "plot": self.plot,
            "warnings": self.warnings,
            "cautions": CAUTIONS,
        })
    }
}
