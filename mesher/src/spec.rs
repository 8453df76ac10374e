//! What the mesher is asked for: part shapes, refinements, the outer
//! boundary and the quality settings, as plain data in consistent length
//! units (metres in practice), with the defaults and ranges of the settings
//! defined once.

/// Default smallest angle of every triangle, degrees.
pub const DEFAULT_MIN_ANGLE: f64 = 28.0;
/// Smallest angles the refinement accepts, degrees (Ruppert's refinement
/// terminates for angles up to about 33.8 degrees in practice).
pub const MIN_ANGLE_RANGE: (f64, f64) = (20.0, 33.0);
/// Default growth of the element size per element away from parts.
pub const DEFAULT_GRADING: f64 = 1.3;
/// Gradings accepted.
pub const GRADING_RANGE: (f64, f64) = (1.05, 3.0);

/// Planar studies use (x, y); axisymmetric studies use (r, z) with r >= 0.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Symmetry {
    /// Cross-section of a long assembly: points are (x, y).
    Planar,
    /// Body of revolution about the z axis: points are (r, z).
    Axisymmetric,
}

/// A part's outline as the case file gives it.
#[derive(Clone, Debug, PartialEq)]
pub enum Shape {
    /// A closed polygon, its points in order.
    Polygon(Vec<[f64; 2]>),
    /// An axis-aligned rectangle between two corners.
    Rect {
        /// one corner
        from: [f64; 2],
        /// the opposite corner
        to: [f64; 2],
    },
    /// A circle (chords bounded by a sagitta).
    Circle {
        /// its centre
        center: [f64; 2],
        /// its radius
        radius: f64,
    },
    /// Rings of straight and arc segments: the outline first, then its
    /// holes (each arc split into chords bounded by a sagitta, as circles are).
    Rings(Vec<Vec<Vertex>>),
}

/// A vertex of a ring and the bulge of the segment from it to the next
/// vertex (0 for a straight segment).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Vertex {
    /// The point.
    pub at: [f64; 2],
    /// tan(theta / 4) of the arc to the next vertex; positive: counter-clockwise.
    pub bulge: f64,
}

/// How the outside of the model is closed.
#[derive(Clone, Debug, PartialEq)]
pub enum OuterBoundary {
    /// Unbounded space: a disk (half-disk when axisymmetric) whose exterior is
    /// mapped by the Kelvin transformation onto a second disk.
    Open,
    /// Unbounded space cut by a symmetry plane on the line x = 0 (planar),
    /// the half x >= 0 modelled: a half disk and its half Kelvin exterior,
    /// the plane flux-normal (nothing imposed) or flux-parallel (zero potential).
    OpenHalf {
        /// flux crosses the plane at right angles
        flux_normal: bool,
    },
    /// A box: zero potential (flux parallel) on its sides, unless a side
    /// is named a symmetry plane or one of a periodic pair.
    FluxParallel {
        /// two corners of the box; None picks twice the parts' extent
        from_to: Option<([f64; 2], [f64; 2])>,
        /// what each side is, in the order bottom, right, top, left
        sides: BoxSides,
    },
}

impl OuterBoundary {
    /// The flux-parallel box's lower-left and upper-right corners, where
    /// the case gives the box (its two corners may come in any order).
    pub fn given_box(&self) -> Option<([f64; 2], [f64; 2])> {
        match self {
            OuterBoundary::FluxParallel { from_to: Some((a, b)), .. } => Some(ordered_box(*a, *b)),
            _ => None,
        }
    }
}

/// The lower-left and upper-right corners of the box with corners `a` and `b`.
pub fn ordered_box(a: [f64; 2], b: [f64; 2]) -> ([f64; 2], [f64; 2]) {
    ([a[0].min(b[0]), a[1].min(b[1])], [a[0].max(b[0]), a[1].max(b[1])])
}

/// Whether `p` lies outside the box `lo`..`hi` (its sides count as inside).
pub fn outside_box((lo, hi): ([f64; 2], [f64; 2]), p: [f64; 2]) -> bool {
    p[0] < lo[0] || p[1] < lo[1] || p[0] > hi[0] || p[1] > hi[1]
}

/// What one side of a flux-parallel box is.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum SideKind {
    /// A far wall: zero potential, flux parallel to it (the default).
    #[default]
    Far,
    /// A symmetry plane of the assembly: flux parallel to it (zero
    /// potential) or normal to it (the natural condition, nothing imposed).
    /// Unlike a far wall, a force's stress band may reach it.
    Mirror {
        /// flux crosses at right angles (true) or runs along it (false)
        flux_normal: bool,
    },
    /// One of two opposite sides on which the potential repeats (`anti`:
    /// repeats with its sign turned, as over half a period of alternating poles).
    Periodic {
        /// the potential changes sign from one side to the other
        anti: bool,
    },
}

/// The four sides of a box: bottom, right, top, left (counter-clockwise
/// from the lower left corner, the order of the box's outline).
pub type BoxSides = [SideKind; 4];

/// Index of the bottom side in [`BoxSides`].
pub const BOTTOM: usize = 0;
/// Index of the right side in [`BoxSides`].
pub const RIGHT: usize = 1;
/// Index of the top side in [`BoxSides`].
pub const TOP: usize = 2;
/// Index of the left side in [`BoxSides`].
pub const LEFT: usize = 3;

/// One part to be meshed: a shape and the target edge length in and near it.
#[derive(Clone, Debug)]
pub struct PartSpec {
    /// The outline.
    pub shape: Shape,
    /// Target edge length in and near the part.
    pub mesh_size: f64,
}

/// Something that is not a part but wants a fine mesh near it (a probe).
#[derive(Clone, Debug)]
pub enum Refinement {
    /// A point to be resolved finely.
    Point {
        /// the point
        at: [f64; 2],
        /// target edge length there
        size: f64,
    },
    /// A segment to be resolved finely.
    Line {
        /// one end
        from: [f64; 2],
        /// the other end
        to: [f64; 2],
        /// target edge length along it
        size: f64,
    },
    /// A point the domain must hold, with no mesh size of its own: the end
    /// of a flux line, whose flux is read from the potential there (an end
    /// past the open boundary's rim gave NaN).
    Enclose {
        /// the point
        at: [f64; 2],
    },
}

/// Everything the mesher needs, in consistent length units (metres in practice).
#[derive(Clone, Debug)]
pub struct MeshSpec {
    /// Planar or axisymmetric.
    pub symmetry: Symmetry,
    /// The parts, later ones covering earlier ones where they overlap.
    pub parts: Vec<PartSpec>,
    /// Places other than parts that want a fine mesh.
    pub refinements: Vec<Refinement>,
    /// How the outside is closed.
    pub outer: OuterBoundary,
    /// Minimum angle of every triangle, degrees (clamped to [`MIN_ANGLE_RANGE`]).
    pub min_angle_deg: f64,
    /// Ratio by which element size may grow per element away from parts
    /// (clamped to [`GRADING_RANGE`]).
    pub grading: f64,
    /// Refuse (before or during meshing) to make more triangles than this.
    pub max_triangles: usize,
}
