//! Closed-form reference fields, each with its published source. These are
//! written from the cited formulas, independently of the solver.

use std::f64::consts::PI;

/// Permeability of free space, H/m (CODATA 2018).
pub const MU0: f64 = 1.256_637_062_12e-6;

/// On-axis B_z of a uniformly axially magnetized cylinder (remanence `br`,
/// radius `a`, occupying 0 <= z <= `length`) outside the magnet, from the
/// charged-disk model: B_z = Br/2 [ z/sqrt(z^2+a^2) - (z-L)/sqrt((z-L)^2+a^2) ]
/// (E. P. Furlani, Permanent Magnet and Electromechanical Devices, 2001,
/// section 4.3; N. Derby and S. Olbert, Am. J. Phys. 78(3), 2010).
pub fn cylinder_axis_bz(br: f64, a: f64, length: f64, z: f64) -> f64 {
    let f = |u: f64| u / (u * u + a * a).sqrt();
    0.5 * br * (f(z) - f(z - length))
}

/// Bulirsch's generalized complete elliptic integral
/// cel(kc, p, c, s) = integral over [0, pi/2] of (c cos^2 + s sin^2) /
/// ((cos^2 + p sin^2) sqrt(cos^2 + kc^2 sin^2)), by his iteration
/// (R. Bulirsch, Numer. Math. 13, 1969; the p > 0 branch as printed in
/// Press et al., Numerical Recipes in C, 2nd ed., 1992, section 6.11).
pub fn cel(kc: f64, p: f64, c: f64, s: f64) -> f64 {
    let mut qc = kc.abs();
    let (mut a, mut p) = (c, p.sqrt());
    let mut b = s / p;
    let mut e = qc;
    let mut em = 1.0;
    loop {
        let f = a;
        a += b / p;
        let g = e / p;
        b += f * g;
        b += b;
        p += g;
        let g = em;
        em += qc;
        if (g - qc).abs() <= g * 1e-14 {
            break;
        }
        qc = 2.0 * e.sqrt();
        e = qc * em;
    }
    0.5 * PI * (b + a * em) / (em * (em + p))
}

/// Field (B_r, B_z) of a uniformly axially magnetized cylinder of radius `a`
/// and half-length `b`, centred at z = 0, at (rho, z) outside the magnet
/// (N. Derby and S. Olbert, Cylindrical magnets and ideal solenoids,
/// Am. J. Phys. 78(3), 2010, eqs. 3 and 4 with B0 = Br / pi).
pub fn cylinder_field(br: f64, a: f64, b: f64, rho: f64, z: f64) -> [f64; 2] {
    let b0 = br / PI;
    let zp = z + b;
    let zm = z - b;
    let ap = a / (zp * zp + (rho + a) * (rho + a)).sqrt();
    let am = a / (zm * zm + (rho + a) * (rho + a)).sqrt();
    let bp = zp / (zp * zp + (rho + a) * (rho + a)).sqrt();
    let bm = zm / (zm * zm + (rho + a) * (rho + a)).sqrt();
    let g = (a - rho) / (a + rho);
    let kp = ((zp * zp + (a - rho) * (a - rho)) / (zp * zp + (a + rho) * (a + rho))).sqrt();
    let km = ((zm * zm + (a - rho) * (a - rho)) / (zm * zm + (a + rho) * (a + rho))).sqrt();
    let br_ = b0 * (ap * cel(kp, 1.0, 1.0, -1.0) - am * cel(km, 1.0, 1.0, -1.0));
    let bz = b0 * a / (a + rho) * (bp * cel(kp, g * g, 1.0, g) - bm * cel(km, g * g, 1.0, g));
    [br_, bz]
}

