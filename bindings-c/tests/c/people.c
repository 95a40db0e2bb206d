/* People and machines near the rig through the C API, checked against hand formulas:
 *  - the footfall force lines: (h f_p, alpha_h W) with the fixed factors 0.5, 0.2, 0.1, 0.05
 *    (Murray, Allen & Ungar 1997, docs/references.md#s21) and the pace-dependent ones (Young
 *    2001, same section); the force history W[1 + sum alpha_h cos(2 pi h f_p t)] inside a pass;
 *  - the standing tilt of a rigid deck on four springs: theta = W d / k_rock, k_rock = 4 k
 *    (statics of a rigid body on springs);
 *  - steady footfall and a walking pass far below the deck's rocking mode: the quasi-static
 *    value (W d / k_rock) sqrt(sum alpha_h^2 / 2), and the pass's RMS within 2 % of the steady one;
 *  - tonal lines: a force line far below resonance gives F d / k_rock; a ground velocity line
 *    is converted to displacement by 1/(2 pi f); shares add to 1;
 *  - the Bornitz ratio (r1/r2)^n exp(-pi f eta (r2 - r1)/c) (docs/references.md#s22);
 *  - bad input: each status with its message. Prints "reached CODE" for the statuses reached. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "stillsky.h"
#include "checks.h"

static const double PI = 3.14159265358979323846;
static const double ARCSEC = 206264.80624709636;
static const double G = 9.80665;

/* A rigid 200 kg deck on four vertical springs k = 1e6 N/m at (+-1, +-1) m (k_rock = 4k about
 * both horizontal axes) with a stiff stand carrying the optics at zenith (invented test rig;
 * the same as core/src/people.rs's test fixture). */
static const char MODEL[] =
    "[[body]]\nname = \"deck\"\nmass_kg = 200\ncg_m = [0, 0, 0.1]\ninertia_kgm2 = [60, 60, 120]\n"
    "dofs = [\"z\", \"rx\", \"ry\"]\n"
    "[[body]]\nname = \"scope\"\nmass_kg = 20\ncg_m = [0, 0, 1.0]\ninertia_kgm2 = [2, 2, 1]\n"
    "dofs = [\"x\", \"y\", \"z\", \"rx\", \"ry\", \"rz\"]\n"
    "[optics]\nbody = \"scope\"\nfocal_length_mm = 1000\npixel_um = 3.76\naltitude_deg = 90\nazimuth_deg = 0\n"
    "[[spring]]\nname = \"post0\"\nfrom = \"ground\"\nto = \"deck\"\nat_m = [1, 1, 0.1]\ndirection = [0, 0, 1]\n"
    "stiffness_n_per_m = 1e6\ndamping_ns_per_m = 2000\n"
    "[[spring]]\nname = \"post1\"\nfrom = \"ground\"\nto = \"deck\"\nat_m = [1, -1, 0.1]\ndirection = [0, 0, 1]\n"
    "stiffness_n_per_m = 1e6\ndamping_ns_per_m = 2000\n"
    "[[spring]]\nname = \"post2\"\nfrom = \"ground\"\nto = \"deck\"\nat_m = [-1, 1, 0.1]\ndirection = [0, 0, 1]\n"
    "stiffness_n_per_m = 1e6\ndamping_ns_per_m = 2000\n"
    "[[spring]]\nname = \"post3\"\nfrom = \"ground\"\nto = \"deck\"\nat_m = [-1, -1, 0.1]\ndirection = [0, 0, 1]\n"
    "stiffness_n_per_m = 1e6\ndamping_ns_per_m = 2000\n"
    "[[spring]]\nname = \"sx\"\nfrom = \"deck\"\nto = \"scope\"\nat_m = [0, 0, 0.5]\ndirection = [1, 0, 0]\n"
    "stiffness_n_per_m = 1e7\ndamping_ns_per_m = 2000\n"
    "[[torsion_spring]]\nname = \"tsx\"\nfrom = \"deck\"\nto = \"scope\"\naxis = [1, 0, 0]\n"
    "stiffness_nm_per_rad = 2e6\ndamping_nms_per_rad = 200\n"
    "[[spring]]\nname = \"sy\"\nfrom = \"deck\"\nto = \"scope\"\nat_m = [0, 0, 0.5]\ndirection = [0, 1, 0]\n"
    "stiffness_n_per_m = 1e7\ndamping_ns_per_m = 2000\n"
    "[[torsion_spring]]\nname = \"tsy\"\nfrom = \"deck\"\nto = \"scope\"\naxis = [0, 1, 0]\n"
    "stiffness_nm_per_rad = 2e6\ndamping_nms_per_rad = 200\n"
    "[[spring]]\nname = \"sz\"\nfrom = \"deck\"\nto = \"scope\"\nat_m = [0, 0, 0.5]\ndirection = [0, 0, 1]\n"
    "stiffness_n_per_m = 1e7\ndamping_ns_per_m = 2000\n"
    "[[torsion_spring]]\nname = \"tsz\"\nfrom = \"deck\"\nto = \"scope\"\naxis = [0, 0, 1]\n"
    "stiffness_nm_per_rad = 2e6\ndamping_nms_per_rad = 200\n";


