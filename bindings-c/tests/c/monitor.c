/* The streaming monitor on synthetic accelerometer streams:
 *  1. a stationary multisine of known PSD: the windowed RMS agrees with the offline
 *     image-motion RMS for the same PSD within 5 %, from the model and from a calibration;
 *     an exposure over one period gives the same number;
 *  2. a 20 Hz vibration switched on and off: the flag rises and falls in the predicted blocks;
 *  3. NaN, stopped and gapped data read as UNSAFE.
 * Prints "reached CODE" for status codes it checks and "rel_err NAME VALUE" lines.
 * `monitor --quick` (used for the valgrind run) runs every call path but pushes only a few
 * hundred samples through the stationary-stream monitors and skips the 5 % checks there. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "stillsky.h"
#include "checks.h"
#include "monitor_rig.h"

static const double PI = 3.14159265358979323846;
static int quick = 0;



static uint64_t rng = 0x2545F4914F6CDD1DULL; /* xorshift64, fixed seed */
static double uniform(void) {
    rng ^= rng << 13;
    rng ^= rng >> 7;
    rng ^= rng << 17;
    return (double)(rng >> 11) / 9007199254740992.0;
}

#define FS 200.0
/* Multisine: line spacing DF over one period of 1/DF = 20 s; x on even lines, y on odd lines
 * (so the channels share no frequency and their cross terms vanish over a period). */
#define DF 0.05
#define PERIOD 4000
#define K_LO 60  /* 3 Hz */
#define K_HI 800 /* 40 Hz */
#define S_ACC 1e-5 /* (m/s^2)^2/Hz per axis, invented */

static double period_buf[PERIOD * 2];

static void make_multisine(void) {
    memset(period_buf, 0, sizeof period_buf);
    /* Each axis has a line every 2 DF; amplitude A with A^2/2 = S * 2 DF gives PSD S. */
    const double a = sqrt(2.0 * S_ACC * 2.0 * DF);
    for (int k = K_LO; k <= K_HI; k++) {
        int ch = k % 2;
        double ph = 2.0 * PI * uniform();
        for (int i = 0; i < PERIOD; i++)
            period_buf[2 * i + ch] += a * cos(2.0 * PI * k * DF * i / FS + ph);
    }
}

static stillsky_monitor *new_monitor(const stillsky_model *model, const char *axes, stillsky_monitor_config *cfg) {
    stillsky_monitor *m = NULL;
    int32_t st = stillsky_monitor_from_model(model, axes, cfg, &m);
    check(st == STILLSKY_STATUS_OK && m != NULL, "monitor from model");
    return m;
}

/* Push `n` samples of the periodic multisine starting at sample index `i0`, in blocks of at
 * most 50. */
static void push_multisine(stillsky_monitor *m, long i0, long n) {
    double blk[100];
    for (long s = 0; s < n; s += 50) {
        long nb = n - s < 50 ? n - s : 50;
        for (int j = 0; j < nb; j++) {
            long i = (i0 + s + j) % PERIOD;
            blk[2 * j] = period_buf[2 * i];
            blk[2 * j + 1] = period_buf[2 * i + 1];
        }
        int32_t st = stillsky_monitor_push(m, (double)(i0 + s) / FS, blk, (size_t)nb, 2);
        if (st != STILLSKY_STATUS_OK) {
            check(0, "push multisine");
            return;
        }
    }
}

static void rel(const char *name, double got, double want, double tol) {
    double e = fabs(got / want - 1.0);
    printf("rel_err %s %.5f (monitor %.6g, reference %.6g)\n", name, e, got, want);
    check(e < tol, name);
}

