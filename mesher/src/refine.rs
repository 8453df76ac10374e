//! Uniform (red) refinement: every triangle split into four at its edge
//! midpoints. The refined mesh is nested in the coarse one, so a value
//! computed on both converges regularly from one to the other, and their
//! difference measures the discretization error (the study's error
//! estimates rest on this). Triangle shapes, and so the smallest angle, are
//! kept; midpoints of the open boundary's rim go onto the exact circle, in
//! the domain and in the Kelvin-mapped exterior alike.

pub use crate::boundary_circle::BoundaryCircle;
use crate::exterior::ExteriorDisk;
use crate::mesh::{BoundaryTag, Mesh};
use std::collections::HashMap;

/// Midpoint node of each edge, keyed by its sorted end nodes.
type EdgeMidpoints = HashMap<(usize, usize), usize>;

/// An edge's key: its end nodes sorted.
pub(crate) fn key(a: usize, b: usize) -> (usize, usize) {
    (a.min(b), a.max(b))
}

/// The middle of ab.
pub(crate) fn midpoint(a: [f64; 2], b: [f64; 2]) -> [f64; 2] {
    [0.5 * (a[0] + b[0]), 0.5 * (a[1] + b[1])]
}

/// The point at the same angle on the circle (centre, radius); on the axis
/// side of an axisymmetric half-disk r stays non-negative.
pub(crate) fn onto_circle(p: [f64; 2], center: [f64; 2], radius: f64) -> [f64; 2] {
    let d = (p[0] - center[0]).hypot(p[1] - center[1]);
    if d == 0.0 {
        return p;
    }
    [center[0] + (p[0] - center[0]) * radius / d, center[1] + (p[1] - center[1]) * radius / d]
}

/// The four children of a counter-clockwise triangle with midpoints m of
/// edges 0-1, 1-2, 2-0; all counter-clockwise.
fn children(t: [usize; 3], m: [usize; 3]) -> [[usize; 3]; 4] {
    [[t[0], m[0], m[2]], [m[0], t[1], m[1]], [m[2], m[1], t[2]], [m[0], m[1], m[2]]]
}

/// The circle an edge lies on, if it is an outline edge of a round part:
/// both ends within the outline's chord sagitta of the circle (a split point
/// of a chord lies up to that far inside; after refinement every point is on it).
fn circle_of_edge(tag: BoundaryTag, a: [f64; 2], b: [f64; 2], circles: &[BoundaryCircle]) -> Option<BoundaryCircle> {
    let BoundaryTag::Interface(r1, r2) = tag else { return None };
    circles.iter().copied().find(|c| {
        let on = |p: [f64; 2]| ((p[0] - c.center[0]).hypot(p[1] - c.center[1]) - c.radius).abs() <= 1.01 * c.sagitta + 1e-12 * c.radius;
        [r1, r2].contains(&crate::mesh::Region::Part(c.part)) && on(a) && on(b) && along_arc(c, a, b) && tangential(c.center, a, b)
    })
}

/// Whether the edge ab runs along its circle rather than across it: a
/// chord is square to the radius through its middle (a piece of a chord
/// that angle refinement split turns from it by at most half the chord's
/// angle). A short straight edge leaving an arc's end along the radius
/// (a half ring's flat end) has both ends within the outline's sagitta of
/// the circle and its middle on the arc's last angle; taken for the arc,
/// its midpoint went onto the circle, onto the arc's end node, and after
/// a few bisections at the corner two nodes coincided (a half ring at 0.01
/// % stopped with "the system matrix is not positive definite").
fn tangential(center: [f64; 2], a: [f64; 2], b: [f64; 2]) -> bool {
    let m = midpoint(a, b);
    let (u, v) = ([b[0] - a[0], b[1] - a[1]], [m[0] - center[0], m[1] - center[1]]);
    (u[0] * v[0] + u[1] * v[1]).abs() <= 0.5 * u[0].hypot(u[1]) * v[0].hypot(v[1])
}

