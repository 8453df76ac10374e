//! From a model to a mesh spec and a solver problem. Errors name the model
//! item they come from ([`Origin`]), so the reader of the case can point at
//! its line.

use crate::materials::Material;
use crate::model::{FluxSpec, Model, Part, ProbeShape};
use mesher::{MeshError, MeshSpec, PartSpec, Refinement, Symmetry};
use solver::element::ElementOrder;
use solver::{BhCurve, Law, Problem};
use std::sync::Arc;

/// Element size at a part's corner as a share of the part's size: the
/// field is singular at corners of magnets and steel (B grows without bound
/// at a re-entrant steel corner), and a-priori grading there keeps the
/// convergence rate that uniform refinement then multiplies (I. Babuska,
/// B. Q. Guo, The h, p and h-p version of the finite element method, 1992).
const CORNER_SHARE: f64 = 0.25;
/// Turns sharper than this make a corner, degrees.
const CORNER_TURN_DEG: f64 = 10.0;
/// The mesh size at a point probe near a part, as a share of its distance to
/// the part (`point_probe_size`).
const PROBE_SHARE: f64 = 0.5;
/// The finest mesh size at a point probe, as a share of the study's.
const PROBE_FLOOR: f64 = 1.0 / 16.0;

/// The corners of the model's rectangles and polygons, where the field is
/// singular, each with its part: not those on the axis of an axisymmetric
/// study (a face meeting the axis is flat in 3D), not nearly straight
/// polygon vertices.
fn singular_corners(model: &Model) -> Vec<(&Part, [f64; 2])> {
    let axisymmetric = model.symmetry == Symmetry::Axisymmetric;
    let mut out = Vec::new();
    for (p, outline) in model.parts.iter().flat_map(|p| p.shape.corner_outlines().into_iter().map(move |o| (p, o))) {
        let n = outline.len();
        for i in 0..n {
            let (a, b, c) = (outline[(i + n - 1) % n], outline[i], outline[(i + 1) % n]);
            let u = [b[0] - a[0], b[1] - a[1]];
            let v = [c[0] - b[0], c[1] - b[1]];
            let turn = (u[0] * v[1] - u[1] * v[0]).atan2(u[0] * v[0] + u[1] * v[1]).abs().to_degrees();
            if turn < CORNER_TURN_DEG || (axisymmetric && b[0] <= 0.0) {
                continue;
            }
            out.push((p, b));
        }
    }
    out
}

/// The corners that want a finer mesh (`singular_corners`).
fn corner_refinements(model: &Model) -> Vec<Refinement> {
    singular_corners(model)
        .into_iter()
        .map(|(p, at)| Refinement::Point {
            at,
            size: CORNER_SHARE * p.mesh_size,
        })
        .collect()
}

/// A point this close to a singular corner (a share of the parts' extent)
/// sits on it: rounding of the case's units, not a distance meant.
const ON_CORNER: f64 = 1e-9;

/// The model's singular corners (`singular_corners`), to tell whether a
/// probe's point sits on one: the field there grows without bound as the
/// mesh refines, so it has no value to report.
pub(crate) struct SingularCorners<'m> {
    corners: Vec<(&'m Part, [f64; 2])>,
    tolerance: f64,
}

impl<'m> SingularCorners<'m> {
    pub(crate) fn of(model: &'m Model) -> SingularCorners<'m> {
        let (lo, hi) = model
            .parts
            .iter()
            .map(|p| p.shape.bounds())
            .fold(([f64::INFINITY; 2], [f64::NEG_INFINITY; 2]), |(lo, hi), (a, b)| {
                ([lo[0].min(a[0]), lo[1].min(a[1])], [hi[0].max(b[0]), hi[1].max(b[1])])
            });
        SingularCorners {
            corners: singular_corners(model),
            tolerance: ON_CORNER * (hi[0] - lo[0]).hypot(hi[1] - lo[1]),
        }
    }

    /// The part whose corner `at` sits on, if any.
    pub(crate) fn part_at(&self, at: [f64; 2]) -> Option<&'m Part> {
        self.corners
            .iter()
            .find(|(_, c)| (c[0] - at[0]).hypot(c[1] - at[1]) <= self.tolerance)
            .map(|(p, _)| *p)
    }
}

