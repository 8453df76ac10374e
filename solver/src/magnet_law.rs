//! A permanent magnet's second-quadrant law with its knee.
//!
//! Along the easy axis the polarization follows a linear-plus-tanh intrinsic
//! curve (the form of T. Takacs's phenomenological loop model, COMPEL 20(4),
//! 2001, as described in its abstract; the parameterization here is ours):
//!
//! J(H) = chi mu0 (H + HcJ) + Jk tanh((H + HcJ) / w),  Jk = Br - chi mu0 HcJ,
//!
//! with chi = mu_rec - 1. J(0) = Br to within e^(-2 HcJ / w), J(-HcJ) = 0
//! exactly, the slope far from the knee is the recoil slope, and well past
//! the knee the magnet reverses (J tends to -Jk plus the recoil slope). The
//! knee's width w puts the tanh term at 90 % at H = -Hk: w = (HcJ - Hk) /
//! atanh(0.9), where Hk / HcJ is the squareness.
//!
//! A magnet that has been driven down to H_min recoils from there:
//! J = min(J_major(H), f Br + chi mu0 H), with f the share of Br left (the
//! recoil line's intercept over Br). Across the easy axis the magnet is
//! linear with the recoil permeability.
//!
//! Everything is in terms of B for the vector-potential solver: H along the
//! axis is the root of mu0 H + J(H) = B, which is unique because mu0 H + J
//! rises strictly with H.

use crate::intrinsic_table::IntrinsicTable;
use crate::MU0;

/// The knee of a magnet's intrinsic curve.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Knee {
    /// Intrinsic coercivity HcJ at the study temperature, A/m (positive).
    pub hcj: f64,
    /// Width w of the tanh term, A/m.
    pub width: f64,
}

impl Knee {
    /// The knee of a grade of squareness `hk_over_hcj` (0.5 to 0.999); None
    /// when the recoil line alone reaches J = 0 before HcJ (the model then
    /// has no knee to draw) or the figures are not finite and positive.
    pub fn from_squareness(br: f64, recoil_permeability: f64, hcj: f64, hk_over_hcj: f64) -> Option<Knee> {
        let q = hk_over_hcj.clamp(0.5, 0.999);
        let jk = br - (recoil_permeability - 1.0) * MU0 * hcj;
        (hcj.is_finite() && hcj > 0.0 && br > 0.0 && jk > 0.0).then(|| Knee {
            hcj,
            width: (1.0 - q) * hcj / 0.9_f64.atanh(),
        })
    }
}

/// One magnet's law along and across its easy axis.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct MagnetCurve<'t> {
    /// Remanence, T (positive).
    pub br: f64,
    /// Relative recoil permeability mu_rec.
    pub recoil_permeability: f64,
    /// The knee, or None for a magnet that stays on its recoil line.
    pub knee: Option<Knee>,
    /// A user's intrinsic curve, which takes the knee's place.
    pub table: Option<&'t IntrinsicTable>,
}

/// H along the easy axis and its derivative dH/dB there.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct AxialResponse {
    /// H along the easy axis, A/m.
    pub h: f64,
    /// dH/dB along the easy axis, m/H.
    pub dh_db: f64,
}

/// tanh(u) and sech(u)^2 from one exponential: this pair is evaluated at
/// every magnet point in every Newton step, where separate tanh and cosh
/// calls were a quarter of a bare magnet's run. expm1 keeps tanh's relative
/// accuracy near 0; e^(-2|u|) keeps sech^2's far out on the tails.
fn tanh_sech2(u: f64) -> (f64, f64) {
    let a = u.abs();
    let e = (-2.0 * a).exp();
    let one_minus_e = if a < 0.35 { -(-2.0 * a).exp_m1() } else { 1.0 - e };
    let t = one_minus_e / (1.0 + e);
    (t.copysign(u), 4.0 * e / ((1.0 + e) * (1.0 + e)))
}

/// ln cosh(u) without overflow.
fn ln_cosh(u: f64) -> f64 {
    let a = u.abs();
    a + (-2.0 * a).exp().ln_1p() - std::f64::consts::LN_2
}