static void stationary(const stillsky_model *model) {
    /* Offline image motion for PSD S_ACC on 3..40 Hz in both x and y (trapezoid, 0.01 Hz). */
    enum { NG = 3701 };
    static double f[NG], s[NG];
    for (int i = 0; i < NG; i++) {
        f[i] = 3.0 + 0.01 * i;
        s[i] = S_ACC;
    }
    stillsky_image_motion ref;
    check(stillsky_image_motion_compute(model, f, NG, s, s, NULL, 1.0, &ref) == STILLSKY_STATUS_OK, "image motion");
    printf("offline: rms x %.4g y %.4g radial %.4g arcsec, %.4g px, P(>1 px) %.4g\n", ref.rms_x_arcsec,
           ref.rms_y_arcsec, ref.rms_radial_arcsec, ref.rms_radial_px, ref.p_outside);
    /* Rayleigh law with the isotropic sigma (docs/references.md#s11). */
    check(fabs(ref.p_outside - exp(-1.0 / (2.0 * ref.sigma_iso_px * ref.sigma_iso_px))) < 1e-12, "p_outside");
    check(fabs(ref.sigma_iso_px - ref.rms_radial_px / sqrt(2.0)) < 1e-12 * ref.rms_radial_px, "sigma_iso");
    /* plate scale 206.264806 * 3.76 / 1000 = 0.77556 arcsec/px (docs/references.md#s11) */
    check(fabs(ref.rms_radial_arcsec / ref.rms_radial_px - 0.775556) < 1e-5, "plate scale");

    stillsky_monitor_config cfg;
    stillsky_monitor_config_default(&cfg);
    cfg.sample_rate_hz = FS;
    cfg.window_s = PERIOD / FS; /* one whole period of the multisine */
    cfg.threshold_arcsec = 1e3;
    cfg.highpass_hz = 1.0;
    cfg.fir_taps = 1024;
    stillsky_monitor *m = new_monitor(model, "xy", &cfg);
    if (!m) return;
    stillsky_monitor_info info;
    check(stillsky_monitor_info_get(m, &info) == STILLSKY_STATUS_OK && info.window_samples == PERIOD &&
              info.warmup_samples == 1024 + PERIOD && fabs(info.latency_s - 128 / FS) < 1e-12,
          "monitor info");

    /* Warm up (5024 samples) plus margin, then an exposure of exactly one period. */
    const long warm = quick ? 200 : 6000, t_begin = warm, t_end = warm + (quick ? 200 : PERIOD);
    push_multisine(m, 0, warm);
    check(stillsky_monitor_exposure_begin(m, t_begin / FS) == STILLSKY_STATUS_OK, "exposure begin");
    long lat = (long)(info.latency_s * FS);
    /* Data up to t_end + latency: the samples attributed to [t_begin, t_end) are one period. */
    push_multisine(m, warm, (t_end - t_begin) + lat);
    long last = warm + (t_end - t_begin) + lat - 1;
    stillsky_monitor_reading rd;
    check(stillsky_monitor_tick(m, last / FS, &rd) == STILLSKY_STATUS_OK, "tick");
    stillsky_exposure_quality q;
    if (quick) {
        check(rd.state == STILLSKY_MONITOR_STATE_UNSAFE, "unsafe while warming up");
        check(stillsky_monitor_exposure_end(m, t_end / FS, &q) == STILLSKY_STATUS_OK, "exposure end");
    }
    check(rd.state == (quick ? STILLSKY_MONITOR_STATE_UNSAFE : STILLSKY_MONITOR_STATE_QUIET), "quiet under a high threshold");
    if (quick) goto calibration;
    rel("monitor_x_vs_offline", rd.rms_x_arcsec, ref.rms_x_arcsec, 0.05);
    rel("monitor_y_vs_offline", rd.rms_y_arcsec, ref.rms_y_arcsec, 0.05);
    rel("monitor_radial_vs_offline", rd.rms_arcsec, ref.rms_radial_arcsec, 0.05);
    rel("monitor_px_vs_offline", rd.rms_px, ref.rms_radial_px, 0.05);
    check(stillsky_monitor_exposure_end(m, t_end / FS, &q) == STILLSKY_STATUS_OK, "exposure end");
    printf("exposure: %.2f s rms %.5g arcsec coverage %.4f above %.2f\n", q.duration_s, q.rms_arcsec, q.coverage,
           q.above_fraction);
    check(q.coverage > 0.999 && q.above_fraction == 0.0, "exposure coverage");
    /* The exposure covers exactly the samples in the window at the tick: the same RMS. */
    rel("exposure_vs_window", q.rms_arcsec, rd.rms_arcsec, 1e-9);

calibration:;
    /* The same from a measured calibration: the model's H/(-w^2) on 0.5..99.5 Hz. */
    enum { NC = 1991 };
    static double fc[NC];
    static stillsky_complex hx[NC], hy[NC], hxy[NC], hyy[NC], g[NC * 4];
    for (int i = 0; i < NC; i++) fc[i] = 0.5 + 0.05 * i;
    check(stillsky_frf_evaluate_interleaved(model, fc, NC, "ground_x", "image_x", hx, NC) == 0 &&
              stillsky_frf_evaluate_interleaved(model, fc, NC, "ground_y", "image_x", hy, NC) == 0 &&
              stillsky_frf_evaluate_interleaved(model, fc, NC, "ground_x", "image_y", hxy, NC) == 0 &&
              stillsky_frf_evaluate_interleaved(model, fc, NC, "ground_y", "image_y", hyy, NC) == 0,
          "calibration FRFs");
    for (int i = 0; i < NC; i++) {
        double w2 = pow(2.0 * PI * fc[i], 2);
        stillsky_complex *row = &g[i * 4]; /* [image_x: ch x, ch y][image_y: ch x, ch y] */
        row[0] = (stillsky_complex){-hx[i].re / w2, -hx[i].im / w2};
        row[1] = (stillsky_complex){-hy[i].re / w2, -hy[i].im / w2};
        row[2] = (stillsky_complex){-hxy[i].re / w2, -hxy[i].im / w2};
        row[3] = (stillsky_complex){-hyy[i].re / w2, -hyy[i].im / w2};
    }
    stillsky_monitor *mc = NULL;
    check(stillsky_monitor_from_calibration(fc, NC, 2, g, info.plate_scale_arcsec_per_px, &cfg, &mc) == 0, "calibration monitor");
    if (mc) {
        push_multisine(mc, 0, warm);
        stillsky_monitor_reading rc;
        check(stillsky_monitor_tick(mc, (warm - 1) / FS, &rc) == 0, "tick calibration");
        stillsky_monitor_reading rm;
        stillsky_monitor_reset(m);
        push_multisine(m, 0, warm);
        check(stillsky_monitor_tick(m, (warm - 1) / FS, &rm) == 0, "tick model");
        if (!quick) {
            rel("calibration_vs_model_monitor", rc.rms_arcsec, rm.rms_arcsec, 0.01);
            rel("calibration_monitor_vs_offline", rc.rms_arcsec, ref.rms_radial_arcsec, 0.05);
        }
        stillsky_monitor_free(mc);
    }
    stillsky_monitor_free(m);
}

