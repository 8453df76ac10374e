//! One constrained Delaunay triangulation of the domain and all parts,
//! refined to the graded size field, then to the minimum angle.

use crate::domain::Domain;
use crate::error::MeshError;
use crate::exterior;
use crate::geometry::{dist, Symmetry};
use crate::mesh::{BoundaryTag, Mesh, Region};
use crate::size_field;
use crate::spatial::{PolygonIndex, SourceIndex};
use crate::spec::{MeshSpec, GRADING_RANGE, MIN_ANGLE_RANGE};
use rayon::prelude::*;
use spade::handles::{FixedFaceHandle, FixedVertexHandle, InnerTag};
use spade::{AngleLimit, ConstrainedDelaunayTriangulation, Point2, RefinementParameters, Triangulation};

#[path = "periodic.rs"]
mod periodic;

type Cdt = ConstrainedDelaunayTriangulation<Point2<f64>>;

/// The working state of the mesher: the triangulation and a target size per vertex.
struct Work<'a> {
    cdt: Cdt,
    size: Vec<f64>,
    /// Every size source (part edges and probes), indexed.
    sources: SourceIndex,
    /// The probes' sources alone.
    probe_sources: SourceIndex,
    /// The part outlines, indexed by their boxes.
    parts: PolygonIndex,
    grading: f64,
    max_size: f64,
    polygons: &'a [Vec<[f64; 2]>],
    part_sizes: Vec<f64>,
    axisymmetric: bool,
    /// Set once the outline (which holds the axis) is in.
    constrained_axis: bool,
}

/// A pass inserting fewer than one point per this many vertices is followed
/// by a local pass around the new points instead of a whole-mesh pass.
const LOCAL_PASS_SHARE: usize = 10;
/// A point of a refinement pass is left out when one inserted in the same
/// pass lies closer than this share of its size (`Work::crowded_by_new`).
/// On that row of blocks 0.2, 0.3, 0.5 and 0.7 gave 42 000, 39 000,
/// 31 000 and 36 000 triangles (the angle refinement adds more at 0.7);
/// at 0.5 a cylinder's far axis probe at 0.001 % came out 380 times closer
/// than its estimate (above the tenth of the target that excuses it) and a
/// probe inside a magnet near its corner missed 0.01 % on four meshes; at
/// 0.3 neither, and the examples within a tenth of 0.5's times
/// (docs/measurement-log.md).
const CROWDING_SHARE: f64 = 0.3;

/// Rounds coordinates below any sensible geometry scale to zero, so that
/// points meant to be on the axis are exactly on it.
fn snap(v: f64) -> f64 {
    if v.abs() < 1e-15 {
        0.0
    } else {
        v
    }
}

pub fn mesh_domain(spec: &MeshSpec, rings: &crate::geometry::PartRings, domain: &Domain) -> Result<Mesh, MeshError> {
    let polygons = &rings.rings;
    let mut work = Work {
        cdt: Cdt::new(),
        size: Vec::new(),
        sources: SourceIndex::new(size_field::sources(spec, rings)),
        probe_sources: SourceIndex::new(size_field::sources(spec, rings).split_off(polygons.iter().map(Vec::len).sum())),
        parts: PolygonIndex::new(polygons, &rings.part_of),
        grading: spec.grading.clamp(GRADING_RANGE.0, GRADING_RANGE.1),
        max_size: domain.max_size,
        polygons,
        part_sizes: spec.parts.iter().map(|p| p.mesh_size).collect(),
        axisymmetric: spec.symmetry == Symmetry::Axisymmetric || domain.cut.is_some(),
        constrained_axis: false,
    };
    let outline = match domain.kelvin {
        // The rim is split on the circle itself: bisected chords would leave
        // points a rounding error inside the hull, and slivers with them.
        Some((c, radius)) => {
            let samples = crate::domain::circle_outline(c, radius, false, 2.0 * std::f64::consts::PI * radius / 4096.0);
            let rim_size = samples.iter().map(|&p| work.size_at(p)).fold(f64::INFINITY, f64::min);
            // 0.9: chords a little shorter than the size, so that no chord is bisected.
            crate::domain::circle_outline(c, radius, domain.cut.is_some(), 0.9 * rim_size)
        }
        None => domain.outline.clone(),
    };
    work.add_polyline(&outline, true)?;
    work.constrained_axis = true;
    // Crossings of two parts' outlines are vertices of both (crossings.rs).
    for poly in crate::crossings::with_crossings(polygons) {
        work.add_polyline(&poly, true)?;
    }
    let max_vertices = spec.max_triangles / 2 + 1000;
    work.refine_to_size(max_vertices, spec.max_triangles)?;
    work.refine_angles(spec.min_angle_deg, max_vertices, spec.max_triangles)?;
    if let Some((b0, b1, sides)) = &domain.sides {
        work.match_periodic_sides(*b0, *b1, sides, spec.min_angle_deg, max_vertices, spec.max_triangles)?;
    }
    let mut mesh = work.extract(spec.symmetry, domain);
    if let Some((c, radius)) = domain.kelvin {
        attach_exterior(&mut mesh, c, radius, domain.cut.is_some())?;
    }
    Ok(mesh)
}

