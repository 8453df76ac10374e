//! Triangle quadrature rules in barycentric coordinates.

use crate::element_order::ElementOrder;
use mesher::Symmetry;
use std::sync::OnceLock;

/// One rule: barycentric points and weights summing to 1.
pub struct Rule {
    /// Barycentric coordinates of the points.
    pub points: &'static [[f64; 3]],
    /// Weights (summing to 1).
    pub weights: &'static [f64],
}

const A1: f64 = 0.059_715_871_789_770;
const B1: f64 = 0.470_142_064_105_115;
const A2: f64 = 0.797_426_985_353_087;
const B2: f64 = 0.101_286_507_323_456;
const W0: f64 = 0.225;
const W1: f64 = 0.132_394_152_788_506;
const W2: f64 = 0.125_939_180_544_827;

/// Seven-point rule exact for degree 5 (D. A. Dunavant, High degree efficient
/// symmetrical Gaussian quadrature rules for the triangle, IJNME 21, 1985).
pub const DEGREE5: Rule = Rule {
    points: &[
        [1.0 / 3.0, 1.0 / 3.0, 1.0 / 3.0],
        [A1, B1, B1],
        [B1, A1, B1],
        [B1, B1, A1],
        [A2, B2, B2],
        [B2, A2, B2],
        [B2, B2, A2],
    ],
    weights: &[W0, W1, W1, W1, W2, W2, W2],
};

/// Three-point rule exact for degree 2 (G. Strang, G. Fix, An Analysis of the
/// Finite Element Method, 1973, table 4.1): enough for planar quadratic
/// elements, where B is linear and the linear-material integrand quadratic.
pub const DEGREE2: Rule = Rule {
    points: &[
        [2.0 / 3.0, 1.0 / 6.0, 1.0 / 6.0],
        [1.0 / 6.0, 2.0 / 3.0, 1.0 / 6.0],
        [1.0 / 6.0, 1.0 / 6.0, 2.0 / 3.0],
    ],
    weights: &[1.0 / 3.0, 1.0 / 3.0, 1.0 / 3.0],
};

/// The rule for elements of `order` in `symmetry`: exact for the stiffness
/// of a linear material, degree 2 (p - 1) in the plane. About the axis the
/// integrand r |grad A|^2 has degree 2 p - 1 and the A/r term is not a
/// polynomial: a degree or two more (5 for quadratic elements, as measured
/// before, 6 cubic, 8 quartic), and two more again (`boosted`) in the
/// Kelvin-mapped exterior, whose weight |x' - c|^2 / R^2 adds degree 2, and
/// next to the axis, where A^2 / r is far from a polynomial, and on curved
/// elements, whose map is not a polynomial (with 6 and 8 there too, P1's
/// probes moved by up to 1.3e-6 at order 3 and 4.3e-7 at order 4, most of
/// it from the curved elements along the rim; boosted where said, they
/// agree with the higher rule everywhere to 1e-9).
pub fn rule(order: ElementOrder, symmetry: Symmetry, boosted: bool) -> &'static Rule {
    let degree = match (order, symmetry) {
        (ElementOrder::Linear | ElementOrder::Quadratic, Symmetry::Planar) if !boosted => return &DEGREE2,
        (ElementOrder::Linear | ElementOrder::Quadratic, _) => return &DEGREE5,
        (ElementOrder::Cubic, Symmetry::Planar) => 4 + 2 * usize::from(boosted),
        (ElementOrder::Quartic, Symmetry::Planar) => 6 + 2 * usize::from(boosted),
        (ElementOrder::Cubic, Symmetry::Axisymmetric) => 6 + 2 * usize::from(boosted),
        (ElementOrder::Quartic, Symmetry::Axisymmetric) => 8 + 2 * usize::from(boosted),
    };
    rule_of_degree(degree)
}