/// Field (B_x, B_y) outside an infinitely long rectangular magnet of width
/// 2w (|x| <= w) and height 2h (|y| <= h) magnetized along +y with
/// remanence `br`: two sheets of surface charge +-Br/mu0 at y = +-h
/// (E. P. Furlani, 2001, section 4.2, the 2D charged-sheet field).
pub fn bar_field_2d(br: f64, w: f64, h: f64, x: f64, y: f64) -> [f64; 2] {
    let sheet = |y0: f64, sign: f64| {
        let dy = y - y0;
        let bx = br / (4.0 * PI) * (((x + w).powi(2) + dy * dy) / ((x - w).powi(2) + dy * dy)).ln();
        let by = br / (2.0 * PI) * ((x + w).atan2(dy) - (x - w).atan2(dy));
        [sign * bx, sign * by]
    };
    let top = sheet(h, 1.0);
    let bottom = sheet(-h, -1.0);
    [top[0] + bottom[0], top[1] + bottom[1]]
}

/// On-axis B_z of a thick solenoid (radii r1 < r2, length L centred at z = 0)
/// with uniform current density j (A/m2): B_z = mu0 j / 2 [ u ln((r2 + sqrt(r2^2 + u^2)) / (r1 + sqrt(r1^2 + u^2))) ] from u = z - L/2 to z + L/2
/// (D. B. Montgomery, Solenoid Magnet Design, Wiley 1969, ch. 1).
pub fn thick_solenoid_axis_bz(j: f64, r1: f64, r2: f64, length: f64, z: f64) -> f64 {
    let f = |u: f64| u * ((r2 + (r2 * r2 + u * u).sqrt()) / (r1 + (r1 * r1 + u * u).sqrt())).ln();
    0.5 * MU0 * j * (f(z + 0.5 * length) - f(z - 0.5 * length))
}

/// Bessel function J1 by its integral representation
/// J1(x) = (1/pi) integral over [0, pi] of cos(t - x sin t) (Abramowitz and
/// Stegun 9.1.21), with Gauss-Legendre panels; past x = 25 by the
/// asymptotic expansion (A&S 9.2.5, 9.2.9, 9.2.10, three terms each: error
/// below 1e-10 there), since the panels' cost grows with x.
pub fn bessel_j1(x: f64) -> f64 {
    if x.abs() > 25.0 {
        let (mu, z) = (4.0, 8.0 * x.abs());
        let m = |k: u32| (0..k).map(|i| mu - f64::from(2 * i + 1).powi(2)).product::<f64>();
        let p = 1.0 - m(2) / (2.0 * z.powi(2)) + m(4) / (24.0 * z.powi(4)) - m(6) / (720.0 * z.powi(6));
        let q = m(1) / z - m(3) / (6.0 * z.powi(3)) + m(5) / (120.0 * z.powi(5));
        let chi = x.abs() - 0.75 * PI;
        return x.signum() * (2.0 / (PI * x.abs())).sqrt() * (p * chi.cos() - q * chi.sin());
    }
    let panels = 16 + (x.abs() as usize) * 2;
    let h = PI / panels as f64;
    let (g, w) = gauss_legendre_8();
    let mut s = 0.0;
    for p in 0..panels {
        let a = p as f64 * h;
        for k in 0..8 {
            let t = a + 0.5 * h * (g[k] + 1.0);
            s += 0.5 * h * w[k] * (t - x * t.sin()).cos();
        }
    }
    s / PI
}

