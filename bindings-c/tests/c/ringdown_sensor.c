/* The ring-down card and a geophone's response through the C API, checked against closed forms:
 *  - the card of a noise-free tap x(t) = A e^(-zeta wn t) sin(wd t), wd = wn sqrt(1 - zeta^2)
 *    (free decay of a viscously damped oscillator, docs/references.md#s13): f and zeta to 1e-6,
 *    the first excursion A e^(-sigma tp) sin(wd tp) at tan(wd tp) = wd/sigma (the derivative's
 *    zero) within the sampling's reach, px and arcsec through the plate scale, and the fitted
 *    settle time ln(envelope at the first excursion / threshold)/sigma;
 *  - a lightly damped, short record that never settles: the flag, NaN and the warning text;
 *  - the geophone response H(s) = G s^2/(s^2 + 2 zeta w0 s + w0^2), s = 2 pi i f, written out
 *    as -G w^2 / ((w0^2 - w^2) + i 2 zeta w0 w) (the standard moving-coil geophone, Wielandt,
 *    NMSOP ch. 5; docs/references.md#sensor-response), |H| = G/(2 zeta) at f0, |H| = 0.1 G at
 *    the start of the valid band;
 *  - removing it from a PSD: S_out / |H|^2 inside the band, 0 outside;
 *  - bad input: each status with its message. Prints "reached CODE" for the statuses reached. */
#include <math.h>
#include <stdbool.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "stillsky.h"
#include "checks.h"

static const double PI = 3.14159265358979323846;


/* A noise-free tap in px: rest before t_imp, then amp e^(-zeta wn t) sin(wd t). */
static void tap(double *x, size_t n, double fs, double f, double zeta, double amp, double t_imp) {
    double wn = 2 * PI * f, wd = wn * sqrt(1 - zeta * zeta);
    for (size_t i = 0; i < n; i++) {
        double t = (double)i / fs - t_imp;
        x[i] = t < 0 ? 0.0 : amp * exp(-zeta * wn * t) * sin(wd * t);
    }
}