impl Work<'_> {
    /// Size at a point: the graded field of every source, and the size of
    /// every part whose outline holds the point (so that an edge between
    /// two parts is split for the finer of the two).
    fn size_at(&self, p: [f64; 2]) -> f64 {
        let graded = self.sources.size_at(p, self.grading, self.max_size);
        self.parts
            .containing(self.polygons, p)
            .into_iter()
            .map(|i| self.part_sizes[i])
            .fold(graded, f64::min)
    }

    /// Size wanted by the probes alone (few sources, so brute force is cheap).
    fn probe_size_at(&self, p: [f64; 2]) -> f64 {
        self.probe_sources.size_at(p, self.grading, self.max_size)
    }

    /// True for an edge on the axis r = 0 that the outline already constrains.
    fn on_axis(&self, a: FixedVertexHandle, b: FixedVertexHandle) -> bool {
        self.axisymmetric && self.cdt.vertex(a).position().x == 0.0 && self.cdt.vertex(b).position().x == 0.0 && self.constrained_axis
    }

    fn insert(&mut self, p: [f64; 2], size: f64, hint: Option<FixedVertexHandle>) -> Result<FixedVertexHandle, MeshError> {
        let pt = Point2::new(snap(p[0]), snap(p[1]));
        let v = match hint {
            Some(h) => self.cdt.insert_with_hint(pt, h),
            None => self.cdt.insert(pt),
        }
        .map_err(|e| MeshError::Triangulation(format!("point ({:.6e}, {:.6e}): {e:?}", p[0], p[1])))?;
        let i = v.index();
        if i >= self.size.len() {
            self.size.resize(i + 1, f64::INFINITY);
        }
        self.size[i] = self.size[i].min(size);
        Ok(v)
    }

    /// Inserts a polyline split so that no piece is longer than the local size.
    fn add_points(&mut self, pts: &[[f64; 2]], closed: bool) -> Result<Vec<FixedVertexHandle>, MeshError> {
        let n = pts.len();
        let segs = if closed { n } else { n - 1 };
        let mut handles = Vec::new();
        for i in 0..segs.max(1) {
            let (a, b) = (pts[i], pts[(i + 1) % n]);
            let mut pieces = vec![a];
            if n > 1 {
                self.split_segment(a, b, 0, &mut pieces);
            }
            for p in pieces {
                let s = self.size_at(p);
                handles.push(self.insert_snapped(p, s)?);
            }
        }
        if !closed && n > 1 {
            let s = self.size_at(pts[n - 1]);
            handles.push(self.insert(pts[n - 1], s, handles.last().copied())?);
        }
        Ok(handles)
    }

    /// Appends the interior split points of ab (not a, not b) by bisection
    /// until no piece is longer than the size at its ends and middle.
    fn split_segment(&self, a: [f64; 2], b: [f64; 2], depth: u32, out: &mut Vec<[f64; 2]>) {
        let m = [0.5 * (a[0] + b[0]), 0.5 * (a[1] + b[1])];
        let h = self.size_at(a).min(self.size_at(b)).min(self.size_at(m));
        if dist(a, b) <= h || depth > 30 {
            return;
        }
        self.split_segment(a, m, depth + 1, out);
        out.push(m);
        self.split_segment(m, b, depth + 1, out);
    }

    /// Inserts a boundary point, reusing an existing vertex closer than a
    /// millionth of the local size: collinear edges of touching parts split
    /// independently would otherwise leave slivers that no refinement can heal.
    fn insert_snapped(&mut self, p: [f64; 2], size: f64) -> Result<FixedVertexHandle, MeshError> {
        use spade::PositionInTriangulation::*;
        let pt = Point2::new(snap(p[0]), snap(p[1]));
        let near = match self.cdt.locate(pt) {
            OnVertex(v) => Some(v),
            OnEdge(e) => self
                .cdt
                .directed_edge(e)
                .vertices()
                .into_iter()
                .find(|v| dist([v.position().x, v.position().y], p) < 1e-6 * size)
                .map(|v| v.fix()),
            OnFace(f) => self
                .cdt
                .face(f)
                .vertices()
                .into_iter()
                .find(|v| dist([v.position().x, v.position().y], p) < 1e-6 * size)
                .map(|v| v.fix()),
            _ => None,
        };
        match near {
            Some(v) => {
                self.size[v.index()] = self.size[v.index()].min(size);
                Ok(v)
            }
            None => self.insert(p, size, None),
        }
    }

    fn add_polyline(&mut self, pts: &[[f64; 2]], closed: bool) -> Result<(), MeshError> {
        let handles = self.add_points(pts, closed)?;
        let m = handles.len();
        for i in 0..m {
            let (a, b) = (handles[i], handles[(i + 1) % m]);
            if a != b && !self.on_axis(a, b) {
                self.cdt.add_constraint_and_split(a, b, |p| Point2::new(snap(p.x), snap(p.y)));
            }
        }
        let n = self.cdt.num_vertices();
        for i in self.size.len()..n {
            let p = self.cdt.vertex(FixedVertexHandle::from_index(i)).position();
            let s = self.size_at([p.x, p.y]);
            self.size.push(s);
        }
        Ok(())
    }

    /// The centroid to insert in face `f` if it is longer than its target
    /// size (and not held by a long constraint edge), with the new point's
    /// size. A face's corners already carry its part's size (the outline's
    /// points were sized with it, and every point inside was inserted no
    /// larger), so the part is looked up only for a face found too long, for
    /// the new point's size: a flood fill of every face's region on every
    /// whole-mesh pass was a sixth of the mesher's time.
    fn split(&self, f: FixedFaceHandle<InnerTag>) -> Option<([f64; 2], f64, FixedVertexHandle)> {
        let face = self.cdt.face(f);
        let vs = face.vertices();
        let pos = vs.map(|v| [v.position().x, v.position().y]);
        let hs = vs.map(|v| self.size[v.fix().index()]);
        let centroid = [(pos[0][0] + pos[1][0] + pos[2][0]) / 3.0, (pos[0][1] + pos[1][1] + pos[2][1]) / 3.0];
        let probe = self.probe_size_at(centroid);
        let target = hs.iter().copied().fold(probe, f64::min);
        let edges = face.adjacent_edges();
        let lens = edges.map(|e| {
            let [p, q] = e.positions();
            (p.x - q.x).hypot(p.y - q.y)
        });
        let k = (0..3).fold(0, |m, i| if lens[i] > lens[m] { i } else { m });
        // A long constraint edge (only where the pre-split missed a size) is
        // left as it is: a centroid would not shorten it.
        if lens[k] <= target || edges[k].is_constraint_edge() {
            return None;
        }
        let rs = self.region_size_at(face.positions()).min(probe);
        let grown = (0..3).map(|k| hs[k] + (self.grading - 1.0) * dist(centroid, pos[k])).fold(rs, f64::min);
        Some((centroid, grown, vs[0].fix()))
    }

    /// Inserts the centroid of every triangle longer than its target size,
    /// pass after pass: whole-mesh passes while many triangles are oversize,
    /// then passes over the faces around the points just inserted.
    fn refine_to_size(&mut self, max_vertices: usize, max_triangles: usize) -> Result<(), MeshError> {
        let mut recent: Option<Vec<FixedVertexHandle>> = None;
        loop {
            let pending: Vec<([f64; 2], f64, FixedVertexHandle)> = match &recent {
                // Whole-mesh passes look at every face on every core (in face order).
                None => {
                    let faces: Vec<FixedFaceHandle<InnerTag>> = self.cdt.fixed_inner_faces().collect();
                    faces.par_iter().filter_map(|&f| self.split(f)).collect()
                }
                Some(vertices) => {
                    let mut faces: Vec<_> = vertices
                        .iter()
                        .flat_map(|&v| {
                            self.cdt
                                .vertex(v)
                                .out_edges()
                                .filter_map(|e| e.face().as_inner())
                                .map(|f| f.fix())
                                .collect::<Vec<_>>()
                        })
                        .collect();
                    faces.sort_unstable();
                    faces.dedup();
                    faces.into_iter().filter_map(|f| self.split(f)).collect()
                }
            };
            if pending.is_empty() {
                return Ok(());
            }
            if self.cdt.num_vertices() + pending.len() > max_vertices {
                return Err(MeshError::TooManyTriangles {
                    estimate: 2.0 * (self.cdt.num_vertices() + pending.len()) as f64,
                    limit: max_triangles,
                });
            }
            let before = self.cdt.num_vertices();
            let mut inserted = Vec::with_capacity(pending.len());
            for (c, s, hint) in &pending {
                if !self.crowded_by_new(*c, *s, *hint, before) {
                    inserted.push(self.insert(*c, *s, Some(*hint))?);
                }
            }
            if self.cdt.num_vertices() == before {
                return Ok(());
            }
            // Few insertions: the next pass need only look around them.
            recent = (inserted.len() * LOCAL_PASS_SHARE < self.cdt.num_vertices()).then_some(inserted);
        }
    }

    /// True when a point of this pass (index `first_new` or later) already
    /// lies within `CROWDING_SHARE` of `size` of `p`. The faces of a fan
    /// around a fine vertex are all too long for that vertex's size, and
    /// their centroids, found on the mesh before the pass, lie a third of the
    /// fan's spacing apart in a row where the size is several times that:
    /// a row of eight 10 mm magnet blocks at 0.5 mm came out with 0.2 mm
    /// elements 10 to 30 mm out, where the size field asks for 3 to 9 mm
    /// (82 000 triangles; 39 000 with this test). The next pass looks at the
    /// faces again, so no face too long is left unsplit: the first point of
    /// every pass is always inserted.
    fn crowded_by_new(&self, p: [f64; 2], size: f64, hint: FixedVertexHandle, first_new: usize) -> bool {
        use spade::PositionInTriangulation::*;
        let near = |v: FixedVertexHandle| {
            let q = self.cdt.vertex(v).position();
            v.index() >= first_new && dist([q.x, q.y], p) < CROWDING_SHARE * size
        };
        match self.cdt.locate_with_hint(Point2::new(snap(p[0]), snap(p[1])), hint) {
            OnVertex(_) => true,
            OnEdge(e) => self.cdt.directed_edge(e).vertices().iter().any(|v| near(v.fix())),
            OnFace(f) => self.cdt.face(f).vertices().iter().any(|v| near(v.fix())),
            _ => false,
        }
    }

    /// Target size of the region holding a triangle (the last part holding its centroid).
    fn region_size_at(&self, p: [Point2<f64>; 3]) -> f64 {
        let c = [(p[0].x + p[1].x + p[2].x) / 3.0, (p[0].y + p[1].y + p[2].y) / 3.0];
        self.parts.last_containing(self.polygons, c).map_or(f64::INFINITY, |i| self.part_sizes[i])
    }

    fn refine_angles(&mut self, min_angle: f64, max_vertices: usize, max_triangles: usize) -> Result<(), MeshError> {
        let angle = min_angle.clamp(MIN_ANGLE_RANGE.0, MIN_ANGLE_RANGE.1);
        let extra = max_vertices.saturating_sub(self.cdt.num_vertices());
        let params = RefinementParameters::<f64>::new()
            .with_angle_limit(AngleLimit::from_deg(angle))
            .with_max_additional_vertices(extra);
        let result = self.cdt.refine(params);
        if !result.refinement_complete && self.cdt.num_vertices() >= max_vertices {
            return Err(MeshError::TooManyTriangles {
                estimate: 2.0 * self.cdt.num_vertices() as f64,
                limit: max_triangles,
            });
        }
        Ok(())
    }

    fn extract(&self, symmetry: Symmetry, domain: &Domain) -> Mesh {
        let nodes: Vec<[f64; 2]> = self.cdt.vertices().map(|v| onto_box_sides([v.position().x, v.position().y], domain)).collect();
        let regions_by_face = face_regions(&self.cdt, self.polygons, &self.parts);
        let mut triangles = Vec::with_capacity(self.cdt.num_inner_faces());
        let mut regions = Vec::with_capacity(self.cdt.num_inner_faces());
        for face in self.cdt.inner_faces() {
            triangles.push(face.vertices().map(|v| v.fix().index()));
            regions.push(regions_by_face[face.fix().index()].unwrap_or(Region::Air));
        }
        let mut boundary = Vec::new();
        for edge in self.cdt.convex_hull() {
            let [a, b] = edge.vertices().map(|v| v.fix().index());
            let on_axis = (symmetry == Symmetry::Axisymmetric || domain.cut.is_some()) && nodes[a][0].abs() <= 0.0 && nodes[b][0].abs() <= 0.0;
            let tag = if on_axis {
                match domain.cut {
                    Some(Some(flux_normal)) => BoundaryTag::Mirror { flux_normal },
                    _ => BoundaryTag::Axis,
                }
            } else if domain.kelvin.is_some() {
                BoundaryTag::Rim
            } else {
                box_side_tag(domain, nodes[a], nodes[b])
            };
            boundary.push(([a, b], tag));
        }
        for edge in self.cdt.undirected_edges() {
            if !edge.is_constraint_edge() {
                continue;
            }
            let [d0, d1] = [edge.as_directed(), edge.as_directed().rev()];
            let (f0, f1) = (d0.face().as_inner(), d1.face().as_inner());
            if let (Some(f0), Some(f1)) = (f0, f1) {
                let r0 = regions_by_face[f0.fix().index()].unwrap_or(Region::Air);
                let r1 = regions_by_face[f1.fix().index()].unwrap_or(Region::Air);
                if r0 != r1 {
                    let [a, b] = edge.vertices().map(|v| v.fix().index());
                    boundary.push(([a, b], BoundaryTag::Interface(r0, r1)));
                }
            }
        }
        let n_physical = nodes.len();
        Mesh {
            symmetry,
            nodes,
            n_physical,
            triangles,
            regions,
            boundary,
            exterior: None,
            circles: Vec::new(),
        }
    }
}

