use super::*;

/// Edge rule `h_j <= h_i + g |x_i - x_j|` with a relative slack for the rounding of one sum.
fn obeys_rule(points: &[[f64; 3]], edges: &[(u32, u32)], h: &[f64], g: f64) -> bool {
    edges.iter().all(|&(a, b)| {
        let (a, b) = (a as usize, b as usize);
        let d = g * distance(&points[a], &points[b]);
        h[b] <= (h[a] + d) * (1.0 + 1e-14) && h[a] <= (h[b] + d) * (1.0 + 1e-14)
    })
}

/// Structured n x n grid of points in the unit square with its horizontal, vertical and one
/// diagonal edge per cell.
fn grid(n: usize) -> (Vec<[f64; 3]>, Vec<(u32, u32)>) {
    let id = |i: usize, j: usize| (i * n + j) as u32;
    let mut points = Vec::new();
    let mut edges = Vec::new();
    for i in 0..n {
        for j in 0..n {
            // slightly irregular spacing so distances differ between edges
            let x = j as f64 + 0.1 * ((i * 7 + j * 3) % 5) as f64;
            points.push([x, i as f64, 0.0]);
            if j + 1 < n {
                edges.push((id(i, j), id(i, j + 1)));
            }
            if i + 1 < n {
                edges.push((id(i, j), id(i + 1, j)));
            }
            if i + 1 < n && j + 1 < n {
                edges.push((id(i, j), id(i + 1, j + 1)));
            }
        }
    }
    (points, edges)
}

#[test]
fn chain_grows_linearly_from_the_small_size() {
    // 1D chain with uneven spacing, one small size at node 3: h = min(H, h0 + g |x - x_3|)
    // (Persson 2006, discrete form, method sheet 3.7).
    let xs = [0.0, 0.4, 1.5, 2.0, 2.3, 3.9, 4.0, 6.5];
    let points: Vec<[f64; 3]> = xs.iter().map(|&x| [x, 0.0, 0.0]).collect();
    let edges: Vec<(u32, u32)> = (0..7).map(|i| (i, i + 1)).collect();
    let (h0, g, big) = (0.05, 0.3, 10.0);
    let mut h = vec![big; xs.len()];
    h[3] = h0;
    limit_gradation(&points, &edges, &mut h, g).unwrap();
    for (k, x) in xs.iter().enumerate() {
        let expected = (h0 + g * (x - xs[3]).abs()).min(big);
        // the path sum adds edge lengths one by one: a few ulps of rounding
        assert!((h[k] - expected).abs() <= 1e-14 * expected, "{k}: {}", h[k]);
    }
}

#[test]
fn grid_output_obeys_the_rule_and_never_grows() {
    let (points, edges) = grid(12);
    let input: Vec<f64> = (0..points.len())
        .map(|k| 0.01 + ((k * 37) % 23) as f64 * 0.2)
        .collect();
    let mut h = input.clone();
    limit_gradation(&points, &edges, &mut h, 0.25).unwrap();
    assert!(obeys_rule(&points, &edges, &h, 0.25));
    assert!(!obeys_rule(&points, &edges, &input, 0.25)); // the test did change something
    assert!(h.iter().zip(&input).all(|(a, b)| a <= b));
    // graded already: a second pass changes nothing
    let mut again = h.clone();
    limit_gradation(&points, &edges, &mut again, 0.25).unwrap();
    assert_eq!(again, h);
}

#[test]
fn constant_field_is_unchanged() {
    let (points, edges) = grid(5);
    let mut h = vec![0.7; points.len()];
    limit_gradation(&points, &edges, &mut h, 0.2).unwrap();
    assert!(h.iter().all(|&v| v == 0.7));
}

#[test]
fn bad_inputs_are_typed_errors() {
    let points = [[0.0; 3], [1.0, 0.0, 0.0]];
    let mut h = [1.0, 1.0];
    assert!(matches!(
        limit_gradation(&points, &[(0, 2)], &mut h, 0.2),
        Err(PlanError::Edge { index: 0, .. })
    ));
    assert!(limit_gradation(&points, &[(0, 1)], &mut h, -0.2).is_err());
    assert!(limit_gradation(&points, &[(0, 1)], &mut [1.0], 0.2).is_err());
    assert!(limit_gradation(&points, &[(0, 1)], &mut [1.0, f64::NAN], 0.2).is_err());
}

/// The heap starts from the nodes that lower a neighbour only; the result is still the minimum
/// over all paths, `h_j = min_i (h_i + g * path length)` (Persson 2006, discrete form), checked
/// against Bellman-Ford relaxation of every edge until nothing changes (an independent way to
/// the same fixed point; equal up to the rounding of path sums taken in another order). The
/// edge graph is reused for a second field, as a plan does.
#[test]
fn seeded_heap_gives_the_shortest_path_field() {
    let (points, edges) = grid(15);
    let graph = EdgeGraph::new(&points, &edges).unwrap();
    for (g, shift) in [(0.3, 3usize), (0.05, 11)] {
        let input: Vec<f64> = (0..points.len())
            .map(|k| 0.02 + ((k * 29 + shift) % 31) as f64 * 0.15)
            .collect();
        let mut expected = input.clone();
        loop {
            let mut changed = false;
            for &(a, b) in &edges {
                let (a, b) = (a as usize, b as usize);
                let d = g * distance(&points[a], &points[b]);
                for (i, j) in [(a, b), (b, a)] {
                    if expected[i] + d < expected[j] {
                        expected[j] = expected[i] + d;
                        changed = true;
                    }
                }
            }
            if !changed {
                break;
            }
        }
        let mut h = input.clone();
        graph.limit(&mut h, g).unwrap();
        assert_ne!(h, input, "g = {g}: the field had to change");
        for (k, (a, b)) in h.iter().zip(&expected).enumerate() {
            assert!((a - b).abs() <= 1e-13 * b, "g = {g}, node {k}: {a} vs {b}");
        }
    }
}
