//! DXF sections: the ASCII drawing exchange format's group-code pairs read
//! into the entities a cross-section is drawn with (LINE, ARC, CIRCLE,
//! LWPOLYLINE with bulges, POLYLINE with its VERTEX entities), on one
//! layer, joined end to end into closed loops. No file access here: the
//! caller reads the text.

use mesher::outline::Vertex;

/// A drawn piece: from `a` to `b`, an arc when `bulge` is not 0.
#[derive(Clone, Debug, PartialEq)]
struct Piece {
    a: [f64; 2],
    b: [f64; 2],
    bulge: f64,
    /// The entity's handle (group code 5), or its kind and position in the file.
    entity: String,
}

/// What the drawing holds on a layer: closed loops, and open pieces to join.
#[derive(Debug, Default)]
struct Layer {
    loops: Vec<Vec<Vertex>>,
    pieces: Vec<Piece>,
}

/// Why a section could not be read.
#[derive(Clone, Debug, PartialEq)]
pub enum DxfError {
    /// The text is not a DXF of group-code pairs.
    Malformed(String),
    /// Nothing on the layer; the layers that have entities are listed.
    EmptyLayer(Vec<String>),
    /// A loop closes on itself with no area (a line drawn there and back).
    NoArea {
        /// the entity that closes it
        entity: String,
    },
    /// A loop does not close: the last entity reached, and the gap to the nearest free end.
    Gap {
        /// the entity at the open end
        entity: String,
        /// the gap, in drawing units
        gap: f64,
    },
}

impl std::fmt::Display for DxfError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            DxfError::Malformed(m) => write!(f, "not a readable ASCII DXF: {m}"),
            DxfError::EmptyLayer(layers) if layers.is_empty() => write!(f, "the drawing has no LINE, ARC, CIRCLE, LWPOLYLINE or POLYLINE entities"),
            DxfError::EmptyLayer(layers) => write!(f, "no entities on that layer; the layers drawn on are: {}", layers.join(", ")),
            DxfError::Gap { entity, gap } => write!(f, "a loop does not close: {entity} ends {gap:.6} drawing units from the nearest free end"),
            DxfError::NoArea { entity } => write!(f, "a loop closed by {entity} encloses no area"),
        }
    }
}

/// Metres per drawing unit from `$INSUNITS` (None when unitless or absent).
fn insunits(code: i64) -> Option<f64> {
    match code {
        1 => Some(0.0254),
        2 => Some(0.3048),
        4 => Some(1e-3),
        5 => Some(1e-2),
        6 => Some(1.0),
        8 => Some(0.0254e-6),
        9 => Some(0.0254e-3),
        10 => Some(0.9144),
        12 => Some(1e-10),
        13 => Some(1e-9),
        14 => Some(1e-6),
        15 => Some(1e-1),
        _ => None,
    }
}

/// The group-code pairs of a DXF text.
fn pairs(text: &str) -> Result<Vec<(i32, &str)>, DxfError> {
    let lines: Vec<&str> = text.lines().map(str::trim).collect();
    if lines.len() % 2 == 1 && !lines.last().is_some_and(|l| l.is_empty()) {
        return Err(DxfError::Malformed("an odd number of lines: group codes and values come in pairs".into()));
    }
    lines
        .chunks(2)
        .filter(|c| c.len() == 2)
        .enumerate()
        .map(|(k, c)| {
            c[0].parse::<i32>()
                .map(|code| (code, c[1]))
                .map_err(|_| DxfError::Malformed(format!("line {}: '{}' is not a group code", 2 * k + 1, c[0])))
        })
        .collect()
}

/// One entity's pairs (after its `0` pair).
struct Entity<'a> {
    kind: &'a str,
    pairs: Vec<(i32, &'a str)>,
    /// Position among the entities, for naming one without a handle.
    index: usize,
}

impl Entity<'_> {
    fn get(&self, code: i32) -> Option<&str> {
        self.pairs.iter().find(|(c, _)| *c == code).map(|(_, v)| *v)
    }

    fn num(&self, code: i32) -> Result<f64, DxfError> {
        let v = self
            .get(code)
            .ok_or_else(|| DxfError::Malformed(format!("{} has no group {code}", self.name())))?;
        v.parse::<f64>()
            .ok()
            .filter(|x| x.is_finite())
            .ok_or_else(|| DxfError::Malformed(format!("{}: '{v}' is not a number", self.name())))
    }

    fn layer(&self) -> &str {
        self.get(8).unwrap_or("0")
    }

    fn name(&self) -> String {
        match self.get(5) {
            Some(h) => format!("{} (handle {h}, layer {})", self.kind, self.layer()),
            None => format!("{} number {} (no handle, layer {})", self.kind, self.index + 1, self.layer()),
        }
    }
}

