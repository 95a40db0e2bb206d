//! Ring-down identification on synthetic free decays.
//!
//! Source for every physics check here: docs/references.md#s13 (free decay of a viscously damped
//! SDOF, x = A e^{−ζω_n t} sin(ω_d t), ω_d = ω_n √(1 − ζ²); logarithmic decrement and
//! half-power relations), and for several modes the superposition of such decays (a linear
//! system's free response is a sum of its modes' decays, docs/references.md#s13's SDOF form per mode).
//! Tolerances: f within 0.5 %, ζ within 10 % (the acceptance of the issue; noise sets them).

use rand::SeedableRng;
use rand::rngs::StdRng;
use rand_distr::{Distribution, Normal};
use std::f64::consts::PI;
use stillsky::Error;
use stillsky::identify::{
    CompareOptions, EstimateSource, RingdownOptions, SettleThreshold, compare_ringdowns, identify_ringdown,
};

/// Σ_i A_i e^{−ζ_i ω_i t} sin(ω_d,i t) + white Gaussian noise. SNR (dB) is
/// 10 log10((A₀²/2)/σ²): the first mode's initial power over the noise power.
fn ringdown(modes: &[(f64, f64, f64)], fs: f64, duration_s: f64, snr_db: Option<f64>, seed: u64) -> Vec<f64> {
    let n = (duration_s * fs).round() as usize;
    let mut x: Vec<f64> = (0..n)
        .map(|i| {
            let t = i as f64 / fs;
            modes
                .iter()
                .map(|&(f, z, a)| {
                    let wn = 2.0 * PI * f;
                    let wd = wn * (1.0 - z * z).sqrt();
                    a * (-z * wn * t).exp() * (wd * t).sin()
                })
                .sum()
        })
        .collect();
    if let Some(snr) = snr_db {
        let a0 = modes[0].2;
        let sigma = (a0 * a0 / 2.0 / 10f64.powf(snr / 10.0)).sqrt();
        let mut rng = StdRng::seed_from_u64(seed);
        let normal = Normal::new(0.0, sigma).unwrap();
        for v in &mut x {
            *v += normal.sample(&mut rng);
        }
    }
    x
}

/// Record long enough for the decay to reach e^{−6} (0.25 %), plus a little noise tail.
fn duration_for(f: f64, z: f64) -> f64 {
    7.0 / (z * 2.0 * PI * f)
}

#[test]
fn single_mode_grid_frequency_and_damping() {
    // docs/references.md#s13: x = e^{−ζω_n t} sin(ω_d t); f within 0.5 %, best ζ within 10 %.
    let mut seed = 1;
    let mut worst_f: f64 = 0.0;
    let mut worst_z: f64 = 0.0;
    for &f in &[3.0, 7.3, 15.0, 40.0] {
        for &z in &[0.005, 0.01, 0.02, 0.05] {
            for &snr in &[20.0, 30.0, 40.0] {
                seed += 1;
                let fs = 1000.0;
                let x = ringdown(&[(f, z, 2.5)], fs, duration_for(f, z), Some(snr), seed);
                let r = identify_ringdown(&x, fs, &RingdownOptions::default()).unwrap();
                let d = r.dominant;
                let ef = (r.frequency_hz[d] - f).abs() / f;
                let ez = (r.damping_ratio[d] - z).abs() / z;
                eprintln!(
                    "f {f:5.1} z {z:.3} snr {snr:.0}: f {:.4} ({:.2e}) z {:.5} ({:.3}) ld {:?} env {:?} hp {:?} src {:?} pencil {:?}",
                    r.frequency_hz[d],
                    ef,
                    r.damping_ratio[d],
                    ez,
                    r.methods.log_decrement,
                    r.methods.envelope_fit,
                    r.methods.half_power,
                    r.dominant_source,
                    r.pencil
                        .iter()
                        .map(|m| (m.frequency_hz, m.damping_ratio, m.amplitude))
                        .collect::<Vec<_>>()
                );
                eprintln!(
                    "   fspec {:?} fphase {:?}",
                    r.methods.spectral_frequency_hz, r.methods.phase_frequency_hz
                );
                eprintln!(
                    "   order {} sv {:?} warn {:?}",
                    r.model_order,
                    &r.pencil_singular_values[..r.pencil_singular_values.len().min(6)],
                    r.warnings
                );
                worst_f = worst_f.max(ef);
                worst_z = worst_z.max(ez);
                assert!(ef < 0.005, "f {f} z {z} snr {snr}: f error {ef}");
                assert!(ez < 0.10, "f {f} z {z} snr {snr}: zeta error {ez}");
                assert!(!r.clipped && !r.close_modes);
                assert_eq!(r.dominant_source, EstimateSource::SingleMode);
                // All three methods ran on these clean decays.
                assert!(r.methods.log_decrement.is_some() && r.methods.envelope_fit.is_some());
                assert!(r.methods.half_power.is_some());
            }
        }
    }
    eprintln!("worst relative errors: f {worst_f:.2e}, zeta {worst_z:.3}");
}

