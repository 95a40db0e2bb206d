/* Every error path of the C API that C can reach: each call must return its code, leave a
 * message naming the function, and never crash. Prints "reached CODE" for each code seen. */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "stillsky.h"

static int failures = 0;

static void expect(int32_t got, int32_t want, const char *func, const char *what) {
    char msg[1024];
    stillsky_last_error_message(msg, sizeof msg);
    if (got != want) {
        fprintf(stderr, "FAIL %s: got %s, want %s (last error: %s)\n", what, stillsky_status_str(got),
                stillsky_status_str(want), msg);
        failures++;
        return;
    }
    if (want != STILLSKY_STATUS_OK && strstr(msg, func) == NULL) {
        fprintf(stderr, "FAIL %s: message does not name %s: %s\n", what, func, msg);
        failures++;
        return;
    }
    printf("reached %s  [%s] %s\n", stillsky_status_str(got), what, want ? msg : "");
}

static const char SDOF[] =
    "[[body]]\nname = \"mass\"\nmass_kg = 1\ncg_m = [0, 0, 1]\ninertia_kgm2 = [1, 1, 1]\ndofs = [\"z\"]\n"
    "[[spring]]\nname = \"s\"\nfrom = \"ground\"\nto = \"mass\"\nat_m = [0, 0, 0]\ndirection = [0, 0, 1]\n"
    "stiffness_n_per_m = %.17g\n";

