//! Where the outlines of two parts cross (a later magnet cutting through a
//! plate), the crossing point becomes a vertex of both outlines before
//! they are split and constrained. Left to the constrained triangulation,
//! the crossing was inserted a hair from a split point of the other
//! outline, and the tiny edge between them sent the angle refinement past
//! any vertex budget (the study was refused as too large to mesh).

use crate::geometry::bbox;

/// Each polygon with the proper crossings of its edges with every other
/// polygon's edges inserted in order along the edge (points where the two
/// edges cross at a single point inside both; touching, collinear and
/// end-point contacts are left as they are).
pub fn with_crossings(polygons: &[Vec<[f64; 2]>]) -> Vec<Vec<[f64; 2]>> {
    let boxes: Vec<([f64; 2], [f64; 2])> = polygons.iter().map(|p| bbox(p.iter().copied())).collect();
    let overlap = |i: usize, j: usize| {
        let (a, b) = (boxes[i], boxes[j]);
        a.0[0] <= b.1[0] && b.0[0] <= a.1[0] && a.0[1] <= b.1[1] && b.0[1] <= a.1[1]
    };
    polygons
        .iter()
        .enumerate()
        .map(|(i, poly)| {
            let others: Vec<usize> = (0..polygons.len()).filter(|&j| j != i && overlap(i, j)).collect();
            if others.is_empty() {
                return poly.clone();
            }
            let n = poly.len();
            let mut out = Vec::with_capacity(n);
            for k in 0..n {
                let (a, b) = (poly[k], poly[(k + 1) % n]);
                out.push(a);
                let mut on_edge: Vec<(f64, [f64; 2])> = Vec::new();
                for &j in &others {
                    let q = &polygons[j];
                    for m in 0..q.len() {
                        if let Some(t) = crossing(a, b, q[m], q[(m + 1) % q.len()]) {
                            on_edge.push((t, [a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1])]));
                        }
                    }
                }
                on_edge.sort_by(|x, y| x.0.total_cmp(&y.0));
                out.extend(on_edge.into_iter().map(|x| x.1));
            }
            out
        })
        .collect()
}

/// The parameter t in (0, 1) along ab where ab crosses cd at one point
/// strictly inside both, or None (parallel, touching or apart).
fn crossing(a: [f64; 2], b: [f64; 2], c: [f64; 2], d: [f64; 2]) -> Option<f64> {
    let r = [b[0] - a[0], b[1] - a[1]];
    let s = [d[0] - c[0], d[1] - c[1]];
    let den = r[0] * s[1] - r[1] * s[0];
    let scale = (r[0].hypot(r[1]) * s[0].hypot(s[1])).max(f64::MIN_POSITIVE);
    if den.abs() <= 1e-12 * scale {
        return None;
    }
    let w = [c[0] - a[0], c[1] - a[1]];
    let t = (w[0] * s[1] - w[1] * s[0]) / den;
    let u = (w[0] * r[1] - w[1] * r[0]) / den;
    let inside = |x: f64| x > 1e-9 && x < 1.0 - 1e-9;
    (inside(t) && inside(u)).then_some(t)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A plate cut by a block: the plate's long edges each gain the two
    /// crossings, in order; the block's sides each gain two; a square
    /// touching another along an edge gains nothing.
    #[test]
    fn crossings_become_vertices_of_both_outlines() {
        let plate = vec![[-20.0, 15.0], [60.0, 15.0], [60.0, 18.0], [-20.0, 18.0]];
        let block = vec![[20.0, 0.0], [30.0, 0.0], [30.0, 20.0], [20.0, 20.0]];
        let got = with_crossings(&[plate, block]);
        assert_eq!(
            got[0],
            vec![
                [-20.0, 15.0],
                [20.0, 15.0],
                [30.0, 15.0],
                [60.0, 15.0],
                [60.0, 18.0],
                [30.0, 18.0],
                [20.0, 18.0],
                [-20.0, 18.0]
            ]
        );
        assert_eq!(
            got[1],
            vec![
                [20.0, 0.0],
                [30.0, 0.0],
                [30.0, 15.0],
                [30.0, 18.0],
                [30.0, 20.0],
                [20.0, 20.0],
                [20.0, 18.0],
                [20.0, 15.0]
            ]
        );
        let a = vec![[0.0, 0.0], [1.0, 0.0], [1.0, 1.0], [0.0, 1.0]];
        let b = vec![[1.0, 0.0], [2.0, 0.0], [2.0, 1.0], [1.0, 1.0]];
        assert_eq!(with_crossings(&[a.clone(), b.clone()]), vec![a, b]);
    }
}
