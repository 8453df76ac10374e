//! Typed result quantities: every scalar a study reports has a name
//! (`force.pull.z`, `part.cup.saturated_share`, ...) and a unit fixed by
//! what it is, not guessed from its spelling. The names a model can report
//! are known before it is meshed, so a misspelled `[[expect]]` is refused
//! while the case is read.

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
    /// Current, A.
    Ampere,
    /// Resistance, ohm.
    Ohm,
    /// Power, W.
    Watt,
    /// Current density, A/m2.
    AmperePerSquareMetre,
    /// A temperature difference, K.
    Kelvin,
    /// Volume, m3.
    CubicMetre,
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
            Unit::Ampere => "A",
            Unit::Ohm => "ohm",
            Unit::Watt => "W",
            Unit::AmperePerSquareMetre => "A/m2",
            Unit::Kelvin => "K",
            Unit::CubicMetre => "m3",
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
            Unit::Ampere => "a current",
            Unit::Ohm => "a resistance",
            Unit::Watt => "a power",
            Unit::AmperePerSquareMetre => "a current density",
            Unit::Kelvin => "a temperature difference",
            Unit::CubicMetre => "a volume",
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
    /// A name with its unit.
    pub fn new(name: String, unit: Unit) -> ValueName {
        ValueName { name, unit }
    }
}
