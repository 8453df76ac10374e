//! Why a geometry could not be meshed; each variant names the part involved.

use std::fmt;

/// A geometry or meshing failure, always caused by the input.
#[derive(Clone, Debug, PartialEq)]
pub enum MeshError {
    /// A part outline with fewer than three points.
    TooFewPoints {
        /// part index in the spec
        part: usize,
        /// points given
        count: usize,
    },
    /// Two consecutive points of an outline coincide.
    RepeatedPoint {
        /// part index in the spec
        part: usize,
        /// index of the repeated point
        index: usize,
    },
    /// Two edges of an outline cross.
    SelfIntersection {
        /// part index in the spec
        part: usize,
        /// the crossing edges, by their first point
        edges: [usize; 2],
    },
    /// A hole is not inside its part's outline, or touches it or another hole.
    HoleOutside {
        /// part index in the spec
        part: usize,
        /// the hole, counted from 0
        hole: usize,
    },
    /// An outline encloses no area.
    ZeroArea {
        /// part index in the spec
        part: usize,
    },
    /// An axisymmetric part reaches r < 0.
    AcrossAxis {
        /// part index in the spec
        part: usize,
    },
    /// A coordinate is NaN or infinite.
    NotFinite {
        /// part index in the spec
        part: usize,
    },
    /// A mesh size is not a positive finite length.
    BadSize {
        /// part index in the spec
        part: usize,
        /// the size given
        size: f64,
    },
    /// A part is absurdly large or small for the others.
    OutOfRange {
        /// part index in the spec
        part: usize,
        /// its extent
        extent: f64,
    },
    /// The mesh would exceed the triangle limit.
    TooManyTriangles {
        /// estimated triangles
        estimate: f64,
        /// the limit
        limit: usize,
    },
    /// The triangulation itself failed (message from the Delaunay step).
    Triangulation(String),
    /// The spec has no part.
    NoParts,
}

/// Peak memory per triangle of a quadratic solve, measured by the project's
/// benchmark (1.25 GB at 527 000 triangles): a rough guide for refusals.
pub const BYTES_PER_TRIANGLE: f64 = 2400.0;

impl fmt::Display for MeshError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        use MeshError::*;
        match self {
            TooFewPoints { part, count } => write!(f, "part {part}: a polygon needs at least 3 points, found {count}"),
            RepeatedPoint { part, index } => write!(f, "part {part}: point {index} repeats the point before it"),
            SelfIntersection { part, edges } => write!(f, "part {part}: the polygon crosses itself (edges {} and {})", edges[0], edges[1]),
            ZeroArea { part } => write!(f, "part {part}: the shape has zero area"),
            HoleOutside { part, hole } => write!(f, "part {part}: hole {} is not inside the outline, or touches the outline or another hole", hole + 1),
            AcrossAxis { part } => write!(f, "part {part}: the shape crosses the symmetry axis (axisymmetric shapes must lie in r >= 0; only a circle centred on the axis may cross it, as a sphere)"),
            NotFinite { part } => write!(f, "part {part}: a coordinate is not a finite number"),
            BadSize { part, size } => write!(f, "part {part}: mesh size must be a positive finite length, got {size}"),
            OutOfRange { part, extent } => write!(f, "part {part}: the shape spans {extent:.3e} m, outside the sensible range 1e-6 m to 1e4 m"),
            TooManyTriangles { estimate, limit } => write!(
                f,
                "the mesh would need about {estimate:.3e} triangles (about {:.1} GB of memory to solve), more than the limit of {limit}; coarsen mesh.size or mesh_size, or raise the limit with [mesh] max_elements",
                estimate * BYTES_PER_TRIANGLE / 1e9
            ),
            Triangulation(msg) => write!(f, "triangulation failed: {msg}"),
            NoParts => write!(f, "the study has no parts"),
        }
    }
}

impl std::error::Error for MeshError {}
