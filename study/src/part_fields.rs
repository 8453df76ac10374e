//! The field in each part: peak and mean |B|, volume, and how much of it
//! runs past saturation (above the knee of its own B-H curve, or, for steel
//! taken as linear, above every library steel's knee), with the warnings.

use crate::materials::Material;
use crate::model::Model;
use crate::results::{PartResult, SATURATED_SHARE};
use solver::space::ElementKind;
use solver::Solution;
use std::collections::BTreeMap;

/// Relative permeability from which a linear material stands for steel or
/// iron (a real share of it above every library steel's knee is then
/// warned of): below it, plastics, stainless and powder-like fillers.
const LINEAR_STEEL_FROM: f64 = 100.0;

/// Each part's peak and mean |B|, its volume and its saturated shares, as
/// `part.NAME.*` values too; the shares are volume integrals over the
/// quadrature points, not the peak, which sits at a corner where the field
/// is singular and follows the mesh.
pub(crate) fn part_results(model: &Model, sol: &Solution, values: &mut BTreeMap<String, f64>) -> BTreeMap<String, PartResult> {
    let n = model.parts.len();
    let mut max = vec![0.0f64; n];
    let mut sum = vec![0.0; n];
    let mut vol = vec![0.0; n];
    let mut above = vec![0.0; n];
    let mut beyond = vec![0.0; n];
    // A linear stand-in for steel (mu_r from LINEAR_STEEL_FROM) is held
    // against the highest knee of the library's steels and irons.
    let linear_steel: Vec<bool> = model
        .parts
        .iter()
        .map(|p| matches!(p.material.material, Material::Linear { relative_permeability } if relative_permeability >= LINEAR_STEEL_FROM))
        .collect();
    let steel_knee = match linear_steel.contains(&true) {
        true => crate::materials::highest_soft_knee().1,
        false => f64::INFINITY,
    };
    let knees: Vec<Option<f64>> = model
        .parts
        .iter()
        .map(|p| match &p.material.material {
            Material::Soft { curve } => solver::BhCurve::new(curve).ok().map(|c| c.knee_b()),
            _ => None,
        })
        .collect();
    let els = &sol.elements;
    // Per element (in parallel): part, peak |B|, integral of |B|, volume,
    // volume above its curve's knee, volume of linear steel above every
    // library steel's knee.
    use rayon::prelude::*;
    let stats: Vec<(usize, f64, f64, f64, f64, f64)> = (0..els.n_physical)
        .into_par_iter()
        .filter_map(|e| {
            let ElementKind::Part(i) = els.kinds[e] else { return None };
            let mut st = (i, 0.0f64, 0.0, 0.0, 0.0, 0.0);
            solver::post::integrate::for_each_field_point(sol, e, |p| {
                let bm = p.b[0].hypot(p.b[1]);
                st.1 = st.1.max(bm);
                st.2 += bm * p.weight;
                st.3 += p.weight;
                if knees[i].is_some_and(|k| bm > k) {
                    st.4 += p.weight;
                }
                if linear_steel[i] && bm > steel_knee {
                    st.5 += p.weight;
                }
            });
            Some(st)
        })
        .collect();
    for (i, m, s_, v, ab, bey) in stats {
        max[i] = max[i].max(m);
        sum[i] += s_;
        vol[i] += v;
        above[i] += ab;
        beyond[i] += bey;
    }
    let mut out = BTreeMap::new();
    for (i, p) in model.parts.iter().enumerate() {
        let mean = if vol[i] > 0.0 { sum[i] / vol[i] } else { 0.0 };
        let knee = knees[i];
        let share = if vol[i] > 0.0 { above[i] / vol[i] } else { 0.0 };
        values.insert(format!("part.{}.b.max", p.name), max[i]);
        values.insert(format!("part.{}.b.mean", p.name), mean);
        // Its volume as meshed (the whole depth of a planar study): for a
        // cost or a fixed-volume design.
        let depth = if model.symmetry == mesher::Symmetry::Planar { model.depth } else { 1.0 };
        values.insert(format!("part.{}.volume", p.name), vol[i] * depth);
        if knee.is_some() {
            values.insert(format!("part.{}.saturated_share", p.name), share);
        }
        // Saturated when more than SATURATED_SHARE of the part runs above its knee
        // (the peak alone sits at a corner, where the field is singular).
        let saturated = knee.map(|_| share > SATURATED_SHARE);
        out.insert(
            p.name.clone(),
            PartResult {
                material: p.material.name.clone(),
                b_max: max[i],
                b_mean: mean,
                knee_t: knee,
                saturated_share: knee.map(|_| share),
                saturated,
                above_steel_knees_share: linear_steel[i].then(|| if vol[i] > 0.0 { beyond[i] / vol[i] } else { 0.0 }),
            },
        );
    }
    out
}

/// A part that saturates on its own curve, and steel taken as linear where
/// real steel would saturate.
pub(crate) fn saturation_warnings(model: &Model, parts: &BTreeMap<String, PartResult>) -> Vec<String> {
    let mut warnings = Vec::new();
    for (name, p) in parts {
        if p.saturated == Some(true) {
            warnings.push(format!(
                "part '{name}' ({}): {:.0} % of it runs above the knee of its B-H curve ({:.2} T): it saturates",
                p.material,
                100.0 * p.saturated_share.unwrap_or(0.0),
                p.knee_t.unwrap_or(0.0)
            ));
        }
    }
    for p in &model.parts {
        let share = parts.get(&p.name).and_then(|r| r.above_steel_knees_share);
        if let (Some(share), Material::Linear { relative_permeability }) = (share, &p.material.material) {
            if share > SATURATED_SHARE {
                let (steel, knee) = crate::materials::highest_soft_knee();
                warnings.push(format!(
                    "part '{}' ({}): linear (mu_r {relative_permeability}), so it never saturates here, yet {:.0} % of it carries more than {knee:.2} T, the highest knee of the library's steels and irons ({steel}'s): steel would saturate there, so the flux and forces through it are overstated; give its B-H curve ([materials] bh) or a library steel",
                    p.name,
                    p.material.name,
                    100.0 * share,
                ));
            }
        }
    }
    warnings
}

/// Parts whose B-H curve is more permeable than any soft material: most
/// often a steel's curve with H in kA/m (or oersted) read as A/m, which
/// makes the steel a thousand times too permeable and the pull too high,
/// with no other sign.
pub(crate) fn implausible_curve_warnings(model: &Model) -> Vec<String> {
    let mut seen = Vec::new();
    let mut warnings = Vec::new();
    for p in &model.parts {
        let Material::Soft { curve } = &p.material.material else { continue };
        let (mu, h) = crate::materials::largest_relative_permeability(curve);
        if mu > crate::materials::PLAUSIBLE_RELATIVE_PERMEABILITY && !seen.contains(&&p.material.name) {
            seen.push(&p.material.name);
            warnings.push(format!(
                "material '{}' (part '{}'): its B-H curve reaches a relative permeability of {mu:.2e} (B / (mu0 H) at H = {h} A/m), past the {:.0e} of the most permeable nickel-iron alloys: is H in kA/m or oersted rather than A/m (1 kA/m = 1000 A/m, 1 Oe = 79.6 A/m)?",
                p.material.name,
                p.name,
                crate::materials::PLAUSIBLE_RELATIVE_PERMEABILITY
            ));
        }
    }
    warnings
}
