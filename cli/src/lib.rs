//! Lodestone's command-line crate: reads case files, drives the mesher and
//! solver, writes results. The only crate that touches files and the terminal.

pub mod case;
pub mod checks;
pub mod commands;
pub mod junit;
pub mod library_text;
pub mod materials;
pub mod output;
pub mod post;
pub mod progress;
pub mod run;
pub mod study;
pub mod summary;
pub mod sweep;
