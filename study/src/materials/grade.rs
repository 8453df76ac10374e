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
    /// Squareness Hk/HcJ of the intrinsic curve: where its knee begins
    /// (the knee model in `solver::magnet_law`).
    pub squareness: f64,
    /// A user's tabulated intrinsic curve at 20 degC, used in place of the
    /// knee model.
    pub intrinsic: Option<std::sync::Arc<solver::intrinsic_table::IntrinsicTable>>,
}

impl MagnetGrade {
    /// Squareness of sintered NdFeB: Hk/HcJ = 0.97, derived from a maker's
    /// digitised N35-class curve at 20 and 80 degC (S56 in docs/materials.md).
    pub const NDFEB_SQUARENESS: f64 = 0.97;
    /// Squareness of the other families and of user grades: the knee at
    /// 90 % of HcJ, the knee fraction the design check has always used
    /// (common practice, from memory); a wider knee than measured on NdFeB,
    /// so loss is predicted early rather than late.
    pub const DEFAULT_SQUARENESS: f64 = 0.9;

    /// A grade from its tabulated intrinsic curve ([H A/m, J T] from J <= 0
    /// up to H = 0): Br is J(0), HcJ where the points cross J = 0.
    pub fn from_intrinsic_curve(points: &[[f64; 2]], recoil_permeability: f64, br_coeff: f64, hcj_coeff: f64) -> Result<MagnetGrade, String> {
        let table = solver::intrinsic_table::IntrinsicTable::new(points, (recoil_permeability - 1.0) * solver::MU0)?;
        let br = table.j(0.0).0;
        if br.partial_cmp(&0.0) != Some(std::cmp::Ordering::Greater) || points[0][1] > 0.0 {
            return Err(format!(
                "the curve must run from J <= 0 (at HcJ) up to a positive J at H = 0; it runs from {} T to {br} T",
                points[0][1]
            ));
        }
        let k = points.iter().rposition(|p| p[1] <= 0.0).unwrap_or(0);
        let (a, b) = (points[k], points[k + 1]);
        let hcj = -(a[0] + (b[0] - a[0]) * (0.0 - a[1]) / (b[1] - a[1]));
        Ok(MagnetGrade {
            br,
            recoil_permeability,
            hcj,
            hcb: None,
            br_coeff,
            hcj_coeff,
            max_temperature: None,
            squareness: MagnetGrade::DEFAULT_SQUARENESS,
            intrinsic: Some(std::sync::Arc::new(table)),
        })
    }

    /// The user's intrinsic curve at a temperature: H scaled with HcJ and J
    /// with Br by the reversible coefficients.
    pub fn intrinsic_at(&self, celsius: f64) -> Option<std::sync::Arc<solver::intrinsic_table::IntrinsicTable>> {
        let t = self.intrinsic.as_ref()?;
        let dt = celsius - 20.0;
        let (kh, kj) = (1.0 + self.hcj_coeff / 100.0 * dt, 1.0 + self.br_coeff / 100.0 * dt);
        Some(if dt == 0.0 || !(kh > 0.0 && kj > 0.0) {
            t.clone()
        } else {
            std::sync::Arc::new(t.scaled(kh, kj))
        })
    }

    /// The knee of the intrinsic curve at a temperature; None without a finite HcJ.
    pub fn knee_at(&self, celsius: f64) -> Option<solver::magnet_law::Knee> {
        solver::magnet_law::Knee::from_squareness(self.br_at(celsius), self.recoil_permeability, self.hcj_at(celsius), self.squareness)
    }

    /// Br at a temperature (linear reversible model, reference 20 degC).
    pub fn br_at(&self, celsius: f64) -> f64 {
        self.br * (1.0 + self.br_coeff / 100.0 * (celsius - 20.0))
    }

    /// HcJ at a temperature (linear reversible model, reference 20 degC).
    pub fn hcj_at(&self, celsius: f64) -> f64 {
        (self.hcj * (1.0 + self.hcj_coeff / 100.0 * (celsius - 20.0))).max(0.0)
    }
}

/// The highest reversible Br coefficient of any magnet family, %/K: every
/// family in docs/materials.md loses remanence as it warms (sintered NdFeB
/// -0.12, S1; SmCo -0.025 to -0.043, S17 to S20; hard ferrite about -0.2,
/// S23; AlNiCo -0.02, S25; bonded NdFeB -0.11, S29), and temperature-
/// compensated SmCo stays within about 0.01 of zero (from memory).
pub const HIGHEST_BR_COEFF: f64 = 0.01;

/// The HcJ coefficient above which a coercivity rises with temperature, %/K:
/// hard ferrite's does (+0.27, S23), NdFeB's and SmCo's fall (-0.5 to -0.76,
/// S1 and S10; -0.15 to -0.30, S20).
pub const RISING_HCJ_COEFF: f64 = 0.1;

/// The highest remanence of a hard ferrite, T (Y33's typical 0.42, S22;
/// with margin): a rising coercivity with a remanence above it is no
/// family's.
pub const HIGHEST_FERRITE_BR: f64 = 0.5;

/// The lowest intrinsic coercivity of any permanent magnet family, A/m,
/// with margin: cast AlNiCo 5's is about 48 kA/m (its HcB, S25), hard
/// ferrite's 140 to 300 kA/m (S22), sintered NdFeB's from 955 kA/m (S1).
/// A bare `hcj = 955` is read as 955 A/m (bare numbers are SI), and the
/// magnet came out 99.9 % demagnetized with no word of the unit.
pub const LOWEST_HCJ: f64 = 10e3;

