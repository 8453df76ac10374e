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

mod domain;
mod error;
mod exterior;
pub mod geometry;
mod mesh;
mod size_field;
mod triangulate;

pub use domain::{Domain, OuterBoundary};
pub use error::MeshError;
pub use exterior::ExteriorDisk;
pub use geometry::{Shape, Symmetry};
pub use mesh::{BoundaryTag, Mesh, MeshQuality, Region};

/// One part to be meshed: a shape and the target edge length in and near it.
#[derive(Clone, Debug)]
pub struct PartSpec {
    pub shape: Shape,
    pub mesh_size: f64,
}

/// Something that is not a part but wants a fine mesh near it (a probe).
#[derive(Clone, Debug)]
pub enum Refinement {
    Point { at: [f64; 2], size: f64 },
    Line { from: [f64; 2], to: [f64; 2], size: f64 },
}

/// Everything the mesher needs, in consistent length units (metres in practice).
#[derive(Clone, Debug)]
pub struct MeshSpec {
    pub symmetry: Symmetry,
    pub parts: Vec<PartSpec>,
    pub refinements: Vec<Refinement>,
    pub outer: OuterBoundary,
    /// Minimum angle of every triangle, degrees (clamped to 20..=33).
    pub min_angle_deg: f64,
    /// Ratio by which element size may grow per element away from parts.
    pub grading: f64,
    /// Refuse (before or during meshing) to make more triangles than this.
    pub max_triangles: usize,
}

/// Builds the mesh of a study: validate shapes, triangulate, refine, tag.
pub fn build_mesh(spec: &MeshSpec) -> Result<Mesh, MeshError> {
    let polygons = geometry::part_polygons(spec)?;
    let domain = Domain::enclosing(spec, &polygons)?;
    size_field::check_estimate(spec, &polygons, &domain)?;
    triangulate::mesh_domain(spec, &polygons, &domain)
}

/// Estimated number of triangles the spec would produce (before meshing).
pub fn estimate_triangles(spec: &MeshSpec) -> Result<f64, MeshError> {
    let polygons = geometry::part_polygons(spec)?;
    let domain = Domain::enclosing(spec, &polygons)?;
    Ok(size_field::estimate(spec, &polygons, &domain))
}