static void card_checks(void) {
    enum { N = 5000 };
    static double x[N];
    const double fs = 250.0, f = 7.3, zeta = 0.03, amp = 4.0, t_imp = 0.3, plate = 0.8;
    tap(x, N, fs, f, zeta, amp, t_imp);
    stillsky_ringdown_card_summary c;
    char warn[256];
    check(stillsky_ringdown_card(x, N, "px", fs, plate, NAN, &c, warn, sizeof warn) == STILLSKY_STATUS_OK, "card px");
    close_to("card f (Hz)", c.frequency_hz, f, 1e-6);
    close_to("card zeta", c.damping_ratio, zeta, 1e-6);
    check(c.frequency_uncertainty_hz > 0 && c.frequency_uncertainty_hz < 0.01 * f, "f uncertainty small, > 0");
    check(c.damping_uncertainty > 0 && c.damping_uncertainty < 0.1 * zeta, "zeta uncertainty small, > 0");
    double wn = 2 * PI * f, sigma = zeta * wn, wd = wn * sqrt(1 - zeta * zeta);
    double tp = atan(wd / sigma) / wd;
    double peak_px = amp * exp(-sigma * tp) * sin(wd * tp);
    /* The card takes the largest sample, at most half a sample dt from the peak: below it by
     * at most 1 - e^(-sigma dt/2) cos(wd dt/2) (decay times phase; 6.9e-3 here). */
    double tol = 1 - exp(-sigma / fs / 2) * cos(wd / fs / 2);
    close_to("first excursion (px)", c.first_excursion_px, peak_px, tol);
    close_to("first excursion (arcsec)", c.first_excursion_arcsec, peak_px * plate, tol);
    check(c.first_excursion_px <= peak_px, "a sample is never above the peak");
    check(fabs(c.first_excursion_time_s - (t_imp + tp)) <= 0.5 / fs + 1e-12, "first excursion time within half a sample");
    close_to("threshold (px): default 1/2 px", c.threshold_px, 0.5, 1e-15);
    close_to("threshold (arcsec)", c.threshold_arcsec, 0.5 * plate, 1e-15);
    /* Envelope amp e^(-sigma (t - t_imp)) in px reaches 1/2 px at ln(2 amp e^(-sigma (t0 - t_imp)))/sigma after t0. */
    double t0 = c.first_excursion_time_s;
    close_to("settle time from the fit (s)", c.settle_time_fit_s, (log(amp / 0.5) - sigma * (t0 - t_imp)) / sigma, 1e-6);
    check(c.settled && fabs(c.settle_time_s - c.settle_time_fit_s) < 1.0 / f, "measured settle time within a period of the fit's");
    check(c.residual_rms_arcsec < 1e-8, "noise-free fit residual");
    check(c.warnings_len == strlen(warn) + 1 && c.n_warnings == 0, "no warnings");

    /* The same track in arcsec, no plate scale: the same f and zeta, no px. The threshold
     * default is then 10 % of the first excursion. */
    static double xa[N];
    for (int i = 0; i < N; i++) xa[i] = x[i] * plate;
    stillsky_ringdown_card_summary ca;
    check(stillsky_ringdown_card(xa, N, "arcsec", fs, NAN, NAN, &ca, NULL, 0) == STILLSKY_STATUS_OK, "card arcsec");
    close_to("arcsec track: f", ca.frequency_hz, c.frequency_hz, 1e-9);
    close_to("arcsec track: first excursion", ca.first_excursion_arcsec, c.first_excursion_arcsec, 1e-12);
    close_to("arcsec track: threshold 10 %", ca.threshold_arcsec, 0.1 * ca.first_excursion_arcsec, 1e-12);
    check(isnan(ca.first_excursion_px) && isnan(ca.threshold_px), "no plate scale: px are NaN");
    /* A threshold in px is read in px: 0.25 px. */
    check(stillsky_ringdown_card(x, N, "px", fs, plate, 0.25, &ca, NULL, 0) == STILLSKY_STATUS_OK, "card px 0.25");
    close_to("threshold given in px", ca.threshold_px, 0.25, 1e-15);

    /* Lightly damped and short: still outside 1/2 px at the end. */
    enum { M = 1024 };
    static double y[M];
    tap(y, M, fs, 5.0, 0.002, 20.0, 0.1);
    char small[8];
    stillsky_ringdown_card_summary cs;
    check(stillsky_ringdown_card(y, M, "px", fs, plate, NAN, &cs, small, sizeof small) == STILLSKY_STATUS_OK, "card short");
    check(!cs.settled && isnan(cs.settle_time_s), "never settles: flag off, NaN");
    check(cs.n_warnings >= 1 && cs.warnings_len > sizeof small, "a warning longer than the small buffer");
    check(strlen(small) == sizeof small - 1, "truncated warning text is NUL-terminated");
    char *full = malloc(cs.warnings_len);
    if (!full) exit(1);
    check(stillsky_ringdown_card(y, M, "px", fs, plate, NAN, &cs, full, cs.warnings_len) == STILLSKY_STATUS_OK, "card again");
    printf("warnings: %s\n", full);
    check(strstr(full, "still outside the threshold") != NULL && strlen(full) + 1 == cs.warnings_len, "warning text");
    free(full);

    /* Bad input. */
    expect(stillsky_ringdown_card(x, N, "px", fs, NAN, NAN, &c, NULL, 0), STILLSKY_STATUS_INVALID_ARGUMENT,
           "plate_scale_arcsec_per_px", "px without a plate scale");
    expect(stillsky_ringdown_card(x, N, "px", fs, -0.8, NAN, &c, NULL, 0), STILLSKY_STATUS_INVALID_ARGUMENT,
           "plate_scale_arcsec_per_px", "negative plate scale");
    expect(stillsky_ringdown_card(x, N, "mm", fs, plate, NAN, &c, NULL, 0), STILLSKY_STATUS_UNKNOWN_NAME, "arcsec, px",
           "unknown unit");
    expect(stillsky_ringdown_card(x, N, "px", 0.0, plate, NAN, &c, NULL, 0), STILLSKY_STATUS_INVALID_ARGUMENT, "fs_hz",
           "zero sample rate");
    expect(stillsky_ringdown_card(x, N, "px", fs, plate, -1.0, &c, NULL, 0), STILLSKY_STATUS_INVALID_ARGUMENT, "threshold",
           "negative threshold");
    expect(stillsky_ringdown_card(x, 10, "px", fs, plate, NAN, &c, NULL, 0), STILLSKY_STATUS_INVALID_ARGUMENT, "10",
           "too few samples");
    expect(stillsky_ringdown_card(NULL, N, "px", fs, plate, NAN, &c, NULL, 0), STILLSKY_STATUS_NULL_POINTER, "'x'", "NULL x");
    expect(stillsky_ringdown_card(x, N, NULL, fs, plate, NAN, &c, NULL, 0), STILLSKY_STATUS_NULL_POINTER, "unit", "NULL unit");
    expect(stillsky_ringdown_card(x, N, "px", fs, plate, NAN, NULL, NULL, 0), STILLSKY_STATUS_NULL_POINTER, "out", "NULL out");
    x[17] = NAN;
    expect(stillsky_ringdown_card(x, N, "px", fs, plate, NAN, &c, NULL, 0), STILLSKY_STATUS_INVALID_ARGUMENT, "17",
           "NaN sample");
}