/// Axial attraction (N) between two coaxial cylinders magnetized along the
/// axis in the same direction (remanences br1, br2, radii a1, a2, lengths
/// l1, l2) with facing ends a distance `gap` apart, by the charge model:
/// F = pi Br1 Br2 a1 a2 / mu0 * integral of J1(k a1) J1(k a2) e^{-k gap}
/// (1 - e^{-k l1})(1 - e^{-k l2}) dk / k (J. Vokoun et al., J. Magn. Magn.
/// Mater. 321, 2009, 3758; the disk-pair form summed over the four faces).
pub fn coaxial_cylinders_force(br1: f64, br2: f64, a1: f64, a2: f64, l1: f64, l2: f64, gap: f64) -> f64 {
    let scale = a1.max(a2);
    let (g, w) = gauss_legendre_8();
    // Touching faces: the integrand falls only as 1/k^2, so the range ends
    // at 4000/scale and the tail is added in closed form below.
    let kmax = if gap > 0.0 { 60.0 / gap.min(scale) + 200.0 / scale } else { 4000.0 / scale };
    // Panels no wider than 1/scale: J1(k a) turns over every 2 pi / a.
    let panels = (kmax * scale).ceil().max(4000.0) as usize;
    let h = kmax / panels as f64;
    let mut s = 0.0;
    for p in 0..panels {
        let a = p as f64 * h;
        for k in 0..8 {
            let kk = a + 0.5 * h * (g[k] + 1.0);
            let f = bessel_j1(kk * a1) * bessel_j1(kk * a2) * (-kk * gap).exp() * (1.0 - (-kk * l1).exp()) * (1.0 - (-kk * l2).exp()) / kk;
            s += 0.5 * h * w[k] * f;
        }
    }
    if gap == 0.0 {
        // J1(k a1) J1(k a2) ~ cos(k (a1 - a2)) / (pi k sqrt(a1 a2)) on average
        // past kmax (the oscillating rest is O(1/kmax^2)); equal radii: 1 / (pi a kmax).
        if a1 == a2 {
            s += 1.0 / (PI * a1 * kmax);
        }
    }
    PI * br1 * br2 * a1 * a2 / MU0 * s
}

/// Eight-point Gauss-Legendre nodes and weights on [-1, 1].
pub fn gauss_legendre_8() -> ([f64; 8], [f64; 8]) {
    let x = [
        -0.960_289_856_497_536_3,
        -0.796_666_477_413_626_7,
        -0.525_532_409_916_329,
        -0.183_434_642_495_649_8,
        0.183_434_642_495_649_8,
        0.525_532_409_916_329,
        0.796_666_477_413_626_7,
        0.960_289_856_497_536_3,
    ];
    let w = [
        0.101_228_536_290_376_3,
        0.222_381_034_453_374_5,
        0.313_706_645_877_887_3,
        0.362_683_783_378_362,
        0.362_683_783_378_362,
        0.313_706_645_877_887_3,
        0.222_381_034_453_374_5,
        0.101_228_536_290_376_3,
    ];
    (x, w)
}

/// Direct numerical integration of the charge model for the cylinder of
/// `cylinder_field` (used to cross-check the elliptic-integral form).
pub fn cylinder_field_by_quadrature(br: f64, a: f64, b: f64, rho: f64, z: f64) -> [f64; 2] {
    let (g, w) = gauss_legendre_8();
    let (nr, nt) = (40, 80);
    let mut out = [0.0; 2];
    for (z0, sign) in [(b, 1.0), (-b, -1.0)] {
        for i in 0..nr {
            for gi in 0..8 {
                let r = a * (i as f64 + 0.5 * (g[gi] + 1.0)) / nr as f64;
                let wr = a / nr as f64 * 0.5 * w[gi];
                for j in 0..nt {
                    for gj in 0..8 {
                        let t = 2.0 * PI * (j as f64 + 0.5 * (g[gj] + 1.0)) / nt as f64;
                        let wt = 2.0 * PI / nt as f64 * 0.5 * w[gj];
                        let d = [rho - r * t.cos(), -r * t.sin(), z - z0];
                        let d3 = (d[0] * d[0] + d[1] * d[1] + d[2] * d[2]).powf(1.5);
                        let q = sign * br / (4.0 * PI) * r * wr * wt / d3;
                        out[0] += q * d[0];
                        out[1] += q * d[2];
                    }
                }
            }
        }
    }
    out
}

/// Complete elliptic integrals K(k) and E(k) from Bulirsch's cel
/// (K = cel(k', 1, 1, 1), E = cel(k', 1, 1, k'^2)).
pub fn elliptic_ke(k: f64) -> (f64, f64) {
    let kc = (1.0 - k * k).sqrt();
    (cel(kc, 1.0, 1.0, 1.0), cel(kc, 1.0, 1.0, kc * kc))
}

