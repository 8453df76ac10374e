//! Triangle quadrature rules in barycentric coordinates.

/// One rule: barycentric points and weights summing to 1.
pub struct Rule {
    /// Barycentric coordinates of the points.
    pub points: &'static [[f64; 3]],
    /// Weights (summing to 1).
    pub weights: &'static [f64],
}

const A1: f64 = 0.059_715_871_789_770;
const B1: f64 = 0.470_142_064_105_115;
const A2: f64 = 0.797_426_985_353_087;
const B2: f64 = 0.101_286_507_323_456;
const W0: f64 = 0.225;
const W1: f64 = 0.132_394_152_788_506;
const W2: f64 = 0.125_939_180_544_827;

/// Seven-point rule exact for degree 5 (D. A. Dunavant, High degree efficient
/// symmetrical Gaussian quadrature rules for the triangle, IJNME 21, 1985).
pub const DEGREE5: Rule = Rule {
    points: &[
        [1.0 / 3.0, 1.0 / 3.0, 1.0 / 3.0],
        [A1, B1, B1],
        [B1, A1, B1],
        [B1, B1, A1],
        [A2, B2, B2],
        [B2, A2, B2],
        [B2, B2, A2],
    ],
    weights: &[W0, W1, W1, W1, W2, W2, W2],
};

/// Three-point rule exact for degree 2 (G. Strang, G. Fix, An Analysis of the
/// Finite Element Method, 1973, table 4.1): enough for planar quadratic
/// elements, where B is linear and the linear-material integrand quadratic.
pub const DEGREE2: Rule = Rule {
    points: &[
        [2.0 / 3.0, 1.0 / 6.0, 1.0 / 6.0],
        [1.0 / 6.0, 2.0 / 3.0, 1.0 / 6.0],
        [1.0 / 6.0, 1.0 / 6.0, 2.0 / 3.0],
    ],
    weights: &[1.0 / 3.0, 1.0 / 3.0, 1.0 / 3.0],
};
