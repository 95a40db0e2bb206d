//! The documentation stays linked: no file cites the old, unpublished source notes; every anchor
//! of docs/references.md cited anywhere exists; every relative link in the Markdown pages
//! resolves (file and anchor); every test that docs/references.md names as a check still exists.
//! `scripts/rewrite-citations.sh` turns old-style citations into anchors of docs/references.md.

use std::collections::{BTreeSet, HashMap};
use std::fs;
use std::path::{Component, Path, PathBuf};

fn root() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).parent().expect("tests/ has a parent").to_path_buf()
}

/// Directories never scanned: version control, build output, caches, virtual environments.
fn skipped_dir(name: &str) -> bool {
    matches!(name, ".git" | "target" | "__pycache__" | ".pytest_cache" | ".mypy_cache" | "node_modules")
        || name.starts_with(".venv")
        || name == "venv"
}

/// Every UTF-8 text file of the repository as (path relative to the root, contents).
fn text_files() -> Vec<(String, String)> {
    fn walk(dir: &Path, root: &Path, out: &mut Vec<(String, String)>) {
        let mut entries: Vec<_> = fs::read_dir(dir).expect("readable dir").flatten().collect();
        entries.sort_by_key(|e| e.file_name());
        for e in entries {
            let p = e.path();
            let name = e.file_name().to_string_lossy().into_owned();
            if p.is_dir() {
                if !skipped_dir(&name) {
                    walk(&p, root, out);
                }
            } else if let Ok(text) = fs::read_to_string(&p)
                && !text.contains('\0')
            {
                let rel = p.strip_prefix(root).expect("under root").to_string_lossy().replace('\\', "/");
                out.push((rel, text));
            }
        }
    }
    let root = root();
    let mut out = Vec::new();
    walk(&root, &root, &mut out);
    assert!(out.iter().any(|(p, _)| p == "docs/references.md"), "docs/references.md not found");
    out
}

fn report(what: &str, problems: &[String]) {
    assert!(problems.is_empty(), "{what}:\n  {}", problems.join("\n  "));
}

/// GitHub's anchor for a heading: lower case, markup and punctuation dropped, spaces to '-'.
fn slug(heading: &str) -> String {
    let mut text = String::new();
    let mut in_tag = false;
    for c in heading.chars() {
        match c {
            '<' => in_tag = true,
            '>' if in_tag => in_tag = false,
            _ if !in_tag => text.push(c),
            _ => {}
        }
    }
    text.trim()
        .chars()
        .filter_map(|c| match c {
            ' ' => Some('-'),
            '-' | '_' => Some(c),
            c if c.is_alphanumeric() => Some(c),
            _ => None,
        })
        .flat_map(char::to_lowercase)
        .collect()
}

/// Anchors a Markdown page offers: explicit `<a id="...">` and `id="..."` plus heading slugs
/// (numbered -1, -2, ... when a heading repeats), ignoring fenced code.
fn anchors(markdown: &str) -> BTreeSet<String> {
    let mut out = BTreeSet::new();
    let mut seen: HashMap<String, usize> = HashMap::new();
    let mut fenced = false;
    for line in markdown.lines() {
        if line.trim_start().starts_with("```") {
            fenced = !fenced;
            continue;
        }
        if fenced {
            continue;
        }
        let mut rest = line;
        while let Some(i) = rest.find("id=\"") {
            rest = &rest[i + 4..];
            if let Some(j) = rest.find('"') {
                out.insert(rest[..j].to_string());
                rest = &rest[j..];
            }
        }
        let t = line.trim_start();
        if t.starts_with('#') {
            let s = slug(t.trim_start_matches('#'));
            let n = seen.entry(s.clone()).or_insert(0);
            out.insert(if *n == 0 { s.clone() } else { format!("{s}-{n}") });
            *n += 1;
        }
    }
    out
}

fn is_anchor_char(c: char) -> bool {
    c.is_ascii_alphanumeric() || c == '-' || c == '_'
}

