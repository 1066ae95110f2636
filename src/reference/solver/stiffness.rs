//! Element kernels: stiffness `K_e = sum_q B^T D B w det J f(x_q)`, the consistent body-force
//! vector `f_e = sum_q N^T b(x_q) w det J f(x_q)` and the strain energy of a solved element.
//!
//! B follows `recovery::ElementData::strain_at` row by row (strains xx, yy, zz, xy, yz, xz,
//! engineering shear): column `ndim a + i` holds the strains of a unit displacement of node `a`
//! in direction `i`. 2D: `e_xx = dN/dx u`, `e_yy = dN/dy v`, `g_xy = dN/dy u + dN/dx v`, and in
//! axisymmetry the hoop strain `N u_r / r` (the limit `dN/dr u_r` on the axis). 3D adds
//! `e_zz = dN/dz w`, `g_yz = dN/dz v + dN/dy w`, `g_xz = dN/dz u + dN/dx w`.
//! (Zienkiewicz & Taylor, The Finite Element Method vol. 1, chs. 2, 5 and 6; common practice.)

use super::VectorField;
use crate::element::{map_gradients, ElementKind, ShapeTable, TableRule, MAX_NODES};
use crate::material::{AnalysisMode, Elasticity};
use crate::recovery::ElementData;

/// Largest number of dofs of one element (27 nodes x 3 components).
pub(super) const MAX_DOF: usize = MAX_NODES * 3;

/// Fixed data of one block's kernel.
#[derive(Copy, Clone)]
pub(super) struct Kernel {
    /// Element kind of the block.
    pub kind: ElementKind,
    /// Full-rule shape table of the kind.
    pub table: &'static ShapeTable,
    /// Analysis mode.
    pub mode: AnalysisMode,
    /// Displacement components per node.
    pub ndim: usize,
}

impl Kernel {
    /// The kernel of `kind` in `mode`.
    pub fn new(kind: ElementKind, mode: AnalysisMode) -> Self {
        Self {
            kind,
            table: kind.table(TableRule::Full),
            mode,
            ndim: mode.dimension(),
        }
    }

    /// Dofs per element.
    pub fn dofs(&self) -> usize {
        self.kind.node_count() * self.ndim
    }

    /// Writes `K_e` (row-major, `dofs() x dofs()`) into `ke` and the body-force vector into
    /// `fe`. Returns `false` when det J is not positive and finite at some quadrature point.
    ///
    /// B is kept column by column with its at most three non-zero rows, so `D B` costs 18
    /// multiply-adds per column and each entry of `B^T (D B)` three.
    pub fn element(
        &self,
        coords: &[[f64; 3]],
        elasticity: &Elasticity,
        body: Option<&VectorField>,
        ke: &mut [f64],
        fe: &mut [f64],
    ) -> bool {
        let nn = self.kind.node_count();
        let nd = nn * self.ndim;
        let dim = self.kind.dim();
        let d = &elasticity.stiffness;
        ke[..nd * nd].fill(0.0);
        fe[..nd].fill(0.0);
        let size = coords[..nn].iter().map(|x| x[0].abs()).fold(0.0, f64::max);
        let mut dn = [[0.0; 3]; MAX_NODES];
        let mut b = [Column::default(); MAX_DOF];
        let mut db = [[0.0; 6]; MAX_DOF];
        for k in 0..self.table.len() {
            let det = map_gradients(dim, &coords[..nn], self.table.dn_at(k), &mut dn[..nn]);
            if !(det.is_finite() && det > 0.0) {
                return false;
            }
            let n = self.table.n_at(k);
            let mut x = [0.0; 3];
            for a in 0..nn {
                for c in 0..3 {
                    x[c] += n[a] * coords[a][c];
                }
            }
            let wt = self.table.weights[k] * det * self.mode.measure_factor(x[0]);
            self.fill_b(&dn[..nn], n, x[0], size, &mut b);
            for q in 0..nd {
                let col = &b[q];
                let mut out = [0.0; 6];
                for t in 0..col.len {
                    let (r, v) = (col.rows[t], col.values[t]);
                    for (o, row) in out.iter_mut().zip(d.iter()) {
                        *o += row[r] * v;
                    }
                }
                db[q] = out;
            }
            for p in 0..nd {
                let col = b[p];
                let row = &mut ke[p * nd..(p + 1) * nd];
                for q in p..nd {
                    let mut acc = 0.0;
                    for t in 0..col.len {
                        acc += col.values[t] * db[q][col.rows[t]];
                    }
                    row[q] += wt * acc;
                }
            }
            if let Some(body) = body {
                let force = body(x);
                for a in 0..nn {
                    for c in 0..self.ndim {
                        fe[a * self.ndim + c] += wt * n[a] * force[c];
                    }
                }
            }
        }
        for p in 0..nd {
            for q in 0..p {
                ke[p * nd + q] = ke[q * nd + p];
            }
        }
        true
    }

    /// The columns of B at one point from physical gradients `dn`, shape values `n` and the
    /// radius `r` (axisymmetric only; `size` is the element's largest |x|, for the on-axis test
    /// of `ElementData::strain_at`).
    fn fill_b(&self, dn: &[[f64; 3]], n: &[f64], r: f64, size: f64, b: &mut [Column; MAX_DOF]) {
        let axisymmetric = self.mode == AnalysisMode::Axisymmetric;
        let off_axis = r > 1e-12 * size.max(f64::MIN_POSITIVE);
        for (a, g) in dn.iter().enumerate() {
            if self.ndim == 2 {
                b[2 * a] = if axisymmetric {
                    let hoop = if off_axis { n[a] / r } else { g[0] };
                    Column::new(&[(0, g[0]), (2, hoop), (3, g[1])])
                } else {
                    Column::new(&[(0, g[0]), (3, g[1])])
                };
                b[2 * a + 1] = Column::new(&[(1, g[1]), (3, g[0])]);
            } else {
                b[3 * a] = Column::new(&[(0, g[0]), (3, g[1]), (5, g[2])]);
                b[3 * a + 1] = Column::new(&[(1, g[1]), (3, g[0]), (4, g[2])]);
                b[3 * a + 2] = Column::new(&[(2, g[2]), (4, g[1]), (5, g[0])]);
            }
        }
    }
}

/// One column of B: its non-zero strain rows and values.
#[derive(Copy, Clone, Default)]
struct Column {
    rows: [usize; 3],
    values: [f64; 3],
    len: usize,
}

impl Column {
    fn new(entries: &[(usize, f64)]) -> Self {
        let mut c = Column::default();
        for (t, &(r, v)) in entries.iter().enumerate() {
            c.rows[t] = r;
            c.values[t] = v;
        }
        c.len = entries.len();
        c
    }
}

/// Strain energy `1/2 integral eps^T D eps f(x)` of one solved element with the full rule, by
/// the estimator's own strain evaluation; `None` when det J <= 0 at a point.
pub(super) fn element_energy(
    data: &ElementData,
    elasticity: &Elasticity,
    mode: AnalysisMode,
) -> Option<f64> {
    let table = data.kind.table(TableRule::Full);
    let dim = data.kind.dim();
    let mut energy = 0.0;
    for k in 0..table.len() {
        let (strain, x, det) = data.strain_at(table, k, dim, mode, false).ok()?;
        let stress = elasticity.stress(&strain);
        let density: f64 = (0..6).map(|i| stress[i] * strain[i]).sum();
        energy += 0.5 * density * table.weights[k] * det * mode.measure_factor(x[0]);
    }
    Some(energy)
}
