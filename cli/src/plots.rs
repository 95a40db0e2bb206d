//! SVG plots of a report (plotters).

use plotters::prelude::*;
use std::path::{Path, PathBuf};
use stillsky::batch::{Curve, Report};

type PlotResult<T> = Result<T, Box<dyn std::error::Error>>;

const COLOURS: [RGBColor; 8] = [
    RGBColor(31, 119, 180),
    RGBColor(255, 127, 14),
    RGBColor(44, 160, 44),
    RGBColor(214, 39, 40),
    RGBColor(148, 103, 189),
    RGBColor(140, 86, 75),
    RGBColor(227, 119, 194),
    RGBColor(127, 127, 127),
];

struct Line<'a> {
    label: String,
    x: &'a [f64],
    y: Vec<f64>,
    dashed: bool,
}

fn line(c: &Curve) -> Line<'_> {
    Line { label: c.label.clone(), x: &c.freq_hz, y: c.values.clone(), dashed: false }
}

/// A chart with logarithmic (or linear) axes; points ≤ 0 are dropped on log axes.
fn chart(
    path: &Path,
    title: &str,
    x_desc: &str,
    y_desc: &str,
    lines: &[Line],
    log_x: bool,
    log_y: bool,
) -> PlotResult<()> {
    let keep = |x: f64, y: f64| x.is_finite() && y.is_finite() && (!log_x || x > 0.0) && (!log_y || y > 0.0);
    let pts: Vec<(f64, f64)> = lines
        .iter()
        .flat_map(|l| l.x.iter().zip(&l.y).map(|(a, b)| (*a, *b)))
        .filter(|&(a, b)| keep(a, b))
        .collect();
    if pts.is_empty() {
        return Err(format!("nothing to plot in {title}").into());
    }
    let (mut x0, mut x1, mut y0, mut y1) = (f64::MAX, f64::MIN, f64::MAX, f64::MIN);
    for &(a, b) in &pts {
        x0 = x0.min(a);
        x1 = x1.max(a);
        y0 = y0.min(b);
        y1 = y1.max(b);
    }
    if log_y {
        // Keep eight decades below the top at most, so near-zero tails do not flatten the plot.
        y0 = y0.max(y1 * 1e-8);
        y0 *= 0.5;
        y1 *= 2.0;
    } else {
        let pad = 0.05 * (y1 - y0).max(1e-12);
        y0 -= pad;
        y1 += pad;
    }
    if x1 <= x0 {
        x1 = x0 * 2.0 + 1.0;
    }
    let root = SVGBackend::new(path, (960, 600)).into_drawing_area();
    root.fill(&WHITE)?;
    let mut b = ChartBuilder::on(&root);
    b.caption(title, ("sans-serif", 22)).margin(14).x_label_area_size(48).y_label_area_size(80);
    macro_rules! draw {
        ($c:expr) => {{
            let mut c = $c;
            c.configure_mesh()
                .x_desc(x_desc)
                .y_desc(y_desc)
                .y_label_formatter(&|v| format!("{v:.1e}"))
                .x_label_formatter(&|v| format!("{v}"))
                .draw()?;
            for (k, l) in lines.iter().enumerate() {
                let col = COLOURS[k % COLOURS.len()];
                let data: Vec<(f64, f64)> =
                    l.x.iter()
                        .zip(&l.y)
                        .map(|(a, b)| (*a, if log_y { b.max(y0) } else { *b }))
                        .filter(|&(a, b)| keep(a, b))
                        .collect();
                let style = ShapeStyle {
                    color: col.to_rgba(),
                    filled: false,
                    stroke_width: if l.dashed { 1 } else { 2 },
                };
                let s = c.draw_series(LineSeries::new(data, style))?;
                s.label(l.label.clone())
                    .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 20, y)], col));
            }
            c.configure_series_labels().background_style(WHITE.mix(0.85)).border_style(BLACK).draw()?;
        }};
    }
    match (log_x, log_y) {
        (true, true) => draw!(b.build_cartesian_2d((x0..x1).log_scale(), (y0..y1).log_scale())?),
        (true, false) => draw!(b.build_cartesian_2d((x0..x1).log_scale(), y0..y1)?),
        (false, true) => draw!(b.build_cartesian_2d(x0..x1, (y0..y1).log_scale())?),
        (false, false) => draw!(b.build_cartesian_2d(x0..x1, y0..y1)?),
    }
    root.present()?;
    Ok(())
}