#[test]
fn no_file_cites_the_old_notes() {
    // Built from pieces so that this file does not match itself.
    let old_file = concat!("REFERENCES", ".md");
    let old_phrase = format!("{} {}", "reference", "notes");
    let old_section = format!("{} {}", "notes", '\u{a7}');
    // The rewriting tool has to name the forms it rewrites.
    let exempt = ["scripts/rewrite-citations.sh"];
    let mut problems = Vec::new();
    for (path, text) in text_files() {
        if exempt.contains(&path.as_str()) {
            continue;
        }
        for (n, line) in text.lines().enumerate() {
            let lower = line.to_lowercase();
            if line.contains(old_file) || lower.contains(&old_phrase) || lower.contains(&old_section) {
                problems.push(format!("{path}:{}: {}", n + 1, line.trim()));
            }
        }
    }
    report(
        "citations of the old notes remain (run scripts/rewrite-citations.sh, then cite the anchors of docs/references.md)",
        &problems,
    );
}

#[test]
fn cited_reference_anchors_exist() {
    let files = text_files();
    let page = &files.iter().find(|(p, _)| p == "docs/references.md").expect("page").1;
    let have = anchors(page);
    for n in 1..=17 {
        assert!(have.contains(&format!("s{n}")), "docs/references.md lost its anchor s{n}");
    }
    let needle = concat!("docs/references.md", "#");
    let mut problems = Vec::new();
    let mut cited = 0;
    for (path, text) in &files {
        for (n, line) in text.lines().enumerate() {
            let mut rest = line;
            while let Some(i) = rest.find(needle) {
                rest = &rest[i + needle.len()..];
                let id: String = rest.chars().take_while(|&c| is_anchor_char(c)).collect();
                // A trailing '-' belongs to the sentence ("#s6-1 – ..."), not to the anchor.
                let id = id.trim_end_matches('-');
                cited += 1;
                if !have.contains(id) {
                    problems.push(format!("{path}:{}: #{id}", n + 1));
                }
            }
        }
    }
    assert!(cited > 50, "only {cited} citations of docs/references.md found: is the scan broken?");
    report("citations of anchors that docs/references.md does not have", &problems);
}

/// Relative Markdown link targets of a page (inline links and images, and reference
/// definitions), with their line numbers; fenced code and inline code spans are skipped.
fn links(markdown: &str) -> Vec<(usize, String)> {
    let mut out = Vec::new();
    let mut fenced = false;
    for (n, line) in markdown.lines().enumerate() {
        if line.trim_start().starts_with("```") {
            fenced = !fenced;
            continue;
        }
        if fenced {
            continue;
        }
        // Drop inline code spans.
        let text: String = line.split('`').step_by(2).collect::<Vec<_>>().join(" ");
        let mut rest = text.as_str();
        while let Some(i) = rest.find("](") {
            rest = &rest[i + 2..];
            if let Some(j) = rest.find(')') {
                let target = rest[..j].split_whitespace().next().unwrap_or("").trim_matches(['<', '>']);
                out.push((n + 1, target.to_string()));
                rest = &rest[j..];
            }
        }
        let t = text.trim_start();
        if t.starts_with('[')
            && let Some(i) = t.find("]: ")
        {
            out.push((n + 1, t[i + 3..].split_whitespace().next().unwrap_or("").to_string()));
        }
    }
    out.retain(|(_, t)| {
        !(t.is_empty() || t.starts_with("http://") || t.starts_with("https://") || t.starts_with("mailto:"))
    });
    out
}

/// `base` joined with a relative `target`, with `.` and `..` resolved; `None` if it leaves the root.
fn resolve(base: &Path, target: &str) -> Option<PathBuf> {
    let mut parts: Vec<String> =
        base.components().filter_map(|c| c.as_os_str().to_str().map(String::from)).collect();
    for c in Path::new(target).components() {
        match c {
            Component::ParentDir => {
                parts.pop()?;
            }
            Component::Normal(s) => parts.push(s.to_str()?.to_string()),
            Component::CurDir => {}
            _ => return None,
        }
    }
    Some(parts.iter().collect())
}

