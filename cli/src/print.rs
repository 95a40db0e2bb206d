//! Plain-text terminal output (no colour, no escape codes).

use std::fmt::Write;
use stillsky::batch::{Report, SweepOutcome};
use stillsky::identify::RingdownId;

pub fn report_text(model: &str, r: &Report) -> String {
    let mut s = String::new();
    let im = &r.image;
    let _ = writeln!(s, "model: {model} ({} DOF, optics on '{}')", r.dof_count, r.optics_body);
    let _ = writeln!(
        s,
        "disturbances: ground {}; wind {}",
        r.ground_label.as_deref().unwrap_or("none"),
        r.wind.as_deref().unwrap_or("none")
    );
    let _ = writeln!(
        s,
        "optics: f = {} mm, pixel {} um, plate scale {:.4} arcsec/px",
        im.focal_length_mm, im.pixel_um, im.plate_scale_arcsec_per_px
    );
    let _ = writeln!(s, "\nmodes (first {} of {}):", r.modes.len().min(12), r.modes.len());
    let _ = writeln!(
        s,
        "  {:>3} {:>9} {:>7} {:>8}  {:<40} {:<26} {:<30} {:>26}",
        "#",
        "f (Hz)",
        "zeta",
        "image %",
        "mode (mount axes)",
        "moving most",
        "flexing most",
        "eff. mass x/y/z (kg)"
    );
    let top =
        |v: &[(String, f64)]| v.first().map_or(String::new(), |(n, f)| format!("{n} {:.0} %", 100.0 * f));
    for m in r.modes.iter().take(12) {
        let [a, b, c] = m.effective_mass_kg;
        let share = m.image_share.map_or("-".to_string(), |x| format!("{:.1}", 100.0 * x));
        let _ = writeln!(
            s,
            "  {:>3} {:>9.3} {:>7.4} {:>8}  {:<40} {:<26} {:<30} {:>8.2} {:>8.2} {:>8.2}",
            m.index,
            m.frequency_hz,
            m.damping_ratio,
            share,
            m.label,
            top(&m.moving),
            top(&m.flexing),
            a,
            b,
            c
        );
    }
    if r.modes.iter().filter_map(|m| m.image_share).any(|x| !(-0.005..=1.005).contains(&x)) {
        let _ = writeln!(
            s,
            "  (image %: each mode's share of the image mean square; a share above 100 % or below 0 means modes partly cancel)"
        );
    }
    let um_per_arcsec = im.rms_um / im.rms_arcsec.max(1e-300);
    let _ = writeln!(s, "\nimage motion (RMS):");
    let _ = writeln!(s, "  {:<14} {:>10} {:>12} {:>10}", "", "arcsec", "um", "px");
    for (name, v) in [
        (r.image_axes[0].as_str(), im.per_axis_arcsec[0]),
        (r.image_axes[1].as_str(), im.per_axis_arcsec[1]),
        ("radial", im.rms_arcsec),
    ] {
        let _ = writeln!(
            s,
            "  {:<14} {:>10.4} {:>12.4} {:>10.4}",
            name,
            v,
            v * um_per_arcsec,
            v / im.plate_scale_arcsec_per_px
        );
    }
    if let Some(p) = &im.peak {
        let _ = writeln!(
            s,
            "  expected peak |excursion| in a {} s exposure (Davenport 1964 peak factor): \
             x {:.4} arcsec = {:.3} px ({:.2} RMS), y {:.4} arcsec = {:.3} px ({:.2} RMS)",
            p.duration_s,
            p.peak_arcsec[0],
            p.peak_px[0],
            p.peak_factor[0],
            p.peak_arcsec[1],
            p.peak_px[1],
            p.peak_factor[1]
        );
    }
    let _ = writeln!(s, "  probability outside {} px: {:.3e}", im.radius_px, im.p_outside);
    let ([bx, by], _) = r.blur_vs_seeing();
    let _ =
        writeln!(s, "  motion blur FWHM (2.355 sigma of each axis, all motion): x {bx:.3}, y {by:.3} arcsec");
    if let Some((label, f, share)) = r.dominant_mode() {
        let _ =
            writeln!(s, "  dominant mode: {label} at {f:.2} Hz ({:.0} % of the mean square)", 100.0 * share);
    }
    let _ = writeln!(
        s,
        "  dominant band: third octave at {:.2} Hz ({:.0} %)",
        im.dominant_band_hz,
        100.0 * im.dominant_band_share
    );
    for (name, share) in &im.input_share {
        let _ = writeln!(s, "  from {name}: {:.1} %", 100.0 * share);
    }
    if let Some(e) = &im.exposure {
        let _ = writeln!(
            s,
            "  exposure {} s: wander {:.4} arcsec, smear {:.4} arcsec RMS",
            e.exposure_s, e.wander_rms_arcsec, e.smear_rms_arcsec
        );
    }
    if let (Some(g), Some(gm)) = (&im.guide, &im.guiding) {
        let _ = writeln!(
            s,
            "  guiding (applied): cadence {} s, guide exposure {} s, latency {} s, integral gain {}, \
             proportional gain {}; guide Nyquist {:.3} Hz",
            g.cadence_s, g.exposure_s, g.latency_s, g.gain, g.proportional_gain, gm.nyquist_hz
        );
        let _ = writeln!(
            s,
            "  guiding: radial RMS {:.4} arcsec unguided -> {:.4} arcsec guided; aliased part x {:.4}, y {:.4} arcsec RMS",
            gm.unguided_rms_arcsec,
            im.rms_arcsec,
            gm.aliased_per_axis_arcsec[0],
            gm.aliased_per_axis_arcsec[1]
        );
    }
    if let Some(g) = &r.gust {
        gust_text(&mut s, g);
    }
    budget_text(&mut s, im);
    if let Some(t) = &r.tones {
        tones_text(&mut s, t, im.rms_arcsec, im.rms_px);
    }
    if let Some(p) = &r.people {
        s.push('\n');
        s.push_str(&people_text(p));
    }
    if let Some(m) = &r.sky_map {
        let _ = writeln!(
            s,
            "\nsky map ({} cells; below {:.0}° altitude not mapped):",
            m.rows_deg.len() * m.cols_deg.len(),
            m.min_altitude_deg
        );
        let _ = writeln!(s, "  {}", m.summary_text());
        if let Some(t) = m.pier_side_text() {
            let _ = writeln!(s, "  {t}");
        }
    }
    if !r.criteria.is_empty() {
        let _ = writeln!(s, "\nground vs criterion curves (third-octave RMS velocity, worst axis):");
        for c in &r.criteria {
            let _ = writeln!(
                s,
                "  {:<5} {:>6.2} um/s: worst {:.2e} of the limit at {:.1} Hz ({}) {}",
                c.curve,
                c.level_um_s,
                c.worst_ratio,
                c.worst_band_hz,
                c.worst_axis,
                if c.passes { "pass" } else { "exceeded" }
            );
        }
    }
    let level = crate::verdict::Level::from_p_outside(im.p_outside);
    let _ = writeln!(s, "\nverdict: {} ({}); radial RMS {:.3} px", level.words(), level.rule(), im.rms_px);
    if !r.notes.is_empty() {
        let _ = writeln!(s, "notes:");
        for n in &r.notes {
            let _ = writeln!(s, "  - {n}");
        }
    }
    s
}

