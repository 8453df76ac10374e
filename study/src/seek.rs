//! Goal seek: the parameter value at which a result meets its target.
//!
//! The range is scanned from its low end for the first change of sign of
//! value - target (the smallest parameter that reaches the target, as a
//! designer asks it), then the bracket is closed by Brent's method (R. P.
//! Brent, Algorithms for Minimization without Derivatives, 1973, ch. 4:
//! inverse quadratic interpolation and secant steps, bisection whenever
//! they do not shrink the bracket fast enough), interpolating in log-log
//! coordinates where the parameter and the values are positive. Each
//! evaluation is a solve with its own error estimate, so the search stops
//! once the bracket is
//! narrower than what that error allows: the parameter's uncertainty is the
//! value's estimated error over the slope, plus what is left of the bracket.
//! It also stops at a point whose value, its error included, lies within
//! the `tolerance` asked of the target (the study's accuracy): finding the
//! parameter more closely than the value is asked for costs evaluations
//! and changes no design; the uncertainty is then the value's distance
//! from the target and its error, over the slope.
//!
//! The scan needs only the side of the target each point lies on, so its
//! points are asked at a looser accuracy (`Need::Side`); a point whose value
//! lies within its error of the target is asked again in full. Points of
//! the scan may close the bracket's ends, but the answer is never one of
//! them and their errors do not widen the stopping test.

/// One evaluation: the parameter, the value there and its estimated error.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Evaluation {
    /// Parameter value.
    pub x: f64,
    /// The sought value there (SI).
    pub value: f64,
    /// Its estimated absolute error (0 when not estimated).
    pub error: f64,
    /// Whether it was asked only for its side of the target (`Need::Side`).
    pub side_only: bool,
}

/// What an evaluation is asked for.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Need {
    /// Which side of the target the value lies on (the scan): a looser
    /// accuracy will do when the value is not near the target.
    Side,
    /// The value to the study's own accuracy.
    Value,
}

/// The answer of a seek.
#[derive(Clone, Debug, PartialEq)]
pub struct Found {
    /// The parameter value where the value meets the target.
    pub x: f64,
    /// Its uncertainty (same unit as x): the value's error over the slope,
    /// plus half the final bracket; or, stopped within the tolerance, the
    /// value's distance from the target and its error, over the slope.
    pub uncertainty: f64,
    /// Every evaluation, in order.
    pub evaluations: Vec<Evaluation>,
}

/// Why a seek found nothing.
#[derive(Clone, Debug, PartialEq)]
pub enum SeekError<E> {
    /// The value does not cross the target anywhere in the range: its
    /// smallest and largest value seen.
    NotInRange {
        /// Smallest value seen.
        low: f64,
        /// Largest value seen.
        high: f64,
    },
    /// An evaluation failed.
    Evaluation(E),
}

/// Points the range is scanned at for a bracket, ends included.
const SCAN_POINTS: usize = 9;
/// Most evaluations after the bracket is found.
const MOST_STEPS: usize = 40;

/// The scan's points: geometric when the range spans more than a decade of
/// positive values (a magnet's size), else even.
fn scan(lo: f64, hi: f64) -> Vec<f64> {
    let n = SCAN_POINTS - 1;
    (0..=n)
        .map(|i| {
            let t = i as f64 / n as f64;
            if lo > 0.0 && hi / lo > 10.0 {
                lo * (hi / lo).powf(t)
            } else {
                lo + t * (hi - lo)
            }
        })
        .collect()
}

