//! One Lodestone study, from model to typed results, without I/O.
//!
//! The [`model::Model`] holds a study in SI units with names resolved (the
//! command line builds it from a case file; the Python package from a dict
//! or a file). [`lower`] turns it into a mesh spec and a solver problem,
//! [`run`] meshes and solves it, [`post`] and [`checks`] turn the solution
//! into [`results::Results`]: probes, forces, fluxes, energy, part
//! statistics, magnet working points, the stray field and the flat map of
//! typed values ([`quantity`]) that expectations and tables read.
//!
//! Architecture invariant: no files, no terminal, no clap, no serde_json
//! here; a serde derive on the results sits behind the `serde` feature.

#![warn(missing_docs)]

pub mod boundary_warnings;
pub mod checks;
pub mod coil;
pub mod error_scale;
pub mod estimate;
pub mod lower;
pub mod materials;
mod message_number;
pub mod model;
pub mod net_current;
pub mod optimize;
mod part_fields;
pub mod post;
mod probe_warnings;
pub mod quantity;
pub mod results;
pub mod run;
pub mod seek;
pub mod tolerance;
pub mod value_names;

pub use lower::{Origin, StudyError};
pub use model::Model;
pub use results::Results;
