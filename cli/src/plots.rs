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
    if let Some(m) = &r.sky_map {
        out.push(sky_map_svg(m)?);
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

/// Colour of `t` in [0, 1] on a dark-blue-to-yellow ramp (five anchors, linear between them;
/// lightness rises with the value so the order reads in grey too).
fn ramp(t: f64) -> RGBColor {
    const A: [(f64, f64, f64); 5] = [
        (68.0, 1.0, 84.0),
        (59.0, 82.0, 139.0),
        (33.0, 145.0, 140.0),
        (94.0, 201.0, 98.0),
        (253.0, 231.0, 37.0),
    ];
    let x = t.clamp(0.0, 1.0) * 4.0;
    let k = (x.floor() as usize).min(3);
    let f = x - k as f64;
    let mix = |a: f64, b: f64| (a + (b - a) * f).round() as u8;
    RGBColor(mix(A[k].0, A[k + 1].0), mix(A[k].1, A[k + 1].1), mix(A[k].2, A[k + 1].2))
}

/// The sky map as a heat map: one cell per pointing with its RMS written in it, a colour scale
/// with numbers, skipped cells hatched grey, and the best and worst cells framed and labelled.
pub fn sky_map_svg(m: &stillsky::skymap::SkyMap) -> PlotResult<Plot> {
    use stillsky::skymap::SkyFrame;
    // x and y of the plot: azimuth × altitude, or hour angle (h) × declination.
    let eq = m.frame == SkyFrame::Equatorial;
    let (xs, ys): (Vec<f64>, Vec<f64>) = if eq {
        (m.rows_deg.iter().map(|h| h / 15.0).collect(), m.cols_deg.clone())
    } else {
        (m.cols_deg.clone(), m.rows_deg.clone())
    };
    let at = |ix: usize, iy: usize| if eq { (ix, iy) } else { (iy, ix) };
    let value = |ix: usize, iy: usize| {
        let (r, c) = at(ix, iy);
        (m.rms_arcsec[r][c], m.rms_px[r][c])
    };
    let finite: Vec<f64> = m.rms_arcsec.iter().flatten().copied().filter(|v| v.is_finite()).collect();
    let lo = finite.iter().copied().fold(f64::INFINITY, f64::min);
    let hi = finite.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let span = if hi > lo { hi - lo } else { 1.0 };
    let plate = m.best.map_or(f64::NAN, |b| b.rms_arcsec / b.rms_px);
    let (x_desc, y_desc) = if eq {
        ("hour angle (h, west positive)", "declination (°)")
    } else {
        ("azimuth (° from north through east)", "altitude (°)")
    };
    let title = if eq {
        format!(
            "Sky map: image RMS over hour angle × declination (latitude {:.1}°)",
            m.latitude_deg.unwrap_or(f64::NAN)
        )
    } else {
        "Sky map: image RMS over altitude × azimuth".to_string()
    };
    let (nx, ny) = (xs.len(), ys.len());
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (1100, 856)).into_drawing_area();
        root.fill(&WHITE)?;
        let (main, side) = root.split_horizontally(900);
        let (main, foot) = main.split_vertically(730);
        let mut b = ChartBuilder::on(&main);
        b.caption(&title, (FONT, 24)).margin(14).x_label_area_size(60).y_label_area_size(80);
        let mut c = b.build_cartesian_2d(-0.5..nx as f64 - 0.5, -0.5..ny as f64 - 0.5)?;
        let label_of = |v: f64, axis: &[f64], signed: bool| -> String {
            let k = v.round();
            if (v - k).abs() > 1e-6 || k < 0.0 || k as usize >= axis.len() {
                return String::new();
            }
            let a = axis[k as usize];
            let s = if (a - a.round()).abs() < 1e-9 { format!("{a:.0}") } else { format!("{a:.1}") };
            if signed && a > 0.0 { format!("+{s}") } else { s }
        };
        c.configure_mesh()
            .disable_mesh()
            .x_labels(nx.min(25))
            .y_labels(ny.min(25))
            .x_desc(x_desc)
            .y_desc(y_desc)
            .label_style((FONT, TICK_PT))
            .axis_desc_style((FONT, AXIS_PT))
            .x_label_formatter(&|v| label_of(*v, &xs, eq))
            .y_label_formatter(&|v| label_of(*v, &ys, false))
            .draw()?;
        let grey = RGBColor(215, 215, 215);
        for ix in 0..nx {
            for iy in 0..ny {
                let (x, y) = (ix as f64, iy as f64);
                let (v, _) = value(ix, iy);
                let rect = [(x - 0.5, y - 0.5), (x + 0.5, y + 0.5)];
                if !v.is_finite() {
                    c.draw_series(std::iter::once(Rectangle::new(rect, grey.filled())))?;
                    // Hatching, so skipped cells differ from data by pattern as well as colour.
                    c.draw_series(std::iter::once(PathElement::new(
                        vec![(x - 0.5, y - 0.5), (x + 0.5, y + 0.5)],
                        RGBColor(150, 150, 150),
                    )))?;
                    continue;
                }
                let t = (v - lo) / span;
                c.draw_series(std::iter::once(Rectangle::new(rect, ramp(t).filled())))?;
                let ink = if t < 0.55 { WHITE } else { BLACK };
                let font = TextStyle::from((FONT, 14).into_font())
                    .color(&ink)
                    .pos(Pos::new(HPos::Center, VPos::Center));
                c.draw_series(std::iter::once(Text::new(format!("{v:.3}"), (x, y), font)))?;
            }
        }
        // Best: framed, a circle and the word; worst: framed, a triangle and the word.
        let marker = |area: &DrawingArea<SVGBackend, plotters::coord::Shift>,
                      best: bool,
                      at: (i32, i32),
                      ink: RGBColor|
         -> PlotResult<()> {
            let style = ShapeStyle { color: ink.to_rgba(), filled: false, stroke_width: 2 };
            if best {
                area.draw(&Circle::new(at, 6, style))?;
            } else {
                area.draw(&TriangleMarker::new(at, 7, style))?;
            }
            Ok(())
        };
        for (cell, best) in [(m.best, true), (m.worst, false)] {
            let Some(cell) = cell else { continue };
            let (ix, iy) = if eq { (cell.row, cell.col) } else { (cell.col, cell.row) };
            let (x, y) = (ix as f64, iy as f64);
            let frame = ShapeStyle { color: RED.to_rgba(), filled: false, stroke_width: 4 };
            c.draw_series(std::iter::once(Rectangle::new(
                [(x - 0.47, y - 0.47), (x + 0.47, y + 0.47)],
                frame,
            )))?;
            let t = (cell.rms_arcsec - lo) / span;
            let ink = if t < 0.55 { WHITE } else { BLACK };
            let font =
                TextStyle::from((FONT, 14).into_font()).color(&ink).pos(Pos::new(HPos::Left, VPos::Top));
            let word = if best { "best" } else { "worst" };
            c.draw_series(std::iter::once(Text::new(word.to_string(), (x - 0.18, y + 0.46), font)))?;
            let (px, py) = c.backend_coord(&(x - 0.3, y + 0.3));
            marker(&main, best, (px, py), ink)?;
        }
        // Footer: the best and worst cells in words.
        let line = |s: String, k: i32| foot.draw(&Text::new(s, (40, 8 + 26 * k), (FONT, 17).into_font()));
        match (m.best, m.worst) {
            (Some(b), Some(w)) => {
                marker(&foot, true, (22, 17), BLACK)?;
                line(format!("best (framed): {}", b.describe(m.frame)), 0)?;
                marker(&foot, false, (22, 43), BLACK)?;
                line(format!("worst (framed): {}", w.describe(m.frame)), 1)?;
            }
            _ => line("no cell high enough to map".into(), 0)?,
        }
        line(
            format!(
                "numbers in the cells: RMS in arcsec; hatched grey: below {:.0}° altitude, not mapped",
                m.min_altitude_deg
            ),
            2,
        )?;
        if m.pier_side_text().is_some() {
            line("tube west of the pier for hour angles below 0, east from the meridian on".into(), 3)?;
        }
        // Colour scale with numbers in arcsec and pixels.
        let (top, bottom, left) = (90i32, 640i32, 20i32);
        side.draw(&Text::new("RMS", (left, top - 50), (FONT, 18).into_font()))?;
        side.draw(&Text::new("arcsec (px)", (left, top - 28), (FONT, 16).into_font()))?;
        let steps = 100;
        for k in 0..steps {
            let t0 = k as f64 / steps as f64;
            let ya = bottom - ((bottom - top) as f64 * (k + 1) as f64 / steps as f64).round() as i32;
            let yb = bottom - ((bottom - top) as f64 * t0).round() as i32;
            side.draw(&Rectangle::new(
                [(left, ya), (left + 34, yb)],
                ramp(t0 + 0.5 / steps as f64).filled(),
            ))?;
        }
        side.draw(&Rectangle::new([(left, top), (left + 34, bottom)], BLACK.stroke_width(1)))?;
        for k in 0..=4 {
            let t = k as f64 / 4.0;
            let v = lo + t * span;
            let y = bottom - ((bottom - top) as f64 * t).round() as i32;
            side.draw(&PathElement::new(vec![(left + 34, y), (left + 42, y)], BLACK))?;
            let text = if finite.is_empty() { String::new() } else { format!("{v:.3} ({:.2})", v / plate) };
            side.draw(&Text::new(
                text,
                (left + 46, y),
                TextStyle::from((FONT, 15).into_font()).pos(Pos::new(HPos::Left, VPos::Center)),
            ))?;
        }
        root.present()?;
    }
    Ok(Plot { file_name: "sky-map.svg", title, svg })
}