/// Refuses a point probe on a corner of a part: asked there, a pot
/// magnet's probe refined to 376 000 triangles and reported 2.4 T +- 4.9 T.
/// (A line probe's sample on a corner is left out instead: `post`.)
fn check_probe_off_corners(model: &Model, corners: &SingularCorners, i: usize, at: [f64; 2]) -> Result<(), StudyError> {
    match corners.part_at(at) {
        Some(p) => Err(StudyError::new(
            format!(
                "probe '{}' sits on a corner of part '{}', where the field is singular (it grows without bound as the mesh refines); move it off the corner, to the side you mean, by a small distance",
                model.probes[i].name, p.name
            ),
            Some(Origin::Probe(i)),
        )),
        None => Ok(()),
    }
}

/// The mesh size at a point probe: the study's, and finer where the probe
/// lies close to a part, so that the ball its field is extracted from
/// (`solver::post::extraction`, at most 0.9 of the distance to the nearest
/// part) spans a few elements there (two elements of the longest allowed
/// edge across the distance; distances are to the parts' bounding boxes,
/// never more than the distance to the parts themselves). Inside a box the
/// distance is to the nearest outline: a probe inside a magnet half a
/// millimetre below its corner, whose B is read in the element holding it,
/// kept the study's size and, on a mesher that keeps closer to it (tenth
/// session), converged erratically (estimates 0.28, 0.19, 0.031 % on four
/// meshes at 0.01 % asked; 0.024 and 0.004 % on three with this rule;
/// tests/tests/local_refinement.rs). A probe on an outline keeps the
/// study's size; none goes below `PROBE_FLOOR` of it.
fn point_probe_size(model: &Model, at: [f64; 2]) -> f64 {
    let box_distance = box_clearance(model, at);
    let clearance = if box_distance > 0.0 { box_distance } else { outline_clearance(model, at) };
    size_at_clearance(model, clearance)
}

/// The mesh size along a line probe: as at a point probe outside the
/// parts' boxes, for the segment's distance to the nearest box. Its values
/// are read in the elements holding them, and the field there varies on
/// the scale of that distance: a row of blocks with its line probe 3 mm
/// from the magnets' faces on a mesh of the study's 4 mm (a twentieth of
/// its 80 mm steel backing) took four meshes for the line's peak, and
/// 1.5 mm had to be set by hand; with this rule the line gets 1.5 mm by
/// itself and two meshes reach 0.1 % (docs/measurement-log.md, eleventh
/// session; tests/tests/default_settings.rs, the bar's line probe). A line
/// that touches or crosses a part's box keeps the study's size.
fn line_probe_size(model: &Model, from: [f64; 2], to: [f64; 2]) -> f64 {
    let clearance = model
        .parts
        .iter()
        .map(|p| segment_box_distance(p.shape.bounds(), from, to))
        .fold(f64::INFINITY, f64::min);
    size_at_clearance(model, clearance)
}

/// Distance from the segment a-b to the box (lo, hi): zero when it meets
/// the box, else the nearest of its ends to the box and of the box's
/// corners to it.
fn segment_box_distance((lo, hi): ([f64; 2], [f64; 2]), a: [f64; 2], b: [f64; 2]) -> f64 {
    use mesher::geometry::{point_segment_distance, segments_intersect};
    let corners = [lo, [hi[0], lo[1]], hi, [lo[0], hi[1]]];
    let crosses = (0..4).any(|i| segments_intersect(a, b, corners[i], corners[(i + 1) % 4]));
    if crosses {
        return 0.0;
    }
    let ends = point_box_distance((lo, hi), a).min(point_box_distance((lo, hi), b));
    corners.iter().map(|&q| point_segment_distance(q, a, b)).fold(ends, f64::min)
}

/// The mesh size at a probe `clearance` from the nearest part (zero on a
/// part's outline): two elements of the longest allowed edge across the
/// distance, never coarser than the study's size nor finer than
/// `PROBE_FLOOR` of it.
fn size_at_clearance(model: &Model, clearance: f64) -> f64 {
    if clearance > 0.0 && clearance.is_finite() {
        // Higher orders resolve the ball with fewer, larger elements.
        let order = f64::from(model.mesh.order.max(2)) / 2.0;
        model.mesh.size.min(PROBE_SHARE * order * clearance).max(PROBE_FLOOR * model.mesh.size)
    } else {
        model.mesh.size
    }
}

