//! `cargo bench -p validation --bench scale`: end-to-end solves of
//! axisymmetric and planar cases from about 1e4 to 1e6 unknowns, linear and
//! saturating, with the time of each stage, peak memory and the fitted
//! growth exponent; the cost of an exact Newton iteration; sweeps; meshing.
//! Figures are printed as Markdown tables.
//!
//! Every measured run is a child process of this one (`--row`), so its peak
//! memory is its own and no run warms the next one's caches; each figure is
//! the median of `--runs N` runs (default 5).
//!
//! Options: `--quick` (sizes to 1e5 only), `--runs N`, `--one NAME SIZE`
//! (one run, printed), `--exact-only`, `--sweep-only`, `--mesh-only`.

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
accuracy = "off"
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

#[derive(Clone, Debug, Default)]
struct Row {
    unknowns: f64,
    triangles: f64,
    mesh: f64,
    pattern: f64,
    assembly: f64,
    symbolic: f64,
    numeric: f64,
    solve: f64,
    iterations: f64,
    factorizations: f64,
    cg: f64,
    post: f64,
    output: f64,
    total: f64,
    peak_mb: f64,
}

impl Row {
    fn fields(&self) -> [f64; 15] {
        [
            self.unknowns,
            self.triangles,
            self.mesh,
            self.pattern,
            self.assembly,
            self.symbolic,
            self.numeric,
            self.solve,
            self.iterations,
            self.factorizations,
            self.cg,
            self.post,
            self.output,
            self.total,
            self.peak_mb,
        ]
    }

    fn from_fields(f: &[f64]) -> Option<Row> {
        let g = |k: usize| f.get(k).copied();
        Some(Row {
            unknowns: g(0)?,
            triangles: g(1)?,
            mesh: g(2)?,
            pattern: g(3)?,
            assembly: g(4)?,
            symbolic: g(5)?,
            numeric: g(6)?,
            solve: g(7)?,
            iterations: g(8)?,
            factorizations: g(9)?,
            cg: g(10)?,
            post: g(11)?,
            output: g(12)?,
            total: g(13)?,
            peak_mb: g(14)?,
        })
    }

    /// The median of each column over the runs.
    fn median(rows: &[Row]) -> Row {
        let cols: Vec<f64> = (0..15)
            .map(|k| {
                let mut v: Vec<f64> = rows.iter().map(|r| r.fields()[k]).collect();
                v.sort_by(f64::total_cmp);
                v.get(v.len() / 2).copied().unwrap_or(f64::NAN)
            })
            .collect();
        Row::from_fields(&cols).unwrap_or_default()
    }
}

/// The case text for a benchmark name ("axisymmetric saturating", "planar
/// linear", with " exact" for a factorization every Newton step).
fn case_for(name: &str, size: f64) -> String {
    let steel = if name.contains("saturating") { "low-carbon-steel" } else { "linear-steel" };
    let text = case(name.contains("planar"), steel, size);
    if name.contains("exact") {
        format!("{text}\n[solver]\nreuse_factorization = false\n")
    } else {
        text
    }
}

