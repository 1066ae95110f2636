//! Shape-function properties that hold for every Lagrange / serendipity element (common
//! practice): partition of unity, Kronecker delta at the nodes, gradients summing to zero and
//! agreeing with central finite differences.

use super::super::{ElementKind, MAX_NODES};
use super::{assert_close, gradients, shape, Rng};

/// Values are O(1) and each sum has at most 27 terms: 1e-13 is a few hundred ulps.
const SUM_TOL: f64 = 1e-13;

#[test]
fn partition_of_unity_and_gradients_sum_to_zero() {
    let mut rng = Rng::new(1);
    for kind in ElementKind::ALL {
        let nn = kind.node_count();
        for _ in 0..50 {
            let xi = rng.point_in(kind, 0.0);
            let n = shape(kind, xi);
            let dn = gradients(kind, xi);
            let sum: f64 = n[..nn].iter().sum();
            assert_close(sum, 1.0, SUM_TOL, 1.0, &format!("{kind} sum N at {xi:?}"));
            for d in 0..3 {
                let gsum: f64 = dn[..nn].iter().map(|g| g[d]).sum();
                assert_close(
                    gsum,
                    0.0,
                    SUM_TOL,
                    1.0,
                    &format!("{kind} sum dN/dxi{d} at {xi:?}"),
                );
            }
            if kind.dim() == 2 {
                assert!(
                    dn[..nn].iter().all(|g| g[2] == 0.0),
                    "{kind}: third gradient entry not 0"
                );
            }
        }
    }
}

#[test]
fn shape_functions_are_kronecker_at_reference_nodes() {
    for kind in ElementKind::ALL {
        let nn = kind.node_count();
        for (j, &xi) in kind.reference_nodes().iter().enumerate() {
            let n = shape(kind, xi);
            for (i, &v) in n[..nn].iter().enumerate() {
                let expected = if i == j { 1.0 } else { 0.0 };
                assert_close(
                    v,
                    expected,
                    SUM_TOL,
                    1.0,
                    &format!("{kind} N_{i} at node {j}"),
                );
            }
        }
    }
}

#[test]
fn gradients_match_central_finite_differences() {
    // Central differences with step 1e-6: truncation error ~ h^2 |N'''| ~ 1e-12 and round-off
    // ~ 1e-16 / 1e-6 = 1e-10 on O(1) values, so 1e-8 (relative to the O(1) gradients) leaves
    // a wide margin while still catching any wrong term.
    const H: f64 = 1e-6;
    const FD_TOL: f64 = 1e-8;
    let mut rng = Rng::new(2);
    for kind in ElementKind::ALL {
        let nn = kind.node_count();
        for _ in 0..20 {
            let xi = rng.point_in(kind, 0.01);
            let dn = gradients(kind, xi);
            for d in 0..kind.dim() {
                let mut plus = xi;
                let mut minus = xi;
                plus[d] += H;
                minus[d] -= H;
                let np = shape(kind, plus);
                let nm = shape(kind, minus);
                for i in 0..nn {
                    let fd = (np[i] - nm[i]) / (2.0 * H);
                    assert_close(dn[i][d], fd, FD_TOL, 1.0, &format!("{kind} dN_{i}/dxi{d}"));
                }
            }
        }
    }
}

#[test]
fn shape_table_rows_match_direct_evaluation() {
    use super::super::TableRule;
    for kind in ElementKind::ALL {
        let nn = kind.node_count();
        for rule in TableRule::ALL {
            let table = kind.table(rule);
            assert!(!table.is_empty(), "{kind} {rule:?} table is empty");
            assert_eq!(table.n.len(), table.len() * nn);
            assert_eq!(table.dn.len(), table.len() * nn);
            assert_eq!(table.weights.len(), table.len());
            for k in 0..table.len() {
                let xi = table.points[k];
                assert_eq!(
                    table.n_at(k),
                    &shape(kind, xi)[..nn],
                    "{kind} {rule:?} N row {k}"
                );
                assert_eq!(
                    table.dn_at(k),
                    &gradients(kind, xi)[..nn],
                    "{kind} {rule:?} dN row {k}"
                );
            }
            // The cache hands out the same table every time.
            assert!(std::ptr::eq(table, kind.table(rule)));
        }
        assert_eq!(kind.table(TableRule::Nodes).points, kind.reference_nodes());
        assert_eq!(
            kind.table(TableRule::Sampling).points,
            kind.sampling_points()
        );
    }
    assert!(ElementKind::ALL.iter().all(|k| k.node_count() <= MAX_NODES));
}
