//! The resolved study: names turned into indices, quantities in SI units.

use crate::materials::Entry;
use crate::quantity::ValueName;
use mesher::{OuterBoundary, Shape, Symmetry};
use std::collections::BTreeMap;

/// One study, ready to mesh and solve.
#[derive(Clone, Debug)]
pub struct Model {
    /// Title, for reports.
    pub title: String,
    /// Planar or axisymmetric.
    pub symmetry: Symmetry,
    /// Name and SI factor of the study's length unit.
    pub length_unit: (String, f64),
    /// Planar out-of-plane length, m (1 for axisymmetric studies).
    pub depth: f64,
    /// Whether a planar study's depth was given (else results are per metre).
    pub depth_given: bool,
    /// Magnet temperature, degC.
    pub temperature: f64,
    /// How the outside is closed.
    pub boundary: OuterBoundary,
    /// Uniform applied flux density, T.
    pub applied_field: [f64; 2],
    /// Mesh settings.
    pub mesh: MeshSettings,
    /// The parts, later ones covering earlier ones.
    pub parts: Vec<Part>,
    /// Field probes.
    pub probes: Vec<Probe>,
    /// Forces asked for.
    pub forces: Vec<ForceSpec>,
    /// Fluxes and windings asked for.
    pub fluxes: Vec<FluxSpec>,
    /// Expectations on typed values.
    pub expects: Vec<Expect>,
    /// Which output files to write.
    pub output: OutputFlags,
    /// Newton-Raphson stopping rules and step method (`[solver]`).
    pub newton: solver::NewtonSettings,
    /// Flux density below which the axis "reach" ends, T.
    pub reach_level: f64,
    /// The point the reach is measured from (m); None: the centre of the
    /// box around every part.
    pub reach_from: Option<[f64; 2]>,
    /// Whether the stray field's values are made (the reach along the
    /// axis, the dipole moment, the implant distances and the air-transport
    /// screen): a search's evaluation whose objective and constraints read
    /// none of them leaves them out (on cheapest-holding-magnet their rays
    /// and extractions were a fifth of each evaluation). They drive no
    /// refinement, so the other values are the same either way.
    pub stray_field: bool,
    /// Parameter values of this variant.
    pub params: BTreeMap<String, f64>,
    /// Design-check failures that `check` lets pass (`"demagnetization"`).
    pub allow: Vec<String>,
    /// Relative error every asked value is refined to (`[study] accuracy`);
    /// None keeps the mesh as given and estimates nothing.
    pub accuracy: Option<f64>,
    /// An earlier state the magnets went through (`[study] exposure`).
    pub exposure: Option<Exposure>,
    /// How the modelled section stands for the whole assembly, when forces
    /// and energies are to be reported for the whole (`[study] scale_to_whole`).
    pub whole: Option<WholeAssembly>,
}

/// The whole assembly as copies of the modelled section: mirrored on its
/// symmetry planes, repeated over its periodic cells.
#[derive(Clone, Debug, PartialEq)]
pub struct WholeAssembly {
    /// Forces, torques and energies of the whole over those of the section:
    /// 2 per symmetry plane, times the number of cells.
    pub factor: f64,
    /// The symmetry planes: (the axis normal to the plane, 0 for x or r and
    /// 1 for y or z; the plane's coordinate on that axis). The whole's force
    /// has no component along that axis.
    pub mirrors: Vec<(usize, f64)>,
}

/// An exposure: the magnets are solved first at this temperature and
/// applied field, and every magnet element keeps the lowest point it
/// reached (it recoils from there in the study itself).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Exposure {
    /// Magnet temperature during the exposure, degC.
    pub temperature: f64,
    /// Uniform applied flux density during the exposure, T.
    pub applied_field: [f64; 2],
}

/// How the mesh is made.
#[derive(Clone, Debug)]
pub struct MeshSettings {
    /// Default target edge length in and near parts, m.
    pub size: f64,
    /// Smallest triangle angle, degrees.
    pub min_angle: f64,
    /// Size growth per element away from parts.
    pub grading: f64,
    /// Most triangles allowed.
    pub max_elements: usize,
    /// 1 (linear) or 2 (quadratic) triangles.
    pub order: u32,
    /// Meshes refined before any enters an error estimate: a hand-set
    /// first mesh far coarser than the default one is not yet in the
    /// range where a value's change between meshes measures its error.
    pub pilot_meshes: u32,
}

