//! Typed result quantities: every scalar a study reports has a name
//! (`force.pull.z`, `part.cup.saturated_share`, ...) and a unit fixed by
//! what it is, not guessed from its spelling. The names a model can report
//! are known before it is meshed, so a misspelled `[[expect]]` is refused
//! while the case is read.

use crate::materials::Material;
use crate::model::{Model, ProbeShape};
use mesher::Symmetry;

/// The SI unit of a reported quantity.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Unit {
    /// Flux density, T.
    Tesla,
    /// Field strength, A/m.
    AmperePerMetre,
    /// Force, N.
    Newton,
    /// Torque, N m.
    NewtonMetre,
    /// Flux or flux linkage, Wb.
    Weber,
    /// Inductance, H.
    Henry,
    /// Energy, J.
    Joule,
    /// Length, m.
    Metre,
    /// Magnetic dipole moment, A m2.
    AmpereSquareMetre,
    /// A ratio without physical unit (shares, margins, permeance coefficients).
    Ratio,
}

impl Unit {
    /// The unit's symbol as tables print it (empty for a ratio).
    pub fn symbol(self) -> &'static str {
        match self {
            Unit::Tesla => "T",
            Unit::AmperePerMetre => "A/m",
            Unit::Newton => "N",
            Unit::NewtonMetre => "N m",
            Unit::Weber => "Wb",
            Unit::Henry => "H",
            Unit::Joule => "J",
            Unit::Metre => "m",
            Unit::AmpereSquareMetre => "A m2",
            Unit::Ratio => "",
        }
    }

    /// What the unit measures, for messages ("a force").
    pub fn quantity(self) -> &'static str {
        match self {
            Unit::Tesla => "a flux density",
            Unit::AmperePerMetre => "a field strength",
            Unit::Newton => "a force",
            Unit::NewtonMetre => "a torque",
            Unit::Weber => "a flux",
            Unit::Henry => "an inductance",
            Unit::Joule => "an energy",
            Unit::Metre => "a length",
            Unit::AmpereSquareMetre => "a dipole moment",
            Unit::Ratio => "a ratio without unit",
        }
    }
}

/// A reported scalar's name with its unit.
#[derive(Clone, Debug, PartialEq)]
pub struct ValueName {
    /// The name as `[[expect]]`, results.json and sweep.csv write it.
    pub name: String,
    /// Its SI unit.
    pub unit: Unit,
}

impl ValueName {
    fn new(name: String, unit: Unit) -> ValueName {
        ValueName { name, unit }
    }
}

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
    push("energy".into(), Unit::Joule);
    push("coenergy".into(), Unit::Joule);
    for p in &model.parts {
        push(format!("part.{}.b.max", p.name), Unit::Tesla);
        push(format!("part.{}.b.mean", p.name), Unit::Tesla);
        match p.material.material {
            Material::Soft { .. } => push(format!("part.{}.saturated_share", p.name), Unit::Ratio),
            Material::Magnet(_) => {
                for s in ["margin", "permeance", "share_past_knee"] {
                    push(format!("magnet.{}.{s}", p.name), Unit::Ratio);
                }
            }
            _ => {}
        }
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
