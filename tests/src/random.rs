//! The deterministic random generator of the property tests and the fuzz
//! harness: study's SplitMix64 (fixed seeds, no dependencies) with the
//! helpers the tests want.

pub struct Rng(study::tolerance::Rng);

impl Rng {
    pub fn new(seed: u64) -> Rng {
        Rng(study::tolerance::Rng::new(seed))
    }

    pub fn next_u64(&mut self) -> u64 {
        self.0.next_u64()
    }

    /// Uniform in [0, 1).
    pub fn unit(&mut self) -> f64 {
        self.0.unit()
    }

    pub fn range(&mut self, lo: f64, hi: f64) -> f64 {
        lo + (hi - lo) * self.unit()
    }

    pub fn below(&mut self, n: usize) -> usize {
        (self.next_u64() % n.max(1) as u64) as usize
    }

    pub fn pick<'a, T>(&mut self, items: &'a [T]) -> &'a T {
        &items[self.below(items.len())]
    }
}

/// A mutated copy of `text`: byte flips, deletions, duplications and
/// insertions of TOML-ish tokens.
pub fn mutate(text: &str, rng: &mut Rng) -> String {
    const TOKENS: &[&str] = &[
        "[",
        "]",
        "{",
        "}",
        "=",
        "\"",
        ",",
        "nan",
        "inf",
        "-1e308",
        "1e-300",
        "0",
        "[[part]]",
        "\n",
        "# ",
        "mm",
        "T",
        "+z",
        "\"10 / 0\"",
        "\"(\"",
        "1e400",
        "-",
        "polygon = [[0,0],[0,0],[0,0]]",
        // Multi-byte UTF-8: spaces pasted from PDFs, accents, an emoji, a
        // byte-order mark, a right-to-left mark, a combining accent.
        "\u{a0}",
        "\u{2009}",
        "\u{e9}",
        "\u{1f9f2}",
        "\u{feff}",
        "\u{200f}",
        "e\u{301}",
        "\\u00e9",
        "\\t",
        "\u{1b}[31m",
        "../",
        "/",
    ];
    let mut bytes = text.as_bytes().to_vec();
    for _ in 0..1 + rng.below(4) {
        if bytes.is_empty() {
            break;
        }
        let at = rng.below(bytes.len());
        match rng.below(7) {
            0 => bytes[at] = (rng.next_u64() & 0x7f) as u8,
            1 => {
                let end = (at + rng.below(16)).min(bytes.len());
                bytes.drain(at..end);
            }
            2 => {
                let end = (at + rng.below(32)).min(bytes.len());
                let piece = bytes[at..end].to_vec();
                bytes.splice(at..at, piece);
            }
            4 => {
                let t = rng.pick(TOKENS).as_bytes().to_vec();
                bytes.splice(at..at, t);
            }
            5 => {
                // Deep nesting: parentheses in an expression, brackets or
                // braces in TOML.
                let (open, close) = *rng.pick(&[("(", ")"), ("[", "]"), ("{", "}"), ("-", "")]);
                let depth = 1 + rng.below(2_000);
                let piece = format!("{}1{}", open.repeat(depth), close.repeat(depth));
                bytes.splice(at..at, piece.into_bytes());
            }
            _ => {
                // A long name or string.
                let piece = "n".repeat(1 + rng.below(5_000));
                bytes.splice(at..at, piece.into_bytes());
            }
        }
    }
    String::from_utf8_lossy(&bytes).into_owned()
}