/// The tonal lines: each line's image RMS and share, then the lines with the broadband motion.
fn tones_text(s: &mut String, t: &stillsky::tonal::ToneImage, broad_arcsec: f64, broad_px: f64) {
    let _ = writeln!(
        s,
        "\ntonal lines (RMS amplitudes at the rig, after --ground-distance-m if given; FRF at each line's own frequency):"
    );
    for l in &t.lines {
        let _ = writeln!(
            s,
            "  {:>8.3} Hz {:<24} {:.3e} {:<4} -> x {:.4}, y {:.4}; radial {:.4} arcsec = {:.4} um = {:.4} px ({:.1} %)",
            l.line.frequency_hz,
            l.line.input,
            l.line.amplitude_rms,
            l.line.unit.name(),
            l.image_rms_arcsec[0],
            l.image_rms_arcsec[1],
            l.rms_arcsec,
            l.rms_um,
            l.rms_px,
            100.0 * l.share
        );
    }
    let _ = writeln!(
        s,
        "  all lines: radial RMS {:.4} arcsec = {:.4} um = {:.4} px; with the broadband motion {:.4} arcsec = {:.4} px",
        t.rms_arcsec,
        t.rms_um,
        t.rms_px,
        t.rms_arcsec.hypot(broad_arcsec),
        t.rms_px.hypot(broad_px)
    );
}

/// The star image budget: one line per term, the FWHM it makes, elongation and direction.
fn budget_text(s: &mut String, im: &stillsky::image::ImageMotion) {
    let b = &im.budget;
    let _ = writeln!(
        s,
        "\nstar image budget (Gaussian terms in quadrature; FWHM-equivalent 2.355 sigma along each axis):"
    );
    let _ = writeln!(s, "  {:<48} {:>10} {:>10}", "term", "x arcsec", "y arcsec");
    let row = |s: &mut String, name: &str, v: [f64; 2]| {
        let _ = writeln!(s, "  {:<48} {:>10.3} {:>10.3}", name, v[0], v[1]);
    };
    for l in b.lines.iter().filter(|l| l.in_exposure) {
        row(s, &l.label, l.fwhm_arcsec);
    }
    let one =
        if b.exposure_s.is_some() { "= star FWHM in one exposure" } else { "= star FWHM (long exposure)" };
    row(s, one, b.exposure.fwhm_arcsec);
    for l in b.lines.iter().filter(|l| !l.in_exposure) {
        row(s, &format!("{} (not in one exposure)", l.label), l.fwhm_arcsec);
        row(s, "= FWHM of an unregistered stack", b.unregistered_stack.fwhm_arcsec);
    }
    let e = &b.exposure;
    let seeing = im.seeing_fwhm_arcsec.map_or(String::new(), |sv| {
        format!("; {:+.1} % on the seeing", 100.0 * (e.major_fwhm_arcsec / sv.max(1e-300) - 1.0))
    });
    let _ = writeln!(
        s,
        "  star: {:.3} x {:.3} px (x, y); elongation {:.3} (major {:.3}, minor {:.3} arcsec), major axis {:.1} deg \
         from sensor x toward y{seeing}",
        e.fwhm_px[0], e.fwhm_px[1], e.elongation, e.major_fwhm_arcsec, e.minor_fwhm_arcsec, e.major_axis_deg
    );
    for n in &b.notes {
        let _ = writeln!(s, "  ({n})");
    }
}

