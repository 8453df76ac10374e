//! Shared helpers of the validation tests: building problems in code and
//! closed-form reference fields with their sources.

pub mod reference;

use mesher::{build_mesh, Mesh, MeshSpec, OuterBoundary, PartSpec, Refinement, Shape, Symmetry};

/// A mesh spec with the case-file defaults (min angle 28 degrees, grading 1.3).
pub fn spec(symmetry: Symmetry, parts: Vec<(Shape, f64)>, refinements: Vec<Refinement>, outer: OuterBoundary) -> MeshSpec {
    MeshSpec {
        symmetry,
        parts: parts.into_iter().map(|(shape, mesh_size)| PartSpec { shape, mesh_size }).collect(),
        refinements,
        outer,
        min_angle_deg: 28.0,
        grading: 1.3,
        max_triangles: 4_000_000,
    }
}

pub fn mesh(spec: &MeshSpec) -> Mesh {
    build_mesh(spec).expect("test geometry meshes")
}

/// Relative error |a - b| / |b|.
pub fn rel(a: f64, b: f64) -> f64 {
    (a - b).abs() / b.abs()
}
