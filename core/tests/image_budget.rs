//! Image motion with the sampled-data guider, the star budget and the peak excursion on the
//! demo tripod (tripod-lawn.toml, invented demo rig) in a 4 m/s wind.

use approx::assert_relative_eq;
use stillsky::Error;
use stillsky::FreqGrid;
use stillsky::budget::BudgetTerm;
use stillsky::guider::GuideLoop;
use stillsky::image::{FWHM_PER_SIGMA, Guiding, ImageMotion, ImageOptions};
use stillsky::model::Model;
use stillsky::response::Disturbances;
use stillsky::schema::ModelFile;
use stillsky::wind::{Turbulence, WindSpec, WindSpectrum};

fn model() -> Model {
    let p = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../docs/examples/tripod-lawn.toml");
    ModelFile::read(&p).unwrap().to_model().unwrap()
}

fn wind() -> Disturbances {
    // Quasi-steady drag (no aerodynamic admittance), so the tripod's modes at 5–20 Hz carry the
    // motion that the guiding and peak checks below look at.
    let w = WindSpec::new(WindSpectrum::Kaimal, 4.0, 2.0, Turbulence::Intensity(0.2)).with_admittance(false);
    Disturbances { wind: Some(w), ..Default::default() }
}

fn run(o: &ImageOptions) -> ImageMotion {
    let grid = FreqGrid::log(0.02, 100.0, 900).unwrap();
    model().image_motion(&grid, &wind(), o).unwrap()
}

#[test]
fn budget_lines_combine_to_the_reported_fwhm() {
    for o in [
        ImageOptions::default(),
        ImageOptions::default().exposure(2.0),
        ImageOptions::default().exposure(5.0).guiding(Guiding { cadence_s: 2.0, gain: 0.5 }),
    ] {
        let im = run(&o);
        let b = &im.budget;
        // Quadrature of Gaussian widths (REFERENCES §11): FWHM² per axis = Σ of the lines' FWHM².
        for ax in 0..2 {
            let one: f64 = b.lines.iter().filter(|l| l.in_exposure).map(|l| l.fwhm_arcsec[ax].powi(2)).sum();
            let all: f64 = b.lines.iter().map(|l| l.fwhm_arcsec[ax].powi(2)).sum();
            assert_relative_eq!(b.exposure.fwhm_arcsec[ax], one.sqrt(), max_relative = 1e-12);
            assert_relative_eq!(b.unregistered_stack.fwhm_arcsec[ax], all.sqrt(), max_relative = 1e-12);
        }
        // The motion lines (guiding residual, smear, wander) partition the motion's covariance.
        let motion =
            [BudgetTerm::GuidingResidual, BudgetTerm::VibrationSmear, BudgetTerm::WanderBetweenExposures];
        for k in 0..3 {
            let s: f64 =
                b.lines.iter().filter(|l| motion.contains(&l.term)).map(|l| l.covariance_arcsec2[k]).sum();
            assert_relative_eq!(s, im.covariance_arcsec2[k], max_relative = 1e-9);
        }
        // Diffraction of the 280 mm aperture at 550 nm: 1.029 λ/D (Airy; Born & Wolf).
        let d = b.line(BudgetTerm::Diffraction).unwrap();
        assert_relative_eq!(d.fwhm_arcsec[0], 1.029 * 550e-9 / 0.28 * 206_264.806, max_relative = 1e-3);
        // The blur per axis is 2.35482 σ of that axis, not of the radial RMS.
        assert_relative_eq!(
            im.blur_fwhm_arcsec[0],
            FWHM_PER_SIGMA * im.per_axis_arcsec[0],
            max_relative = 1e-12
        );
        assert_eq!(b.line(BudgetTerm::GuidingResidual).is_some(), im.guide.is_some());
    }
}

