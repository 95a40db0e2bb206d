//! The shape of the core crate, as docs/architecture.md describes it: which top-level module
//! may import which. The checks read the source of core/src: every `crate::` path outside
//! comments and string literals (in `use` lines and inline) is an import of the top-level module
//! it names. `super::` paths are not followed: they stay inside one top-level module.

use std::collections::{BTreeMap, BTreeSet};
use std::fs;
use std::path::{Path, PathBuf};

/// Import cycles between top-level modules that are accepted, each with its reason. Today there
/// are none; add one here only with a reason a reader can check.
const ALLOWED_CYCLES: &[(&[&str], &str)] = &[];

fn core_src() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).parent().expect("tests/ has a parent").join("core/src")
}

/// Every .rs file under core/src as (path relative to core/src, contents).
fn sources() -> Vec<(String, String)> {
    fn walk(dir: &Path, base: &Path, out: &mut Vec<(String, String)>) {
        let mut entries: Vec<_> = fs::read_dir(dir).expect("readable dir").flatten().collect();
        entries.sort_by_key(|e| e.file_name());
        for e in entries {
            let p = e.path();
            if p.is_dir() {
                walk(&p, base, out);
            } else if p.extension().is_some_and(|x| x == "rs") {
                let rel = p.strip_prefix(base).expect("under core/src").to_string_lossy().replace('\\', "/");
                out.push((rel, fs::read_to_string(&p).expect("utf-8 source")));
            }
        }
    }
    let base = core_src();
    let mut out = Vec::new();
    walk(&base, &base, &mut out);
    assert!(out.len() > 20, "core/src not found or nearly empty");
    out
}

/// The source with comments and the contents of string and character literals blanked out
/// (replaced by spaces, newlines kept), so that line numbers still match.
fn code_only(src: &str) -> String {
    let c: Vec<char> = src.chars().collect();
    let mut out = String::with_capacity(src.len());
    let blank = |out: &mut String, ch: char| out.push(if ch == '\n' { '\n' } else { ' ' });
    let mut i = 0;
    while i < c.len() {
        let next = c.get(i + 1).copied();
        if c[i] == '/' && next == Some('/') {
            while i < c.len() && c[i] != '\n' {
                i += 1;
                out.push(' ');
            }
        } else if c[i] == '/' && next == Some('*') {
            let mut depth = 0;
            while i < c.len() {
                if c[i] == '/' && c.get(i + 1) == Some(&'*') {
                    depth += 1;
                    out.push_str("  ");
                    i += 2;
                } else if c[i] == '*' && c.get(i + 1) == Some(&'/') {
                    depth -= 1;
                    out.push_str("  ");
                    i += 2;
                    if depth == 0 {
                        break;
                    }
                } else {
                    blank(&mut out, c[i]);
                    i += 1;
                }
            }
        } else if c[i] == 'r' && (next == Some('"') || next == Some('#')) && !prev_is_ident(&c, i) {
            // Raw string r"..." or r#"..."#.
            let mut j = i + 1;
            let mut hashes = 0;
            while c.get(j) == Some(&'#') {
                hashes += 1;
                j += 1;
            }
            if c.get(j) != Some(&'"') {
                out.push(c[i]);
                i += 1;
                continue;
            }
            out.push('"');
            j += 1;
            while j < c.len() {
                if c[j] == '"' && (1..=hashes).all(|h| c.get(j + h) == Some(&'#')) {
                    j += 1 + hashes;
                    break;
                }
                blank(&mut out, c[j]);
                j += 1;
            }
            out.push('"');
            i = j;
        } else if c[i] == '"' {
            out.push('"');
            i += 1;
            while i < c.len() && c[i] != '"' {
                if c[i] == '\\' {
                    blank(&mut out, c[i]);
                    i += 1;
                }
                if i < c.len() {
                    blank(&mut out, c[i]);
                    i += 1;
                }
            }
            out.push('"');
            i += 1;
        } else if c[i] == '\'' {
            // A character literal ('x', '\n', '\u{..}') or a lifetime ('a).
            let is_char = matches!((next, c.get(i + 2)), (Some('\\'), _) | (Some(_), Some('\'')));
            if is_char {
                out.push('\'');
                i += 1;
                while i < c.len() && c[i] != '\'' {
                    if c[i] == '\\' {
                        out.push(' ');
                        i += 1;
                    }
                    out.push(' ');
                    i += 1;
                }
                out.push('\'');
                i += 1;
            } else {
                out.push('\'');
                i += 1;
            }
        } else {
            out.push(c[i]);
            i += 1;
        }
    }
    out
}

