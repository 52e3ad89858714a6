/* t-subdiv.c — the regular subdivision: structure checks and Euler's relation.
 *
 * Reference: the cells of a polyhedral subdivision of a convex polytope form a ball, so
 * sum_k (-1)^k f_k = 1 (Euler–Poincaré; common practice, no source). Generic heights on
 * the lattice points of k·simplex give a triangulation whose maximal cells have n+1
 * points (common practice, no source).
 */
#include <stdio.h>
#include <stdlib.h>

#include "ptsbuild.h"
#include "testlib.h"
#include "trope/subdiv.h"

static void test_random_euler(void)
{
    tp_rng r;
    tp_rng_seed(&r, tp_test_seed() + 1);
    tp_error err;
    tp_error_init(&err, NULL);
    long iters = 200 * tp_test_multiplier();
    for (long it = 0; it < iters; it++) {
        size_t n = 1 + (size_t)(it % 4);
        size_t count = n + 1 + (size_t)tp_rng_range(&r, 0, 12);
        tp_points P;
        pts_random(&P, &r, n, count, tp_rng_range(&r, 1, 3), tp_rng_range(&r, 0, 5));
        tp_subdiv S;
        tp_subdiv_init(&S);
        tp_status st = tp_subdiv_build(&S, &P, TP_ENGINE_CDD, &err);
        tp_check(st == TP_OK, "it %ld: %s", it, err.msg);
        if (st == TP_OK) {
            tp_check(tp_subdiv_check(&S, &P, &err) == TP_OK, "it %ld: %s", it, err.msg);
            long chi = 0;
            for (size_t c = 0; c < S.ncells; c++)
                chi += (S.cells[c].dim % 2) ? -1 : 1;
            tp_check(chi == 1, "it %ld (n=%zu): Euler characteristic %ld", it, n, chi);
            /* used + unused = all points */
            size_t used = 0;
            for (size_t i = 0; i < P.count; i++)
                used += S.hull.on_hull[i];
            tp_check(used + S.nunused == P.count, "it %ld: used/unused", it);
        }
        tp_subdiv_clear(&S);
        tp_points_clear(&P);
    }
}

static void test_equal_heights_one_cell(void)
{
    /* All heights equal on the lattice points of 3·triangle: one maximal cell holding all
     * 10 points, 3 boundary edges, 3 vertices. */
    long e[20], h[10] = {0};
    size_t k = 0;
    for (long i = 0; i <= 3; i++)
        for (long j = 0; i + j <= 3; j++) {
            e[2 * k] = i;
            e[2 * k + 1] = j;
            k++;
        }
    tp_points P;
    pts_make(&P, 2, 10, e, h, NULL);
    tp_subdiv S;
    tp_subdiv_init(&S);
    tp_error err;
    tp_error_init(&err, NULL);
    tp_check(tp_subdiv_build(&S, &P, TP_ENGINE_CDD, &err) == TP_OK, "equal: %s", err.msg);
    size_t f[3] = {0};
    for (size_t c = 0; c < S.ncells; c++)
        f[S.cells[c].dim]++;
    tp_check(f[2] == 1 && f[1] == 3 && f[0] == 3, "equal heights: f = %zu %zu %zu", f[0], f[1],
             f[2]);
    tp_check(S.ncells > 0 && S.cells[0].npts == 10, "equal heights: the cell holds every point");
    tp_check(S.nunused == 0, "equal heights: no unused point");
    tp_subdiv_clear(&S);
    tp_points_clear(&P);
}

int main(void)
{
    test_random_euler();
    test_equal_heights_one_cell();
    return tp_test_finish("t-subdiv");
}
