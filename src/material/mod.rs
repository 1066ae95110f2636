//! Isotropic linear-elastic materials and the analysis modes (3D, plane stress, plane strain,
//! axisymmetric).
//!
//! Symbols: E Young's modulus, nu Poisson's ratio, lambda = E nu / ((1 + nu)(1 - 2 nu)) and
//! mu = E / (2 (1 + nu)) the Lame constants.
//!
//! Every stress and strain in hone is a 6-vector in the order xx, yy, zz, xy, yz, xz (strains with
//! engineering shear, gamma = 2 epsilon). In axisymmetric analysis x is the radius r, y the axis z,
//! and the zz slot holds the hoop component (theta theta). Components a mode does not use are zero
//! in both the stiffness and the compliance, so one energy formula,
//! `sigma^T C sigma` with `C` the compliance, serves every mode (Hooke's law; e.g. Timoshenko &
//! Goodier 1970, Theory of Elasticity, ch. 1 and 3, common practice).

mod zones;

pub use zones::{MaterialMap, ZoneMaterialsError};

use thiserror::Error;

/// Stress or strain components in hone's fixed order: xx, yy, zz, xy, yz, xz.
pub type SymTensor = [f64; 6];

/// A problem with material data, with the value found and the range expected.
#[derive(Debug, Error, Clone, PartialEq)]
pub enum MaterialError {
    /// Young's modulus must be finite and positive.
    #[error("{context}Young's modulus E = {value} is not allowed: expected a finite value > 0")]
    Youngs { context: String, value: f64 },
    /// Poisson's ratio must lie in (-1, 0.5) for a stable isotropic solid.
    #[error("{context}Poisson's ratio nu = {value} is not allowed: expected -1 < nu < 0.5 (0.5 is incompressible, which displacement elements cannot represent)")]
    Poisson { context: String, value: f64 },
    /// Plane-stress thickness must be finite and positive.
    #[error("thickness t = {value} is not allowed: expected a finite value > 0")]
    Thickness { value: f64 },
}

/// Isotropic linear-elastic material.
#[derive(Copy, Clone, Debug, PartialEq)]
pub struct Material {
    /// Young's modulus E (any consistent unit set).
    pub youngs: f64,
    /// Poisson's ratio nu.
    pub poisson: f64,
}

impl Material {
    /// Checks E > 0 and -1 < nu < 0.5 (thermodynamic stability of an isotropic solid, common
    /// practice); `context` prefixes the message (for example "zone 3: ").
    pub fn new(youngs: f64, poisson: f64, context: &str) -> Result<Self, MaterialError> {
        if !(youngs.is_finite() && youngs > 0.0) {
            return Err(MaterialError::Youngs {
                context: context.to_string(),
                value: youngs,
            });
        }
        if !(poisson.is_finite() && poisson > -1.0 && poisson < 0.5) {
            return Err(MaterialError::Poisson {
                context: context.to_string(),
                value: poisson,
            });
        }
        Ok(Self { youngs, poisson })
    }
}

/// How a mesh is to be interpreted mechanically.
#[derive(Copy, Clone, Debug, PartialEq)]
pub enum AnalysisMode {
    /// Three-dimensional solid.
    Solid3d,
    /// 2D plane stress (sigma_zz = 0) with the given out-of-plane thickness.
    PlaneStress {
        /// Out-of-plane thickness t; energies are per the full thickness.
        thickness: f64,
    },
    /// 2D plane strain (epsilon_zz = 0), per unit thickness; sigma_zz = nu (sigma_xx + sigma_yy).
    PlaneStrain,
    /// Axisymmetric about the y axis: x = r, y = z, hoop strain u_r / r, volume 2 pi r dA.
    Axisymmetric,
}

impl AnalysisMode {
    /// Checks the mode's own parameters (the plane-stress thickness).
    pub fn validate(self) -> Result<Self, MaterialError> {
        if let AnalysisMode::PlaneStress { thickness } = self {
            if !(thickness.is_finite() && thickness > 0.0) {
                return Err(MaterialError::Thickness { value: thickness });
            }
        }
        Ok(self)
    }

