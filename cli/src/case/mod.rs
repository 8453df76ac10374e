//! Reading a case file: TOML with spans, units, expressions over
//! parameters, and the resolve step that builds the typed [`Model`] in SI units.
//!
//! Stage one (`document`) only parses and keeps spans; stage two
//! (`resolve`) checks every key, unit and name and builds the model. A sweep
//! resolves the same document once per variant with other parameter values.

pub mod diagnostic;
pub mod document;
pub mod dxf;
pub mod expr;
pub mod material_names;
mod quantity;
pub mod resolve;
pub mod suggest;
pub mod units;

pub use diagnostic::{render, Diagnostic};
pub use study::model::Model;