/// Points within this share of the box's extent of a box side lie on it
/// (`onto_box_sides`, the periodic matching).
pub(crate) const BOX_TOLERANCE: f64 = 1e-9;

/// A point within a billionth of the box's extent of a box side, put on it
/// exactly: the angle refinement splits a side's edges at blends of their
/// ends, which can land a rounding error off x = const, and an edge so
/// placed was tagged as no side at all (`box_side_tag` compares exactly):
/// on a periodic array's right side it held the potential at zero, and the
/// field came out 30 % off.
fn onto_box_sides(mut p: [f64; 2], domain: &Domain) -> [f64; 2] {
    if let Some((b0, b1, _)) = &domain.sides {
        for c in 0..2 {
            let tol = BOX_TOLERANCE * (b1[c] - b0[c]);
            for v in [b0[c], b1[c]] {
                if (p[c] - v).abs() <= tol {
                    p[c] = v;
                }
            }
        }
    }
    p
}

/// The tag of a box edge: what the side it lies on was named.
fn box_side_tag(domain: &Domain, a: [f64; 2], b: [f64; 2]) -> BoundaryTag {
    let Some((b0, b1, sides)) = &domain.sides else { return BoundaryTag::Outer };
    // Bottom, right, top, left: the coordinate each holds fixed, and its value.
    let lines = [(1, b0[1]), (0, b1[0]), (1, b1[1]), (0, b0[0])];
    let Some(side) = lines.iter().position(|&(c, v)| a[c] == v && b[c] == v) else {
        return BoundaryTag::Outer;
    };
    match sides[side] {
        crate::spec::SideKind::Far => BoundaryTag::Outer,
        crate::spec::SideKind::Mirror { flux_normal } => BoundaryTag::Mirror { flux_normal },
        crate::spec::SideKind::Periodic { anti } => BoundaryTag::Periodic { side: side as u8, anti },
    }
}

