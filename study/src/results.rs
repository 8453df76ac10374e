//! The typed results of one study, in SI units: what results.json holds.
//! Serializable behind the `serde` feature.

use std::collections::BTreeMap;

/// Everything about a solved study, SI units.
#[derive(Clone, Debug)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Results {
    /// Format tag of results.json.
    pub format: &'static str,
    /// The study as solved.
    pub study: StudyInfo,
    /// The sweep variant, if one.
    #[cfg_attr(feature = "serde", serde(skip_serializing_if = "Option::is_none"))]
    pub variant: Option<VariantInfo>,
    /// Mesh figures.
    pub mesh: MeshInfo,
    /// Solve figures.
    pub solve: SolveInfo,
    /// Probe fields by name.
    pub probes: BTreeMap<String, ProbeResult>,
    /// Forces by name.
    pub forces: BTreeMap<String, ForceResult>,
    /// Fluxes by name.
    pub flux: BTreeMap<String, FluxResult>,
    /// Stored energy and co-energy.
    pub energy: EnergyResult,
    /// Per-part flux density figures.
    pub parts: BTreeMap<String, PartResult>,
    /// Magnet working points.
    pub magnets: BTreeMap<String, MagnetResult>,
    /// The stray field.
    pub stray: StrayResult,
    /// Winding figures of the parts whose wire is given.
    pub coils: BTreeMap<String, crate::coil::CoilFigures>,
    /// Each expectation's outcome.
    pub expect: Vec<ExpectResult>,
    /// Design warnings.
    pub warnings: Vec<String>,
    /// Every scalar by its `[[expect]]` name, SI units.
    pub values: BTreeMap<String, f64>,
    /// Estimated absolute error of each value, SI units (empty when
    /// `[study] accuracy = "off"`).
    pub errors: BTreeMap<String, f64>,
    /// The least scale some values' errors are measured against, by name
    /// (`estimate::scale`): a force's share of the gross pull that cancels
    /// in it. Not written out.
    #[cfg_attr(feature = "serde", serde(skip))]
    pub floors: BTreeMap<String, f64>,
    /// The refinement steps that led to these values.
    #[cfg_attr(feature = "serde", serde(skip_serializing_if = "Option::is_none"))]
    pub adaptive: Option<Adaptive>,
    /// The values the case asks for, in its order: expectations first, then
    /// forces, fluxes and probes as written (sweep reports lead with them).
    pub asked: Vec<String>,
    /// The unit symbol of every value, from its type (empty for a ratio).
    pub units: BTreeMap<String, &'static str>,
    /// The cautions every report carries.
    pub cautions: Vec<&'static str>,
}

/// Which sweep variant a result belongs to.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
pub struct VariantInfo {
    /// Its index in the sweep.
    pub index: usize,
    /// Its folder name.
    pub label: String,
    /// The swept parameters and their values.
    pub swept: Vec<(String, f64)>,
}

/// The study as solved.
#[derive(Clone, Debug)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct StudyInfo {
    /// Its title.
    pub title: String,
    /// "planar" or "axisymmetric".
    pub geometry: &'static str,
    /// Magnet temperature, degC.
    pub temperature_c: f64,
    /// Out-of-plane depth, m (1 when axisymmetric).
    pub depth_m: f64,
    /// Parameter values.
    pub parameters: BTreeMap<String, f64>,
}

/// Mesh figures.
#[derive(Clone, Debug)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct MeshInfo {
    /// Nodes, edge midpoints included.
    pub nodes: usize,
    /// Triangles of the physical domain.
    pub elements: usize,
    /// Unknowns solved for.
    pub unknowns: usize,
    /// Element order.
    pub element_order: u32,
    /// Smallest triangle angle, degrees.
    pub min_angle_deg: f64,
}

/// Solve figures.
#[derive(Clone, Debug)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct SolveInfo {
    /// Whether Newton-Raphson met its stopping rules.
    pub converged: bool,
    /// Iterations taken.
    pub iterations: usize,
    /// Last relative residual.
    pub residual: f64,
    /// Relative residual after each iteration.
    pub residual_history: Vec<f64>,
    /// Numeric factorizations of the tangent (fewer than iterations when
    /// later steps reuse one as a conjugate-gradient preconditioner).
    pub factorizations: usize,
    /// Conjugate-gradient iterations.
    pub cg_iterations: usize,
    /// Wall time, s.
    pub seconds: f64,
}