/// Why an intrinsic coercivity is no permanent magnet's, or None.
pub fn implausible_coercivity(hcj: f64) -> Option<String> {
    (hcj < LOWEST_HCJ).then(|| {
        format!(
            "{hcj} A/m is below any permanent magnet's (cast AlNiCo about 48 kA/m, ferrite 140 to 300 kA/m, sintered NdFeB from 955 kA/m); a bare number is A/m: write the data sheet's unit, as \"{hcj} kA/m\" or \"12 kOe\""
        )
    })
}

/// The lowest remanence of any permanent magnet, T, with margin: isotropic
/// ferrite's is 0.2 T (Y10T, S22), flexible bonded ferrite sheet's about
/// 0.1 to 0.25 T (from memory). A remanence in mT or gauss written as tesla
/// ("1.2 mT" for "1.2 T") gave a magnet a thousand times too weak.
pub const LOWEST_BR: f64 = 0.05;

/// Why a remanence is no permanent magnet's (below `LOWEST_BR`), or None.
pub fn implausible_remanence(br: f64) -> Option<String> {
    (br < LOWEST_BR).then(|| {
        format!(
            "{br} T is below any permanent magnet's remanence (isotropic ferrite 0.2 T, sintered NdFeB 1.2 to 1.45 T): check its unit (\"1.2 T\", \"12 kG\")"
        )
    })
}

/// Why a grade's reversible temperature coefficients are no magnet
/// family's, with the key at fault: most often a data sheet's minus sign
/// dropped. A user grade with `br_coeff = 0.12` gained 7 % of remanence at
/// 80 degC, and an NdFeB grade with `hcj_coeff = 0.6` a coercivity that
/// rises as it warms, hiding its demagnetization: both solved in silence.
pub fn implausible_coefficients(br: f64, br_coeff: f64, hcj_coeff: f64) -> Option<(&'static str, String)> {
    if br_coeff > HIGHEST_BR_COEFF {
        return Some((
            "br_coeff",
            format!(
                "{br_coeff} %/K makes the remanence rise as the magnet warms; every magnet family loses it (sintered NdFeB about -0.12, SmCo -0.03 to -0.04, ferrite -0.2, AlNiCo -0.02 %/K): give the data sheet's minus sign"
            ),
        ));
    }
    if hcj_coeff > RISING_HCJ_COEFF && br > HIGHEST_FERRITE_BR {
        return Some((
            "hcj_coeff",
            format!(
                "{hcj_coeff} %/K makes the coercivity rise as the magnet warms, which only hard ferrite's does (+0.27 %/K, with Br below {HIGHEST_FERRITE_BR} T); with Br {br} T this is no ferrite, and NdFeB's and SmCo's HcJ fall (-0.5 to -0.76 and -0.15 to -0.3 %/K): give the data sheet's minus sign"
            ),
        ));
    }
    None
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

#[cfg(test)]
mod tests {
    use super::MagnetGrade;
    use solver::magnet_law::MagnetCurve;

    /// The knee model against a measured curve: the intrinsic curve of an
    /// N35-class sintered NdFeB at 20 degC (BOMATEC BMN-35 data sheet,
    /// digitised: S56 in docs/materials.md; reading error about 3 kA/m),
    /// with the figures derived from it (Br 1.219 T, HcJ 959 kA/m, mu_rec
    /// 1.043, Hk/HcJ 0.97). At each measured (H, J) the model's H for that
    /// J lies within 1.5 % of HcJ: the tanh knee is symmetric about -HcJ
    /// while the measured one drops almost vertically at -HcJ, so the
    /// model bends about 12 kA/m early at the knee's foot.
    #[test]
    fn the_knee_follows_a_measured_ndfeb_curve() {
        let grade = MagnetGrade {
            br: 1.219,
            recoil_permeability: 1.043,
            hcj: 959e3,
            hcb: None,
            br_coeff: 0.0,
            hcj_coeff: 0.0,
            max_temperature: None,
            squareness: MagnetGrade::NDFEB_SQUARENESS,
            intrinsic: None,
        };
        let curve = MagnetCurve {
            br: grade.br,
            recoil_permeability: grade.recoil_permeability,
            knee: grade.knee_at(20.0),
            table: None,
        };
        let measured = [
            (-500.0, 1.195),
            (-800.0, 1.176),
            (-880.0, 1.167),
            (-900.0, 1.157),
            (-920.0, 1.131),
            (-929.9, 1.100),
            (-939.2, 1.050),
            (-944.6, 1.000),
            (-951.6, 0.900),
            (-955.8, 0.800),
        ];
        for (h_ka, j) in measured {
            let b = solver::MU0 * h_ka * 1e3 + j;
            // The model's H where mu0 H + J(H) = b, i.e. where J(H) = j on this point's load line.
            let h = curve.axial(b, 1.0).h;
            let off = (h - h_ka * 1e3).abs() / grade.hcj;
            assert!(
                off < 0.015,
                "at {h_ka} kA/m, J {j} T: model H {:.1} kA/m, {:.2} % of HcJ off",
                h / 1e3,
                100.0 * off
            );
        }
    }
}
