//! The typed results of one study, in SI units: what results.json holds.
//! Serializable behind the `serde` feature.

use std::collections::BTreeMap;

#[derive(Clone, Debug)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Results {
    pub format: &'static str,
    pub study: StudyInfo,
    #[cfg_attr(feature = "serde", serde(skip_serializing_if = "Option::is_none"))]
    pub variant: Option<VariantInfo>,
    pub mesh: MeshInfo,
    pub solve: SolveInfo,
    pub probes: BTreeMap<String, ProbeResult>,
    pub forces: BTreeMap<String, ForceResult>,
    pub flux: BTreeMap<String, FluxResult>,
    pub energy: EnergyResult,
    pub parts: BTreeMap<String, PartResult>,
    pub magnets: BTreeMap<String, MagnetResult>,
    pub stray: StrayResult,
    pub expect: Vec<ExpectResult>,
    pub warnings: Vec<String>,
    /// Every scalar by its `[[expect]]` name, SI units.
    pub values: BTreeMap<String, f64>,
    /// The unit symbol of every value, from its type (empty for a ratio).
    pub units: BTreeMap<String, &'static str>,
    pub cautions: Vec<&'static str>,
}

/// Which sweep variant a result belongs to.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
pub struct VariantInfo {
    pub index: usize,
    pub label: String,
    pub swept: Vec<(String, f64)>,
}

#[derive(Clone, Debug)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct StudyInfo {
    pub title: String,
    pub geometry: &'static str,
    pub temperature_c: f64,
    pub depth_m: f64,
    pub parameters: BTreeMap<String, f64>,
}

#[derive(Clone, Debug)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct MeshInfo {
    pub nodes: usize,
    pub elements: usize,
    pub unknowns: usize,
    pub element_order: u32,
    pub min_angle_deg: f64,
}

#[derive(Clone, Debug)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct SolveInfo {
    pub converged: bool,
    pub iterations: usize,
    pub residual: f64,
    pub residual_history: Vec<f64>,
    /// Numeric factorizations of the tangent (fewer than iterations when
    /// later steps reuse one as a conjugate-gradient preconditioner).
    pub factorizations: usize,
    pub cg_iterations: usize,
    pub seconds: f64,
}

#[derive(Clone, Debug)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct ProbeResult {
    pub points: Vec<[f64; 2]>,
    pub b: Vec<[f64; 2]>,
    pub bmag: Vec<f64>,
    pub h: Vec<[f64; 2]>,
}

#[derive(Clone, Debug)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct ForceResult {
    pub vector: [f64; 2],
    pub magnitude: f64,
    #[cfg_attr(feature = "serde", serde(skip_serializing_if = "Option::is_none"))]
    pub torque: Option<f64>,
    pub contact: bool,
}

#[derive(Clone, Debug)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct FluxResult {
    pub wb: f64,
    #[cfg_attr(feature = "serde", serde(skip_serializing_if = "Option::is_none"))]
    pub turns: Option<f64>,
    /// Apparent inductance: linkage over current (no magnets, no applied field).
    #[cfg_attr(feature = "serde", serde(skip_serializing_if = "Option::is_none"))]
    pub inductance_h: Option<f64>,
    /// Incremental inductance d(linkage)/dI, by a perturbation solve.
    #[cfg_attr(feature = "serde", serde(skip_serializing_if = "Option::is_none"))]
    pub incremental_inductance_h: Option<f64>,
}

#[derive(Clone, Debug)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct EnergyResult {
    pub stored_j: f64,
    pub coenergy_j: f64,
}

#[derive(Clone, Debug)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct PartResult {
    pub material: String,
    pub b_max: f64,
    pub b_mean: f64,
    #[cfg_attr(feature = "serde", serde(skip_serializing_if = "Option::is_none"))]
    pub knee_t: Option<f64>,
    /// Volume share above the knee.
    #[cfg_attr(feature = "serde", serde(skip_serializing_if = "Option::is_none"))]
    pub saturated_share: Option<f64>,
    #[cfg_attr(feature = "serde", serde(skip_serializing_if = "Option::is_none"))]
    pub saturated: Option<bool>,
}

/// Volume share above the knee from which a steel part counts as saturated.
pub const SATURATED_SHARE: f64 = 0.05;

#[derive(Clone, Debug)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct MagnetResult {
    pub grade: String,
    pub temperature_c: f64,
    pub br_t: f64,
    pub hcj_a_per_m: f64,
    /// Field strength of the knee along the magnetization (negative), A/m.
    pub knee_h_a_per_m: f64,
    pub margin: f64,
    pub share_past_knee: f64,
    pub permeance: f64,
    pub mean_b_t: f64,
    pub mean_h_a_per_m: f64,
    /// Temperature at which the worst point reaches the knee (linear model estimate).
    pub knee_onset_c: Option<f64>,
    #[cfg_attr(feature = "serde", serde(skip))]
    pub points: Vec<[f64; 2]>,
}

#[derive(Clone, Debug, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct StrayResult {
    /// Dipole moment of the assembly (axisymmetric), A m2.
    pub moment_a_m2: Option<f64>,
    /// Distances from the assembly's centre where |B| falls to 0.5 mT, m.
    pub implant_distance_axis_m: Option<f64>,
    pub implant_distance_plane_m: Option<f64>,
    /// Distance along the axis where |B| falls to the reach level, m.
    pub reach_axis_m: Option<f64>,
    pub reach_level_t: f64,
    /// |H| at 2.1 m and 4.6 m (the larger of axis and mid-plane), A/m.
    pub h_at_2100mm_a_per_m: Option<f64>,
    pub h_at_4600mm_a_per_m: Option<f64>,
    /// Air-transport screen against the magnetized-material thresholds.
    pub air_transport: Option<String>,
}

#[derive(Clone, Debug)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct ExpectResult {
    pub value: String,
    pub bound: String,
    pub actual: Option<f64>,
    pub pass: bool,
}

/// The cautions every report carries.
pub const CAUTIONS: &[&str] = &[
    "Strong magnets pinch fingers and can shatter when they snap together; handle with care and keep them apart.",
    "Static fields can affect implanted medical devices such as pacemakers; 0.5 mT is the level below which such devices are generally not affected (ICNIRP 2009). Follow local codes and the device maker's advice.",
    "Magnetized goods have air-transport rules (IATA packing instruction 953); this tool screens, the current regulations and the carrier decide.",
    "Results are estimates from a 2D model; confirm by measurement and qualified practice before relying on them.",
];