/// A probe's samples.
#[derive(Clone, Debug)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct ProbeResult {
    /// Sample points, m.
    pub points: Vec<[f64; 2]>,
    /// B at each, T (NaN outside the mesh).
    pub b: Vec<[f64; 2]>,
    /// |B| at each, T.
    pub bmag: Vec<f64>,
    /// H at each, A/m.
    pub h: Vec<[f64; 2]>,
}

/// A force result (whole depth when planar).
#[derive(Clone, Debug)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct ForceResult {
    /// Force vector, N.
    pub vector: [f64; 2],
    /// Its magnitude, N.
    pub magnitude: f64,
    /// Torque about the given point, N m (planar).
    #[cfg_attr(feature = "serde", serde(skip_serializing_if = "Option::is_none"))]
    pub torque: Option<f64>,
    /// Whether the set touches another part: the pull at contact, across the interface.
    pub contact: bool,
    /// Whether the set touches the outer boundary: the value is not reliable.
    pub unreliable: bool,
    /// The gross pull of the stress in its band, N (`solver::post::force::Force::gross`):
    /// the scale of the pulls that cancel in a force that vanishes.
    #[cfg_attr(feature = "serde", serde(skip))]
    pub gross: f64,
}

/// A flux result.
#[derive(Clone, Debug)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct FluxResult {
    /// Flux or flux linkage, Wb.
    pub wb: f64,
    /// Turns of a winding.
    #[cfg_attr(feature = "serde", serde(skip_serializing_if = "Option::is_none"))]
    pub turns: Option<f64>,
    /// Apparent inductance: linkage over current (no magnets, no applied field).
    #[cfg_attr(feature = "serde", serde(skip_serializing_if = "Option::is_none"))]
    pub inductance_h: Option<f64>,
    /// Incremental inductance d(linkage)/dI at the working point, from the
    /// field's first-order response on the converged tangent.
    #[cfg_attr(feature = "serde", serde(skip_serializing_if = "Option::is_none"))]
    pub incremental_inductance_h: Option<f64>,
}

impl FluxResult {
    /// The incremental inductance where it says something the apparent one
    /// does not: with saturating steel or magnets (without them the two are
    /// one number, linkage over current).
    pub fn distinct_incremental_inductance(&self) -> Option<f64> {
        self.incremental_inductance_h
            .filter(|&l| self.inductance_h.is_none_or(|a| (a - l).abs() > 1e-9 * a.abs()))
    }
}

/// Energy of the whole field.
#[derive(Clone, Debug)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct EnergyResult {
    /// Stored energy, J.
    pub stored_j: f64,
    /// Co-energy, J.
    pub coenergy_j: f64,
}

/// Flux density figures of a part.
#[derive(Clone, Debug)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct PartResult {
    /// Its material's name.
    pub material: String,
    /// Largest |B| at any quadrature point, T: a local value that follows the mesh at corners.
    pub b_max: f64,
    /// Volume mean of |B|, T.
    pub b_mean: f64,
    /// Knee of a soft material's curve, T.
    #[cfg_attr(feature = "serde", serde(skip_serializing_if = "Option::is_none"))]
    pub knee_t: Option<f64>,
    /// Volume share above the knee.
    #[cfg_attr(feature = "serde", serde(skip_serializing_if = "Option::is_none"))]
    pub saturated_share: Option<f64>,
    /// Whether more than SATURATED_SHARE of it runs above its knee.
    #[cfg_attr(feature = "serde", serde(skip_serializing_if = "Option::is_none"))]
    pub saturated: Option<bool>,
    /// For a linear stand-in for steel (mu_r 100 or more), the volume share
    /// above the highest knee of the library's steels and irons.
    #[cfg_attr(feature = "serde", serde(skip_serializing_if = "Option::is_none"))]
    pub above_steel_knees_share: Option<f64>,
}