fn flat<'a>(label: &str, x: &'a [f64], y: f64) -> Line<'a> {
    Line { label: label.into(), x, y: vec![y; x.len()], dashed: true }
}

/// Write every plot of a report into `dir`; returns the files written.
pub fn report_plots(r: &Report, dir: &Path) -> PlotResult<Vec<PathBuf>> {
    let mut out = Vec::new();
    let im = &r.image;
    let plate = im.plate_scale_arcsec_per_px;

    let p = dir.join("transmissibility.svg");
    let lines: Vec<Line> = r.transmissibility.iter().map(line).collect();
    chart(
        &p,
        "Transmissibility: payload / ground translation",
        "frequency (Hz)",
        "|T| (-)",
        &lines,
        true,
        true,
    )?;
    out.push(p);

    let p = dir.join("image-per-ground.svg");
    let lines: Vec<Line> = r.image_per_ground_arcsec_per_um.iter().map(line).collect();
    chart(&p, "Image motion per ground displacement", "frequency (Hz)", "arcsec per um", &lines, true, true)?;
    out.push(p);

    let p = dir.join("image-psd.svg");
    let px2 = plate * plate;
    let mut lines = vec![
        Line {
            label: "image_x (az)".into(),
            x: &im.freq_hz,
            y: im.psd_arcsec2[0].iter().map(|v| v / px2).collect(),
            dashed: false,
        },
        Line {
            label: "image_y (alt)".into(),
            x: &im.freq_hz,
            y: im.psd_arcsec2[1].iter().map(|v| v / px2).collect(),
            dashed: false,
        },
    ];
    let mut title = format!("Image-motion PSD in pixels (plate scale {plate:.3} arcsec/px)");
    if let Some(gm) = &im.guiding {
        for (k, name) in ["image_x unguided", "image_y unguided"].iter().enumerate() {
            lines.push(Line {
                label: (*name).into(),
                x: &im.freq_hz,
                y: gm.unguided_psd_arcsec2[k].iter().map(|v| v / px2).collect(),
                dashed: true,
            });
        }
        title =
            format!("Image-motion PSD in pixels, guided (solid) and unguided (thin); {plate:.3} arcsec/px");
    }
    chart(&p, &title, "frequency (Hz)", "px^2/Hz", &lines, true, true)?;
    out.push(p);

    let p = dir.join("cumulative-rms.svg");
    let radial: Vec<f64> = im.cumulative_rms_arcsec[0]
        .iter()
        .zip(&im.cumulative_rms_arcsec[1])
        .map(|(a, b)| a.hypot(*b) / plate)
        .collect();
    let lines = vec![
        Line {
            label: "image_x (az)".into(),
            x: &im.freq_hz,
            y: im.cumulative_rms_arcsec[0].iter().map(|v| v / plate).collect(),
            dashed: false,
        },
        Line {
            label: "image_y (alt)".into(),
            x: &im.freq_hz,
            y: im.cumulative_rms_arcsec[1].iter().map(|v| v / plate).collect(),
            dashed: false,
        },
        Line { label: "radial".into(), x: &im.freq_hz, y: radial, dashed: false },
        flat("1/2 pixel", &im.freq_hz, 0.5),
    ];
    chart(
        &p,
        "Cumulative RMS image motion from low frequency",
        "frequency (Hz)",
        "RMS (px)",
        &lines,
        true,
        false,
    )?;
    out.push(p);

    if !r.ground_accel_psd.is_empty() {
        let p = dir.join("ground-psd.svg");
        let mut lines: Vec<Line> = r.ground_accel_psd.iter().map(line).collect();
        for c in r.reference_accel_psd.iter().chain(&r.criterion_accel_psd) {
            let mut l = line(c);
            l.dashed = true;
            lines.push(l);
        }
        chart(
            &p,
            "Ground acceleration PSD vs Peterson NLNM/NHNM and VC curves (band-equivalent)",
            "frequency (Hz)",
            "(m/s^2)^2/Hz",
            &lines,
            true,
            true,
        )?;
        out.push(p);
    }

    let p = dir.join("budget.svg");
    budget_chart(&p, r)?;
    out.push(p);

    if let Some(g) = &r.gust {
        let p = dir.join("gust.svg");
        let mut lines: Vec<Line> = g
            .traces
            .iter()
            .enumerate()
            .map(|(k, t)| Line {
                label: format!(
                    "{} (ring-down {})",
                    t.label,
                    t.ringdown_s.map_or("> record".into(), |v| format!("{v:.2} s"))
                ),
                x: &t.time_s,
                y: t.image_x_px.iter().zip(&t.image_y_px).map(|(x, y)| x.hypot(*y)).collect(),
                dashed: k > 0 && k % 2 == 0,
            })
            .collect();
        if let Some(t) = g.traces.first() {
            lines.push(flat("1/2 px", &t.time_s, 0.5));
            chart(
                &p,
                &format!(
                    "Gust of {:.2} s, {:.2} m/s (1-cosine from {} s): radial image excursion",
                    t.duration_s, t.amplitude_m_s, g.start_s
                ),
                "time (s)",
                "px",
                &lines,
                false,
                false,
            )?;
            out.push(p);
        }
    }
    Ok(out)
}