#[test]
fn relative_markdown_links_resolve() {
    let root = root();
    let files = text_files();
    let pages: Vec<&(String, String)> = files
        .iter()
        .filter(|(p, _)| p.ends_with(".md") && (p.starts_with("docs/") || !p.contains('/')))
        .collect();
    assert!(pages.iter().any(|(p, _)| p == "docs/python.md"), "docs pages not found");
    let mut problems = Vec::new();
    for (path, text) in &pages {
        let dir = Path::new(path.as_str()).parent().unwrap_or(Path::new(""));
        for (n, target) in links(text) {
            let (file, fragment) = match target.split_once('#') {
                Some((f, a)) => (f, Some(a)),
                None => (target.as_str(), None),
            };
            let rel = if file.is_empty() { Some(PathBuf::from(path.as_str())) } else { resolve(dir, file) };
            let Some(rel) = rel else {
                problems.push(format!("{path}:{n}: {target} leaves the repository"));
                continue;
            };
            let full = root.join(&rel);
            if !full.exists() {
                problems.push(format!("{path}:{n}: {target} does not exist"));
                continue;
            }
            if let (Some(a), true) = (fragment, rel.extension().is_some_and(|e| e == "md")) {
                let body = fs::read_to_string(&full).unwrap_or_default();
                if !anchors(&body).contains(a) {
                    problems.push(format!("{path}:{n}: {target}: no anchor #{a}"));
                }
            }
        }
    }
    report("relative links in the Markdown pages that do not resolve", &problems);
}

#[test]
fn checks_named_in_references_exist() {
    let root = root();
    let files = text_files();
    // Every Rust `fn` and Python `def` name in the repository.
    let mut defined = BTreeSet::new();
    for (path, text) in &files {
        let keyword = if path.ends_with(".rs") {
            "fn "
        } else if path.ends_with(".py") {
            "def "
        } else {
            continue;
        };
        for line in text.lines() {
            let mut rest = line;
            while let Some(i) = rest.find(keyword) {
                let before = rest[..i].chars().last();
                rest = &rest[i + keyword.len()..];
                if before.is_none_or(|c| !is_anchor_char(c)) {
                    defined.insert(rest.chars().take_while(|&c| is_anchor_char(c)).collect::<String>());
                }
            }
        }
    }
    let page = &files.iter().find(|(p, _)| p == "docs/references.md").expect("page").1;
    // The text after each "**Checked by:**" up to the end of its paragraph or list item.
    let mut spans = Vec::new();
    let mut current: Option<String> = None;
    for line in page.lines() {
        let t = line.trim_start();
        let ends = t.is_empty() || t.starts_with("- ") || t.starts_with('#') || t.starts_with('|');
        if ends {
            spans.extend(current.take());
        }
        if let Some(i) = line.find("**Checked by:**") {
            spans.extend(current.take());
            current = Some(line[i..].to_string());
        } else if let Some(c) = current.as_mut() {
            c.push(' ');
            c.push_str(t);
        }
    }
    spans.extend(current);
    assert!(spans.len() > 20, "only {} \"Checked by\" lists found", spans.len());
    let mut problems = Vec::new();
    let mut names = 0;
    for span in &spans {
        let pieces: Vec<&str> = span.split('`').collect();
        for k in (1..pieces.len()).step_by(2) {
            let token = pieces[k];
            names += 1;
            if token.contains('/') {
                if !root.join(token).exists() {
                    problems.push(format!("file {token} does not exist"));
                }
            } else if pieces[k - 1].ends_with("core, ") {
                // A core module: core/src/a/b.rs or core/src/a/b/mod.rs.
                let p = root.join("core/src").join(token.replace("::", "/"));
                if !p.with_extension("rs").exists() && !p.join("mod.rs").exists() {
                    problems.push(format!("core module {token} does not exist"));
                }
            } else if !defined.contains(token) {
                problems.push(format!("test {token} is defined nowhere (fn or def)"));
            }
        }
    }
    assert!(names > 100, "only {names} names found in the \"Checked by\" lists");
    report("docs/references.md names checks that do not exist", &problems);
}
