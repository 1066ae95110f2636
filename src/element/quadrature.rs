//! Quadrature rules on the reference elements, as static tables named after their source.
//!
//! Base rules: Gauss-Legendre on [-1, 1] (1, 2, 3 points), symmetric triangle rules (1, 3, 6
//! points) and symmetric tetrahedron rules (1, 4, 14 points), all with positive weights.
//! Quadrilaterals and hexahedra use tensor products of the Gauss-Legendre rule; wedges use a
//! triangle rule times a Gauss-Legendre rule in `t`. Products are built once, lazily, and cached.
//!
//! Every constant below was recomputed to 40 significant digits (mpmath) from the closed forms
//! or by solving each rule's moment equations, then rounded to the nearest f64; the unit tests
//! integrate every monomial up to the rule's degree against the exact integrals.

use std::sync::OnceLock;

use super::{ElementKind, MAX_POINTS};

/// Which of an element's two quadrature rules to use.
#[derive(Copy, Clone, Debug, PartialEq, Eq, Hash)]
pub enum Rule {
    /// Integrates the stiffness and mass integrands of an affine element exactly.
    Full,
    /// One order lower than `Full` (e.g. 1 point for quad4, 2x2 for quad8).
    Reduced,
}

/// One quadrature point: natural coordinates (third entry 0 in 2D) and weight on the reference
/// element (the weights of a rule sum to the reference measure).
#[derive(Copy, Clone, Debug, PartialEq)]
pub struct QuadraturePoint {
    /// Natural coordinates.
    pub xi: [f64; 3],
    /// Weight on the reference element.
    pub weight: f64,
}

/// A simplex rule with its polynomial degree of exactness.
pub(crate) struct SimplexRule {
    pub points: &'static [QuadraturePoint],
    /// Degree of exactness; read by the monomial tests.
    #[cfg_attr(not(test), allow(dead_code))]
    pub degree: usize,
}

