//! Periodic pairs of box sides: the mesh's nodes on one side of a pair are
//! the images of those on the other, so that each node can be tied to its
//! image (the solver's constraints). The angle refinement splits boundary
//! edges where it needs to, on one side at a time; the images of its new
//! points are inserted on the other side and the refinement is run again
//! until both sides hold the same points.

use super::Work;
use crate::error::MeshError;
use crate::spec::{BoxSides, SideKind, BOTTOM, LEFT};
use crate::triangulate::BOX_TOLERANCE;
use spade::Triangulation;

/// Rounds of inserting images and refining again before giving up.
const MAX_ROUNDS: usize = 40;

/// The two pairs of opposite sides: (axis along the side, fixed coordinate
/// index). Left and right are x = const (points matched by y); bottom and
/// top are y = const (matched by x).
fn pairs(sides: &BoxSides) -> Vec<usize> {
    [LEFT, BOTTOM]
        .into_iter()
        .filter(|&k| matches!(sides[k], SideKind::Periodic { .. }))
        .map(|k| if k == LEFT { 0 } else { 1 })
        .collect()
}

impl Work<'_> {
    /// Inserts on each periodic side the images of the other side's points
    /// and refines again, until the two sides match point for point.
    pub(super) fn match_periodic_sides(
        &mut self,
        b0: [f64; 2],
        b1: [f64; 2],
        sides: &BoxSides,
        min_angle: f64,
        max_vertices: usize,
        max_triangles: usize,
    ) -> Result<(), MeshError> {
        let fixed_axes = pairs(sides);
        if fixed_axes.is_empty() {
            return Ok(());
        }
        for _ in 0..MAX_ROUNDS {
            let missing: Vec<[f64; 2]> = fixed_axes.iter().flat_map(|&c| self.missing_images(c, b0, b1)).collect();
            if missing.is_empty() {
                return self.check_no_triangle_spans(&fixed_axes, b0, b1);
            }
            for p in missing {
                let s = self.size_at(p);
                self.insert(p, s, None)?;
            }
            self.refine_angles(min_angle, max_vertices, max_triangles)?;
        }
        Err(MeshError::Triangulation(
            "the periodic sides' meshes could not be matched point for point".into(),
        ))
    }

    /// Points on one side of the pair fixed in coordinate `c` whose image on
    /// the other side is not yet a vertex. On a side means within a
    /// billionth of the box: the angle refinement splits a side's edges at
    /// points computed as blends of its ends, which can land a rounding error
    /// off x = const (a quartic periodic array's right side once kept such a
    /// point without an image, and the tie of its nodes left the system
    /// matrix not positive definite).
    fn missing_images(&self, c: usize, b0: [f64; 2], b1: [f64; 2]) -> Vec<[f64; 2]> {
        let along = 1 - c;
        let tol = BOX_TOLERANCE * (b1[along] - b0[along]);
        let across = BOX_TOLERANCE * (b1[c] - b0[c]);
        let on = |x: f64| -> Vec<f64> {
            let mut v: Vec<f64> = self
                .cdt
                .vertices()
                .map(|v| [v.position().x, v.position().y])
                .filter(|p| (p[c] - x).abs() <= across)
                .map(|p| p[along])
                .collect();
            v.sort_by(f64::total_cmp);
            v
        };
        let (low, high) = (on(b0[c]), on(b1[c]));
        let image = |t: f64, x: f64| {
            let mut p = [0.0; 2];
            p[c] = x;
            p[along] = t;
            p
        };
        let lacking = |from: &[f64], to: &[f64]| -> Vec<f64> { from.iter().copied().filter(|&t| !near(to, t, tol)).collect() };
        let mut out: Vec<[f64; 2]> = lacking(&low, &high).into_iter().map(|t| image(t, b1[c])).collect();
        out.extend(lacking(&high, &low).into_iter().map(|t| image(t, b0[c])));
        out
    }

    /// No triangle may touch both sides of a pair: its two nodes there would
    /// be one unknown held twice by one element.
    fn check_no_triangle_spans(&self, fixed_axes: &[usize], b0: [f64; 2], b1: [f64; 2]) -> Result<(), MeshError> {
        for face in self.cdt.inner_faces() {
            let p = face.positions();
            for &c in fixed_axes {
                let across = BOX_TOLERANCE * (b1[c] - b0[c]);
                let at = |x: f64| p.iter().any(|q| ([q.x, q.y][c] - x).abs() <= across);
                if at(b0[c]) && at(b1[c]) {
                    return Err(MeshError::Triangulation(
                        "a triangle reaches across the periodic cell from one side to the other: give the parts a finer mesh size".into(),
                    ));
                }
            }
        }
        Ok(())
    }
}

/// Whether the sorted values hold one within `tol` of t.
fn near(sorted: &[f64], t: f64, tol: f64) -> bool {
    let i = sorted.partition_point(|&v| v < t - tol);
    sorted.get(i).is_some_and(|&v| v <= t + tol)
}
