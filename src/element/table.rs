//! Shape functions and reference gradients tabulated once per element kind and point set.
//!
//! Hot loops over many cells of one kind read `N` and `dN/dxi` from these tables instead of
//! re-evaluating the polynomials; the tables are built lazily on first use and cached for the
//! life of the program (one `OnceLock` per kind and point set).

use std::sync::OnceLock;

use super::{ElementKind, Rule};

/// Which point set a [`ShapeTable`] is tabulated at.
#[derive(Copy, Clone, Debug, PartialEq, Eq, Hash)]
pub enum TableRule {
    /// The full quadrature rule, [`ElementKind::quadrature`] with [`Rule::Full`].
    Full,
    /// The reduced quadrature rule, [`ElementKind::quadrature`] with [`Rule::Reduced`].
    Reduced,
    /// The SPR sampling points, [`ElementKind::sampling_points`] (weights 1).
    Sampling,
    /// The element's own nodes, [`ElementKind::reference_nodes`] (weights 1); used to
    /// evaluate gradients of the FE field at the nodes.
    Nodes,
}

impl TableRule {
    /// All point sets, in cache order.
    pub const ALL: [TableRule; 4] = [
        TableRule::Full,
        TableRule::Reduced,
        TableRule::Sampling,
        TableRule::Nodes,
    ];
}

/// Shape functions and gradients of one kind at one point set.
#[derive(Clone, Debug, PartialEq)]
pub struct ShapeTable {
    /// Natural coordinates of each point.
    pub points: Vec<[f64; 3]>,
    /// Quadrature weights (1.0 for the `Sampling` and `Nodes` tables).
    pub weights: Vec<f64>,
    /// `points.len() * node_count` values of `N_i`, row-major by point.
    pub n: Vec<f64>,
    /// `points.len() * node_count` reference gradients `dN_i/dxi` (third entry 0 in 2D).
    pub dn: Vec<[f64; 3]>,
}

impl ShapeTable {
    /// Tabulates `kind` at `points` with `weights`.
    pub fn new(kind: ElementKind, points: Vec<[f64; 3]>, weights: Vec<f64>) -> ShapeTable {
        let nn = kind.node_count();
        let mut n = vec![0.0; points.len() * nn];
        let mut dn = vec![[0.0; 3]; points.len() * nn];
        for (k, &xi) in points.iter().enumerate() {
            let range = k * nn..(k + 1) * nn;
            kind.shape_functions_and_gradients(xi, &mut n[range.clone()], &mut dn[range]);
        }
        ShapeTable {
            points,
            weights,
            n,
            dn,
        }
    }

    /// Number of points.
    pub fn len(&self) -> usize {
        self.points.len()
    }

    /// Whether the table has no points (never the case for the cached tables).
    pub fn is_empty(&self) -> bool {
        self.points.is_empty()
    }

    /// Number of nodes per point row.
    pub fn node_count(&self) -> usize {
        self.n.len().checked_div(self.points.len()).unwrap_or(0)
    }

    /// Shape functions `N_i` at point `k`.
    pub fn n_at(&self, k: usize) -> &[f64] {
        let nn = self.node_count();
        &self.n[k * nn..(k + 1) * nn]
    }

    /// Reference gradients `dN_i/dxi` at point `k`.
    pub fn dn_at(&self, k: usize) -> &[[f64; 3]] {
        let nn = self.node_count();
        &self.dn[k * nn..(k + 1) * nn]
    }
}

static TABLES: [OnceLock<ShapeTable>; TableRule::ALL.len() * ElementKind::ALL.len()] =
    [const { OnceLock::new() }; TableRule::ALL.len() * ElementKind::ALL.len()];

/// The cached table of `kind` at the point set `rule`.
pub(crate) fn cached(kind: ElementKind, rule: TableRule) -> &'static ShapeTable {
    let slot = kind.index() * TableRule::ALL.len() + rule as usize;
    TABLES[slot].get_or_init(|| {
        let (points, weights): (Vec<[f64; 3]>, Vec<f64>) = match rule {
            TableRule::Full => kind
                .quadrature(Rule::Full)
                .iter()
                .map(|q| (q.xi, q.weight))
                .unzip(),
            TableRule::Reduced => kind
                .quadrature(Rule::Reduced)
                .iter()
                .map(|q| (q.xi, q.weight))
                .unzip(),
            TableRule::Sampling => kind.sampling_points().iter().map(|&p| (p, 1.0)).unzip(),
            TableRule::Nodes => kind.reference_nodes().iter().map(|&p| (p, 1.0)).unzip(),
        };
        ShapeTable::new(kind, points, weights)
    })
}
