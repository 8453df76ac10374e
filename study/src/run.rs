//! Running one study: mesh, solve and post-process a model. Progress goes
//! to a callback; nothing here prints.

use crate::lower::{self, StudyError};
use crate::model::Model;
use crate::results::Results;
use solver::Solution;

/// Stages of a run, reported to the progress callback.
#[derive(Clone, Debug, PartialEq)]
pub enum Stage {
    /// The mesh is being built.
    Meshing,
    /// The mesh is built: its corner nodes and triangles.
    /// The mesh is built.
    Meshed {
        /// corner nodes
        corners: usize,
        /// triangles
        triangles: usize,
    },
    /// A Newton-Raphson iteration finished with this relative residual.
    /// A Newton-Raphson iteration finished.
    Newton {
        /// its number
        iteration: usize,
        /// relative residual after it
        residual: f64,
    },
}

/// Meshes a model after checking that its probes lie where the mesh reaches.
pub fn mesh(model: &Model) -> Result<mesher::Mesh, StudyError> {
    lower::check_probes_inside(model)?;
    lower::check_sources(model)?;
    mesher::build_mesh(&lower::mesh_spec(model)).map_err(|e| lower::mesh_error(model, &e))
}

/// Solves a model on its mesh.
pub fn solve<'m>(model: &Model, mesh: &'m mesher::Mesh, progress: &(dyn Fn(Stage) + Sync)) -> Result<Solution<'m>, StudyError> {
    let problem = lower::problem(model, mesh)?;
    progress(Stage::Meshed {
        corners: mesh.n_nodes(),
        triangles: mesh.triangles.len(),
    });
    solver::solve(&problem, &|iteration, residual| progress(Stage::Newton { iteration, residual })).map_err(|e| StudyError {
        message: e.to_string(),
        origin: None,
        help: None,
    })
}

/// Meshes, solves and post-processes a model: its typed results.
pub fn run(model: &Model, progress: &(dyn Fn(Stage) + Sync)) -> Result<Results, StudyError> {
    progress(Stage::Meshing);
    let mesh = mesh(model)?;
    let solution = solve(model, &mesh, progress)?;
    Ok(crate::post::results(model, &solution, 0.0))
}