/// Distance from `at` to the nearest part outline, inside or outside it.
fn outline_clearance(model: &Model, at: [f64; 2]) -> f64 {
    use mesher::geometry::point_segment_distance;
    model
        .parts
        .iter()
        .map(|p| match &p.shape {
            mesher::Shape::Circle { center, radius } => ((at[0] - center[0]).hypot(at[1] - center[1]) - radius).abs(),
            shape => shape
                .corner_outlines()
                .iter()
                .flat_map(|o| (0..o.len()).map(move |i| point_segment_distance(at, o[i], o[(i + 1) % o.len()])))
                .fold(f64::INFINITY, f64::min),
        })
        .fold(f64::INFINITY, f64::min)
}

/// Distance from `at` to the nearest part's bounding box (zero inside or
/// on one): never more than the distance to the parts themselves.
pub(crate) fn box_clearance(model: &Model, at: [f64; 2]) -> f64 {
    model
        .parts
        .iter()
        .map(|p| point_box_distance(p.shape.bounds(), at))
        .fold(f64::INFINITY, f64::min)
}

/// Distance from `at` to the box (lo, hi), zero inside or on it.
fn point_box_distance((lo, hi): ([f64; 2], [f64; 2]), at: [f64; 2]) -> f64 {
    let dx = (lo[0] - at[0]).max(at[0] - hi[0]).max(0.0);
    let dy = (lo[1] - at[1]).max(at[1] - hi[1]).max(0.0);
    dx.hypot(dy)
}

/// The ends of the flux lines, where the flux is read from the potential.
fn flux_line_ends(model: &Model) -> impl Iterator<Item = [f64; 2]> + '_ {
    model.fluxes.iter().flat_map(|f| match f {
        FluxSpec::Line { from, to, .. } => vec![*from, *to],
        FluxSpec::Winding { .. } => Vec::new(),
    })
}

/// The mesh spec of a model: every part, every probe as a refinement, and
/// the parts' corners graded.
pub fn mesh_spec(model: &Model) -> MeshSpec {
    let mut refinements: Vec<Refinement> = model
        .probes
        .iter()
        .map(|p| match p.shape {
            ProbeShape::Point(at) => Refinement::Point {
                at,
                size: point_probe_size(model, at),
            },
            ProbeShape::Line { from, to, .. } => Refinement::Line {
                from,
                to,
                size: line_probe_size(model, from, to),
            },
        })
        .collect();
    refinements.extend(flux_line_ends(model).map(|at| Refinement::Enclose { at }));
    if model.accuracy.is_some() {
        refinements.extend(corner_refinements(model));
    }
    MeshSpec {
        symmetry: model.symmetry,
        parts: model
            .parts
            .iter()
            .map(|p| PartSpec {
                shape: p.shape.clone(),
                mesh_size: p.mesh_size,
            })
            .collect(),
        refinements,
        outer: model.boundary.clone(),
        min_angle_deg: model.mesh.min_angle,
        grading: model.mesh.grading,
        max_triangles: model.mesh.max_elements,
    }
}

/// The model item an error is about.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Origin {
    /// The part with this index.
    Part(usize),
    /// The probe with this index.
    Probe(usize),
}

/// Why a model cannot be meshed or solved as written: an input error.
#[derive(Clone, Debug, PartialEq)]
pub struct StudyError {
    /// What is wrong, naming the item.
    pub message: String,
    /// The item it is about, if one.
    pub origin: Option<Origin>,
    /// What to do about it, if there is advice.
    pub help: Option<String>,
}

impl StudyError {
    pub(crate) fn new(message: String, origin: Option<Origin>) -> StudyError {
        StudyError { message, origin, help: None }
    }
}

impl std::fmt::Display for StudyError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&self.message)
    }
}

