/* testlib.h — the small harness shared by tests/unit/t-*.c.
 *
 * Randomised tests use tp_test_seed() (env TROPE_TEST_SEED, default 0x7470) and scale
 * their iteration counts by tp_test_multiplier() (env TROPE_TEST_MULTIPLIER, default 1).
 * tp_check records a failure with its message and goes on; tp_test_finish prints the
 * summary and returns the exit status for main.
 */
#ifndef TROPE_TESTLIB_H
#define TROPE_TESTLIB_H

#include <stdbool.h>
#include <stdint.h>

uint64_t tp_test_seed(void);
long tp_test_multiplier(void);
/* A small deterministic generator (splitmix64). */
typedef struct { uint64_t s; } tp_rng;
void tp_rng_seed(tp_rng *r, uint64_t seed);
uint64_t tp_rng_next(tp_rng *r);
/* Uniform integer in [lo, hi]. */
long tp_rng_range(tp_rng *r, long lo, long hi);

/* Records a failure (printing file:line and the message) when ok is false. */
bool tp_check_at(bool ok, const char *file, int line, const char *fmt, ...)
    __attribute__((format(printf, 4, 5)));
#define tp_check(ok, ...) tp_check_at((ok), __FILE__, __LINE__, __VA_ARGS__)
int tp_test_finish(const char *name);

#endif
