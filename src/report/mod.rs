//! Summaries for people (text) and scripts (JSON). Writers take `impl Write` so tests render
//! into memory. Every report carries the cautions.

mod estimate_report;
pub mod plan_files;
mod plan_report;
mod study_plot;
mod study_report;

pub use estimate_report::{EstimateReport, TopElement};
pub use plan_report::{percent, PlanReport, SpotLine};
pub use study_plot::write_study_svg;
pub use study_report::{StudyReport, NO_LIMIT};

/// The cautions every report and the README state.
pub const CAUTIONS: &str = "\
This estimate covers discretisation error only, not modelling, material or load error.
Stresses at singular points (sharp re-entrant corners, point loads, point supports) are not
physical: they grow without limit under refinement. Use these results to guide mesh design;
design decisions follow the applicable codes and a licensed engineer's review.";

/// Writes the notes, the warnings and the cautions that end every text report.
pub(crate) fn write_footer(
    w: &mut impl std::io::Write,
    notes: &[String],
    warnings: &[String],
) -> std::io::Result<()> {
    if !warnings.is_empty() || !notes.is_empty() {
        writeln!(w)?;
        for note in notes {
            writeln!(w, "  note: {note}")?;
        }
        for warning in warnings {
            writeln!(w, "  warning: {warning}")?;
        }
    }
    writeln!(w)?;
    for line in CAUTIONS.lines() {
        writeln!(w, "  {line}")?;
    }
    Ok(())
}

/// Formats a count with thousands separators: 1234567 -> "1,234,567".
pub fn thousands(n: usize) -> String {
    let s = n.to_string();
    let mut out = String::with_capacity(s.len() + s.len() / 3);
    for (i, ch) in s.chars().enumerate() {
        if i > 0 && (s.len() - i) % 3 == 0 {
            out.push(',');
        }
        out.push(ch);
    }
    out
}

/// Formats a number compactly with `sig` significant digits (plain or scientific).
pub fn number(v: f64, sig: usize) -> String {
    if v == 0.0 || !v.is_finite() {
        return format!("{v}");
    }
    let mag = v.abs().log10().floor() as i32;
    if (-3..6).contains(&mag) {
        let decimals = (sig as i32 - 1 - mag).max(0) as usize;
        format!("{v:.decimals$}")
    } else {
        format!("{v:.prec$e}", prec = sig.saturating_sub(1))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn thousands_separators() {
        assert_eq!(thousands(0), "0");
        assert_eq!(thousands(999), "999");
        assert_eq!(thousands(1000), "1,000");
        assert_eq!(thousands(1234567), "1,234,567");
    }

    #[test]
    fn compact_numbers() {
        assert_eq!(number(1234.5678, 4), "1235");
        assert_eq!(number(0.012345, 3), "0.0123");
        assert_eq!(number(1.5e-7, 3), "1.50e-7");
        assert_eq!(number(2.5e9, 2), "2.5e9");
    }
}