/// One recording on a ring-down card plot.
pub struct CardTrace<'a> {
    pub label: String,
    pub x: &'a [f64],
    pub unit: &'a str,
    pub card: &'a stillsky::identify::RingdownCard,
}

/// The ring-down card's plot: each trace minus its rest level, its fitted envelope ±A e^{−σt}
/// over the fit window, and the ±threshold band (±½ px for an image track by default).
pub fn ringdown_card_svg(traces: &[CardTrace]) -> PlotResult<Plot> {
    let first = traces.first().ok_or("no trace")?;
    let times: Vec<Vec<f64>> =
        traces.iter().map(|t| (0..t.x.len()).map(|i| i as f64 / t.card.fs_hz).collect()).collect();
    let fit_t: Vec<Vec<f64>> = traces
        .iter()
        .map(|t| {
            let f = &t.card.fit;
            (0..=400).map(|i| f.t0_s + (f.t_end_s - f.t0_s) * i as f64 / 400.0).collect()
        })
        .collect();
    let mut lines = Vec::new();
    for (k, t) in traces.iter().enumerate() {
        let c = t.card;
        let name =
            if traces.len() > 1 { format!("{} ", ["before", "after"][k.min(1)]) } else { String::new() };
        let short = std::path::Path::new(&t.label)
            .file_name()
            .map_or(t.label.clone(), |s| s.to_string_lossy().into_owned());
        lines.push(data_line(
            &format!("{name}trace ({short})"),
            &times[k],
            t.x.iter().map(|v| v - c.rest_level).collect(),
        ));
        let env: Vec<f64> = fit_t[k].iter().map(|&s| c.fit.envelope_at(s)).collect();
        lines.push(data_line(
            &format!(
                "{name}fitted envelope (f {:.3} Hz, ζ {:.4})",
                c.frequency_hz.value, c.damping_ratio.value
            ),
            &fit_t[k],
            env.clone(),
        ));
        lines.push(data_line(&format!("{name}− envelope"), &fit_t[k], env.iter().map(|v| -v).collect()));
    }
    let c0 = first.card;
    let band = match c0.threshold_px {
        Some(px) => format!("±{px:.2} px"),
        None => format!("±{}", tick_label(c0.threshold)),
    };
    let all_t = &times[0];
    let mut up = threshold(&band, all_t, c0.threshold);
    up.label = band.clone();
    lines.push(up);
    let mut down = threshold(&format!("−{}", &band[2..]), all_t, -c0.threshold);
    down.end_label = None;
    lines.push(down);
    let title = match c0.first_excursion_px {
        Some(px) => format!("Ring-down card: first excursion {px:.2} px"),
        None => "Ring-down card".to_string(),
    };
    let svg = chart(
        &title,
        "time (s)",
        &format!("{} − rest level ({})", "track", first.unit),
        &lines,
        false,
        false,
        SeriesLabelPosition::UpperRight,
    )?;
    Ok(Plot { file_name: "ringdown-card.svg", title, svg })
}