/// Region of every inner face: flood fill across non-constraint edges, then
/// one point-in-polygon test per connected component (last part wins).
fn face_regions(cdt: &Cdt, polygons: &[Vec<[f64; 2]>], parts: &PolygonIndex) -> Vec<Option<Region>> {
    let n = cdt.num_inner_faces() + 1;
    let mut region: Vec<Option<Region>> = vec![None; n];
    let mut stack = Vec::new();
    for start in cdt.inner_faces() {
        if region[start.fix().index()].is_some() {
            continue;
        }
        let p = start.positions();
        let c = [(p[0].x + p[1].x + p[2].x) / 3.0, (p[0].y + p[1].y + p[2].y) / 3.0];
        let r = parts.last_containing(polygons, c).map_or(Region::Air, Region::Part);
        region[start.fix().index()] = Some(r);
        stack.push(start);
        while let Some(face) = stack.pop() {
            for edge in face.adjacent_edges() {
                if edge.is_constraint_edge() {
                    continue;
                }
                if let Some(next) = edge.rev().face().as_inner() {
                    let slot = &mut region[next.fix().index()];
                    if slot.is_none() {
                        *slot = Some(r);
                        stack.push(next);
                    }
                }
            }
        }
    }
    region
}

/// The Kelvin-mapped exterior joined at the rim; `half`: the disk is cut
/// on x = 0 (the axis, or a planar symmetry plane), and the cut's ends on
/// the circle are rim nodes too.
fn attach_exterior(mesh: &mut Mesh, c: [f64; 2], radius: f64, half: bool) -> Result<(), MeshError> {
    let mut rim: Vec<usize> = mesh.boundary.iter().filter(|(_, t)| *t == BoundaryTag::Rim).flat_map(|(e, _)| *e).collect();
    if half {
        rim.extend(
            mesh.boundary
                .iter()
                .filter(|(_, t)| matches!(t, BoundaryTag::Axis | BoundaryTag::Mirror { .. }))
                .flat_map(|(e, _)| *e)
                .filter(|&n| (dist(mesh.nodes[n], c) - radius).abs() <= 1e-9 * radius),
        );
    }
    rim.sort_unstable();
    rim.dedup();
    // Every rim node onto the exact circle: a node that refinement put on a
    // rim chord sits a sagitta inside it, while the exterior maps it on the
    // circle, so one unknown stood for two places and the field near the rim
    // kept an error that no refinement removed (1e-4 at a probe at 0.9 of the
    // radius). A sagitta is far below a triangle's size: no triangle turns.
    for &n in &rim {
        mesh.nodes[n] = exterior::onto_circle(mesh.nodes[n], c, radius);
    }
    let rim: Vec<(usize, [f64; 2])> = rim.into_iter().map(|n| (n, mesh.nodes[n])).collect();
    let disk = exterior::build(c, radius, &rim, half, mesh.nodes.len())?;
    for local in rim.len()..disk.mapped.len() {
        mesh.nodes.push(disk.mapped[local]);
    }
    mesh.exterior = Some(disk);
    Ok(())
}
