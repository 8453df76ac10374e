//! `[mesh]` and `[solver]`: mesh settings (defaults defined once, in
//! in the mesher's `spec` module) and the Newton-Raphson stopping rules.

use crate::case::diagnostic::Diagnostic;
use crate::case::document::{Fields, Item, Value};
use crate::case::quantity::Context;
use crate::case::units::Kind;
use mesher::{DEFAULT_GRADING, DEFAULT_MIN_ANGLE, GRADING_RANGE, MIN_ANGLE_RANGE};
use study::model::MeshSettings;

/// Default largest number of triangles: the mesher refuses a bigger first
/// mesh, and `[study] accuracy` stops refining before a bigger one (a
/// million quadratic triangles solve in 10 to 30 s on two cores; a thin
/// saturating plate went on to 1.4 million for its last 0.04 %).
pub const DEFAULT_MAX_ELEMENTS: usize = 1_000_000;

/// Keys of `[mesh]`.
pub const MESH: &[&str] = &["size", "min_angle", "grading", "max_elements", "order"];
/// Keys of `[solver]`.
pub const SOLVER: &[&str] = &[
    "residual_tolerance",
    "update_tolerance",
    "max_iterations",
    "reuse_factorization",
    "stiffen_tangent_above",
];

pub(super) fn mesh_settings(top: &Fields, ctx: &Context) -> Result<MeshSettings, Diagnostic> {
    let empty = Item {
        value: Value::Table(Vec::new()),
        span: 0..0,
    };
    let m = top.get("mesh").unwrap_or(&empty).table("[mesh]", MESH)?;
    let size = match m.get("size") {
        Some(s) => ctx.positive(s, Kind::Length, "mesh.size")?,
        // Set from the parts once they are resolved (`default_size`).
        None => ctx.length_unit,
    };
    let number = |key: &str, default: f64, lo: f64, hi: f64| bounded_number(&m, "mesh", key, default, lo, hi);
    Ok(MeshSettings {
        size,
        min_angle: number("min_angle", DEFAULT_MIN_ANGLE, MIN_ANGLE_RANGE.0, MIN_ANGLE_RANGE.1)?,
        grading: number("grading", DEFAULT_GRADING, GRADING_RANGE.0, GRADING_RANGE.1)?,
        max_elements: number("max_elements", DEFAULT_MAX_ELEMENTS as f64, 100.0, 1e9)? as usize,
        order: number("order", 2.0, 1.0, 4.0)?.round() as u32,
        pilot_meshes: 0,
    })
}

/// An optional number of a table, `default` when absent, else within [lo, hi].
fn bounded_number(table: &Fields, section: &str, key: &str, default: f64, lo: f64, hi: f64) -> Result<f64, Diagnostic> {
    let Some(v) = table.get(key) else { return Ok(default) };
    let x = v.number(&format!("{section}.{key}"))?;
    if !(lo..=hi).contains(&x) {
        return Err(Diagnostic::new(
            format!("{section}.{key} must lie between {lo} and {hi}, got {x}"),
            Some(v.span.clone()),
        ));
    }
    Ok(x)
}

/// The `[solver]` table: Newton-Raphson stopping rules and the step method.
pub(super) fn solver_settings(top: &Fields) -> Result<solver::NewtonSettings, Diagnostic> {
    let empty = Item {
        value: Value::Table(Vec::new()),
        span: 0..0,
    };
    let t = top.get("solver").unwrap_or(&empty).table("[solver]", SOLVER)?;
    let d = solver::NewtonSettings::default();
    let number = |key: &str, default: f64, lo: f64, hi: f64| bounded_number(&t, "solver", key, default, lo, hi);
    Ok(solver::NewtonSettings {
        residual_tolerance: number("residual_tolerance", d.residual_tolerance, 1e-14, 1e-2)?,
        update_tolerance: number("update_tolerance", d.update_tolerance, 1e-14, 1.0)?,
        max_iterations: number("max_iterations", d.max_iterations as f64, 1.0, 1000.0)?.round() as usize,
        stiffen_tangent_above: number("stiffen_tangent_above", d.stiffen_tangent_above, 1e-12, 10.0)?,
        reuse_factorization: t
            .get("reuse_factorization")
            .map(|v| v.bool("solver.reuse_factorization"))
            .transpose()?
            .unwrap_or(d.reuse_factorization),
    })
}

