//! Shape-function building blocks shared by the element families: 1D Lagrange polynomials,
//! tensor-product Lagrange elements, serendipity elements and barycentric simplex elements.
//! Each writes `N_i` into `n` and `dN_i/dxi_j` into `dn` for every node, without allocating.

/// 1D Lagrange polynomial of degree `order` (1 or 2) on the nodes {-1, 1} or {-1, 0, 1},
/// belonging to the node at `c`, and its derivative, at `x`.
///
/// Linear: `(1 + c x)/2`. Quadratic: `x (x - 1)/2` (c = -1), `1 - x^2` (c = 0),
/// `x (x + 1)/2` (c = 1) (common practice).
#[inline]
pub(crate) fn lagrange_1d(order: usize, c: f64, x: f64) -> (f64, f64) {
    if order == 1 {
        (0.5 * (1.0 + c * x), 0.5 * c)
    } else if c == 0.0 {
        (1.0 - x * x, -2.0 * x)
    } else {
        (0.5 * x * (x + c), x + 0.5 * c)
    }
}

/// Tensor-product Lagrange element (quad4, quad9, hex8, hex27):
/// `N_i(xi) = prod_d l_{c_id}(xi_d)` with `c_i` the node's reference coordinates.
pub(crate) fn tensor_lagrange(
    nodes: &[[f64; 3]],
    dim: usize,
    order: usize,
    xi: [f64; 3],
    n: &mut [f64],
    dn: &mut [[f64; 3]],
) {
    for (i, c) in nodes.iter().enumerate() {
        let mut val = [1.0; 3];
        let mut der = [0.0; 3];
        for d in 0..dim {
            (val[d], der[d]) = lagrange_1d(order, c[d], xi[d]);
        }
        n[i] = val[0] * val[1] * val[2];
        dn[i] = [
            der[0] * val[1] * val[2],
            val[0] * der[1] * val[2],
            val[0] * val[1] * der[2],
        ];
    }
}

/// Quadratic serendipity element on [-1, 1]^dim (quad8, hex20), e.g. Zienkiewicz & Taylor,
/// "The Finite Element Method", vol. 1, serendipity family (common practice):
/// corner nodes `N = 2^-dim prod_d (1 + c_d xi_d) (sum_d c_d xi_d - (dim - 1))`;
/// mid-edge nodes (exactly one `c_d = 0`): `N = 2^(1-dim) (1 - xi_d^2) prod_{e != d} (1 + c_e xi_e)`.
pub(crate) fn serendipity(
    nodes: &[[f64; 3]],
    dim: usize,
    xi: [f64; 3],
    n: &mut [f64],
    dn: &mut [[f64; 3]],
) {
    let scale_corner = 0.5f64.powi(dim as i32);
    let scale_mid = 2.0 * scale_corner;
    for (i, c) in nodes.iter().enumerate() {
        // Factors per direction: (1 + c xi) for c != 0, (1 - xi^2) for c == 0.
        let mut val = [1.0; 3];
        let mut der = [0.0; 3];
        let mut zero_dir = None;
        for d in 0..dim {
            if c[d] == 0.0 {
                zero_dir = Some(d);
                (val[d], der[d]) = (1.0 - xi[d] * xi[d], -2.0 * xi[d]);
            } else {
                (val[d], der[d]) = (1.0 + c[d] * xi[d], c[d]);
            }
        }
        let prod = val[0] * val[1] * val[2];
        let dprod = [
            der[0] * val[1] * val[2],
            val[0] * der[1] * val[2],
            val[0] * val[1] * der[2],
        ];
        if zero_dir.is_some() {
            n[i] = scale_mid * prod;
            dn[i] = dprod.map(|g| scale_mid * g);
        } else {
            let mut sum = -(dim as f64 - 1.0);
            for d in 0..dim {
                sum += c[d] * xi[d];
            }
            n[i] = scale_corner * prod * sum;
            for d in 0..3 {
                let dsum = if d < dim { c[d] } else { 0.0 };
                dn[i][d] = scale_corner * (dprod[d] * sum + prod * dsum);
            }
        }
    }
}

/// Barycentric coordinates of the unit simplex in `dim` dimensions and their constant gradients:
/// `L0 = 1 - sum_d xi_d`, `L_k = xi_(k-1)`.
#[inline]
pub(crate) fn barycentric(dim: usize, xi: [f64; 3]) -> ([f64; 4], [[f64; 3]; 4]) {
    let mut l = [0.0; 4];
    let mut dl = [[0.0; 3]; 4];
    l[0] = 1.0;
    for d in 0..dim {
        l[0] -= xi[d];
        l[d + 1] = xi[d];
        dl[0][d] = -1.0;
        dl[d + 1][d] = 1.0;
    }
    (l, dl)
}

/// Lagrange simplex element of degree 1 or 2 (tri3, tri6, tet4, tet10) in barycentric form
/// (common practice): corners `N_i = L_i` (p = 1) or `L_i (2 L_i - 1)` (p = 2); the mid node of
/// edge `(a, b)` has `N = 4 L_a L_b`. Corner `i` is the vertex where `L_i = 1`.
pub(crate) fn simplex(
    dim: usize,
    edges: &[[usize; 2]],
    mid_nodes: &[usize],
    xi: [f64; 3],
    n: &mut [f64],
    dn: &mut [[f64; 3]],
) {
    let (l, dl) = barycentric(dim, xi);
    let quadratic = !mid_nodes.is_empty();
    for i in 0..=dim {
        if quadratic {
            n[i] = l[i] * (2.0 * l[i] - 1.0);
            dn[i] = dl[i].map(|g| (4.0 * l[i] - 1.0) * g);
        } else {
            n[i] = l[i];
            dn[i] = dl[i];
        }
    }
    for (&[a, b], &m) in edges.iter().zip(mid_nodes) {
        n[m] = 4.0 * l[a] * l[b];
        for d in 0..3 {
            dn[m][d] = 4.0 * (dl[a][d] * l[b] + l[a] * dl[b][d]);
        }
    }
}
