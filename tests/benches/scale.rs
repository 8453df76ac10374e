//! `cargo bench -p validation`: meshing speed, and end-to-end solves of
//! axisymmetric and planar cases from about 1e4 to 1e6 unknowns, linear and
//! saturating, with the time of each stage, peak memory and the fitted
//! growth exponent. Figures are printed as a Markdown table.

use std::time::Instant;

fn peak_rss_mb() -> f64 {
    std::fs::read_to_string("/proc/self/status")
        .ok()
        .and_then(|s| {
            s.lines()
                .find(|l| l.starts_with("VmHWM"))
                .and_then(|l| l.split_whitespace().nth(1)?.parse::<f64>().ok())
        })
        .map_or(f64::NAN, |kb| kb / 1024.0)
}

fn case(planar: bool, steel: &str, size: f64) -> String {
    let (geometry, extra) = if planar { ("planar", "depth = \"50 mm\"") } else { ("axisymmetric", "") };
    format!(
        r#"
[study]
geometry = "{geometry}"
unit = "mm"
{extra}
[mesh]
size = {size}
grading = 1.3
max_elements = 20000000
[materials.linear-steel]
mur = 1000
[[part]]
name = "cup"
material = "{steel}"
polygon = [[0, -5], [20, -5], [20, 10], [16, 10], [16, 0], [0, 0]]
[[part]]
name = "magnet"
material = "N42"
magnetization = "+{dir}"
rect = {{ from = [0, 0], to = [15, 10] }}
[[part]]
name = "plate"
material = "{steel}"
rect = {{ from = [0, 11], to = [40, 17] }}
[[force]]
name = "pull"
parts = ["plate"]
[output]
plots = false
report = false
"#,
        dir = if planar { "y" } else { "z" }
    )
}

struct Row {
    label: String,
    unknowns: usize,
    triangles: usize,
    mesh: f64,
    pattern: f64,
    assembly: f64,
    symbolic: f64,
    numeric: f64,
    solve: f64,
    iterations: usize,
    factorizations: usize,
    cg: usize,
    post: f64,
    output: f64,
    total: f64,
    peak_mb: f64,
}

fn run(label: &str, planar: bool, steel: &str, size: f64) -> Row {
    run_text(label, &case(planar, steel, size))
}

/// The case with every Newton step solved by a fresh factorization.
fn exact_newton(planar: bool, size: f64) -> String {
    format!("{}\n[solver]\nreuse_factorization = false\n", case(planar, "low-carbon-steel", size))
}