/// Whether the edge ab runs along the circle's arc (always, for a full
/// circle): its middle is within the arc's angles and no further inside the
/// circle than a chord of the outline's own (a straight edge between two
/// points of the circle is a longer chord, its middle deeper inside).
fn along_arc(c: &BoundaryCircle, a: [f64; 2], b: [f64; 2]) -> bool {
    let Some(arc) = c.arc else { return true };
    let m = midpoint(a, b);
    let depth = c.radius - (m[0] - c.center[0]).hypot(m[1] - c.center[1]);
    arc.spans(m) && depth <= 1.01 * c.sagitta + 1e-12 * c.radius
}

/// Area between the chord ab and the curve from a to b whose distance
/// and angle about `center` run linearly (the circle's arc when both lie on
/// it): the sector swept, dtheta (r_a^2 + r_a dr + dr^2 / 3) / 2, less the
/// triangle of the centre and the chord.
fn arc_segment(center: [f64; 2], a: [f64; 2], b: [f64; 2]) -> f64 {
    let polar = |p: [f64; 2]| ((p[0] - center[0]).hypot(p[1] - center[1]), (p[1] - center[1]).atan2(p[0] - center[0]));
    let ((ra, ta), (rb, tb)) = (polar(a), polar(b));
    let pi = std::f64::consts::PI;
    let dtheta = (tb - ta + pi).rem_euclid(2.0 * pi) - pi;
    let dr = rb - ra;
    let sector = 0.5 * dtheta.abs() * (ra * ra + ra * dr + dr * dr / 3.0);
    (sector - 0.5 * ra * rb * dtheta.abs().sin()).max(0.0)
}

/// Moves the ends of the edges on circles onto them.
pub(crate) fn snap(nodes: &mut [[f64; 2]], on_circle: &HashMap<(usize, usize), BoundaryCircle>) {
    for (&(a, b), c) in on_circle {
        for n in [a, b] {
            nodes[n] = onto_circle(nodes[n], c.center, c.radius);
        }
    }
}

impl Mesh {
    /// The outline edges of round parts, with their circles.
    pub fn edges_on_circles(&self, circles: &[BoundaryCircle]) -> HashMap<(usize, usize), BoundaryCircle> {
        self.boundary
            .iter()
            .filter_map(|&([a, b], tag)| Some((key(a, b), circle_of_edge(tag, self.nodes[a], self.nodes[b], circles)?)))
            .collect()
    }

    /// Area of each part with the edges on round outlines curved onto their
    /// circles as the elements are (`solver::element_map`: radius and angle
    /// about the centre linear along the edge): the chord triangles' area,
    /// plus each such edge's segment on the side of the centre, less it on
    /// the other. A winding's current density is its ampere-turns over this
    /// area, so the curved elements carry exactly its ampere-turns (over the
    /// chord triangles' area a round conductor carried a share of about the
    /// chords' sagitta too much, an error that only a finer mesh reduced).
    pub fn part_areas_curved(&self, n_parts: usize) -> Vec<f64> {
        let mut areas = self.part_areas(n_parts);
        let on_circle = self.edges_on_circles(&self.circles);
        if on_circle.is_empty() {
            return areas;
        }
        for (t, tri) in self.triangles.iter().enumerate() {
            let crate::mesh::Region::Part(i) = self.regions[t] else { continue };
            for k in 0..3 {
                let (a, b, v) = (tri[k], tri[(k + 1) % 3], tri[(k + 2) % 3]);
                let Some(c) = on_circle.get(&key(a, b)) else { continue };
                let (pa, pb) = (self.nodes[a], self.nodes[b]);
                let segment = arc_segment(c.center, pa, pb);
                // The arc bulges away from the centre: the triangle on the
                // centre's side of the chord gains the segment.
                let side = |p: [f64; 2]| crate::plane::orient(pa, pb, p).signum();
                if let Some(area) = areas.get_mut(i) {
                    *area += if side(self.nodes[v]) == side(c.center) { segment } else { -segment };
                }
            }
        }
        areas
    }

    /// Moves the outline nodes of round parts onto their circles: a node that
    /// angle refinement put on a chord sits up to a sagitta inside, and the
    /// first step of refinement would otherwise change the geometry (and the
    /// values) by more than the discretization does.
    pub fn snap_onto(&mut self, circles: &[BoundaryCircle]) {
        let on_circle = self.edges_on_circles(circles);
        snap(&mut self.nodes, &on_circle);
        self.circles = circles.to_vec();
    }

