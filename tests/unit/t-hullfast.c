/* t-hullfast.c — the fast exact lower-hull engine against cddlib, cell for cell.
 *
 * Reference: cddlib's GMP-exact double description method (Debian libcdd-dev), run
 * through tp_hull_lower with TP_ENGINE_CDD. Both results go through tp_hull_finish, so
 * the comparison is of canonical objects: every lower cell (all points on it, its
 * normal w), every facet of the Newton polytope (all points on it, primitive inner
 * normal), the on_hull marks. The fast engine is called directly so that a silent
 * fallback to cddlib cannot make the test pass.
 *
 * Inputs: random, lattice (fine, flat), piecewise-linear, huge heights, large
 * exponents, and Newton polytopes of lower dimension in up to 5 variables (homogeneous
 * ones among them), which the engine works in projected coordinates.
 *
 * Independent facts checked as well (common practice, no source): for generic
 * heights on the lattice points of dΔ with strictly convex heights every lattice
 * point is used and the subdivision is a triangulation with d^2 triangles of
 * normalised area 1 (Pick's theorem); for equal heights there is one cell holding every
 * point.
 */
#include "testlib.h"
#include "../../src/lib/hull_internal.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* ---- a hand-built point set (independent of points.c) ------------------------- */

typedef struct {
    tp_points P;
    size_t cap;
} pset;

static void ps_init(pset *S, size_t n)
{
    memset(S, 0, sizeof *S);
    S->P.n = n;
}

static void ps_add(pset *S, const int64_t *a, const mpq_t h)
{
    tp_points *P = &S->P;
    if (P->count == S->cap) {
        size_t c = S->cap ? 2 * S->cap : 16;
        P->exps = realloc(P->exps, c * (P->n ? P->n : 1) * sizeof *P->exps);
        mpq_t *hh = malloc(c * sizeof *hh);
        for (size_t i = 0; i < P->count; i++) {
            mpq_init(hh[i]);
            mpq_swap(hh[i], P->heights[i]);
            mpq_clear(P->heights[i]);
        }
        free(P->heights);
        P->heights = hh;
        P->dup = realloc(P->dup, c * sizeof *P->dup);
        if (!P->exps || !P->dup) {
            fprintf(stderr, "out of memory\n");
            exit(1);
        }
        S->cap = c;
    }
    memcpy(&P->exps[P->count * P->n], a, P->n * sizeof *a);
    mpq_init(P->heights[P->count]);
    mpq_set(P->heights[P->count], h);
    P->dup[P->count] = false;
    P->count++;
}

/* dup marks: a repeated exponent keeps its smallest height (first such wins). */
static void ps_dups(pset *S)
{
    tp_points *P = &S->P;
    for (size_t i = 0; i < P->count; i++) {
        P->dup[i] = false;
        for (size_t j = 0; j < P->count; j++) {
            if (j == i || memcmp(&P->exps[i * P->n], &P->exps[j * P->n],
                                 P->n * sizeof *P->exps) != 0)
                continue;
            int c = mpq_cmp(P->heights[j], P->heights[i]);
            if (c < 0 || (c == 0 && j < i)) {
                P->dup[i] = true;
                break;
            }
        }
    }
}

static void ps_clear(pset *S)
{
    for (size_t i = 0; i < S->P.count; i++)
        mpq_clear(S->P.heights[i]);
    free(S->P.heights);
    free(S->P.exps);
    free(S->P.dup);
    memset(S, 0, sizeof *S);
}

/* ---- comparison ----------------------------------------------------------------- */

static long n_fast_handled, n_declined, n_cases;

static bool same_hull(const tp_hull *A, const tp_hull *B, char *why, size_t wl)
{
    if (A->dim != B->dim || A->nlower != B->nlower || A->nsides != B->nsides) {
        snprintf(why, wl, "counts: dim %d/%d lower %zu/%zu sides %zu/%zu", A->dim, B->dim,
                 A->nlower, B->nlower, A->nsides, B->nsides);
        return false;
    }
    for (size_t i = 0; i < A->nlower; i++) {
        const tp_hull_facet *f = &A->lower[i], *g = &B->lower[i];
        if (f->npts != g->npts || memcmp(f->pts, g->pts, f->npts * sizeof *f->pts) != 0) {
            snprintf(why, wl, "lower cell %zu: point lists differ (%zu vs %zu points)", i,
                     f->npts, g->npts);
            return false;
        }
        for (size_t j = 0; j < A->n; j++)
            if (!mpq_equal(f->w[j], g->w[j])) {
                snprintf(why, wl, "lower cell %zu: normal differs in coordinate %zu", i, j);
                return false;
            }
    }
    for (size_t i = 0; i < A->nsides; i++) {
        const tp_hull_side *f = &A->sides[i], *g = &B->sides[i];
        if (f->npts != g->npts || memcmp(f->pts, g->pts, f->npts * sizeof *f->pts) != 0) {
            snprintf(why, wl, "side %zu: point lists differ (%zu vs %zu points)", i, f->npts,
                     g->npts);
            return false;
        }
        for (size_t j = 0; j < A->n; j++)
            if (mpz_cmp(f->u[j], g->u[j]) != 0) {
                snprintf(why, wl, "side %zu: normal differs", i);
                return false;
            }
    }
    for (size_t i = 0; i < A->npoints; i++)
        if (A->on_hull[i] != B->on_hull[i]) {
            snprintf(why, wl, "on_hull differs at point %zu", i);
            return false;
        }
    return true;
}