fn prev_is_ident(c: &[char], i: usize) -> bool {
    i > 0 && (c[i - 1].is_alphanumeric() || c[i - 1] == '_')
}

fn ident_at(s: &str) -> &str {
    let end = s.find(|c: char| !(c.is_alphanumeric() || c == '_')).unwrap_or(s.len());
    &s[..end]
}

/// Byte ranges of `#[cfg(test)]` modules in code-only text.
fn test_ranges(code: &str) -> Vec<(usize, usize)> {
    let mut out = Vec::new();
    let mut from = 0;
    while let Some(i) = code[from..].find("#[cfg(test)]") {
        let start = from + i;
        from = start + 1;
        let after = &code[start + 12..];
        let trimmed = after.trim_start();
        let is_mod = trimmed.starts_with("mod ")
            || trimmed.starts_with("pub mod ")
            || trimmed.starts_with("pub(crate) mod ");
        if !is_mod {
            continue;
        }
        let Some(open) = after.find('{') else { continue };
        let mut depth = 0;
        for (k, ch) in after[open..].char_indices() {
            match ch {
                '{' => depth += 1,
                '}' => {
                    depth -= 1;
                    if depth == 0 {
                        out.push((start, start + 12 + open + k));
                        break;
                    }
                }
                _ => {}
            }
        }
    }
    out
}

/// One import: the file and line it is on, and whether it sits in test code.
#[derive(Debug, Clone)]
struct Site {
    file: String,
    line: usize,
    test: bool,
}

/// Top-level modules of the crate (from lib.rs) and the names lib.rs re-exports from them.
fn crate_layout(files: &[(String, String)]) -> (BTreeSet<String>, BTreeMap<String, String>) {
    let lib = code_only(&files.iter().find(|(p, _)| p == "lib.rs").expect("lib.rs").1);
    let mut modules = BTreeSet::new();
    let mut reexports = BTreeMap::new();
    // Statements end at ';' (attributes and inner attributes may precede them).
    for stmt in lib.split(';') {
        let words: Vec<&str> = stmt.split_whitespace().collect();
        if let [.., "mod", name] = words.as_slice() {
            modules.insert(ident_at(name).to_string());
        }
    }
    for stmt in lib.split(';') {
        let s = stmt.split_whitespace().collect::<Vec<_>>().join(" ");
        if let Some(rest) = s.find("pub use ").map(|i| &s[i + 8..]) {
            let m = ident_at(rest).to_string();
            if !modules.contains(&m) {
                continue;
            }
            let names = rest.rsplit("::").next().unwrap_or("");
            for n in names.trim_matches(['{', '}', ' ']).split(',') {
                let n = n.split(" as ").last().unwrap_or("").trim();
                if !n.is_empty() {
                    reexports.insert(n.to_string(), m.clone());
                }
            }
        }
    }
    (modules, reexports)
}

/// Imports between top-level modules: (from, to) → the sites where they happen.
type Edges = BTreeMap<(String, String), Vec<Site>>;