/// Inductance of a single-layer solenoid (current sheet) of radius a, length
/// l and n turns: L = K_N mu0 pi a^2 n^2 / l with Nagaoka's coefficient
/// K_N = 4/(3 pi k') [ (k'^2/k^2)(K(k) - E(k)) + E(k) - k ], k = 2a/sqrt(4a^2 + l^2)
/// (H. Nagaoka, J. Coll. Sci. Imp. Univ. Tokyo 27, 1909; F. W. Grover,
/// Inductance Calculations, 1946).
pub fn nagaoka_inductance(a: f64, l: f64, n: f64) -> f64 {
    let k = 2.0 * a / (4.0 * a * a + l * l).sqrt();
    let kp = (1.0 - k * k).sqrt();
    let (kk, ee) = elliptic_ke(k);
    let coefficient = 4.0 / (3.0 * PI * kp) * (kp * kp / (k * k) * (kk - ee) + ee - k);
    coefficient * MU0 * PI * a * a * n * n / l
}

/// Self-inductance of a coil of `turns` turns spread uniformly over a
/// rectangular cross-section (radii r1 < r2, length l): the mutual
/// inductance of two coaxial circles in its Bessel form,
/// M = mu0 pi a b integral of J1(k a) J1(k b) e^{-k |d|} dk (the Hankel
/// transform of a ring's vector potential; W. R. Smythe, Static and
/// Dynamic Electricity, 3rd ed., 1968, from memory of its chapter 7),
/// integrated over both cross-sections:
/// L = mu0 pi n^2 integral of S(k)^2 Z(k) dk, n = turns / ((r2 - r1) l),
/// with S(k) = integral of r J1(k r) dr over [r1, r2] (Gauss-Legendre) and
/// Z(k) = 2 (k l - 1 + e^{-k l}) / k^2 the double z integral in closed form,
/// up to kmax = 3000 / r1. Past it k a >> 1 and J1's asymptotic form
/// (A&S 9.2.1) gives S^2 on average 4 a sin^2(k w / 2) / (pi k^3) (a the
/// mean radius, w = r2 - r1, to O((w/a)^2)), whose tail `coil_tail` adds.
/// In the thin limit it is Nagaoka's current sheet (`nagaoka_inductance`;
/// the tests below).
pub fn thick_coil_inductance(r1: f64, r2: f64, l: f64, turns: f64) -> f64 {
    let (g, w) = gauss_legendre_8();
    let width = r2 - r1;
    let s_of = |k: f64| -> f64 {
        let panels = (k * width).ceil().max(1.0) as usize;
        let h = width / panels as f64;
        let mut s = 0.0;
        for p in 0..panels {
            for i in 0..8 {
                let r = r1 + h * (p as f64 + 0.5 * (g[i] + 1.0));
                s += 0.5 * h * w[i] * r * bessel_j1(k * r);
            }
        }
        s
    };
    let z_of = |k: f64| {
        let kl = k * l;
        // Near k = 0 the closed form cancels: its series, l^2 (1 - kl/3 + (kl)^2/12).
        if kl < 1e-3 {
            l * l * (1.0 - kl / 3.0 + kl * kl / 12.0)
        } else {
            2.0 * (kl - 1.0 + (-kl).exp()) / (k * k)
        }
    };
    let kmax = 3000.0 / r1;
    // Panels one radian of J1(k r2)'s phase wide (a sixth of its turn).
    let panels = (kmax * r2).ceil() as usize;
    let h = kmax / panels as f64;
    let mut total = 0.0;
    for p in 0..panels {
        for i in 0..8 {
            let k = h * (p as f64 + 0.5 * (g[i] + 1.0));
            total += 0.5 * h * w[i] * s_of(k).powi(2) * z_of(k);
        }
    }
    total += coil_tail(0.5 * (r1 + r2), width, l, kmax);
    let n = turns / (width * l);
    MU0 * PI * n * n * total
}