/// How an element's rule is built from the base tables.
#[derive(Copy, Clone)]
pub(crate) enum RuleSpec {
    /// Tensor-product Gauss-Legendre, `n` points per direction in `dim` directions.
    Gauss { dim: usize, n: usize },
    /// A triangle or tetrahedron rule used as it is.
    Simplex(&'static SimplexRule),
    /// Triangle rule in `(r, s)` times an `n`-point Gauss-Legendre rule in `t`.
    Wedge {
        triangle: &'static SimplexRule,
        n: usize,
    },
}

/// Gauss-Legendre abscissae and weights on [-1, 1], `[x, w]`, for 1, 2 and 3 points, degree
/// 2n - 1 (Abramowitz & Stegun 1964, Handbook of Mathematical Functions, Table 25.4 (table
/// number from memory); exact values 0; +-1/sqrt(3); 0, +-sqrt(3/5) with weights 2; 1, 1;
/// 8/9, 5/9, 5/9).
pub(crate) const GAUSS_LEGENDRE: [&[[f64; 2]]; 3] = [
    &[[0.0, 2.0]],
    &[
        [-0.577_350_269_189_625_8, 1.0],
        [0.577_350_269_189_625_8, 1.0],
    ],
    &[
        [-0.774_596_669_241_483_4, 5.0 / 9.0],
        [0.0, 8.0 / 9.0],
        [0.774_596_669_241_483_4, 5.0 / 9.0],
    ],
];

const fn qp(r: f64, s: f64, t: f64, weight: f64) -> QuadraturePoint {
    QuadraturePoint {
        xi: [r, s, t],
        weight,
    }
}

/// Triangle centroid rule, degree 1: point (1/3, 1/3), weight 1/2 (the reference area).
pub(crate) static TRIANGLE_CENTROID: SimplexRule = SimplexRule {
    points: &[qp(1.0 / 3.0, 1.0 / 3.0, 0.0, 0.5)],
    degree: 1,
};

/// Strang & Fix (1973), "An Analysis of the Finite Element Method", table of triangle rules
/// (table number not checked): the 3-point interior rule of degree 2, barycentric
/// (2/3, 1/6, 1/6) and permutations, weight 1/3 x area = 1/6.
pub(crate) static TRIANGLE_STRANG_FIX_3: SimplexRule = SimplexRule {
    points: &[
        qp(1.0 / 6.0, 1.0 / 6.0, 0.0, 1.0 / 6.0),
        qp(2.0 / 3.0, 1.0 / 6.0, 0.0, 1.0 / 6.0),
        qp(1.0 / 6.0, 2.0 / 3.0, 0.0, 1.0 / 6.0),
    ],
    degree: 2,
};

const DUN_A: f64 = 0.4459484909159649;
const DUN_A1: f64 = 0.10810301816807023;
const DUN_WA: f64 = 0.5 * 0.22338158967801147;
const DUN_B: f64 = 0.09157621350977074;
const DUN_B1: f64 = 0.8168475729804585;
const DUN_WB: f64 = 0.5 * 0.10995174365532187;

/// Dunavant (1985), "High degree efficient symmetrical Gaussian quadrature rules for the
/// triangle", IJNME 21:1129-1148, the 6-point rule of degree 4 (also in Strang & Fix 1973):
/// barycentric (a, a, 1-2a) with a = 0.4459484909159649, weight 0.2233815896780115 x area, and
/// (b, b, 1-2b) with b = 0.0915762135097707, weight 0.1099517436553219 x area (area = 1/2).
pub(crate) static TRIANGLE_DUNAVANT_6: SimplexRule = SimplexRule {
    points: &[
        qp(DUN_A, DUN_A, 0.0, DUN_WA),
        qp(DUN_A1, DUN_A, 0.0, DUN_WA),
        qp(DUN_A, DUN_A1, 0.0, DUN_WA),
        qp(DUN_B, DUN_B, 0.0, DUN_WB),
        qp(DUN_B1, DUN_B, 0.0, DUN_WB),
        qp(DUN_B, DUN_B1, 0.0, DUN_WB),
    ],
    degree: 4,
};

/// Tetrahedron centroid rule, degree 1: point (1/4, 1/4, 1/4), weight 1/6 (the reference volume).
pub(crate) static TET_CENTROID: SimplexRule = SimplexRule {
    points: &[qp(0.25, 0.25, 0.25, 1.0 / 6.0)],
    degree: 1,
};

const K4_A: f64 = 0.5854101966249684;
const K4_B: f64 = 0.1381966011250105;

/// Keast (1986), "Moderate-degree tetrahedral quadrature formulas", CMAME 55:339-348 (citation
/// from memory; the rule itself is common practice), the 4-point rule of degree 2: barycentric
/// (a, b, b, b) and permutations with a = (5 + 3 sqrt 5)/20, b = (5 - sqrt 5)/20, weight
/// 1/4 x volume = 1/24.
pub(crate) static TET_KEAST_4: SimplexRule = SimplexRule {
    points: &[
        qp(K4_B, K4_B, K4_B, 1.0 / 24.0),
        qp(K4_A, K4_B, K4_B, 1.0 / 24.0),
        qp(K4_B, K4_A, K4_B, 1.0 / 24.0),
        qp(K4_B, K4_B, K4_A, 1.0 / 24.0),
    ],
    degree: 2,
};

const GH_A: f64 = 0.3108859192633006;
const GH_A0: f64 = 1.0 - 3.0 * GH_A;
const GH_WA: f64 = 0.018781320953002643;
const GH_B: f64 = 0.09273525031089122;
const GH_B0: f64 = 1.0 - 3.0 * GH_B;
const GH_WB: f64 = 0.012248840519393659;
const GH_C: f64 = 0.04550370412564965;
const GH_C1: f64 = 0.5 - GH_C;
const GH_WC: f64 = 0.007091003462846911;

/// Gellert & Harbord (1991), "Moderate degree cubature formulas for 3-D tetrahedral
/// finite-element approximations", Commun. Appl. Numer. Methods 7:487-495, Table VI: the
/// 14-point rule of degree 5 with positive weights (the same rule is given by Walkington 2000,
/// "Quadrature on simplices of arbitrary dimension"). Barycentric orbits (a,a,a,1-3a) with
/// a = 0.3108859192633006, (b,b,b,1-3b) with b = 0.0927352503108912, and the six permutations
/// of (c, c, 1/2-c, 1/2-c) with c = 0.0455037041256496. Digits from the paper's closed form
/// (g = 1/(46 sqrt 46), h = acos g + (2/3) asin g, k = (104 + 8 sqrt 46 cos h)/3, s = sqrt(49-k),
/// a = (7+s)/k, b = (7-s)/k, ...), as reproduced in several public codes; exactness to degree 5
/// is verified by the unit tests.
pub(crate) static TET_GELLERT_HARBORD_14: SimplexRule = SimplexRule {
    points: &[
        qp(GH_A, GH_A, GH_A, GH_WA),
        qp(GH_A0, GH_A, GH_A, GH_WA),
        qp(GH_A, GH_A0, GH_A, GH_WA),
        qp(GH_A, GH_A, GH_A0, GH_WA),
        qp(GH_B, GH_B, GH_B, GH_WB),
        qp(GH_B0, GH_B, GH_B, GH_WB),
        qp(GH_B, GH_B0, GH_B, GH_WB),
        qp(GH_B, GH_B, GH_B0, GH_WB),
        qp(GH_C, GH_C, GH_C1, GH_WC),
        qp(GH_C, GH_C1, GH_C, GH_WC),
        qp(GH_C1, GH_C, GH_C, GH_WC),
        qp(GH_C, GH_C1, GH_C1, GH_WC),
        qp(GH_C1, GH_C, GH_C1, GH_WC),
        qp(GH_C1, GH_C1, GH_C, GH_WC),
    ],
    degree: 5,
};

impl RuleSpec {
    /// Expands the specification into its list of points (only when building a cache entry).
    pub(crate) fn build(self) -> Vec<QuadraturePoint> {
        let mut out = Vec::with_capacity(MAX_POINTS);
        match self {
            RuleSpec::Gauss { dim, n } => {
                let g = GAUSS_LEGENDRE[n - 1];
                let line_z: &[[f64; 2]] = if dim == 3 { g } else { &[[0.0, 1.0]] };
                // Lexicographic, first coordinate running fastest.
                for &[z, wz] in line_z {
                    for &[y, wy] in g {
                        for &[x, wx] in g {
                            out.push(qp(x, y, z, wx * wy * wz));
                        }
                    }
                }
            }
            RuleSpec::Simplex(rule) => out.extend_from_slice(rule.points),
            RuleSpec::Wedge { triangle, n } => {
                for &[t, wt] in GAUSS_LEGENDRE[n - 1] {
                    for p in triangle.points {
                        out.push(qp(p.xi[0], p.xi[1], t, p.weight * wt));
                    }
                }
            }
        }
        debug_assert!(out.len() <= MAX_POINTS);
        out
    }
}

static RULES: [OnceLock<Vec<QuadraturePoint>>; 2 * ElementKind::ALL.len()] =
    [const { OnceLock::new() }; 2 * ElementKind::ALL.len()];
static SAMPLING: [OnceLock<Vec<[f64; 3]>>; ElementKind::ALL.len()] =
    [const { OnceLock::new() }; ElementKind::ALL.len()];

/// The rule specification of `kind` for `rule`.
pub(crate) fn spec(kind: ElementKind, rule: Rule) -> RuleSpec {
    match rule {
        Rule::Full => kind.info().full,
        Rule::Reduced => kind.info().reduced,
    }
}

/// The cached quadrature rule of `kind`.
pub(crate) fn cached(kind: ElementKind, rule: Rule) -> &'static [QuadraturePoint] {
    let slot = 2 * kind.index() + usize::from(rule == Rule::Reduced);
    RULES[slot].get_or_init(|| spec(kind, rule).build())
}

/// The cached SPR sampling points of `kind` (the points of its sampling rule, weights dropped).
pub(crate) fn cached_sampling(kind: ElementKind) -> &'static [[f64; 3]] {
    SAMPLING[kind.index()].get_or_init(|| {
        let points = kind.info().sampling.build();
        points.into_iter().map(|p| p.xi).collect()
    })
}
