//! The module import graph of a crate, read from its sources, and the
//! cycles in it (strongly connected components of more than one module).
//!
//! A module is a source file (`a/b.rs` or `a/b/mod.rs` is `a::b`). An edge
//! a -> b is any path in a's production code (up to its first
//! `#[cfg(test)]`) that names b through `crate::`, `super::` or `self::`.
//! The crate root and `mod.rs` files that only declare and re-export are
//! facades: a path through a facade to a re-exported name is followed to
//! the module that defines it, so re-exports do not count as imports back.

use std::collections::{BTreeMap, BTreeSet};
use std::path::Path;

/// Module name (`""` for the crate root) to the text of its production code.
pub fn read_crate(src: &Path) -> BTreeMap<String, String> {
    let mut out = BTreeMap::new();
    collect(src, src, &mut out);
    out
}

fn collect(root: &Path, dir: &Path, out: &mut BTreeMap<String, String>) {
    let Ok(entries) = std::fs::read_dir(dir) else { return };
    for entry in entries.flatten() {
        let path = entry.path();
        if path.is_dir() {
            if path.file_name().is_some_and(|n| n != "bin") {
                collect(root, &path, out);
            }
            continue;
        }
        if path.extension().is_none_or(|e| e != "rs") {
            continue;
        }
        let rel = path.strip_prefix(root).unwrap_or(&path).with_extension("");
        let mut parts: Vec<String> = rel.iter().map(|s| s.to_string_lossy().into_owned()).collect();
        if parts.last().is_some_and(|l| l == "mod" || l == "lib" || l == "main") {
            parts.pop();
        }
        let text = std::fs::read_to_string(&path).unwrap_or_default();
        let production = text.split("#[cfg(test)]").next().unwrap_or("").to_string();
        out.insert(parts.join("::"), production);
    }
}

/// Names a facade re-exports (`pub use a::b::{X, Y}` in it), mapped to the
/// module path they come from, relative to the facade.
fn reexports(text: &str) -> BTreeMap<String, String> {
    let mut out = BTreeMap::new();
    for stmt in text.split(';') {
        let s = strip_comments(stmt);
        let s = s.trim();
        let Some(rest) = s.strip_prefix("pub use ") else { continue };
        let rest: String = rest.chars().filter(|c| !c.is_whitespace()).collect();
        let (base, names) = match rest.find("::{") {
            Some(i) => (
                rest[..i].to_string(),
                rest[i + 3..].trim_end_matches('}').split(',').map(str::to_string).collect::<Vec<_>>(),
            ),
            None => match rest.rfind("::") {
                Some(i) => (rest[..i].to_string(), vec![rest[i + 2..].to_string()]),
                None => continue,
            },
        };
        for n in names {
            let name = n.split("as").last().unwrap_or(&n).to_string();
            let base = base.trim_start_matches("self::").trim_start_matches("crate::").to_string();
            out.insert(name, base);
        }
    }
    out
}

fn strip_comments(s: &str) -> String {
    s.lines().filter(|l| !l.trim_start().starts_with("//")).collect::<Vec<_>>().join("\n")
}

/// Every module path each module names: a -> {b, ...}.
pub fn edges(modules: &BTreeMap<String, String>) -> BTreeMap<String, BTreeSet<String>> {
    let facades: BTreeMap<&str, BTreeMap<String, String>> = modules.iter().map(|(m, t)| (m.as_str(), reexports(t))).collect();
    let mut out = BTreeMap::new();
    for (module, text) in modules {
        let mut targets = BTreeSet::new();
        let children: Vec<String> = modules
            .keys()
            .filter_map(|m| {
                let rest = if module.is_empty() {
                    Some(m.as_str())
                } else {
                    m.strip_prefix(&format!("{module}::"))
                };
                rest.filter(|r| !r.is_empty() && !r.contains("::")).map(str::to_string)
            })
            .collect();
        // Re-exports make a facade, not an import: they are followed in `resolve`.
        let imports: String = text.split_inclusive(';').filter(|s| !s.trim_start().starts_with("pub use ")).collect();
        for path in paths(&strip_comments(&imports), &children) {
            if let Some(t) = resolve(module, &path, modules, &facades) {
                if &t != module {
                    targets.insert(t);
                }
            }
        }
        out.insert(module.clone(), targets);
    }
    out
}

/// `crate::a::b::C`, `super::x`, `self::y` paths in the text, as segment lists
/// beginning with their anchor; `use` groups `{a, b::c}` are expanded.
fn paths(text: &str, children: &[String]) -> Vec<Vec<String>> {
    let mut out = Vec::new();
    let bytes: Vec<char> = text.chars().collect();
    let mut i = 0;
    while i < bytes.len() {
        let rest: String = bytes[i..bytes.len().min(i + 8)].iter().collect();
        let long: String = bytes[i..bytes.len().min(i + 64)].iter().collect();
        let child = children.iter().find(|c| long.starts_with(&format!("{c}::"))).map(|c| format!("self::{c}::"));
        let anchor = ["crate::", "super::", "self::"]
            .into_iter()
            .find(|a| rest.starts_with(a))
            .map(str::to_string)
            .or(child.clone());
        let boundary = i == 0 || !(bytes[i - 1].is_alphanumeric() || bytes[i - 1] == '_' || bytes[i - 1] == ':');
        if let (Some(a), true) = (anchor, boundary) {
            let skip = if child.is_some() && !rest.starts_with("self::") { 0 } else { a.len() };
            let mut j = i;
            let mut depth = 0;
            while j < bytes.len() {
                let c = bytes[j];
                if c == '{' {
                    depth += 1;
                } else if c == '}' {
                    if depth == 0 {
                        break;
                    }
                    depth -= 1;
                } else if depth == 0 && !(c.is_alphanumeric() || c == '_' || c == ':') {
                    break;
                }
                j += 1;
            }
            let full: String = bytes[i..j].iter().filter(|c| !c.is_whitespace()).collect();
            for p in expand(&full) {
                let segs: Vec<String> = p.split("::").filter(|s| !s.is_empty()).map(str::to_string).collect();
                let mut anchored = vec![a.split("::").next().unwrap_or("self").to_string()];
                anchored.extend(segs.into_iter().skip(usize::from(skip > 0)));
                out.push(anchored);
            }
            i = j.max(i + 1);
        } else {
            i += 1;
        }
    }
    out
}