pub fn sweep_text(o: &SweepOutcome) -> String {
    let mut s = String::new();
    let _ = writeln!(
        s,
        "sweep: {} rows ({} computed, {} kept from an earlier run) -> {}",
        o.rows.len(),
        o.computed,
        o.kept,
        o.path.display()
    );
    visibility_line(&mut s, &o.summary.visibility, "no pad");
    for t in &o.summary.per_wind {
        let windy = t.entries.iter().any(|e| e.gust_peak_px.is_finite());
        let _ = writeln!(
            s,
            "\nranking, wind {}, {} (mean ratio of image RMS to no pad; lower is better):",
            t.wind, t.spectrum
        );
        let _ = write!(
            s,
            "  {:>2} {:<20} {:>8} {:>10} {:>12} {:>13}",
            "", "isolator", "ratio", "rms px", "P(>1/2 px)", "better/same/worse"
        );
        if windy {
            let _ = write!(s, " {:>10} {:>11}", "gust px", "ring-down s");
        }
        let _ = writeln!(s, "  verdict");
        for (k, e) in t.entries.iter().enumerate() {
            let _ = write!(
                s,
                "  {:>2} {:<20} {:>8.3} {:>10.4} {:>12.3e} {:>7}/{}/{:<7}",
                k + 1,
                e.spec,
                e.mean_ratio,
                e.mean_rms_px,
                e.mean_p_outside_half_px,
                e.cases_better,
                e.cases_same,
                e.cases_worse
            );
            if windy {
                // NaN: the image did not settle within the record.
                let ring = if e.gust_ringdown_s.is_finite() {
                    format!("{:.2}", e.gust_ringdown_s)
                } else {
                    "> record".to_string()
                };
                let _ = write!(s, " {:>10.3} {:>11}", e.gust_peak_px, ring);
            }
            let verdict = if e.spec == stillsky::batch::NO_PAD { "(baseline)" } else { e.verdict.words() };
            let _ = writeln!(s, "  {}{}", verdict, if e.overloaded { " (over rated load)" } else { "" });
        }
    }
    if o.summary.per_wind_spectrum.len() > o.summary.per_wind.len() {
        let _ = writeln!(s, "\nbest per wind case and spectrum:");
        for t in &o.summary.per_wind_spectrum {
            let best = t.entries.iter().find(|e| e.spec != stillsky::batch::NO_PAD);
            let line = match (t.entries.first(), best) {
                (Some(first), Some(b)) if first.spec == stillsky::batch::NO_PAD => {
                    format!("none ranks first; best pad {}: {}", b.spec, b.verdict.words())
                }
                (Some(first), _) => {
                    format!("{} (ratio {:.3}: {})", first.spec, first.mean_ratio, first.verdict.words())
                }
                _ => "no rows".into(),
            };
            let _ = writeln!(s, "  {:<28} {:<22} {line}", t.wind, t.spectrum);
        }
    }
    if !o.summary.failures.is_empty() {
        let _ = writeln!(s, "\nfailed inputs:");
        for (k, e) in &o.summary.failures {
            let _ = writeln!(s, "  {k}: {e}");
        }
    }
    s
}

pub fn tap_text(file: &str, axis: &str, fs: f64, id: &RingdownId) -> String {
    let mut s = String::new();
    let _ = writeln!(s, "tap test: {file}, axis '{axis}', fs {fs} Hz");
    let _ = writeln!(s, "  {:>3} {:>10} {:>9} {:>12}", "#", "f (Hz)", "zeta", "amplitude");
    for k in 0..id.frequency_hz.len() {
        let _ = writeln!(
            s,
            "  {:>3} {:>10.3} {:>9.4} {:>12.4e}{}",
            k + 1,
            id.frequency_hz[k],
            id.damping_ratio[k],
            id.amplitude[k],
            if k == id.dominant { "  (dominant)" } else { "" }
        );
    }
    for w in &id.warnings {
        let _ = writeln!(s, "  warning: {w}");
    }
    s
}

