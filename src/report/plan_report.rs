//! The plan summary: current error, goal, what the next mesh will cost, marks, singular spots
//! and the files written.

use super::{number, thousands, write_footer, CAUTIONS};
use serde_json::{json, Value};
use std::io::{self, Write};

/// One singular spot as the report shows it.
#[derive(Clone, Debug)]
pub struct SpotLine {
    /// Plain kind name ("reentrant_corner", "clamped_free_corner", ...).
    pub kind: String,
    /// Where it is.
    pub location: [f64; 3],
    /// Interior angle in degrees.
    pub angle_deg: f64,
    /// Singularity exponent lambda.
    pub lambda: f64,
    /// Elements flagged around it.
    pub elements: usize,
    /// The plain sentence for the analyst.
    pub sentence: String,
}

/// Everything the plan summary states.
#[derive(Clone, Debug)]
pub struct PlanReport {
    /// Input file.
    pub file: String,
    /// Current elements.
    pub elements: usize,
    /// Current nodes.
    pub nodes: usize,
    /// Element kinds with counts.
    pub kinds: Vec<(&'static str, usize)>,
    /// Space dimension.
    pub dimension: usize,
    /// Analysis mode name.
    pub mode: &'static str,
    /// Strategy name and its parameter, in words.
    pub strategy: String,
    /// Current global relative error (fraction).
    pub relative_error: f64,
    /// Target relative error (fraction).
    pub target_error: f64,
    /// Whether the target was the default.
    pub target_is_default: bool,
    /// DOF budget, if given.
    pub max_dofs: Option<f64>,
    /// The budget decided the sizes.
    pub budget_limited: bool,
    /// Predicted relative error of the planned mesh (fraction).
    pub achievable_error: f64,
    /// Predicted elements.
    pub predicted_elements: f64,
    /// Predicted nodes.
    pub predicted_nodes: f64,
    /// Predicted DOFs.
    pub predicted_dofs: f64,
    /// Current DOFs.
    pub current_dofs: f64,
    /// (refined, kept, coarsened).
    pub marks: (usize, usize, usize),
    /// Smallest and largest nodal target size.
    pub size_range: (f64, f64),
    /// Singular spots.
    pub spots: Vec<SpotLine>,
    /// Files written.
    pub files: Vec<String>,
    /// Things the user must read.
    pub warnings: Vec<String>,
    /// Things worth knowing.
    pub notes: Vec<String>,
}

/// A fraction as a percentage with 3 significant digits (0.0115 -> "1.15", 3.7e-5 -> "0.00370").
pub fn percent(fraction: f64) -> String {
    number(100.0 * fraction, 3)
}

impl PlanReport {
    /// Writes the text summary.
    pub fn write_text(&self, w: &mut impl Write) -> io::Result<()> {
        let kinds = self
            .kinds
            .iter()
            .map(|(k, n)| format!("{k} {}", thousands(*n)))
            .collect::<Vec<_>>()
            .join(", ");
        let count = |v: f64| thousands(v.round().max(0.0) as usize);
        writeln!(w, "hone plan: {}", self.file)?;
        writeln!(
            w,
            "  current mesh           {} elements ({kinds}), {} nodes, {} DOFs; {}D, {}",
            thousands(self.elements),
            thousands(self.nodes),
            count(self.current_dofs),
            self.dimension,
            self.mode
        )?;
        writeln!(w, "  strategy               {}", self.strategy)?;
        writeln!(w)?;
        writeln!(
            w,
            "  global relative error  {} % now",
            percent(self.relative_error)
        )?;
        writeln!(
            w,
            "  target error           {} %{}",
            percent(self.target_error),
            if self.target_is_default {
                " (default, common practice)"
            } else {
                ""
            }
        )?;
        if let Some(b) = self.max_dofs {
            writeln!(
                w,
                "  DOF budget             {}{}",
                count(b),
                if self.budget_limited {
                    ": the target does not fit, the budget is spent optimally"
                } else {
                    ": the target fits"
                }
            )?;
        }
        writeln!(
            w,
            "  achievable error       {} % (predicted for the planned mesh)",
            percent(self.achievable_error)
        )?;
        writeln!(w)?;
        let ratio = self.predicted_dofs / self.current_dofs.max(1.0);
        writeln!(
            w,
            "  next mesh (predicted)  {} elements, {} nodes, {} DOFs ({}x the current DOFs)",
            count(self.predicted_elements),
            count(self.predicted_nodes),
            count(self.predicted_dofs),
            number(ratio, 3)
        )?;
        writeln!(
            w,
            "  elements               {} refined, {} kept, {} may coarsen",
            thousands(self.marks.0),
            thousands(self.marks.1),
            thousands(self.marks.2)
        )?;
        writeln!(
            w,
            "  target sizes           {} to {}",
            number(self.size_range.0, 4),
            number(self.size_range.1, 4)
        )?;
        writeln!(w)?;
        if self.spots.is_empty() {
            writeln!(w, "  singular spots         none found")?;
        } else {
            writeln!(w, "  singular spots         {}", self.spots.len())?;
            for s in &self.spots {
                writeln!(w, "    - {}", s.sentence)?;
                writeln!(
                    w,
                    "      {} elements around it are sized with lambda {:.4}.",
                    thousands(s.elements),
                    s.lambda
                )?;
            }
        }
        if !self.files.is_empty() {
            writeln!(w)?;
            writeln!(w, "  written")?;
            for f in &self.files {
                writeln!(w, "    {f}")?;
            }
        }
        write_footer(w, &self.notes, &self.warnings)
    }

    /// The summary object (stdout with `--json`, and the `summary` of plan.json).
    pub fn to_json(&self) -> Value {
        json!({
            "file": self.file,
            "current_elements": self.elements,
            "current_nodes": self.nodes,
            "current_dofs": self.current_dofs,
            "element_kinds": self.kinds.iter().map(|(k, n)| json!({"kind": k, "count": n})).collect::<Vec<_>>(),
            "dimension": self.dimension,
            "mode": self.mode,
            "strategy": self.strategy,
            "relative_error": self.relative_error,
            "target_error": self.target_error,
            "max_dofs": self.max_dofs,
            "budget_limited": self.budget_limited,
            "achievable_error": self.achievable_error,
            "predicted_elements": self.predicted_elements.round(),
            "predicted_nodes": self.predicted_nodes.round(),
            "predicted_dofs": self.predicted_dofs.round(),
            "marked_elements": self.marks.0,
            "kept_elements": self.marks.1,
            "coarsened_elements": self.marks.2,
            "size_target_min": self.size_range.0,
            "size_target_max": self.size_range.1,
            "singular_points": self.spots.iter().map(|s| json!({
                "kind": s.kind,
                "location": s.location,
                "angle_deg": s.angle_deg,
                "lambda": s.lambda,
                "elements": s.elements,
                "note": s.sentence,
            })).collect::<Vec<_>>(),
            "files": self.files,
            "warnings": self.warnings,
            "notes": self.notes,
            "cautions": CAUTIONS.replace('\n', " "),
        })
    }
}
