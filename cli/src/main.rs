//! The `lodestone` command: solve, check, mesh and materials.

use clap::{Args, Parser, Subcommand};
use lodestone::commands;
use std::path::PathBuf;

#[derive(Parser)]
#[command(
    name = "lodestone",
    version,
    about = "Permanent-magnet assemblies by 2D finite elements (planar and axisymmetric), driven by a TOML case file."
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Args, Clone)]
struct Common {
    /// No progress, only errors and the final summary.
    #[arg(long, short, global = true)]
    quiet: bool,
}

/// Inputs shared by the commands that read a case.
#[derive(Args, Clone)]
struct CaseInputs {
    /// Override a parameter: --set gap=2.5 (repeatable).
    #[arg(long = "set", value_name = "NAME=VALUE")]
    set: Vec<String>,
    /// Refuse meshes with more triangles than this.
    #[arg(long)]
    max_elements: Option<usize>,
}

#[derive(Subcommand)]
enum Command {
    /// Mesh, solve and write results (every sweep variant).
    Solve {
        /// The case file (TOML).
        case: PathBuf,
        /// Output folder (default: <case name>-results in the current folder).
        #[arg(short, long)]
        output: Option<PathBuf>,
        #[command(flatten)]
        inputs: CaseInputs,
        /// Solve only every N-th sweep variant starting at K (K/N, from 0).
        #[arg(long, value_name = "K/N")]
        shard: Option<String>,
        /// Solve variants again even when their results are already whole.
        #[arg(long)]
        force: bool,
        #[command(flatten)]
        common: Common,
    },
    /// Solve and evaluate every [[expect]]; exit 1 if any fails.
    Check {
        /// The case files (TOML); every one is solved and checked.
        #[arg(required = true)]
        cases: Vec<PathBuf>,
        /// Write a JUnit XML report of the expectations.
        #[arg(long)]
        junit: Option<PathBuf>,
        #[command(flatten)]
        inputs: CaseInputs,
        #[command(flatten)]
        common: Common,
    },
    /// Mesh only, for inspection: mesh.vtu, mesh.svg and a summary.
    Mesh {
        /// The case file (TOML).
        case: PathBuf,
        /// Output folder (default: <case name>-results in the current folder).
        #[arg(short, long)]
        output: Option<PathBuf>,
        #[command(flatten)]
        inputs: CaseInputs,
        #[command(flatten)]
        common: Common,
    },
    /// List the built-in material library, or show one entry.
    Materials {
        /// An entry's name (a grade such as N42, or a steel); without it, the whole list.
        name: Option<String>,
        /// Draw the entry's B-H curve (soft materials) or demagnetization line (magnets) to an SVG file.
        #[arg(long, value_name = "FILE.svg")]
        plot: Option<PathBuf>,
    },
    /// Merge the outputs of sharded sweep runs into one sweep.csv.
    Merge {
        /// The output folders of the shards (or one folder holding them all).
        #[arg(required = true)]
        folders: Vec<PathBuf>,
        /// Folder for the merged sweep.csv.
        #[arg(short, long)]
        output: PathBuf,
    },
}

/// A file-size limit (`ulimit -f`) kills a process that writes past it
/// with SIGXFSZ and no message; ignored, the write fails with EFBIG
/// instead, and the atomic writer reports it and leaves earlier results.
/// SIGPIPE gets its default back (see below).
fn ignore_file_size_signal() {
    #[cfg(unix)]
    // SAFETY: setting a signal's disposition to SIG_IGN at start-up, before
    // any thread exists, has no memory-safety preconditions.
    unsafe {
        libc::signal(libc::SIGXFSZ, libc::SIG_IGN);
        // Output piped into `head` that closes early: end quietly as other
        // command-line tools do (Rust ignores SIGPIPE, and println! then
        // panicked on the broken pipe).
        libc::signal(libc::SIGPIPE, libc::SIG_DFL);
    }
}

fn main() {
    ignore_file_size_signal();
    lodestone::interrupt::install();
    let cli = Cli::parse();
    let code = match cli.command {
        Command::Solve {
            case,
            output,
            inputs,
            shard,
            force,
            common,
        } => commands::solve(&case, output, &inputs.set, inputs.max_elements, shard.as_deref(), force, common.quiet),
        Command::Check { cases, junit, inputs, common } => commands::check(&cases, junit, &inputs.set, inputs.max_elements, common.quiet),
        Command::Mesh { case, output, inputs, common } => commands::mesh(&case, output, &inputs.set, inputs.max_elements, common.quiet),
        Command::Materials { name, plot } => commands::materials(name.as_deref(), plot),
        Command::Merge { folders, output } => commands::merge(&folders, &output),
    };
    std::process::exit(code);
}
