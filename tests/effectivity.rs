//! Effectivity of the SPR estimator against exact errors on the benchmark problems.
//!
//! Bands (ours, stated as such; Zienkiewicz & Zhu 1992, part 2, report SPR effectivities close
//! to one on smooth problems): smooth problems 0.9 <= theta <= 1.1 for tri3, tri6, quad4, quad8,
//! tet4, tet10, hex8, hex20; the L-shape 0.8 <= theta <= 1.25 (on meshes graded toward the
//! corner for tri3, tri6, quad4, quad8; on uniform meshes for tri6, quad9). Checked on every
//! level but the coarsest of each sequence; nodal averaging is reported, not banded. The
//! printed rows are the effectivity table of DEVELOPERS.md (run with `--nocapture`).

use hone::element::ElementKind;
use hone::reference::effectivity::{effectivity_row, EffectivityRow, TABLE_HEADER};
use hone::reference::problems::{self, Problem};

type Build = fn(ElementKind, usize) -> Problem;

fn sequence(build: Build, kind: ElementKind, levels: &[usize]) -> Vec<EffectivityRow> {
    levels
        .iter()
        .map(|&n| {
            effectivity_row(&build(kind, n), n)
                .unwrap_or_else(|e| panic!("{kind:?} level {n}: {e}"))
        })
        .collect()
}

fn check(rows: &[EffectivityRow], low: f64, high: f64, failures: &mut Vec<String>) {
    for row in rows {
        println!("{}", row.line());
    }
    for row in &rows[1..] {
        if !(low..=high).contains(&row.theta_spr) {
            failures.push(format!(
                "{} {} level {}: theta {:.3} outside [{low}, {high}]",
                row.problem, row.kind, row.level, row.theta_spr
            ));
        }
    }
}

#[test]
fn smooth_problems_2d() {
    println!("{TABLE_HEADER}");
    let mut failures = Vec::new();
    let suites: [(Build, &[usize]); 4] = [
        (problems::cantilever, &[2, 4, 8]),
        (problems::lame_axisymmetric, &[2, 4, 8]),
        (problems::lame_plane_strain, &[4, 8, 16]),
        (problems::kirsch, &[4, 8, 16]),
    ];
    for (build, levels) in suites {
        for kind in [
            ElementKind::Tri3,
            ElementKind::Tri6,
            ElementKind::Quad4,
            ElementKind::Quad8,
        ] {
            check(&sequence(build, kind, levels), 0.9, 1.1, &mut failures);
        }
    }
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

#[test]
fn smooth_problems_3d() {
    println!("{TABLE_HEADER}");
    let mut failures = Vec::new();
    let suites: [(Build, &[usize]); 2] = [
        (problems::manufactured_box, &[2, 4, 6]),
        (problems::lame_solid, &[4, 10, 12]),
    ];
    for (build, levels) in suites {
        for kind in [
            ElementKind::Tet4,
            ElementKind::Tet10,
            ElementKind::Hex8,
            ElementKind::Hex20,
        ] {
            check(&sequence(build, kind, levels), 0.9, 1.1, &mut failures);
        }
    }
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

/// The L-shape band (0.8-1.25) on meshes graded toward the corner
/// (`problems::l_shape_graded`, sizes growing like r^(1/2)) for every 2D kind, and on uniform
/// meshes for tri6 and quad9. On uniform meshes tri3, quad4 and quad8 measure 0.75-0.80: there
/// the elements touching the corner hold a fixed share of the error at every level (the test
/// below), and no polynomial recovery reproduces the r^(lambda - 1) stress inside them. Those
/// rows are reported, not banded; the band is not widened.
#[test]
fn singular_l_shape() {
    println!("{TABLE_HEADER}");
    let mut failures = Vec::new();
    for kind in [
        ElementKind::Tri3,
        ElementKind::Tri6,
        ElementKind::Quad4,
        ElementKind::Quad8,
    ] {
        check(
            &sequence(problems::l_shape_graded, kind, &[4, 8, 16]),
            0.8,
            1.25,
            &mut failures,
        );
    }
    for kind in [ElementKind::Tri6, ElementKind::Quad9] {
        check(
            &sequence(problems::l_shape, kind, &[4, 8, 16]),
            0.8,
            1.25,
            &mut failures,
        );
    }
    for kind in [ElementKind::Tri3, ElementKind::Quad4, ElementKind::Quad8] {
        for row in sequence(problems::l_shape, kind, &[4, 8, 16]) {
            println!("{}", row.line());
        }
    }
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

/// Why uniform meshes miss the band: the exact error of the elements touching the corner is a
/// fixed share of the total at every level (the r^lambda field looks the same at every scale,
/// so each halving reproduces the same corner picture), and inside those elements SPR recovers
/// only part of it. Measured at n = 8 and 16: shares 0.64 (tri3), 0.73 (quad4), 0.91 (quad8),
/// corner effectivities 0.65-0.78; the rest of the mesh is near one (0.82-1.25).
#[test]
fn uniform_l_shape_error_sits_in_the_corner_elements() {
    for kind in [ElementKind::Tri3, ElementKind::Quad4, ElementKind::Quad8] {
        let mut shares = Vec::new();
        for n in [8, 16] {
            let problem = problems::l_shape(kind, n);
            let solved = problem.solve().unwrap();
            let computed = problem
                .estimate(&solved, hone::recovery::RecoveryMethod::Spr)
                .unwrap();
            let mesh = &solved.model.mesh;
            let (mut exact, mut estimated) = (0.0, 0.0);
            for e in 0..mesh.element_count() {
                let touches = mesh.element(e).1.iter().any(|&v| {
                    let p = mesh.points[v as usize];
                    p[0].abs() < 1e-12 && p[1].abs() < 1e-12
                });
                if touches {
                    exact += solved.element_error_sq[e];
                    estimated += computed.estimate.error_sq[e];
                }
            }
            let share = exact / solved.error_sq;
            let corner_theta = (estimated / exact).sqrt();
            println!(
                "{} n = {n}: corner share {share:.3}, corner theta {corner_theta:.3}",
                kind.name()
            );
            assert!(share > 0.6, "{kind:?} n = {n}: corner share {share}");
            assert!(
                corner_theta < 0.8,
                "{kind:?} n = {n}: corner theta {corner_theta}"
            );
            shares.push(share);
        }
        // The same share at both levels, within 0.03 (measured differences 0.002-0.016).
        assert!(
            (shares[0] - shares[1]).abs() < 0.03,
            "{kind:?}: shares {shares:?}"
        );
    }
}
