//! `dxf = { file = "section.dxf", layer = "POLE" }`: a part's outline (and
//! holes) read from a drawing: the loops on the layer, the largest the
//! outline and the others its holes.

use crate::case::diagnostic::Diagnostic;
use crate::case::document::Item;
use crate::case::dxf::{read_loops, DxfError};
use crate::case::quantity::Context;
use crate::case::units::Kind;
use mesher::Shape;

/// Keys of `dxf`.
const DXF: &[&str] = &["file", "layer", "tolerance"];
/// Largest drawing read, bytes.
const MAX_DXF_BYTES: u64 = 64 << 20;

/// The part's shape from its `dxf` table.
pub(super) fn section(item: &Item, ctx: &Context, what: &str) -> Result<Shape, Diagnostic> {
    let t = item.table(&format!("{what} dxf"), DXF)?;
    let file = t.require("file")?;
    let layer = t.require("layer")?.str(&format!("{what} dxf.layer"))?;
    let dir = ctx
        .case_dir
        .ok_or_else(|| Diagnostic::new(format!("{what}: a DXF section is read only from a case file"), Some(item.span.clone())))?;
    let path = dir.join(file.str(&format!("{what} dxf.file"))?);
    let bytes =
        crate::input_file::read_bytes(&path, "DXF drawing", MAX_DXF_BYTES).map_err(|e| Diagnostic::new(format!("{what} dxf: {e}"), Some(file.span.clone())))?;
    // Drawings are often in a legacy code page: the group codes and numbers are ASCII either way.
    let text = String::from_utf8_lossy(&bytes);
    // The joining tolerance in metres; 1 micrometre unless given. A drawing
    // without $INSUNITS is taken in the case's length unit.
    let tol_m = match t.get("tolerance") {
        Some(tol) => ctx.positive(tol, Kind::Length, &format!("{what} dxf.tolerance"))?,
        None => 1e-6,
    };
    let unit = crate::case::dxf::drawing_unit(&text, ctx.length_unit);
    let mut loops = read_loops(&text, layer, unit, tol_m / unit).map_err(|e| dxf_error(e, &path, layer, item, what, unit))?;
    // The largest loop is the outline; the others are its holes (checked by the mesher).
    let area = |r: &Vec<mesher::outline::Vertex>| mesher::outline::ring_area(r).abs();
    let k = (0..loops.len()).fold(0, |m, i| if area(&loops[i]) > area(&loops[m]) { i } else { m });
    loops.swap(0, k);
    let outline = mesher::outline::ring_polygon(&loops[0], f64::INFINITY);
    let apart = loops[1..].iter().filter(|r| !mesher::geometry::point_in_polygon(&outline, r[0].at)).count();
    if apart > 0 {
        return Err(Diagnostic::new(
            format!(
                "{what} dxf: {} layer {layer}: {} closed loops lie apart; a part is one outline with its holes: put each outline on a layer of its own, one part per layer",
                path.display(),
                apart + 1
            ),
            Some(item.span.clone()),
        ));
    }
    Ok(Shape::Rings(loops))
}

fn dxf_error(e: DxfError, path: &std::path::Path, layer: &str, item: &Item, what: &str, unit: f64) -> Diagnostic {
    let msg = match e {
        DxfError::Gap { entity, gap } => format!(
            "{what} dxf: {} layer {layer}: a loop does not close: {entity} ends {:.4} mm from the nearest free end; close the outline in the drawing (ends are joined within dxf.tolerance, 0.001 mm unless given)",
            path.display(),
            gap * unit * 1e3
        ),
        other => format!("{what} dxf: {} layer {layer}: {other}", path.display()),
    };
    Diagnostic::new(msg, Some(item.span.clone()))
}
