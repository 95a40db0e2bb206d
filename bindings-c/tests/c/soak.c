/* Soak run of the streaming monitor through the C API (a script, not a test: build and run it
 * with bindings-c/tests/soak.sh). Pushes N samples (default 1e8, argv[1] overrides) of one
 * ground-x accelerometer channel at 200 Hz, in blocks of 100 with a tick after each block:
 * broadband noise well below the threshold, plus a 3 s burst of a 20 Hz sine (windowed RMS
 * twice the threshold) at a known, seeded time in every 1000 s of data. It checks that every
 * burst is flagged (ABOVE at some tick between its start and its end plus latency, window and
 * hold-off), that nothing is flagged elsewhere, that no tick after the warm-up reads UNSAFE,
 * and that the exposure opened around each burst reports it (above_fraction > 0, full
 * coverage). It prints the resident set size (VmRSS from /proc/self/status) after the warm-up
 * and at the end, and the samples per second of the push/tick loop.
 * Exit status 0 only when every check passed and the RSS did not grow by more than 64 kB. */
#define _POSIX_C_SOURCE 199309L
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "stillsky.h"
#include "monitor_rig.h"

static const double PI = 3.14159265358979323846;


#define FS 200.0
#define BLOCK 100
#define CYCLE 200000L /* samples per burst cycle: 1000 s */
#define BURST 600L    /* 3 s */
#define NOISE_LEN 65536
#define THRESHOLD 0.5  /* arcsec */
#define HOLD_OFF 1.0   /* s */
#define WINDOW 1.0     /* s */

static uint64_t rng = 0x9E3779B97F4A7C15ULL; /* xorshift64, fixed seed */
static double uniform(void) {
    rng ^= rng << 13;
    rng ^= rng >> 7;
    rng ^= rng << 17;
    return ((double)(rng >> 11) + 0.5) / 9007199254740992.0;
}

static long rss_kb(void) {
    FILE *f = fopen("/proc/self/status", "r");
    char line[256];
    long kb = -1;
    if (!f) return -1;
    while (fgets(line, sizeof line, f))
        if (strncmp(line, "VmRSS:", 6) == 0) kb = strtol(line + 6, NULL, 10);
    fclose(f);
    return kb;
}

