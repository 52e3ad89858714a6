/* t-hull.c — the lower hull engines against a brute-force lower hull and worked cases.
 *
 * Reference: the brute force below enumerates every affinely independent (n+1)-subset
 * of points, takes the non-vertical hyperplane through their lifts, and keeps it when
 * no lifted point lies below it: the definition of a lower facet (common practice, no
 * source). The unit-square example is the cddlib check recorded in STYLE.md §4.
 */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "ptsbuild.h"
#include "testlib.h"
#include "trope/hull.h"

/* Solve h_i + <a_i, w> = c for the n+1 points idx; returns false if singular. */
static bool plane_through(const tp_points *P, const size_t *idx, mpq_t *w, mpq_t c)
{
    size_t n = P->n, m = n + 1;
    /* unknowns (w_1..w_n, c): a_i . w - c = -h_i */
    mpq_t *M = malloc(m * (m + 1) * sizeof *M);
    for (size_t i = 0; i < m * (m + 1); i++)
        mpq_init(M[i]);
    for (size_t r = 0; r < m; r++) {
        for (size_t j = 0; j < n; j++)
            mpq_set_si(M[r * (m + 1) + j], (long)P->exps[idx[r] * n + j], 1);
        mpq_set_si(M[r * (m + 1) + n], -1, 1);
        mpq_neg(M[r * (m + 1) + m], P->heights[idx[r]]);
    }
    bool ok = true;
    mpq_t t, f;
    mpq_inits(t, f, NULL);
    for (size_t col = 0; col < m && ok; col++) {
        size_t piv = m;
        for (size_t r = col; r < m; r++)
            if (mpq_sgn(M[r * (m + 1) + col])) {
                piv = r;
                break;
            }
        if (piv == m) {
            ok = false;
            break;
        }
        for (size_t j = 0; j <= m; j++)
            mpq_swap(M[col * (m + 1) + j], M[piv * (m + 1) + j]);
        for (size_t r = 0; r < m; r++) {
            if (r == col || !mpq_sgn(M[r * (m + 1) + col]))
                continue;
            mpq_div(f, M[r * (m + 1) + col], M[col * (m + 1) + col]);
            for (size_t j = 0; j <= m; j++) {
                mpq_mul(t, f, M[col * (m + 1) + j]);
                mpq_sub(M[r * (m + 1) + j], M[r * (m + 1) + j], t);
            }
        }
    }
    if (ok) {
        for (size_t j = 0; j < n; j++)
            mpq_div(w[j], M[j * (m + 1) + m], M[j * (m + 1) + j]);
        mpq_div(c, M[n * (m + 1) + m], M[n * (m + 1) + n]);
    }
    mpq_clears(t, f, NULL);
    for (size_t i = 0; i < m * (m + 1); i++)
        mpq_clear(M[i]);
    free(M);
    return ok;
}

typedef struct {
    size_t npts;
    uint32_t pts[64]; /* the hull's list type (tp_hull_facet.pts) */
} ptset;