#[test]
fn guiding_leaves_high_modes_alone_and_returns_both_psds() {
    let open = run(&ImageOptions::default());
    let g = GuideLoop::new(2.0, 0.5);
    let guided = run(&ImageOptions::default().guiding_loop(g));
    let gm = guided.guiding.as_ref().unwrap();
    assert_eq!(gm.unguided_psd_arcsec2, open.psd_arcsec2);
    assert_relative_eq!(gm.unguided_rms_arcsec, open.rms_arcsec, max_relative = 1e-12);
    // The shorthand and the loop with defaults agree.
    let short = run(&ImageOptions::default().guiding(Guiding { cadence_s: 2.0, gain: 0.5 }));
    assert_eq!(short.psd_arcsec2, guided.psd_arcsec2);
    // Around the tripod's modes (above 5 Hz, ten times the guide rate; where the PSD is above 1 %
    // of its peak there) the open-loop level stays within 1 %: the guider's exposure averages
    // that motion away (the old discrete rejection |E(e^{i2πfT})|² swung between 0 and 1.78
    // there). Between the modes the hold's images of the large slow correction add a few per cent.
    let high = |k: usize| open.freq_hz[k] > 5.0;
    let peak =
        (0..open.freq_hz.len()).filter(|&k| high(k)).map(|k| open.psd_arcsec2[1][k]).fold(0.0, f64::max);
    for (k, f) in open.freq_hz.iter().enumerate() {
        if high(k) && open.psd_arcsec2[1][k] > 0.01 * peak {
            let r = guided.psd_arcsec2[1][k] / open.psd_arcsec2[1][k];
            assert!((r - 1.0).abs() < 0.01, "{f} Hz: guided/open {r}");
        }
    }
    let above = |p: &[f64]| {
        let (f, y): (Vec<f64>, Vec<f64>) =
            open.freq_hz.iter().zip(p).filter(|(f, _)| **f > 3.0).map(|(a, b)| (*a, *b)).unzip();
        stillsky::grid::trapezoid(&f, &y)
    };
    let r = above(&guided.psd_arcsec2[1]) / above(&open.psd_arcsec2[1]);
    assert!((r - 1.0).abs() < 0.01, "mean square above 3 Hz: guided/open {r}");
    // Shares still sum to 1 after guiding.
    assert_relative_eq!(guided.mode_share.iter().map(|m| m.share).sum::<f64>(), 1.0, max_relative = 1e-9);
    assert_relative_eq!(guided.input_share.iter().map(|m| m.1).sum::<f64>(), 1.0, max_relative = 1e-9);
}

#[test]
fn bad_guide_settings_are_refused() {
    let grid = FreqGrid::log(0.1, 50.0, 100).unwrap();
    let m = model();
    let both = ImageOptions::default()
        .guiding(Guiding { cadence_s: 1.0, gain: 0.5 })
        .guiding_loop(GuideLoop::new(1.0, 0.5));
    let e = m.image_motion(&grid, &wind(), &both).unwrap_err();
    assert!(matches!(&e, Error::InvalidArgument { name, .. } if name == "guide"), "{e}");
    let unstable = ImageOptions::default().guiding_loop(GuideLoop::new(1.0, 1.2).with_latency(1.0));
    let e = m.image_motion(&grid, &wind(), &unstable).unwrap_err();
    assert!(matches!(&e, Error::InvalidArgument { name, .. } if name == "guide.gain"), "{e}");
    let e = m
        .image_motion(&grid, &wind(), &ImageOptions::default().guiding(Guiding { cadence_s: 1.0, gain: 2.5 }))
        .unwrap_err();
    assert!(e.to_string().contains("unstable"), "{e}");
}

#[test]
fn peak_excursion_with_an_exposure() {
    assert!(run(&ImageOptions::default()).peak.is_none());
    let im = run(&ImageOptions::default().exposure(2.0));
    let p = im.peak.unwrap();
    for ax in 0..2 {
        // Davenport (1964): g(2νT) σ, ν = √(m₂/m₀); the tripod's modes sit at 5–20 Hz.
        assert!((5.0..25.0).contains(&p.crossing_rate_hz[ax]), "{:?}", p.crossing_rate_hz);
        let g = stillsky::peak::davenport_peak_factor(2.0 * p.crossing_rate_hz[ax] * 2.0).unwrap();
        assert_relative_eq!(p.peak_arcsec[ax], g * im.per_axis_arcsec[ax], max_relative = 1e-12);
        assert_relative_eq!(
            p.peak_px[ax],
            p.peak_arcsec[ax] / im.plate_scale_arcsec_per_px,
            max_relative = 1e-12
        );
    }
}
