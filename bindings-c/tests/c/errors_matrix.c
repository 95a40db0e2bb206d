/* The C column of docs/errors.md: one case per row id, ROW("id", ...) checking the status
 * code and that the last error names the culprit. Prints "row ID ok" per passing case; the
 * Rust driver (tests/c_api.rs) checks every C row of the document was printed. */
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "stillsky.h"

static int failures = 0;

/* Check a status and that the message contains `needle`; print the row id when both hold. */
static void ROW(const char *id, int32_t got, int32_t want, const char *needle) {
    char msg[1024];
    stillsky_last_error_message(msg, sizeof msg);
    if (got != want) {
        fprintf(stderr, "FAIL %s: got %s, want %s (%s)\n", id, stillsky_status_str(got), stillsky_status_str(want), msg);
        failures++;
        return;
    }
    if (want != STILLSKY_STATUS_OK && strstr(msg, needle) == NULL) {
        fprintf(stderr, "FAIL %s: message does not name '%s': %s\n", id, needle, msg);
        failures++;
        return;
    }
    printf("row %s ok  [%s] %s\n", id, stillsky_status_str(got), msg);
}

#define SDOF_HEAD "[[body]]\nname = \"mass\"\nmass_kg = 1\ncg_m = [0, 0, 1]\ninertia_kgm2 = [1, 1, 1]\ndofs = [\"z\"]\n"
#define SPRING(to, k) "[[spring]]\nname = \"support\"\nfrom = \"ground\"\nto = \"" to "\"\nat_m = [0, 0, 0]\ndirection = [0, 0, 1]\n" k "\n"
#define GOOD_K "stiffness_n_per_m = 4e5\nloss_factor = 0.05"
#define OPTICS(px) "[optics]\nbody = \"mass\"\nfocal_length_mm = 1000\npixel_um = " px "\naltitude_deg = 45\nazimuth_deg = 0\n"