    /// Spatial dimension of the mesh this mode applies to.
    pub fn dimension(self) -> usize {
        match self {
            AnalysisMode::Solid3d => 3,
            _ => 2,
        }
    }

    /// Short name used in summaries.
    pub fn name(self) -> &'static str {
        match self {
            AnalysisMode::Solid3d => "3D solid",
            AnalysisMode::PlaneStress { .. } => "plane stress",
            AnalysisMode::PlaneStrain => "plane strain",
            AnalysisMode::Axisymmetric => "axisymmetric",
        }
    }

    /// Factor that turns an area or volume integrand weight into an energy weight at a point with
    /// radius `x`: the thickness (plane stress), 1 (plane strain per unit thickness, 3D), or
    /// 2 pi r (axisymmetric, the full ring).
    #[inline]
    pub fn measure_factor(self, x: f64) -> f64 {
        match self {
            AnalysisMode::Solid3d | AnalysisMode::PlaneStrain => 1.0,
            AnalysisMode::PlaneStress { thickness } => thickness,
            AnalysisMode::Axisymmetric => 2.0 * std::f64::consts::PI * x,
        }
    }
}

/// Stiffness D and compliance C = D^-1 of one material in one mode, as 6x6 matrices on hone's
/// component order, with the rows and columns of unused components zero.
///
/// In every mode both matrices are block diagonal: a 3x3 block on the normal components
/// (xx, yy, zz) and a diagonal on the shear components (xy, yz, xz). The products used in hot
/// loops work on that compact form (12 multiplications instead of 36).
#[derive(Copy, Clone, Debug, PartialEq)]
pub struct Elasticity {
    /// sigma = D epsilon (engineering shear strains).
    pub stiffness: [[f64; 6]; 6],
    /// epsilon = C sigma on the components the mode uses; C is what the energy norm integrates.
    pub compliance: [[f64; 6]; 6],
    d_normal: [[f64; 3]; 3],
    d_shear: [f64; 3],
    c_normal: [[f64; 3]; 3],
    c_shear: [f64; 3],
}

/// Splits a block-diagonal 6x6 matrix into its normal block and shear diagonal.
fn compact(m: &[[f64; 6]; 6]) -> ([[f64; 3]; 3], [f64; 3]) {
    let mut normal = [[0.0; 3]; 3];
    for i in 0..3 {
        for j in 0..3 {
            normal[i][j] = m[i][j];
        }
    }
    (normal, [m[3][3], m[4][4], m[5][5]])
}

