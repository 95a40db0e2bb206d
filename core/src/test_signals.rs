//! Random test signals with a prescribed PSD (tests only).

use num_complex::Complex64;
use rand::{Rng, SeedableRng};
use std::f64::consts::PI;

/// A periodic random signal of `n` samples at step `dt` whose one-sided PSD is `psd` on the DFT
/// bins k/(n·dt): random phases, exact amplitudes √(2 G Δf) (so its mean square is Σ G Δf).
pub(crate) fn synthesise(n: usize, dt: f64, psd: impl Fn(f64) -> f64, seed: u64) -> Vec<f64> {
    let mut rng = rand::rngs::StdRng::seed_from_u64(seed);
    let mut planner = realfft::RealFftPlanner::<f64>::new();
    let inv = planner.plan_fft_inverse(n);
    let mut spec = inv.make_input_vec();
    let df = 1.0 / (n as f64 * dt);
    for (k, s) in spec.iter_mut().enumerate() {
        if k == 0 || k == n / 2 {
            continue;
        }
        let a = (2.0 * psd(k as f64 * df) * df).sqrt();
        let ph: f64 = rng.random_range(0.0..2.0 * PI);
        // The unnormalised inverse real FFT sums X_k e^{i2πkn/N} over both halves: X_k = a/2.
        *s = Complex64::from_polar(0.5 * a, ph);
    }
    let mut x = inv.make_output_vec();
    inv.process(&mut spec, &mut x).unwrap();
    x
}

/// `n` samples of seeded Gaussian white noise with standard deviation `sigma`.
pub(crate) fn white_noise(n: usize, sigma: f64, seed: u64) -> Vec<f64> {
    use rand_distr::Distribution;
    let mut rng = rand::rngs::StdRng::seed_from_u64(seed);
    let d = rand_distr::Normal::new(0.0, sigma).expect("sigma is finite and >= 0");
    (0..n).map(|_| d.sample(&mut rng)).collect()
}

#[test]
fn synthesised_mean_square_is_the_psd_integral() {
    // Parseval: Σ a²/2 = Σ G Δf for a sum of cosines with random phases.
    let (n, dt) = (1 << 12, 0.01);
    let x = synthesise(n, dt, |f| if (5.0..10.0).contains(&f) { 2.0 } else { 0.0 }, 3);
    let ms = x.iter().map(|v| v * v).sum::<f64>() / n as f64;
    let df = 1.0 / (n as f64 * dt);
    let want: f64 =
        (1..n / 2).map(|k| k as f64 * df).filter(|f| (5.0..10.0).contains(f)).count() as f64 * 2.0 * df;
    approx::assert_relative_eq!(ms, want, max_relative = 1e-9);
}
