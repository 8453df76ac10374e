//! The typed values a model can report, known before it is meshed.

use crate::materials::Material;
use crate::model::{Model, ProbeShape};
use crate::quantity::{Unit, ValueName};
use mesher::Symmetry;

/// Every value a solved model can report. Some (the stray-field distances,
/// the incremental inductance) exist only when the solution has them; the
/// list is what may be asked for.
pub fn value_names(model: &Model) -> Vec<ValueName> {
    let planar = model.symmetry == Symmetry::Planar;
    let (c0, c1) = if planar { ("bx", "by") } else { ("br", "bz") };
    let mut out = Vec::new();
    let mut push = |name: String, unit| out.push(ValueName::new(name, unit));
    for p in &model.probes {
        let key = |s: &str| format!("probe.{}.{s}", p.name);
        match p.shape {
            ProbeShape::Point(_) => {
                for c in ["b", c0, c1] {
                    push(key(c), Unit::Tesla);
                }
                push(key("h"), Unit::AmperePerMetre);
            }
            ProbeShape::Line { .. } => {
                for s in ["b.max", "b.min", "b.mean"] {
                    push(key(s), Unit::Tesla);
                }
            }
        }
    }
    for f in &model.forces {
        let components = if planar { ["x", "y"] } else { ["r", "z"] };
        for c in components.into_iter().chain(["magnitude"]) {
            push(format!("force.{}.{c}", f.name), Unit::Newton);
        }
        if planar {
            push(format!("force.{}.torque", f.name), Unit::NewtonMetre);
        }
    }
    for f in &model.fluxes {
        push(format!("flux.{}", f.name()), Unit::Weber);
        push(format!("flux.{}.inductance", f.name()), Unit::Henry);
        push(format!("flux.{}.incremental_inductance", f.name()), Unit::Henry);
    }
    // Unbounded where a planar study's currents do not return (`net_current`).
    if !matches!(crate::net_current::anchor(model), crate::net_current::Anchor::OpenWithNetCurrent { .. }) {
        push("energy".into(), Unit::Joule);
        push("coenergy".into(), Unit::Joule);
    }
    for p in &model.parts {
        push(format!("part.{}.b.max", p.name), Unit::Tesla);
        push(format!("part.{}.b.mean", p.name), Unit::Tesla);
        push(format!("part.{}.volume", p.name), Unit::CubicMetre);
        match p.material.material {
            Material::Soft { .. } => push(format!("part.{}.saturated_share", p.name), Unit::Ratio),
            Material::Magnet(ref g) => {
                // Without a coercivity there is no knee to measure against (checks::magnet_results).
                let knee = ["margin", "margin_local", "share_past_knee", "loss"];
                for s in std::iter::once("permeance").chain(knee.into_iter().filter(|_| g.hcj.is_finite())) {
                    push(format!("magnet.{}.{s}", p.name), Unit::Ratio);
                }
            }
            _ => {}
        }
    }
    for p in model.parts.iter().filter(|p| p.winding.is_some() && p.current.is_some()) {
        push(format!("coil.{}.resistance", p.name), Unit::Ohm);
        push(format!("coil.{}.current", p.name), Unit::Ampere);
        push(format!("coil.{}.power", p.name), Unit::Watt);
        push(format!("coil.{}.current_density", p.name), Unit::AmperePerSquareMetre);
        push(format!("coil.{}.temperature_rise", p.name), Unit::Kelvin);
    }
    push("reach.axis".into(), Unit::Metre);
    if !planar {
        push("stray.moment".into(), Unit::AmpereSquareMetre);
        push("stray.h_at_2100mm".into(), Unit::AmperePerMetre);
        push("stray.h_at_4600mm".into(), Unit::AmperePerMetre);
        push("stray.implant_distance.axis".into(), Unit::Metre);
        push("stray.implant_distance.plane".into(), Unit::Metre);
    }
    out
}

/// The typed name of `name` in this model, or None when the model cannot report it.
pub fn value_name(model: &Model, name: &str) -> Option<ValueName> {
    value_names(model).into_iter().find(|v| v.name == name)
}
