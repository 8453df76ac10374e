//! The built-in material library: magnet grades, soft-magnetic curves and
//! linear materials, each entry with its source.
//!
//! Grade values are typical catalogue values (the standards that define
//! minimum values, IEC 60404-8-1 and MMPA 0100, are not freely readable);
//! source ids refer to the project's docs/materials.md.

mod curves;
mod entry;
mod grade;
mod library;
mod magnets;
mod soft;
mod sourced_curves;

pub use curves::{
    bh_points, check_table, h_at, implausible_relative_permeability, knee, largest_relative_permeability, CurveError, LOWEST_RELATIVE_PERMEABILITY,
    PLAUSIBLE_RELATIVE_PERMEABILITY,
};
pub use entry::{Entry, Material};
pub use grade::{
    implausible_coefficients, implausible_coercivity, implausible_remanence, MagnetGrade, HIGHEST_BR_COEFF, HIGHEST_FERRITE_BR, LOWEST_BR, LOWEST_HCJ,
    RISING_HCJ_COEFF,
};
pub use library::{lookup, names};
pub use soft::highest_knee as highest_soft_knee;