/// The integral of (4 a / pi) sin^2(k w / 2) (2 l / k^4 - 2 / k^5) over
/// [kmax, infinity) (the asymptotic S^2 Z of `thick_coil_inductance`;
/// Z's e^{-k l} is below e^-3000 there): sin^2 = 1/2 - cos(k w)/2, the
/// constant half in closed form, the cosine half by Gauss-Legendre panels
/// no wider than an eighth of k or a radian of k w, out to where it is
/// 1e-9 of the half.
fn coil_tail(a: f64, w: f64, l: f64, kmax: f64) -> f64 {
    let weight = |k: f64| 2.0 * l / k.powi(4) - 2.0 / k.powi(5);
    let half = 0.5 * (2.0 * l / (3.0 * kmax.powi(3)) - 2.0 / (4.0 * kmax.powi(4)));
    let (g, gw) = gauss_legendre_8();
    let (mut k, mut cosine) = (kmax, 0.0);
    let end = kmax * 1e3_f64.max(1e3 / (kmax * w)).min(1e6);
    while k < end {
        let h = (k / 8.0).min(1.0 / w);
        for i in 0..8 {
            let x = k + 0.5 * h * (g[i] + 1.0);
            cosine += 0.5 * h * gw[i] * (x * w).cos() * weight(x);
        }
        k += h;
    }
    4.0 * a / PI * (half - 0.5 * cosine)
}

/// Inductance per unit length of a coaxial line: solid inner conductor of
/// radius a, outer conductor b < r < c, uniform current in both:
/// mu0/(2 pi) [ ln(b/a) + 1/4 + c^4 ln(c/b)/(c^2 - b^2)^2 - (3c^2 - b^2)/(4(c^2 - b^2)) ]
/// (S. Ramo, J. R. Whinnery, T. Van Duzer, Fields and Waves in Communication
/// Electronics, 3rd ed., 1994, internal inductance of round conductors).
pub fn coax_inductance_per_length(a: f64, b: f64, c: f64) -> f64 {
    let d = c * c - b * b;
    MU0 / (2.0 * PI) * ((b / a).ln() + 0.25 + c.powi(4) * (c / b).ln() / (d * d) - (3.0 * c * c - b * b) / (4.0 * d))
}

/// Force per unit length (N/m) along +y on bar 2 from bar 1, both long bars
/// of width 2w magnetized along +y (remanence br): bar 1 centred at the
/// origin with height 2h1, bar 2 centred at (0, y2) with height 2h2. Charge
/// model: F = (Br/mu0) integral over x of [B1y(x, top of 2) - B1y(x, bottom of 2)],
/// integrated here by Gauss-Legendre (Furlani 2001 sec. 4.2 for B1).
pub fn bar_pair_force_2d(br: f64, w: f64, h1: f64, h2: f64, y2: f64) -> f64 {
    let (g, wt) = gauss_legendre_8();
    let n = 400;
    let mut f = 0.0;
    for i in 0..n {
        for k in 0..8 {
            let x = -w + 2.0 * w * (i as f64 + 0.5 * (g[k] + 1.0)) / n as f64;
            let dx = 2.0 * w / n as f64 * 0.5 * wt[k];
            let top = bar_field_2d(br, w, h1, x, y2 + h2)[1];
            let bottom = bar_field_2d(br, w, h1, x, y2 - h2)[1];
            f += br / MU0 * (top - bottom) * dx;
        }
    }
    f
}

/// Magnetometric demagnetizing factor of a cylinder (radius a, length l),
/// the volume-mean demagnetizing field over the magnetization, as defined by
/// D.-X. Chen, J. A. Brug and R. B. Goldfarb, IEEE Trans. Magn. 27(4), 1991;
/// computed here from the charge-model self-energy of the two end faces:
/// N = (2/l) integral of J1(k a)^2 (1 - e^{-k l}) / k^2 dk.
pub fn cylinder_demag_factor(a: f64, l: f64) -> f64 {
    let (g, w) = gauss_legendre_8();
    let kmax = 400.0 / a;
    let panels = 8000;
    let h = kmax / panels as f64;
    let mut s = 0.0;
    for p in 0..panels {
        for k in 0..8 {
            let kk = p as f64 * h + 0.5 * h * (g[k] + 1.0);
            let j = bessel_j1(kk * a);
            s += 0.5 * h * w[k] * j * j * (1.0 - (-kk * l).exp()) / (kk * kk);
        }
    }
    // Tail beyond kmax: J1^2 ~ 2/(pi k a) cos^2, mean 1/(pi k a); (1 - e^{-kl}) ~ 1.
    s += 1.0 / (PI * a) / (2.0 * kmax * kmax);
    2.0 / l * s
}

