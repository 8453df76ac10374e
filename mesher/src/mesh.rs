//! The plain-data mesh handed to the solver, with its quality figures.

use crate::exterior::ExteriorDisk;
use crate::geometry::{orient, Symmetry};

/// What a triangle of the physical domain is made of.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Region {
    /// Air (no part).
    Air,
    /// Index of the part in the order of the case file.
    Part(usize),
}

/// What a boundary or interface edge is.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum BoundaryTag {
    /// The symmetry axis r = 0 of an axisymmetric study.
    Axis,
    /// The outer box of a flux-parallel study.
    Outer,
    /// The circle where the Kelvin-mapped exterior joins the domain.
    Rim,
    /// A side of the box named a symmetry plane (`flux_normal`: nothing
    /// imposed; otherwise zero potential).
    Mirror {
        /// flux crosses it at right angles
        flux_normal: bool,
    },
    /// A side of the box in a periodic pair: `side` is its index in
    /// `BoxSides` (the right side repeats the left, the top the bottom).
    Periodic {
        /// bottom, right, top or left (0 to 3)
        side: u8,
        /// the potential changes sign across the period
        anti: bool,
    },
    /// An edge between two different regions.
    Interface(Region, Region),
}

/// Triangles, nodes and tags of a study.
///
/// Nodes `0..n_physical` lie in the physical domain; nodes after that belong
/// only to the Kelvin-mapped exterior and have no physical position.
#[derive(Clone, Debug)]
pub struct Mesh {
    /// Planar or axisymmetric.
    pub symmetry: Symmetry,
    /// Node positions.
    pub nodes: Vec<[f64; 2]>,
    /// Nodes of the physical domain (the exterior disk adds its own after them).
    pub n_physical: usize,
    /// Counter-clockwise node triples of the physical domain.
    pub triangles: Vec<[usize; 3]>,
    /// Region of each triangle.
    pub regions: Vec<Region>,
    /// Tagged boundary edges.
    pub boundary: Vec<([usize; 2], BoundaryTag)>,
    /// The Kelvin-mapped exterior disk of an open study.
    pub exterior: Option<ExteriorDisk>,
    /// The circles that round parts' outlines follow (elements with an edge
    /// on one are curved onto it); empty until `follow` or `snap_onto` sets them.
    pub circles: Vec<crate::boundary_circle::BoundaryCircle>,
}

/// Summary figures of a mesh.
#[derive(Clone, Debug)]
pub struct MeshQuality {
    /// Smallest angle of any triangle, degrees.
    pub min_angle_deg: f64,
    /// Smallest triangle area.
    pub min_area: f64,
    /// Total area of the physical triangles.
    pub total_area: f64,
}

impl Mesh {
    /// Number of nodes (physical and exterior).
    pub fn n_nodes(&self) -> usize {
        self.nodes.len()
    }

    /// The corner positions of triangle t.
    pub fn triangle_points(&self, t: usize) -> [[f64; 2]; 3] {
        self.triangles[t].map(|n| self.nodes[n])
    }

    /// Area of triangle t.
    pub fn triangle_area(&self, t: usize) -> f64 {
        let [a, b, c] = self.triangle_points(t);
        0.5 * orient(a, b, c)
    }

    /// Triangles per region (air first, then parts by index).
    pub fn triangles_per_part(&self, n_parts: usize) -> (usize, Vec<usize>) {
        let mut per = vec![0; n_parts];
        let mut air = 0;
        for r in &self.regions {
            match r {
                Region::Air => air += 1,
                Region::Part(i) if *i < n_parts => per[*i] += 1,
                Region::Part(_) => {}
            }
        }
        (air, per)
    }

    /// Area of each part as meshed.
    pub fn part_areas(&self, n_parts: usize) -> Vec<f64> {
        let mut areas = vec![0.0; n_parts];
        for (t, r) in self.regions.iter().enumerate() {
            if let Region::Part(i) = r {
                areas[*i] += self.triangle_area(t);
            }
        }
        areas
    }

    /// Quality figures of the physical triangles.
    pub fn quality(&self) -> MeshQuality {
        let mut q = MeshQuality {
            min_angle_deg: 180.0,
            min_area: f64::INFINITY,
            total_area: 0.0,
        };
        // The smallest angle has the largest cosine: one arccosine for the
        // whole mesh (three a triangle were most of this loop's time).
        let mut cos_max = f64::NEG_INFINITY;
        for t in 0..self.triangles.len() {
            let area = self.triangle_area(t);
            q.min_area = q.min_area.min(area);
            q.total_area += area;
            cos_max = cos_max.max(max_cosine(self.triangle_points(t)));
        }
        q.min_angle_deg = angle_deg(cos_max);
        q
    }
}

/// The angle of a cosine, degrees (180 for none: an empty mesh).
fn angle_deg(cos: f64) -> f64 {
    cos.clamp(-1.0, 1.0).acos().to_degrees()
}

/// Largest cosine of a triangle's three interior angles; an angle at a
/// repeated corner has none (NaN) and is left out, as `f64::max` does.
fn max_cosine(p: [[f64; 2]; 3]) -> f64 {
    (0..3)
        .map(|k| {
            let (a, b, c) = (p[k], p[(k + 1) % 3], p[(k + 2) % 3]);
            let u = [b[0] - a[0], b[1] - a[1]];
            let v = [c[0] - a[0], c[1] - a[1]];
            (u[0] * v[0] + u[1] * v[1]) / ((u[0] * u[0] + u[1] * u[1]) * (v[0] * v[0] + v[1] * v[1])).sqrt()
        })
        .fold(f64::NEG_INFINITY, f64::max)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn one_triangle(p: [[f64; 2]; 3]) -> Mesh {
        Mesh {
            symmetry: Symmetry::Planar,
            nodes: p.to_vec(),
            n_physical: 3,
            triangles: vec![[0, 1, 2]],
            regions: vec![Region::Air],
            boundary: Vec::new(),
            exterior: None,
            circles: Vec::new(),
        }
    }

    /// Elementary geometry: a right isosceles triangle's angles are 45, 45
    /// and 90 degrees; a 30-60-90 triangle's smallest is 30.
    #[test]
    fn smallest_angle_of_known_triangles() {
        let q = one_triangle([[0.0, 0.0], [1.0, 0.0], [0.0, 1.0]]).quality();
        assert!((q.min_angle_deg - 45.0).abs() < 1e-12, "{q:?}");
        assert!((q.total_area - 0.5).abs() < 1e-15, "{q:?}");
        let q = one_triangle([[0.0, 0.0], [3f64.sqrt(), 0.0], [0.0, 1.0]]).quality();
        assert!((q.min_angle_deg - 30.0).abs() < 1e-12, "{q:?}");
    }
}