/// The ring-down card of one recording.
pub fn card_text(file: &str, axis: &str, unit: &str, c: &stillsky::identify::RingdownCard) -> String {
    let mut s = String::new();
    let _ = writeln!(s, "== ring-down card: {file}, axis '{axis}', fs {} Hz ==", c.fs_hz);
    let (f, z) = (&c.frequency_hz, &c.damping_ratio);
    let methods = |m: &[(String, f64)], p: usize| {
        m.iter().map(|(n, v)| format!("{n} {v:.p$}")).collect::<Vec<_>>().join(", ")
    };
    let _ = writeln!(
        s,
        "  frequency     {:.4} ± {:.4} Hz   (fit σ {:.2e}; methods {})",
        f.value,
        f.uncertainty,
        f.fit_std,
        methods(&f.methods, 4)
    );
    let _ = writeln!(
        s,
        "  damping ratio {:.5} ± {:.5}    (fit σ {:.2e}; methods {})",
        z.value,
        z.uncertainty,
        z.fit_std,
        methods(&z.methods, 5)
    );
    let px = |v: Option<f64>| v.map_or(String::new(), |v| format!(" = {v:.3} px"));
    let _ = writeln!(
        s,
        "  first excursion {:.4e} {unit}{} at {:.3} s",
        c.first_excursion,
        px(c.first_excursion_px),
        c.first_excursion_time_s
    );
    let measured = c.settle_time_s.map_or("not within the record".to_string(), |t| format!("{t:.3} s"));
    let _ = writeln!(
        s,
        "  inside ±{:.4e} {unit}{}: after {measured} (samples), {:.3} s (fitted envelope)",
        c.threshold,
        px(c.threshold_px),
        c.settle_time_fit_s
    );
    let _ = writeln!(
        s,
        "  fit: {} samples from {:.3} s, residual RMS {:.3e} {unit}, rest level {:.4e} {unit}",
        c.fit.samples, c.fit.t0_s, c.fit.residual_rms, c.rest_level
    );
    for w in &c.warnings {
        let _ = writeln!(s, "  warning: {w}");
    }
    s
}

/// Before/after ratios of two ring-down cards.
pub fn card_comparison_text(c: &stillsky::identify::CardComparison) -> String {
    let mut s = String::from("== before/after (after / before) ==\n");
    let opt = |v: Option<f64>| v.map_or("-".to_string(), |v| format!("{v:.3}"));
    let _ = writeln!(s, "  first excursion {:.3}", c.excursion_ratio);
    let _ = writeln!(
        s,
        "  damping ratio   {:.3}  ({})",
        c.damping_ratio_ratio,
        if c.damping_change_resolved {
            "the change is larger than the two uncertainties"
        } else {
            "within the uncertainties: not resolved"
        }
    );
    let _ = writeln!(s, "  frequency       {:.4}", c.frequency_ratio);
    let _ = writeln!(
        s,
        "  settle time     {} (fitted envelope), {} (samples)",
        opt(c.settle_time_fit_ratio),
        opt(c.settle_time_ratio)
    );
    s
}

/// Static checks with their verdicts and the cautions that always go with them.
pub fn checks_text(wind: &stillsky::checks::StaticWind, r: &stillsky::checks::CheckReport) -> String {
    let mut o = String::new();
    let _ = writeln!(
        o,
        "\nStatic checks (design wind {:.1} m/s, gust factor {:.2}):",
        wind.speed_m_s, wind.gust_factor
    );
    let _ = writeln!(o, "  {:<58} {:>12} {:>12} {:>6} {:>9}", "check", "demand", "capacity", "unit", "FoS");
    for c in &r.checks {
        let _ = writeln!(
            o,
            "  {:<58} {:>12.4e} {:>12.4e} {:>6} {:>9.2}  {:?}",
            c.name, c.value, c.limit, c.unit, c.margin, c.verdict
        );
    }
    for n in &r.notes {
        let _ = writeln!(o, "  note: {n}");
    }
    let _ = writeln!(o, "  overall: {:?}", r.verdict());
    for line in r.cautions() {
        let _ = writeln!(o, "  CAUTION: {line}");
    }
    o
}

/// The calibration result: parameters, per-target residuals and the caution.
pub fn calibration_text(model: &str, c: &stillsky::identify::Calibration) -> String {
    let mut t = format!("== calibration: {model} ==\n");
    t.push_str(&format!("{:<44} {:>14} {:>14}  note\n", "parameter", "start", "fitted"));
    for j in 0..c.paths.len() {
        let note = if c.at_bound[j] { "at a bound" } else { "" };
        t.push_str(&format!("{:<44} {:>14.6e} {:>14.6e}  {note}\n", c.paths[j], c.initial[j], c.values[j]));
    }
    t.push_str(&format!(
        "{:>5} {:>12} {:>12} {:>9} {:>10} {:>10}\n",
        "mode", "target Hz", "model Hz", "error", "target ζ", "model ζ"
    ));
    for r in &c.residuals {
        let zt = r.target_damping_ratio.map_or("-".to_string(), |z| format!("{z:.4}"));
        t.push_str(&format!(
            "{:>5} {:>12.4} {:>12.4} {:>8.3}% {:>10} {:>10.4}\n",
            r.mode + 1,
            r.target_frequency_hz,
            r.model_frequency_hz,
            100.0 * r.frequency_error,
            zt,
            r.model_damping_ratio
        ));
    }
    t.push_str(&format!(
        "cost {:.3e} -> {:.3e} in {} iterations ({})\n",
        c.initial_cost,
        c.cost,
        c.iterations,
        if c.converged { "converged" } else { "iteration limit reached" }
    ));
    t.push_str("Each target is tied to the model mode nearest to it at the start; check the ties above.\n");
    t
}