/// A smooth saturating test law, B(H) = mu0 H + (2 Js / pi) atan(pi (mu_r - 1) mu0 H / (2 Js)),
/// with initial relative permeability 2000 and polarization saturating at Js = 1.8 T (a test
/// law, not a material; in the arctangent family used e.g. by J. Fischer and H. Moser, 1956).
pub fn arctan_saturation_b(h: f64) -> f64 {
    let (js, mur) = (1.8, 2000.0);
    MU0 * h + 2.0 * js / PI * (PI * (mur - 1.0) * MU0 * h / (2.0 * js)).atan()
}

/// `arctan_saturation_b` as a B-H table: (0, 0) and 400 points log-spaced from 0.1 A/m to
/// 1e6 A/m (about 4 % apart: a monotone cubic through them stays within 1e-5 of the law in
/// H, 3.2e-6 measured in nonlinear.rs).
pub fn arctan_saturation_table() -> Vec<[f64; 2]> {
    let mut pts = vec![[0.0, 0.0]];
    for k in 0..400 {
        let h = 1e-1 * 10f64.powf(k as f64 * 7.0 / 399.0);
        pts.push([h, arctan_saturation_b(h)]);
    }
    pts
}

/// Flux per unit depth through a radial cut from r1 to r2 of an axially symmetric core of
/// law `b_of_h` around a straight conductor carrying `ni` ampere-turns: by Ampere's law
/// H = NI / (2 pi r) in the core whatever the material, so the flux is the integral of
/// B(H(r)) dr, here by 200 panels of 8-point Gauss-Legendre.
pub fn toroidal_core_flux(b_of_h: impl Fn(f64) -> f64, ni: f64, r1: f64, r2: f64) -> f64 {
    let (g, w) = gauss_legendre_8();
    let n = 200;
    let dr = (r2 - r1) / n as f64;
    (0..n)
        .flat_map(|i| (0..8).map(move |k| (i, k)))
        .map(|(i, k)| {
            let r = r1 + dr * (i as f64 + 0.5 * (g[k] + 1.0));
            0.5 * dr * w[k] * b_of_h(ni / (2.0 * PI * r))
        })
        .sum()
}

