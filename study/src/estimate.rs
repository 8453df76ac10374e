//! Error estimates and adaptive refinement (`[study] accuracy`).
//!
//! The study is solved on a sequence of nested meshes, each the previous
//! one with every triangle split into four (`Mesh::refined`). On nested
//! meshes a value converges regularly, so the change of a value from one
//! mesh to the next measures its discretization error (the idea behind
//! Richardson extrapolation; L. F. Richardson, Phil. Trans. R. Soc. A 210,
//! 1911):
//! - with two meshes, the error of the finer value is taken as the whole
//!   change |d|: exact for a value converging as
//!   h^1, three times the error at h^2 and fifteen times at h^4, so never an
//!   underestimate once the error at least halves per step;
//! - with three or more, when the last two changes have one sign, the
//!   observed ratio rho = |d_k| / |d_(k-1)| gives the geometric tail
//!   |d_k| rho / (1 - rho), doubled for safety; when the sign reversed (two
//!   error terms still compete, as at a probe near the open boundary's rim
//!   on coarse meshes) the estimate is twice the change; rho is kept
//!   within [rho_min, 0.9] (no faster than the a-priori rate of the value's
//!   kind, see `rho_min`, and a stalled value gets ten times its change),
//!   and an estimate never falls below what a rho_min decrease per step
//!   since the previous change leaves (a change that happens to pass
//!   through zero does not make a value look exact).
//!
//! Refinement continues until every value the case asks for (its probes,
//! forces, fluxes and expectations) has an estimated relative error below
//! the target and no expectation is undecided, or until the next mesh
//! would pass `max_elements`. The mesh is refined uniformly: the a-priori
//! grading at corners (see `lower::mesh_spec`) puts the fine elements where
//! the field is singular, and each step keeps it.

pub use crate::error_scale::{percent, scale, target_percent};
use crate::model::{Bound, Model};
use std::collections::BTreeMap;

/// Slowest: a value changing by more than 90 % of its last change is not
/// yet converging; its estimate is ten times its change.
const RHO_MAX: f64 = 0.9;
/// Safety factor on the geometric tail.
const SAFETY: f64 = 2.0;
/// No estimate claims less than this share of the value's scale: round-off
/// and the solver's stopping tolerances leave about this much even where
/// the discretization error vanishes (a round magnet's torque in a uniform
/// field came out 5.8e-10 off with a change between meshes of 1.9e-10).
const PRECISION: f64 = 1e-9;

/// Estimated absolute errors of the last mesh's values.
#[derive(Clone, Debug, Default)]
pub struct Estimate {
    /// By value name, SI units.
    pub errors: BTreeMap<String, f64>,
    /// The refinement record (None when accuracy is off).
    pub adaptive: Option<crate::results::Adaptive>,
    /// The last mesh's results as already computed for the estimate (so the
    /// finishing step does not post-process the largest mesh twice).
    pub results: Option<crate::results::Results>,
}

/// Whether a value is the field's extreme at a single point of a part: a
/// steel part's peak flux density and a magnet's margin at its worst
/// point. Both sit at corners, where the field is singular (B grows
/// without bound at a re-entrant steel corner, H logarithmically at a
/// magnet's), so they follow the mesh and have no limit to err from: they
/// carry no estimate (docs/case-format.md says so beside them). Measured
/// on a cup holding magnet at 0.1 %: the worst point's margin moved 1 to 5
/// % between two default-settings meshes and a 0.001 % solve, 2.4 to 34
/// times its two-mesh change (docs/measurement-log.md, thirteenth session).
pub fn is_local(name: &str) -> bool {
    (name.starts_with("part.") && name.ends_with(".b.max")) || (name.starts_with("magnet.") && name.ends_with(".margin_local"))
}

/// Whether a value is an integral over the field (energy, force, flux),
/// which converges twice as fast as a field at a point or a peak.
pub(crate) fn is_integral(name: &str) -> bool {
    ["energy", "coenergy", "force.", "flux.", "torque"].iter().any(|p| name.starts_with(p))
}

