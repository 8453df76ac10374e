//! The resolved study: names turned into indices, quantities in SI units.

use crate::materials::Entry;
use crate::quantity::ValueName;
use mesher::{OuterBoundary, Shape, Symmetry};
use std::collections::BTreeMap;

/// One study, ready to mesh and solve.
#[derive(Clone, Debug)]
pub struct Model {
    pub title: String,
    pub symmetry: Symmetry,
    /// Name and SI factor of the study's length unit.
    pub length_unit: (String, f64),
    /// Planar out-of-plane length, m (1 for axisymmetric studies).
    pub depth: f64,
    /// Magnet temperature, degC.
    pub temperature: f64,
    pub boundary: OuterBoundary,
    pub applied_field: [f64; 2],
    pub mesh: MeshSettings,
    pub parts: Vec<Part>,
    pub probes: Vec<Probe>,
    pub forces: Vec<ForceSpec>,
    pub fluxes: Vec<FluxSpec>,
    pub expects: Vec<Expect>,
    pub output: OutputFlags,
    /// Newton-Raphson stopping rules and step method (`[solver]`).
    pub newton: solver::NewtonSettings,
    /// Flux density below which the axis "reach" ends, T.
    pub reach_level: f64,
    pub params: BTreeMap<String, f64>,
}

#[derive(Clone, Debug)]
pub struct MeshSettings {
    /// Default target edge length in and near parts, m.
    pub size: f64,
    pub min_angle: f64,
    pub grading: f64,
    pub max_elements: usize,
    /// 1 (linear) or 2 (quadratic) triangles.
    pub order: u32,
}

#[derive(Clone, Debug)]
pub struct Part {
    pub name: String,
    pub material: Entry,
    pub shape: Shape,
    pub mesh_size: f64,
    /// Unit vector of magnetization (magnets only).
    pub magnetization: Option<[f64; 2]>,
    /// Ampere-turns through the cross-section, A.
    pub current: Option<f64>,
}

#[derive(Clone, Debug)]
pub enum ProbeShape {
    Point([f64; 2]),
    Line { from: [f64; 2], to: [f64; 2], points: usize },
}

#[derive(Clone, Debug)]
pub struct Probe {
    pub name: String,
    pub shape: ProbeShape,
}

#[derive(Clone, Debug)]
pub struct ForceSpec {
    pub name: String,
    pub parts: Vec<usize>,
    pub torque_about: [f64; 2],
}

#[derive(Clone, Debug)]
pub enum FluxSpec {
    Line {
        name: String,
        from: [f64; 2],
        to: [f64; 2],
    },
    /// Parts with the sign of their current, and the turn count.
    Winding {
        name: String,
        parts: Vec<(usize, f64)>,
        turns: f64,
    },
}

impl FluxSpec {
    pub fn name(&self) -> &str {
        match self {
            FluxSpec::Line { name, .. } | FluxSpec::Winding { name, .. } => name,
        }
    }
}

#[derive(Clone, Debug, PartialEq)]
pub enum Bound {
    Min(f64),
    Max(f64),
    Between(f64, f64),
    /// Target and absolute tolerance.
    Near(f64, f64),
}

#[derive(Clone, Debug)]
pub struct Expect {
    /// The value's name and unit, checked against the model when the case is read.
    pub value: ValueName,
    pub bound: Bound,
    /// The bound as the case wrote it, for reports.
    pub text: String,
}

#[derive(Clone, Debug)]
pub struct OutputFlags {
    pub vtk: bool,
    pub plots: bool,
    pub report: bool,
    pub csv: bool,
}

impl Model {
    pub fn part_index(&self, name: &str) -> Option<usize> {
        self.parts.iter().position(|p| p.name == name)
    }
}
