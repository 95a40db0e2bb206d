//! SVG plots of a report and of a sweep ranking (plotters). Each plot renders to a string (for
//! the HTML page) and the same text goes to a file (for `--plots DIR`). Lines differ by pattern
//! (solid, dashed, dotted, markers) as well as colour; log axes are labelled in decades.

use plotters::element::DashedPathElement;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};
use std::path::{Path, PathBuf};
use stillsky::batch::{Curve, NO_PAD, RankTable, Report, Verdict};

type PlotResult<T> = Result<T, Box<dyn std::error::Error>>;

/// One rendered plot: the file name it is written to, a short title and the SVG text.
pub struct Plot {
    pub file_name: &'static str,
    pub title: String,
    pub svg: String,
}

const COLOURS: [RGBColor; 8] = [
    RGBColor(31, 119, 180),
    RGBColor(214, 39, 40),
    RGBColor(44, 160, 44),
    RGBColor(148, 103, 189),
    RGBColor(255, 127, 14),
    RGBColor(140, 86, 75),
    RGBColor(227, 119, 194),
    RGBColor(127, 127, 127),
];

const FONT: &str = "sans-serif";
const CAPTION_PT: u32 = 26;
const AXIS_PT: u32 = 20;
const TICK_PT: u32 = 17;
const LEGEND_PT: u32 = 17;
const SIZE: (u32, u32) = (1000, 640);
/// Length of the line sample in a legend (px).
const LEGEND_W: i32 = 22;

/// How a line is drawn, so that no two lines of a plot differ by colour alone.
#[derive(Clone, Copy, Debug, PartialEq)]
enum Pattern {
    Solid,
    Dashed,
    Dotted,
    Circles,
    Triangles,
    Squares,
    Crosses,
    /// Long dashes and dots, for thresholds such as ±½ px.
    DashDot,
}

const PATTERNS: [Pattern; 7] = [
    Pattern::Solid,
    Pattern::Dashed,
    Pattern::Dotted,
    Pattern::Circles,
    Pattern::Triangles,
    Pattern::Squares,
    Pattern::Crosses,
];

struct Line<'a> {
    label: String,
    x: &'a [f64],
    y: Vec<f64>,
    /// A reference curve or threshold: drawn thinner.
    reference: bool,
    /// Fixed pattern and colour (thresholds); otherwise chosen by position.
    fixed: Option<(Pattern, RGBColor)>,
    /// Text written at the right end of the line.
    end_label: Option<String>,
}

fn line(c: &Curve) -> Line<'_> {
    Line {
        label: c.label.clone(),
        x: &c.freq_hz,
        y: c.values.clone(),
        reference: false,
        fixed: None,
        end_label: None,
    }
}

fn data_line<'a>(label: &str, x: &'a [f64], y: Vec<f64>) -> Line<'a> {
    Line { label: label.into(), x, y, reference: false, fixed: None, end_label: None }
}

/// A horizontal threshold with its value written at the right end.
fn threshold<'a>(label: &str, x: &'a [f64], y: f64) -> Line<'a> {
    Line {
        label: label.into(),
        x,
        y: vec![y; x.len()],
        reference: true,
        fixed: Some((Pattern::DashDot, BLACK)),
        end_label: Some(label.into()),
    }
}

fn superscript(n: i32) -> String {
    n.to_string()
        .chars()
        .map(|c| match c {
            '-' => '⁻',
            '0' => '⁰',
            '1' => '¹',
            '2' => '²',
            '3' => '³',
            '4' => '⁴',
            '5' => '⁵',
            '6' => '⁶',
            '7' => '⁷',
            '8' => '⁸',
            _ => '⁹',
        })
        .collect()
}

/// A tick label: plain decimals from 0.001 to 9999 (at most three significant digits, trailing
/// zeros dropped), otherwise 10ⁿ or m×10ⁿ with a Unicode superscript.
pub fn tick_label(v: f64) -> String {
    if v == 0.0 || !v.is_finite() {
        return "0".into();
    }
    let a = v.abs();
    let e = a.log10().floor() as i32;
    if (1e-3..1e4).contains(&a) {
        let decimals = (2 - e).clamp(0, 6) as usize;
        let s = format!("{v:.decimals$}");
        let s = if s.contains('.') { s.trim_end_matches('0').trim_end_matches('.').to_string() } else { s };
        return if s == "-0" { "0".into() } else { s.replace('-', "−") };
    }
    // Round the mantissa first: 9.996e-5 is 1.00×10⁻⁴, not 10.0×10⁻⁵.
    let (mut m, mut e) = (v / 10f64.powi(e), e);
    m = (m * 100.0).round() / 100.0;
    if m.abs() >= 10.0 {
        m /= 10.0;
        e += 1;
    }
    if (m.abs() - 1.0).abs() < 1e-9 {
        format!("{}10{}", if m < 0.0 { "−" } else { "" }, superscript(e))
    } else {
        format!("{}×10{}", tick_label(m), superscript(e))
    }
}