fn ringdown_text(t: Option<f64>) -> String {
    t.map_or("not within the record".to_string(), |t| format!("{t:.2} s"))
}

/// The gust family: one line per gust, then the worst cases of the rig and its alternatives.
fn gust_text(s: &mut String, g: &stillsky::batch::GustReport) {
    let f = &g.family;
    let _ = writeln!(
        s,
        "\ngust family (1-cosine gusts from half the first period to {:.0} s; amplitude 3 x the RMS velocity change over the rise; ring-down from the gust's end until within 1/2 px):",
        stillsky::batch::gust::GUST_LONGEST_S
    );
    let _ = writeln!(
        s,
        "  {:>10} {:>10} {:>10} {:>12} {:>14}",
        "duration s", "gust m/s", "peak px", "peak after s", "ring-down"
    );
    for (k, c) in f.cases.iter().enumerate() {
        let mark = match (k == f.worst_peak, k == f.worst_ringdown) {
            (true, true) => "  <- worst peak and ring-down",
            (true, false) => "  <- worst peak",
            (false, true) => "  <- longest ring-down",
            _ => "",
        };
        let _ = writeln!(
            s,
            "  {:>10.3} {:>10.3} {:>10.3} {:>12.3} {:>14}{mark}",
            c.duration_s,
            c.amplitude_m_s,
            c.peak_px,
            c.peak_after_start_s,
            ringdown_text(c.ringdown_s)
        );
    }
    if g.rigs.len() > 1 {
        let _ = writeln!(s, "  alternatives (each over its own gust family):");
        let _ = writeln!(
            s,
            "    {:<24} {:>14} {:>12} {:>16} {:>12}",
            "rig", "worst peak px", "at gust s", "ring-down", "at gust s"
        );
        for o in &g.rigs {
            match &o.error {
                Some(e) => {
                    let _ = writeln!(s, "    {:<24} not computed: {e}", o.label);
                }
                None => {
                    let _ = writeln!(
                        s,
                        "    {:<24} {:>14.3} {:>12.3} {:>16} {:>12.3}",
                        o.label,
                        o.worst_peak_px,
                        o.worst_peak_duration_s,
                        ringdown_text(o.worst_ringdown_s),
                        o.worst_ringdown_duration_s
                    );
                }
            }
        }
    }
}

/// A transfer estimate in brief: the bins where the channels are coherent, and the largest |H1|
/// among them.
pub fn transfer_text(
    input: &str,
    output: &str,
    n: usize,
    fs: f64,
    nperseg: usize,
    t: &stillsky::spectrum::TransferEstimate,
) -> String {
    let mut s = String::new();
    let _ = writeln!(s, "transfer: {input} -> {output}");
    let _ = writeln!(
        s,
        "  {n} samples at {fs} Hz; Welch segments of {nperseg} ({} averaged), bins {:.4} Hz apart",
        t.n_segments,
        fs / nperseg as f64
    );
    let coherent: Vec<usize> = (0..t.freq_hz.len()).filter(|&k| t.coherence[k] >= 0.9).collect();
    let _ = writeln!(
        s,
        "  coherence >= 0.9 in {} of {} bins; below it H1 and H2 disagree (noise or other inputs)",
        coherent.len(),
        t.freq_hz.len()
    );
    if let Some(&k) = coherent.iter().max_by(|&&a, &&b| t.h1[a].norm().total_cmp(&t.h1[b].norm())) {
        let _ = writeln!(
            s,
            "  largest coherent |H1| {:.4e} at {:.3} Hz (|H2| {:.4e}, phase {:.1} deg, coherence {:.3})",
            t.h1[k].norm(),
            t.freq_hz[k],
            t.h2[k].norm(),
            t.h1[k].arg().to_degrees(),
            t.coherence[k]
        );
    }
    s
}

/// Every bin of a transfer estimate as CSV.
pub fn transfer_csv(t: &stillsky::spectrum::TransferEstimate) -> String {
    let mut s = String::from("freq_hz,h1_abs,h1_phase_deg,h2_abs,h2_phase_deg,coherence\n");
    for k in 0..t.freq_hz.len() {
        let _ = writeln!(
            s,
            "{},{},{},{},{},{}",
            t.freq_hz[k],
            t.h1[k].norm(),
            t.h1[k].arg().to_degrees(),
            t.h2[k].norm(),
            t.h2[k].arg().to_degrees(),
            t.coherence[k]
        );
    }
    s
}