/// Finds x in [lo, hi] where value(x) = target, the smallest such x when
/// there are several, to within `tolerance` of the target in value (0:
/// as closely as the values' errors allow). `evaluate` solves the study at
/// x to what is needed; the scan calls it for two points at once, one on
/// each core.
pub fn seek<E: Send>(
    lo: f64,
    hi: f64,
    target: f64,
    tolerance: f64,
    evaluate: impl Fn(f64, Need) -> Result<Evaluation, E> + Sync,
) -> Result<Found, SeekError<E>> {
    let mut evaluations = Vec::new();
    let record = |e: Result<Evaluation, E>, evaluations: &mut Vec<Evaluation>| -> Result<Evaluation, SeekError<E>> {
        let e = e.map_err(SeekError::Evaluation)?;
        evaluations.push(e);
        Ok(e)
    };
    let eval = |x: f64, need: Need, evaluations: &mut Vec<Evaluation>| record(evaluate(x, need), evaluations);
    // The first sign change from the low end. The scan's points are solved
    // two at a time: each is a small study at a looser accuracy, whose
    // solve shares two cores poorly (smallest-magnet-for-5mT: seven such
    // points, one after another, were half of its run). The second of a
    // pair is spent when the first closes the bracket.
    let mut previous: Option<Evaluation> = None;
    let mut bracket = None;
    'scan: for pair in scan(lo, hi).chunks(2) {
        let [a, rest @ ..] = pair else { continue };
        let (first, second) = match rest.first() {
            Some(&b) => {
                let (ea, eb) = rayon::join(|| evaluate(*a, Need::Side), || evaluate(b, Need::Side));
                (ea, Some(eb))
            }
            None => (evaluate(*a, Need::Side), None),
        };
        for e in std::iter::once(first).chain(second) {
            let mut e = record(e, &mut evaluations)?;
            if e.side_only && (e.value - target).abs() <= e.error {
                // Its side is not known at the looser accuracy.
                e = eval(e.x, Need::Value, &mut evaluations)?;
            }
            if let Some(p) = previous {
                if (p.value - target).signum() != (e.value - target).signum() || e.value == target {
                    bracket = Some((p, e));
                    break 'scan;
                }
            } else if e.value == target {
                bracket = Some((e, e));
                break 'scan;
            }
            previous = Some(e);
        }
    }
    let Some((a, b)) = bracket else {
        let values = evaluations.iter().map(|e| e.value);
        return Err(SeekError::NotInRange {
            low: values.clone().fold(f64::INFINITY, f64::min),
            high: values.fold(f64::NEG_INFINITY, f64::max),
        });
    };
    let (x, uncertainty) = brent(a, b, target, tolerance, &mut |x| eval(x, Need::Value, &mut evaluations))?;
    Ok(Found { x, uncertainty, evaluations })
}

/// Whether the seek stops at a full evaluation with this value and error:
/// within `tolerance` of the target, the error included (Brent's loop
/// below, and a caller that keeps only such a point's full outcome).
pub fn stops_at(value: f64, error: f64, target: f64, tolerance: f64) -> bool {
    (value - target).abs() + error <= tolerance
}

/// Brent's method on f(x) = value - target inside the bracket [a, b]
/// (b the better end, a the other end of the bracket, c the previous b, d
/// the one before). Stops when the bracket is within the uncertainty the
/// value's error allows at the current slope (or within 1e-9 of the range),
/// or at a full evaluation within `tolerance` of the target, its error included.
fn brent<E>(
    a: Evaluation,
    b: Evaluation,
    target: f64,
    tolerance: f64,
    eval: &mut dyn FnMut(f64) -> Result<Evaluation, SeekError<E>>,
) -> Result<(f64, f64), SeekError<E>> {
    let f = |e: &Evaluation| e.value - target;
    let (mut a, mut b) = (a, b);
    if f(&a).abs() < f(&b).abs() {
        std::mem::swap(&mut a, &mut b);
    }
    let (mut c, mut d) = (a, a.x);
    let mut bisected = true;
    let floor = 1e-9 * (b.x - a.x).abs();
    let uncertainty = |a: &Evaluation, b: &Evaluation| {
        let slope = (f(b) - f(a)) / (b.x - a.x);
        // A scan point's looser error says nothing of the answer's.
        let error = match (a.side_only, b.side_only) {
            (true, false) => b.error,
            (false, true) => a.error,
            _ => a.error.max(b.error),
        };
        let allowed = if slope != 0.0 && slope.is_finite() { error / slope.abs() } else { 0.0 };
        (allowed, 0.5 * (b.x - a.x).abs())
    };
    for _ in 0..MOST_STEPS {
        let (allowed, half) = uncertainty(&a, &b);
        if f(&b) == 0.0 && !b.side_only {
            return Ok((b.x, allowed));
        }
        if !b.side_only && stops_at(b.value, b.error, target, tolerance) {
            let slope = ((f(&b) - f(&a)) / (b.x - a.x)).abs();
            if slope > 0.0 && slope.is_finite() {
                return Ok((b.x, (f(&b).abs() + b.error) / slope));
            }
        }
        if 2.0 * half <= allowed.max(floor) && !b.side_only {
            return Ok((b.x, allowed + half));
        }
        let mut s = interpolated(&a, &b, &c, target);
        let edge = (3.0 * a.x + b.x) / 4.0;
        let outside = !((s > edge.min(b.x)) && (s < edge.max(b.x)));
        let slow = if bisected {
            (s - b.x).abs() >= 0.5 * (b.x - c.x).abs()
        } else {
            (s - b.x).abs() >= 0.5 * (c.x - d).abs()
        };
        bisected = outside || slow || !s.is_finite();
        if bisected {
            s = 0.5 * (a.x + b.x);
        }
        // A step shorter than the resolution the value's error allows is
        // lengthened to half of it, towards the other end (Brent's own
        // rule, ch. 4): the next point then usually lands past the root and
        // the bracket closes, where interpolation kept landing on the same
        // side (the 5 mT seek evaluated d = 37.381749 twice, then bisected
        // five times from the far end).
        let resolution = 0.5 * allowed.max(floor);
        if (s - b.x).abs() < resolution {
            s = b.x + resolution.copysign(a.x - b.x);
        }
        let e = eval(s)?;
        d = c.x;
        c = b;
        if (f(&a) < 0.0) != (f(&e) < 0.0) {
            b = e;
        } else {
            a = e;
        }
        if f(&a).abs() < f(&b).abs() {
            std::mem::swap(&mut a, &mut b);
        }
    }
    let (allowed, half) = uncertainty(&a, &b);
    Ok((b.x, allowed + half))
}