int main(void) {
    stillsky_model *model = NULL, *m2 = NULL;
    char text[1024];
    /* k = (2 pi)^2 N/m on 1 kg, undamped: Z(omega) = k - omega^2 m is exactly 0 at 1 Hz. */
    const double w = 2.0 * 3.14159265358979323846 * 1.0;
    snprintf(text, sizeof text, SDOF, w * w);
    expect(stillsky_model_from_toml(text, &model), STILLSKY_STATUS_OK, "", "valid model");
    if (!model) return 1;

    /* model creation */
    expect(stillsky_model_from_toml(NULL, &m2), STILLSKY_STATUS_NULL_POINTER, "stillsky_model_from_toml", "NULL text");
    expect(stillsky_model_from_toml(text, NULL), STILLSKY_STATUS_NULL_POINTER, "stillsky_model_from_toml", "NULL out");
    expect(stillsky_model_from_toml("[[body]\nname = 1\n", &m2), STILLSKY_STATUS_PARSE, "model text", "TOML syntax");
    if (m2 != NULL) failures++;
    expect(stillsky_model_from_toml("[[body]]\nname = \"free\"\nmass_kg = 1\ncg_m = [0, 0, 0]\n"
                                    "inertia_kgm2 = [1, 1, 1]\ndofs = [\"z\"]\n", &m2),
           STILLSKY_STATUS_UNSUPPORTED_MODEL, "'free'", "free body");
    expect(stillsky_model_from_toml("\xff\xfe", &m2), STILLSKY_STATUS_INVALID_ARGUMENT, "UTF-8", "non-UTF-8 text");
    expect(stillsky_model_from_file("/nonexistent/dir/rig.toml", &m2), STILLSKY_STATUS_IO, "rig.toml", "missing file");
    expect(stillsky_model_from_file(NULL, &m2), STILLSKY_STATUS_NULL_POINTER, "stillsky_model_from_file", "NULL path");
    size_t n = 0;
    expect(stillsky_model_dof_count(NULL, &n), STILLSKY_STATUS_NULL_POINTER, "stillsky_model_dof_count", "NULL model");
    expect(stillsky_model_dof_count(model, NULL), STILLSKY_STATUS_NULL_POINTER, "stillsky_model_dof_count", "NULL out");

    /* FRF */
    double f[3] = {0.5, 2.0, 3.0}, bad[3] = {2.0, 1.0, 3.0}, re[3], im[3];
    stillsky_complex z[3];
    const char *F = "stillsky_frf_evaluate";
    expect(stillsky_frf_evaluate(model, bad, 3, "ground_z", "mass:z", re, im, 3), STILLSKY_STATUS_INVALID_GRID, F, "unsorted grid");
    expect(stillsky_frf_evaluate(model, f, 0, "ground_z", "mass:z", re, im, 3), STILLSKY_STATUS_INVALID_GRID, "empty", "empty grid");
    expect(stillsky_frf_evaluate(model, NULL, 3, "ground_z", "mass:z", re, im, 3), STILLSKY_STATUS_NULL_POINTER, "freq_hz", "NULL grid");
    expect(stillsky_frf_evaluate(model, f, 3, "ground_w", "mass:z", re, im, 3), STILLSKY_STATUS_UNKNOWN_NAME, "ground_w", "unknown input");
    expect(stillsky_frf_evaluate(model, f, 3, "ground_z", NULL, re, im, 3), STILLSKY_STATUS_NULL_POINTER, "output", "NULL output");
    expect(stillsky_frf_evaluate(model, f, 3, "ground_z", "mass:z", NULL, im, 3), STILLSKY_STATUS_NULL_POINTER, "out_re", "NULL out_re");
    expect(stillsky_frf_evaluate(model, f, 3, "ground_z", "mass:z", re, NULL, 3), STILLSKY_STATUS_NULL_POINTER, "out_im", "NULL out_im");
    expect(stillsky_frf_evaluate(model, f, 3, "ground_z", "mass:z", re, im, 2), STILLSKY_STATUS_BUFFER_TOO_SMALL, "3 needed", "short buffer");
    double one[1] = {1.0};
    expect(stillsky_frf_evaluate(model, one, 1, "ground_z", "mass:z", re, im, 1), STILLSKY_STATUS_SINGULAR, "1 Hz", "undamped resonance");
    expect(stillsky_frf_evaluate_interleaved(model, f, 3, "ground_z", "image_x", z, 3), STILLSKY_STATUS_INVALID_ARGUMENT, "optics", "no optics");
    expect(stillsky_frf_evaluate_interleaved(model, f, 3, "ground_z", "mass:z", NULL, 3), STILLSKY_STATUS_NULL_POINTER, "out", "NULL out");

    /* modes */
    double fm[1], zm[1];
    expect(stillsky_modes_compute(model, fm, zm, 1, NULL), STILLSKY_STATUS_NULL_POINTER, "n_modes", "NULL n_modes");
    expect(stillsky_modes_compute(model, NULL, zm, 1, &n), STILLSKY_STATUS_NULL_POINTER, "frequency_hz", "NULL frequencies");
    expect(stillsky_modes_compute(model, NULL, NULL, 0, &n), STILLSKY_STATUS_BUFFER_TOO_SMALL, "1 modes", "capacity 0");
    if (n != 1) failures++;

    /* image motion */
    stillsky_image_motion im_out;
    double psd[3] = {1e-6, 1e-6, 1e-6};
    const char *I = "stillsky_image_motion_compute";
    expect(stillsky_image_motion_compute(model, f, 3, NULL, NULL, psd, 1.0, &im_out), STILLSKY_STATUS_INVALID_ARGUMENT, "optics", "no optics");
    expect(stillsky_image_motion_compute(NULL, f, 3, NULL, NULL, psd, 1.0, &im_out), STILLSKY_STATUS_NULL_POINTER, I, "NULL model");
    expect(stillsky_image_motion_compute(model, f, 3, NULL, NULL, psd, 1.0, NULL), STILLSKY_STATUS_NULL_POINTER, I, "NULL out");

    /* monitor configuration and creation */
    stillsky_monitor_config cfg;
    stillsky_monitor *mon = NULL;
    expect(stillsky_monitor_config_default(NULL), STILLSKY_STATUS_NULL_POINTER, "stillsky_monitor_config_default", "NULL config");
    expect(stillsky_monitor_config_default(&cfg), STILLSKY_STATUS_OK, "", "default config");
    double cf[2] = {0.5, 150.0};
    stillsky_complex g[4] = {{1e-6, 0}, {0, 0}, {1e-6, 0}, {0, 0}};
    const char *C = "stillsky_monitor_from_calibration";
    expect(stillsky_monitor_from_model(model, "z", &cfg, &mon), STILLSKY_STATUS_INVALID_ARGUMENT, "optics", "model without optics");
    expect(stillsky_monitor_from_model(model, "z", NULL, &mon), STILLSKY_STATUS_NULL_POINTER, "config", "NULL config");
    expect(stillsky_monitor_from_calibration(cf, 2, 1, g, 1.0, &cfg, NULL), STILLSKY_STATUS_NULL_POINTER, C, "NULL out");
    expect(stillsky_monitor_from_calibration(cf, 2, 1, NULL, 1.0, &cfg, &mon), STILLSKY_STATUS_NULL_POINTER, "frf", "NULL calibration");
    expect(stillsky_monitor_from_calibration(cf, 2, 1, g, -1.0, &cfg, &mon), STILLSKY_STATUS_INVALID_ARGUMENT, "plate_scale", "negative plate scale");
    cfg.hysteresis = 1.5;
    expect(stillsky_monitor_from_calibration(cf, 2, 1, g, 1.0, &cfg, &mon), STILLSKY_STATUS_OUT_OF_RANGE, "hysteresis", "hysteresis 1.5");
    stillsky_monitor_config_default(&cfg);
    cfg.fir_taps = (size_t)1 << 20;
    expect(stillsky_monitor_from_calibration(cf, 2, 1, g, 1.0, &cfg, &mon), STILLSKY_STATUS_TOO_LARGE, "fir_taps", "huge FIR");
    stillsky_monitor_config_default(&cfg);
    cfg.sample_rate_hz = NAN;
    expect(stillsky_monitor_from_calibration(cf, 2, 1, g, 1.0, &cfg, &mon), STILLSKY_STATUS_INVALID_ARGUMENT, "sample_rate_hz", "NaN rate");
    stillsky_monitor_config_default(&cfg);
    double cbad[2] = {150.0, 0.5};
    expect(stillsky_monitor_from_calibration(cbad, 2, 1, g, 1.0, &cfg, &mon), STILLSKY_STATUS_INVALID_GRID, "calibration", "unsorted calibration");
    expect(stillsky_monitor_from_calibration(cf, 2, 1, g, 1.0, &cfg, &mon), STILLSKY_STATUS_OK, "", "valid calibration");
    if (!mon) return 1;

    /* monitor use */
    double x[4] = {0, 0, 0, 0};
    stillsky_monitor_reading rd;
    stillsky_exposure_quality q;
    const char *P = "stillsky_monitor_push";
    expect(stillsky_monitor_push(mon, 0.0, x, 2, 2), STILLSKY_STATUS_SHAPE_MISMATCH, P, "2 channels into 1");
    expect(stillsky_monitor_push(mon, 0.0, x, 0, 1), STILLSKY_STATUS_INVALID_ARGUMENT, "empty", "empty block");
    expect(stillsky_monitor_push(mon, 0.0, NULL, 4, 1), STILLSKY_STATUS_NULL_POINTER, "samples", "NULL samples");
    expect(stillsky_monitor_push(NULL, 0.0, x, 4, 1), STILLSKY_STATUS_NULL_POINTER, P, "NULL monitor");
    expect(stillsky_monitor_push(mon, NAN, x, 4, 1), STILLSKY_STATUS_INVALID_ARGUMENT, "t0_s", "NaN time");
    expect(stillsky_monitor_push(mon, 0.0, x, 4, 1), STILLSKY_STATUS_OK, "", "first block");
    expect(stillsky_monitor_push(mon, 0.0, x, 4, 1), STILLSKY_STATUS_INVALID_ARGUMENT, "back", "time going back");
    x[2] = INFINITY;
    expect(stillsky_monitor_push(mon, 4.0 / 200.0, x, 4, 1), STILLSKY_STATUS_INVALID_ARGUMENT, "inf", "infinite sample");
    expect(stillsky_monitor_tick(mon, NAN, &rd), STILLSKY_STATUS_INVALID_ARGUMENT, "now_s", "NaN now");
    expect(stillsky_monitor_tick(mon, 1.0, NULL), STILLSKY_STATUS_NULL_POINTER, "out", "NULL reading");
    expect(stillsky_monitor_tick(mon, 1.0, &rd), STILLSKY_STATUS_OK, "", "tick");
    if (rd.state != STILLSKY_MONITOR_STATE_UNSAFE || rd.reason != STILLSKY_UNSAFE_REASON_BAD_SAMPLE || !isnan(rd.rms_arcsec)) {
        fprintf(stderr, "FAIL: after a bad sample the state is %d (reason %d)\n", (int)rd.state, (int)rd.reason);
        failures++;
    }
    expect(stillsky_monitor_exposure_end(mon, 1.0, &q), STILLSKY_STATUS_INVALID_ARGUMENT, "no exposure", "end without begin");
    expect(stillsky_monitor_exposure_begin(mon, 1.0), STILLSKY_STATUS_OK, "", "begin");
    expect(stillsky_monitor_exposure_begin(mon, 1.0), STILLSKY_STATUS_INVALID_ARGUMENT, "already open", "begin twice");
    expect(stillsky_monitor_exposure_end(mon, 0.5, &q), STILLSKY_STATUS_INVALID_ARGUMENT, "before", "end before begin");
    expect(stillsky_monitor_exposure_end(mon, 2.0, NULL), STILLSKY_STATUS_NULL_POINTER, "out", "NULL quality");
    expect(stillsky_monitor_exposure_end(mon, 2.0, &q), STILLSKY_STATUS_OK, "", "end");
    if (!(q.coverage == 0.0 && isnan(q.rms_arcsec))) failures++;
    expect(stillsky_monitor_reset(NULL), STILLSKY_STATUS_NULL_POINTER, "stillsky_monitor_reset", "NULL reset");
    expect(stillsky_monitor_info_get(mon, NULL), STILLSKY_STATUS_NULL_POINTER, "out", "NULL info");
    stillsky_monitor_free(mon);
    stillsky_monitor_free(NULL);

    /* last error: query, truncation with NUL, status names */
    stillsky_model_dof_count(NULL, &n);
    size_t need = stillsky_last_error_message(NULL, 0);
    char small[8];
    memset(small, 'X', sizeof small);
    size_t got = stillsky_last_error_message(small, sizeof small);
    if (got != need || need < 9 || small[7] != '\0' || strlen(small) != 7) {
        fprintf(stderr, "FAIL: truncation: need %zu got %zu\n", need, got);
        failures++;
    }
    if (strcmp(stillsky_status_str(STILLSKY_STATUS_OK), "STILLSKY_STATUS_OK") != 0 ||
        strcmp(stillsky_status_str(STILLSKY_STATUS_NOT_POSITIVE_DEFINITE), "STILLSKY_STATUS_NOT_POSITIVE_DEFINITE") != 0 ||
        strcmp(stillsky_status_str(9999), "STILLSKY_STATUS_UNKNOWN") != 0 ||
        strcmp(stillsky_status_str(-1), "STILLSKY_STATUS_UNKNOWN") != 0 || strlen(stillsky_version()) < 5) {
        fprintf(stderr, "FAIL: status names or version\n");
        failures++;
    }

    stillsky_model_free(model);
    printf("%s\n", failures ? "FAILED" : "ok");
    return failures ? 1 : 0;
}