/// The fastest error decrease per refinement step that is trusted for a
/// value on elements of order p, when the step multiplied the unknowns by
/// `growth`: the a-priori rate in unknowns N, N^(-p/2) for a field at a
/// point (B is a derivative of the potential) and N^(-p) for an integral
/// (S. C. Brenner, L. R. Scott, The Mathematical Theory of Finite Element
/// Methods, 3rd ed., 2008, ch. 0 and 5; on adaptive meshes the same rates
/// in N are the best possible, R. Becker, R. Rannacher, Acta Numerica 10,
/// 2001). For a uniform step (N times 4) that is 2^-p and 4^-p. An
/// observed decrease faster than that is pre-asymptotic luck: P1 at 23.7
/// mm fell from 3.4e-4 to 3.2e-5 in one step and then by a third per
/// step, and trusting the first ratio (0.066) gave an estimate of 2.9e-6
/// for an error of 1.1e-5. A local step that adds few unknowns is thus
/// trusted to have reduced the error little, whatever the change shows.
fn rho_min(name: &str, order: u32, growth: f64) -> f64 {
    let p = order.max(1) as f64;
    let rate = if is_integral(name) { p } else { p / 2.0 };
    growth.max(1.0).powf(-rate)
}

/// Errors of the newest values from the last two changes.
pub(crate) struct History {
    order: u32,
    /// The relative accuracy asked for.
    target: f64,
    unknowns: usize,
    growth: f64,
    previous: BTreeMap<String, f64>,
    change: BTreeMap<String, f64>,
    /// The next update's change is an order step's (same mesh, order raised).
    raising: bool,
    /// The last change was an order step's: the next mesh step's estimate
    /// is its own change (the rate of an order step says nothing of a mesh step's).
    after_raise: bool,
    pub(crate) estimate: BTreeMap<String, f64>,
}

impl History {
    /// No meshes yet; elements of this order, relative accuracy `target` asked.
    pub(crate) fn new(order: u32, target: f64) -> History {
        History {
            order,
            target,
            unknowns: 0,
            growth: 4.0,
            previous: BTreeMap::new(),
            change: BTreeMap::new(),
            raising: false,
            after_raise: false,
            estimate: BTreeMap::new(),
        }
    }

    /// The next values come from the same mesh at element order `order`.
    pub(crate) fn raise_order(&mut self, order: u32) {
        self.order = order;
        self.raising = true;
    }

    /// The estimates for `values` (the finer mesh's, with `unknowns`) against
    /// the previous mesh's, each error floored at a share of the value's
    /// scale (`scale`, with the least scales `floors`).
    pub(crate) fn update(&mut self, values: &BTreeMap<String, f64>, floors: &BTreeMap<String, f64>, unknowns: usize) {
        // The floor below looks back over the previous step too.
        let growth = unknowns as f64 / self.unknowns.max(1) as f64;
        let previous_growth = std::mem::replace(&mut self.growth, growth);
        self.unknowns = unknowns;
        let mut change = BTreeMap::new();
        let mut estimate = BTreeMap::new();
        for (name, &v) in values.iter().filter(|(n, _)| !is_local(n)) {
            let Some(&p) = self.previous.get(name) else { continue };
            let d = v - p;
            // However small this change, the error cannot have fallen faster
            // than rho_min per step since the last one.
            // Kept below RHO_MAX: a step that added next to nothing trusts
            // no decrease, and its estimate is ten times its change.
            let rho_min = rho_min(name, self.order, growth).min(RHO_MAX);
            let rho_before = self::rho_min(name, self.order, previous_growth).min(RHO_MAX);
            // The error after the previous change d0 was at least d0 rho_before / (1 - rho_before),
            // and this step took at most the factor rho_min off it.
            let floor = |d0: f64| SAFETY * d0.abs() * rho_before * rho_min / (1.0 - rho_before);
            let e = match self.change.get(name).filter(|_| !self.after_raise) {
                // Changes of one sign: the asymptotic range, where the tail applies.
                Some(&d0) if d0 != 0.0 && d0.signum() == d.signum() => {
                    let rho = (d / d0).abs().clamp(rho_min, RHO_MAX);
                    (SAFETY * d.abs() * rho / (1.0 - rho)).max(floor(d0))
                }
                // A change that reverses the last one: two error terms still
                // compete, and the next change may be as large as this one.
                Some(&d0) => (SAFETY * d.abs()).max(floor(d0)),
                None => {
                    // Two meshes: the change itself, for every kind of value. It is at least the error of the finer value
                    // whenever the error at least halves per refinement, and at least half of
                    // it down to a decrease of a third. A field at a point once took twice its
                    // change: a probe near the open boundary's rim had an error of 1.1e-4
                    // against a change of 4e-5, from the rim's polygon against the Kelvin
                    // map's exact circle; with the rim's elements curved (solver::element_map)
                    // that error is gone, and twice the change made a round magnet's field
                    // estimate 38 times its error on curved elements (the two-mesh estimate
                    // can only be loose when the error falls much faster than h^2).
                    d.abs()
                }
            };
            change.insert(name.clone(), d);
            estimate.insert(name.clone(), e.max(PRECISION * scale(name, values, floors)));
        }
        pollution_floor(values, floors, &mut estimate, self.target);
        self.after_raise = std::mem::take(&mut self.raising);
        self.previous = values.clone();
        self.change = change;
        self.estimate = estimate;
    }
}