/// A study plot: a file name of its own (variables name the outcome-against-variable plots).
pub struct StudyPlot {
    pub file_name: String,
    pub title: String,
    pub svg: String,
}

/// A file-name-safe form of a variable or outcome name.
fn file_stem(s: &str) -> String {
    s.chars().map(|c| if c.is_ascii_alphanumeric() || c == '-' || c == '_' { c } else { '-' }).collect()
}

/// The outcomes a study plots, with their axis words.
const STUDY_PLOTTED: [(&str, &str); 5] = [
    ("rms_px", "image RMS (px)"),
    ("gust_peak_px", "worst gust peak (px)"),
    ("first_mode_hz", "first natural frequency (Hz)"),
    ("min_static_fos", "lowest static factor of safety"),
    ("standing_tilt_px", "standing-person tilt (px)"),
];

/// The outcomes plotted against each variable's values (skipped where they have no numbers).
const STUDY_AGAINST_VALUES: [(&str, &str); 3] = [STUDY_PLOTTED[0], STUDY_PLOTTED[1], STUDY_PLOTTED[4]];

/// The plots of a study: a sensitivity chart per outcome (the range of each variable's main
/// effect, one bar per disturbance) and, per variable, image RMS against its values (one line
/// per disturbance; the standing tilt too when the study has a person on a deck). Outcomes without numbers (e.g. gusts in a calm-only study) are skipped.
pub fn study_svgs(
    study: &stillsky::batch::Study,
    s: &[stillsky::batch::Sensitivity],
) -> PlotResult<Vec<StudyPlot>> {
    let mut out = Vec::new();
    let disturbances: Vec<(String, String)> = {
        let mut d: Vec<(String, String)> = Vec::new();
        for x in s {
            let k = (x.ground.clone(), x.wind.clone());
            if !d.contains(&k) {
                d.push(k);
            }
        }
        d
    };
    for (outcome, words) in STUDY_PLOTTED {
        let of: Vec<&stillsky::batch::Sensitivity> = s.iter().filter(|x| x.outcome == outcome).collect();
        if of.iter().all(|x| !x.range.is_finite()) {
            continue;
        }
        let title = format!("Sensitivity: how much each variable moves the {words}");
        out.push(StudyPlot {
            file_name: format!("study-sensitivity-{}.svg", file_stem(outcome)),
            svg: sensitivity_chart(&title, words, study, &of, &disturbances)?,
            title,
        });
    }
    for var in &study.variables {
        for (outcome, words) in STUDY_AGAINST_VALUES.iter() {
            let series: Vec<(String, Vec<f64>)> = disturbances
                .iter()
                .filter_map(|(g, w)| {
                    let x = s.iter().find(|x| {
                        x.variable == var.name && x.outcome == *outcome && &x.ground == g && &x.wind == w
                    })?;
                    Some((format!("{g}, {w}"), x.levels.iter().map(|l| l.1).collect::<Vec<f64>>()))
                })
                .filter(|(_, v)| v.iter().any(|x| x.is_finite()))
                .collect();
            if series.is_empty() {
                continue;
            }
            let labels: Vec<String> = (0..var.len()).map(|k| var.label(k)).collect();
            let title = format!("{words} against {}", var.name);
            out.push(StudyPlot {
                file_name: format!("study-{}-{}.svg", file_stem(outcome), file_stem(&var.name)),
                svg: levels_chart(&title, &var.name, words, &labels, var.numbers(), &series)?,
                title,
            });
        }
    }
    Ok(out)
}