/// One part: outline, material, magnetization, current.
#[derive(Clone, Debug)]
pub struct Part {
    /// Its unique name.
    pub name: String,
    /// Its material entry.
    pub material: Entry,
    /// Its outline, m.
    pub shape: Shape,
    /// Target edge length in and near it, m.
    pub mesh_size: f64,
    /// Unit vector of magnetization (magnets only); for a radial magnet,
    /// its direction at the part's first outline point.
    pub magnetization: Option<[f64; 2]>,
    /// A planar magnet magnetized radially about a centre (a ring's
    /// magnetization pointing away from or towards it everywhere).
    pub radial: Option<Radial>,
    /// Ampere-turns through the cross-section, A.
    pub current: Option<f64>,
    /// The winding's wire, for its resistance, power and temperature rise.
    pub winding: Option<Winding>,
}

impl Part {
    /// Whether the part neither makes nor guides flux: no current, and air,
    /// an unwound conductor or a material of mu_r 1 (a plastic spacer). It
    /// feels no magnetic force and shapes no field.
    pub fn is_inert(&self) -> bool {
        use crate::materials::Material;
        self.current.is_none()
            && match self.material.material {
                Material::Air | Material::Conductor => true,
                Material::Linear { relative_permeability } => relative_permeability == 1.0,
                _ => false,
            }
    }
}

/// Radial magnetization about a centre, planar (about the axis, `+r` and
/// `-r` are radial already).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Radial {
    /// The centre, m.
    pub center: [f64; 2],
    /// Away from the centre (true) or towards it.
    pub outward: bool,
}

impl Radial {
    /// The magnetization's unit direction at a point.
    pub fn direction_at(&self, p: [f64; 2]) -> [f64; 2] {
        let (dx, dy) = (p[0] - self.center[0], p[1] - self.center[1]);
        let r = dx.hypot(dy);
        let sign = if self.outward { 1.0 } else { -1.0 };
        if r > 0.0 {
            [sign * dx / r, sign * dy / r]
        } else {
            [0.0, sign]
        }
    }
}

/// A winding's turns and wire, given on a part that carries a current.
#[derive(Clone, Debug, PartialEq)]
pub struct Winding {
    /// Number of turns in the part.
    pub turns: f64,
    /// Copper cross-section of one wire, m2 (from the wire size, or from a
    /// fill factor and the part's area).
    pub wire_area: f64,
    /// Mean length of one turn, m: None about the axis (2 pi times the
    /// part's centroid radius); given for a planar coil side.
    pub turn_length: Option<f64>,
    /// Copper temperature for the resistance, degC.
    pub temperature: f64,
}

/// Where a probe samples the field.
#[derive(Clone, Debug)]
pub enum ProbeShape {
    /// One point, m.
    Point([f64; 2]),
    /// Evenly spaced points on a segment.
    Line {
        /// first point, m
        from: [f64; 2],
        /// last point, m
        to: [f64; 2],
        /// number of points
        points: usize,
    },
}

/// A named field probe.
#[derive(Clone, Debug)]
pub struct Probe {
    /// Its unique name.
    pub name: String,
    /// Where it samples.
    pub shape: ProbeShape,
}

/// A force (and planar torque) on a set of parts.
#[derive(Clone, Debug)]
pub struct ForceSpec {
    /// Its unique name.
    pub name: String,
    /// The parts of the set, by index.
    pub parts: Vec<usize>,
    /// Point the torque is taken about, m.
    pub torque_about: [f64; 2],
}

/// A flux to report.
#[derive(Clone, Debug)]
pub enum FluxSpec {
    /// Flux across a line.
    Line {
        /// Its unique name.
        name: String,
        /// One end, m.
        from: [f64; 2],
        /// The other end, m.
        to: [f64; 2],
    },
    /// Parts with the sign of their current, and the turn count.
    Winding {
        /// Its unique name.
        name: String,
        /// The parts (index) and the sign of the turns in each.
        parts: Vec<(usize, f64)>,
        /// Number of turns.
        turns: f64,
    },
}

impl FluxSpec {
    /// Its name.
    pub fn name(&self) -> &str {
        match self {
            FluxSpec::Line { name, .. } | FluxSpec::Winding { name, .. } => name,
        }
    }
}