#[test]
fn two_close_modes_separated_by_matrix_pencil() {
    // Two superposed free decays (docs/references.md#s13 per mode): 10 Hz ζ 0.01 and 11 Hz ζ 0.02,
    // equal amplitudes. f within 0.5 %, ζ within 10 % from the matrix pencil (Hua & Sarkar 1990).
    for (seed, snr) in [(11, 30.0), (12, 40.0), (13, 25.0)] {
        let modes = [(10.0, 0.01, 1.0), (11.0, 0.02, 1.0)];
        let fs = 1000.0;
        let x = ringdown(&modes, fs, duration_for(10.0, 0.01), Some(snr), seed);
        let r = identify_ringdown(&x, fs, &RingdownOptions::default()).unwrap();
        eprintln!(
            "snr {snr}: f {:?} z {:?} a {:?} order {} sv {:?} methods {:?} warn {:?}",
            r.frequency_hz,
            r.damping_ratio,
            r.amplitude,
            r.model_order,
            &r.pencil_singular_values[..6],
            r.methods,
            r.warnings
        );
        assert!(r.close_modes);
        assert_eq!(r.dominant_source, EstimateSource::MatrixPencil);
        assert_eq!(r.frequency_hz.len(), 2, "{:?}", r.frequency_hz);
        for (i, &(f, z, a)) in modes.iter().enumerate() {
            assert!((r.frequency_hz[i] - f).abs() / f < 0.005, "mode {i}: f {}", r.frequency_hz[i]);
            assert!((r.damping_ratio[i] - z).abs() / z < 0.10, "mode {i}: zeta {}", r.damping_ratio[i]);
            assert!((r.amplitude[i] - a).abs() / a < 0.10, "mode {i}: amplitude {}", r.amplitude[i]);
        }
        // The single-mode log decrement gives one ζ for the beating pair: it cannot report the
        // 11 Hz mode (its value is far from 0.02), and it is at least 3× further from the 10 Hz
        // mode's ζ than the pencil is.
        let ld = r.methods.log_decrement.unwrap();
        assert!((ld - 0.02).abs() / 0.02 > 0.25, "{ld}");
        assert!(
            (ld - 0.01).abs() > 3.0 * (r.damping_ratio[0] - 0.01).abs(),
            "{ld} vs {}",
            r.damping_ratio[0]
        );
    }
}