/// A rule exact for polynomials of an even `degree` from 4 to 16 (made
/// once): Dunavant's symmetric rules up to 10 (6, 12, 16 and 25 points,
/// where the conical product rule takes 9, 16, 25 and 36: every element
/// integral of orders 3 and 4, and the extraction of a probe's field on
/// its sub-triangles, costs that much less), the conical product rule
/// above 10.
pub fn rule_of_degree(degree: usize) -> &'static Rule {
    static RULES: [OnceLock<Rule>; 7] = [const { OnceLock::new() }; 7];
    let d = degree.clamp(4, 16).div_ceil(2) * 2;
    RULES[d / 2 - 2].get_or_init(|| match d {
        4 => symmetric(DUNAVANT4),
        6 => symmetric(DUNAVANT6),
        8 => symmetric(DUNAVANT8),
        10 => symmetric(DUNAVANT10),
        _ => collapsed_gauss(d),
    })
}

/// One orbit of a rule that is symmetric under the triangle's six
/// permutations of its corners, with the weight of each of its points.
#[derive(Clone, Copy)]
enum Orbit {
    /// The centroid.
    Centroid(f64),
    /// The three points with two barycentrics equal to `a`.
    Two { a: f64, w: f64 },
    /// The six permutations of (a, b, 1 - a - b).
    Three { a: f64, b: f64, w: f64 },
}

// D. A. Dunavant, High degree efficient symmetrical Gaussian quadrature
// rules for the triangle, IJNME 21 (1985), rules of degree 4, 6, 8 and 10
// (every weight positive, every point inside). The table's 15 digits were
// taken to double precision by Newton's method on the moment equations
// (orbit by orbit; the values moved by at most 3e-12), and
// `rules_are_exact_to_their_degree` holds each rule to 1e-12.
const DUNAVANT4: &[Orbit] = &[
    Orbit::Two {
        a: 0.445_948_490_915_964_8,
        w: 0.223_381_589_678_011_33,
    },
    Orbit::Two {
        a: 0.091_576_213_509_770_84,
        w: 0.109_951_743_655_322_02,
    },
];
const DUNAVANT6: &[Orbit] = &[
    Orbit::Two {
        a: 0.249_286_745_170_934_71,
        w: 0.116_786_275_726_338_72,
    },
    Orbit::Two {
        a: 0.063_089_014_491_497_3,
        w: 0.050_844_906_370_199_67,
    },
    Orbit::Three {
        a: 0.053_145_049_844_834_11,
        b: 0.310_352_451_033_765_4,
        w: 0.082_851_075_618_397_47,
    },
];
const DUNAVANT8: &[Orbit] = &[
    Orbit::Centroid(0.144_315_607_677_743_73),
    Orbit::Two {
        a: 0.459_292_588_292_685_16,
        w: 0.095_091_634_267_318_02,
    },
    Orbit::Two {
        a: 0.170_569_307_751_716_1,
        w: 0.103_217_370_534_709_53,
    },
    Orbit::Two {
        a: 0.050_547_228_317_028_826,
        w: 0.032_458_497_623_199_946,
    },
    Orbit::Three {
        a: 0.008_394_777_409_921_653,
        b: 0.263_112_829_634_755_24,
        w: 0.027_230_314_174_428_956,
    },
];
const DUNAVANT10: &[Orbit] = &[
    Orbit::Centroid(0.090_817_990_379_758_36),
    Orbit::Two {
        a: 0.485_577_633_383_024_6,
        w: 0.036_725_957_757_312_2,
    },
    Orbit::Two {
        a: 0.109_481_575_485_838_7,
        w: 0.045_321_059_435_846_6,
    },
    Orbit::Three {
        a: 0.141_707_219_417_212_73,
        b: 0.307_939_838_764_104_6,
        w: 0.072_757_916_844_473_14,
    },
    Orbit::Three {
        a: 0.025_003_534_763_491_896,
        b: 0.246_672_560_641_692_2,
        w: 0.028_327_242_531_723_43,
    },
    Orbit::Three {
        a: 0.009_540_815_400_255_769,
        b: 0.066_803_251_013_096_53,
        w: 0.009_421_666_963_930_962,
    },
];