/// Brent's interpolation step: inverse quadratic through a, b and c, or
/// the secant through a and b where two values coincide. Where every
/// parameter and value is positive it is taken in log-log coordinates: the
/// values a designer seeks follow power laws of the parameter over the
/// bracket (a magnet's far field against its size, a pull against a gap),
/// which are straight lines there. The 5 mT seek's first step from its
/// bracket d = 32.5 .. 47.3 mm landed at 36.6 mm (4.77 mT) by the linear
/// secant and at 37.48 mm (5.08 mT) by the logarithmic one, the answer
/// being 37.38 mm.
fn interpolated(a: &Evaluation, b: &Evaluation, c: &Evaluation, target: f64) -> f64 {
    let positive = target > 0.0 && [a, b, c].iter().all(|e| e.x > 0.0 && e.value > 0.0);
    let map = |v: f64| if positive { v.ln() } else { v };
    let unmap = |v: f64| if positive { v.exp() } else { v };
    let g = |e: &Evaluation| map(e.value) - map(target);
    let (xa, xb, xc) = (map(a.x), map(b.x), map(c.x));
    let (fa, fb, fc) = (g(a), g(b), g(c));
    unmap(if fa != fc && fb != fc {
        xa * fb * fc / ((fa - fb) * (fa - fc)) + xb * fa * fc / ((fb - fa) * (fb - fc)) + xc * fa * fb / ((fc - fa) * (fc - fb))
    } else {
        xb - fb * (xb - xa) / (fb - fa)
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn exact(x: f64, _: Need) -> Result<Evaluation, ()> {
        Ok(Evaluation {
            x,
            value: x * x * x,
            error: 0.0,
            side_only: false,
        })
    }

    #[test]
    fn the_cube_root_is_found_to_the_tolerance() {
        let found = seek(0.1, 10.0, 2.0, 0.0, exact).unwrap();
        assert!((found.x - 2f64.cbrt()).abs() < 1e-8, "{found:?}");
        assert!(found.evaluations.len() < 25, "{} evaluations", found.evaluations.len());
    }

    /// A far field against a magnet's size, as a power law (a dipole's
    /// field at a fixed distance grows as its volume, d^3 for a fixed
    /// shape): interpolated in log-log coordinates, the first step from the
    /// scan's bracket lands on the root, so a seek asked to 1e-3 of the
    /// target stops at the first evaluation past the scan; Brent's linear
    /// interpolation took three.
    #[test]
    fn a_power_law_is_sought_in_log_log_coordinates() {
        let field = |d: f64| 1e-7 * d.powi(3);
        let value = |x: f64, _: Need| -> Result<Evaluation, ()> {
            Ok(Evaluation {
                x,
                value: field(x),
                error: 1e-12,
                side_only: false,
            })
        };
        let target = field(37.4);
        let found = seek(5.0, 100.0, target, 1e-3 * target, value).unwrap();
        let scan = found.evaluations.iter().position(|e| e.value > target).unwrap() + 1;
        let after = found.evaluations.len() - scan;
        assert_eq!(after, 1, "evaluations after the scan: {:?}", &found.evaluations[scan..]);
        assert!((found.x - 37.4).abs() <= found.uncertainty, "{found:?}");
    }

    /// Asked to 1e-3 of the target (an accuracy of 0.1 %), the seek of the
    /// cube root of 2 stops at the first full evaluation whose value, its
    /// error included, is that close, in fewer evaluations than the exact
    /// seek, and its uncertainty covers the root.
    #[test]
    fn the_seek_stops_within_the_tolerance_asked() {
        let value_error = 1e-5;
        let noisy = |x: f64, _: Need| -> Result<Evaluation, ()> {
            Ok(Evaluation {
                x,
                value: x * x * x + 0.5 * value_error,
                error: value_error,
                side_only: false,
            })
        };
        let tolerance = 2e-3;
        let loose = seek(0.1, 10.0, 2.0, tolerance, noisy).unwrap();
        let tight = seek(0.1, 10.0, 2.0, 0.0, noisy).unwrap();
        let last = loose.evaluations.last().unwrap();
        assert!((last.value - 2.0).abs() + last.error <= tolerance && last.x == loose.x, "{loose:?}");
        assert!(
            loose.evaluations.len() < tight.evaluations.len(),
            "{} against {}",
            loose.evaluations.len(),
            tight.evaluations.len()
        );
        let root = 2f64.cbrt();
        assert!((loose.x - root).abs() <= loose.uncertainty, "{loose:?}");
        assert!(loose.uncertainty < tolerance / (3.0 * root * root), "{loose:?}");
    }

    #[test]
    fn the_smallest_root_is_taken() {
        // sin crosses 0.5 at pi/6 and 5 pi/6 in [0, 3]: the scan from the low end takes pi/6.
        let found = seek(0.0, 3.0, 0.5, 0.0, |x, _| {
            Ok::<_, ()>(Evaluation {
                x,
                value: x.sin(),
                error: 0.0,
                side_only: false,
            })
        })
        .unwrap();
        assert!((found.x - std::f64::consts::FRAC_PI_6).abs() < 1e-8, "{found:?}");
    }

    #[test]
    fn an_error_on_the_value_becomes_the_parameters_uncertainty() {
        // value 10 x with error 0.01: x is known to 0.001.
        let found = seek(0.0, 1.0, 4.0, 0.0, |x, _| {
            Ok::<_, ()>(Evaluation {
                x,
                value: 10.0 * x,
                error: 0.01,
                side_only: false,
            })
        })
        .unwrap();
        assert!((found.x - 0.4).abs() <= found.uncertainty, "{found:?}");
        assert!(found.uncertainty < 0.003 && found.uncertainty >= 0.001, "{found:?}");
    }

    /// The scan solves its points two at a time: a point past the one that
    /// closes the bracket is spent, and its failure (a geometry that cannot
    /// be built there) does not stop the seek. The scan's points from 0.1 to
    /// 10 are 0.1 * 10^(k/4); x^3 = 0.5 closes its bracket at x = 1, paired
    /// with 1.78.
    #[test]
    fn a_spent_scan_point_does_not_stop_the_seek() {
        let found = seek(0.1, 10.0, 0.5, 0.0, |x, _| {
            if x > 1.5 {
                return Err("no geometry");
            }
            Ok(Evaluation {
                x,
                value: x * x * x,
                error: 1e-12,
                side_only: false,
            })
        })
        .unwrap();
        assert!((found.x - 0.5f64.cbrt()).abs() <= found.uncertainty.max(1e-9), "{found:?}");
        assert!(found.evaluations.iter().all(|e| e.x <= 1.0), "{found:?}");
    }

    /// Scan points asked at a looser accuracy, each off by 0.9 of its
    /// (honest) error: those whose side is unsure are asked again in full,
    /// and the answer and its uncertainty come from full evaluations.
    #[test]
    fn scan_points_at_a_looser_accuracy_do_not_set_the_answer() {
        let found = seek(0.1, 10.0, 2.0, 0.0, |x, need| {
            let (error, side_only) = if need == Need::Side { (3.0, true) } else { (1e-9, false) };
            Ok::<_, ()>(Evaluation {
                x,
                value: x * x * x + 0.9 * error,
                error,
                side_only,
            })
        })
        .unwrap();
        let root = 2f64.cbrt();
        assert!((found.x - root).abs() <= found.uncertainty && found.uncertainty < 1e-6, "{found:?}");
        assert!(found.evaluations.iter().any(|e| e.x == found.x && !e.side_only), "{found:?}");
        // x = 1 (value 1 + 2.7 against 2, error 3) was unsure at the looser accuracy.
        let at_one: Vec<bool> = found.evaluations.iter().filter(|e| e.x == 1.0).map(|e| e.side_only).collect();
        assert_eq!(at_one, vec![true, false], "{found:?}");
    }

    #[test]
    fn a_target_out_of_reach_is_reported_with_what_was_seen() {
        let e = seek(1.0, 2.0, 100.0, 0.0, exact).unwrap_err();
        assert_eq!(e, SeekError::NotInRange { low: 1.0, high: 8.0 });
    }
}