/// Reads, meshes, solves, post-processes and writes one case, timing each stage.
fn run_text(text: &str) -> Row {
    let dir = std::env::temp_dir().join(format!("lodestone-bench-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join("case.toml");
    std::fs::write(&path, text).unwrap();
    let t0 = Instant::now();
    let loaded = lodestone::run::load(&path).unwrap_or_else(|f| panic!("{}", f.message()));
    let v = lodestone::run::variants(&loaded, &Default::default()).unwrap_or_else(|f| panic!("{}", f.message()));
    let model = lodestone::run::resolve(&loaded, &v[0].params, &Default::default())
        .unwrap_or_else(|f| panic!("{}", f.message()))
        .model;
    let t = Instant::now();
    let mesh = mesher::build_mesh(&study::lower::mesh_spec(&model)).unwrap();
    let mesh_s = t.elapsed().as_secs_f64();
    let problem = study::lower::problem(&model, &mesh).unwrap();
    let sol = solver::solve(&problem, &|_, _| {}).unwrap();
    // Post-processing, the pictures and the field file's encoding, side by side as in `lodestone solve`.
    let t = Instant::now();
    let (_, files) = lodestone::run::results_and_files(&model, &sol, Default::default(), |_| {}).unwrap_or_else(|f| panic!("{}", f.message()));
    let post_s = t.elapsed().as_secs_f64();
    let t = Instant::now();
    lodestone::output::write_all(&dir.join("out"), &files).unwrap();
    let output_s = t.elapsed().as_secs_f64();
    let r = &sol.report;
    let _ = std::fs::remove_dir_all(&dir);
    Row {
        unknowns: r.n_dofs as f64,
        triangles: mesh.triangles.len() as f64,
        mesh: mesh_s,
        pattern: r.seconds_pattern,
        assembly: r.seconds_assembly,
        symbolic: r.seconds_symbolic,
        numeric: r.seconds_numeric,
        solve: r.seconds_solve,
        iterations: r.iterations as f64,
        factorizations: r.factorizations as f64,
        cg: r.cg_iterations as f64,
        post: post_s,
        output: output_s,
        total: t0.elapsed().as_secs_f64(),
        peak_mb: peak_rss_mb(),
    }
}

/// The time of everything but symbolic analysis and numeric factorization
/// (the total less those two) against theirs, for the share target.
fn share_line(name: &str, r: &Row) -> String {
    let factorization = r.symbolic + r.numeric;
    let rest = r.total - factorization;
    format!(
        "{name} 1e6: everything but symbolic analysis and numeric factorization {rest:.2} s against their {factorization:.2} s (share {:.2})",
        rest / factorization
    )
}

/// The median row of `runs` child processes each running `name` at `size`.
fn measured(name: &str, size: f64, runs: usize) -> Row {
    let exe = std::env::current_exe().expect("own path");
    let rows: Vec<Row> = (0..runs)
        .filter_map(|_| {
            let out = std::process::Command::new(&exe).args(["--row", name, &size.to_string()]).output().ok()?;
            let text = String::from_utf8_lossy(&out.stdout);
            let line = text.lines().find_map(|l| l.strip_prefix("ROW "))?;
            Row::from_fields(&line.split_whitespace().filter_map(|x| x.parse().ok()).collect::<Vec<f64>>())
        })
        .collect();
    Row::median(&rows)
}

fn print_row(label: &str, r: &Row) {
    println!(
        "| {label} | {:.0} | {:.0} | {:.2} | {:.2} | {:.2} | {:.2} | {:.2} | {:.2} | {:.0} ({:.0}, {:.0}) | {:.2} | {:.2} | {:.2} | {:.0} | {:.0} |",
        r.unknowns,
        r.triangles,
        r.mesh,
        r.pattern,
        r.assembly,
        r.symbolic,
        r.numeric,
        r.solve,
        r.iterations,
        r.factorizations,
        r.cg,
        r.post,
        r.output,
        r.total,
        r.unknowns / r.total,
        r.peak_mb
    );
}

/// 16 variants of a case of about 20 000 triangles: in one parallel sweep, and
/// one after another in separate processes.
fn sweep_benchmark() {
    let Some(exe) = lodestone_binary() else {
        println!("sweep benchmark skipped: build the lodestone binary first (cargo build --release)");
        return;
    };
    let dir = std::env::temp_dir().join(format!("lodestone-sweep-bench-{}", std::process::id()));
    let (path, parallel, ok) = timed_sweep(&exe, &dir, &gap_sweep(0.68, 16));
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
    let triangles = std::fs::read_to_string(dir.join("out/variant-0000/results.json"))
        .ok()
        .and_then(|s| s.split("\"elements\": ").nth(1).and_then(|r| r.split(',').next().map(str::to_string)))
        .unwrap_or_default();
    println!("\nsweep of 16 variants ({triangles} triangles each): parallel {parallel:.2} s, one after another in separate processes {sequential:.2} s, ratio {:.2}{}", parallel / sequential, if ok { "" } else { " (the sweep failed)" });
    let _ = std::fs::remove_dir_all(&dir);
}

/// Exact Newton (a factorization every step): the cost of an iteration
/// against the factorization and solve it contains.
fn newton_cost_benchmark(sizes: &[f64], runs: usize) {
    println!("\n| exact Newton | unknowns | iterations | assembly s | numeric s | solve s | per iteration s | factorization + solve s | ratio |\n|---|---|---|---|---|---|---|---|---|");
    for name in ["axisymmetric saturating exact", "planar saturating exact"] {
        for &size in sizes {
            let r = measured(name, size, runs);
            let per_factor = (r.numeric + r.solve) / r.factorizations.max(1.0);
            let per_iteration = (r.assembly + r.numeric + r.solve) / r.iterations.max(1.0);
            println!(
                "| {} | {:.0} | {:.0} | {:.2} | {:.2} | {:.2} | {:.3} | {:.3} | {:.2} |",
                name.trim_end_matches(" saturating exact"),
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

/// A 100-variant sweep of the design-sized saturating case (about 3e4
/// unknowns a variant) in one `lodestone solve`, both cores.
fn design_sweep_benchmark() {
    let Some(exe) = lodestone_binary() else {
        println!("design sweep skipped: build the lodestone binary first (cargo build --release)");
        return;
    };
    let dir = std::env::temp_dir().join(format!("lodestone-design-sweep-{}", std::process::id()));
    let (_, seconds, ok) = timed_sweep(&exe, &dir, &gap_sweep(0.85, 100));
    println!(
        "\nsweep of 100 design-sized saturating variants (about 2.8e4 unknowns each): {seconds:.1} s{}",
        if ok { "" } else { " (the sweep failed)" }
    );
    let _ = std::fs::remove_dir_all(&dir);
}

/// Writes `text` to DIR/sweep.toml and times one `lodestone solve` of it into
/// DIR/out: (the case's path, seconds, whether it succeeded).
fn timed_sweep(exe: &std::path::Path, dir: &std::path::Path, text: &str) -> (std::path::PathBuf, f64, bool) {
    std::fs::create_dir_all(dir).unwrap();
    let path = dir.join("sweep.toml");
    std::fs::write(&path, text).unwrap();
    let t = Instant::now();
    let ok = std::process::Command::new(exe)
        .args(["solve", "--quiet", path.to_str().unwrap(), "-o", dir.join("out").to_str().unwrap()])
        .stdout(std::process::Stdio::null())
        .status()
        .map(|s| s.success())
        .unwrap_or(false);
    (path, t.elapsed().as_secs_f64(), ok)
}

/// The benchmark case with the plate's gap swept over `steps` values.
fn gap_sweep(size: f64, steps: usize) -> String {
    case(false, "low-carbon-steel", size)
        .replace(
            "[mesh]",
            &format!("[params]\ngap = 1.0\n[sweep]\ngap = {{ from = 0.5, to = 4, steps = {steps} }}\n[mesh]"),
        )
        .replace(
            "rect = { from = [0, 11], to = [40, 17] }",
            "rect = { from = [0, \"10 + gap\"], to = [40, \"16 + gap\"] }",
        )
}

/// The release `lodestone` binary beside this benchmark, if built.
fn lodestone_binary() -> Option<std::path::PathBuf> {
    std::env::current_exe()
        .ok()
        .and_then(|p| p.parent()?.parent().map(|d| d.join("lodestone")))
        .filter(|p| p.exists())
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
        let model = lodestone::run::resolve(&loaded, &v[0].params, &Default::default())
            .unwrap_or_else(|f| panic!("{}", f.message()))
            .model;
        let spec = study::lower::mesh_spec(&model);
        let t = Instant::now();
        let mesh = mesher::build_mesh(&spec).unwrap();
        let s = t.elapsed().as_secs_f64();
        let n = mesh.triangles.len() + mesh.exterior.as_ref().map_or(0, |d| d.triangles.len());
        println!("| size {size} mm | {n} | {s:.2} | {:.0} | {:.0} |", n as f64 / s, peak_rss_mb());
        let _ = std::fs::remove_dir_all(&dir);
    }
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let arg = |flag: &str| {
        args.iter()
            .position(|a| a == flag)
            .map(|k| (args.get(k + 1).cloned(), args.get(k + 2).cloned()))
    };
    if let Some((name, size)) = arg("--row") {
        let r = run_text(&case_for(name.as_deref().unwrap_or(""), size.and_then(|s| s.parse().ok()).unwrap_or(0.6)));
        println!("ROW {}", r.fields().map(|x| x.to_string()).join(" "));
        return;
    }
    if let Some((name, size)) = arg("--one") {
        let r = run_text(&case_for(
            name.as_deref().unwrap_or("axisymmetric saturating"),
            size.and_then(|s| s.parse().ok()).unwrap_or(0.6),
        ));
        println!("{:.0} unknowns, {:.0} triangles: total {:.3} s; mesh {:.3}, pattern {:.3}, assembly {:.3}, symbolic {:.3}, numeric {:.3}, solve {:.3}, {:.0} iterations ({:.0} factorizations, {:.0} CG iterations), post {:.3}, output {:.3}; peak {:.0} MB", r.unknowns, r.triangles, r.total, r.mesh, r.pattern, r.assembly, r.symbolic, r.numeric, r.solve, r.iterations, r.factorizations, r.cg, r.post, r.output, r.peak_mb);
        return;
    }
    let runs: usize = arg("--runs").and_then(|(n, _)| n?.parse().ok()).unwrap_or(5).max(1);
    if arg("--exact-only").is_some() {
        newton_cost_benchmark(&[0.6, 0.107], runs);
        return;
    }
    if arg("--mesh-only").is_some() {
        mesh_benchmark();
        return;
    }
    if arg("--sweep-only").is_some() {
        sweep_benchmark();
        design_sweep_benchmark();
        return;
    }
    let quick = arg("--quick").is_some();
    println!(
        "Machine: {} cores; {}; medians of {runs} runs",
        std::thread::available_parallelism().map_or(0, |n| n.get()),
        std::fs::read_to_string("/proc/cpuinfo")
            .ok()
            .and_then(|s| s
                .lines()
                .find(|l| l.starts_with("model name"))
                .map(|l| l.split(':').nth(1).unwrap_or("").trim().to_string()))
            .unwrap_or_default()
    );
    println!("\n| case | unknowns | triangles | mesh s | pattern s | assembly s | symbolic s | numeric s | solve s | Newton it. (factorizations, CG it.) | post s | output s | total s | unknowns/s | peak MB |");
    println!("|---|---|---|---|---|---|---|---|---|---|---|---|---|---|---|");
    let sizes: &[(f64, &str)] = if quick {
        &[(2.0, "1e4"), (0.85, "3e4"), (0.6, "1e5")]
    } else {
        &[(2.0, "1e4"), (0.85, "3e4"), (0.6, "1e5"), (0.107, "1e6")]
    };
    let mut fits: Vec<(String, Vec<(f64, f64)>)> = Vec::new();
    let mut shares: Vec<String> = Vec::new();
    for name in ["axisymmetric linear", "axisymmetric saturating", "planar linear", "planar saturating"] {
        let mut pts = Vec::new();
        for (size, tag) in sizes {
            let r = measured(name, *size, runs);
            print_row(&format!("{name} {tag}"), &r);
            if *tag == "1e5" || *tag == "1e6" {
                pts.push((r.unknowns, r.total));
            }
            if *tag == "1e6" {
                shares.push(share_line(name, &r));
            }
        }
        fits.push((name.to_string(), pts));
    }
    println!();
    for (name, pts) in fits {
        if let [a, b] = pts[..] {
            println!(
                "{name}: time grows as unknowns^{:.2} between {:.0} and {:.0} unknowns",
                (b.1 / a.1).ln() / (b.0 / a.0).ln(),
                a.0,
                b.0
            );
        }
    }
    shares.iter().for_each(|l| println!("{l}"));
    newton_cost_benchmark(if quick { &[0.6] } else { &[0.6, 0.107] }, runs.min(3));
    sweep_benchmark();
    design_sweep_benchmark();
}