/* Run the fast engine directly (span, engine, finish), as tp_hull_lower does. */
static tp_status run_fast(tp_hull *H, const tp_points *P, bool *handled, tp_error *err)
{
    tp_hull_clear(H);
    tp_status st = tp_hull_span(H, P, err);
    if (st != TP_OK)
        return st;
    H->on_hull = calloc(P->count ? P->count : 1, sizeof *H->on_hull);
    if (!H->on_hull)
        return TP_ENOMEM;
    st = tp_hull_lower_fast(H, P, handled, err);
    if (st != TP_OK || !*handled)
        return st;
    return tp_hull_finish(H, err);
}

/* Compare both engines on S; expect_fast: the fast engine must accept the input. */
static void compare(pset *S, bool expect_fast, const char *what, long it)
{
    tp_hull A, B;
    tp_hull_init(&A);
    tp_hull_init(&B);
    tp_error e1, e2;
    tp_error_init(&e1, NULL);
    tp_error_init(&e2, NULL);
    bool handled = false;
    n_cases++;
    tp_status s1 = run_fast(&A, &S->P, &handled, &e1);
    tp_check(s1 == TP_OK, "%s it=%ld: fast engine failed: %s", what, it, e1.msg);
    if (expect_fast)
        tp_check(handled, "%s it=%ld: fast engine declined", what, it);
    if (s1 == TP_OK && handled) {
        n_fast_handled++;
        tp_status s2 = tp_hull_lower(&B, &S->P, TP_ENGINE_CDD, &e2);
        tp_check(s2 == TP_OK, "%s it=%ld: cddlib failed: %s", what, it, e2.msg);
        char why[256] = "";
        if (s2 == TP_OK)
            tp_check(same_hull(&A, &B, why, sizeof why), "%s it=%ld (seed %llu): %s", what,
                     it, (unsigned long long)tp_test_seed(), why);
    } else if (s1 == TP_OK) {
        n_declined++;
    }
    tp_hull_clear(&A);
    tp_hull_clear(&B);
}

/* ---- generators ----------------------------------------------------------------- */

static void gen_random(pset *S, tp_rng *r, size_t n, size_t k, long erange, long hrange,
                       long hden)
{
    ps_init(S, n);
    mpq_t h;
    mpq_init(h);
    int64_t a[3];
    for (size_t i = 0; i < k; i++) {
        for (size_t j = 0; j < n; j++)
            a[j] = tp_rng_range(r, -erange, erange);
        mpq_set_si(h, tp_rng_range(r, -hrange, hrange), (unsigned long)tp_rng_range(r, 1, hden));
        mpq_canonicalize(h);
        ps_add(S, a, h);
    }
    mpq_clear(h);
    ps_dups(S);
}

/* Lattice points of d*simplex with heights sum a_j^2 + (a_1 a_2) + noise. */
static void gen_simplex(pset *S, tp_rng *r, size_t n, long d, long noise, bool flat)
{
    ps_init(S, n);
    mpq_t h;
    mpq_init(h);
    int64_t a[3] = {0, 0, 0};
    for (a[0] = 0; a[0] <= d; a[0]++)
        for (a[1] = 0; a[1] <= (n > 1 ? d - a[0] : 0); a[1]++)
            for (a[2] = 0; a[2] <= (n > 2 ? d - a[0] - a[1] : 0); a[2]++) {
                long v = 0;
                if (!flat) {
                    for (size_t j = 0; j < n; j++)
                        v += (long)(a[j] * a[j]);
                    if (n > 1)
                        v += (long)(a[0] * a[1]);
                    v = v * 8 + (noise ? tp_rng_range(r, -noise, noise) : 0);
                }
                mpq_set_si(h, v, 1);
                ps_add(S, a, h);
            }
    mpq_clear(h);
    ps_dups(S);
}

