//! The HTML pages of `report --html`, `sweep --html` and `demo`: self-contained (no scripts,
//! links or addresses), every user string escaped, every section present, tags balanced, one
//! inline SVG per plot; and the standalone SVGs carry the readable labels.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

const BIN: &str = env!("CARGO_BIN_EXE_stillsky");

fn examples() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("..").join("docs").join("examples")
}

fn tmp(tag: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("stillsky-html-{tag}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn run(args: &[&str]) -> Output {
    Command::new(BIN).args(args).output().unwrap()
}

fn s(p: &Path) -> &str {
    p.to_str().unwrap()
}

fn escaped(t: &str) -> String {
    t.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
        .replace('\'', "&#39;")
}

/// Start and end tags balance (void elements and self-closed tags excepted); comments,
/// the doctype and text are skipped. Returns the first problem.
fn tag_balance(doc: &str) -> Result<(), String> {
    const VOID: [&str; 6] = ["meta", "br", "hr", "img", "input", "link"];
    let mut stack: Vec<String> = Vec::new();
    let mut rest = doc;
    while let Some(k) = rest.find('<') {
        rest = &rest[k + 1..];
        let end = rest.find('>').ok_or("a '<' without '>'")?;
        let tag = &rest[..end];
        rest = &rest[end + 1..];
        if tag.starts_with('!') || tag.starts_with('?') {
            continue;
        }
        let name: String = tag
            .trim_start_matches('/')
            .chars()
            .take_while(|c| c.is_ascii_alphanumeric() || *c == '-')
            .collect();
        if name.is_empty() {
            return Err(format!("bad tag <{tag}>"));
        }
        if tag.starts_with('/') {
            match stack.pop() {
                Some(open) if open == name => {}
                other => return Err(format!("</{name}> closes {other:?}")),
            }
        } else if !tag.ends_with('/') && !VOID.contains(&name.as_str()) {
            stack.push(name);
        }
    }
    if stack.is_empty() { Ok(()) } else { Err(format!("left open: {stack:?}")) }
}

/// Nothing in the page could make a browser fetch anything.
fn assert_self_contained(doc: &str) {
    for bad in
        ["<script", "<link", "<img", "<iframe", "<object", "<embed", "src=", "href=", "url(", "@import"]
    {
        assert!(!doc.contains(bad), "page contains {bad}");
    }
    let without_ns = doc.replace("xmlns=\"http://www.w3.org/2000/svg\"", "");
    assert!(!without_ns.contains("http://") && !without_ns.contains("https://"), "page names an address");
}

fn count(doc: &str, what: &str) -> usize {
    doc.matches(what).count()
}

#[test]
fn report_page_escapes_user_strings_and_has_every_section() {
    let d = tmp("report");
    // A folder and a model title full of markup characters.
    let odd = d.join("rig <b>&\"'");
    std::fs::create_dir_all(&odd).unwrap();
    let src = std::fs::read_to_string(examples().join("tripod-paver.toml")).unwrap();
    let title = "Tripod <script>alert('x')</script> & \"friends\"";
    let text: String = src
        .lines()
        .map(|l| if l.starts_with("title") { format!("title = {title:?}") } else { l.to_string() })
        .collect::<Vec<_>>()
        .join("\n");
    assert!(text.contains("<script>"), "the title line was replaced");
    let model = odd.join("model.toml");
    std::fs::write(&model, text).unwrap();
    let page_path = d.join("page.html");
    let rec = examples().join("recordings").join("quiet-night.csv");
    let o = run(&[
        "report",
        s(&model),
        "--ground",
        s(&rec),
        "--wind-speed",
        "3",
        "--exposure-s",
        "2",
        "--plots",
        s(&d.join("plots")),
        "--html",
        s(&page_path),
    ]);
    let out = String::from_utf8_lossy(&o.stdout);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    assert!(out.contains(&format!("html: {}", page_path.display())), "{out}");
    let doc = std::fs::read_to_string(&page_path).unwrap();

    assert!(doc.starts_with("<!DOCTYPE html>"));
    tag_balance(&doc).unwrap();
    assert_self_contained(&doc);
    // Escaped, never raw.
    assert!(!doc.contains("<script") && !doc.contains("<b>"), "raw markup from the user");
    assert!(doc.contains(&escaped(title)), "title not escaped");
    assert!(doc.contains(&escaped(s(&model))), "model path not escaped");

    for id in [
        "verdict",
        "star-budget",
        "image-motion-section",
        "modes-section",
        "plots",
        "static-checks",
        "inputs",
        "table id=\"budget\"",
        "table id=\"image-motion\"",
        "table id=\"modes\"",
        "table id=\"checks\"",
        "table id=\"inputs-table\"",
    ] {
        assert!(doc.contains(id), "missing {id}");
    }
    let verdict = ["Verdict: holds", "Verdict: marginal", "Verdict: does not hold"];
    assert_eq!(verdict.iter().filter(|v| doc.contains(*v)).count(), 1, "one verdict in plain words");
    // The cautions word for word (escaped the same way as every other string).
    for c in stillsky::checks::CAUTIONS {
        assert!(doc.contains(&escaped(c)), "caution missing: {c}");
    }
    // One inline SVG per plot file, with the same text as the file.
    let files: Vec<PathBuf> =
        std::fs::read_dir(d.join("plots")).unwrap().map(|e| e.unwrap().path()).collect();
    assert_eq!(count(&doc, "<svg "), files.len());
    for f in &files {
        let svg = std::fs::read_to_string(f).unwrap();
        assert!(doc.contains(svg.trim_end()), "{} not inlined as written", f.display());
    }
    // Inputs and defaults, with the version.
    for want in
        ["frequency grid", "600 points", "ground scale", "kaimal", "exposure (s)", env!("CARGO_PKG_VERSION")]
    {
        assert!(doc.to_lowercase().contains(&want.to_lowercase()), "inputs lack {want}");
    }
}

#[test]
fn standalone_svgs_have_readable_units_ticks_and_labelled_half_pixel_lines() {
    let d = tmp("svg");
    let o = run(&[
        "report",
        s(&examples().join("tripod-paver.toml")),
        "--ground",
        s(&examples().join("recordings").join("quiet-night.csv")),
        "--wind-speed",
        "3",
        "--plots",
        s(&d),
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let read = |f: &str| std::fs::read_to_string(d.join(f)).unwrap();
    let psd = read("image-psd.svg");
    assert!(psd.contains("px²/Hz") && !psd.contains("^2"), "image-psd units");
    // Decades as 10⁻ⁿ, never as 1.0e-3.
    assert!(psd.contains("10⁻"), "no decade label in image-psd.svg");
    for f in ["image-psd.svg", "transmissibility.svg", "ground-psd.svg", "cumulative-rms.svg"] {
        let t = read(f);
        let exponent = t.as_bytes().windows(3).any(|w| {
            w[0].is_ascii_digit() && (w[1] == b'e' || w[1] == b'E') && (w[2] == b'-' || w[2].is_ascii_digit())
        });
        assert!(!exponent, "{f} has a label like 1.0e-3");
    }
    assert!(read("ground-psd.svg").contains("(m/s²)²/Hz"));
    let cum = read("cumulative-rms.svg");
    assert!(cum.contains(">½ px<") || cum.contains("½ px"), "½ px line unlabelled");
    let gust = read("gust.svg");
    assert!(gust.contains(">½ px<") || gust.contains("½ px"), "½ px line unlabelled");
    assert!(gust.contains("ring-down"), "gust traces name their ring-down");
    // Dashed and dotted lines are drawn as many short segments: more polylines than series.
    assert!(count(&cum, "<polyline") > 10, "no dashed lines in cumulative-rms.svg");
}

#[test]
fn sweep_page_ranks_isolators_and_lists_inputs() {
    let d = tmp("sweep");
    let page_path = d.join("sweep.html");
    let o = run(&[
        "sweep",
        "--model",
        s(&examples().join("tripod-paver.toml")),
        "--catalogue",
        s(&examples().join("isolators.toml")),
        "--ground",
        "nhnm",
        "--wind",
        "calm",
        "3",
        "--out",
        s(&d.join("rows.csv")),
        "--html",
        s(&page_path),
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let doc = std::fs::read_to_string(&page_path).unwrap();
    tag_balance(&doc).unwrap();
    assert_self_contained(&doc);
    assert!(doc.contains("Verdict: "), "no verdict");
    assert!(doc.contains("table id=\"ranking-overall\""), "no overall ranking");
    // One ranking plot per wind case (calm and 3 m/s are ranked apart).
    assert_eq!(count(&doc, "<svg "), 2, "the ranking plots");
    assert!(doc.contains("table id=\"ranking-wind-2\""), "no second wind case");
    // Every isolator of the catalogue and the no-pad baseline are ranked.
    let cat = std::fs::read_to_string(examples().join("isolators.toml")).unwrap();
    for name in cat.lines().filter_map(|l| l.trim().strip_prefix("name = ")) {
        let name = name.trim_matches('"');
        assert!(doc.contains(&format!("<td>{name}</td>")), "{name} not ranked");
    }
    assert!(doc.contains("<td>none</td>"));
    for want in ["isolator catalogue", "isolators.toml", "wind cases", "600 points"] {
        assert!(doc.contains(want), "inputs lack {want}");
    }
}

#[test]
fn demo_writes_one_page_with_report_sweep_and_checks() {
    let d = tmp("demo");
    let o = run(&["demo", "--out", s(&d)]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let doc = std::fs::read_to_string(d.join("report.html")).unwrap();
    tag_balance(&doc).unwrap();
    assert_self_contained(&doc);
    let plot_files = std::fs::read_dir(d.join("plots")).unwrap().count();
    // The report's plots and one sweep ranking per wind case (calm and 4 m/s).
    assert_eq!(count(&doc, "<svg "), plot_files + 2);
    assert!(doc.contains("id=\"gusts\"") && doc.contains("table id=\"gust-rigs\""), "no gust section");
    assert!(doc.contains("id=\"sweep\"") && doc.contains("id=\"static-checks\""));
    // The verdict names the sweep's finding (a best isolator, or none better than no pads).
    let v = &doc[doc.find("id=\"verdict\"").unwrap()..doc.find("id=\"star-budget\"").unwrap()];
    assert!(v.contains("helps most") || v.contains("beats standing without pads"), "{v}");
}

#[test]
fn the_tag_balance_check_finds_unbalanced_pages() {
    assert!(tag_balance("<p><b>x</p></b>").is_err());
    assert!(tag_balance("<div><p>x</p>").is_err());
    assert!(tag_balance("<!DOCTYPE html><html><meta charset=\"utf-8\"/><p>a<br>b</p></html>").is_ok());
}