impl MagnetCurve<'_> {
    fn chi_mu0(&self) -> f64 {
        (self.recoil_permeability - 1.0) * MU0
    }

    /// Jk = Br - chi mu0 HcJ: the tanh term's height.
    fn jk(&self, k: &Knee) -> f64 {
        self.br - self.chi_mu0() * k.hcj
    }

    /// J on the major (virgin demagnetization) curve, T.
    pub fn major_j(&self, h: f64) -> f64 {
        if let Some(t) = self.table {
            return t.j(h).0;
        }
        match &self.knee {
            None => self.br + self.chi_mu0() * h,
            Some(k) => self.chi_mu0() * (h + k.hcj) + self.jk(k) * ((h + k.hcj) / k.width).tanh(),
        }
    }

    /// The share of Br left on the recoil line from a point that reached
    /// field strength `h` on the major curve: (J(h) - chi mu0 h) / Br.
    pub fn remaining_share(&self, h: f64) -> f64 {
        ((self.major_j(h) - self.chi_mu0() * h) / self.br).clamp(-1.0, 1.0)
    }

    /// J on the curve of a magnet with `share` of Br left, T.
    pub fn j(&self, h: f64, share: f64) -> f64 {
        self.major_j(h).min(share * self.br + self.chi_mu0() * h)
    }

    /// H and dH/dB along the easy axis at flux density `b` there, for a
    /// magnet with `share` of its remanence left.
    pub fn axial(&self, b: f64, share: f64) -> AxialResponse {
        let mu = MU0 * self.recoil_permeability;
        let recoil = AxialResponse {
            h: (b - share * self.br) / mu,
            dh_db: 1.0 / mu,
        };
        let major = match (self.table, &self.knee) {
            (Some(t), _) => table_axial(t, b, recoil.h),
            (None, Some(k)) => self.major_axial(b, k),
            (None, None) => return recoil,
        };
        // B(H) is the smaller of the two rising branches, so H is the larger root.
        if share < 1.0 && recoil.h > major.h {
            recoil
        } else {
            major
        }
    }

    /// The root of mu0 H + J_major(H) = b by Newton's method kept inside a
    /// bracket (tanh between -1 and 1 bounds the root on both sides), with
    /// bisection whenever a step does not halve the residual.
    fn major_axial(&self, b: f64, k: &Knee) -> AxialResponse {
        let mu = MU0 * self.recoil_permeability;
        let jk = self.jk(k);
        // In u = (H + HcJ) / w: g(u) = mu w u - mu0 HcJ + Jk tanh(u) - b.
        let shift = b + MU0 * k.hcj;
        let (lo, hi) = ((shift - jk) / (mu * k.width), (shift + jk) / (mu * k.width));
        if lo >= 20.0 {
            // tanh(u) = 1 to the last bit: the recoil line itself, computed
            // as the knee-less law computes it (the same rounding, so a
            // magnet far from its knee converges as a linear one does).
            return AxialResponse {
                h: (b - self.br) / mu,
                dh_db: 1.0 / mu,
            };
        }
        let g = |u: f64| {
            let (tanh, sech2) = tanh_sech2(u);
            (mu * k.width * u - MU0 * k.hcj + jk * tanh - b, mu * k.width + jk * sech2)
        };
        let u = bracketed_root(g, lo, hi, lo, 1e-14);
        AxialResponse {
            h: u * k.width - k.hcj,
            dh_db: 1.0 / (mu + jk / k.width * tanh_sech2(u).1),
        }
    }

    /// The integral of B dH along the easy axis from 0 to h on the curve with `share` of Br left.
    fn b_dh(&self, h: f64, share: f64) -> f64 {
        let mu = MU0 * self.recoil_permeability;
        let recoil = |h: f64| 0.5 * mu * h * h + share * self.br * h;
        if let Some(t) = self.table {
            let major = |h: f64| 0.5 * MU0 * h * h + t.integral(h);
            if share >= 1.0 {
                return major(h) - major(0.0);
            }
            let crossing = table_crossing(|x| t.j(x).0 - (share * self.br + self.chi_mu0() * x));
            return if h >= crossing {
                recoil(h)
            } else {
                recoil(crossing) + major(h) - major(crossing)
            };
        }
        let Some(k) = &self.knee else { return recoil(h) };
        let jk = self.jk(k);
        let major = |h: f64| 0.5 * MU0 * h * h + 0.5 * self.chi_mu0() * (h + k.hcj).powi(2) + jk * k.width * ln_cosh((h + k.hcj) / k.width);
        if share >= 1.0 {
            return major(h) - major(0.0);
        }
        // The branches cross once, at tanh(u) = 1 - (1 - share) Br / Jk: recoil above, major below.
        let t = 1.0 - (1.0 - share) * self.br / jk;
        let crossing = if t > -1.0 { t.atanh() * k.width - k.hcj } else { f64::NEG_INFINITY };
        if h >= crossing || crossing >= 0.0 {
            recoil(h)
        } else {
            recoil(crossing) + major(h) - major(crossing)
        }
    }

    /// Energy density along the easy axis, J/m3: the integral of H dB from
    /// the unloaded state (H = 0), H B - integral of B dH.
    pub fn axial_energy(&self, b: f64, share: f64) -> f64 {
        let h = self.axial(b, share).h;
        h * b - self.b_dh(h, share)
    }
}