/// Horizontal bars: each budget line's FWHM-equivalent along x and y, then the star's FWHM.
fn budget_chart(path: &Path, r: &Report) -> PlotResult<()> {
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
    let root = SVGBackend::new(path, (960, 120 + 60 * n as u32)).into_drawing_area();
    root.fill(&WHITE)?;
    let mut c = ChartBuilder::on(&root)
        .caption(
            format!(
                "Star image budget (Gaussian terms in quadrature); elongation {:.2}",
                b.exposure.elongation
            ),
            ("sans-serif", 22),
        )
        .margin(14)
        .x_label_area_size(48)
        .y_label_area_size(10)
        .build_cartesian_2d(0.0..vmax * 1.9, 0.0..n as f64)?;
    c.configure_mesh()
        .disable_y_mesh()
        .y_labels(0)
        .x_desc("FWHM-equivalent 2.355 sigma (arcsec)")
        .x_label_formatter(&|v| format!("{v:.2}"))
        .draw()?;
    for (k, axis) in ["x (sensor)", "y (sensor)"].iter().enumerate() {
        let col = COLOURS[k];
        let bars = rows.iter().enumerate().map(move |(i, (_, v))| {
            let top = (n - i) as f64 - 0.15 - 0.35 * k as f64;
            Rectangle::new([(0.0, top), (v[k], top - 0.3)], col.filled())
        });
        c.draw_series(bars)?
            .label(*axis)
            .legend(move |(x, y)| Rectangle::new([(x, y - 5), (x + 16, y + 5)], col.filled()));
    }
    c.draw_series(rows.iter().enumerate().map(|(i, (name, v))| {
        Text::new(
            format!("{name}: {:.3} x {:.3}", v[0], v[1]),
            (v[0].max(v[1]) + 0.02 * vmax, (n - i) as f64 - 0.45),
            ("sans-serif", 15).into_font(),
        )
    }))?;
    c.configure_series_labels().background_style(WHITE.mix(0.85)).border_style(BLACK).draw()?;
    root.present()?;
    Ok(())
}
