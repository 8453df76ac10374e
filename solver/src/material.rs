//! Constitutive laws H(B) of the regions: linear, saturating, permanent magnet.

use crate::bh_curve::BhCurve;
use crate::intrinsic_table::IntrinsicTable;
use crate::magnet_law::{Knee, MagnetCurve};
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
    /// Permanent magnet: along its easy axis the recoil line H = (B - Br) /
    /// (mu0 mu_rec), or with a knee the intrinsic curve of
    /// `magnet_law`; across it linear with mu_rec.
    Magnet {
        /// relative recoil permeability
        recoil_permeability: f64,
        /// remanence vector, T
        br: [f64; 2],
        /// The knee of the intrinsic curve; None keeps the magnet on its recoil line.
        knee: Option<Knee>,
        /// A user's tabulated intrinsic curve, in the knee's place.
        table: Option<Arc<IntrinsicTable>>,
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
    /// The first step from zero potential: as `NoSofterThanSecant`, and a
    /// magnet's slope along its axis no softer than its recoil line. At
    /// zero potential every magnet point sits at B = 0, near the knee of a
    /// grade whose HcB is close to its HcJ, and the knee's soft slope sent
    /// the first step far off (a saturating pot magnet lost its quadratic
    /// tail). Only the first step: a magnet that ends past its knee needs
    /// the soft slope to get there (stiffened throughout, a hot thin disk
    /// crept from 1 to 0.09 in 40 steps).
    ColdStart,
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

    /// Whether the law is not affine in B (a saturating curve, a magnet with a knee).
    pub fn is_nonlinear(&self) -> bool {
        matches!(
            self,
            Law::Saturating(_) | Law::Magnet { knee: Some(_), .. } | Law::Magnet { table: Some(_), .. }
        )
    }

    /// A magnet's curve along its easy axis and the axis (unit vector); None for other laws.
    pub fn magnet_curve(&self) -> Option<(MagnetCurve<'_>, [f64; 2])> {
        let Law::Magnet {
            recoil_permeability,
            br,
            knee,
            table,
        } = self
        else {
            return None;
        };
        let size = br[0].hypot(br[1]);
        let axis = if size > 0.0 { [br[0] / size, br[1] / size] } else { [0.0, 1.0] };
        Some((
            MagnetCurve {
                br: size,
                recoil_permeability: *recoil_permeability,
                knee: *knee,
                table: table.as_deref(),
            },
            axis,
        ))
    }

    /// H and the exact tangent dH/dB at flux density `b`.
    pub fn response(&self, b: [f64; 2]) -> FieldResponse {
        self.response_with(b, Tangent::Exact)
    }

    /// H at `b` and the tangent of the given kind (H itself never changes).
    pub fn response_with(&self, b: [f64; 2], tangent: Tangent) -> FieldResponse {
        self.response_of(b, tangent, 1.0)
    }

    /// H and the tangent at `b` for a magnet with `share` of its remanence
    /// left after an earlier exposure (other laws ignore the share).
    pub fn response_of(&self, b: [f64; 2], tangent: Tangent, share: f64) -> FieldResponse {
        match self {
            Law::Magnet { .. } if share != 1.0 || self.is_nonlinear() => magnet_response(self, b, share, tangent),
            Law::Linear { relative_permeability } => {
                let nu = NU0 / relative_permeability;
                FieldResponse {
                    h: [nu * b[0], nu * b[1]],
                    dh_db: [[nu, 0.0], [0.0, nu]],
                    nu,
                }
            }
            Law::Magnet { recoil_permeability, br, .. } => {
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
                    Tangent::NoSofterThanSecant | Tangent::ColdStart => dh.max(nu),
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
        self.energy_density_of(b, 1.0)
    }

    /// Energy density of a magnet with `share` of its remanence left (other laws ignore the share).
    pub fn energy_density_of(&self, b: [f64; 2], share: f64) -> f64 {
        match self {
            Law::Magnet { .. } if share != 1.0 || self.is_nonlinear() => {
                let Some((curve, axis)) = self.magnet_curve() else { return 0.0 };
                let (along, across) = split(b, axis);
                curve.axial_energy(along, share) + 0.5 * NU0 / curve.recoil_permeability * across * across
            }
            Law::Linear { relative_permeability } => 0.5 * NU0 / relative_permeability * (b[0] * b[0] + b[1] * b[1]),
            Law::Magnet { recoil_permeability, br, .. } => {
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

/// B split into its components along and across a unit axis.
fn split(b: [f64; 2], axis: [f64; 2]) -> (f64, f64) {
    (b[0] * axis[0] + b[1] * axis[1], -b[0] * axis[1] + b[1] * axis[0])
}

/// A magnet's H and tangent: the easy axis by its curve, across it linear.
/// The cold-start tangent keeps the slope along the axis no softer than
/// the recoil line's (see `Tangent::ColdStart`).
fn magnet_response(law: &Law, b: [f64; 2], share: f64, tangent: Tangent) -> FieldResponse {
    let Some((curve, e)) = law.magnet_curve() else {
        return law.response(b);
    };
    let (along, across) = split(b, e);
    let mut r = curve.axial(along, share);
    if tangent == Tangent::ColdStart {
        r.dh_db = r.dh_db.max(NU0 / curve.recoil_permeability);
    }
    let nu_across = NU0 / curve.recoil_permeability;
    let h_across = nu_across * across;
    // Back from (along, across) to (x, y): t = e r e^T + n nu n^T with n = (-e_y, e_x).
    let n = [-e[1], e[0]];
    let h = [r.h * e[0] + h_across * n[0], r.h * e[1] + h_across * n[1]];
    let t = |i: usize, j: usize| r.dh_db * e[i] * e[j] + nu_across * n[i] * n[j];
    FieldResponse {
        h,
        dh_db: [[t(0, 0), t(0, 1)], [t(1, 0), t(1, 1)]],
        nu: nu_across,
    }
}