/* Brute-force lower facets (full-dimensional inputs with <= 64 points). */
static size_t brute_lower(const tp_points *P, ptset *out, size_t maxout)
{
    size_t n = P->n, cnt = 0, m = n + 1;
    size_t idx[8];
    size_t N = P->count;
    mpq_t *w = malloc(n * sizeof *w);
    for (size_t j = 0; j < n; j++)
        mpq_init(w[j]);
    mpq_t c, v, t;
    mpq_inits(c, v, t, NULL);
    /* iterate over m-subsets in lexicographic order */
    for (size_t i = 0; i < m; i++)
        idx[i] = i;
    while (N >= m) {
        bool skip = false;
        for (size_t i = 0; i < m; i++)
            skip = skip || P->dup[idx[i]];
        if (!skip && plane_through(P, idx, w, c)) {
            ptset s = {0};
            bool below = false;
            for (size_t p = 0; p < N && !below; p++) {
                if (P->dup[p])
                    continue;
                mpq_set(v, P->heights[p]);
                for (size_t j = 0; j < n; j++) {
                    mpq_set_si(t, (long)P->exps[p * n + j], 1);
                    mpq_mul(t, t, w[j]);
                    mpq_add(v, v, t);
                }
                int s2 = mpq_cmp(v, c);
                if (s2 < 0)
                    below = true;
                else if (s2 == 0)
                    s.pts[s.npts++] = (uint32_t)p;
            }
            if (!below) {
                bool seen = false;
                for (size_t k = 0; k < cnt && !seen; k++)
                    seen = out[k].npts == s.npts &&
                           memcmp(out[k].pts, s.pts, s.npts * sizeof *s.pts) == 0;
                if (!seen && cnt < maxout)
                    out[cnt++] = s;
            }
        }
        /* next subset */
        size_t i = m;
        while (i > 0 && idx[i - 1] == N - m + (i - 1))
            i--;
        if (i == 0)
            break;
        idx[i - 1]++;
        for (size_t k = i; k < m; k++)
            idx[k] = idx[k - 1] + 1;
    }
    mpq_clears(c, v, t, NULL);
    for (size_t j = 0; j < n; j++)
        mpq_clear(w[j]);
    free(w);
    return cnt;
}

static void test_square(void)
{
    /* Unit square, heights 0,0,0,1: two lower triangles {0,1,2}, {1,2,3}. */
    long e[] = {0, 0, 1, 0, 0, 1, 1, 1};
    long h[] = {0, 0, 0, 1};
    tp_points P;
    pts_make(&P, 2, 4, e, h, NULL);
    tp_hull H;
    tp_hull_init(&H);
    tp_error err;
    tp_error_init(&err, NULL);
    tp_check(tp_hull_lower(&H, &P, TP_ENGINE_CDD, &err) == TP_OK, "square: %s", err.msg);
    tp_check(H.dim == 2 && H.nlin == 0, "square: dim %d", H.dim);
    tp_check(H.nlower == 2, "square: %zu lower facets", H.nlower);
    if (H.nlower == 2) {
        tp_check(H.lower[0].npts == 3 && H.lower[0].pts[0] == 0 && H.lower[0].pts[2] == 2,
                 "square: first cell");
        tp_check(H.lower[1].npts == 3 && H.lower[1].pts[0] == 1 && H.lower[1].pts[2] == 3,
                 "square: second cell");
        /* second cell: h + <a,w> = c with w = (-1,-1)? heights 0 at (1,0),(0,1), 1 at
         * (1,1): h = x + y - 1, so w = (-1, -1). */
        tp_check(mpq_cmp_si(H.lower[1].w[0], -1, 1) == 0 && mpq_cmp_si(H.lower[1].w[1], -1, 1) == 0,
                 "square: normal of the upper-right cell");
    }
    tp_check(H.nsides == 4, "square: %zu Newton facets", H.nsides);
    tp_hull_clear(&H);
    tp_points_clear(&P);
}