/// A mesher error, with the part it names.
pub fn mesh_error(model: &Model, e: &MeshError) -> StudyError {
    let part = match e {
        MeshError::TooFewPoints { part, .. }
        | MeshError::RepeatedPoint { part, .. }
        | MeshError::SelfIntersection { part, .. }
        | MeshError::ZeroArea { part }
        | MeshError::HoleOutside { part, .. }
        | MeshError::AcrossAxis { part }
        | MeshError::NotFinite { part }
        | MeshError::BadSize { part, .. }
        | MeshError::OutOfRange { part, .. } => Some(*part),
        _ => None,
    };
    let mut msg = e.to_string();
    if let Some((i, p)) = part.and_then(|i| model.parts.get(i).map(|p| (i, p))) {
        msg = msg.replacen(&format!("part {i}"), &format!("part '{}'", p.name), 1);
    }
    let mut err = StudyError::new(msg, part.map(Origin::Part));
    err.help = matches!(e, MeshError::TooManyTriangles { .. }).then(|| "or pass --max-elements N on the command line".to_string());
    err
}

/// The solver's law for each part at the study temperature.
pub fn laws(model: &Model) -> Result<Vec<Law>, StudyError> {
    model
        .parts
        .iter()
        .enumerate()
        .map(|(i, p)| match &p.material.material {
            Material::Air | Material::Conductor => Ok(Law::air()),
            Material::Linear { relative_permeability } => Ok(Law::Linear {
                relative_permeability: *relative_permeability,
            }),
            Material::Soft { curve } => BhCurve::new(curve)
                .map(|c| Law::Saturating(Arc::new(c)))
                .map_err(|e| StudyError::new(format!("material '{}': {e}", p.material.name), Some(Origin::Part(i)))),
            Material::Magnet(g) => {
                let br = g.br_at(model.temperature);
                let d = p.magnetization.unwrap_or([0.0, 1.0]);
                Ok(Law::Magnet {
                    recoil_permeability: g.recoil_permeability,
                    br: [br * d[0], br * d[1]],
                    knee: g.knee_at(model.temperature),
                    table: g.intrinsic_at(model.temperature),
                })
            }
        })
        .collect()
}

/// The laws of radially magnetized parts' elements, appended to `laws`:
/// each element's remanence points from the centre through its centroid
/// (or towards the centre). None when no part is radial.
fn radial_laws(model: &Model, mesh: &mesher::Mesh, laws: &mut Vec<Law>) -> Option<Arc<[u32]>> {
    if model.parts.iter().all(|p| p.radial.is_none()) {
        return None;
    }
    let mut own = vec![solver::OWN_LAW_NONE; mesh.triangles.len()];
    for (t, region) in mesh.regions.iter().enumerate() {
        let mesher::Region::Part(i) = *region else { continue };
        let (
            Some(radial),
            Law::Magnet {
                recoil_permeability,
                br,
                knee,
                table,
            },
        ) = (model.parts[i].radial, &laws[i])
        else {
            continue;
        };
        let [a, b, c] = mesh.triangle_points(t);
        let centroid = [(a[0] + b[0] + c[0]) / 3.0, (a[1] + b[1] + c[1]) / 3.0];
        let size = br[0].hypot(br[1]);
        let dir = radial.direction_at(centroid);
        let law = Law::Magnet {
            recoil_permeability: *recoil_permeability,
            br: [size * dir[0], size * dir[1]],
            knee: *knee,
            table: table.clone(),
        };
        own[t] = laws.len() as u32;
        laws.push(law);
    }
    Some(own.into())
}

/// Current density of each part: ampere-turns over the meshed area with
/// round outlines curved (`Mesh::part_areas_curved`; every
/// part has area: `check_parts_visible` refuses a covered one first).
fn current_densities(model: &Model, mesh: &mesher::Mesh) -> Vec<f64> {
    let areas = mesh.part_areas_curved(model.parts.len());
    model.parts.iter().zip(areas).map(|(p, area)| p.current.map_or(0.0, |i| i / area)).collect()
}

/// A study without any source of field is refused: no magnet, no winding
/// current and no applied field give zero everywhere (such a case
/// "converged in 0 iterations" with all zeros).
pub fn check_sources(model: &Model) -> Result<(), StudyError> {
    let magnet = model.parts.iter().any(|p| matches!(p.material.material, Material::Magnet(_)));
    let current = model.parts.iter().any(|p| p.current.is_some_and(|i| i != 0.0));
    if magnet || current || model.applied_field != [0.0, 0.0] {
        return Ok(());
    }
    Err(StudyError::new(
        "the study has no source of field: no magnet, no winding current and no applied field, so every result would be zero; add a magnet, a current or study.applied_field".into(),
        None,
    ))
}

