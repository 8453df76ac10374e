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

impl MagnetGrade {
    /// Lowest study temperature accepted, degC: catalogues quote the
    /// reversible coefficients from room temperature upward, and below
    /// about -40 degC NdFeB leaves its linear behaviour (common practice).
    pub const LOWEST_TEMPERATURE: f64 = -40.0;

    /// Share of its 20 degC value below which Br or HcJ, extrapolated by the
    /// linear model, is taken as gone: the model then says nothing more.
    const LOWEST_SHARE: f64 = 0.01;

    /// The study temperatures over which this grade's linear temperature
    /// model is used, degC: from LOWEST_TEMPERATURE up to 100 K above the
    /// catalogue's maximum working temperature (enough to study a magnet
    /// pushed past it: N42, rated 80 degC, up to 152 degC), and never where
    /// the model takes Br or HcJ below LOWEST_SHARE of their 20 degC values
    /// (N42 at 1000 degC had Br reversed). Outside it the study is refused.
    pub fn temperature_range(&self) -> (f64, f64) {
        let falls_to = |coeff: f64| {
            if coeff < 0.0 {
                20.0 + (1.0 - Self::LOWEST_SHARE) / (-coeff / 100.0)
            } else {
                f64::INFINITY
            }
        };
        let model = falls_to(self.br_coeff).min(falls_to(self.hcj_coeff));
        let catalogue = self.max_temperature.map_or(f64::INFINITY, |t| t + 100.0);
        (Self::LOWEST_TEMPERATURE, model.min(catalogue))
    }
}
