/* t-complex.c — the dual complex: balancing, weights, curve invariants, conventions.
 *
 * References: generic plane curves of degree d have d^2 vertices, 3d(d-1)/2 bounded
 * edges, 3d rays of weight 1 and genus (d-1)(d-2)/2 (Mikhalkin, "Enumerative tropical
 * algebraic geometry in R^2", J. AMS 18 (2005), §2, from memory; Euler and Pick,
 * common practice). Tropical hypersurfaces are balanced (Mikhalkin 2005, §2, from
 * memory); the trivial-valuation curve of full support of degree d has one vertex and
 * three rays of weight d (common practice, no source).
 */
#include <stdio.h>
#include <stdlib.h>

#include "ptsbuild.h"
#include "testlib.h"
#include "trope/complex.h"

static bool build(tp_points *P, tp_subdiv *S, tp_complex *C, bool max, tp_error *err)
{
    tp_subdiv_init(S);
    tp_complex_init(C);
    if (tp_subdiv_build(S, P, TP_ENGINE_CDD, err) != TP_OK)
        return false;
    return tp_complex_build(C, S, P, NULL, max, err) == TP_OK;
}

static void test_generic_curves(void)
{
    tp_rng r;
    tp_rng_seed(&r, tp_test_seed() + 2);
    tp_error err;
    tp_error_init(&err, NULL);
    for (long d = 1; d <= 6; d++) {
        size_t cnt = (size_t)((d + 1) * (d + 2) / 2);
        long *e = malloc(2 * cnt * sizeof *e), *hn = malloc(cnt * sizeof *hn),
             *hd = malloc(cnt * sizeof *hd);
        size_t k = 0;
        for (long i = 0; i <= d; i++)
            for (long j = 0; i + j <= d; j++) {
                e[2 * k] = i;
                e[2 * k + 1] = j;
                /* i^2 + ij + j^2 plus a small generic perturbation */
                hn[k] = 1000 * (i * i + i * j + j * j) + tp_rng_range(&r, 0, 97);
                hd[k] = 1000;
                k++;
            }
        tp_points P;
        pts_make(&P, 2, cnt, e, hn, hd);
        tp_subdiv S;
        tp_complex C;
        bool ok = build(&P, &S, &C, false, &err);
        tp_check(ok, "degree %ld: %s", d, err.msg);
        if (ok) {
            tp_check(tp_complex_check(&C, &err) == TP_OK, "degree %ld: %s", d, err.msg);
            tp_check(C.nverts == (size_t)(d * d), "degree %ld: %zu vertices", d, C.nverts);
            tp_check(C.nbounded == (size_t)(3 * d * (d - 1) / 2), "degree %ld: %zu bounded", d,
                     C.nbounded);
            tp_check(C.nunbounded == (size_t)(3 * d), "degree %ld: %zu rays", d, C.nunbounded);
            tp_check(C.genus == (d - 1) * (d - 2) / 2, "degree %ld: genus %ld", d, C.genus);
            tp_check(C.smooth == 1, "degree %ld: smooth", d);
            for (size_t i = 0; i < C.ncells; i++)
                if (C.cells[i].dim == 0)
                    tp_check(mpz_cmp_ui(C.cells[i].mult, 1) == 0, "degree %ld: multiplicity", d);
        }
        tp_complex_clear(&C);
        tp_subdiv_clear(&S);
        tp_points_clear(&P);
        free(e);
        free(hn);
        free(hd);
    }
}

static void test_trivial_full_support(void)
{
    tp_error err;
    tp_error_init(&err, NULL);
    for (long d = 1; d <= 5; d++) {
        size_t cnt = (size_t)((d + 1) * (d + 2) / 2);
        long *e = malloc(2 * cnt * sizeof *e), *h = calloc(cnt, sizeof *h);
        size_t k = 0;
        for (long i = 0; i <= d; i++)
            for (long j = 0; i + j <= d; j++) {
                e[2 * k] = i;
                e[2 * k + 1] = j;
                k++;
            }
        tp_points P;
        pts_make(&P, 2, cnt, e, h, NULL);
        tp_subdiv S;
        tp_complex C;
        bool ok = build(&P, &S, &C, false, &err);
        tp_check(ok && C.nverts == 1 && C.nrays == 3, "trivial degree %ld", d);
        if (ok) {
            tp_check(mpq_sgn(C.verts[0]) == 0 && mpq_sgn(C.verts[1]) == 0,
                     "trivial degree %ld: vertex at the origin", d);
            /* rays sorted: (-1,-1), (0,1), (1,0) */
            tp_check(mpz_cmp_si(C.rays[0], -1) == 0 && mpz_cmp_si(C.rays[1], -1) == 0 &&
                         mpz_cmp_si(C.rays[2], 0) == 0 && mpz_cmp_si(C.rays[3], 1) == 0 &&
                         mpz_cmp_si(C.rays[4], 1) == 0 && mpz_cmp_si(C.rays[5], 0) == 0,
                     "trivial degree %ld: rays", d);
            for (size_t i = 0; i < C.nraydeg; i++)
                tp_check(mpz_cmp_si(C.raydeg[i].weight, d) == 0, "trivial degree %ld: weight", d);
            tp_check(C.genus == 0, "trivial: genus 0");
        }
        tp_complex_clear(&C);
        tp_subdiv_clear(&S);
        tp_points_clear(&P);
        free(e);
        free(h);
    }
}

static void test_random_balanced_and_max(void)
{
    tp_rng r;
    tp_rng_seed(&r, tp_test_seed() + 3);
    tp_error err;
    tp_error_init(&err, NULL);
    long iters = 150 * tp_test_multiplier();
    for (long it = 0; it < iters; it++) {
        size_t n = 1 + (size_t)(it % 4);
        size_t count = n + 1 + (size_t)tp_rng_range(&r, 0, 10);
        tp_points P;
        pts_random(&P, &r, n, count, tp_rng_range(&r, 1, 4), tp_rng_range(&r, 0, 9));
        tp_subdiv S, S2;
        tp_complex C, C2;
        bool ok = build(&P, &S, &C, false, &err);
        tp_check(ok, "it %ld: %s", it, err.msg);
        if (ok)
            tp_check(tp_complex_check(&C, &err) == TP_OK, "it %ld (n=%zu): %s", it, n, err.msg);
        /* --max: same cells, every vertex negated. */
        bool ok2 = build(&P, &S2, &C2, true, &err);
        if (ok && ok2) {
            tp_check(C.nverts == C2.nverts && C.ncells == C2.ncells, "it %ld: max shape", it);
            for (size_t v = 0; v < C.nverts && C.nverts == C2.nverts; v++) {
                size_t w = C.nverts - 1 - v; /* negation reverses lexicographic order */
                bool eq = true;
                for (size_t j = 0; j < n; j++) {
                    mpq_t t;
                    mpq_init(t);
                    mpq_neg(t, C2.verts[w * n + j]);
                    eq = eq && mpq_equal(t, C.verts[v * n + j]);
                    mpq_clear(t);
                }
                tp_check(eq, "it %ld: vertex %zu negated under max", it, v);
            }
        }
        tp_complex_clear(&C);
        tp_subdiv_clear(&S);
        tp_complex_clear(&C2);
        tp_subdiv_clear(&S2);
        tp_points_clear(&P);
    }
}

int main(void)
{
    test_generic_curves();
    test_trivial_full_support();
    test_random_balanced_and_max();
    return tp_test_finish("t-complex");
}