/// The top-level modules and the imports between them.
fn imports() -> (BTreeSet<String>, Edges) {
    let files = sources();
    let (modules, reexports) = crate_layout(&files);
    let mut edges: Edges = BTreeMap::new();
    for (path, src) in &files {
        let top = path.split('/').next().unwrap_or("").trim_end_matches(".rs").to_string();
        if !modules.contains(&top) {
            continue; // lib.rs
        }
        let code = code_only(src);
        let tests = test_ranges(&code);
        let mut add = |target: &str, at: usize| {
            let to = reexports.get(target).cloned().unwrap_or_else(|| target.to_string());
            if to != top && modules.contains(&to) {
                let line = code[..at].matches('\n').count() + 1;
                let test = tests.iter().any(|&(a, b)| (a..=b).contains(&at));
                edges.entry((top.clone(), to)).or_default().push(Site { file: path.clone(), line, test });
            }
        };
        let mut from = 0;
        while let Some(i) = code[from..].find("crate::") {
            let at = from + i;
            from = at + 7;
            if code[..at].chars().next_back().is_some_and(|c| c.is_alphanumeric() || c == '_') {
                continue; // e.g. `other_crate::`
            }
            let rest = &code[at + 7..];
            if let Some(group) = rest.strip_prefix('{') {
                // use crate::{a::b, c, d::{e, f}}: the first segment of each top-level item.
                let mut depth = 0;
                let mut item = String::new();
                let mut items = Vec::new();
                for ch in group.chars() {
                    match ch {
                        '{' => depth += 1,
                        '}' if depth == 0 => break,
                        '}' => depth -= 1,
                        ',' if depth == 0 => items.push(std::mem::take(&mut item)),
                        _ => item.push(ch),
                    }
                }
                items.push(item);
                for it in items {
                    let name = ident_at(it.trim_start());
                    if !name.is_empty() {
                        add(name, at);
                    }
                }
            } else {
                add(ident_at(rest), at);
            }
        }
    }
    (modules, edges)
}

/// Strongly connected components with more than one module (Tarjan).
fn cycles(modules: &BTreeSet<String>, edges: &Edges) -> Vec<Vec<String>> {
    struct T<'a> {
        adj: BTreeMap<&'a str, Vec<&'a str>>,
        index: BTreeMap<&'a str, usize>,
        low: BTreeMap<&'a str, usize>,
        stack: Vec<&'a str>,
        on: BTreeSet<&'a str>,
        out: Vec<Vec<String>>,
    }
    fn visit<'a>(t: &mut T<'a>, v: &'a str) {
        let n = t.index.len();
        t.index.insert(v, n);
        t.low.insert(v, n);
        t.stack.push(v);
        t.on.insert(v);
        for w in t.adj.get(v).cloned().unwrap_or_default() {
            if !t.index.contains_key(w) {
                visit(t, w);
                let lw = t.low[w];
                let lv = t.low.get_mut(v).expect("visited");
                *lv = (*lv).min(lw);
            } else if t.on.contains(w) {
                let iw = t.index[w];
                let lv = t.low.get_mut(v).expect("visited");
                *lv = (*lv).min(iw);
            }
        }
        if t.low[v] == t.index[v] {
            let mut comp = Vec::new();
            while let Some(w) = t.stack.pop() {
                t.on.remove(w);
                comp.push(w.to_string());
                if w == v {
                    break;
                }
            }
            if comp.len() > 1 {
                comp.sort();
                t.out.push(comp);
            }
        }
    }
    let mut adj: BTreeMap<&str, Vec<&str>> = BTreeMap::new();
    for (a, b) in edges.keys() {
        adj.entry(a.as_str()).or_default().push(b.as_str());
    }
    let mut t = T {
        adj,
        index: BTreeMap::new(),
        low: BTreeMap::new(),
        stack: vec![],
        on: BTreeSet::new(),
        out: vec![],
    };
    for m in modules {
        if !t.index.contains_key(m.as_str()) {
            visit(&mut t, m.as_str());
        }
    }
    t.out
}

fn describe(edges: &Edges, from: &str, to: &str) -> String {
    let sites = &edges[&(from.to_string(), to.to_string())];
    let shown: Vec<String> = sites
        .iter()
        .take(3)
        .map(|s| format!("core/src/{}:{}{}", s.file, s.line, if s.test { " (test code)" } else { "" }))
        .collect();
    format!("{from} -> {to}: {}", shown.join(", "))
}

