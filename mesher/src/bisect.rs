//! Local refinement by bisection: the marked triangles are split into
//! four, and just enough of their neighbours are bisected that the mesh
//! stays conforming (no node in the middle of another triangle's edge).
//!
//! Each triangle is bisected at its longest edge first (its refinement
//! edge), and a triangle with any edge to split must split its refinement
//! edge too (the closure), so a child's further cut is always one of its
//! parent's own edges: every triangle ends in two, three or four children
//! (the 4T longest-edge partition). Longest-edge bisection keeps the
//! smallest angle bounded below by a fixed share of the initial one
//! (M. C. Rivara, Algorithms for refining triangular grids suitable for
//! adaptive and multigrid techniques, Int. J. Numer. Meth. Eng. 20(4),
//! 1984; I. G. Rosenberg, F. Stenger, A lower bound on the angles of
//! triangles constructed by bisecting the longest side, Math. Comp. 29,
//! 1975), whatever the number of steps, so the error estimates and the
//! conditioning do not degrade as refinement concentrates at a corner.
//!
//! The Kelvin-mapped exterior is split by the same rules in its own
//! coordinates; an edge of the rim belongs to both sides and is split on
//! both. Midpoints of the rim and of round parts' outlines go onto their
//! circles, as in uniform refinement.

use crate::boundary_circle::BoundaryCircle;
use crate::exterior::ExteriorDisk;
use crate::mesh::{BoundaryTag, Mesh};
use crate::refine::{key, midpoint, onto_circle, snap};
use std::collections::{HashMap, HashSet};

/// An edge: its sorted global end nodes and its side (0: the physical
/// domain and the rim; 1: inside the mapped exterior, where two nodes of
/// the rim may also be joined by a chord of the disk).
type EdgeKey = (usize, usize, u8);

/// Squared distance.
fn dist2(a: [f64; 2], b: [f64; 2]) -> f64 {
    (a[0] - b[0]).powi(2) + (a[1] - b[1]).powi(2)
}

/// The triangle rotated so that its refinement edge, the longest (ties
/// broken by node ids, so the choice does not depend on the order of
/// corners), lies opposite its first corner; the orientation is kept.
fn refinement_first(t: [usize; 3], at: impl Fn(usize) -> [f64; 2], id: impl Fn(usize) -> usize) -> [usize; 3] {
    let edge = |k: usize| {
        let (a, b) = (t[(k + 1) % 3], t[(k + 2) % 3]);
        (dist2(at(a), at(b)), key(id(a), id(b)))
    };
    let k = (0..3)
        .max_by(|&i, &j| edge(i).partial_cmp(&edge(j)).unwrap_or(std::cmp::Ordering::Equal))
        .unwrap_or(0);
    [t[k], t[(k + 1) % 3], t[(k + 2) % 3]]
}

/// Splits `t` (refinement edge opposite its first corner) at the edges
/// that `mid` has a midpoint for: at the refinement edge, then each child
/// at its own refinement edge, which is one of the parent's other edges.
fn split(t: [usize; 3], mid: &impl Fn(usize, usize) -> Option<usize>, out: &mut Vec<[usize; 3]>) {
    match mid(t[1], t[2]) {
        Some(m) => {
            split([m, t[0], t[1]], mid, out);
            split([m, t[2], t[0]], mid, out);
        }
        None => out.push(t),
    }
}

/// Every triangle of the mesh and the exterior with global corners, its
/// refinement edge first, and the key of each of its edges.
struct Triangles {
    /// Corners, global ids (physical triangles first).
    corners: Vec<[usize; 3]>,
    /// Edge keys, the refinement edge (opposite corner 0) first.
    edges: Vec<[EdgeKey; 3]>,
}

impl Triangles {
    fn of(mesh: &Mesh, rim: &HashSet<(usize, usize)>) -> Triangles {
        let mut corners = Vec::new();
        let mut edges = Vec::new();
        for t in &mesh.triangles {
            let t = refinement_first(*t, |n| mesh.nodes[n], |n| n);
            corners.push(t);
            edges.push([0, 1, 2].map(|k| {
                let (a, b) = key(t[(k + 1) % 3], t[(k + 2) % 3]);
                (a, b, 0)
            }));
        }
        if let Some(disk) = &mesh.exterior {
            for t in &disk.triangles {
                let t = refinement_first(*t, |l| disk.mapped[l], |l| disk.global[l]);
                let g = t.map(|l| disk.global[l]);
                corners.push(g);
                edges.push([0, 1, 2].map(|k| exterior_edge(g[(k + 1) % 3], g[(k + 2) % 3], rim)));
            }
        }
        Triangles { corners, edges }
    }
}