/// Horizontal bars: per variable, one bar per disturbance of the outcome's main-effect range.
fn sensitivity_chart(
    title: &str,
    words: &str,
    study: &stillsky::batch::Study,
    of: &[&stillsky::batch::Sensitivity],
    disturbances: &[(String, String)],
) -> PlotResult<String> {
    let nv = study.variables.len().max(1);
    let nd = disturbances.len().max(1);
    let vmax = of.iter().map(|x| x.range).filter(|v| v.is_finite()).fold(0.0f64, f64::max).max(1e-12);
    let rows = nv * (nd + 1);
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (SIZE.0, 160 + 30 * rows as u32)).into_drawing_area();
        root.fill(&WHITE)?;
        let mut c = ChartBuilder::on(&root)
            .caption(title, (FONT, CAPTION_PT))
            .margin(16)
            .x_label_area_size(64)
            .y_label_area_size(10)
            .build_cartesian_2d(0.0..vmax * 1.9, 0.0..rows as f64 + 0.5)?;
        c.configure_mesh()
            .disable_y_mesh()
            .y_labels(0)
            .label_style((FONT, TICK_PT))
            .axis_desc_style((FONT, AXIS_PT))
            .x_desc(format!("range of the mean {words} over the variable's values"))
            .x_label_formatter(&|v| tick_label(*v))
            .draw()?;
        let font = TextStyle::from((FONT, LEGEND_PT).into_font()).pos(Pos::new(HPos::Left, VPos::Center));
        for (vi, var) in study.variables.iter().enumerate() {
            let top = rows as f64 - (vi * (nd + 1)) as f64;
            c.draw_series(std::iter::once(Text::new(var.name.clone(), (0.0, top - 0.3), font.clone())))?;
            for (di, (g, w)) in disturbances.iter().enumerate() {
                let r = of
                    .iter()
                    .find(|x| x.variable == var.name && &x.ground == g && &x.wind == w)
                    .map_or(f64::NAN, |x| x.range);
                let y = top - 1.0 - di as f64;
                let col = COLOURS[di % COLOURS.len()];
                if r.is_finite() {
                    c.draw_series(std::iter::once(Rectangle::new(
                        [(0.0, y - 0.1), (r, y - 0.8)],
                        col.filled(),
                    )))?;
                }
                let txt = if r.is_finite() {
                    format!("{g}, {w}: {}", tick_label(r))
                } else {
                    format!("{g}, {w}: n/a")
                };
                c.draw_series(std::iter::once(Text::new(
                    txt,
                    (r.max(0.0) + 0.02 * vmax, y - 0.45),
                    font.clone(),
                )))?;
            }
        }
        root.present()?;
    }
    Ok(svg)
}