/// Data range of the lines that can be drawn (log axes need positive values), and the smallest
/// and largest y of the data lines alone (not the reference curves).
fn extent(lines: &[Line], log_x: bool, log_y: bool) -> Option<([f64; 4], [f64; 2])> {
    let keep = |x: f64, y: f64| x.is_finite() && y.is_finite() && (!log_x || x > 0.0) && (!log_y || y > 0.0);
    let (mut x0, mut x1, mut y0, mut y1) = (f64::MAX, f64::MIN, f64::MAX, f64::MIN);
    let (mut d0, mut d1) = (f64::MAX, f64::MIN);
    for l in lines {
        for (&a, &b) in l.x.iter().zip(&l.y) {
            if keep(a, b) {
                x0 = x0.min(a);
                x1 = x1.max(a);
                y0 = y0.min(b);
                y1 = y1.max(b);
                if !l.reference {
                    d0 = d0.min(b);
                    d1 = d1.max(b);
                }
            }
        }
    }
    if x0 > x1 {
        return None;
    }
    if d0 > d1 {
        (d0, d1) = (y0, y1);
    }
    Some(([x0, x1, y0, y1], [d0, d1]))
}

/// A chart with logarithmic (or linear) axes; points ≤ 0 are dropped on log axes.
fn chart(
    title: &str,
    x_desc: &str,
    y_desc: &str,
    lines: &[Line],
    log_x: bool,
    log_y: bool,
    legend_at: SeriesLabelPosition,
) -> PlotResult<String> {
    let keep = |x: f64, y: f64| x.is_finite() && y.is_finite() && (!log_x || x > 0.0) && (!log_y || y > 0.0);
    let Some(([x0, mut x1, mut y0, mut y1], [d0, d1])) = extent(lines, log_x, log_y) else {
        return Err(format!("nothing to plot in {title}").into());
    };
    if log_y {
        // Show the data lines down to eight decades below their own top (near-zero tails would
        // flatten the plot) and reference curves down to twelve decades below the top.
        y0 = y0.max(y1 * 1e-12).min(d0.max(d1 * 1e-8));
        y0 *= 0.5;
        y1 *= 2.0;
    } else {
        let pad = 0.08 * (y1 - y0).max(1e-12);
        y0 -= pad;
        y1 += pad;
    }
    if x1 <= x0 {
        x1 = x0 * 2.0 + 1.0;
    }
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, SIZE).into_drawing_area();
        root.fill(&WHITE)?;
        let mut b = ChartBuilder::on(&root);
        b.caption(title, (FONT, CAPTION_PT)).margin(16).x_label_area_size(64).y_label_area_size(96);
        macro_rules! draw {
            ($c:expr) => {{
                let mut c = $c;
                c.configure_mesh()
                    .x_desc(x_desc)
                    .y_desc(y_desc)
                    .label_style((FONT, TICK_PT))
                    .axis_desc_style((FONT, AXIS_PT))
                    .light_line_style(RGBColor(235, 235, 235))
                    .y_label_formatter(&|v| tick_label(*v))
                    .x_label_formatter(&|v| tick_label(*v))
                    .draw()?;
                for (k, l) in lines.iter().enumerate() {
                    let (pattern, col) =
                        l.fixed.unwrap_or((PATTERNS[k % PATTERNS.len()], COLOURS[k % COLOURS.len()]));
                    let data: Vec<(f64, f64)> =
                        l.x.iter()
                            .zip(&l.y)
                            .filter(|&(_, b)| !(log_y && l.reference && *b < y0))
                            .map(|(a, b)| (*a, if log_y { b.max(y0) } else { *b }))
                            .filter(|&(a, b)| keep(a, b))
                            .collect();
                    let width = if l.reference { 1 } else { 2 };
                    let style = ShapeStyle { color: col.to_rgba(), filled: false, stroke_width: width };
                    let step = (data.len() / 14).max(1);
                    let marks: Vec<(f64, f64)> =
                        data.iter().skip((k * step / 3) % step).step_by(step).copied().collect();
                    let label = l.label.clone();
                    match pattern {
                        Pattern::Solid => {
                            c.draw_series(LineSeries::new(data.clone(), style))?.label(label).legend(
                                move |(x, y)| PathElement::new(vec![(x, y), (x + LEGEND_W, y)], style),
                            );
                        }
                        Pattern::Dashed => {
                            c.draw_series(DashedLineSeries::new(data.clone(), 10, 6, style))?
                                .label(label)
                                .legend(move |(x, y)| {
                                    DashedPathElement::new(vec![(x, y), (x + LEGEND_W, y)], 10, 6, style)
                                });
                        }
                        Pattern::Dotted => {
                            let dot = ShapeStyle { stroke_width: width + 1, ..style };
                            c.draw_series(DashedLineSeries::new(data.clone(), 2, 5, dot))?
                                .label(label)
                                .legend(move |(x, y)| {
                                    DashedPathElement::new(vec![(x, y), (x + LEGEND_W, y)], 2, 5, dot)
                                });
                        }
                        Pattern::DashDot => {
                            c.draw_series(DashedLineSeries::new(data.clone(), 14, 5, style))?;
                            c.draw_series(DashedLineSeries::new(data.clone(), 2, 17, style))?
                                .label(label)
                                .legend(move |(x, y)| {
                                    DashedPathElement::new(vec![(x, y), (x + LEGEND_W, y)], 14, 5, style)
                                });
                        }
                        Pattern::Circles => {
                            c.draw_series(LineSeries::new(data.clone(), style))?;
                            c.draw_series(marks.iter().map(|&p| Circle::new(p, 5, style)))?
                                .label(label)
                                .legend(move |(x, y)| {
                                    EmptyElement::at((x, y))
                                        + PathElement::new(vec![(0, 0), (LEGEND_W, 0)], style)
                                        + Circle::new((LEGEND_W / 2, 0), 5, style)
                                });
                        }
                        Pattern::Triangles => {
                            c.draw_series(LineSeries::new(data.clone(), style))?;
                            c.draw_series(marks.iter().map(|&p| TriangleMarker::new(p, 6, style)))?
                                .label(label)
                                .legend(move |(x, y)| {
                                    EmptyElement::at((x, y))
                                        + PathElement::new(vec![(0, 0), (LEGEND_W, 0)], style)
                                        + TriangleMarker::new((LEGEND_W / 2, 0), 6, style)
                                });
                        }
                        Pattern::Squares => {
                            c.draw_series(LineSeries::new(data.clone(), style))?;
                            c.draw_series(
                                marks.iter().map(|&p| {
                                    EmptyElement::at(p) + Rectangle::new([(-4, -4), (4, 4)], style)
                                }),
                            )?
                            .label(label)
                            .legend(move |(x, y)| {
                                EmptyElement::at((x, y))
                                    + PathElement::new(vec![(0, 0), (LEGEND_W, 0)], style)
                                    + Rectangle::new([(LEGEND_W / 2 - 4, -4), (LEGEND_W / 2 + 4, 4)], style)
                            });
                        }
                        Pattern::Crosses => {
                            c.draw_series(LineSeries::new(data.clone(), style))?;
                            c.draw_series(marks.iter().map(|&p| Cross::new(p, 5, style)))?
                                .label(label)
                                .legend(move |(x, y)| {
                                    EmptyElement::at((x, y))
                                        + PathElement::new(vec![(0, 0), (LEGEND_W, 0)], style)
                                        + Cross::new((LEGEND_W / 2, 0), 5, style)
                                });
                        }
                    }
                    if let (Some(text), Some(&(xe, ye))) = (&l.end_label, data.last()) {
                        let v = if ye >= 0.0 { VPos::Bottom } else { VPos::Top };
                        let font =
                            TextStyle::from((FONT, LEGEND_PT).into_font()).pos(Pos::new(HPos::Right, v));
                        c.draw_series(std::iter::once(Text::new(text.clone(), (xe, ye), font)))?;
                    }
                }
                c.configure_series_labels()
                    .position(legend_at.clone())
                    .label_font((FONT, LEGEND_PT))
                    .background_style(WHITE.mix(0.9))
                    .border_style(BLACK)
                    .draw()?;
            }};
        }
        match (log_x, log_y) {
            (true, true) => draw!(b.build_cartesian_2d((x0..x1).log_scale(), (y0..y1).log_scale())?),
            (true, false) => draw!(b.build_cartesian_2d((x0..x1).log_scale(), y0..y1)?),
            (false, true) => draw!(b.build_cartesian_2d(x0..x1, (y0..y1).log_scale())?),
            (false, false) => draw!(b.build_cartesian_2d(x0..x1, y0..y1)?),
        }
        root.present()?;
    }
    Ok(svg)
}