/// Parts that later parts cover wholly are refused: they would contribute
/// nothing and report zeros (a study whose only magnet was covered gave
/// zero results and exit 0).
pub fn check_parts_visible(model: &Model, mesh: &mesher::Mesh) -> Result<(), StudyError> {
    let areas = mesh.part_areas(model.parts.len());
    for (i, (p, area)) in model.parts.iter().zip(areas).enumerate() {
        if area <= 0.0 {
            let cover = model.parts[i + 1..].iter().map(|q| format!("'{}'", q.name)).collect::<Vec<_>>();
            return Err(StudyError::new(
                format!(
                    "part '{}' is wholly covered by later parts ({}), so nothing of it is meshed; where parts overlap the later one wins: move it, or list it after them",
                    p.name,
                    cover.join(", ")
                ),
                Some(Origin::Part(i)),
            ));
        }
    }
    Ok(())
}

/// The solver's problem for a model on its mesh.
pub fn problem<'m>(model: &Model, mesh: &'m mesher::Mesh) -> Result<Problem<'m>, StudyError> {
    check_parts_visible(model, mesh)?;
    let mut laws = laws(model)?;
    let element_law = radial_laws(model, mesh, &mut laws);
    let mut problem = Problem::new(mesh, laws, current_densities(model, mesh));
    problem.element_law = element_law;
    problem.applied_field = model.applied_field;
    problem.newton = model.newton;
    problem.order = element_order(model);
    Ok(problem)
}

/// The model's element order (quadratic where its degree has none).
pub fn element_order(model: &Model) -> ElementOrder {
    ElementOrder::of_degree(model.mesh.order).unwrap_or(ElementOrder::Quadratic)
}

/// Probes that the mesh cannot reach are input errors, found before solving.
pub fn check_probes_inside(model: &Model) -> Result<(), StudyError> {
    let box_bounds = model.boundary.given_box();
    let corners = SingularCorners::of(model);
    for (i, probe) in model.probes.iter().enumerate() {
        let pts = match probe.shape {
            ProbeShape::Point(p) => vec![p],
            ProbeShape::Line { from, to, .. } => vec![from, to],
        };
        let at = Some(Origin::Probe(i));
        if let ProbeShape::Point(p) = probe.shape {
            check_probe_off_corners(model, &corners, i, p)?;
        }
        if model.symmetry == Symmetry::Axisymmetric && pts.iter().any(|p| p[0] < 0.0) {
            return Err(StudyError::new(
                format!("probe '{}' has r < 0; axisymmetric points lie in r >= 0", probe.name),
                at,
            ));
        }
        if let Some(b) = box_bounds {
            if pts.iter().any(|&p| mesher::outside_box(b, p)) {
                return Err(StudyError::new(format!("probe '{}' lies outside the flux-parallel box", probe.name), at));
            }
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::segment_box_distance;

    /// A line probe's distance to a part's box: zero where it crosses the
    /// box between its ends (a sampled line of two points missed that), the
    /// nearest end or box corner otherwise.
    #[test]
    fn a_segment_is_as_far_from_a_box_as_its_nearest_point() {
        let unit = ([0.0, 0.0], [1.0, 1.0]);
        assert_eq!(segment_box_distance(unit, [-1.0, 0.5], [2.0, 0.5]), 0.0);
        assert_eq!(segment_box_distance(unit, [0.2, 0.2], [0.8, 0.8]), 0.0);
        assert!((segment_box_distance(unit, [-1.0, 3.0], [2.0, 3.0]) - 2.0).abs() < 1e-15);
        // Past a corner: the corner (1, 1) to the line x + y = 3 is sqrt(2)/2 away.
        assert!((segment_box_distance(unit, [3.0, 0.0], [0.0, 3.0]) - 0.5f64.sqrt()).abs() < 1e-12);
        assert!((segment_box_distance(unit, [3.0, 0.5], [4.0, 0.5]) - 2.0).abs() < 1e-15);
    }
}