    /// Records the circles that round parts' outlines follow, leaving the
    /// nodes where they are (the elements along them are curved onto them).
    pub fn follow(&mut self, circles: &[BoundaryCircle]) {
        self.circles = circles.to_vec();
    }

    /// This mesh with every triangle split into four (physical domain and
    /// exterior disk); regions and boundary tags are inherited.
    pub fn refined(&self) -> Mesh {
        self.refined_onto(&[])
    }

    /// `refined`, with the outline edges of round parts split on their
    /// circles, and their old nodes moved onto them (a node that angle
    /// refinement put on a chord sat a sagitta inside; left there, the
    /// polygon's error would stay whatever the refinement).
    pub fn refined_onto(&self, circles: &[BoundaryCircle]) -> Mesh {
        let on_circle = self.edges_on_circles(circles);
        let rim = self.exterior.as_ref().map(|d| (d.center, d.radius));
        let rim_edges: std::collections::HashSet<(usize, usize)> = self
            .boundary
            .iter()
            .filter(|(_, t)| *t == BoundaryTag::Rim)
            .map(|(e, _)| key(e[0], e[1]))
            .collect();
        // Physical nodes first: old ones, then the new midpoints.
        let mut nodes: Vec<[f64; 2]> = self.nodes[..self.n_physical].to_vec();
        snap(&mut nodes, &on_circle);
        let mut mids = EdgeMidpoints::new();
        let mut triangles = Vec::with_capacity(4 * self.triangles.len());
        for t in &self.triangles {
            let m = [0, 1, 2].map(|k| {
                let (a, b) = (t[k], t[(k + 1) % 3]);
                *mids.entry(key(a, b)).or_insert_with(|| {
                    let mut p = midpoint(nodes[a], nodes[b]);
                    if let (Some((c, r)), true) = (rim, rim_edges.contains(&key(a, b))) {
                        p = onto_circle(p, c, r);
                    } else if let Some(c) = on_circle.get(&key(a, b)) {
                        p = onto_circle(p, c.center, c.radius);
                    }
                    nodes.push(p);
                    nodes.len() - 1
                })
            });
            triangles.extend(children(*t, m));
        }
        let n_physical = nodes.len();
        let regions = self.regions.iter().flat_map(|r| [*r; 4]).collect();
        let boundary = self
            .boundary
            .iter()
            .flat_map(|&([a, b], tag)| {
                let m = mids[&key(a, b)];
                [([a, m], tag), ([m, b], tag)]
            })
            .collect();
        let mut mesh = Mesh {
            symmetry: self.symmetry,
            nodes,
            n_physical,
            triangles,
            regions,
            boundary,
            exterior: None,
            circles: circles.to_vec(),
        };
        if let Some(disk) = &self.exterior {
            mesh.exterior = Some(refine_exterior(disk, self.n_physical, &mids, &rim_edges, &mut mesh.nodes));
        }
        mesh
    }
}

impl ExteriorDisk {
    /// The disk's global node ids once the physical nodes (the first
    /// `old_physical` of `nodes`) have grown to all of `nodes`: its
    /// exterior-only nodes move after them, appended to `nodes` at their
    /// mapped positions, in their old order.
    pub(crate) fn renumbered(&self, old_physical: usize, nodes: &mut Vec<[f64; 2]>) -> Vec<usize> {
        let first_free = nodes.len();
        let global: Vec<usize> = self
            .global
            .iter()
            .map(|&g| if g < old_physical { g } else { g - old_physical + first_free })
            .collect();
        for (local, &g) in global.iter().enumerate() {
            if g >= first_free {
                debug_assert_eq!(g, nodes.len());
                nodes.push(self.mapped[local]);
            }
        }
        global
    }
}

