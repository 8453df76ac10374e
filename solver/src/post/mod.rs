//! Post-processing of a solution: the integrator every quantity goes
//! through, and the quantities themselves (energy, flux and linkage,
//! Maxwell-stress force and torque, magnet working points, the stray field
//! beyond the domain).

pub mod contact;
pub mod energy;
pub mod error_indicator;
pub mod extraction;
pub mod flux;
pub mod force;
pub mod integrate;
pub mod magnet_check;
pub mod stray;