/// No value but the energy and coenergy themselves is claimed more
/// accurate than the square of the field's relative error in the energy
/// norm, up to a twentieth of the target. A force, a flux or a point far
/// from the sources is a functional of the field whose error is bounded by
/// the energy norms of the errors of the solution and of its dual problem
/// (R. Becker, R. Rannacher, Acta Numerica 10, 2001), so it errs as that
/// square times a constant, while its change between two meshes can pass
/// near zero by chance. Measured on P1 (a cylinder's axis field, 1 %
/// asked, a hand-set 3.2 mm mesh): at 47.4 mm a change of 1.6e-5 against
/// an error of 1.8e-4, with the energy norm at 1.1e-2 (floor 1.3e-4). On
/// a cup holding magnet pulling a 4 mm plate across 1 mm (0.1 % asked, two
/// meshes): a change of the pull of 3.0e-6 of it against an error of
/// 2.8e-5 (against a 0.0003 % solve), with the energy norm's square at
/// 1.9e-4 (floor 5e-5; docs/measurement-log.md, thirteenth session). The
/// constant is not known (on P1 at 0.001 % with quartic elements the
/// points were 15 times below the square), so the floor stops at a
/// twentieth of the target: it corrects claims far beyond what was asked,
/// never by itself asks for another mesh, and stays below the tenth of the
/// target under which an estimate need not be sharp. The energy and the
/// coenergy are the norm's own measure and keep their estimates, and a
/// part's volume is geometry, no functional of the field: it keeps its own
/// change (0 for straight sides, the arcs' convergence for curved ones;
/// floored, an optimizer's cost of volumes carried a field error it has
/// not).
///
/// A magnet's margin over the worst 1 % of its volume is a percentile of
/// its working points, no smooth functional: the points that make it
/// change with the mesh, and its error is not that square times a
/// constant. Against 0.001 % solves of the examples its difference came
/// out 0.07 to 80 times the square (margins near corners the most); its
/// change between meshes covered it but once: speaker-motor's margin, a
/// change under 5e-5 against a difference of 4.6e-4 (the reference's own
/// estimate 2.1e-4), with the square at 3.2e-4. For margins the floor is
/// the square itself, without the cap. (Uncapped for the shares past the
/// knee and saturated too, it made 19 estimates of shares loose, most of
/// them 0 on every mesh, and none more honest; docs/measurement-log.md,
/// thirteenth session.)
fn pollution_floor(values: &BTreeMap<String, f64>, floors: &BTreeMap<String, f64>, estimate: &mut BTreeMap<String, f64>, target: f64) {
    let Some(norm) = energy_norm(values, estimate) else { return };
    let square = norm * norm;
    for (name, e) in estimate.iter_mut().filter(|(n, _)| !NORM_MEASURES.contains(&n.as_str()) && !is_geometry(n)) {
        let floor = if is_percentile_margin(name) { square } else { square.min(0.05 * target) };
        *e = e.max(floor * scale(name, values, floors));
    }
}