/// Metres per drawing unit: the header's $INSUNITS, or `default` when the
/// drawing is unitless or does not say.
pub fn drawing_unit(text: &str, default: f64) -> f64 {
    let Ok(pairs) = pairs(text) else { return default };
    pairs
        .iter()
        .position(|&(c, v)| c == 9 && v == "$INSUNITS")
        .and_then(|i| match pairs.get(i + 1) {
            Some(&(70, v)) => v.parse::<i64>().ok().and_then(insunits),
            _ => None,
        })
        .unwrap_or(default)
}

/// The entities of the ENTITIES section (or of the whole file if it has no sections).
fn entities(text: &str) -> Result<Vec<Entity<'_>>, DxfError> {
    let pairs = pairs(text)?;
    let start = pairs
        .windows(2)
        .position(|w| w[0] == (0, "SECTION") && w[1] == (2, "ENTITIES"))
        .map_or(0, |i| i + 2);
    let mut out: Vec<Entity> = Vec::new();
    for &(code, value) in &pairs[start..] {
        if code == 0 {
            if value == "ENDSEC" || value == "EOF" {
                break;
            }
            out.push(Entity {
                kind: value,
                pairs: Vec::new(),
                index: out.len(),
            });
        } else if let Some(e) = out.last_mut() {
            e.pairs.push((code, value));
        }
    }
    Ok(out)
}

/// Polyline vertices (codes 10, 20, 42 in order) and whether it is closed.
fn lw_vertices(e: &Entity) -> Result<Vec<Vertex>, DxfError> {
    let mut out: Vec<Vertex> = Vec::new();
    let mut x = None;
    for &(code, v) in &e.pairs {
        let num = || {
            v.parse::<f64>()
                .ok()
                .filter(|x| x.is_finite())
                .ok_or_else(|| DxfError::Malformed(format!("{}: '{v}' is not a number", e.name())))
        };
        match code {
            10 => x = Some(num()?),
            20 => {
                let at = [x.take().ok_or_else(|| DxfError::Malformed(format!("{}: a y without its x", e.name())))?, num()?];
                out.push(Vertex { at, bulge: 0.0 });
            }
            42 => {
                if let Some(last) = out.last_mut() {
                    last.bulge = num()?;
                }
            }
            _ => {}
        }
    }
    Ok(out)
}

/// The layer's loops and pieces, each entity read into one or the other.
fn layer_contents(entities: &[Entity], layer: &str) -> Result<Layer, DxfError> {
    let mut out = Layer::default();
    let mut i = 0;
    while i < entities.len() {
        let e = &entities[i];
        i += 1;
        if e.layer() != layer {
            continue;
        }
        match e.kind {
            "LINE" => out.pieces.push(Piece {
                a: [e.num(10)?, e.num(20)?],
                b: [e.num(11)?, e.num(21)?],
                bulge: 0.0,
                entity: e.name(),
            }),
            "ARC" => {
                let (c, r) = ([e.num(10)?, e.num(20)?], radius(e)?);
                let (t0, t1) = (e.num(50)?.to_radians(), e.num(51)?.to_radians());
                let sweep = (t1 - t0).rem_euclid(std::f64::consts::TAU);
                let at = |t: f64| [c[0] + r * t.cos(), c[1] + r * t.sin()];
                out.pieces.push(Piece {
                    a: at(t0),
                    b: at(t1),
                    bulge: (sweep / 4.0).tan(),
                    entity: e.name(),
                });
            }
            "CIRCLE" => out.loops.push(mesher::outline::circle_ring([e.num(10)?, e.num(20)?], radius(e)?)),
            "LWPOLYLINE" | "POLYLINE" => {
                let closed = e.get(70).and_then(|f| f.trim().parse::<i64>().ok()).is_some_and(|f| f & 1 == 1);
                let mut vertices = lw_vertices(e)?;
                if e.kind == "POLYLINE" {
                    // Its points follow as VERTEX entities up to SEQEND.
                    vertices.clear();
                    while i < entities.len() && entities[i].kind == "VERTEX" {
                        vertices.extend(lw_vertices(&entities[i])?);
                        i += 1;
                    }
                }
                if closed {
                    out.loops.push(vertices);
                } else {
                    out.pieces.extend(vertices.windows(2).map(|w| Piece {
                        a: w[0].at,
                        b: w[1].at,
                        bulge: w[0].bulge,
                        entity: e.name(),
                    }));
                }
            }
            _ => {}
        }
    }
    Ok(out)
}

