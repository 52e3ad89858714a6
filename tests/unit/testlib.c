#include "testlib.h"

#include <inttypes.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>

static long checks, failures;

uint64_t tp_test_seed(void)
{
    const char *s = getenv("TROPE_TEST_SEED");
    return s ? strtoull(s, NULL, 0) : 0x7470u;
}

long tp_test_multiplier(void)
{
    const char *s = getenv("TROPE_TEST_MULTIPLIER");
    long m = s ? strtol(s, NULL, 10) : 1;
    return m > 0 ? m : 1;
}

void tp_rng_seed(tp_rng *r, uint64_t seed) { r->s = seed; }

uint64_t tp_rng_next(tp_rng *r)
{
    uint64_t z = (r->s += 0x9e3779b97f4a7c15u);
    z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9u;
    z = (z ^ (z >> 27)) * 0x94d049bb133111ebu;
    return z ^ (z >> 31);
}

long tp_rng_range(tp_rng *r, long lo, long hi)
{
    uint64_t span = (uint64_t)(hi - lo) + 1;
    return lo + (long)(tp_rng_next(r) % span);
}

bool tp_check_at(bool ok, const char *file, int line, const char *fmt, ...)
{
    checks++;
    if (ok)
        return true;
    failures++;
    fprintf(stderr, "%s:%d: check failed: ", file, line);
    va_list ap;
    va_start(ap, fmt);
    vfprintf(stderr, fmt, ap);
    va_end(ap);
    fprintf(stderr, " (seed 0x%" PRIx64 ")\n", tp_test_seed());
    return false;
}

int tp_test_finish(const char *name)
{
    printf("%s: %ld checks, %ld failed\n", name, checks, failures);
    return failures ? 1 : 0;
}
