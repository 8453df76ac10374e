//! The circles a mesh follows: round parts' outlines and the arcs of
//! outlines. Plain data, so the mesh can carry them (its elements are curved
//! onto them) without depending on the refinement that also reads them.

/// A part whose outline is a circle: refinement puts the midpoints of its
/// boundary edges on the circle, so the geometry converges with the mesh.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct BoundaryCircle {
    /// The part's index (its region).
    pub part: usize,
    /// Centre of the circle.
    pub center: [f64; 2],
    /// Its radius.
    pub radius: f64,
    /// How far inside the circle the meshed outline may lie: the sagitta of
    /// its chords (`geometry::circle_sagitta`).
    pub sagitta: f64,
    /// For an arc of an outline, the arc: only edges along it follow the
    /// circle (a straight edge of the same part may end on the circle too).
    pub arc: Option<crate::outline::Arc>,
}

impl BoundaryCircle {
    /// The circles that refinement must follow for a part's shape: a
    /// circle's, and every arc of its rings.
    pub fn of_shape(part: usize, shape: &crate::spec::Shape, size: f64) -> Vec<BoundaryCircle> {
        match shape {
            crate::spec::Shape::Circle { center, radius } => vec![BoundaryCircle {
                part,
                center: *center,
                radius: *radius,
                sagitta: crate::geometry::circle_sagitta(*radius, size),
                arc: None,
            }],
            crate::spec::Shape::Rings(rings) => rings
                .iter()
                .flat_map(|r| crate::outline::ring_arcs(r))
                .map(|arc| BoundaryCircle {
                    part,
                    center: arc.center,
                    radius: arc.radius,
                    sagitta: arc.radius * (1.0 - (0.5 * arc.sweep.abs() / arc.chords(size) as f64).cos()),
                    arc: Some(arc),
                })
                .collect(),
            _ => Vec::new(),
        }
    }
}