/// The pier sizing table: formula values with the beam model's beside them.
pub fn pier_table_text(
    spec: &stillsky::pier_table::PierTableSpec,
    rows: &[stillsky::pier_table::PierRow],
) -> String {
    let mut o = String::new();
    let base = match rows.first().map(|r| r.rocking_nm_per_rad) {
        Some(k) if k.is_finite() => format!("footing rocking {k:.4e} N·m/rad"),
        _ => "rigid base".to_string(),
    };
    let _ = writeln!(
        o,
        "Pier table: {} N at the top (tilt), top mass {} kg, top inertia {} kg·m² about the vertical, {base}",
        spec.load_n, spec.top_mass_kg, spec.top_inertia_kgm2
    );
    let _ = writeln!(
        o,
        "{:>7} {:>6} {:>5} {:<18} {:>6} {:>9} {:>9} {:>9} {:>9} {:>9} {:>8} {:>8} {:>8} {:>8}",
        "OD mm",
        "wall",
        "H m",
        "material",
        "fill",
        "column\"",
        "rocking\"",
        "tilt\"",
        "model\"",
        "defl um",
        "bend Hz",
        "model",
        "twist Hz",
        "model"
    );
    for r in rows {
        let _ = writeln!(
            o,
            "{:>7.1} {:>6.1} {:>5.2} {:<18} {:>6.0} {:>9.4} {:>9.4} {:>9.4} {:>9.4} {:>9.2} {:>8.2} {:>8.2} {:>8.1} {:>8.1}",
            r.outer_diameter_m * 1e3,
            r.wall_m * 1e3,
            r.height_m,
            r.material,
            r.fill_density_kg_m3,
            r.tilt_column_arcsec,
            r.tilt_rocking_arcsec,
            r.tilt_arcsec,
            r.model_tilt_arcsec,
            r.deflection_m * 1e6,
            r.bending_hz,
            r.model_bending_hz,
            r.torsion_hz,
            r.model_torsion_hz
        );
    }
    let _ = writeln!(
        o,
        "tilt: F L²/(2EI) + F L/k_rock; frequencies: Rayleigh estimates (formula) and the modes of a \
         16-element beam model (model). The load figure is common practice, no source; the \
         defaults for top mass and inertia are placeholders."
    );
    o
}

/// The people section: walking pass, steady footfall lines, standing table.
pub fn people_text(p: &stillsky::batch::PeopleReport) -> String {
    let mut s = String::new();
    let w = &p.walker;
    let pass = &p.walking;
    let _ = writeln!(
        s,
        "people on the deck '{}': {:.0} N ({:.0} kg) walking at {:.2} Hz ({} load factors) at x {:.2}, y {:.2} m:",
        p.deck,
        w.weight_n,
        w.weight_n / stillsky::people::STANDARD_GRAVITY_M_S2,
        w.pace_hz,
        w.model.name(),
        pass.point_m[0],
        pass.point_m[1]
    );
    let _ = writeln!(
        s,
        "  walking pass: peak {:.3} arcsec ({:.2} px) at {:.2} s, weight's tilt included; RMS about the mean {:.3} arcsec ({:.2} px)",
        pass.peak_arcsec, pass.peak_px, pass.peak_time_s, pass.rms_arcsec, pass.rms_px
    );
    let lines: Vec<String> = p
        .steady
        .lines
        .iter()
        .map(|l| format!("{:.1} Hz {:.0} N -> {:.3}\"", l.frequency_hz, l.force_n, l.image_rms_arcsec))
        .collect();
    let _ = writeln!(
        s,
        "  steady footfall lines: {}; total RMS {:.3} arcsec ({:.2} px)",
        lines.join(", "),
        p.steady.rms_arcsec,
        p.steady.rms_px
    );
    let t = &p.standing;
    let _ = writeln!(
        s,
        "  standing still ({:.0} N), static image angle{}:",
        t.weight_n,
        if t.worst_azimuth { " at the worst azimuth" } else { "" }
    );
    let _ = writeln!(
        s,
        "    {:>8} {:>8} {:>12} {:>10} {:>12}",
        "dist m", "az deg", "image arcsec", "image px", "deck arcsec"
    );
    for r in &t.rows {
        let _ = writeln!(
            s,
            "    {:>8.3} {:>8.0} {:>12.4} {:>10.3} {:>12.4}",
            r.distance_m, r.azimuth_deg, r.image_arcsec, r.image_px, r.deck_tilt_arcsec
        );
    }
    let _ = writeln!(s, "  standing: {}", standing_verdict(t));
    let _ = writeln!(
        s,
        "  (rigid deck: the local dip of boards and joists under a foot is not modelled; a real deck tilts a stand on it more near the foot)"
    );
    s
}