/// The points and weights of a symmetric rule from its orbits.
fn symmetric(orbits: &[Orbit]) -> Rule {
    let (mut points, mut weights) = (Vec::new(), Vec::new());
    for &orbit in orbits {
        let (at, w): (Vec<[f64; 3]>, f64) = match orbit {
            Orbit::Centroid(w) => (vec![[1.0 / 3.0; 3]], w),
            Orbit::Two { a, w } => {
                let b = 1.0 - 2.0 * a;
                (vec![[b, a, a], [a, b, a], [a, a, b]], w)
            }
            Orbit::Three { a, b, w } => {
                let c = 1.0 - a - b;
                (vec![[a, b, c], [a, c, b], [b, a, c], [b, c, a], [c, a, b], [c, b, a]], w)
            }
        };
        weights.extend(std::iter::repeat_n(w, at.len()));
        points.extend(at);
    }
    Rule {
        points: Box::leak(points.into_boxed_slice()),
        weights: Box::leak(weights.into_boxed_slice()),
    }
}

/// The conical product rule exact for polynomials of degree `degree` (even)
/// on the triangle (A. H. Stroud, Approximate Calculation of Multiple Integrals,
/// 1971, sec. 2.7): Gauss-Legendre points in the square mapped onto the
/// triangle by l1 = u, l2 = v (1 - u), whose Jacobian (1 - u) adds one
/// degree in u. Made once, for the degrees above Dunavant's rules here.
fn collapsed_gauss(degree: usize) -> Rule {
    let n = degree / 2 + 1;
    let (x, w) = gauss_legendre(n);
    let mut points = Vec::with_capacity(n * n);
    let mut weights = Vec::with_capacity(n * n);
    for (&u, &wu) in x.iter().zip(&w) {
        for (&v, &wv) in x.iter().zip(&w) {
            let (l1, l2) = (u, v * (1.0 - u));
            points.push([1.0 - l1 - l2, l1, l2]);
            // The square's weights sum to 1 and the Jacobian's integral is 1/2.
            weights.push(2.0 * wu * wv * (1.0 - u));
        }
    }
    Rule {
        points: Box::leak(points.into_boxed_slice()),
        weights: Box::leak(weights.into_boxed_slice()),
    }
}

/// Gauss-Legendre points on [0, 1] with their weights (summing to 1), n
/// of them (1 to 8), made once: the rule along an edge for the stress on a
/// face (3 points) and the error indicator's jumps (4 points).
pub fn edge_rule(n: usize) -> &'static [(f64, f64)] {
    static RULES: [OnceLock<Vec<(f64, f64)>>; 8] = [const { OnceLock::new() }; 8];
    let n = n.clamp(1, 8);
    RULES[n - 1].get_or_init(|| {
        let (x, w) = gauss_legendre(n);
        x.into_iter().zip(w).collect()
    })
}

/// Gauss-Legendre points and weights on [0, 1] (weights summing to 1), by
/// Newton's method on the Legendre polynomial from Chebyshev starting points.
fn gauss_legendre(n: usize) -> (Vec<f64>, Vec<f64>) {
    let mut x = Vec::with_capacity(n);
    let mut w = Vec::with_capacity(n);
    for i in 0..n {
        let mut t = (std::f64::consts::PI * (i as f64 + 0.75) / (n as f64 + 0.5)).cos();
        let mut dp = 1.0;
        for _ in 0..100 {
            let (p, d) = legendre(n, t);
            dp = d;
            let step = p / d;
            t -= step;
            if step.abs() < 1e-16 {
                break;
            }
        }
        x.push(0.5 * (1.0 - t));
        w.push(1.0 / ((1.0 - t * t) * dp * dp));
    }
    (x, w)
}

