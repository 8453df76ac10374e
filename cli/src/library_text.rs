//! Text of `lodestone materials`: the library listing and one entry.

use std::collections::BTreeMap;
use study::materials::{self, Entry, Material};

pub fn listing() -> String {
    let mut by_family: BTreeMap<String, Vec<String>> = BTreeMap::new();
    for n in materials::names() {
        if let Some(e) = materials::lookup(&n) {
            by_family.entry(e.family.clone()).or_default().push(n);
        }
    }
    let mut s = String::from("Built-in materials (typical catalogue values; `lodestone materials NAME` shows one with its source):\n");
    for (family, names) in by_family {
        s += &format!("  {family}:\n    {}\n", names.join(" "));
    }
    s
}

pub fn entry(e: &Entry) -> String {
    let mut s = format!("{} ({})\n", e.name, e.family);
    match &e.material {
        Material::Air => s += "  relative permeability 1\n",
        Material::Conductor => s += "  conductor, relative permeability 1 (may carry a winding current)\n",
        Material::Linear { relative_permeability } => s += &format!("  linear, relative permeability {relative_permeability}\n"),
        Material::Soft { curve } => {
            s += "  B-H curve (H in A/m, B in T):\n";
            for p in curve {
                s += &format!("    {:>10.1} {:>7.4}\n", p[0], p[1]);
            }
            if let Some(k) = study::materials::knee(curve) {
                s += &format!("  knee (differential permeability fallen to a tenth of its peak): {k:.2} T\n");
            }
        }
        Material::Magnet(g) => {
            s += &format!("  Br {:.3} T ({:.2} kG) at 20 degC, alpha Br {} %/K\n", g.br, g.br * 10.0, g.br_coeff);
            s += &format!(
                "  HcJ {:.0} kA/m ({:.1} kOe), alpha HcJ {} %/K\n",
                g.hcj / 1e3,
                g.hcj * 4.0 * std::f64::consts::PI / 1e6,
                g.hcj_coeff
            );
            if let Some(h) = g.hcb {
                s += &format!("  HcB {:.0} kA/m\n", h / 1e3);
            }
            s += &format!("  recoil permeability {}\n", g.recoil_permeability);
            if let Some(t) = g.max_temperature {
                s += &format!("  catalogue maximum working temperature {t} degC (assumes a permeance coefficient near 2)\n");
            }
        }
    }
    s += &format!("  source: {}\n", e.source);
    s
}