/// Reads a case text through every stage short of solving: parse,
/// parameters, resolve, and the mesh estimate (meshing only when small).
/// Returns whether it was accepted. Panics propagate to the caller.
pub fn read_case(text: &str) -> bool {
    // Every refusal is rendered too: the renderer once panicked on its own.
    let refused = |d: lodestone::case::Diagnostic| {
        let _ = lodestone::case::render("fuzz.toml", text, &d);
        false
    };
    let doc = match lodestone::case::document::parse(text) {
        Ok(doc) => doc,
        Err(d) => return refused(d),
    };
    let params = match lodestone::case::resolve::params(&doc, &Default::default()) {
        Ok(p) => p,
        Err(d) => return refused(d),
    };
    if let Err(d) = lodestone::case::resolve::sweep(&doc) {
        refused(d);
    }
    let model = match lodestone::case::resolve::resolve(&doc, &params, std::path::Path::new(".")) {
        Ok((model, _spans)) => model,
        Err(d) => return refused(d),
    };
    // The design-question tables, read against the model as `solve` reads them.
    for read in [
        |doc: &_, p: &_, m: &_| lodestone::case::resolve::seek(doc, p, m).map(|_| ()),
        |doc: &_, p: &_, m: &_| lodestone::case::resolve::tolerance(doc, p, m).map(|_| ()),
        |doc: &_, p: &_, m: &_| lodestone::case::resolve::optimize(doc, p, m).map(|_| ()),
    ] {
        if let Err(d) = read(&doc, &params, &model) {
            refused(d);
        }
    }
    let mut spec = study::lower::mesh_spec(&model);
    spec.max_triangles = 20_000;
    match mesher::estimate_triangles(&spec) {
        Ok(n) if n < 20_000.0 => mesher::build_mesh(&spec).is_ok(),
        _ => false,
    }
}

/// How a fuzzing run went: inputs tried, how many each fate took, and the
/// inputs that panicked (written beside the bad cases for triage).
pub struct FuzzTally {
    pub inputs: u64,
    pub fates: std::collections::BTreeMap<&'static str, u64>,
    pub panics: u64,
}

/// The fuzzing loop both harnesses share: for `seconds` (or `max_inputs`),
/// takes an example case, mutates it one to three times and hands it to
/// `judge`, which names its fate; a panic is caught and the input written to
/// tests/bad-cases/`prefix`-NNN.toml. Arguments from the command line:
/// `SECONDS [SEED] [MAX_INPUTS]`.
pub fn fuzz(prefix: &str, judge: impl Fn(&str) -> &'static str + std::panic::RefUnwindSafe) -> FuzzTally {
    let args: Vec<String> = std::env::args().collect();
    let seconds: f64 = args.get(1).and_then(|s| s.parse().ok()).unwrap_or(60.0);
    let seed: u64 = args.get(2).and_then(|s| s.parse().ok()).unwrap_or(7);
    let max_inputs: u64 = args.get(3).and_then(|s| s.parse().ok()).unwrap_or(u64::MAX);
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/../cases");
    let seeds: Vec<String> = std::fs::read_dir(dir)
        .expect("cases folder")
        .flatten()
        .filter(|e| e.path().extension().is_some_and(|x| x == "toml"))
        .filter_map(|e| std::fs::read_to_string(e.path()).ok())
        .collect();
    std::panic::set_hook(Box::new(|_| {}));
    let mut rng = Rng::new(seed);
    let start = std::time::Instant::now();
    let mut tally = FuzzTally {
        inputs: 0,
        fates: Default::default(),
        panics: 0,
    };
    while start.elapsed().as_secs_f64() < seconds && tally.inputs < max_inputs {
        let mut text = seeds[rng.below(seeds.len())].clone();
        for _ in 0..1 + rng.below(3) {
            text = mutate(&text, &mut rng);
        }
        tally.inputs += 1;
        match std::panic::catch_unwind(|| judge(&text)) {
            Ok(fate) => *tally.fates.entry(fate).or_default() += 1,
            Err(_) => {
                tally.panics += 1;
                let path = format!("{}/../tests/bad-cases/{prefix}-{:03}.toml", env!("CARGO_MANIFEST_DIR"), tally.panics);
                let _ = std::fs::write(&path, &text);
                eprintln!("crash #{} written to {path}", tally.panics);
            }
        }
    }
    let fates: Vec<String> = tally.fates.iter().map(|(k, v)| format!("{v} {k}")).collect();
    println!(
        "{prefix}: {} inputs in {:.0} s, {}, {} panics (seed {seed})",
        tally.inputs,
        start.elapsed().as_secs_f64(),
        fates.join(", "),
        tally.panics
    );
    tally
}
