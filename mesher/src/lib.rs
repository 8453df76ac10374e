//! Quality graded constrained Delaunay meshes of 2D magnet assemblies.
//!
//! The mesher turns part shapes (rectangles, polygons, circles) into one
//! constrained Delaunay triangulation (spade), refines it to a local size
//! field that grows by a grading factor away from parts, restores a minimum
//! angle by Ruppert-style refinement, and tags each triangle with the last
//! part that covers it. For an unbounded (`open`) study it also builds the
//! disk that the Kelvin transformation maps the exterior onto.
//!
//! Architecture invariant: no file, terminal or physics code here. Input is
//! plain data ([`MeshSpec`]), output is plain data ([`Mesh`]).
//!
//! # References
//! - J. Ruppert, A Delaunay refinement algorithm for quality 2-dimensional
//!   mesh generation, J. Algorithms 18(3), 1995.
//! - E. M. Freeman, D. A. Lowther, An open boundary technique for
//!   axisymmetric and three dimensional magnetic and electric field
//!   problems, IEEE Trans. Magn. 25(5), 1989.

#![warn(missing_docs)]

mod bisect;
mod boundary_circle;
mod crossings;
mod domain;
mod error;
mod exterior;
pub mod geometry;
mod mesh;
pub mod outline;
mod plane;
mod refine;
mod size_field;
mod spatial;
mod spec;
mod triangulate;

pub use bisect::Split;
pub use domain::Domain;
pub use error::{MeshError, BYTES_PER_TRIANGLE};
pub use exterior::ExteriorDisk;
pub use mesh::{BoundaryTag, Mesh, MeshQuality, Region};
pub use refine::BoundaryCircle;
pub use spec::{
    ordered_box, outside_box, BoxSides, MeshSpec, OuterBoundary, PartSpec, Refinement, Shape, SideKind, Symmetry, BOTTOM, DEFAULT_GRADING, DEFAULT_MIN_ANGLE,
    GRADING_RANGE, LEFT, MIN_ANGLE_RANGE, RIGHT, TOP,
};

/// Builds the mesh of a study: validate shapes, triangulate, refine, tag.
pub fn build_mesh(spec: &MeshSpec) -> Result<Mesh, MeshError> {
    let rings = geometry::part_polygons(spec)?;
    let domain = Domain::enclosing(spec, &rings.rings)?;
    size_field::check_estimate(spec, &rings, &domain)?;
    triangulate::mesh_domain(spec, &rings, &domain)
}

/// Estimated number of triangles the spec would produce (before meshing).
pub fn estimate_triangles(spec: &MeshSpec) -> Result<f64, MeshError> {
    let rings = geometry::part_polygons(spec)?;
    let domain = Domain::enclosing(spec, &rings.rings)?;
    Ok(size_field::estimate(spec, &rings, &domain))
}