#[test]
fn bad_inputs_give_named_errors() {
    let fs = 1000.0;
    let opts = RingdownOptions::default();
    // Too short: fewer than 64 samples.
    let e = identify_ringdown(&[0.1; 50], fs, &opts).unwrap_err();
    assert!(
        matches!(&e, Error::InvalidArgument { name, reason } if name == "x" && reason.contains("too short")),
        "{e}"
    );
    // Too short: 200 samples of a 5 Hz decay at 1 kHz is one cycle (< 3).
    let x = ringdown(&[(5.0, 0.01, 1.0)], fs, 0.2, None, 0);
    let e = identify_ringdown(&x, fs, &opts.clone()).unwrap_err();
    assert!(e.to_string().contains("too short") || e.to_string().contains("no dominant"), "{e}");
    // NaN: the index is named.
    let mut x = ringdown(&[(20.0, 0.01, 1.0)], fs, 2.0, Some(30.0), 3);
    x[777] = f64::NAN;
    let e = identify_ringdown(&x, fs, &opts).unwrap_err();
    assert!(e.to_string().contains("sample 777"), "{e}");
    // No dominant peak: white noise.
    let x = ringdown(&[(20.0, 0.01, 0.0)], fs, 4.0, None, 0);
    let mut rng = StdRng::seed_from_u64(5);
    let normal = Normal::new(0.0, 1.0).unwrap();
    let noise: Vec<f64> = x.iter().map(|_| normal.sample(&mut rng)).collect();
    let e = identify_ringdown(&noise, fs, &opts).unwrap_err();
    assert!(e.to_string().contains("no dominant spectral peak"), "{e}");
    // Bad sampling rate and options are named.
    let x = ringdown(&[(20.0, 0.01, 1.0)], fs, 2.0, Some(30.0), 3);
    assert!(identify_ringdown(&x, -1.0, &opts).unwrap_err().to_string().contains("fs_hz"));
    let mut o = opts.clone();
    o.band_half_width = 0.0;
    assert!(identify_ringdown(&x, fs, &o).unwrap_err().to_string().contains("band_half_width"));
}

#[test]
fn clipping_is_flagged_and_heavy_clipping_is_an_error() {
    // A decay (docs/references.md#s13 form) recorded by a sensor that saturates at ±0.8 of the
    // first peak: a few cycles clip. Flagged, with the fits starting after the last clipped
    // sample; the damping is still found within 10 %.
    let fs = 1000.0;
    let x = ringdown(&[(12.0, 0.01, 1.0)], fs, duration_for(12.0, 0.01), Some(40.0), 21);
    let clip = |v: f64, c: f64| v.clamp(-c, c);
    let light: Vec<f64> = x.iter().map(|&v| clip(v, 0.8)).collect();
    let r = identify_ringdown(&light, fs, &RingdownOptions::default()).unwrap();
    assert!(r.clipped && r.clipping.runs > 0 && r.clipping.fraction < 0.05, "{:?}", r.clipping);
    assert!(r.warnings.iter().any(|w| w.contains("clipped")));
    let d = r.dominant;
    assert!((r.frequency_hz[d] - 12.0).abs() / 12.0 < 0.005);
    assert!((r.damping_ratio[d] - 0.01).abs() / 0.01 < 0.10, "{}", r.damping_ratio[d]);
    // Clipped at 5 % of the peak: most samples sit at the rails → error.
    let heavy: Vec<f64> = x.iter().map(|&v| clip(v, 0.05)).collect();
    let e = identify_ringdown(&heavy, fs, &RingdownOptions::default()).unwrap_err();
    assert!(e.to_string().contains("clipped"), "{e}");
    // An unclipped record is not flagged.
    let r = identify_ringdown(&x, fs, &RingdownOptions::default()).unwrap();
    assert!(!r.clipped);
}