#[test]
fn the_scan_sees_the_imports_it_should() {
    // Guards the parser: imports that exist today and will exist after any restructure.
    let (modules, edges) = imports();
    for m in ["error", "grid", "linalg", "model", "spectrum", "wind", "batch", "io"] {
        assert!(modules.contains(m), "module {m} not found in lib.rs: {modules:?}");
    }
    for (a, b) in [("grid", "error"), ("wind", "spectrum"), ("response", "model"), ("batch", "model")] {
        assert!(edges.contains_key(&(a.to_string(), b.to_string())), "missed the import {a} -> {b}");
    }
    // `use crate::{Complex64, ...}` names no module; `crate::Error` is the error module.
    assert!(!modules.contains("Complex64"));
}

#[test]
fn no_import_cycle_between_top_level_modules() {
    let (modules, edges) = imports();
    let mut problems = Vec::new();
    for comp in cycles(&modules, &edges) {
        let allowed = ALLOWED_CYCLES.iter().any(|(ms, _)| {
            let mut ms: Vec<String> = ms.iter().map(|s| s.to_string()).collect();
            ms.sort();
            ms == comp
        });
        if allowed {
            continue;
        }
        let mut lines = vec![format!("cycle among {}", comp.join(", "))];
        for a in &comp {
            for b in &comp {
                if edges.contains_key(&(a.clone(), b.clone())) {
                    lines.push(format!("    {}", describe(&edges, a, b)));
                }
            }
        }
        problems.push(lines.join("\n"));
    }
    assert!(problems.is_empty(), "import cycles between core modules:\n{}", problems.join("\n"));
}

#[test]

fn io_imports_only_the_error_module() {
    let (_, edges) = imports();
    let bad: Vec<String> = edges
        .keys()
        .filter(|(a, b)| a == "io" && b != "error")
        .map(|(a, b)| describe(&edges, a, b))
        .collect();
    assert!(bad.is_empty(), "io reads and writes text only; it imports:\n  {}", bad.join("\n  "));
}

#[test]

fn explicit_simd_lives_only_in_linalg() {
    let mut bad = Vec::new();
    for (path, src) in sources() {
        if path.starts_with("linalg/") {
            continue;
        }
        for (n, line) in src.lines().enumerate() {
            if line.contains("pulp") {
                bad.push(format!("core/src/{path}:{}: {}", n + 1, line.trim()));
            }
        }
    }
    assert!(bad.is_empty(), "pulp outside core/src/linalg:\n  {}", bad.join("\n  "));
}

#[test]

fn architecture_page_names_every_core_module() {
    let doc =
        fs::read_to_string(core_src().join("../../docs/architecture.md")).expect("docs/architecture.md");
    assert!(doc.contains("| module | owns | may import |"), "the module table of docs/architecture.md moved");
    let (modules, edges) = imports();
    // The table rows of docs/architecture.md start with the module in backticks.
    let mut documented: BTreeMap<String, BTreeSet<String>> = BTreeMap::new();
    let table = doc.lines().skip_while(|l| !l.starts_with("| module | owns | may import |"));
    for line in table.skip(2).take_while(|l| l.starts_with('|')) {
        let Some(row) = line.strip_prefix("| `") else { continue };
        let name = ident_at(row).to_string();
        let cells: Vec<&str> = line.split('|').collect();
        // Last cell: the modules it may import, in backticks.
        let allowed = cells.iter().rev().nth(1).copied().unwrap_or("");
        let may: BTreeSet<String> = allowed.split('`').skip(1).step_by(2).map(|s| s.to_string()).collect();
        documented.insert(name, may);
    }
    let mut problems = Vec::new();
    for m in &modules {
        if !documented.contains_key(m) {
            problems.push(format!("module {m} has no row in docs/architecture.md"));
        }
    }
    for m in documented.keys() {
        if !modules.contains(m) {
            problems.push(format!("docs/architecture.md has a row for {m}, which lib.rs does not declare"));
        }
    }
    for ((a, b), sites) in &edges {
        if sites.iter().all(|s| s.test) {
            continue; // test code may use higher modules for its fixtures
        }
        if let Some(may) = documented.get(a)
            && !may.contains(b)
        {
            problems.push(format!("not in the table: {}", describe(&edges, a, b)));
        }
    }
    assert!(problems.is_empty(), "docs/architecture.md and core/src disagree:\n  {}", problems.join("\n  "));
}