/// The key of an edge of the exterior between global nodes a and b.
fn exterior_edge(a: usize, b: usize, rim: &HashSet<(usize, usize)>) -> EdgeKey {
    let (a, b) = key(a, b);
    (a, b, if rim.contains(&(a, b)) { 0 } else { 1 })
}

/// How far a triangle is to be split.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord)]
pub enum Split {
    /// Only as far as its neighbours' splits force it (conformity).
    Keep,
    /// Bisected at its longest edge (two children, more if forced).
    Halve,
    /// All three edges split (four children).
    Quarter,
}

/// The edges to split: the refinement edge of each halved triangle and all
/// three of each quartered one, closed so that every triangle with an edge
/// to split splits its refinement edge.
fn closure(tris: &Triangles, splits: &[Split]) -> HashSet<EdgeKey> {
    let mut sharing: HashMap<EdgeKey, Vec<usize>> = HashMap::with_capacity(2 * tris.edges.len());
    for (i, es) in tris.edges.iter().enumerate() {
        for e in es {
            sharing.entry(*e).or_default().push(i);
        }
    }
    let mut split = HashSet::new();
    let mut work = Vec::new();
    let mark = |e: EdgeKey, split: &mut HashSet<EdgeKey>, work: &mut Vec<usize>| {
        if split.insert(e) {
            work.extend(sharing.get(&e).into_iter().flatten().copied());
        }
    };
    for (es, s) in tris.edges.iter().zip(splits) {
        let n = match s {
            Split::Keep => 0,
            Split::Halve => 1,
            Split::Quarter => 3,
        };
        es[..n].iter().for_each(|&e| mark(e, &mut split, &mut work));
    }
    while let Some(i) = work.pop() {
        let es = tris.edges[i];
        if !split.contains(&es[0]) && es.iter().any(|e| split.contains(e)) {
            mark(es[0], &mut split, &mut work);
        }
    }
    split
}

impl Mesh {
    /// This mesh with its triangles split as asked (one `Split` per
    /// triangle: the physical ones, then those of the exterior disk, the
    /// solver's element order; missing ones are `Keep`) and their
    /// neighbours bisected as conformity needs;
    /// regions and boundary tags are inherited, and the outline edges of
    /// round parts and the rim are split on their circles. A mesh with
    /// periodic sides is refined uniformly instead: the two sides of a
    /// pair must keep matching nodes.
    pub fn bisected(&self, splits: &[Split], circles: &[BoundaryCircle]) -> Mesh {
        if self.boundary.iter().any(|(_, t)| matches!(t, BoundaryTag::Periodic { .. })) {
            return self.refined_onto(circles);
        }
        let on_circle = self.edges_on_circles(circles);
        let rim: HashSet<(usize, usize)> = self
            .boundary
            .iter()
            .filter(|(_, t)| *t == BoundaryTag::Rim)
            .map(|(e, _)| key(e[0], e[1]))
            .collect();
        let tris = Triangles::of(self, &rim);
        let split_edges = closure(&tris, splits);
        let mut nodes: Vec<[f64; 2]> = self.nodes[..self.n_physical].to_vec();
        snap(&mut nodes, &on_circle);
        // Physical midpoints, in a fixed order (sorted keys) so that equal
        // input gives equal output.
        let mut sorted: Vec<EdgeKey> = split_edges.iter().copied().collect();
        sorted.sort_unstable();
        let mut mids: HashMap<EdgeKey, usize> = HashMap::with_capacity(sorted.len());
        for &(a, b, side) in sorted.iter().filter(|e| e.2 == 0) {
            let mut p = midpoint(nodes[a], nodes[b]);
            if let (Some(d), true) = (&self.exterior, rim.contains(&(a, b))) {
                p = onto_circle(p, d.center, d.radius);
            } else if let Some(c) = on_circle.get(&(a, b)) {
                p = onto_circle(p, c.center, c.radius);
            }
            mids.insert((a, b, side), nodes.len());
            nodes.push(p);
        }
        let n_physical = nodes.len();
        let mut triangles = Vec::with_capacity(self.triangles.len() + 3 * split_edges.len());
        let mut regions = Vec::with_capacity(triangles.capacity());
        let find = |a: usize, b: usize| {
            let (a, b) = key(a, b);
            mids.get(&(a, b, 0)).copied()
        };
        for (t, region) in tris.corners[..self.triangles.len()].iter().zip(&self.regions) {
            let before = triangles.len();
            split(*t, &find, &mut triangles);
            regions.resize(triangles.len(), *region);
            debug_assert!(triangles.len() > before);
        }
        let boundary = self
            .boundary
            .iter()
            .flat_map(|&([a, b], tag)| match find(a, b) {
                Some(m) => vec![([a, m], tag), ([m, b], tag)],
                None => vec![([a, b], tag)],
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
            let split_exterior = SplitExterior {
                disk,
                old_physical: self.n_physical,
                rim: &rim,
                mids: &mids,
                split_edges: &sorted,
            };
            mesh.exterior = Some(split_exterior.apply(&tris.corners[self.triangles.len()..], &mut mesh.nodes));
        }
        mesh
    }
}

/// What splitting the exterior disk needs from the physical side.
struct SplitExterior<'a> {
    disk: &'a ExteriorDisk,
    old_physical: usize,
    rim: &'a HashSet<(usize, usize)>,
    /// Midpoints of the physical (and rim) edges, new global ids.
    mids: &'a HashMap<EdgeKey, usize>,
    /// Every edge to split, sorted.
    split_edges: &'a [EdgeKey],
}

