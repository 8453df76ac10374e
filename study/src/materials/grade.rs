//! A permanent-magnet grade: remanence, coercivities, recoil permeability
//! and the reversible temperature model.

/// A magnet grade at 20 degC with its reversible temperature coefficients.
#[derive(Clone, Debug, PartialEq)]
pub struct MagnetGrade {
    /// Remanence, T.
    pub br: f64,
    /// Recoil (relative) permeability.
    pub recoil_permeability: f64,
    /// Intrinsic coercivity, A/m.
    pub hcj: f64,
    /// Normal coercivity, A/m, where known.
    pub hcb: Option<f64>,
    /// Reversible coefficient of Br, %/K.
    pub br_coeff: f64,
    /// Reversible coefficient of HcJ, %/K (positive for hard ferrite).
    pub hcj_coeff: f64,
    /// Catalogue maximum working temperature, degC (at a permeance coefficient near 2).
    pub max_temperature: Option<f64>,
}

impl MagnetGrade {
    /// Br at a temperature (linear reversible model, reference 20 degC).
    pub fn br_at(&self, celsius: f64) -> f64 {
        self.br * (1.0 + self.br_coeff / 100.0 * (celsius - 20.0))
    }

    /// HcJ at a temperature (linear reversible model, reference 20 degC).
    pub fn hcj_at(&self, celsius: f64) -> f64 {
        (self.hcj * (1.0 + self.hcj_coeff / 100.0 * (celsius - 20.0))).max(0.0)
    }
}
