//! What a material is: the kinds of law a library or user entry can carry.

use super::grade::MagnetGrade;

/// What a material is, physically.
#[derive(Clone, Debug, PartialEq)]
pub enum Material {
    /// Non-magnetic and non-conducting (mu_r = 1).
    Air,
    /// Non-magnetic conductor that may carry a winding current (mu_r = 1).
    Conductor,
    /// Linear permeable material.
    Linear {
        /// mu_r
        relative_permeability: f64,
    },
    /// Soft magnetic material with a B-H curve (H in A/m, B in T).
    Soft {
        /// rows [H (A/m), B (T)] from the origin
        curve: Vec<[f64; 2]>,
    },
    /// Permanent magnet, linear recoil line.
    Magnet(MagnetGrade),
}

/// A library or user entry.
#[derive(Clone, Debug, PartialEq)]
pub struct Entry {
    /// Its name as the case file writes it.
    pub name: String,
    /// Family, for listings (NdFeB, steel, ...).
    pub family: String,
    /// What it is physically.
    pub material: Material,
    /// Where the numbers come from, with the labels of docs/materials.md.
    pub source: String,
}