fn run_text(label: &str, text: &str) -> Row {
    let dir = std::env::temp_dir().join(format!("lodestone-bench-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join("case.toml");
    std::fs::write(&path, text).unwrap();
    let t0 = Instant::now();
    let loaded = lodestone::run::load(&path).unwrap_or_else(|f| panic!("{}", f.message()));
    let v = lodestone::run::variants(&loaded, &Default::default()).unwrap_or_else(|f| panic!("{}", f.message()));
    let model = lodestone::run::resolve(&loaded, &v[0].params, &Default::default()).unwrap_or_else(|f| panic!("{}", f.message()));
    let t = Instant::now();
    let mesh = mesher::build_mesh(&lodestone::study::mesh_spec(&model)).unwrap();
    let mesh_s = t.elapsed().as_secs_f64();
    let problem = lodestone::study::problem(&model, &mesh).unwrap();
    let sol = solver::solve(&problem, &|_, _| {}).unwrap();
    // Post-processing and the field file's encoding run side by side, as in `lodestone solve`.
    let t = Instant::now();
    let (results, field) = lodestone::run::results_and_field(&model, &sol);
    let post_s = t.elapsed().as_secs_f64();
    let t = Instant::now();
    let field = field.unwrap_or_else(|f| panic!("{}", f.message()));
    let files = lodestone::run::collect_files(&model, &sol, &results, field).unwrap_or_else(|f| panic!("{}", f.message()));
    lodestone::output::write_all(&dir.join("out"), &files).unwrap();
    let output_s = t.elapsed().as_secs_f64();
    let r = &sol.report;
    let _ = std::fs::remove_dir_all(&dir);
    Row {
        label: label.into(),
        unknowns: r.n_dofs,
        triangles: mesh.triangles.len(),
        mesh: mesh_s,
        pattern: r.seconds_pattern,
        assembly: r.seconds_assembly,
        symbolic: r.seconds_symbolic,
        numeric: r.seconds_numeric,
        solve: r.seconds_solve,
        iterations: r.iterations,
        factorizations: r.factorizations,
        cg: r.cg_iterations,
        post: post_s,
        output: output_s,
        total: t0.elapsed().as_secs_f64(),
        peak_mb: peak_rss_mb(),
    }
}

/// 16 variants of a case of about 20 000 triangles: in one parallel sweep, and
/// one after another in separate processes.
fn sweep_benchmark() {
    let exe = std::env::current_exe()
        .ok()
        .and_then(|p| p.parent()?.parent().map(|d| d.join("lodestone")))
        .filter(|p| p.exists());
    let Some(exe) = exe else {
        println!("sweep benchmark skipped: build the lodestone binary first (cargo build --release)");
        return;
    };
    let dir = std::env::temp_dir().join(format!("lodestone-sweep-bench-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let text = case(false, "low-carbon-steel", 0.68)
        .replace("[mesh]", "[params]\ngap = 1.0\n[sweep]\ngap = { from = 0.5, to = 4, steps = 16 }\n[mesh]")
        .replace(
            "rect = { from = [0, 11], to = [40, 17] }",
            "rect = { from = [0, \"10 + gap\"], to = [40, \"16 + gap\"] }",
        );
    let path = dir.join("sweep.toml");
    std::fs::write(&path, &text).unwrap();
    let t = Instant::now();
    let ok = std::process::Command::new(&exe)
        .args(["solve", "--quiet", path.to_str().unwrap(), "-o", dir.join("parallel").to_str().unwrap()])
        .status()
        .map(|s| s.success())
        .unwrap_or(false);
    let parallel = t.elapsed().as_secs_f64();
    let t = Instant::now();
    for k in 0..16 {
        let gap = 0.5 + 3.5 * k as f64 / 15.0;
        let _ = std::process::Command::new(&exe)
            .args([
                "solve",
                "--quiet",
                path.to_str().unwrap(),
                "-o",
                dir.join(format!("seq-{k}")).to_str().unwrap(),
                "--set",
                &format!("gap={gap}"),
            ])
            .stdout(std::process::Stdio::null())
            .status();
    }
    let sequential = t.elapsed().as_secs_f64();
    let triangles = std::fs::read_to_string(dir.join("parallel/variant-0000/results.json"))
        .ok()
        .and_then(|s| s.split("\"elements\": ").nth(1).and_then(|r| r.split(',').next().map(str::to_string)))
        .unwrap_or_default();
    println!("\nsweep of 16 variants ({triangles} triangles each): parallel {parallel:.2} s, one after another in separate processes {sequential:.2} s, ratio {:.2}{}", parallel / sequential, if ok { "" } else { " (the sweep failed)" });
    let _ = std::fs::remove_dir_all(&dir);
}

/// Exact Newton (a factorization every step): the cost of an iteration
/// against the factorization and solve it contains.
fn newton_cost_benchmark(sizes: &[f64]) {
    println!("\n| exact Newton | unknowns | iterations | assembly s | numeric s | solve s | per iteration s | factorization + solve s | ratio |\n|---|---|---|---|---|---|---|---|---|");
    for planar in [false, true] {
        for &size in sizes {
            let name = if planar { "planar" } else { "axisymmetric" };
            let r = run_text(name, &exact_newton(planar, size));
            let per_factor = (r.numeric + r.solve) / r.factorizations.max(1) as f64;
            let per_iteration = (r.assembly + r.numeric + r.solve) / r.iterations.max(1) as f64;
            println!(
                "| {name} | {} | {} | {:.2} | {:.2} | {:.2} | {:.3} | {:.3} | {:.2} |",
                r.unknowns,
                r.iterations,
                r.assembly,
                r.numeric,
                r.solve,
                per_iteration,
                per_factor,
                per_iteration / per_factor
            );
        }
    }
}

/// Meshing alone (one thread: the mesher is sequential), at about 1e5 and
/// 1e6 triangles; the process's peak memory is read after each.
fn mesh_benchmark() {
    println!("\n| mesh | triangles | seconds | triangles/s | peak MB |\n|---|---|---|---|---|");
    for size in [0.3, 0.07] {
        let dir = std::env::temp_dir().join(format!("lodestone-mesh-bench-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let path = dir.join("case.toml");
        std::fs::write(&path, case(false, "low-carbon-steel", size)).unwrap();
        let loaded = lodestone::run::load(&path).unwrap_or_else(|f| panic!("{}", f.message()));
        let v = lodestone::run::variants(&loaded, &Default::default()).unwrap_or_else(|f| panic!("{}", f.message()));
        let model = lodestone::run::resolve(&loaded, &v[0].params, &Default::default()).unwrap_or_else(|f| panic!("{}", f.message()));
        let spec = lodestone::study::mesh_spec(&model);
        let t = Instant::now();
        let mesh = mesher::build_mesh(&spec).unwrap();
        let s = t.elapsed().as_secs_f64();
        let n = mesh.triangles.len() + mesh.exterior.as_ref().map_or(0, |d| d.triangles.len());
        println!("| size {size} mm | {n} | {s:.2} | {:.0} | {:.0} |", n as f64 / s, peak_rss_mb());
        let _ = std::fs::remove_dir_all(&dir);
    }
}

fn main() {
    if std::env::args().any(|a| a == "--linear-1e6") {
        let r = run("axisymmetric linear 1e6", false, "linear-steel", 0.107);
        println!("{} unknowns: total {:.2} s; symbolic {:.2} + numeric {:.2} = {:.2} s; the rest {:.2} s (mesh {:.2}, pattern {:.2}, assembly {:.2}, solve {:.2}, post {:.2}, output {:.2})", r.unknowns, r.total, r.symbolic, r.numeric, r.symbolic + r.numeric, r.total - r.symbolic - r.numeric, r.mesh, r.pattern, r.assembly, r.solve, r.post, r.output);
        return;
    }
    // `--one NAME SIZE`: a single run, e.g. `--one "axisymmetric saturating" 0.6`.
    let args: Vec<String> = std::env::args().collect();
    if let Some(k) = args.iter().position(|a| a == "--one") {
        let name = args.get(k + 1).map_or("axisymmetric saturating", String::as_str);
        let size: f64 = args.get(k + 2).and_then(|s| s.parse().ok()).unwrap_or(0.6);
        let steel = if name.contains("saturating") { "low-carbon-steel" } else { "linear-steel" };
        let r = run(name, name.contains("planar"), steel, size);
        println!("{} unknowns, {} triangles: total {:.3} s; mesh {:.3}, pattern {:.3}, assembly {:.3}, symbolic {:.3}, numeric {:.3}, solve {:.3}, {} iterations ({} factorizations, {} CG iterations), post {:.3}, output {:.3}; peak {:.0} MB", r.unknowns, r.triangles, r.total, r.mesh, r.pattern, r.assembly, r.symbolic, r.numeric, r.solve, r.iterations, r.factorizations, r.cg, r.post, r.output, r.peak_mb);
        return;
    }
    if std::env::args().any(|a| a == "--exact-only") {
        newton_cost_benchmark(&[0.6, 0.107]);
        return;
    }
    if std::env::args().any(|a| a == "--mesh-only") {
        mesh_benchmark();
        return;
    }
    if std::env::args().any(|a| a == "--sweep-only") {
        sweep_benchmark();
        return;
    }
    let quick = std::env::args().any(|a| a == "--quick");
    println!(
        "Machine: {} cores; {}",
        std::thread::available_parallelism().map_or(0, |n| n.get()),
        std::fs::read_to_string("/proc/cpuinfo")
            .ok()
            .and_then(|s| s
                .lines()
                .find(|l| l.starts_with("model name"))
                .map(|l| l.split(':').nth(1).unwrap_or("").trim().to_string()))
            .unwrap_or_default()
    );
    println!("\n| case | unknowns | triangles | mesh s | pattern s | assembly s | symbolic s | numeric s | solve s | Newton it. | post s | output s | total s | unknowns/s | peak MB |");
    println!("|---|---|---|---|---|---|---|---|---|---|---|---|---|---|---|");
    let sizes: &[(f64, &str)] = if quick {
        &[(2.0, "1e4"), (0.6, "1e5")]
    } else {
        &[(2.0, "1e4"), (0.6, "1e5"), (0.107, "1e6")]
    };
    let mut fits: Vec<(String, Vec<(f64, f64)>)> = Vec::new();
    for (planar, steel, name) in [
        (false, "linear-steel", "axisymmetric linear"),
        (false, "low-carbon-steel", "axisymmetric saturating"),
        (true, "linear-steel", "planar linear"),
        (true, "low-carbon-steel", "planar saturating"),
    ] {
        let mut pts = Vec::new();
        for (size, tag) in sizes {
            let r = run(&format!("{name} {tag}"), planar, steel, *size);
            println!(
                "| {} | {} | {} | {:.2} | {:.2} | {:.2} | {:.2} | {:.2} | {:.2} | {} | {:.2} | {:.2} | {:.2} | {:.0} | {:.0} |",
                r.label,
                r.unknowns,
                r.triangles,
                r.mesh,
                r.pattern,
                r.assembly,
                r.symbolic,
                r.numeric,
                r.solve,
                r.iterations,
                r.post,
                r.output,
                r.total,
                r.unknowns as f64 / r.total,
                r.peak_mb
            );
            pts.push((r.unknowns as f64, r.total));
        }
        fits.push((name.to_string(), pts));
    }
    sweep_benchmark();
    println!();
    for (name, pts) in fits {
        if pts.len() >= 3 {
            let (a, b) = (pts[1], pts[2]);
            println!(
                "{name}: time grows as unknowns^{:.2} between {:.0} and {:.0} unknowns",
                (b.1 / a.1).ln() / (b.0 / a.0).ln(),
                a.0,
                b.0
            );
        }
    }
}