/// A bound on a value, in SI units.
#[derive(Clone, Debug, PartialEq)]
pub enum Bound {
    /// At least this.
    Min(f64),
    /// At most this.
    Max(f64),
    /// Between these, both included.
    Between(f64, f64),
    /// Target and absolute tolerance.
    Near(f64, f64),
}

/// A statistic of a value over a tolerance study's samples, which an
/// expectation may bound in place of the nominal value.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Statistic {
    /// The smallest value over the samples.
    Min,
    /// The 1st percentile.
    P1,
    /// The median.
    P50,
    /// The 99th percentile.
    P99,
    /// The largest value over the samples.
    Max,
    /// The end of the spread that the bound faces (min for a lower bound,
    /// max for an upper one, both for a range).
    Worst,
}

/// An expectation: a typed value and its bound.
#[derive(Clone, Debug)]
pub struct Expect {
    /// The value's name and unit, checked against the model when the case is read.
    pub value: ValueName,
    /// The bound.
    pub bound: Bound,
    /// The bound as the case wrote it, for reports.
    pub text: String,
    /// Bound a statistic over a tolerance study instead of the nominal
    /// value (judged by the tolerance run, not by the nominal solve).
    pub statistic: Option<Statistic>,
}

/// Which output files a run writes.
#[derive(Clone, Debug)]
pub struct OutputFlags {
    /// field.vtu.
    pub vtk: bool,
    /// mesh.svg and the pictures.
    pub plots: bool,
    /// report.md.
    pub report: bool,
    /// Probe CSV files.
    pub csv: bool,
    /// Colour scale of the field map: logarithmic shows mT-level fields at a
    /// distance that a linear scale puts on the zero colour.
    pub log_scale: bool,
    /// |B| range of the field map's colours, T (None: chosen from the field).
    pub field_range: Option<(f64, f64)>,
    /// Charts' y axes: Some(true) log, Some(false) linear, None chosen per
    /// chart (log where positive values span more than two decades).
    pub chart_log: Option<bool>,
    /// |B| range of the charts of flux density, T.
    pub chart_range: Option<(f64, f64)>,
}

/// Whether a value name is one of the stray field's (`Model::stray_field`).
pub fn is_stray_value(name: &str) -> bool {
    name.starts_with("reach.") || name.starts_with("stray.")
}

impl Model {
    /// Index of the part with this name.
    pub fn part_index(&self, name: &str) -> Option<usize> {
        self.parts.iter().position(|p| p.name == name)
    }

    /// The box around every part, lower-left and upper-right corners (m).
    pub fn parts_box(&self) -> ([f64; 2], [f64; 2]) {
        bounds_of(self.parts.iter())
    }

    /// The box around the parts that make or guide flux (not
    /// [`Part::is_inert`]), or around every part where none does.
    pub fn active_parts_box(&self) -> ([f64; 2], [f64; 2]) {
        match self.parts.iter().any(|p| !p.is_inert()) {
            true => bounds_of(self.parts.iter().filter(|p| !p.is_inert())),
            false => self.parts_box(),
        }
    }

    /// A length in the case's unit for a warning, to six significant
    /// digits: 3.000000000000001 mm reads "3 mm", 63.53490177 mm "63.5349 mm".
    pub fn length_text(&self, metres: f64) -> String {
        format!("{} {}", self.in_unit(metres), self.length_unit.0)
    }

    /// A point in the case's unit for a warning: "(0, 2.5) mm".
    pub fn point_text(&self, x: [f64; 2]) -> String {
        format!("({}, {}) {}", self.in_unit(x[0]), self.in_unit(x[1]), self.length_unit.0)
    }

    /// Metres in the case's unit, to six significant digits.
    pub fn in_unit(&self, metres: f64) -> f64 {
        let v = metres / self.length_unit.1;
        if v == 0.0 || !v.is_finite() {
            return v;
        }
        let scale = 10f64.powi(5 - v.abs().log10().floor() as i32);
        (v * scale).round() / scale
    }
}

/// The box around some parts' outlines, lower-left and upper-right corners (m).
fn bounds_of<'a>(parts: impl Iterator<Item = &'a Part>) -> ([f64; 2], [f64; 2]) {
    mesher::geometry::bbox(parts.flat_map(|p| {
        let (a, b) = p.shape.bounds();
        [a, b]
    }))
}