/// Where a standing person keeps the image under the limit, in words.
pub fn standing_verdict(t: &stillsky::people::StandingTable) -> String {
    let first = t.rows.first().map(|r| r.distance_m).unwrap_or(0.0);
    let last = t.rows.last().map(|r| r.distance_m).unwrap_or(0.0);
    match (t.under_within_m(), t.under_beyond_m()) {
        (Some(d), _) => format!(
            "under {} px within {:.3} m of the stand, over it farther out (to {last} m)",
            t.limit_px, d
        ),
        (None, Some(d)) => format!("under {} px beyond {:.3} m from the stand", t.limit_px, d),
        _ if t.crossings_m.is_empty() && t.under_at_nearest => {
            format!("under {} px at every distance from {first} to {last} m", t.limit_px)
        }
        _ if t.crossings_m.is_empty() => {
            format!("over {} px at every distance from {first} to {last} m", t.limit_px)
        }
        _ => format!("crosses {} px at {:?} m", t.limit_px, t.crossings_m),
    }
}

/// The line that says when a ranking's verdict against `against` reads "no visible difference".
fn visibility_line(s: &mut String, v: &stillsky::batch::Visibility, against: &str) {
    let _ = writeln!(
        s,
        "\nverdicts against {against}: no visible difference when both stay below {} px RMS and P(>1/2 px) {} %, or differ by less than that",
        v.rms_px,
        100.0 * v.p_outside
    );
}

/// A study's ranked summary per disturbance and its sensitivity table, as plain text.
pub fn study_text(study: &stillsky::batch::Study, o: &stillsky::batch::StudyOutcome) -> String {
    let mut s = String::new();
    let _ = writeln!(
        s,
        "study{}: {} rows ({} computed, {} kept from an earlier run) -> {}",
        study.title.as_deref().map(|t| format!(" '{t}'")).unwrap_or_default(),
        o.rows.len(),
        o.computed,
        o.kept,
        o.path.display()
    );
    visibility_line(&mut s, &o.summary.visibility, "the base");
    for t in &o.summary.per_disturbance {
        let windy = t.entries.iter().any(|e| e.gust_peak_px.is_finite());
        let person = t.entries.iter().any(|e| e.standing_tilt_px.is_finite());
        let _ = writeln!(s, "\nranking, ground {}, wind {} (image RMS, lower is better):", t.ground, t.wind);
        // The variant column as wide as its longest label, so long labels keep the columns aligned.
        let vw = t.entries.iter().map(|e| e.variant.chars().count()).max().unwrap_or(0).max(7);
        let _ = write!(
            s,
            "  {:>3} {:<vw$} {:>9} {:>11} {:>7} {:>8}",
            "", "variant", "rms px", "P(>1/2 px)", "ratio", "f1 Hz"
        );
        if windy {
            let _ = write!(s, " {:>8}", "gust px");
        }
        if person {
            let _ = write!(s, " {:>9}", "stand px");
        }
        let _ = writeln!(s, " {:>6}  vs base", "FoS");
        for (k, e) in t.entries.iter().enumerate() {
            let _ = write!(
                s,
                "  {:>3} {:<vw$} {:>9.4} {:>11.3e} {:>7.3} {:>8.2}",
                k + 1,
                e.variant,
                e.rms_px,
                e.p_outside_half_px,
                e.ratio_to_base,
                e.first_mode_hz
            );
            if windy {
                let _ = write!(s, " {:>8.3}", e.gust_peak_px);
            }
            if person {
                let _ = write!(s, " {:>9.3}", e.standing_tilt_px);
            }
            let _ = writeln!(s, " {:>6.2}  {}", e.min_static_fos, e.vs_base);
        }
    }
    let _ = writeln!(
        s,
        "\nsensitivity: range of each outcome's mean over a variable's values (the other variables averaged)"
    );
    let _ = writeln!(
        s,
        "  {:<32} {:<34} {:>10} {:>10} {:>10} {:>10}",
        "variable", "ground, wind", "rms px", "gust px", "f1 Hz", "FoS"
    );
    let mut seen = Vec::new();
    for x in &o.sensitivity {
        let k = (x.variable.clone(), x.ground.clone(), x.wind.clone());
        if seen.contains(&k) {
            continue;
        }
        seen.push(k);
        let get = |name: &str| {
            o.sensitivity
                .iter()
                .find(|y| {
                    y.variable == x.variable && y.ground == x.ground && y.wind == x.wind && y.outcome == name
                })
                .map_or(f64::NAN, |y| y.range)
        };
        // An outcome a disturbance does not have (the gust when calm) reads "-".
        let cell = |v: f64, p: usize| if v.is_nan() { "-".to_string() } else { format!("{v:.p$}") };
        let _ = writeln!(
            s,
            "  {:<32} {:<34} {:>10} {:>10} {:>10} {:>10}",
            x.variable,
            format!("{}, {}", x.ground, x.wind),
            cell(get("rms_px"), 4),
            cell(get("gust_peak_px"), 4),
            cell(get("first_mode_hz"), 3),
            cell(get("min_static_fos"), 3)
        );
    }
    if !o.summary.failures.is_empty() {
        let _ = writeln!(s, "\n{} error row(s):", o.summary.failures.len());
        for (k, e) in o.summary.failures.iter().take(20) {
            let _ = writeln!(s, "  {k}: {e}");
        }
    }
    let _ = writeln!(s, "\n{}", stillsky::checks::CAUTIONS.join("\n"));
    s
}

