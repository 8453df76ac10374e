//! CSV tables: line probes and sweeps. Headers name the units.

use crate::case::Model;
use mesher::Symmetry;
use study::results::ProbeResult;

/// One line probe: distance and position in the case's length unit, fields in T and A/m.
pub fn probe_csv(model: &Model, p: &ProbeResult) -> String {
    let (u, f) = (&model.length_unit.0, model.length_unit.1);
    let (x, y) = if model.symmetry == Symmetry::Planar { ("x", "y") } else { ("r", "z") };
    let mut s = format!("distance_{u},{x}_{u},{y}_{u},b{x}_T,b{y}_T,b_T,h{x}_A_per_m,h{y}_A_per_m\n");
    let start = p.points.first().copied().unwrap_or([0.0; 2]);
    for i in 0..p.points.len() {
        let q = p.points[i];
        let d = (q[0] - start[0]).hypot(q[1] - start[1]);
        s += &format!(
            "{},{},{},{:.6e},{:.6e},{:.6e},{:.6e},{:.6e}\n",
            d / f,
            q[0] / f,
            q[1] / f,
            p.b[i][0],
            p.b[i][1],
            p.bmag[i],
            p.h[i][0],
            p.h[i][1]
        );
    }
    s
}