/// Volume share above the knee from which a steel part counts as saturated.
pub const SATURATED_SHARE: f64 = 0.05;

/// A magnet's working point at the study temperature.
#[derive(Clone, Debug)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct MagnetResult {
    /// Its grade.
    pub grade: String,
    /// Study temperature, degC.
    pub temperature_c: f64,
    /// Remanence at that temperature, T.
    pub br_t: f64,
    /// Intrinsic coercivity at that temperature, A/m.
    pub hcj_a_per_m: f64,
    /// Field strength of the knee along the magnetization (negative), A/m.
    pub knee_h_a_per_m: f64,
    /// Margin to the knee of the most demagnetized 1 % of the volume:
    /// 1 - H/H_knee at that percentile (converges with the mesh).
    pub margin: f64,
    /// The margin at the single worst point: a local value that follows the mesh at corners.
    pub margin_local: f64,
    /// Volume share past the knee.
    pub share_past_knee: f64,
    /// Irreversible flux loss (fraction of Br): 1 - the volume mean of the
    /// share each point keeps on recoiling from its lowest point.
    pub irreversible_loss: f64,
    /// Permeance coefficient from the volume means.
    pub permeance: f64,
    /// Volume mean of B along the magnetization, T.
    pub mean_b_t: f64,
    /// Volume mean of H along the magnetization, A/m.
    pub mean_h_a_per_m: f64,
    /// Temperature at which the most demagnetized 1 % of the volume reaches the knee (linear model estimate).
    pub knee_onset_c: Option<f64>,
    /// Whether the magnet is past its knee above the onset (NdFeB, SmCo)
    /// or below it (ferrite, whose coercivity falls as it cools).
    pub knee_past_above_onset: Option<bool>,
    /// (H, B) along the magnetization at each quadrature point, for plots.
    #[cfg_attr(feature = "serde", serde(skip))]
    pub points: Vec<[f64; 2]>,
}

impl MagnetResult {
    /// Whether the magnet was checked against a knee: a grade without an
    /// intrinsic coercivity has none, and its margin, share past the knee
    /// and loss are NaN (null in results.json), not a margin of 1.
    pub fn knee_checked(&self) -> bool {
        self.margin.is_finite()
    }
}

/// The stray field beyond the assembly.
#[derive(Clone, Debug, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct StrayResult {
    /// Dipole moment of the assembly (axisymmetric), A m2.
    pub moment_a_m2: Option<f64>,
    /// Distances from the assembly's centre where |B| falls to 0.5 mT, m.
    pub implant_distance_axis_m: Option<f64>,
    /// Distance in the mid-plane where |B| falls to 0.5 mT, m.
    pub implant_distance_plane_m: Option<f64>,
    /// The point distances are measured from: the centre of the box around
    /// every part (on the axis when axisymmetric), m.
    pub reference_point_m: Option<[f64; 2]>,
    /// Distance along the axis where |B| falls to the reach level, m.
    pub reach_axis_m: Option<f64>,
    /// The point the reach is measured from (`[study] reach_from`, or the
    /// reference point), m.
    pub reach_from_m: Option<[f64; 2]>,
    /// The reach level, T.
    pub reach_level_t: f64,
    /// |H| at 2.1 m and 4.6 m (the larger of axis and mid-plane), A/m.
    pub h_at_2100mm_a_per_m: Option<f64>,
    /// |H| at 4.6 m, A/m.
    pub h_at_4600mm_a_per_m: Option<f64>,
    /// Air-transport screen against the magnetized-material thresholds.
    pub air_transport: Option<String>,
}

/// One expectation's outcome.
#[derive(Clone, Debug)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct ExpectResult {
    /// The value's name.
    pub value: String,
    /// The bound as written.
    pub bound: String,
    /// The value found (None when the study did not report it).
    pub actual: Option<f64>,
    /// Whether the bound holds for the value within its error.
    pub pass: bool,
    /// "pass", "fail", or "undecided" when the bound lies within the value's error.
    pub verdict: Verdict,
    /// The value's estimated absolute error, if estimated.
    #[cfg_attr(feature = "serde", serde(skip_serializing_if = "Option::is_none"))]
    pub error: Option<f64>,
    /// A hint beside a failure, such as a force component whose bound holds
    /// for the opposite sign.
    #[cfg_attr(feature = "serde", serde(skip_serializing_if = "Option::is_none"))]
    pub note: Option<String>,
}