/* A Newton polytope of lower dimension: a = a0 + M b with an integer n x d matrix M
 * (n = 2..5, d = 1..3; M may happen to have lower rank), b in a box, heights random
 * (few values: ties) or convex in b (fine subdivisions). Homogeneous input is the case
 * users meet most (M's columns summing to zero). */
static void gen_lowdim(pset *S, tp_rng *r, size_t n, size_t d, size_t k, bool homogeneous)
{
    ps_init(S, n);
    long M[5][3], a0[5];
    for (size_t i = 0; i < n; i++) {
        a0[i] = tp_rng_range(r, -5, 5);
        for (size_t j = 0; j < d; j++)
            M[i][j] = tp_rng_range(r, -3, 3);
    }
    if (homogeneous)
        for (size_t j = 0; j < d; j++) {
            long sum = 0;
            for (size_t i = 0; i + 1 < n; i++)
                sum += M[i][j];
            M[n - 1][j] = -sum;
        }
    long hmode = tp_rng_range(r, 0, 2);
    mpq_t h;
    mpq_init(h);
    for (size_t t = 0; t < k; t++) {
        long b[3] = {0, 0, 0};
        for (size_t j = 0; j < d; j++)
            b[j] = tp_rng_range(r, -4, 4);
        int64_t a[5];
        for (size_t i = 0; i < n; i++) {
            a[i] = a0[i];
            for (size_t j = 0; j < d; j++)
                a[i] += M[i][j] * b[j];
        }
        long v = hmode == 0 ? tp_rng_range(r, 0, 3)
                 : hmode == 1 ? tp_rng_range(r, -50, 50)
                              : b[0] * b[0] + b[1] * b[1] + b[2] * b[2] + tp_rng_range(r, 0, 1);
        mpq_set_si(h, v, 1);
        ps_add(S, a, h);
    }
    mpq_clear(h);
    ps_dups(S);
}

/* Heights with ~100 bits: forces the GMP predicates. */
static void gen_huge(pset *S, tp_rng *r, size_t n, size_t k)
{
    ps_init(S, n);
    mpz_t big;
    mpq_t h;
    mpz_init(big);
    mpq_init(h);
    int64_t a[3];
    for (size_t i = 0; i < k; i++) {
        for (size_t j = 0; j < n; j++)
            a[j] = tp_rng_range(r, -4, 4);
        mpz_set_ui(big, 1);
        mpz_mul_2exp(big, big, 100);
        /* heights c*2^100 + small: ties at the 2^100 level broken by the small part */
        mpz_mul_si(big, big, tp_rng_range(r, -3, 3));
        mpz_add_ui(big, big, (unsigned long)tp_rng_range(r, 0, 5));
        mpq_set_z(h, big);
        if (tp_rng_range(r, 0, 3) == 0) {
            mpz_set_ui(big, 3);
            mpz_pow_ui(big, big, 50);
            mpq_set_den(h, big);
            mpq_canonicalize(h);
        }
        ps_add(S, a, h);
    }
    mpz_clear(big);
    mpq_clear(h);
    ps_dups(S);
}

/* A coarse "staircase": heights that are piecewise linear on big regions. */
static void gen_pl(pset *S, tp_rng *r, size_t n, long d)
{
    ps_init(S, n);
    mpq_t h;
    mpq_init(h);
    long c[4][3];
    for (int k = 0; k < 4; k++)
        for (int j = 0; j < 3; j++)
            c[k][j] = tp_rng_range(r, -3, 3);
    int64_t a[3] = {0, 0, 0};
    for (a[0] = -d; a[0] <= d; a[0]++)
        for (a[1] = (n > 1 ? -d : 0); a[1] <= (n > 1 ? d : 0); a[1]++)
            for (a[2] = (n > 2 ? -d : 0); a[2] <= (n > 2 ? d : 0); a[2]++) {
                long best = 0;
                for (int k = 0; k < 4; k++) {
                    long v = 0;
                    for (size_t j = 0; j < n; j++)
                        v += c[k][j] * a[j];
                    if (k == 0 || v > best)
                        best = v;
                }
                /* some points lifted above */
                if (tp_rng_range(r, 0, 4) == 0)
                    best += tp_rng_range(r, 1, 2);
                mpq_set_si(h, best, 1);
                ps_add(S, a, h);
            }
    mpq_clear(h);
    ps_dups(S);
}

