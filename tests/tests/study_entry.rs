//! The file-free entry point `study::run::run` (the seam the Python package
//! and an optimizer will use) gives the command line's values.

use std::path::Path;

#[test]
fn a_study_run_without_files_gives_the_command_lines_values() {
    let case = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases/pot-magnet.toml");
    let text = std::fs::read_to_string(&case).unwrap();
    let doc = lodestone::case::document::parse(&text).unwrap();
    let params = lodestone::case::resolve::params(&doc, &Default::default()).unwrap();
    let (model, _) = lodestone::case::resolve::resolve(&doc, &params, case.parent().unwrap()).unwrap();
    let stages = std::sync::Mutex::new(Vec::new());
    let direct = study::run::run(&model, &|s| stages.lock().unwrap().push(s)).unwrap();
    let through_cli = validation::solve_case_text(&text, &[]);
    assert_eq!(direct.values.keys().collect::<Vec<_>>(), through_cli.values.keys().collect::<Vec<_>>());
    for (k, v) in &direct.values {
        assert_eq!(v.to_bits(), through_cli.values[k].to_bits(), "{k}");
    }
    let stages = stages.into_inner().unwrap();
    assert_eq!(stages.first(), Some(&study::run::Stage::Meshing));
    assert!(stages.iter().any(|s| matches!(s, study::run::Stage::Newton { .. })));
}
