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
                    tp_check(mpz_cmp_ui(tp_complex_mult(&C, i), 1) == 0,
                             "degree %ld: multiplicity", d);
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

/* tp_complex_build_move gives the same complex as tp_complex_build (a check of the
 * storage only: the mathematics is checked above), takes every lower facet normal,
 * and leaves a monomial's subdivision alone. Both engines, both conventions. */
static bool same_complex(const tp_complex *A, const tp_complex *B)
{
    size_t n = A->n;
    if (A->n != B->n || A->dim != B->dim || A->nverts != B->nverts ||
        A->nrays != B->nrays || A->ncells != B->ncells || A->balanced != B->balanced ||
        A->genus != B->genus || A->smooth != B->smooth)
        return false;
    for (size_t i = 0; i < A->nverts * n; i++)
        if (!mpq_equal(A->verts[i], B->verts[i]))
            return false;
    for (size_t i = 0; i < A->nrays * n; i++)
        if (mpz_cmp(A->rays[i], B->rays[i]) != 0)
            return false;
    for (size_t i = 0; i < A->ncells; i++) {
        const tp_complex_cell *a = &A->cells[i], *b = &B->cells[i];
        if (a->dim != b->dim || a->nverts != b->nverts || a->nrays != b->nrays ||
            a->dual != b->dual || mpz_cmp(a->weight, b->weight) != 0 ||
            mpz_cmp(tp_complex_mult(A, i), tp_complex_mult(B, i)) != 0)
            return false;
        for (size_t t = 0; t < a->nverts; t++)
            if (a->verts[t] != b->verts[t])
                return false;
        for (size_t t = 0; t < a->nrays; t++)
            if (tp_complex_cell_rays(a)[t] != tp_complex_cell_rays(b)[t])
                return false;
    }
    return true;
}

static void test_move_equals_copy(void)
{
    tp_rng r;
    tp_rng_seed(&r, tp_test_seed() + 4);
    tp_error err;
    tp_error_init(&err, NULL);
    long iters = 120 * tp_test_multiplier();
    for (long it = 0; it < iters; it++) {
        size_t n = 1 + (size_t)(it % 3);
        size_t count = it % 17 == 0 ? 1 : n + 1 + (size_t)tp_rng_range(&r, 0, 25);
        bool max = it % 2 == 1;
        tp_engine eng = it % 4 < 2 ? TP_ENGINE_AUTO : TP_ENGINE_CDD;
        tp_points P;
        pts_random(&P, &r, n, count, tp_rng_range(&r, 1, 5), tp_rng_range(&r, 0, 9));
        tp_subdiv S1, S2;
        tp_complex C1, C2;
        tp_subdiv_init(&S1);
        tp_subdiv_init(&S2);
        tp_complex_init(&C1);
        tp_complex_init(&C2);
        bool ok = tp_subdiv_build(&S1, &P, eng, &err) == TP_OK &&
                  tp_subdiv_build(&S2, &P, eng, &err) == TP_OK &&
                  tp_complex_build(&C1, &S1, &P, NULL, max, &err) == TP_OK &&
                  tp_complex_build_move(&C2, &S2, &P, NULL, max, &err) == TP_OK;
        tp_check(ok, "move it %ld: %s", it, err.msg);
        if (ok) {
            tp_check(same_complex(&C1, &C2), "move it %ld (n=%zu): complexes differ", it,
                     n);
            tp_check(tp_complex_check(&C2, &err) == TP_OK, "move it %ld: %s", it, err.msg);
            size_t kept = 0;
            for (size_t f = 0; f < S2.hull.nlower; f++)
                kept += S2.hull.lower[f].w != NULL;
            bool monomial = S2.hull.dim <= 0;
            tp_check(monomial ? kept == S2.hull.nlower : kept == 0,
                     "move it %ld: %zu of %zu normals left behind", it, kept,
                     S2.hull.nlower);
            for (size_t f = 0; f < S1.hull.nlower; f++)
                tp_check(S1.hull.lower[f].w != NULL, "copy it %ld: normal %zu taken", it,
                         f);
            /* a second build from S2 cannot copy what was moved */
            if (!monomial) {
                tp_complex C3;
                tp_complex_init(&C3);
                tp_check(tp_complex_build(&C3, &S2, &P, NULL, max, &err) == TP_EINTERNAL,
                         "move it %ld: building again from a taken subdivision", it);
                tp_complex_clear(&C3);
            }
        }
        /* the complex outlives nothing it needs: clear the subdivision first */
        tp_subdiv_clear(&S2);
        if (ok)
            tp_check(same_complex(&C1, &C2), "move it %ld: complex after clearing S", it);
        tp_complex_clear(&C1);
        tp_complex_clear(&C2);
        tp_subdiv_clear(&S1);
        tp_points_clear(&P);
    }
}

int main(void)
{
    test_generic_curves();
    test_trivial_full_support();
    test_random_balanced_and_max();
    test_move_equals_copy();
    return tp_test_finish("t-complex");
}
