//! 2D magnetostatics by finite elements: planar (A_z) and axisymmetric (A_phi).
//!
//! # Formulation
//! With the magnetic vector potential A (one component: A_z out of the plane,
//! or A_phi about the axis), B = curl A and the field equation
//! curl H(B) = J holds in weak form on linear triangles:
//!
//! sum over elements of  integral  G^T (H(B) - nu0 B_bg) w  -  N J w  = 0,
//!
//! with B = B_bg + G a at each quadrature point, where a holds the element's
//! nodal potentials and
//! - planar: B = (dA/dy, -dA/dx), w = dA (per metre of depth);
//! - axisymmetric: B = (-dA/dz, dA/dr + A/r), w = 2 pi r dA (exact on
//!   the axis for uniform fields, because A = B_z r / 2 is linear in r).
//!
//! B_bg is a uniform applied field; the unknown is the reaction potential,
//! which vanishes at infinity. Permanent magnets follow the recoil line
//! H = (B - Br) / (mu0 mu_rec); saturating steel follows H(|B|) B/|B|.
//!
//! # Newton-Raphson
//! The tangent is the exact derivative dH/dB = nu I + (dH/dB|_curve - nu) n n^T
//! (n = B/|B|), assembled per quadrature point, with its slope along B kept
//! no softer than the secant while far from the solution; steps are solved
//! by sparse Cholesky, or near the solution by conjugate gradients
//! preconditioned with an earlier factorization (an inexact Newton method);
//! a line search on the field energy keeps the iteration monotone.
//!
//! # Open boundary
//! The exterior of the domain's circle is mapped by the Kelvin
//! transformation onto a second disk (see the mesher); planar energy is
//! conformally invariant, and axisymmetric energy picks up the factor
//! |x' - c|^2 / R^2 (Freeman and Lowther, IEEE Trans. Magn. 25(5), 1989).
//!
//! Architecture invariant: no file, terminal, serde or clap code in this crate.

#![warn(missing_docs)]

pub mod assembly;
pub mod bh_curve;
mod buffer;
pub mod constraints;
pub mod dofs;
pub mod element;
pub mod element_map;
pub mod element_order;
pub mod intrinsic_table;
pub mod lagrange;
pub mod linear_system;
mod locate;
pub mod magnet_law;
pub mod material;
pub mod newton;
pub mod newton_step;
mod ordering;
pub mod pattern;
pub mod post;
pub mod problem;
pub mod prolong;
pub mod quadrature;
mod reduction;
mod segment_grid;
pub mod solution;
pub mod source_response;
pub mod space;
mod substitution;

pub use bh_curve::{check_polarization, BhCurve, CurveError};
pub use material::Law;
pub use newton::{SolveError, SolveReport};
pub use problem::{NewtonSettings, Problem, OWN_LAW_NONE};
pub use solution::{solve, solve_on, PointField, Solution};

/// Permeability of free space, H/m (CODATA 2018: 1.25663706212e-6).
pub const MU0: f64 = 1.256_637_062_12e-6;
/// Reluctivity of free space, m/H.
pub const NU0: f64 = 1.0 / MU0;