/// Axial force on a ring winding (current density j, +phi, section r0..r1 by z0..z1) beside a
/// uniformly magnetized cylinder (Br along +z, radius a, length l, centred at z = 0):
/// F_z = - integral of j B_r 2 pi r dA with B_r the magnet's field (`cylinder_field`, Derby and
/// Olbert 2010; the winding's self-field gives no net force), by 8 x 8 panels of 8 x 8-point
/// Gauss-Legendre over the section.
pub fn ring_winding_force(br: f64, a: f64, l: f64, j: f64, (r0, r1): (f64, f64), (z0, z1): (f64, f64)) -> f64 {
    let (g, w) = gauss_legendre_8();
    let (n, dr, dz) = (8, (r1 - r0) / 8.0, (z1 - z0) / 8.0);
    let mut f = 0.0;
    for ir in 0..n {
        for iz in 0..n {
            for (&gr, &wr) in g.iter().zip(&w) {
                for (&gz, &wz) in g.iter().zip(&w) {
                    let r = r0 + dr * (ir as f64 + 0.5 * (gr + 1.0));
                    let z = z0 + dz * (iz as f64 + 0.5 * (gz + 1.0));
                    f -= j * cylinder_field(br, a, l / 2.0, r, z)[0] * 2.0 * PI * r * 0.25 * dr * dz * wr * wz;
                }
            }
        }
    }
    f
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn elliptic_form_agrees_with_direct_quadrature() {
        for (rho, z) in [(0.3, 1.2), (1.5, 0.2), (2.0, 2.0), (0.0, 1.5)] {
            let e = cylinder_field(1.0, 1.0, 0.5, rho, z);
            let q = cylinder_field_by_quadrature(1.0, 1.0, 0.5, rho, z);
            assert!((e[0] - q[0]).abs() < 1e-6 && (e[1] - q[1]).abs() < 1e-6, "{rho} {z}: {e:?} vs {q:?}");
        }
    }

    #[test]
    fn axis_forms_agree() {
        let z = 1.3;
        let e = cylinder_field(1.0, 1.0, 0.5, 0.0, z);
        assert!((e[1] - cylinder_axis_bz(1.0, 1.0, 1.0, z + 0.5)).abs() < 1e-12);
    }

    #[test]
    fn the_touching_pull_continues_the_closing_gap() {
        // The gap-0 form (closed-form tail) continues the pulls at gaps of 1
        // and 2 micrometres: the last micrometre adds more than the one
        // before (the slope grows like -log(gap) at the faces' rims) but
        // not twice as much.
        let f = |gap: f64| coaxial_cylinders_force(1.2, 1.2, 0.01, 0.01, 0.005, 0.005, gap);
        let (f0, f1, f2) = (f(0.0), f(1e-6), f(2e-6));
        let (last, before) = (f0 - f1, f1 - f2);
        assert!(before > 0.0 && last > before && last < 2.0 * before, "{f0} {f1} {f2}");
    }

    #[test]
    fn the_asymptotic_bessel_form_joins_the_integral() {
        // Just past the switch, against the integral representation itself.
        let x: f64 = 25.5;
        let panels = 16 + (x as usize) * 2;
        let h = PI / panels as f64;
        let (g, w) = gauss_legendre_8();
        let mut s = 0.0;
        for p in 0..panels {
            for k in 0..8 {
                let t = p as f64 * h + 0.5 * h * (g[k] + 1.0);
                s += 0.5 * h * w[k] * (t - x * t.sin()).cos();
            }
        }
        assert!((bessel_j1(x) - s / PI).abs() < 1e-9, "{} {}", bessel_j1(x), s / PI);
    }

    #[test]
    fn bessel_j1_matches_tables() {
        // Abramowitz and Stegun, table 9.1: J1(1) = 0.4400505857, J1(5) = -0.3275791376.
        assert!((bessel_j1(1.0) - 0.440_050_585_7).abs() < 1e-9);
        assert!((bessel_j1(5.0) + 0.327_579_137_6).abs() < 1e-9);
    }

    #[test]
    fn a_thin_coil_is_nagaoka_s_current_sheet() {
        // Nagaoka's coefficient (Nagaoka 1909) for a sheet at the mean
        // radius, extrapolated to zero thickness from a hundredth and a
        // two-hundredth of the radius, for a short coil and a long one.
        // On the long one a winding t thick is lower by t / (3 a) to first
        // order: across it the field falls linearly to zero, storing a third
        // of the energy the sheet's would there (by hand, from B's profile).
        for (a, l, n) in [(0.02, 0.1, 100.0), (0.02, 2.0, 100.0)] {
            let coil = |t: f64| thick_coil_inductance(a - t / 2.0, a + t / 2.0, l, n);
            let sheet = nagaoka_inductance(a, l, n);
            let (t1, t2) = (a / 100.0, a / 200.0);
            let (l1, l2) = (coil(t1), coil(t2));
            let slope = (l1 - l2) / (t1 - t2) / sheet;
            let thin = l2 - slope * sheet * t2;
            assert!((thin / sheet - 1.0).abs() < 2e-5, "{l}: {thin} vs {sheet}");
            if l > 50.0 * a {
                assert!((slope * 3.0 * a + 1.0).abs() < 0.02, "{slope}");
            }
        }
    }
}
