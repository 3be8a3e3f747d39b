//! The source tree's layers import downward only, and no module imports one that imports it
//! back. Read from the source text: every `crate::…`, `super::…` and (in the command line)
//! `offgas::…` path outside test modules, resolved to the module file it names.

use std::collections::{BTreeMap, BTreeSet};
use std::path::{Path, PathBuf};

/// The layers from the bottom up: a module may use its own layer and those listed before it.
const LAYERS: &[&str] = &[
    "basics",
    "catalog",
    "chem",
    "pour",
    "report",
    "judge",
    "embedded",
    "check",
    "record",
    "procedure",
    "store",
    "plot",
    "output",
    "cli",
];

fn src() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("src")
}

fn rust_files(dir: &Path, out: &mut Vec<PathBuf>) {
    for e in std::fs::read_dir(dir).unwrap() {
        let p = e.unwrap().path();
        if p.is_dir() {
            rust_files(&p, out);
        } else if p.extension().is_some_and(|x| x == "rs") {
            out.push(p);
        }
    }
}

/// The module path of a file: `src/store/audit.rs` is `store::audit`, `src/store/mod.rs` is
/// `store`. The command line's files (the binary) sit under `cli`.
fn module_of(file: &Path) -> Vec<String> {
    let rel = file.strip_prefix(src()).unwrap();
    let mut parts: Vec<String> = rel
        .iter()
        .map(|c| c.to_string_lossy().trim_end_matches(".rs").to_string())
        .collect();
    if parts.last().is_some_and(|p| p == "mod") {
        parts.pop();
    }
    if parts == ["main"] {
        parts = vec!["cli".into()];
    }
    parts
}

/// The source without its test modules (by convention the last item of a file).
fn without_tests(text: &str) -> &str {
    match text.find("#[cfg(test)]\nmod tests") {
        Some(i) => &text[..i],
        None => text,
    }
}

/// Every path the source names that starts at `root` (`crate`, `super` or `offgas`), as
/// its segments, including each branch of a `use root::{a::b, c}` group.
fn paths_from(text: &str, root: &str) -> Vec<Vec<String>> {
    let mut out = Vec::new();
    let needle = format!("{root}::");
    let bytes = text.as_bytes();
    let mut at = 0;
    while let Some(i) = text[at..].find(&needle) {
        let start = at + i;
        at = start + needle.len();
        // A whole word: not `xcrate::` or `a_super::`.
        if start > 0 && (bytes[start - 1].is_ascii_alphanumeric() || bytes[start - 1] == b'_') {
            continue;
        }
        let mut prefix = vec![root.to_string()];
        // `super::super::x`
        let mut rest = &text[at..];
        while let Some(r) = rest.strip_prefix("super::") {
            prefix.push("super".into());
            rest = r;
        }
        at = text.len() - rest.len();
        if let Some(group) = rest.strip_prefix('{') {
            let end = group.find('}').unwrap_or(group.len());
            for item in group[..end].split(',') {
                let segs = segments(item.trim());
                if !segs.is_empty() {
                    out.push(prefix.iter().cloned().chain(segs).collect());
                }
            }
        } else {
            out.push(prefix.into_iter().chain(segments(rest)).collect());
        }
    }
    out
}

fn segments(s: &str) -> Vec<String> {
    let mut out = Vec::new();
    let mut rest = s;
    loop {
        let end = rest
            .find(|c: char| !(c.is_ascii_alphanumeric() || c == '_'))
            .unwrap_or(rest.len());
        if end == 0 {
            break;
        }
        out.push(rest[..end].to_string());
        match rest[end..].strip_prefix("::") {
            Some(r) if !r.starts_with('{') => rest = r,
            _ => break,
        }
    }
    out
}

struct Tree {
    /// Module path → its file.
    modules: BTreeMap<Vec<String>, PathBuf>,
}

impl Tree {
    /// The longest module the path names (`store::audit::Level` → `store::audit`).
    fn resolve(&self, mut path: Vec<String>) -> Option<Vec<String>> {
        while !path.is_empty() {
            if self.modules.contains_key(&path) {
                return Some(path);
            }
            path.pop();
        }
        None
    }
}