/// Write plots into `dir` under their file names; returns the files written.
pub fn write_plots(plots: &[Plot], dir: &Path) -> PlotResult<Vec<PathBuf>> {
    let mut out = Vec::new();
    for p in plots {
        let path = dir.join(p.file_name);
        std::fs::write(&path, &p.svg)?;
        out.push(path);
    }
    Ok(out)
}

/// Write every plot of a report into `dir`; returns the files written.
pub fn report_plots(r: &Report, dir: &Path) -> PlotResult<Vec<PathBuf>> {
    write_plots(&report_svgs(r)?, dir)
}

/// Every plot of a report, rendered to SVG text.
pub fn report_svgs(r: &Report) -> PlotResult<Vec<Plot>> {
    let mut out = Vec::new();
    let im = &r.image;
    let plate = im.plate_scale_arcsec_per_px;
    let mut push = |file_name: &'static str, title: &str, svg: String| {
        out.push(Plot { file_name, title: title.to_string(), svg });
    };

    let title = "Transmissibility: payload / ground translation";
    let lines: Vec<Line> = r.transmissibility.iter().map(line).collect();
    push(
        "transmissibility.svg",
        title,
        chart(title, "frequency (Hz)", "|T| (–)", &lines, true, true, SeriesLabelPosition::UpperRight)?,
    );

    let title = "Image motion per ground displacement";
    let lines: Vec<Line> = r.image_per_ground_arcsec_per_um.iter().map(line).collect();
    push(
        "image-per-ground.svg",
        title,
        chart(title, "frequency (Hz)", "arcsec/µm", &lines, true, true, SeriesLabelPosition::UpperRight)?,
    );

    let px2 = plate * plate;
    let per_px2 = |v: &[f64]| v.iter().map(|v| v / px2).collect::<Vec<f64>>();
    let mut lines = vec![
        data_line(&r.image_axes[0], &im.freq_hz, per_px2(&im.psd_arcsec2[0])),
        data_line(&r.image_axes[1], &im.freq_hz, per_px2(&im.psd_arcsec2[1])),
    ];
    let mut title = format!("Image-motion PSD in pixels (plate scale {plate:.3} arcsec/px)");
    if let Some(gm) = &im.guiding {
        for (k, name) in ["image_x unguided", "image_y unguided"].iter().enumerate() {
            let mut l = data_line(name, &im.freq_hz, per_px2(&gm.unguided_psd_arcsec2[k]));
            l.reference = true;
            lines.push(l);
        }
        title = format!("Image-motion PSD in pixels, guided and unguided ({plate:.3} arcsec/px)");
    }
    push(
        "image-psd.svg",
        &title,
        chart(&title, "frequency (Hz)", "PSD (px²/Hz)", &lines, true, true, SeriesLabelPosition::UpperRight)?,
    );

    let per_px = |v: &[f64]| v.iter().map(|v| v / plate).collect::<Vec<f64>>();
    let radial: Vec<f64> = im.cumulative_rms_arcsec[0]
        .iter()
        .zip(&im.cumulative_rms_arcsec[1])
        .map(|(a, b)| a.hypot(*b) / plate)
        .collect();
    let lines = vec![
        data_line(&r.image_axes[0], &im.freq_hz, per_px(&im.cumulative_rms_arcsec[0])),
        data_line(&r.image_axes[1], &im.freq_hz, per_px(&im.cumulative_rms_arcsec[1])),
        data_line("radial", &im.freq_hz, radial),
        threshold("½ px", &im.freq_hz, 0.5),
    ];
    let title = "Cumulative RMS image motion from low frequency";
    push(
        "cumulative-rms.svg",
        title,
        chart(title, "frequency (Hz)", "RMS (px)", &lines, true, false, SeriesLabelPosition::UpperLeft)?,
    );

    if !r.ground_accel_psd.is_empty() {
        let mut lines: Vec<Line> = r.ground_accel_psd.iter().map(line).collect();
        for c in r.reference_accel_psd.iter().chain(&r.criterion_accel_psd) {
            let mut l = line(c);
            l.reference = true;
            l.end_label = Some(c.label.clone());
            lines.push(l);
        }
        let title = "Ground acceleration PSD vs Peterson NLNM/NHNM and VC curves (band-equivalent)";
        push(
            "ground-psd.svg",
            title,
            chart(
                title,
                "frequency (Hz)",
                "PSD ((m/s²)²/Hz)",
                &lines,
                true,
                true,
                SeriesLabelPosition::LowerRight,
            )?,
        );
    }

    push("budget.svg", "Star image budget", budget_chart(r)?);

    if let Some(g) = &r.gust
        && let Some(t) = g.traces.first()
    {
        let mut lines: Vec<Line> = g
            .traces
            .iter()
            .map(|t| {
                let ring = t.ringdown_s.map_or("> record".into(), |v| format!("{v:.2} s"));
                data_line(
                    &format!("{} (ring-down {ring})", t.label),
                    &t.time_s,
                    t.image_x_px.iter().zip(&t.image_y_px).map(|(x, y)| x.hypot(*y)).collect(),
                )
            })
            .collect();
        lines.push(threshold("½ px", &t.time_s, 0.5));
        let title = format!(
            "Gust of {:.2} s, {:.2} m/s (1-cosine from {} s): radial image excursion",
            t.duration_s, t.amplitude_m_s, g.start_s
        );
        push(
            "gust.svg",
            &title,
            chart(
                &title,
                "time (s)",
                "radial image excursion (px)",
                &lines,
                false,
                false,
                SeriesLabelPosition::UpperRight,
            )?,
        );
    }
    Ok(out)
}

