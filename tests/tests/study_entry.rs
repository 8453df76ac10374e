//! The file-free entry point `study::run::run` (the seam the Python package
//! and an optimizer will use) gives the command line's values.

use std::path::Path;

/// An example case's text and its model, resolved as the command line does.
fn example_model(name: &str) -> (String, study::model::Model) {
    let case = Path::new(env!("CARGO_MANIFEST_DIR")).join(format!("../cases/{name}.toml"));
    let text = std::fs::read_to_string(&case).unwrap();
    let doc = lodestone::case::document::parse(&text).unwrap();
    let params = lodestone::case::resolve::params(&doc, &Default::default()).unwrap();
    let (model, _) = lodestone::case::resolve::resolve(&doc, &params, case.parent().unwrap()).unwrap();
    (text, model)
}

#[test]
fn a_study_run_without_files_gives_the_command_lines_values() {
    let (text, model) = example_model("pot-magnet");
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

/// An accuracy given beside the case (the Python package's `accuracy=`, a
/// goal seek's scan) resolves to the model the same key in the case gives:
/// the default element order and first mesh follow it (set on the model
/// after resolving, 0.01 % kept quadratic elements on a mesh for 0.1 %).
#[test]
fn an_accuracy_given_beside_the_case_sizes_the_model_as_the_key_does() {
    let case = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases/magnet-bare.toml");
    let text = std::fs::read_to_string(&case).unwrap();
    let resolve = |text: &str, accuracy| {
        let doc = lodestone::case::document::parse(text).unwrap();
        let params = lodestone::case::resolve::params(&doc, &Default::default()).unwrap();
        lodestone::case::resolve::resolve_with(&doc, &params, case.parent().unwrap(), accuracy)
            .unwrap()
            .0
    };
    let keyed = resolve(&text.replace("[study]\n", "[study]\naccuracy = \"0.01 %\"\n"), None);
    let beside = resolve(&text, Some(Some(1e-4)));
    let default = resolve(&text, None);
    assert_eq!(keyed.accuracy, Some(1e-4));
    assert_eq!(
        (beside.accuracy, beside.mesh.order, beside.mesh.size),
        (keyed.accuracy, keyed.mesh.order, keyed.mesh.size)
    );
    assert_eq!((keyed.mesh.order, default.mesh.order), (4, 2));
    let parts = |m: &study::model::Model| m.parts.iter().map(|p| p.mesh_size).collect::<Vec<_>>();
    assert_eq!(parts(&beside), parts(&keyed));
    assert_ne!(beside.mesh.size, default.mesh.size);
    let off = resolve(&text, Some(None));
    assert_eq!(off.accuracy, None);
}

/// A search's evaluation that reads no stray-field value leaves those
/// values out (`Model::stray_field`): they refine nothing, so every other
/// value and its error are the same to the bit, and the stray ones (the
/// reach, the moment, the implant distances) are absent rather than wrong.
#[test]
fn leaving_out_the_stray_field_changes_no_other_value() {
    let (_, mut model) = example_model("pot-magnet");
    let full = study::run::run(&model, &|_| {}).unwrap();
    model.stray_field = false;
    let lean = study::run::run(&model, &|_| {}).unwrap();
    let stray: Vec<&String> = full.values.keys().filter(|k| study::model::is_stray_value(k)).collect();
    assert!(stray.len() >= 5, "the pot magnet should report its stray field: {stray:?}");
    assert!(lean.values.keys().all(|k| !study::model::is_stray_value(k)), "{:?}", lean.values.keys());
    for (k, v) in &lean.values {
        assert_eq!(v.to_bits(), full.values[k].to_bits(), "{k}");
        assert_eq!(lean.errors.get(k).map(|e| e.to_bits()), full.errors.get(k).map(|e| e.to_bits()), "{k}");
    }
    assert_eq!(lean.values.len() + stray.len(), full.values.len());
}