static void test_collinear_and_homogeneous(void)
{
    tp_error err;
    tp_error_init(&err, NULL);
    /* Four collinear exponents in the plane: dim 1, lineality spanned by (1,-1)... the
     * points (0,0),(1,1),(2,2),(3,3) span direction (1,1); L = R(1,-1) up to sign. */
    long e[] = {0, 0, 1, 1, 2, 2, 3, 3};
    long h[] = {3, 1, 0, 2};
    tp_points P;
    pts_make(&P, 2, 4, e, h, NULL);
    tp_hull H;
    tp_hull_init(&H);
    tp_check(tp_hull_lower(&H, &P, TP_ENGINE_CDD, &err) == TP_OK, "collinear: %s", err.msg);
    tp_check(H.dim == 1 && H.nlin == 1, "collinear: dim %d nlin %zu", H.dim, H.nlin);
    if (H.nlin == 1) {
        tp_check(mpz_cmp_si(H.lin[0], -1) == 0 && mpz_cmp_si(H.lin[1], 1) == 0,
                 "collinear: lineality (-1,1) with pivot on the last coordinate");
        for (size_t f = 0; f < H.nlower; f++)
            tp_check(mpq_sgn(H.lower[f].w[1]) == 0, "collinear: reduced normal has w_2 = 0");
    }
    /* lower hull of heights 3,1,0,2 at t=0..3: segments [0,1],[1,2],[2,3] all lower. */
    tp_check(H.nlower == 3, "collinear: %zu segments", H.nlower);
    tp_hull_clear(&H);
    tp_points_clear(&P);

    /* Homogeneous cubic support in 3 variables: lineality (1,1,1). */
    long e3[] = {3, 0, 0, 0, 3, 0, 0, 0, 3, 1, 1, 1, 2, 1, 0};
    long h3[] = {0, 0, 0, -1, 1};
    pts_make(&P, 3, 5, e3, h3, NULL);
    tp_check(tp_hull_lower(&H, &P, TP_ENGINE_CDD, &err) == TP_OK, "homog: %s", err.msg);
    tp_check(H.dim == 2 && H.nlin == 1, "homog: dim %d", H.dim);
    if (H.nlin == 1)
        tp_check(mpz_cmp_si(H.lin[0], 1) == 0 && mpz_cmp_si(H.lin[1], 1) == 0 &&
                     mpz_cmp_si(H.lin[2], 1) == 0,
                 "homog: lineality (1,1,1)");
    for (size_t f = 0; f < H.nlower; f++)
        tp_check(mpq_sgn(H.lower[f].w[2]) == 0, "homog: chart z = 0");
    /* (1,1,1) with height -1 is below the others: 3 triangles around it. */
    tp_check(H.nlower == 3, "homog: %zu cells", H.nlower);
    tp_check(!H.on_hull[4], "homog: (2,1,0) with height 1 is above the hull");
    tp_hull_clear(&H);
    tp_points_clear(&P);
}

static void test_random_vs_brute(void)
{
    tp_rng r;
    tp_rng_seed(&r, tp_test_seed());
    tp_error err;
    tp_error_init(&err, NULL);
    long iters = 150 * tp_test_multiplier();
    ptset *bf = malloc(4096 * sizeof *bf);
    for (long it = 0; it < iters; it++) {
        size_t n = 1 + (size_t)(it % 3);
        size_t count = n + 2 + (size_t)tp_rng_range(&r, 0, n == 3 ? 6 : 9);
        long deg = tp_rng_range(&r, 1, 4);
        long hmax = tp_rng_range(&r, 0, 6); /* small range: many coplanar lifts */
        tp_points P;
        pts_random(&P, &r, n, count, deg, hmax);
        tp_hull H;
        tp_hull_init(&H);
        tp_status st = tp_hull_lower(&H, &P, TP_ENGINE_CDD, &err);
        tp_check(st == TP_OK, "it %ld: %s", it, err.msg);
        if (st == TP_OK && H.dim == (int)n) {
            size_t nb = brute_lower(&P, bf, 4096);
            tp_check(nb == H.nlower, "it %ld (n=%zu, %zu pts): brute %zu facets, hull %zu", it,
                     n, count, nb, H.nlower);
            for (size_t f = 0; f < H.nlower; f++) {
                bool found = false;
                for (size_t k = 0; k < nb && !found; k++)
                    found = bf[k].npts == H.lower[f].npts &&
                            memcmp(bf[k].pts, H.lower[f].pts, bf[k].npts * sizeof *bf[k].pts) == 0;
                tp_check(found, "it %ld: hull facet %zu not found by brute force", it, f);
            }
        }
        tp_hull_clear(&H);
        tp_points_clear(&P);
    }
    free(bf);
}

int main(void)
{
    test_square();
    test_collinear_and_homogeneous();
    test_random_vs_brute();
    return tp_test_finish("t-hull");
}
