//! One self-contained HTML page per run: inline CSS and SVG, no scripts, no fonts and no
//! addresses outside the file. [`Page`] is the generic builder (verdict, sections, tables,
//! figures); [`report_page`] and [`sweep_page`] fill it from a [`Report`] and a [`SweepOutcome`].
//! Every string from the user (paths, titles, labels) goes through [`escape`]. The output is
//! also well-formed XML, so a strict parser can check it.

use crate::plots::Plot;
use crate::verdict::Level;
use std::fmt::Write;
use stillsky::batch::{NO_PAD, RankTable, Report, ReportOptions, SweepOutcome};
use stillsky::checks::{CheckReport, StaticWind};

/// Escape text for HTML element content and quoted attribute values.
pub fn escape(s: &str) -> String {
    let mut o = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => o.push_str("&amp;"),
            '<' => o.push_str("&lt;"),
            '>' => o.push_str("&gt;"),
            '"' => o.push_str("&quot;"),
            '\'' => o.push_str("&#39;"),
            c => o.push(c),
        }
    }
    o
}

const CSS: &str = "
body { font-family: sans-serif; font-size: 16px; line-height: 1.45; color: #1a1a1a; margin: 0 auto;
  max-width: 1060px; padding: 1.2em; }
h1 { font-size: 1.6em; margin-bottom: 0.1em; }
h2 { font-size: 1.25em; border-bottom: 1px solid #bbb; margin-top: 1.8em; }
.sub { color: #444; margin-top: 0; word-break: break-all; }
.verdict { border: 3px solid #333; border-radius: 6px; padding: 0.8em 1.1em; margin: 1em 0; }
.verdict .level { font-size: 1.7em; font-weight: bold; margin: 0; }
.verdict p { margin: 0.35em 0; }
.holds { border-color: #2b7a2b; background: #eef7ee; }
.marginal { border-color: #a86b00; background: #fdf5e6; border-style: dashed; }
.fails { border-color: #b22; background: #fbeeee; border-style: double; border-width: 5px; }
table { border-collapse: collapse; margin: 0.6em 0; font-size: 0.95em; }
th, td { border: 1px solid #ccc; padding: 0.25em 0.6em; text-align: left; vertical-align: top; }
th { background: #f1f1f1; }
td.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
figure { margin: 1.2em 0; page-break-inside: avoid; }
figure svg { width: 100%; height: auto; border: 1px solid #ddd; }
figcaption { font-size: 0.9em; color: #333; }
ul.cautions li { font-weight: bold; }
footer { margin-top: 2em; font-size: 0.85em; color: #555; }
@media print { body { max-width: none; } .verdict { background: none; } }
";

/// A page under construction.
pub struct Page {
    title: String,
    subtitle: String,
    body: String,
}

/// The verdict block at the top of a page.
pub struct Verdict {
    pub level: Level,
    /// The one reason that decides the level.
    pub reason: String,
    /// Further lines (the change that helps most, the static checks).
    pub also: Vec<String>,
}

impl Page {
    pub fn new(title: &str, subtitle: &str) -> Page {
        Page { title: title.into(), subtitle: subtitle.into(), body: String::new() }
    }

    pub fn verdict(&mut self, v: &Verdict) {
        let class = match v.level {
            Level::Holds => "holds",
            Level::Marginal => "marginal",
            Level::DoesNotHold => "fails",
        };
        let _ = write!(
            self.body,
            "<section id=\"verdict\" class=\"verdict {class}\">\n<p class=\"level\">Verdict: {}</p>\n\
             <p class=\"reason\">{}</p>\n",
            escape(v.level.words()),
            escape(&v.reason)
        );
        for a in &v.also {
            let _ = writeln!(self.body, "<p>{}</p>", escape(a));
        }
        self.body.push_str("</section>\n");
    }

    /// A section with a heading; `html` is already-built markup (from [`table`], [`figure`], ...).
    pub fn section(&mut self, id: &str, heading: &str, html: &str) {
        let _ = write!(
            self.body,
            "<section id=\"{}\">\n<h2>{}</h2>\n{html}</section>\n",
            escape(id),
            escape(heading)
        );
    }

    /// The finished document.
    pub fn finish(self) -> String {
        let mut o = String::new();
        let _ = write!(
            o,
            "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\"/>\n\
             <meta name=\"viewport\" content=\"width=device-width, initial-scale=1\"/>\n\
             <title>{}</title>\n<style>{CSS}</style>\n</head>\n<body>\n<header>\n<h1>{}</h1>\n\
             <p class=\"sub\">{}</p>\n</header>\n{}<footer>Written by stillsky {} (linear model; \
             estimates, not measurements).</footer>\n</body>\n</html>\n",
            escape(&self.title),
            escape(&self.title),
            escape(&self.subtitle),
            self.body,
            escape(env!("CARGO_PKG_VERSION"))
        );
        o
    }
}

/// A paragraph of plain text.
pub fn para(text: &str) -> String {
    format!("<p>{}</p>\n", escape(text))
}

/// A bulleted list of plain-text items with a class.
pub fn list(class: &str, items: &[String]) -> String {
    let mut o = format!("<ul class=\"{}\">\n", escape(class));
    for i in items {
        let _ = writeln!(o, "<li>{}</li>", escape(i));
    }
    o.push_str("</ul>\n");
    o
}

/// A table of plain-text cells; cells that read as numbers are right-aligned.
pub fn table(id: &str, head: &[&str], rows: &[Vec<String>]) -> String {
    table_aligned(id, head, rows, true)
}

fn table_aligned(id: &str, head: &[&str], rows: &[Vec<String>], align_numbers: bool) -> String {
    let mut o = format!("<table id=\"{}\">\n<thead><tr>", escape(id));
    for h in head {
        let _ = write!(o, "<th>{}</th>", escape(h));
    }
    o.push_str("</tr></thead>\n<tbody>\n");
    for r in rows {
        o.push_str("<tr>");
        for c in r {
            let numeric = align_numbers && c.trim().parse::<f64>().is_ok();
            let class = if numeric { " class=\"num\"" } else { "" };
            let _ = write!(o, "<td{class}>{}</td>", escape(c));
        }
        o.push_str("</tr>\n");
    }
    o.push_str("</tbody>\n</table>\n");
    o
}

/// Two-column table of names and values (all left-aligned: the values mix numbers and text).
pub fn pairs(id: &str, head: [&str; 2], rows: &[(String, String)]) -> String {
    let rows: Vec<Vec<String>> = rows.iter().map(|(a, b)| vec![a.clone(), b.clone()]).collect();
    table_aligned(id, &head, &rows, false)
}

/// A plot as a figure with its caption. The SVG text comes from our plot code, which escapes
/// every text it draws.
pub fn figure(p: &Plot, caption: &str) -> String {
    format!(
        "<figure id=\"plot-{}\">\n{}\n<figcaption>{}</figcaption>\n</figure>\n",
        escape(p.file_name.trim_end_matches(".svg")),
        strip_xml_declaration(&p.svg),
        escape(caption)
    )
}

fn strip_xml_declaration(svg: &str) -> &str {
    match svg.find("<svg") {
        Some(k) => &svg[k..],
        None => svg,
    }
}

fn num(v: f64, decimals: usize) -> String {
    format!("{v:.decimals$}")
}

fn opt<T: std::fmt::Display>(v: Option<T>, none: &str) -> String {
    v.map_or_else(|| none.to_string(), |v| v.to_string())
}

/// The image-motion verdict of a report: the level, and the reason as the share of time outside
/// ½ px with the mode (or band) that carries most of the motion.
pub fn report_verdict(r: &Report) -> Verdict {
    let im = &r.image;
    let level = Level::from_p_outside(im.p_outside);
    let mut reason = format!(
        "The star's centre is outside {} px {:.2} % of the time (radial RMS {:.3} px = {:.3} arcsec; rule: {}).",
        im.radius_px,
        100.0 * im.p_outside,
        im.rms_px,
        im.rms_arcsec,
        level.rule()
    );
    if let Some((label, f, share)) = r.dominant_mode() {
        let _ = write!(
            reason,
            " Most of it comes from {label} at {f:.2} Hz ({:.0} % of the mean square).",
            100.0 * share
        );
    } else {
        let _ = write!(
            reason,
            " Most of it lies in the third octave at {:.2} Hz ({:.0} %).",
            im.dominant_band_hz,
            100.0 * im.dominant_band_share
        );
    }
    Verdict { level, reason, also: Vec::new() }
}

/// The change that helps most according to a sweep ranking, in words.
pub fn best_change(t: &RankTable) -> Option<String> {
    t.entries.first()?;
    let best = t.entries.iter().find(|e| e.spec != NO_PAD && e.verdict == stillsky::batch::Verdict::Better);
    Some(match best {
        None => format!("No isolator in the catalogue visibly beats standing without pads ({}).", t.scope()),
        Some(best) => format!(
            "The change that helps most ({}): isolator {} (image RMS {:.2} × that without pads, mean over {} case(s); \
             P(outside ½ px) {:.3}).",
            t.scope(),
            best.spec,
            best.mean_ratio,
            best.cases,
            best.mean_p_outside_half_px
        ),
    })
}

fn star_budget_html(r: &Report) -> String {
    let im = &r.image;
    let b = &im.budget;
    let mut rows: Vec<Vec<String>> = Vec::new();
    for l in b.lines.iter().filter(|l| l.in_exposure) {
        rows.push(vec![l.label.clone(), num(l.fwhm_arcsec[0], 3), num(l.fwhm_arcsec[1], 3)]);
    }
    let one =
        if b.exposure_s.is_some() { "= star FWHM in one exposure" } else { "= star FWHM (long exposure)" };
    rows.push(vec![one.into(), num(b.exposure.fwhm_arcsec[0], 3), num(b.exposure.fwhm_arcsec[1], 3)]);
    for l in b.lines.iter().filter(|l| !l.in_exposure) {
        rows.push(vec![
            format!("{} (not in one exposure)", l.label),
            num(l.fwhm_arcsec[0], 3),
            num(l.fwhm_arcsec[1], 3),
        ]);
        rows.push(vec![
            "= FWHM of an unregistered stack".into(),
            num(b.unregistered_stack.fwhm_arcsec[0], 3),
            num(b.unregistered_stack.fwhm_arcsec[1], 3),
        ]);
    }
    let e = &b.exposure;
    let mut o = para("Gaussian terms added in quadrature; FWHM-equivalent 2.355 σ along each sensor axis.");
    o.push_str(&table("budget", &["term", "x (arcsec)", "y (arcsec)"], &rows));
    o.push_str(&para(&format!(
        "Star: {:.3} × {:.3} px (x, y); elongation {:.3} (major {:.3}, minor {:.3} arcsec), major axis {:.1}° from \
         sensor x toward y.",
        e.fwhm_px[0], e.fwhm_px[1], e.elongation, e.major_fwhm_arcsec, e.minor_fwhm_arcsec, e.major_axis_deg
    )));
    if !b.notes.is_empty() {
        o.push_str(&list("notes", &b.notes));
    }
    o
}

fn image_motion_html(r: &Report) -> String {
    let im = &r.image;
    let um_per_arcsec = im.rms_um / im.rms_arcsec.max(1e-300);
    let rows: Vec<Vec<String>> = [
        (r.image_axes[0].as_str(), im.per_axis_arcsec[0]),
        (r.image_axes[1].as_str(), im.per_axis_arcsec[1]),
        ("radial", im.rms_arcsec),
    ]
    .iter()
    .map(|(n, v)| {
        vec![n.to_string(), num(*v, 4), num(v * um_per_arcsec, 4), num(v / im.plate_scale_arcsec_per_px, 4)]
    })
    .collect();
    let mut o = table("image-motion", &["RMS", "arcsec", "µm", "px"], &rows);
    let mut facts: Vec<(String, String)> = vec![(
        format!("probability outside {} px", im.radius_px),
        format!("{:.3e} ({:.2} %)", im.p_outside, 100.0 * im.p_outside),
    )];
    if let Some(p) = &im.peak {
        facts.push((
            format!("expected peak |excursion| in {} s (Davenport 1964 peak factor)", p.duration_s),
            format!(
                "x {:.4} arcsec = {:.3} px ({:.2} RMS); y {:.4} arcsec = {:.3} px ({:.2} RMS)",
                p.peak_arcsec[0],
                p.peak_px[0],
                p.peak_factor[0],
                p.peak_arcsec[1],
                p.peak_px[1],
                p.peak_factor[1]
            ),
        ));
    }
    let ([bx, by], _) = r.blur_vs_seeing();
    facts.push(("motion blur FWHM (2.355 σ, all motion)".into(), format!("x {bx:.3}, y {by:.3} arcsec")));
    if let Some((label, f, share)) = r.dominant_mode() {
        facts.push((
            "dominant mode".into(),
            format!("{label} at {f:.2} Hz ({:.0} % of the mean square)", 100.0 * share),
        ));
    }
    facts.push((
        "dominant band".into(),
        format!("third octave at {:.2} Hz ({:.0} %)", im.dominant_band_hz, 100.0 * im.dominant_band_share),
    ));
    for (name, share) in &im.input_share {
        facts.push((format!("share from {name}"), format!("{:.1} %", 100.0 * share)));
    }
    if let Some(e) = &im.exposure {
        facts.push((
            format!("exposure {} s", e.exposure_s),
            format!("wander {:.4} arcsec, smear {:.4} arcsec RMS", e.wander_rms_arcsec, e.smear_rms_arcsec),
        ));
    }
    if let Some(gm) = &im.guiding {
        facts.push((
            "guiding".into(),
            format!(
                "radial RMS {:.4} arcsec unguided → {:.4} arcsec guided; aliased x {:.4}, y {:.4} arcsec; guide Nyquist {:.3} Hz",
                gm.unguided_rms_arcsec,
                im.rms_arcsec,
                gm.aliased_per_axis_arcsec[0],
                gm.aliased_per_axis_arcsec[1],
                gm.nyquist_hz
            ),
        ));
    }
    if let Some(g) = &r.gust {
        let f = &g.family;
        let (p, q) = (&f.cases[f.worst_peak], &f.cases[f.worst_ringdown]);
        let ring = q.ringdown_s.map_or("not within the record".to_string(), |t| format!("{t:.2} s"));
        facts.push((
            "gust family (1-cosine)".into(),
            format!(
                "worst peak {:.3} px under the {:.2} s gust of {:.2} m/s; longest ring-down {ring} after the {:.2} s gust",
                p.peak_px, p.duration_s, p.amplitude_m_s, q.duration_s
            ),
        ));
    }
    o.push_str(&pairs("image-facts", ["quantity", "value"], &facts));
    o
}

/// At most this many modes in the table (the JSON has them all).
const MAX_MODE_ROWS: usize = 30;

fn modes_html(r: &Report) -> String {
    let top = |v: &[(String, f64)]| {
        v.iter().map(|(n, f)| format!("{n} {:.0} %", 100.0 * f)).collect::<Vec<_>>().join(", ")
    };
    let rows: Vec<Vec<String>> = r
        .modes
        .iter()
        .take(MAX_MODE_ROWS)
        .map(|m| {
            let [a, b, c] = m.effective_mass_kg;
            vec![
                m.index.to_string(),
                num(m.frequency_hz, 3),
                num(m.damping_ratio, 4),
                m.image_share.map_or("–".to_string(), |x| num(100.0 * x, 1)),
                m.label.clone(),
                top(&m.moving),
                top(&m.flexing),
                format!("{} / {} / {}", num(a, 2), num(b, 2), num(c, 2)),
            ]
        })
        .collect();
    let mut o = para(&format!(
        "First {} of {} modes. Image share: the mode's part of the image mean square (a mode whose motion cancels \
         another's has a negative share). Moving: kinetic energy per body; flexing: strain energy per connector.",
        rows.len(),
        r.modes.len()
    ));
    o.push_str(&table(
        "modes",
        &[
            "#",
            "f (Hz)",
            "ζ",
            "image share (%)",
            "mode (mount axes)",
            "moving",
            "flexing",
            "eff. mass x/y/z (kg)",
        ],
        &rows,
    ));
    o
}

/// A ring-down time (s) in a table cell, or that the image did not settle within the record.
fn ring(t: Option<f64>) -> String {
    t.map_or("not within the record".to_string(), |v| num(v, 2))
}

/// The gust family of the rig, and the rig beside its alternatives.
fn gusts_html(g: &stillsky::batch::GustReport) -> String {
    let rows: Vec<Vec<String>> = g
        .family
        .cases
        .iter()
        .enumerate()
        .map(|(k, c)| {
            let mark = match (k == g.family.worst_peak, k == g.family.worst_ringdown) {
                (true, true) => "worst peak and ring-down",
                (true, false) => "worst peak",
                (false, true) => "longest ring-down",
                _ => "",
            };
            vec![
                num(c.duration_s, 3),
                num(c.amplitude_m_s, 3),
                num(c.peak_px, 3),
                ring(c.ringdown_s),
                mark.into(),
            ]
        })
        .collect();
    let mut o = para(
        "A family of 1-cosine gusts from half the first period to 4 s, each of 3 × the RMS velocity change over its \
         rise; ring-down is the time from the end of the gust until the image stays within ½ px.",
    );
    o.push_str(&table(
        "gust-family",
        &["duration (s)", "gust (m/s)", "peak (px)", "ring-down (s)", ""],
        &rows,
    ));
    if g.rigs.len() > 1 {
        let rows: Vec<Vec<String>> = g
            .rigs
            .iter()
            .map(|o| match &o.error {
                Some(e) => vec![o.label.clone(), "–".into(), "–".into(), format!("not computed: {e}")],
                None => vec![
                    o.label.clone(),
                    num(o.worst_peak_px, 3),
                    ring(o.worst_ringdown_s),
                    format!(
                        "peak at {} s, ring-down at {} s gusts",
                        num(o.worst_peak_duration_s, 2),
                        num(o.worst_ringdown_duration_s, 2)
                    ),
                ],
            })
            .collect();
        o.push_str("<h3>The rig and its alternatives (each over its own gust family)</h3>\n");
        o.push_str(&table("gust-rigs", &["rig", "worst peak (px)", "longest ring-down (s)", "note"], &rows));
    }
    o
}

fn criteria_html(r: &Report) -> String {
    let rows: Vec<Vec<String>> = r
        .criteria
        .iter()
        .map(|c| {
            vec![
                c.curve.clone(),
                num(c.level_um_s, 2),
                format!("{:.2e}", c.worst_ratio),
                num(c.worst_band_hz, 1),
                c.worst_axis.clone(),
                if c.passes { "pass" } else { "exceeded" }.into(),
            ]
        })
        .collect();
    table(
        "criteria",
        &["curve", "limit (µm/s)", "worst ratio to limit", "at band (Hz)", "axis", "result"],
        &rows,
    )
}

fn ranking_html(t: &RankTable, id: &str) -> String {
    let windy = t.entries.iter().any(|e| e.gust_peak_px.is_finite());
    let rows: Vec<Vec<String>> = t
        .entries
        .iter()
        .enumerate()
        .map(|(k, e)| {
            let mut note =
                if e.spec == NO_PAD { "baseline".to_string() } else { e.verdict.words().to_string() };
            if e.overloaded {
                note.push_str("; over rated load");
            }
            let mut row = vec![
                (k + 1).to_string(),
                e.spec.clone(),
                num(e.mean_ratio, 3),
                num(e.mean_rms_px, 4),
                format!("{:.3e}", e.mean_p_outside_half_px),
                format!("{}/{}/{}", e.cases_better, e.cases_same, e.cases_worse),
            ];
            if windy {
                row.push(num(e.gust_peak_px, 3));
                // NaN: the image did not settle within the record.
                row.push(ring(Some(e.gust_ringdown_s).filter(|t| t.is_finite())));
            }
            row.push(note);
            row
        })
        .collect();
    let mut o = format!("<h3>{}</h3>\n", escape(&t.scope()));
    let mut head = vec![
        "rank",
        "isolator",
        "mean ratio to no pads",
        "mean RMS (px)",
        "P(outside ½ px)",
        "cases better/same/worse",
    ];
    if windy {
        head.extend(["worst gust peak (px)", "longest ring-down (s)"]);
    }
    head.push("verdict");
    o.push_str(&table(id, &head, &rows));
    o
}

/// The ranking tables, plot and failures of a sweep.
fn sweep_html(o: &SweepOutcome, plots: &[Plot]) -> String {
    let mut h = para(&format!(
        "{} rows ({} computed, {} kept from an earlier run) in {}. Lower ratios are better; 1 is no pads.",
        o.rows.len(),
        o.computed,
        o.kept,
        o.path.display()
    ));
    let v = &o.summary.visibility;
    h.push_str(&para(&format!(
        "Verdicts against no pads: no visible difference when both stay below {} px RMS and P(outside ½ px) {} %, or \
         differ by less than that. Calm and windy cases are ranked apart.",
        v.rms_px,
        100.0 * v.p_outside
    )));
    for (k, t) in o.summary.per_wind.iter().enumerate() {
        let id = if k == 0 { "ranking-overall".to_string() } else { format!("ranking-wind-{}", k + 1) };
        h.push_str(&ranking_html(t, &id));
        if let Some(p) = plots.get(k) {
            h.push_str(&figure(p, &p.title));
        }
    }
    for (k, t) in o.summary.per_wind_spectrum.iter().enumerate() {
        h.push_str(&ranking_html(t, &format!("ranking-{}", k + 1)));
    }
    if !o.summary.failures.is_empty() {
        let f: Vec<String> = o.summary.failures.iter().map(|(k, e)| format!("{k}: {e}")).collect();
        h.push_str("<h3>Failed inputs</h3>\n");
        h.push_str(&list("failures", &f));
    }
    h
}

/// Static checks with their verdicts and the cautions, word for word.
fn checks_html(wind: &StaticWind, c: &CheckReport) -> String {
    let rows: Vec<Vec<String>> = c
        .checks
        .iter()
        .map(|k| {
            vec![
                k.name.clone(),
                format!("{:.4e}", k.value),
                format!("{:.4e}", k.limit),
                k.unit.clone(),
                num(k.margin, 2),
                format!("{:?}", k.verdict),
            ]
        })
        .collect();
    let mut o = para(&format!(
        "Design wind {:.1} m/s, gust factor {:.2}, air density {} kg/m³. Overall: {:?}.",
        wind.speed_m_s,
        wind.gust_factor,
        wind.air_density_kg_m3,
        c.verdict()
    ));
    o.push_str(&table(
        "checks",
        &["check", "demand", "capacity", "unit", "factor of safety", "verdict"],
        &rows,
    ));
    if !c.notes.is_empty() {
        o.push_str(&list("notes", &c.notes));
    }
    let cautions: Vec<String> = c.cautions().iter().map(|s| s.to_string()).collect();
    o.push_str(&list("cautions", &cautions));
    o
}

/// What a report page shows.
pub struct ReportContent<'a> {
    /// The model file as the user named it.
    pub model_path: &'a str,
    pub model_title: Option<&'a str>,
    pub report: &'a Report,
    pub plots: &'a [Plot],
    /// Static checks of a rig file, with the wind they assumed.
    pub checks: Option<(&'a StaticWind, &'a CheckReport)>,
    /// Every input and default used, as (name, value).
    pub inputs: &'a [(String, String)],
    /// A sweep run together with the report (the demo).
    pub sweep: Option<(&'a SweepOutcome, &'a [Plot])>,
}

fn plot_caption(p: &Plot, r: &Report) -> String {
    let plate = r.image.plate_scale_arcsec_per_px;
    match p.file_name {
        "image-psd.svg" => format!(
            "{}. Pixel scale {plate:.3} arcsec/px ({:.2} µm pixels at {} mm): 1 px² = {:.4} arcsec².",
            p.title,
            r.image.pixel_um,
            r.image.focal_length_mm,
            plate * plate
        ),
        "cumulative-rms.svg" => format!("{}; the dash-dot line is ½ px.", p.title),
        "gust.svg" => format!("{}; the dash-dot lines are ±½ px.", p.title),
        "sky-map.svg" => match &r.sky_map {
            Some(m) => format!("{}. {}.", p.title, sky_map_words(m)),
            None => p.title.clone(),
        },
        _ => p.title.clone(),
    }
}

/// The sky map's best and worst cells in words, with the rule for skipped cells.
/// The people section: a walking pass, the steady footfall lines, and the standing table.
fn people_html(p: &stillsky::batch::PeopleReport) -> String {
    let (w, pass) = (&p.walker, &p.walking);
    let lines: Vec<String> = p
        .steady
        .lines
        .iter()
        .map(|l| format!("{:.1} Hz {:.0} N → {:.3}″", l.frequency_hz, l.force_n, l.image_rms_arcsec))
        .collect();
    let mut h = para(&format!(
        "A person of {:.0} N walking at {:.2} Hz ({} load factors) at x {:.2}, y {:.2} m on the deck '{}': \
         peak {:.3}″ ({:.2} px) at {:.2} s, the weight's tilt included; RMS about the mean {:.3}″ ({:.2} px). \
         Steady footfall lines: {}; total RMS {:.3}″ ({:.2} px).",
        w.weight_n,
        w.pace_hz,
        w.model.name(),
        pass.point_m[0],
        pass.point_m[1],
        p.deck,
        pass.peak_arcsec,
        pass.peak_px,
        pass.peak_time_s,
        pass.rms_arcsec,
        pass.rms_px,
        lines.join(", "),
        p.steady.rms_arcsec,
        p.steady.rms_px
    ));
    let t = &p.standing;
    let rows: Vec<Vec<String>> = t
        .rows
        .iter()
        .map(|r| {
            vec![
                format!("{:.3}", r.distance_m),
                format!("{:.0}", r.azimuth_deg),
                format!("{:.4}", r.image_arcsec),
                format!("{:.3}", r.image_px),
                format!("{:.4}", r.deck_tilt_arcsec),
            ]
        })
        .collect();
    h.push_str(&table(
        "standing",
        &["distance m", "azimuth deg", "image arcsec", "image px", "deck tilt arcsec"],
        &rows,
    ));
    h.push_str(&para(&format!(
        "Standing still ({:.0} N): {}. The deck is a rigid body here: the local dip of boards and joists under a foot is not modelled, so a real deck tilts a stand on it more near the foot.",
        t.weight_n,
        crate::print::standing_verdict(t)
    )));
    h
}

pub fn sky_map_words(m: &stillsky::skymap::SkyMap) -> String {
    let cap = |s: String| {
        let mut c = s.chars();
        c.next().map_or(String::new(), |f| f.to_uppercase().collect::<String>() + c.as_str())
    };
    let side = m.pier_side_text().map(|t| format!(" {}.", cap(t.to_string()))).unwrap_or_default();
    format!(
        "{} (pointings below {:.0}° altitude are not mapped).{side}",
        cap(m.summary_text()),
        m.min_altitude_deg
    )
}

/// The report page.
pub fn report_page(c: &ReportContent) -> String {
    let r = c.report;
    let title = match c.model_title {
        Some(t) if !t.trim().is_empty() => format!("stillsky report: {t}"),
        _ => "stillsky report".to_string(),
    };
    let mut page = Page::new(&title, &format!("model file {}", c.model_path));
    let mut v = report_verdict(r);
    if let Some((o, _)) = c.sweep {
        v.also.extend(o.summary.per_wind.iter().filter_map(best_change));
    }
    if let Some((_, k)) = c.checks {
        v.also.push(format!(
            "Static checks: {:?} overall (lowest factor of safety {:.2}); see the cautions below.",
            k.verdict(),
            k.min_margin()
        ));
    }
    page.verdict(&v);
    page.section("star-budget", "Star image budget", &star_budget_html(r));
    page.section("image-motion-section", "Image motion", &image_motion_html(r));
    page.section("modes-section", "Modes", &modes_html(r));
    if let Some(g) = &r.gust {
        page.section("gusts", "Gusts", &gusts_html(g));
    }
    if let Some(p) = &r.people {
        page.section("people-section", "People on the deck", &people_html(p));
    }
    if let Some(m) = &r.sky_map {
        page.section("sky-map-section", "Sky map", &para(&format!("{}.", sky_map_words(m))));
    }
    if !r.criteria.is_empty() {
        page.section("criteria-section", "Ground against criterion curves", &criteria_html(r));
    }
    let mut figs = String::new();
    for p in c.plots {
        figs.push_str(&figure(p, &plot_caption(p, r)));
    }
    page.section("plots", "Plots", &figs);
    if let Some((o, plots)) = c.sweep {
        page.section("sweep", "Isolator sweep", &sweep_html(o, plots));
    }
    if let Some((w, k)) = c.checks {
        page.section("static-checks", "Static checks", &checks_html(w, k));
    }
    if !r.notes.is_empty() {
        page.section("notes", "Notes", &list("notes", &r.notes));
    }
    page.section("inputs", "Inputs and defaults used", &pairs("inputs-table", ["input", "value"], c.inputs));
    page.finish()
}

/// What a sweep page shows.
pub struct SweepContent<'a> {
    pub outcome: &'a SweepOutcome,
    pub plots: &'a [Plot],
    pub inputs: &'a [(String, String)],
}

/// The sweep page: the verdict of the best isolator, the rankings and the inputs.
pub fn sweep_page(c: &SweepContent) -> String {
    let o = c.outcome;
    let mut page = Page::new("stillsky isolator sweep", &format!("rows in {}", o.path.display()));
    // The hardest wind case decides the page's verdict.
    let hardest = o.summary.per_wind.iter().max_by(|a, b| {
        let p = |t: &RankTable| t.entries.first().map_or(0.0, |e| e.mean_p_outside_half_px);
        p(a).total_cmp(&p(b))
    });
    if let Some((t, best)) = hardest.and_then(|t| t.entries.first().map(|e| (t, e))) {
        let level = Level::from_p_outside(best.mean_p_outside_half_px);
        let hardest_of = if o.summary.per_wind.len() > 1 { " (the hardest wind case)" } else { "" };
        let reason = format!(
            "In {}{hardest_of}, with the best choice ({}), the star's centre is outside ½ px {:.2} % of the time on average over {} case(s) \
             (rule: {}).",
            t.scope(),
            best.spec,
            100.0 * best.mean_p_outside_half_px,
            best.cases,
            level.rule()
        );
        let also = o.summary.per_wind.iter().filter_map(best_change).collect();
        page.verdict(&Verdict { level, reason, also });
    }
    page.section("sweep", "Isolator sweep", &sweep_html(o, c.plots));
    page.section("inputs", "Inputs and defaults used", &pairs("inputs-table", ["input", "value"], c.inputs));
    page.finish()
}

/// A frequency grid in words: number of points and range.
pub fn grid_text(hz: &[f64]) -> String {
    match (hz.first(), hz.last()) {
        (Some(a), Some(b)) => format!("{} points, {a} to {b} Hz (log-spaced)", hz.len()),
        _ => "empty".into(),
    }
}

/// The inputs and defaults of a report run, for the page's last table.
pub fn report_inputs(
    model_path: &str,
    o: &ReportOptions,
    r: &Report,
    wind: Option<&StaticWind>,
) -> Vec<(String, String)> {
    let im = &r.image;
    let ground = if o.ground_off {
        "none".to_string()
    } else {
        match &o.ground {
            Some(g) => format!("{} ({g:?})", g.label()),
            None => "nhnm (default: Peterson's high-noise model)".into(),
        }
    };
    let mut v: Vec<(String, String)> = vec![
        ("program".into(), format!("stillsky {}", env!("CARGO_PKG_VERSION"))),
        ("model file".into(), model_path.into()),
        ("degrees of freedom".into(), r.dof_count.to_string()),
        ("optics on body".into(), r.optics_body.clone()),
        ("frequency grid".into(), grid_text(o.grid.hz())),
        ("ground".into(), ground),
        ("ground label".into(), opt(r.ground_label.as_deref(), "none")),
        ("ground scale x, y, z".into(), format!("{:?}", o.ground_scale)),
        ("recording options".into(), format!("{:?}", o.series)),
        ("wind".into(), opt(r.wind.as_deref(), "none")),
        ("wind spec".into(), o.wind.as_ref().map_or("none".into(), |w| format!("{w:?}"))),
        ("focal length (mm)".into(), format!("{} ({})", im.focal_length_mm, given(o.focal_length_mm))),
        ("pixel (µm)".into(), format!("{} ({})", im.pixel_um, given(o.pixel_um))),
        ("plate scale (arcsec/px)".into(), format!("{:.4}", im.plate_scale_arcsec_per_px)),
        ("altitude (deg)".into(), opt(o.altitude_deg, "model's")),
        ("azimuth (deg)".into(), opt(o.azimuth_deg, "model's")),
        (
            "seeing FWHM (arcsec)".into(),
            format!("{} ({})", opt(im.seeing_fwhm_arcsec, "none"), given(o.seeing_fwhm_arcsec)),
        ),
        ("aperture (mm)".into(), opt(o.aperture_mm, "model's")),
        ("wavelength (nm)".into(), format!("{} ({})", im.budget.wavelength_nm, given(o.wavelength_nm))),
        ("exposure (s)".into(), opt(o.exposure_s, "none (long exposure)")),
        ("radius for the probability (px)".into(), im.radius_px.to_string()),
        ("guide loop".into(), im.guide.as_ref().map_or("none".into(), |g| format!("{g:?}"))),
        ("wind from (deg)".into(), opt(o.wind_from_deg, "the model's own ([wind_load], else 270)")),
    ];
    if let Some(m) = &r.sky_map {
        let [rn, cn] = m.frame.axis_names();
        v.push((
            "sky map grid".into(),
            format!(
                "{rn} {:?} × {cn} {:?}; cells below {}° altitude skipped",
                m.rows_deg, m.cols_deg, m.min_altitude_deg
            ),
        ));
    }
    if let Some(w) = wind {
        v.push((
            "static checks wind".into(),
            format!(
                "{} m/s, gust factor {}, air density {} kg/m³ (defaults)",
                w.speed_m_s, w.gust_factor, w.air_density_kg_m3
            ),
        ));
    }
    v
}

fn given<T>(o: Option<T>) -> &'static str {
    if o.is_some() { "given" } else { "model's or default" }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn escape_replaces_the_five_markup_characters() {
        assert_eq!(escape(r#"<a href="x">'&'</a>"#), "&lt;a href=&quot;x&quot;&gt;&#39;&amp;&#39;&lt;/a&gt;");
        assert_eq!(escape("plain µm ½"), "plain µm ½");
    }

    #[test]
    fn page_escapes_title_subtitle_and_table_cells() {
        let mut p = Page::new("<b>t</b>", "path/<i>&");
        p.section("s", "head<", &table("t", &["h&"], &[vec!["<script>".into()]]));
        let h = p.finish();
        assert!(!h.contains("<b>t</b>") && !h.contains("<i>") && !h.contains("<script>"), "{h}");
        assert!(h.contains("&lt;b&gt;t&lt;/b&gt;") && h.contains("path/&lt;i&gt;&amp;"));
        assert!(h.contains("<td>&lt;script&gt;</td>") && h.contains("<th>h&amp;</th>"));
    }

    #[test]
    fn numeric_cells_are_right_aligned_and_text_cells_not() {
        let t = table("t", &["a", "b"], &[vec!["1.50".into(), "x".into()]]);
        assert!(t.contains("<td class=\"num\">1.50</td><td>x</td>"), "{t}");
    }
}