static void switching(const stillsky_model *model) {
    /* Predicted radial RMS of a 20 Hz ground-x sine of amplitude a: a |G|/sqrt(2) with
     * G = H/(-w^2) the accelerometer-to-image FRF (RMS of a sinusoid = amplitude/sqrt 2). */
    double f20[1] = {20.0}, hre[1], him[1], gx2 = 0.0;
    const char *outs[2] = {"image_x", "image_y"};
    for (int o = 0; o < 2; o++) {
        check(stillsky_frf_evaluate(model, f20, 1, "ground_x", outs[o], hre, him, 1) == 0, "frf 20 Hz");
        gx2 += (hre[0] * hre[0] + him[0] * him[0]) / pow(2.0 * PI * 20.0, 4);
    }
    const double thr = 0.5, hyst = 0.2, window = 2.0;
    const double rms_per_amp = sqrt(gx2 / 2.0) * 206264.80624709636;
    const double amp = 2.0 * thr / rms_per_amp; /* on-level RMS = 2 x threshold */

    stillsky_monitor_config cfg;
    stillsky_monitor_config_default(&cfg);
    cfg.sample_rate_hz = FS;
    cfg.window_s = window;
    cfg.threshold_arcsec = thr;
    cfg.hysteresis = hyst;
    cfg.hold_off_s = 1.0;
    cfg.max_age_s = 0.5;
    cfg.highpass_hz = 2.0;
    cfg.fir_taps = 512;
    stillsky_monitor *m = new_monitor(model, "xy", &cfg);
    if (!m) return;
    stillsky_monitor_info info;
    stillsky_monitor_info_get(m, &info);

    /* 0.1 s blocks: quiet to 8 s, 20 Hz on from 8 s to 14 s, quiet to 24 s. */
    const double t_on = 8.0, t_off = 14.0;
    int first_above = -1, last_above = -1, chatter = 0, warm_quiet = 0;
    double blk[40];
    for (int b = 0; b < 240; b++) {
        for (int j = 0; j < 20; j++) {
            double t = (b * 20 + j) / FS;
            blk[2 * j] = (t >= t_on && t < t_off) ? amp * sin(2.0 * PI * 20.0 * (t - t_on)) : 0.0;
            blk[2 * j + 1] = 0.0;
        }
        check(stillsky_monitor_push(m, b * 20 / FS, blk, 20, 2) == 0, "push");
        stillsky_monitor_reading rd;
        stillsky_monitor_tick(m, (b * 20 + 19) / FS, &rd);
        int n_done = (b + 1) * 20;
        if (n_done < (int)info.warmup_samples) {
            if (rd.state != STILLSKY_MONITOR_STATE_UNSAFE || rd.reason != STILLSKY_UNSAFE_REASON_WARMING_UP) chatter++;
        } else if (rd.state == STILLSKY_MONITOR_STATE_ABOVE) {
            if (first_above < 0) first_above = b;
            else if (last_above != b - 1) chatter++;
            last_above = b;
        } else if (rd.state == STILLSKY_MONITOR_STATE_QUIET) {
            if (first_above < 0) warm_quiet++;
        } else {
            chatter++;
        }
    }
    /* Rise: the windowed mean square ramps linearly after the onset (delayed by the latency)
     * and crosses thr^2 after (thr/rms_on)^2 = 1/4 of the window. Fall: it ramps down after the
     * end and crosses (thr(1-h))^2 when 1 - 0.16 = 0.84 of the window has passed. */
    double t_rise = t_on + info.latency_s + window * 0.25;
    double t_fall = t_off + info.latency_s + window * (1.0 - pow(thr * (1.0 - hyst) / (2.0 * thr), 2));
    int b_rise = (int)floor(t_rise * 10.0), b_fall = (int)floor(t_fall * 10.0);
    printf("flag: on in block %d (predicted %d), last on in block %d (predicted off in %d)\n", first_above, b_rise,
           last_above, b_fall);
    check(abs(first_above - b_rise) <= 2, "flag rises in the predicted block");
    check(abs(last_above + 1 - b_fall) <= 2, "flag falls in the predicted block");
    check(chatter == 0 && warm_quiet > 0, "no chatter; quiet before the onset");

    /* NaN -> UNSAFE (BAD_SAMPLE), refill -> QUIET, silence -> STALE, jump -> GAP. */
    double t = 240 * 20 / FS;
    blk[6] = NAN;
    int32_t st = stillsky_monitor_push(m, t, blk, 20, 2);
    check(st == STILLSKY_STATUS_INVALID_ARGUMENT, "NaN sample refused");
    printf("reached %s [NaN sample]\n", stillsky_status_str(st));
    stillsky_monitor_reading rd;
    stillsky_monitor_tick(m, t + 0.1, &rd);
    check(rd.state == STILLSKY_MONITOR_STATE_UNSAFE && rd.reason == STILLSKY_UNSAFE_REASON_BAD_SAMPLE, "UNSAFE after NaN");
    memset(blk, 0, sizeof blk);
    int nb = (int)(info.warmup_samples / 20) + 1;
    for (int b = 1; b <= nb; b++) check(stillsky_monitor_push(m, t + b * 0.1, blk, 20, 2) == 0, "refill");
    t += nb * 0.1;
    stillsky_monitor_tick(m, t + 0.1, &rd);
    check(rd.state == STILLSKY_MONITOR_STATE_QUIET, "QUIET after refill");
    stillsky_monitor_tick(m, t + 0.1 + 0.6, &rd);
    check(rd.state == STILLSKY_MONITOR_STATE_UNSAFE && rd.reason == STILLSKY_UNSAFE_REASON_STALE && rd.age_s > 0.5,
          "UNSAFE when the sensor stops");
    check(stillsky_monitor_push(m, t + 0.1, blk, 20, 2) == 0, "resume");
    stillsky_monitor_tick(m, t + 0.2, &rd);
    check(rd.state == STILLSKY_MONITOR_STATE_QUIET, "fresh again after resuming without a gap");
    check(stillsky_monitor_push(m, t + 5.0, blk, 20, 2) == 0, "push after gap");
    stillsky_monitor_tick(m, t + 5.1, &rd);
    check(rd.state == STILLSKY_MONITOR_STATE_UNSAFE && rd.reason == STILLSKY_UNSAFE_REASON_GAP, "UNSAFE after a gap");
    stillsky_monitor_free(m);
}

int main(int argc, char **argv) {
    quick = argc > 1 && strcmp(argv[1], "--quick") == 0;
    stillsky_model *model = NULL;
    if (stillsky_model_from_toml(MODEL, &model) != STILLSKY_STATUS_OK) {
        check(0, "model");
        return 1;
    }
    make_multisine();
    stationary(model);
    switching(model);
    stillsky_model_free(model);
    printf("%s\n", failures ? "FAILED" : "ok");
    return failures ? 1 : 0;
}
