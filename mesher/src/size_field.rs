//! The target element size: each source's size near it, growing linearly
//! (a geometric progression of element sizes, ratio `grading`) away from it.

use crate::domain::Domain;
use crate::error::MeshError;
#[cfg(test)]
use crate::geometry::point_segment_distance;
use crate::geometry::PartRings;
use crate::geometry::{dist, signed_area};
use crate::spec::{MeshSpec, Refinement};

/// Area of an equilateral triangle of unit edge.
const EQUILATERAL: f64 = 0.433_012_701_892_219_3;

/// A segment (or point, when both ends agree) with the size wanted on it.
#[derive(Clone, Copy, Debug)]
pub struct SizeSource {
    pub a: [f64; 2],
    pub b: [f64; 2],
    pub size: f64,
}

/// All size sources of a spec: part edges and probe refinements.
pub fn sources(spec: &MeshSpec, rings: &PartRings) -> Vec<SizeSource> {
    let mut out = Vec::new();
    for (poly, &part) in rings.rings.iter().zip(&rings.part_of) {
        for i in 0..poly.len() {
            out.push(SizeSource {
                a: poly[i],
                b: poly[(i + 1) % poly.len()],
                size: spec.parts[part].mesh_size,
            });
        }
    }
    for r in &spec.refinements {
        match *r {
            Refinement::Point { at, size } => out.push(SizeSource { a: at, b: at, size }),
            Refinement::Line { from, to, size } => out.push(SizeSource { a: from, b: to, size }),
            Refinement::Enclose { .. } => {}
        }
    }
    out
}

/// Size at a point by brute force over sources: the reference the
/// indexed search (`spatial::SourceIndex`) is tested against.
#[cfg(test)]
pub fn size_at(p: [f64; 2], sources: &[SizeSource], grading: f64, max_size: f64) -> f64 {
    sources
        .iter()
        .map(|s| s.size + (grading - 1.0) * point_segment_distance(p, s.a, s.b))
        .fold(max_size, f64::min)
}

/// Rough triangle count: part interiors at their size plus the graded air around
/// each source edge (integral of 1/h^2 over a band growing away from it).
pub fn estimate(spec: &MeshSpec, rings: &PartRings, domain: &Domain) -> f64 {
    let g = (spec.grading - 1.0).max(0.05);
    let mut n = 0.0;
    // Outlines run counter-clockwise and holes clockwise: their signed areas net out.
    for (poly, &part) in rings.rings.iter().zip(&rings.part_of) {
        let h = spec.parts[part].mesh_size.min(domain.max_size);
        n += signed_area(poly) / (EQUILATERAL * h * h);
    }
    for s in sources(spec, rings) {
        let h = s.size.min(domain.max_size);
        let len = dist(s.a, s.b).max(h);
        n += 2.0 * len / (EQUILATERAL * g * h);
    }
    n += domain.area() / (EQUILATERAL * domain.max_size * domain.max_size);
    2.0 * n
}

pub fn check_estimate(spec: &MeshSpec, rings: &PartRings, domain: &Domain) -> Result<(), MeshError> {
    let estimate = estimate(spec, rings, domain);
    if !estimate.is_finite() || estimate > spec.max_triangles as f64 {
        return Err(MeshError::TooManyTriangles {
            estimate,
            limit: spec.max_triangles,
        });
    }
    Ok(())
}