static double now_s(void) {
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

static int fail(const char *what, int32_t st) {
    char msg[512];
    stillsky_last_error_message(msg, sizeof msg);
    fprintf(stderr, "FAIL %s: %s (%s)\n", what, stillsky_status_str(st), msg);
    return 1;
}

static double noise[NOISE_LEN];

int main(int argc, char **argv) {
    long n_total = argc > 1 ? atol(argv[1]) : 100000000L;
    stillsky_model *model = NULL;
    int32_t st = stillsky_model_from_toml(MODEL, &model);
    if (st) return fail("model", st);
    stillsky_monitor_config cfg;
    stillsky_monitor_config_default(&cfg);
    cfg.sample_rate_hz = FS;
    cfg.window_s = WINDOW;
    cfg.threshold_arcsec = THRESHOLD;
    cfg.hysteresis = 0.2;
    cfg.hold_off_s = HOLD_OFF;
    cfg.max_age_s = 0.5;
    cfg.highpass_hz = 4.0;
    cfg.fir_taps = 256;

    /* Burst amplitude: windowed RMS = 2 x threshold, from the FRF at 20 Hz
     * (RMS of a sinusoid = amplitude / sqrt 2). */
    double f20[1] = {20.0}, hre[1], him[1], g2 = 0.0;
    const char *outs[2] = {"image_x", "image_y"};
    for (int o = 0; o < 2; o++) {
        st = stillsky_frf_evaluate(model, f20, 1, "ground_x", outs[o], hre, him, 1);
        if (st) return fail("frf", st);
        g2 += (hre[0] * hre[0] + him[0] * him[0]) / pow(2.0 * PI * 20.0, 4);
    }
    const double amp = 2.0 * THRESHOLD / (sqrt(g2 / 2.0) * 206264.80624709636);

    /* Gaussian noise (Box-Muller), scaled so that its windowed RMS is about 0.15 x threshold
     * (measured on a scratch monitor). */
    for (int i = 0; i < NOISE_LEN; i += 2) {
        double r = sqrt(-2.0 * log(uniform())), p = 2.0 * PI * uniform();
        noise[i] = r * cos(p);
        noise[i + 1] = r * sin(p);
    }
    stillsky_monitor *m = NULL;
    st = stillsky_monitor_from_model(model, "x", &cfg, &m);
    if (st) return fail("monitor", st);
    st = stillsky_monitor_push(m, 0.0, noise, 20000, 1);
    stillsky_monitor_reading rd;
    if (st || (st = stillsky_monitor_tick(m, 19999 / FS, &rd))) return fail("scratch", st);
    const double scale = 0.15 * THRESHOLD / rd.rms_arcsec;
    for (int i = 0; i < NOISE_LEN; i++) noise[i] *= scale;
    stillsky_monitor_reset(m);
    stillsky_monitor_info info;
    stillsky_monitor_info_get(m, &info);
    /* A burst is attributed to ticks from its start to its end + latency + window + hold-off
     * + one block. */
    const long tail = (long)ceil((info.latency_s + WINDOW + HOLD_OFF) * FS) + BLOCK;

    long n_bursts = 0, detected = 0, false_above = 0, unsafe_after_warmup = 0, exposure_ok = 0;
    long burst_on = -1, burst_next = -1, cycle = -1;
    int seen_above = 0;
    double blk[BLOCK];
    long rss_start = -1;
    double t_loop = 0.0;
    printf("soak: %ld samples at %.0f Hz (%.1f days of data), %zu taps, window %.0f s, threshold %.2f arcsec\n",
           n_total, FS, n_total / FS / 86400.0, info.fir_taps, WINDOW, THRESHOLD);
    for (long i0 = 0; i0 < n_total; i0 += BLOCK) {
        long c = i0 / CYCLE;
        if (c != cycle) { /* a new cycle: place its burst at a seeded time in 100..800 s */
            cycle = c;
            burst_next = c * CYCLE + 20000L + (long)(uniform() * 140000.0) / BLOCK * BLOCK;
        }
        if (burst_next >= 0 && i0 == burst_next - 2000) { /* expose from 10 s before the burst */
            st = stillsky_monitor_exposure_begin(m, i0 / FS);
            if (st) return fail("exposure begin", st);
        }
        if (i0 == burst_next) {
            burst_on = burst_next;
            burst_next = -1;
            n_bursts++;
            seen_above = 0;
        }
        long nb = n_total - i0 < BLOCK ? n_total - i0 : BLOCK;
        memcpy(blk, &noise[(i0 / BLOCK) % (NOISE_LEN / BLOCK) * BLOCK], sizeof blk);
        if (burst_on >= 0 && i0 < burst_on + BURST)
            for (long j = 0; j < nb; j++) blk[j] += amp * sin(2.0 * PI * 20.0 * (double)(i0 + j - burst_on) / FS);
        double t0 = now_s();
        st = stillsky_monitor_push(m, i0 / FS, blk, (size_t)nb, 1);
        if (st) return fail("push", st);
        st = stillsky_monitor_tick(m, (i0 + nb - 1) / FS, &rd);
        if (st) return fail("tick", st);
        t_loop += now_s() - t0;
        long done = i0 + nb;
        if (done >= (long)info.warmup_samples && rss_start < 0) rss_start = rss_kb();
        if (rd.state == STILLSKY_MONITOR_STATE_UNSAFE) {
            if (done >= (long)info.warmup_samples) unsafe_after_warmup++;
        } else if (burst_on >= 0 && done <= burst_on + BURST + tail) {
            if (rd.state == STILLSKY_MONITOR_STATE_ABOVE) seen_above = 1;
        } else if (rd.state == STILLSKY_MONITOR_STATE_ABOVE) {
            false_above++;
        }
        if (burst_on >= 0 && done > burst_on + BURST + tail) {
            detected += seen_above;
            if (!seen_above) printf("missed burst at %.1f s\n", burst_on / FS);
            stillsky_exposure_quality q;
            st = stillsky_monitor_exposure_end(m, (burst_on + BURST + tail) / FS - info.latency_s, &q);
            if (st) return fail("exposure end", st);
            exposure_ok += q.above_fraction > 0.0 && q.coverage > 0.99;
            burst_on = -1;
        }
        if (n_total >= 10 && done % (n_total / 10) < BLOCK)
            printf("  %3.0f %%: %ld bursts, %ld flagged, RSS %ld kB\n", 100.0 * done / n_total, n_bursts, detected,
                   rss_kb());
    }
    if (burst_on >= 0) n_bursts--; /* a burst cut off by the end of the run is not counted */
    long rss_end = rss_kb();
    printf("bursts %ld, flagged %ld, exposures reporting the burst %ld, false ABOVE ticks %ld, UNSAFE ticks after warm-up %ld\n",
           n_bursts, detected, exposure_ok, false_above, unsafe_after_warmup);
    printf("RSS after warm-up %ld kB, at the end %ld kB\n", rss_start, rss_end);
    printf("push+tick: %.3f s for %ld samples = %.3g samples/s\n", t_loop, n_total, n_total / t_loop);
    stillsky_monitor_free(m);
    stillsky_model_free(model);
    int ok = n_bursts > 0 && detected == n_bursts && exposure_ok == n_bursts && false_above == 0 &&
             unsafe_after_warmup == 0 && rss_end - rss_start <= 64;
    printf("%s\n", ok ? "ok" : "FAILED");
    return ok ? 0 : 1;
}