/// The quiet-hours survey as text: the recording, percentile levels per axis at a few
/// frequencies, the hour map and the hours that hold ½ px.
pub fn quiet_survey_text(s: &stillsky::batch::QuietSurvey) -> String {
    let mut t = String::new();
    let _ = writeln!(
        t,
        "quiet hours: {} ({} Hz{}), {} blocks of {} s",
        s.source,
        s.fs_hz,
        s.start_time.as_deref().map(|x| format!(", start {x}")).unwrap_or_default(),
        s.n_blocks,
        s.block_s
    );
    let freqs: Vec<f64> = [0.1, 0.3, 1.0, 3.0, 10.0, 30.0]
        .into_iter()
        .filter(|&f| s.period_s.iter().any(|&p| (1.0 / p - f).abs() / f < 0.1))
        .collect();
    for a in &s.axes {
        let _ = writeln!(
            t,
            "\naxis {} ('{}'): acceleration PSD, dB re 1 (m/s²)²/Hz (probabilistic PSD, McNamara & Buland 2004)",
            a.ground_axis, a.name
        );
        let mut head = String::from("  freq (Hz)");
        for (q, _) in &a.percentiles_db {
            let _ = write!(head, "{:>8}", format!("{q:.0} %"));
        }
        let _ = writeln!(t, "{head}  below NLNM  above NHNM");
        for f in &freqs {
            let Some(k) = nearest(&s.period_s, 1.0 / f) else { continue };
            let mut row = format!("  {:>9.2}", 1.0 / s.period_s[k]);
            for (_, v) in &a.percentiles_db {
                let _ = write!(row, "{:>8.0}", v[k]);
            }
            let share = |x: f64| {
                if x.is_finite() { format!("{:>10.0} %", 100.0 * x) } else { format!("{:>12}", "-") }
            };
            let _ = writeln!(t, "{row}{}{}", share(a.share_below_nlnm[k]), share(a.share_above_nhnm[k]));
        }
    }
    let (unit, factor) = match s.band_quantity {
        stillsky::spectrum::Quantity::Velocity => ("µm/s", 1e6),
        stillsky::spectrum::Quantity::Acceleration => ("mm/s²", 1e3),
        stillsky::spectrum::Quantity::Displacement => ("µm", 1e6),
        _ => ("SI", 1.0),
    };
    if s.hour_blocks.iter().any(|&n| n > 0) {
        let mut head = String::from("\nhour (UTC)  blocks");
        for (lo, hi) in &s.bands_hz {
            let _ = write!(head, "  {:>16}", format!("RMS {lo}-{hi} Hz"));
        }
        let judged = s.hour_judged.iter().any(|&n| n > 0);
        if judged {
            head.push_str("  held ½ px");
        }
        let _ =
            writeln!(t, "{head}   (RMS in {unit}, axis {})", s.axes.first().map_or("", |a| &a.ground_axis));
        for h in 0..24 {
            if s.hour_blocks[h] == 0 {
                continue;
            }
            let mut row = format!("  {h:02}:00   {:>7}", s.hour_blocks[h]);
            for v in &s.hour_band_rms[h] {
                let _ = write!(row, "  {:>16.4}", v * factor);
            }
            if judged {
                let _ = write!(row, "  {:>4}/{}", s.hour_held[h], s.hour_judged[h]);
            }
            let _ = writeln!(t, "{row}");
        }
        if judged {
            let q = s.quiet_hours();
            let _ = writeln!(
                t,
                "hours in which every block holds ½ px: {}",
                if q.is_empty() {
                    "none".to_string()
                } else {
                    q.iter().map(|h| format!("{h:02}")).collect::<Vec<_>>().join(", ")
                }
            );
        }
    } else if s.blocks.iter().any(|b| b.holds.is_some()) {
        let held = s.blocks.iter().filter(|b| b.holds == Some(true)).count();
        let _ = writeln!(t, "\nblocks in which the rig holds ½ px: {held} of {}", s.blocks.len());
    }
    for n in &s.notes {
        let _ = writeln!(t, "note: {n}");
    }
    t
}

fn nearest(v: &[f64], x: f64) -> Option<usize> {
    v.iter().enumerate().min_by(|a, b| (a.1 - x).abs().total_cmp(&(b.1 - x).abs())).map(|(i, _)| i)
}