impl Elasticity {
    /// Builds D and C for `material` in `mode`.
    ///
    /// 3D: D_ii = lambda + 2 mu, D_ij = lambda (normal block), D = mu on the shear diagonal;
    /// C = (1/E)[[1,-nu,-nu],...] with 2(1+nu)/E on the shear diagonal.
    /// Plane stress: `D = E/(1-nu^2) [[1,nu,0],[nu,1,0],[0,0,(1-nu)/2]]` on (xx, yy, xy).
    /// Plane strain: the 3D D on (xx, yy, xy) with sigma_zz = lambda (e_xx + e_yy) reported, and
    /// `C = ((1+nu)/E) [[1-nu,-nu,0],[-nu,1-nu,0],[0,0,2]]` on (xx, yy, xy) so that the energy is
    /// consistent with e_zz = 0. Axisymmetric: the 3D D and C on (rr, zz, theta theta, rz).
    /// (Compliance forms: Zienkiewicz & Taylor, The Finite Element Method vol. 1, ch. 6; restated in
    /// the project's method sheet section 2, common practice.)
    pub fn new(material: Material, mode: AnalysisMode) -> Self {
        let e = material.youngs;
        let nu = material.poisson;
        let lambda = e * nu / ((1.0 + nu) * (1.0 - 2.0 * nu));
        let mu = e / (2.0 * (1.0 + nu));
        let mut d = [[0.0; 6]; 6];
        let mut c = [[0.0; 6]; 6];
        match mode {
            AnalysisMode::Solid3d | AnalysisMode::Axisymmetric => {
                for i in 0..3 {
                    for j in 0..3 {
                        d[i][j] = if i == j { lambda + 2.0 * mu } else { lambda };
                        c[i][j] = if i == j { 1.0 / e } else { -nu / e };
                    }
                }
                let shear = if mode == AnalysisMode::Solid3d {
                    3..6
                } else {
                    3..4
                };
                for i in shear {
                    d[i][i] = mu;
                    c[i][i] = 2.0 * (1.0 + nu) / e;
                }
            }
            AnalysisMode::PlaneStress { .. } => {
                let f = e / (1.0 - nu * nu);
                d[0][0] = f;
                d[1][1] = f;
                d[0][1] = f * nu;
                d[1][0] = f * nu;
                d[3][3] = f * (1.0 - nu) / 2.0;
                c[0][0] = 1.0 / e;
                c[1][1] = 1.0 / e;
                c[0][1] = -nu / e;
                c[1][0] = -nu / e;
                c[3][3] = 2.0 * (1.0 + nu) / e;
            }
            AnalysisMode::PlaneStrain => {
                d[0][0] = lambda + 2.0 * mu;
                d[1][1] = lambda + 2.0 * mu;
                d[0][1] = lambda;
                d[1][0] = lambda;
                // sigma_zz = lambda (e_xx + e_yy): reported, not part of the energy.
                d[2][0] = lambda;
                d[2][1] = lambda;
                d[3][3] = mu;
                let f = (1.0 + nu) / e;
                c[0][0] = f * (1.0 - nu);
                c[1][1] = f * (1.0 - nu);
                c[0][1] = -f * nu;
                c[1][0] = -f * nu;
                c[3][3] = 2.0 * f;
            }
        }
        let (d_normal, d_shear) = compact(&d);
        let (c_normal, c_shear) = compact(&c);
        Self {
            stiffness: d,
            compliance: c,
            d_normal,
            d_shear,
            c_normal,
            c_shear,
        }
    }

    /// sigma = D epsilon.
    #[inline]
    pub fn stress(&self, strain: &SymTensor) -> SymTensor {
        let d = &self.d_normal;
        [
            d[0][0] * strain[0] + d[0][1] * strain[1] + d[0][2] * strain[2],
            d[1][0] * strain[0] + d[1][1] * strain[1] + d[1][2] * strain[2],
            d[2][0] * strain[0] + d[2][1] * strain[1] + d[2][2] * strain[2],
            self.d_shear[0] * strain[3],
            self.d_shear[1] * strain[4],
            self.d_shear[2] * strain[5],
        ]
    }

    /// The energy density product a^T C b (twice the complementary energy density when a = b).
    #[inline]
    pub fn energy_product(&self, a: &SymTensor, b: &SymTensor) -> f64 {
        let c = &self.c_normal;
        let mut acc = 0.0;
        for i in 0..3 {
            acc += a[i] * (c[i][0] * b[0] + c[i][1] * b[1] + c[i][2] * b[2]);
        }
        acc + a[3] * self.c_shear[0] * b[3]
            + a[4] * self.c_shear[1] * b[4]
            + a[5] * self.c_shear[2] * b[5]
    }
}

/// Von Mises equivalent stress of a 6-vector (xx, yy, zz, xy, yz, xz):
/// sqrt(0.5[(sxx-syy)^2 + (syy-szz)^2 + (szz-sxx)^2] + 3(sxy^2 + syz^2 + sxz^2)) (common practice).
#[inline]
pub fn von_mises(s: &SymTensor) -> f64 {
    let a = s[0] - s[1];
    let b = s[1] - s[2];
    let c = s[2] - s[0];
    (0.5 * (a * a + b * b + c * c) + 3.0 * (s[3] * s[3] + s[4] * s[4] + s[5] * s[5])).sqrt()
}

#[cfg(test)]
mod tests;