/* Closed form of the geophone response (see the file's head). */
static void geophone_closed(double f, double f0, double zeta, double g, double *re, double *im) {
    double w = 2 * PI * f, w0 = 2 * PI * f0;
    double dr = w0 * w0 - w * w, di = 2 * zeta * w0 * w, d2 = dr * dr + di * di;
    *re = -g * w * w * dr / d2;
    *im = g * w * w * di / d2;
}

static void sensor_checks(void) {
    enum { N = 400 };
    const double f0 = 4.5, zeta = 0.7, g = 28.8;
    double f[N], psd_out[N], ground[N], back[N];
    stillsky_complex h[N];
    for (int i = 0; i < N; i++) f[i] = 0.05 * pow(500.0 / 0.05, i / (N - 1.0)); /* 0.05..500 Hz */
    double lo = NAN;
    check(stillsky_geophone_response(f0, zeta, g, f, N, h, &lo) == STILLSKY_STATUS_OK, "geophone response");
    double worst = 0;
    for (int i = 0; i < N; i++) {
        double re, im;
        geophone_closed(f[i], f0, zeta, g, &re, &im);
        worst = fmax(worst, hypot(h[i].re - re, h[i].im - im) / hypot(re, im));
    }
    printf("geophone response vs closed form: worst relative error %.2e over 0.05..500 Hz\n", worst);
    check(worst < 1e-12, "geophone response matches the closed form");
    stillsky_complex h0;
    double f0v = f0;
    check(stillsky_geophone_response(f0, zeta, g, &f0v, 1, &h0, NULL) == STILLSKY_STATUS_OK, "response at f0");
    close_to("|H(f0)| = G/(2 zeta)", hypot(h0.re, h0.im), g / (2 * zeta), 1e-12);
    close_to("phase at f0 = +90 deg", atan2(h0.im, h0.re), PI / 2, 1e-12);
    double re, im;
    geophone_closed(lo, f0, zeta, g, &re, &im);
    close_to("|H| at the valid band's start = 0.1 G", hypot(re, im), 0.1 * g, 1e-9);
    check(lo > 1.0 && lo < 2.0, "valid band starts between 1 and 2 Hz");

    /* A ground velocity PSD (invented: 1e-14 (m/s)^2/Hz times (1 + f/10)) through |H|^2, and back. */
    for (int i = 0; i < N; i++) {
        geophone_closed(f[i], f0, zeta, g, &re, &im);
        ground[i] = 1e-14 * (1 + f[i] / 10);
        psd_out[i] = ground[i] * (re * re + im * im);
    }
    check(stillsky_geophone_remove_psd(f0, zeta, g, f, psd_out, N, 2.0, 80.0, back) == STILLSKY_STATUS_OK, "remove psd");
    double werr = 0;
    int outside_zero = 1;
    for (int i = 0; i < N; i++) {
        if (f[i] >= 2.0 && f[i] <= 80.0) werr = fmax(werr, fabs(back[i] - ground[i]) / ground[i]);
        else outside_zero &= back[i] == 0.0;
    }
    printf("PSD removal inside 2..80 Hz: worst relative error %.2e\n", werr);
    check(werr < 1e-12 && outside_zero, "PSD removal recovers the ground inside the band, 0 outside");
    check(stillsky_geophone_remove_psd(f0, zeta, g, f, psd_out, N, NAN, NAN, back) == STILLSKY_STATUS_OK, "default band");
    int ok = 1;
    for (int i = 0; i < N; i++) ok &= (f[i] < lo) == (back[i] == 0.0);
    check(ok, "default band: the whole valid band, nothing below it");
    check(stillsky_geophone_remove_psd(f0, zeta, g, f, psd_out, N, 3.0, INFINITY, back) == STILLSKY_STATUS_OK, "open band");
    close_to("open band, top bin", back[N - 1], ground[N - 1], 1e-12);

    /* Bad input. */
    expect(stillsky_geophone_remove_psd(f0, zeta, g, f, psd_out, N, 0.5, 80.0, back), STILLSKY_STATUS_OUT_OF_RANGE,
           "band low end", "band below the valid band");
    expect(stillsky_geophone_remove_psd(f0, zeta, g, f, psd_out, N, 80.0, 2.0, back), STILLSKY_STATUS_INVALID_ARGUMENT,
           "band", "band low > high");
    expect(stillsky_geophone_remove_psd(f0, zeta, g, f, psd_out, N, 2.0, NAN, back), STILLSKY_STATUS_INVALID_ARGUMENT,
           "band", "band high NaN");
    double unsorted[3] = {1.0, 3.0, 2.0}, p3[3] = {1, 1, 1}, o3[3];
    expect(stillsky_geophone_remove_psd(f0, zeta, g, unsorted, p3, 3, NAN, NAN, o3), STILLSKY_STATUS_INVALID_GRID,
           "freq_hz", "unsorted grid");
    double fs3[3] = {2.0, 3.0, 4.0}, neg[3] = {1, -1, 1};
    expect(stillsky_geophone_remove_psd(f0, zeta, g, fs3, neg, 3, NAN, NAN, o3), STILLSKY_STATUS_INVALID_ARGUMENT,
           "index 1", "negative PSD");
    expect(stillsky_geophone_remove_psd(f0, zeta, g, fs3, p3, 3, NAN, NAN, NULL), STILLSKY_STATUS_NULL_POINTER, "out",
           "NULL out");
    expect(stillsky_geophone_remove_psd(f0, 1.2, g, fs3, p3, 3, NAN, NAN, o3), STILLSKY_STATUS_INVALID_ARGUMENT,
           "damping", "overdamped coil");
    expect(stillsky_geophone_response(-4.5, zeta, g, fs3, 3, h, NULL), STILLSKY_STATUS_INVALID_ARGUMENT, "natural_hz",
           "negative natural frequency");
    expect(stillsky_geophone_response(f0, zeta, 0.0, fs3, 3, h, NULL), STILLSKY_STATUS_INVALID_ARGUMENT,
           "generator_v_per_m_s", "zero generator constant");
    double fnan[2] = {1.0, NAN};
    expect(stillsky_geophone_response(f0, zeta, g, fnan, 2, h, NULL), STILLSKY_STATUS_INVALID_ARGUMENT, "index 1",
           "NaN frequency");
    expect(stillsky_geophone_response(f0, zeta, g, NULL, 2, h, NULL), STILLSKY_STATUS_NULL_POINTER, "freq_hz",
           "NULL freq_hz");
}

int main(void) {
    card_checks();
    sensor_checks();
    printf("%s\n", failures ? "FAILED" : "ok");
    return failures ? 1 : 0;
}