/// Module → the modules it names (outside its own tests), itself left out.
fn imports() -> (Tree, BTreeMap<Vec<String>, BTreeSet<Vec<String>>>) {
    let mut files = Vec::new();
    rust_files(&src(), &mut files);
    let tree = Tree {
        modules: files
            .iter()
            .filter(|f| !f.ends_with("lib.rs"))
            .map(|f| (module_of(f), f.clone()))
            .collect(),
    };
    let mut graph = BTreeMap::new();
    for (module, file) in &tree.modules {
        let text = std::fs::read_to_string(file).unwrap();
        let body = without_tests(&text);
        let in_binary = module[0] == "cli";
        let mut names = BTreeSet::new();
        let roots: &[&str] = if in_binary {
            &["offgas", "super"]
        } else {
            &["crate", "super"]
        };
        for root in roots {
            for p in paths_from(body, root) {
                let absolute: Vec<String> = match p[0].as_str() {
                    "crate" | "offgas" => p[1..].to_vec(),
                    _ => {
                        // `super` is the parent of the module (of the file's module for a
                        // file module; a `mod.rs` is its folder's module).
                        let ups = p.iter().take_while(|s| *s == "super").count();
                        let mut base = module.clone();
                        for _ in 0..ups {
                            base.pop();
                        }
                        if in_binary && base.is_empty() {
                            base.push("cli".into());
                        }
                        base.into_iter().chain(p[ups..].iter().cloned()).collect()
                    }
                };
                if let Some(target) = tree.resolve(absolute) {
                    if &target != module {
                        names.insert(target);
                    }
                }
            }
        }
        graph.insert(module.clone(), names);
    }
    (tree, graph)
}

fn layer(module: &[String]) -> usize {
    LAYERS
        .iter()
        .position(|l| *l == module[0])
        .unwrap_or_else(|| panic!("src/{} is in no layer; add it to LAYERS", module[0]))
}

fn name(m: &[String]) -> String {
    m.join("::")
}

#[test]
fn every_module_is_in_a_layer_and_imports_only_its_own_and_lower_layers() {
    let (_, graph) = imports();
    let mut upward = Vec::new();
    for (m, targets) in &graph {
        for t in targets {
            if layer(t) > layer(m) {
                upward.push(format!("{} uses {}", name(m), name(t)));
            }
        }
    }
    assert!(
        upward.is_empty(),
        "imports that go up a layer:\n  {}",
        upward.join("\n  ")
    );
}

#[test]
fn no_module_imports_one_that_imports_it_back() {
    let (_, graph) = imports();
    // Every cycle shows up as some pair of modules that reach each other.
    let reach = |from: &Vec<String>| -> BTreeSet<Vec<String>> {
        let mut seen = BTreeSet::new();
        let mut stack = vec![from.clone()];
        while let Some(m) = stack.pop() {
            for t in graph.get(&m).into_iter().flatten() {
                if seen.insert(t.clone()) {
                    stack.push(t.clone());
                }
            }
        }
        seen
    };
    let mut cycles = Vec::new();
    for m in graph.keys() {
        if reach(m).contains(m) {
            cycles.push(name(m));
        }
    }
    assert!(
        cycles.is_empty(),
        "modules on an import cycle: {}",
        cycles.join(", ")
    );
}

#[test]
fn the_reader_finds_what_it_should() {
    // The checks above are only as good as the path reader: it sees groups, `super` and
    // long paths, and leaves test modules out.
    let text = "use crate::{pour::batch::Batch, judge};\nuse super::super::x::Y;\nfn f() { crate::a::b(); }\n#[cfg(test)]\nmod tests { use crate::cli; }";
    let body = without_tests(text);
    assert_eq!(
        paths_from(body, "crate"),
        vec![
            vec!["crate", "pour", "batch", "Batch"],
            vec!["crate", "judge"],
            vec!["crate", "a", "b"],
        ]
    );
    assert_eq!(
        paths_from(body, "super"),
        vec![vec!["super", "super", "x", "Y"]]
    );
    let (tree, graph) = imports();
    assert!(tree.modules.len() > 60, "{} modules", tree.modules.len());
    assert!(graph[&vec!["check".to_string()]].contains(&vec!["judge".into(), "assess".into()]));
}