/// How much the default size is scaled for the first of the nested meshes
/// that `[study] accuracy` refines: for targets looser than 0.1 %,
/// (target / 0.1 %)^(1/2), at most 4; for tighter ones
/// (target / 0.01 %)^(1/2) within [1/4, 1]. The first two meshes are always
/// solved, so a looser target starts coarser and a tighter one finer (a
/// step of four times the triangles saved). Above 0.1 % the step follows
/// the slowest regular convergence, h^2 (a field at a point on quadratic
/// elements, or a force held back by the parts' singular corners: P2's
/// two-mesh estimates at 1 % were 1.6 to 3.7 times its true errors), so the
/// first estimate lands at the same share of any looser target: with the
/// fourth root P2 at 1 % came out at 0.01 to 0.04 % in 0.28 s for its
/// three gaps, with the square root at 0.003 to 0.04 % (estimates 0.02 to
/// 0.18 %) in 0.18 to 0.23 s (docs/measurement-log.md). Below 0.1 %, where
/// elements are quartic, the same square root holds from 0.001 % (the size
/// measured there; a start twice as coarse took a third mesh; quartic
/// elements now take the power `QUARTIC_TIGHT_POWER` there) up to 0.01 %,
/// and no coarser above: with the fourth root P2 at 0.01 % came out at
/// 1e-7 to 5e-7 under estimates of 2e-7 to 2.5e-6, 40 times below the
/// target, in 1.9 s; from the square root's 1.78 times coarser start at
/// 2.5e-6 to 5.9e-6 under 7.7e-6 to 1.9e-5 in 1.1 s (1.5 times as coarse
/// again, one gap took a third mesh).
///
/// A case on quadratic elements that asks for integrals only (forces,
/// torques, fluxes, the energy: no probe and no expectation) starts twice
/// as coarse: integrals err as h^4 there, so the first estimate still
/// lands below the target (P2's pulls at 1 % came out at 0.014 % from the
/// point-field sizing; its three gaps took 0.73 s, 0.35 s twice as coarse;
/// for quartic elements, already four times coarser, a third mesh
/// followed and P2 at 0.001 % took 4.9 s against 3.2 s). One that also
/// asks for point probes, whose field is extracted from a ball around them,
/// starts sqrt(2) times as coarse: their field converges as an integral's
/// where the ball is as wide as the room around the probe allows, but
/// only as h^2 (with a far smaller constant than the element's) where it is
/// a few elements wide; twice as coarse, a round magnet's field at default
/// settings came out 33 times closer than its estimate, against the
/// estimate's promise of at most 20 (docs/measurement-log.md).
///
/// On quartic elements the square root of the tight branch goes on up to
/// `QUARTIC_LOOSEST`, reached at 0.05 % (errors there fall as h^4 at
/// least), until the loose branch passes it at 0.5 %.
pub fn first_mesh_scale(target: f64, asked: Asked, order: u32) -> f64 {
    let kind = match asked {
        Asked::Integrals => 2.0,
        Asked::Extracted => std::f64::consts::SQRT_2,
        Asked::Points => 1.0,
    };
    let ratio = target / 1e-3;
    let by_target = if ratio > 1.0 {
        ratio.sqrt().min(4.0)
    } else {
        (10.0 * ratio).sqrt().clamp(0.25, 1.0)
    };
    let quartic = (10.0 * ratio)
        .powf(if ratio < 0.1 { QUARTIC_TIGHT_POWER } else { 0.5 })
        .clamp(0.25, QUARTIC_LOOSEST);
    kind * match order {
        4.. if ratio < 0.1 => quartic,
        4.. => by_target.max(quartic),
        _ => by_target,
    }
}

/// On quartic elements below 0.01 %, the first mesh shrinks as the target's
/// power 0.6 (0.25 times the 0.01 % one at 0.001 %). With the square root
/// (0.32 times) P2's pull at a 1 mm gap at 0.001 % took a third mesh once
/// the mesher kept to the asked size in the air (tenth session: 0.43 s
/// against 0.17 s; its three gaps 0.68 s against 0.48 s in all, every
/// estimate honest; docs/measurement-log.md).
const QUARTIC_TIGHT_POWER: f64 = 0.6;

/// The coarsest first mesh on quartic elements, as a multiple of the one
/// for 0.01 %: with the order step a linear, ideal study at 0.1 % started
/// on its 0.01 % mesh reached P2's pulls at 1e-5 to 2.5e-5 in 0.32 s; 3.16
/// times as coarse, at 1.4e-4 to 3.9e-4 under estimates of 2.6e-4 to
/// 6.5e-4 in 0.18 to 0.22 s, but two magnets' torques about a far point,
/// each within its estimate, then missed cancelling by 1.05e-3 of the
/// torque (their estimates 1.8e-3 together): a check of the validation
/// table past 0.1 %. At sqrt(5) they cancel to 6.4e-4 and P2 took 0.24 s
/// against 0.35 s (P1's probe and corner sizes set its mesh either way;
/// docs/measurement-log.md).
const QUARTIC_LOOSEST: f64 = 2.236_067_977_499_79;

