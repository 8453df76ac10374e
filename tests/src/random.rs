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
