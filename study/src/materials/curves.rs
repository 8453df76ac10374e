//! Points of material curves for pictures and listings: a soft material's
//! interpolated B-H curve and knee, a magnet's recoil line at a temperature.
//! The formulas live here so that the command line only draws.

use super::grade::MagnetGrade;
use solver::{BhCurve, MU0};

pub use solver::CurveError;

/// Whether a B-H table makes a valid curve of a material (starts at the
/// origin, rises, slope above mu0, finite, polarization within what any
/// material reaches), and if not, the row at fault.
pub fn check_table(table: &[[f64; 2]]) -> Result<(), CurveError> {
    BhCurve::new(table)?;
    solver::check_polarization(table)
}

/// The lowest relative permeability of any material a case may hold:
/// the strongest diamagnets stay above it (bismuth 0.999834, chi -1.66e-4:
/// HyperPhysics, "Magnetic Susceptibilities of Paramagnetic and
/// Diamagnetic Materials at 20 degC"; pyrolytic graphite across its planes
/// about 0.9996, from memory). Only a superconductor excludes more flux.
pub const LOWEST_RELATIVE_PERMEABILITY: f64 = 0.999;

/// Why a linear relative permeability is no material's, or None: below
/// `LOWEST_RELATIVE_PERMEABILITY` it is most often a permeability in H/m
/// written as a relative one (a steel's 6.3e-3 H/m is mu_r 5000, and as
/// `mur` it kept all flux out of the part, with no sign of it), and the
/// reason offers mu / mu0.
pub fn implausible_relative_permeability(mur: f64) -> Option<String> {
    if mur >= LOWEST_RELATIVE_PERMEABILITY {
        return None;
    }
    let absolute = if mur < 0.1 {
        let relative = mur / MU0;
        let digits = if relative >= 10.0 { 0 } else { 3 };
        format!("; if {mur} is the permeability in H/m, mur is {relative:.digits$} (it over mu0, 1.2566e-6 H/m)")
    } else {
        String::new()
    };
    Some(format!(
        "{mur} is below any material's relative permeability (air and copper 1, the strongest diamagnet, bismuth, 0.99983; steel hundreds to thousands){absolute}"
    ))
}

/// The interpolated (Fritsch-Carlson) B-H curve from B = 0 to `b_top`,
/// as `samples + 1` points [H (A/m), B (T)]; None for an invalid table.
pub fn bh_points(table: &[[f64; 2]], b_top: f64, samples: usize) -> Option<Vec<[f64; 2]>> {
    let c = BhCurve::new(table).ok()?;
    Some(
        (0..=samples)
            .map(|k| {
                let b = b_top * k as f64 / samples as f64;
                [c.h_of_b(b).0, b]
            })
            .collect(),
    )
}

/// H (A/m) on the interpolated curve at each flux density; None for an invalid table.
pub fn h_at(table: &[[f64; 2]], b: &[f64]) -> Option<Vec<[f64; 2]>> {
    let c = BhCurve::new(table).ok()?;
    Some(b.iter().map(|&b| [c.h_of_b(b).0, b]).collect())
}

/// The knee of a soft material's curve (differential permeability fallen
/// to a tenth of its peak), T; None for an invalid table.
pub fn knee(table: &[[f64; 2]]) -> Option<f64> {
    BhCurve::new(table).ok().map(|c| c.knee_b())
}

impl MagnetGrade {
    /// Recoil permeability of a user grade that gives neither mur nor HcB
    /// (sintered NdFeB's typical 1.05, S1 in docs/materials.md).
    pub const DEFAULT_RECOIL_PERMEABILITY: f64 = 1.05;

    /// Recoil permeability of a straight normal curve through Br and -HcB:
    /// mu_rec = Br / (mu0 HcB).
    pub fn recoil_permeability_from(br: f64, hcb: f64) -> f64 {
        br / (MU0 * hcb)
    }

    /// B on the recoil line at field strength `h` (A/m, along the
    /// magnetization) and temperature `celsius`.
    pub fn recoil_b(&self, h: f64, celsius: f64) -> f64 {
        self.br_at(celsius) + MU0 * self.recoil_permeability * h
    }

    /// The recoil line at a temperature from H = 0 down to where it meets
    /// B = 0 or -HcJ, whichever comes first: two points [H (A/m), B (T)].
    pub fn recoil_line(&self, celsius: f64) -> [[f64; 2]; 2] {
        let hcb = self.br_at(celsius) / (MU0 * self.recoil_permeability);
        let h_end = -hcb.min(self.hcj_at(celsius));
        [[h_end, self.recoil_b(h_end, celsius)], [0.0, self.br_at(celsius)]]
    }
}

/// Highest relative permeability a soft material's curve is taken to
/// reach without a warning. The best nickel-iron alloys reach a few
/// hundred thousand in steady fields (Mumetal up to 350 000: Imphy Alloys,
/// "Mumetal, Permimphy, Supermimphy" data sheet), the very best about a
/// million (from memory); mild steels a few thousand. A curve past this
/// is most often an ordinary steel's with H in kA/m or oersted read as A/m.
pub const PLAUSIBLE_RELATIVE_PERMEABILITY: f64 = 1e6;

/// The largest secant relative permeability B / (mu0 H) over a table's
/// rows with H > 0, and the H (A/m) of that row.
pub fn largest_relative_permeability(table: &[[f64; 2]]) -> (f64, f64) {
    table
        .iter()
        .filter(|p| p[0] > 0.0)
        .map(|p| (p[1] / (MU0 * p[0]), p[0]))
        .fold((0.0, 0.0), |best, x| if x.0 > best.0 { x } else { best })
}
