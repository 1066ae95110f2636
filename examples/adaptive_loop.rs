//! Prints the error-against-DOF tables of uniform refinement and of the adaptive loop (solve,
//! estimate, screen, plan, remesh) on the L-shape and the plate with a hole, tri3 and tri6,
//! with least-squares rates and the DOFs each needs for 1 % exact relative error.
//!
//! ```text
//! cargo run --release --example adaptive_loop
//! ```

use hone::element::ElementKind;
use hone::plan::PlanSettings;
use hone::reference::adaptive::{
    adaptive_run, uniform_run, AdaptiveSettings, ProblemOn, RateFit, StepRecord, TABLE_HEADER,
};
use hone::reference::meshes::{Domain, MesherOptions};
use hone::reference::problems::{kirsch_domain, kirsch_on, l_shape_domain, l_shape_on};

/// One problem and kind: uniform sizes and the adaptive start size.
struct Case {
    name: &'static str,
    build: ProblemOn,
    domain: Domain,
    kind: ElementKind,
    uniform: Vec<f64>,
    start: f64,
}

fn table(title: &str, records: &[StepRecord]) {
    println!("\n{title}\n\n{TABLE_HEADER}");
    for r in records {
        println!("{}", r.line());
    }
}

fn rate_line(what: &str, records: &[StepRecord]) {
    match RateFit::of_records(records) {
        Some(fit) => println!(
            "\n{what}: rate {:.3}, 1 % at {} DOFs",
            fit.rate,
            fit.dofs_for(0.01)
                .map_or("-".to_string(), |n| format!("{n:.3e}"))
        ),
        None => println!("\n{what}: no fit"),
    }
}

fn main() {
    let cases = [
        Case {
            name: "L-shape",
            build: l_shape_on,
            domain: l_shape_domain(),
            kind: ElementKind::Tri3,
            uniform: vec![0.25, 0.125, 0.0625, 0.03125],
            start: 0.125,
        },
        Case {
            name: "L-shape",
            build: l_shape_on,
            domain: l_shape_domain(),
            kind: ElementKind::Tri6,
            uniform: vec![0.5, 0.25, 0.125, 0.0625],
            start: 0.25,
        },
        Case {
            name: "plate with hole",
            build: kirsch_on,
            domain: kirsch_domain(),
            kind: ElementKind::Tri3,
            uniform: vec![0.5, 0.25, 0.125, 0.0625],
            start: 0.5,
        },
        Case {
            name: "plate with hole",
            build: kirsch_on,
            domain: kirsch_domain(),
            kind: ElementKind::Tri6,
            uniform: vec![2.0, 1.0, 0.5, 0.25],
            start: 1.0,
        },
    ];
    let mesher = MesherOptions::default();
    for c in &cases {
        let kind = c.kind.name();
        let t = std::time::Instant::now();
        let uniform = uniform_run(c.build, &c.domain, c.kind, &c.uniform, &mesher)
            .unwrap_or_else(|e| panic!("{} {kind} uniform: {e}", c.name));
        table(
            &format!(
                "### {} {kind}, uniform (h = {:?}; {:.1} s)",
                c.name,
                c.uniform,
                t.elapsed().as_secs_f64()
            ),
            &uniform,
        );
        rate_line("uniform fit", &uniform);
        for targets in [vec![0.01; 5], vec![0.08, 0.04, 0.02, 0.01, 0.01]] {
            let settings = AdaptiveSettings {
                kind: c.kind,
                start_size: c.start,
                targets: targets.clone(),
                plan: PlanSettings {
                    fit_final_error: true,
                    ..PlanSettings::default()
                },
                mesher,
            };
            let t = std::time::Instant::now();
            let adaptive = adaptive_run(c.build, &c.domain, &settings)
                .unwrap_or_else(|e| panic!("{} {kind} adaptive: {e}", c.name));
            let percent: Vec<f64> = targets.iter().map(|t| 100.0 * t).collect();
            table(
                &format!(
                    "### {} {kind}, adaptive (start h = {}, targets {percent:?} %; {:.1} s)",
                    c.name,
                    c.start,
                    t.elapsed().as_secs_f64()
                ),
                &adaptive,
            );
            let misses: Vec<String> = adaptive
                .windows(2)
                .map(|w| {
                    format!(
                        "{:+.1} %",
                        100.0 * w[1].dof_prediction_error(&w[0]).unwrap_or(0.0)
                    )
                })
                .collect();
            println!(
                "\nDOFs against the previous plan's prediction: {}",
                misses.join(", ")
            );
            if targets[0] != targets[3] {
                rate_line("adaptive fit over steps 1-4", &adaptive[1..5]);
            }
        }
    }
}
