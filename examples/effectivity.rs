//! Prints the effectivity table: for each benchmark problem, element kind and mesh level the
//! exact relative error, the estimated one, and the effectivity index theta = estimated / exact
//! for SPR and for nodal averaging, plus the rank correlation of element indicators.
//!
//! ```text
//! cargo run --release --example effectivity [-- --levels 3]
//! ```

use hone::element::ElementKind;
use hone::reference::effectivity::{effectivity_row, TABLE_HEADER};
use hone::reference::problems::{self, Problem};

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let levels: usize = args
        .iter()
        .position(|a| a == "--levels")
        .and_then(|i| args.get(i + 1))
        .and_then(|v| v.parse().ok())
        .unwrap_or(3);
    type Build = fn(ElementKind, usize) -> Problem;
    let two_d = [
        ElementKind::Tri3,
        ElementKind::Tri6,
        ElementKind::Quad4,
        ElementKind::Quad8,
        ElementKind::Quad9,
    ];
    let three_d = [
        ElementKind::Tet4,
        ElementKind::Tet10,
        ElementKind::Hex8,
        ElementKind::Hex20,
        ElementKind::Hex27,
        ElementKind::Wedge6,
        ElementKind::Wedge15,
    ];
    let suites: Vec<(Build, &[ElementKind], usize)> = vec![
        (problems::cantilever, &two_d, 2),
        (problems::kirsch, &two_d, 2),
        (problems::lame_plane_strain, &two_d, 2),
        (problems::lame_axisymmetric, &two_d, 2),
        (problems::l_shape, &two_d, 2),
        (problems::l_shape_graded, &two_d, 2),
        (problems::lame_solid, &three_d, 2),
        (problems::manufactured_box, &three_d, 2),
    ];
    println!("{TABLE_HEADER}");
    for (build, kinds, base) in suites {
        for &kind in kinds {
            for level in 0..levels {
                let n = base << level;
                match effectivity_row(&build(kind, n), n) {
                    Ok(row) => println!("{}", row.line()),
                    Err(e) => println!(
                        "| {} | {} | {n} | failed: {e} |",
                        build(kind, 1).name,
                        kind.name()
                    ),
                }
            }
        }
    }
}
