//! Lodestone's command-line crate: reads case files, drives the mesher and
//! solver, writes results. The only crate that touches files and the terminal.

pub mod case;
pub mod commands;
pub mod input_file;
pub mod interrupt;
pub mod junit;
pub mod library_text;
pub mod many_warnings;
pub mod optimize;
pub mod output;
pub mod progress;
pub mod run;
pub mod seek;
pub mod summary;
pub mod sweep;
pub mod tolerance;
pub mod variants;
