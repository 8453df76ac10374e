//! What the search is asked (`Search`) and what one evaluation gives
//! (`Point`), and which evaluation is best.

/// One evaluation: where, the objective there (to be minimized) and each
/// constraint's margin (feasible where every margin is at least 0).
#[derive(Clone, Debug, PartialEq)]
pub struct Point {
    /// Parameter values.
    pub x: Vec<f64>,
    /// The objective, as minimized (a maximized value enters negated).
    pub objective: f64,
    /// Constraint margins: at least 0 where the constraint holds.
    pub margins: Vec<f64>,
    /// What the caller keeps beside the point for its log (the values
    /// behind the margins and their errors); the search never reads it.
    pub reported: Vec<f64>,
}

impl Point {
    /// The largest constraint violation (0 when feasible).
    pub fn violation(&self) -> f64 {
        self.margins.iter().map(|m| (-m).max(0.0)).fold(0.0, f64::max)
    }
}

/// What the search is asked.
#[derive(Clone, Debug, PartialEq)]
pub struct Search {
    /// Bounds of each parameter, low below high.
    pub bounds: Vec<[f64; 2]>,
    /// Where to start (inside the bounds): the case's own values.
    pub start: Vec<f64>,
    /// Number of constraints.
    pub constraints: usize,
    /// Most evaluations in all, the parallel design included.
    pub max_evaluations: usize,
    /// Candidates of the parallel design (0: none).
    pub design_points: usize,
    /// The search stops when its steps fall below this share of each range.
    pub x_tolerance: f64,
    /// Seed of the design.
    pub seed: u64,
}

/// The best point of a log: least violation first, then least objective.
pub(crate) fn best(log: &[Point]) -> &Point {
    log.iter()
        .min_by(|a, b| a.violation().total_cmp(&b.violation()).then(a.objective.total_cmp(&b.objective)))
        .expect("a log is never empty")
}
