/* ptsbuild.h — build tp_points by hand in unit tests (no parser involved). */
#ifndef TROPE_PTSBUILD_H
#define TROPE_PTSBUILD_H

#include <stdlib.h>
#include "trope/points.h"
#include "testlib.h"

/* count points in n dims; exps row-major; heights as num/den pairs. */
static inline void pts_make(tp_points *P, size_t n, size_t count, const long *exps,
                            const long *hnum, const long *hden)
{
    tp_points_init(P);
    P->n = n;
    P->count = count;
    P->exps = malloc((count * n + 1) * sizeof *P->exps);
    P->heights = malloc((count + 1) * sizeof *P->heights);
    P->dup = calloc(count + 1, sizeof *P->dup);
    for (size_t i = 0; i < count * n; i++)
        P->exps[i] = exps[i];
    for (size_t i = 0; i < count; i++) {
        mpq_init(P->heights[i]);
        mpq_set_si(P->heights[i], hnum[i], hden ? (unsigned long)hden[i] : 1);
        mpq_canonicalize(P->heights[i]);
    }
    tp_points_mark_dups(P);
}

/* Random points: `count` exponents in [0, deg]^n (distinct not required), random heights. */
static inline void pts_random(tp_points *P, tp_rng *r, size_t n, size_t count, long deg,
                              long hmax)
{
    long *e = malloc((count * n + 1) * sizeof *e);
    long *h = malloc((count + 1) * sizeof *h);
    for (size_t i = 0; i < count * n; i++)
        e[i] = tp_rng_range(r, 0, deg);
    for (size_t i = 0; i < count; i++)
        h[i] = tp_rng_range(r, 0, hmax);
    pts_make(P, n, count, e, h, NULL);
    free(e);
    free(h);
}

#endif