/// The Legendre polynomial P_n and its derivative at t (three-term recurrence).
fn legendre(n: usize, t: f64) -> (f64, f64) {
    let (mut p0, mut p1) = (1.0, t);
    for k in 2..=n {
        let p2 = ((2 * k - 1) as f64 * t * p1 - (k - 1) as f64 * p0) / k as f64;
        p0 = p1;
        p1 = p2;
    }
    if n == 0 {
        return (1.0, 0.0);
    }
    (p1, n as f64 * (t * p1 - p0) / (t * t - 1.0))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn edge_rules_are_the_tabulated_gauss_legendre_rules() {
        // Abramowitz and Stegun, table 25.4, mapped to [0, 1]: three points at 1/2 and
        // 1/2 -+ sqrt(15)/10 with weights 5/18, 8/18, 5/18.
        let r = edge_rule(3);
        let x = 0.5 - 15f64.sqrt() / 10.0;
        let expected = [(x, 5.0 / 18.0), (0.5, 8.0 / 18.0), (1.0 - x, 5.0 / 18.0)];
        for (a, b) in r.iter().zip(expected) {
            assert!((a.0 - b.0).abs() < 1e-15 && (a.1 - b.1).abs() < 1e-15, "{r:?}");
        }
        // Exact to degree 2n - 1 on [0, 1]: the mean of s^k is 1 / (k + 1).
        for n in 1..=8 {
            for k in 0..2 * n {
                let q: f64 = edge_rule(n).iter().map(|&(s, w)| w * s.powi(k as i32)).sum();
                assert!((q - 1.0 / (k as f64 + 1.0)).abs() < 1e-14, "n {n}, degree {k}: {q}");
            }
        }
    }

    /// The mean of l0^a l1^b l2^c over a triangle, 2 a! b! c! / (a + b + c + 2)!.
    fn exact_mean(a: u32, b: u32, c: u32) -> f64 {
        let f = |k: u32| (1..=k).map(f64::from).product::<f64>();
        2.0 * f(a) * f(b) * f(c) / f(a + b + c + 2)
    }

    /// Each rule integrates every monomial of its degree exactly, and the
    /// next degree not exactly (so the degree claimed is the degree held).
    #[test]
    fn rules_are_exact_to_their_degree() {
        for (rule, degree) in [
            (&DEGREE2, 2),
            (&DEGREE5, 5),
            (&collapsed_gauss(4), 4),
            (&collapsed_gauss(6), 6),
            (&collapsed_gauss(8), 8),
            (&collapsed_gauss(10), 10),
            (&collapsed_gauss(12), 12),
            (&symmetric(DUNAVANT4), 4),
            (&symmetric(DUNAVANT6), 6),
            (&symmetric(DUNAVANT8), 8),
            (&symmetric(DUNAVANT10), 10),
        ] {
            let mean = |a: u32, b: u32, c: u32| -> f64 {
                rule.points
                    .iter()
                    .zip(rule.weights)
                    .map(|(l, w)| w * l[0].powi(a as i32) * l[1].powi(b as i32) * l[2].powi(c as i32))
                    .sum()
            };
            for d in 0..=degree {
                for a in 0..=d {
                    for b in 0..=d - a {
                        let c = d - a - b;
                        let err = (mean(a, b, c) - exact_mean(a, b, c)).abs() / exact_mean(a, b, c);
                        assert!(err < 1e-12, "degree {degree}: l0^{a} l1^{b} l2^{c} off by {err}");
                    }
                }
            }
            let d = degree + 1;
            let worst = (0..=d)
                .flat_map(|a| (0..=d - a).map(move |b| (a, b, d - a - b)))
                .map(|(a, b, c)| (mean(a, b, c) - exact_mean(a, b, c)).abs())
                .fold(0.0, f64::max);
            assert!(worst > 1e-12, "degree {degree} rule is exact at {d} too");
        }
    }
}
