//! Expectations on a tolerance study's statistics: pass, fail, or
//! undecided where the bound lies within a statistic's numerical error or a
//! Monte Carlo percentile's sampling interval.

use std::collections::BTreeMap;
use study::model::Statistic;
use study::results::Verdict;
use study::tolerance::{judged_statistics, Statistics};

/// An expectation on a statistic, judged over the samples.
pub struct Judged {
    /// What was bounded, as "force.pull.z p99".
    pub name: String,
    /// The bound as written.
    pub bound: String,
    /// The figures judged (one, or both ends for "worst" on a range).
    pub figures: Vec<f64>,
    /// Where each figure may lie: +- the numerical error, and for a Monte
    /// Carlo percentile its 95 % sampling interval (an infinite end: the
    /// samples cannot bound it).
    pub ranges: Vec<(f64, f64)>,
    /// Whether each range is a Monte Carlo percentile's sampling interval
    /// (else the figure +- its numerical error).
    pub sampled: Vec<bool>,
    /// Unit symbol of the value.
    pub unit: &'static str,
    /// Pass, fail, or undecided where the bound lies within a range.
    pub verdict: Verdict,
    /// Why undecided, in words (empty otherwise).
    pub why: String,
}

/// Judges every `[[expect]]` that names a statistic.
pub fn judge(model: &study::model::Model, stats: &BTreeMap<String, Statistics>) -> Vec<Judged> {
    model
        .expects
        .iter()
        .filter_map(|x| {
            let s = x.statistic?;
            let name = format!("{} {}", x.value.name, format!("{s:?}").to_lowercase());
            let unit = x.value.unit.symbol();
            let Some(st) = stats.get(&x.value.name) else {
                return Some(Judged {
                    name,
                    bound: x.text.clone(),
                    figures: Vec::new(),
                    ranges: Vec::new(),
                    sampled: Vec::new(),
                    unit,
                    verdict: Verdict::Fail,
                    why: String::new(),
                });
            };
            let verdict = st.verdict(s, &x.bound);
            let statistics = judged_statistics(s, &x.bound);
            let why = if verdict == Verdict::Undecided {
                undecided_why(st, &statistics, unit)
            } else {
                String::new()
            };
            Some(Judged {
                name,
                bound: x.text.clone(),
                figures: st.judged(s, &x.bound),
                ranges: statistics.iter().map(|&k| st.range(k)).collect(),
                sampled: statistics.iter().map(|&k| st.intervals.is_some() && percentile(k).is_some()).collect(),
                unit,
                verdict,
                why,
            })
        })
        .collect()
}

/// Why a verdict on a statistic is undecided: the sampling of a Monte
/// Carlo percentile (and how many samples would bound it), or the
/// samples' numerical error.
fn undecided_why(st: &Statistics, statistics: &[Statistic], unit: &str) -> String {
    let q = statistics.iter().find_map(|&s| percentile(s));
    match (q, st.intervals) {
        (Some(q), Some(_)) => format!(
            "the bound lies within the {:.0} % interval that {} samples leave for this percentile; more samples would decide (both ends need at least {})",
            100.0 * study::tolerance::CONFIDENCE,
            st.samples,
            study::tolerance::fewest_samples(q)
        ),
        _ => format!(
            "the bound lies within the samples' numerical error ({}); a tighter [study] accuracy would decide",
            crate::output::engineering::eng(st.error.unwrap_or(0.0), unit)
        ),
    }
}

/// The quantile a percentile statistic stands for; None for the others.
fn percentile(s: Statistic) -> Option<f64> {
    match s {
        Statistic::P1 => Some(0.01),
        Statistic::P50 => Some(0.5),
        Statistic::P99 => Some(0.99),
        _ => None,
    }
}

impl Judged {
    /// The judged figures as people read them: "49.33 mT ± 0.001 mT", or
    /// both ends, with a percentile's 95 % interval where it is sampled.
    pub(super) fn figures_text(&self) -> String {
        let eng = |v: f64| crate::output::engineering::eng(v, self.unit);
        let figs: Vec<String> = self
            .figures
            .iter()
            .zip(self.ranges.iter().zip(&self.sampled))
            .map(|(&v, (&(lo, hi), &sampled))| {
                if !sampled {
                    crate::output::engineering::eng_pm(v, Some(0.5 * (hi - lo)), self.unit)
                } else {
                    let end = |x: f64, none: &str| if x.is_finite() { eng(x) } else { none.to_string() };
                    format!("{} (95 %: {} .. {})", eng(v), end(lo, "unbounded"), end(hi, "unbounded"))
                }
            })
            .collect();
        figs.join(" .. ")
    }

    /// The verdict as printed.
    pub fn verdict_text(&self) -> &'static str {
        match self.verdict {
            Verdict::Pass => "pass",
            Verdict::Fail => "FAIL",
            Verdict::Undecided => "UNDECIDED",
        }
    }

    /// Whether the bound holds (undecided does not).
    pub fn pass(&self) -> bool {
        self.verdict == Verdict::Pass
    }

    /// The line `solve` and `check` print.
    pub fn line(&self) -> String {
        let why = if self.why.is_empty() { String::new() } else { format!(": {}", self.why) };
        format!("{:<36} {:<24} {:>24}  {}{why}", self.name, self.bound, self.figures_text(), self.verdict_text())
    }
}
