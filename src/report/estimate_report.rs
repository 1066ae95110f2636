//! The `estimate` summary.

use super::{number, thousands, write_footer, CAUTIONS};
use serde_json::{json, Value};
use std::io::{self, Write};

/// One of the elements with the largest error.
#[derive(Clone, Debug, PartialEq)]
pub struct TopElement {
    /// Cell index in the results file.
    pub id: u32,
    /// Element kind name.
    pub kind: &'static str,
    /// Mean of the corner coordinates.
    pub centroid: [f64; 3],
    /// ||e||_K.
    pub error_energy: f64,
    /// ||e||_K^2 / ||e||^2.
    pub error_share: f64,
}

/// Everything the estimate summary shows; assembled by the command, rendered here.
#[derive(Clone, Debug, PartialEq)]
pub struct EstimateReport {
    /// Input file as named by the user.
    pub file: String,
    /// Element kinds with counts.
    pub kinds: Vec<(&'static str, usize)>,
    /// Number of elements estimated on.
    pub elements: usize,
    /// Number of nodes.
    pub nodes: usize,
    /// 2 or 3.
    pub dimension: usize,
    /// Analysis mode name.
    pub mode: &'static str,
    /// Material description.
    pub material: String,
    /// Recovery method name.
    pub recovery: &'static str,
    /// How many nodes used each recovery rule.
    pub recovery_rules: Vec<(&'static str, usize)>,
    /// ||u_h||.
    pub energy_norm: f64,
    /// ||e||.
    pub error_norm: f64,
    /// eta (fraction).
    pub relative_error: f64,
    /// Fewest elements holding 50 % of the error squared.
    pub elements_for_half: usize,
    /// Fewest elements holding 90 % of the error squared.
    pub elements_for_ninety: usize,
    /// The largest element errors, largest first.
    pub top_elements: Vec<TopElement>,
    /// Warnings (also make the exit code 1).
    pub warnings: Vec<String>,
    /// Plain notes on how the input was interpreted.
    pub notes: Vec<String>,
}

impl EstimateReport {
    /// Writes the text summary.
    pub fn write_text(&self, w: &mut impl Write) -> io::Result<()> {
        let pct = |n: usize| 100.0 * n as f64 / self.elements.max(1) as f64;
        let kinds = self
            .kinds
            .iter()
            .map(|(k, n)| format!("{k} {}", thousands(*n)))
            .collect::<Vec<_>>()
            .join(", ");
        writeln!(w, "hone estimate: {}", self.file)?;
        writeln!(
            w,
            "  elements               {} ({kinds})",
            thousands(self.elements)
        )?;
        writeln!(w, "  nodes                  {}", thousands(self.nodes))?;
        writeln!(
            w,
            "  dimension, mode        {}D, {}",
            self.dimension, self.mode
        )?;
        writeln!(w, "  material               {}", self.material)?;
        let rules = self
            .recovery_rules
            .iter()
            .map(|(r, n)| format!("{} {r}", thousands(*n)))
            .collect::<Vec<_>>()
            .join(", ");
        writeln!(
            w,
            "  recovery               {}; nodes from: {rules}",
            self.recovery
        )?;
        writeln!(w)?;
        writeln!(
            w,
            "  global relative error  {} %",
            super::percent(self.relative_error)
        )?;
        writeln!(
            w,
            "  energy norm            {}",
            number(self.energy_norm, 5)
        )?;
        writeln!(w, "  error norm             {}", number(self.error_norm, 5))?;
        writeln!(
            w,
            "  error concentration    50 % of the error in {} elements ({:.2} %), 90 % in {} ({:.2} %)",
            thousands(self.elements_for_half),
            pct(self.elements_for_half),
            thousands(self.elements_for_ninety),
            pct(self.elements_for_ninety)
        )?;
        writeln!(w)?;
        writeln!(w, "  largest element errors")?;
        writeln!(
            w,
            "  {:>4}  {:>10}  {:<7}  {:<40}  {:>12}  {:>7}",
            "rank", "cell", "kind", "centroid", "error_energy", "share"
        )?;
        for (i, t) in self.top_elements.iter().enumerate() {
            let c = if self.dimension == 2 {
                format!(
                    "({}, {})",
                    number(t.centroid[0], 5),
                    number(t.centroid[1], 5)
                )
            } else {
                format!(
                    "({}, {}, {})",
                    number(t.centroid[0], 5),
                    number(t.centroid[1], 5),
                    number(t.centroid[2], 5)
                )
            };
            writeln!(
                w,
                "  {:>4}  {:>10}  {:<7}  {:<40}  {:>12}  {:>6.2}%",
                i + 1,
                t.id,
                t.kind,
                c,
                number(t.error_energy, 4),
                100.0 * t.error_share
            )?;
        }
        write_footer(w, &self.notes, &self.warnings)
    }

    /// The JSON object for `--json`.
    pub fn to_json(&self) -> Value {
        json!({
            "file": self.file,
            "elements": self.elements,
            "element_kinds": self.kinds.iter().map(|(k, n)| json!({"kind": k, "count": n})).collect::<Vec<_>>(),
            "nodes": self.nodes,
            "dimension": self.dimension,
            "mode": self.mode,
            "material": self.material,
            "recovery": self.recovery,
            "recovery_rules": self.recovery_rules.iter().map(|(r, n)| json!({"rule": r, "nodes": n})).collect::<Vec<_>>(),
            "energy_norm": self.energy_norm,
            "error_norm": self.error_norm,
            "relative_error": self.relative_error,
            "elements_for_half_error": self.elements_for_half,
            "elements_for_ninety_percent_error": self.elements_for_ninety,
            "top_elements": self.top_elements.iter().map(|t| json!({
                "id": t.id,
                "kind": t.kind,
                "centroid": t.centroid,
                "error_energy": t.error_energy,
                "error_share": t.error_share,
            })).collect::<Vec<_>>(),
            "warnings": self.warnings,
            "notes": self.notes,
            "cautions": CAUTIONS.replace('\n', " "),
        })
    }
}