/// An arc's or circle's radius (group 40), which must be positive.
fn radius(e: &Entity) -> Result<f64, DxfError> {
    let r = e.num(40)?;
    if r > 0.0 {
        Ok(r)
    } else {
        Err(DxfError::Malformed(format!("{}: radius {r}; a radius is positive", e.name())))
    }
}

fn dist(a: [f64; 2], b: [f64; 2]) -> f64 {
    (a[0] - b[0]).hypot(a[1] - b[1])
}

/// Joins pieces end to end (ends within `tol`) into closed loops.
fn join(mut pieces: Vec<Piece>, tol: f64) -> Result<Vec<Vec<Vertex>>, DxfError> {
    let mut loops = Vec::new();
    while let Some(first) = pieces.pop() {
        let start = first.a;
        let mut ring = vec![Vertex {
            at: first.a,
            bulge: first.bulge,
        }];
        let mut end = first.b;
        let mut last = first.entity;
        while dist(end, start) > tol {
            let next = pieces.iter().position(|p| dist(p.a, end) <= tol || dist(p.b, end) <= tol);
            let Some(k) = next else {
                let gap = pieces
                    .iter()
                    .flat_map(|p| [p.a, p.b])
                    .chain([start])
                    .map(|q| dist(q, end))
                    .fold(f64::INFINITY, f64::min);
                return Err(DxfError::Gap { entity: last, gap });
            };
            let p = pieces.swap_remove(k);
            // A piece drawn the other way is walked backwards, its arc turned.
            let (a, b, bulge) = if dist(p.a, end) <= tol { (p.a, p.b, p.bulge) } else { (p.b, p.a, -p.bulge) };
            ring.push(Vertex { at: a, bulge });
            end = b;
            last = p.entity;
        }
        if ring.len() < 2 || (ring.len() == 2 && ring.iter().all(|v| v.bulge == 0.0)) {
            return Err(DxfError::NoArea { entity: last });
        }
        loops.push(ring);
    }
    Ok(loops)
}