/// What a case asks for, as the first mesh's size goes (`first_mesh_scale`).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Asked {
    /// Forces, torques, fluxes, energies only.
    Integrals,
    /// Those and point probes, with expectations on point probes only.
    Extracted,
    /// Anything else (line probes, peaks, working points).
    Points,
}

/// The element order a linear, ideal study takes when the case gives
/// neither `[mesh] order` nor `size` (`study::run::order_step_is_trusted_unmeshed`):
/// quartic, its first estimate from the cubic solve on the same mesh (the
/// order step). P1 and P2 (a cylinder's axis field, the pull of two
/// cylinders) at 1 % took 0.043 and 0.139 s against 0.096 and 0.205 s
/// on quadratic elements, at 0.1 % 0.055 and 0.21 s against 0.155 and
/// 0.44 s, the estimates as honest (docs/measurement-log.md).
pub const ORDER_STEP_ORDER: u32 = 4;

/// The element order when `[mesh] order` is not given: quadratic down to
/// the default 0.1 %, quartic for tighter targets. On P1 and P2 (a
/// cylinder's axis field, the pull of two cylinders) quartic elements
/// reached 0.01 % in 0.3 s and 1.0 s where quadratic ones took 4.7 s and
/// 0.9 s; at 0.1 % quadratic elements were as fast on forces and the
/// saturating examples (docs/measurement-log.md).
pub fn default_order(accuracy: Option<f64>) -> u32 {
    match accuracy {
        Some(t) if t < 0.999e-3 => 4,
        _ => 2,
    }
}

/// How much coarser the first mesh is for elements of order p than for
/// quadratic ones when `[mesh] size` is not given: the same for p = 3,
/// whose first estimate compares with a quadratic solve on that mesh (the
/// order step, `study::run::ORDER_STEP_FROM`), so the quadratic solve has
/// to meet the target there; for p = 4 four times the element size (P1
/// and P2 at 0.01 % took 0.3 s and 1.9 s with it, 2.2 s and 1.9 s at half,
/// by mesh steps; with the order step from cubic on it 0.08 s and 0.33 s,
/// the cubic solve meeting 0.01 % by a factor 2 to 4 on P2's pulls). The
/// size is chosen before the study knows whether it may take the order
/// step (`study::run::order_step_is_trusted` needs the mesh), so a cubic
/// case that takes mesh steps instead (steel, a knee, a line probe) starts
/// on the quadratic size too, twice as fine as before the order step
/// (integrals-only cases, twice as coarse for the kind, are unchanged).
pub fn order_scale(order: u32) -> f64 {
    match order {
        3 => 1.0,
        4 => 4.0,
        _ => 1.0,
    }
}

/// The growth of the element size away from parts, sources and corners
/// (`[mesh] grading`) when the case does not give it and accuracy is on:
/// quartic elements follow a smooth field over longer elements, so their
/// mesh may coarsen faster away from where the field varies sharply.
/// Measured on P1 and P2 (a cylinder's axis field, the pull of two
/// cylinders; docs/measurement-log.md): at 1.45, P1 and P2 at 0.01 % in
/// 0.073 and 0.26 s against 0.096 and 0.35 s at 1.3, at 0.001 % in 0.15
/// and 0.61 s against 0.19 and 0.91 s, every estimate as honest. Steeper
/// was faster still (2.0: P1 at 0.001 % in 0.12 s) but the order step's
/// estimate of a far point (23.7 mm above the magnet) came out 68 times
/// its true error at 0.001 %, above a tenth of the target: the cubic solve
/// it compares with falls behind the quartic one on long elements.
/// Other orders keep the default (cubic at 1.6 left P1's estimates as
/// loose as at 1.3; quadratic at 1.45 and 1.6 was no faster beyond the
/// machine's noise).
pub fn adaptive_grading(order: u32) -> f64 {
    match order {
        4 => 1.45,
        _ => DEFAULT_GRADING,
    }
}

/// Meshes solved before the first that enters an error estimate, for a
/// hand-set `[mesh] size` of `given` where the default first mesh would
/// have `default_first`: one per halving that brings it within twice the
/// default. On P1 (a cylinder's axis field, 1 % asked) a hand-set 9 mm,
/// four times the default, stopped after two meshes with errors of 1.1 %
/// and 0.17 % under estimates of 0.14 % and 0.0055 %: the values had
/// barely moved on the first step. From 4.5 mm every estimate held.
pub fn pilot_meshes(given: f64, default_first: f64) -> u32 {
    let halvings = (given / (2.0 * default_first)).log2().ceil();
    if halvings.is_finite() {
        halvings.clamp(0.0, 4.0) as u32
    } else {
        0
    }
}