/// The exterior disk refined: rim edges share the domain's rim midpoints,
/// every other edge gets an exterior-only node (numbered after all
/// physical nodes, whose count grew, so old exterior-only ids shift too).
fn refine_exterior(
    disk: &ExteriorDisk,
    old_physical: usize,
    physical_mids: &EdgeMidpoints,
    rim_edges: &std::collections::HashSet<(usize, usize)>,
    nodes: &mut Vec<[f64; 2]>,
) -> ExteriorDisk {
    let mut global = disk.renumbered(old_physical, nodes);
    let mut mapped = disk.mapped.clone();
    let mut local_mids: HashMap<(usize, usize), usize> = HashMap::new();
    let mut triangles = Vec::with_capacity(4 * disk.triangles.len());
    for t in &disk.triangles {
        let m = [0, 1, 2].map(|k| {
            let (a, b) = (t[k], t[(k + 1) % 3]);
            *local_mids.entry(key(a, b)).or_insert_with(|| {
                let (ga, gb) = (disk.global[a], disk.global[b]);
                let on_rim = ga < old_physical && gb < old_physical && rim_edges.contains(&key(ga, gb));
                let p = midpoint(disk.mapped[a], disk.mapped[b]);
                if on_rim {
                    // The domain's midpoint is on the circle, where the map is the identity.
                    let g = physical_mids[&key(ga, gb)];
                    mapped.push(nodes[g]);
                    global.push(g);
                } else {
                    mapped.push(p);
                    global.push(nodes.len());
                    nodes.push(p);
                }
                mapped.len() - 1
            })
        });
        triangles.extend(children(*t, m));
    }
    ExteriorDisk {
        center: disk.center,
        radius: disk.radius,
        mapped,
        global,
        triangles,
        infinity: disk.infinity,
    }
}

#[cfg(test)]
pub(crate) mod tests {
    use crate::spec::{MeshSpec, OuterBoundary, PartSpec, Shape, Symmetry};

    /// A 10 x 20 mm part in open space, 2 mm elements.
    pub(crate) fn spec(symmetry: Symmetry) -> MeshSpec {
        MeshSpec {
            symmetry,
            parts: vec![PartSpec {
                shape: Shape::Rect {
                    from: [0.0, 0.0],
                    to: [0.01, 0.02],
                },
                mesh_size: 0.002,
            }],
            refinements: Vec::new(),
            outer: OuterBoundary::Open,
            min_angle_deg: 28.0,
            grading: 1.3,
            max_triangles: 1_000_000,
        }
    }

    /// Red refinement by definition: four children per triangle, the same
    /// area per region, the same smallest angle (children are similar to
    /// their parent), rim midpoints on the circle, every exterior node id
    /// after the physical ones and each node used.
    #[test]
    fn red_refinement_keeps_areas_angles_and_the_rim() {
        for symmetry in [Symmetry::Planar, Symmetry::Axisymmetric] {
            let coarse = crate::build_mesh(&spec(symmetry)).unwrap();
            let fine = coarse.refined();
            assert_eq!(fine.triangles.len(), 4 * coarse.triangles.len());
            let (qc, qf) = (coarse.quality(), fine.quality());
            // Rim midpoints move out onto the circle: a little area is gained, none lost.
            assert!(qf.total_area >= qc.total_area * (1.0 - 1e-12) && qf.total_area < qc.total_area * 1.01);
            assert!((qc.min_angle_deg - qf.min_angle_deg).abs() < 0.5, "{qc:?} {qf:?}");
            let ac: f64 = coarse.part_areas(1)[0];
            let af: f64 = fine.part_areas(1)[0];
            assert!((ac - af).abs() < 1e-12 * ac);
            let disk = fine.exterior.as_ref().unwrap();
            assert_eq!(disk.triangles.len(), 4 * coarse.exterior.as_ref().unwrap().triangles.len());
            for (l, &g) in disk.global.iter().enumerate() {
                // New rim midpoints (old rim nodes may be chord split points a sagitta inside).
                if (coarse.n_physical..fine.n_physical).contains(&g) {
                    let p = fine.nodes[g];
                    let d = (p[0] - disk.center[0]).hypot(p[1] - disk.center[1]);
                    assert!(
                        (d - disk.radius).abs() < 1e-9 * disk.radius,
                        "{symmetry:?} rim node {g} (local {l}) at {d}, radius {}, coarse physical {}",
                        disk.radius,
                        coarse.n_physical
                    );
                    let q = disk.mapped[l];
                    assert!((q[0] - p[0]).abs() + (q[1] - p[1]).abs() < 1e-9 * disk.radius);
                }
            }
            let mut used = vec![false; fine.n_nodes()];
            fine.triangles.iter().flatten().for_each(|&n| used[n] = true);
            disk.triangles.iter().flatten().for_each(|&l| used[disk.global[l]] = true);
            assert!(used.iter().all(|&u| u), "every node belongs to a triangle");
            assert!(fine.triangles.iter().flatten().all(|&n| n < fine.n_physical));
        }
    }