impl SplitExterior<'_> {
    /// The split disk: its old exterior-only nodes renumbered after all
    /// physical nodes, then a node for each split edge inside the disk; a
    /// split rim edge shares the domain's midpoint (on the circle, where the
    /// map is the identity). `corners` are the disk's triangles in global
    /// ids, refinement edge first.
    fn apply(&self, corners: &[[usize; 3]], nodes: &mut Vec<[f64; 2]>) -> ExteriorDisk {
        let disk = self.disk;
        let mut global = disk.renumbered(self.old_physical, nodes);
        let mut mapped = disk.mapped.clone();
        // Old global id -> local id, for the corners handed in as global ids.
        let local_of: HashMap<usize, usize> = disk.global.iter().enumerate().map(|(l, &g)| (g, l)).collect();
        let mut local_mid: HashMap<EdgeKey, usize> = HashMap::new();
        for &(a, b, side) in self.split_edges {
            let on_disk = local_of.contains_key(&a) && local_of.contains_key(&b);
            if !on_disk || (side == 0 && !self.rim.contains(&(a, b))) {
                continue;
            }
            let l = mapped.len();
            if side == 0 {
                let g = self.mids[&(a, b, 0)];
                mapped.push(nodes[g]);
                global.push(g);
            } else {
                let p = midpoint(disk.mapped[local_of[&a]], disk.mapped[local_of[&b]]);
                mapped.push(p);
                global.push(nodes.len());
                nodes.push(p);
            }
            local_mid.insert((a, b, side), l);
        }
        let old_global = &disk.global;
        let find = |la: usize, lb: usize| {
            let (ga, gb) = (old_global.get(la)?, old_global.get(lb)?);
            local_mid.get(&exterior_edge(*ga, *gb, self.rim)).copied()
        };
        let mut triangles = Vec::with_capacity(2 * corners.len());
        for t in corners {
            split(t.map(|g| local_of[&g]), &find, &mut triangles);
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
}

#[cfg(test)]
mod tests {
    use super::Split;
    use crate::mesh::{BoundaryTag, Mesh};
    use crate::spec::Symmetry;
    use std::collections::HashMap;

    fn magnet(symmetry: Symmetry) -> Mesh {
        crate::build_mesh(&crate::refine::tests::spec(symmetry)).unwrap()
    }

    /// Conformity: an edge used by one triangle only lies on a boundary
    /// of the mesh (a hanging node would leave its long edge used once).
    fn assert_conforming(mesh: &Mesh) {
        let mut uses: HashMap<(usize, usize), usize> = HashMap::new();
        for t in &mesh.triangles {
            for k in 0..3 {
                *uses.entry(crate::refine::key(t[k], t[(k + 1) % 3])).or_default() += 1;
            }
        }
        let outer: std::collections::HashSet<(usize, usize)> = mesh
            .boundary
            .iter()
            .filter(|(_, t)| !matches!(t, BoundaryTag::Interface(..)))
            .map(|(e, _)| crate::refine::key(e[0], e[1]))
            .collect();
        for (e, n) in &uses {
            assert!(*n == 2 || (*n == 1 && outer.contains(e)), "edge {e:?} used {n} times");
        }
        assert_eq!(outer.iter().filter(|e| uses.get(e) != Some(&1)).count(), 0, "a boundary edge lost its triangle");
        let disk = mesh.exterior.as_ref().unwrap();
        let local: HashMap<usize, usize> = disk.global.iter().enumerate().map(|(l, &g)| (g, l)).collect();
        let mut uses: HashMap<(usize, usize), usize> = HashMap::new();
        for t in &disk.triangles {
            for k in 0..3 {
                let (a, b) = (disk.global[t[k]], disk.global[t[(k + 1) % 3]]);
                *uses.entry(crate::refine::key(a, b)).or_default() += 1;
            }
        }
        let on_axis = |e: &(usize, usize)| {
            mesh.symmetry == Symmetry::Axisymmetric && disk.mapped[local[&e.0]][0].abs() < 1e-12 && disk.mapped[local[&e.1]][0].abs() < 1e-12
        };
        let rim: Vec<(usize, usize)> = mesh
            .boundary
            .iter()
            .filter(|(_, t)| *t == BoundaryTag::Rim)
            .map(|(e, _)| crate::refine::key(e[0], e[1]))
            .collect();
        for (e, n) in &uses {
            assert!(*n == 2 || (*n == 1 && (rim.contains(e) || on_axis(e))), "exterior edge {e:?} used {n} times");
        }
        assert!(rim.iter().all(|e| uses.get(e) == Some(&1)), "the rim is split alike on both sides");
    }

    /// Refining at one corner, step after step: the mesh stays conforming
    /// on both sides of the rim, keeps its area, grows locally (a few
    /// triangles per step, not four times), and its smallest angle stays
    /// above half the first mesh's (Rosenberg and Stenger 1975 prove a
    /// bound of half for bisection at the longest edge).
    #[test]
    fn bisection_at_a_corner_stays_conforming_and_shapely() {
        for symmetry in [Symmetry::Planar, Symmetry::Axisymmetric] {
            let mut mesh = magnet(symmetry);
            let (area, angle) = (mesh.quality().total_area, mesh.quality().min_angle_deg);
            let corner = [0.01, 0.02];
            assert_conforming(&mesh);
            for step in 0..12 {
                let near = |t: &[usize; 3]| t.iter().any(|&n| (mesh.nodes[n][0] - corner[0]).hypot(mesh.nodes[n][1] - corner[1]) < 1e-9);
                let marked: Vec<Split> = mesh.triangles.iter().map(|t| if near(t) { Split::Quarter } else { Split::Keep }).collect();
                assert!(marked.contains(&Split::Quarter), "step {step}: the corner is a node");
                let before = mesh.triangles.len();
                mesh = mesh.bisected(&marked, &[]);
                assert_conforming(&mesh);
                let q = mesh.quality();
                assert!(
                    (q.total_area - area).abs() < 1e-12 * area,
                    "{symmetry:?} step {step}: area {} against {area}",
                    q.total_area
                );
                assert!(
                    q.min_angle_deg > 0.5 * angle,
                    "{symmetry:?} step {step}: {} deg against {angle}",
                    q.min_angle_deg
                );
                let added = mesh.triangles.len() - before;
                assert!(added > 0 && added < before / 5, "{symmetry:?} step {step}: {added} triangles added to {before}");
            }
        }
    }

    /// Marking every triangle splits each into four, with the same area and
    /// rim nodes on the circle, and the exterior's nodes all in use.
    #[test]
    fn marking_everything_splits_everything() {
        let coarse = magnet(Symmetry::Axisymmetric);
        let n = coarse.triangles.len() + coarse.exterior.as_ref().unwrap().triangles.len();
        let fine = coarse.bisected(&vec![Split::Quarter; n], &[]);
        assert_conforming(&fine);
        assert_eq!(fine.triangles.len(), 4 * coarse.triangles.len());
        let disk = fine.exterior.as_ref().unwrap();
        assert_eq!(disk.triangles.len(), 4 * coarse.exterior.as_ref().unwrap().triangles.len());
        let mut used = vec![false; fine.n_nodes()];
        fine.triangles.iter().flatten().for_each(|&n| used[n] = true);
        disk.triangles.iter().flatten().for_each(|&l| used[disk.global[l]] = true);
        assert!(used.iter().all(|&u| u), "every node belongs to a triangle");
        for (e, t) in &fine.boundary {
            if *t == BoundaryTag::Rim {
                for n in e {
                    let p = fine.nodes[*n];
                    let d = (p[0] - disk.center[0]).hypot(p[1] - disk.center[1]);
                    assert!((d - disk.radius).abs() < 1e-3 * disk.radius, "rim node {n} at {d}");
                }
            }
        }
    }
}