/// An outcome's main-effect means against a variable's values: numbers on a linear axis, other
/// values (rigs, pads) at even steps named below.
fn levels_chart(
    title: &str,
    x_desc: &str,
    y_desc: &str,
    labels: &[String],
    numbers: Option<&[f64]>,
    series: &[(String, Vec<f64>)],
) -> PlotResult<String> {
    let xs: Vec<f64> = match numbers {
        Some(n) => n.to_vec(),
        None => (0..labels.len()).map(|k| k as f64).collect(),
    };
    let (mut x0, mut x1) =
        xs.iter().fold((f64::INFINITY, f64::NEG_INFINITY), |a, &x| (a.0.min(x), a.1.max(x)));
    let pad = 0.08 * (x1 - x0).max(1e-9);
    if numbers.is_none() {
        (x0, x1) = (-0.5, labels.len() as f64 - 0.5);
    } else {
        (x0, x1) = (x0 - pad, x1 + pad);
    }
    let ys = series.iter().flat_map(|s| s.1.iter().copied()).filter(|y| y.is_finite());
    let (y0, y1) = ys.fold((f64::INFINITY, f64::NEG_INFINITY), |a, y| (a.0.min(y), a.1.max(y)));
    let yp = 0.1 * (y1 - y0).max(1e-6 * y1.abs()).max(1e-12);
    let (y0, y1) = ((y0 - yp).min(0.0_f64.max(y0 - yp)), y1 + 3.0 * yp);
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, SIZE).into_drawing_area();
        root.fill(&WHITE)?;
        let mut c = ChartBuilder::on(&root)
            .caption(title, (FONT, CAPTION_PT))
            .margin(16)
            .x_label_area_size(64)
            .y_label_area_size(96)
            .build_cartesian_2d(x0..x1, y0..y1)?;
        let categorical = numbers.is_none();
        let fmt = |v: &f64| {
            if categorical {
                let k = v.round();
                if (v - k).abs() < 1e-6 && k >= 0.0 {
                    labels.get(k as usize).cloned().unwrap_or_default()
                } else {
                    String::new()
                }
            } else {
                tick_label(*v)
            }
        };
        let mut mesh = c.configure_mesh();
        mesh.x_desc(x_desc)
            .y_desc(y_desc)
            .label_style((FONT, TICK_PT))
            .axis_desc_style((FONT, AXIS_PT))
            .light_line_style(RGBColor(235, 235, 235))
            .y_label_formatter(&|v| tick_label(*v))
            .x_label_formatter(&fmt);
        if categorical {
            mesh.x_labels(labels.len() * 4 + 1);
        }
        mesh.draw()?;
        for (k, (label, ys)) in series.iter().enumerate() {
            let col = COLOURS[k % COLOURS.len()];
            let style = ShapeStyle { color: col.to_rgba(), filled: false, stroke_width: 2 };
            let data: Vec<(f64, f64)> =
                xs.iter().zip(ys).filter(|(_, y)| y.is_finite()).map(|(x, y)| (*x, *y)).collect();
            let marker = k % 3;
            c.draw_series(LineSeries::new(data.clone(), style))?;
            c.draw_series(data.iter().map(move |&p| -> DynElement<'static, SVGBackend, (f64, f64)> {
                match marker {
                    0 => Circle::new(p, 5, style).into_dyn(),
                    1 => TriangleMarker::new(p, 6, style).into_dyn(),
                    _ => Cross::new(p, 5, style).into_dyn(),
                }
            }))?
            .label(label.clone())
            .legend(move |(x, y)| {
                EmptyElement::at((x, y))
                    + PathElement::new(vec![(0, 0), (LEGEND_W, 0)], style)
                    + Circle::new((LEGEND_W / 2, 0), 4, style)
            });
        }
        c.configure_series_labels()
            .position(SeriesLabelPosition::UpperRight)
            .label_font((FONT, LEGEND_PT))
            .background_style(WHITE.mix(0.9))
            .border_style(BLACK)
            .draw()?;
        root.present()?;
    }
    Ok(svg)
}