    /// A round part of radius 5 mm meshed at 1 mm, its circle, and the disk's area.
    fn round_part() -> (MeshSpec, [crate::refine::BoundaryCircle; 1], f64) {
        let (radius, size) = (0.005, 0.001);
        let mut s = spec(Symmetry::Planar);
        s.parts[0] = PartSpec {
            shape: Shape::Circle { center: [0.0, 0.0], radius },
            mesh_size: size,
        };
        let circle = [crate::refine::BoundaryCircle {
            part: 0,
            center: [0.0, 0.0],
            radius,
            sagitta: crate::geometry::circle_sagitta(radius, size),
            arc: None,
        }];
        (s, circle, std::f64::consts::PI * radius * radius)
    }

    /// A round part's area converges to pi R^2 at the rate of the chords'
    /// sagitta, h^2, once refinement follows the circle (without it, it stays
    /// at the first outline's deficit).
    #[test]
    fn refinement_follows_round_outlines() {
        let (s, circle, exact) = round_part();
        let mut mesh = crate::build_mesh(&s).unwrap();
        mesh.snap_onto(&circle);
        let mut deficits = Vec::new();
        for _ in 0..3 {
            deficits.push(1.0 - mesh.part_areas(1)[0] / exact);
            mesh = mesh.refined_onto(&circle);
        }
        assert!(deficits[0] > 0.0 && deficits[0] < 0.01, "{deficits:?}");
        for w in deficits.windows(2) {
            let ratio = w[0] / w[1];
            assert!((3.5..4.5).contains(&ratio), "deficits {deficits:?}: ratio {ratio}, expected 4");
        }
        let plain = crate::build_mesh(&s).unwrap().refined().refined();
        assert!(1.0 - plain.part_areas(1)[0] / exact > 10.0 * deficits[2], "plain refinement keeps the polygon");
    }

    /// A short edge leaving an arc's end along the radius is not on the
    /// circle, however close to it both its ends lie; a short chord there is.
    #[test]
    fn an_edge_across_a_circle_does_not_follow_it() {
        use crate::mesh::BoundaryTag;
        use crate::refine::{circle_of_edge, BoundaryCircle};
        let circle = BoundaryCircle {
            part: 0,
            center: [0.0, 0.0],
            radius: 0.01,
            sagitta: 3e-4,
            arc: crate::outline::Arc::of_segment([-0.01, 0.0], [0.01, 0.0], -1.0),
        };
        let tag = BoundaryTag::Interface(crate::mesh::Region::Air, crate::mesh::Region::Part(0));
        let radial = circle_of_edge(tag, [0.01, 0.0], [0.01002, 0.0], &[circle]);
        assert!(radial.is_none(), "a radial edge taken for the arc");
        let (t, r) = (1e-3f64, 0.01);
        let chord = circle_of_edge(tag, [r, 0.0], [r * t.cos(), r * t.sin()], &[circle]);
        assert!(chord.is_some(), "a chord at the arc's end not taken for it");
    }

    /// With its outline edges curved onto the circle, a round part whose
    /// outline nodes lie on it has the disk's area pi R^2 on every mesh; the
    /// chord triangles alone fall short by about the sagitta's share.
    #[test]
    fn curved_areas_of_a_round_part_are_the_disks() {
        let (s, circle, exact) = round_part();
        let mut mesh = crate::build_mesh(&s).unwrap();
        mesh.follow(&circle);
        let chord_deficit = 1.0 - mesh.part_areas(1)[0] / exact;
        assert!(chord_deficit > 1e-4, "{chord_deficit}");
        mesh.snap_onto(&circle);
        for _ in 0..2 {
            let off = mesh.part_areas_curved(1)[0] / exact - 1.0;
            assert!(off.abs() < 1e-12, "curved area off by {off:e} (chords {chord_deficit:e})");
            mesh = mesh.refined_onto(&circle);
        }
    }
}