/// Horizontal bars: each budget line's FWHM-equivalent along x (filled) and y (outlined), then
/// the star's FWHM.
fn budget_chart(r: &Report) -> PlotResult<String> {
    let b = &r.image.budget;
    let mut rows: Vec<(String, [f64; 2])> =
        b.lines.iter().filter(|l| l.in_exposure).map(|l| (l.label.clone(), l.fwhm_arcsec)).collect();
    let one = if b.exposure_s.is_some() { "star FWHM, one exposure" } else { "star FWHM" };
    rows.push((one.into(), b.exposure.fwhm_arcsec));
    for l in b.lines.iter().filter(|l| !l.in_exposure) {
        rows.push((format!("{} (not in one exposure)", l.label), l.fwhm_arcsec));
        rows.push(("FWHM, unregistered stack".into(), b.unregistered_stack.fwhm_arcsec));
    }
    let n = rows.len();
    let vmax = rows.iter().map(|(_, v)| v[0].max(v[1])).fold(0.0f64, f64::max).max(1e-6);
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (SIZE.0, 140 + 64 * n as u32)).into_drawing_area();
        root.fill(&WHITE)?;
        let mut c = ChartBuilder::on(&root)
            .caption(
                format!(
                    "Star image budget (Gaussian terms in quadrature); elongation {:.2}",
                    b.exposure.elongation
                ),
                (FONT, CAPTION_PT),
            )
            .margin(16)
            .x_label_area_size(64)
            .y_label_area_size(10)
            .build_cartesian_2d(0.0..vmax * 2.0, 0.0..n as f64)?;
        c.configure_mesh()
            .disable_y_mesh()
            .y_labels(0)
            .label_style((FONT, TICK_PT))
            .axis_desc_style((FONT, AXIS_PT))
            .x_desc("FWHM-equivalent 2.355 σ (arcsec)")
            .x_label_formatter(&|v| tick_label(*v))
            .draw()?;
        for (k, axis) in ["x (sensor), filled", "y (sensor), outlined"].iter().enumerate() {
            let col = COLOURS[k];
            let style = if k == 0 { col.filled() } else { col.stroke_width(2) };
            let bars = rows.iter().enumerate().map(move |(i, (_, v))| {
                let top = (n - i) as f64 - 0.12 - 0.36 * k as f64;
                Rectangle::new([(0.0, top), (v[k], top - 0.32)], style)
            });
            c.draw_series(bars)?
                .label(*axis)
                .legend(move |(x, y)| Rectangle::new([(x, y - 6), (x + 18, y + 6)], style));
        }
        c.draw_series(rows.iter().enumerate().map(|(i, (name, v))| {
            Text::new(
                format!("{name}: {:.3} × {:.3}", v[0], v[1]),
                (v[0].max(v[1]) + 0.02 * vmax, (n - i) as f64 - 0.5),
                TextStyle::from((FONT, LEGEND_PT).into_font()).pos(Pos::new(HPos::Left, VPos::Center)),
            )
        }))?;
        c.configure_series_labels()
            .label_font((FONT, LEGEND_PT))
            .background_style(WHITE.mix(0.9))
            .border_style(BLACK)
            .draw()?;
        root.present()?;
    }
    Ok(svg)
}