/// The closed loops drawn on `layer`, in metres (`unit` metres per drawing
/// unit, from `drawing_unit`); `tol`, in drawing units, joins ends.
pub fn read_loops(text: &str, layer: &str, unit: f64, tol: f64) -> Result<Vec<Vec<Vertex>>, DxfError> {
    let entities = entities(text)?;
    let contents = layer_contents(&entities, layer)?;
    if contents.loops.is_empty() && contents.pieces.is_empty() {
        let mut layers: Vec<String> = entities
            .iter()
            .filter(|e| matches!(e.kind, "LINE" | "ARC" | "CIRCLE" | "LWPOLYLINE" | "POLYLINE"))
            .map(|e| e.layer().to_string())
            .collect();
        layers.sort();
        layers.dedup();
        return Err(DxfError::EmptyLayer(layers));
    }
    let mut loops = contents.loops;
    loops.extend(join(contents.pieces, tol)?);
    for ring in &mut loops {
        for v in ring.iter_mut() {
            v.at = [v.at[0] * unit, v.at[1] * unit];
        }
    }
    Ok(loops)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn dxf(body: &str) -> String {
        format!("0\nSECTION\n2\nHEADER\n9\n$INSUNITS\n70\n4\n0\nENDSEC\n0\nSECTION\n2\nENTITIES\n{body}0\nENDSEC\n0\nEOF\n")
    }

    fn line(h: &str, a: [f64; 2], b: [f64; 2]) -> String {
        format!("0\nLINE\n5\n{h}\n8\nPOLE\n10\n{}\n20\n{}\n11\n{}\n21\n{}\n", a[0], a[1], b[0], b[1])
    }

    /// Three lines and an arc drawn in any order and direction close into
    /// one loop, in millimetres from $INSUNITS 4; the arc keeps its turn.
    #[test]
    fn lines_and_an_arc_join_into_a_loop() {
        let arc = "0\nARC\n5\nA1\n8\nPOLE\n10\n10\n20\n5\n40\n5\n50\n270\n51\n90\n";
        let body = line("L1", [0.0, 0.0], [10.0, 0.0]) + &line("L2", [0.0, 10.0], [0.0, 0.0]) + arc + &line("L3", [10.0, 10.0], [0.0, 10.0]);
        let text = dxf(&body);
        let unit = drawing_unit(&text, 1.0);
        assert_eq!(unit, 1e-3);
        let loops = read_loops(&text, "POLE", unit, 1e-6).unwrap();
        assert_eq!(loops.len(), 1);
        let ring = &loops[0];
        assert_eq!(ring.len(), 4);
        let area = mesher::outline::ring_area(ring).abs();
        let want = (100.0 + std::f64::consts::PI * 25.0 / 2.0) * 1e-6;
        assert!((area - want).abs() < 1e-12, "{area} against {want}");
    }

    /// A 0.2-unit gap is refused, naming the entity at the open end and the gap.
    #[test]
    fn a_gap_names_the_entity_and_its_size() {
        let body = line("L1", [0.0, 0.0], [10.0, 0.0])
            + &line("L2", [10.0, 0.0], [10.0, 10.0])
            + &line("L3", [10.0, 10.0], [0.0, 10.0])
            + &line("L4", [0.0, 10.0], [0.0, 0.2]);
        let err = read_loops(&dxf(&body), "POLE", 1.0, 1e-6).unwrap_err();
        match &err {
            DxfError::Gap { entity, gap } => {
                assert!(entity.contains("handle") && entity.contains("layer POLE"), "{entity}");
                assert!((gap - 0.2).abs() < 1e-9, "{gap}");
            }
            other => panic!("{other:?}"),
        }
    }

    /// A closed LWPOLYLINE with a bulge and a CIRCLE are loops as drawn.
    #[test]
    fn polylines_and_circles_are_loops() {
        let body = "0\nLWPOLYLINE\n5\nP1\n8\nPOLE\n90\n2\n70\n1\n10\n1\n20\n0\n42\n1\n10\n-1\n20\n0\n42\n1\n0\nCIRCLE\n5\nC1\n8\nPOLE\n10\n0\n20\n0\n40\n0.5\n";
        let loops = read_loops(&dxf(body), "POLE", 1e-3, 1e-6).unwrap();
        assert_eq!(loops.len(), 2);
        let areas: Vec<f64> = loops.iter().map(|r| mesher::outline::ring_area(r).abs() * 1e6).collect();
        assert!(
            (areas[0] - std::f64::consts::PI).abs() < 1e-9 && (areas[1] - std::f64::consts::PI * 0.25).abs() < 1e-9,
            "{areas:?}"
        );
        assert!(matches!(read_loops(&dxf(body), "COIL", 1.0, 1e-6), Err(DxfError::EmptyLayer(l)) if l == ["POLE"]));
    }

    /// Mutated drawings (lines dropped, repeated, swapped, numbers
    /// replaced by extremes or junk) never panic the reader: each is read
    /// or refused.
    #[test]
    fn mutated_drawings_are_read_or_refused() {
        let text = std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/../cases/sections/lifting-yoke.dxf")).unwrap();
        let lines: Vec<&str> = text.lines().collect();
        let junk = [
            "nan",
            "-1e308",
            "1e308",
            "0",
            "-0",
            "abc",
            "",
            "999999999999",
            "LINE",
            "ARC",
            "CIRCLE",
            "VERTEX",
            "SEQEND",
            "42",
            "70",
            "1",
        ];
        let mut state = 0x2545_f491_4f6c_dd1d_u64;
        let mut next = |n: usize| {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            (state % n as u64) as usize
        };
        for _ in 0..3000 {
            let mut l: Vec<String> = lines.iter().map(|s| s.to_string()).collect();
            for _ in 0..1 + next(6) {
                let i = next(l.len());
                match next(4) {
                    0 => {
                        l.remove(i);
                    }
                    1 => l.insert(i, l[i].clone()),
                    2 => {
                        let j = next(l.len());
                        l.swap(i, j)
                    }
                    _ => l[i] = junk[next(junk.len())].to_string(),
                }
            }
            let mutated = l.join("\n");
            let unit = drawing_unit(&mutated, 1e-3);
            let _ = read_loops(&mutated, "YOKE", unit, 1e-3);
        }
    }
}