int main(void) {
    stillsky_model *model = NULL;
    if (stillsky_model_from_toml(MODEL, &model) != STILLSKY_STATUS_OK) {
        check(0, "model");
        return 1;
    }
    const double k = 1e6, k_rock = 4.0 * k, w = 75.0 * G, plate = ARCSEC * 3.76 / 1e6;

    /* Force lines. */
    double f[4], a[4];
    const double fixed[4] = {0.5, 0.2, 0.1, 0.05};
    check(stillsky_footfall_harmonics(75.0, 2.0, "fixed", f, a) == STILLSKY_STATUS_OK, "harmonics fixed");
    for (int h = 0; h < 4; h++) {
        check(f[h] == 2.0 * (h + 1), "harmonic frequency");
        close_to("fixed line force (N)", a[h], fixed[h] * w, 1e-12);
    }
    const double p = 1.9, young[4] = {0.41 * (p - 0.95), 0.069 + 0.0056 * 2 * p, 0.033 + 0.0064 * 3 * p,
                                      0.013 + 0.0065 * 4 * p};
    check(stillsky_footfall_harmonics(80.0, p, "pace", f, a) == STILLSKY_STATUS_OK, "harmonics pace");
    for (int h = 0; h < 4; h++) close_to("pace line force (N)", a[h], young[h] * 80.0 * G, 1e-12);

    /* Force history inside the pass (after the one-step fade-in): the harmonic series. */
    enum { NF = 2000 };
    static double force[NF];
    const double fs = 200.0, start = 0.5;
    check(stillsky_footfall_force(75.0, 2.0, "fixed", fs, start, 5.0, force, NF) == STILLSKY_STATUS_OK, "force");
    check(force[0] == 0.0 && force[NF - 1] == 0.0, "no force outside the pass");
    double worst = 0.0;
    for (int i = (int)((start + 0.5) * fs); i < (int)((start + 4.5) * fs); i++) {
        double s = i / fs - start, v = 1.0;
        for (int h = 0; h < 4; h++) v += fixed[h] * cos(2.0 * PI * (h + 1) * 2.0 * s);
        worst = fmax(worst, fabs(force[i] - w * v) / w);
    }
    printf("force history vs harmonic series: max rel %.2e\n", worst);
    check(worst < 1e-12, "force history");

    /* Standing tilt: theta = W d / k_rock along an azimuth and at the worst azimuth. */
    const double d[4] = {0.0, 0.5, 1.0, 2.0};
    stillsky_standing_row rows[4];
    for (int pass = 0; pass < 2; pass++) {
        check(stillsky_standing_tilt(model, "deck", 75.0, d, 4, pass ? NAN : 30.0, rows, 4) == STILLSKY_STATUS_OK,
              "standing tilt");
        for (int i = 1; i < 4; i++) {
            double hand = w * d[i] / k_rock * ARCSEC;
            close_to("standing image (arcsec) vs W d / k_rock", rows[i].image_arcsec, hand, 1e-6);
            close_to("deck tilt (arcsec)", rows[i].deck_tilt_arcsec, hand, 1e-6);
            close_to("image px", rows[i].image_px, rows[i].image_arcsec / plate, 1e-9);
        }
        check(rows[0].image_arcsec < 1e-9, "no tilt at the axis");
        if (!pass) check(rows[2].azimuth_deg == 30.0, "azimuth kept");
    }

    /* Steady footfall and a walking pass at 1.5 m, far below the rocking mode. */
    double lines[4], steady = 0.0;
    check(stillsky_footfall_steady(model, "deck", 1.5, 0.0, 75.0, 2.0, "fixed", lines, &steady) == 0, "steady");
    double qs = w * 1.5 / k_rock * ARCSEC * sqrt((0.25 + 0.04 + 0.01 + 0.0025) / 2.0);
    printf("steady footfall %.6g arcsec, quasi-static %.6g\n", steady, qs);
    check(steady > qs && steady < 1.05 * qs, "steady near the quasi-static value");
    double sum = 0.0;
    for (int h = 0; h < 4; h++) sum += lines[h] * lines[h];
    close_to("steady total = sqrt(sum of lines^2)", steady, sqrt(sum), 1e-12);
    stillsky_walking_pass_summary ps;
    check(stillsky_walking_pass(model, "deck", 1.5, 0.0, 75.0, 2.0, "fixed", 10.0, 1000.0, &ps) == 0, "pass");
    close_to("pass RMS vs steady", ps.rms_arcsec, steady, 0.02);
    double peak_qs = 1.85 * w * 1.5 / k_rock * ARCSEC;
    check(ps.peak_arcsec > 0.99 * peak_qs && ps.peak_arcsec < 2.0 * peak_qs, "peak at least the in-phase tilt");
    check(ps.point_m[0] == 1.5 && ps.point_m[1] == 0.0 && fabs(ps.point_m[2] - 0.1) < 1e-15, "tread point");

    /* Tonal lines: 100 N RMS at 1 Hz at 1.5 m, and a ground velocity line. */
    const char *tones[2] = {"1:force:deck:z@1.5,0,0.1:100:N", "24:ground_z:2e-6:m_s"};
    stillsky_tone_line_image ti[2];
    double total = 0.0;
    check(stillsky_tone_image(model, tones, 2, ti, 2, &total) == STILLSKY_STATUS_OK, "tone image");
    close_to("force line vs F d / k_rock", ti[0].rms_arcsec, 100.0 * 1.5 / k_rock * ARCSEC, 0.01);
    close_to("velocity line's displacement (m)", ti[1].input_amplitude_rms, 2e-6 / (2.0 * PI * 24.0), 1e-12);
    close_to("shares add to 1", ti[0].share + ti[1].share, 1.0, 1e-12);
    close_to("total", total, hypot(ti[0].rms_arcsec, ti[1].rms_arcsec), 1e-12);
    close_to("line px", ti[0].rms_px, ti[0].rms_arcsec / plate, 1e-9);

    /* Bornitz ratio against its formula. */
    const double fr[3] = {0.0, 10.0, 50.0};
    double ratio[3];
    check(stillsky_ground_distance_ratio(fr, 3, 5.0, 20.0, "surface", 0.1, 200.0, ratio) == 0, "ratio");
    for (int i = 0; i < 3; i++)
        close_to("Bornitz ratio", ratio[i], pow(5.0 / 20.0, 0.5) * exp(-PI * fr[i] * 0.1 * 15.0 / 200.0), 1e-12);
    check(stillsky_ground_distance_ratio(fr, 3, 5.0, 20.0, "body-at-surface", 0.0, 200.0, ratio) == 0, "ratio n=2");
    close_to("body waves at the surface, no damping", ratio[2], 1.0 / 16.0, 1e-12);

    /* Bad input. */
    expect(stillsky_footfall_harmonics(75.0, 3.5, "fixed", f, a), STILLSKY_STATUS_INVALID_ARGUMENT, "pace_hz",
           "pace out of range");
    expect(stillsky_footfall_harmonics(75.0, 2.0, "run", f, a), STILLSKY_STATUS_UNKNOWN_NAME, "run",
           "unknown footfall model");
    expect(stillsky_footfall_harmonics(75.0, 2.0, "fixed", NULL, a), STILLSKY_STATUS_NULL_POINTER, "freq_hz",
           "NULL output");
    expect(stillsky_footfall_harmonics(-1.0, 2.0, "fixed", f, a), STILLSKY_STATUS_INVALID_ARGUMENT, "mass_kg",
           "negative mass");
    expect(stillsky_standing_tilt(model, "porch", 75.0, d, 4, NAN, rows, 4), STILLSKY_STATUS_UNKNOWN_NAME, "porch",
           "unknown deck");
    expect(stillsky_standing_tilt(model, "deck", 75.0, d, 4, NAN, rows, 3), STILLSKY_STATUS_BUFFER_TOO_SMALL, "4 needed",
           "rows too small");
    const double back[2] = {1.0, 0.5};
    expect(stillsky_standing_tilt(model, "deck", 75.0, back, 2, NAN, rows, 4), STILLSKY_STATUS_INVALID_ARGUMENT,
           "increasing", "distances not increasing");
    const char *bad_tone[1] = {"24:ground_z"};
    expect(stillsky_tone_image(model, bad_tone, 1, ti, 2, &total), STILLSKY_STATUS_PARSE, "24:ground_z",
           "tone line without amplitude");
    const char *bad_unit[1] = {"24:ground_z:1e-6:N"};
    expect(stillsky_tone_image(model, bad_unit, 1, ti, 2, &total), STILLSKY_STATUS_INVALID_ARGUMENT, "ground_z",
           "unit that does not fit the input");
    expect(stillsky_ground_distance_ratio(fr, 3, 5.0, 20.0, "sea", 0.1, 200.0, ratio), STILLSKY_STATUS_UNKNOWN_NAME,
           "sea", "unknown wave kind");
    expect(stillsky_ground_distance_ratio(fr, 3, -5.0, 20.0, "surface", 0.1, 200.0, ratio),
           STILLSKY_STATUS_INVALID_ARGUMENT, "from_m", "negative distance");
    expect(stillsky_walking_pass(model, "deck", 1.5, 0.0, 75.0, 2.0, "fixed", 1e7, 1000.0, &ps),
           STILLSKY_STATUS_TOO_LARGE, "walking pass samples", "pass too long");

    stillsky_model_free(model);
    printf("%s\n", failures ? "FAILED" : "ok");
    return failures ? 1 : 0;
}