/// The root of a rising g in [lo, hi] (g(lo) <= 0 <= g(hi)) from `start`:
/// Newton's method kept inside the bracket, bisecting whenever a step
/// leaves it or does not halve |g| (Newton alone can cycle between the two
/// bends of a knee), until the step or the bracket is below `tol` relative.
/// `g` returns the value and the slope.
fn bracketed_root(g: impl Fn(f64) -> (f64, f64), mut lo: f64, mut hi: f64, start: f64, tol: f64) -> f64 {
    let (mut x, mut last) = (start, f64::INFINITY);
    for _ in 0..200 {
        let (v, slope) = g(x);
        if v > 0.0 {
            hi = x;
        } else {
            lo = x;
        }
        let newton = x - v / slope;
        let inside = newton >= lo && newton <= hi;
        // A Newton step below the tolerance ends the search even when |g|
        // did not halve: at the root |g| is round-off, which need not
        // shrink, and bisecting the whole bracket from there took up to 49
        // evaluations where 2 do.
        if v == 0.0 || (inside && (newton - x).abs() <= tol * (1.0 + x.abs())) {
            return if v == 0.0 { x } else { newton };
        }
        let next = if inside && v.abs() <= 0.5 * last { newton } else { 0.5 * (lo + hi) };
        last = v.abs();
        let done = hi - lo <= tol * (1.0 + x.abs());
        x = next;
        if done {
            break;
        }
    }
    x
}

/// The root of mu0 H + J(H) = b on a tabulated curve: bracketed from the
/// recoil line's root `guess` by doubling steps, then Newton's method with
/// bisection whenever a step does not halve the residual.
fn table_axial(t: &IntrinsicTable, b: f64, guess: f64) -> AxialResponse {
    let g = |h: f64| MU0 * h + t.j(h).0 - b;
    let mut step = guess.abs().max(1e3) * 0.1;
    let (mut lo, mut hi) = (guess, guess);
    for _ in 0..200 {
        if g(lo) <= 0.0 {
            break;
        }
        lo -= step;
        step *= 2.0;
    }
    step = guess.abs().max(1e3) * 0.1;
    for _ in 0..200 {
        if g(hi) >= 0.0 {
            break;
        }
        hi += step;
        step *= 2.0;
    }
    let h = bracketed_root(
        |h| {
            let (j, dj) = t.j(h);
            (MU0 * h + j - b, MU0 + dj)
        },
        lo,
        hi,
        0.5 * (lo + hi),
        1e-13,
    );
    AxialResponse {
        h,
        dh_db: 1.0 / (MU0 + t.j(h).1),
    }
}