/// Whether a value is the geometry's alone, whatever the field (`pollution_floor`).
fn is_geometry(name: &str) -> bool {
    name.starts_with("part.") && name.ends_with(".volume")
}

/// Whether a value is a magnet's margin over the worst 1 % of its volume (`pollution_floor`).
fn is_percentile_margin(name: &str) -> bool {
    name.starts_with("magnet.") && name.ends_with(".margin")
}

/// The values the energy norm is read from (`energy_norm`), in that order.
const NORM_MEASURES: [&str; 2] = ["coenergy", "energy"];

/// The global error in the energy norm, relative to the field's energy
/// norm, from the estimate of the coenergy (else the energy): the
/// Galerkin solution minimizes a functional whose value at the solution is
/// minus the coenergy, and on nested meshes the functional's error is half
/// the squared energy norm of the field's error (W_h - W = ||u - u_h||^2 /
/// 2, S. C. Brenner, L. R. Scott, The Mathematical Theory of Finite Element
/// Methods, 3rd ed., 2008, sec. 0.3 and 2.5; exact for a linear study, to
/// first order for a saturating one). So ||e|| / ||u|| = sqrt(e_W / |W|),
/// with ||u||^2 = 2 |W|.
pub(crate) fn energy_norm(values: &BTreeMap<String, f64>, errors: &BTreeMap<String, f64>) -> Option<f64> {
    NORM_MEASURES.iter().find_map(|name| {
        let (w, e) = (values.get(*name)?.abs(), *errors.get(*name)?);
        (w > 0.0 && e.is_finite()).then(|| (e / w).sqrt())
    })
}

/// The values that drive refinement: those asked for, else the energy
/// (else each part's mean |B|).
/// A force on parts that touch the outer boundary is left out: no surface
/// closes around them, it does not converge, and a warning already says so.
pub(crate) fn driving(model: &Model, results: &crate::results::Results) -> Vec<String> {
    let mut out: Vec<String> = results.asked.to_vec();
    out.extend(model.expects.iter().map(|e| e.value.name.clone()));
    for (name, f) in &results.forces {
        if f.unreliable {
            let prefix = format!("force.{name}.");
            out.retain(|v| !v.starts_with(&prefix));
        }
    }
    // Where the energy is unbounded (`net_current`) it is no value: each
    // part's mean field stands in for it.
    if out.is_empty() && results.values.contains_key("energy") {
        out.push("energy".into());
    } else if out.is_empty() {
        out.extend(results.values.keys().filter(|k| k.starts_with("part.") && k.ends_with(".b.mean")).cloned());
    }
    out.sort();
    out.dedup();
    out
}

/// The worst relative error among the driving values, and its name.
pub(crate) fn worst(names: &[String], values: &BTreeMap<String, f64>, floors: &BTreeMap<String, f64>, errors: &BTreeMap<String, f64>) -> (f64, String) {
    let mut w = (0.0, String::new());
    for n in names {
        let Some(&e) = errors.get(n) else { continue };
        let s = scale(n, values, floors);
        let rel = if s > 0.0 { e / s } else { 0.0 };
        if rel > w.0 || w.1.is_empty() {
            w = (rel, n.clone());
        }
    }
    w
}

/// Whether a bound holds for every, no, or some value within v +- e.
pub fn verdict(bound: &Bound, v: f64, e: f64) -> crate::results::Verdict {
    verdict_within(bound, v - e, v + e)
}