int main(void) {
    stillsky_model *model = NULL, *m2 = NULL, *optic = NULL;
    if (stillsky_model_from_toml(SDOF_HEAD SPRING("mass", GOOD_K), &model) != 0) return 1;
    if (stillsky_model_from_toml(OPTICS("4") SDOF_HEAD SPRING("mass", GOOD_K), &optic) != 0) return 1;
    double f[3] = {0.5, 2.0, 3.0}, re[3], im[3];
    stillsky_image_motion out;

    /* file */
    ROW("file_missing", stillsky_model_from_file("/nonexistent/rig.toml", &m2), STILLSKY_STATUS_IO, "/nonexistent/rig.toml");
    {
        const char *p = "errors_matrix_latin1.toml";
        FILE *fp = fopen(p, "wb");
        if (!fp) return 1;
        fputs("title = \"caf\xe9\"\n", fp);
        fclose(fp);
        ROW("file_not_utf8", stillsky_model_from_file(p, &m2), STILLSKY_STATUS_IO, "UTF-8");
        remove(p);
    }

    /* model */
    ROW("model_syntax", stillsky_model_from_toml("[[body]\nname = 1\n", &m2), STILLSKY_STATUS_PARSE, "line 1");
    ROW("model_unknown_key", stillsky_model_from_toml(SDOF_HEAD SPRING("mass", GOOD_K) "stifness = 3\n", &m2),
        STILLSKY_STATUS_PARSE, "stifness");
    ROW("model_bad_value", stillsky_model_from_toml(SDOF_HEAD SPRING("mass", "stiffness_n_per_m = -5"), &m2),
        STILLSKY_STATUS_INVALID_ARGUMENT, "support");
    ROW("model_unknown_carrier", stillsky_model_from_toml(SDOF_HEAD SPRING("mas", GOOD_K), &m2),
        STILLSKY_STATUS_UNKNOWN_NAME, "mas");
    ROW("model_free_body",
        stillsky_model_from_toml("[[node]]\nname = \"floating\"\nmass_kg = 1\nat_m = [0, 0, 0]\ndofs = [\"z\"]\n", &m2),
        STILLSKY_STATUS_UNSUPPORTED_MODEL, "floating");
    {
        /* 334 free 6-DOF bodies = 2004 DOFs > 2000 (MAX_DOFS). */
        size_t cap = 334 * 128, len = 0;
        char *big = malloc(cap);
        if (!big) return 1;
        for (int i = 0; i < 334; i++)
            len += (size_t)snprintf(big + len, cap - len,
                                    "[[body]]\nname = \"b%d\"\nmass_kg = 1\ncg_m = [0, 0, %d]\ninertia_kgm2 = [1, 1, 1]\n", i, i);
        ROW("model_too_large", stillsky_model_from_toml(big, &m2), STILLSKY_STATUS_TOO_LARGE, "free DOFs = 2004 exceeds the limit of 2000");
        free(big);
    }
    if (m2 != NULL) failures++;

    /* grid */
    double unsorted[3] = {2.0, 1.0, 3.0}, nan_grid[2] = {1.0, NAN};
    ROW("grid_unsorted", stillsky_frf_evaluate(model, unsorted, 3, "ground_z", "mass:z", re, im, 3), STILLSKY_STATUS_INVALID_GRID, "strictly increasing");
    ROW("grid_not_finite", stillsky_frf_evaluate(model, nan_grid, 2, "ground_z", "mass:z", re, im, 3), STILLSKY_STATUS_INVALID_GRID, "not finite");
    ROW("grid_empty", stillsky_frf_evaluate(model, f, 0, "ground_z", "mass:z", re, im, 3), STILLSKY_STATUS_INVALID_GRID, "empty");
    {
        /* MAX_GRID_LEN + 1 = 4194305 points. */
        size_t n = ((size_t)1 << 22) + 1;
        double *g = malloc(n * sizeof *g), *p = malloc(n * sizeof *p);
        if (!g || !p) return 1;
        for (size_t i = 0; i < n; i++) {
            g[i] = (double)(i + 1);
            p[i] = 1e-6;
        }
        ROW("grid_too_long", stillsky_image_motion_compute(optic, g, n, NULL, NULL, p, 1.0, &out), STILLSKY_STATUS_TOO_LARGE,
            "4194305 exceeds the limit of 4194304");
        free(g);
        free(p);
    }
    ROW("name_unknown", stillsky_frf_evaluate(model, f, 3, "ground_w", "mass:z", re, im, 3), STILLSKY_STATUS_UNKNOWN_NAME, "ground_w");
    {
        char text[1024];
        const double w = 2.0 * 3.14159265358979323846;
        snprintf(text, sizeof text, SDOF_HEAD SPRING("mass", "stiffness_n_per_m = %.17g"), w * w);
        stillsky_model *und = NULL;
        if (stillsky_model_from_toml(text, &und) != 0) return 1;
        double one[1] = {1.0};
        ROW("singular", stillsky_frf_evaluate(und, one, 1, "ground_z", "mass:z", re, im, 1), STILLSKY_STATUS_SINGULAR, "1 Hz");
        stillsky_model_free(und);
    }

    /* PSD arrays (the C API takes PSDs as arrays on the caller's grid) */
    double neg[3] = {1e-6, -1e-6, 1e-6};
    ROW("psd_negative", stillsky_image_motion_compute(optic, f, 3, NULL, NULL, neg, 1.0, &out), STILLSKY_STATUS_INVALID_ARGUMENT, "acc_psd_z");

    /* samples: a non-finite sample into the streaming monitor */
    {
        stillsky_monitor_config cfg;
        stillsky_monitor_config_default(&cfg);
        double cf[2] = {0.5, 150.0};
        stillsky_complex g[4] = {{1e-6, 0}, {0, 0}, {1e-6, 0}, {0, 0}};
        stillsky_monitor *mon = NULL;
        if (stillsky_monitor_from_calibration(cf, 2, 1, g, 1.0, &cfg, &mon) != 0) return 1;
        double x[4] = {0.0, 1.0, NAN, 0.0};
        ROW("series_nan_sample", stillsky_monitor_push(mon, 0.0, x, 4, 1), STILLSKY_STATUS_INVALID_ARGUMENT, "sample 2 of channel 0 is NaN");
        ROW("length_mismatch", stillsky_monitor_push(mon, 1.0, x, 2, 2), STILLSKY_STATUS_SHAPE_MISMATCH, "expected 1");
        ROW("length_overflow", stillsky_monitor_push(mon, 1.0, x, SIZE_MAX, 2), STILLSKY_STATUS_TOO_LARGE, "overflows");
        stillsky_monitor_free(mon);
    }
    /* A pointer with a length no allocation can have (> PTRDIFF_MAX bytes) is refused before
     * it is read. */
    ROW("length_overflow", stillsky_frf_evaluate(model, f, SIZE_MAX / 4, "ground_z", "mass:z", re, im, SIZE_MAX / 4),
        STILLSKY_STATUS_TOO_LARGE, "too large");

    /* optics */
    ROW("optics_missing", stillsky_image_motion_compute(model, f, 3, NULL, NULL, f, 1.0, &out), STILLSKY_STATUS_INVALID_ARGUMENT, "optics");
    ROW("optics_bad_value", stillsky_model_from_toml(OPTICS("0") SDOF_HEAD SPRING("mass", GOOD_K), &m2),
        STILLSKY_STATUS_INVALID_ARGUMENT, "optics.pixel_um");

    /* an image track in px without a plate scale (NaN: none) */
    {
        double track[512];
        stillsky_ringdown_card_summary card;
        for (int i = 0; i < 512; i++) track[i] = exp(-i / 100.0) * sin(0.3 * i);
        ROW("track_px_no_plate_scale", stillsky_ringdown_card(track, 512, "px", 100.0, NAN, NAN, &card, NULL, 0),
            STILLSKY_STATUS_INVALID_ARGUMENT, "plate_scale_arcsec_per_px");
    }
    /* a sensor-response removal band reaching below the band where the response is valid
     * (a 4.5 Hz geophone, zeta 0.7, 28.8 V/(m/s): valid from about 1.2 Hz) */
    {
        double gf[3] = {0.5, 1.0, 2.0}, gp[3] = {1.0, 1.0, 1.0}, go[3];
        ROW("removal_band_outside", stillsky_geophone_remove_psd(4.5, 0.7, 28.8, gf, gp, 3, 0.5, 2.0, go),
            STILLSKY_STATUS_OUT_OF_RANGE, "band low end");
    }

    /* pointers and buffers */
    ROW("null_pointer", stillsky_frf_evaluate(model, NULL, 3, "ground_z", "mass:z", re, im, 3), STILLSKY_STATUS_NULL_POINTER, "freq_hz");
    ROW("null_pointer", stillsky_model_from_toml(NULL, &m2), STILLSKY_STATUS_NULL_POINTER, "text");
    ROW("buffer_too_small", stillsky_frf_evaluate(model, f, 3, "ground_z", "mass:z", re, im, 2), STILLSKY_STATUS_BUFFER_TOO_SMALL, "3 needed");
    {
        size_t n_modes = 0;
        ROW("buffer_too_small", stillsky_modes_compute(model, NULL, NULL, 0, &n_modes), STILLSKY_STATUS_BUFFER_TOO_SMALL, "1 modes");
        if (n_modes != 1) failures++;
    }
    ROW("not_utf8_text", stillsky_model_from_toml("title = \"caf\xe9\"\n", &m2), STILLSKY_STATUS_INVALID_ARGUMENT, "UTF-8");

    stillsky_model_free(model);
    stillsky_model_free(optic);
    printf("%s\n", failures ? "FAILED" : "ok");
    return failures ? 1 : 0;
}