/// An expectation's outcome.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize), serde(rename_all = "lowercase"))]
pub enum Verdict {
    /// The bound holds for every value within the error.
    Pass,
    /// The bound fails for every value within the error (or there is no value).
    Fail,
    /// The bound holds for some values within the error and not for others.
    Undecided,
}

/// The cautions every report carries.
pub const CAUTIONS: &[&str] = &[
    "Strong magnets pinch fingers and can shatter when they snap together; handle with care and keep them apart.",
    "Static fields can affect implanted medical devices such as pacemakers; 0.5 mT is the level below which such devices are generally not affected (ICNIRP 2009). Follow local codes and the device maker's advice.",
    "Magnetized goods have air-transport rules (IATA packing instruction 953); this tool screens, the current regulations and the carrier decide.",
    "Results are estimates from a 2D model; confirm by measurement and qualified practice before relying on them.",
];

/// One mesh of the refinement sequence.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Step {
    /// Triangles of the physical domain.
    pub elements: usize,
    /// Unknowns solved for.
    pub unknowns: usize,
    /// Element order of this step's solve (the first estimate of a case on
    /// cubic or quartic elements compares it with the order below on the
    /// same mesh).
    pub order: u32,
    /// Largest estimated relative error of an asked value (None on the
    /// first mesh, which has nothing to compare with).
    pub worst_relative_error: Option<f64>,
    /// The value it belongs to.
    pub worst_value: Option<String>,
    /// Seconds for this step's solve and estimate (when the two orders of
    /// an order step ran at once, the lower's own and the higher's from
    /// the start of both).
    pub seconds: f64,
}

/// How the reported values were reached.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Adaptive {
    /// The relative error asked for.
    pub target: f64,
    /// Whether every asked value reached it.
    pub reached: bool,
    /// The meshes solved, coarsest first; the values are from the last.
    pub steps: Vec<Step>,
    /// The estimated error of the whole field in the energy norm, relative
    /// to the field's own (`estimate::energy_norm`); None after one mesh.
    pub energy_norm: Option<f64>,
}

/// Distinct meshes among the steps solved: an order step solves its mesh again.
pub fn meshes_solved(steps: &[Step]) -> usize {
    1 + steps.windows(2).filter(|w| w[1].order == w[0].order).count()
}

impl Adaptive {
    /// The solves that led to the values, for the summary and the report:
    /// "2 nested meshes, order 2", or "2 solves on 1 nested mesh, order 3 then 4"
    /// when the first estimate came from an order step.
    pub fn route(&self) -> String {
        let solves = self.steps.len();
        let meshes = meshes_solved(&self.steps);
        let (first, last) = (self.steps.first().map_or(0, |s| s.order), self.steps.last().map_or(0, |s| s.order));
        let plural = |n: usize, word: &str| format!("{n} {word}{}", if n == 1 { "" } else { "es" });
        if first == last {
            format!("{}, order {last}", plural(meshes, "nested mesh"))
        } else {
            format!("{solves} solves on {}, order {first} then {last}", plural(meshes, "nested mesh"))
        }
    }

    /// The last mesh's largest estimated relative error and the value it
    /// belongs to; None after a single mesh (nothing to compare with).
    pub fn worst(&self) -> Option<(f64, &str)> {
        let last = self.steps.last()?;
        Some((last.worst_relative_error?, last.worst_value.as_deref()?))
    }

    /// Refinement stopped short of "reached" only because an expectation
    /// stays undecided: every value met the target, and the expectation's
    /// bound lies within its value's error at the finest mesh allowed.
    pub fn undecided_at_target(&self, expect: &[ExpectResult]) -> bool {
        !self.reached && self.worst().is_some_and(|(w, _)| w <= self.target) && expect.iter().any(|e| e.verdict == Verdict::Undecided)
    }
}
