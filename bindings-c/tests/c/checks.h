/* Shared checks of the C tests: a failure counter, a checked condition, a relative comparison
 * and an expected failure (status and a word of its message). Include after stillsky.h. */
#ifndef STILLSKY_TEST_CHECKS_H
#define STILLSKY_TEST_CHECKS_H

#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <string.h>

static int failures = 0;

static inline void check(int ok, const char *what) {
    if (!ok) {
        char msg[512];
        stillsky_last_error_message(msg, sizeof msg);
        fprintf(stderr, "FAIL %s (last error: %s)\n", what, msg);
        failures++;
    }
}

static inline void close_to(const char *what, double got, double want, double rel) {
    double e = fabs(got - want) / fmax(fabs(want), 1e-300);
    printf("%s: %.10g (expected %.10g, rel %.2e)\n", what, got, want, e);
    check(e <= rel, what);
}

/* A call that must fail with `want`, and whose message must name `word`. */
static inline void expect(int32_t st, int32_t want, const char *word, const char *what) {
    char msg[512];
    stillsky_last_error_message(msg, sizeof msg);
    int ok = st == want && strstr(msg, word) != NULL;
    if (ok) printf("reached %s [%s] %s\n", stillsky_status_str(st), what, msg);
    else fprintf(stderr, "FAIL %s: got %s, message '%s'\n", what, stillsky_status_str(st), msg);
    failures += !ok;
}

#endif