/// Whether a bound holds for every, no, or some value in [low, high] (an
/// end may be infinite). The bounds are intervals, so the ends decide,
/// except for a target interval that sits inside [low, high].
pub fn verdict_within(bound: &Bound, low: f64, high: f64) -> crate::results::Verdict {
    use crate::results::Verdict;
    let holds = |x: f64| match *bound {
        Bound::Min(lo) => x >= lo,
        Bound::Max(hi) => x <= hi,
        Bound::Between(lo, hi) => x >= lo && x <= hi,
        Bound::Near(t, tol) => (x - t).abs() <= tol,
    };
    let inside = match *bound {
        Bound::Between(lo, hi) => low <= lo && hi <= high,
        Bound::Near(t, tol) => low <= t - tol && t + tol <= high,
        _ => false,
    };
    match (holds(low), holds(high)) {
        (true, true) => Verdict::Pass,
        (false, false) if !inside => Verdict::Fail,
        _ => Verdict::Undecided,
    }
}

/// Whether some expectation is undecided at these values and errors.
pub(crate) fn undecided(model: &Model, values: &BTreeMap<String, f64>, errors: &BTreeMap<String, f64>) -> bool {
    model
        .expects
        .iter()
        .filter(|x| x.statistic.is_none())
        .any(|x| match (values.get(&x.value.name), errors.get(&x.value.name)) {
            (Some(&v), Some(&e)) => verdict(&x.bound, v, e) == crate::results::Verdict::Undecided,
            _ => false,
        })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::error_scale::map;
    use crate::results::Verdict;

    /// A sequence with error C h^p on halving meshes: the estimate after
    /// three meshes is within a factor two of the true error, from above,
    /// for p from 1 to 4 (the Richardson tail of a geometric sequence).
    #[test]
    fn estimates_of_geometric_sequences_are_within_two() {
        // An integral converges at up to h^4 on quadratic elements, a point field at up to h^2.
        for (name, rates) in [("energy", &[1.0, 1.5, 2.0, 3.0, 4.0][..]), ("probe.p.b", &[1.0, 1.5, 2.0][..])] {
            for &p in rates {
                let mut h = History::new(2, 1e-3);
                let exact = 3.0;
                for k in 0..5 {
                    let err = 0.1 * 0.5f64.powf(p * k as f64);
                    h.update(&map(&[(name, exact + err)]), &BTreeMap::new(), 4usize.pow(k as u32));
                    if k >= 1 {
                        let ratio = h.estimate[name] / err;
                        assert!(
                            (1.0..=if k == 1 { 16.0 } else { 2.01 }).contains(&ratio),
                            "{name} p {p} step {k}: ratio {ratio}"
                        );
                    }
                }
            }
        }
    }

    /// A force whose change between two meshes nearly vanishes is given
    /// the square of the energy norm's relative error, up to a twentieth of
    /// the target; the coenergy and a volume keep their own change.
    #[test]
    fn a_vanishing_change_of_a_force_is_floored_by_the_energy_norm() {
        for (w_change, floor) in [(1e-6, 1e-6), (1e-3, 0.05 * 1e-3)] {
            let mut h = History::new(2, 1e-3);
            h.update(
                &map(&[("coenergy", 1.0), ("force.f.z", -100.0), ("part.p.volume", 2e-6)]),
                &BTreeMap::new(),
                1000,
            );
            h.update(
                &map(&[("coenergy", 1.0 - w_change), ("force.f.z", -100.000_000_1), ("part.p.volume", 2e-6)]),
                &BTreeMap::new(),
                4000,
            );
            let want = floor * 100.0;
            assert!((h.estimate["force.f.z"] - want).abs() < 1e-5 * want, "{w_change}: {}", h.estimate["force.f.z"]);
            // Rounding only (1e-9 of it), where the floor gave 5e-5 of it.
            assert!(
                h.estimate["part.p.volume"] < 1e-8 * 2e-6,
                "a volume is geometry, not the field's: {}",
                h.estimate["part.p.volume"]
            );
            assert!((h.estimate["coenergy"] - w_change).abs() < 1e-12, "{w_change}: {}", h.estimate["coenergy"]);
        }
    }

    /// The peak at a single point has no estimate; a share is measured
    /// against the whole.
    #[test]
    fn local_peaks_carry_no_estimate_and_shares_scale_with_the_whole() {
        let mut h = History::new(2, 1e-3);
        let first = map(&[
            ("part.plate.b.max", 2.0),
            ("magnet.m.margin_local", 0.3),
            ("magnet.m.loss", 2e-7),
            ("probe.a.b.max", 0.2),
        ]);
        h.update(&first, &BTreeMap::new(), 1000);
        h.update(
            &map(&[
                ("part.plate.b.max", 2.1),
                ("magnet.m.margin_local", 0.31),
                ("magnet.m.loss", 3e-7),
                ("probe.a.b.max", 0.21),
            ]),
            &BTreeMap::new(),
            4000,
        );
        assert!(!h.estimate.contains_key("part.plate.b.max") && !h.estimate.contains_key("magnet.m.margin_local"));
        assert!(h.estimate.contains_key("probe.a.b.max"));
        assert_eq!(scale("magnet.m.loss", &first, &BTreeMap::new()), 1.0);
        assert_eq!(scale("magnet.m.margin", &map(&[("magnet.m.margin", -3.0)]), &BTreeMap::new()), 3.0);
    }

    /// A magnet's margin takes the energy norm's square as its floor
    /// beyond a twentieth of the target; a force stops there.
    #[test]
    fn margins_take_the_whole_square_as_their_floor() {
        let mut h = History::new(2, 1e-3);
        h.update(
            &map(&[("coenergy", 1.0), ("magnet.m.margin", 0.4), ("force.f.z", 10.0)]),
            &BTreeMap::new(),
            1000,
        );
        h.update(
            &map(&[("coenergy", 1.0 - 4e-4), ("magnet.m.margin", 0.4), ("force.f.z", 10.0)]),
            &BTreeMap::new(),
            4000,
        );
        let square = 4e-4 / (1.0 - 4e-4);
        assert!((h.estimate["magnet.m.margin"] - square).abs() < 1e-12, "{}", h.estimate["magnet.m.margin"]);
        assert!((h.estimate["force.f.z"] - 0.05 * 1e-3 * 10.0).abs() < 1e-12, "{}", h.estimate["force.f.z"]);
    }

    /// The verdict is decided only when the whole interval agrees.
    #[test]
    fn verdicts_within_the_error() {
        assert_eq!(verdict(&Bound::Min(10.0), 11.0, 0.5), Verdict::Pass);
        assert_eq!(verdict(&Bound::Min(10.0), 11.0, 2.0), Verdict::Undecided);
        assert_eq!(verdict(&Bound::Min(10.0), 8.0, 1.0), Verdict::Fail);
        assert_eq!(verdict(&Bound::Between(1.0, 2.0), 1.5, 0.2), Verdict::Pass);
        assert_eq!(verdict(&Bound::Between(1.0, 2.0), 1.5, 1.0), Verdict::Undecided);
        assert_eq!(verdict(&Bound::Near(5.0, 0.1), 6.0, 0.2), Verdict::Fail);
        assert_eq!(verdict(&Bound::Near(5.0, 0.1), 5.05, 0.1), Verdict::Undecided);
        assert_eq!(verdict(&Bound::Max(1.0), 0.5, 0.0), Verdict::Pass);
    }

    /// A component is measured against its vector's magnitude.
    #[test]
    fn components_scale_with_their_vector() {
        let v = map(&[("probe.p.bx", 1e-9), ("probe.p.b", 0.5), ("force.f.magnitude", 3.0), ("force.f.x", 0.0)]);
        assert_eq!(scale("probe.p.bx", &v, &BTreeMap::new()), 0.5);
        assert_eq!(scale("force.f.x", &v, &BTreeMap::new()), 3.0);
        assert_eq!(scale("energy", &map(&[("energy", -2.0)]), &BTreeMap::new()), 2.0);
        // A torque is no component of the force beside it.
        assert_eq!(
            scale(
                "force.f.torque",
                &map(&[("force.f.torque", 0.01), ("force.f.magnitude", 3.0)]),
                &BTreeMap::new()
            ),
            0.01
        );
    }
}