/// The isolator ranking of a sweep: one bar per spec (mean ratio of the image RMS to no pads),
/// filled when better than no pads, outlined when worse, grey for no pads itself, with the value
/// and the words written beside it.
pub fn ranking_svg(t: &RankTable) -> PlotResult<Plot> {
    let n = t.entries.len();
    if n == 0 {
        return Err(format!("nothing to plot in the ranking for {}", t.scope()).into());
    }
    let vmax = t.entries.iter().map(|e| e.mean_ratio).filter(|v| v.is_finite()).fold(1.0f64, f64::max);
    let title = format!("Isolator ranking, {}: image RMS relative to no pads", t.scope());
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (SIZE.0, 140 + 48 * n as u32)).into_drawing_area();
        root.fill(&WHITE)?;
        let mut c = ChartBuilder::on(&root)
            .caption(&title, (FONT, CAPTION_PT))
            .margin(16)
            .x_label_area_size(64)
            .y_label_area_size(10)
            .build_cartesian_2d(0.0..vmax * 1.6, 0.0..n as f64 + 0.6)?;
        c.configure_mesh()
            .disable_y_mesh()
            .y_labels(0)
            .label_style((FONT, TICK_PT))
            .axis_desc_style((FONT, AXIS_PT))
            .x_desc("mean ratio of image RMS to no pads (lower is better)")
            .x_label_formatter(&|v| tick_label(*v))
            .draw()?;
        let better = COLOURS[2].filled();
        let worse = COLOURS[1].stroke_width(2);
        let baseline = RGBColor(160, 160, 160).filled();
        c.draw_series(t.entries.iter().enumerate().map(|(i, e)| {
            let top = (n - i) as f64 - 0.15;
            let style = if e.spec == NO_PAD {
                baseline
            } else if e.verdict == Verdict::Worse || e.verdict == Verdict::Mixed {
                worse
            } else {
                better
            };
            Rectangle::new([(0.0, top), (e.mean_ratio.max(0.0), top - 0.7)], style)
        }))?;
        c.draw_series(t.entries.iter().enumerate().map(|(i, e)| {
            let verdict = if e.spec == NO_PAD { "baseline" } else { e.verdict.words() };
            Text::new(
                format!("{}. {}: {:.3} ({verdict})", i + 1, e.spec, e.mean_ratio),
                (e.mean_ratio.max(0.0) + 0.02 * vmax, (n - i) as f64 - 0.5),
                TextStyle::from((FONT, LEGEND_PT).into_font()).pos(Pos::new(HPos::Left, VPos::Center)),
            )
        }))?;
        let one = ShapeStyle { color: BLACK.to_rgba(), filled: false, stroke_width: 1 };
        c.draw_series(DashedLineSeries::new(vec![(1.0, 0.0), (1.0, n as f64 + 0.6)], 14, 5, one))?;
        c.draw_series(std::iter::once(Text::new(
            " no pads = 1",
            (1.0, n as f64 + 0.55),
            TextStyle::from((FONT, LEGEND_PT).into_font()).pos(Pos::new(HPos::Left, VPos::Top)),
        )))?;
        root.present()?;
    }
    Ok(Plot { file_name: "ranking.svg", title, svg })
}

#[cfg(test)]
mod tests {
    use super::tick_label;

    #[test]
    fn ticks_are_plain_decimals_or_powers_of_ten_with_superscripts() {
        let cases = [
            (1.0, "1"),
            (10.0, "10"),
            (0.001, "0.001"),
            (0.25, "0.25"),
            (2.5, "2.5"),
            (1000.0, "1000"),
            (1e-4, "10⁻⁴"),
            (1e-12, "10⁻¹²"),
            (1e5, "10⁵"),
            (3e-7, "3×10⁻⁷"),
            (2.5e-5, "2.5×10⁻⁵"),
            (9.9999999e-5, "10⁻⁴"),
            (-0.5, "−0.5"),
            (-1e-6, "−10⁻⁶"),
            (0.0, "0"),
            (0.30000000000000004, "0.3"),
        ];
        for (v, want) in cases {
            assert_eq!(tick_label(v), want, "tick for {v:e}");
        }
    }
}
