//! The plain-text summary printed after a solve.

use crate::run::Outcome;
use std::path::Path;

pub fn summary(o: &Outcome, out: &Path) -> String {
    let r = &o.results;
    let m = &o.model;
    let (u, f) = (&m.length_unit.0, m.length_unit.1);
    let mut s = format!("{}\n", m.title);
    s += &format!(
        "  mesh: {} nodes, {} triangles (order {}), {} unknowns, min angle {:.1} deg\n",
        r.mesh.nodes, r.mesh.elements, r.mesh.element_order, r.mesh.unknowns, r.mesh.min_angle_deg
    );
    s += &format!(
        "  solve: {} in {} iteration(s), {} factorization(s), residual {:.2e}, {:.2} s\n",
        if r.solve.converged { "converged" } else { "NOT CONVERGED" },
        r.solve.iterations,
        r.solve.factorizations,
        r.solve.residual,
        r.solve.seconds
    );
    for (name, fr) in &r.forces {
        let contact = if fr.contact {
            "  (parts touch other material or the boundary: value unreliable)"
        } else {
            ""
        };
        s += &format!(
            "  force {name}: [{:.4e}, {:.4e}] N, |F| = {:.4e} N{contact}\n",
            fr.vector[0], fr.vector[1], fr.magnitude
        );
    }
    for (name, fl) in &r.flux {
        s += &format!("  flux {name}: {:.4e} Wb", fl.wb);
        if let Some(l) = fl.inductance_h {
            s += &format!(", inductance {l:.4e} H");
        }
        s.push('\n');
    }
    for (name, p) in &r.probes {
        if p.points.len() == 1 {
            s += &format!(
                "  probe {name} at ({:.4}, {:.4}) {u}: |B| = {:.4e} T\n",
                p.points[0][0] / f,
                p.points[0][1] / f,
                p.bmag[0]
            );
        } else {
            let max = p.bmag.iter().copied().fold(0.0, f64::max);
            s += &format!("  probe {name}: {} points, |B| max {:.4e} T\n", p.points.len(), max);
        }
    }
    for (name, p) in &r.parts {
        let sat = match p.saturated {
            Some(true) => "  SATURATED (above the knee of its curve)",
            _ => "",
        };
        s += &format!("  part {name} ({}): |B| max {:.3} T, mean {:.3} T{sat}\n", p.material, p.b_max, p.b_mean);
    }
    s += &format!("  energy: {:.4e} J\n", r.energy.stored_j);
    for e in &r.expect {
        s += &format!(
            "  expect {} {}: {} ({})\n",
            e.value,
            e.bound,
            e.actual.map_or("-".into(), |a| format!("{a:.4e}")),
            if e.pass { "pass" } else { "FAIL" }
        );
    }
    s += &format!("  results in {}\n", out.display());
    s
}
