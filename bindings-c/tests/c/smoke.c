/* A complete stillsky C example: build a one-degree-of-freedom model from TOML text, evaluate
 * its ground-to-mass transmissibility and natural frequency, and handle errors.
 * Build: cc -std=c11 -I include smoke.c libstillsky.a -lpthread -ldl -lm
 * Run:   ./smoke [file]   (with a file argument the FRF is written there, one line per
 *                          frequency: f re im) */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "stillsky.h"

/* A 25 kg mass on a vertical spring k = 4e5 N/m with loss factor 0.08 (invented example). */
static const char MODEL[] =
    "[[body]]\n"
    "name = \"mass\"\n"
    "mass_kg = 25\n"
    "cg_m = [0, 0, 1]\n"
    "inertia_kgm2 = [1, 1, 1]\n"
    "dofs = [\"z\"]\n"
    "[[spring]]\n"
    "name = \"support\"\n"
    "from = \"ground\"\n"
    "to = \"mass\"\n"
    "at_m = [0, 0, 0.5]\n"
    "direction = [0, 0, 1]\n"
    "stiffness_n_per_m = 4e5\n"
    "loss_factor = 0.08\n";

#define N 50

static void print_last_error(void) {
    char msg[512];
    stillsky_last_error_message(msg, sizeof msg);
    fprintf(stderr, "  last error: %s\n", msg);
}

int main(int argc, char **argv) {
    const double k = 4e5, m = 25.0, eta = 0.08, pi = 3.14159265358979323846;
    const double fn = sqrt(k / m) / (2.0 * pi);
    int failures = 0;

    printf("stillsky %s\n", stillsky_version());

    stillsky_model *model = NULL;
    int32_t st = stillsky_model_from_toml(MODEL, &model);
    if (st != STILLSKY_STATUS_OK) {
        fprintf(stderr, "model: %s\n", stillsky_status_str(st));
        print_last_error();
        return 1;
    }
    size_t ndof = 0;
    if (stillsky_model_dof_count(model, &ndof) != STILLSKY_STATUS_OK || ndof != 1) {
        fprintf(stderr, "dof count %zu, expected 1\n", ndof);
        failures++;
    }

    /* Transmissibility on a log grid 0.1 fn .. 10 fn. */
    double f[N], re[N], im[N];
    for (int i = 0; i < N; i++) f[i] = 0.1 * fn * pow(100.0, (double)i / (N - 1));
    st = stillsky_frf_evaluate(model, f, N, "ground_z", "mass:z", re, im, N);
    if (st != STILLSKY_STATUS_OK) {
        fprintf(stderr, "frf: %s\n", stillsky_status_str(st));
        print_last_error();
        stillsky_model_free(model);
        return 1;
    }
    /* Closed form for a hysteretic spring (Den Hartog; docs/references.md#s1):
     * T = (1 + i eta) / (1 - r^2 + i eta). */
    double worst = 0.0;
    for (int i = 0; i < N; i++) {
        double r = f[i] / fn, c = 1.0 - r * r, d = c * c + eta * eta;
        double tre = (c + eta * eta) / d, tim = -eta * r * r / d;
        double err = hypot(re[i] - tre, im[i] - tim) / hypot(tre, tim);
        if (err > worst) worst = err;
    }
    printf("transmissibility: worst relative error vs closed form %.3e\n", worst);
    if (!(worst < 1e-9)) failures++;

    /* The interleaved variant gives the same numbers. */
    stillsky_complex z[N];
    st = stillsky_frf_evaluate_interleaved(model, f, N, "ground_z", "mass:z", z, N);
    for (int i = 0; st == STILLSKY_STATUS_OK && i < N; i++)
        if (z[i].re != re[i] || z[i].im != im[i]) st = -1;
    if (st != STILLSKY_STATUS_OK) {
        fprintf(stderr, "interleaved FRF differs\n");
        failures++;
    }

    /* Modes: ask for the count, then fetch. */
    size_t n_modes = 0;
    st = stillsky_modes_compute(model, NULL, NULL, 0, &n_modes);
    if (st != STILLSKY_STATUS_BUFFER_TOO_SMALL || n_modes != 1) {
        fprintf(stderr, "modes query: %s, n = %zu\n", stillsky_status_str(st), n_modes);
        failures++;
    }
    double fm[1], zeta[1];
    st = stillsky_modes_compute(model, fm, zeta, 1, &n_modes);
    printf("mode: %.6f Hz (closed form sqrt(k/m)/2pi = %.6f Hz), damping ratio %.4f\n", fm[0], fn, zeta[0]);
    /* Modal strain energy gives zeta = eta/2 for one hysteretic spring (half the loss factor). */
    if (st != STILLSKY_STATUS_OK || fabs(fm[0] / fn - 1.0) > 1e-9 || fabs(zeta[0] - eta / 2) > 1e-9) failures++;

    /* Errors: a NULL argument gives NULL_POINTER and a message. */
    st = stillsky_frf_evaluate(NULL, f, N, "ground_z", "mass:z", re, im, N);
    size_t need = stillsky_last_error_message(NULL, 0);
    printf("NULL model: %s (message of %zu bytes)\n", stillsky_status_str(st), need);
    if (st != STILLSKY_STATUS_NULL_POINTER || need < 2) failures++;
    print_last_error();

    /* A buffer shorter than the grid gives BUFFER_TOO_SMALL. */
    st = stillsky_frf_evaluate(model, f, N, "ground_z", "mass:z", re, im, N - 1);
    printf("short buffer: %s\n", stillsky_status_str(st));
    if (st != STILLSKY_STATUS_BUFFER_TOO_SMALL) failures++;

    /* Freeing NULL is allowed. */
    stillsky_model_free(NULL);

    if (argc > 1) {
        FILE *out = fopen(argv[1], "w");
        if (!out) {
            failures++;
        } else {
            for (int i = 0; i < N; i++) fprintf(out, "%.17g %.17g %.17g\n", f[i], re[i], im[i]);
            fclose(out);
        }
    }
    stillsky_model_free(model);
    printf("%s\n", failures ? "FAILED" : "ok");
    return failures ? 1 : 0;
}
