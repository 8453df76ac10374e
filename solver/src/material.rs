//! Constitutive laws H(B) of the regions: linear, saturating, permanent magnet.

use crate::bh_curve::BhCurve;
use crate::{MU0, NU0};
use std::sync::Arc;

/// How a region's field strength follows from its flux density.
#[derive(Clone, Debug)]
pub enum Law {
    /// H = B / (mu0 mu_r).
    /// Linear material.
    Linear {
        /// mu_r
        relative_permeability: f64,
    },
    /// H = H(|B|) B/|B| from a B-H curve.
    Saturating(Arc<BhCurve>),
    /// Linear recoil line: H = (B - Br) / (mu0 mu_rec), remanence `br` in T.
    /// Permanent magnet on its recoil line.
    Magnet {
        /// relative recoil permeability
        recoil_permeability: f64,
        /// remanence vector, T
        br: [f64; 2],
    },
}

/// Which linearization of H(B) the Newton tangent uses.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum Tangent {
    /// dH/dB exactly: quadratic convergence near the solution.
    #[default]
    Exact,
    /// Along B, the larger of the differential dH/dB and the secant H/B.
    /// On a curve's low-field toe the differential slope is the smaller, and
    /// the exact step overshoots there again and again (the line search
    /// then cuts it to a third or half); the stiffer slope does not.
    NoSofterThanSecant,
}

/// H at a point and the tangent dH/dB (symmetric 2x2).
#[derive(Clone, Copy, Debug)]
pub struct FieldResponse {
    /// Field strength, A/m.
    pub h: [f64; 2],
    /// Its derivative dH/dB (the tangent reluctivity).
    pub dh_db: [[f64; 2]; 2],
    /// Secant reluctivity |H|/|B| seen by the relative permeability output.
    pub nu: f64,
}

impl Law {
    /// Air: mu_r = 1.
    pub fn air() -> Law {
        Law::Linear { relative_permeability: 1.0 }
    }

    /// Whether the law is not affine in B (a saturating curve).
    pub fn is_nonlinear(&self) -> bool {
        matches!(self, Law::Saturating(_))
    }

    /// H and the exact tangent dH/dB at flux density `b`.
    pub fn response(&self, b: [f64; 2]) -> FieldResponse {
        self.response_with(b, Tangent::Exact)
    }

    /// H at `b` and the tangent of the given kind (H itself never changes).
    pub fn response_with(&self, b: [f64; 2], tangent: Tangent) -> FieldResponse {
        match self {
            Law::Linear { relative_permeability } => {
                let nu = NU0 / relative_permeability;
                FieldResponse {
                    h: [nu * b[0], nu * b[1]],
                    dh_db: [[nu, 0.0], [0.0, nu]],
                    nu,
                }
            }
            Law::Magnet { recoil_permeability, br } => {
                let nu = NU0 / recoil_permeability;
                FieldResponse {
                    h: [nu * (b[0] - br[0]), nu * (b[1] - br[1])],
                    dh_db: [[nu, 0.0], [0.0, nu]],
                    nu,
                }
            }
            Law::Saturating(curve) => {
                // sqrt, not hypot: |B| never comes near overflow, and hypot costs more.
                let bm = (b[0] * b[0] + b[1] * b[1]).sqrt();
                let (nu, dh) = curve.reluctivity(bm);
                let dh = match tangent {
                    Tangent::Exact => dh,
                    Tangent::NoSofterThanSecant => dh.max(nu),
                };
                let extra = if bm > 1e-12 { (dh - nu) / (bm * bm) } else { 0.0 };
                let t = [[nu + extra * b[0] * b[0], extra * b[0] * b[1]], [extra * b[0] * b[1], nu + extra * b[1] * b[1]]];
                FieldResponse {
                    h: [nu * b[0], nu * b[1]],
                    dh_db: t,
                    nu,
                }
            }
        }
    }

    /// Stored energy density (J/m3): the integral of H dB from the
    /// unloaded state (B = 0, or B = Br for a magnet).
    pub fn energy_density(&self, b: [f64; 2]) -> f64 {
        match self {
            Law::Linear { relative_permeability } => 0.5 * NU0 / relative_permeability * (b[0] * b[0] + b[1] * b[1]),
            Law::Magnet { recoil_permeability, br } => {
                let d = [b[0] - br[0], b[1] - br[1]];
                0.5 * NU0 / recoil_permeability * (d[0] * d[0] + d[1] * d[1])
            }
            Law::Saturating(curve) => curve.energy_density(b[0].hypot(b[1])),
        }
    }

    /// Relative permeability B/(mu0 H) as a secant value for output.
    pub fn relative_permeability(&self, b: [f64; 2]) -> f64 {
        1.0 / (MU0 * self.response(b).nu)
    }
}