#[test]
fn before_after_comparison() {
    // Two decays of the docs/references.md#s13 form, 8 Hz: without pads ζ = 0.005, with pads
    // ζ = 0.03 and a 40 % smaller amplitude. Hand calculation (docs/references.md#s13,
    // x = A e^{−σt} sin(ω_d t), σ = ζω_n): the first peak is at t* = atan(ω_d/σ)/ω_d with value
    // A e^{−σt*} ω_d/ω_n; the envelope A e^{−σt} falls to 1/e of that value 1/σ + ln(ω_n/ω_d)/σ
    // after t*, and to a level c at t = ln(A/c)/σ.
    let fs = 500.0;
    let a = ringdown(&[(8.0, 0.005, 1.0)], fs, 20.0, Some(60.0), 31);
    let b = ringdown(&[(8.0, 0.03, 0.6)], fs, 20.0, Some(60.0), 32);
    let c = compare_ringdowns(&a, &b, fs, &CompareOptions::default()).unwrap();
    let hand = |z: f64, amp: f64| {
        let wn = 2.0 * PI * 8.0;
        let wd = wn * (1.0 - z * z).sqrt();
        let sigma = z * wn;
        let t_star = (wd / sigma).atan() / wd;
        let first = amp * (-sigma * t_star).exp() * wd / wn;
        let decay = 1.0 / sigma + (wn / wd).ln() / sigma;
        let settle = (amp / (0.1 * first)).ln() / sigma - t_star;
        (first, decay, settle, sigma)
    };
    let (fa, da, sa, sig_a) = hand(0.005, 1.0);
    let (fb, db, sb, _) = hand(0.03, 0.6);
    eprintln!("{c:?}\nhand: {fa} {da} {sa} / {fb} {db} {sb}");
    // Tolerances: the first excursion is sampled (2 ms steps: < 0.2 % at 8 Hz) and noisy
    // (60 dB); times within half a period (peaks of |x| are 1/(2 f_d) apart) + 1 %.
    let tol = |t: f64| 0.0625 + 0.01 * t;
    assert!((c.before.first_excursion - fa).abs() / fa < 0.005);
    assert!((c.excursion_ratio - fb / fa).abs() < 0.005);
    assert!((c.before.decay_time_s.unwrap() - da).abs() < tol(da), "{:?} vs {da}", c.before.decay_time_s);
    assert!((c.after.decay_time_s.unwrap() - db).abs() < tol(db), "{:?} vs {db}", c.after.decay_time_s);
    assert!((c.before.settle_time_s.unwrap() - sa).abs() < tol(sa), "{:?} vs {sa}", c.before.settle_time_s);
    assert!((c.after.settle_time_s.unwrap() - sb).abs() < tol(sb), "{:?} vs {sb}", c.after.settle_time_s);
    assert!((c.settle_time_ratio.unwrap() - sb / sa).abs() < 0.02);
    assert!((c.after.damping_ratio.unwrap() - 0.03).abs() / 0.03 < 0.1);
    assert!((c.before.damping_ratio.unwrap() - 0.005).abs() / 0.005 < 0.1);
    // Absolute threshold 0.01 units: ln(1/0.01)/σ − t* (noise-free records: near the threshold
    // noise peaks would lengthen the settle time).
    let mut o = CompareOptions::default();
    o.settle = SettleThreshold::Absolute(0.01);
    let a0 = ringdown(&[(8.0, 0.005, 1.0)], fs, 25.0, None, 0);
    let c = compare_ringdowns(&a0, &b, fs, &o).unwrap();
    let t = 100f64.ln() / sig_a - (c.before.first_excursion_time_s);
    assert!((c.before.settle_time_s.unwrap() - t).abs() < tol(t), "{:?} vs {t}", c.before.settle_time_s);
    // A record still ringing at its end has no settle or decay time.
    let short = &a[..1000];
    let c = compare_ringdowns(short, &b, fs, &CompareOptions::default()).unwrap();
    assert!(c.before.settle_time_s.is_none() && c.settle_time_ratio.is_none());
    assert!(c.before.decay_time_s.is_none());
    // Errors name the record.
    let e = compare_ringdowns(&a, &b[..10], fs, &CompareOptions::default()).unwrap_err();
    assert!(e.to_string().contains("after"), "{e}");
}