/// `a::{b, c::{d, e}}` to `a::b`, `a::c::d`, `a::c::e`.
fn expand(path: &str) -> Vec<String> {
    let Some(open) = path.find('{') else { return vec![path.to_string()] };
    let head = &path[..open];
    let inner = path[open + 1..].strip_suffix('}').unwrap_or(&path[open + 1..]);
    let mut items = Vec::new();
    let (mut depth, mut start) = (0, 0);
    for (k, c) in inner.char_indices() {
        match c {
            '{' => depth += 1,
            '}' => depth -= 1,
            ',' if depth == 0 => {
                items.push(&inner[start..k]);
                start = k + 1;
            }
            _ => {}
        }
    }
    items.push(&inner[start..]);
    items
        .into_iter()
        .filter(|s| !s.is_empty())
        .flat_map(|s| expand(&format!("{head}{s}")))
        .collect()
}

/// The module a path names: the longest module prefix, followed through a
/// facade's re-export when the next segment is a name the facade re-exports.
fn resolve(from: &str, segs: &[String], modules: &BTreeMap<String, String>, facades: &BTreeMap<&str, BTreeMap<String, String>>) -> Option<String> {
    let mut base: Vec<String> = if from.is_empty() {
        vec![]
    } else {
        from.split("::").map(str::to_string).collect()
    };
    let mut k = 1;
    match segs[0].as_str() {
        "crate" => base.clear(),
        "self" => {}
        _ => {
            base.pop();
            while segs.get(k).is_some_and(|s| s == "super") {
                base.pop();
                k += 1;
            }
        }
    }
    let mut current = base;
    for s in &segs[k..] {
        let mut next = current.clone();
        next.push(s.clone());
        if modules.contains_key(&next.join("::")) {
            current = next;
            continue;
        }
        let here = current.join("::");
        if let Some(src) = facades.get(here.as_str()).and_then(|r| r.get(s)) {
            let mut target = current.clone();
            target.extend(src.split("::").filter(|x| !x.is_empty()).map(str::to_string));
            while !target.is_empty() && !modules.contains_key(&target.join("::")) {
                target.pop();
            }
            if !target.is_empty() && target.join("::") != here {
                return Some(target.join("::"));
            }
        }
        break;
    }
    Some(current.join("::"))
}

/// Strongly connected components with more than one module (Tarjan).
pub fn cycles(graph: &BTreeMap<String, BTreeSet<String>>) -> Vec<Vec<String>> {
    let names: Vec<&String> = graph.keys().collect();
    let index_of: BTreeMap<&String, usize> = names.iter().enumerate().map(|(i, n)| (*n, i)).collect();
    let adj: Vec<Vec<usize>> = names
        .iter()
        .map(|n| graph[*n].iter().filter_map(|t| index_of.get(t).copied()).collect())
        .collect();
    let mut tarjan = Tarjan::new(adj.len());
    for v in 0..adj.len() {
        if tarjan.index[v].is_none() {
            tarjan.visit(v, &adj);
        }
    }
    tarjan
        .components
        .into_iter()
        .filter(|c| c.len() > 1)
        .map(|c| c.into_iter().map(|i| names[i].clone()).collect())
        .collect()
}

struct Tarjan {
    index: Vec<Option<usize>>,
    low: Vec<usize>,
    on_stack: Vec<bool>,
    stack: Vec<usize>,
    next: usize,
    components: Vec<Vec<usize>>,
}

impl Tarjan {
    fn new(n: usize) -> Tarjan {
        Tarjan {
            index: vec![None; n],
            low: vec![0; n],
            on_stack: vec![false; n],
            stack: Vec::new(),
            next: 0,
            components: Vec::new(),
        }
    }

    fn visit(&mut self, v: usize, adj: &[Vec<usize>]) {
        self.index[v] = Some(self.next);
        self.low[v] = self.next;
        self.next += 1;
        self.stack.push(v);
        self.on_stack[v] = true;
        for &w in &adj[v] {
            match self.index[w] {
                None => {
                    self.visit(w, adj);
                    self.low[v] = self.low[v].min(self.low[w]);
                }
                Some(iw) if self.on_stack[w] => self.low[v] = self.low[v].min(iw),
                _ => {}
            }
        }
        if Some(self.low[v]) == self.index[v] {
            let mut comp = Vec::new();
            while let Some(w) = self.stack.pop() {
                self.on_stack[w] = false;
                comp.push(w);
                if w == v {
                    break;
                }
            }
            self.components.push(comp);
        }
    }
}

/// The workspace's crates, by folder.
pub const CRATES: &[&str] = &["mesher", "solver", "study", "cli", "python"];