/// A twentieth of the largest body's extent when `[mesh] size` is not
/// given, measured on the parts as resolved (placed, copied by an array,
/// read from a drawing: a part drawn in a DXF file used to count for
/// nothing). A body is one `[[part]]` table: a part, or all the copies of
/// an array together (`bodies` holds each table's parts). An array is one
/// assembly drawn once: the eight-block Halbach row started on a twentieth
/// of one block, 0.5 mm, and reached 0.1 % on 55 590 and 222 360 triangles
/// with its asked values' estimates 1e-5 to 3e-6; on the row's 4 mm, on
/// 8 288 and 33 152, the largest 1e-4, every one of its 62 estimates
/// within twice its difference from a 0.001 % solve where that solve's
/// own error could tell (`cargo bench -p validation --bench honesty`;
/// docs/measurement-log.md, thirteenth session). Its line probe's peak
/// once kept it on three meshes from 4 mm; extracted from balls, it
/// converges as the points do.
/// Parts whose boxes touch were tried as one body (a plunger in its
/// frame): the plunger sweep then started on 2.5 mm and took a third mesh
/// at 0.1 % (docs/measurement-log.md, eleventh session).
pub(super) fn default_size(bodies: &[&[study::model::Part]], length_unit: f64) -> f64 {
    let extent = bodies.iter().map(|b| body_extent(b)).filter(|e| e.is_finite()).fold(0.0, f64::max);
    if extent > 0.0 {
        extent / 20.0
    } else {
        length_unit
    }
}

/// The larger side of the box around all the parts of a body.
fn body_extent(parts: &[study::model::Part]) -> f64 {
    let (mut lo, mut hi) = ([f64::INFINITY; 2], [f64::NEG_INFINITY; 2]);
    for p in parts {
        let (a, b) = p.shape.bounds();
        for k in 0..2 {
            lo[k] = lo[k].min(a[k]);
            hi[k] = hi[k].max(b[k]);
        }
    }
    (hi[0] - lo[0]).max(hi[1] - lo[1])
}

/// The default mesh size of a part: the study's, but never more than the
/// part's own extent. The study's size follows the largest part, and on
/// quartic elements it is about as wide as that part; a small magnet above
/// a large plate (5 mm against 200 mm) then lay in elements of 89 mm, its
/// corners' 22 mm: the pull's first changes between meshes were
/// pre-asymptotic and its estimate came out 13.6 times below its error
/// (1.3e-4 against 9e-6). At 5 mm, one element across, the first order
/// step gave 8.3e-5 under an estimate of 1.5e-4 (docs/measurement-log.md,
/// eleventh session). A part at least as large as the size is unchanged.
pub(super) fn part_size(size: f64, shape: &mesher::Shape) -> f64 {
    let extent = extent(shape);
    if extent > 0.0 && extent.is_finite() {
        size.min(extent)
    } else {
        size
    }
}

/// The larger side of a shape's bounding box.
fn extent(shape: &mesher::Shape) -> f64 {
    let (lo, hi) = shape.bounds();
    (hi[0] - lo[0]).max(hi[1] - lo[1])
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A looser target never starts on a finer first mesh, the scale stays
    /// within [1/4, 4] of its kind's, and it has no jump at the default
    /// 0.1 % where the two branches meet.
    #[test]
    fn the_first_mesh_coarsens_steadily_with_the_target() {
        for (asked, order) in [Asked::Integrals, Asked::Extracted, Asked::Points].into_iter().flat_map(|a| [(a, 2), (a, 4)]) {
            let kind = first_mesh_scale(1e-3, asked, 2);
            let mut last = 0.0;
            for k in 0..=80 {
                let target = 10f64.powf(-7.0 + 0.08 * f64::from(k));
                let s = first_mesh_scale(target, asked, order);
                assert!(s >= last, "{asked:?} order {order}: {s} at {target:e} below {last}");
                assert!((0.25 * kind..=4.0 * kind).contains(&s), "{asked:?} order {order}: {s} at {target:e}");
                last = s;
            }
            let (below, above) = (first_mesh_scale(0.999_999e-3, asked, order), first_mesh_scale(1.000_001e-3, asked, order));
            assert!((above - below).abs() < 1e-5 * kind, "{asked:?} order {order}: {below} | {above}");
        }
    }
}