/// The quiet-hours survey's plots: the percentile curves of each axis against frequency with
/// Peterson's NLNM and NHNM, and the band RMS over the hours of the day (with the share of
/// blocks that held ½ px when the rig judged them).
pub fn quiet_survey_svgs(s: &stillsky::batch::QuietSurvey) -> PlotResult<Vec<Plot>> {
    use stillsky::spectrum::ReferenceGround;
    let mut out = Vec::new();
    // Increasing frequency: the period bins reversed.
    let order: Vec<usize> = (0..s.period_s.len()).rev().collect();
    let freq: Vec<f64> = order.iter().map(|&k| 1.0 / s.period_s[k]).collect();
    let model_db = |m: ReferenceGround| -> Vec<f64> {
        order.iter().map(|&k| m.accel_db_at_period(s.period_s[k]).unwrap_or(f64::NAN)).collect()
    };
    let mut lines = Vec::new();
    for a in &s.axes {
        for (q, v) in &a.percentiles_db {
            if [10.0, 50.0, 90.0].contains(q) {
                lines.push(data_line(
                    &format!("{} {q:.0} %", a.ground_axis),
                    &freq,
                    order.iter().map(|&k| v[k]).collect(),
                ));
            }
        }
    }
    for (m, name) in [(ReferenceGround::Nlnm, "NLNM"), (ReferenceGround::Nhnm, "NHNM")] {
        let mut l = data_line(&format!("Peterson {name}"), &freq, model_db(m));
        l.reference = true;
        lines.push(l);
    }
    let title = format!("Probabilistic PSD: {} blocks of {} s", s.n_blocks, s.block_s);
    let svg = chart(
        &title,
        "frequency (Hz)",
        "acceleration PSD (dB re 1 (m/s²)²/Hz)",
        &lines,
        true,
        false,
        SeriesLabelPosition::LowerRight,
    )?;
    out.push(Plot { file_name: "quiet-percentiles.svg", title, svg });
    if s.hour_blocks.iter().any(|&n| n > 0) {
        let hours: Vec<f64> = (0..24).map(f64::from).collect();
        let scale = match s.band_quantity {
            stillsky::spectrum::Quantity::Velocity => 1e6,
            _ => 1.0,
        };
        let unit = if scale == 1e6 { "µm/s" } else { "SI" };
        let mut lines: Vec<Line> = s
            .bands_hz
            .iter()
            .enumerate()
            .map(|(b, (lo, hi))| {
                data_line(
                    &format!("RMS {lo}-{hi} Hz"),
                    &hours,
                    (0..24).map(|h| s.hour_band_rms[h][b] * scale).collect(),
                )
            })
            .collect();
        lines.retain(|l| l.y.iter().any(|v| v.is_finite() && *v > 0.0));
        if !lines.is_empty() {
            let title = "Ground motion over the hours of the day".to_string();
            let svg = chart(
                &title,
                "hour of the day (UTC)",
                &format!("band RMS ({unit})"),
                &lines,
                false,
                true,
                SeriesLabelPosition::UpperRight,
            )?;
            out.push(Plot { file_name: "quiet-hour-map.svg", title, svg });
        }
        if s.hour_judged.iter().any(|&n| n > 0) {
            let share: Vec<f64> = (0..24)
                .map(|h| {
                    if s.hour_judged[h] > 0 {
                        s.hour_held[h] as f64 / s.hour_judged[h] as f64
                    } else {
                        f64::NAN
                    }
                })
                .collect();
            let lines = vec![data_line("share of blocks holding ½ px", &hours, share)];
            let title = "Hours when the rig holds ½ px".to_string();
            let svg = chart(
                &title,
                "hour of the day (UTC)",
                "share of blocks",
                &lines,
                false,
                false,
                SeriesLabelPosition::LowerRight,
            )?;
            out.push(Plot { file_name: "quiet-hours-held.svg", title, svg });
        }
    }
    Ok(out)
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