static void count_checks(void)
{
    /* Pick's theorem on a fine triangulation of d*Delta_2: d^2 unit triangles, every
     * lattice point used (common practice, no source). */
    for (long d = 1; d <= 12; d++) {
        pset S;
        tp_rng r;
        tp_rng_seed(&r, tp_test_seed() + (uint64_t)d);
        gen_simplex(&S, &r, 2, d, 1, false);
        tp_hull H;
        tp_hull_init(&H);
        tp_error e;
        tp_error_init(&e, NULL);
        bool handled = false;
        tp_status st = run_fast(&H, &S.P, &handled, &e);
        tp_check(st == TP_OK && handled, "d=%ld: fast engine: %s", d, e.msg);
        if (st == TP_OK && handled) {
            tp_check(H.nlower == (size_t)(d * d), "d=%ld: %zu cells, expected d^2", d,
                     H.nlower);
            size_t used = 0;
            for (size_t i = 0; i < S.P.count; i++)
                used += H.on_hull[i];
            tp_check(used == S.P.count, "d=%ld: %zu of %zu points used", d, used, S.P.count);
            tp_check(H.nsides == 3, "d=%ld: %zu sides, expected 3", d, H.nsides);
        }
        tp_hull_clear(&H);
        ps_clear(&S);
        /* flat: one cell with every point */
        gen_simplex(&S, &r, 2, d, 0, true);
        tp_hull_init(&H);
        st = run_fast(&H, &S.P, &handled, &e);
        tp_check(st == TP_OK && handled && H.nlower == 1 &&
                     H.lower[0].npts == S.P.count,
                 "d=%ld flat: expected one cell with all %zu points", d, S.P.count);
        tp_hull_clear(&H);
        ps_clear(&S);
    }
}

int main(void)
{
    uint64_t seed = tp_test_seed();
    long mult = tp_test_multiplier();
    tp_rng r;
    tp_rng_seed(&r, seed);
    pset S;

    count_checks();

    for (long it = 0; it < 1500 * mult; it++) {
        size_t n = (size_t)(1 + it % 3);
        size_t k = (size_t)tp_rng_range(&r, (long)n + 1, n == 3 ? 40 : 80);
        long er = tp_rng_range(&r, 1, it % 5 == 0 ? 100 : 5);
        long hr = tp_rng_range(&r, 0, it % 4 == 0 ? 1 : 50);
        long hd = it % 7 == 0 ? 6 : 1;
        gen_random(&S, &r, n, k, er, hr, hd);
        compare(&S, false, "random", it);
        ps_clear(&S);
    }
    for (long it = 0; it < 150 * mult; it++) {
        size_t n = (size_t)(1 + it % 3);
        long d = tp_rng_range(&r, 1, n == 3 ? 6 : 12);
        gen_simplex(&S, &r, n, d, it % 2 ? 3 : 0, it % 5 == 4);
        compare(&S, true, "simplex", it);
        ps_clear(&S);
    }
    for (long it = 0; it < 150 * mult; it++) {
        size_t n = (size_t)(1 + it % 3);
        gen_pl(&S, &r, n, n == 3 ? 2 : 4);
        compare(&S, true, "piecewise-linear", it);
        ps_clear(&S);
    }
    for (long it = 0; it < 200 * mult; it++) {
        size_t n = (size_t)(1 + it % 3);
        gen_huge(&S, &r, n, (size_t)tp_rng_range(&r, 8, 40));
        compare(&S, false, "huge heights", it);
        ps_clear(&S);
    }
    /* Large exponents: the int128 / GMP predicate paths. */
    for (long it = 0; it < 150 * mult; it++) {
        size_t n = (size_t)(1 + it % 3);
        gen_random(&S, &r, n, (size_t)tp_rng_range(&r, 6, 30), 1L << 26, 1000000, 1);
        compare(&S, false, "large exponents", it);
        ps_clear(&S);
    }
    /* Lower-dimensional Newton polytopes (projected to d coordinates). */
    long before = n_fast_handled;
    for (long it = 0; it < 300 * mult; it++) {
        size_t n = (size_t)tp_rng_range(&r, 2, 5);
        size_t d = (size_t)tp_rng_range(&r, 1, n - 1 < 3 ? (long)n - 1 : 3);
        gen_lowdim(&S, &r, n, d, (size_t)tp_rng_range(&r, 3, d == 3 ? 30 : 50), it % 2 == 0);
        compare(&S, false, "lower dimensional", it);   /* declined: a single point */
        ps_clear(&S);
    }
    tp_check(n_fast_handled - before > 280 * mult, "lower dimensional: only %ld handled",
             n_fast_handled - before);
    printf("t-hullfast: %ld cases, fast engine handled %ld, declined %ld\n", n_cases,
           n_fast_handled, n_declined);
    tp_check(n_fast_handled > n_cases * 9 / 10, "fast engine handled too few cases");
    return tp_test_finish("hullfast");
}
