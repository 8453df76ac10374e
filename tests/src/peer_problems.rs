//! The two problems of the peer instrument (../shared/peer) as case text,
//! with their exact values: shared by the accuracy bench and the tests of
//! the order step.
//! - P1: a rigid cylinder (Br 1.26 T, R 9.525 mm, L 25.4 mm), B_z on its axis
//!   1, 5, 23.7 and 47.4 mm above its face (Derby and Olbert, Am. J. Phys.
//!   78, 2010);
//! - P2: two such cylinders, coaxial, magnetized alike, `gap` mm apart; the
//!   pull (charge model, Vokoun, Beleggia, Heller, Sittner, J. Magn. Magn.
//!   Mater. 321, 2009).

use crate::reference::{coaxial_cylinders_force, cylinder_axis_bz};

/// The rigid magnet material of both problems.
pub const RIGID: &str = "[materials.rigid]\nbr = \"1.26 T\"\nmur = 1\ndescription = \"rigid magnet\"\n";
/// No files but results.json.
pub const OUTPUT: &str = "[output]\nvtk = false\nplots = false\nreport = false\ncsv = false\n";
const R: f64 = 9.525e-3;
const L: f64 = 25.4e-3;

/// A case's text and the exact value of each checked result, by name.
pub type CaseWithExact = (String, Vec<(String, f64)>);

/// The `[study]` table of an axisymmetric case in mm at `accuracy`, the
/// material and the output table, then `extra` (a `[mesh]` table or nothing).
pub fn head(title: &str, accuracy: &str, extra: &str) -> String {
    format!("[study]\ntitle = \"{title}\"\ngeometry = \"axisymmetric\"\nunit = \"mm\"\naccuracy = \"{accuracy}\"\n{RIGID}{OUTPUT}{extra}")
}

/// P1 after `head`.
pub fn p1(head: &str) -> CaseWithExact {
    let mut text = head.to_string();
    text += "[[part]]\nname = \"magnet\"\nmaterial = \"rigid\"\nmagnetization = \"+z\"\nrect = { from = [0, 0], to = [9.525, 25.4] }\n";
    let mut exact = Vec::new();
    for (i, d) in [1.0, 5.0, 23.7, 47.4].iter().enumerate() {
        text += &format!("[[probe]]\nname = \"d{i}\"\npoint = [0, {}]\n", 25.4 + d);
        exact.push((format!("probe.d{i}.bz"), cylinder_axis_bz(1.26, R, L, L + d * 1e-3)));
    }
    (text, exact)
}

/// P2 at a gap of `gap` mm after `head`.
pub fn p2(head: &str, gap: f64) -> CaseWithExact {
    let mut text = head.to_string();
    text += "[[part]]\nname = \"lower\"\nmaterial = \"rigid\"\nmagnetization = \"+z\"\nrect = { from = [0, -25.4], to = [9.525, 0] }\n";
    text += &format!(
        "[[part]]\nname = \"upper\"\nmaterial = \"rigid\"\nmagnetization = \"+z\"\nrect = {{ from = [0, {gap}], to = [9.525, {}] }}\n",
        gap + 25.4
    );
    text += "[[force]]\nname = \"pull\"\nparts = [\"upper\"]\n";
    (
        text,
        vec![("force.pull.z".into(), -coaxial_cylinders_force(1.26, 1.26, R, R, L, L, gap * 1e-3))],
    )
}