/// Where a tabulated major curve meets a recoil line below H = 0 (`gap`
/// is major minus recoil: positive at 0 for a magnet that lost flux), by
/// bisection; minus infinity if they never meet.
fn table_crossing(gap: impl Fn(f64) -> f64) -> f64 {
    let mut lo = -1e3;
    while gap(lo) > 0.0 {
        lo *= 2.0;
        if lo < -1e12 {
            return f64::NEG_INFINITY;
        }
    }
    let mut hi = 0.0;
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if gap(mid) > 0.0 {
            hi = mid;
        } else {
            lo = mid;
        }
    }
    0.5 * (lo + hi)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn n42_hot() -> MagnetCurve<'static> {
        let (br, mu, hcj) = (1.1, 1.05, 500e3);
        MagnetCurve {
            br,
            recoil_permeability: mu,
            knee: Knee::from_squareness(br, mu, hcj, 0.97),
            table: None,
        }
    }

    #[test]
    fn the_curve_passes_its_defining_points() {
        let m = n42_hot();
        assert!((m.major_j(0.0) - m.br).abs() < 1e-12);
        assert!(m.major_j(-500e3).abs() < 1e-12);
        // At -Hk the tanh term is at 90 %.
        let k = m.knee.unwrap();
        let jk = m.br - 0.05 * MU0 * 500e3;
        let at_hk = m.major_j(-0.97 * 500e3) - 0.05 * MU0 * 0.03 * 500e3;
        assert!((at_hk / jk - 0.9).abs() < 1e-12, "{}", at_hk / jk);
        assert!(k.width > 0.0);
    }

    #[test]
    fn h_of_b_inverts_b_of_h_on_both_branches() {
        let m = n42_hot();
        for share in [1.0, 0.8, 0.3] {
            for h in [-900e3, -520e3, -495e3, -480e3, -300e3, 0.0, 200e3] {
                let b = MU0 * h + m.j(h, share);
                let r = m.axial(b, share);
                assert!((r.h - h).abs() < 1e-6 * 500e3, "share {share} h {h}: {}", r.h);
                // dH/dB against a difference quotient.
                let d = 1e-7;
                let fd = (m.axial(b + d, share).h - m.axial(b - d, share).h) / (2.0 * d);
                assert!((fd - r.dh_db).abs() < 1e-4 * fd.abs().max(1.0), "share {share} h {h}: {fd} vs {}", r.dh_db);
            }
        }
    }

    #[test]
    fn the_energy_is_the_integral_of_h_db() {
        let m = n42_hot();
        for share in [1.0, 0.7] {
            for b in [-0.8, -0.2, 0.1, 0.6, 1.2] {
                let d = 1e-6;
                let fd = (m.axial_energy(b + d, share) - m.axial_energy(b - d, share)) / (2.0 * d);
                let h = m.axial(b, share).h;
                assert!((fd - h).abs() < 1e-5 * h.abs().max(1e3), "share {share} b {b}: {fd} vs {h}");
            }
        }
    }

    #[test]
    fn one_exponential_gives_tanh_and_sech_squared() {
        for u in [-30.0, -5.0, -0.4, -0.3, -1e-9, 0.0, 1e-12, 0.2, 0.36, 1.0, 7.5, 19.0, 400.0] {
            let (t, s2) = tanh_sech2(u);
            let sech2 = 1.0 / f64::cosh(u).powi(2);
            assert!(
                (t - u.tanh()).abs() <= 4.0 * f64::EPSILON * u.tanh().abs().max(f64::MIN_POSITIVE),
                "tanh({u}): {t}"
            );
            assert!((s2 - sech2).abs() <= 1e-14 * sech2, "sech2({u}): {s2} vs {sech2}");
        }
    }

    #[test]
    fn the_recoil_share_follows_the_lowest_point() {
        let m = n42_hot();
        assert!((m.remaining_share(-100e3) - 1.0).abs() < 1e-9);
        let s = m.remaining_share(-490e3);
        assert!(s < 0.9 && s > 0.0, "{s}");
    }
}

#[cfg(test)]
mod sweep {
    use super::*;

    /// A hot magnet (HcJ 24 kA/m, a knee 490 A/m wide): Newton's method
    /// alone cycled between the knee's two bends here and returned a
    /// wrong root (a jump of 2.3 kA/m in H at B = 1.0674 T).
    #[test]
    fn h_of_b_is_continuous_on_a_fine_sweep() {
        let (br, mu, hcj) = (1.1, 1.05, 24e3);
        let m = MagnetCurve {
            br,
            recoil_permeability: mu,
            knee: Knee::from_squareness(br, mu, hcj, 0.97),
            table: None,
        };
        let mut worst: f64 = 0.0;
        let mut at = 0.0;
        let n = 300_000;
        let (b0, b1) = (-1.5, 1.5);
        let db = (b1 - b0) / n as f64;
        let mut prev = m.axial(b0, 1.0);
        for i in 1..=n {
            let b = b0 + i as f64 * db;
            let r = m.axial(b, 1.0);
            let predicted = prev.h + 0.5 * (prev.dh_db + r.dh_db) * db;
            let e = (r.h - predicted).abs();
            if e > worst {
                worst = e;
                at = b;
            }
            prev = r;
        }
        assert!(worst < 1e-3, "worst jump {worst} A/m at b = {at}");
    }
}
